//! Document reading and validation: every kind of bad input is a typed error
//! that names the field at fault (architecture.md invariants).

use chiroptic::{Document, ErrorKind, Model};

const GOOD: &str = r#"{
  "chiroptic": 1,
  "sample": {"concentration_mol_per_l": 0.001, "path_length_cm": 1.0,
             "molar_mass_g_per_mol": 342.3, "solvent": {"constant": 1.333}},
  "bands": [
    {"name": "B1", "shape": "lorentz", "center_nm": 290.0, "fwhm_cm1": 3000.0,
     "rotatory_strength_1e40_cgs": 10.0, "dipole_strength_debye2": 2.0},
    {"name": "B2", "shape": "voigt", "center_nm": 210.0, "fwhm_cm1": 3000.0, "lorentz_fwhm_cm1": 900.0,
     "rotatory_strength_1e40_cgs": -4.0, "dipole_strength_debye2": 5.0}
  ]
}"#;

fn with(from: &str, to: &str) -> String {
    assert!(GOOD.contains(from), "test edit must apply: {from}");
    GOOD.replacen(from, to, 1)
}

fn error_of(text: &str) -> chiroptic::Error {
    Model::from_json(text).expect_err("document must be refused")
}

#[test]
fn the_architecture_example_reads() {
    let m = Model::from_json(GOOD).unwrap();
    assert_eq!(m.bands.len(), 2);
    assert_eq!(m.bands[0].name, "B1");
}

#[test]
fn the_demo_document_reads() {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/demo/demo.json")).unwrap();
    let m = Model::from_json(&text).unwrap();
    assert_eq!(m.bands.len(), 3);
}

#[test]
fn documents_round_trip_through_json_exactly() {
    let doc = Document::from_json(GOOD).unwrap();
    assert_eq!(Document::from_json(&doc.to_json()).unwrap(), doc);
    assert_eq!(Document::from_json(&doc.to_json_pretty()).unwrap(), doc);
}

#[test]
fn negative_width_names_the_band_field() {
    let e = error_of(&with(
        r#""fwhm_cm1": 3000.0,
     "rotatory_strength_1e40_cgs": 10.0"#,
        r#""fwhm_cm1": -3000.0,
     "rotatory_strength_1e40_cgs": 10.0"#,
    ));
    assert_eq!(e.kind, ErrorKind::NotPositive);
    assert_eq!(e.field, "bands[0].fwhm_cm1");
    assert!(e.to_string().contains("width must be positive"), "{e}");
}

#[test]
fn zero_path_is_refused() {
    let e = error_of(&with(r#""path_length_cm": 1.0"#, r#""path_length_cm": 0"#));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::NotPositive, "sample.path_length_cm"));
}

#[test]
fn nan_is_refused() {
    // JSON cannot spell NaN, but a document built in code (or passed from the
    // page as a JS object) can hold one.
    let mut doc = Document::from_json(GOOD).unwrap();
    doc.bands[1].rotatory_strength_1e40_cgs = f64::NAN;
    let e = Model::from_document(&doc).unwrap_err();
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::NotFinite, "bands[1].rotatory_strength_1e40_cgs"));
    // And the JSON spelling is a syntax error, not a crash.
    let e = error_of(&with("10.0,", "NaN,"));
    assert_eq!(e.kind, ErrorKind::Syntax);
}

#[test]
fn centre_outside_50_nm_to_50_um_is_refused() {
    for bad in ["49.9", "50001", "-290"] {
        let e = error_of(&with(r#""center_nm": 290.0"#, &format!(r#""center_nm": {bad}"#)));
        assert_eq!((e.kind, e.field.as_str()), (ErrorKind::OutOfRange, "bands[0].center_nm"), "{bad}");
    }
    // At the ends of the range (a 100 cm^-1 width fits below 200 cm^-1 = 50 um).
    for ok in ["50", "50000"] {
        let text = with(r#""center_nm": 290.0, "fwhm_cm1": 3000.0"#, &format!(r#""center_nm": {ok}, "fwhm_cm1": 100.0"#));
        Model::from_json(&text).unwrap();
    }
}

#[test]
fn unknown_shape_is_refused_by_name() {
    let e = error_of(&with(r#""shape": "lorentz""#, r#""shape": "sech2""#));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::UnknownName, "bands[0].shape"));
    assert!(e.message.contains("sech2"));
}

#[test]
fn unknown_major_version_is_refused() {
    let e = error_of(&with(r#""chiroptic": 1"#, r#""chiroptic": 2, "future_field": true"#));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::UnknownVersion, "chiroptic"));
    let e = error_of(r#"{"sample": {}}"#);
    assert_eq!(e.kind, ErrorKind::MissingField);
}

#[test]
fn a_misspelt_field_is_named_not_ignored() {
    let e = error_of(&with(
        r#""fwhm_cm1": 3000.0,
     "rotatory"#,
        r#""fwhm_cm": 3000.0,
     "rotatory"#,
    ));
    assert_eq!(e.kind, ErrorKind::UnknownField);
    assert!(e.field.starts_with("bands[0]"), "{e}");
    assert!(e.message.contains("fwhm_cm"), "{e}");
}

#[test]
fn voigt_needs_its_lorentz_width_and_solvent_needs_one_kind() {
    let e = error_of(&with(r#", "lorentz_fwhm_cm1": 900.0"#, ""));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::MissingField, "bands[1].lorentz_fwhm_cm1"));
    let e = error_of(&with(r#"{"constant": 1.333}"#, r#"{"constant": 1.333, "sellmeier": "water-20c"}"#));
    assert_eq!(e.field, "sample.solvent");
    let e = error_of(&with(r#"{"constant": 1.333}"#, r#"{"sellmeier": "water-25c"}"#));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::UnknownName, "sample.solvent.sellmeier"));
    let e = error_of(&with(r#"{"constant": 1.333}"#, r#"{"sellmeier": {"b": [1.0], "c_um2": []}}"#));
    assert_eq!(e.kind, ErrorKind::OutOfRange);
}

#[test]
fn negative_dipole_strength_and_wrong_types_are_refused() {
    let e = error_of(&with(r#""dipole_strength_debye2": 2.0"#, r#""dipole_strength_debye2": -2.0"#));
    assert_eq!(e.field, "bands[0].dipole_strength_debye2");
    let e = error_of(&with(
        r#""fwhm_cm1": 3000.0,
     "rotatory"#,
        r#""fwhm_cm1": "wide",
     "rotatory"#,
    ));
    assert_eq!((e.kind, e.field.as_str()), (ErrorKind::Syntax, "bands[0].fwhm_cm1"));
}

#[test]
fn oversized_input_is_refused_before_parsing() {
    let huge = format!("{{\"chiroptic\": 1, \"title\": \"{}\"}}", "x".repeat(chiroptic::document::MAX_DOCUMENT_BYTES));
    let e = error_of(&huge);
    assert_eq!(e.kind, ErrorKind::TooLarge);
    let e = error_of("[1, 2, ");
    assert_eq!(e.kind, ErrorKind::Syntax);
}

#[test]
fn a_band_with_dissymmetry_beyond_two_is_refused() {
    // |g| = |De/e| <= 2 because e_L, e_R >= 0 (physics.md); at a band's
    // centre g = 4R/D with R in 1e-40 and D in 1e-36 esu^2 cm^2, so
    // D >= 2e-4 |R| debye^2. R = 10 needs D >= 0.002.
    let e = error_of(&with("\"dipole_strength_debye2\": 2.0", "\"dipole_strength_debye2\": 0.0019"));
    assert_eq!(e.kind, ErrorKind::OutOfRange);
    assert_eq!(e.field, "bands[0].dipole_strength_debye2");
    assert!(e.message.contains("0.002"), "{}", e.message);
    // D = 0 with R != 0 likewise; the limit itself and R = 0 with D = 0 are valid.
    let e = error_of(&with("\"dipole_strength_debye2\": 2.0", "\"dipole_strength_debye2\": 0"));
    assert_eq!(e.field, "bands[0].dipole_strength_debye2");
    assert!(Model::from_json(&with("\"dipole_strength_debye2\": 2.0", "\"dipole_strength_debye2\": 0.002")).is_ok());
    let achiral = with(
        "\"rotatory_strength_1e40_cgs\": 10.0, \"dipole_strength_debye2\": 2.0",
        "\"rotatory_strength_1e40_cgs\": 0, \"dipole_strength_debye2\": 0",
    );
    assert!(Model::from_json(&achiral).is_ok());
    // A negative R is limited by its magnitude.
    let e = error_of(&with("\"rotatory_strength_1e40_cgs\": -4.0", "\"rotatory_strength_1e40_cgs\": -40000"));
    assert_eq!(e.field, "bands[1].dipole_strength_debye2");
}
