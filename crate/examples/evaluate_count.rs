//! The instruction-count companion of `benches/evaluate.rs`: runs one case
//! of the 10-band, 2000-point benchmark a few times inside `measured`, which
//! `benches/callgrind.sh` counts with valgrind's callgrind (instructions are
//! repeatable whatever the machine's load, unlike seconds).
//! Usage: `evaluate_count SHAPE evaluate|shapes [REPEATS]`.

use chiroptic::units::AxisUnit;
use chiroptic::{evaluate, Grid, Model};
use std::hint::black_box;

const BENCH_DOC: &str = include_str!("../../fixtures/reference/bench_10_bands.json");

#[inline(never)]
fn measured(model: &Model, nu: &[f64], what: &str, repeats: usize) -> f64 {
    let mut acc = 0.0;
    for _ in 0..repeats {
        if what == "evaluate" {
            acc += evaluate(black_box(model), black_box(nu)).map(|s| s.delta_epsilon[0]).unwrap_or(f64::NAN);
        } else {
            // The band shapes alone, as the benchmark's second group.
            let ln_nu = chiroptic::lineshape::ln_grid(nu);
            for band in &model.bands {
                let (s, m) = band.lineshape.values_with_mean(black_box(nu), &ln_nu);
                acc += s[0].im + m[0];
            }
        }
    }
    acc
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let (shape, what) = (args.get(1).map(String::as_str).unwrap_or("lorentz"), args.get(2).map(String::as_str).unwrap_or("evaluate"));
    let repeats: usize = args.get(3).and_then(|r| r.parse().ok()).unwrap_or(5);
    let mut doc: serde_json::Value = serde_json::from_str(BENCH_DOC).expect("bench document is JSON");
    for band in doc["bands"].as_array_mut().expect("bands") {
        band["shape"] = serde_json::Value::from(shape);
    }
    let model = Model::from_json(&doc.to_string()).expect("bench document is valid");
    let nu = Grid::linspace(190.0, 650.0, 2000, AxisUnit::Nanometre).expect("grid").wavenumber_cm1;
    // One call outside the count: the Dawson table is built on first use.
    measured(&model, &nu, what, 1);
    println!("{}", measured(&model, &nu, what, repeats));
}
