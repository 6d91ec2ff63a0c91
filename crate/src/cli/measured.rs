//! `import`: what the tool understood of a data file, as CSV.
//! `kk`: measured CD to ORD (or ORD to CD) by Kramers-Kronig, optionally with
//! a document's bands standing for what lies outside the measured range.

use super::{load, Failure};
use crate::data::{data_set_doc, data_sets, DataSet};
use crate::document::{Document, SampleDoc, SolventDoc, SourceDoc};
use crate::error::{Error, ErrorKind};
use crate::import::{self, ColumnChoice, ColumnKind, Measured, Table, MAX_IMPORT_BYTES};
use crate::kk;
use crate::lines::STANDARD_LINES;
use crate::model::Model;
use crate::spectra::Grid;
use crate::table::number;
use crate::units::{self, AbsorptionUnit, AxisUnit, CdUnit, OrdUnit};
use std::path::Path;

/// The flags that name what a file's columns hold.
#[derive(Default)]
pub struct ColumnFlags {
    pub block: Option<usize>,
    pub x_unit: Option<String>,
    pub quantity: Option<String>,
    pub unit: Option<String>,
    pub column: Option<usize>,
}

fn bad(origin: &str, kind: ErrorKind, message: impl Into<String>) -> Failure {
    Failure::input(origin, Error::new(kind, "", message))
}

/// Reads a data file, refusing an oversized one before reading it.
pub fn read_table(path: &Path, block: Option<usize>) -> Result<Table, Failure> {
    let origin = path.display().to_string();
    let meta = std::fs::metadata(path).map_err(|e| bad(&origin, ErrorKind::Io, format!("cannot read: {e}")))?;
    if meta.len() > MAX_IMPORT_BYTES {
        return Err(bad(&origin, ErrorKind::TooLarge, format!("file is {} bytes; the limit is {MAX_IMPORT_BYTES}", meta.len())));
    }
    let bytes = std::fs::read(path).map_err(|e| bad(&origin, ErrorKind::Io, format!("cannot read: {e}")))?;
    // Instrument files in Latin-1 are common; lossy decoding keeps the numbers.
    let text = String::from_utf8_lossy(&bytes);
    import::read(&text, block).map_err(|e| bad(&origin, ErrorKind::Syntax, e.to_string()))
}

fn choice(flags: &ColumnFlags) -> Result<ColumnChoice, Failure> {
    let axis = flags
        .x_unit
        .as_deref()
        .map(|u| {
            AxisUnit::parse(u).ok_or_else(|| bad("--x-unit", ErrorKind::UnknownName, format!("unknown unit \"{u}\" (use nm, cm-1 or ev)")))
        })
        .transpose()?;
    let measured = match (&flags.quantity, &flags.unit) {
        (None, None) => None,
        (Some(q), Some(u)) => Some(Measured::parse(q, u).ok_or_else(|| {
            bad(
                "--quantity/--data-unit",
                ErrorKind::UnknownName,
                format!("\"{q}\" in \"{u}\" is not known (cd: {}; ord: {}; absorption: {})", cd_keys(), ord_keys(), abs_keys()),
            )
        })?),
        _ => return Err(bad("--quantity/--data-unit", ErrorKind::MissingField, "give both --quantity and --data-unit")),
    };
    let column = match flags.column {
        Some(0) => return Err(bad("--column", ErrorKind::OutOfRange, "columns are counted from 1 after the axis")),
        c => c.map(|c| c - 1),
    };
    Ok(ColumnChoice { axis, column, measured })
}

fn cd_keys() -> String {
    CdUnit::ALL.iter().filter(|u| **u != CdUnit::Dissymmetry).map(|u| u.key()).collect::<Vec<_>>().join(", ")
}
fn ord_keys() -> String {
    OrdUnit::ALL.iter().map(|u| u.key()).collect::<Vec<_>>().join(", ")
}
fn abs_keys() -> String {
    AbsorptionUnit::ALL.iter().map(|u| u.key()).collect::<Vec<_>>().join(", ")
}

/// A column header for the CSV: the unit-bearing name when recognised, the
/// file's own label otherwise (commas and quotes taken out).
fn column_header(kind: Option<ColumnKind>, label: &str, measured: Option<Measured>) -> String {
    match kind {
        Some(ColumnKind::Measured(m)) => m.column_name().to_string(),
        Some(ColumnKind::Axis(a)) => a.column_name().to_string(),
        Some(ColumnKind::DetectorVolts) => "ht_v".to_string(),
        Some(ColumnKind::Uncertainty) => match measured {
            Some(m) => format!("sd_{}", m.column_name()),
            None => "sd".to_string(),
        },
        None => {
            let clean: String = label.chars().filter(|c| !matches!(c, ',' | '"' | '\n' | '\r')).collect();
            if clean.trim().is_empty() {
                "unnamed".to_string()
            } else {
                clean.trim().to_string()
            }
        }
    }
}

pub fn import(path: &Path, flags: &ColumnFlags, out: &mut Vec<u8>, notes: &mut Vec<String>) -> Result<(), Failure> {
    let origin = path.display().to_string();
    let table = read_table(path, flags.block)?;
    let choice = choice(flags)?;
    let axis = choice.axis.or(table.axis).ok_or_else(|| {
        bad(
            &origin,
            ErrorKind::MissingField,
            format!("cannot tell the axis unit from \"{}\"; name it with --x-unit nm|cm-1|ev", table.x_label),
        )
    })?;
    notes.extend(table.notes.iter().cloned());
    let first_measured = table.columns.iter().find_map(|c| match c.kind {
        Some(ColumnKind::Measured(m)) => Some(m),
        _ => None,
    });
    let mut header = vec![axis.column_name().to_string()];
    for (i, c) in table.columns.iter().enumerate() {
        let kind = match (choice.column, choice.measured) {
            (Some(k), Some(m)) if k == i => Some(ColumnKind::Measured(m)),
            (None, Some(m)) if i == 0 && c.kind.is_none() => Some(ColumnKind::Measured(m)),
            _ => c.kind,
        };
        header.push(column_header(kind, &c.label, choice.measured.or(first_measured)));
    }
    let mut text = header.join(",");
    text.push('\n');
    for (k, x) in table.x.iter().enumerate() {
        text.push_str(&number(*x));
        for c in &table.columns {
            text.push(',');
            text.push_str(&number(c.values[k]));
        }
        text.push('\n');
    }
    if table.columns.iter().all(|c| c.kind.is_none()) && choice.measured.is_none() {
        notes.push("no column says what it holds; name the measurement with --quantity cd|ord|absorption --data-unit KEY".into());
    }
    out.extend_from_slice(text.as_bytes());
    Ok(())
}

/// A notional sample (1 mol/L, 1 cm) when no document gives one: the
/// transform between sample units (mdeg <-> deg) and between molar units
/// does not depend on it.
pub(super) fn notional_document() -> Document {
    Document {
        chiroptic: crate::document::FORMAT_VERSION,
        title: String::new(),
        sample: SampleDoc {
            concentration_mol_per_l: 1.0,
            path_length_cm: 1.0,
            molar_mass_g_per_mol: None,
            mean_residue_weight_g_per_mol: None,
            solvent: SolventDoc { constant: Some(1.0), ..SolventDoc::default() },
        },
        bands: Vec::new(),
        view: None,
        data: Vec::new(),
        readings: Vec::new(),
        fit: None,
        systems: Vec::new(),
        states: None,
    }
}

pub struct KkOptions<'a> {
    pub add: Option<&'a Path>,
    pub from: Option<f64>,
    pub to: Option<f64>,
    pub step: Option<f64>,
    pub unit: &'a str,
    pub lines: bool,
}

pub fn kk(path: &Path, flags: &ColumnFlags, o: &KkOptions, out: &mut Vec<u8>) -> Result<(), Failure> {
    let origin = path.display().to_string();
    let table = read_table(path, flags.block)?;
    let recognised = table.recognise(&choice(flags)?).map_err(|e| bad(&origin, ErrorKind::MissingField, e.to_string()))?;
    let (mut doc, model) = match o.add {
        Some(p) => load(p)?,
        None => {
            let d = notional_document();
            let m = Model::from_document(&d).map_err(|e| Failure::input("notional sample", e))?;
            (d, m)
        }
    };
    doc.data =
        vec![data_set_doc("measured", &recognised, SourceDoc { file: origin.clone(), format: table.format.into(), metadata: Vec::new() })];
    let set = data_sets(&doc, &model).map_err(|e| Failure::input(&origin, e))?.remove(0);

    let unit = AxisUnit::parse(o.unit)
        .ok_or_else(|| bad("--unit", ErrorKind::UnknownName, format!("unknown unit \"{}\" (use nm, cm-1 or ev)", o.unit)))?;
    let (axis, x): (AxisUnit, Vec<f64>) = if o.lines {
        (AxisUnit::Nanometre, STANDARD_LINES.iter().map(|l| l.wavelength_nm).collect())
    } else {
        match (o.from, o.to, o.step) {
            (None, None, None) => (set.axis, set.x.clone()),
            (Some(f), Some(t), Some(s)) => {
                let g = Grid::stepped(f, t, s, unit).map_err(|e| Failure::input("grid", e))?;
                (unit, g.wavenumber_cm1.iter().map(|n| unit.from_wavenumber(*n)).collect())
            }
            _ => return Err(bad("grid", ErrorKind::MissingField, "give all of --from, --to and --step, or none")),
        }
    };
    let nu: Vec<f64> = x.iter().map(|v| axis.to_wavenumber(*v)).collect();
    let (name, values) = transformed(&set, &model, &nu).map_err(|e| Failure::input(&origin, e))?;
    let mut text = if o.lines { format!("line,{},{name}\n", axis.column_name()) } else { format!("{},{name}\n", axis.column_name()) };
    for (i, (xi, v)) in x.iter().zip(&values).enumerate() {
        if o.lines {
            text.push_str(STANDARD_LINES[i].name);
            text.push(',');
        }
        text.push_str(&format!("{},{}\n", number(*xi), number(*v)));
    }
    out.extend_from_slice(text.as_bytes());
    Ok(())
}

/// The transformed quantity, in the units that match the data's: sample
/// units give sample units, molar units give molar units.
fn transformed(set: &DataSet, model: &Model, nu: &[f64]) -> crate::error::Result<(&'static str, Vec<f64>)> {
    let ctx = set.context;
    let unit_error = |e: units::UnitError| Error::new(ErrorKind::MissingField, "sample", e.0);
    match set.measured {
        Measured::Cd(u) => {
            let phi = kk::rotation_from_cd(set, &model.bands, nu)?;
            match u {
                CdUnit::Millidegrees | CdUnit::DeltaAbsorbance => Ok((OrdUnit::Degrees.column_name(), phi)),
                _ => Ok((OrdUnit::MolarRotation.column_name(), phi.iter().map(|p| units::molar_rotation_from_degrees(*p, &ctx)).collect())),
            }
        }
        Measured::Ord(u) => {
            let mdeg = kk::ellipticity_from_ord(set, &model.bands, nu)?;
            match u {
                OrdUnit::Degrees => Ok((CdUnit::Millidegrees.column_name(), mdeg)),
                _ => {
                    let molar: Result<Vec<f64>, _> = mdeg
                        .iter()
                        .map(|m| {
                            let de = CdUnit::Millidegrees.to_delta_epsilon(*m, f64::NAN, &ctx)?;
                            CdUnit::MolarEllipticity.from_delta_epsilon(de, f64::NAN, &ctx)
                        })
                        .collect();
                    Ok((CdUnit::MolarEllipticity.column_name(), molar.map_err(unit_error)?))
                }
            }
        }
        Measured::Absorption(_) => Err(Error::new(
            ErrorKind::OutOfRange,
            "data",
            "absorption data have no chiral Kramers-Kronig partner here; give CD or ORD data",
        )),
    }
}
