//! CIE XYZ to sRGB (IEC 61966-2-1:1999): the linear matrix of the standard
//! (D65 white, Y = 1 at white) and the transfer function.
//!
//! Out-of-gamut colours (any linear component below 0 or above 1) are clipped
//! component by component to [0, 1] before encoding; the standard leaves that
//! choice to the application. No chromatic adaptation: colours under A or the
//! LED are shown as a D65-white display shows them.

/// XYZ -> linear sRGB, IEC 61966-2-1:1999 equation (F.7) (the rounded
/// four-digit matrix the standard prints).
const XYZ_TO_LINEAR: [[f64; 3]; 3] = [[3.2406, -1.5372, -0.4986], [-0.9689, 1.8758, 0.0415], [0.0557, -0.2040, 1.0570]];

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

/// Linear values to 8-bit codes for whole pictures, without a power per
/// pixel: the 255 linear thresholds where the code steps up (the inverse
/// transfer function at the half steps), searched by bisection. Gives the
/// same codes as `to_byte(encode(clip(v)))`.
pub struct ByteEncoder {
    thresholds: [f64; 255],
}

impl ByteEncoder {
    pub fn new() -> ByteEncoder {
        ByteEncoder { thresholds: std::array::from_fn(|k| decode((k as f64 + 0.5) / 255.0)) }
    }

    pub fn byte(&self, v: f64) -> u8 {
        let v = clip(v);
        // The number of thresholds at or below v is the code.
        self.thresholds.partition_point(|t| *t <= v) as u8
    }
}

impl Default for ByteEncoder {
    fn default() -> Self {
        ByteEncoder::new()
    }
}

/// The inverse transfer function (IEC 61966-2-1 equation (F.5)).
pub fn decode(e: f64) -> f64 {
    if e <= 0.040_45 {
        e / 12.92
    } else {
        ((e + 0.055) / 1.055).powf(2.4)
    }
}
