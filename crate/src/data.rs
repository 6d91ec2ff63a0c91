//! Measured data sets, validated and processed: from a document's `data`
//! entries to spectra in known units at known conditions, convertible to
//! every unit the model shows (through `units`, never a second formula).

use crate::document::{AxisValuesDoc, ConditionsDoc, DataSetDoc, Document, StepDoc};
use crate::error::{finite, positive, positive_at_most, Error, ErrorKind, Result};
use crate::import::{Measured, Recognised, MAX_POINTS};
use crate::limits::{MAX_CONCENTRATION_MOL_PER_L, MAX_PATH_LENGTH_CM};
use crate::model::Model;
use crate::processing;
use crate::units::{AbsorptionUnit, AxisUnit, CdUnit, OrdUnit, SampleContext, UnitError};

/// Largest Savitzky-Golay polynomial order accepted (higher orders are
/// numerically poor and smooth nothing).
pub const MAX_SMOOTHING_ORDER: u32 = 8;

/// A measured spectrum after its processing.
#[derive(Debug, Clone, PartialEq)]
pub struct DataSet {
    pub name: String,
    pub measured: Measured,
    pub axis: AxisUnit,
    /// The document's sample with this set's conditions.
    pub context: SampleContext,
    pub temperature_c: Option<f64>,
    /// Processed values, in `axis` and the measured unit.
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub sd: Option<Vec<f64>>,
    /// What smoothing removed (before minus after), where a set is smoothed.
    pub smoothing_removed: Option<Vec<f64>>,
    pub hidden: bool,
}

fn field(i: usize, name: &str) -> String {
    format!("data[{i}].{name}")
}

/// The sample context of a set: the document's sample, with the set's own
/// concentration and path where it gives them.
pub fn conditions_context(base: &SampleContext, c: Option<&ConditionsDoc>, at: &str) -> Result<(SampleContext, Option<f64>)> {
    let mut ctx = *base;
    let mut temperature = None;
    if let Some(c) = c {
        if let Some(v) = c.concentration_mol_per_l {
            ctx.concentration_mol_per_l =
                positive_at_most(&format!("{at}.concentration_mol_per_l"), v, MAX_CONCENTRATION_MOL_PER_L, "concentration")?;
        }
        if let Some(v) = c.path_length_cm {
            ctx.path_length_cm = positive_at_most(&format!("{at}.path_length_cm"), v, MAX_PATH_LENGTH_CM, "path length")?;
        }
        if let Some(t) = c.temperature_c {
            let t = finite(&format!("{at}.temperature_c"), t)?;
            if !(-273.15..=1000.0).contains(&t) {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    format!("{at}.temperature_c"),
                    format!("temperature must lie in -273.15..1000 °C (got {t})"),
                ));
            }
            temperature = Some(t);
        }
    }
    Ok((ctx, temperature))
}

/// A polarimeter reading at a lamp line, validated, with its conditions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reading {
    pub wavelength_nm: f64,
    pub wavenumber_cm1: f64,
    pub rotation_deg: f64,
    pub sd_deg: Option<f64>,
    /// The document's sample with the reading's own conditions.
    pub context: SampleContext,
}

/// Every reading of the document, checked (field names as `readings[i]...`).
pub fn readings(doc: &Document, model: &Model) -> Result<Vec<Reading>> {
    doc.readings
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let at = format!("readings[{i}]");
            positive(&format!("{at}.wavelength_nm"), r.wavelength_nm, "wavelength")?;
            finite(&format!("{at}.rotation_deg"), r.rotation_deg)?;
            let sd_deg = r.sd_deg.map(|sd| positive(&format!("{at}.sd_deg"), sd, "standard deviation")).transpose()?;
            let (context, _) = conditions_context(&model.sample.context, r.conditions.as_ref(), &format!("{at}.conditions"))?;
            Ok(Reading {
                wavelength_nm: r.wavelength_nm,
                wavenumber_cm1: AxisUnit::Nanometre.to_wavenumber(r.wavelength_nm),
                rotation_deg: r.rotation_deg,
                sd_deg,
                context,
            })
        })
        .collect()
}

/// The axis values a document stores.
pub fn axis_values(x: &AxisValuesDoc, at: &str) -> Result<Vec<f64>> {
    match x {
        AxisValuesDoc::List(v) => Ok(v.clone()),
        AxisValuesDoc::Even { first, step, count } => {
            finite(&format!("{at}.first"), *first)?;
            finite(&format!("{at}.step"), *step)?;
            if *count as usize > MAX_POINTS {
                return Err(Error::new(ErrorKind::TooLarge, format!("{at}.count"), format!("{count} points; the limit is {MAX_POINTS}")));
            }
            Ok((0..*count).map(|i| first + step * f64::from(i)).collect())
        }
    }
}

/// Stores an axis as first/step/count when it is evenly spaced to within
/// rounding, else as the list.
pub fn axis_doc(x: &[f64]) -> AxisValuesDoc {
    if x.len() >= 3 {
        let step = x[1] - x[0];
        // A millionth of the step: far above rounding, far below any real irregularity.
        let even = x.iter().enumerate().all(|(i, v)| (v - (x[0] + step * i as f64)).abs() <= 1e-6 * step.abs());
        if even && step != 0.0 {
            return AxisValuesDoc::Even { first: x[0], step, count: x.len() as u32 };
        }
    }
    AxisValuesDoc::List(x.to_vec())
}

/// A document entry for a recognised import.
pub fn data_set_doc(name: &str, r: &Recognised, source: crate::document::SourceDoc) -> DataSetDoc {
    DataSetDoc {
        name: name.to_string(),
        quantity: r.measured.quantity().to_string(),
        unit: r.measured.unit_key().to_string(),
        axis_unit: r.axis.key().to_string(),
        conditions: None,
        x: axis_doc(&r.x),
        y: r.y.clone(),
        sd: r.sd.clone(),
        ht_v: r.ht_v.clone(),
        source: Some(source),
        processing: Vec::new(),
        hidden: false,
    }
}

/// Every data set of the document, validated and processed in order
/// (a blank is processed before it is subtracted).
pub fn data_sets(doc: &Document, model: &Model) -> Result<Vec<DataSet>> {
    let mut names = std::collections::HashSet::new();
    for (i, d) in doc.data.iter().enumerate() {
        if d.name.trim().is_empty() {
            return Err(Error::new(ErrorKind::MissingField, field(i, "name"), "a data set needs a name"));
        }
        if !names.insert(d.name.as_str()) {
            return Err(Error::new(ErrorKind::OutOfRange, field(i, "name"), format!("two data sets are named \"{}\"", d.name)));
        }
    }
    (0..doc.data.len()).map(|i| data_set(doc, model, i, 0)).collect()
}

fn data_set(doc: &Document, model: &Model, i: usize, depth: usize) -> Result<DataSet> {
    let d = &doc.data[i];
    let measured = Measured::parse(&d.quantity, &d.unit).ok_or_else(|| {
        Error::new(
            ErrorKind::UnknownName,
            field(i, "unit"),
            format!(
                "\"{}\" in \"{}\" is not a measured quantity and unit this build knows (quantity cd|ord|absorption)",
                d.unit, d.quantity
            ),
        )
    })?;
    let axis = AxisUnit::parse(&d.axis_unit).ok_or_else(|| {
        Error::new(ErrorKind::UnknownName, field(i, "axis_unit"), format!("unknown axis unit \"{}\" (use nm, cm-1 or ev)", d.axis_unit))
    })?;
    let (context, temperature_c) = conditions_context(&model.sample.context, d.conditions.as_ref(), &field(i, "conditions"))?;
    let mut x = axis_values(&d.x, &field(i, "x"))?;
    let mut y = d.y.clone();
    let mut sd = d.sd.clone();
    let mut ht = d.ht_v.clone();
    check_values(i, &x, &y, sd.as_deref(), ht.as_deref(), axis)?;
    let mut smoothing_removed = None;
    for (k, step) in d.processing.iter().enumerate() {
        let at = field(i, &format!("processing[{k}]"));
        match step {
            StepDoc::SubtractBlank { blank } => {
                let j = doc.data.iter().position(|b| &b.name == blank).ok_or_else(|| {
                    Error::new(ErrorKind::UnknownName, format!("{at}.subtract_blank.blank"), format!("no data set named \"{blank}\""))
                })?;
                if j == i || depth > doc.data.len() {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.subtract_blank.blank"),
                        "a data set cannot be its own blank, directly or through others",
                    ));
                }
                let b = data_set(doc, model, j, depth + 1)?;
                if b.measured != measured || b.axis != axis {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.subtract_blank.blank"),
                        format!(
                            "the blank \"{blank}\" is {} {} on a {} axis; this set is {} {} on a {} axis",
                            b.measured.quantity(),
                            b.measured.unit_key(),
                            b.axis.key(),
                            measured.quantity(),
                            measured.unit_key(),
                            axis.key()
                        ),
                    ));
                }
                y = processing::subtract_blank(&x, &y, &b.x, &b.y).map_err(|at_x| {
                    Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.subtract_blank.blank"),
                        format!("the blank \"{blank}\" does not cover {at_x} {}", axis.label()),
                    )
                })?;
            }
            StepDoc::ZeroAt { from, to } => {
                finite(&format!("{at}.zero_at.from"), *from)?;
                finite(&format!("{at}.zero_at.to"), *to)?;
                y = processing::zero_at(&x, &y, *from, *to).ok_or_else(|| {
                    Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.zero_at"),
                        format!("no point lies between {from} and {to} {}", axis.label()),
                    )
                })?;
            }
            StepDoc::Smooth { window, order } => {
                let (w, o) = (*window as usize, *order as usize);
                if w % 2 == 0 || w < 3 || *order > MAX_SMOOTHING_ORDER || o + 1 >= w || w > y.len() {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.smooth"),
                        format!("window must be odd, at least order + 2 and at most the {} points; order at most {MAX_SMOOTHING_ORDER} (got window {window}, order {order})", y.len()),
                    ));
                }
                if !processing::evenly_spaced(&x) {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("{at}.smooth"),
                        "Savitzky-Golay smoothing needs evenly spaced points",
                    ));
                }
                let smoothed = processing::savitzky_golay(&y, w, o);
                smoothing_removed = Some(y.iter().zip(&smoothed).map(|(a, b)| a - b).collect());
                y = smoothed;
            }
            StepDoc::DropAboveHt { limit_v } => {
                positive(&format!("{at}.drop_above_ht.limit_v"), *limit_v, "voltage limit")?;
                let volts = ht.clone().ok_or_else(|| {
                    Error::new(
                        ErrorKind::MissingField,
                        format!("{at}.drop_above_ht"),
                        "this data set has no detector voltage (ht_v) column",
                    )
                })?;
                let keep: Vec<bool> = volts.iter().map(|v| *v <= *limit_v).collect();
                filter_all(&keep, &mut x, &mut y, &mut sd, &mut ht, &mut smoothing_removed);
            }
            StepDoc::Trim { from, to } => {
                finite(&format!("{at}.trim.from"), *from)?;
                finite(&format!("{at}.trim.to"), *to)?;
                let keep = processing::keep_range(&x, *from, *to);
                filter_all(&keep, &mut x, &mut y, &mut sd, &mut ht, &mut smoothing_removed);
            }
        }
        if x.len() < 2 {
            return Err(Error::new(ErrorKind::OutOfRange, at, "fewer than 2 points are left after this step"));
        }
    }
    Ok(DataSet { name: d.name.clone(), measured, axis, context, temperature_c, x, y, sd, smoothing_removed, hidden: d.hidden })
}

fn filter_all(
    keep: &[bool],
    x: &mut Vec<f64>,
    y: &mut Vec<f64>,
    sd: &mut Option<Vec<f64>>,
    ht: &mut Option<Vec<f64>>,
    removed: &mut Option<Vec<f64>>,
) {
    let pick = |v: &[f64]| v.iter().zip(keep).filter(|(_, k)| **k).map(|(a, _)| *a).collect::<Vec<f64>>();
    *x = pick(x);
    *y = pick(y);
    for column in [sd, ht, removed] {
        if let Some(v) = column.as_mut() {
            *v = pick(v);
        }
    }
}

fn check_values(i: usize, x: &[f64], y: &[f64], sd: Option<&[f64]>, ht: Option<&[f64]>, axis: AxisUnit) -> Result<()> {
    if x.len() > MAX_POINTS {
        return Err(Error::new(ErrorKind::TooLarge, field(i, "x"), format!("{} points; the limit is {MAX_POINTS}", x.len())));
    }
    if x.len() < 2 {
        return Err(Error::new(ErrorKind::OutOfRange, field(i, "x"), "a data set needs at least 2 points"));
    }
    for (name, column) in [("y", Some(y)), ("sd", sd), ("ht_v", ht)] {
        if let Some(c) = column {
            if c.len() != x.len() {
                return Err(Error::new(ErrorKind::OutOfRange, field(i, name), format!("{} values for {} axis points", c.len(), x.len())));
            }
            if let Some(k) = c.iter().position(|v| !v.is_finite()) {
                return Err(Error::new(ErrorKind::NotFinite, field(i, &format!("{name}[{k}]")), "must be a finite number"));
            }
        }
    }
    if let Some(k) = sd.and_then(|s| s.iter().position(|v| *v <= 0.0)) {
        return Err(Error::new(ErrorKind::NotPositive, field(i, &format!("sd[{k}]")), "a standard deviation must be positive"));
    }
    if let Some(k) = x.iter().position(|v| !(v.is_finite() && *v > 0.0)) {
        return Err(Error::new(
            ErrorKind::NotPositive,
            field(i, &format!("x[{k}]")),
            format!("axis values must be positive {}", axis.label()),
        ));
    }
    let rising = x[1] > x[0];
    if let Some(k) = (1..x.len()).find(|k| if rising { x[*k] <= x[k - 1] } else { x[*k] >= x[k - 1] }) {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            field(i, &format!("x[{k}]")),
            "the axis must rise or fall throughout, without repeats",
        ));
    }
    Ok(())
}

impl DataSet {
    /// The axis as wavenumbers, cm^-1.
    pub fn wavenumbers(&self) -> Vec<f64> {
        self.x.iter().map(|v| self.axis.to_wavenumber(*v)).collect()
    }

    /// Values as De (M^-1 cm^-1) at this set's conditions; CD sets only.
    pub fn delta_epsilon(&self) -> std::result::Result<Vec<f64>, UnitError> {
        match self.measured {
            Measured::Cd(u) => self.y.iter().map(|v| u.to_delta_epsilon(*v, f64::NAN, &self.context)).collect(),
            _ => Err(UnitError(format!("\"{}\" is {} data, not CD", self.name, self.measured.quantity()))),
        }
    }

    /// Values as observed rotation (deg) at this set's conditions; ORD sets only.
    pub fn rotation_deg(&self) -> std::result::Result<Vec<f64>, UnitError> {
        match self.measured {
            Measured::Ord(u) => self.y.iter().zip(self.wavenumbers()).map(|(v, nu)| u.to_degrees(*v, nu, &self.context)).collect(),
            _ => Err(UnitError(format!("\"{}\" is {} data, not ORD", self.name, self.measured.quantity()))),
        }
    }

    /// Values as e (M^-1 cm^-1); absorption sets only.
    pub fn epsilon(&self) -> std::result::Result<Vec<f64>, UnitError> {
        match self.measured {
            Measured::Absorption(u) => Ok(self.y.iter().map(|v| u.to_epsilon(*v, &self.context)).collect()),
            _ => Err(UnitError(format!("\"{}\" is {} data, not absorption", self.name, self.measured.quantity()))),
        }
    }

    /// CD values in a plot's unit. Intensive units (De, [theta], MRE) need
    /// no conditions; the sample's own (mdeg, DA) are scaled from this set's
    /// conditions to `display`'s, so that data and model share one scale.
    pub fn cd_in(&self, unit: CdUnit, display: &SampleContext) -> std::result::Result<Vec<f64>, UnitError> {
        if unit == CdUnit::Dissymmetry {
            return Err(UnitError("g of measured CD needs a measured absorption at the same points".into()));
        }
        self.delta_epsilon()?.iter().map(|de| unit.from_delta_epsilon(*de, f64::NAN, display)).collect()
    }

    /// ORD values in a plot's unit, through the molar rotation (intensive).
    pub fn ord_in(&self, unit: OrdUnit, display: &SampleContext) -> std::result::Result<Vec<f64>, UnitError> {
        let nu = self.wavenumbers();
        self.rotation_deg()?
            .iter()
            .zip(&nu)
            .map(|(phi, nu)| {
                let molar = OrdUnit::MolarRotation.from_degrees(*phi, *nu, &self.context)?;
                let phi_display = OrdUnit::MolarRotation.to_degrees(molar, *nu, display)?;
                unit.from_degrees(phi_display, *nu, display)
            })
            .collect()
    }

    /// Absorption values in a plot's unit.
    pub fn absorption_in(&self, unit: AbsorptionUnit, display: &SampleContext) -> std::result::Result<Vec<f64>, UnitError> {
        Ok(self.epsilon()?.iter().map(|e| unit.from_epsilon(*e, display)).collect())
    }
}
