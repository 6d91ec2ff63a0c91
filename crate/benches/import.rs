//! Speed of the JCAMP-DX decoder (`chiroptic::import::jcamp::parse`) on a
//! generated 20,000-point file in DIF/DUP form, the most compressed form of
//! the standard (McDonald and Wilks, Appl. Spectrosc. 42, 151 (1988)).
//! The target is under 100 ms in the page for this file.
//! Run: `cargo bench -p chiroptic --bench import`.

use chiroptic::import::jcamp::parse;
use criterion::{Criterion, Throughput};
use std::hint::black_box;

#[path = "support/dif_dup.rs"]
mod dif_dup;
use dif_dup::{file, ordinates, POINTS};

fn bench_import(c: &mut Criterion) {
    let y = ordinates();
    let text = file(&y);
    // The benchmark decodes what it should before it is timed.
    let blocks = parse(&text).expect("the generated file decodes");
    assert_eq!(blocks[0].y.len(), POINTS);
    assert!(blocks[0].y.iter().zip(&y).all(|(a, &b)| (a - b as f64 * 0.001).abs() < 1e-12));
    assert!(blocks[0].notes.is_empty(), "{:?}", blocks[0].notes);
    println!("DIF/DUP file: {POINTS} points, {} bytes, {} lines", text.len(), text.lines().count());

    let mut group = c.benchmark_group("jcamp");
    group.throughput(Throughput::Bytes(text.len() as u64));
    group.bench_function("dif_dup_20000_points", |b| b.iter(|| parse(black_box(&text)).expect("decodes")));
    group.finish();
}

fn main() {
    let mut c = Criterion::default().configure_from_args();
    bench_import(&mut c);
    c.final_summary();
}
