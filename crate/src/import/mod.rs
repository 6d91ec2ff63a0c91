//! Measured spectra from files: one parser per format, each a pure function
//! from text to a [`Table`] (axis, columns, what each column holds), and the
//! choice of which column is the measurement.
//!
//! - `delimited`: text tables as instruments and spreadsheets write them;
//! - `jcamp`: JCAMP-DX (IUPAC);
//! - `columns`: recognising quantity and unit from a column header.

pub mod columns;
pub mod delimited;
pub mod jcamp;

use crate::units::{AbsorptionUnit, AxisUnit, CdUnit, OrdUnit};
use std::fmt;

pub use columns::ColumnKind;

pub use crate::limits::{MAX_IMPORT_BYTES, MAX_POINTS};

/// What a measured value is, with its unit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Measured {
    Cd(CdUnit),
    Ord(OrdUnit),
    Absorption(AbsorptionUnit),
}

impl Measured {
    /// The family: `cd`, `ord` or `absorption` (the plot it belongs on).
    pub fn quantity(self) -> &'static str {
        match self {
            Measured::Cd(_) => "cd",
            Measured::Ord(_) => "ord",
            Measured::Absorption(_) => "absorption",
        }
    }

    /// The unit key, as documents store it.
    pub fn unit_key(self) -> &'static str {
        match self {
            Measured::Cd(u) => u.key(),
            Measured::Ord(u) => u.key(),
            Measured::Absorption(u) => u.key(),
        }
    }

    pub fn column_name(self) -> &'static str {
        match self {
            Measured::Cd(u) => u.column_name(),
            Measured::Ord(u) => u.column_name(),
            Measured::Absorption(u) => u.column_name(),
        }
    }

    /// From a document's quantity and unit keys.
    pub fn parse(quantity: &str, unit: &str) -> Option<Measured> {
        match quantity {
            "cd" => CdUnit::parse(unit).filter(|u| *u != CdUnit::Dissymmetry).map(Measured::Cd),
            "ord" => OrdUnit::parse(unit).map(Measured::Ord),
            "absorption" => AbsorptionUnit::parse(unit).map(Measured::Absorption),
            _ => None,
        }
    }
}

/// One column of an imported table.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    /// The header as the file writes it (empty when the file has none).
    pub label: String,
    /// What the header says the column holds, when it could tell.
    pub kind: Option<ColumnKind>,
    pub values: Vec<f64>,
}

/// A table read from a file: the spectral axis and the other columns.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    /// Lines before (and after) the numbers: instrument, date, settings ...
    pub metadata: Vec<String>,
    pub x_label: String,
    /// The axis unit, when the header or file says it.
    pub axis: Option<AxisUnit>,
    pub x: Vec<f64>,
    pub columns: Vec<Column>,
    /// What the reader noticed and worked around, for the user.
    pub notes: Vec<String>,
    /// The file format: `delimited` or `jcamp-dx`.
    pub format: &'static str,
}

/// Why a file cannot be read: the line (from 1; 0 for the file as a whole)
/// and what was expected.
#[derive(Debug, Clone, PartialEq)]
pub struct ImportError {
    pub line: usize,
    pub message: String,
}

impl ImportError {
    pub fn whole(message: impl Into<String>) -> ImportError {
        ImportError { line: 0, message: message.into() }
    }

    pub fn at(line: usize, message: impl Into<String>) -> ImportError {
        ImportError { line, message: message.into() }
    }
}

impl fmt::Display for ImportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.line == 0 {
            f.write_str(&self.message)
        } else {
            write!(f, "line {}: {}", self.line, self.message)
        }
    }
}

/// Which columns the user names, where the header does not tell (CLI flags,
/// the page's column picker).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ColumnChoice {
    pub axis: Option<AxisUnit>,
    /// Index among `Table::columns` (0 = the first column after the axis).
    pub column: Option<usize>,
    pub measured: Option<Measured>,
}

/// A table reduced to what a data set holds: the axis, the measurement, and
/// the optional uncertainty and detector-voltage columns.
#[derive(Debug, Clone, PartialEq)]
pub struct Recognised {
    pub axis: AxisUnit,
    pub x: Vec<f64>,
    pub measured: Measured,
    pub y: Vec<f64>,
    pub sd: Option<Vec<f64>>,
    pub ht_v: Option<Vec<f64>>,
    pub label: String,
}

/// Sniffs the format: JCAMP-DX when the first labelled line is `##TITLE=`
/// (or any `##` label), else delimited text.
pub fn read(text: &str, block: Option<usize>) -> Result<Table, ImportError> {
    let trimmed = text.trim_start_matches('\u{feff}').trim_start();
    let table = if trimmed.starts_with("##") {
        jcamp_table(text, block)?
    } else {
        if block.is_some() {
            return Err(ImportError::whole("--block applies to JCAMP-DX files only; this is delimited text"));
        }
        delimited::parse(text)?
    };
    table.check_axis()?;
    Ok(table)
}

fn jcamp_table(text: &str, block: Option<usize>) -> Result<Table, ImportError> {
    let blocks = jcamp::parse(text).map_err(|e| ImportError::at(e.line, e.message))?;
    if blocks.is_empty() {
        return Err(ImportError::whole("the JCAMP-DX file holds no XYDATA or XYPOINTS block"));
    }
    let index = match block {
        Some(0) => return Err(ImportError::whole("blocks are counted from 1")),
        Some(n) if n > blocks.len() => return Err(ImportError::whole(format!("block {n} asked for; the file has {}", blocks.len()))),
        Some(n) => n - 1,
        None if blocks.len() > 1 => {
            return Err(ImportError::whole(format!(
                "the file holds {} data blocks; choose one with --block N (1 to {})",
                blocks.len(),
                blocks.len()
            )))
        }
        None => 0,
    };
    let b = &blocks[index];
    let x_units = b.x_units.clone().unwrap_or_default();
    let y_units = b.y_units.clone().unwrap_or_default();
    let mut metadata: Vec<String> = b.labels.iter().map(|(k, v)| format!("##{k}={v}")).collect();
    metadata.insert(0, format!("##TITLE={}", b.title));
    Ok(Table {
        metadata,
        x_label: x_units.clone(),
        axis: columns::jcamp_axis(&x_units),
        x: b.x.clone(),
        columns: vec![Column { label: y_units.clone(), kind: columns::jcamp_kind(&y_units), values: b.y.clone() }],
        notes: b.notes.clone(),
        format: "jcamp-dx",
    })
}

impl Table {
    /// Chooses the axis and measured column, from the header where it tells
    /// and from `choice` where the user names them; says which flag to use
    /// when neither does.
    /// Wavelengths, wavenumbers and photon energies are all positive; a
    /// table that says otherwise is refused on reading, not when it joins a model.
    fn check_axis(&self) -> Result<(), ImportError> {
        match self.x.iter().find(|v| v.is_nan() || **v <= 0.0) {
            Some(bad) => Err(ImportError::whole(format!("axis values must be positive (found {bad} in \"{}\")", self.x_label))),
            None => Ok(()),
        }
    }

    pub fn recognise(&self, choice: &ColumnChoice) -> Result<Recognised, ImportError> {
        let axis = choice.axis.or(self.axis).ok_or_else(|| {
            ImportError::whole(format!("cannot tell the axis unit from \"{}\"; name it with --x-unit nm|cm-1|ev", self.x_label))
        })?;
        let index = match choice.column {
            Some(i) if i >= self.columns.len() => {
                return Err(ImportError::whole(format!(
                    "column {} asked for; the file has {} after the axis",
                    i + 1,
                    self.columns.len()
                )))
            }
            Some(i) => i,
            None => self
                .columns
                .iter()
                .position(|c| matches!(c.kind, Some(ColumnKind::Measured(_))))
                .or_else(|| (choice.measured.is_some() && !self.columns.is_empty()).then_some(0))
                .ok_or_else(|| {
                    let labels: Vec<String> = self.columns.iter().map(|c| format!("\"{}\"", c.label)).collect();
                    ImportError::whole(format!(
                        "cannot tell what the columns hold ({}); name the measurement with --quantity cd|ord|absorption --data-unit KEY (and --column N, counted from 1 after the axis)",
                        if labels.is_empty() { "none".to_string() } else { labels.join(", ") }
                    ))
                })?,
        };
        let column = &self.columns[index];
        let measured = match (choice.measured, column.kind) {
            (Some(m), _) => m,
            (None, Some(ColumnKind::Measured(m))) => m,
            (None, _) => {
                return Err(ImportError::whole(format!(
                    "cannot tell the quantity and unit of \"{}\"; name them with --quantity cd|ord|absorption --data-unit KEY",
                    column.label
                )))
            }
        };
        let find =
            |want: fn(&ColumnKind) -> bool| self.columns.iter().find(|c| c.kind.as_ref().is_some_and(want)).map(|c| c.values.clone());
        Ok(Recognised {
            axis,
            x: self.x.clone(),
            measured,
            y: column.values.clone(),
            sd: find(|k| matches!(k, ColumnKind::Uncertainty)),
            ht_v: find(|k| matches!(k, ColumnKind::DetectorVolts)),
            label: column.label.clone(),
        })
    }
}
