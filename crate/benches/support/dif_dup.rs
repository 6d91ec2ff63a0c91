//! The generated 20,000-point DIF/DUP JCAMP-DX file (invented: a CD-like
//! trace) shared by `benches/import.rs` and `examples/dif_dup_file.rs`.

use chiroptic::import::jcamp::{encode_xydata, Form};

pub const POINTS: usize = 20_000;

/// Two bands of opposite sign on a flat baseline, in integer counts, so DUP
/// has runs to count where the signal is flat.
pub fn ordinates() -> Vec<i64> {
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

/// The file: its labels and the ordinates in DIF/DUP form.
pub fn file(y: &[i64]) -> String {
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
