//! Rotation at the standard polarimeter lamp lines, and the one-term Drude
//! law that QC labs use to carry a rotation from one line to another.

use crate::error::Result;
use crate::model::Model;
use crate::spectra::{chiral_scale, evaluate, Spectra};
use crate::units::{degrees_from_delta_n, AxisUnit, OrdUnit, SampleContext, ESU2_CM2_PER_ROTATORY_UNIT};
use std::f64::consts::PI;

/// A lamp line: name and wavelength in nm as polarimeters quote it (air
/// wavelengths, used as given: no air-to-vacuum correction is applied).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LampLine {
    pub name: &'static str,
    pub wavelength_nm: f64,
}

/// The lines polarimeters offer (common practice; wavelengths from memory of
/// the usual spectral-line tables).
pub const STANDARD_LINES: [LampLine; 7] = [
    LampLine { name: "He-Ne 633", wavelength_nm: 632.8 },
    LampLine { name: "Na D", wavelength_nm: 589.3 },
    LampLine { name: "Hg 578", wavelength_nm: 578.0 },
    LampLine { name: "Hg 546", wavelength_nm: 546.1 },
    LampLine { name: "Hg 436", wavelength_nm: 435.8 },
    LampLine { name: "Hg 405", wavelength_nm: 404.7 },
    LampLine { name: "Hg 365", wavelength_nm: 365.0 },
];

#[derive(Debug, Clone, PartialEq)]
pub struct LineRotation {
    pub line: LampLine,
    pub rotation_deg: f64,
    pub specific_rotation: Option<f64>,
    pub molar_rotation: f64,
}

/// Rotation, specific and molar rotation of the model at every standard line.
pub fn rotation_at_lines(model: &Model) -> Result<Vec<LineRotation>> {
    let grid: Vec<f64> = STANDARD_LINES.iter().map(|l| AxisUnit::Nanometre.to_wavenumber(l.wavelength_nm)).collect();
    let s: Spectra = evaluate(model, &grid)?;
    let specific = s.specific_rotation();
    let molar = s.ord_in(OrdUnit::MolarRotation).unwrap_or_default();
    Ok(STANDARD_LINES
        .iter()
        .enumerate()
        .map(|(i, line)| LineRotation {
            line: *line,
            rotation_deg: s.rotation_deg[i],
            specific_rotation: specific.as_ref().map(|v| v[i]),
            molar_rotation: molar[i],
        })
        .collect())
}

/// One-term Drude law: rotation(lambda) = a / (lambda^2 - lambda0^2).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DrudeTerm {
    /// Amplitude, in (rotation unit) nm^2.
    pub amplitude_nm2: f64,
    /// Wavelength of the effective band, nm.
    pub lambda0_nm: f64,
}

impl DrudeTerm {
    /// The term through two measured rotations; `None` when the two values
    /// admit no real band wavelength (e.g. equal rotations or a sign change).
    pub fn through(l1_nm: f64, rot1: f64, l2_nm: f64, rot2: f64) -> Option<DrudeTerm> {
        // rot1 (l1^2 - L0^2) = rot2 (l2^2 - L0^2)
        let l0_sq = (rot1 * l1_nm * l1_nm - rot2 * l2_nm * l2_nm) / (rot1 - rot2);
        if !(l0_sq.is_finite() && l0_sq > 0.0) {
            return None;
        }
        let amplitude = rot1 * (l1_nm * l1_nm - l0_sq);
        Some(DrudeTerm { amplitude_nm2: amplitude, lambda0_nm: l0_sq.sqrt() })
    }

    /// The least-squares term through any number of readings (lambda nm,
    /// rotation), minimising the relative residuals: for a given lambda0 the
    /// best amplitude is linear, so only lambda0 is searched (golden section
    /// between zero and just below the shortest reading's wavelength).
    /// `None` with fewer than two readings or when the rotations change sign.
    pub fn fit(readings: &[(f64, f64)]) -> Option<DrudeTerm> {
        let positive = readings.iter().all(|r| r.1 > 0.0);
        let negative = readings.iter().all(|r| r.1 < 0.0);
        if readings.len() < 2 || !(positive || negative) || readings.iter().any(|r| !(r.0 > 0.0 && r.0.is_finite())) {
            return None;
        }
        // x_i = 1/((l_i^2 - L0^2) rot_i); residual_i = a x_i - 1; best a = sum x / sum x^2.
        let best = |l0: f64| {
            let x: Vec<f64> = readings.iter().map(|(l, r)| 1.0 / ((l * l - l0 * l0) * r)).collect();
            let amplitude = x.iter().sum::<f64>() / x.iter().map(|v| v * v).sum::<f64>();
            let cost = x.iter().map(|v| (amplitude * v - 1.0).powi(2)).sum::<f64>();
            (cost, amplitude)
        };
        let shortest = readings.iter().map(|r| r.0).fold(f64::INFINITY, f64::min);
        let (mut lo, mut hi) = (0.0, shortest * (1.0 - 1e-6));
        let ratio = (5.0_f64.sqrt() - 1.0) / 2.0;
        for _ in 0..200 {
            let (m1, m2) = (hi - ratio * (hi - lo), lo + ratio * (hi - lo));
            if best(m1).0 < best(m2).0 {
                hi = m2;
            } else {
                lo = m1;
            }
        }
        let lambda0_nm = (lo + hi) / 2.0;
        let (_, amplitude_nm2) = best(lambda0_nm);
        amplitude_nm2.is_finite().then_some(DrudeTerm { amplitude_nm2, lambda0_nm })
    }

    pub fn rotation(&self, lambda_nm: f64) -> f64 {
        self.amplitude_nm2 / (lambda_nm * lambda_nm - self.lambda0_nm * self.lambda0_nm)
    }

    /// The rotatory strength (1e-40 cgs) of a band at `lambda0_nm` whose
    /// far-from-band rotation, in degrees for this sample, is this term.
    /// Far from the band the model's Dn is chiral_scale(c) R drude(nu_j, nu)
    /// and phi = degrees_from_delta_n(Dn, nu, l); with nu = 1e7/lambda,
    /// nu drude(nu_j, nu) = (2/pi) lambda_j^2 / (lambda^2 - lambda_j^2).
    pub fn rotatory_strength_1e40(&self, sample: &SampleContext) -> f64 {
        let per_r = degrees_from_delta_n(chiral_scale(sample.concentration_mol_per_l), 1.0, sample.path_length_cm)
            * (2.0 / PI)
            * self.lambda0_nm
            * self.lambda0_nm;
        self.amplitude_nm2 / per_r / ESU2_CM2_PER_ROTATORY_UNIT
    }
}
