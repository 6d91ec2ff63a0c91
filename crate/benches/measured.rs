//! Speed of the measured-spectra path: importing a 100,000-line delimited
//! file, and Kramers-Kronig of a 4,000-point CD spectrum onto 4,000 points
//! (Maclaurin's formula; the targets are for the page, under 100 ms
//! and 20 ms, measured there by tests/bench; these are the native figures).
//! Run: `cargo bench -p chiroptic --bench measured`.

use chiroptic::data::{data_set_doc, data_sets};
use chiroptic::document::{Document, SourceDoc};
use chiroptic::import::{self, ColumnChoice};
use chiroptic::kk::rotation_from_cd;
use chiroptic::Model;
use criterion::Criterion;
use std::hint::black_box;
use std::time::Duration;

const DEMO: &str = include_str!("../../fixtures/demo/demo.json");

/// An invented 100,000-line table in the form instruments write.
fn big_table() -> String {
    let mut text = String::from("Sample,INVENTED benchmark table\nWavelength [nm],CD [mdeg],HT [V]\n");
    for i in 0..100_000 {
        let nm = 180.0 + 0.005 * i as f64;
        text.push_str(&format!("{nm:.3},{:.5},{:.1}\n", 30.0 * (-(nm - 290.0).powi(2) / 200.0).exp(), 300.0 + 0.001 * i as f64));
    }
    text
}

fn main() {
    let mut c = Criterion::default().configure_from_args().sample_size(20).measurement_time(Duration::from_secs(3));
    let text = big_table();
    c.bench_function("import_delimited_100000_lines", |b| b.iter(|| import::read(black_box(&text), None).expect("reads")));

    let doc = Document::from_json(DEMO).expect("demo");
    let model = Model::from_document(&doc).expect("demo");
    let nm: Vec<f64> = (0..4000).map(|i| 190.0 + 0.05 * i as f64).collect();
    let nu: Vec<f64> = nm.iter().map(|l| 1e7 / l).collect();
    let s = chiroptic::evaluate(&model, &nu).expect("evaluates");
    let recognised = import::Recognised {
        axis: chiroptic::units::AxisUnit::Nanometre,
        x: nm.clone(),
        measured: import::Measured::Cd(chiroptic::units::CdUnit::Millidegrees),
        y: s.ellipticity_mdeg.clone(),
        sd: None,
        ht_v: None,
        label: String::new(),
    };
    let mut d = doc.clone();
    d.data = vec![data_set_doc("cd", &recognised, SourceDoc::default())];
    let set = data_sets(&d, &model).expect("valid").remove(0);
    let _ = ColumnChoice::default();
    c.bench_function("kk_cd_to_ord_4000_onto_4000", |b| b.iter(|| rotation_from_cd(black_box(&set), &[], &nu).expect("transform")));
    c.final_summary();
}
