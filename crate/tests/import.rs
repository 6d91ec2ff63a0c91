//! Delimited-text import: the invented demo written the ways instruments and
//! spreadsheets write tables (fixtures/import/make_fixtures.py, values from
//! the independent NumPy/SciPy model), read back to the right axis, quantity
//! and values; broken files refused with the line and what was expected; the
//! processing steps against published weights and hand-worked values.

use chiroptic::data::{axis_doc, data_set_doc, data_sets};
use chiroptic::document::{Document, SourceDoc, StepDoc};
use chiroptic::import::{self, ColumnChoice, ColumnKind, Measured};
use chiroptic::processing::savitzky_golay;
use chiroptic::units::{AxisUnit, CdUnit, SampleContext};
use chiroptic::{evaluate, Model};

const DEMO: &str = include_str!("../../fixtures/demo/demo.json");

fn fixture(name: &str) -> String {
    let path = format!("{}/../fixtures/import/{name}", env!("CARGO_MANIFEST_DIR"));
    let bytes = std::fs::read(&path).unwrap_or_else(|e| panic!("{path}: {e}"));
    String::from_utf8_lossy(&bytes).into_owned()
}

fn demo() -> (Document, Model) {
    let doc = Document::from_json(DEMO).expect("demo");
    let model = Model::from_document(&doc).expect("demo model");
    (doc, model)
}

/// Reads a good fixture and checks its values against the model (the
/// fixture's values came from the NumPy/SciPy model of the same demo).
/// `absolute` and `relative` tolerances match the digits the fixture wrote.
fn check_good(
    name: &str,
    axis: AxisUnit,
    measured: Measured,
    points: usize,
    absolute: f64,
    relative: f64,
) -> chiroptic::import::Recognised {
    let table = import::read(&fixture(&format!("good/{name}")), None).unwrap_or_else(|e| panic!("{name}: {e}"));
    let r = table.recognise(&ColumnChoice::default()).unwrap_or_else(|e| panic!("{name}: {e}"));
    assert_eq!(r.axis, axis, "{name}: axis");
    assert_eq!(r.measured, measured, "{name}: quantity");
    assert_eq!(r.x.len(), points, "{name}: points");
    let (_, model) = demo();
    let nu: Vec<f64> = r.x.iter().map(|v| axis.to_wavenumber(*v)).collect();
    let s = evaluate(&model, &nu).expect("demo evaluates");
    let want = match measured {
        Measured::Cd(u) => s.cd_in(u).expect("unit"),
        _ => unreachable!("the fixtures hold CD"),
    };
    for (got, w) in r.y.iter().zip(&want) {
        assert!((got - w).abs() <= absolute + relative * w.abs(), "{name}: {got} vs model {w}");
    }
    r
}

#[test]
fn semicolon_decimal_comma_with_metadata() {
    let r = check_good("semicolon-decimal-comma.csv", AxisUnit::Nanometre, Measured::Cd(CdUnit::Millidegrees), 421, 5e-5, 0.0);
    assert!(r.ht_v.as_ref().is_some_and(|h| (h[0] - 650.0).abs() < 1e-9), "HT column recognised");
    let table = import::read(&fixture("good/semicolon-decimal-comma.csv"), None).expect("reads");
    assert_eq!(table.metadata.len(), 4, "{:?}", table.metadata);
    assert!(table.metadata[2].contains("20,0 °C"), "metadata kept as written");
    assert!(table.notes.iter().any(|n| n.contains("decimal comma")), "{:?}", table.notes);
}

#[test]
fn tab_separated_wavenumber_axis_with_sd() {
    let r = check_good("tab-wavenumber.txt", AxisUnit::Wavenumber, Measured::Cd(CdUnit::DeltaEpsilon), 541, 0.0, 5e-7);
    // Written with 7 significant digits, hence the relative tolerance.
    let sd = r.sd.expect("sd column recognised");
    assert_eq!(sd.len(), 541);
    assert!(sd.iter().all(|v| *v > 0.0));
}

#[test]
fn descending_with_ht_column() {
    let r = check_good("descending-ht.csv", AxisUnit::Nanometre, Measured::Cd(CdUnit::Millidegrees), 421, 5e-6, 0.0);
    assert!(r.x[0] > r.x[1], "kept descending");
    assert!(r.ht_v.is_some());
}

#[test]
fn byte_order_mark_and_crlf() {
    let r = check_good("bom-crlf.csv", AxisUnit::Nanometre, Measured::Cd(CdUnit::Millidegrees), 421, 5e-5, 0.0);
    assert!(r.sd.is_some_and(|s| s.iter().all(|v| *v == 0.05)));
}

#[test]
fn space_aligned_greek_headers_cr_line_ends() {
    check_good("spaces-cr.txt", AxisUnit::Nanometre, Measured::Cd(CdUnit::DeltaEpsilon), 421, 5e-7, 0.0);
}

#[test]
fn a_file_without_header_needs_the_columns_named() {
    let table = import::read(&fixture("good/no-header.csv"), None).expect("reads");
    let e = table.recognise(&ColumnChoice::default()).expect_err("cannot tell");
    assert!(e.message.contains("--x-unit"), "{e}");
    let e = table.recognise(&ColumnChoice { axis: Some(AxisUnit::Nanometre), ..Default::default() }).expect_err("cannot tell");
    assert!(e.message.contains("--quantity") && e.message.contains("--data-unit"), "{e}");
    let r = table
        .recognise(&ColumnChoice { axis: Some(AxisUnit::Nanometre), column: None, measured: Some(Measured::Cd(CdUnit::Millidegrees)) })
        .expect("named");
    assert_eq!(r.x.len(), 421);
}

#[test]
fn headers_as_the_trade_writes_them() {
    // Common practice of instrument exports and papers.
    use chiroptic::units::{AbsorptionUnit, OrdUnit};
    let cases: [(&str, ColumnKind); 20] = [
        ("Wavelength [nm]", ColumnKind::Axis(AxisUnit::Nanometre)),
        ("wavelength (nm)", ColumnKind::Axis(AxisUnit::Nanometre)),
        ("λ/nm", ColumnKind::Axis(AxisUnit::Nanometre)),
        ("Wavenumber (cm-1)", ColumnKind::Axis(AxisUnit::Wavenumber)),
        ("eV", ColumnKind::Axis(AxisUnit::ElectronVolt)),
        ("CD [mdeg]", ColumnKind::Measured(Measured::Cd(CdUnit::Millidegrees))),
        ("Ellipticity (mdeg)", ColumnKind::Measured(Measured::Cd(CdUnit::Millidegrees))),
        ("θ", ColumnKind::Measured(Measured::Cd(CdUnit::Millidegrees))),
        ("Δε", ColumnKind::Measured(Measured::Cd(CdUnit::DeltaEpsilon))),
        ("delta epsilon (M-1 cm-1)", ColumnKind::Measured(Measured::Cd(CdUnit::DeltaEpsilon))),
        ("[θ]", ColumnKind::Measured(Measured::Cd(CdUnit::MolarEllipticity))),
        ("MRE", ColumnKind::Measured(Measured::Cd(CdUnit::MeanResidueEllipticity))),
        ("rotation (deg)", ColumnKind::Measured(Measured::Ord(OrdUnit::Degrees))),
        ("[α]", ColumnKind::Measured(Measured::Ord(OrdUnit::SpecificRotation))),
        ("Absorbance", ColumnKind::Measured(Measured::Absorption(AbsorptionUnit::Absorbance))),
        ("ε", ColumnKind::Measured(Measured::Absorption(AbsorptionUnit::MolarAbsorption))),
        ("HT [V]", ColumnKind::DetectorVolts),
        ("sd_mdeg", ColumnKind::Uncertainty),
        ("sigma", ColumnKind::Uncertainty),
        ("[θ] (deg cm2 dmol-1)", ColumnKind::Measured(Measured::Cd(CdUnit::MolarEllipticity))),
    ];
    for (header, want) in cases {
        assert_eq!(import::columns::recognise(header), Some(want), "{header}");
    }
    // A unit we do not know is not guessed.
    assert_eq!(import::columns::recognise("Wavelength (Å)"), None);
    assert_eq!(import::columns::recognise("CD (arbitrary)"), None);
}

#[test]
fn broken_files_name_the_line_and_what_was_expected() {
    let expected: serde_json::Value = serde_json::from_str(&fixture("broken/expected.json")).expect("expected.json");
    let cases = expected.as_object().expect("object");
    assert!(cases.len() >= 25, "at least 25 broken files");
    let (doc, model) = demo();
    for (name, want) in cases {
        let text = fixture(&format!("broken/{name}.txt"));
        let line = want["line"].as_u64().expect("line") as usize;
        let phrase = want["contains"].as_str().expect("phrase");
        // The whole path a file takes: read, recognise, validate as a data set.
        let message = match import::read(&text, None) {
            Err(e) => {
                assert_eq!(e.line, line, "{name}: {e}");
                e.to_string()
            }
            Ok(table) => match table.recognise(&ColumnChoice::default()) {
                Err(e) => e.to_string(),
                Ok(r) => {
                    let mut d = doc.clone();
                    d.data = vec![data_set_doc("set", &r, SourceDoc::default())];
                    match data_sets(&d, &model) {
                        Err(e) => e.to_string(),
                        Ok(_) => panic!("{name}: accepted"),
                    }
                }
            },
        };
        assert!(message.contains(phrase), "{name}: \"{message}\" should say \"{phrase}\"");
        if line > 0 {
            assert!(message.starts_with(&format!("line {line}:")), "{name}: {message}");
        }
    }
}

#[test]
fn an_oversized_paste_is_refused_by_its_size() {
    let huge = "1,2\n".repeat((import::MAX_IMPORT_BYTES / 4 + 1) as usize);
    let e = import::read(&huge, None).expect_err("too large");
    assert!(e.message.contains("limit"), "{e}");
}

#[test]
fn savitzky_golay_uses_the_published_weights() {
    // Savitzky and Golay (1964), Table I: quadratic, 5 points: (-3, 12, 17, 12, -3)/35;
    // 7 points: (-2, 3, 6, 7, 6, 3, -2)/21.
    for (window, weights, norm) in
        [(5usize, vec![-3.0, 12.0, 17.0, 12.0, -3.0], 35.0), (7, vec![-2.0, 3.0, 6.0, 7.0, 6.0, 3.0, -2.0], 21.0)]
    {
        let m = window / 2;
        let mut impulse = vec![0.0; 21];
        impulse[10] = 1.0;
        let out = savitzky_golay(&impulse, window, 2);
        for (k, w) in weights.iter().enumerate() {
            assert!((out[10 + m - k] - w / norm).abs() < 1e-14, "window {window}, weight {k}");
        }
    }
    // A polynomial of the smoothing order passes unchanged, ends included
    // (Gorry, Anal. Chem. 62, 570 (1990), for the end points).
    let y: Vec<f64> = (0..30)
        .map(|i| {
            let x = i as f64;
            2.0 - 0.5 * x + 0.03 * x * x - 0.001 * x * x * x
        })
        .collect();
    let out = savitzky_golay(&y, 9, 3);
    for (a, b) in out.iter().zip(&y) {
        assert!((a - b).abs() < 1e-10, "{a} vs {b}");
    }
}

fn demo_with_set(
    processing: Vec<StepDoc>,
    extra: Vec<chiroptic::document::DataSetDoc>,
) -> chiroptic::Result<Vec<chiroptic::data::DataSet>> {
    let (mut doc, model) = demo();
    let x: Vec<f64> = (0..=100).map(|i| 200.0 + i as f64).collect();
    let y: Vec<f64> = x.iter().map(|v| 10.0 + 0.01 * v).collect();
    let ht: Vec<f64> = x.iter().map(|v| if *v < 210.0 { 800.0 } else { 400.0 }).collect();
    let mut set = data_set_doc(
        "run",
        &chiroptic::import::Recognised {
            axis: AxisUnit::Nanometre,
            x: x.clone(),
            measured: Measured::Cd(CdUnit::Millidegrees),
            y,
            sd: None,
            ht_v: Some(ht),
            label: String::new(),
        },
        SourceDoc::default(),
    );
    set.processing = processing;
    doc.data = vec![set];
    doc.data.extend(extra);
    data_sets(&doc, &model)
}

#[test]
fn processing_steps_do_what_they_say() {
    // Zeroing over 290-300 nm subtracts the mean there: 10 + 0.01 * 295 = 12.95.
    let s = demo_with_set(vec![StepDoc::ZeroAt { from: 290.0, to: 300.0 }], vec![]).expect("valid");
    assert!((s[0].y[0] - (12.0 - 12.95)).abs() < 1e-12, "{}", s[0].y[0]);
    // Dropping points above 600 V removes 200-209 nm.
    let s = demo_with_set(vec![StepDoc::DropAboveHt { limit_v: 600.0 }], vec![]).expect("valid");
    assert_eq!(s[0].x.len(), 91);
    assert_eq!(s[0].x[0], 210.0);
    // Trimming keeps the range, either order.
    let s = demo_with_set(vec![StepDoc::Trim { from: 250.0, to: 220.0 }], vec![]).expect("valid");
    assert_eq!((s[0].x[0], s[0].x.len()), (220.0, 31));
    // A blank on a coarser grid is interpolated: blank = 0.01 * x exactly, so
    // the result is the constant 10.
    let bx: Vec<f64> = (0..=50).map(|i| 195.0 + 2.5 * i as f64).collect();
    let blank = data_set_doc(
        "blank",
        &chiroptic::import::Recognised {
            axis: AxisUnit::Nanometre,
            x: bx.clone(),
            measured: Measured::Cd(CdUnit::Millidegrees),
            y: bx.iter().map(|v| 0.01 * v).collect(),
            sd: None,
            ht_v: None,
            label: String::new(),
        },
        SourceDoc::default(),
    );
    let s = demo_with_set(vec![StepDoc::SubtractBlank { blank: "blank".into() }], vec![blank.clone()]).expect("valid");
    assert!(s[0].y.iter().all(|v| (v - 10.0).abs() < 1e-9));
    // Smoothing a straight line changes nothing, and says what it removed.
    let s = demo_with_set(vec![StepDoc::Smooth { window: 11, order: 2 }], vec![]).expect("valid");
    assert!(s[0].smoothing_removed.as_ref().is_some_and(|r| r.iter().all(|v| v.abs() < 1e-9)));
    // Bad steps are refused with the field named.
    let e = demo_with_set(vec![StepDoc::Smooth { window: 10, order: 2 }], vec![]).expect_err("even window");
    assert_eq!(e.field, "data[0].processing[0].smooth");
    let e = demo_with_set(vec![StepDoc::SubtractBlank { blank: "nothing".into() }], vec![]).expect_err("no such blank");
    assert!(e.message.contains("no data set named"), "{e}");
    let e = demo_with_set(vec![StepDoc::SubtractBlank { blank: "run".into() }], vec![]).expect_err("itself");
    assert!(e.message.contains("own blank"), "{e}");
    let e = demo_with_set(vec![StepDoc::ZeroAt { from: 500.0, to: 510.0 }], vec![]).expect_err("outside");
    assert!(e.message.contains("no point"), "{e}");
}

#[test]
fn measured_units_convert_through_the_units_module() {
    // Hand-worked (common practice, 32.98 and 3298.2 from Kelly, Jess and Price 2005):
    // 10 mdeg at 0.5 mM in a 1 mm cell: De = 0.010 / (32.98 * 0.0005 * 0.1) = 6.064;
    // [theta] = 100 * 0.010 / (0.0005 * 0.1) = 20000 deg cm2 dmol-1.
    let (mut doc, model) = demo();
    let set = data_set_doc(
        "run",
        &chiroptic::import::Recognised {
            axis: AxisUnit::Nanometre,
            x: vec![220.0, 221.0],
            measured: Measured::Cd(CdUnit::Millidegrees),
            y: vec![10.0, 10.0],
            sd: None,
            ht_v: None,
            label: String::new(),
        },
        SourceDoc::default(),
    );
    doc.data = vec![chiroptic::document::DataSetDoc {
        conditions: Some(chiroptic::document::ConditionsDoc {
            concentration_mol_per_l: Some(0.0005),
            path_length_cm: Some(0.1),
            temperature_c: Some(20.0),
        }),
        ..set
    }];
    let s = data_sets(&doc, &model).expect("valid").remove(0);
    let de = s.delta_epsilon().expect("cd")[0];
    assert!((de - 0.010 / (32.98 * 0.0005 * 0.1)).abs() < 1e-3 * de, "{de}");
    let molar = s.cd_in(CdUnit::MolarEllipticity, &s.context).expect("molar")[0];
    assert!((molar - 20000.0).abs() < 1e-9 * 20000.0, "{molar}");
    // Shown on a plot at the model's conditions (0.5 mM, 1 cm): 10x the mdeg.
    let shown = s.cd_in(CdUnit::Millidegrees, &model.sample.context).expect("mdeg")[0];
    assert!((shown - 100.0).abs() < 1e-9, "{shown}");
    // MRE needs a mean residue weight, and says so.
    let bare = SampleContext { mean_residue_weight_g_per_mol: None, ..s.context };
    assert!(s.cd_in(CdUnit::MeanResidueEllipticity, &bare).is_err());
    assert!(matches!(axis_doc(&[1.0, 1.5, 2.0, 2.5]), chiroptic::document::AxisValuesDoc::Even { count: 4, .. }));
}
