//! Speed of the colour panel's work (`chiroptic::colour`): the end-on swatch
//! with the 181-angle strip, and a 600 x 150 side view, each from the
//! document (model evaluation on the 81 table wavelengths included), for the
//! demo in a 10 cm tube and an invented visible dye with strong CD.
//! The issue's targets in the page: 5 ms and 50 ms.
//! Run: `cargo bench -p chiroptic --bench colour`.

use chiroptic::colour::side::{self, SideViewRequest};
use chiroptic::colour::{self, Illuminant, Optics};
use chiroptic::{Document, Model};
use criterion::Criterion;
use std::hint::black_box;

fn model(json: &str) -> Model {
    Model::from_document(&Document::from_json(json).expect("bench document")).expect("bench model")
}

fn documents() -> Vec<(&'static str, Model)> {
    let demo = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/demo/demo.json")).expect("demo");
    let mut demo: serde_json::Value = serde_json::from_str(&demo).expect("demo json");
    demo["sample"]["path_length_cm"] = 10.0.into();
    let dye = r#"{"chiroptic": 1,
        "sample": {"concentration_mol_per_l": 2e-4, "path_length_cm": 1.0, "solvent": {"sellmeier": "water-20c"}},
        "bands": [{"shape": "gaussian", "center_nm": 520.0, "fwhm_cm1": 2500.0, "rotatory_strength_1e40_cgs": 5000.0, "dipole_strength_debye2": 20.0},
                  {"shape": "voigt", "center_nm": 420.0, "fwhm_cm1": 2000.0, "lorentz_fwhm_cm1": 800.0, "rotatory_strength_1e40_cgs": -2000.0, "dipole_strength_debye2": 8.0}]}"#;
    vec![("demo_10cm", model(&demo.to_string())), ("visible_dye", model(dye))]
}

fn main() {
    let mut c = Criterion::default().configure_from_args();
    for (name, m) in documents() {
        c.bench_function(&format!("colour_swatch_and_strip_181/{name}"), |b| {
            b.iter(|| {
                let optics = Optics::of_model(black_box(&m)).expect("optics");
                let swatch = colour::end_on_optics(&optics, 0.0, Illuminant::D65).expect("swatch");
                let strip = colour::strip_optics(&optics, Illuminant::D65, colour::DEFAULT_STRIP_SAMPLES).expect("strip");
                black_box((swatch, strip))
            })
        });
        c.bench_function(&format!("colour_side_view_600x150/{name}"), |b| {
            let req = SideViewRequest { width: 600, height: 150, illuminant: Illuminant::D65, viewer_distance_cm: None };
            b.iter(|| {
                let optics = Optics::of_model(black_box(&m)).expect("optics");
                let view = side::render(&optics, &req).expect("side view");
                black_box(view.rgba())
            })
        });
    }
    c.final_summary();
}
