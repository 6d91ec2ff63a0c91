//! Writes the 20,000-point DIF/DUP JCAMP-DX file of `benches/import.rs` to
//! standard output, for the page's timing script (tests/bench/data.mjs).
//! Run: `cargo run -q -p chiroptic --example dif_dup_file > file.jdx`.

use chiroptic::import::jcamp::{encode_xydata, Form};

const POINTS: usize = 20_000;

fn main() {
    // The same invented trace as the native benchmark: two bands of opposite sign.
    let y: Vec<i64> = (0..POINTS)
        .map(|i| {
            let t = i as f64;
            let y = 30_000.0 * (-((t - 6_000.0) / 900.0).powi(2)).exp() - 18_000.0 * (-((t - 12_000.0) / 1_500.0).powi(2)).exp();
            if y.abs() < 20.0 {
                0
            } else {
                y.round() as i64
            }
        })
        .collect();
    let (first, step) = (800.0, -0.025);
    let last = first + (y.len() - 1) as f64 * step;
    print!(
        "##TITLE= generated CD trace\n##JCAMP-DX= 4.24\n##DATA TYPE= UV/VIS SPECTRUM\n\
         ##XUNITS= NANOMETERS\n##YUNITS= MILLIDEGREES\n##XFACTOR= 1\n##YFACTOR= 0.001\n\
         ##FIRSTX= {first}\n##LASTX= {last}\n##DELTAX= {step}\n##NPOINTS= {}\n##XYDATA= (X++(Y..Y))\n{}##END=\n",
        y.len(),
        encode_xydata(first, step, &y, Form::DifDup, 16)
    );
}
