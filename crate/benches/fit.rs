//! Speed of fitting: six Gaussian bands (18 free parameters) jointly to one
//! CD and one ORD set of 1000 points each, from a start 20 % off
//! (fixtures/fit/bench_fit.py, invented data). Times one local
//! Levenberg-Marquardt run and the default fit (8 starts), then, in the same
//! run, scipy.optimize.least_squares ("lm" and "trf", numerical Jacobian) on
//! the same problem and start, and prints chi-squares and ratios.
//! Run: `cargo bench -p chiroptic --bench fit`.

use chiroptic::data::{data_set_doc, data_sets};
use chiroptic::document::{Document, FitDoc, SourceDoc};
use chiroptic::fit::fit;
use chiroptic::import::{self, ColumnChoice};
use chiroptic::Model;
use std::process::Command;
use std::time::Instant;

const DIR: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/fit");

fn problem(starts: u32) -> (Document, Model, Vec<chiroptic::data::DataSet>) {
    let mut doc = Document::from_json(&std::fs::read_to_string(format!("{DIR}/bench_start.json")).expect("start")).expect("doc");
    for (name, file) in [("cd", "bench_cd.csv"), ("ord", "bench_ord.csv")] {
        let table = import::read(&std::fs::read_to_string(format!("{DIR}/{file}")).expect(file), None).expect("reads");
        doc.data.push(data_set_doc(name, &table.recognise(&ColumnChoice::default()).expect("columns"), SourceDoc::default()));
    }
    doc.fit = Some(FitDoc { starts: Some(starts), ..FitDoc::default() });
    let model = Model::from_document(&doc).expect("model");
    let sets = data_sets(&doc, &model).expect("sets");
    (doc, model, sets)
}

/// Median seconds and the chi-square of `repeats` fits.
fn time_fit(starts: u32, repeats: usize) -> (f64, f64, usize) {
    let (doc, model, sets) = problem(starts);
    let mut times = Vec::new();
    let mut chi = f64::NAN;
    let mut at_best = 0;
    for _ in 0..repeats {
        let t = Instant::now();
        let f = fit(&doc, &model, &sets, &mut |_, _, _| true).expect("fit");
        times.push(t.elapsed().as_secs_f64());
        chi = f.report.chi_square;
        at_best = f.report.starts_at_best;
    }
    times.sort_by(f64::total_cmp);
    (times[times.len() / 2], chi, at_best)
}

fn main() {
    if std::env::args().any(|a| a == "--list") {
        return;
    }
    let (local, chi_local, _) = time_fit(1, 15);
    let (global, chi_global, at_best) = time_fit(8, 7);
    println!("fit_6_gaussians_2x1000 local (1 start): {:.2} ms, chi2 {chi_local:.6}", local * 1e3);
    println!(
        "fit_6_gaussians_2x1000 default (8 starts, 2 threads): {:.2} ms, chi2 {chi_global:.6}, {at_best} of 8 starts at the best",
        global * 1e3
    );
    let script = format!("{DIR}/bench_fit.py");
    match Command::new("python3").arg(&script).output() {
        Ok(out) if out.status.success() => {
            let text = String::from_utf8_lossy(&out.stdout);
            for line in text.lines() {
                let field = |k: &str| line.split_whitespace().find_map(|w| w.strip_prefix(k)).and_then(|v| v.parse::<f64>().ok());
                let (Some(chi), Some(secs)) = (field("chi2="), field("seconds=")) else { continue };
                let label = line.split_whitespace().nth(1).unwrap_or("?");
                println!(
                    "  scipy {label:>5}: {:8.1} ms, chi2 {chi:.6}   local/scipy = {:.0}x faster, default/scipy = {:.1}x faster, default chi2 {} scipy's",
                    secs * 1e3,
                    secs / local,
                    secs / global,
                    if chi_global <= chi * (1.0 + 1e-9) { "at or below" } else { "ABOVE" }
                );
            }
        }
        _ => println!("  (python3 with numpy and scipy not available: no SciPy comparison)"),
    }
}
