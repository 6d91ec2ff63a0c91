//! Numerical Kramers-Kronig transforms between the circular birefringence
//! Dn (odd in nu) and the circular extinction Dk (even in nu):
//!
//!   Dn(nu) =  (2 nu / pi) P int_0^inf Dk(nu') / (nu'^2 - nu^2) dnu'
//!   Dk(nu) = -(2 / pi)    P int_0^inf nu' Dn(nu') / (nu'^2 - nu^2) dnu'
//!
//! The sampled function is taken as piecewise linear between grid points and
//! zero outside the grid; each segment's principal-value integral is done in
//! closed form, so the result is exact for that interpolant.

use std::f64::consts::PI;

/// P int f(x) / (x - t) dx over the piecewise-linear interpolant of (x, f).
/// x must be strictly increasing.
fn principal_value(x: &[f64], f: &[f64], t: f64) -> f64 {
    // On [a, b] with f = fa + m (x - a):
    //   int f/(x - t) = m (b - a) + (fa + m (t - a)) (ln|b - t| - ln|a - t|)
    // The log at a node that coincides with t cancels between its two
    // segments (f is continuous), so it is dropped.
    if x.len() < 2 {
        return 0.0;
    }
    let ln_abs = |v: f64| if v == 0.0 { 0.0 } else { v.abs().ln() };
    let mut total = 0.0;
    let mut ln_a = ln_abs(x[0] - t);
    for k in 0..x.len() - 1 {
        let (a, b) = (x[k], x[k + 1]);
        let m = (f[k + 1] - f[k]) / (b - a);
        let ln_b = ln_abs(b - t);
        total += m * (b - a) + (f[k] + m * (t - a)) * (ln_b - ln_a);
        ln_a = ln_b;
    }
    total
}

/// Circular birefringence Dn at each `at` wavenumber from Dk sampled on `nu`.
pub fn delta_n_from_delta_k(nu: &[f64], delta_k: &[f64], at: &[f64]) -> Vec<f64> {
    at.iter()
        .map(|&t| (principal_value(nu, delta_k, t) - principal_value(nu, delta_k, -t)) / PI)
        .collect()
}

/// Circular extinction Dk at each `at` wavenumber from Dn sampled on `nu`.
pub fn delta_k_from_delta_n(nu: &[f64], delta_n: &[f64], at: &[f64]) -> Vec<f64> {
    at.iter()
        .map(|&t| -(principal_value(nu, delta_n, t) + principal_value(nu, delta_n, -t)) / PI)
        .collect()
}
