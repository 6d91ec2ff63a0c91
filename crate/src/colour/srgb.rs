//! CIE XYZ to sRGB (IEC 61966-2-1:1999): the linear matrix of the standard
//! (D65 white, Y = 1 at white) and the transfer function.
//!
//! Out-of-gamut colours (any linear component below 0 or above 1) are clipped
//! component by component to [0, 1] before encoding; the standard leaves that
//! choice to the application. No chromatic adaptation: colours under A or the
//! LED are shown as a D65-white display shows them.

/// XYZ -> linear sRGB, IEC 61966-2-1:1999 equation (F.7) (the rounded
/// four-digit matrix the standard prints).
const XYZ_TO_LINEAR: [[f64; 3]; 3] = [
    [3.2406, -1.5372, -0.4986],
    [-0.9689, 1.8758, 0.0415],
    [0.0557, -0.2040, 1.0570],
];

/// Linear sRGB, not clipped.
pub fn linear_from_xyz(xyz: [f64; 3]) -> [f64; 3] {
    XYZ_TO_LINEAR.map(|row| row[0] * xyz[0] + row[1] * xyz[1] + row[2] * xyz[2])
}

/// The sRGB transfer function (IEC 61966-2-1 equation (F.8)) of a linear
/// value already in [0, 1].
pub fn encode(v: f64) -> f64 {
    if v <= 0.003_130_8 {
        12.92 * v
    } else {
        1.055 * v.powf(1.0 / 2.4) - 0.055
    }
}

/// A linear component clipped into the gamut (NaN counts as black).
pub fn clip(v: f64) -> f64 {
    if v.is_nan() {
        0.0
    } else {
        v.clamp(0.0, 1.0)
    }
}

/// An encoded value in [0, 1] as an 8-bit code.
pub fn to_byte(v: f64) -> u8 {
    (v * 255.0).round().clamp(0.0, 255.0) as u8
}
