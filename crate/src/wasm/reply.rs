//! The one reply shape of every call the page makes:
//! `{ ok: true, ...fields }` or `{ ok: false, error: { kind, field, message } }`,
//! with `kind` a stable snake_case key the page may match on: the core's
//! error kinds, and `needs_molar_mass` / `needs_mean_residue_weight`.

use crate::error::{Error, ErrorKind};
use crate::view::NeedsSample;
use serde::Serialize;
use serde_json::{Map, Value};
use wasm_bindgen::JsValue;

/// The stable key of an error kind.
pub fn kind_key(kind: ErrorKind) -> &'static str {
    match kind {
        ErrorKind::Syntax => "syntax",
        ErrorKind::UnknownField => "unknown_field",
        ErrorKind::MissingField => "missing_field",
        ErrorKind::UnknownVersion => "unknown_version",
        ErrorKind::NotFinite => "not_finite",
        ErrorKind::NotPositive => "not_positive",
        ErrorKind::OutOfRange => "out_of_range",
        ErrorKind::UnknownName => "unknown_name",
        ErrorKind::TooLarge => "too_large",
        ErrorKind::Io => "io",
    }
}

#[derive(Serialize)]
struct ErrorOut<'a> {
    kind: &'static str,
    field: &'a str,
    message: &'a str,
}

/// Everything crosses as a serde_json value: one serializer into JS for all
/// replies keeps the module small. Plain JS objects (not Maps).
fn to_js(value: &Value) -> JsValue {
    value.serialize(&serde_wasm_bindgen::Serializer::json_compatible()).unwrap_or(JsValue::NULL)
}

fn with_ok(mut map: Map<String, Value>, ok: bool) -> JsValue {
    map.insert("ok".into(), Value::Bool(ok));
    to_js(&Value::Object(map))
}

/// `{ ok: true, ...body }`; `body` serialises as a map of named fields.
pub fn ok<T: Serialize + ?Sized>(body: &T) -> JsValue {
    match serde_json::to_value(body) {
        Ok(Value::Object(map)) => with_ok(map, true),
        _ => with_ok(Map::new(), true),
    }
}

/// `{ ok: true, <name>: value }` (a NaN crosses as null).
pub fn ok_one<T: Serialize>(name: &'static str, value: T) -> JsValue {
    let mut map = Map::new();
    map.insert(name.into(), serde_json::to_value(value).unwrap_or(Value::Null));
    with_ok(map, true)
}

/// Why a call was refused, as the page gets it: the core's error, or sample
/// data a unit needs (`needs_molar_mass`, `needs_mean_residue_weight`),
/// worded for the page's controls.
#[derive(Debug, Clone)]
pub struct Refusal {
    pub kind: &'static str,
    pub field: String,
    pub message: String,
}

impl From<Error> for Refusal {
    fn from(e: Error) -> Refusal {
        Refusal { kind: kind_key(e.kind), field: e.field, message: e.message }
    }
}

impl Refusal {
    /// `quantity` needs sample data the model lacks; `field` chose the unit.
    pub fn needs(needs: NeedsSample, field: &str, quantity: &str) -> Refusal {
        let what = match needs {
            NeedsSample::MolarMass => "the molar mass",
            NeedsSample::MeanResidueWeight => "the mean residue weight",
        };
        Refusal { kind: needs.key(), field: field.into(), message: format!("{quantity} needs {what}") }
    }
}

/// `{ ok: false, error }` for a refusal.
pub fn refused(e: &Refusal) -> JsValue {
    let error = ErrorOut { kind: e.kind, field: &e.field, message: &e.message };
    let mut map = Map::new();
    map.insert("error".into(), serde_json::to_value(error).unwrap_or(Value::Null));
    with_ok(map, false)
}

/// `{ ok: false, error }` for a core error.
pub fn failed(e: &Error) -> JsValue {
    refused(&Refusal::from(e.clone()))
}

/// A result as a reply: the success's fields, or the error.
pub fn reply<T: Serialize>(result: Result<T, Error>) -> JsValue {
    reply_refusal(result.map_err(Refusal::from))
}

/// A result as a reply, when the refusal may be the page's own (needs_molar_mass ...).
pub fn reply_refusal<T: Serialize>(result: Result<T, Refusal>) -> JsValue {
    match result {
        Ok(body) => ok(&body),
        Err(e) => refused(&e),
    }
}

/// A result of one named value as a reply.
pub fn reply_one<T: Serialize>(name: &'static str, result: Result<T, Error>) -> JsValue {
    reply_one_refusal(name, result.map_err(Refusal::from))
}

/// One named value, or a refusal that may be the page's own.
pub fn reply_one_refusal<T: Serialize>(name: &'static str, result: Result<T, Refusal>) -> JsValue {
    match result {
        Ok(value) => ok_one(name, value),
        Err(e) => refused(&e),
    }
}
