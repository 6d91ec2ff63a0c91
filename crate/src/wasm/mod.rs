//! The browser face: wasm-bindgen bindings that take the document as a plain
//! JS object (the same JSON the files and links hold). Every call answers in
//! one shape (`reply`): `{ ok: true, ... }` or `{ ok: false, error: { kind,
//! field, message } }`; nothing here panics on user input. Should a bug panic
//! all the same, the hook shows a message in the page.
//!
//! Parts: `catalog` (names, keys, caps and defaults the page builds its
//! controls from), `workbench` (the four canvases and the last good model),
//! `canvas` (the fast plotters canvas backend), `reply` (the reply shape),
//! `coupled` (the coupled-chromophore panel: couplet helper, geometry),
//! `fit` (band models fitted to the data, run in the page's fit worker).

mod canvas;
mod catalog;
mod colour;
mod coupled;
mod data;
mod fit;
mod reply;
mod states;
mod workbench;

pub use catalog::catalog;
pub use workbench::Workbench;

use crate::document::Document;
use crate::error::{Error, ErrorKind};
use crate::figures;
use crate::link;
use crate::units::{AxisUnit, UnitError};
use crate::view::{self, NeedsSample, AXIS_UNITS};
use reply::{reply_one, Refusal};
use wasm_bindgen::prelude::*;

/// The invented demo, embedded at build time so that the page (and the single
/// offline file) open on it without fetching anything.
const DEMO_JSON: &str = include_str!("../../../fixtures/demo/demo.json");

#[wasm_bindgen(start)]
pub fn start() {
    std::panic::set_hook(Box::new(|info| {
        let message = info.to_string();
        web_sys::console::error_1(&JsValue::from_str(&format!("chiroptic: internal error: {message}")));
        show_fatal(&message);
    }));
}

/// Panics on purpose: only in the test build (feature `panic-trigger`), for
/// the browser test of the page's recovery (tests/e2e/panic.test.mjs).
#[cfg(feature = "panic-trigger")]
#[wasm_bindgen]
pub fn panic_for_tests() {
    panic!("the test-only panic trigger");
}

/// Shows a panic in the page's `#fatal` box: the module cannot be used after
/// a panic, so the page must say so instead of silently freezing.
fn show_fatal(message: &str) {
    let Some(doc) = web_sys::window().and_then(|w| w.document()) else { return };
    if let Some(el) = doc.get_element_by_id("fatal") {
        el.set_text_content(Some(&format!(
            "The calculation core stopped on an internal error and must be reloaded. \
             Your last good model is kept in the address and in this browser. Details: {message}"
        )));
        let _ = el.remove_attribute("hidden");
    }
}

/// Reads a JS object, or its JSON text, as a document, with the core's
/// field-naming errors. The text is the fast way in for a large document
/// (a thousand computed transitions): one string crosses, where an object
/// is read property by property across the boundary.
fn document_from_js(value: JsValue) -> Result<Document, Error> {
    if let Some(text) = value.as_string() {
        return Document::from_json(&text);
    }
    let json: serde_json::Value =
        serde_wasm_bindgen::from_value(value).map_err(|e| Error::new(ErrorKind::Syntax, "", format!("not a document: {e}")))?;
    Document::from_value(json)
}

/// A document as the JSON value a file holds (absent options left out, not null).
fn document_value(doc: &Document) -> serde_json::Value {
    serde_json::to_value(doc).unwrap_or(serde_json::Value::Null)
}

fn doc_reply(result: Result<Document, Error>) -> JsValue {
    reply_one("doc", result.map(|d| document_value(&d)))
}

/// The invented demo document: `{ ok, doc }`.
#[wasm_bindgen]
pub fn demo_document() -> JsValue {
    doc_reply(Document::from_json(DEMO_JSON))
}

/// Document text read strictly (names and types, not values): `{ ok, doc }`.
#[wasm_bindgen]
pub fn parse_document(text: &str) -> JsValue {
    doc_reply(Document::from_json(text))
}

/// Document text that must parse and validate as a whole, model and view
/// (an opened file, the autosave): `{ ok, doc }`.
#[wasm_bindgen]
pub fn read_valid_document(text: &str) -> JsValue {
    doc_reply(Document::from_json(text).and_then(|doc| link::validate(&doc).map(|_| doc)))
}

/// The document as the pretty JSON a file holds: `{ ok, text }`.
#[wasm_bindgen]
pub fn document_json(doc: JsValue) -> JsValue {
    reply_one("text", document_from_js(doc).map(|d| d.to_json_pretty()))
}

/// The share-link fragment (`c1.…`, no `#`) of a document that validates: `{ ok, link }`.
#[wasm_bindgen]
pub fn link_encode(doc: JsValue) -> JsValue {
    reply_one(
        "link",
        document_from_js(doc).and_then(|doc| {
            link::validate(&doc)?;
            link::encode(&doc)
        }),
    )
}

/// Opens a share link (fragment, `#fragment` or whole URL; page options after
/// `&` are ignored here): `{ ok, doc }`. The codec caps the length and the
/// inflated size before doing any real work.
#[wasm_bindgen]
pub fn link_decode(text: &str) -> JsValue {
    doc_reply(link::decode(text))
}

/// A window that frames the document's bands: `{ ok, range_nm: [lo, hi] }`.
#[wasm_bindgen]
pub fn frame_bands(doc: JsValue) -> JsValue {
    reply_one(
        "range_nm",
        document_from_js(doc).and_then(|doc| {
            let model = crate::model::Model::from_document(&doc)?;
            Ok(view::frame_bands(&doc, &model))
        }),
    )
}

/// The colour of band `index` as `#rrggbb` (the same as its plot lines): `{ ok, colour }`.
#[wasm_bindgen]
pub fn band_colour(index: usize) -> JsValue {
    reply_one("colour", Ok(figures::band_colour_hex(index)))
}

/// Figure colours for the page's CSS: `{ ok, background, text, muted, grid }`.
#[wasm_bindgen]
pub fn theme_colours(dark: bool) -> JsValue {
    let [background, text, muted, grid] = figures::theme(dark).hex();
    reply::ok(&serde_json::json!({ "background": background, "text": text, "muted": muted, "grid": grid }))
}

// ------------------------------------------------------------------- units

fn unknown_unit(what: &str, key: &str) -> Error {
    Error::new(ErrorKind::UnknownName, "", format!("unknown {what} unit \"{key}\""))
}

fn axis_unit(key: &str) -> Result<AxisUnit, Error> {
    AXIS_UNITS.into_iter().find(|u| view::axis_key(*u) == key).ok_or_else(|| unknown_unit("spectral", key))
}

/// A conversion refused for want of the molar mass (mass concentrations).
fn needs_molar_mass(_: UnitError) -> Refusal {
    Refusal::needs(NeedsSample::MolarMass, "", "a mass concentration")
}

/// A spectral position from one axis unit to another: `{ ok, value }`.
#[wasm_bindgen]
pub fn convert_position(value: f64, from: &str, to: &str) -> JsValue {
    reply_one("value", (|| Ok(axis_unit(to)?.from_wavenumber(axis_unit(from)?.to_wavenumber(value))))())
}

/// A band width (FWHM) from one axis unit to another; widths in nm depend on
/// where the band is, so the centre (in nm) is needed: `{ ok, value }`.
#[wasm_bindgen]
pub fn convert_width(width: f64, from: &str, to: &str, center_nm: f64) -> JsValue {
    let nu = AxisUnit::Nanometre.to_wavenumber(center_nm);
    reply_one("value", (|| Ok(axis_unit(to)?.width_from_wavenumber(axis_unit(from)?.width_to_wavenumber(width, nu), nu)))())
}

/// A concentration from one unit to another (mass units need the molar mass): `{ ok, value }`.
#[wasm_bindgen]
pub fn convert_concentration(value: f64, from: &str, to: &str, molar_mass_g_per_mol: Option<f64>) -> JsValue {
    let result = (|| -> Result<f64, Refusal> {
        let unit = |key: &str| catalog::concentration_unit(key).ok_or_else(|| unknown_unit("concentration", key));
        let mol = unit(from)?.to_mol_per_l(value, molar_mass_g_per_mol).map_err(needs_molar_mass)?;
        unit(to)?.from_mol_per_l(mol, molar_mass_g_per_mol).map_err(needs_molar_mass)
    })();
    reply::reply_one_refusal("value", result)
}

/// A path length from one unit to another: `{ ok, value }`.
#[wasm_bindgen]
pub fn convert_path(value: f64, from: &str, to: &str) -> JsValue {
    let factor = |key: &str| catalog::cm_per_path_unit(key).ok_or_else(|| unknown_unit("path length", key));
    reply_one("value", (|| Ok(value * factor(from)? / factor(to)?))())
}
