//! The command line as a script would use it: output format, exit codes and
//! one-line messages for bad input (architecture.md).

use std::path::PathBuf;
use std::process::{Command, Output};

fn chiroptic(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_chiroptic")).args(args).output().expect("binary runs")
}

fn demo() -> String {
    format!("{}/../fixtures/demo/demo.json", env!("CARGO_MANIFEST_DIR"))
}

fn temp_doc(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("chiroptic-cli-test-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

#[test]
fn eval_writes_one_row_per_grid_point_with_unit_headers() {
    let out = chiroptic(&["eval", &demo(), "--from", "200", "--to", "400", "--step", "0.5"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    for col in [
        "wavelength_nm",
        "wavenumber_cm1",
        "n_L",
        "n_R",
        "k_L",
        "k_R",
        "delta_n",
        "delta_k",
        "rotation_deg",
        "specific_rotation_deg_dm-1_(g/mL)-1",
        "ellipticity_mdeg",
        "delta_epsilon_M-1_cm-1",
        "epsilon_M-1_cm-1",
        "g_factor",
    ] {
        assert!(header.contains(&col), "missing column {col}");
    }
    let rows: Vec<Vec<f64>> = lines.map(parse_row).collect();
    assert_eq!(rows.len(), 401);
    assert_eq!(rows[0][0], 200.0);
    assert!((rows[400][0] - 400.0).abs() < 1e-9);
    assert!(rows.iter().all(|r| r.len() == header.len()));
    // wavelength and wavenumber agree: nu = 1e7 / lambda.
    assert!(rows.iter().all(|r| (r[0] * r[1] - 1e7).abs() < 1e-6));
}

/// A CSV row; an empty cell is a missing value (NaN).
fn parse_row(line: &str) -> Vec<f64> {
    line.split(',').map(|c| if c.is_empty() { f64::NAN } else { c.parse().unwrap_or_else(|_| panic!("bad cell {c}")) }).collect()
}

fn column(text: &str, name: &str) -> Vec<f64> {
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let i = header.iter().position(|h| *h == name).unwrap_or_else(|| panic!("no column {name} in {header:?}"));
    lines.map(|l| parse_row(l)[i]).collect()
}

#[test]
fn eval_writes_every_cd_unit_the_page_shows() {
    // A protein-like invented sample: 15 kDa, MRW 110, 1 mm, 0.2 mg/mL.
    let text = std::fs::read_to_string(demo()).unwrap().replacen(
        "\"molar_mass_g_per_mol\": 312.4,",
        "\"molar_mass_g_per_mol\": 15000, \"mean_residue_weight_g_per_mol\": 110,",
        1,
    );
    let p = temp_doc("protein-like.json", &text);
    let out = chiroptic(&["eval", p.to_str().unwrap(), "--from", "190", "--to", "260", "--step", "1"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let csv = String::from_utf8(out.stdout).unwrap();
    let de = column(&csv, "delta_epsilon_M-1_cm-1");
    let molar = column(&csv, "molar_ellipticity_deg_cm2_dmol-1");
    let mre = column(&csv, "mean_residue_ellipticity_deg_cm2_dmol-1");
    for i in 0..de.len() {
        // [theta] = 3298.2 De (Kelly, Jess and Price 2005) and MRE = [theta] MRW / M.
        assert!((molar[i] - 3298.2 * de[i]).abs() <= 1e-4 * molar[i].abs() + 1e-9, "row {i}");
        assert!((mre[i] - molar[i] * 110.0 / 15000.0).abs() <= 1e-12 * mre[i].abs() + 1e-12, "row {i}");
    }
    // Without a mean residue weight there is no MRE column, but [theta] stays.
    let out = chiroptic(&["eval", &demo(), "--from", "200", "--to", "210", "--step", "1"]);
    let csv = String::from_utf8(out.stdout).unwrap();
    let header = csv.lines().next().unwrap();
    assert!(header.contains("molar_ellipticity_deg_cm2_dmol-1") && !header.contains("mean_residue"), "{header}");
}

#[test]
fn g_is_missing_where_there_is_no_absorption() {
    // The demo's bands absorb below ~330 nm; at 600 nm e is far below 1e-3 of
    // its maximum, so g is an empty cell, not a ratio of tails.
    let out = chiroptic(&["eval", &demo(), "--from", "190", "--to", "650", "--step", "1"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let csv = String::from_utf8(out.stdout).unwrap();
    let g = column(&csv, "g_factor");
    let eps = column(&csv, "epsilon_M-1_cm-1");
    let max = eps.iter().fold(0.0_f64, |m, e| m.max(e.abs()));
    for (gi, e) in g.iter().zip(&eps) {
        assert_eq!(gi.is_nan(), e.abs() <= 1e-3 * max, "g {gi} at e {e}");
        // |g| <= 2 by definition wherever it is reported (physics.md).
        assert!(gi.is_nan() || gi.abs() <= 2.0);
    }
    assert!(g.last().unwrap().is_nan() && !g[10].is_nan());
}

#[test]
fn water_preset_is_refused_outside_its_fitted_range() {
    // Daimon and Masumura's water fit covers 182-1129 nm; below it the series
    // passes a pole at 161.9 nm (physics.md), so the grid is refused.
    for (from, to) in [("150", "300"), ("163", "300"), ("300", "1200")] {
        let out = chiroptic(&["eval", &demo(), "--from", from, "--to", to, "--step", "1"]);
        assert_bad_input(&out, &["water-20c", "182", "1129"]);
    }
}

#[test]
fn eval_accepts_wavenumber_and_ev_grids() {
    for (unit, from, to, step, rows) in [("cm-1", "30000", "40000", "100", 101), ("ev", "4", "6", "0.05", 41)] {
        let out = chiroptic(&["eval", &demo(), "--from", from, "--to", to, "--step", step, "--unit", unit]);
        assert!(out.status.success(), "{unit}: {}", String::from_utf8_lossy(&out.stderr));
        assert_eq!(String::from_utf8(out.stdout).unwrap().lines().count(), rows + 1, "{unit}");
    }
}

#[test]
fn lines_lists_every_standard_lamp_line() {
    let out = chiroptic(&["lines", &demo()]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    for name in ["Na D", "Hg 546", "Hg 436", "Hg 405", "Hg 365"] {
        assert!(text.contains(name), "missing {name}");
    }
    // [alpha] = phi / (l_dm c_g_per_ml) for the demo sample (0.5 mM, M 312.4, 1 cm).
    let na: Vec<&str> = text.lines().find(|l| l.starts_with("Na D")).unwrap().split(',').collect();
    let (phi, alpha): (f64, f64) = (na[2].parse().unwrap(), na[3].parse().unwrap());
    assert!((alpha - phi / (0.1 * 0.0005 * 312.4 / 1000.0)).abs() < 1e-9 * alpha.abs());
}

fn assert_bad_input(out: &Output, must_name: &[&str]) {
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
    assert!(!err.contains("panicked"), "{err}");
    for part in must_name {
        assert!(err.contains(part), "message must name {part}: {err}");
    }
}

#[test]
fn bad_documents_exit_2_with_one_line_naming_file_and_field() {
    let text = std::fs::read_to_string(demo()).unwrap().replacen("\"fwhm_cm1\": 2600.0", "\"fwhm_cm1\": -5", 1);
    let p = temp_doc("negative-width.json", &text);
    let path = p.to_str().unwrap();
    assert_bad_input(&chiroptic(&["eval", path]), &["negative-width.json", "bands[0].fwhm_cm1"]);
    assert_bad_input(&chiroptic(&["lines", path]), &["bands[0].fwhm_cm1"]);
    let p = temp_doc("broken.json", "{\"chiroptic\": 1, \"sample\": ");
    assert_bad_input(&chiroptic(&["eval", p.to_str().unwrap()]), &["broken.json", "JSON"]);
    assert_bad_input(&chiroptic(&["eval", "/nonexistent/model.json"]), &["/nonexistent/model.json"]);
}

#[test]
fn bands_with_dissymmetry_beyond_two_are_refused() {
    // |g| = 4|R|/D <= 2 (physics.md): R = 20000 with D = 1 would give g = 8.
    let text = std::fs::read_to_string(demo()).unwrap().replacen(
        "\"rotatory_strength_1e40_cgs\": 9.0",
        "\"rotatory_strength_1e40_cgs\": 20000",
        1,
    );
    let p = temp_doc("too-dissymmetric.json", &text);
    assert_bad_input(&chiroptic(&["eval", p.to_str().unwrap()]), &["bands[0].dipole_strength_debye2", "smallest D", "4 D²"]);
}

#[test]
fn bad_grids_exit_2() {
    assert_bad_input(&chiroptic(&["eval", &demo(), "--from", "200", "--to", "400"]), &["--step"]);
    assert_bad_input(&chiroptic(&["eval", &demo(), "--from", "200", "--to", "400", "--step", "-1"]), &["step"]);
    assert_bad_input(&chiroptic(&["eval", &demo(), "--from", "200", "--to", "400", "--step", "1e-9"]), &["limit"]);
    assert_bad_input(&chiroptic(&["eval", &demo(), "--from", "1", "--to", "2", "--step", "1", "--unit", "furlong"]), &["furlong"]);
}

fn fixture(name: &str) -> String {
    format!("{}/../fixtures/import/{name}", env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn import_writes_what_it_understood() {
    let out = chiroptic(&["import", &fixture("good/semicolon-decimal-comma.csv")]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let csv = String::from_utf8(out.stdout).unwrap();
    assert_eq!(csv.lines().next().unwrap(), "wavelength_nm,ellipticity_mdeg,ht_v");
    assert_eq!(csv.lines().count(), 422);
    // Decimal commas read as the numbers they are (invented demo fixture).
    assert!(csv.lines().nth(1).unwrap().starts_with("190,"), "{}", csv.lines().nth(1).unwrap());
    let notes = String::from_utf8_lossy(&out.stderr);
    assert!(notes.contains("decimal comma") && notes.contains("metadata"), "{notes}");

    let out = chiroptic(&["import", &fixture("good/tab-wavenumber.txt")]);
    let csv = String::from_utf8(out.stdout).unwrap();
    assert_eq!(csv.lines().next().unwrap(), "wavenumber_cm1,delta_epsilon_M-1_cm-1,sd_delta_epsilon_M-1_cm-1");
}

#[test]
fn import_says_which_flags_name_the_columns() {
    assert_bad_input(&chiroptic(&["import", &fixture("good/no-header.csv")]), &["no-header.csv", "--x-unit"]);
    let out = chiroptic(&["import", &fixture("good/no-header.csv"), "--x-unit", "nm", "--quantity", "cd", "--data-unit", "mdeg"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert_eq!(String::from_utf8(out.stdout).unwrap().lines().next().unwrap(), "wavelength_nm,ellipticity_mdeg");
    assert_bad_input(
        &chiroptic(&["import", &fixture("broken/04-short-row.txt")]),
        &["04-short-row.txt", "line 38", "2 columns expected, found 1"],
    );
    assert_bad_input(&chiroptic(&["import", &fixture("good/no-header.csv"), "--quantity", "cd"]), &["--data-unit"]);
}

#[test]
fn kk_predicts_the_lamp_line_rotations_from_measured_cd() {
    // The invented demo's CD "measured" over 190-400 nm (a fixture written by
    // the NumPy/SciPy model), with the demo's own bands standing for what lies
    // outside: the predicted rotations must be the model's own (chiroptic lines).
    let out = chiroptic(&["kk", &fixture("good/semicolon-decimal-comma.csv"), "--add", &demo(), "--lines"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let kk = String::from_utf8(out.stdout).unwrap();
    assert_eq!(kk.lines().next().unwrap(), "line,wavelength_nm,rotation_deg");
    let lines = String::from_utf8(chiroptic(&["lines", &demo()]).stdout).unwrap();
    let na = |text: &str, col: usize| -> f64 {
        text.lines().find(|l| l.starts_with("Na D")).unwrap().split(',').nth(col).unwrap().parse().unwrap()
    };
    let (predicted, model) = (na(&kk, 2), na(&lines, 2));
    assert!((predicted - model).abs() < 0.01 * model.abs(), "Na D: {predicted} from CD vs {model} from the model");

    // On a grid, in the data's own axis by default.
    let out = chiroptic(&["kk", &fixture("good/semicolon-decimal-comma.csv"), "--from", "200", "--to", "300", "--step", "10"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert_eq!(String::from_utf8(out.stdout).unwrap().lines().count(), 12);
    // ORD -> CD: rotation data give ellipticity.
    let out = chiroptic(&["eval", &demo(), "--from", "190", "--to", "600", "--step", "0.5"]);
    let ord: String = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            format!("{},{}\n", f[0], f[8])
        })
        .collect();
    let p = temp_doc("ord.csv", &ord);
    let out = chiroptic(&["kk", p.to_str().unwrap(), "--add", &demo(), "--from", "220", "--to", "320", "--step", "20"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert_eq!(String::from_utf8(out.stdout).unwrap().lines().next().unwrap(), "wavelength_nm,ellipticity_mdeg");
    assert_bad_input(&chiroptic(&["kk", &fixture("good/no-header.csv")]), &["--x-unit"]);
}

fn shared_jcamp(name: &str) -> String {
    // ../shared beside the checkout, or where the workplace keeps it.
    let beside = format!("{}/../../shared/data/jcamp/{name}", env!("CARGO_MANIFEST_DIR"));
    let path = if std::path::Path::new(&beside).exists() { beside } else { format!("/work/shared/data/jcamp/{name}") };
    assert!(std::path::Path::new(&path).exists(), "the public-domain JCAMP-DX test files are expected at ../shared/data/jcamp/ ({path})");
    path
}

#[test]
fn import_reads_jcamp_dx_with_its_units() {
    // Values from ../shared/data/jcamp/README.md (decoded by two independent decoders).
    let out = chiroptic(&["import", &shared_jcamp("dupinc1.jdx")]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let csv = String::from_utf8(out.stdout).unwrap();
    assert_eq!(csv.lines().next().unwrap(), "wavelength_nm,absorbance");
    let y = column(&csv, "absorbance");
    assert_eq!(y.len(), 440);
    assert!((y.iter().sum::<f64>() - 164.7604).abs() < 1e-9);
    assert_eq!(csv.lines().nth(1).unwrap(), "250,1.1663", "decoded at the precision the file wrote");
    // The header's wrong MINY is reported, not silently used.
    assert!(String::from_utf8_lossy(&out.stderr).contains("MINY"));

    // A LINK file with five blocks: one must be chosen, counted from 1.
    assert_bad_input(&chiroptic(&["import", &shared_jcamp("blckpac1.jdx")]), &["5 data blocks", "--block"]);
    assert_bad_input(&chiroptic(&["import", &shared_jcamp("blckpac1.jdx"), "--block", "9"]), &["block 9", "5"]);
    let out = chiroptic(&["import", &shared_jcamp("blckpac1.jdx"), "--block", "5"]);
    let csv = String::from_utf8(out.stdout).unwrap();
    let y = column(&csv, "absorbance");
    assert_eq!(y.len(), 176);
    assert!((y.iter().sum::<f64>() - 11.1047322750).abs() < 1e-8);
    // Transmittance is kept under the name the file gives it, unconverted.
    let out = chiroptic(&["import", &shared_jcamp("pacdec1.jdx")]);
    let csv = String::from_utf8(out.stdout).unwrap();
    assert_eq!(csv.lines().next().unwrap(), "wavenumber_cm1,TRANSMITTANCE");
    assert_bad_input(&chiroptic(&["import", &fixture("good/bom-crlf.csv"), "--block", "2"]), &["JCAMP-DX"]);
}

fn fit_fixture(name: &str) -> String {
    format!("{}/../fixtures/fit/{name}", env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn fit_writes_the_fitted_document_and_prints_the_report() {
    // The invented three-band problem of fixtures/fit (made by make_fit_reference.py).
    let dir = std::env::temp_dir().join(format!("chiroptic-fit-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let out_path = dir.join("fitted.json");
    let out =
        chiroptic(&["fit", &fit_fixture("start.json"), &fit_fixture("cd.csv"), &fit_fixture("ord.csv"), "-o", out_path.to_str().unwrap()]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let report = String::from_utf8_lossy(&out.stderr);
    for part in ["B2.center_nm", "± ", "reduced", "AIC", "BIC", "D is not determined"] {
        assert!(report.contains(part), "report lacks {part}: {report}");
    }
    // The fitted document is a document the page and the CLI read, band names kept.
    let fitted = std::fs::read_to_string(&out_path).unwrap();
    let doc = chiroptic::Document::from_json(&fitted).expect("fitted document reads");
    assert_eq!(doc.bands.iter().map(|b| b.name.as_str()).collect::<Vec<_>>(), ["B1", "B2", "B3"]);
    assert!((doc.bands[1].center_nm - 262.0).abs() < 0.05, "truth.json has 262 nm: {}", doc.bands[1].center_nm);
    assert!(chiroptic(&["lines", out_path.to_str().unwrap()]).status.success());

    assert_bad_input(
        &chiroptic(&[
            "fit",
            &fit_fixture("start.json"),
            &fit_fixture("cd.csv"),
            "--free",
            "centre,colour",
            "-o",
            out_path.to_str().unwrap(),
        ]),
        &["--free", "colour"],
    );
    assert_bad_input(
        &chiroptic(&["fit", &fit_fixture("start.json"), &fit_fixture("cd.csv"), "--fix", "B9.center_nm", "-o", out_path.to_str().unwrap()]),
        &["no band named \"B9\""],
    );
    assert_bad_input(
        &chiroptic(&["fit", &fit_fixture("start.json"), "/nonexistent.csv", "-o", out_path.to_str().unwrap()]),
        &["/nonexistent.csv"],
    );
}

/// A document's wavelength and De columns from `eval` (190-330 nm), as a measured CD file.
fn delta_epsilon_csv(doc: &std::path::Path) -> String {
    let csv =
        String::from_utf8(chiroptic(&["eval", doc.to_str().unwrap(), "--from", "190", "--to", "330", "--step", "0.5"]).stdout).unwrap();
    csv.lines()
        .map(|l| {
            let f: Vec<&str> = l.split(',').collect();
            format!("{},{}\n", f[0], f[12])
        })
        .collect()
}

#[test]
fn states_and_compare_assign_a_configuration() {
    // The invented transition list of fixtures/states: broadened into a
    // document, then compared with its own CD moved by 0.2 eV (a stand-in
    // measurement) and with the mirror image of that.
    let example = format!("{}/../fixtures/states/example.txt", env!("CARGO_MANIFEST_DIR"));
    let dir = std::env::temp_dir().join(format!("chiroptic-states-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let doc = dir.join("computed.json");
    let out = chiroptic(&["states", &example, "--fwhm-ev", "0.3", "-o", doc.to_str().unwrap()]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8_lossy(&out.stderr).contains("74.97 %"), "populations printed");
    // The document holds the transitions; its lamp-line rotations say what they are.
    let lines = chiroptic(&["lines", doc.to_str().unwrap()]);
    assert!(lines.status.success() && String::from_utf8_lossy(&lines.stdout).contains("Na D,589.3,"));
    assert!(String::from_utf8_lossy(&lines.stderr).contains("rough estimate of [α]_D"), "the caution");
    let shifted = dir.join("shifted.json");
    let out = chiroptic(&["states", &example, "--shift-ev", "0.2", "-o", shifted.to_str().unwrap()]);
    assert!(out.status.success());
    let de = delta_epsilon_csv(&shifted);
    let measured = temp_doc("measured-cd.csv", &de);
    let mirror: String = de
        .lines()
        .enumerate()
        .map(|(i, l)| {
            if i == 0 {
                format!("{l}\n")
            } else {
                let (x, y) = l.split_once(',').unwrap();
                format!("{x},{}\n", -y.parse::<f64>().unwrap())
            }
        })
        .collect();
    let mirrored = temp_doc("mirror-cd.csv", &mirror);
    let out = chiroptic(&["compare", doc.to_str().unwrap(), measured.to_str().unwrap(), "--label", "R"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    let shift: f64 = text.lines().find(|l| l.starts_with("best_shift_ev")).unwrap().split(',').nth(1).unwrap().parse().unwrap();
    assert!((shift - 0.2).abs() < 0.01, "best shift {shift}");
    assert!(text.contains("the computed configuration (R) matches"), "{text}");
    let out = chiroptic(&["compare", doc.to_str().unwrap(), mirrored.to_str().unwrap(), "--label", "R"]);
    assert!(String::from_utf8(out.stdout).unwrap().contains("the mirror image of the computed configuration (R) matches"));
    // The same list broadened 0.4 eV wide and moved by 0.2 eV: --fit-width
    // finds the 0.3 eV document's widths times 4/3 and the shift.
    let wide = dir.join("wide.json");
    assert!(chiroptic(&["states", &example, "--fwhm-ev", "0.4", "--shift-ev", "0.2", "-o", wide.to_str().unwrap()]).status.success());
    let de_wide = delta_epsilon_csv(&wide);
    let measured_wide = temp_doc("measured-wide-cd.csv", &de_wide);
    let out = chiroptic(&["compare", doc.to_str().unwrap(), measured_wide.to_str().unwrap(), "--fit-width"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let text = String::from_utf8(out.stdout).unwrap();
    let row = |name: &str| -> f64 { text.lines().find(|l| l.starts_with(name)).unwrap().split(',').nth(1).unwrap().parse().unwrap() };
    assert!((row("best_width_factor") - 4.0 / 3.0).abs() < 0.005, "{text}");
    assert!((row("best_shift_ev") - 0.2).abs() < 0.01 && row("similarity_best") > 0.999, "{text}");
    assert!(text.contains("widths ×1.33"), "{text}");
    let bad = temp_doc("bad-states.txt", "conformer A, energy 0.5\nenergy_eV f R\n4.5 0.1 3\n");
    assert_bad_input(
        &chiroptic(&["states", bad.to_str().unwrap(), "-o", doc.to_str().unwrap()]),
        &["bad-states.txt", "line 1", "needs its unit"],
    );
}

#[test]
fn propose_gives_a_start_that_fit_takes_to_the_minimum() {
    // The invented problem of fixtures/fit: bands proposed from its CD (with
    // the start document's sample), then fitted to CD and ORD together: the
    // chi-square SciPy reaches (scipy_fit.json).
    let dir = std::env::temp_dir().join(format!("chiroptic-propose-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let (start, fitted) = (dir.join("proposed.json"), dir.join("fitted.json"));
    let out = chiroptic(&["propose", &fit_fixture("cd.csv"), "--add", &fit_fixture("start.json"), "-o", start.to_str().unwrap()]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let out = chiroptic(&["fit", start.to_str().unwrap(), &fit_fixture("cd.csv"), &fit_fixture("ord.csv"), "-o", fitted.to_str().unwrap()]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let doc = chiroptic::Document::from_json(&std::fs::read_to_string(&fitted).unwrap()).unwrap();
    let chi = doc.fit.and_then(|f| f.report).expect("report").chi_square;
    let reference: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(fit_fixture("scipy_fit.json")).unwrap()).unwrap();
    let want = reference["lm"]["chi_square"].as_f64().unwrap();
    assert!((chi - want).abs() <= 1e-6 * want, "chi2 {chi} vs SciPy {want}");
    assert_bad_input(&chiroptic(&["propose", &fit_fixture("ord.csv"), "-o", start.to_str().unwrap()]), &["not CD"]);
}
