//! Light through a polariser, the sample and an analyser, wavelength by
//! wavelength, in the Jones calculus.
//!
//! Basis (p, c): p is the polariser's transmission axis, c the direction a
//! clockwise quarter turn (seen facing the light, the sense of positive
//! rotation in physics.md) takes p to. The analyser angle beta is measured
//! from p the same way, so a dextrorotatory sample passes most at beta = phi.
//!
//! The sample's Jones matrix is diag(t_L, t_R) in the circular basis, with
//! t = exp(i 2 pi nu N z) for the complex indices N = n + i k. In (p, c) it is
//!     exp(i 2 pi nu N_mean z) [[cos chi, -sin chi], [sin chi, cos chi]],
//!     chi = pi nu (N_L - N_R) z,
//! whose eigenvectors are (1, -i) (left: anticlockwise seen facing the light)
//! with t_L and (1, i) with t_R. Re chi is the rotation; Im chi, from the
//! circular dichroism, makes the light elliptical and is kept. The common
//! phase exp(i 2 pi nu n_mean z) drops out of every intensity, so only the
//! mean absorption exp(-2 pi nu k_mean z) is kept of it.

use crate::error::{Error, ErrorKind, Result};
use crate::model::Model;
use crate::spectra::evaluate;
use crate::units::AxisUnit;
use num_complex::Complex64;
use std::f64::consts::PI;

use super::tables::COUNT;
use super::wavelength_nm;

/// A Jones vector in the (p, c) basis.
pub type Jones = [Complex64; 2];

/// The sample's optics at the table wavelengths, per centimetre of path.
#[derive(Debug, Clone)]
pub struct Optics {
    /// chi per cm: pi nu (Dn + i Dk).
    pub chi_per_cm: Vec<Complex64>,
    /// Amplitude attenuation per cm: 2 pi nu k_mean (the intensity falls as
    /// exp(-2 x this x z)).
    pub attenuation_per_cm: Vec<f64>,
    /// The document's path length, cm.
    pub path_cm: f64,
}

impl Optics {
    /// Evaluates the model on the table wavelengths (380-780 nm).
    pub fn of_model(model: &Model) -> Result<Optics> {
        let nu: Vec<f64> = (0..COUNT).map(|i| AxisUnit::Nanometre.to_wavenumber(wavelength_nm(i))).collect();
        let s = evaluate(model, &nu)?;
        // Dn and Dk straight from the spectra: n_L - n_R would lose digits
        // to the solvent's index for dilute samples.
        let chi_per_cm: Vec<Complex64> = (0..COUNT).map(|i| Complex64::new(s.delta_n[i], s.delta_k[i]) * (PI * nu[i])).collect();
        let attenuation_per_cm: Vec<f64> = (0..COUNT).map(|i| 2.0 * PI * nu[i] * (s.k_left[i] + s.k_right[i]) / 2.0).collect();
        let finite = chi_per_cm.iter().all(|c| c.re.is_finite() && c.im.is_finite())
            && attenuation_per_cm.iter().all(|a| a.is_finite() && *a >= 0.0);
        if !finite {
            return Err(Error::new(ErrorKind::OutOfRange, "bands", "the model gives no finite index in 380-780 nm"));
        }
        Ok(Optics { chi_per_cm, attenuation_per_cm, path_cm: model.sample.context.path_length_cm })
    }

    /// No sample at all: the polarisers alone.
    pub fn empty() -> Optics {
        Optics { chi_per_cm: vec![Complex64::new(0.0, 0.0); COUNT], attenuation_per_cm: vec![0.0; COUNT], path_cm: 0.0 }
    }

    /// The sample's Jones matrix at wavelength `i` for a path of `z_cm`.
    pub fn matrix(&self, i: usize, z_cm: f64) -> [[Complex64; 2]; 2] {
        // mean cos chi = (t_L + t_R)/2 and mean sin chi = (t_L - t_R)/(2i),
        // from t_L,R = exp(-2 pi nu k_L,R z +- i Re chi): each of modulus <= 1,
        // so long absorbing paths give 0, never inf x 0.
        let chi = self.chi_per_cm[i] * z_cm;
        let mean = -self.attenuation_per_cm[i] * z_cm;
        let t_l = Complex64::new(mean - chi.im, chi.re).exp();
        let t_r = Complex64::new(mean + chi.im, -chi.re).exp();
        let c = (t_l + t_r) * 0.5;
        let s = (t_l - t_r) * Complex64::new(0.0, -0.5);
        [[c, -s], [s, c]]
    }

    /// The light at depth `z_cm`, for unit light along p from the polariser.
    pub fn after(&self, i: usize, z_cm: f64) -> Jones {
        apply(&self.matrix(i, z_cm), [Complex64::new(1.0, 0.0), Complex64::new(0.0, 0.0)])
    }

    /// The fraction of the polariser's light the analyser at `beta_deg`
    /// passes at wavelength `i`, through the whole path.
    pub fn transmission(&self, i: usize, beta_deg: f64) -> f64 {
        through_analyser(self.after(i, self.path_cm), beta_deg)
    }
}

pub fn apply(m: &[[Complex64; 2]; 2], e: Jones) -> Jones {
    [m[0][0] * e[0] + m[0][1] * e[1], m[1][0] * e[0] + m[1][1] * e[1]]
}

/// An ideal linear analyser at `beta_deg` (clockwise from p seen facing the
/// light): the intensity of the light's component along its axis.
pub fn through_analyser(e: Jones, beta_deg: f64) -> f64 {
    let b = beta_deg.to_radians();
    (e[0] * b.cos() + e[1] * b.sin()).norm_sqr()
}
