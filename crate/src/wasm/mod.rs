//! The browser face: wasm-bindgen bindings that take the document as a plain
//! JS object (the same JSON the files and links hold), validate it with the
//! core, evaluate the spectra and draw the four plots onto canvases with the
//! figure module.
//!
//! Nothing here panics on user input: every failure comes back to the page as
//! `{ field, message, kind }` so the page can show it next to the control at
//! fault, and the plots of the last good model stay on the canvases. Should a
//! bug panic all the same, the hook shows a message in the page.

use crate::document::{Document, ViewDoc, DEFAULT_VIEW_POINTS};
use crate::error::{Error, ErrorKind};
use crate::figures::{self, PlotFrame, PlotKind, PlotRequest};
use crate::lines::{rotation_at_lines, STANDARD_LINES};
use crate::link;
use crate::model::Model;
use crate::spectra::{evaluate, Grid, Spectra};
use crate::table::spectra_csv;
use crate::units::{self, AxisUnit, CdUnit, ConcentrationUnit, OrdUnit};
use fast_canvas::{DrawnText, FastCanvas, TextSizes};
use plotters::prelude::IntoDrawingArea;
use serde::Serialize;
use wasm_bindgen::prelude::*;
use std::cell::RefCell;
use std::collections::HashMap;
use web_sys::HtmlCanvasElement;

/// The invented demo, embedded at build time so that the page (and the single
/// offline file) open on it without fetching anything.
const DEMO_JSON: &str = include_str!("../../fixtures/demo/demo.json");


/// The ORD units offered on the ORD plot (Δn has its own plot).
const ORD_MENU: [OrdUnit; 3] = [OrdUnit::Degrees, OrdUnit::SpecificRotation, OrdUnit::MolarRotation];

#[wasm_bindgen(start)]
pub fn start() {
    std::panic::set_hook(Box::new(|info| {
        let message = info.to_string();
        web_sys::console::error_1(&JsValue::from_str(&format!("chiroptic: internal error: {message}")));
        show_fatal(&message);
    }));
}

/// Shows a panic in the page's `#fatal` box: the module cannot be used after
/// a panic, so the page must say so instead of silently freezing.
fn show_fatal(message: &str) {
    let Some(doc) = web_sys::window().and_then(|w| w.document()) else { return };
    if let Some(el) = doc.get_element_by_id("fatal") {
        el.set_text_content(Some(&format!(
            "The calculation core stopped on an internal error and must be reloaded. \
             Your model is kept: save it (or copy the address) before reloading. Details: {message}"
        )));
        let _ = el.remove_attribute("hidden");
    }
}

/// What the page gets back for an error: the document path of the field at
/// fault (`bands[1].fwhm_cm1`, `view.cd_unit`, ...) and a sentence.
#[derive(Serialize)]
struct ErrorOut {
    field: String,
    message: String,
    kind: String,
}

impl From<Error> for ErrorOut {
    fn from(e: Error) -> ErrorOut {
        ErrorOut { field: e.field, message: e.message, kind: format!("{:?}", e.kind) }
    }
}

fn to_js<T: Serialize>(value: &T) -> JsValue {
    value.serialize(&serde_wasm_bindgen::Serializer::json_compatible()).unwrap_or(JsValue::NULL)
}

fn error_js(e: Error) -> JsValue {
    #[derive(Serialize)]
    struct Failed {
        ok: bool,
        error: ErrorOut,
    }
    to_js(&Failed { ok: false, error: e.into() })
}

/// Reads a JS object as a document, with the core's field-naming errors.
fn document_from_js(value: JsValue) -> Result<Document, Error> {
    let json: serde_json::Value = serde_wasm_bindgen::from_value(value)
        .map_err(|e| Error::new(ErrorKind::Syntax, "", format!("not a document: {e}")))?;
    Document::from_value(json)
}

fn document_to_js(doc: &Document) -> JsValue {
    // Through serde_json::Value so that the JS object has exactly the file's
    // fields (absent options are left out, not set to null).
    let value = serde_json::to_value(doc).unwrap_or(serde_json::Value::Null);
    to_js(&value)
}

/// The invented demo document as a JS object.
#[wasm_bindgen]
pub fn demo_document() -> JsValue {
    match Document::from_json(DEMO_JSON) {
        Ok(doc) => document_to_js(&doc),
        Err(e) => error_js(e),
    }
}

/// Parses document text (a file the user opened): `{ ok, doc }` or `{ ok: false, error }`.
#[wasm_bindgen]
pub fn parse_document(text: &str) -> JsValue {
    match Document::from_json(text) {
        Ok(doc) => ok_doc(&doc),
        Err(e) => error_js(e),
    }
}

/// The document as the pretty JSON a file holds (for saving); an error message
/// if the object is not a readable document.
#[wasm_bindgen]
pub fn document_json(doc: JsValue) -> Result<String, JsError> {
    let doc = document_from_js(doc).map_err(|e| JsError::new(&e.to_string()))?;
    Ok(doc.to_json_pretty())
}

/// `{ ok: true, <key>: value }`, the success half of the page's replies.
fn ok_with(key: &str, value: &JsValue) -> JsValue {
    let out = js_sys::Object::new();
    let _ = js_sys::Reflect::set(&out, &"ok".into(), &JsValue::TRUE);
    let _ = js_sys::Reflect::set(&out, &key.into(), value);
    out.into()
}

fn ok_doc(doc: &Document) -> JsValue {
    ok_with("doc", &document_to_js(doc))
}

/// Reads a document the page saved itself (autosave): it must parse and
/// validate as a whole, or `{ ok: false, error }`.
#[wasm_bindgen]
pub fn read_valid_document(text: &str) -> JsValue {
    match Document::from_json(text).and_then(|doc| link::validate(&doc).map(|_| doc)) {
        Ok(doc) => ok_doc(&doc),
        Err(e) => error_js(e),
    }
}

/// The share-link fragment (`c1.…`, no `#`) for a document that validates:
/// `{ ok, link }` or `{ ok: false, error }`.
#[wasm_bindgen]
pub fn link_encode(doc: JsValue) -> JsValue {
    let made = document_from_js(doc).and_then(|doc| {
        link::validate(&doc)?;
        link::encode(&doc)
    });
    match made {
        Ok(text) => ok_with("link", &JsValue::from_str(&text)),
        Err(e) => error_js(e),
    }
}

/// Opens a share link (fragment, `#fragment` or whole URL; page options after
/// `&` are ignored here): `{ ok, doc }` or `{ ok: false, error }`. The codec
/// caps the length and the inflated size before doing any real work.
#[wasm_bindgen]
pub fn link_decode(text: &str) -> JsValue {
    match link::decode(text) {
        Ok(doc) => ok_doc(&doc),
        Err(e) => error_js(e),
    }
}

/// Longest link the codec reads, for the page's own early check.
#[wasm_bindgen]
pub fn link_max_chars() -> usize {
    link::MAX_LINK_CHARS
}

#[derive(Serialize)]
struct Choice {
    key: &'static str,
    label: &'static str,
}

/// Every unit, plot and lamp line the page offers, with the labels the trade
/// uses; the page builds its menus from this so no label is written twice.
#[wasm_bindgen]
pub fn catalog() -> JsValue {
    #[derive(Serialize)]
    struct Line {
        name: &'static str,
        wavelength_nm: f64,
    }
    #[derive(Serialize)]
    struct Plot {
        key: &'static str,
        title: &'static str,
    }
    #[derive(Serialize)]
    struct Catalog {
        axis: Vec<Choice>,
        cd: Vec<Choice>,
        ord: Vec<Choice>,
        concentration: Vec<Choice>,
        path: Vec<Choice>,
        plots: Vec<Plot>,
        lines: Vec<Line>,
        palette: Vec<String>,
        default_points: u32,
        max_points: usize,
        min_center_nm: f64,
        max_center_nm: f64,
        /// Starting coefficients offered when the user picks explicit Sellmeier terms.
        sellmeier_start: (Vec<f64>, Vec<f64>),
        presets: Vec<&'static str>,
        /// For the sign-convention notes: mdeg of ellipticity per unit ΔA.
        mdeg_per_delta_a: f64,
    }
    let axis = [AxisUnit::Nanometre, AxisUnit::Wavenumber, AxisUnit::ElectronVolt]
        .into_iter()
        .map(|u| Choice { key: axis_key(u), label: u.label() })
        .collect();
    to_js(&Catalog {
        axis,
        cd: CdUnit::ALL.into_iter().map(|u| Choice { key: u.key(), label: u.label() }).collect(),
        ord: ORD_MENU.into_iter().map(|u| Choice { key: u.key(), label: u.label() }).collect(),
        concentration: CONCENTRATION_UNITS.iter().map(|(key, label, _)| Choice { key, label }).collect(),
        path: PATH_UNITS.iter().map(|(key, label, _)| Choice { key, label }).collect(),
        plots: PlotKind::ALL.into_iter().map(|k| Plot { key: k.key(), title: k.title() }).collect(),
        lines: STANDARD_LINES.iter().map(|l| Line { name: l.name, wavelength_nm: l.wavelength_nm }).collect(),
        palette: (0..figures::BAND_PALETTE.len()).map(figures::band_colour_hex).collect(),
        default_points: DEFAULT_VIEW_POINTS,
        max_points: crate::spectra::MAX_GRID_POINTS,
        min_center_nm: crate::model::MIN_CENTER_NM,
        max_center_nm: crate::model::MAX_CENTER_NM,
        sellmeier_start: (crate::solvent::WATER_20C_B.to_vec(), crate::solvent::WATER_20C_C_UM2.to_vec()),
        presets: crate::solvent::PRESETS.to_vec(),
        mdeg_per_delta_a: units::MDEG_PER_DEG * units::ELLIPTICITY_DEG_PER_DELTA_A,
    })
}

fn axis_key(u: AxisUnit) -> &'static str {
    match u {
        AxisUnit::Nanometre => "nm",
        AxisUnit::Wavenumber => "cm-1",
        AxisUnit::ElectronVolt => "ev",
    }
}

fn axis_unit(key: &str) -> Result<AxisUnit, JsError> {
    AxisUnit::parse(key).ok_or_else(|| JsError::new(&format!("unknown spectral unit \"{key}\" (use nm, cm-1 or ev)")))
}

/// The colour of band `index` as `#rrggbb` (the same as its plot lines).
#[wasm_bindgen]
pub fn band_colour(index: usize) -> String {
    figures::band_colour_hex(index)
}

/// Figure colours `[background, text, muted, grid]` for the page's CSS.
#[wasm_bindgen]
pub fn theme_colours(dark: bool) -> Vec<String> {
    figures::theme(dark).hex().to_vec()
}

/// A spectral position from one axis unit to another.
#[wasm_bindgen]
pub fn convert_position(value: f64, from: &str, to: &str) -> Result<f64, JsError> {
    let nu = axis_unit(from)?.to_wavenumber(value);
    Ok(axis_unit(to)?.from_wavenumber(nu))
}

/// A band width (FWHM) from one axis unit to another; widths in nm depend on
/// where the band is, so the centre (in nm) is needed.
#[wasm_bindgen]
pub fn convert_width(width: f64, from: &str, to: &str, center_nm: f64) -> Result<f64, JsError> {
    let nu = AxisUnit::Nanometre.to_wavenumber(center_nm);
    let cm1 = axis_unit(from)?.width_to_wavenumber(width, nu);
    Ok(axis_unit(to)?.width_from_wavenumber(cm1, nu))
}

/// Concentration units offered for entry: key, label, core unit.
const CONCENTRATION_UNITS: [(&str, &str, ConcentrationUnit); 4] = [
    ("mol/L", "mol/L", ConcentrationUnit::MolPerLitre),
    ("mmol/L", "mmol/L", ConcentrationUnit::MillimolPerLitre),
    ("mg/mL", "mg/mL", ConcentrationUnit::MgPerMl),
    ("g/100mL", "g/100 mL", ConcentrationUnit::GramPer100Ml),
];

fn concentration_unit(key: &str) -> Result<ConcentrationUnit, JsError> {
    CONCENTRATION_UNITS
        .iter()
        .find(|(k, _, _)| *k == key)
        .map(|(_, _, u)| *u)
        .ok_or_else(|| JsError::new(&format!("unknown concentration unit \"{key}\"")))
}

/// A concentration from one unit to another (mass units need the molar mass).
#[wasm_bindgen]
pub fn convert_concentration(value: f64, from: &str, to: &str, molar_mass_g_per_mol: Option<f64>) -> Result<f64, JsError> {
    let mol = concentration_unit(from)?
        .to_mol_per_l(value, molar_mass_g_per_mol)
        .map_err(|e| JsError::new(&friendly(&e.0)))?;
    concentration_unit(to)?.from_mol_per_l(mol, molar_mass_g_per_mol).map_err(|e| JsError::new(&friendly(&e.0)))
}

/// Path length units offered for entry: key, label, centimetres per unit.
const PATH_UNITS: [(&str, &str, f64); 3] = [
    ("mm", "mm", 1.0 / units::MM_PER_CM),
    ("cm", "cm", 1.0),
    ("dm", "dm", units::CM_PER_DM),
];

/// A path length from one unit to another.
#[wasm_bindgen]
pub fn convert_path(value: f64, from: &str, to: &str) -> Result<f64, JsError> {
    let factor = |key: &str| {
        PATH_UNITS
            .iter()
            .find(|(k, _, _)| *k == key)
            .map(|(_, _, f)| *f)
            .ok_or_else(|| JsError::new(&format!("unknown path length unit \"{key}\"")))
    };
    Ok(value * factor(from)? / factor(to)?)
}

/// The core names document fields in its messages; the page speaks of the
/// controls instead.
fn friendly(message: &str) -> String {
    message
        .replace("sample.molar_mass_g_per_mol", "the molar mass")
        .replace("sample.mean_residue_weight_g_per_mol", "the mean residue weight")
}

/// The view with every choice made: what the document's view says, or the
/// defaults.
#[derive(Debug, Clone)]
struct View {
    axis: AxisUnit,
    /// Shown range in axis units, left then right.
    x_range: (f64, f64),
    range_nm: (f64, f64),
    points: usize,
    cd_unit: CdUnit,
    ord_unit: OrdUnit,
    plots: Vec<PlotKind>,
}

fn resolve_view(view: Option<&ViewDoc>, model: &Model) -> Result<View, Error> {
    let empty = ViewDoc::default();
    let v = view.unwrap_or(&empty);
    // One validator of a view, shared with share links: every name and
    // number below is known to be good after it.
    link::check_view(v)?;
    let axis = v.axis_unit.as_deref().and_then(AxisUnit::parse).unwrap_or(AxisUnit::Nanometre);
    let (a, b) = match v.range_nm {
        Some([a, b]) => (a, b),
        None => Grid::default_range_nm(model),
    };
    let (lo_nm, hi_nm) = (a.min(b), a.max(b));
    // Stricter than "two different ends": a window too narrow to draw.
    if hi_nm - lo_nm < hi_nm * 1e-6 {
        return Err(Error::new(ErrorKind::OutOfRange, "view.range_nm", format!("the range is empty ({a} to {b} nm)")));
    }
    // Left to right in increasing axis value.
    let ends = (axis.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(lo_nm)), axis.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(hi_nm)));
    let x_range = (ends.0.min(ends.1), ends.0.max(ends.1));
    let points = v.points.unwrap_or(DEFAULT_VIEW_POINTS) as usize;
    let cd_unit = v.cd_unit.as_deref().and_then(CdUnit::parse).unwrap_or(CdUnit::Millidegrees);
    let ord_unit = v.ord_unit.as_deref().and_then(OrdUnit::parse).unwrap_or(OrdUnit::Degrees);
    let plots = match &v.plots {
        None => PlotKind::ALL.to_vec(),
        Some(keys) => keys.iter().filter_map(|k| PlotKind::parse(k)).collect(),
    };
    // The unit conversions that need sample data fail here, before any
    // canvas is touched, so a bad choice leaves every plot as it was.
    let ctx = model.sample.context;
    cd_unit
        .from_delta_epsilon(1.0, 1.0, &ctx)
        .map_err(|e| Error::new(ErrorKind::MissingField, "view.cd_unit", friendly(&e.0)))?;
    ord_unit
        .from_degrees(1.0, 1.0, &ctx)
        .map_err(|e| Error::new(ErrorKind::MissingField, "view.ord_unit", friendly(&e.0)))?;
    Ok(View { axis, x_range, range_nm: (lo_nm, hi_nm), points, cd_unit, ord_unit, plots })
}

/// Page-side options that are not part of the document.
#[derive(Debug, Clone, Copy, Default, serde::Deserialize)]
#[serde(default)]
struct DrawOptions {
    dark: bool,
    contributions: Option<bool>,
    /// Band drawn emphasised (the row the user is on).
    highlight: Option<usize>,
    /// Canvas pixels per CSS pixel (devicePixelRatio), for sharp HiDPI plots.
    pixel_ratio: Option<f64>,
    /// A key naming the traces (the wiki view, which has no band list).
    legend: bool,
}

/// Largest pixel ratio the page may ask for (PNG export at 4x, HiDPI screens).
const MAX_PIXEL_RATIO: f64 = 8.0;

fn plot_kind(key: &str) -> Result<PlotKind, JsError> {
    PlotKind::parse(key).ok_or_else(|| JsError::new(&format!("unknown plot \"{key}\" (use cd, ord, abs or index)")))
}

fn checked_ratio(r: f64) -> Result<f64, JsError> {
    if r.is_finite() && r > 0.0 && r <= MAX_PIXEL_RATIO {
        Ok(r)
    } else {
        Err(JsError::new(&format!("pixel ratio must lie in (0, {MAX_PIXEL_RATIO}] (got {r})")))
    }
}

/// The last model that validated and drew: what readouts and exports use.
struct Current {
    spectra: Spectra,
    view: View,
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

#[derive(Serialize)]
struct LineOut {
    name: &'static str,
    wavelength_nm: f64,
    rotation_deg: f64,
    specific_rotation: Option<f64>,
    molar_rotation: f64,
}

#[derive(Serialize)]
struct Drawn {
    ok: bool,
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
    labels: Vec<(&'static str, &'static str)>,
}

#[wasm_bindgen]
impl Workbench {
    /// Takes the four canvases: CD, ORD, absorption, refractive indices.
    #[wasm_bindgen(constructor)]
    pub fn new(
        cd: HtmlCanvasElement,
        ord: HtmlCanvasElement,
        abs: HtmlCanvasElement,
        index: HtmlCanvasElement,
    ) -> Workbench {
        Workbench {
            canvases: vec![(PlotKind::Cd, cd), (PlotKind::Ord, ord), (PlotKind::Absorption, abs), (PlotKind::Index, index)],
            current: None,
            options: DrawOptions::default(),
            text_sizes: TextSizes::default(),
            drawn_text: RefCell::new(HashMap::new()),
        }
    }

    /// Validates the document, evaluates it and redraws every visible plot.
    /// Returns `{ ok: true, frames, lines, ... }`, or `{ ok: false, error }`
    /// with the canvases left showing the last good model.
    pub fn update(&mut self, doc: JsValue, options: JsValue) -> JsValue {
        if let Ok(o) = serde_wasm_bindgen::from_value::<DrawOptions>(options) {
            self.options = o;
        }
        match self.try_update(doc) {
            Ok(out) => to_js(&out),
            Err(e) => error_js(e),
        }
    }

    /// Redraws the last good model with new page options (theme, highlight).
    pub fn redraw(&mut self, options: JsValue) -> JsValue {
        if let Ok(o) = serde_wasm_bindgen::from_value::<DrawOptions>(options) {
            self.options = o;
        }
        let Some(current) = self.current.take() else { return JsValue::NULL };
        let result = self.draw_all(&current.spectra, &current.view);
        match result {
            Ok(frames) => {
                let out = self.report(&current.spectra, &current.view, &frames, Vec::new());
                self.current = Some(current);
                to_js(&out)
            }
            Err(e) => {
                self.current = Some(current);
                error_js(e)
            }
        }
    }

    /// The values under the crosshair at an axis position, for every visible
    /// plot: `{ x, nm, cm1, ev, plots: [{ plot, label, values: [[name, v]] }] }`.
    pub fn readout(&self, x: f64) -> JsValue {
        #[derive(Serialize)]
        struct PlotValues {
            plot: &'static str,
            label: &'static str,
            values: Vec<(String, f64)>,
        }
        #[derive(Serialize)]
        struct Out {
            x: f64,
            nm: f64,
            cm1: f64,
            ev: f64,
            plots: Vec<PlotValues>,
        }
        let Some(cur) = &self.current else { return JsValue::NULL };
        let mut plots = Vec::new();
        let mut at = None;
        for kind in &cur.view.plots {
            let req = self.request(*kind, &cur.spectra, &cur.view);
            if let Ok(r) = figures::readout(&req, x) {
                at = Some(r.x);
                plots.push(PlotValues { plot: kind.key(), label: req.y_label(), values: r.values });
            }
        }
        let Some(x) = at else { return JsValue::NULL };
        let nu = cur.view.axis.to_wavenumber(x);
        to_js(&Out {
            x,
            nm: AxisUnit::Nanometre.from_wavenumber(nu),
            cm1: nu,
            ev: AxisUnit::ElectronVolt.from_wavenumber(nu),
            plots,
        })
    }

    /// The spectra of the last good model as CSV (the CLI's `eval` columns).
    pub fn csv(&self) -> Option<String> {
        self.current.as_ref().map(|c| spectra_csv(&c.spectra))
    }

    /// One plot of the last good model as SVG, `width` x `height` CSS
    /// pixels, light, nothing emphasised: the figure code of the canvas
    /// (`figures::svg`), so at the canvas's size it has the canvas's ticks.
    pub fn svg(&self, plot: &str, width: u32, height: u32, legend: bool) -> Result<String, JsError> {
        let kind = plot_kind(plot)?;
        let cur = self.current.as_ref().ok_or_else(|| JsError::new("no plot has been drawn yet"))?;
        let mut req = self.export_request(kind, &cur.spectra, &cur.view);
        req.legend = legend;
        req.pixel_ratio = 1.0;
        figures::svg(&req, width, height).map_err(|e| JsError::new(&e.to_string()))
    }

    /// Draws one plot of the last good model onto `canvas` (any canvas, e.g.
    /// an offscreen one for PNG export) at `pixel_ratio` canvas pixels per
    /// CSS pixel, light, nothing emphasised. Returns its frame.
    pub fn draw_plot(&self, plot: &str, canvas: HtmlCanvasElement, pixel_ratio: f64, legend: bool) -> Result<JsValue, JsError> {
        let kind = plot_kind(plot)?;
        let ratio = checked_ratio(pixel_ratio)?;
        let cur = self.current.as_ref().ok_or_else(|| JsError::new("no plot has been drawn yet"))?;
        let mut req = self.export_request(kind, &cur.spectra, &cur.view);
        req.legend = legend;
        req.pixel_ratio = ratio;
        let backend = FastCanvas::new(canvas, self.text_sizes.clone(), None)
            .ok_or_else(|| JsError::new("the browser gave no 2D canvas context"))?;
        let frame = figures::draw(&backend.into_drawing_area(), &req).map_err(|e| JsError::new(&e.to_string()))?;
        Ok(to_js(&frame_out(kind, &frame)))
    }

    /// Where each band's contribution to the CD plot is largest in magnitude
    /// on the grid: `[{ x, y } | null]` in axis and plotted units (null for a
    /// band with no contribution), for dragging a band by its peak.
    pub fn band_peaks(&self) -> JsValue {
        #[derive(Serialize)]
        struct Peak {
            x: f64,
            y: f64,
        }
        let Some(cur) = &self.current else { return JsValue::NULL };
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
        to_js(&peaks)
    }

    /// Every text the last redraw put on a plot's canvas, in drawing order.
    pub fn drawn_text(&self, plot: &str) -> Result<Vec<String>, JsError> {
        let kind = plot_kind(plot)?;
        Ok(self.drawn_text.borrow().get(kind.key()).cloned().unwrap_or_default())
    }
}

impl Workbench {
    fn try_update(&mut self, doc: JsValue) -> Result<Drawn, Error> {
        let doc = document_from_js(doc)?;
        let model = Model::from_document(&doc)?;
        let view = resolve_view(doc.view.as_ref(), &model)?;
        let grid = Grid::linspace(view.x_range.0, view.x_range.1, view.points, view.axis)?;
        let spectra = evaluate(&model, &grid.wavenumber_cm1)?;
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
        let frames = self.draw_all(&spectra, &view)?;
        let out = self.report(&spectra, &view, &frames, lines);
        self.current = Some(Current { spectra, view });
        Ok(out)
    }

    fn request<'a>(&self, kind: PlotKind, spectra: &'a Spectra, view: &View) -> PlotRequest<'a> {
        let mut req = PlotRequest::new(kind, spectra, view.axis, view.x_range);
        req.cd_unit = view.cd_unit;
        req.ord_unit = view.ord_unit;
        req.dark = self.options.dark;
        req.show_contributions = self.options.contributions.unwrap_or(true);
        req.highlight = self.options.highlight.filter(|i| *i < spectra.bands.len());
        // No key on the workbench: band colours are in the band list and the
        // caption names the index traces. The wiki view asks for one.
        req.legend = self.options.legend;
        req.pixel_ratio = self.options.pixel_ratio.filter(|r| r.is_finite() && *r > 0.0).unwrap_or(1.0).min(MAX_PIXEL_RATIO);
        req
    }

    /// The request for an export: as on screen, but light (for paper and
    /// wikis) and with no band emphasised.
    fn export_request<'a>(&self, kind: PlotKind, spectra: &'a Spectra, view: &View) -> PlotRequest<'a> {
        let mut req = self.request(kind, spectra, view);
        req.dark = false;
        req.highlight = None;
        req
    }

    fn draw_all(&self, spectra: &Spectra, view: &View) -> Result<Vec<(PlotKind, PlotFrame)>, Error> {
        let mut frames = Vec::new();
        for (kind, canvas) in &self.canvases {
            if !view.plots.contains(kind) || canvas.width() == 0 || canvas.height() == 0 {
                continue;
            }
            let texts = DrawnText::default();
            let backend = FastCanvas::new(canvas.clone(), self.text_sizes.clone(), Some(texts.clone()))
                .ok_or_else(|| Error::new(ErrorKind::Io, "figure", "the browser gave no 2D canvas context"))?;
            let frame = figures::draw(&backend.into_drawing_area(), &self.request(*kind, spectra, view))?;
            self.drawn_text.borrow_mut().insert(kind.key(), texts.take());
            frames.push((*kind, frame));
        }
        Ok(frames)
    }

    fn report(&self, _spectra: &Spectra, view: &View, frames: &[(PlotKind, PlotFrame)], lines: Vec<LineOut>) -> Drawn {
        Drawn {
            ok: true,
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
            labels: vec![("cd", view.cd_unit.label()), ("ord", view.ord_unit.label())],
        }
    }
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

/// The canvas backend of plotters, with two costs of the live page removed:
/// text is measured with the canvas's own `measureText` (plotters' default on
/// the web inserts a DOM element and forces a page layout for every label)
/// and remembered across redraws; and a polyline is cut to the points that
/// change its picture (per pixel column: first, lowest, highest, last), since
/// 2000 points across a few hundred pixels would otherwise mean thousands of
/// calls into the browser per trace. Drawing is still plotters-canvas's.
mod fast_canvas {
    use plotters_backend::{BackendColor, BackendCoord, BackendStyle, BackendTextStyle, DrawingBackend, DrawingErrorKind};
    use plotters_canvas::CanvasBackend;
    use std::cell::RefCell;
    use std::collections::HashMap;
    use std::rc::Rc;
    use wasm_bindgen::JsCast;
    use web_sys::{CanvasRenderingContext2d, HtmlCanvasElement};

    /// Measured text boxes by (CSS font, text); shared by the four canvases.
    pub type TextSizes = Rc<RefCell<HashMap<(String, String), (u32, u32)>>>;

    /// Entries kept before the memory starts over (labels of a session are few).
    const MAX_REMEMBERED: usize = 4096;

    /// Collects the text a drawing puts on its canvas.
    #[derive(Clone, Default)]
    pub struct DrawnText(Rc<RefCell<Vec<String>>>);

    impl DrawnText {
        pub fn take(&self) -> Vec<String> {
            std::mem::take(&mut *self.0.borrow_mut())
        }
    }

    pub struct FastCanvas {
        inner: CanvasBackend,
        context: CanvasRenderingContext2d,
        sizes: TextSizes,
        texts: Option<DrawnText>,
    }

    type Failure = DrawingErrorKind<<CanvasBackend as DrawingBackend>::ErrorType>;

    impl FastCanvas {
        pub fn new(canvas: HtmlCanvasElement, sizes: TextSizes, texts: Option<DrawnText>) -> Option<FastCanvas> {
            let context = canvas.get_context("2d").ok()??.dyn_into::<CanvasRenderingContext2d>().ok()?;
            let inner = CanvasBackend::with_canvas_object(canvas)?;
            Some(FastCanvas { inner, context, sizes, texts })
        }
    }

    /// Keeps, for each run of points in one pixel column, the first, the
    /// extremes and the last point: the same pixels, far fewer segments.
    pub fn thin_path(points: impl IntoIterator<Item = BackendCoord>) -> Vec<BackendCoord> {
        let mut out: Vec<BackendCoord> = Vec::new();
        let mut run: Vec<BackendCoord> = Vec::new();
        let flush = |run: &mut Vec<BackendCoord>, out: &mut Vec<BackendCoord>| {
            let (Some(&first), Some(&last)) = (run.first(), run.last()) else { return };
            let lo = run.iter().enumerate().min_by_key(|(_, p)| p.1).map(|(i, _)| i).unwrap_or(0);
            let hi = run.iter().enumerate().max_by_key(|(_, p)| p.1).map(|(i, _)| i).unwrap_or(0);
            let (a, b) = if lo <= hi { (lo, hi) } else { (hi, lo) };
            for p in [first, run[a], run[b], last] {
                if out.last() != Some(&p) {
                    out.push(p);
                }
            }
            run.clear();
        };
        for p in points {
            if run.first().is_some_and(|f| f.0 != p.0) {
                flush(&mut run, &mut out);
            }
            run.push(p);
        }
        flush(&mut run, &mut out);
        out
    }

    impl DrawingBackend for FastCanvas {
        type ErrorType = <CanvasBackend as DrawingBackend>::ErrorType;

        fn get_size(&self) -> (u32, u32) {
            self.inner.get_size()
        }
        fn ensure_prepared(&mut self) -> Result<(), Failure> {
            self.inner.ensure_prepared()
        }
        fn present(&mut self) -> Result<(), Failure> {
            self.inner.present()
        }
        fn draw_pixel(&mut self, point: BackendCoord, color: BackendColor) -> Result<(), Failure> {
            self.inner.draw_pixel(point, color)
        }
        fn draw_line<S: BackendStyle>(&mut self, from: BackendCoord, to: BackendCoord, style: &S) -> Result<(), Failure> {
            self.inner.draw_line(from, to, style)
        }
        fn draw_rect<S: BackendStyle>(
            &mut self,
            upper_left: BackendCoord,
            bottom_right: BackendCoord,
            style: &S,
            fill: bool,
        ) -> Result<(), Failure> {
            self.inner.draw_rect(upper_left, bottom_right, style, fill)
        }
        fn draw_path<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, path: I, style: &S) -> Result<(), Failure> {
            self.inner.draw_path(thin_path(path), style)
        }
        fn draw_circle<S: BackendStyle>(&mut self, center: BackendCoord, radius: u32, style: &S, fill: bool) -> Result<(), Failure> {
            self.inner.draw_circle(center, radius, style, fill)
        }
        fn fill_polygon<S: BackendStyle, I: IntoIterator<Item = BackendCoord>>(&mut self, vert: I, style: &S) -> Result<(), Failure> {
            self.inner.fill_polygon(vert, style)
        }
        fn draw_text<T: BackendTextStyle>(&mut self, text: &str, style: &T, pos: BackendCoord) -> Result<(), Failure> {
            if let Some(texts) = &self.texts {
                texts.0.borrow_mut().push(text.to_string());
            }
            self.inner.draw_text(text, style, pos)
        }
        fn estimate_text_size<T: BackendTextStyle>(&self, text: &str, style: &T) -> Result<(u32, u32), Failure> {
            // The same CSS font string plotters-canvas draws with.
            let font = format!("{} {}px {}", style.style().as_str(), style.size(), style.family().as_str());
            let key = (font, text.to_string());
            if let Some(size) = self.sizes.borrow().get(&key) {
                return Ok(*size);
            }
            self.context.set_font(&key.0);
            let size = match self.context.measure_text(text) {
                Ok(m) => {
                    let height = m.font_bounding_box_ascent() + m.font_bounding_box_descent();
                    (m.width().round().max(0.0) as u32, height.round().max(0.0) as u32)
                }
                // Should the canvas refuse, fall back to plotters' own measure.
                Err(_) => {
                    let ((x0, y0), (x1, y1)) =
                        style.layout_box(text).map_err(|e| DrawingErrorKind::FontError(Box::new(e)))?;
                    ((x1 - x0).max(0) as u32, (y1 - y0).max(0) as u32)
                }
            };
            let mut sizes = self.sizes.borrow_mut();
            if sizes.len() >= MAX_REMEMBERED {
                sizes.clear();
            }
            sizes.insert(key, size);
            Ok(size)
        }
    }
}
