//! Fitting: the analytic Jacobian against finite differences; the minimum
//! against scipy.optimize.least_squares on the same problem and start
//! (fixtures/fit/make_fit_reference.py); recovery of invented truth with
//! honest standard errors; links and bounds; the quartz rotation table;
//! D fixed without absorption data.

use chiroptic::data::{data_set_doc, data_sets, DataSet};
use chiroptic::document::{Document, FitDoc, FitLinkDoc, FitParameterDoc, ReadingDoc, SourceDoc};
use chiroptic::fit::lm::Problem;
use chiroptic::fit::params::{Layout, Mode, Parameter, Target};
use chiroptic::fit::residuals::{FitProblem, Observations};
use chiroptic::fit::{fit, scatter_sigma};
use chiroptic::import::{self, ColumnChoice};
use chiroptic::Model;
use rand::{rngs::SmallRng, RngExt, SeedableRng};

fn fixture(name: &str) -> String {
    std::fs::read_to_string(format!("{}/../fixtures/fit/{name}", env!("CARGO_MANIFEST_DIR"))).expect(name)
}

/// The start document with the two invented measured sets attached.
fn problem_document(start: &str) -> Document {
    let mut doc = Document::from_json(&fixture(start)).expect("doc");
    for (name, file) in [("cd", "cd.csv"), ("ord", "ord.csv")] {
        let table = import::read(&fixture(file), None).expect("reads");
        let r = table.recognise(&ColumnChoice::default()).expect("recognised");
        doc.data.push(data_set_doc(name, &r, SourceDoc::default()));
    }
    doc
}

fn sets(doc: &Document) -> (Model, Vec<DataSet>) {
    let model = Model::from_document(doc).expect("model");
    let sets = data_sets(doc, &model).expect("sets");
    (model, sets)
}

fn run(doc: &Document) -> chiroptic::fit::Fitted {
    let (model, sets) = sets(doc);
    fit(doc, &model, &sets, &mut |_, _, _| true).expect("fit")
}

#[test]
fn analytic_jacobian_matches_finite_differences() {
    // Every lineshape and every kind of parameter, against central differences.
    let text = r#"{"chiroptic":1,"sample":{"concentration_mol_per_l":0.001,"path_length_cm":1,"solvent":{"constant":1.333}},
      "bands":[{"name":"L","shape":"lorentz","center_nm":300,"fwhm_cm1":2500,"rotatory_strength_1e40_cgs":5,"dipole_strength_debye2":1},
               {"name":"G","shape":"gaussian","center_nm":250,"fwhm_cm1":3000,"rotatory_strength_1e40_cgs":-9,"dipole_strength_debye2":3},
               {"name":"V","shape":"voigt","center_nm":215,"fwhm_cm1":2800,"lorentz_fwhm_cm1":900,"rotatory_strength_1e40_cgs":12,"dipole_strength_debye2":5}]}"#;
    let mut doc = Document::from_json(text).expect("doc");
    let model = Model::from_document(&doc).expect("model");
    let x: Vec<f64> = (0..60).map(|i| 195.0 + 3.0 * i as f64).collect();
    let s = chiroptic::evaluate(&model, &x.iter().map(|l| 1e7 / l).collect::<Vec<_>>()).expect("spectra");
    for (name, quantity, unit, y) in [
        ("cd", "cd", "mdeg", s.ellipticity_mdeg.clone()),
        ("ord", "ord", "deg", s.rotation_deg.clone()),
        ("abs", "absorption", "epsilon", s.epsilon.clone()),
    ] {
        let r = import::Recognised {
            axis: chiroptic::units::AxisUnit::Nanometre,
            x: x.clone(),
            measured: import::Measured::parse(quantity, unit).expect("unit"),
            y: y.iter().map(|v| v * 1.1 + 0.01).collect(),
            sd: None,
            ht_v: None,
            label: String::new(),
        };
        doc.data.push(data_set_doc(name, &r, SourceDoc::default()));
    }
    let sets = data_sets(&doc, &model).expect("sets");
    let mut params = Vec::new();
    for (b, band) in model.bands.iter().enumerate() {
        let d = &doc.bands[b];
        params.push(Parameter {
            target: Target::Center(b),
            name: "c".into(),
            start: band.lineshape.center(),
            mode: Mode::Free { min: None, max: None },
        });
        params.push(Parameter {
            target: Target::Fwhm(b),
            name: "w".into(),
            start: d.fwhm_cm1,
            mode: Mode::Free { min: Some(10.0), max: Some(9000.0) },
        });
        params.push(Parameter {
            target: Target::Rotatory(b),
            name: "r".into(),
            start: d.rotatory_strength_1e40_cgs,
            mode: Mode::Free { min: None, max: None },
        });
        params.push(Parameter {
            target: Target::Dipole(b),
            name: "d".into(),
            start: d.dipole_strength_debye2,
            mode: Mode::Free { min: Some(0.0), max: None },
        });
    }
    params.push(Parameter { target: Target::LorentzFwhm(2), name: "l".into(), start: 900.0, mode: Mode::Free { min: None, max: None } });
    params.push(Parameter { target: Target::Shift, name: "s".into(), start: 40.0, mode: Mode::Free { min: None, max: None } });
    for k in 0..3 {
        params.push(Parameter { target: Target::Offset(k), name: "o".into(), start: 0.002, mode: Mode::Free { min: None, max: None } });
        params.push(Parameter { target: Target::Scale(k), name: "k".into(), start: 0.9, mode: Mode::Free { min: None, max: None } });
    }
    let layout = Layout::new(params).expect("layout");
    let weights: Vec<Vec<f64>> = sets.iter().map(|s| vec![1.0 / s.y.iter().fold(0.0_f64, |m, v| m.max(v.abs())); s.y.len()]).collect();
    let problem = FitProblem::new(&doc, &model, layout, &Observations { sets: &sets, weights: &weights, readings: &[] }).expect("problem");
    let u = problem.layout.start();
    let (mut r, mut jac) = (Vec::new(), Vec::new());
    problem.jacobian(&u, &mut r, &mut jac);
    let n = u.len();
    for k in 0..n {
        let h = 1e-5 * u[k].abs().max(1.0);
        let (mut up, mut down) = (u.clone(), u.clone());
        up[k] += h;
        down[k] -= h;
        let (mut rp, mut rm) = (Vec::new(), Vec::new());
        problem.residuals(&up, &mut rp);
        problem.residuals(&down, &mut rm);
        let scale = (0..r.len()).map(|i| jac[k * r.len() + i].abs()).fold(0.0, f64::max);
        for i in 0..r.len() {
            let numeric = (rp[i] - rm[i]) / (2.0 * h);
            assert!(
                (numeric - jac[k * r.len() + i]).abs() <= 1e-5 * scale + 1e-8,
                "variable {k} ({:?}), residual {i}: analytic {} vs numeric {numeric}",
                problem.layout.parameters[problem.layout.free[k].0].target,
                jac[k * r.len() + i]
            );
        }
    }
}

#[test]
fn one_local_fit_reaches_scipys_minimum() {
    // fixtures/fit/scipy_fit.json: scipy.optimize.least_squares ("lm" and
    // "trf", numerical Jacobian) on the same data, weights and start.
    let reference: serde_json::Value = serde_json::from_str(&fixture("scipy_fit.json")).expect("json");
    let mut doc = problem_document("start.json");
    doc.fit = Some(FitDoc { starts: Some(1), ..FitDoc::default() });
    let fitted = run(&doc);
    let report = &fitted.report;
    let chi_ref = reference["lm"]["chi_square"].as_f64().expect("chi2");
    assert!((report.chi_square - chi_ref).abs() <= 1e-6 * chi_ref, "chi2 {} vs SciPy {chi_ref}", report.chi_square);
    let x: Vec<f64> = reference["lm"]["x"].as_array().expect("x").iter().map(|v| v.as_f64().expect("number")).collect();
    let free: Vec<_> = report.parameters.iter().filter(|p| p.mode == "free").collect();
    assert_eq!(free.len(), 9, "centres, widths and R of three bands");
    for (p, want) in free.iter().zip(&x) {
        let se = p.standard_error.expect("se");
        assert!((p.value - want).abs() <= 1e-4 * se, "{}: {} vs SciPy {want} (se {se})", p.name, p.value);
    }
    assert_eq!(report.stop, "converged");
    assert!(report.warnings.iter().any(|w| w.contains("D is not determined")), "{:?}", report.warnings);
}

#[test]
fn the_fit_recovers_the_truth_with_honest_standard_errors() {
    // 50 noise draws (sigma as in make_fit_reference.py) on the invented
    // truth, computed here by chiroptic from truth.json: the estimates scatter
    // as the reported standard errors say (within 30 %), and each draw's
    // estimates lie within 3 standard errors of the truth.
    let truth_doc = Document::from_json(&fixture("truth.json")).expect("truth");
    let truth = Model::from_document(&truth_doc).expect("model");
    let base = problem_document("start.json");
    let (cd_nm, ord_nm) = (base.data[0].clone(), base.data[1].clone());
    let axis = |d: &chiroptic::document::DataSetDoc| chiroptic::data::axis_values(&d.x, "x").expect("axis");
    let (cd_x, ord_x) = (axis(&cd_nm), axis(&ord_nm));
    let cd_true = chiroptic::evaluate(&truth, &cd_x.iter().map(|l| 1e7 / l).collect::<Vec<_>>()).expect("cd").delta_epsilon;
    let ord_true = chiroptic::evaluate(&truth, &ord_x.iter().map(|l| 1e7 / l).collect::<Vec<_>>()).expect("ord").rotation_deg;
    let normal = |rng: &mut SmallRng| -> f64 {
        // Box-Muller.
        let (a, b): (f64, f64) = (rng.random_range(1e-12..1.0), rng.random_range(0.0..1.0));
        (-2.0 * a.ln()).sqrt() * (2.0 * std::f64::consts::PI * b).cos()
    };
    let mut rng = SmallRng::seed_from_u64(7);
    let true_values: Vec<f64> =
        truth_doc.bands.iter().flat_map(|b| [1e7 / b.center_nm, b.fwhm_cm1, b.rotatory_strength_1e40_cgs]).collect();
    let mut estimates: Vec<Vec<f64>> = Vec::new();
    let mut errors: Vec<Vec<f64>> = Vec::new();
    for _ in 0..50 {
        let mut doc = base.clone();
        doc.data[0].y = cd_true.iter().map(|v| v + 0.02 * normal(&mut rng)).collect();
        doc.data[1].y = ord_true.iter().map(|v| v + 2e-4 * normal(&mut rng)).collect();
        doc.fit = Some(FitDoc { starts: Some(1), ..FitDoc::default() });
        let report = run(&doc).report;
        let free: Vec<_> = report.parameters.iter().filter(|p| p.mode == "free").collect();
        estimates.push(free.iter().map(|p| p.value).collect());
        errors.push(free.iter().map(|p| p.standard_error.expect("se")).collect());
    }
    for k in 0..true_values.len() {
        let values: Vec<f64> = estimates.iter().map(|e| e[k]).collect();
        let mean = values.iter().sum::<f64>() / 50.0;
        let scatter = (values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / 49.0).sqrt();
        let se = errors.iter().map(|e| e[k]).sum::<f64>() / 50.0;
        assert!((scatter / se - 1.0).abs() < 0.3, "parameter {k}: scatter {scatter:e} vs mean se {se:e}");
        let outside = estimates.iter().zip(&errors).filter(|(e, s)| (e[k] - true_values[k]).abs() > 3.0 * s[k]).count();
        assert!(outside <= 1, "parameter {k}: {outside} of 50 draws beyond 3 se of the truth");
    }
}

#[test]
fn links_are_honoured_exactly() {
    let mut doc = problem_document("start.json");
    let link = |parameter: &str, to: &str, factor: f64| FitParameterDoc {
        parameter: parameter.into(),
        fixed: false,
        min: None,
        max: None,
        link: Some(FitLinkDoc { to: to.into(), factor, offset: 0.0 }),
    };
    doc.fit = Some(FitDoc {
        starts: Some(1),
        parameters: vec![
            // A couplet: R3 = -R2 to the last bit; one width for B2 and B3.
            link("B3.rotatory_strength_1e40_cgs", "B2.rotatory_strength_1e40_cgs", -1.0),
            link("B3.fwhm_cm1", "B2.fwhm_cm1", 1.0),
            FitParameterDoc { parameter: "B1.center_nm".into(), fixed: true, min: None, max: None, link: None },
        ],
        ..FitDoc::default()
    });
    let fitted = run(&doc);
    let b = &fitted.document.bands;
    assert_eq!(b[2].rotatory_strength_1e40_cgs.to_bits(), (-b[1].rotatory_strength_1e40_cgs).to_bits());
    assert_eq!(b[2].fwhm_cm1.to_bits(), b[1].fwhm_cm1.to_bits());
    assert_eq!(b[0].center_nm, 300.0, "fixed");
    let linked = fitted.report.parameters.iter().find(|p| p.name == "B3.rotatory_strength_1e40_cgs").expect("reported");
    assert_eq!(linked.mode, "linked");
    // The fitted document is a document: it reads back and carries its report.
    let again = Document::from_json(&fitted.document.to_json_pretty()).expect("reads back");
    assert!(again.fit.and_then(|f| f.report).is_some());
}

#[test]
fn bounds_are_honoured_exactly() {
    // B1's true width is 2500 cm-1 (truth.json); bounded to 2700..4000 the fit
    // must stop at 2700 and say the parameter is at its bound.
    let mut doc = problem_document("start.json");
    doc.fit = Some(FitDoc {
        starts: Some(1),
        parameters: vec![FitParameterDoc {
            parameter: "B1.fwhm_cm1".into(),
            fixed: false,
            min: Some(2700.0),
            max: Some(4000.0),
            link: None,
        }],
        ..FitDoc::default()
    });
    let fitted = run(&doc);
    let w = fitted.document.bands[0].fwhm_cm1;
    assert!((2700.0..=4000.0).contains(&w), "{w}");
    assert!((w - 2700.0).abs() < 1e-3, "{w}");
    assert!(fitted.report.parameters.iter().find(|p| p.name == "B1.fwhm_cm1").expect("reported").at_bound);
    // Centre bounds are given in nm (the document's unit).
    doc.fit = Some(FitDoc {
        starts: Some(1),
        parameters: vec![FitParameterDoc {
            parameter: "B1.center_nm".into(),
            fixed: false,
            min: Some(299.0),
            max: Some(302.0),
            link: None,
        }],
        ..FitDoc::default()
    });
    let c = run(&doc).document.bands[0].center_nm;
    assert!((c - 302.0).abs() < 1e-6, "truth 305 nm lies beyond the bound: {c}");
}

#[test]
fn quartz_rotation_table_fitted_with_one_far_uv_band() {
    // Quartz along the optic axis at 20 C, deg/mm (handbook tables; from
    // memory; physics.md): one Lorentz band far in the UV, centre and R free,
    // fitted to the four lines as readings of a 1 mm "sample" at 1 mol/L.
    let lines = [(404.7, 48.95), (435.8, 41.55), (546.1, 25.54), (589.3, 21.72)];
    let text = r#"{"chiroptic":1,"sample":{"concentration_mol_per_l":1,"path_length_cm":0.1,"solvent":{"constant":1.544}},
      "bands":[{"name":"far UV","shape":"lorentz","center_nm":150,"fwhm_cm1":100,"rotatory_strength_1e40_cgs":3000,"dipole_strength_debye2":10}]}"#;
    let mut doc = Document::from_json(text).expect("doc");
    doc.readings =
        lines.iter().map(|(l, r)| ReadingDoc { wavelength_nm: *l, rotation_deg: *r, sd_deg: Some(0.001 * r), conditions: None }).collect();
    doc.fit = Some(FitDoc { free: vec!["center".into(), "R".into()], starts: Some(4), ..FitDoc::default() });
    let fitted = run(&doc);
    let band = &fitted.document.bands[0];
    // The least-squares Drude term through the same lines (lines::DrudeTerm::fit,
    // itself checked against SciPy in physics.rs): lambda0 = 131.65 nm.
    let drude = chiroptic::lines::DrudeTerm::fit(&lines).expect("drude");
    assert!((band.center_nm - drude.lambda0_nm).abs() < 1.0, "centre {} vs Drude {}", band.center_nm, drude.lambda0_nm);
    let model = Model::from_document(&fitted.document).expect("model");
    let s = chiroptic::evaluate(&model, &lines.iter().map(|(l, _)| 1e7 / l).collect::<Vec<_>>()).expect("spectra");
    for ((l, want), got) in lines.iter().zip(&s.rotation_deg) {
        assert!((got / want - 1.0).abs() < 2e-3, "{l} nm: {got} vs {want}");
    }
}

#[test]
fn scatter_estimate_of_white_noise() {
    // The second-difference estimate of sigma on pure noise of sigma 0.5.
    let mut rng = SmallRng::seed_from_u64(3);
    let y: Vec<f64> = (0..20000)
        .map(|_| {
            let (a, b): (f64, f64) = (rng.random_range(1e-12..1.0), rng.random_range(0.0..1.0));
            0.5 * (-2.0 * a.ln()).sqrt() * (2.0 * std::f64::consts::PI * b).cos()
        })
        .collect();
    assert!((scatter_sigma(&y) / 0.5 - 1.0).abs() < 0.03, "{}", scatter_sigma(&y));
}

#[test]
fn bands_proposed_from_the_cd_lead_the_fit_to_the_same_minimum() {
    // The invented problem's CD alone (truth.json: +6 at 305 nm, -18 at
    // 262 nm, +25 at 228 nm): one band per lobe, then the joint fit from
    // there reaches the minimum SciPy reaches from the hand-made start.
    let reference: serde_json::Value = serde_json::from_str(&fixture("scipy_fit.json")).expect("json");
    let mut doc = problem_document("start.json");
    let (_, sets) = sets(&doc);
    let proposed = chiroptic::fit::propose_bands(&sets[0], 6).expect("proposed");
    assert_eq!(proposed.len(), 3, "{proposed:?}");
    for (b, (nm, sign)) in proposed.iter().zip([(305.0, 1.0), (262.0, -1.0), (228.0, 1.0)]) {
        assert!((b.center_nm - nm).abs() < 8.0, "{} at {} nm, expected near {nm}", b.name, b.center_nm);
        assert_eq!(b.rotatory_strength_1e40_cgs.signum(), sign, "{}", b.name);
    }
    doc.bands = proposed;
    doc.fit = Some(FitDoc { starts: Some(4), ..FitDoc::default() });
    let report = run(&doc).report;
    let chi_ref = reference["lm"]["chi_square"].as_f64().expect("chi2");
    assert!((report.chi_square - chi_ref).abs() <= 1e-6 * chi_ref, "chi2 {} vs SciPy {chi_ref}", report.chi_square);
}

/// A couplet's distance and twist fitted to its own CD and absorption
/// (DeVoe's polarisability model, `coupled`): from 15 % and 12° off, the fit
/// returns the geometry that made the data, exactly without noise and within
/// three standard errors with it; the fitted document holds that geometry.
/// Invented couplet; strong enough coupling (V near the width) for the shape
/// to tell the splitting (1/d^3) from the amplitude.
#[test]
fn a_couplets_distance_and_twist_are_fitted() {
    use chiroptic::coupled::geometry::{couplet, distance_and_twist};
    use chiroptic::document::TransitionDoc;
    let t = TransitionDoc {
        shape: "gaussian".into(),
        center_nm: 300.0,
        fwhm_cm1: 1800.0,
        lorentz_fwhm_cm1: None,
        dipole_strength_debye2: 30.0,
        rotatory_strength_1e40_cgs: 0.0,
        direction: None,
    };
    let text = r#"{"chiroptic": 1, "sample": {"concentration_mol_per_l": 1e-4, "path_length_cm": 1.0, "solvent": {"constant": 1.33}}}"#;
    let mut truth = Document::from_json(text).expect("doc");
    truth.systems = vec![couplet(4.5, 50.0, &t)];
    let x: Vec<f64> = (0..=140).map(|i| 240.0 + i as f64).collect();
    let nu: Vec<f64> = x.iter().map(|l| 1e7 / l).collect();
    let s = chiroptic::evaluate(&Model::from_document(&truth).expect("truth"), &nu).expect("spectra");
    let peak = |v: &[f64]| v.iter().fold(0.0_f64, |m, y| m.max(y.abs()));
    let (cd_peak, abs_peak) = (peak(&s.ellipticity_mdeg), peak(&s.epsilon));
    let mut rng = SmallRng::seed_from_u64(11);
    let mut normal = || -> f64 {
        let (a, b): (f64, f64) = (rng.random_range(1e-12..1.0), rng.random_range(0.0..1.0));
        (-2.0 * a.ln()).sqrt() * (2.0 * std::f64::consts::PI * b).cos()
    };
    for noise in [0.0, 0.01] {
        let mut doc = truth.clone();
        doc.systems = vec![couplet(5.2, 62.0, &t)];
        for (name, quantity, unit, y, scale) in
            [("cd", "cd", "mdeg", &s.ellipticity_mdeg, cd_peak), ("abs", "absorption", "epsilon", &s.epsilon, abs_peak)]
        {
            let r = import::Recognised {
                axis: chiroptic::units::AxisUnit::Nanometre,
                x: x.clone(),
                measured: import::Measured::parse(quantity, unit).expect("unit"),
                y: y.iter().map(|v| v + noise * scale * normal()).collect(),
                sd: if noise > 0.0 { Some(vec![noise * scale; x.len()]) } else { None },
                ht_v: None,
                label: String::new(),
            };
            doc.data.push(data_set_doc(name, &r, SourceDoc::default()));
        }
        doc.fit = Some(FitDoc { free: vec!["distance".into(), "twist".into()], starts: Some(2), ..FitDoc::default() });
        let fitted = run(&doc);
        let get = |key: &str| fitted.report.parameters.iter().find(|p| p.name == format!("couplet.{key}")).expect(key).clone();
        let (d, twist) = (get("distance_angstrom"), get("twist_deg"));
        assert_eq!((d.mode.as_str(), twist.mode.as_str()), ("free", "free"));
        if noise == 0.0 {
            assert!((d.value - 4.5).abs() < 1e-4 && (twist.value - 50.0).abs() < 1e-3, "{d:?} {twist:?}");
        } else {
            for (p, truth) in [(&d, 4.5), (&twist, 50.0)] {
                let se = p.standard_error.expect("se");
                assert!(se > 0.0 && (p.value - truth).abs() < 3.0 * se, "{p:?}");
            }
        }
        let (fd, ft) = distance_and_twist(&fitted.document.systems[0]).expect("a pair");
        assert!((fd - d.value).abs() < 1e-9 && (ft.expect("twist") - twist.value).abs() < 1e-9);
    }
}

/// Geometry parameters named wrongly get one message each.
#[test]
fn geometry_parameters_that_do_not_exist_are_refused() {
    let mut doc = problem_document("start.json");
    doc.fit = Some(FitDoc { free: vec!["twist".into()], ..FitDoc::default() });
    let (model, sets) = sets(&doc);
    let e = fit(&doc, &model, &sets, &mut |_, _, _| true).unwrap_err().to_string();
    assert!(e.contains("twist_deg") && e.contains("two chromophores"), "{e}");
    doc.fit = Some(FitDoc {
        parameters: vec![FitParameterDoc { parameter: "pair.distance".into(), fixed: false, min: None, max: None, link: None }],
        ..FitDoc::default()
    });
    let e = fit(&doc, &model, &sets, &mut |_, _, _| true).unwrap_err().to_string();
    assert!(e.contains("no coupled system named \"pair\""), "{e}");
}

/// The page splits the starts over workers (`Prepared::run_starts`, start k
/// to worker k mod n) and joins them (`Prepared::finish`): the result must be
/// the whole fit's, bit for bit (source: `fit` itself on the same document).
#[test]
fn starts_split_over_workers_join_to_the_whole_fit() {
    let mut doc = problem_document("start.json");
    doc.fit = Some(FitDoc { starts: Some(5), ..FitDoc::default() });
    let whole = run(&doc);
    let (model, sets) = sets(&doc);
    for workers in [1, 2, 3] {
        let prepared = chiroptic::fit::prepare(&doc, &model, &sets).expect("prepared");
        let mut parts: Vec<(usize, chiroptic::fit::lm::Outcome)> =
            (0..workers).flat_map(|j| prepared.run_starts(j, workers, &mut |_| true)).collect();
        parts.sort_by_key(|(k, _)| *k);
        assert_eq!(parts.iter().map(|(k, _)| *k).collect::<Vec<_>>(), (0..5).collect::<Vec<_>>());
        let joined = prepared.finish(parts.into_iter().map(|(_, o)| o).collect()).expect("joined");
        assert_eq!(joined, whole, "{workers} workers");
    }
    // Outcomes that do not match the settings are refused, not trusted.
    let prepared = chiroptic::fit::prepare(&doc, &model, &sets).expect("prepared");
    let some = prepared.run_starts(0, 2, &mut |_| true).into_iter().map(|(_, o)| o).collect::<Vec<_>>();
    let e = prepared.finish(some).unwrap_err().to_string();
    assert!(e.contains("do not match"), "{e}");
    let prepared = chiroptic::fit::prepare(&doc, &model, &sets).expect("prepared");
    let mut wrong = prepared.run_starts(0, 1, &mut |_| true).into_iter().map(|(_, o)| o).collect::<Vec<_>>();
    wrong[0].u.pop();
    assert!(prepared.finish(wrong).is_err(), "a short variable vector is refused");
}
