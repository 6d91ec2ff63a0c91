//! Measured spectra from files: one parser per format, each a pure function
//! from text to data.

pub mod jcamp;
