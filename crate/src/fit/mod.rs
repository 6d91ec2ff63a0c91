//! Fitting band models to measured spectra: weighted nonlinear least
//! squares (Levenberg-Marquardt, `lm`), parameters free, fixed, bounded or
//! linked (`params`), several data sets and lamp-line readings at once
//! (`residuals`), from several starts (`multistart`), with a report of
//! estimates, standard errors, correlations and model-comparison figures;
//! starting bands proposed from a measured CD set (`propose`).

pub mod lm;
pub mod params;
pub mod propose;
pub mod residuals;

use crate::data::DataSet;
use crate::document::{Document, FitDoc, FitParameterDoc, FitReportDoc, ParameterEstimateDoc, SetFitDoc, StrongPairDoc};
use crate::error::{Error, ErrorKind, Result};
use crate::import::Measured;
use crate::model::Model;
use crate::units::AxisUnit;
use params::{Layout, Mode, Parameter, Target};
use rand::{rngs::SmallRng, RngExt, SeedableRng};
use residuals::{FitProblem, Observations};

/// The band fields a fit can set, with the names documents and the CLI use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Field {
    Center,
    Width,
    LorentzWidth,
    Rotatory,
    Dipole,
}

impl Field {
    pub const ALL: [Field; 5] = [Field::Center, Field::Width, Field::LorentzWidth, Field::Rotatory, Field::Dipole];

    /// The document field name.
    pub fn key(self) -> &'static str {
        match self {
            Field::Center => "center_nm",
            Field::Width => "fwhm_cm1",
            Field::LorentzWidth => "lorentz_fwhm_cm1",
            Field::Rotatory => "rotatory_strength_1e40_cgs",
            Field::Dipole => "dipole_strength_debye2",
        }
    }

    /// Accepts the document name or a short one (centre, width, lorentz, R, D).
    pub fn parse(s: &str) -> Option<Field> {
        match s {
            "center" | "centre" => Some(Field::Center),
            "width" | "fwhm" => Some(Field::Width),
            "lorentz" | "lorentz_width" => Some(Field::LorentzWidth),
            "R" | "r" | "rotatory" => Some(Field::Rotatory),
            "D" | "d" | "dipole" => Some(Field::Dipole),
            other => Field::ALL.into_iter().find(|f| f.key() == other),
        }
    }

    fn target(self, band: usize) -> Target {
        match self {
            Field::Center => Target::Center(band),
            Field::Width => Target::Fwhm(band),
            Field::LorentzWidth => Target::LorentzFwhm(band),
            Field::Rotatory => Target::Rotatory(band),
            Field::Dipole => Target::Dipole(band),
        }
    }
}

/// The geometry of a two-chromophore coupled system that a fit can set
/// (see `coupled::geometry::distance_and_twist`). Held fixed unless named.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GeometryField {
    Distance,
    Twist,
}

impl GeometryField {
    pub const ALL: [GeometryField; 2] = [GeometryField::Distance, GeometryField::Twist];

    pub fn key(self) -> &'static str {
        match self {
            GeometryField::Distance => "distance_angstrom",
            GeometryField::Twist => "twist_deg",
        }
    }

    /// Accepts the key or a short name (distance, twist).
    pub fn parse(s: &str) -> Option<GeometryField> {
        match s {
            "distance" | "distance_angstrom" => Some(GeometryField::Distance),
            "twist" | "twist_deg" => Some(GeometryField::Twist),
            _ => None,
        }
    }

    fn target(self, system: usize) -> Target {
        match self {
            GeometryField::Distance => Target::Distance(system),
            GeometryField::Twist => Target::Twist(system),
        }
    }

    /// The geometry field a target sets, if it sets one.
    fn of(t: Target) -> Option<GeometryField> {
        match t {
            Target::Distance(_) => Some(GeometryField::Distance),
            Target::Twist(_) => Some(GeometryField::Twist),
            _ => None,
        }
    }
}

/// The names `fit.free` and `--free` accept, for messages.
pub const FREE_NAMES: &str = "centre, width, lorentz, R, D, distance, twist";

/// The name of system `i` in parameter names: its own, else `systems[i]`.
fn system_label(doc: &Document, i: usize) -> String {
    match doc.systems.get(i).map(|s| s.name.as_str()) {
        Some(name) if !name.is_empty() => name.to_string(),
        _ => format!("systems[{i}]"),
    }
}

/// What "NAME.FIELD" names: a band field or a system's geometry.
enum Named {
    Band(usize, Field),
    Geometry(usize, GeometryField),
}

/// The default free fields: centres, widths and rotatory strengths.
pub const DEFAULT_FREE: [Field; 3] = [Field::Center, Field::Width, Field::Rotatory];
pub const DEFAULT_STARTS: u32 = 8;
pub const DEFAULT_MAX_ITERATIONS: u32 = 300;
pub use crate::limits::{MAX_ITERATIONS, MAX_STARTS};
pub use propose::{propose_bands, propose_in_document, Proposal, PROPOSED_DEFAULT_BANDS};
/// |r| above this names a pair as strongly correlated.
pub const STRONG_CORRELATION: f64 = 0.9;
/// Polarimeter readability when a reading gives no uncertainty (common practice: 0.002 deg).
pub const DEFAULT_READING_SD_DEG: f64 = 0.002;

/// The result of a fit: the fitted document (bands updated, `fit.report`
/// filled) and the report.
#[derive(Debug, Clone, PartialEq)]
pub struct Fitted {
    pub document: Document,
    pub report: FitReportDoc,
}

fn band_index(doc: &Document, name: &str) -> Option<usize> {
    doc.bands.iter().position(|b| b.name == name)
}

/// "BAND.field" -> (band, field).
fn parse_parameter(doc: &Document, text: &str, at: &str) -> Result<(usize, Field)> {
    match parse_named(doc, text, at)? {
        Named::Band(b, f) => Ok((b, f)),
        Named::Geometry(..) => Err(Error::new(ErrorKind::OutOfRange, at, format!("\"{text}\" is a system's geometry, not a band field"))),
    }
}

/// "BAND.field" or "SYSTEM.distance" / "SYSTEM.twist".
fn parse_named(doc: &Document, text: &str, at: &str) -> Result<Named> {
    let (name, field) = text.rsplit_once('.').ok_or_else(|| {
        Error::new(
            ErrorKind::Syntax,
            at,
            format!("\"{text}\" should be BAND.FIELD, e.g. \"{}.center_nm\"", doc.bands.first().map(|b| b.name.as_str()).unwrap_or("B1")),
        )
    })?;
    if let Some(g) = GeometryField::parse(field) {
        let s = (0..doc.systems.len())
            .find(|&i| system_label(doc, i) == name)
            .ok_or_else(|| Error::new(ErrorKind::UnknownName, at, format!("no coupled system named \"{name}\"")))?;
        return Ok(Named::Geometry(s, g));
    }
    let b = band_index(doc, name).ok_or_else(|| Error::new(ErrorKind::UnknownName, at, format!("no band named \"{name}\"")))?;
    let f = Field::parse(field).ok_or_else(|| {
        Error::new(
            ErrorKind::UnknownName,
            at,
            format!(
                "unknown field \"{field}\" (use {}, or {} for a system)",
                Field::ALL.map(|f| f.key()).join(", "),
                GeometryField::ALL.map(|f| f.key()).join(", ")
            ),
        )
    })?;
    Ok(Named::Band(b, f))
}

/// A band field's start value in the fit's units (centre in cm^-1).
fn start_value(doc: &Document, model: &Model, band: usize, field: Field) -> f64 {
    let b = &doc.bands[band];
    match field {
        Field::Center => model.bands[band].lineshape.center(),
        Field::Width => b.fwhm_cm1,
        Field::LorentzWidth => b.lorentz_fwhm_cm1.unwrap_or(0.0),
        Field::Rotatory => b.rotatory_strength_1e40_cgs,
        Field::Dipole => b.dipole_strength_debye2,
    }
}

fn parameter_name(doc: &Document, t: Target, sets: &[DataSet]) -> String {
    let band = |i: usize| doc.bands.get(i).map(|b| b.name.clone()).unwrap_or_default();
    match t {
        Target::Center(i) => format!("{}.center_cm1", band(i)),
        Target::Fwhm(i) => format!("{}.fwhm_cm1", band(i)),
        Target::LorentzFwhm(i) => format!("{}.lorentz_fwhm_cm1", band(i)),
        Target::Rotatory(i) => format!("{}.rotatory_strength_1e40_cgs", band(i)),
        Target::Dipole(i) => format!("{}.dipole_strength_debye2", band(i)),
        Target::Shift => "shift_cm1".into(),
        Target::Offset(s) => format!("{}.offset", sets.get(s).map(|d| d.name.as_str()).unwrap_or("readings")),
        Target::Scale(s) => format!("{}.scale", sets.get(s).map(|d| d.name.as_str()).unwrap_or("readings")),
        Target::Distance(s) => format!("{}.{}", system_label(doc, s), GeometryField::Distance.key()),
        Target::Twist(s) => format!("{}.{}", system_label(doc, s), GeometryField::Twist.key()),
    }
}

/// Noise of a set from its own point-to-point scatter: the second
/// differences of evenly sampled smooth data are noise, with variance 6 sigma^2.
pub fn scatter_sigma(y: &[f64]) -> f64 {
    if y.len() < 5 {
        return 0.0;
    }
    let sum: f64 = y.windows(3).map(|w| (w[2] - 2.0 * w[1] + w[0]).powi(2)).sum();
    (sum / (6.0 * (y.len() - 2) as f64)).sqrt()
}

/// Builds the parameters of a fit from the document's settings.
fn parameters(doc: &Document, model: &Model, settings: &FitDoc, sets: &[DataSet], warnings: &mut Vec<String>) -> Result<Vec<Parameter>> {
    let mut free: Vec<Field> = Vec::new();
    let mut free_geometry: Vec<GeometryField> = Vec::new();
    for (i, f) in settings.free.iter().enumerate() {
        match (Field::parse(f), GeometryField::parse(f)) {
            (Some(field), _) => free.push(field),
            (None, Some(g)) => free_geometry.push(g),
            _ => {
                return Err(Error::new(
                    ErrorKind::UnknownName,
                    format!("fit.free[{i}]"),
                    format!("unknown field \"{f}\" (use {FREE_NAMES})"),
                ))
            }
        }
    }
    if free.is_empty() {
        free = DEFAULT_FREE.to_vec();
    }
    let has_absorption = sets.iter().any(|s| matches!(s.measured, Measured::Absorption(_)));
    let mut out = Vec::new();
    for (b, band) in doc.bands.iter().enumerate() {
        for field in Field::ALL {
            if field == Field::LorentzWidth && band.shape != "voigt" {
                continue;
            }
            let start = start_value(doc, model, b, field);
            let mut mode = if free.contains(&field) { Mode::Free { min: None, max: None } } else { Mode::Fixed };
            // Physical limits as bounds: widths positive, D not negative.
            if let Mode::Free { min, .. } = &mut mode {
                match field {
                    Field::Width => *min = Some(1.0_f64.min(start * 0.5)),
                    Field::LorentzWidth | Field::Dipole => *min = Some(0.0_f64.min(start)),
                    _ => {}
                }
            }
            out.push(Parameter { target: field.target(b), name: format!("{}.{}", band.name, field.key()), start, mode });
        }
    }
    // Two-chromophore systems: distance and twist, fixed unless named.
    for (s, system) in doc.systems.iter().enumerate() {
        let Some((distance, twist)) = crate::coupled::geometry::distance_and_twist(system) else { continue };
        let free_mode = |g: GeometryField| match (free_geometry.contains(&g), g) {
            (false, _) => Mode::Fixed,
            (true, GeometryField::Distance) => Mode::Free { min: Some(crate::coupled::MIN_SEPARATION_ANGSTROM), max: None },
            (true, GeometryField::Twist) => Mode::Free { min: None, max: None },
        };
        let name = |g: GeometryField| format!("{}.{}", system_label(doc, s), g.key());
        out.push(Parameter {
            target: Target::Distance(s),
            name: name(GeometryField::Distance),
            start: distance,
            mode: free_mode(GeometryField::Distance),
        });
        if let Some(t) = twist {
            out.push(Parameter {
                target: Target::Twist(s),
                name: name(GeometryField::Twist),
                start: t,
                mode: free_mode(GeometryField::Twist),
            });
        }
    }
    for g in &free_geometry {
        if !out.iter().any(|p| GeometryField::of(p.target) == Some(*g) && matches!(p.mode, Mode::Free { .. })) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                "fit.free",
                format!(
                    "{} is free, but no coupled system has one: it needs a system of two chromophores{}",
                    g.key(),
                    if *g == GeometryField::Twist { " whose directions do not lie along the axis between them" } else { "" }
                ),
            ));
        }
    }
    // The document's own choices per parameter.
    for (i, p) in settings.parameters.iter().enumerate() {
        let at = format!("fit.parameters[{i}]");
        let (target, mode) = match parse_named(doc, &p.parameter, &format!("{at}.parameter"))? {
            Named::Band(b, field) => (field.target(b), parameter_mode(doc, model, p, field, &at)?),
            Named::Geometry(s, g) => (g.target(s), geometry_mode(p, g, &at)?),
        };
        let k = out.iter().position(|q| q.target == target).ok_or_else(|| {
            Error::new(
                ErrorKind::OutOfRange,
                format!("{at}.parameter"),
                format!(
                    "{} is not a parameter of this document ({})",
                    p.parameter,
                    match target {
                        Target::Distance(_) | Target::Twist(_) =>
                            "distance and twist belong to a system of two chromophores; a twist needs directions off the axis between them",
                        _ => "that band has no such field",
                    }
                ),
            )
        })?;
        out[k].mode = mode;
    }
    if !has_absorption && !doc.bands.is_empty() {
        for p in out.iter_mut().filter(|p| matches!(p.target, Target::Dipole(_))) {
            p.mode = Mode::Fixed;
        }
        warnings
            .push("D is not determined by CD and ORD alone (no absorption data): every dipole strength is held at its start value".into());
    }
    // With D fixed, |g| = 4|R|/D <= 2 bounds R.
    let dipoles: Vec<(usize, f64, bool)> = out
        .iter()
        .filter_map(|p| match p.target {
            Target::Dipole(b) => Some((b, p.start, matches!(p.mode, Mode::Fixed))),
            _ => None,
        })
        .collect();
    for (b, d, fixed) in dipoles {
        // |R| <= D / (the smallest D that R = 1 allows).
        let limit = d / crate::model::dissymmetry_limited_dipole_strength(1.0);
        if let Some(p) = out.iter_mut().find(|p| p.target == Target::Rotatory(b)) {
            if let (true, Mode::Free { min, max }) = (fixed, &mut p.mode) {
                *min = Some(min.unwrap_or(-limit).max(-limit));
                *max = Some(max.unwrap_or(limit).min(limit));
                if p.start.abs() >= limit {
                    p.start = p.start.clamp(-limit * 0.999, limit * 0.999);
                }
            }
        }
    }
    if settings.shift {
        out.push(Parameter { target: Target::Shift, name: "shift_cm1".into(), start: 0.0, mode: Mode::Free { min: None, max: None } });
    }
    for (s, set) in sets.iter().enumerate() {
        if settings.offsets {
            out.push(Parameter {
                target: Target::Offset(s),
                name: format!("{}.offset", set.name),
                start: 0.0,
                mode: Mode::Free { min: None, max: None },
            });
        }
        if settings.scales {
            out.push(Parameter {
                target: Target::Scale(s),
                name: format!("{}.scale", set.name),
                start: 1.0,
                mode: Mode::Free { min: Some(0.0), max: None },
            });
        }
    }
    Ok(out)
}

fn parameter_mode(doc: &Document, model: &Model, p: &FitParameterDoc, field: Field, at: &str) -> Result<Mode> {
    if let Some(link) = &p.link {
        let (b, f) = parse_parameter(doc, &link.to, &format!("{at}.link.to"))?;
        if f != field {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                format!("{at}.link.to"),
                format!("a {} can only be linked to another {}", field.key(), field.key()),
            ));
        }
        for (name, v) in [("factor", link.factor), ("offset", link.offset)] {
            crate::error::finite(&format!("{at}.link.{name}"), v)?;
        }
        return Ok(Mode::Linked { to: f.target(b), factor: link.factor, offset: link.offset });
    }
    if p.fixed {
        return Ok(Mode::Fixed);
    }
    // Bounds are given in the units the user sees: nm for centres.
    let convert = |v: Option<f64>, name: &str| -> Result<Option<f64>> {
        v.map(|v| crate::error::finite(&format!("{at}.{name}"), v)).transpose()?;
        Ok(v.map(|v| if field == Field::Center { AxisUnit::Nanometre.to_wavenumber(v) } else { v }))
    };
    let (mut min, mut max) = (convert(p.min, "min")?, convert(p.max, "max")?);
    if field == Field::Center {
        // nm bounds become cm^-1 bounds the other way round.
        std::mem::swap(&mut min, &mut max);
    }
    let _ = model;
    Ok(Mode::Free { min, max })
}

/// A geometry parameter's own mode: fixed, or free within bounds (angstrom,
/// degrees); it cannot be linked.
fn geometry_mode(p: &FitParameterDoc, g: GeometryField, at: &str) -> Result<Mode> {
    if p.link.is_some() {
        return Err(Error::new(ErrorKind::OutOfRange, format!("{at}.link"), format!("a {} cannot be linked", g.key())));
    }
    if p.fixed {
        return Ok(Mode::Fixed);
    }
    for (name, v) in [("min", p.min), ("max", p.max)] {
        v.map(|v| crate::error::finite(&format!("{at}.{name}"), v)).transpose()?;
    }
    let floor = if g == GeometryField::Distance { Some(crate::coupled::MIN_SEPARATION_ANGSTROM) } else { None };
    let min = match (p.min, floor) {
        (Some(m), Some(f)) => Some(m.max(f)),
        (m, f) => m.or(f),
    };
    Ok(Mode::Free { min, max: p.max })
}

/// Fits the document's bands to its data sets and readings.
/// `progress(start, iteration, chi_square)` after every accepted step; false cancels.
pub fn fit(doc: &Document, model: &Model, sets: &[DataSet], progress: &mut dyn FnMut(usize, usize, f64) -> bool) -> Result<Fitted> {
    fit_watched(doc, model, sets, &mut |step: &Step| progress(step.start, step.iteration, step.chi_square))
}

/// Where a running fit is: after an accepted step of one start.
pub struct Step<'a> {
    pub start: usize,
    pub iteration: usize,
    pub chi_square: f64,
    doc: &'a Document,
    problem: &'a FitProblem,
    u: &'a [f64],
}

impl Step<'_> {
    /// The document with the values this step reached (built only when asked
    /// for: the page shows the curves a few times a second, not every step).
    pub fn document(&self) -> Document {
        let mut doc = self.doc.clone();
        write_back(&mut doc, self.problem, &self.problem.layout.values(self.u));
        doc
    }
}

/// `fit` with a progress hook that can also see the values reached ([`Step`]).
pub fn fit_watched(doc: &Document, model: &Model, sets: &[DataSet], progress: &mut dyn FnMut(&Step) -> bool) -> Result<Fitted> {
    let prepared = prepare(doc, model, sets)?;
    let outcome =
        multistart(&prepared.problem, prepared.starts, prepared.max_iterations, prepared.seed, &mut |start, iteration, chi_square, u| {
            progress(&Step { start, iteration, chi_square, doc, problem: &prepared.problem, u })
        });
    prepared.finish(outcome.all)
}

/// A fit made ready and checked: parameters, weights, the problem and the
/// settings. `fit_watched` runs every start and finishes; the page splits
/// the starts over its workers ([`Prepared::run_starts`]) and finishes once
/// with all their outcomes, which gives the same result.
pub struct Prepared<'a> {
    doc: &'a Document,
    settings: FitDoc,
    problem: FitProblem,
    sets: Vec<DataSet>,
    relative: bool,
    warnings: Vec<String>,
    starts: usize,
    max_iterations: usize,
    seed: u64,
}

/// Reads the fit settings and builds the problem, refusing what cannot be fitted.
pub fn prepare<'a>(doc: &'a Document, model: &Model, sets: &[DataSet]) -> Result<Prepared<'a>> {
    let settings = doc.fit.clone().unwrap_or_default();
    let starts = settings.starts.unwrap_or(DEFAULT_STARTS);
    let max_iterations = settings.max_iterations.unwrap_or(DEFAULT_MAX_ITERATIONS);
    if !(1..=MAX_STARTS).contains(&starts) {
        return Err(Error::new(ErrorKind::OutOfRange, "fit.starts", format!("starts must lie in 1..{MAX_STARTS}")));
    }
    if !(1..=MAX_ITERATIONS).contains(&max_iterations) {
        return Err(Error::new(ErrorKind::OutOfRange, "fit.max_iterations", format!("max_iterations must lie in 1..{MAX_ITERATIONS}")));
    }
    let fitted_sets: Vec<DataSet> = sets.iter().filter(|s| !s.hidden).cloned().collect();
    let mut warnings = Vec::new();
    let params = parameters(doc, model, &settings, &fitted_sets, &mut warnings)?;
    coverage_warnings(doc, model, &fitted_sets, &mut warnings);
    let layout = Layout::new(params).map_err(|m| Error::new(ErrorKind::OutOfRange, "fit.parameters", m))?;

    // Weights: each point's own sd, else the set's scatter (relative weights).
    let mut relative = false;
    let weights: Vec<Vec<f64>> = fitted_sets
        .iter()
        .map(|s| match &s.sd {
            Some(sd) => sd.iter().map(|v| 1.0 / v).collect(),
            None => {
                relative = true;
                let sigma = scatter_sigma(&s.y);
                let floor = 1e-6 * s.y.iter().fold(0.0_f64, |m, v| m.max(v.abs())).max(1e-300);
                vec![1.0 / sigma.max(floor); s.y.len()]
            }
        })
        .collect();
    let readings: Vec<(f64, f64, f64, crate::units::SampleContext)> = crate::data::readings(doc, model)?
        .into_iter()
        .map(|r| {
            let sd = r.sd_deg.unwrap_or_else(|| {
                relative = true;
                DEFAULT_READING_SD_DEG
            });
            (r.wavenumber_cm1, r.rotation_deg, 1.0 / sd, r.context)
        })
        .collect();
    let obs = Observations { sets: &fitted_sets, weights: &weights, readings: &readings };
    let problem = FitProblem::new(doc, model, layout, &obs).map_err(|m| Error::new(ErrorKind::OutOfRange, "data", m))?;
    if problem.is_empty() {
        return Err(Error::new(ErrorKind::MissingField, "data", "nothing to fit: the document has no shown data set and no reading"));
    }
    let nfree = problem.layout.free.len();
    if nfree == 0 {
        return Err(Error::new(ErrorKind::OutOfRange, "fit", "no parameter is free"));
    }
    if problem.len() <= nfree {
        return Err(Error::new(ErrorKind::OutOfRange, "fit", format!("{} points cannot determine {nfree} free parameters", problem.len())));
    }

    Ok(Prepared {
        doc,
        seed: settings.seed.unwrap_or(1),
        settings,
        problem,
        sets: fitted_sets,
        relative,
        warnings,
        starts: starts as usize,
        max_iterations: max_iterations as usize,
    })
}

impl Prepared<'_> {
    pub fn starts(&self) -> usize {
        self.starts
    }

    /// The local fits from starts `first`, `first + stride`, ... (numbered as
    /// in `multistart`), one after the other, with their start numbers.
    pub fn run_starts(&self, first: usize, stride: usize, progress: &mut dyn FnMut(&Step) -> bool) -> Vec<(usize, lm::Outcome)> {
        let points = start_points(&self.problem, self.starts, self.seed);
        points
            .iter()
            .enumerate()
            .skip(first)
            .step_by(stride.max(1))
            .map(|(k, u0)| {
                let outcome = lm::minimise(&self.problem, u0, self.max_iterations, &mut |iteration, chi_square, u| {
                    progress(&Step { start: k, iteration, chi_square, doc: self.doc, problem: &self.problem, u })
                });
                (k, outcome)
            })
            .collect()
    }

    /// The report and the fitted document from every start's outcome, in start order.
    pub fn finish(self, all: Vec<lm::Outcome>) -> Result<Fitted> {
        let k = self.problem.layout.free.len();
        if all.len() != self.starts || all.iter().any(|o| o.u.len() != k) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                "fit",
                format!(
                    "the fit's starts do not match its settings ({} outcomes for {} starts of {k} free parameters)",
                    all.len(),
                    self.starts
                ),
            ));
        }
        let outcome = Starts { best: best_of(&all), all };
        let best = outcome.best.clone();
        if !best.chi_square.is_finite() {
            return Err(Error::new(ErrorKind::OutOfRange, "fit", "the fit did not converge: chi-square is not finite"));
        }
        let (doc, problem) = (self.doc, &self.problem);
        let report = report(doc, problem, &self.sets, &best, &outcome, self.relative, self.warnings);
        let mut document = doc.clone();
        write_back(&mut document, problem, &problem.layout.values(&best.u));
        let mut fit_doc = self.settings;
        fit_doc.report = Some(report.clone());
        document.fit = Some(fit_doc);
        // The fitted model must itself be valid (a fit may not leave |g| <= 2, widths > 0 ...).
        Model::from_document(&document)
            .map_err(|e| Error::new(e.kind, e.field, format!("the fitted model is not valid: {}", e.message)))?;
        Ok(Fitted { document, report })
    }
}

/// Bands that no data set sees: warn, do not pretend.
fn coverage_warnings(doc: &Document, model: &Model, sets: &[DataSet], warnings: &mut Vec<String>) {
    let has_ord = sets.iter().any(|s| matches!(s.measured, Measured::Ord(_))) || !doc.readings.is_empty();
    for (b, band) in model.bands.iter().enumerate() {
        let center = band.lineshape.center();
        let fwhm = doc.bands[b].fwhm_cm1;
        let seen = sets
            .iter()
            .filter(|s| !matches!(s.measured, Measured::Ord(_)))
            .any(|s| s.x.iter().any(|x| (s.axis.to_wavenumber(*x) - center).abs() <= fwhm));
        if !seen {
            warnings.push(if has_ord {
                format!(
                    "band {} lies outside every CD and absorption set's range: only its tail in the rotation constrains it",
                    doc.bands[b].name
                )
            } else {
                format!("band {} lies outside every data set's range: the data cannot constrain it", doc.bands[b].name)
            });
        }
    }
}

fn write_back(doc: &mut Document, problem: &FitProblem, values: &[f64]) {
    let shift = problem.layout.parameters.iter().zip(values).find(|(p, _)| p.target == Target::Shift).map(|(_, v)| *v).unwrap_or(0.0);
    for (p, v) in problem.layout.parameters.iter().zip(values) {
        match p.target {
            Target::Center(b) => doc.bands[b].center_nm = AxisUnit::Nanometre.from_wavenumber(v + shift),
            Target::Fwhm(b) => doc.bands[b].fwhm_cm1 = *v,
            Target::LorentzFwhm(b) => doc.bands[b].lorentz_fwhm_cm1 = Some(*v),
            Target::Rotatory(b) => doc.bands[b].rotatory_strength_1e40_cgs = *v,
            Target::Dipole(b) => doc.bands[b].dipole_strength_debye2 = *v,
            _ => {}
        }
    }
    for (s, system) in doc.systems.iter_mut().enumerate() {
        let (d, t) = problem.geometry(values, s);
        if let Some(d) = d {
            crate::coupled::geometry::set_distance_and_twist(system, d, t);
        }
    }
}

/// `progress(start, iteration, chi_square, variables)` after each accepted step; false cancels.
pub type StartProgress<'a> = dyn FnMut(usize, usize, f64, &[f64]) -> bool + 'a;

/// Every start's outcome and the best.
pub struct Starts {
    pub best: lm::Outcome,
    pub all: Vec<lm::Outcome>,
}

/// Local fits from the given start and from `starts - 1` perturbed starts
/// (each free value moved by up to 20 % of itself, or of its width for a
/// centre, kept inside its bounds), on two threads natively.
pub fn multistart(problem: &FitProblem, starts: usize, max_iterations: usize, seed: u64, progress: &mut StartProgress) -> Starts {
    let points = start_points(problem, starts, seed);
    let run = |u0: &Vec<f64>, report: &mut dyn FnMut(usize, f64, &[f64]) -> bool| lm::minimise(problem, u0, max_iterations, report);
    let mut all: Vec<lm::Outcome> = Vec::with_capacity(points.len());
    #[cfg(not(target_arch = "wasm32"))]
    {
        // The first start reports progress (and can cancel); the rest run
        // beside it on the other core.
        let (head, tail) = points.split_at(1);
        std::thread::scope(|scope| {
            let helper = scope.spawn(|| tail.iter().map(|u0| run(u0, &mut |_, _, _| true)).collect::<Vec<_>>());
            all.push(run(&head[0], &mut |i, chi, u| progress(0, i, chi, u)));
            all.extend(helper.join().unwrap_or_default());
        });
    }
    #[cfg(target_arch = "wasm32")]
    for (k, u0) in points.iter().enumerate() {
        all.push(run(u0, &mut |i, chi, u| progress(k, i, chi, u)));
    }
    Starts { best: best_of(&all), all }
}

/// The given start and `starts - 1` perturbed ones, from a seeded generator
/// (the same points on every run and machine).
fn start_points(problem: &FitProblem, starts: usize, seed: u64) -> Vec<Vec<f64>> {
    let mut rng = SmallRng::seed_from_u64(seed);
    let mut points = vec![problem.layout.start()];
    for _ in 1..starts {
        points.push(perturbed(problem, &mut rng));
    }
    points
}

/// The lowest finite chi-square (the first of equals), else the first start.
fn best_of(all: &[lm::Outcome]) -> lm::Outcome {
    all.iter()
        .filter(|o| o.chi_square.is_finite())
        .min_by(|a, b| a.chi_square.total_cmp(&b.chi_square))
        .or(all.first())
        .cloned()
        .unwrap_or(lm::Outcome { u: Vec::new(), chi_square: f64::NAN, iterations: 0, stop: lm::Stop::Stalled })
}

fn perturbed(problem: &FitProblem, rng: &mut SmallRng) -> Vec<f64> {
    let layout = &problem.layout;
    layout
        .free
        .iter()
        .map(|(i, t)| {
            let p = &layout.parameters[*i];
            let scale = match p.target {
                Target::Center(b) => {
                    layout.parameters.iter().find(|q| q.target == Target::Fwhm(b)).map(|q| q.start).unwrap_or(p.start.abs() * 0.05)
                }
                Target::Shift | Target::Offset(_) => 0.0,
                _ => p.start.abs(),
            };
            let v = p.start + 0.2 * scale * rng.random_range(-1.0..1.0);
            let v = match p.mode {
                Mode::Free { min, max } => v.clamp(min.unwrap_or(f64::NEG_INFINITY), max.unwrap_or(f64::INFINITY)),
                _ => v,
            };
            t.variable(v)
        })
        .collect()
}

fn report(
    doc: &Document,
    problem: &FitProblem,
    sets: &[DataSet],
    best: &lm::Outcome,
    outcome: &Starts,
    relative: bool,
    mut warnings: Vec<String>,
) -> FitReportDoc {
    let values = problem.layout.values(&best.u);
    let (mut r, mut jac) = (Vec::new(), Vec::new());
    problem.free_value_jacobian(&values, &mut r, &mut jac);
    let n = r.len();
    let k = problem.layout.free.len();
    let dof = n.saturating_sub(k);
    let chi = lm::sum_sq(&r);
    let reduced = if dof > 0 { chi / dof as f64 } else { f64::NAN };
    // Covariance of the free parameters in their model values: (J^T J)^-1,
    // scaled by reduced chi-square when the weights are relative.
    let covariance = lm::inverse_spd(&lm::normal_matrix(&jac, k), k);
    let scale = if relative { reduced } else { 1.0 };
    let se: Vec<f64> = (0..k).map(|p| covariance.as_ref().map(|c| (c[p * k + p] * scale).sqrt()).unwrap_or(f64::NAN)).collect();
    if covariance.is_none() {
        warnings
            .push("the parameters are not all determined by the data (the normal matrix is singular): standard errors are missing".into());
    }
    let mut names = Vec::new();
    let mut correlations = vec![0.0; k * k];
    let mut strong = Vec::new();
    for (p, (i, _)) in problem.layout.free.iter().enumerate() {
        names.push(parameter_name(doc, problem.layout.parameters[*i].target, sets));
        for q in 0..k {
            let c = covariance.as_ref().map(|c| c[p * k + q] / (c[p * k + p] * c[q * k + q]).sqrt()).unwrap_or(f64::NAN);
            correlations[p * k + q] = c;
        }
    }
    for p in 0..k {
        for q in p + 1..k {
            let c = correlations[p * k + q];
            if c.abs() >= STRONG_CORRELATION {
                strong.push(StrongPairDoc { a: names[p].clone(), b: names[q].clone(), r: c });
            }
        }
    }
    let parameters = problem
        .layout
        .parameters
        .iter()
        .zip(&values)
        .enumerate()
        .map(|(i, (p, v))| {
            let free_index = problem.layout.free.iter().position(|(j, _)| *j == i);
            let transform = free_index.map(|f| problem.layout.free[f].1);
            let (mode, se_value) = match (&p.mode, free_index, problem.layout.map[i]) {
                (Mode::Fixed, _, _) => ("fixed", None),
                (Mode::Linked { .. }, _, Some((kf, factor, _))) => ("linked", Some(se[kf] * factor.abs())),
                (_, Some(f), _) => ("free", Some(se[f])),
                _ => ("fixed", None),
            };
            ParameterEstimateDoc {
                name: parameter_name(doc, p.target, sets),
                value: *v,
                standard_error: se_value.filter(|s| s.is_finite()),
                mode: mode.into(),
                at_bound: transform.is_some_and(|t| t.at_bound(*v)),
            }
        })
        .collect();
    let set_of = problem.point_sets();
    let per_set = (0..problem.set_count)
        .map(|s| {
            let rs: Vec<f64> = r.iter().zip(&set_of).filter(|(_, k)| **k == s).map(|(v, _)| *v).collect();
            SetFitDoc {
                name: sets.get(s).map(|d| d.name.clone()).unwrap_or_else(|| "lamp-line readings".into()),
                points: rs.len(),
                chi_square: lm::sum_sq(&rs),
                rms_weighted_residual: (lm::sum_sq(&rs) / rs.len().max(1) as f64).sqrt(),
            }
        })
        .collect();
    let nf = n as f64;
    let (aic, bic) = if relative {
        let base = nf * (chi / nf).ln();
        (base + 2.0 * k as f64, base + k as f64 * nf.ln())
    } else {
        (chi + 2.0 * k as f64, chi + k as f64 * nf.ln())
    };
    let at_best = outcome.all.iter().filter(|o| (o.chi_square - best.chi_square).abs() <= 1e-6 * best.chi_square.max(1e-300)).count();
    FitReportDoc {
        parameters,
        chi_square: chi,
        reduced_chi_square: reduced,
        degrees_of_freedom: dof,
        points: n,
        free_parameters: k,
        aic,
        bic,
        weights: if relative { "relative (from each set's scatter)".into() } else { "from the given uncertainties".into() },
        sets: per_set,
        iterations: best.iterations,
        stop: best.stop.key().into(),
        stop_reason: best.stop.describe().into(),
        starts: outcome.all.len(),
        starts_at_best: at_best,
        correlation_names: names,
        correlations,
        strong_correlations: strong,
        warnings,
    }
}
