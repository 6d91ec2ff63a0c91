//! Measured data beside the model on the plots: each shown data set in the
//! plot's axis and unit (through `data`'s conversions), with its residual
//! (data − model, CD and ORD) from the model evaluated at the set's own
//! points. The page, the SVG export and the CLI render draw the same
//! overlay, so the three pictures agree.

use crate::data::{self, DataSet};
use crate::document::Document;
use crate::error::{Error, ErrorKind, Result};
use crate::import::Measured;
use crate::model::Model;
use crate::spectra::{evaluate, MAX_GRID_POINTS};
use crate::units::AbsorptionUnit;
use crate::view::{PlotKind, View};

/// One data set as drawn on one plot.
#[derive(Debug, Clone, PartialEq)]
pub struct PointSet {
    pub name: String,
    pub plot: PlotKind,
    /// Position in the document's data list (the marker follows it).
    pub index: usize,
    /// Axis positions in the view's axis unit.
    pub x: Vec<f64>,
    /// Values in the plot's unit.
    pub y: Vec<f64>,
    /// Data − model at the same points, CD and ORD; None where the model
    /// cannot be evaluated there (outside the solvent's range, too many points).
    pub residual: Option<Vec<f64>>,
    /// A set computed from another (Kramers-Kronig): drawn as a line.
    pub derived: bool,
}

/// Source format of data sets the tool computed (Kramers-Kronig predictions).
pub const DERIVED_FORMAT: &str = "kramers-kronig";

/// The plot a measured quantity belongs on.
pub fn plot_of(m: Measured) -> PlotKind {
    match m {
        Measured::Cd(_) => PlotKind::Cd,
        Measured::Ord(_) => PlotKind::Ord,
        Measured::Absorption(_) => PlotKind::Absorption,
    }
}

fn unit_error(i: usize, e: crate::units::UnitError) -> Error {
    Error::new(ErrorKind::MissingField, format!("data[{i}]"), e.0)
}

/// Every shown data set of `doc` on the plot it belongs on, in `view`'s units.
pub fn point_sets(doc: &Document, model: &Model, view: &View) -> Result<Vec<PointSet>> {
    let sets = data::data_sets(doc, model)?;
    let display = model.sample.context;
    let mut out = Vec::new();
    for (i, set) in sets.iter().enumerate().filter(|(_, s)| !s.hidden) {
        let plot = plot_of(set.measured);
        let nu = set.wavenumbers();
        let y = plotted(set, plot, view, &display).map_err(|e| unit_error(i, e))?;
        let residual = residual(model, plot, view, &nu, &y);
        let derived = doc.data[i].source.as_ref().is_some_and(|s| s.format == DERIVED_FORMAT);
        let x = nu.iter().map(|n| view.axis.from_wavenumber(*n)).collect();
        out.push(PointSet { name: set.name.clone(), plot, index: i, x, y, residual, derived });
    }
    Ok(out)
}

fn plotted(
    set: &DataSet,
    plot: PlotKind,
    view: &View,
    display: &crate::units::SampleContext,
) -> std::result::Result<Vec<f64>, crate::units::UnitError> {
    match plot {
        PlotKind::Cd => set.cd_in(view.cd_unit, display),
        PlotKind::Ord => set.ord_in(view.ord_unit, display),
        _ => set.absorption_in(AbsorptionUnit::MolarAbsorption, display),
    }
}

fn residual(model: &Model, plot: PlotKind, view: &View, nu: &[f64], y: &[f64]) -> Option<Vec<f64>> {
    if !matches!(plot, PlotKind::Cd | PlotKind::Ord) || nu.len() > MAX_GRID_POINTS {
        return None;
    }
    let s = evaluate(model, nu).ok()?;
    let m = if plot == PlotKind::Cd { s.cd_in(view.cd_unit).ok()? } else { s.ord_in(view.ord_unit).ok()? };
    Some(y.iter().zip(&m).map(|(d, m)| d - m).collect())
}

/// The root mean square of a residual (finite values only).
pub fn rms(values: &[f64]) -> Option<f64> {
    let finite: Vec<f64> = values.iter().copied().filter(|v| v.is_finite()).collect();
    (!finite.is_empty()).then(|| (finite.iter().map(|v| v * v).sum::<f64>() / finite.len() as f64).sqrt())
}
