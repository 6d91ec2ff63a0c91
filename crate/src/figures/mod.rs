//! Figures: one drawing function for the live canvas, the SVG export and the
//! CLI, so that all three are the same picture. Generic over the plotters
//! `DrawingBackend` (canvas, SVG).
//!
//! By stage: `traces` (what to draw, per grid point), `scale` (value ranges,
//! ticks, the power of ten of each axis, computed once per axis), `layout`
//! (text and label room), `draw` (chart, mesh, zero line, traces, frame,
//! key), `style` (palette and themes). [`draw`] runs them in order.
//!
//! - `x_range` is in `axis` units as drawn left -> right; a decreasing pair
//!   draws a reversed axis.
//! - [`PlotFrame`] gives the plotting box in backend pixels and the values at
//!   its edges, so the page maps the pointer to values and back.
//! - The sum is drawn in the text colour, each band's contribution as a thin
//!   line in its palette colour (the highlighted band thicker). One zero line.
//!   Non-finite points break the line instead of failing.
//! - Index plot: the mean index less the solvent's, n̄ − n(solvent), on the
//!   left axis; Δn = nₗ − nᵣ on a right axis in the muted colour, whose zero
//!   sits at the left axis's zero. Contributions there are Δn per band.
//! - Text: the family is `sans-serif`. On wasm the canvas measures text; on
//!   native plotters measures it with DejaVu Sans (bundled by the `dejavu`
//!   crate, licence in crate/licenses/), registered on first use.

mod draw;
mod layout;
mod points;
mod scale;
mod sticks;
mod style;
mod traces;

pub use crate::view::PlotKind;
pub use style::{band_colour, band_colour_hex, hex, theme, Theme, BAND_PALETTE};

use crate::error::{Error, ErrorKind, Result};
use crate::spectra::Spectra;
use crate::units::{AxisUnit, CdUnit, OrdUnit};
use draw::{Placement, XAxis};
use layout::Layout;
use plotters::coord::Shift;
use plotters::prelude::*;
pub use points::RESIDUAL_LABEL;
use scale::{value_range, zero_aligned, AxisScale};
pub use sticks::sticks;
use traces::{axis_positions, traces, Trace};
pub use traces::{sum_key, KeyEntry};

/// The font sizes an export may ask for, in CSS pixels.
pub const MIN_FONT_PX: f64 = 6.0;
pub const MAX_FONT_PX: f64 = 40.0;

/// Axis label of the mean molar absorption coefficient.
pub const EPSILON_LABEL: &str = "ε / M⁻¹ cm⁻¹";
/// Axis label (and key name) of what the bands add to the solvent's index.
pub const INDEX_LABEL: &str = "n̄ − n(solvent)";
pub const MEAN_INDEX_NAME: &str = INDEX_LABEL;
/// Axis label of the circular birefringence on the Index plot.
pub const DELTA_N_LABEL: &str = "Δn = nₗ − nᵣ";
pub const DELTA_N_NAME: &str = "Δn";
/// Key name of the sum over bands.
pub const SUM_NAME: &str = "sum";

/// Spectral axis label as the trade writes it.
pub fn axis_label(axis: AxisUnit) -> String {
    let symbol = match axis {
        AxisUnit::Nanometre => "λ",
        AxisUnit::Wavenumber => "ν\u{0303}",
        AxisUnit::ElectronVolt => "E",
    };
    format!("{symbol} / {}", axis.label())
}

/// The y-axis label (left axis) of a plot in the given units.
pub fn y_label(kind: PlotKind, cd_unit: CdUnit, ord_unit: OrdUnit) -> &'static str {
    match kind {
        PlotKind::Cd => cd_unit.label(),
        PlotKind::Ord => ord_unit.label(),
        PlotKind::Absorption => EPSILON_LABEL,
        PlotKind::Index => INDEX_LABEL,
    }
}

/// What to draw.
#[derive(Debug, Clone, Copy)]
pub struct PlotRequest<'a> {
    pub kind: PlotKind,
    pub spectra: &'a Spectra,
    pub axis: AxisUnit,
    /// Shown range in `axis` units, left edge then right edge.
    pub x_range: (f64, f64),
    pub cd_unit: CdUnit,
    pub ord_unit: OrdUnit,
    pub show_contributions: bool,
    pub dark: bool,
    /// Band (position in the band list) drawn emphasised.
    pub highlight: Option<usize>,
    /// A key naming the traces (band names, n_L/n_R/Δn) in the top corner.
    pub legend: bool,
    /// Backend pixels per CSS pixel (a HiDPI canvas passes devicePixelRatio):
    /// text and lines scale with it, so the picture looks the same.
    pub pixel_ratio: f64,
    /// The left axis's value range, held (while a peak is dragged); None: fitted to the traces.
    pub y_range: Option<(f64, f64)>,
    /// Tick label size in CSS pixels (an export's font size); None: follows the figure's size.
    pub font_px: Option<f64>,
    /// Measured data sets (`overlay`); each is drawn on the plot it belongs on.
    pub points: &'a [crate::overlay::PointSet],
}

impl<'a> PlotRequest<'a> {
    /// Defaults: De and degrees, contributions shown, light, no highlight, no legend.
    pub fn new(kind: PlotKind, spectra: &'a Spectra, axis: AxisUnit, x_range: (f64, f64)) -> PlotRequest<'a> {
        PlotRequest {
            kind,
            spectra,
            axis,
            x_range,
            cd_unit: CdUnit::DeltaEpsilon,
            ord_unit: OrdUnit::Degrees,
            show_contributions: true,
            dark: false,
            highlight: None,
            legend: false,
            pixel_ratio: 1.0,
            y_range: None,
            font_px: None,
            points: &[],
        }
    }

    /// The y-axis label (left axis).
    pub fn y_label(&self) -> &'static str {
        y_label(self.kind, self.cd_unit, self.ord_unit)
    }
}

/// Where the plot landed: the plotting box in backend pixels and the values
/// at its edges (unscaled, in the units of the request).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlotFrame {
    pub left: i32,
    pub top: i32,
    pub right: i32,
    pub bottom: i32,
    /// Axis values at the left and right edges.
    pub x_range: (f64, f64),
    /// Values at the bottom and top edges of the left axis.
    pub y_range: (f64, f64),
    /// Values at the bottom and top edges of the right axis (Index plot: Δn).
    pub y2_range: Option<(f64, f64)>,
}

impl PlotFrame {
    pub fn contains(&self, px: f64, py: f64) -> bool {
        px >= f64::from(self.left) && px <= f64::from(self.right) && py >= f64::from(self.top) && py <= f64::from(self.bottom)
    }

    /// Axis value under a pixel column.
    pub fn x_at(&self, px: f64) -> f64 {
        lerp(self.x_range, (px - f64::from(self.left)) / f64::from((self.right - self.left).max(1)))
    }

    /// Pixel column of an axis value.
    pub fn px_of_x(&self, x: f64) -> f64 {
        f64::from(self.left) + unlerp(self.x_range, x) * f64::from(self.right - self.left)
    }

    /// Left-axis value under a pixel row.
    pub fn y_at(&self, py: f64) -> f64 {
        lerp(self.y_range, (f64::from(self.bottom) - py) / f64::from((self.bottom - self.top).max(1)))
    }

    /// Pixel row of a left-axis value.
    pub fn py_of_y(&self, y: f64) -> f64 {
        f64::from(self.bottom) - unlerp(self.y_range, y) * f64::from(self.bottom - self.top)
    }

    /// Right-axis value under a pixel row (Index plot).
    pub fn y2_at(&self, py: f64) -> Option<f64> {
        let r = self.y2_range?;
        Some(lerp(r, (f64::from(self.bottom) - py) / f64::from((self.bottom - self.top).max(1))))
    }
}

pub(crate) fn lerp((a, b): (f64, f64), t: f64) -> f64 {
    a + (b - a) * t
}

pub(crate) fn unlerp((a, b): (f64, f64), v: f64) -> f64 {
    if b == a {
        0.0
    } else {
        (v - a) / (b - a)
    }
}

/// The values under the crosshair: at the grid point nearest to `x`.
#[derive(Debug, Clone, PartialEq)]
pub struct Readout {
    /// Index of the grid point in the spectra.
    pub index: usize,
    /// Its position on the axis.
    pub x: f64,
    /// (trace name, value in the plotted unit): the sum(s) first, then bands.
    pub values: Vec<(String, f64)>,
}

pub use crate::limits::MAX_FIGURE_PIXELS;

fn range_error(message: impl Into<String>) -> Error {
    Error::new(ErrorKind::OutOfRange, "view.range", message)
}

fn draw_error<E: std::error::Error + Send + Sync>(e: plotters::drawing::DrawingAreaErrorKind<E>) -> Error {
    Error::new(ErrorKind::Io, "figure", format!("drawing failed: {e}"))
}

/// Checks the range and returns (lo, hi) ascending.
fn checked_range(req: &PlotRequest) -> Result<(f64, f64)> {
    let (a, b) = req.x_range;
    if !(a.is_finite() && b.is_finite()) {
        return Err(range_error(format!("range ends must be finite numbers (got {a} and {b})")));
    }
    if a <= 0.0 || b <= 0.0 {
        return Err(Error::new(ErrorKind::NotPositive, "view.range", format!("range ends must be positive (got {a} and {b})")));
    }
    let (lo, hi) = (a.min(b), a.max(b));
    if hi - lo <= hi * 1e-9 {
        return Err(range_error(format!("the range is empty ({a} to {b})")));
    }
    if req.spectra.is_empty() {
        return Err(range_error("there are no computed points to draw"));
    }
    Ok((lo, hi))
}

/// The value ranges of the left and (Index plot) right axes over the
/// visible points; a held left range is kept as it is.
fn value_ranges(req: &PlotRequest, sums: &[Trace], bands: &[Trace], visible: &[bool]) -> ((f64, f64), Option<(f64, f64)>) {
    let all = || sums.iter().chain(bands);
    let held = req.y_range.filter(|(a, b)| a.is_finite() && b.is_finite() && a < b);
    let y = held.unwrap_or_else(|| value_range(all().filter(|t| !t.secondary), visible, Some(0.0)));
    let y2 = all().any(|t| t.secondary).then(|| zero_aligned(y, value_range(all().filter(|t| t.secondary), visible, Some(0.0))));
    (y, y2)
}

/// Draws one plot filling `area`.
pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, req: &PlotRequest) -> Result<PlotFrame> {
    #[cfg(not(target_arch = "wasm32"))]
    native_font::ensure()?;
    let theme = theme(req.dark);
    let (lo, hi) = checked_range(req)?;
    let (sums, bands) = traces(req, &theme)?;
    let xs = axis_positions(req);
    let visible: Vec<bool> = xs.iter().map(|x| x.is_finite() && *x >= lo && *x <= hi).collect();
    if !visible.iter().any(|v| *v) {
        return Err(range_error(format!("no computed points lie between {lo} and {hi} {}", req.axis.label())));
    }
    let (y_range, y2_range) = value_ranges(req, &sums, &bands, &visible);
    let sets = points::on_plot(req);
    let sticks = sticks::sticks(req);
    let y_range = if req.y_range.is_some() { y_range } else { sticks::widen(points::widen(y_range, &sets, (lo, hi)), &sticks, (lo, hi)) };
    let layout = Layout::new(area.dim_in_pixel(), req, &theme);
    let x = XAxis::new((lo, hi), req.x_range.0 > req.x_range.1, layout.x_ticks());
    let y = AxisScale::new(y_range, layout.y_ticks());
    let y2 = y2_range.map(|r| AxisScale::new(r, layout.y_ticks()));

    area.fill(&theme.background).map_err(draw_error)?;
    // A residual strip takes the bottom of the figure; the plot keeps the rest.
    let (main, strip) = if points::wants_strip(&sets) {
        let (m, s) = points::split(area);
        (m, Some(s))
    } else {
        (area.clone(), None)
    };
    let mut chart = draw::chart(&main, &layout, &x, &y, y2.as_ref())?;
    draw::mesh(&mut chart, &layout, &theme, (&x, req.axis), (&y, req.y_label()), y2.as_ref())?;
    sticks::draw(&mut chart, &layout, &theme, &sticks, &x, &y)?;
    draw::zero_line(&mut chart, &layout, &theme, &x, &y)?;
    let at = Placement { xs: &xs, visible: &visible, x: &x, y: &y, y2: y2.as_ref(), legend: req.legend };
    let keyed = draw::traces(&mut chart, &layout, &sums, &bands, &at)?;
    points::draw_sets(&mut chart, &layout, &theme, &sets, &x, &y, |s| Some(&s.y))?;
    draw::frame(&mut chart, &layout, &theme, &x, &y)?;
    if keyed {
        let all: Vec<&Trace> = sums.iter().chain(&bands).collect();
        draw::key(&mut chart, &layout, &theme, draw::key_corner(&all, &at))?;
    }

    let (px, py) = chart.plotting_area().get_pixel_range();
    if let Some(strip) = strip {
        points::strip(&strip, &layout, &theme, &sets, &x, layout.y_area(&main, &y))?;
    }
    Ok(PlotFrame { left: px.start, top: py.start, right: px.end, bottom: py.end, x_range: req.x_range, y_range, y2_range })
}

/// Backend pixels per SVG pixel in [`svg`].
pub const SVG_OVERSAMPLE: u32 = 4;

/// The figure as an SVG document of `width` x `height` pixels.
pub fn svg(req: &PlotRequest, width: u32, height: u32) -> Result<String> {
    for (name, v) in [("width", width), ("height", height)] {
        if !(64..=MAX_FIGURE_PIXELS / SVG_OVERSAMPLE).contains(&v) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                name,
                format!("figure {name} must lie in 64..{} pixels (got {v})", MAX_FIGURE_PIXELS / SVG_OVERSAMPLE),
            ));
        }
    }
    // plotters places everything on whole backend pixels; drawing at
    // SVG_OVERSAMPLE times the size inside a viewBox of that size keeps the
    // curves smooth, and the document still declares width x height.
    let (big_w, big_h) = (width * SVG_OVERSAMPLE, height * SVG_OVERSAMPLE);
    let mut text = String::new();
    {
        let root = SVGBackend::with_string(&mut text, (big_w, big_h)).into_drawing_area();
        let mut big = *req;
        big.pixel_ratio = req.pixel_ratio * f64::from(SVG_OVERSAMPLE);
        draw(&root, &big)?;
        root.present().map_err(draw_error)?;
    }
    let header = format!("<svg width=\"{big_w}\" height=\"{big_h}\"");
    if !text.starts_with(&header) {
        return Err(Error::new(ErrorKind::Io, "figure", "unexpected SVG header from the drawing backend"));
    }
    Ok(format!("<svg width=\"{width}\" height=\"{height}\"{}", &text[header.len()..]))
}

/// The plotted values at the grid point nearest to `x` (axis units).
pub fn readout(req: &PlotRequest, x: f64) -> Result<Readout> {
    crate::error::finite("x", x)?;
    let (sums, bands) = traces(req, &theme(req.dark))?;
    let xs = axis_positions(req);
    let index = xs
        .iter()
        .enumerate()
        .filter(|(_, p)| p.is_finite())
        .min_by(|a, b| (a.1 - x).abs().total_cmp(&(b.1 - x).abs()))
        .map(|(i, _)| i)
        .ok_or_else(|| range_error("there are no computed points"))?;
    let values = sums.iter().chain(&bands).map(|t| (t.name.clone(), t.values.get(index).copied().unwrap_or(f64::NAN))).collect();
    Ok(Readout { index, x: xs.get(index).copied().unwrap_or(f64::NAN), values })
}

#[cfg(not(target_arch = "wasm32"))]
mod native_font {
    use crate::error::{Error, ErrorKind, Result};
    use std::sync::OnceLock;

    static REGISTERED: OnceLock<bool> = OnceLock::new();

    /// Registers DejaVu Sans as "sans-serif" for plotters' text layout.
    pub fn ensure() -> Result<()> {
        let ok = *REGISTERED.get_or_init(|| {
            plotters::style::register_font("sans-serif", plotters::style::FontStyle::Normal, dejavu::sans::regular()).is_ok()
        });
        if ok {
            Ok(())
        } else {
            Err(Error::new(ErrorKind::Io, "figure", "the bundled font could not be loaded"))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plot_kinds_round_trip_their_keys() {
        for k in PlotKind::ALL {
            assert_eq!(PlotKind::parse(k.key()), Some(k));
        }
        assert_eq!(PlotKind::parse("xyz"), None);
    }
}
