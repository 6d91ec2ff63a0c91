//! The colour of a sample between polarisers (`chiroptic::colour`): the CIE
//! tables, the polarimeter's Jones calculus, the quartz transition tint, an
//! independent colour-science computation, the side view and the CLI verb.
//! Each check names its source; "from memory" marks a recalled value.

use chiroptic::colour::side::{self, SideViewRequest};
use chiroptic::colour::{self, tables, Illuminant, Optics, Weights};
use chiroptic::lines::DrudeTerm;
use chiroptic::units::{self, AxisUnit};
use chiroptic::{Document, Model};
use num_complex::Complex64;
use serde_json::{json, Value};
use std::f64::consts::PI;

fn model_of(doc: &Value) -> Model {
    let d = Document::from_json(&doc.to_string()).expect("test document reads");
    Model::from_document(&d).expect("test document validates")
}

/// No bands in a medium of index 1: only the polarisers act.
fn empty_sample() -> Value {
    json!({"chiroptic": 1, "sample": {"concentration_mol_per_l": 1.0, "path_length_cm": 1.0, "solvent": {"constant": 1.0}}, "bands": []})
}

/// Quartz along its optic axis as one Lorentz band through the one-term
/// Drude law fitted to the rotation table of physics.md (handbook tables;
/// from memory), built as crate/tests/physics.rs builds it.
fn quartz(thickness_mm: f64) -> Value {
    let table = [(404.7, 48.95), (435.8, 41.55), (546.1, 25.54), (589.3, 21.72)];
    let term = DrudeTerm::fit(&table).expect("quartz Drude term");
    // The table is per mm: R for a 1 mm path at 1 mol/L, then any thickness.
    let per_mm = units::SampleContext {
        concentration_mol_per_l: 1.0,
        path_length_cm: 1.0 / units::MM_PER_CM,
        molar_mass_g_per_mol: None,
        mean_residue_weight_g_per_mol: None,
    };
    let r = term.rotatory_strength_1e40(&per_mm);
    let d = chiroptic::model::dissymmetry_limited_dipole_strength(r);
    json!({"chiroptic": 1,
        "sample": {"concentration_mol_per_l": 1.0, "path_length_cm": thickness_mm / units::MM_PER_CM, "solvent": {"constant": 1.0}},
        "bands": [{"shape": "lorentz", "center_nm": term.lambda0_nm, "fwhm_cm1": 100.0, "rotatory_strength_1e40_cgs": r, "dipole_strength_debye2": d}]})
}

fn xy_of(xyz: [f64; 3]) -> [f64; 2] {
    let s = xyz[0] + xyz[1] + xyz[2];
    [xyz[0] / s, xyz[1] / s]
}

/// Chromaticity of the spectral locus at table entry i.
fn locus(i: usize) -> [f64; 2] {
    xy_of([tables::CMF_X[i], tables::CMF_Y[i], tables::CMF_Z[i]])
}

fn white(ill: Illuminant) -> [f64; 3] {
    Weights::new(ill).xyz(|_| 1.0)
}

/// Hue angle about a white point in the xy diagram, degrees.
fn hue_deg(xy: [f64; 2], w: [f64; 2]) -> f64 {
    (xy[1] - w[1]).atan2(xy[0] - w[0]).to_degrees()
}

/// CIELAB (CIE 15:2004, 8.2.1) relative to a white of Y = 1.
fn lab(xyz: [f64; 3], white: [f64; 3]) -> [f64; 3] {
    let f = |t: f64| if t > (6.0f64 / 29.0).powi(3) { t.cbrt() } else { t / (3.0 * (6.0f64 / 29.0).powi(2)) + 4.0 / 29.0 };
    let [fx, fy, fz] = [f(xyz[0] / white[0]), f(xyz[1] / white[1]), f(xyz[2] / white[2])];
    [116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)]
}

fn delta_e(a: [f64; 3], b: [f64; 3]) -> f64 {
    ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt()
}

fn nu_of(i: usize) -> f64 {
    AxisUnit::Nanometre.to_wavenumber(colour::wavelength_nm(i))
}

// ---------------------------------------------------------------------------
// The CIE tables.

#[test]
fn colour_matching_functions_have_equal_sums_and_the_cie_integral() {
    // CIE 15: the three functions have equal integrals (equal-energy white
    // E at x = y = 1/3), and int y-bar dlambda = 106.857 nm (CIE 1931 tables;
    // from memory; colour-science's 5 nm sums over 380-780 nm: 106.8576,
    // 106.8566, 106.8577).
    let sum = |t: &[f64]| t.iter().sum::<f64>() * tables::STEP_NM;
    let (x, y, z) = (sum(&tables::CMF_X), sum(&tables::CMF_Y), sum(&tables::CMF_Z));
    assert!((y - 106.857).abs() < 0.01, "sum y-bar = {y}");
    assert!((x - y).abs() / y < 2e-5 && (z - y).abs() / y < 2e-5, "{x} {y} {z}");
    let e = colour::Colour::from_xyz(white(Illuminant::E));
    assert!((e.xy[0] - 1.0 / 3.0).abs() < 1e-5 && (e.xy[1] - 1.0 / 3.0).abs() < 1e-5, "E: {:?}", e.xy);
}

#[test]
fn d65_white_point_and_srgb_white() {
    // CIE 15: D65 at (x, y) = (0.3127, 0.3290) (common practice, 4 decimals);
    // IEC 61966-2-1: sRGB of D65 white is (1, 1, 1).
    let c = colour::Colour::from_xyz(white(Illuminant::D65));
    assert!((c.xy[0] - 0.3127).abs() < 5e-5 && (c.xy[1] - 0.3290).abs() < 5e-5, "D65 {:?}", c.xy);
    assert!((c.luminance() - 1.0).abs() < 1e-12);
    for v in c.srgb_linear {
        assert!((v - 1.0).abs() < 1e-3, "linear {:?}", c.srgb_linear);
    }
    assert_eq!(c.srgb_8bit, [255, 255, 255]);
    assert!(!c.clipped);
}

#[test]
fn illuminant_a_from_planck_and_the_led_have_their_cie_white_points() {
    // CIE 15:2004 table T.3: A at (0.44757, 0.40745); CIE 15:2018 table 11:
    // LED-B3 at (0.3756, 0.3723) (values as colour-science lists them).
    let a = xy_of(white(Illuminant::A));
    assert!((a[0] - 0.44757).abs() < 1e-4 && (a[1] - 0.40745).abs() < 1e-4, "A {a:?}");
    let led = xy_of(white(Illuminant::Led));
    assert!((led[0] - 0.3756).abs() < 5e-4 && (led[1] - 0.3723).abs() < 5e-4, "LED {led:?}");
    // Planck's law: the ratio of A's power at 780 and 380 nm, from the
    // closed form with c2 = 1.438777 cm K (CODATA 2018).
    let s = Illuminant::A.spectrum();
    let ratio = |l1: f64, l2: f64| (l2 / l1).powi(5) * (1.438777e7 / (l2 * 2856.0)).exp_m1() / (1.438777e7 / (l1 * 2856.0)).exp_m1();
    assert!((s[80] / s[0] - ratio(780.0, 380.0)).abs() / ratio(780.0, 380.0) < 1e-6);
}

// ---------------------------------------------------------------------------
// The polarimeter.

#[test]
fn without_a_sample_crossed_polarisers_are_black_and_parallel_ones_pass_the_white() {
    // Ideal polarisers (Malus's law, cos^2 beta): crossed pass nothing,
    // parallel pass all the polariser's light, i.e. the illuminant's white.
    let m = model_of(&empty_sample());
    for ill in Illuminant::ALL {
        let crossed = colour::end_on(&m, 90.0, ill).unwrap();
        assert!(crossed.luminance().abs() < 1e-20, "{ill:?} crossed Y = {}", crossed.luminance());
        assert_eq!(crossed.srgb_8bit, [0, 0, 0]);
        let parallel = colour::end_on(&m, 0.0, ill).unwrap();
        let w = white(ill);
        for c in 0..3 {
            assert!((parallel.xyz[c] - w[c]).abs() < 1e-12, "{ill:?} {:?} vs {w:?}", parallel.xyz);
        }
        // Malus at 60 degrees: a quarter of the light.
        let at60 = colour::end_on(&m, 60.0, ill).unwrap();
        assert!((at60.luminance() - 0.25).abs() < 1e-12);
    }
}

#[test]
fn a_dextrorotatory_sample_passes_most_where_the_analyser_follows_its_rotation() {
    // physics.md: positive rotation is clockwise seen facing the light, and
    // the analyser angle is measured the same way, so each wavelength passes
    // fully at beta = phi(lambda) and not at all at phi + 90 (no CD to speak of).
    let m = model_of(&quartz(1.0));
    let optics = Optics::of_model(&m).unwrap();
    let nu: Vec<f64> = (0..tables::COUNT).map(nu_of).collect();
    let s = chiroptic::evaluate(&m, &nu).unwrap();
    // (The one-band quartz model carries the smallest D its R allows, so a
    // little CD and absorption remain: the extremes sit at phi, not at 1 and 0.)
    for i in (0..tables::COUNT).step_by(10) {
        let phi = s.rotation_deg[i];
        let t = |beta: f64| optics.transmission(i, beta);
        assert!(phi > 10.0, "dextrorotatory: {phi}");
        assert!(t(phi) > 0.99 && t(phi) > t(phi - 1.0) && t(phi) > t(phi + 1.0), "{} nm", colour::wavelength_nm(i));
        assert!(t(phi + 90.0) < 1e-6 && t(phi + 90.0) < t(phi + 89.0) && t(phi + 90.0) < t(phi + 91.0));
        assert!(t(-phi) < t(phi));
    }
}

#[test]
fn circular_dichroism_lets_light_through_crossed_polarisers_as_the_jones_calculus_says() {
    // Hand derivation: through the sample the amplitude along the analyser at
    // beta is T cos(beta - chi), chi = phi + i eta with phi = pi nu l Dn,
    // eta = pi nu l Dk, |T|^2 = exp(-2 pi nu l (k_L + k_R)); |cos(x - i eta)|^2
    // = cos^2 x + sinh^2 eta, so
    //     I(beta) = exp(-2 pi nu l (k_L + k_R)) [cos^2(beta - phi) + sinh^2 eta].
    // The ellipticity (eta) leaks light past crossed polarisers that the
    // rotation alone would not.
    let dye = json!({"chiroptic": 1,
        "sample": {"concentration_mol_per_l": 2e-4, "path_length_cm": 1.0, "solvent": {"sellmeier": "water-20c"}},
        "bands": [{"shape": "gaussian", "center_nm": 520.0, "fwhm_cm1": 2500.0, "rotatory_strength_1e40_cgs": 5000.0, "dipole_strength_debye2": 20.0}]});
    let m = model_of(&dye);
    let with_cd = Optics::of_model(&m).unwrap();
    let i = (520.0 - tables::START_NM) as usize / tables::STEP_NM as usize;
    let nu = nu_of(i);
    let s = chiroptic::evaluate(&m, &[nu]).unwrap();
    let l = 1.0;
    let (phi, eta) = (PI * nu * l * s.delta_n[0], PI * nu * l * s.delta_k[0]);
    let dim = (-2.0 * PI * nu * l * (s.k_left[0] + s.k_right[0])).exp();
    assert!(eta.abs() > 1e-3, "the band must have CD at 520 nm: eta = {eta}");
    for beta_deg in [0.0_f64, 30.0, 90.0, 135.0] {
        let expected = dim * ((beta_deg.to_radians() - phi).cos().powi(2) + eta.sinh().powi(2));
        let got = with_cd.transmission(i, beta_deg);
        assert!((got - expected).abs() <= 1e-12 * expected.max(1e-6), "beta {beta_deg}: {got} vs {expected}");
    }
    // The same ORD and mean absorption without the CD.
    let mut without = with_cd.clone();
    for c in &mut without.chi_per_cm {
        *c = Complex64::new(c.re, 0.0);
    }
    // Crossed polarisers: the CD adds exactly sum_lambda w_Y dim sinh^2 eta
    // (the formula above, wavelength by wavelength) to what the ORD leaks.
    let crossed = |o: &Optics| colour::end_on_optics(o, 90.0, Illuminant::D65).unwrap().luminance();
    let (y_cd, y_ord) = (crossed(&with_cd), crossed(&without));
    let w = Weights::new(Illuminant::D65);
    let added: f64 = (0..tables::COUNT)
        .map(|i| {
            let z = with_cd.path_cm;
            w.xyz[1][i] * (-2.0 * with_cd.attenuation_per_cm[i] * z).exp() * (with_cd.chi_per_cm[i].im * z).sinh().powi(2)
        })
        .sum();
    assert!(added > 0.05 * y_ord, "the CD's share: {added} of {y_ord}");
    assert!(((y_cd - y_ord) - added).abs() < 1e-12 * y_cd, "with CD {y_cd}, without {y_ord}, formula adds {added}");
}

// ---------------------------------------------------------------------------
// The quartz transition tint.

#[test]
fn quartz_of_3_75_mm_between_parallel_polarisers_shows_the_purple_transition_tint() {
    // Common practice (polarimetry texts; from memory): a 3.75 mm quartz
    // plate cut across its axis turns yellow light by 90 degrees, so between
    // parallel polarisers yellow is extinguished and the plate looks purple;
    // 0.1 mm thinner it turns red, 0.1 mm thicker blue.
    let optics = |mm: f64| Optics::of_model(&model_of(&quartz(mm))).unwrap();
    let plate = optics(3.75);
    let (i_min, t_min) =
        (0..tables::COUNT).map(|i| (i, plate.transmission(i, 0.0))).fold((0, f64::MAX), |a, b| if b.1 < a.1 { b } else { a });
    let lambda = colour::wavelength_nm(i_min);
    assert!((550.0..=590.0).contains(&lambda) && t_min < 1e-3, "extinguished at {lambda} nm ({t_min})");

    // Purple: a hue no single wavelength has, i.e. inside the triangle of the
    // white point and the spectral locus's two ends (CIE colorimetry's
    // "purple boundary"; common practice). Judged against the white of the
    // light used: A, the incandescent light of visual polarimetry.
    let ill = Illuminant::A;
    let w = xy_of(white(ill));
    let c = colour::end_on_optics(&plate, 0.0, ill).unwrap();
    let (violet, red) = (hue_deg(locus(0), w), hue_deg(locus(tables::COUNT - 1), w));
    let h = hue_deg(c.xy, w);
    assert!(violet < h && h < red, "tint hue {h} deg, purples lie between {violet} and {red}");

    // 0.1 mm either way: the hue moves towards red (thinner: the extinction
    // moves to shorter waves) or towards blue (thicker), by a visible step
    // (CIE76 colour difference above 5; a just-noticeable one is about 2.3,
    // common practice).
    for ill in [Illuminant::A, Illuminant::D65] {
        let w3 = white(ill);
        let w = xy_of(w3);
        let at = |mm: f64| colour::end_on_optics(&optics(mm), 0.0, ill).unwrap();
        let (thin, tint, thick) = (at(3.65), at(3.75), at(3.85));
        let (h_thin, h_tint, h_thick) = (hue_deg(thin.xy, w), hue_deg(tint.xy, w), hue_deg(thick.xy, w));
        assert!(h_thin > h_tint && h_tint > h_thick, "{ill:?}: hues {h_thin} {h_tint} {h_thick} (red is at larger angles)");
        assert!(thin.srgb_linear[0] > tint.srgb_linear[0] && thick.srgb_linear[2] > tint.srgb_linear[2], "{ill:?}");
        let (d1, d2) = (delta_e(lab(thin.xyz, w3), lab(tint.xyz, w3)), delta_e(lab(thick.xyz, w3), lab(tint.xyz, w3)));
        assert!(d1 > 5.0 && d2 > 5.0, "{ill:?}: Delta E {d1} {d2}");
    }
}

// ---------------------------------------------------------------------------
// An independent computation.

#[test]
fn colours_agree_with_the_colour_science_reference() {
    // fixtures/colour/make_colour_reference.py: the NumPy model of
    // fixtures/reference, the Jones matrix built as U diag(t_L, t_R) U^-1,
    // colour.sd_to_XYZ and colour.XYZ_to_sRGB (colour-science 0.4.7). The
    // two models' indices agree to about 1e-12 relative; 1e-7 leaves room for
    // the quadrature of the mean index in the reference.
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/colour/colour_reference.json")).unwrap();
    let reference: Value = serde_json::from_str(&text).unwrap();
    let cases = reference["cases"].as_array().unwrap();
    assert!(cases.len() >= 40);
    let mut worst = 0.0_f64;
    for case in cases {
        let ill = colour::parse_illuminant(case["illuminant"].as_str().unwrap()).unwrap();
        let beta = case["analyser_deg"].as_f64().unwrap();
        let c = colour::end_on(&model_of(&case["doc"]), beta, ill).unwrap();
        let get = |k: &str| case[k].as_array().unwrap().iter().map(|v| v.as_f64().unwrap()).collect::<Vec<_>>();
        let label = format!("{} {} {beta}", case["name"], case["illuminant"]);
        for (ours, theirs) in [
            (c.xyz.to_vec(), get("xyz")),
            (c.xy.to_vec(), get("xy")),
            (c.srgb_linear.to_vec(), get("srgb_linear")),
            (c.srgb.to_vec(), get("srgb")),
        ] {
            for (a, b) in ours.iter().zip(&theirs) {
                worst = worst.max((a - b).abs());
                assert!((a - b).abs() < 1e-7, "{label}: {ours:?} vs {theirs:?}");
            }
        }
    }
    eprintln!("largest difference from colour-science: {worst:e}");
}

// ---------------------------------------------------------------------------
// The strip.

#[test]
fn the_strip_runs_from_0_to_180_degrees_with_the_end_on_colours() {
    let m = model_of(&quartz(3.75));
    let strip = colour::strip(&m, Illuminant::D65, colour::DEFAULT_STRIP_SAMPLES).unwrap();
    assert_eq!(strip.len(), 181);
    assert_eq!((strip[0].analyser_deg, strip[180].analyser_deg), (0.0, 180.0));
    // Half a turn of the analyser is the same analyser.
    assert!(delta_e(strip[0].colour.xyz, strip[180].colour.xyz) < 1e-12);
    for k in [0, 45, 90, 137] {
        let single = colour::end_on(&m, k as f64, Illuminant::D65).unwrap();
        assert!(delta_e(strip[k].colour.xyz, single.xyz) < 1e-13);
    }
    for bad in [0, 1, colour::MAX_STRIP_SAMPLES + 1] {
        assert!(colour::strip(&m, Illuminant::D65, bad).is_err());
    }
}

// ---------------------------------------------------------------------------
// The side view.

fn long_tube() -> Value {
    // Quartz's dispersion at a fifth of its strength in a 10 cm tube: several
    // turns of the plane along the tube.
    let mut doc = quartz(100.0);
    doc["sample"]["concentration_mol_per_l"] = json!(0.2);
    doc
}

#[test]
fn side_view_centre_pixel_is_the_dipole_pattern_summed_over_the_spectrum() {
    // At the middle of the tube, level with the eye, the line of sight is
    // along c, so the scattered intensity |E|^2 - |n . E|^2 is |E_p|^2 =
    // exp(-2 a z) |cos chi(z)|^2 at z = l/2, Rayleigh-weighted (nu^4),
    // normalised so that light polarised across the line of sight gives
    // Y = 1, and averaged over the chord (0 <= s <= 2R) of the exit-path
    // absorption exp(-2 a s): (1 - exp(-4 a R)) / (4 a R). Tolerance 1e-4
    // relative: the linear interpolation of that absorption between depths.
    let optics = Optics::of_model(&model_of(&long_tube())).unwrap();
    let req = SideViewRequest { width: 301, height: 75, illuminant: Illuminant::D65, viewer_distance_cm: None };
    let view = side::render(&optics, &req).unwrap();
    let got = view.at(150, 37).unwrap();
    let s = Illuminant::D65.spectrum();
    let cmf = [tables::CMF_X, tables::CMF_Y, tables::CMF_Z];
    let power: Vec<f64> = (0..tables::COUNT).map(|i| s[i] * nu_of(i).powi(4)).collect();
    let norm: f64 = (0..tables::COUNT).map(|i| power[i] * tables::CMF_Y[i]).sum();
    for c in 0..3 {
        let expected: f64 = (0..tables::COUNT)
            .map(|i| {
                let (z, a, two_r) = (optics.path_cm / 2.0, optics.attenuation_per_cm[i], view.diameter_cm);
                let exit = if a > 0.0 { -(-2.0 * a * two_r).exp_m1() / (2.0 * a * two_r) } else { 1.0 };
                power[i] * cmf[c][i] / norm * (-2.0 * a * z).exp() * (optics.chi_per_cm[i] * z).cos().norm_sqr() * exit
            })
            .sum();
        assert!((got[c] - expected).abs() < 1e-4 * expected, "{c}: {} vs {expected}", got[c]);
    }
    assert_eq!(view.rgba().len(), 301 * 75 * 4);
    assert_eq!(view.viewer_distance_cm, 25.0);
}

#[test]
fn side_view_bands_slant_as_the_line_of_sight_tilts() {
    // Derived from the dipole pattern: at height v the direction to the eye
    // is tilted by atan(v/D) from the horizontal, so for a dextrorotatory
    // sample a dark band (E along that direction) comes earlier above the
    // axis and later below it, by 2 atan(v/D) / rho between the two heights.
    let optics = Optics::of_model(&model_of(&long_tube())).unwrap();
    let (w, h, d) = (600u32, 150u32, 12.0);
    let view =
        side::render(&optics, &SideViewRequest { width: w, height: h, illuminant: Illuminant::D65, viewer_distance_cm: Some(d) }).unwrap();
    let y = |col: u32, row: u32| view.at(col, row).unwrap()[1];
    let minima = |row: u32| -> Vec<u32> { (1..w - 1).filter(|&c| y(c, row) < y(c - 1, row) && y(c, row) <= y(c + 1, row)).collect() };
    let centre = minima(h / 2);
    // The dark bands near the middle of the tube and their spacing (half a turn).
    let mid = *centre.iter().min_by_key(|c| (**c as i64 - w as i64 / 2).abs()).unwrap();
    let next = *centre.iter().filter(|c| **c > mid + 5).min().unwrap();
    let px_per_cm = w as f64 / view.length_cm;
    let rho_deg_per_cm = 180.0 / ((next - mid) as f64 / px_per_cm);
    let near = |row: u32| *minima(row).iter().min_by_key(|c| (**c as i64 - mid as i64).abs()).unwrap();
    let (top, bottom) = (h / 8, h - 1 - h / 8);
    let v_edge = view.diameter_cm / 2.0 * d / (d * d - (view.diameter_cm / 2.0).powi(2)).sqrt();
    let v = v_edge * (1.0 - 2.0 * (top as f64 + 0.5) / h as f64);
    let predicted_px = 2.0 * (v / d).atan().to_degrees() / rho_deg_per_cm * px_per_cm;
    let (t, b) = (near(top), near(bottom));
    assert!(t < b, "top band at column {t}, bottom at {b}");
    let measured = (b - t) as f64;
    assert!((measured - predicted_px).abs() < 0.35 * predicted_px + 2.0, "shift {measured} px, predicted {predicted_px}");
}

#[test]
fn side_view_refuses_sizes_and_distances_it_cannot_draw() {
    let optics = Optics::of_model(&model_of(&long_tube())).unwrap();
    let req = |w, h, d| SideViewRequest { width: w, height: h, illuminant: Illuminant::E, viewer_distance_cm: d };
    for (w, h, d, field) in [
        (0, 150, None, "width"),
        (side::MAX_WIDTH + 1, 150, None, "width"),
        (600, u32::MAX, None, "height"),
        (600, 150, Some(f64::NAN), "viewer_distance_cm"),
        (600, 150, Some(-3.0), "viewer_distance_cm"),
        (600, 150, Some(1.0), "viewer_distance_cm"), // inside a 2.5 cm tube
    ] {
        let e = side::render(&optics, &req(w, h, d)).unwrap_err();
        assert_eq!(e.field, field, "{w} {h} {d:?}: {e}");
    }
}

// ---------------------------------------------------------------------------
// Nothing panics.

#[test]
fn odd_inputs_give_errors_or_finite_colours() {
    let m = model_of(&quartz(3.75));
    assert!(colour::end_on(&m, f64::NAN, Illuminant::D65).is_err());
    assert!(colour::end_on(&m, f64::INFINITY, Illuminant::D65).is_err());
    assert!(colour::parse_illuminant("d50").is_err());
    assert_eq!(colour::parse_illuminant("LED").unwrap(), Illuminant::Led);
    // A huge angle is just an angle.
    assert!(colour::end_on(&m, 1e15, Illuminant::D65).unwrap().xyz.iter().all(|v| v.is_finite()));
    // An absorbing sample over the longest path a document may hold: black, not NaN.
    let too_long = json!({"chiroptic": 1, "sample": {"concentration_mol_per_l": 1.0, "path_length_cm": 1e6, "solvent": {"constant": 1.33}}, "bands": []});
    assert!(Model::from_json(&too_long.to_string()).is_err(), "a 10 km path is refused (limits::MAX_PATH_LENGTH_CM)");
    let mut dye = json!({"chiroptic": 1,
        "sample": {"concentration_mol_per_l": 1.0, "path_length_cm": chiroptic::limits::MAX_PATH_LENGTH_CM, "solvent": {"constant": 1.33}},
        "bands": [{"shape": "gaussian", "center_nm": 520.0, "fwhm_cm1": 2500.0, "rotatory_strength_1e40_cgs": 5000.0, "dipole_strength_debye2": 20.0}]});
    let c = colour::end_on(&model_of(&dye), 0.0, Illuminant::A).unwrap();
    assert!(c.xyz.iter().all(|v| v.is_finite() && *v >= 0.0) && c.srgb_8bit == [0, 0, 0], "{c:?}");
    let view = side::render(
        &Optics::of_model(&model_of(&dye)).unwrap(),
        &SideViewRequest { width: 40, height: 10, illuminant: Illuminant::A, viewer_distance_cm: None },
    )
    .unwrap();
    assert!(view.pixels.iter().flatten().all(|p| p.iter().all(|v| v.is_finite())));
    // The water preset's range holds: the visible is inside it.
    dye["sample"]["solvent"] = json!({"sellmeier": "water-20c"});
    dye["sample"]["path_length_cm"] = json!(1.0);
    assert!(colour::end_on(&model_of(&dye), 0.0, Illuminant::A).is_ok());
}

// ---------------------------------------------------------------------------
// The CLI verb.

fn run(args: &[&str]) -> i32 {
    chiroptic::cli::run(std::iter::once("chiroptic").chain(args.iter().copied()).map(Into::into))
}

fn temp(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("chiroptic-colour-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

#[test]
fn cli_writes_a_png_of_the_side_view_and_refuses_bad_flags_with_exit_2() {
    let doc = temp("tube.json");
    std::fs::write(&doc, long_tube().to_string()).unwrap();
    let doc_s = doc.to_str().unwrap();
    let png = temp("tube.png");
    assert_eq!(run(&["colour", doc_s, "--side-view", "-o", png.to_str().unwrap(), "--width", "120", "--height", "30"]), 0);
    let bytes = std::fs::read(&png).unwrap();
    // PNG (ISO/IEC 15948): signature, IHDR with the size, IEND whose CRC-32
    // is AE 42 60 82 in every PNG file.
    assert_eq!(&bytes[..8], &[0x89, b'P', b'N', b'G', 0x0d, 0x0a, 0x1a, 0x0a]);
    assert_eq!(&bytes[12..16], b"IHDR");
    assert_eq!(u32::from_be_bytes(bytes[16..20].try_into().unwrap()), 120);
    assert_eq!(u32::from_be_bytes(bytes[20..24].try_into().unwrap()), 30);
    assert_eq!(&bytes[bytes.len() - 8..], &[b'I', b'E', b'N', b'D', 0xae, 0x42, 0x60, 0x82]);
    // The pixels inflate back to the rendered picture.
    let idat_len = u32::from_be_bytes(bytes[33..37].try_into().unwrap()) as usize;
    assert_eq!(&bytes[37..41], b"IDAT");
    let raw = miniz_oxide::inflate::decompress_to_vec_zlib(&bytes[41..41 + idat_len]).unwrap();
    let optics = Optics::of_model(&model_of(&long_tube())).unwrap();
    let rgba = side::render(&optics, &SideViewRequest { width: 120, height: 30, illuminant: Illuminant::D65, viewer_distance_cm: None })
        .unwrap()
        .rgba();
    let rows: Vec<u8> = raw.chunks(1 + 120 * 4).flat_map(|r| r[1..].to_vec()).collect();
    assert_eq!(rows, rgba);

    let svg = temp("tube.svg");
    assert_eq!(run(&["colour", doc_s, "--side-view", "-o", svg.to_str().unwrap(), "--width", "60", "--height", "15"]), 0);
    assert!(std::fs::read_to_string(&svg).unwrap().contains("data:image/png;base64,"));

    assert_eq!(run(&["colour", doc_s]), 0);
    assert_eq!(run(&["colour", doc_s, "--strip", "--samples", "19"]), 0);
    for bad in [
        vec!["colour", doc_s, "--illuminant", "d50"],
        vec!["colour", doc_s, "--analyser", "nan"],
        vec!["colour", doc_s, "--side-view"],
        vec!["colour", doc_s, "-o", "x.png"],
        vec!["colour", doc_s, "--side-view", "-o", "x.gif"],
        vec!["colour", doc_s, "--side-view", "-o", "x.png", "--width", "100000"],
        vec!["colour", doc_s, "--strip", "--samples", "1"],
        vec!["colour", "/nonexistent/doc.json"],
    ] {
        assert_eq!(run(&bad), 2, "{bad:?}");
    }
}

#[test]
fn the_picture_encoder_gives_the_codes_of_the_transfer_function() {
    // IEC 61966-2-1 (F.8) then rounding to 8 bits, against the threshold
    // table the pictures use.
    use chiroptic::colour::srgb;
    let enc = srgb::ByteEncoder::new();
    for k in 0..=120_000 {
        let v = -0.1 + 1.2 * k as f64 / 120_000.0;
        assert_eq!(enc.byte(v), srgb::to_byte(srgb::encode(srgb::clip(v))), "v = {v}");
    }
    assert_eq!(enc.byte(f64::NAN), 0);
}
