//! The versioned JSON document: what files and share links hold.
//!
//! Every field name carries its unit. Reading is strict: an unknown field is
//! an error naming it (a typo such as `fwhm_cm` must not be silently ignored),
//! and so is an unknown major version.

use crate::error::{Error, ErrorKind, Result};
use serde::{Deserialize, Serialize};

/// The major version this build writes and reads.
pub const FORMAT_VERSION: u32 = 1;
pub use crate::limits::{MAX_BANDS, MAX_DATA_SETS, MAX_DOCUMENT_BYTES, MAX_READINGS};

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
    /// Measured spectra, each with its conditions and processing.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub data: Vec<DataSetDoc>,
    /// Rotations read on a polarimeter at lamp lines.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub readings: Vec<ReadingDoc>,
    /// Fit settings and, after a fit, its report.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fit: Option<FitDoc>,
    /// Coupled chromophores (see `coupled`), added to the bands' spectra.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub systems: Vec<SystemDoc>,
    /// Computed excited states (see `states`), broadened and added to the
    /// bands' spectra.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub states: Option<StatesDoc>,
}

/// Computed excited states: conformers with their transitions, the
/// temperature of their Boltzmann populations and how they are broadened.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StatesDoc {
    #[serde(default = "room_temperature")]
    pub temperature_k: f64,
    #[serde(default)]
    pub broadening: BroadeningDoc,
    pub conformers: Vec<ConformerDoc>,
}

fn room_temperature() -> f64 {
    crate::states::DEFAULT_TEMPERATURE_K
}

fn gaussian_name() -> String {
    "gaussian".into()
}

fn usual_state_width() -> f64 {
    crate::states::DEFAULT_FWHM_EV
}

fn is_one(v: &f64) -> bool {
    *v == 1.0
}

/// How each transition becomes a band: one shape and width for all, a
/// shift of every excitation energy and a scale of every strength.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct BroadeningDoc {
    /// `gaussian` (the default), `lorentz` or `voigt`.
    #[serde(default = "gaussian_name")]
    pub shape: String,
    /// Full width at half maximum (of a Voigt's Gaussian part), eV.
    #[serde(default = "usual_state_width")]
    pub fwhm_ev: f64,
    /// A Voigt band's Lorentzian FWHM, eV.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lorentz_fwhm_ev: Option<f64>,
    #[serde(default, skip_serializing_if = "is_zero")]
    pub shift_ev: f64,
    #[serde(default = "one", skip_serializing_if = "is_one")]
    pub scale: f64,
    /// Use the velocity-form rotatory strengths (else the length form).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub velocity_form: bool,
}

impl Default for BroadeningDoc {
    fn default() -> BroadeningDoc {
        BroadeningDoc {
            shape: gaussian_name(),
            fwhm_ev: usual_state_width(),
            lorentz_fwhm_ev: None,
            shift_ev: 0.0,
            scale: 1.0,
            velocity_form: false,
        }
    }
}

/// One conformer: a relative energy in the unit it was given in, or a
/// population; optionally a share set by hand (0..1) in place of its
/// Boltzmann share, and switched off.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ConformerDoc {
    pub name: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_energy_kcal_per_mol: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_energy_kj_per_mol: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_energy_ev: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub relative_energy_hartree: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub population: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub share: Option<f64>,
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub off: bool,
    pub transitions: Vec<ExcitedStateDoc>,
}

/// One computed transition: its excitation energy (eV) or wavelength (nm),
/// its oscillator strength and/or dipole strength, its rotatory strength
/// in the length and/or velocity form (1e-40 cgs), and optionally its own width.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExcitedStateDoc {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub energy_ev: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub wavelength_nm: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub oscillator_strength: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub dipole_strength_debye2: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rotatory_length_1e40_cgs: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub rotatory_velocity_1e40_cgs: Option<f64>,
    /// This transition's own FWHM (of a Voigt's Gaussian part), eV, in place
    /// of the broadening's.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fwhm_ev: Option<f64>,
}

/// Chromophores whose transitions couple through the dipole field (DeVoe's
/// polarisability model, see `coupled`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SystemDoc {
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub name: String,
    /// Divide the dipole-dipole coupling by the solvent's n^2.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub screened: bool,
    /// Turn the coupling off (the transitions then act as plain bands).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub uncoupled: bool,
    pub chromophores: Vec<ChromophoreDoc>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ChromophoreDoc {
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub name: String,
    /// Position, angstrom.
    pub position_angstrom: [f64; 3],
    /// Transition direction of the chromophore's transitions.
    pub direction: Direction,
    pub transitions: Vec<TransitionDoc>,
}

/// A transition direction as a unit vector `[x, y, z]` or as two angles
/// `{"polar_deg": theta, "azimuth_deg": phi}` (theta from +z, phi from +x
/// towards +y in the xy plane, the ISO 80000-2 spherical convention). The
/// form the user wrote is kept when the document is saved.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Direction {
    Vector([f64; 3]),
    Angles(DirectionAngles),
}

#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DirectionAngles {
    pub polar_deg: f64,
    pub azimuth_deg: f64,
}

impl Direction {
    /// The direction as a vector (of length 1 when given as angles).
    pub fn vector(self) -> [f64; 3] {
        match self {
            Direction::Vector(v) => v,
            Direction::Angles(a) => {
                let (st, ct) = a.polar_deg.to_radians().sin_cos();
                let (sp, cp) = a.azimuth_deg.to_radians().sin_cos();
                [st * cp, st * sp, ct]
            }
        }
    }
}

impl<'de> Deserialize<'de> for Direction {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> std::result::Result<Direction, D::Error> {
        #[derive(Deserialize)]
        #[serde(untagged)]
        enum Either {
            Vector([f64; 3]),
            Angles(DirectionAngles),
        }
        // serde's own message for an untagged miss names no form; say both.
        match Either::deserialize(d) {
            Ok(Either::Vector(v)) => Ok(Direction::Vector(v)),
            Ok(Either::Angles(a)) => Ok(Direction::Angles(a)),
            Err(_) => Err(serde::de::Error::custom(
                "a direction is [x, y, z] (a unit vector) or {\"polar_deg\": θ, \"azimuth_deg\": φ} (degrees)",
            )),
        }
    }
}

/// One transition of a chromophore: a band whose rotatory strength is its
/// intrinsic one (zero by default) and whose direction, when given, is its own.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct TransitionDoc {
    /// `lorentz`, `gaussian` or `voigt`.
    pub shape: String,
    pub center_nm: f64,
    pub fwhm_cm1: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub lorentz_fwhm_cm1: Option<f64>,
    pub dipole_strength_debye2: f64,
    #[serde(default, skip_serializing_if = "is_zero")]
    pub rotatory_strength_1e40_cgs: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub direction: Option<Direction>,
}

fn is_zero(v: &f64) -> bool {
    *v == 0.0
}

/// How to fit the bands to the data (see `fit`), and the last report.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitDoc {
    /// Band fields free by default (`center_nm`, `fwhm_cm1`, `lorentz_fwhm_cm1`,
    /// `rotatory_strength_1e40_cgs`, `dipole_strength_debye2`, or short names);
    /// empty means centres, widths and rotatory strengths.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub free: Vec<String>,
    /// Per-parameter choices: fixed, bounds, links.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub parameters: Vec<FitParameterDoc>,
    /// One energy shift of every band centre, cm^-1.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub shift: bool,
    /// A baseline offset per data set.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub offsets: bool,
    /// A scale factor per data set (concentration uncertainty).
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub scales: bool,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub starts: Option<u32>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max_iterations: Option<u32>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub seed: Option<u64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub report: Option<FitReportDoc>,
}

/// One parameter's mode: `parameter` is "BAND.field". Bounds are in the
/// units the document uses (nm for centres); a link makes this parameter
/// factor * (the other) + offset (offset in cm^-1 for centres, so that a
/// vibronic progression keeps its spacing).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitParameterDoc {
    pub parameter: String,
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub fixed: bool,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub min: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub max: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub link: Option<FitLinkDoc>,
}

fn one() -> f64 {
    1.0
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitLinkDoc {
    pub to: String,
    #[serde(default = "one")]
    pub factor: f64,
    #[serde(default)]
    pub offset: f64,
}

/// What a fit found (written by `fit`, read back for display).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FitReportDoc {
    pub parameters: Vec<ParameterEstimateDoc>,
    pub chi_square: f64,
    pub reduced_chi_square: f64,
    pub degrees_of_freedom: usize,
    pub points: usize,
    pub free_parameters: usize,
    pub aic: f64,
    pub bic: f64,
    pub weights: String,
    pub sets: Vec<SetFitDoc>,
    pub iterations: usize,
    pub stop: String,
    pub stop_reason: String,
    pub starts: usize,
    pub starts_at_best: usize,
    pub correlation_names: Vec<String>,
    /// Row-major, correlation_names.len() squared.
    pub correlations: Vec<f64>,
    pub strong_correlations: Vec<StrongPairDoc>,
    pub warnings: Vec<String>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ParameterEstimateDoc {
    pub name: String,
    pub value: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub standard_error: Option<f64>,
    /// free, fixed or linked.
    pub mode: String,
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub at_bound: bool,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SetFitDoc {
    pub name: String,
    pub points: usize,
    pub chi_square: f64,
    pub rms_weighted_residual: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct StrongPairDoc {
    pub a: String,
    pub b: String,
    pub r: f64,
}

/// A measured spectrum as imported, with the conditions it was measured at
/// and the processing applied to it (applied on reading, so that a file or
/// link reproduces it; the values stay as they came).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DataSetDoc {
    pub name: String,
    /// `cd`, `ord` or `absorption`.
    pub quantity: String,
    /// A unit key of that quantity: `units::CdUnit::key` (not `g`),
    /// `units::OrdUnit::key`, or `absorbance` / `epsilon`.
    pub unit: String,
    /// `nm`, `cm-1` or `ev`: the unit of `x`.
    pub axis_unit: String,
    /// Where a condition is absent, the document's sample gives it.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub conditions: Option<ConditionsDoc>,
    pub x: AxisValuesDoc,
    pub y: Vec<f64>,
    /// Standard deviation of each y, in y's unit.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sd: Option<Vec<f64>>,
    /// Detector high voltage at each point, V.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ht_v: Option<Vec<f64>>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub source: Option<SourceDoc>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub processing: Vec<StepDoc>,
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub hidden: bool,
}

/// The axis as a list, or, when evenly spaced, as first value, step and
/// count (shorter in links).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum AxisValuesDoc {
    Even { first: f64, step: f64, count: u32 },
    List(Vec<f64>),
}

#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ConditionsDoc {
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub concentration_mol_per_l: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub path_length_cm: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub temperature_c: Option<f64>,
}

/// Where a data set came from: file name, format, the file's metadata lines.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SourceDoc {
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub file: String,
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub format: String,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub metadata: Vec<String>,
}

/// One processing step, in the order applied. Ranges are in the data
/// set's own axis unit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", deny_unknown_fields)]
pub enum StepDoc {
    /// Subtract another data set (a solvent or cell baseline), interpolated.
    SubtractBlank { blank: String },
    /// Subtract the mean over a range where the signal must vanish.
    ZeroAt { from: f64, to: f64 },
    /// Savitzky-Golay smoothing.
    Smooth { window: u32, order: u32 },
    /// Drop points whose detector voltage exceeds a limit.
    DropAboveHt { limit_v: f64 },
    /// Keep only a range.
    Trim { from: f64, to: f64 },
}

/// A rotation read at a lamp line, with its conditions.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ReadingDoc {
    /// Air wavelength of the line, nm (as polarimeters quote it).
    pub wavelength_nm: f64,
    pub rotation_deg: f64,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sd_deg: Option<f64>,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub conditions: Option<ConditionsDoc>,
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
        // Editors on some systems begin a saved file with a byte-order mark,
        // which JSON (RFC 8259, section 8.1) allows a reader to ignore.
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let value: serde_json::Value =
            serde_json::from_str(text).map_err(|e| Error::new(ErrorKind::Syntax, "", format!("not valid JSON: {e}")))?;
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
        if doc.data.len() > MAX_DATA_SETS {
            return Err(Error::new(ErrorKind::TooLarge, "data", format!("{} data sets; the limit is {MAX_DATA_SETS}", doc.data.len())));
        }
        if doc.readings.len() > MAX_READINGS {
            return Err(Error::new(
                ErrorKind::TooLarge,
                "readings",
                format!("{} readings; the limit is {MAX_READINGS}", doc.readings.len()),
            ));
        }
        if doc.bands.len() > MAX_BANDS {
            return Err(Error::new(ErrorKind::TooLarge, "bands", format!("{} bands; the limit is {}", doc.bands.len(), MAX_BANDS)));
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
    let obj = value.as_object().ok_or_else(|| Error::new(ErrorKind::Syntax, "", "a chiroptic document is a JSON object"))?;
    let version = obj
        .get("chiroptic")
        .ok_or_else(|| Error::new(ErrorKind::MissingField, "chiroptic", "not a chiroptic document (no \"chiroptic\" version field)"))?;
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
