//! Measured data on a plot: markers (one shape per data set, in the text
//! colour, so that sets differ without relying on colour), derived sets
//! (Kramers-Kronig predictions) as a dashed muted line, and the residual
//! strip (data − model) under CD and ORD.

use super::draw::{Chart, XAxis};
use super::layout::Layout;
use super::scale::{tick_label, ticked, AxisScale};
use super::style::Theme;
use super::{draw_error, PlotRequest};
use crate::error::Result;
use crate::overlay::PointSet;
use plotters::chart::ChartBuilder;
use plotters::coord::Shift;
use plotters::prelude::*;

/// Axis label of the residual strip.
pub const RESIDUAL_LABEL: &str = "residual (data − model)";
/// The strip's share of the figure's height.
const STRIP_FRACTION: f64 = 0.24;

/// The sets drawn on this request's plot.
pub fn on_plot<'a>(req: &PlotRequest<'a>) -> Vec<&'a PointSet> {
    req.points.iter().filter(|p| p.plot == req.kind).collect()
}

fn inside(x: f64, (lo, hi): (f64, f64)) -> bool {
    x.is_finite() && x >= lo && x <= hi
}

/// The left axis's range widened to hold every visible data value.
pub fn widen((mut lo, mut hi): (f64, f64), sets: &[&PointSet], x: (f64, f64)) -> (f64, f64) {
    let (mut dlo, mut dhi) = (f64::INFINITY, f64::NEG_INFINITY);
    for s in sets {
        for (px, v) in s.x.iter().zip(&s.y).filter(|(px, v)| inside(**px, x) && v.is_finite()) {
            let _ = px;
            dlo = dlo.min(*v);
            dhi = dhi.max(*v);
        }
    }
    if dlo.is_finite() && dhi.is_finite() {
        let pad = (dhi - dlo).abs().max(hi - lo) * 0.04;
        if dlo < lo {
            lo = dlo - pad;
        }
        if dhi > hi {
            hi = dhi + pad;
        }
    }
    (lo, hi)
}

/// Whether this plot gets a residual strip: CD or ORD with a residual shown.
pub fn wants_strip(sets: &[&PointSet]) -> bool {
    sets.iter().any(|s| !s.derived && s.residual.is_some())
}

/// The main plot's and the strip's areas.
pub fn split<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>) -> (DrawingArea<DB, Shift>, DrawingArea<DB, Shift>) {
    let h = area.dim_in_pixel().1;
    area.split_vertically((f64::from(h) * (1.0 - STRIP_FRACTION)).round() as u32)
}

/// Every `stride`-th point, so that markers do not pile up past one per few pixels.
fn stride(count: usize, width_px: u32, layout: &Layout) -> usize {
    let room = (f64::from(width_px) / (layout.font_px * 0.3)).max(1.0) as usize;
    count.div_ceil(room).max(1)
}

/// Markers (or, for a derived set, a dashed line) of every set on the chart.
pub fn draw_sets<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    layout: &Layout,
    theme: &Theme,
    sets: &[&PointSet],
    x: &XAxis,
    y: &AxisScale,
    values: impl Fn(&PointSet) -> Option<&[f64]>,
) -> Result<()> {
    let width = chart.plotting_area().dim_in_pixel().0;
    for s in sets {
        let Some(v) = values(s) else { continue };
        let pts: Vec<(f64, f64)> =
            s.x.iter()
                .zip(v)
                .filter(|(px, v)| inside(**px, (x.lo, x.hi)) && v.is_finite())
                .map(|(px, v)| (px * x.sign, v * y.factor))
                .collect();
        if s.derived {
            let style = ShapeStyle::from(&theme.muted).stroke_width((1.6 * layout.line_scale).round().max(1.0) as u32);
            chart.draw_series(DashedLineSeries::new(pts, layout.em(0.5), layout.em(0.35), style)).map_err(draw_error)?;
            continue;
        }
        let step = stride(pts.len(), width, layout);
        let r = (layout.font_px * 0.22).max(1.5) as i32;
        let stroke = ShapeStyle::from(&theme.text).stroke_width(layout.rule);
        let picked = pts.into_iter().step_by(step);
        match s.index % 4 {
            0 => chart.draw_series(picked.map(|p| Circle::new(p, r, stroke))),
            1 => chart.draw_series(picked.map(|p| TriangleMarker::new(p, r + 1, stroke))),
            2 => chart.draw_series(picked.map(|p| Cross::new(p, r, stroke))),
            _ => chart.draw_series(picked.map(|p| Circle::new(p, r, theme.text.filled()))),
        }
        .map_err(draw_error)?;
    }
    Ok(())
}

/// The residual strip under the plot: the same x mapping (same label room
/// on the left and right), a zero line and the residual markers.
pub fn strip<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    layout: &Layout,
    theme: &Theme,
    sets: &[&PointSet],
    x: &XAxis,
    left_room: u32,
) -> Result<()> {
    let mut big = 0.0f64;
    for s in sets {
        for (px, v) in s.x.iter().zip(s.residual.as_deref().unwrap_or(&[])) {
            if inside(*px, (x.lo, x.hi)) && v.is_finite() {
                big = big.max(v.abs());
            }
        }
    }
    let half = if big > 0.0 { big * 1.1 } else { 1.0 };
    let y = AxisScale::new((-half, half), 3);
    let (a, b) = x.ends();
    let keys = x.ticks.iter().map(|t| t * x.sign).collect();
    let mut chart = ChartBuilder::on(area)
        .margin_top(layout.em(0.3))
        .margin_left(layout.em(0.4))
        .margin_bottom(layout.em(0.3))
        .y_label_area_size(left_room)
        .right_y_label_area_size(layout.right_margin())
        .build_cartesian_2d(ticked(a, b, keys), y.coord())
        .map_err(draw_error)?
        .set_secondary_coord(ticked(a, b, Vec::new()), y.coord());
    let step = y.step;
    let y_fmt = move |v: &f64| tick_label(*v, step);
    chart
        .configure_mesh()
        .bold_line_style(ShapeStyle::from(&theme.grid).stroke_width(layout.rule))
        .light_line_style(TRANSPARENT)
        .axis_style(ShapeStyle::from(&theme.text).stroke_width(layout.rule))
        .set_all_tick_mark_size(layout.em(0.35))
        .label_style(layout.tick_font.clone())
        .axis_desc_style(layout.tick_font.clone())
        .x_label_formatter(&|_| String::new())
        .y_label_formatter(&y_fmt)
        .draw()
        .map_err(draw_error)?;
    // The strip is too low for an upright axis label: the label sits inside, top left.
    let inner = chart.plotting_area().strip_coord_spec();
    let at = (layout.em(0.4) as i32, layout.em(0.2) as i32);
    inner.draw(&Text::new(y.label(RESIDUAL_LABEL), at, layout.tick_font.clone().color(&theme.muted))).map_err(draw_error)?;
    super::draw::zero_line(&mut chart, layout, theme, x, &y)?;
    let measured: Vec<&PointSet> = sets.iter().copied().filter(|s| !s.derived).collect();
    draw_sets(&mut chart, layout, theme, &measured, x, &y, |s| s.residual.as_deref())?;
    super::draw::frame(&mut chart, layout, theme, x, &y)
}
