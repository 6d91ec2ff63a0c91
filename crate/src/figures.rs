//! Figures: one drawing function for the live canvas, the SVG export and the
//! CLI, so that all three are the same picture.
//!
//! API
//! ```text
//! pub enum PlotKind { Cd, Ord, Absorption, Index }      key()/parse(): "cd" "ord" "abs" "index"
//! pub struct PlotRequest<'a> { kind, spectra, axis, x_range, cd_unit, ord_unit,
//!                              show_contributions, dark, highlight, legend }
//! PlotRequest::new(kind, &spectra, axis, x_range) -> PlotRequest   (defaults below)
//! pub fn draw<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, req: &PlotRequest)
//!     -> Result<PlotFrame>
//! pub fn svg(req: &PlotRequest, width: u32, height: u32) -> Result<String>
//! pub fn readout(req: &PlotRequest, x: f64) -> Result<Readout>
//! pub const BAND_PALETTE: [(u8, u8, u8); 7];  band_colour(i), band_colour_hex(i)
//! pub fn theme(dark) -> Theme                  background/text/muted/grid colours
//! ```
//! - `x_range` is in `axis` units as drawn left -> right; a decreasing pair
//!   (e.g. wavenumbers high -> low) draws a reversed axis.
//! - [`PlotFrame`] gives the plotting box in backend pixels (the coordinates of
//!   the backend, not of `area`) and the values at its edges, so the page maps
//!   the pointer to values and back (`x_at`, `px_of_x`, `y_at`, `py_of_y`).
//! - The sum is drawn in the text colour, each band's contribution as a thin
//!   line in its palette colour (the highlighted band thicker; a highlighted
//!   band is drawn even when contributions are off). CD and ORD get a zero
//!   line. Non-finite points break the line instead of failing.
//! - Index plot: n_L (solid) and n_R (dashed) on the left axis; Δn = n_L − n_R
//!   on a secondary right axis in the muted colour, since at any useful scale
//!   n_L and n_R lie on top of each other. Contributions there are Δn per band.
//! - Very small or large values are scaled by a power of ten that is written
//!   into the axis label in quantity-calculus form ("Δn / 10⁻⁶").
//! - Text: the family is `sans-serif`. On wasm the canvas measures text; on
//!   native plotters measures it with DejaVu Sans (bundled by the `dejavu`
//!   crate, licence in crate/licenses/), registered on first use.

use crate::error::{Error, ErrorKind, Result};
use crate::spectra::Spectra;
use crate::units::{AxisUnit, CdUnit, OrdUnit, UnitError};
use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint};
use plotters::coord::Shift;
use plotters::prelude::*;

pub use crate::view::PlotKind;

/// The font sizes an export may ask for, in CSS pixels.
pub const MIN_FONT_PX: f64 = 6.0;
pub const MAX_FONT_PX: f64 = 40.0;

/// Axis label of the mean molar absorption coefficient.
pub const EPSILON_LABEL: &str = "ε / M⁻¹ cm⁻¹";
/// Axis label of the refractive indices.
pub const INDEX_LABEL: &str = "n";
/// Axis label of the circular birefringence on the Index plot.
pub const DELTA_N_LABEL: &str = "Δn = n_L − n_R";

/// Spectral axis label as the trade writes it.
pub fn axis_label(axis: AxisUnit) -> String {
    let symbol = match axis {
        AxisUnit::Nanometre => "λ",
        AxisUnit::Wavenumber => "ν\u{0303}",
        AxisUnit::ElectronVolt => "E",
    };
    format!("{symbol} / {}", axis.label())
}

/// Okabe-Ito colours (Wong, Nature Methods 8, 441 (2011)) without black,
/// which is kept for the sum: orange, sky blue, bluish green, yellow, blue,
/// vermillion, reddish purple. Band i gets entry i mod 7.
pub const BAND_PALETTE: [(u8, u8, u8); 7] = [
    (0xE6, 0x9F, 0x00),
    (0x56, 0xB4, 0xE9),
    (0x00, 0x9E, 0x73),
    (0xF0, 0xE4, 0x42),
    (0x00, 0x72, 0xB2),
    (0xD5, 0x5E, 0x00),
    (0xCC, 0x79, 0xA7),
];

/// The colour of the band at position `index` in the band list.
pub fn band_colour(index: usize) -> RGBColor {
    let (r, g, b) = BAND_PALETTE[index % BAND_PALETTE.len()];
    RGBColor(r, g, b)
}

/// The same colour as `#rrggbb`, for the page's band table.
pub fn band_colour_hex(index: usize) -> String {
    hex(band_colour(index))
}

fn hex(c: RGBColor) -> String {
    format!("#{:02x}{:02x}{:02x}", c.0, c.1, c.2)
}

/// Figure colours for a light or dark page.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Theme {
    pub background: RGBColor,
    /// Text, axes, frame and the sum.
    pub text: RGBColor,
    /// Zero line and secondary traces.
    pub muted: RGBColor,
    pub grid: RGBColor,
}

impl Theme {
    /// `[background, text, muted, grid]` as `#rrggbb`, for the page's CSS.
    pub fn hex(&self) -> [String; 4] {
        [hex(self.background), hex(self.text), hex(self.muted), hex(self.grid)]
    }
}

pub fn theme(dark: bool) -> Theme {
    if dark {
        Theme {
            background: RGBColor(0x16, 0x18, 0x1b),
            text: RGBColor(0xe8, 0xe8, 0xe6),
            muted: RGBColor(0x9a, 0x9c, 0xa0),
            grid: RGBColor(0x30, 0x33, 0x38),
        }
    } else {
        Theme {
            background: RGBColor(0xff, 0xff, 0xff),
            text: RGBColor(0x1a, 0x1a, 0x1a),
            muted: RGBColor(0x70, 0x70, 0x70),
            grid: RGBColor(0xe6, 0xe6, 0xe6),
        }
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
        }
    }

    /// The y-axis label (left axis).
    pub fn y_label(&self) -> &'static str {
        y_label(self.kind, self.cd_unit, self.ord_unit)
    }
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

fn lerp((a, b): (f64, f64), t: f64) -> f64 {
    a + (b - a) * t
}

fn unlerp((a, b): (f64, f64), v: f64) -> f64 {
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

/// One line to draw: values per grid point (NaN where undefined).
struct Trace {
    name: String,
    values: Vec<f64>,
    colour: RGBColor,
    width: f64,
    dashed: bool,
    /// Drawn against the right axis.
    secondary: bool,
}

/// A linear axis whose ticks we choose (plotters' own pick cannot be told
/// the 1-2-5 steps that the labels are formatted for).
#[derive(Clone)]
struct TickedAxis {
    lo: f64,
    hi: f64,
    ticks: Vec<f64>,
}

impl Ranged for TickedAxis {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, v: &f64, limit: (i32, i32)) -> i32 {
        let t = unlerp((self.lo, self.hi), *v);
        let span = f64::from(limit.1 - limit.0);
        let p = f64::from(limit.0) + span * t;
        // Far-off values (a line leaving the box) are pinned, not overflowed.
        p.clamp(-1e6, 1e6).round() as i32
    }

    fn key_points<Hint: KeyPointHint>(&self, _hint: Hint) -> Vec<f64> {
        self.ticks.clone()
    }

    fn range(&self) -> std::ops::Range<f64> {
        self.lo..self.hi
    }
}

fn ticked(lo: f64, hi: f64, ticks: Vec<f64>) -> TickedAxis {
    TickedAxis { lo, hi, ticks }
}

/// Largest figure drawn, in pixels per side.
pub const MAX_FIGURE_PIXELS: u32 = 20_000;

fn unit_error(field: &str, e: UnitError) -> Error {
    Error::new(ErrorKind::MissingField, field, e.0)
}

fn range_error(message: impl Into<String>) -> Error {
    Error::new(ErrorKind::OutOfRange, "view.range", message)
}

/// The traces of a request: sums first (drawn last, on top), then bands.
fn traces(req: &PlotRequest, theme: &Theme) -> Result<(Vec<Trace>, Vec<Trace>)> {
    let s = req.spectra;
    let n_bands = s.bands.len();
    let wanted = |i: usize| req.show_contributions || req.highlight == Some(i);
    let band_width = |i: usize| if req.highlight == Some(i) { 2.4 } else { 1.0 };
    let band = |i: usize, values: Vec<f64>, secondary: bool| Trace {
        name: s.bands.get(i).map(|b| b.name.clone()).unwrap_or_default(),
        values,
        colour: band_colour(i),
        width: band_width(i),
        dashed: false,
        secondary,
    };
    let sum = |name: &str, values: Vec<f64>| Trace {
        name: name.to_string(),
        values,
        colour: theme.text,
        width: 2.0,
        dashed: false,
        secondary: false,
    };
    let mut bands = Vec::new();
    let sums = match req.kind {
        PlotKind::Cd => {
            let total = s.cd_in(req.cd_unit).map_err(|e| unit_error("view.cd_unit", e))?;
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                let v = s.band_cd_in(i, req.cd_unit).map_err(|e| unit_error("view.cd_unit", e))?;
                bands.push(band(i, v, false));
            }
            vec![sum("sum", total)]
        }
        PlotKind::Ord => {
            let total = s.ord_in(req.ord_unit).map_err(|e| unit_error("view.ord_unit", e))?;
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                let v = s.band_ord_in(i, req.ord_unit).map_err(|e| unit_error("view.ord_unit", e))?;
                bands.push(band(i, v, false));
            }
            vec![sum("sum", total)]
        }
        PlotKind::Absorption => {
            for (i, b) in s.bands.iter().enumerate().filter(|(i, _)| wanted(*i)) {
                bands.push(band(i, b.epsilon.clone(), false));
            }
            vec![sum("sum", s.epsilon.clone())]
        }
        PlotKind::Index => {
            for (i, b) in s.bands.iter().enumerate().filter(|(i, _)| wanted(*i)) {
                bands.push(band(i, b.delta_n.clone(), true));
            }
            let mut n_r = sum("n_R", s.n_right.clone());
            n_r.dashed = true;
            let mut dn = sum("Δn", s.delta_n.clone());
            dn.colour = theme.muted;
            dn.width = 1.6;
            dn.secondary = true;
            vec![dn, sum("n_L", s.n_left.clone()), n_r]
        }
    };
    Ok((sums, bands))
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

/// Axis positions of the grid points.
fn axis_positions(req: &PlotRequest) -> Vec<f64> {
    req.spectra.wavenumber_cm1.iter().map(|nu| req.axis.from_wavenumber(*nu)).collect()
}

/// Value range of the traces over the visible points, padded; `include` is
/// forced in (zero for signed quantities).
fn value_range<'t>(
    traces: impl Iterator<Item = &'t Trace>,
    visible: &[bool],
    include: Option<f64>,
) -> (f64, f64) {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for t in traces {
        for (v, _) in t.values.iter().zip(visible).filter(|(v, vis)| **vis && v.is_finite()) {
            lo = lo.min(*v);
            hi = hi.max(*v);
        }
    }
    if let Some(z) = include {
        lo = lo.min(z);
        hi = hi.max(z);
    }
    if !(lo.is_finite() && hi.is_finite()) {
        return (-1.0, 1.0);
    }
    let span = hi - lo;
    let scale = hi.abs().max(lo.abs());
    if span <= scale * 1e-12 || span == 0.0 {
        // A flat line: centre it in a small band around its value.
        let half = if scale > 0.0 { scale * 0.1 } else { 1.0 };
        return (lo - half, hi + half);
    }
    let pad = span * 0.06;
    let lo = if include == Some(lo) && lo == 0.0 && hi > 0.0 && lo >= 0.0 { lo - pad * 0.5 } else { lo - pad };
    (lo, hi + pad)
}

/// Ticks at 1-2-5 multiples of a power of ten, about `target` of them.
fn ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, f64) {
    let target = target.max(2) as f64;
    let raw = (hi - lo) / target;
    let mag = 10f64.powf(raw.log10().floor());
    // The 1-2-5 step whose tick count is nearest the target (by ratio).
    let off = |s: f64| ((hi - lo) / s / target).ln().abs();
    let step = [0.5, 1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * mag)
        .min_by(|a, b| off(*a).total_cmp(&off(*b)))
        .unwrap_or(mag);
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    let ticks = (first..=last).take(100).map(|k| k as f64 * step).collect();
    (ticks, step)
}

/// Tick label with just enough decimals for the step and a true minus sign.
fn tick_label(v: f64, step: f64) -> String {
    let decimals = if step >= 1.0 { 0 } else { (-step.log10() - 1e-9).ceil().max(0.0) as usize };
    let text = format!("{:.*}", decimals, v);
    // "-0.0" and the like are zero.
    let text = if text.trim_start_matches('-').chars().all(|c| c == '0' || c == '.') {
        text.trim_start_matches('-').to_string()
    } else {
        text
    };
    text.replace('-', "\u{2212}")
}

/// Power of ten (multiple of 3) that brings the values to a readable size.
fn scale_exponent(lo: f64, hi: f64) -> i32 {
    let m = lo.abs().max(hi.abs());
    if m == 0.0 || !m.is_finite() {
        return 0;
    }
    let e = m.log10().floor() as i32;
    if (-2..4).contains(&e) {
        0
    } else {
        // Bounded so that 10^-e stays a finite double.
        (e.div_euclid(3) * 3).clamp(-300, 300)
    }
}

fn superscript(n: i32) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

/// "Q / U" shown as Q/(10^e U): "Q / 10^e U"; "Q = def" becomes "Q / 10^e (Q = def)".
fn scaled_label(label: &str, exponent: i32) -> String {
    if exponent == 0 {
        return label.to_string();
    }
    let power = format!("10{}", superscript(exponent));
    if let Some((q, u)) = label.split_once(" / ") {
        format!("{q} / {power} {u}")
    } else if let Some((q, _)) = label.split_once(" = ") {
        format!("{q} / {power}  ({label})")
    } else {
        format!("{label} / {power}")
    }
}

fn draw_error<E: std::error::Error + Send + Sync>(e: plotters::drawing::DrawingAreaErrorKind<E>) -> Error {
    Error::new(ErrorKind::Io, "figure", format!("drawing failed: {e}"))
}

/// Splits a trace into runs of finite points inside the shown range.
fn segments(xs: &[f64], values: &[f64], visible: &[bool], x_sign: f64, y_scale: f64) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut run = Vec::new();
    for ((x, v), vis) in xs.iter().zip(values).zip(visible) {
        let y = v * y_scale;
        if *vis && y.is_finite() {
            run.push((x * x_sign, y));
        } else if !run.is_empty() {
            out.push(std::mem::take(&mut run));
        }
    }
    if !run.is_empty() {
        out.push(run);
    }
    out
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

    let zero = match req.kind {
        PlotKind::Cd | PlotKind::Ord | PlotKind::Absorption => Some(0.0),
        PlotKind::Index => None,
    };
    let primary = sums.iter().chain(&bands).filter(|t| !t.secondary);
    let held = req.y_range.filter(|(a, b)| a.is_finite() && b.is_finite() && a < b);
    let (y_lo, y_hi) = held.unwrap_or_else(|| value_range(primary, &visible, zero));
    let secondary_wanted = sums.iter().chain(&bands).any(|t| t.secondary);
    let y2 = secondary_wanted.then(|| value_range(sums.iter().chain(&bands).filter(|t| t.secondary), &visible, Some(0.0)));

    let (w, h) = area.dim_in_pixel();
    let ratio = if req.pixel_ratio.is_finite() { req.pixel_ratio.clamp(0.25, 8.0) } else { 1.0 };
    let css_size = (f64::from(w) / ratio).min(f64::from(h) / ratio * 1.6);
    let css_font = req.font_px.filter(|f| f.is_finite()).map(|f| f.clamp(MIN_FONT_PX, MAX_FONT_PX));
    let font_px = css_font.unwrap_or_else(|| (css_size / 48.0).clamp(11.0, 18.0)) * ratio;
    let line_scale = font_px / 13.0;
    let tick_font = ("sans-serif", font_px).into_font().color(&theme.text);
    let desc_font = ("sans-serif", font_px * 1.08).into_font().color(&theme.text);

    let plot_w_guess = f64::from(w) * 0.8;
    let plot_h_guess = f64::from(h) * 0.75;
    let (xt, x_step) = ticks(lo, hi, (plot_w_guess / (font_px * 6.5)) as usize);
    let y_exp = scale_exponent(y_lo, y_hi);
    let y_scale = 10f64.powi(-y_exp);
    let (yt, y_step) = ticks(y_lo * y_scale, y_hi * y_scale, (plot_h_guess / (font_px * 3.2)) as usize);
    let y_labels: Vec<String> = yt.iter().map(|v| tick_label(*v, y_step)).collect();

    // Reversed axes are drawn in negated coordinates and labelled back.
    let reversed = req.x_range.0 > req.x_range.1;
    let x_sign = if reversed { -1.0 } else { 1.0 };
    let (cx0, cx1) = if reversed { (-hi, -lo) } else { (lo, hi) };
    let x_keys: Vec<f64> = xt.iter().map(|x| x * x_sign).collect();
    let x_fmt = move |v: &f64| tick_label(*v * x_sign, x_step);
    let y_fmt = |v: &f64| tick_label(*v, y_step);

    let text_width = |s: &str| area.estimate_text_size(s, &tick_font).map(|(tw, _)| tw).unwrap_or(0);
    let widest_y = y_labels.iter().map(|l| text_width(l)).max().unwrap_or(0);
    let y_area = widest_y as f64 + font_px * 2.6;
    let x_area = font_px * 3.3;

    let (y2_parts, y2_area) = match y2 {
        Some((a, b)) => {
            let e = scale_exponent(a, b);
            let s = 10f64.powi(-e);
            let (t, step) = ticks(a * s, b * s, (plot_h_guess / (font_px * 3.2)) as usize);
            let widest = t.iter().map(|v| text_width(&tick_label(*v, step))).max().unwrap_or(0);
            (Some((a * s, b * s, e, s, t, step)), widest as f64 + font_px * 2.6)
        }
        None => (None, font_px * 1.2),
    };

    area.fill(&theme.background).map_err(draw_error)?;
    let chart = ChartBuilder::on(area)
        .margin_top((font_px * 0.9) as u32)
        .margin_left((font_px * 0.4) as u32)
        .margin_bottom((font_px * 0.3) as u32)
        .x_label_area_size(x_area as u32)
        .y_label_area_size(y_area as u32)
        .right_y_label_area_size(y2_area as u32)
        .build_cartesian_2d(
            ticked(cx0, cx1, x_keys),
            ticked(y_lo * y_scale, y_hi * y_scale, yt.clone()),
        )
        .map_err(draw_error)?;

    // Every chart gets a secondary coordinate system (one type for the code
    // below); only the Index plot shows it.
    let (frame_y2, y2_scale, y2_coord) = match &y2_parts {
        Some((a, b, _, s, t, _)) => (Some((a / s, b / s)), *s, ticked(*a, *b, t.clone())),
        None => (None, y_scale, ticked(y_lo * y_scale, y_hi * y_scale, Vec::new())),
    };
    let mut chart = chart.set_secondary_coord(ticked(cx0, cx1, Vec::new()), y2_coord);
    let axis_style = ShapeStyle::from(&theme.text).stroke_width(ratio.round().max(1.0) as u32);
    let grid_style = ShapeStyle::from(&theme.grid).stroke_width(ratio.round().max(1.0) as u32);
    let y_desc = scaled_label(req.y_label(), y_exp);
    // The secondary system must exist before the mesh, or the primary mesh
    // labels the right axis too.
    chart
        .configure_mesh()
        .bold_line_style(grid_style)
        .light_line_style(TRANSPARENT)
        .axis_style(axis_style)
        .set_all_tick_mark_size((font_px * 0.35) as u32)
        .label_style(tick_font.clone())
        .axis_desc_style(desc_font.clone())
        .x_label_formatter(&x_fmt)
        .y_label_formatter(&y_fmt)
        .x_desc(axis_label(req.axis))
        .y_desc(y_desc)
        .draw()
        .map_err(draw_error)?;

    if let Some((_, _, e, _, _, step)) = y2_parts {
        let y2_fmt = move |v: &f64| tick_label(*v, step);
        chart
            .configure_secondary_axes()
            .axis_style(axis_style)
            .set_all_tick_mark_size((font_px * 0.35) as u32)
            .label_style(tick_font.clone().color(&theme.muted))
            .axis_desc_style(desc_font.clone().color(&theme.muted))
            .y_label_formatter(&y2_fmt)
            .y_desc(scaled_label(DELTA_N_LABEL, e))
            .draw()
            .map_err(draw_error)?;
    }

    // Zero lines under everything else.
    let zero_style = ShapeStyle::from(&theme.muted).stroke_width(ratio.round().max(1.0) as u32);
    if zero.is_some() && y_lo < 0.0 && y_hi > 0.0 {
        chart
            .draw_series(std::iter::once(PathElement::new(vec![(cx0, 0.0), (cx1, 0.0)], zero_style)))
            .map_err(draw_error)?;
    }
    if let Some((a, b)) = frame_y2 {
        if a < 0.0 && b > 0.0 {
            chart
                .draw_secondary_series(DashedLineSeries::new(
                    vec![(cx0, 0.0), (cx1, 0.0)],
                    (font_px * 0.3) as u32,
                    (font_px * 0.3) as u32,
                    zero_style,
                ))
                .map_err(draw_error)?;
        }
    }

    // Bands first (highlighted last), sums on top.
    let mut order: Vec<&Trace> = bands.iter().collect();
    order.sort_by(|a, b| a.width.total_cmp(&b.width));
    order.extend(sums.iter());
    let mut legend_done = std::collections::HashSet::new();
    for t in order {
        let scale = if t.secondary { y2_scale } else { y_scale };
        let style = ShapeStyle::from(&t.colour).stroke_width((t.width * line_scale).round().max(1.0) as u32);
        for seg in segments(&xs, &t.values, &visible, x_sign, scale) {
            let anno = match (t.secondary, t.dashed) {
                (false, false) => chart.draw_series(LineSeries::new(seg, style)),
                (true, false) => chart.draw_secondary_series(LineSeries::new(seg, style)),
                (false, true) => chart.draw_series(DashedLineSeries::new(
                    seg,
                    (font_px * 0.5) as u32,
                    (font_px * 0.35) as u32,
                    style,
                )),
                (true, true) => chart.draw_secondary_series(DashedLineSeries::new(
                    seg,
                    (font_px * 0.5) as u32,
                    (font_px * 0.35) as u32,
                    style,
                )),
            }
            .map_err(draw_error)?;
            if req.legend && legend_done.insert(t.name.clone()) && !t.name.is_empty() {
                let (colour, width, dashed) = (t.colour, style.stroke_width, t.dashed);
                let len = (font_px * 1.6) as i32;
                anno.label(t.name.clone()).legend(move |(x, y)| {
                    let s = ShapeStyle::from(&colour).stroke_width(width);
                    if dashed {
                        PathElement::new(vec![(x, y), (x + len / 3, y)], s)
                    } else {
                        PathElement::new(vec![(x, y), (x + len, y)], s)
                    }
                });
            }
        }
    }

    // A closed frame around the plotting area.
    let (y_a, y_b) = (y_lo * y_scale, y_hi * y_scale);
    chart
        // A path, not a Rectangle: the SVG backend drops a rectangle's stroke width.
        .draw_series(std::iter::once(PathElement::new(
            vec![(cx0, y_a), (cx1, y_a), (cx1, y_b), (cx0, y_b), (cx0, y_a)],
            axis_style,
        )))
        .map_err(draw_error)?;

    if req.legend && !legend_done.is_empty() {
        chart
            .configure_series_labels()
            .position(legend_corner(&sums, &bands, &xs, &visible, (lo, hi), (y_lo, y_hi), frame_y2, reversed))
            .margin((font_px * 0.6) as u32)
            .label_font(tick_font.clone())
            .background_style(theme.background.mix(0.85))
            .border_style(grid_style)
            .legend_area_size((font_px * 1.8) as u32)
            .draw()
            .map_err(draw_error)?;
    }

    let (px, py) = chart.plotting_area().get_pixel_range();
    Ok(PlotFrame {
        left: px.start,
        top: py.start,
        right: px.end,
        bottom: py.end,
        x_range: req.x_range,
        y_range: (y_lo, y_hi),
        y2_range: frame_y2,
    })
}

/// The corner of the plot whose outer third holds the fewest drawn points,
/// so the legend hides as little data as possible (ties: upper right).
#[allow(clippy::too_many_arguments)]
fn legend_corner(
    sums: &[Trace],
    bands: &[Trace],
    xs: &[f64],
    visible: &[bool],
    (lo, hi): (f64, f64),
    y: (f64, f64),
    y2: Option<(f64, f64)>,
    reversed: bool,
) -> SeriesLabelPosition {
    // Fractions across the box, 0 = left/bottom as drawn.
    let along = |v: f64, (a, b): (f64, f64)| (v - a) / (b - a);
    let mut counts = [0usize; 4]; // upper right, upper left, lower right, lower left
    for t in sums.iter().chain(bands) {
        let yr = if t.secondary { y2.unwrap_or(y) } else { y };
        for ((x, v), vis) in xs.iter().zip(&t.values).zip(visible) {
            if !*vis || !v.is_finite() {
                continue;
            }
            let fx = along(*x, (lo, hi));
            let fx = if reversed { 1.0 - fx } else { fx };
            let fy = along(*v, yr);
            let right = fx > 0.65;
            let left = fx < 0.35;
            if fy > 0.65 {
                counts[0] += usize::from(right);
                counts[1] += usize::from(left);
            } else if fy < 0.35 {
                counts[2] += usize::from(right);
                counts[3] += usize::from(left);
            }
        }
    }
    let corners = [
        SeriesLabelPosition::UpperRight,
        SeriesLabelPosition::UpperLeft,
        SeriesLabelPosition::LowerRight,
        SeriesLabelPosition::LowerLeft,
    ];
    let best = (0..4).min_by_key(|i| counts[*i]).unwrap_or(0);
    corners.into_iter().nth(best).unwrap_or(SeriesLabelPosition::UpperRight)
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
    let values = sums
        .iter()
        .chain(&bands)
        .map(|t| (t.name.clone(), t.values.get(index).copied().unwrap_or(f64::NAN)))
        .collect();
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
            plotters::style::register_font("sans-serif", plotters::style::FontStyle::Normal, dejavu::sans::regular())
                .is_ok()
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
    fn ticks_are_1_2_5_multiples_inside_the_range() {
        let (t, step) = ticks(183.0, 647.0, 10);
        assert_eq!(step, 50.0);
        assert_eq!(t.first().copied(), Some(200.0));
        assert_eq!(t.last().copied(), Some(600.0));
    }

    #[test]
    fn tick_labels_use_a_true_minus_and_no_negative_zero() {
        assert_eq!(tick_label(-0.2, 0.1), "\u{2212}0.2");
        assert_eq!(tick_label(-1e-17, 0.1), "0.0");
        assert_eq!(tick_label(250.0, 50.0), "250");
    }

    #[test]
    fn scaled_labels_follow_quantity_calculus() {
        assert_eq!(scaled_label("ΔA", -3), "ΔA / 10⁻³");
        assert_eq!(scaled_label("θ / mdeg", 3), "θ / 10³ mdeg");
        assert_eq!(scaled_label(DELTA_N_LABEL, -6), "Δn / 10⁻⁶  (Δn = n_L − n_R)");
        assert_eq!(scale_exponent(-2.0e-6, 3.1e-6), -6);
        assert_eq!(scale_exponent(-20.0, 31.0), 0);
    }

    #[test]
    fn palette_is_okabe_ito_without_black() {
        // Hex values as published in Wong, Nature Methods 8, 441 (2011).
        let hexes: Vec<String> = (0..7).map(band_colour_hex).collect();
        assert_eq!(hexes, ["#e69f00", "#56b4e9", "#009e73", "#f0e442", "#0072b2", "#d55e00", "#cc79a7"]);
        assert_eq!(band_colour_hex(7), "#e69f00");
    }

    #[test]
    fn plot_kinds_round_trip_their_keys() {
        for k in PlotKind::ALL {
            assert_eq!(PlotKind::parse(k.key()), Some(k));
        }
        assert_eq!(PlotKind::parse("xyz"), None);
    }
}
