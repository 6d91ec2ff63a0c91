//! Speed of the JCAMP-DX decoder (`chiroptic::import::jcamp::parse`) on a
//! generated 20,000-point file in DIF/DUP form, the most compressed form of
//! the standard (McDonald and Wilks, Appl. Spectrosc. 42, 151 (1988)).
//! The target is under 100 ms in the page for this file.
//! Run: `cargo bench -p chiroptic --bench import`.

use chiroptic::import::jcamp::{encode_xydata, parse, Form};
use criterion::{Criterion, Throughput};
use std::hint::black_box;

const POINTS: usize = 20_000;

/// A CD-like trace: two bands of opposite sign on a flat baseline, in
/// integer counts, so DUP has runs to count where the signal is flat.
fn ordinates() -> Vec<i64> {
    (0..POINTS)
        .map(|i| {
            let t = i as f64;
            let y = 30_000.0 * (-((t - 6_000.0) / 900.0).powi(2)).exp() - 18_000.0 * (-((t - 12_000.0) / 1_500.0).powi(2)).exp();
            // Below a count of 20 the instrument reads its baseline.
            if y.abs() < 20.0 {
                0
            } else {
                y.round() as i64
            }
        })
        .collect()
}

fn file(y: &[i64]) -> String {
    let (first, step) = (800.0, -0.025);
    let last = first + (y.len() - 1) as f64 * step;
    format!(
        "##TITLE= generated CD trace\n##JCAMP-DX= 4.24\n##DATA TYPE= UV/VIS SPECTRUM\n\
         ##XUNITS= NANOMETERS\n##YUNITS= MILLIDEGREES\n##XFACTOR= 1\n##YFACTOR= 0.001\n\
         ##FIRSTX= {first}\n##LASTX= {last}\n##DELTAX= {step}\n##NPOINTS= {}\n##XYDATA= (X++(Y..Y))\n{}##END=\n",
        y.len(),
        encode_xydata(first, step, y, Form::DifDup, 16)
    )
}

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
