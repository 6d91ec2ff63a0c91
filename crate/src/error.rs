//! Typed errors: bad input is a value that names the field at fault.

use std::fmt;

/// What kind of problem a field has; the page and the CLI show the message,
/// tests and callers match on the kind.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ErrorKind {
    /// Not valid JSON, or a value of the wrong type.
    Syntax,
    /// A field this version of the format does not know.
    UnknownField,
    /// A required field is absent.
    MissingField,
    /// A document of a major version this build cannot read.
    UnknownVersion,
    /// NaN or infinity.
    NotFinite,
    /// Zero or negative where only positive values make sense.
    NotPositive,
    /// A finite value outside the range the model supports.
    OutOfRange,
    /// A lineshape, preset or unit name that does not exist.
    UnknownName,
    /// Input larger than this tool accepts.
    TooLarge,
    /// Anything that is not the user's input (I/O and the like).
    Io,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Error {
    pub kind: ErrorKind,
    /// Path of the field at fault, e.g. `bands[1].fwhm_cm1` (may be empty).
    pub field: String,
    pub message: String,
}

impl Error {
    pub fn new(kind: ErrorKind, field: impl Into<String>, message: impl Into<String>) -> Error {
        Error { kind, field: field.into(), message: message.into() }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.field.is_empty() {
            f.write_str(&self.message)
        } else {
            write!(f, "{}: {}", self.field, self.message)
        }
    }
}

impl std::error::Error for Error {}

pub type Result<T> = std::result::Result<T, Error>;

/// Checks that a value is finite and strictly positive.
pub fn positive(field: &str, value: f64, what: &str) -> Result<f64> {
    finite(field, value)?;
    if value <= 0.0 {
        return Err(Error::new(ErrorKind::NotPositive, field, format!("{what} must be positive (got {value})")));
    }
    Ok(value)
}

/// Checks that a value is positive and at most `max` (a cap of `limits`).
pub fn positive_at_most(field: &str, value: f64, max: f64, what: &str) -> Result<f64> {
    positive(field, value, what)?;
    if value > max {
        return Err(Error::new(ErrorKind::OutOfRange, field, format!("{what} must be at most {max} (got {value})")));
    }
    Ok(value)
}

/// Checks that a value is finite.
pub fn finite(field: &str, value: f64) -> Result<f64> {
    if !value.is_finite() {
        return Err(Error::new(ErrorKind::NotFinite, field, format!("must be a finite number (got {value})")));
    }
    Ok(value)
}
