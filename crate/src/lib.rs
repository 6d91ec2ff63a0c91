//! chiroptic: left- and right-circular refractive indices of a sample from
//! damped oscillators with chiral coupling, and the CD and ORD that follow.
//!
//! Data flow: [`document::Document`] (JSON, share link) -> [`model::Model`]
//! (validated, canonical units) -> [`spectra::evaluate`] on a grid ->
//! [`spectra::Spectra`] -> CSV, figures, the page.

pub mod band_sum;
pub mod colour;
pub mod coupled;
pub mod data;
pub mod document;
pub mod error;
pub mod figures;
pub mod fit;
pub mod import;
pub mod kk;
pub mod limits;
pub mod lines;
pub mod lineshape;
pub mod link;
pub mod model;
pub mod overlay;
pub mod processing;
pub mod similarity;
pub mod solvent;
pub mod spectra;
pub mod states;
pub mod table;
pub mod units;
pub mod view;

#[cfg(not(target_arch = "wasm32"))]
pub mod cli;

#[cfg(target_arch = "wasm32")]
pub mod wasm;

pub use document::Document;
pub use error::{Error, ErrorKind, Result};
pub use model::Model;
pub use spectra::{evaluate, Grid, Spectra};
