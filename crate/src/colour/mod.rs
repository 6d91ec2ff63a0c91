//! What the eye sees: the colour of a sample between two polarisers, looked
//! at end-on through the analyser or from the side of the tube.
//!
//! Per wavelength the Jones calculus (`polarimeter`) gives the share of the
//! polariser's light that reaches the eye; weighted by an illuminant
//! (`illuminant`) and summed against the CIE 1931 2 degree colour-matching
//! functions (`tables`, at 5 nm, 380-780 nm, summation as CIE 15 recommends)
//! it gives CIE XYZ, normalised so that the illuminant seen through parallel
//! ideal polarisers with no sample has Y = 1; then xy and sRGB (`srgb`).
//! `side` renders the tube seen from the side by the light it scatters.

pub mod illuminant;
pub mod polarimeter;
pub mod side;
pub mod srgb;
pub mod tables;

pub use illuminant::Illuminant;
pub use polarimeter::Optics;

use crate::error::{Error, ErrorKind, Result};
use crate::model::Model;
use serde::Serialize;
use tables::{CMF_X, CMF_Y, CMF_Z, COUNT, START_NM, STEP_NM};

/// The wavelength of table entry `i`, nm.
pub fn wavelength_nm(i: usize) -> f64 {
    START_NM + STEP_NM * i as f64
}

/// Most analyser angles a strip may have.
pub const MAX_STRIP_SAMPLES: usize = 3601;
/// Angles in the usual strip: 0, 1, ..., 180 degrees.
pub const DEFAULT_STRIP_SAMPLES: usize = 181;

/// A colour as the eye and a display see it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Colour {
    /// CIE XYZ; Y (the luminance) is 1 for the illuminant through parallel
    /// polarisers and no sample.
    pub xyz: [f64; 3],
    /// Chromaticity (NaN for black).
    pub xy: [f64; 2],
    /// Linear sRGB before clipping (may leave [0, 1]).
    pub srgb_linear: [f64; 3],
    /// sRGB, encoded, after clipping: 0-1.
    pub srgb: [f64; 3],
    /// The same as 8-bit codes.
    pub srgb_8bit: [u8; 3],
    /// True when the colour lies outside the sRGB gamut and was clipped.
    pub clipped: bool,
}

impl Colour {
    pub fn from_xyz(xyz: [f64; 3]) -> Colour {
        let sum = xyz[0] + xyz[1] + xyz[2];
        let xy = if sum > 0.0 { [xyz[0] / sum, xyz[1] / sum] } else { [f64::NAN; 2] };
        let srgb_linear = srgb::linear_from_xyz(xyz);
        // Tolerance below half an 8-bit step: D65 white itself comes out
        // 1 +- 2e-4 through the standard's four-digit matrix.
        let clipped = srgb_linear.iter().any(|v| !(-1e-3..=1.0 + 1e-3).contains(v));
        let srgb = srgb_linear.map(|v| srgb::encode(srgb::clip(v)));
        Colour { xyz, xy, srgb_linear, srgb, srgb_8bit: srgb.map(srgb::to_byte), clipped }
    }

    pub fn luminance(&self) -> f64 {
        self.xyz[1]
    }

    /// `#rrggbb`.
    pub fn hex(&self) -> String {
        let [r, g, b] = self.srgb_8bit;
        format!("#{r:02x}{g:02x}{b:02x}")
    }
}

/// The per-wavelength weights S(lambda) cmf(lambda) / sum S y-bar of an illuminant.
#[derive(Debug, Clone)]
pub struct Weights {
    pub xyz: [[f64; COUNT]; 3],
}

impl Weights {
    pub fn new(illuminant: Illuminant) -> Weights {
        Weights::with_factor(illuminant, |_| 1.0)
    }

    /// Weights with an extra spectral factor (the side view's scattering),
    /// still normalised so that a factor-weighted white has Y = 1.
    pub fn with_factor(illuminant: Illuminant, factor: impl Fn(usize) -> f64) -> Weights {
        let s = illuminant.spectrum();
        let power: Vec<f64> = (0..COUNT).map(|i| s[i] * factor(i)).collect();
        let norm: f64 = (0..COUNT).map(|i| power[i] * CMF_Y[i]).sum();
        let w = |cmf: &[f64; COUNT]| std::array::from_fn(|i| power[i] * cmf[i] / norm);
        Weights { xyz: [w(&CMF_X), w(&CMF_Y), w(&CMF_Z)] }
    }

    /// CIE XYZ of a spectral transmission (one value per table wavelength).
    pub fn xyz(&self, transmission: impl Fn(usize) -> f64) -> [f64; 3] {
        let mut out = [0.0; 3];
        for i in 0..COUNT {
            let t = transmission(i);
            for (o, w) in out.iter_mut().zip(&self.xyz) {
                *o += w[i] * t;
            }
        }
        out
    }
}

fn analyser_angle(beta_deg: f64) -> Result<f64> {
    if beta_deg.is_finite() {
        Ok(beta_deg)
    } else {
        Err(Error::new(ErrorKind::NotFinite, "analyser_deg", "the analyser angle must be a finite number of degrees"))
    }
}

/// The colour seen end-on through the analyser at `beta_deg`.
pub fn end_on_optics(optics: &Optics, beta_deg: f64, illuminant: Illuminant) -> Result<Colour> {
    let beta = analyser_angle(beta_deg)?;
    Ok(Colour::from_xyz(Weights::new(illuminant).xyz(|i| optics.transmission(i, beta))))
}

/// The colour of the document's sample seen end-on through the analyser at `beta_deg`.
pub fn end_on(model: &Model, beta_deg: f64, illuminant: Illuminant) -> Result<Colour> {
    end_on_optics(&Optics::of_model(model)?, beta_deg, illuminant)
}

/// One colour of a strip.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StripEntry {
    pub analyser_deg: f64,
    pub colour: Colour,
}

/// The colours seen while the analyser turns from 0 to 180 degrees, at
/// `samples` evenly spaced angles (both ends included).
pub fn strip_optics(optics: &Optics, illuminant: Illuminant, samples: usize) -> Result<Vec<StripEntry>> {
    if !(2..=MAX_STRIP_SAMPLES).contains(&samples) {
        return Err(Error::new(ErrorKind::OutOfRange, "samples", format!("a strip has 2 to {MAX_STRIP_SAMPLES} angles (got {samples})")));
    }
    let weights = Weights::new(illuminant);
    // The light after the sample is the same for every angle.
    let light: Vec<polarimeter::Jones> = (0..COUNT).map(|i| optics.after(i, optics.path_cm)).collect();
    Ok((0..samples)
        .map(|k| {
            let beta = 180.0 * k as f64 / (samples - 1) as f64;
            let xyz = weights.xyz(|i| polarimeter::through_analyser(light[i], beta));
            StripEntry { analyser_deg: beta, colour: Colour::from_xyz(xyz) }
        })
        .collect())
}

pub fn strip(model: &Model, illuminant: Illuminant, samples: usize) -> Result<Vec<StripEntry>> {
    strip_optics(&Optics::of_model(model)?, illuminant, samples)
}

/// The illuminant names for error messages and help.
pub fn illuminant_keys() -> String {
    Illuminant::ALL.map(|i| i.key()).join(", ")
}

/// Reads an illuminant key (d65, a, led, e).
pub fn parse_illuminant(key: &str) -> Result<Illuminant> {
    Illuminant::parse(key).ok_or_else(|| {
        Error::new(ErrorKind::UnknownName, "illuminant", format!("unknown illuminant \"{key}\" (use {})", illuminant_keys()))
    })
}
