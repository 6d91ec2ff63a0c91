//! Figures: the SVG parses, carries the labels the trade writes, and puts
//! the curves where the returned PlotFrame says the values are; bad requests
//! are errors, not panics.

use chiroptic::figures::{self, draw, svg, theme, PlotFrame, PlotKind, PlotRequest};
use chiroptic::units::{AxisUnit, CdUnit, OrdUnit};
use chiroptic::{evaluate, ErrorKind, Grid, Model, Spectra};
use plotters::prelude::*;

fn demo() -> Model {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/demo/demo.json");
    Model::from_json(&std::fs::read_to_string(path).expect("demo")).expect("demo model")
}

fn spectra(model: &Model, from: f64, to: f64, points: usize, axis: AxisUnit) -> Spectra {
    let grid = Grid::linspace(from, to, points, axis).expect("grid");
    evaluate(model, &grid.wavenumber_cm1).expect("spectra")
}

/// Texts of an SVG document, whitespace trimmed.
fn texts(svg: &str) -> Vec<String> {
    let doc = roxmltree::Document::parse(svg).expect("the figure is well-formed XML");
    assert_eq!(doc.root_element().tag_name().name(), "svg");
    doc.descendants().filter(|n| n.has_tag_name("text")).map(|n| n.text().unwrap_or_default().trim().to_string()).collect()
}

/// Point lists of the polylines drawn in `stroke` colour at least `width` wide
/// (axes and ticks are 1 px; the sum is thicker).
fn polylines(svg: &str, stroke: &str, width: u32) -> Vec<Vec<(f64, f64)>> {
    let doc = roxmltree::Document::parse(svg).expect("well-formed");
    doc.descendants()
        .filter(|n| n.has_tag_name("polyline"))
        .filter(|n| n.attribute("stroke").map(str::to_ascii_lowercase).as_deref() == Some(stroke))
        .filter(|n| n.attribute("stroke-width").and_then(|w| w.parse::<u32>().ok()).is_some_and(|w| w >= width))
        .map(|n| {
            n.attribute("points")
                .unwrap_or_default()
                .split_whitespace()
                .filter_map(|p| p.split_once(','))
                .filter_map(|(x, y)| Some((x.parse().ok()?, y.parse().ok()?)))
                .collect()
        })
        .collect()
}

/// Draws at 1 backend pixel per SVG pixel and returns the SVG and its frame.
fn draw_1x(req: &PlotRequest, w: u32, h: u32) -> (String, PlotFrame) {
    let mut text = String::new();
    let frame = {
        let root = SVGBackend::with_string(&mut text, (w, h)).into_drawing_area();
        let frame = draw(&root, req).expect("draws");
        root.present().expect("presents");
        frame
    };
    (text, frame)
}

#[test]
fn cd_svg_has_the_trade_labels_and_a_declared_size() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 600, AxisUnit::Nanometre);
    let req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Nanometre, (190.0, 400.0));
    let out = svg(&req, 800, 500).expect("svg");
    assert!(out.starts_with("<svg width=\"800\" height=\"500\""), "{}", &out[..80]);
    let t = texts(&out);
    for label in ["λ / nm", "Δε / M⁻¹ cm⁻¹", "200", "300", "0", "−10"] {
        assert!(t.iter().any(|x| x == label), "no label {label:?} in {t:?}");
    }
}

#[test]
fn every_unit_labels_its_axis() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 300, AxisUnit::Nanometre);
    for unit in CdUnit::ALL {
        let mut req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Nanometre, (190.0, 400.0));
        req.cd_unit = unit;
        match svg(&req, 640, 400) {
            Ok(out) => {
                let t = texts(&out);
                // A scaled axis writes the power of ten inside the label.
                let symbol = unit.label().split(" / ").next().unwrap_or_default().split(" = ").next().unwrap_or_default();
                assert!(t.iter().any(|x| x.starts_with(symbol)), "{unit:?}: {t:?}");
            }
            // The demo has no mean residue weight.
            Err(e) => {
                assert_eq!(unit, CdUnit::MeanResidueEllipticity, "{e}");
                assert_eq!(e.kind, ErrorKind::MissingField);
                assert!(e.message.contains("mean_residue_weight"), "{e}");
            }
        }
    }
    for unit in OrdUnit::ALL {
        let mut req = PlotRequest::new(PlotKind::Ord, &s, AxisUnit::Nanometre, (190.0, 400.0));
        req.ord_unit = unit;
        let t = texts(&svg(&req, 640, 400).expect("ord svg"));
        let symbol = unit.label().split(" / ").next().unwrap_or_default().split(" = ").next().unwrap_or_default();
        assert!(t.iter().any(|x| x.starts_with(symbol)), "{unit:?}: {t:?}");
    }
}

#[test]
fn the_sum_is_drawn_where_the_frame_says_its_values_are() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 441, AxisUnit::Nanometre);
    let mut req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Nanometre, (190.0, 400.0));
    req.show_contributions = false;
    let (out, frame) = draw_1x(&req, 800, 500);
    let sum = polylines(&out, &theme(false).hex()[1], 2);
    let points: Vec<(f64, f64)> = sum.into_iter().flatten().collect();
    assert!(points.len() > 300, "{} points", points.len());
    // Largest De of the spectra against the highest point of the drawn curve.
    let (i_max, de_max) = s.delta_epsilon.iter().enumerate().max_by(|a, b| a.1.total_cmp(b.1)).map(|(i, v)| (i, *v)).expect("values");
    let top = points.iter().min_by(|a, b| a.1.total_cmp(&b.1)).copied().expect("points");
    let lambda = AxisUnit::Nanometre.from_wavenumber(s.wavenumber_cm1[i_max]);
    assert!((frame.x_at(top.0) - lambda).abs() < 1.0, "peak drawn at {} nm, is at {lambda}", frame.x_at(top.0));
    let per_px = (frame.y_range.1 - frame.y_range.0) / f64::from(frame.bottom - frame.top);
    assert!((frame.y_at(top.1) - de_max).abs() < 1.5 * per_px, "{} vs {de_max}", frame.y_at(top.1));
    // The frame's maps invert each other.
    assert!((frame.px_of_x(frame.x_at(123.0)) - 123.0).abs() < 1e-9);
    assert!((frame.py_of_y(frame.y_at(77.0)) - 77.0).abs() < 1e-9);
    assert!(frame.contains(400.0, 250.0));
    // CD has a zero line inside the frame.
    assert!(frame.y_range.0 < 0.0 && frame.y_range.1 > 0.0);
}

#[test]
fn reversed_ranges_draw_a_reversed_axis() {
    let m = demo();
    let s = spectra(&m, 25_000.0, 54_000.0, 400, AxisUnit::Wavenumber);
    let req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Wavenumber, (54_000.0, 25_000.0));
    let (out, frame) = draw_1x(&req, 800, 500);
    assert!(frame.x_at(f64::from(frame.left)) > frame.x_at(f64::from(frame.right)));
    assert!((frame.x_at(f64::from(frame.left)) - 54_000.0).abs() < 1e-6);
    let t = texts(&out);
    assert!(t.iter().any(|x| x == "ν\u{303} / cm⁻¹"), "{t:?}");
    assert!(t.iter().any(|x| x == "50000"), "{t:?}");
}

#[test]
fn index_plot_has_delta_n_on_a_secondary_axis_with_a_shared_zero() {
    let m = demo();
    let s = spectra(&m, 190.0, 650.0, 400, AxisUnit::Nanometre);
    let mut req = PlotRequest::new(PlotKind::Index, &s, AxisUnit::Nanometre, (190.0, 650.0));
    req.legend = true;
    let (out, frame) = draw_1x(&req, 800, 500);
    let (lo, hi) = frame.y2_range.expect("secondary axis");
    assert!(lo < 0.0 && hi > 0.0);
    let t = texts(&out);
    // Subscripts typeset, no "_L" (the same text goes to canvas and SVG).
    assert!(t.iter().any(|x| x.starts_with("Δn / 10") && x.contains("nₗ − nᵣ")), "{t:?}");
    assert!(t.iter().all(|x| !x.contains('_')), "{t:?}");
    let first_band = m.bands.first().map(|b| b.name.clone()).unwrap_or_default();
    for name in ["n̄ − n(solvent)", "Δn", first_band.as_str()] {
        assert!(t.iter().any(|x| x == name), "legend lacks {name}: {t:?}");
    }
    assert!(frame.y2_at(f64::from(frame.bottom)).is_some());
    // One zero line serves both axes: zero lies at the same height on each.
    let (a, b) = frame.y_range;
    let (left, right) = (-a / (b - a), -lo / (hi - lo));
    assert!((left - right).abs() < 1e-9, "zero at {left} (left) and {right} (right)");
}

#[test]
fn non_finite_points_break_the_line_instead_of_failing() {
    let m = demo();
    let mut s = spectra(&m, 190.0, 400.0, 300, AxisUnit::Nanometre);
    s.delta_epsilon[150] = f64::NAN;
    s.delta_epsilon[151] = f64::INFINITY;
    let mut req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Nanometre, (190.0, 400.0));
    req.show_contributions = false;
    let (out, _) = draw_1x(&req, 800, 500);
    assert_eq!(polylines(&out, &theme(false).hex()[1], 2).len(), 2, "the sum should be drawn in two pieces");
}

#[test]
fn bad_requests_are_errors() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 100, AxisUnit::Nanometre);
    let req = |range| PlotRequest::new(PlotKind::Ord, &s, AxisUnit::Nanometre, range);
    let kind = |r: PlotRequest| svg(&r, 600, 400).map(|_| ()).map_err(|e| e.kind);
    assert_eq!(kind(req((300.0, 300.0))), Err(ErrorKind::OutOfRange));
    assert_eq!(kind(req((f64::NAN, 300.0))), Err(ErrorKind::OutOfRange));
    assert_eq!(kind(req((-1.0, 300.0))), Err(ErrorKind::NotPositive));
    assert_eq!(kind(req((500.0, 600.0))), Err(ErrorKind::OutOfRange), "no points in range");
    assert_eq!(svg(&req((190.0, 400.0)), 10, 400).map(|_| ()).map_err(|e| e.kind), Err(ErrorKind::OutOfRange));
    let mut r = req((190.0, 400.0));
    r.highlight = Some(99);
    assert!(svg(&r, 600, 400).is_ok(), "an unknown highlight is ignored");
}

#[test]
fn dark_theme_and_pixel_ratio_change_colours_and_sizes() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 100, AxisUnit::Nanometre);
    let mut req = PlotRequest::new(PlotKind::Absorption, &s, AxisUnit::Nanometre, (190.0, 400.0));
    req.dark = true;
    let (out, _) = draw_1x(&req, 600, 400);
    let bg = theme(true).hex()[0].to_ascii_uppercase();
    assert!(out.contains(&format!("fill=\"{bg}\"")), "no {bg} background");
    let font_size = |svg: &str| -> f64 {
        let doc = roxmltree::Document::parse(svg).expect("xml");
        doc.descendants().filter(|n| n.has_tag_name("text")).filter_map(|n| n.attribute("font-size")?.parse().ok()).fold(0.0, f64::max)
    };
    let one = font_size(&out);
    req.pixel_ratio = 2.0;
    let (big, _) = draw_1x(&req, 1200, 800);
    assert!((font_size(&big) / one - 2.0).abs() < 0.05, "{} vs {one}", font_size(&big));
    assert!(texts(&out).iter().any(|x| x.starts_with("ε / ")), "{:?}", texts(&out));
}

#[test]
fn readout_gives_the_plotted_values_at_the_nearest_point() {
    let m = demo();
    let s = spectra(&m, 190.0, 400.0, 211, AxisUnit::Nanometre);
    let mut req = PlotRequest::new(PlotKind::Cd, &s, AxisUnit::Nanometre, (190.0, 400.0));
    req.cd_unit = CdUnit::Millidegrees;
    let r = figures::readout(&req, 235.2).expect("readout");
    assert!((r.x - 235.0).abs() < 1e-9, "{}", r.x);
    assert_eq!(r.values[0].0, "sum");
    assert_eq!(r.values[0].1, s.ellipticity_mdeg[r.index]);
    assert_eq!(r.values.len(), 1 + m.bands.len());
    assert!(figures::readout(&req, f64::NAN).is_err());
}

mod extreme_values {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

        /// Whatever numbers reach the figure (huge, tiny, subnormal, NaN,
        /// infinite), drawing returns a value and never panics.
        #[test]
        fn any_values_draw_without_panicking(
            values in prop::collection::vec(proptest::num::f64::ANY, 50),
            kind in prop::sample::select(PlotKind::ALL.to_vec()),
            lo in 100.0..400.0f64,
            width in 1e-6..300.0f64,
        ) {
            let m = demo();
            let mut s = spectra(&m, 190.0, 400.0, 50, AxisUnit::Nanometre);
            s.delta_epsilon = values.clone();
            s.epsilon = values.iter().map(|v| v * 0.5).collect();
            s.rotation_deg = values.iter().rev().copied().collect();
            s.n_left = values.clone();
            s.delta_n = values.clone();
            if let Some(b) = s.bands.first_mut() {
                b.shape = values.iter().map(|v| num_complex::Complex64::new(*v, -v)).collect();
            }
            let req = PlotRequest::new(kind, &s, AxisUnit::Nanometre, (lo, lo + width));
            match svg(&req, 320, 200) {
                Ok(out) => prop_assert!(out.ends_with("</svg>\n") || out.ends_with("</svg>")),
                Err(e) => prop_assert!(!e.message.is_empty()),
            }
        }
    }
}
