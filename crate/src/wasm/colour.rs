//! The colour panel's calls: what the eye sees through the sample between
//! polarisers (`crate::colour`). Each takes the document as the page holds
//! it and answers in the one reply shape.

use super::document_from_js;
use super::reply::{self, failed, reply};
use crate::colour::side::{self, SideViewRequest};
use crate::colour::{self, Colour, Illuminant, Optics};
use crate::error::Error;
use crate::model::Model;
use serde::Serialize;
use serde_json::json;
use wasm_bindgen::prelude::*;

fn optics(doc: JsValue) -> Result<Optics, Error> {
    let doc = document_from_js(doc)?;
    Optics::of_model(&Model::from_document(&doc)?)
}

#[derive(Serialize)]
struct Swatch {
    xyz: [f64; 3],
    xy: [f64; 2],
    luminance: f64,
    srgb: [f64; 3],
    srgb_linear: [f64; 3],
    srgb_8bit: [u8; 3],
    hex: String,
    clipped: bool,
}

fn swatch(c: &Colour) -> Swatch {
    Swatch {
        xyz: c.xyz,
        xy: c.xy,
        luminance: c.luminance(),
        srgb: c.srgb,
        srgb_linear: c.srgb_linear,
        srgb_8bit: c.srgb_8bit,
        hex: c.hex(),
        clipped: c.clipped,
    }
}

/// The light sources offered: `{ ok, illuminants: [{ key, label }], default_samples,
/// max_samples, side: { max_width, max_height, default_distance_cm } }`.
#[wasm_bindgen]
pub fn colour_catalog() -> JsValue {
    let list: Vec<_> = Illuminant::ALL.iter().map(|i| json!({ "key": i.key(), "label": i.label() })).collect();
    reply::ok(&json!({
        "illuminants": list,
        "default_samples": colour::DEFAULT_STRIP_SAMPLES,
        "max_samples": colour::MAX_STRIP_SAMPLES,
        "side": { "max_width": side::MAX_WIDTH, "max_height": side::MAX_HEIGHT, "default_distance_cm": side::DEFAULT_VIEWER_DISTANCE_CM },
    }))
}

/// The colour seen end-on through the analyser at `analyser_deg` (clockwise
/// from the polariser, seen facing the light):
/// `{ ok, xyz, xy, luminance, srgb, srgb_linear, srgb_8bit, hex, clipped }`.
#[wasm_bindgen]
pub fn colour_end_on(doc: JsValue, analyser_deg: f64, illuminant: &str) -> JsValue {
    reply((|| {
        let illuminant = colour::parse_illuminant(illuminant)?;
        Ok(swatch(&colour::end_on_optics(&optics(doc)?, analyser_deg, illuminant)?))
    })())
}

/// The colours over analyser angles 0..180 degrees at `samples` angles:
/// `{ ok, analyser_deg: [...], hex: [...], srgb_8bit: [r, g, b, r, g, b, ...], luminance: [...] }`.
#[wasm_bindgen]
pub fn colour_strip(doc: JsValue, illuminant: &str, samples: usize) -> JsValue {
    reply((|| {
        let illuminant = colour::parse_illuminant(illuminant)?;
        let strip = colour::strip_optics(&optics(doc)?, illuminant, samples)?;
        Ok(json!({
            "analyser_deg": strip.iter().map(|s| s.analyser_deg).collect::<Vec<_>>(),
            "hex": strip.iter().map(|s| s.colour.hex()).collect::<Vec<_>>(),
            "srgb_8bit": strip.iter().flat_map(|s| s.colour.srgb_8bit).collect::<Vec<_>>(),
            "luminance": strip.iter().map(|s| s.colour.luminance()).collect::<Vec<_>>(),
        }))
    })())
}

/// The tube seen from the side (single scattering): `{ ok, width, height,
/// length_cm, diameter_cm, viewer_distance_cm, rgba }` with `rgba` a
/// Uint8ClampedArray ready for `new ImageData(rgba, width, height)`.
/// `viewer_distance_cm` undefined: the default distance.
#[wasm_bindgen]
pub fn colour_side_view(doc: JsValue, width: u32, height: u32, illuminant: &str, viewer_distance_cm: Option<f64>) -> JsValue {
    let result = (|| {
        let illuminant = colour::parse_illuminant(illuminant)?;
        side::render(&optics(doc)?, &SideViewRequest { width, height, illuminant, viewer_distance_cm })
    })();
    match result {
        Err(e) => failed(&e),
        Ok(view) => {
            let reply = reply::ok(&json!({
                "width": view.width,
                "height": view.height,
                "length_cm": view.length_cm,
                "diameter_cm": view.diameter_cm,
                "viewer_distance_cm": view.viewer_distance_cm,
            }));
            // The pixels cross as one typed array, not as a JSON list.
            let rgba = js_sys::Uint8ClampedArray::from(&view.rgba()[..]);
            let _ = js_sys::Reflect::set(&reply, &JsValue::from_str("rgba"), &rgba);
            reply
        }
    }
}
