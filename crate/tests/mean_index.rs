//! The mean (achiral) refractive index: the even-type shape s~ of each band
//! against a direct quadrature of the n-k Kramers-Kronig transform of its
//! absorption shape, and its Sellmeier-like far wing.
//!
//! Reference: fixtures/reference/mean_dispersion_scipy.csv, made by
//! fixtures/reference/make_reference.py with scipy.integrate.quad (QUADPACK,
//! Cauchy weight for the principal value) of
//! (2/pi) P int_0^inf nu' Im s(nu') / (nu'^2 - nu^2) dnu' (physics.md, "From
//! bands to n_L and n_R"), Im s written from physics.md, not from the Rust code.

use chiroptic::lineshape::{sellmeier_like, Lineshape};
use chiroptic::{evaluate, Model};

const TABLE: &str = include_str!("../../fixtures/reference/mean_dispersion_scipy.csv");

struct Case {
    shape: String,
    center: f64,
    fwhm: f64,
    lorentz: f64,
    points: Vec<(f64, f64)>,
}

fn cases() -> Vec<Case> {
    let mut out: Vec<Case> = Vec::new();
    for line in TABLE.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let num = |i: usize| f[i].parse::<f64>().unwrap_or_else(|_| panic!("bad number in {line}"));
        let (center, fwhm, lorentz) = (num(1), num(2), num(3));
        let same = out.last().is_some_and(|c| c.shape == f[0] && c.center == center && c.fwhm == fwhm && c.lorentz == lorentz);
        if !same {
            out.push(Case { shape: f[0].to_string(), center, fwhm, lorentz, points: Vec::new() });
        }
        out.last_mut().expect("case").points.push((num(4), num(5)));
    }
    out
}

fn lineshape(c: &Case) -> Lineshape {
    match c.shape.as_str() {
        "lorentz" => Lineshape::lorentz(c.center, c.fwhm),
        "gaussian" => Lineshape::gaussian(c.center, c.fwhm),
        "voigt" => Lineshape::voigt(c.center, c.fwhm, c.lorentz),
        other => panic!("unknown shape {other}"),
    }
}

#[test]
fn mean_shape_is_the_nk_transform_of_the_absorption_shape() {
    let cases = cases();
    assert_eq!(cases.len(), 8, "three Lorentz, two Gaussian and three Voigt bands in the table");
    for c in &cases {
        let shape = lineshape(c);
        let peak = c.points.iter().fold(0.0_f64, |m, (_, v)| m.max(v.abs()));
        // Closed forms (Lorentz: partial fractions; Gaussian: Dawson; Voigt:
        // Faddeeva plus the mirror wing's series) against QUADPACK. The issue
        // asks 1e-6 of the quadrature for the Voigt; all three reach 1e-9.
        for (nu, want) in &c.points {
            let got = shape.mean_dispersion(*nu);
            assert!(
                (got - want).abs() <= 1e-9 * peak,
                "{} at {} cm-1 (centre {}, fwhm {}, lorentz {}): {got:e} vs quadrature {want:e}",
                c.shape,
                nu,
                c.center,
                c.fwhm,
                c.lorentz
            );
        }
        // The grid and the whole-grid path give the same numbers.
        let nus: Vec<f64> = c.points.iter().map(|p| p.0).collect();
        let (_, grid) = shape.values_with_mean(&nus, &chiroptic::lineshape::ln_grid(&nus));
        for (g, nu) in grid.iter().zip(&nus) {
            assert_eq!(*g, shape.mean_dispersion(*nu), "{} grid path at {nu}", c.shape);
        }
    }
}

#[test]
fn chiral_shape_is_unchanged_by_the_mean_shape() {
    // CD and ORD come from the odd-type s alone: the one-pass grid path must
    // give exactly the values of Lineshape::value, bit for bit.
    let nus: Vec<f64> = (0..400).map(|i| 10_000.0 + 150.0 * i as f64).collect();
    for shape in [Lineshape::lorentz(40_000.0, 3000.0), Lineshape::gaussian(33_000.0, 2600.0), Lineshape::voigt(50_000.0, 3000.0, 1200.0)] {
        let (s, _) = shape.values_with_mean(&nus, &chiroptic::lineshape::ln_grid(&nus));
        for (got, nu) in s.iter().zip(&nus) {
            let want = shape.value(*nu);
            assert!(got.re.to_bits() == want.re.to_bits() && got.im.to_bits() == want.im.to_bits(), "{shape:?} at {nu}");
        }
    }
}

#[test]
fn far_from_the_band_the_mean_shape_is_sellmeier_like() {
    // physics.md: far from a band Re s~ tends to (2/pi) nu_j / (nu_j^2 - nu^2)
    // (exactly for the Gaussian, up to its second-moment excess ~ 3 sigma^2/nu_j^2;
    // for the damped oscillator to O(Gamma/nu_j)); the chiral shape's
    // (2/pi) nu/(nu_j^2 - nu^2) would be 10x smaller at nu = nu_j/10.
    let center = 40_000.0;
    let fwhm = 2000.0;
    let sigma = fwhm / (8.0 * std::f64::consts::LN_2).sqrt();
    for nu in [1000.0, 4000.0, 12_000.0] {
        let want = sellmeier_like(center, nu);
        let g = Lineshape::gaussian(center, fwhm).mean_dispersion(nu);
        assert!((g / want - 1.0).abs() < 3.0 * (sigma / center).powi(2) * 2.0, "Gaussian at {nu}: {g:e} vs {want:e}");
        let l = Lineshape::lorentz(center, fwhm).mean_dispersion(nu);
        assert!((l / want - 1.0).abs() < fwhm / center, "Lorentz at {nu}: {l:e} vs {want:e}");
        let v = Lineshape::voigt(center, fwhm, 500.0).mean_dispersion(nu);
        assert!((v / want - 1.0).abs() < (fwhm + 500.0) / center, "Voigt at {nu}: {v:e} vs {want:e}");
    }
    // It does not fall to zero at long wavelength as the odd shape does
    // (their ratio there is nu_j/nu = 40).
    let odd = Lineshape::gaussian(center, fwhm).value(1000.0).re;
    let even = Lineshape::gaussian(center, fwhm).mean_dispersion(1000.0);
    assert!((even / odd / 40.0 - 1.0).abs() < 1e-3, "even {even:e}, odd {odd:e}");
}

#[test]
fn solute_raises_the_index_at_sodium_d_by_the_sellmeier_amount() {
    // One Gaussian band far in the UV: the solute's n - n_solvent at 589.3 nm
    // is mean_scale * D * (2/pi) nu_j/(nu_j^2 - nu^2) (physics.md), to the
    // Gaussian's small second-moment excess, and positive (normal dispersion).
    let doc = r#"{"chiroptic":1,"sample":{"concentration_mol_per_l":0.05,"path_length_cm":1,
        "solvent":{"constant":1.333}},
        "bands":[{"name":"UV","shape":"gaussian","center_nm":200,"fwhm_cm1":2000,
        "rotatory_strength_1e40_cgs":0,"dipole_strength_debye2":10}]}"#;
    let model = Model::from_json(doc).expect("valid");
    let nu = 1e7 / 589.3;
    let s = evaluate(&model, &[nu]).expect("evaluates");
    let dn = (s.n_left[0] + s.n_right[0]) / 2.0 - 1.333;
    let d_esu = 10.0 * 1e-36; // debye^2 -> esu^2 cm^2 (physics.md)
    let want = chiroptic::spectra::mean_scale(0.05) * d_esu * sellmeier_like(5e4, nu);
    assert!(dn > 0.0 && (dn / want - 1.0).abs() < 1e-3, "n - n_solvent = {dn:e}, Sellmeier-like {want:e}");
}
