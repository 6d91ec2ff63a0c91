//! Computed excited states: the transition-list reader, Boltzmann
//! populations, f <-> D, broadening against an independent NumPy/SciPy
//! computation (fixtures/states/make_states_reference.py), strengths back
//! from the integrals, the similarity score and its shift search.

use chiroptic::similarity::{best_shift, overlap};
use chiroptic::states::{self, table, Broadening, ConformerEnergy};
use chiroptic::units::{self, AxisUnit, EnergyUnit};
use chiroptic::{evaluate, Document, Model};

const EXAMPLE: &str = include_str!("../../fixtures/states/example.txt");
const REFERENCE: &str = include_str!("../../fixtures/states/states_scipy.csv");

fn example_document(b: &Broadening) -> Document {
    let conformers = table::parse(EXAMPLE).expect("example reads");
    let bands = states::bands(&conformers, b).expect("bands");
    let mut doc =
        Document::from_json(r#"{"chiroptic":1,"sample":{"concentration_mol_per_l":0.001,"path_length_cm":1,"solvent":{"constant":1.0}}}"#)
            .expect("doc");
    doc.bands = bands;
    doc
}

/// The SciPy reference rows (wavelength_nm, De, e) and each column's largest |value|.
fn reference() -> (Vec<Vec<f64>>, impl Fn(usize) -> f64) {
    let rows: Vec<Vec<f64>> = REFERENCE
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split(',').map(|v| v.parse().expect("number")).collect())
        .collect();
    let peaks: Vec<f64> = (0..3).map(|k| rows.iter().fold(0.0_f64, |m, r| m.max(r[k].abs()))).collect();
    (rows, move |k: usize| peaks[k])
}

#[test]
fn the_example_list_reads() {
    let c = table::parse(EXAMPLE).expect("reads");
    assert_eq!(c.len(), 2);
    assert_eq!((c[0].name.as_str(), c[0].transitions.len(), c[1].transitions.len()), ("A", 4, 3));
    assert_eq!(c[1].energy, ConformerEnergy::Relative { value: 0.65, unit: EnergyUnit::KcalPerMol });
    assert_eq!(c[0].transitions[2].rotatory_velocity, Some(-49.0));
}

#[test]
fn boltzmann_populations_match_a_hand_computation() {
    // p_B / p_A = exp(-0.65 * 4184 / (8.314462618 * 298.15)) (R from CODATA,
    // thermochemical calorie): 0.3338..., so p_A = 0.74971, p_B = 0.25029.
    let c = table::parse(EXAMPLE).expect("reads");
    let p = states::populations(&c, 298.15).expect("populations");
    let ratio = (-0.65 * 4184.0 / (8.314462618 * 298.15_f64)).exp();
    assert!((p[1] / p[0] - ratio).abs() < 1e-9 * ratio, "{p:?}");
    assert!((p[0] - 1.0 / (1.0 + ratio)).abs() < 1e-9, "R = k_B N_A to the 10 digits quoted");
    // A conformer switched off takes no share; hartree and kJ/mol convert.
    let mut off = c.clone();
    off[1].enabled = false;
    assert_eq!(states::populations(&off, 298.15).expect("p"), vec![1.0, 0.0]);
    let kj = EnergyUnit::KjPerMol.erg_per_molecule() / EnergyUnit::KcalPerMol.erg_per_molecule();
    assert!((kj - 1.0 / 4.184).abs() < 1e-15);
    // 1 hartree = 27.211386 eV (CODATA 2018).
    assert!((EnergyUnit::Hartree.erg_per_molecule() / EnergyUnit::ElectronVolt.erg_per_molecule() - 27.211386246).abs() < 1e-8);
}

#[test]
fn oscillator_and_dipole_strengths_convert_by_the_standard_relation() {
    // f = 4.702e-7 nu[cm^-1] D[debye^2] (common practice; from memory).
    assert!((units::OSCILLATOR_PER_WAVENUMBER_DEBYE2 / 4.702e-7 - 1.0).abs() < 1e-3);
    // And an f read from a list gives D = f / (K nu).
    let t = states::Transition {
        energy_ev: 5.0,
        oscillator: Some(0.2),
        dipole_debye2: None,
        rotatory_length: Some(1.0),
        rotatory_velocity: None,
        fwhm_ev: None,
    };
    let nu = AxisUnit::ElectronVolt.to_wavenumber(5.0);
    assert!((states::dipole_strength(&t).expect("d") * 4.702e-7 * nu / 0.2 - 1.0).abs() < 1e-3);
}

#[test]
fn broadened_spectrum_matches_the_numpy_scipy_computation() {
    let doc = example_document(&Broadening::default());
    let model = Model::from_document(&doc).expect("model");
    let (rows, peak) = reference();
    let nu: Vec<f64> = rows.iter().map(|r| 1e7 / r[0]).collect();
    let s = evaluate(&model, &nu).expect("spectra");
    // 1e-8: SciPy's electron mass is CODATA 2022's, chiroptic's CODATA 2018's
    // (they differ by 1.4e-9), and it enters D through f.
    for (i, r) in rows.iter().enumerate() {
        assert!((s.delta_epsilon[i] - r[1]).abs() <= 1e-9 * peak(1), "De at {} nm: {} vs {}", r[0], s.delta_epsilon[i], r[1]);
        assert!((s.epsilon[i] - r[2]).abs() <= 1e-8 * peak(2), "e at {} nm: {} vs {}", r[0], s.epsilon[i], r[2]);
    }
}

#[test]
fn strengths_come_back_from_the_integrals() {
    // R = C_R int De/nu dnu and D = C_D int e/nu dnu (physics.md), summed
    // over the population-weighted transitions.
    let b = Broadening::default();
    let doc = example_document(&b);
    let model = Model::from_document(&doc).expect("model");
    let nu: Vec<f64> = (0..40000).map(|i| 5000.0 + 2.5 * i as f64).collect();
    let s = evaluate(&model, &nu).expect("spectra");
    let integral = |y: &[f64]| -> f64 { (1..nu.len()).map(|i| 0.5 * (y[i] / nu[i] + y[i - 1] / nu[i - 1]) * (nu[i] - nu[i - 1])).sum() };
    let r_total: f64 = doc.bands.iter().map(|b| b.rotatory_strength_1e40_cgs).sum();
    let d_total: f64 = doc.bands.iter().map(|b| b.dipole_strength_debye2).sum();
    let r = units::ROTATORY_CONSTANT * integral(&s.delta_epsilon) / units::ESU2_CM2_PER_ROTATORY_UNIT;
    let d = units::DIPOLE_CONSTANT * integral(&s.epsilon) / units::ESU2_CM2_PER_DEBYE2;
    assert!((r - r_total).abs() < 1e-3 * doc.bands.iter().map(|b| b.rotatory_strength_1e40_cgs.abs()).sum::<f64>(), "R {r} vs {r_total}");
    assert!((d / d_total - 1.0).abs() < 1e-3, "D {d} vs {d_total}");
}

#[test]
fn similarity_is_one_for_the_same_minus_one_for_the_mirror_and_finds_a_shift() {
    let doc = example_document(&Broadening::default());
    let model = Model::from_document(&doc).expect("model");
    let step = 0.005;
    let grid: Vec<f64> = (0..1400).map(|i| 3.0 + step * i as f64).collect();
    let de = evaluate(&model, &grid.iter().map(|e| AxisUnit::ElectronVolt.to_wavenumber(*e)).collect::<Vec<_>>())
        .expect("spectra")
        .delta_epsilon;
    assert!((overlap(&de, &de) - 1.0).abs() < 1e-12);
    let mirror: Vec<f64> = de.iter().map(|v| -v).collect();
    assert!((overlap(&de, &mirror) + 1.0).abs() < 1e-12);
    // A "measurement" that is the computed spectrum moved by +0.23 eV.
    let at: Vec<f64> = (0..500).map(|i| 4.0 + step * i as f64).collect();
    let moved: Vec<f64> = at.iter().map(|e| chiroptic::processing::interpolate(&grid, &de, e - 0.23).unwrap_or(0.0)).collect();
    let (shift, s) = best_shift(&grid, &de, &at, &moved, 1.0, 0.01, 1.0);
    assert!((shift - 0.23).abs() < 1e-3, "shift {shift}");
    assert!(s > 0.9999, "{s}");
    let (_, s_mirror) = best_shift(&grid, &de, &at, &moved, 1.0, 0.01, -1.0);
    assert!(s_mirror < s);
}

#[test]
fn bad_tables_name_the_line() {
    let cases = [
        ("energy_eV f R\n4.5 0.1 3\n", 1, "must start with a \"conformer"),
        ("conformer A, energy 0.0 kcal/mol\nstate f R\n1 0.1 3\n", 2, "no excitation column"),
        ("conformer A, energy 0.0 kcal/mol\nenergy_eV f\n4.5 0.1\n", 2, "no rotatory strength column"),
        ("conformer A, energy 0.0 kcal/mol\nenergy_eV f R\n4.5 -0.1 3\n", 3, "cannot be negative"),
        ("conformer A, energy 0.5\nenergy_eV f R\n4.5 0.1 3\n", 1, "needs its unit"),
        ("conformer A, energy 0.5 furlongs\nenergy_eV f R\n4.5 0.1 3\n", 1, "needs its unit"),
        ("conformer A, energy 0 eV\nenergy_eV f R\n4.5 0.1\n", 3, "3 columns expected, found 2"),
        ("conformer A, energy 0 eV\nenergy_eV f R\n4.5 abc 3\n", 3, "not a number"),
        ("conformer A, energy 0 eV\nenergy_eV f R\n-4.5 0.1 3\n", 3, "must be positive"),
        ("conformer A, energy 0 eV\n4.5 0.1 3\n", 2, "header row"),
        ("conformer A, population -0.2\nenergy_eV f R\n4.5 0.1 3\n", 1, "cannot be negative"),
    ];
    for (text, line, phrase) in cases {
        let e = table::parse(text).expect_err(text);
        assert_eq!(e.line, line, "{text}: {e}");
        assert!(e.message.contains(phrase), "{text}: {e}");
    }
    let e = table::parse("conformer A, energy 0 eV\nenergy_eV f R\n").expect_err("empty");
    assert!(e.message.contains("no transitions"), "{e}");
}

/// The example list as a document's `states` section.
fn states_document(b: &Broadening) -> Document {
    let conformers = table::parse(EXAMPLE).expect("example reads");
    let mut doc = example_document(b);
    doc.bands.clear();
    doc.states = Some(states::doc::to_doc(&conformers, b));
    doc
}

#[test]
fn the_states_section_broadens_as_the_numpy_scipy_computation() {
    // The document's own transitions, summed through nodes on a fine grid
    // (180-340 nm every 0.05 nm holds every reference wavelength), against
    // fixtures/states/states_scipy.csv: the same tolerance as the bands.
    let doc = states_document(&Broadening::default());
    let model = Model::from_document(&doc).expect("model");
    let nm: Vec<f64> = (0..=3200).map(|i| 180.0 + 0.05 * i as f64).collect();
    let s = evaluate(&model, &nm.iter().map(|x| 1e7 / x).collect::<Vec<_>>()).expect("spectra");
    let (rows, peak) = reference();
    for r in &rows {
        let i = ((r[0] - 180.0) / 0.05).round() as usize;
        assert!((nm[i] - r[0]).abs() < 1e-9);
        assert!((s.delta_epsilon[i] - r[1]).abs() <= 1e-9 * peak(1), "De at {} nm: {} vs {}", r[0], s.delta_epsilon[i], r[1]);
        assert!((s.epsilon[i] - r[2]).abs() <= 1e-8 * peak(2), "e at {} nm: {} vs {}", r[0], s.epsilon[i], r[2]);
    }
    // The states give no bands of their own to the band list.
    assert!(s.bands.is_empty() && model.states.as_ref().expect("states").bands.len() == 7);
}

#[test]
fn an_edit_elsewhere_reuses_the_states_sums_to_the_bit() {
    let mut doc = states_document(&Broadening::default());
    let nu: Vec<f64> = (0..2000).map(|i| AxisUnit::Nanometre.to_wavenumber(180.0 + 0.2 * i as f64)).collect();
    let first = evaluate(&Model::from_document(&doc).expect("model"), &nu).expect("spectra");
    doc.sample.concentration_mol_per_l = 0.002;
    let model = Model::from_document(&doc).expect("model");
    let reused = chiroptic::spectra::evaluate_reusing(&model, &nu, Some(&first)).expect("spectra");
    let fresh = evaluate(&model, &nu).expect("spectra");
    assert!(reused.delta_epsilon == fresh.delta_epsilon && reused.rotation_deg == fresh.rotation_deg, "the totals differ");
    // Compared as printed: g is NaN (missing) where e is negligible, and NaN != NaN.
    assert!(format!("{reused:?}") == format!("{fresh:?}"), "some column differs");
}

#[test]
fn shares_set_by_hand_leave_the_rest_to_boltzmann() {
    // Three conformers at 0, 0.65 and 1.2 kcal/mol; C set to 40 % by hand:
    // A and B divide 60 % in their Boltzmann ratio exp(-0.65 kcal/mol / RT)
    // (R = 8.314462618 J/(mol K), CODATA; 1 kcal = 4184 J).
    let text = format!("{EXAMPLE}conformer C, energy 1.2 kcal/mol\nenergy_eV f R\n5.0 0.1 5\n");
    let mut c = table::parse(&text).expect("reads");
    c[2].share = Some(0.4);
    let p = states::populations(&c, 298.15).expect("populations");
    let ratio = (-0.65 * 4184.0 / (8.314462618 * 298.15_f64)).exp();
    assert!((p[2] - 0.4).abs() < 1e-15);
    assert!((p[0] - 0.6 / (1.0 + ratio)).abs() < 1e-9 && (p[1] - 0.6 * ratio / (1.0 + ratio)).abs() < 1e-9, "{p:?}");
    // Every enabled conformer set by hand: normalised; switched off: no share.
    c[0].share = Some(0.3);
    c[1].share = Some(0.3);
    let p = states::populations(&c, 298.15).expect("populations");
    assert!((p[0] - 0.3).abs() < 1e-15 && (p[2] - 0.4).abs() < 1e-15);
    c[1].enabled = false;
    let p = states::populations(&c, 298.15).expect("populations");
    assert!((p[0] - 3.0 / 7.0).abs() < 1e-15 && p[1] == 0.0, "{p:?}");
    // More than 100 % set by hand beside a conformer left to Boltzmann.
    c[1].enabled = true;
    c[1].share = None;
    c[0].share = Some(0.7);
    let e = states::populations(&c, 298.15).expect_err("110 %");
    assert!(e.to_string().contains("110.0 %"), "{e}");
}

#[test]
fn the_states_section_round_trips_and_names_what_is_wrong() {
    let doc = states_document(&Broadening { fwhm_ev: 0.25, shift_ev: -0.1, gauge: states::Gauge::Velocity, ..Broadening::default() });
    let text = doc.to_json_pretty();
    let back = Document::from_json(&text).expect("reads back");
    assert_eq!(back, doc);
    let (conformers, b) = states::doc::from_doc(back.states.as_ref().expect("states")).expect("valid");
    assert_eq!(conformers, table::parse(EXAMPLE).expect("reads"));
    assert_eq!((b.fwhm_ev, b.shift_ev, b.gauge), (0.25, -0.1, states::Gauge::Velocity));
    let value: serde_json::Value = serde_json::from_str(&text).expect("json");
    let cases: [(&str, serde_json::Value, &str); 7] = [
        ("/states/conformers/0/transitions/0/oscillator_strength", serde_json::json!(-0.1), "oscillator strength must be 0 or more"),
        ("/states/conformers/0/transitions/0/wavelength_nm", serde_json::json!(250.0), "not both"),
        ("/states/conformers/0/transitions/0/energy_ev", serde_json::json!(-4.0), "must be positive"),
        ("/states/broadening/shape", serde_json::json!("sinc"), "unknown shape"),
        ("/states/broadening/fwhm_ev", serde_json::json!(-0.3), "width"),
        ("/states/conformers/1/population", serde_json::json!(0.3), "more than once"),
        ("/states/conformers/1/share", serde_json::json!(1.5), "0..1"),
    ];
    for (path, v, phrase) in cases {
        let mut bad = value.clone();
        let (parent, key) = path.rsplit_once('/').expect("path");
        bad.pointer_mut(parent).expect(parent)[key] = v;
        let e = Model::from_document(&Document::from_value(bad).expect("parses")).expect_err(path);
        assert!(e.to_string().contains(phrase), "{path}: {e}");
    }
    let mut voigt = value.clone();
    voigt["states"]["broadening"]["shape"] = "voigt".into();
    let e = Model::from_document(&Document::from_value(voigt).expect("parses")).expect_err("voigt");
    assert!(e.to_string().contains("lorentz_fwhm_ev"), "{e}");
}

#[test]
fn each_stick_is_as_tall_as_its_own_band_at_its_centre() {
    // Two transitions 2 eV apart (their 0.3 eV wide CD bands do not
    // overlap): on the CD and absorption plots each stick's height is the
    // spectrum's value at its centre, in the plot's unit; the ORD plot has none.
    let list = "conformer A, energy 0 kcal/mol\nenergy_eV f R\n4.0 0.1 20\n6.0 0.2 -30\n";
    let conformers = table::parse(list).expect("reads");
    let mut doc = example_document(&Broadening::default());
    doc.bands.clear();
    doc.states = Some(states::doc::to_doc(&conformers, &Broadening::default()));
    let model = Model::from_document(&doc).expect("model");
    let centres: Vec<f64> = [4.0, 6.0].iter().map(|e| AxisUnit::ElectronVolt.to_wavenumber(*e)).collect();
    let s = evaluate(&model, &centres).expect("spectra");
    use chiroptic::figures::{sticks, PlotKind, PlotRequest};
    let range = (3.0, 7.0);
    let cd = sticks(&PlotRequest::new(PlotKind::Cd, &s, AxisUnit::ElectronVolt, range));
    let abs = sticks(&PlotRequest::new(PlotKind::Absorption, &s, AxisUnit::ElectronVolt, range));
    for (i, e) in [4.0, 6.0].iter().enumerate() {
        assert!((cd[i].0 - e).abs() < 1e-12 && (abs[i].0 - e).abs() < 1e-12);
        assert!((cd[i].1 / s.delta_epsilon[i] - 1.0).abs() < 1e-9, "{:?} vs {}", cd[i], s.delta_epsilon[i]);
        assert!((abs[i].1 / s.epsilon[i] - 1.0).abs() < 1e-9, "{:?} vs {}", abs[i], s.epsilon[i]);
    }
    assert!(cd[0].1 > 0.0 && cd[1].1 < 0.0, "the signs of R");
    let mut mdeg = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::ElectronVolt, range);
    mdeg.cd_unit = chiroptic::units::CdUnit::Millidegrees;
    assert!((sticks(&mdeg)[1].1 / s.ellipticity_mdeg[1] - 1.0).abs() < 1e-9);
    assert!(sticks(&PlotRequest::new(PlotKind::Ord, &s, AxisUnit::ElectronVolt, range)).is_empty());
}

#[test]
fn a_transition_may_carry_its_own_width() {
    // A sigma or FWHM column (eV) replaces the broadening's width for its
    // rows: FWHM = 2 sqrt(2 ln 2) sigma (common practice), 1 eV = 8065.543937
    // cm^-1 (CODATA 2018); rows of a list without one keep the common width.
    let list = "conformer A, energy 0 kcal/mol\nenergy_eV f R sigma_eV\n4.0 0.1 20 0.1\n5.0 0.1 20 0.2\n\
                conformer B, energy 0 kcal/mol\nenergy_eV, f, R, FWHM (eV)\n6.0, 0.1, 10, 0.5\n\
                conformer C, energy 0 kcal/mol\nenergy_eV f R\n6.5 0.1 10\n";
    let c = table::parse(list).expect("reads");
    let b = Broadening::default();
    let bands = states::bands(&c, &b).expect("bands");
    let fwhm_per_sigma = 2.0 * (2.0 * std::f64::consts::LN_2).sqrt();
    for (band, fwhm_ev) in bands.iter().zip([0.1 * fwhm_per_sigma, 0.2 * fwhm_per_sigma, 0.5, states::DEFAULT_FWHM_EV]) {
        assert!((band.fwhm_cm1 / (fwhm_ev * 8065.543937) - 1.0).abs() < 1e-9, "{} vs {fwhm_ev} eV", band.fwhm_cm1);
    }
    // The document keeps each width, and a bad one is named.
    let section = states::doc::to_doc(&c, &b);
    assert_eq!(states::doc::from_doc(&section).expect("valid").0, c);
    let mut bad = section.clone();
    bad.conformers[1].transitions[0].fwhm_ev = Some(-0.5);
    let e = states::doc::from_doc(&bad).expect_err("negative width");
    assert!(e.to_string().contains("states.conformers[1].transitions[0].fwhm_ev"), "{e}");
    let e = table::parse("conformer A, energy 0 eV\nenergy_eV f R fwhm_eV\n4.5 0.1 3 -0.2\n").expect_err("negative");
    assert_eq!(e.line, 3);
    assert!(e.message.contains("width must be positive"), "{e}");
}

#[test]
fn faults_of_shares_and_broadening_are_placed_in_the_section() {
    // The page shows a refusal beside the control its field names.
    let mut doc = states_document(&Broadening::default());
    let section = doc.states.as_mut().expect("states");
    section.conformers[0].share = Some(0.8);
    section.conformers[1].share = None;
    let text = format!("{EXAMPLE}conformer C, energy 1.2 kcal/mol\nenergy_eV f R\n5.0 0.1 5\n");
    let mut three = states_document(&Broadening::default());
    three.states = Some(states::doc::to_doc(&table::parse(&text).expect("reads"), &Broadening::default()));
    let s = three.states.as_mut().expect("states");
    s.conformers[0].share = Some(0.7);
    s.conformers[1].share = Some(0.4);
    let e = Model::from_document(&three).expect_err("110 %");
    assert_eq!(e.field, "states.conformers", "{e}");
    let mut shifted = states_document(&Broadening::default());
    shifted.states.as_mut().expect("states").broadening.shift_ev = -5.0;
    let e = Model::from_document(&shifted).expect_err("below zero");
    assert_eq!(e.field, "states.broadening.shift_ev", "{e}");
    assert!(Model::from_document(&doc).is_ok(), "80 % for A leaves B the rest");
}

#[test]
fn frame_bands_counts_the_computed_states() {
    // The example's transitions span 4.22-6.10 eV (203-294 nm), 0.3 eV wide:
    // each centre ± 3 FWHM in wavenumber (view::FRAME_WIDTHS), rounded out
    // to whole nm, with no bands of the document's own.
    let doc = states_document(&Broadening::default());
    let model = Model::from_document(&doc).expect("model");
    let (lo, hi) = chiroptic::view::frame_bands(&doc, &model);
    let nm = |ev: f64, widths: f64| 1e7 / AxisUnit::ElectronVolt.to_wavenumber(ev + widths * 0.3);
    assert_eq!(lo, nm(6.10, 3.0).floor(), "short end from the highest state");
    assert_eq!(hi, nm(4.22, -3.0).ceil(), "long end from the lowest state");
}
