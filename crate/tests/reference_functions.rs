//! The special functions behind the Gaussian and Voigt shapes, checked
//! against SciPy: `fixtures/reference/faddeeva_scipy.csv` holds
//! scipy.special.wofz and `fixtures/reference/dawson_scipy.csv` holds
//! scipy.special.dawsn, both written by `fixtures/reference/make_reference.py`
//! (which also checks its wofz table against mpmath at 40 digits: worst
//! relative error 1.8e-14 on a subsample).
//!
//! Tolerance: the Faddeeva package that both SciPy and our `errorfunctions`
//! crate derive from aims at about 1e-13 relative error; we allow 1e-13
//! relative to |w| (and to |F| for Dawson), plus an absolute 1e-300 so that
//! exact zeros (exp(-x^2) underflowing) compare equal. A wrong branch, a
//! sign slip or a lost term in any region of the grid gives errors of 1e-3
//! or more, far above this.

use chiroptic::lineshape::{dawson, faddeeva, gaussian_delta_from_fwhm, Lineshape};
use num_complex::Complex64;
use std::f64::consts::PI;

const FADDEEVA_TABLE: &str = include_str!("../../fixtures/reference/faddeeva_scipy.csv");
const DAWSON_TABLE: &str = include_str!("../../fixtures/reference/dawson_scipy.csv");

/// Relative tolerance against the SciPy tables (see the module comment).
const SCIPY_RTOL: f64 = 1e-13;
/// Keeps exact zeros (underflowed exp(-x^2)) comparable.
const TINY: f64 = 1e-300;

/// Rows of a reference CSV: comment lines start with '#', then one header.
fn rows(table: &str, columns: usize) -> Vec<Vec<f64>> {
    let mut lines = table.lines().filter(|l| !l.starts_with('#'));
    let header = lines.next().expect("table has a header");
    assert_eq!(header.split(',').count(), columns, "unexpected header {header}");
    lines
        .map(|l| {
            let v: Vec<f64> = l.split(',').map(|f| f.parse().unwrap_or_else(|_| panic!("bad number in {l}"))).collect();
            assert_eq!(v.len(), columns, "bad row {l}");
            v
        })
        .collect()
}

#[test]
fn faddeeva_matches_scipy_wofz() {
    // Reference: scipy.special.wofz (table made by fixtures/reference/make_reference.py).
    let table = rows(FADDEEVA_TABLE, 4);
    assert!(table.len() > 4000, "table too short: {}", table.len());
    assert!(table.iter().any(|r| r[1] == 0.0), "table must cover the real axis");
    assert!(table.iter().any(|r| r[0].abs() >= 1e5), "table must cover large |x|");
    let mut worst = (0.0_f64, 0.0, 0.0);
    for r in &table {
        let (x, y) = (r[0], r[1]);
        let want = Complex64::new(r[2], r[3]);
        let got = faddeeva(Complex64::new(x, y));
        let err = (got - want).norm() / (want.norm() + TINY);
        if err > worst.0 {
            worst = (err, x, y);
        }
        assert!(err <= SCIPY_RTOL, "w({x} + {y}i): chiroptic {got}, SciPy {want}, relative error {err:.3e}");
    }
    eprintln!("faddeeva vs scipy.special.wofz: worst relative error {:.2e} at x={} y={}", worst.0, worst.1, worst.2);
}

#[test]
fn faddeeva_real_part_on_the_real_axis_is_the_gaussian() {
    // On the real axis Re w carries the Gaussian absorption, and it is tiny
    // beside Im w in the wings, so the modulus check above cannot see it.
    // Check it on its own, relative to itself, where it is not underflowed.
    // Reference: scipy.special.wofz table.
    let table = rows(FADDEEVA_TABLE, 4);
    let mut checked = 0;
    for r in table.iter().filter(|r| r[1] == 0.0 && r[2] > 1e-290) {
        let got = faddeeva(Complex64::new(r[0], 0.0)).re;
        let err = (got - r[2]).abs() / r[2];
        assert!(err <= 1e-12, "Re w({}): chiroptic {got}, SciPy {}, relative error {err:.3e}", r[0], r[2]);
        checked += 1;
    }
    assert!(checked > 50, "only {checked} real-axis points checked");
}

#[test]
fn dawson_matches_scipy_dawsn() {
    // Reference: scipy.special.dawsn (table made by fixtures/reference/make_reference.py).
    let table = rows(DAWSON_TABLE, 2);
    assert!(table.len() > 1000, "table too short: {}", table.len());
    assert!(table.iter().any(|r| r[0] == 0.0), "table must hold x = 0");
    assert!(table.iter().any(|r| r[0] >= 1e100), "table must cover large x");
    let mut worst = (0.0_f64, 0.0);
    for r in &table {
        let (x, want) = (r[0], r[1]);
        let got = dawson(x);
        let err = (got - want).abs() / (want.abs() + TINY);
        if err > worst.0 {
            worst = (err, x);
        }
        assert!(err <= SCIPY_RTOL, "F({x}): chiroptic {got}, SciPy {want}, relative error {err:.3e}");
    }
    eprintln!("dawson vs scipy.special.dawsn: worst relative error {:.2e} at x={}", worst.0, worst.1);
}

/// The Gaussian shape as physics.md defines it:
/// s = i/(sqrt(pi) Delta) [w((nu - nu_j)/Delta) + w((nu + nu_j)/Delta)].
fn gaussian_by_faddeeva(center: f64, fwhm: f64, nu: f64, lorentz_fwhm: f64) -> Complex64 {
    let delta = gaussian_delta_from_fwhm(fwhm);
    let y = lorentz_fwhm / 2.0 / delta;
    let sum = faddeeva(Complex64::new((nu - center) / delta, y)) + faddeeva(Complex64::new((nu + center) / delta, y));
    Complex64::new(0.0, 1.0) / (PI.sqrt() * delta) * sum
}

/// Wavenumbers from far below to far above a band, through its centre.
fn sweep(center: f64, fwhm: f64) -> Vec<f64> {
    let mut nu: Vec<f64> = (1..=400).map(|i| center * 3.0 * i as f64 / 400.0).collect();
    nu.extend((-80..=80).map(|i| center + fwhm * i as f64 / 20.0));
    nu.push(center);
    nu
}

#[test]
fn gaussian_closed_form_equals_faddeeva_form() {
    // physics.md: on the real axis w(x) = exp(-x^2) + (2i/sqrt(pi)) F(x)
    // (DLMF 7.5.1 with 7.2.5), so Im s = normalised Gaussians and
    // Re s = -(2/(pi Delta)) [F(x1) + F(x2)]. The core uses this cheaper form.
    for (center, fwhm) in [(50_000.0, 3000.0), (33_333.3, 2600.0), (20_000.0, 150.0), (1000.0, 900.0)] {
        let shape = Lineshape::gaussian(center, fwhm);
        for nu in sweep(center, fwhm) {
            let got = shape.value(nu);
            let want = gaussian_by_faddeeva(center, fwhm, nu, 0.0);
            let err = (got - want).norm() / want.norm();
            assert!(err <= 1e-13, "Gaussian {center}/{fwhm} at {nu}: closed form {got}, Faddeeva form {want}, rel {err:.2e}");
            // The absorption part on its own (it is small beside Re s in the wings).
            if want.im > 1e-280 {
                let err_im = (got.im - want.im).abs() / want.im;
                assert!(err_im <= 1e-12, "Gaussian Im s at {nu}: {} vs {}, rel {err_im:.2e}", got.im, want.im);
            }
        }
    }
}

#[test]
fn voigt_shape_is_the_faddeeva_form_with_shifted_argument() {
    // physics.md: the Voigt shape is the Gaussian one with +i Gamma_L/(2 Delta)
    // added to both arguments.
    for (center, fwhm, lorentz) in [(50_000.0, 3000.0, 1200.0), (40_000.0, 500.0, 4000.0), (25_000.0, 2000.0, 10.0)] {
        let shape = Lineshape::voigt(center, fwhm, lorentz);
        for nu in sweep(center, fwhm) {
            let got = shape.value(nu);
            let want = gaussian_by_faddeeva(center, fwhm, nu, lorentz);
            let err = (got - want).norm() / want.norm();
            assert!(err <= 1e-14, "Voigt at {nu}: {got} vs {want}, rel {err:.2e}");
        }
    }
}

#[test]
fn voigt_tends_to_gaussian_as_lorentz_width_vanishes() {
    // With Gamma_L = 0 the Voigt shape is the Gaussian one; for small Gamma_L
    // it moves away linearly, with slope d s/d Gamma_L =
    // i/(sqrt(pi) Delta) * (i/(2 Delta)) [w'(x1) + w'(x2)], where
    // w'(z) = -2 z w(z) + 2i/sqrt(pi) (DLMF 7.10.2).
    let (center, fwhm) = (40_000.0, 2500.0);
    let delta = gaussian_delta_from_fwhm(fwhm);
    let gaussian = Lineshape::gaussian(center, fwhm);
    let i = Complex64::new(0.0, 1.0);
    let w_prime = |z: Complex64| -2.0 * z * faddeeva(z) + 2.0 * i / PI.sqrt();
    for nu in sweep(center, fwhm) {
        let g = gaussian.value(nu);
        let v0 = Lineshape::voigt(center, fwhm, 0.0).value(nu);
        assert!((v0 - g).norm() <= 1e-13 * g.norm(), "Voigt(0) at {nu}: {v0} vs Gaussian {g}");

        let x1 = Complex64::new((nu - center) / delta, 0.0);
        let x2 = Complex64::new((nu + center) / delta, 0.0);
        let slope = i / (PI.sqrt() * delta) * (i / (2.0 * delta)) * (w_prime(x1) + w_prime(x2));
        let mut previous = f64::INFINITY;
        for lorentz in [10.0, 1.0, 0.1] {
            let v = Lineshape::voigt(center, fwhm, lorentz).value(nu);
            let diff = (v - g).norm();
            // Shrinks as Gamma_L does (allowing for rounding once it is tiny)...
            assert!(diff <= previous / 5.0 + 1e-15 * g.norm(), "no convergence at {nu}: {diff} after {previous}");
            previous = diff;
            // ... along the predicted slope, to first order (the second-order
            // term is about Gamma_L/Delta times smaller).
            let predicted = g + slope * lorentz;
            let second_order = 4.0 * (lorentz / delta).powi(2) * g.norm().max(slope.norm() * delta);
            assert!(
                (v - predicted).norm() <= second_order + 1e-13 * g.norm(),
                "Voigt({lorentz}) at {nu}: {v}, first-order prediction {predicted}"
            );
        }
    }
}

#[test]
fn tabulated_dawson_matches_the_library_everywhere() {
    // chiroptic evaluates F(x) from a Taylor table (|x| < 20) and an
    // asymptotic series (|x| >= 20), both built on the library routine that
    // the SciPy table above validates. A dense sweep across both regimes,
    // node midpoints and the hand-over at 20 shows they agree with it.
    use chiroptic::lineshape::dawson_reference;
    let mut worst = (0.0_f64, 0.0);
    for i in 0..=400_000 {
        let x = -30.0 + 60.0 * i as f64 / 400_000.0 + 1.0 / 128.0;
        let (got, want) = (dawson(x), dawson_reference(x));
        let err = (got - want).abs() / (want.abs() + TINY);
        if err > worst.0 {
            worst = (err, x);
        }
    }
    assert!(worst.0 < 1e-14, "worst relative error {:.3e} at x = {}", worst.0, worst.1);
    for x in [0.0, -0.0, 1e-300, 19.999_999_999, 20.0, 1e300, f64::INFINITY] {
        let (got, want) = (dawson(x), dawson_reference(x));
        assert!((got - want).abs() <= 1e-14 * want.abs(), "F({x}) = {got}, library {want}");
    }
    assert!(dawson(f64::NAN).is_nan());
}
