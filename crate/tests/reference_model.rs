//! The whole model against an independent implementation: the invented demo
//! document fixtures/demo/demo.json evaluated by chiroptic and compared, column
//! by column, with fixtures/reference/demo_spectra_scipy.csv, which
//! fixtures/reference/make_reference.py computes with NumPy/SciPy straight
//! from the equations of shared/design/physics.md (constants from
//! scipy.constants, Gaussian through scipy.special.wofz, Voigt through wofz,
//! water Sellmeier preset) on 182..650 nm (the preset's range starts at 182 nm) in 1 nm steps plus the seven lamp
//! lines.
//!
//! Tolerance, per column: |rust - scipy| <= 1e-12 |scipy| + 1e-12 max|column|.
//! Both sides are float64 evaluations of the same closed forms, whose special
//! functions agree to ~1e-14 (see reference_functions.rs) and whose
//! constants are the same exact CODATA values, so a few ulps of rounding per
//! operation is all that may differ: 1e-12 leaves a wide margin for that. The
//! absolute floor (1e-12 of the column's largest magnitude) covers points where
//! a column crosses zero as bands cancel (Dn, De, g between Cotton lobes),
//! where relative error alone is meaningless. Any physics mistake (a factor
//! of 2 or pi, a sign, a width convention, the wrong Sellmeier term) moves the
//! results by far more than 1e-12.

use chiroptic::units::CdUnit;
use chiroptic::{evaluate, Model, Spectra};
use std::collections::HashMap;

const DEMO: &str = include_str!("../../fixtures/demo/demo.json");
const REFERENCE: &str = include_str!("../../fixtures/reference/demo_spectra_scipy.csv");

const RTOL: f64 = 1e-12;
const FLOOR_OF_MAX: f64 = 1e-12;

/// The reference table as named columns (comment lines start with '#').
fn reference_columns() -> HashMap<String, Vec<f64>> {
    let mut lines = REFERENCE.lines().filter(|l| !l.starts_with('#'));
    let names: Vec<String> = lines.next().expect("header").split(',').map(str::to_string).collect();
    let mut cols: Vec<Vec<f64>> = vec![Vec::new(); names.len()];
    for line in lines {
        let fields: Vec<&str> = line.split(',').collect();
        assert_eq!(fields.len(), names.len(), "bad row {line}");
        for (col, f) in cols.iter_mut().zip(fields) {
            col.push(f.parse().unwrap_or_else(|_| panic!("bad number {f}")));
        }
    }
    names.into_iter().zip(cols).collect()
}

fn compare(name: &str, got: &[f64], want: &[f64], wavelength_nm: &[f64]) -> f64 {
    assert_eq!(got.len(), want.len(), "{name}: length");
    let scale = want.iter().filter(|v| !v.is_nan()).fold(0.0_f64, |m, v| m.max(v.abs()));
    assert!(scale > 0.0 && scale.is_finite(), "{name}: reference column is empty or zero");
    let mut worst = 0.0_f64;
    for ((g, w), nm) in got.iter().zip(want).zip(wavelength_nm) {
        // A missing value (g where there is no absorption) must be missing on both sides.
        if w.is_nan() || g.is_nan() {
            assert!(w.is_nan() && g.is_nan(), "{name} at {nm} nm: chiroptic {g:e}, NumPy/SciPy {w:e} (one is missing)");
            continue;
        }
        let err = (g - w).abs();
        let allowed = RTOL * w.abs() + FLOOR_OF_MAX * scale;
        assert!(err <= allowed, "{name} at {nm} nm: chiroptic {g:e}, NumPy/SciPy {w:e} (difference {err:e}, allowed {allowed:e})");
        worst = worst.max(err / (w.abs() + scale * FLOOR_OF_MAX / RTOL));
    }
    worst
}

fn demo_spectra(nu: &[f64]) -> Spectra {
    let model = Model::from_json(DEMO).expect("demo document is valid");
    evaluate(&model, nu).expect("demo evaluates")
}

#[test]
fn demo_document_matches_numpy_scipy_model() {
    let reference = reference_columns();
    let col = |name: &str| -> &Vec<f64> { reference.get(name).unwrap_or_else(|| panic!("reference has no {name}")) };
    let nm = col("wavelength_nm").clone();
    // The grid as the reference wrote it (exact float64), so both sides see the same nu.
    let s = demo_spectra(col("wavenumber_cm1"));
    assert_eq!(s.len(), 476, "469 points of 182..650 nm plus 7 lamp lines");
    assert_eq!(s.bands.len(), 3);

    let cd = |u: CdUnit| s.cd_in(u).expect("CD unit needs nothing the demo lacks");
    let mut checks: Vec<(String, Vec<f64>)> = vec![
        ("n_solvent".into(), s.n_solvent.clone()),
        ("n_left".into(), s.n_left.clone()),
        ("n_right".into(), s.n_right.clone()),
        ("k_left".into(), s.k_left.clone()),
        ("k_right".into(), s.k_right.clone()),
        ("delta_n".into(), s.delta_n.clone()),
        ("delta_k".into(), s.delta_k.clone()),
        ("rotation_deg".into(), s.rotation_deg.clone()),
        ("ellipticity_mdeg".into(), s.ellipticity_mdeg.clone()),
        ("delta_a".into(), cd(CdUnit::DeltaAbsorbance)),
        ("molar_ellipticity".into(), cd(CdUnit::MolarEllipticity)),
        ("delta_epsilon".into(), s.delta_epsilon.clone()),
        ("epsilon".into(), s.epsilon.clone()),
        ("g_factor".into(), s.g_factor.clone()),
        ("specific_rotation".into(), s.specific_rotation().expect("demo has a molar mass")),
        ("molar_rotation".into(), s.molar_rotation()),
    ];
    for j in 0..s.bands.len() {
        checks.push((format!("band{j}_delta_n"), s.band_delta_n(j).unwrap()));
        checks.push((format!("band{j}_delta_epsilon"), s.band_delta_epsilon(j).unwrap()));
        checks.push((format!("band{j}_epsilon"), s.band_epsilon(j).unwrap()));
        checks.push((format!("band{j}_rotation_deg"), s.band_rotation_deg(j).unwrap()));
    }
    // Every reference column but the axis is compared.
    let checked: Vec<&str> = checks.iter().map(|(n, _)| n.as_str()).collect();
    for name in reference.keys() {
        if name != "wavelength_nm" && name != "wavenumber_cm1" {
            assert!(checked.contains(&name.as_str()), "reference column {name} is not compared");
        }
    }
    for (name, got) in &checks {
        let worst = compare(name, got, col(name), &nm);
        eprintln!("{name:>22}: worst scaled error {worst:.1e}");
    }
}

#[test]
fn reference_was_made_from_this_demo() {
    // The table records the numbers it was made from ("# model: {...}"); when
    // the demo's sample or bands change, the table must be made again.
    let line = REFERENCE.lines().find_map(|l| l.strip_prefix("# model: ")).expect("reference records its model");
    let made_from: serde_json::Value = serde_json::from_str(line).expect("model line is JSON");
    let mut demo: serde_json::Value = serde_json::from_str(DEMO).expect("demo is JSON");
    for band in demo["bands"].as_array_mut().expect("bands") {
        band.as_object_mut().expect("band object").remove("name");
    }
    let now = serde_json::json!({"sample": demo["sample"], "bands": demo["bands"]});
    assert_eq!(
        now, made_from,
        "fixtures/demo/demo.json changed since fixtures/reference/demo_spectra_scipy.csv was made: \
         run python3 fixtures/reference/make_reference.py and commit the tables"
    );
}

#[test]
fn demo_grid_is_the_stated_one() {
    // The comparison is only as good as its grid: 1 nm steps over 182..650 nm
    // (deep-UV CD to the red end of polarimetry) and the lamp lines of
    // chiroptic::lines, in the reference's order.
    let reference = reference_columns();
    let nm = &reference["wavelength_nm"];
    let nu = &reference["wavenumber_cm1"];
    for (i, want) in (182..=650).enumerate() {
        assert!((nm[i] - want as f64).abs() < 1e-9, "row {i}: {} nm", nm[i]);
    }
    for (i, line) in chiroptic::lines::STANDARD_LINES.iter().enumerate() {
        assert!((nm[469 + i] - line.wavelength_nm).abs() < 1e-9, "lamp line {}", line.name);
    }
    for (l, n) in nm.iter().zip(nu) {
        assert!((l * n - 1e7).abs() < 1e-6, "axis columns disagree at {l} nm");
    }
}

/// The page's redraw takes unchanged band shapes from the last drawing
/// (`evaluate_reusing`): after an edit of one band's R, of another's centre,
/// of the sample, and on a new grid, the result is `evaluate`'s to the bit,
/// and so matches the SciPy reference as `evaluate` does.
#[test]
fn reusing_the_last_shapes_gives_evaluates_numbers_exactly() {
    use chiroptic::spectra::evaluate_reusing;
    let nu: Vec<f64> = (0..400).map(|i| 1e7 / (190.0 + 0.5 * i as f64)).collect();
    let doc = chiroptic::Document::from_json(DEMO).unwrap();
    let before = evaluate(&Model::from_document(&doc).unwrap(), &nu).unwrap();
    let mut edited = doc.clone();
    edited.bands[0].rotatory_strength_1e40_cgs *= -2.0;
    edited.bands[1].center_nm += 3.0;
    edited.sample.concentration_mol_per_l *= 1.5;
    let model = Model::from_document(&edited).unwrap();
    let reused = evaluate_reusing(&model, &nu, Some(&before)).unwrap();
    assert_eq!(reused, evaluate(&model, &nu).unwrap());
    assert_eq!(reused.bands[2].shape, before.bands[2].shape, "an untouched band keeps its shape");
    assert_ne!(reused.bands[1].shape, before.bands[1].shape, "a moved band gets a new shape");
    let other: Vec<f64> = nu.iter().map(|v| v * 1.001).collect();
    assert_eq!(evaluate_reusing(&model, &other, Some(&before)).unwrap(), evaluate(&model, &other).unwrap());
}
