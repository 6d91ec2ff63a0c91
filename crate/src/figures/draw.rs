//! The drawing stages of one plot, in order: the chart and its coordinates,
//! the mesh and axis labels, the zero line, the traces, the closing frame
//! and the key. Each stage takes the scales computed once in `draw`.

use super::layout::Layout;
use super::scale::{tick_label, ticked, AxisScale, TickedAxis};
use super::style::Theme;
use super::traces::{segments, Trace};
use super::{axis_label, draw_error, DELTA_N_LABEL};
use crate::error::Result;
use plotters::chart::{ChartBuilder, DualCoordChartContext, SeriesLabelPosition};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::collections::HashSet;

type Coord = Cartesian2d<TickedAxis, TickedAxis>;
pub type Chart<'a, DB> = DualCoordChartContext<'a, DB, Coord, Coord>;

/// The x axis as drawn: reversed axes use negated coordinates, labelled back.
pub struct XAxis {
    pub lo: f64,
    pub hi: f64,
    pub sign: f64,
    pub ticks: Vec<f64>,
    pub step: f64,
}

impl XAxis {
    pub fn new((lo, hi): (f64, f64), reversed: bool, target: usize) -> XAxis {
        let (ticks, step) = super::scale::ticks(lo, hi, target);
        XAxis { lo, hi, sign: if reversed { -1.0 } else { 1.0 }, ticks, step }
    }

    /// The chart's x extent in drawn coordinates.
    pub fn ends(&self) -> (f64, f64) {
        if self.sign < 0.0 {
            (-self.hi, -self.lo)
        } else {
            (self.lo, self.hi)
        }
    }

    fn coord(&self, with_ticks: bool) -> TickedAxis {
        let (a, b) = self.ends();
        let keys = if with_ticks { self.ticks.iter().map(|x| x * self.sign).collect() } else { Vec::new() };
        ticked(a, b, keys)
    }
}

/// The chart on `area`, with a secondary coordinate system on every plot
/// (one type for the stages below); only the Index plot shows it.
pub fn chart<'a, DB: DrawingBackend>(
    area: &'a DrawingArea<DB, Shift>,
    layout: &Layout,
    x: &XAxis,
    y: &AxisScale,
    y2: Option<&AxisScale>,
) -> Result<Chart<'a, DB>> {
    let right = y2.map_or(layout.right_margin(), |s| layout.y_area(area, s));
    let chart = ChartBuilder::on(area)
        .margin_top(layout.em(0.9))
        .margin_left(layout.em(0.4))
        .margin_bottom(layout.em(0.3))
        .x_label_area_size(layout.x_area())
        .y_label_area_size(layout.y_area(area, y))
        .right_y_label_area_size(right)
        .build_cartesian_2d(x.coord(true), y.coord())
        .map_err(draw_error)?;
    let secondary = y2.map_or_else(|| ticked(y.shown().0, y.shown().1, Vec::new()), AxisScale::coord);
    Ok(chart.set_secondary_coord(x.coord(false), secondary))
}

/// Grid, axes, tick labels and axis descriptions (the secondary in the muted colour).
pub fn mesh<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    layout: &Layout,
    theme: &Theme,
    (x, x_unit): (&XAxis, crate::units::AxisUnit),
    (y, y_quantity): (&AxisScale, &str),
    y2: Option<&AxisScale>,
) -> Result<()> {
    let axis_style = ShapeStyle::from(&theme.text).stroke_width(layout.rule);
    let grid_style = ShapeStyle::from(&theme.grid).stroke_width(layout.rule);
    let (sign, x_step, y_step) = (x.sign, x.step, y.step);
    let x_fmt = move |v: &f64| tick_label(*v * sign, x_step);
    let y_fmt = move |v: &f64| tick_label(*v, y_step);
    // The secondary system exists before the mesh, or the primary mesh
    // would label the right axis too.
    chart
        .configure_mesh()
        .bold_line_style(grid_style)
        .light_line_style(TRANSPARENT)
        .axis_style(axis_style)
        .set_all_tick_mark_size(layout.em(0.35))
        .label_style(layout.tick_font.clone())
        .axis_desc_style(layout.desc_font.clone())
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .x_desc(axis_label(x_unit))
        .y_desc(y.label(y_quantity))
        .draw()
        .map_err(draw_error)?;
    if let Some(y2) = y2 {
        let step = y2.step;
        let y2_fmt = move |v: &f64| tick_label(*v, step);
        chart
            .configure_secondary_axes()
            .axis_style(axis_style)
            .set_all_tick_mark_size(layout.em(0.35))
            .label_style(layout.tick_font.clone().color(&theme.muted))
            .axis_desc_style(layout.desc_font.clone().color(&theme.muted))
            .y_label_formatter(&y2_fmt)
            .y_desc(y2.label(DELTA_N_LABEL))
            .draw()
            .map_err(draw_error)?;
    }
    Ok(())
}

/// One zero line, under everything else, when zero is inside the range (a
/// secondary axis has its zero at the same height).
pub fn zero_line<DB: DrawingBackend>(chart: &mut Chart<'_, DB>, layout: &Layout, theme: &Theme, x: &XAxis, y: &AxisScale) -> Result<()> {
    if !(y.lo < 0.0 && y.hi > 0.0) {
        return Ok(());
    }
    let (a, b) = x.ends();
    let style = ShapeStyle::from(&theme.muted).stroke_width(layout.rule);
    chart.draw_series(std::iter::once(PathElement::new(vec![(a, 0.0), (b, 0.0)], style))).map_err(draw_error)?;
    Ok(())
}

/// How each trace is drawn against the chart.
pub struct Placement<'t> {
    pub xs: &'t [f64],
    pub visible: &'t [bool],
    pub x: &'t XAxis,
    pub y: &'t AxisScale,
    pub y2: Option<&'t AxisScale>,
    pub legend: bool,
}

/// The traces: bands first (the highlighted one last), the sums on top.
/// Returns whether any named trace went into the key.
pub fn traces<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    layout: &Layout,
    sums: &[Trace],
    bands: &[Trace],
    at: &Placement,
) -> Result<bool> {
    let mut order: Vec<&Trace> = bands.iter().collect();
    order.sort_by(|a, b| a.width.total_cmp(&b.width));
    order.extend(sums.iter());
    let mut keyed = HashSet::new();
    for t in order {
        let factor = if t.secondary { at.y2.map_or(at.y.factor, |s| s.factor) } else { at.y.factor };
        let style = ShapeStyle::from(&t.colour).stroke_width((t.width * layout.line_scale).round().max(1.0) as u32);
        let (dash, gap) = (layout.em(0.5), layout.em(0.35));
        for seg in segments(at.xs, &t.values, at.visible, at.x.sign, factor) {
            let anno = match (t.secondary, t.dashed) {
                (false, false) => chart.draw_series(LineSeries::new(seg, style)),
                (true, false) => chart.draw_secondary_series(LineSeries::new(seg, style)),
                (false, true) => chart.draw_series(DashedLineSeries::new(seg, dash, gap, style)),
                (true, true) => chart.draw_secondary_series(DashedLineSeries::new(seg, dash, gap, style)),
            }
            .map_err(draw_error)?;
            if at.legend && !t.name.is_empty() && keyed.insert(t.name.clone()) {
                let (colour, width, dashed) = (t.colour, style.stroke_width, t.dashed);
                let len = layout.em(1.6) as i32;
                // plotters hands the sample the top of the label's row: the
                // line sits on the text's middle, not below its baseline.
                let lift = layout.em(0.1) as i32;
                anno.label(t.name.clone()).legend(move |(x, y)| {
                    let s = ShapeStyle::from(&colour).stroke_width(width);
                    let end = if dashed { len / 3 } else { len };
                    PathElement::new(vec![(x, y - lift), (x + end, y - lift)], s)
                });
            }
        }
    }
    Ok(!keyed.is_empty())
}

/// A closed frame around the plotting area (a path: the SVG backend drops a
/// rectangle's stroke width).
pub fn frame<DB: DrawingBackend>(chart: &mut Chart<'_, DB>, layout: &Layout, theme: &Theme, x: &XAxis, y: &AxisScale) -> Result<()> {
    let (a, b) = x.ends();
    let (y_a, y_b) = y.shown();
    let style = ShapeStyle::from(&theme.text).stroke_width(layout.rule);
    chart
        .draw_series(std::iter::once(PathElement::new(vec![(a, y_a), (b, y_a), (b, y_b), (a, y_b), (a, y_a)], style)))
        .map_err(draw_error)?;
    Ok(())
}

/// The key, in the corner that hides the fewest drawn points.
pub fn key<'a, DB: DrawingBackend + 'a>(
    chart: &mut Chart<'a, DB>,
    layout: &Layout,
    theme: &Theme,
    corner: SeriesLabelPosition,
) -> Result<()> {
    chart
        .configure_series_labels()
        .position(corner)
        .margin(layout.em(0.6))
        .label_font(layout.tick_font.clone())
        .background_style(theme.background.mix(0.85))
        .border_style(ShapeStyle::from(&theme.grid).stroke_width(layout.rule))
        .legend_area_size(layout.em(1.8))
        .draw()
        .map_err(draw_error)?;
    Ok(())
}

/// The corner of the plot whose outer third holds the fewest drawn points
/// (ties: upper right).
pub fn key_corner(traces: &[&Trace], at: &Placement) -> SeriesLabelPosition {
    let along = |v: f64, (a, b): (f64, f64)| (v - a) / (b - a);
    let mut counts = [0usize; 4]; // upper right, upper left, lower right, lower left
    for t in traces {
        let scale = if t.secondary { at.y2.unwrap_or(at.y) } else { at.y };
        for ((x, v), vis) in at.xs.iter().zip(&t.values).zip(at.visible) {
            if !*vis || !v.is_finite() {
                continue;
            }
            let fx = along(*x, (at.x.lo, at.x.hi));
            let fx = if at.x.sign < 0.0 { 1.0 - fx } else { fx };
            let fy = along(*v, (scale.lo, scale.hi));
            let (right, left) = (fx > 0.65, fx < 0.35);
            if fy > 0.65 {
                counts[0] += usize::from(right);
                counts[1] += usize::from(left);
            } else if fy < 0.35 {
                counts[2] += usize::from(right);
                counts[3] += usize::from(left);
            }
        }
    }
    let corners =
        [SeriesLabelPosition::UpperRight, SeriesLabelPosition::UpperLeft, SeriesLabelPosition::LowerRight, SeriesLabelPosition::LowerLeft];
    let best = (0..4).min_by_key(|i| counts[*i]).unwrap_or(0);
    corners.into_iter().nth(best).unwrap_or(SeriesLabelPosition::UpperRight)
}
