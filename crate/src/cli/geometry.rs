//! Coupled-system geometry as a plain table, both ways (see coupled::table).

use super::{load, Failure};
use crate::coupled::table;
use crate::document::Document;
use crate::error::{Error, ErrorKind};
use crate::model::Model;
use std::path::Path;

/// Reads a geometry table into a system of `into` (or a notional document)
/// and writes the document, validated, as JSON.
pub(super) fn import(path: &Path, into: Option<&Path>, name: &str, out: &mut Vec<u8>) -> Result<(), Failure> {
    let origin = path.display().to_string();
    let text =
        std::fs::read_to_string(path).map_err(|e| Failure::input(&origin, Error::new(ErrorKind::Io, "", format!("cannot read: {e}"))))?;
    let system = table::parse(&text, name).map_err(|e| Failure::input(&origin, e))?;
    let mut doc = match into {
        Some(p) => load(p)?.0,
        None => super::measured::notional_document(),
    };
    doc.systems.push(system);
    Model::from_document(&doc).map_err(|e| Failure::input(&origin, e))?;
    out.extend_from_slice(doc.to_json_pretty().as_bytes());
    out.push(b'\n');
    Ok(())
}

/// Writes one system of a document as a geometry table.
pub(super) fn export(path: &Path, system: usize, out: &mut Vec<u8>) -> Result<(), Failure> {
    let (doc, _) = load(path)?;
    let s = pick(&doc, system).map_err(|e| Failure::input(&path.display().to_string(), e))?;
    out.extend_from_slice(table::write(s).as_bytes());
    Ok(())
}

fn pick(doc: &Document, system: usize) -> Result<&crate::document::SystemDoc, Error> {
    doc.systems
        .get(system)
        .ok_or_else(|| Error::new(ErrorKind::OutOfRange, "systems", format!("no system {system} (the document has {})", doc.systems.len())))
}
