//! Complex band shapes (units: cm) whose imaginary part is the reduced
//! absorption shape (integral over 0..inf equal to 1) and whose real part is
//! its Kramers-Kronig partner.
//!
//! Each band has two: the odd-type s(nu) of the chiral pair (Re s odd, Im s
//! even in nu, as Dn and Dk are), and the even-type partner s~(nu) of the
//! mean index (Im s~ = Im s on nu > 0, extended as an odd function, and
//! Re s~ its n-k transform (2/pi) P int nu' Im s(nu') / (nu'^2 - nu^2) dnu',
//! even in nu, so that n(-w) = n(w)*). Far from the band Re s tends to the
//! Drude-like (2/pi) nu/(nu_j^2 - nu^2), Re s~ to the Sellmeier-like
//! (2/pi) nu_j/(nu_j^2 - nu^2).

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
        // polynomial). The index stays in the table: a < 20 and it holds node
        // 2560 (i32, whose conversions are single instructions, unlike usize's).
        let node = (a * DAWSON_NODES_PER_UNIT + 0.5) as i32;
        let dx = a - f64::from(node) / DAWSON_NODES_PER_UNIT;
        let coefficients = &table[(node as usize).min(table.len() - 1)];
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

    /// Its full widths at half maximum added (a Voigt's Gaussian and
    /// Lorentzian parts), cm^-1: how far it reaches, for framing.
    pub fn full_width(&self) -> f64 {
        match *self {
            Lineshape::Lorentz { gamma, .. } => gamma,
            Lineshape::Gaussian { delta, .. } => delta / gaussian_delta_from_fwhm(1.0),
            Lineshape::Voigt { delta, lorentz_fwhm, .. } => delta / gaussian_delta_from_fwhm(1.0) + lorentz_fwhm,
        }
    }

    /// The same band with every width times `k` (the similarity's width search).
    pub fn widened(&self, k: f64) -> Lineshape {
        match *self {
            Lineshape::Lorentz { center, gamma } => Lineshape::Lorentz { center, gamma: gamma * k },
            Lineshape::Gaussian { center, delta } => Lineshape::Gaussian { center, delta: delta * k },
            Lineshape::Voigt { center, delta, lorentz_fwhm } => {
                Lineshape::Voigt { center, delta: delta * k, lorentz_fwhm: lorentz_fwhm * k }
            }
        }
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

    /// Re s~(nu), the mean index shape at a real wavenumber nu > 0 (its
    /// imaginary part is Im s(nu), see [`Lineshape::value`]).
    pub fn mean_dispersion(&self, nu: f64) -> f64 {
        match *self {
            Lineshape::Lorentz { center, gamma } => LorentzMean::new(center, gamma).at(nu, nu.ln()),
            Lineshape::Gaussian { center, delta } => GaussianTerms::new(center, delta).mean_at(nu),
            Lineshape::Voigt { center, delta, lorentz_fwhm } => voigt_mean(center, delta, lorentz_fwhm, nu),
        }
    }

    /// The chiral shape s and the mean dispersion Re s~ on a whole grid, in
    /// one pass (the Gaussian's Dawson and the Voigt's Faddeeva calls serve
    /// both). `ln_nu` holds ln(nu) of each point ([`ln_grid`]), computed once
    /// for all bands.
    pub fn values_with_mean(&self, nu: &[f64], ln_nu: &[f64]) -> (Vec<Complex64>, Vec<f64>) {
        match *self {
            Lineshape::Lorentz { center, gamma } => {
                let mean = LorentzMean::new(center, gamma);
                let shape = nu.iter().map(|x| lorentz(center, gamma, *x)).collect();
                (shape, nu.iter().zip(ln_nu).map(|(x, l)| mean.at(*x, *l)).collect())
            }
            Lineshape::Gaussian { center, delta } => {
                let g = GaussianTerms::new(center, delta);
                nu.iter().map(|x| g.both_at(*x)).unzip()
            }
            Lineshape::Voigt { center, delta, lorentz_fwhm } => {
                let mirror = VoigtMirror::new(center, delta, lorentz_fwhm);
                nu.iter().zip(ln_nu).map(|(x, l)| voigt_both(center, delta, lorentz_fwhm, &mirror, *x, *l)).unzip()
            }
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
            Lineshape::Voigt { center, delta, lorentz_fwhm } => nu.iter().map(|x| voigt(center, delta, lorentz_fwhm, *x)).collect(),
        }
    }

    pub fn center(&self) -> f64 {
        match *self {
            Lineshape::Lorentz { center, .. } | Lineshape::Gaussian { center, .. } | Lineshape::Voigt { center, .. } => center,
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

    /// Im s or Re s alone: Im needs only exp, Re only Dawson.
    #[inline(always)]
    fn part(&self, nu: f64, imaginary: bool) -> f64 {
        let x1 = (nu - self.center) * self.inv_delta;
        let x2 = (nu + self.center) * self.inv_delta;
        if imaginary {
            self.im_scale * (gauss(x1) + gauss(x2))
        } else {
            self.re_scale * (dawson(x1) + dawson(x2))
        }
    }

    /// Re s~: the n-k partner of the odd pair of Gaussians
    /// G(x1) - G(x2) is -(2/(pi Delta)) [F(x1) - F(x2)]. On nu > 0 that pair
    /// differs from Im s by 2 G(x2) <= exp(-(nu_j/Delta)^2) of the peak,
    /// below 1e-15 for any band narrower than a sixth of its wavenumber.
    #[inline]
    fn mean_at(&self, nu: f64) -> f64 {
        let x1 = (nu - self.center) * self.inv_delta;
        let x2 = (nu + self.center) * self.inv_delta;
        self.re_scale * (dawson(x1) - dawson(x2))
    }

    #[inline]
    fn both_at(&self, nu: f64) -> (Complex64, f64) {
        let x1 = (nu - self.center) * self.inv_delta;
        let x2 = (nu + self.center) * self.inv_delta;
        let (f1, f2) = (dawson(x1), dawson(x2));
        (Complex64::new(self.re_scale * (f1 + f2), self.im_scale * (gauss(x1) + gauss(x2))), self.re_scale * (f1 - f2))
    }
}

/// The damped oscillator's mean dispersion in closed form. With u = nu'^2,
/// a = nu_j^2, b = nu^2 the n-k transform of Im s = (2/pi) G nu^2 / Q(nu^2),
/// Q(u) = (u - a)^2 + G^2 u = (u - u1)(u - u1*), is
///   Re s~ = (2/pi)^2 (G/2) P int_0^inf u / (Q(u)(u - b)) du
/// and partial fractions sum_k c_k/(u - r_k) (sum c_k = 0) integrate to
/// -sum c_k Log(-r_k), the principal value at r = b giving ln b.
#[derive(Clone, Copy)]
struct LorentzMean {
    a: f64,
    gamma2: f64,
    /// The root u1 = a - G^2/2 + i G sqrt(a - G^2/4) (G < nu_j is validated).
    u1: Complex64,
    /// K = Log(-u1) u1 / (u1 - u1*), so that c1 Log(-u1) = K / (u1 - b).
    k: Complex64,
    scale: f64,
}

impl LorentzMean {
    fn new(center: f64, gamma: f64) -> LorentzMean {
        let a = center * center;
        let gamma2 = gamma * gamma;
        let u1 = Complex64::new(a - gamma2 / 2.0, gamma * (a - gamma2 / 4.0).sqrt());
        LorentzMean { a, gamma2, u1, k: (-u1).ln() * u1 / Complex64::new(0.0, 2.0 * u1.im), scale: (2.0 / PI) * (2.0 / PI) * gamma / 2.0 }
    }

    /// `ln_nu` is ln(nu), shared by every band of a grid.
    #[inline]
    fn at(&self, nu: f64, ln_nu: f64) -> f64 {
        let b = nu * nu;
        // |b - u1|^2 = Q(b): c_b = b/Q(b), and K/(u1 - b) = K conj(u1 - b)/Q(b).
        let q_b = (b - self.a) * (b - self.a) + self.gamma2 * b;
        let pair = self.k.re * (self.u1.re - b) + self.k.im * self.u1.im;
        // c2 = conj(c1) and Log(-u2) = conj(Log(-u1)): the pair is twice the real part.
        -self.scale * (b * 2.0 * ln_nu + 2.0 * pair) / q_b
    }
}

/// i/(sqrt(pi) Delta) [w(z1) + w(z2)], z = (nu -+ nu_j + i gamma_L/2) / Delta.
#[inline]
fn voigt(center: f64, delta: f64, lorentz_fwhm: f64, nu: f64) -> Complex64 {
    let y = lorentz_fwhm / 2.0 / delta;
    let sum = faddeeva(Complex64::new((nu - center) / delta, y)) + faddeeva(Complex64::new((nu + center) / delta, y));
    Complex64::new(-sum.im, sum.re) / (PI.sqrt() * delta)
}

/// The Voigt pair: s = i/(sqrt(pi) Delta) [w(z1) + w(z2)] and the analytic
/// odd-type combination i/(sqrt(pi) Delta) [w(z1) - w(z2)], whose real part
/// is the mean dispersion up to the [`VoigtMirror`] correction.
#[inline]
fn voigt_both(center: f64, delta: f64, lorentz_fwhm: f64, mirror: &VoigtMirror, nu: f64, ln_nu: f64) -> (Complex64, f64) {
    let y = lorentz_fwhm / 2.0 / delta;
    let w1 = faddeeva(Complex64::new((nu - center) / delta, y));
    let w2 = faddeeva(Complex64::new((nu + center) / delta, y));
    let sum = w1 + w2;
    // Divided exactly as `voigt` does, so the chiral shape is bit-identical.
    let shape = Complex64::new(-sum.im, sum.re) / (PI.sqrt() * delta);
    let mean = -(w1 - w2).im / (PI.sqrt() * delta) + mirror.at(nu, ln_nu);
    (shape, mean)
}

fn voigt_mean(center: f64, delta: f64, lorentz_fwhm: f64, nu: f64) -> f64 {
    voigt_both(center, delta, lorentz_fwhm, &VoigtMirror::new(center, delta, lorentz_fwhm), nu, nu.ln()).1
}

/// Terms of the asymptotic series w(z) ~ (i/sqrt(pi)) sum_k a_k z^-(2k+1),
/// a_k = (2k-1)!!/2^k, at most; fewer when (Delta/nu_j)^2k is already small.
const MIRROR_WING_TERMS: usize = 6;
/// Below this |r| the near-pole series is used (20 terms: 0.3^20 = 3e-11 of
/// a correction that is itself ~1e-4 of the shape).
const MIRROR_SERIES_RATIO: f64 = 0.3;
const MIRROR_SERIES_TERMS: usize = 20;

/// The odd combination w(z1) - w(z2) has Im = A(nu) - A(-nu), A being the band
/// at +nu_j; the odd extension of Im s differs from it by
/// d(nu) = 2 sign(nu) A(-|nu|), the band's far Lorentzian wing on the other
/// side of zero. Its n-k transform is (2/pi) int_0^inf A(-t) 2t/(t^2 - nu^2) dt.
/// There |z| >= nu_j/Delta, so A(-t) = Re[(i/pi) sum_k w_k / (t - q)^(2k+1)],
/// w_k = a_k Delta^2k, q = -nu_j - i G_L/2, to the series' accuracy, and each
/// term integrates in closed form: sum_k w_k [J_2k+1(nu) + J_2k+1(-nu)] with
/// J_m(a) = P int_0^inf dt / ((t - a)(t - q)^m)
///        = (Log(-q) - ln|a|) u^m - sum_{p=1..m-1} (-q)^-p u^(m-p) / p,  u = 1/(a - q).
/// Those terms cancel where a nears q (a = -nu by the band); there
/// 1/(t - a) = sum_n (a - q)^n/(t - q)^(n+1) gives
/// J_m = (-q)^-m sum_n r^n/(m + n), r = (a - q)/(-q). Both sums over k are
/// polynomials whose coefficients depend only on the band, computed once.
/// Zero for a pure Gaussian (its wing falls faster than any power).
#[derive(Clone, Copy)]
struct VoigtMirror {
    active: bool,
    q: Complex64,
    inv_minus_q: Complex64,
    log_minus_q: Complex64,
    terms: usize,
    /// w_k for the logarithmic part, a polynomial in u^2 (times u).
    log_coefficients: [Complex64; MIRROR_WING_TERMS],
    /// C_e of u^e, e = 1..2K-1 (index e - 1).
    power_coefficients: [Complex64; 2 * MIRROR_WING_TERMS],
    /// c_n = sum_k w_k (-q)^-2k / (2k + 1 + n) of the near-pole series.
    series_coefficients: [Complex64; MIRROR_SERIES_TERMS],
}

impl VoigtMirror {
    fn new(center: f64, delta: f64, lorentz_fwhm: f64) -> VoigtMirror {
        let zero = Complex64::new(0.0, 0.0);
        let q = Complex64::new(-center, -lorentz_fwhm / 2.0);
        let inv_minus_q = 1.0 / (-q);
        // Terms until a_k (Delta/|q|)^2k < 1e-13.
        let mut weights = [0.0; MIRROR_WING_TERMS];
        let mut terms = 0;
        let mut a_k = 1.0;
        for (k, w) in weights.iter_mut().enumerate() {
            *w = a_k * delta.powi(2 * k as i32);
            terms = k + 1;
            if a_k * (delta * delta / q.norm_sqr()).powi(k as i32) < 1e-13 {
                break;
            }
            a_k *= (2 * k + 1) as f64 / 2.0;
        }
        let mut log_coefficients = [zero; MIRROR_WING_TERMS];
        let mut power_coefficients = [zero; 2 * MIRROR_WING_TERMS];
        let mut series_coefficients = [zero; MIRROR_SERIES_TERMS];
        for k in 0..terms {
            let m = 2 * k + 1;
            log_coefficients[k] = Complex64::new(weights[k], 0.0);
            for p in 1..m {
                power_coefficients[m - p - 1] += weights[k] * inv_minus_q.powu(p as u32) / p as f64;
            }
            let scaled = weights[k] * inv_minus_q.powu(2 * k as u32);
            for (n, c) in series_coefficients.iter_mut().enumerate() {
                *c += scaled / (m + n) as f64;
            }
        }
        VoigtMirror {
            active: lorentz_fwhm > 0.0,
            q,
            inv_minus_q,
            log_minus_q: (-q).ln(),
            terms,
            log_coefficients,
            power_coefficients,
            series_coefficients,
        }
    }

    /// sum_k w_k J_2k+1(a) for real a.
    #[inline]
    fn j_sum(&self, a: f64, ln_abs_a: f64) -> Complex64 {
        let aq = a - self.q;
        let r = aq * self.inv_minus_q;
        if r.norm_sqr() < MIRROR_SERIES_RATIO * MIRROR_SERIES_RATIO {
            let mut sum = Complex64::new(0.0, 0.0);
            for c in self.series_coefficients.iter().rev() {
                sum = sum * r + c;
            }
            return sum * self.inv_minus_q;
        }
        let u = 1.0 / aq;
        let u2 = u * u;
        let mut log_part = Complex64::new(0.0, 0.0);
        for c in self.log_coefficients[..self.terms].iter().rev() {
            log_part = log_part * u2 + c;
        }
        let mut power_part = Complex64::new(0.0, 0.0);
        for c in self.power_coefficients[..2 * self.terms - 1].iter().rev() {
            power_part = power_part * u + c;
        }
        (self.log_minus_q - ln_abs_a) * u * log_part - power_part * u
    }

    #[inline]
    fn at(&self, nu: f64, ln_nu: f64) -> f64 {
        if !self.active {
            return 0.0;
        }
        let total = self.j_sum(nu, ln_nu) + self.j_sum(-nu, ln_nu);
        // (2/pi) Re[(i/pi) total]
        (2.0 / PI) * (-total.im / PI)
    }
}

/// Which of a band's terms [`Lineshape::accumulate`] adds: a Gaussian's
/// mirror term at -nu_j varies on the scale of nu itself, so `band_sum`
/// takes it at far fewer nodes than its own term at +nu_j.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Terms {
    All,
    Own,
    Mirror,
}

/// Beyond this |x| a Gaussian's exp(-x^2) is below 3e-17 of its peak.
const GAUSSIAN_NEGLIGIBLE_BEYOND: f64 = 6.2;

impl Lineshape {
    /// Adds chiral * s and mean * s~ at each point to the four sums (Dn, Dk,
    /// mean n, mean k), without keeping the shape. For sums that are
    /// themselves approximations (`band_sum`): a Gaussian's exp(-x^2) is
    /// taken as 0 beyond |x| = 6.2 (below 3e-17 of its peak), which spares
    /// most exp calls; the other shapes are as [`Lineshape::values_with_mean`].
    pub fn accumulate(&self, nu: &[f64], ln_nu: &[f64], chiral: f64, mean: f64, sums: [&mut [f64]; 4], terms: Terms) {
        let [dn, dk, mn, mk] = sums;
        if let Lineshape::Gaussian { center, delta } = *self {
            let g = GaussianTerms::new(center, delta);
            let near = |x: f64| if x.abs() < GAUSSIAN_NEGLIGIBLE_BEYOND { (-x * x).exp() } else { 0.0 };
            // The pair at +nu_j and its mirror at -nu_j (odd in F for the mean index).
            let (own, mirror) = match terms {
                Terms::All => (true, true),
                Terms::Own => (true, false),
                Terms::Mirror => (false, true),
            };
            for (i, x) in nu.iter().enumerate() {
                let (mut f, mut fm, mut gs) = (0.0, 0.0, 0.0);
                if own {
                    let x1 = (x - g.center) * g.inv_delta;
                    let f1 = dawson(x1);
                    (f, fm, gs) = (f1, f1, near(x1));
                }
                if mirror {
                    let x2 = (x + g.center) * g.inv_delta;
                    let f2 = dawson(x2);
                    (f, fm, gs) = (f + f2, fm - f2, gs + near(x2));
                }
                let im = g.im_scale * gs;
                dn[i] += chiral * g.re_scale * f;
                dk[i] += chiral * im;
                mn[i] += mean * g.re_scale * fm;
                mk[i] += mean * im;
            }
            return;
        }
        // Other shapes are not split: their mirror goes with their own part.
        if terms == Terms::Mirror {
            return;
        }
        let (shape, mean_re) = self.values_with_mean(nu, ln_nu);
        add_shape([dn, dk, mn, mk], chiral, mean, &shape, &mean_re);
    }
}

/// Adds chiral * s and mean * s~ (its Re the given mean dispersion, its Im
/// Im s) to the four sums Dn, Dk, mean n, mean k: the one loop every band of
/// `spectra` and `band_sum` runs.
pub fn add_shape(sums: [&mut [f64]; 4], chiral: f64, mean: f64, shape: &[Complex64], mean_dispersion: &[f64]) {
    let [dn, dk, mn, mk] = sums;
    // Zipped, not indexed: no bounds check in the loop.
    let out = dn.iter_mut().zip(dk.iter_mut()).zip(mn.iter_mut().zip(mk.iter_mut()));
    for (((dn, dk), (mn, mk)), (s, m)) in out.zip(shape.iter().zip(mean_dispersion)) {
        *dn += chiral * s.re;
        *dk += chiral * s.im;
        *mn += mean * m;
        *mk += mean * s.im;
    }
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

/// ln(nu) of each grid point, for [`Lineshape::values_with_mean`].
pub fn ln_grid(nu: &[f64]) -> Vec<f64> {
    nu.iter().map(|x| x.ln()).collect()
}

/// The one-term Drude law every chiral shape tends to far from its band.
pub fn drude(center: f64, nu: f64) -> f64 {
    2.0 / PI * nu / (center * center - nu * nu)
}

/// The Sellmeier-like law every mean shape tends to far from its band.
pub fn sellmeier_like(center: f64, nu: f64) -> f64 {
    2.0 / PI * center / (center * center - nu * nu)
}

/// A chiral shape and its derivatives with respect to the band's own
/// parameters, for fitting: d/d(centre), d/d(FWHM) and, for the Voigt,
/// d/d(Lorentzian FWHM) (all per cm^-1).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ShapeDerivatives {
    pub value: Complex64,
    pub d_center: Complex64,
    pub d_fwhm: Complex64,
    pub d_lorentz_fwhm: Complex64,
}

/// w'(z) = -2 z w(z) + 2i/sqrt(pi) (from w(z) = exp(-z^2) erfc(-iz)).
fn faddeeva_derivative(z: Complex64, w: Complex64) -> Complex64 {
    -2.0 * z * w + Complex64::new(0.0, 2.0 / PI.sqrt())
}

impl Lineshape {
    /// s(nu) and its parameter derivatives, in closed form.
    pub fn derivatives(&self, nu: f64) -> ShapeDerivatives {
        let zero = Complex64::new(0.0, 0.0);
        match *self {
            Lineshape::Lorentz { center, gamma } => {
                // s = (2/pi) nu / D, D = nu_j^2 - nu^2 - i gamma nu.
                let d = Complex64::new(center * center - nu * nu, -gamma * nu);
                let value = (2.0 / PI) * nu / d;
                let d2 = d * d;
                ShapeDerivatives {
                    value,
                    d_center: -(2.0 / PI) * nu * 2.0 * center / d2,
                    d_fwhm: (2.0 / PI) * nu * Complex64::new(0.0, nu) / d2,
                    d_lorentz_fwhm: zero,
                }
            }
            Lineshape::Gaussian { center, delta } => voigt_derivatives(center, delta, 0.0, nu, false),
            Lineshape::Voigt { center, delta, lorentz_fwhm } => voigt_derivatives(center, delta, lorentz_fwhm, nu, true),
        }
    }
}

/// One part of s (Im: CD and absorption; Re: ORD) and its parameter
/// derivatives, for fitting, where each point needs only one part.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PartDerivatives {
    pub value: f64,
    pub d_center: f64,
    pub d_fwhm: f64,
    pub d_lorentz_fwhm: f64,
}

impl Lineshape {
    /// Im s (`imaginary`) or Re s at nu: a Gaussian's Im part needs only
    /// exp, its Re part only Dawson.
    #[inline]
    pub fn part(&self, nu: f64, imaginary: bool) -> f64 {
        match *self {
            Lineshape::Gaussian { center, delta } => GaussianTerms::new(center, delta).part(nu, imaginary),
            _ => {
                let v = self.value(nu);
                if imaginary {
                    v.im
                } else {
                    v.re
                }
            }
        }
    }

    /// [`Lineshape::part`] with its derivatives; a Gaussian's in real
    /// arithmetic from w(x) = exp(-x^2) + (2i/sqrt(pi)) F(x) and
    /// w' = -2 x w + 2i/sqrt(pi), the same expressions as
    /// [`Lineshape::derivatives`] takes in complex numbers.
    #[inline]
    pub fn part_derivatives(&self, nu: f64, imaginary: bool) -> PartDerivatives {
        if let Lineshape::Gaussian { center, delta } = *self {
            return GaussianTerms::new(center, delta).part_derivatives(nu, imaginary);
        }
        let d = self.derivatives(nu);
        let pick = |z: Complex64| if imaginary { z.im } else { z.re };
        PartDerivatives { value: pick(d.value), d_center: pick(d.d_center), d_fwhm: pick(d.d_fwhm), d_lorentz_fwhm: pick(d.d_lorentz_fwhm) }
    }
}

impl GaussianTerms {
    /// A Gaussian's part: with x1,2 = (nu -+ nu_j)/Delta and k = 1/(sqrt(pi) Delta),
    /// Im s = k (G1 + G2) and Re s = -(2/sqrt(pi)) k (F1 + F2); Re w' = -2 x G,
    /// Im w' = (2/sqrt(pi)) (1 - 2 x F).
    #[inline(always)]
    fn part_derivatives(&self, nu: f64, imaginary: bool) -> PartDerivatives {
        let inv = self.inv_delta;
        let (x1, x2) = ((nu - self.center) * inv, (nu + self.center) * inv);
        let (value, d_center, spread) = if imaginary {
            let (k, g1, g2) = (self.im_scale, gauss(x1), gauss(x2));
            // Im[i k (w2' - w1')] / Delta and the x Re w' sum of d/dDelta.
            (k * (g1 + g2), k * 2.0 * (x1 * g1 - x2 * g2) * inv, k * 2.0 * (x1 * x1 * g1 + x2 * x2 * g2) * inv)
        } else {
            let (f1, f2) = (dawson(x1), dawson(x2));
            // re_scale = -(2/sqrt(pi)) k.
            let (m, i1, i2) = (self.re_scale, 1.0 - 2.0 * x1 * f1, 1.0 - 2.0 * x2 * f2);
            (m * (f1 + f2), m * (i2 - i1) * inv, -m * (x1 * i1 + x2 * i2) * inv)
        };
        // d/dDelta = -value/Delta + spread; d/dFWHM through Delta = FWHM/(2 sqrt(ln 2)).
        let d_fwhm = (-value * inv + spread) * gaussian_delta_from_fwhm(1.0);
        PartDerivatives { value, d_center, d_fwhm, d_lorentz_fwhm: 0.0 }
    }
}

/// One part of a shape and its derivatives at many wavenumbers, a column
/// each (the fit's Jacobian takes them column by column).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PartColumns {
    pub value: Vec<f64>,
    pub d_center: Vec<f64>,
    pub d_fwhm: Vec<f64>,
    pub d_lorentz_fwhm: Vec<f64>,
}

impl PartColumns {
    /// The columns at every nu from one point's derivatives.
    #[inline(always)]
    fn fill(&mut self, nu: &[f64], at: impl Fn(f64) -> PartDerivatives) {
        for column in [&mut self.value, &mut self.d_center, &mut self.d_fwhm, &mut self.d_lorentz_fwhm] {
            column.resize(nu.len(), 0.0);
        }
        let columns = self.value.iter_mut().zip(self.d_center.iter_mut()).zip(self.d_fwhm.iter_mut()).zip(self.d_lorentz_fwhm.iter_mut());
        for ((((v, c), w), l), &x) in columns.zip(nu) {
            let d = at(x);
            (*v, *c, *w, *l) = (d.value, d.d_center, d.d_fwhm, d.d_lorentz_fwhm);
        }
    }
}

impl Lineshape {
    /// [`Lineshape::part_derivatives`] at every nu, into `out`'s columns:
    /// the shape and the part are chosen once, not per point.
    pub fn part_columns(&self, nu: &[f64], imaginary: bool, out: &mut PartColumns) {
        match (*self, imaginary) {
            (Lineshape::Gaussian { center, delta }, true) => {
                let g = GaussianTerms::new(center, delta);
                out.fill(nu, |x| g.part_derivatives(x, true));
            }
            (Lineshape::Gaussian { center, delta }, false) => {
                let g = GaussianTerms::new(center, delta);
                out.fill(nu, |x| g.part_derivatives(x, false));
            }
            _ => out.fill(nu, |x| self.part_derivatives(x, imaginary)),
        }
    }

    /// sums[i] += strength * (Im or Re of s at nu[i]), the shape and the part chosen once.
    pub fn add_part(&self, nu: &[f64], imaginary: bool, strength: f64, sums: &mut [f64]) {
        let points = sums.iter_mut().zip(nu);
        match (*self, imaginary) {
            (Lineshape::Gaussian { center, delta }, true) => {
                let g = GaussianTerms::new(center, delta);
                points.for_each(|(s, &x)| *s += strength * g.part(x, true));
            }
            (Lineshape::Gaussian { center, delta }, false) => {
                let g = GaussianTerms::new(center, delta);
                points.for_each(|(s, &x)| *s += strength * g.part(x, false));
            }
            _ => points.for_each(|(s, &x)| *s += strength * self.part(x, imaginary)),
        }
    }
}

/// s = i/(sqrt(pi) Delta) [w(z1) + w(z2)], z1,2 = (nu -+ nu_j + i G_L/2)/Delta,
/// Delta = FWHM / (2 sqrt(ln 2)).
fn voigt_derivatives(center: f64, delta: f64, lorentz_fwhm: f64, nu: f64, voigt: bool) -> ShapeDerivatives {
    let y = lorentz_fwhm / 2.0 / delta;
    let z1 = Complex64::new((nu - center) / delta, y);
    let z2 = Complex64::new((nu + center) / delta, y);
    // On the real axis (a Gaussian) w(x) = exp(-x^2) + (2i/sqrt(pi)) F(x): no
    // complex Faddeeva call.
    let real_axis = |x: f64| Complex64::new(gauss(x), 2.0 / PI.sqrt() * dawson(x));
    let (w1, w2) = if voigt { (faddeeva(z1), faddeeva(z2)) } else { (real_axis(z1.re), real_axis(z2.re)) };
    let (dw1, dw2) = (faddeeva_derivative(z1, w1), faddeeva_derivative(z2, w2));
    let pre = Complex64::new(0.0, 1.0 / (PI.sqrt() * delta));
    let value = pre * (w1 + w2);
    // dz1/dnu_j = -1/Delta, dz2/dnu_j = +1/Delta; dz/dDelta = -z/Delta; dz/dG_L = i/(2 Delta).
    let d_center = pre * (dw2 - dw1) / delta;
    let d_delta = -value / delta - pre * (dw1 * z1 + dw2 * z2) / delta;
    let d_fwhm = d_delta * gaussian_delta_from_fwhm(1.0);
    let d_lorentz_fwhm = if voigt { pre * (dw1 + dw2) * Complex64::new(0.0, 0.5 / delta) } else { Complex64::new(0.0, 0.0) };
    ShapeDerivatives { value, d_center, d_fwhm, d_lorentz_fwhm }
}
