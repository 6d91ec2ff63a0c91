//! Share links with measured data: a 1000-point CD set (values at the four
//! decimals an instrument writes, an even axis stored as first/step/count)
//! round-trips bit for bit, and its link length is measured against the cap;
//! the overlay's residual of data made from the model itself is rounding only.

use chiroptic::data::data_set_doc;
use chiroptic::document::{Document, SourceDoc};
use chiroptic::import::{Measured, Recognised};
use chiroptic::units::{AxisUnit, CdUnit};
use chiroptic::view::View;
use chiroptic::{evaluate, link, overlay, Model};

const DEMO: &str = include_str!("../../fixtures/demo/demo.json");

/// The demo's own CD in mdeg at 1000 points, 190.0 to 689.5 nm, rounded to 4 decimals.
fn demo_with_set() -> (Document, Model) {
    let mut doc = Document::from_json(DEMO).unwrap();
    let model = Model::from_document(&doc).unwrap();
    let x: Vec<f64> = (0..1000).map(|i| 190.0 + 0.5 * f64::from(i)).collect();
    let nu: Vec<f64> = x.iter().map(|l| AxisUnit::Nanometre.to_wavenumber(*l)).collect();
    let s = evaluate(&model, &nu).unwrap();
    let y: Vec<f64> = s.cd_in(CdUnit::Millidegrees).unwrap().iter().map(|v| (v * 1e4).round() / 1e4).collect();
    let r = Recognised {
        axis: AxisUnit::Nanometre,
        x,
        measured: Measured::Cd(CdUnit::Millidegrees),
        y,
        sd: None,
        ht_v: None,
        label: "CD [mdeg]".into(),
    };
    doc.data.push(data_set_doc("demo-cd", &r, SourceDoc { file: "demo-cd.csv".into(), format: "delimited".into(), metadata: vec![] }));
    (doc, model)
}

#[test]
fn a_1000_point_cd_set_travels_in_a_link() {
    let (doc, _) = demo_with_set();
    let fragment = link::encode(&doc).unwrap();
    let back = link::decode(&fragment).unwrap();
    assert_eq!(back, doc, "bit for bit");
    println!("link of the demo with a 1000-point CD set: {} characters", fragment.len());
    assert!(fragment.len() < link::MAX_LINK_CHARS, "{} characters", fragment.len());
}

#[test]
fn residual_of_data_made_from_the_model_is_its_rounding() {
    let (doc, model) = demo_with_set();
    let view = View::resolve(doc.view.as_ref(), &model).unwrap();
    let sets = overlay::point_sets(&doc, &model, &view).unwrap();
    assert_eq!(sets.len(), 1);
    let residual = sets[0].residual.as_ref().expect("CD has a residual");
    assert_eq!(residual.len(), 1000);
    // The view's CD unit is mdeg (the demo's view or the default): rounding to 1e-4 mdeg.
    assert!(residual.iter().all(|r| r.abs() <= 0.5e-4 + 1e-9), "largest {}", residual.iter().fold(0.0f64, |a, r| a.max(r.abs())));
}
