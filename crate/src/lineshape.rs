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
///
/// The library's routine (a hundred-way branch on x) is the Gaussian
/// shape's main cost, so for |x| < 10 it is used once per node to build a
/// table of Taylor polynomials (nodes 1/128 apart; the derivatives follow
/// exactly from F' = 1 - 2xF), which evaluates branch-free and lets the
/// processor overlap neighbouring points. For |x| >= 20 the asymptotic series
/// F(x) ~ (1/2x) sum_k (2k-1)!! / (2x^2)^k is summed to below 1e-17. Both are
/// checked against SciPy's dawsn in tests/reference_functions.rs.
pub fn dawson(x: f64) -> f64 {
    let a = x.abs();
    let f = if a >= DAWSON_SERIES_FROM {
        let r = 1.0 / a;
        let t = 0.5 * r * r;
        let mut sum = 0.0;
        for c in DAWSON_SERIES.iter().rev() {
            sum = sum * t + c;
        }
        0.5 * sum * r
    } else {
        let table = dawson_table();
        // Nearest node by truncation (a libm round() call costs more than the
        // polynomial). The index stays in the table: a < 20 and it holds node 2560.
        let node = (a * DAWSON_NODES_PER_UNIT + 0.5) as usize;
        let dx = a - node as f64 / DAWSON_NODES_PER_UNIT;
        let coefficients = &table[node.min(table.len() - 1)];
        let mut sum = 0.0;
        for c in coefficients.iter().rev() {
            sum = sum * dx + c;
        }
        sum
    };
    f.copysign(x)
}

/// The library's Dawson function, without the table (for tests and checks).
pub fn dawson_reference(x: f64) -> f64 {
    x.dawson()
}

const DAWSON_SERIES_FROM: f64 = 20.0;
/// (2k-1)!! for k = 0..8: at x = 20 the last term is 1e-17 of the first.
const DAWSON_SERIES: [f64; 9] = {
    let mut c = [1.0; 9];
    let mut k = 1;
    while k < 9 {
        c[k] = c[k - 1] * (2 * k - 1) as f64;
        k += 1;
    }
    c
};
const DAWSON_NODES_PER_UNIT: f64 = 128.0;
/// Taylor order 5 at |dx| <= 1/256: within 6e-15 of the library everywhere.
const DAWSON_TAYLOR_TERMS: usize = 6;

fn dawson_table() -> &'static [[f64; DAWSON_TAYLOR_TERMS]] {
    static TABLE: std::sync::OnceLock<Vec<[f64; DAWSON_TAYLOR_TERMS]>> = std::sync::OnceLock::new();
    TABLE.get_or_init(|| {
        let nodes = (DAWSON_SERIES_FROM * DAWSON_NODES_PER_UNIT) as usize + 1;
        (0..nodes)
            .map(|i| {
                let x0 = i as f64 / DAWSON_NODES_PER_UNIT;
                // F^(n+1) = -2 x F^(n) - 2 n F^(n-1), from F' = 1 - 2 x F.
                let mut d = [0.0; DAWSON_TAYLOR_TERMS];
                d[0] = x0.dawson();
                d[1] = 1.0 - 2.0 * x0 * d[0];
                for n in 1..DAWSON_TAYLOR_TERMS - 1 {
                    d[n + 1] = -2.0 * x0 * d[n] - 2.0 * n as f64 * d[n - 1];
                }
                let mut factorial = 1.0;
                for (n, v) in d.iter_mut().enumerate().skip(1) {
                    factorial *= n as f64;
                    *v /= factorial;
                }
                d
            })
            .collect()
    })
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
            Lineshape::Lorentz { center, gamma } => lorentz(center, gamma, nu),
            Lineshape::Gaussian { center, delta } => GaussianTerms::new(center, delta).at(nu),
            Lineshape::Voigt { center, delta, lorentz_fwhm } => voigt(center, delta, lorentz_fwhm, nu),
        }
    }

    /// s(nu) on a whole grid; the shape is chosen once, outside the loop, so
    /// the compiler can vectorise the simple shapes.
    pub fn values(&self, nu: &[f64]) -> Vec<Complex64> {
        match *self {
            Lineshape::Lorentz { center, gamma } => nu.iter().map(|x| lorentz(center, gamma, *x)).collect(),
            Lineshape::Gaussian { center, delta } => {
                let g = GaussianTerms::new(center, delta);
                nu.iter().map(|x| g.at(*x)).collect()
            }
            Lineshape::Voigt { center, delta, lorentz_fwhm } => {
                nu.iter().map(|x| voigt(center, delta, lorentz_fwhm, *x)).collect()
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

/// (2/pi) nu / (nu_j^2 - nu^2 - i gamma nu)
#[inline]
fn lorentz(center: f64, gamma: f64, nu: f64) -> Complex64 {
    let re = center * center - nu * nu;
    let im = -gamma * nu;
    let scale = 2.0 / PI * nu / (re * re + im * im);
    Complex64::new(scale * re, -scale * im)
}

/// A Gaussian band's constants, so that a grid costs no divisions.
#[derive(Clone, Copy)]
struct GaussianTerms {
    center: f64,
    inv_delta: f64,
    im_scale: f64,
    re_scale: f64,
}

impl GaussianTerms {
    fn new(center: f64, delta: f64) -> GaussianTerms {
        GaussianTerms { center, inv_delta: 1.0 / delta, im_scale: 1.0 / (PI.sqrt() * delta), re_scale: -2.0 / (PI * delta) }
    }

    /// On the real axis w(x) = exp(-x^2) + (2i/sqrt(pi)) F(x), so the
    /// Gaussian shape needs only exp and Dawson: no complex Faddeeva call.
    #[inline]
    fn at(&self, nu: f64) -> Complex64 {
        let x1 = (nu - self.center) * self.inv_delta;
        let x2 = (nu + self.center) * self.inv_delta;
        Complex64::new(self.re_scale * (dawson(x1) + dawson(x2)), self.im_scale * (gauss(x1) + gauss(x2)))
    }
}

/// i/(sqrt(pi) Delta) [w(z1) + w(z2)], z = (nu -+ nu_j + i gamma_L/2) / Delta.
#[inline]
fn voigt(center: f64, delta: f64, lorentz_fwhm: f64, nu: f64) -> Complex64 {
    let y = lorentz_fwhm / 2.0 / delta;
    let sum = faddeeva(Complex64::new((nu - center) / delta, y)) + faddeeva(Complex64::new((nu + center) / delta, y));
    Complex64::new(-sum.im, sum.re) / (PI.sqrt() * delta)
}

/// exp(-x^2), skipping the library's slow underflow path where the result
/// is exactly zero in f64 anyway (x^2 > 745.2).
#[inline]
fn gauss(x: f64) -> f64 {
    let x2 = x * x;
    if x2 < 746.0 {
        (-x2).exp()
    } else {
        0.0
    }
}

/// The one-term Drude law every shape tends to far from its band.
pub fn drude(center: f64, nu: f64) -> f64 {
    2.0 / PI * nu / (center * center - nu * nu)
}
