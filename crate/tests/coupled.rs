//! Coupled chromophores (DeVoe's polarisability model, issue 15): each check
//! names its source.

use chiroptic::coupled::geometry::{couplet, helix, Handedness};
use chiroptic::coupled::{table, Solver};
use chiroptic::document::{ChromophoreDoc, Direction, DirectionAngles, Document, SystemDoc, TransitionDoc};
use chiroptic::model::Model;
use chiroptic::spectra::{evaluate, Spectra};
use chiroptic::units::{self, WAVENUMBER_PER_DEBYE2_PER_NM3};

const CENTER_NM: f64 = 300.0;
const D_DEBYE2: f64 = 50.0;

fn transition(shape: &str, fwhm: f64) -> TransitionDoc {
    TransitionDoc {
        shape: shape.into(),
        center_nm: CENTER_NM,
        fwhm_cm1: fwhm,
        lorentz_fwhm_cm1: None,
        dipole_strength_debye2: D_DEBYE2,
        rotatory_strength_1e40_cgs: 0.0,
        direction: None,
    }
}

fn document(systems: Vec<SystemDoc>) -> Document {
    let text = r#"{"chiroptic": 1, "sample": {"concentration_mol_per_l": 1e-4, "path_length_cm": 1.0, "solvent": {"constant": 1.0}}}"#;
    let mut doc = Document::from_json(text).unwrap();
    doc.systems = systems;
    doc
}

fn grid(from_cm1: f64, to_cm1: f64, count: usize) -> Vec<f64> {
    (0..count).map(|i| from_cm1 + (to_cm1 - from_cm1) * i as f64 / (count - 1) as f64).collect()
}

fn spectra(doc: &Document, nu: &[f64]) -> Spectra {
    evaluate(&Model::from_document(doc).unwrap(), nu).unwrap()
}

fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0_f64, |m, x| m.max(x.abs()))
}

fn trapezoid(x: &[f64], y: &[f64]) -> f64 {
    x.windows(2).zip(y.windows(2)).map(|(x, y)| 0.5 * (x[1] - x[0]) * (y[0] + y[1])).sum()
}

/// Uncoupled limit (issue 15): coupling off equals the band model to 1e-12,
/// intrinsic rotatory strengths included, for each shape.
#[test]
fn uncoupled_equals_band_model() {
    for shape in ["lorentz", "gaussian"] {
        let mut t1 = transition(shape, 2500.0);
        t1.rotatory_strength_1e40_cgs = 12.0;
        let mut t2 = transition(shape, 3000.0);
        t2.center_nm = 250.0;
        t2.dipole_strength_debye2 = 20.0;
        t2.rotatory_strength_1e40_cgs = -5.0;
        let mut system = couplet(6.0, 45.0, &t1);
        system.chromophores[1].transitions = vec![t2.clone()];
        system.uncoupled = true;
        let coupled = document(vec![system]);
        let mut bands = document(vec![]);
        for t in [&t1, &t2] {
            bands.bands.push(chiroptic::document::BandDoc {
                name: String::new(),
                shape: t.shape.clone(),
                center_nm: t.center_nm,
                fwhm_cm1: t.fwhm_cm1,
                lorentz_fwhm_cm1: None,
                rotatory_strength_1e40_cgs: t.rotatory_strength_1e40_cgs,
                dipole_strength_debye2: t.dipole_strength_debye2,
            });
        }
        let nu = grid(25_000.0, 50_000.0, 801);
        let (a, b) = (spectra(&coupled, &nu), spectra(&bands, &nu));
        for (name, x, y) in [
            ("delta_epsilon", &a.delta_epsilon, &b.delta_epsilon),
            ("epsilon", &a.epsilon, &b.epsilon),
            ("rotation", &a.rotation_deg, &b.rotation_deg),
            ("n_left", &a.n_left, &b.n_left),
        ] {
            let scale = max_abs(y);
            for (u, v) in x.iter().zip(y) {
                assert!((u - v).abs() <= 1e-12 * scale, "{shape} {name}: {u} vs {v}");
            }
        }
    }
}

/// Position of the extremum of the positive (sign 1) or negative lobe of Δε.
fn lobe(nu: &[f64], de: &[f64], sign: f64) -> (f64, f64) {
    let (i, v) = de.iter().enumerate().map(|(i, v)| (i, sign * v)).fold((0, f64::MIN), |m, x| if x.1 > m.1 { x } else { m });
    (nu[i], sign * v)
}

/// Weak coupling of two identical transitions (exciton theory, from memory):
/// splitting 2 V12, V12 = 5.04 κ μ1 μ2 / R³ cm⁻¹ (μ in debye, R in nm); exciton
/// rotatory strengths ±(π ν0 / 2) |R12·(μ1 × μ2)| (R = Im(μ·m), m = iπν r × μ);
/// conservative couplet. Narrow Lorentz bands (Γ = 2 cm⁻¹ ≪ V12): each lobe's
/// wings beyond the half it is integrated over are below 0.5 % of it. (A
/// Gaussian's damping vanishes far from its centre, so a strongly split
/// Gaussian pair gives needle-sharp exciton bands: physics, not a test case.)
#[test]
fn weak_coupling_reproduces_exciton_theory() {
    let d_nm = 1.0;
    let theta = 60.0_f64;
    let mut t = transition("lorentz", 2.0);
    t.center_nm = CENTER_NM;
    let system = couplet(d_nm * 10.0, theta, &t);
    let nu0 = 1e7 / CENTER_NM;
    let nu = grid(nu0 - 400.0, nu0 + 400.0, 16001);
    let s = spectra(&document(vec![system]), &nu);
    // κ = e1·e2 − 3(e1·r̂)(e2·r̂) = cos θ (r along z, dipoles in xy): from memory of the formula.
    let v12 = 5.04 * theta.to_radians().cos() * D_DEBYE2 / d_nm.powi(3);
    assert!((WAVENUMBER_PER_DEBYE2_PER_NM3 - 5.04).abs() < 0.01, "5.04 from memory vs {WAVENUMBER_PER_DEBYE2_PER_NM3}");
    // Absorption: two exciton bands; their separation is 2|V12|.
    let peaks: Vec<f64> =
        (1..nu.len() - 1).filter(|&i| s.epsilon[i] > s.epsilon[i - 1] && s.epsilon[i] > s.epsilon[i + 1]).map(|i| nu[i]).collect();
    // With κ > 0 and twist 60° the in-phase state carries all intensity
    // only when parallel; here both carry some: find the CD lobes instead.
    let (nu_plus, _) = lobe(&nu, &s.delta_epsilon, 1.0);
    let (nu_minus, _) = lobe(&nu, &s.delta_epsilon, -1.0);
    let split = (nu_plus - nu_minus).abs();
    assert!((split - 2.0 * v12).abs() < 0.01 * 2.0 * v12 + 1.0, "splitting {split} vs 2V = {}; absorption peaks {peaks:?}", 2.0 * v12);
    // Rotatory strength of each lobe from ∫Δε/ν over its half, R = C_R ∫Δε/ν.
    let mid = nu.iter().position(|x| *x >= nu0).unwrap();
    let ratio: Vec<f64> = s.delta_epsilon.iter().zip(&nu).map(|(d, n)| d / n).collect();
    let r_low = units::ROTATORY_CONSTANT * trapezoid(&nu[..=mid], &ratio[..=mid]);
    let r_high = units::ROTATORY_CONSTANT * trapezoid(&nu[mid..], &ratio[mid..]);
    let mu2 = units::dipole_strength_esu2_cm2(D_DEBYE2);
    let exciton = std::f64::consts::PI * nu0 / 2.0 * (d_nm * 1e-7) * mu2 * theta.to_radians().sin();
    // Weak coupling: V12/ν0 ≈ 0.4 %, so first order holds to about 1 %.
    for r in [r_low, r_high] {
        assert!((r.abs() - exciton).abs() < 0.01 * exciton, "lobe R {r:e} vs exciton {exciton:e}");
    }
    assert!((r_low + r_high).abs() < 0.02 * exciton, "conservative: {r_low:e} + {r_high:e}");
}

/// Exciton chirality rule (common practice): a positive (clockwise, front to
/// back) twist gives a positive long-wavelength and a negative
/// short-wavelength Cotton effect. Built by hand, not with the helper: the back
/// dipole at the origin along x, the front one 8 Å towards the viewer at +z,
/// seen from there turned anticlockwise by 40°, i.e. front-to-back clockwise.
#[test]
fn exciton_chirality_rule() {
    let t = transition("gaussian", 2500.0);
    let chromophore = |z: f64, d: [f64; 3]| ChromophoreDoc {
        name: String::new(),
        position_angstrom: [0.0, 0.0, z],
        direction: Direction::Vector(d),
        transitions: vec![t.clone()],
    };
    let a = 40.0_f64.to_radians();
    let system = SystemDoc {
        name: "hand-built".into(),
        screened: false,
        uncoupled: false,
        chromophores: vec![chromophore(0.0, [1.0, 0.0, 0.0]), chromophore(8.0, [a.cos(), a.sin(), 0.0])],
    };
    let nu = grid(25_000.0, 42_000.0, 1701);
    let s = spectra(&document(vec![system.clone()]), &nu);
    let (nu_pos, _) = lobe(&nu, &s.delta_epsilon, 1.0);
    let (nu_neg, _) = lobe(&nu, &s.delta_epsilon, -1.0);
    assert!(nu_pos < nu_neg, "positive lobe at {nu_pos} cm⁻¹ should be at the longer wavelength than the negative at {nu_neg}");
    // The helper's couplet with the same twist is the same geometry (shifted along z).
    let h = spectra(&document(vec![couplet(8.0, 40.0, &t)]), &nu);
    for (x, y) in h.delta_epsilon.iter().zip(&s.delta_epsilon) {
        assert!((x - y).abs() < 1e-9 * max_abs(&s.delta_epsilon));
    }
    // And the opposite twist gives the opposite couplet.
    let m = spectra(&document(vec![couplet(8.0, -40.0, &t)]), &nu);
    let (nu_pos_m, _) = lobe(&nu, &m.delta_epsilon, 1.0);
    assert!(nu_pos_m > nu_neg - 1.0, "negative twist: positive lobe at short wavelength");
}

fn mirror(system: &SystemDoc) -> SystemDoc {
    let mut m = system.clone();
    for c in &mut m.chromophores {
        c.position_angstrom[0] = -c.position_angstrom[0];
        let d = c.direction.vector();
        c.direction = Direction::Vector([-d[0], d[1], d[2]]);
    }
    m
}

/// Symmetry (issue 15; a mirror is an improper rotation, so pseudoscalars flip):
/// coplanar, parallel and inversion-symmetric pairs give no CD; a mirror image
/// negates CD and ORD and keeps absorption.
#[test]
fn symmetry() {
    let t = transition("gaussian", 2500.0);
    let nu = grid(25_000.0, 42_000.0, 801);
    let pair = |p2: [f64; 3], d1: [f64; 3], d2: [f64; 3]| SystemDoc {
        name: String::new(),
        screened: false,
        uncoupled: false,
        chromophores: vec![
            ChromophoreDoc {
                name: String::new(),
                position_angstrom: [0.0, 0.0, 0.0],
                direction: Direction::Vector(d1),
                transitions: vec![t.clone()],
            },
            ChromophoreDoc { name: String::new(), position_angstrom: p2, direction: Direction::Vector(d2), transitions: vec![t.clone()] },
        ],
    };
    let s45 = std::f64::consts::FRAC_1_SQRT_2;
    let chiral = spectra(&document(vec![couplet(7.0, 50.0, &t)]), &nu);
    let scale = max_abs(&chiral.delta_epsilon);
    assert!(scale > 0.0);
    for (name, sys) in [
        ("coplanar", pair([5.0, 3.0, 0.0], [1.0, 0.0, 0.0], [s45, s45, 0.0])),
        ("parallel", pair([1.0, 2.0, 6.0], [0.0, 0.6, 0.8], [0.0, 0.6, 0.8])),
        ("inversion", pair([0.0, 0.0, 6.0], [1.0, 0.0, 0.0], [-1.0, 0.0, 0.0])),
    ] {
        let s = spectra(&document(vec![sys]), &nu);
        assert!(max_abs(&s.delta_epsilon) < 1e-12 * scale, "{name}: CD {}", max_abs(&s.delta_epsilon));
    }
    let h = helix(6, 5.0, 3.4, 36.0, Handedness::Right, [0.3, 0.9, 0.3], std::slice::from_ref(&t));
    let (a, b) = (spectra(&document(vec![h.clone()]), &nu), spectra(&document(vec![mirror(&h)]), &nu));
    let (cd, ord) = (max_abs(&a.delta_epsilon), max_abs(&a.rotation_deg));
    assert!(cd > 0.0);
    for i in 0..nu.len() {
        assert!((a.delta_epsilon[i] + b.delta_epsilon[i]).abs() < 1e-12 * cd);
        assert!((a.rotation_deg[i] + b.rotation_deg[i]).abs() < 1e-12 * ord);
        assert!((a.epsilon[i] - b.epsilon[i]).abs() < 1e-12 * max_abs(&a.epsilon));
    }
    // A left-handed helix is the mirror image of the right-handed one (another mirror, same CD).
    let l = spectra(&document(vec![helix(6, 5.0, 3.4, 36.0, Handedness::Left, [0.3, 0.9, 0.3], std::slice::from_ref(&t))]), &nu);
    for i in 0..nu.len() {
        assert!((l.delta_epsilon[i] + a.delta_epsilon[i]).abs() < 1e-9 * cd);
    }
}

/// Kramers-Kronig (issue 15): the computed ORD is the transform of the
/// computed CD, by the project's closed-form piecewise-linear transform, within
/// 1 % of the peak (the range reaches far enough that the tails are small).
#[test]
fn ord_is_the_transform_of_cd() {
    let t = transition("gaussian", 2500.0);
    let nu = grid(5_000.0, 120_000.0, 23001);
    let s = spectra(&document(vec![helix(5, 5.0, 3.4, 36.0, Handedness::Right, [0.2, 0.9, 0.4], &[t])]), &nu);
    let inside: Vec<usize> = (0..nu.len()).filter(|&i| nu[i] > 28_000.0 && nu[i] < 40_000.0).step_by(50).collect();
    let at: Vec<f64> = inside.iter().map(|&i| nu[i]).collect();
    let dn = chiroptic::kk::delta_n_from_delta_k(&nu, &s.delta_k, &at);
    let peak = max_abs(&s.delta_n);
    for (j, &i) in inside.iter().enumerate() {
        assert!((dn[j] - s.delta_n[i]).abs() < 0.01 * peak, "at {}: KK {} vs model {}", nu[i], dn[j], s.delta_n[i]);
    }
}

/// Sum rules (issue 15): Kuhn's sum rule ∫Δε/ν ≈ 0 within 1 % of ∫|Δε|/ν
/// without intrinsic strengths; ∫ε dν within 1 % of the uncoupled value.
#[test]
fn sum_rules() {
    let t = transition("gaussian", 2500.0);
    let nu = grid(10_000.0, 80_000.0, 14001);
    let system = couplet(7.0, 70.0, &t);
    let s = spectra(&document(vec![system.clone()]), &nu);
    let de_nu: Vec<f64> = s.delta_epsilon.iter().zip(&nu).map(|(d, n)| d / n).collect();
    let abs_nu: Vec<f64> = de_nu.iter().map(|v| v.abs()).collect();
    let (net, gross) = (trapezoid(&nu, &de_nu), trapezoid(&nu, &abs_nu));
    assert!(gross > 0.0 && net.abs() < 0.01 * gross, "∫Δε/ν = {net} vs ∫|Δε|/ν = {gross}");
    let mut off = system;
    off.uncoupled = true;
    let u = spectra(&document(vec![off]), &nu);
    let (e, e0) = (trapezoid(&nu, &s.epsilon), trapezoid(&nu, &u.epsilon));
    assert!((e - e0).abs() < 0.01 * e0, "∫ε dν {e} vs uncoupled {e0}");
}

/// The structured solve (one group diagonalised, the rest by a Schur
/// complement) equals a full LU at every point, to rounding: one shared
/// shape; two shapes on a helix; unequal D, a D = 0 transition, intrinsic R,
/// screening and every transition its own shape. The LU is the textbook
/// method (Gaussian elimination with partial pivoting), so this checks the
/// algebra of the partition, not the physics.
#[test]
fn structured_solve_equals_full_lu() {
    let mut far = transition("gaussian", 2500.0);
    far.center_nm = 220.0;
    far.direction = Some(Direction::Vector([0.0, 0.0, 1.0]));
    let one = helix(8, 5.0, 3.4, 36.0, Handedness::Right, [0.3, 0.9, 0.3], &[transition("lorentz", 2500.0)]);
    let two = helix(10, 5.0, 3.4, 36.0, Handedness::Left, [0.3, 0.9, 0.3], &[transition("gaussian", 2500.0), far]);
    let mut mixed = two.clone();
    mixed.screened = true;
    mixed.chromophores[0].transitions[0].dipole_strength_debye2 = 0.0;
    mixed.chromophores[1].transitions[0].dipole_strength_debye2 = 12.0;
    mixed.chromophores[2].transitions[1].rotatory_strength_1e40_cgs = 3.0;
    mixed.chromophores[3].transitions[0].shape = "voigt".into();
    mixed.chromophores[3].transitions[0].lorentz_fwhm_cm1 = Some(400.0);
    let mut distinct = helix(6, 5.0, 3.4, 36.0, Handedness::Right, [0.3, 0.9, 0.3], &[transition("gaussian", 2500.0)]);
    for (k, c) in distinct.chromophores.iter_mut().enumerate() {
        c.transitions[0].center_nm += 3.0 * k as f64;
    }
    let nu = grid(25_000.0, 52_000.0, 601);
    for (name, system) in [("one shape", one), ("two shapes", two), ("mixed", mixed), ("all distinct", distinct)] {
        let doc = document(vec![system]);
        let model = Model::from_document(&doc).unwrap();
        let n = vec![1.4; nu.len()];
        let (c1, m1) = model.systems[0].response_with(&nu, &n, Solver::Structured).unwrap();
        let (c2, m2) = model.systems[0].response_with(&nu, &n, Solver::Lu).unwrap();
        let scale = |v: &[num_complex::Complex64]| v.iter().fold(0.0_f64, |m, z| m.max(z.norm()));
        let (sc, sm) = (scale(&c2), scale(&m2));
        assert!(sc > 0.0 && sm > 0.0, "{name}: the check needs a response");
        for i in 0..nu.len() {
            assert!((c1[i] - c2[i]).norm() <= 1e-12 * sc, "{name}: chiral at {} differs: {} vs {}", nu[i], c1[i], c2[i]);
            assert!((m1[i] - m2[i]).norm() <= 1e-12 * sm, "{name}: mean at {} differs: {} vs {}", nu[i], m1[i], m2[i]);
        }
    }
}

/// The plain table reads back what it wrote, and bad input names the line or field.
#[test]
fn table_and_validation() {
    let mut t2 = transition("gaussian", 3000.0);
    t2.center_nm = 220.0;
    t2.direction = Some(Direction::Vector([0.0, 0.0, 1.0]));
    let mut h = helix(3, 5.0, 3.4, 36.0, Handedness::Right, [0.3, 0.9, 0.3], &[transition("gaussian", 2500.0), t2]);
    h.name = "t".into();
    let text = table::write(&h);
    let back = table::parse(&text, "t").unwrap();
    assert_eq!(back, h);
    for (bad, what) in [("a 0 0 0 1 0 0 gaussian 300 2500", "fields"), ("a 0 0 x 1 0 0 gaussian 300 2500 5", "z")] {
        let e = table::parse(bad, "t").unwrap_err();
        assert!(e.to_string().contains("line 1") && e.to_string().contains(what), "{e}");
    }
    type Edit = Box<dyn Fn(&mut SystemDoc)>;
    let cases: Vec<(Edit, &str)> = vec![
        (
            Box::new(|s| s.chromophores[1].position_angstrom = s.chromophores[0].position_angstrom),
            "systems[0].chromophores[1].position_angstrom",
        ),
        (Box::new(|s| s.chromophores[0].direction = Direction::Vector([0.0, 0.0, 0.0])), "systems[0].chromophores[0].direction"),
        (Box::new(|s| s.chromophores[0].direction = Direction::Vector([1.0, 1.0, 0.0])), "systems[0].chromophores[0].direction"),
        (Box::new(|s| s.chromophores[0].position_angstrom[1] = f64::NAN), "systems[0].chromophores[0].position_angstrom[1]"),
        (Box::new(|s| s.chromophores[0].transitions[0].fwhm_cm1 = -1.0), "systems[0].chromophores[0].transitions[0].fwhm_cm1"),
        (
            Box::new(|s| {
                s.chromophores =
                    (0..40).map(|k| ChromophoreDoc { position_angstrom: [k as f64, 0.0, 0.0], ..s.chromophores[0].clone() }).collect()
            }),
            "systems[0].chromophores",
        ),
    ];
    for (edit, field) in cases {
        let mut s = couplet(6.0, 30.0, &transition("gaussian", 2500.0));
        edit(&mut s);
        let e = Model::from_document(&document(vec![s])).unwrap_err();
        assert_eq!(e.field, field, "{e}");
    }
    // A document without systems writes no "systems" field; with one it round-trips.
    assert!(!document(vec![]).to_json().contains("systems"));
    let d = document(vec![couplet(6.0, 30.0, &transition("gaussian", 2500.0))]);
    assert_eq!(Document::from_json(&d.to_json()).unwrap(), d);
}

/// The CLI (architecture.md: bad input exits non-zero with one line naming
/// the file and the field): geometry-import, eval on the result, geometry-export.
#[test]
fn cli_geometry_verbs() {
    let dir = std::env::temp_dir().join(format!("chiroptic-coupled-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let table_path = dir.join("pair.txt");
    // Invented demo geometry: a 45° couplet 7 Å apart.
    std::fs::write(&table_path, "a 0 0 -3.5 1 0 0 gaussian 300 2500 50\nb 0 0 3.5 0.7071068 0.7071068 0 gaussian 300 2500 50\n").unwrap();
    let bin = env!("CARGO_BIN_EXE_chiroptic");
    let out = std::process::Command::new(bin).arg("geometry-import").arg(&table_path).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let doc_path = dir.join("pair.json");
    std::fs::write(&doc_path, &out.stdout).unwrap();
    let eval = std::process::Command::new(bin)
        .args(["eval", doc_path.to_str().unwrap(), "--from", "320", "--to", "330", "--step", "10"])
        .output()
        .unwrap();
    assert!(eval.status.success());
    let back = std::process::Command::new(bin).args(["geometry-export", doc_path.to_str().unwrap()]).output().unwrap();
    assert_eq!(table::parse(&String::from_utf8_lossy(&back.stdout), "").unwrap().chromophores.len(), 2);
    std::fs::write(&table_path, "a 0 0 0 0 0 0 gaussian 300 2500 50\nb 0 0 3.5 1 0 0 gaussian 300 2500 50\n").unwrap();
    let bad = std::process::Command::new(bin).arg("geometry-import").arg(&table_path).output().unwrap();
    let message = String::from_utf8_lossy(&bad.stderr);
    assert_eq!(bad.status.code(), Some(2));
    assert_eq!(message.trim().lines().count(), 1);
    assert!(message.contains("systems[0].chromophores[0].direction"), "{message}");
    // fit: the couplet's twist from its own CD, started 10° off.
    let truth = Document::from_json(&std::fs::read_to_string(&doc_path).unwrap()).unwrap();
    let x: Vec<f64> = (0..=100).map(|i| 250.0 + i as f64).collect();
    let de = spectra(&truth, &x.iter().map(|l| 1e7 / l).collect::<Vec<_>>()).delta_epsilon;
    let csv: String = x.iter().zip(&de).map(|(l, y)| format!("{l},{y}\n")).collect();
    let data_path = dir.join("cd.csv");
    std::fs::write(&data_path, format!("wavelength_nm,delta_epsilon_M-1_cm-1\n{csv}")).unwrap();
    let mut start = truth.clone();
    chiroptic::coupled::geometry::set_distance_and_twist(&mut start.systems[0], 7.0, Some(55.0));
    let start_path = dir.join("start.json");
    std::fs::write(&start_path, start.to_json()).unwrap();
    let fitted_path = dir.join("fitted.json");
    let fit = std::process::Command::new(bin)
        .args(["fit", start_path.to_str().unwrap(), data_path.to_str().unwrap(), "--free", "twist", "-o", fitted_path.to_str().unwrap()])
        .output()
        .unwrap();
    let report = String::from_utf8_lossy(&fit.stderr);
    assert!(fit.status.success(), "{report}");
    assert!(report.contains("twist_deg"), "{report}");
    let fitted = Document::from_json(&std::fs::read_to_string(&fitted_path).unwrap()).unwrap();
    let (_, twist) = chiroptic::coupled::geometry::distance_and_twist(&fitted.systems[0]).unwrap();
    assert!((twist.unwrap() - 45.0).abs() < 1e-3, "{twist:?}");
    std::fs::remove_dir_all(&dir).ok();
}

/// A direction given as two angles (ISO 80000-2: polar from +z, azimuth from
/// +x towards +y) is the unit vector (sin t cos p, sin t sin p, cos t), gives
/// the same spectra as that vector, and survives a save in the form written.
#[test]
fn direction_as_two_angles() {
    let t = transition("gaussian", 2500.0);
    let (polar, azimuth) = (90.0_f64, 50.0_f64);
    let by_vector = couplet(7.0, 50.0, &t);
    let mut by_angles = by_vector.clone();
    by_angles.chromophores[1].direction = Direction::Angles(DirectionAngles { polar_deg: polar, azimuth_deg: azimuth });
    let v = by_angles.chromophores[1].direction.vector();
    let expect = [azimuth.to_radians().cos(), azimuth.to_radians().sin(), 0.0];
    for c in 0..3 {
        assert!((v[c] - expect[c]).abs() < 1e-15, "{v:?}");
    }
    let nu = grid(25_000.0, 42_000.0, 401);
    let a = spectra(&document(vec![by_vector]), &nu);
    let b = spectra(&document(vec![by_angles.clone()]), &nu);
    for (x, y) in a.delta_epsilon.iter().zip(&b.delta_epsilon) {
        assert!((x - y).abs() <= 1e-12 * max_abs(&a.delta_epsilon));
    }
    let doc = document(vec![by_angles]);
    let text = doc.to_json();
    assert!(text.contains("\"polar_deg\""), "{text}");
    assert_eq!(Document::from_json(&text).unwrap(), doc);
    let bad = text.replace("\"polar_deg\"", "\"polar\"");
    let e = Document::from_json(&bad).unwrap_err().to_string();
    assert!(e.contains("chromophores[1].direction") && e.contains("polar_deg"), "{e}");
}

/// The invented helix demo (fixtures/demo/helix.json: 20 units, two
/// transitions each, the geometry the benchmarks time) is what the helix
/// helper builds; `CHIROPTIC_WRITE_FIXTURES=1` rewrites it. Its CD and
/// absorption stay within the transitions' region: beyond 350 nm under 1 % of the peak.
#[test]
fn helix_demo_fixture_is_the_helper_output() {
    // D = 5 debye^2 keeps the exciton band within the transitions' widths (at
    // the benchmarks' 30-50 the point dipoles push a collective mode far out
    // of the band, where a Gaussian has no damping: a sharp, unphysical line).
    let unit =
        |center_nm: f64, direction| TransitionDoc { center_nm, dipole_strength_debye2: 5.0, direction, ..transition("gaussian", 2500.0) };
    let text = r#"{"chiroptic": 1, "title": "INVENTED DEMO: a right-handed stack of 20 identical chromophores (not a real compound)",
        "sample": {"concentration_mol_per_l": 1e-5, "path_length_cm": 1.0, "solvent": {"constant": 1.33}}}"#;
    let mut doc = Document::from_json(text).unwrap();
    let mut h = helix(
        20,
        5.0,
        3.4,
        36.0,
        Handedness::Right,
        [0.3, 0.9, 0.3],
        &[unit(300.0, None), unit(220.0, Some(Direction::Vector([0.0, 0.0, 1.0])))],
    );
    h.name = "stack".into();
    doc.systems = vec![h];
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../fixtures/demo/helix.json");
    if std::env::var_os("CHIROPTIC_WRITE_FIXTURES").is_some() {
        std::fs::write(&path, doc.to_json_pretty() + "\n").unwrap();
    }
    let saved = Document::from_json(&std::fs::read_to_string(&path).unwrap()).unwrap();
    assert_eq!(saved, doc);
    let nu: Vec<f64> = (0..471).map(|i| 1e7 / (180.0 + i as f64)).collect();
    let s = spectra(&saved, &nu);
    for (name, v) in [("CD", &s.delta_epsilon), ("absorption", &s.epsilon)] {
        let peak = max_abs(v);
        let far = nu.iter().zip(v).filter(|(n, _)| 1e7 / **n > 350.0).fold(0.0_f64, |m, (_, v)| m.max(v.abs()));
        assert!(peak > 0.0 && far < 1e-2 * peak, "{name} beyond 350 nm: {far} of a peak {peak}");
    }
}

/// Every verb that reads a model works on a document with a coupled system
/// (the invented helix demo): exit 0 and output, through the same `evaluate`.
#[test]
fn every_model_verb_reads_a_document_with_systems() {
    let bin = env!("CARGO_BIN_EXE_chiroptic");
    let helix = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../fixtures/demo/helix.json");
    let h = helix.to_str().unwrap();
    let dir = std::env::temp_dir().join(format!("chiroptic-verbs-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let svg = dir.join("cd.svg");
    let verbs: Vec<Vec<&str>> = vec![
        vec!["eval", h, "--from", "200", "--to", "400", "--step", "5"],
        vec!["lines", h],
        vec!["render", h, "--plot", "cd", "-o", svg.to_str().unwrap()],
        vec!["link", h],
        vec!["colour", h, "--analyser", "45"],
        vec!["geometry-export", h],
    ];
    for args in verbs {
        let out = std::process::Command::new(bin).args(&args).output().unwrap();
        assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
        assert!(!out.stdout.is_empty() || svg.exists(), "{args:?} wrote nothing");
    }
    // The link opens back to the same document.
    let link = std::process::Command::new(bin).args(["link", h]).output().unwrap();
    let text = String::from_utf8_lossy(&link.stdout).trim().to_string();
    let opened = std::process::Command::new(bin).args(["open", &text]).output().unwrap();
    assert!(opened.status.success(), "{}", String::from_utf8_lossy(&opened.stderr));
    let back = Document::from_json(&String::from_utf8_lossy(&opened.stdout)).unwrap();
    assert_eq!(back.systems, Document::from_json(&std::fs::read_to_string(&helix).unwrap()).unwrap().systems);
    std::fs::remove_dir_all(&dir).ok();
}
