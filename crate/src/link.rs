//! Share links: the whole document (bands, sample, view) in a URL fragment.
//!
//! Format, version 1 (the fragment, i.e. the text after `#`):
//! ```text
//! c1.<base64url, no padding>( & page options, ignored here )
//! ```
//! The payload is zlib (deflate + Adler-32, so a mangled link is caught by its
//! checksum) of the document's compact JSON, in which
//! - every key is replaced by a short code from [`KEY_CODES`] (keys not in
//!   the table are kept as they are; encoding refuses a key that equals a
//!   code, so the mapping stays reversible), and
//! - whole-valued numbers are written without ".0" (never -0, which keeps its
//!   sign as a float).
//!
//! Numbers are serde_json's shortest round-trip form, parsed back exactly
//! (the `float_roundtrip` feature), so they survive bit for bit.
//!
//! Decoding is bounded: a link longer than [`MAX_LINK_CHARS`] is refused
//! before any work, inflation stops at [`MAX_INFLATED_BYTES`], and the result
//! is checked like any document (strict fields, [`Model::from_document`], and
//! [`crate::view::check`]). Every failure is one [`Error`]:
//!
//! | problem                         | kind            |
//! |---------------------------------|-----------------|
//! | longer than the cap / inflates past the cap | TooLarge |
//! | no `c<digits>.` prefix, not base64url, damaged or cut short, not JSON | Syntax |
//! | a link version other than 1 (`c2.`)           | UnknownVersion  |
//! | an unknown or missing field, a bad value       | as for a document file |
//!
//! API: [`encode`]`(&Document) -> Result<String>` gives the fragment (no `#`),
//! [`share_url`]`(base, &Document)` puts it behind a base URL, and
//! [`decode`]`(text) -> Result<Document>` takes a fragment, `#fragment` or a
//! whole URL.

use crate::document::Document;
use crate::error::{Error, ErrorKind, Result};
use crate::model::Model;
use base64::engine::general_purpose::URL_SAFE_NO_PAD;
use base64::Engine;
use serde_json::{Map, Value};

/// The link format version this build writes and reads.
pub const LINK_VERSION: u32 = 1;
pub use crate::limits::{MAX_INFLATED_BYTES, MAX_LINK_CHARS};
/// zlib level (miniz scale, 10 = best).
const LEVEL: u8 = 10;

/// Document key -> code inside the link. Codes are distinct; a code that is
/// also a document key (a data set's `x` and `y`) has a code of its own, so
/// every key reads back as itself (`a` and `b` of the solvent series stay as
/// they are).
pub const KEY_CODES: [(&str, &str); 31] = [
    ("chiroptic", "v"),
    ("title", "t"),
    ("sample", "s"),
    ("bands", "x"),
    ("view", "w"),
    ("concentration_mol_per_l", "c"),
    ("path_length_cm", "l"),
    ("molar_mass_g_per_mol", "m"),
    ("mean_residue_weight_g_per_mol", "r"),
    ("solvent", "o"),
    ("constant", "k"),
    ("cauchy", "y"),
    ("sellmeier", "z"),
    ("b_um2", "b2"),
    ("c_um4", "c4"),
    ("c_um2", "c2"),
    ("name", "n"),
    ("shape", "h"),
    ("center_nm", "p"),
    ("fwhm_cm1", "f"),
    ("lorentz_fwhm_cm1", "g"),
    ("rotatory_strength_1e40_cgs", "R"),
    ("dipole_strength_debye2", "D"),
    ("axis_unit", "u"),
    ("range_nm", "e"),
    ("points", "N"),
    ("cd_unit", "C"),
    ("ord_unit", "O"),
    ("plots", "P"),
    ("x", "_x"),
    ("y", "_y"),
];

fn link_error(kind: ErrorKind, message: impl Into<String>) -> Error {
    Error::new(kind, "link", message)
}

fn code_of(key: &str) -> Option<&'static str> {
    KEY_CODES.iter().find(|(k, _)| *k == key).map(|(_, c)| *c)
}

fn key_of(code: &str) -> Option<&'static str> {
    KEY_CODES.iter().find(|(_, c)| *c == code).map(|(k, _)| *k)
}

/// Largest magnitude below which every whole f64 is an exact i64.
const EXACT_INTEGER: f64 = 9_007_199_254_740_992.0;

fn shorten(value: Value) -> Result<Value> {
    Ok(match value {
        Value::Object(map) => {
            let mut out = Map::new();
            for (k, v) in map {
                let code = match code_of(&k) {
                    Some(c) => c.to_string(),
                    None if key_of(&k).is_some() => {
                        return Err(link_error(ErrorKind::Io, format!("internal: document key \"{k}\" clashes with a link code")))
                    }
                    None => k,
                };
                out.insert(code, shorten(v)?);
            }
            Value::Object(out)
        }
        Value::Array(items) => Value::Array(items.into_iter().map(shorten).collect::<Result<_>>()?),
        Value::Number(n) => match n.as_f64() {
            Some(x) if n.is_f64() && x.fract() == 0.0 && x.abs() < EXACT_INTEGER && !(x == 0.0 && x.is_sign_negative()) => {
                Value::from(x as i64)
            }
            _ => Value::Number(n),
        },
        other => other,
    })
}

fn expand(value: Value) -> Value {
    match value {
        Value::Object(map) => {
            Value::Object(map.into_iter().map(|(k, v)| (key_of(&k).map(str::to_string).unwrap_or(k), expand(v))).collect())
        }
        Value::Array(items) => Value::Array(items.into_iter().map(expand).collect()),
        other => other,
    }
}

/// The fragment (without `#`) that carries `doc`.
pub fn encode(doc: &Document) -> Result<String> {
    let value = serde_json::to_value(doc).map_err(|e| link_error(ErrorKind::Syntax, format!("the document cannot be written: {e}")))?;
    let compact =
        serde_json::to_vec(&shorten(value)?).map_err(|e| link_error(ErrorKind::Syntax, format!("the document cannot be written: {e}")))?;
    let packed = miniz_oxide::deflate::compress_to_vec_zlib(&compact, LEVEL);
    Ok(format!("c{LINK_VERSION}.{}", URL_SAFE_NO_PAD.encode(packed)))
}

/// A whole share URL: `base#fragment` (`base` may be empty or relative).
pub fn share_url(base: &str, doc: &Document) -> Result<String> {
    let base = base.split('#').next().unwrap_or_default();
    Ok(format!("{base}#{}", encode(doc)?))
}

/// Reads a link: a fragment, `#fragment` or a whole URL.
pub fn decode(text: &str) -> Result<Document> {
    if text.len() > MAX_LINK_CHARS {
        return Err(link_error(ErrorKind::TooLarge, format!("the link is {} characters long; the limit is {MAX_LINK_CHARS}", text.len())));
    }
    let text = text.trim();
    let fragment = text.rsplit_once('#').map_or(text, |(_, f)| f);
    // Page options may follow the payload after '&' (not a base64url character).
    let fragment = fragment.split('&').next().unwrap_or_default();
    let payload = strip_version(fragment)?;
    let packed = URL_SAFE_NO_PAD.decode(payload).map_err(|e| {
        let detail = match e {
            base64::DecodeError::InvalidLength(_) | base64::DecodeError::InvalidLastSymbol { .. } => {
                "it is cut short or changed at its end".to_string()
            }
            base64::DecodeError::InvalidPadding => "it ends in '=' padding, which share links do not use".to_string(),
            base64::DecodeError::InvalidByte(at, byte) => {
                format!("character {:?} at position {} is not allowed", char::from(byte), at + 1)
            }
        };
        link_error(ErrorKind::Syntax, format!("the link is damaged: {detail}"))
    })?;
    let json = miniz_oxide::inflate::decompress_to_vec_zlib_with_limit(&packed, MAX_INFLATED_BYTES).map_err(|e| {
        use miniz_oxide::inflate::TINFLStatus as S;
        match e.status {
            S::HasMoreOutput => {
                link_error(ErrorKind::TooLarge, format!("the link expands to more than {MAX_INFLATED_BYTES} bytes; refused"))
            }
            S::NeedsMoreInput | S::FailedCannotMakeProgress => {
                link_error(ErrorKind::Syntax, "the link is cut short (its compressed data ends early)")
            }
            S::Adler32Mismatch => link_error(ErrorKind::Syntax, "the link is damaged (its checksum does not match)"),
            _ => link_error(ErrorKind::Syntax, "the link is damaged (its compressed data is invalid)"),
        }
    })?;
    let value: Value =
        serde_json::from_slice(&json).map_err(|e| link_error(ErrorKind::Syntax, format!("the link holds no valid document: {e}")))?;
    let doc = Document::from_value(expand(value))?;
    validate(&doc)?;
    Ok(doc)
}

/// `c<version>.` -> payload; another version or no prefix is an error.
fn strip_version(fragment: &str) -> Result<&str> {
    let not_ours =
        || link_error(ErrorKind::Syntax, format!("not a chiroptic link (the part after '#' should start with \"c{LINK_VERSION}.\")"));
    let rest = fragment.strip_prefix('c').ok_or_else(not_ours)?;
    let (version, payload) = rest.split_once('.').ok_or_else(not_ours)?;
    if version.is_empty() || version.len() > 9 || !version.bytes().all(|b| b.is_ascii_digit()) {
        return Err(not_ours());
    }
    if version != LINK_VERSION.to_string() {
        return Err(link_error(
            ErrorKind::UnknownVersion,
            format!("link format version {version} is not supported by this build (it reads version {LINK_VERSION})"),
        ));
    }
    if payload.is_empty() {
        return Err(link_error(ErrorKind::Syntax, "the link is cut short (nothing after the version)"));
    }
    Ok(payload)
}

/// A document as the page would accept it: a valid model and a valid view.
pub fn validate(doc: &Document) -> Result<Model> {
    let model = Model::from_document(doc)?;
    if let Some(view) = &doc.view {
        crate::view::check(view)?;
    }
    Ok(model)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_distinct_and_never_a_document_key() {
        for (i, (k, c)) in KEY_CODES.iter().enumerate() {
            assert_eq!(key_of(code_of(k).unwrap_or_default()), Some(*k), "key {k} reads back as itself");
            assert!(code_of(c).is_none() || KEY_CODES.iter().any(|(k2, _)| k2 == c), "code {c} is a key without a code");
            assert_eq!(KEY_CODES.iter().filter(|(_, c2)| c2 == c).count(), 1, "code {c} used twice");
            assert_eq!(KEY_CODES.iter().position(|(k2, _)| k2 == k), Some(i), "key {k} listed twice");
            assert!(!["a", "b"].contains(c), "code {c} is a solvent key");
        }
    }

    #[test]
    fn whole_numbers_lose_the_point_but_negative_zero_keeps_its_sign() {
        let v = shorten(serde_json::json!([290.0, -0.0, 0.5, 1e300])).unwrap_or(Value::Null);
        assert_eq!(serde_json::to_string(&v).unwrap_or_default(), "[290,-0.0,0.5,1e+300]");
    }

    #[test]
    fn version_prefix_is_parsed_strictly() {
        assert_eq!(strip_version("c1.abc").ok(), Some("abc"));
        assert_eq!(strip_version("c2.abc").map_err(|e| e.kind), Err(ErrorKind::UnknownVersion));
        assert_eq!(strip_version("x1.abc").map_err(|e| e.kind), Err(ErrorKind::Syntax));
        assert_eq!(strip_version("c.abc").map_err(|e| e.kind), Err(ErrorKind::Syntax));
        assert_eq!(strip_version("c1.").map_err(|e| e.kind), Err(ErrorKind::Syntax));
    }
}
