//! The versioned JSON document: what files and share links hold.
//!
//! Every field name carries its unit. Reading is strict: an unknown field is
//! an error naming it (a typo such as `fwhm_cm` must not be silently ignored),
//! and so is an unknown major version.

use crate::error::{Error, ErrorKind, Result};
use serde::{Deserialize, Serialize};

/// The major version this build writes and reads.
pub const FORMAT_VERSION: u32 = 1;
/// Largest document text accepted (bytes): far above any real model, far
/// below what would hurt a browser tab.
pub const MAX_DOCUMENT_BYTES: usize = 2 * 1024 * 1024;
/// Most bands a document may hold.
pub const MAX_BANDS: usize = 500;

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Document {
    pub chiroptic: u32,
    /// Free text naming the sample or scenario.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub title: String,
    pub sample: SampleDoc,
    #[serde(default)]
    pub bands: Vec<BandDoc>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub view: Option<ViewDoc>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SampleDoc {
    pub concentration_mol_per_l: f64,
    pub path_length_cm: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub molar_mass_g_per_mol: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub mean_residue_weight_g_per_mol: Option<f64>,
    pub solvent: SolventDoc,
}

/// Exactly one of the three must be given.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SolventDoc {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub constant: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cauchy: Option<CauchyDoc>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sellmeier: Option<SellmeierDoc>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CauchyDoc {
    pub a: f64,
    #[serde(default)]
    pub b_um2: f64,
    #[serde(default)]
    pub c_um4: f64,
}

/// A preset name (`"water-20c"`) or explicit coefficients (lambda in um).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum SellmeierDoc {
    Preset(String),
    Coefficients { b: Vec<f64>, c_um2: Vec<f64> },
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BandDoc {
    #[serde(default)]
    pub name: String,
    /// `lorentz`, `gaussian` or `voigt`.
    pub shape: String,
    pub center_nm: f64,
    /// FWHM; for a Voigt band, of its Gaussian part.
    pub fwhm_cm1: f64,
    /// FWHM of the Lorentzian part of a Voigt band (ignored by other shapes).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lorentz_fwhm_cm1: Option<f64>,
    pub rotatory_strength_1e40_cgs: f64,
    pub dipole_strength_debye2: f64,
}

/// Grid points across the shown range when a view names none (the page and
/// `chiroptic render` alike, so that both draw the same picture).
pub const DEFAULT_VIEW_POINTS: u32 = 2000;

/// How the model is shown: carried by files and links so that a shared model
/// opens as its author saw it. Every field is optional.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ViewDoc {
    /// Spectral axis unit: `nm`, `cm-1` or `ev`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub axis_unit: Option<String>,
    /// Shown range as two wavelengths in nm (either order).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub range_nm: Option<[f64; 2]>,
    /// Number of grid points across the range.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub points: Option<u32>,
    /// CD unit key (see `units::CdUnit::key`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cd_unit: Option<String>,
    /// ORD unit key (see `units::OrdUnit::key`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ord_unit: Option<String>,
    /// Which plots are visible: any of `cd`, `ord`, `abs`, `index`.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub plots: Option<Vec<String>>,
}

impl Document {
    /// Parses a document, checking size and version before the strict parse
    /// so that a newer file gets a version message, not a field message.
    pub fn from_json(text: &str) -> Result<Document> {
        if text.len() > MAX_DOCUMENT_BYTES {
            return Err(Error::new(
                ErrorKind::TooLarge,
                "",
                format!("document is {} bytes; the limit is {} bytes", text.len(), MAX_DOCUMENT_BYTES),
            ));
        }
        let value: serde_json::Value = serde_json::from_str(text)
            .map_err(|e| Error::new(ErrorKind::Syntax, "", format!("not valid JSON: {e}")))?;
        Document::from_value(value)
    }

    pub fn from_value(value: serde_json::Value) -> Result<Document> {
        check_version(&value)?;
        let doc: Document = serde_path_to_error::deserialize(value).map_err(|e| {
            let field = e.path().to_string();
            let inner = e.into_inner().to_string();
            let kind = if inner.starts_with("unknown field") {
                ErrorKind::UnknownField
            } else if inner.starts_with("missing field") {
                ErrorKind::MissingField
            } else {
                ErrorKind::Syntax
            };
            let field = if field == "." { String::new() } else { field };
            Error::new(kind, field, inner)
        })?;
        if doc.bands.len() > MAX_BANDS {
            return Err(Error::new(
                ErrorKind::TooLarge,
                "bands",
                format!("{} bands; the limit is {}", doc.bands.len(), MAX_BANDS),
            ));
        }
        Ok(doc)
    }

    pub fn to_json_pretty(&self) -> String {
        // Serialising plain structs of numbers and strings cannot fail.
        serde_json::to_string_pretty(self).unwrap_or_default()
    }

    pub fn to_json(&self) -> String {
        serde_json::to_string(self).unwrap_or_default()
    }
}

fn check_version(value: &serde_json::Value) -> Result<()> {
    let obj = value
        .as_object()
        .ok_or_else(|| Error::new(ErrorKind::Syntax, "", "a chiroptic document is a JSON object"))?;
    let version = obj.get("chiroptic").ok_or_else(|| {
        Error::new(ErrorKind::MissingField, "chiroptic", "not a chiroptic document (no \"chiroptic\" version field)")
    })?;
    match version.as_u64() {
        Some(v) if v == u64::from(FORMAT_VERSION) => Ok(()),
        Some(v) => Err(Error::new(
            ErrorKind::UnknownVersion,
            "chiroptic",
            format!("format version {v} is not supported by this build (it reads version {FORMAT_VERSION})"),
        )),
        None => Err(Error::new(ErrorKind::Syntax, "chiroptic", format!("version must be a whole number (got {version})"))),
    }
}
