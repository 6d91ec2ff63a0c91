//! Every resource cap of `chiroptic::limits` is enforced before the work it
//! bounds, with a message that names the limit (issue 13; the caps are
//! common practice for a browser tool, chosen in limits.rs). The document
//! size, import size and link length caps have their own tests beside their
//! readers (tests/document.rs, tests/import.rs, tests/link.rs).

use base64::engine::general_purpose::URL_SAFE_NO_PAD;
use base64::Engine;
use chiroptic::data::data_set_doc;
use chiroptic::document::{BandDoc, Document, ReadingDoc, SourceDoc};
use chiroptic::import::{Measured, Recognised};
use chiroptic::limits::*;
use chiroptic::spectra::Grid;
use chiroptic::units::{AxisUnit, CdUnit};
use chiroptic::{ErrorKind, Model};

const DEMO: &str = include_str!("../../fixtures/demo/demo.json");

/// The demo document with `bands` copies of its first band, `sets` small CD
/// sets and `readings` lamp-line readings, as document text.
fn demo_with(bands: usize, sets: usize, readings: usize) -> String {
    let mut doc = Document::from_json(DEMO).unwrap();
    let band = doc.bands[0].clone();
    doc.bands = (0..bands).map(|i| BandDoc { name: format!("B{i}"), ..band.clone() }).collect();
    let r = Recognised {
        axis: AxisUnit::Nanometre,
        x: vec![300.0, 301.0],
        measured: Measured::Cd(CdUnit::Millidegrees),
        y: vec![1.0, 2.0],
        sd: None,
        ht_v: None,
        label: "CD [mdeg]".into(),
    };
    let source = SourceDoc { file: "set.csv".into(), format: "delimited".into(), metadata: vec![] };
    doc.data = (0..sets).map(|i| data_set_doc(&format!("set-{i}"), &r, source.clone())).collect();
    doc.readings = (0..readings).map(|_| ReadingDoc { wavelength_nm: 589.3, rotation_deg: 1.0, sd_deg: None, conditions: None }).collect();
    serde_json::to_string(&doc).unwrap()
}

#[test]
fn the_band_cap_holds_at_and_past_the_limit() {
    Model::from_json(&demo_with(MAX_BANDS, 0, 0)).expect("the limit itself is accepted");
    let e = Model::from_json(&demo_with(MAX_BANDS + 1, 0, 0)).expect_err("one band too many");
    assert_eq!(e.kind, ErrorKind::TooLarge);
    assert!(e.message.contains(&MAX_BANDS.to_string()), "{e}");
}

#[test]
fn the_data_set_and_reading_caps_hold_at_and_past_the_limit() {
    Model::from_json(&demo_with(1, MAX_DATA_SETS, MAX_READINGS)).expect("the limits themselves are accepted");
    let e = Model::from_json(&demo_with(1, MAX_DATA_SETS + 1, 0)).expect_err("too many sets");
    assert_eq!(e.kind, ErrorKind::TooLarge);
    assert!(e.message.contains(&MAX_DATA_SETS.to_string()), "{e}");
    let e = Model::from_json(&demo_with(1, 0, MAX_READINGS + 1)).expect_err("too many readings");
    assert_eq!(e.kind, ErrorKind::TooLarge);
    assert!(e.message.contains(&MAX_READINGS.to_string()), "{e}");
}

#[test]
fn a_grid_past_the_point_cap_is_refused_before_it_is_built() {
    // 0.001 nm steps over 200-900 nm would be 700,001 points.
    let e = Grid::stepped(200.0, 900.0, 0.001, AxisUnit::Nanometre).expect_err("too many points");
    assert_eq!(e.kind, ErrorKind::TooLarge);
    assert!(e.message.contains(&MAX_GRID_POINTS.to_string()), "{e}");
    Grid::linspace(200.0, 900.0, MAX_GRID_POINTS, AxisUnit::Nanometre).expect("the limit itself is accepted");
    assert!(Grid::linspace(200.0, 900.0, MAX_GRID_POINTS + 1, AxisUnit::Nanometre).is_err());
}

#[test]
fn a_decompression_bomb_in_a_link_stops_at_the_inflate_cap() {
    // 64 MiB of spaces deflate to about 64 kB, which base64 keeps under the
    // link length cap: only the inflate limit can stop it.
    let bomb = vec![b' '; 64 * 1024 * 1024];
    let packed = miniz_oxide::deflate::compress_to_vec_zlib(&bomb, 10);
    let link = format!("c1.{}", URL_SAFE_NO_PAD.encode(packed));
    assert!(link.len() < MAX_LINK_CHARS, "the bomb must pass the length check: {}", link.len());
    let e = chiroptic::link::decode(&link).expect_err("bomb refused");
    assert_eq!(e.kind, ErrorKind::TooLarge, "{e}");
}

#[test]
fn a_jcamp_file_claiming_more_points_than_the_cap_is_refused() {
    // A DUP count (JCAMP-DX 4.24, McDonald and Wilks 1988, compressed forms)
    // that would expand to two million values from a few bytes.
    let text = "##TITLE=bomb\n##JCAMP-DX=5.01\n##DATA TYPE=INFRARED SPECTRUM\n##XUNITS=NANOMETERS\n##YUNITS=ABSORBANCE\n\
                ##FIRSTX=200\n##LASTX=300\n##DELTAX=1\n##XFACTOR=1\n##YFACTOR=1\n##NPOINTS=2000000\n##XYDATA=(X++(Y..Y))\n\
                200 1V1999999\n##END=\n";
    let e = chiroptic::import::read(text, None).expect_err("refused");
    assert!(e.message.contains("1000000") || e.message.contains("1,000,000"), "{e}");
    assert_eq!(MAX_POINTS, 1_000_000);
}

#[test]
fn a_transition_list_past_the_cap_is_refused_at_the_first_row_too_many() {
    let mut text = String::from("conformer A, energy 0 kcal/mol\nstate energy_eV f R\n");
    for i in 0..=MAX_TRANSITIONS {
        text.push_str(&format!("{i} 5.0 0.1 1.0\n"));
    }
    let e = chiroptic::states::table::parse(&text).expect_err("too many transitions");
    assert!(e.to_string().contains(&MAX_TRANSITIONS.to_string()), "{e}");
}

#[test]
fn the_caps_are_written_only_in_limits_rs() {
    // The "one place" rule: no other source file defines a constant of a cap's name.
    let names = [
        "MAX_DOCUMENT_BYTES",
        "MAX_DATA_SETS",
        "MAX_READINGS",
        "MAX_BANDS",
        "MAX_GRID_POINTS",
        "MAX_IMPORT_BYTES",
        "MAX_POINTS",
        "MAX_LINK_CHARS",
        "MAX_INFLATED_BYTES",
        "MAX_TRANSITIONS",
        "MAX_STARTS",
        "MAX_ITERATIONS",
        "MAX_FIGURE_PIXELS",
    ];
    let src = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("src");
    let mut stack = vec![src];
    let mut offenders = Vec::new();
    while let Some(dir) = stack.pop() {
        for entry in std::fs::read_dir(&dir).unwrap() {
            let path = entry.unwrap().path();
            if path.is_dir() {
                stack.push(path);
            } else if path.extension().is_some_and(|e| e == "rs") && !path.ends_with("limits.rs") {
                let text = std::fs::read_to_string(&path).unwrap();
                for name in names {
                    if text.contains(&format!("const {name}:")) {
                        offenders.push(format!("{} defines {name}", path.display()));
                    }
                }
            }
        }
    }
    assert!(offenders.is_empty(), "{offenders:?}");
}
