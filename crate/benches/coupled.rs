//! Speed of coupled chromophores (issue 15 targets): 2 chromophores x 1
//! transition on 2000 points (< 2 ms), and 20 chromophores x 2 transitions on
//! 2000 points (< 50 ms in the page; native figure here; the page's figure
//! comes from tests/bench/coupled.mjs). The structured solve (one shape
//! diagonalised, the rest by a Schur complement) is timed against a full LU
//! per point on the same systems.
//! Invented geometry. Run: `cargo bench -p chiroptic --bench coupled`.

use chiroptic::coupled::geometry::{couplet, helix, Handedness};
use chiroptic::coupled::Solver;
use chiroptic::document::{Direction, Document, SystemDoc, TransitionDoc};
use chiroptic::{evaluate, Model};
use criterion::Criterion;
use std::hint::black_box;
use std::time::Duration;

fn transition(center_nm: f64, direction: Option<[f64; 3]>) -> TransitionDoc {
    TransitionDoc {
        shape: "gaussian".into(),
        center_nm,
        fwhm_cm1: 2500.0,
        lorentz_fwhm_cm1: None,
        dipole_strength_debye2: 30.0,
        rotatory_strength_1e40_cgs: 0.0,
        direction: direction.map(Direction::Vector),
    }
}

fn model(system: SystemDoc) -> Model {
    let text = r#"{"chiroptic": 1, "sample": {"concentration_mol_per_l": 1e-4, "path_length_cm": 1.0, "solvent": {"constant": 1.33}}}"#;
    let mut doc = Document::from_json(text).expect("sample document");
    doc.systems = vec![system];
    Model::from_document(&doc).expect("benchmark model")
}

fn main() {
    let mut c = Criterion::default().configure_from_args().sample_size(10).measurement_time(Duration::from_secs(3));
    let nu: Vec<f64> = (0..2000).map(|i| 1e7 / (180.0 + 0.2 * i as f64)).collect();
    let pair = model(couplet(7.0, 60.0, &transition(300.0, None)));
    c.bench_function("coupled_2x1_onto_2000", |b| b.iter(|| black_box(evaluate(&pair, black_box(&nu)).ok())));
    let mut pair_lu = couplet(7.0, 60.0, &transition(300.0, None));
    pair_lu.chromophores[1].transitions[0].center_nm = 301.0;
    let pair_lu = model(pair_lu);
    c.bench_function("coupled_2x1_two_shapes_onto_2000", |b| b.iter(|| black_box(evaluate(&pair_lu, black_box(&nu)).ok())));
    let one = model(helix(20, 5.0, 3.4, 36.0, Handedness::Right, [0.3, 0.9, 0.3], &[transition(300.0, None)]));
    c.bench_function("coupled_20x1_eigen_onto_2000", |b| b.iter(|| black_box(evaluate(&one, black_box(&nu)).ok())));
    // The invented helix demo: 20 chromophores x 2 transitions (fixtures/demo).
    let helix_doc = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/demo/helix.json")).expect("helix demo");
    let two = Model::from_document(&Document::from_json(&helix_doc).expect("helix demo")).expect("helix model");
    c.bench_function("coupled_20x2_onto_2000", |b| b.iter(|| black_box(evaluate(&two, black_box(&nu)).ok())));
    let n_solvent = vec![1.33; nu.len()];
    for (name, m) in [("coupled_20x1_response", &one), ("coupled_20x2_response", &two)] {
        c.bench_function(&format!("{name}_structured"), |b| {
            b.iter(|| black_box(m.systems[0].response_with(black_box(&nu), &n_solvent, Solver::Auto).ok()))
        });
        c.bench_function(&format!("{name}_full_lu"), |b| {
            b.iter(|| black_box(m.systems[0].response_with(black_box(&nu), &n_solvent, Solver::Lu).ok()))
        });
    }
}
