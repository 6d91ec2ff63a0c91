//! Complex band shapes s(nu) (units: cm) whose imaginary part is the reduced
//! absorption shape (integral over 0..inf equal to 1) and whose real part is
//! its Kramers-Kronig partner: Re s is odd and Im s even in nu.

use errorfunctions::{ComplexErrorFunctions, RealErrorFunctions};
use num_complex::Complex64;
use std::f64::consts::PI;

/// Gaussian FWHM = 2 sqrt(ln 2) * Delta, Delta being the 1/e half width.
pub fn gaussian_delta_from_fwhm(fwhm: f64) -> f64 {
    fwhm / (2.0 * std::f64::consts::LN_2.sqrt())
}

/// The Faddeeva function w(z) = exp(-z^2) erfc(-iz).
pub fn faddeeva(z: Complex64) -> Complex64 {
    z.w()
}

/// Dawson's integral F(x) = exp(-x^2) int_0^x exp(t^2) dt.
pub fn dawson(x: f64) -> f64 {
    x.dawson()
}

/// One band's shape with its constants precomputed for fast evaluation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Lineshape {
    /// Damped (Lorentz) oscillator, gamma = FWHM in cm^-1.
    Lorentz { center: f64, gamma: f64 },
    /// Gaussian in nu with its mirror image at -nu_j.
    Gaussian { center: f64, delta: f64 },
    /// Gaussian convolved with a Lorentzian of FWHM `lorentz_fwhm`.
    Voigt { center: f64, delta: f64, lorentz_fwhm: f64 },
}

impl Lineshape {
    pub fn lorentz(center: f64, fwhm: f64) -> Lineshape {
        Lineshape::Lorentz { center, gamma: fwhm }
    }

    pub fn gaussian(center: f64, fwhm: f64) -> Lineshape {
        Lineshape::Gaussian { center, delta: gaussian_delta_from_fwhm(fwhm) }
    }

    pub fn voigt(center: f64, gaussian_fwhm: f64, lorentz_fwhm: f64) -> Lineshape {
        Lineshape::Voigt { center, delta: gaussian_delta_from_fwhm(gaussian_fwhm), lorentz_fwhm }
    }

    /// s(nu) at a real wavenumber nu (cm^-1).
    #[inline]
    pub fn value(&self, nu: f64) -> Complex64 {
        match *self {
            Lineshape::Lorentz { center, gamma } => {
                // (2/pi) nu / (nu_j^2 - nu^2 - i gamma nu)
                let re = center * center - nu * nu;
                let im = -gamma * nu;
                let scale = 2.0 / PI * nu / (re * re + im * im);
                Complex64::new(scale * re, -scale * im)
            }
            Lineshape::Gaussian { center, delta } => {
                // On the real axis w(x) = exp(-x^2) + (2i/sqrt(pi)) F(x), so the
                // shape needs only exp and Dawson: no complex Faddeeva call.
                let x1 = (nu - center) / delta;
                let x2 = (nu + center) / delta;
                let im = ((-x1 * x1).exp() + (-x2 * x2).exp()) / (PI.sqrt() * delta);
                let re = -2.0 / (PI * delta) * (dawson(x1) + dawson(x2));
                Complex64::new(re, im)
            }
            Lineshape::Voigt { center, delta, lorentz_fwhm } => {
                let y = lorentz_fwhm / 2.0 / delta;
                let z1 = Complex64::new((nu - center) / delta, y);
                let z2 = Complex64::new((nu + center) / delta, y);
                let sum = faddeeva(z1) + faddeeva(z2);
                // i/(sqrt(pi) Delta) * sum
                Complex64::new(-sum.im, sum.re) / (PI.sqrt() * delta)
            }
        }
    }

    pub fn center(&self) -> f64 {
        match *self {
            Lineshape::Lorentz { center, .. }
            | Lineshape::Gaussian { center, .. }
            | Lineshape::Voigt { center, .. } => center,
        }
    }
}

/// The one-term Drude law every shape tends to far from its band.
pub fn drude(center: f64, nu: f64) -> f64 {
    2.0 / PI * nu / (center * center - nu * nu)
}
