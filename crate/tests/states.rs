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
    };
    let nu = AxisUnit::ElectronVolt.to_wavenumber(5.0);
    assert!((states::dipole_strength(&t).expect("d") * 4.702e-7 * nu / 0.2 - 1.0).abs() < 1e-3);
}

#[test]
fn broadened_spectrum_matches_the_numpy_scipy_computation() {
    let doc = example_document(&Broadening::default());
    let model = Model::from_document(&doc).expect("model");
    let rows: Vec<Vec<f64>> = REFERENCE
        .lines()
        .filter(|l| !l.starts_with('#'))
        .skip(1)
        .map(|l| l.split(',').map(|v| v.parse().expect("number")).collect())
        .collect();
    let nu: Vec<f64> = rows.iter().map(|r| 1e7 / r[0]).collect();
    let s = evaluate(&model, &nu).expect("spectra");
    let peak = |k: usize| rows.iter().fold(0.0_f64, |m, r| m.max(r[k].abs()));
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
