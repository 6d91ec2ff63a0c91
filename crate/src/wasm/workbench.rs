//! The page's handle on its four canvases and the last good model: every
//! edit hands the document to `update`, which validates it, resolves the
//! view (`view::View`), evaluates the spectra and redraws; readouts, peaks
//! and exports work on what last drew.

use super::canvas::{DrawnText, FastCanvas, TextSizes};
use super::document_from_js;
use super::reply::{failed, reply, reply_one, reply_refusal, Refusal};
use crate::error::{Error, ErrorKind};
use crate::figures::{self, PlotFrame, PlotRequest};
use crate::lines::rotation_at_lines;
use crate::model::Model;
use crate::spectra::{evaluate, evaluate_reusing, Grid, Spectra};
use crate::table::{number, spectra_csv};
use crate::view::{axis_key, PlotKind, View};
use plotters::prelude::IntoDrawingArea;
use serde::{Deserialize, Serialize};
use std::cell::RefCell;
use std::collections::HashMap;
use wasm_bindgen::prelude::*;
use web_sys::HtmlCanvasElement;

/// Page-side options that are not part of the document.
#[derive(Debug, Clone, Copy, Default, Deserialize)]
#[serde(default)]
struct DrawOptions {
    dark: bool,
    contributions: Option<bool>,
    /// Band drawn emphasised (the row the user is on).
    highlight: Option<usize>,
    /// Canvas pixels per CSS pixel (devicePixelRatio), for sharp HiDPI plots.
    pixel_ratio: Option<f64>,
    /// A key naming the traces.
    legend: bool,
    /// The CD axis's range held still while a band's peak is dragged.
    hold_cd_range: Option<(f64, f64)>,
}

/// What an export asks for: size in CSS pixels, a key, a font size.
#[derive(Debug, Clone, Copy, Default, Deserialize)]
#[serde(default)]
struct FigureOptions {
    width: u32,
    height: u32,
    legend: bool,
    font_px: Option<f64>,
}

/// Largest pixel ratio the page may ask for (PNG export at 4x, HiDPI screens).
const MAX_PIXEL_RATIO: f64 = 8.0;

fn plot_kind(key: &str) -> Result<PlotKind, Error> {
    PlotKind::parse(key)
        .ok_or_else(|| Error::new(ErrorKind::UnknownName, "plot", format!("unknown plot \"{key}\" (use cd, ord, abs or index)")))
}

fn checked_ratio(r: f64) -> Result<f64, Error> {
    if r.is_finite() && r > 0.0 && r <= MAX_PIXEL_RATIO {
        Ok(r)
    } else {
        Err(Error::new(ErrorKind::OutOfRange, "pixel_ratio", format!("pixel ratio must lie in (0, {MAX_PIXEL_RATIO}] (got {r})")))
    }
}

fn nothing_drawn() -> Error {
    Error::new(ErrorKind::Io, "", "no plot has been drawn yet")
}

/// The last model that validated and drew: what readouts and exports use.
struct Current {
    model: Model,
    title: String,
    spectra: Spectra,
    view: View,
}

#[derive(Serialize)]
struct FrameOut {
    plot: &'static str,
    left: i32,
    top: i32,
    right: i32,
    bottom: i32,
    x_range: (f64, f64),
    y_range: (f64, f64),
    y2_range: Option<(f64, f64)>,
}

fn frame_out(kind: PlotKind, f: &PlotFrame) -> FrameOut {
    FrameOut {
        plot: kind.key(),
        left: f.left,
        top: f.top,
        right: f.right,
        bottom: f.bottom,
        x_range: f.x_range,
        y_range: f.y_range,
        y2_range: f.y2_range,
    }
}

#[derive(Serialize)]
struct LineOut {
    name: &'static str,
    wavelength_nm: f64,
    rotation_deg: f64,
    specific_rotation: Option<f64>,
    molar_rotation: f64,
}

/// The reply of a draw: the view as resolved, each plot's frame and label, the lamp lines.
#[derive(Serialize)]
struct Drawn {
    axis_unit: &'static str,
    axis_label: String,
    range_nm: (f64, f64),
    x_range: (f64, f64),
    points: usize,
    cd_unit: &'static str,
    ord_unit: &'static str,
    plots: Vec<&'static str>,
    frames: Vec<FrameOut>,
    lines: Vec<LineOut>,
    y_labels: HashMap<&'static str, &'static str>,
    /// The summed traces of each shown plot, for the key beside it.
    keys: HashMap<&'static str, Vec<KeyOut>>,
}

#[derive(Serialize)]
struct KeyOut {
    name: &'static str,
    colour: String,
    right_axis: bool,
}

#[derive(Serialize)]
struct ReadValue {
    name: String,
    value: f64,
}

#[derive(Serialize)]
struct PlotValues {
    plot: &'static str,
    label: &'static str,
    values: Vec<ReadValue>,
}

#[derive(Serialize)]
struct Readout {
    x: f64,
    nm: f64,
    cm1: f64,
    ev: f64,
    plots: Vec<PlotValues>,
}

#[derive(Serialize)]
struct Peak {
    x: f64,
    y: f64,
}

/// The page's handle: four canvases and the last good result.
#[wasm_bindgen]
pub struct Workbench {
    canvases: Vec<(PlotKind, HtmlCanvasElement)>,
    current: Option<Current>,
    options: DrawOptions,
    text_sizes: TextSizes,
    /// The text drawn on each canvas by the last redraw (tests compare it
    /// with the SVG export).
    drawn_text: RefCell<HashMap<&'static str, Vec<String>>>,
    /// The shown data sets of the last good document, in its plots' units.
    points: Vec<crate::overlay::PointSet>,
}

#[wasm_bindgen]
impl Workbench {
    /// Takes the four canvases: CD, ORD, absorption, refractive indices.
    #[wasm_bindgen(constructor)]
    pub fn new(cd: HtmlCanvasElement, ord: HtmlCanvasElement, abs: HtmlCanvasElement, index: HtmlCanvasElement) -> Workbench {
        Workbench {
            canvases: vec![(PlotKind::Cd, cd), (PlotKind::Ord, ord), (PlotKind::Absorption, abs), (PlotKind::Index, index)],
            current: None,
            options: DrawOptions::default(),
            text_sizes: TextSizes::default(),
            drawn_text: RefCell::new(HashMap::new()),
            points: Vec::new(),
        }
    }

    /// Validates the document, evaluates it and redraws every visible plot:
    /// `{ ok, frames, lines, ... }`; a refused document leaves the canvases
    /// showing the last good model.
    pub fn update(&mut self, doc: JsValue, options: JsValue) -> JsValue {
        if let Ok(o) = serde_wasm_bindgen::from_value::<DrawOptions>(options) {
            self.options = o;
        }
        reply_refusal(self.try_update(doc))
    }

    /// Redraws the last good model with new page options (theme, highlight, size).
    pub fn redraw(&mut self, options: JsValue) -> JsValue {
        if let Ok(o) = serde_wasm_bindgen::from_value::<DrawOptions>(options) {
            self.options = o;
        }
        let Some(current) = self.current.take() else { return failed(&nothing_drawn()) };
        let result = self.draw_all(&current.spectra, &current.view).map(|frames| self.report(&current.view, &frames, Vec::new()));
        self.current = Some(current);
        reply(result)
    }

    /// The values under the crosshair at an axis position, for every visible
    /// plot: `{ ok, x, nm, cm1, ev, plots: [{ plot, label, values: [{ name, value }] }] }`.
    pub fn readout(&self, x: f64) -> JsValue {
        reply(self.try_readout(x))
    }

    /// The spectra of the last good model as CSV on a round `step` (in the
    /// view's axis unit) across its window, after a header block naming the
    /// model, the sample and the grid: `{ ok, csv }`. No step: the view's grid.
    pub fn csv(&self, step: Option<f64>) -> JsValue {
        reply_one("csv", self.try_csv(step))
    }

    /// One plot of the last good model as SVG, light, nothing emphasised,
    /// at the size and font asked for: `{ ok, svg }`.
    pub fn svg(&self, plot: &str, figure: JsValue) -> JsValue {
        let result = (|| {
            let kind = plot_kind(plot)?;
            let o = figure_options(figure)?;
            let cur = self.current.as_ref().ok_or_else(nothing_drawn)?;
            let req = self.export_request(kind, cur, &o, 1.0);
            figures::svg(&req, o.width, o.height)
        })();
        reply_one("svg", result)
    }

    /// Draws one plot of the last good model onto `canvas` (an offscreen one
    /// for PNG export) at `pixel_ratio` canvas pixels per CSS pixel, light,
    /// nothing emphasised: `{ ok, frame }`.
    pub fn draw_plot(&self, plot: &str, canvas: HtmlCanvasElement, pixel_ratio: f64, figure: JsValue) -> JsValue {
        let result = (|| {
            let kind = plot_kind(plot)?;
            let ratio = checked_ratio(pixel_ratio)?;
            let o = figure_options(figure)?;
            let cur = self.current.as_ref().ok_or_else(nothing_drawn)?;
            let req = self.export_request(kind, cur, &o, ratio);
            let backend = FastCanvas::new(canvas, self.text_sizes.clone(), None).ok_or_else(no_context)?;
            let frame = figures::draw(&backend.into_drawing_area(), &req)?;
            Ok(frame_out(kind, &frame))
        })();
        reply_one("frame", result)
    }

    /// Where each band's contribution to the CD plot is largest in magnitude
    /// on the grid, in axis and plotted units (null for a band with no
    /// contribution), for dragging a band by its peak: `{ ok, peaks }`.
    pub fn band_peaks(&self) -> JsValue {
        let Some(cur) = &self.current else { return failed(&nothing_drawn()) };
        let spectra = &cur.spectra;
        let peaks: Vec<Option<Peak>> = (0..spectra.bands.len())
            .map(|i| {
                let values = spectra.band_cd_in(i, cur.view.cd_unit).ok()?;
                let (k, y) = values
                    .iter()
                    .enumerate()
                    .filter(|(_, v)| v.is_finite() && **v != 0.0)
                    .max_by(|a, b| a.1.abs().total_cmp(&b.1.abs()))?;
                let nu = spectra.wavenumber_cm1.get(k)?;
                Some(Peak { x: cur.view.axis.from_wavenumber(*nu), y: *y })
            })
            .collect();
        reply_one("peaks", Ok(peaks))
    }

    /// Every text the last redraw put on a plot's canvas, in drawing order: `{ ok, texts }`.
    pub fn drawn_text(&self, plot: &str) -> JsValue {
        reply_one("texts", plot_kind(plot).map(|k| self.drawn_text.borrow().get(k.key()).cloned().unwrap_or_default()))
    }
}

fn figure_options(figure: JsValue) -> Result<FigureOptions, Error> {
    let o: FigureOptions =
        serde_wasm_bindgen::from_value(figure).map_err(|e| Error::new(ErrorKind::Syntax, "figure", format!("not a figure size: {e}")))?;
    if o.width == 0 || o.height == 0 {
        return Err(Error::new(ErrorKind::OutOfRange, "figure", "a figure needs a width and a height"));
    }
    Ok(o)
}

fn no_context() -> Error {
    Error::new(ErrorKind::Io, "figure", "the browser gave no 2D canvas context")
}

impl Workbench {
    fn try_update(&mut self, doc: JsValue) -> Result<Drawn, Refusal> {
        let doc = document_from_js(doc)?;
        let model = Model::from_document(&doc)?;
        let view = View::choose(doc.view.as_ref(), &model)?;
        // A unit that needs sample data the model lacks, said of the unit menu.
        if let Some((field, quantity, needs)) = view.lacking(&model) {
            return Err(Refusal::needs(needs, field, quantity));
        }
        // Shapes of bands the edit left alone come from the last drawing.
        let spectra = evaluate_reusing(&model, &view.grid()?.wavenumber_cm1, self.current.as_ref().map(|c| &c.spectra))?;
        let last_points = std::mem::replace(&mut self.points, crate::overlay::point_sets(&doc, &model, &view)?);
        let lines = rotation_at_lines(&model)?
            .into_iter()
            .map(|r| LineOut {
                name: r.line.name,
                wavelength_nm: r.line.wavelength_nm,
                rotation_deg: r.rotation_deg,
                specific_rotation: r.specific_rotation,
                molar_rotation: r.molar_rotation,
            })
            .collect();
        let frames = match self.draw_all(&spectra, &view) {
            Ok(f) => f,
            Err(e) => {
                self.points = last_points;
                return Err(e.into());
            }
        };
        let out = self.report(&view, &frames, lines);
        self.current = Some(Current { model, title: doc.title.clone(), spectra, view });
        Ok(out)
    }

    fn try_readout(&self, x: f64) -> Result<Readout, Error> {
        let cur = self.current.as_ref().ok_or_else(nothing_drawn)?;
        let mut plots = Vec::new();
        let mut at = None;
        for kind in &cur.view.plots {
            let req = self.request(*kind, &cur.spectra, &cur.view);
            if let Ok(r) = figures::readout(&req, x) {
                at = Some(r.x);
                let values = r.values.into_iter().map(|(name, value)| ReadValue { name, value }).collect();
                plots.push(PlotValues { plot: kind.key(), label: req.y_label(), values });
            }
        }
        let x = at.ok_or_else(|| Error::new(ErrorKind::OutOfRange, "x", "no plot is shown"))?;
        let nu = cur.view.axis.to_wavenumber(x);
        Ok(Readout {
            x,
            nm: crate::units::AxisUnit::Nanometre.from_wavenumber(nu),
            cm1: nu,
            ev: crate::units::AxisUnit::ElectronVolt.from_wavenumber(nu),
            plots,
        })
    }

    fn try_csv(&self, step: Option<f64>) -> Result<String, Error> {
        let cur = self.current.as_ref().ok_or_else(nothing_drawn)?;
        let Some(step) = step else { return Ok(spectra_csv(&cur.spectra)) };
        crate::error::positive("step", step, "CSV step")?;
        let (lo, hi) = cur.view.x_range;
        // Round multiples of the step inside the window.
        let (from, to) = ((lo / step - 1e-9).ceil() * step, (hi / step + 1e-9).floor() * step);
        if to < from {
            return Err(Error::new(ErrorKind::OutOfRange, "step", format!("the step {step} is wider than the window")));
        }
        let grid = Grid::stepped(tidy(from), tidy(to), step, cur.view.axis)?;
        let spectra = evaluate(&cur.model, &grid.wavenumber_cm1)?;
        Ok(format!("{}{}", csv_header(cur, (tidy(from), tidy(to)), step), spectra_csv(&spectra)))
    }

    fn request<'a>(&'a self, kind: PlotKind, spectra: &'a Spectra, view: &View) -> PlotRequest<'a> {
        let mut req = PlotRequest::new(kind, spectra, view.axis, view.x_range);
        req.points = &self.points;
        req.cd_unit = view.cd_unit;
        req.ord_unit = view.ord_unit;
        req.dark = self.options.dark;
        req.show_contributions = self.options.contributions.unwrap_or(true);
        req.highlight = self.options.highlight.filter(|i| *i < spectra.bands.len());
        req.legend = self.options.legend;
        req.pixel_ratio = self.options.pixel_ratio.filter(|r| r.is_finite() && *r > 0.0).unwrap_or(1.0).min(MAX_PIXEL_RATIO);
        if kind == PlotKind::Cd {
            req.y_range = self.options.hold_cd_range;
        }
        req
    }

    /// The request for an export: as on screen, but light (for paper and
    /// wikis), with no band emphasised and no axis held.
    fn export_request<'a>(&'a self, kind: PlotKind, cur: &'a Current, o: &FigureOptions, ratio: f64) -> PlotRequest<'a> {
        let mut req = self.request(kind, &cur.spectra, &cur.view);
        req.dark = false;
        req.highlight = None;
        req.y_range = None;
        req.legend = o.legend;
        req.font_px = o.font_px;
        req.pixel_ratio = ratio;
        req
    }

    fn draw_all(&self, spectra: &Spectra, view: &View) -> Result<Vec<(PlotKind, PlotFrame)>, Error> {
        let mut frames = Vec::new();
        for (kind, canvas) in &self.canvases {
            if !view.plots.contains(kind) || canvas.width() == 0 || canvas.height() == 0 {
                continue;
            }
            let texts = DrawnText::default();
            let backend = FastCanvas::new(canvas.clone(), self.text_sizes.clone(), Some(texts.clone())).ok_or_else(no_context)?;
            let frame = figures::draw(&backend.into_drawing_area(), &self.request(*kind, spectra, view))?;
            self.drawn_text.borrow_mut().insert(kind.key(), texts.take());
            frames.push((*kind, frame));
        }
        Ok(frames)
    }

    fn report(&self, view: &View, frames: &[(PlotKind, PlotFrame)], lines: Vec<LineOut>) -> Drawn {
        let y_labels = view.plots.iter().map(|k| (k.key(), figures::y_label(*k, view.cd_unit, view.ord_unit))).collect();
        let theme = figures::theme(self.options.dark);
        let key_of = |k: PlotKind| {
            figures::sum_key(k, &theme)
                .into_iter()
                .map(|e| KeyOut { name: e.name, colour: figures::hex(e.colour), right_axis: e.right_axis })
                .collect()
        };
        let keys = view.plots.iter().map(|k| (k.key(), key_of(*k))).collect();
        Drawn {
            axis_unit: axis_key(view.axis),
            axis_label: figures::axis_label(view.axis),
            range_nm: view.range_nm,
            x_range: view.x_range,
            points: view.points,
            cd_unit: view.cd_unit.key(),
            ord_unit: view.ord_unit.key(),
            plots: view.plots.iter().map(|k| k.key()).collect(),
            frames: frames.iter().map(|(k, f)| frame_out(*k, f)).collect(),
            lines,
            y_labels,
            keys,
        }
    }
}

/// Rounds away the binary noise of k × step (0.1 × 3 and the like): 12
/// significant digits.
fn tidy(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let scale = 10f64.powi(11 - v.abs().log10().floor() as i32);
    (v * scale).round() / scale
}

/// The CSV's header block: lines starting with `#`, then the table.
fn csv_header(cur: &Current, (from, to): (f64, f64), step: f64) -> String {
    let s = &cur.model.sample;
    let ctx = &s.context;
    let mut out = String::from("# chiroptic spectra of a band model\n");
    if let Some(t) = Some(cur.title.as_str()).filter(|t| !t.trim().is_empty()) {
        out += &format!("# title: {}\n", t.replace(['\n', '\r'], " "));
    }
    out += &format!("# concentration_mol_per_l: {}\n", number(ctx.concentration_mol_per_l));
    out += &format!("# path_length_cm: {}\n", number(ctx.path_length_cm));
    if let Some(m) = ctx.molar_mass_g_per_mol {
        out += &format!("# molar_mass_g_per_mol: {}\n", number(m));
    }
    if let Some(m) = ctx.mean_residue_weight_g_per_mol {
        out += &format!("# mean_residue_weight_g_per_mol: {}\n", number(m));
    }
    let unit = cur.view.axis.label();
    out +=
        &format!("# grid: {} to {} {unit} in steps of {} {unit}; units are in the column names\n", number(from), number(to), number(step));
    out
}
