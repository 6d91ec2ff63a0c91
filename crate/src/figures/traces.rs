//! The traces of a plot: the sum(s) in the text colour and each band's
//! contribution in its palette colour, as values per grid point (NaN where
//! a quantity is undefined, e.g. g where there is no absorption: a gap).

use super::style::{band_colour, Theme};
use super::{PlotKind, PlotRequest, DELTA_N_NAME, MEAN_INDEX_NAME, SUM_NAME};
use crate::error::{Error, ErrorKind, Result};
use crate::units::UnitError;
use plotters::style::RGBColor;

/// One line to draw: values per grid point (NaN where undefined).
pub struct Trace {
    pub name: String,
    pub values: Vec<f64>,
    pub colour: RGBColor,
    pub width: f64,
    pub dashed: bool,
    /// Drawn against the right axis.
    pub secondary: bool,
}

fn unit_error(field: &str, e: UnitError) -> Error {
    Error::new(ErrorKind::MissingField, field, e.0)
}

/// The traces of a request: sums first (drawn last, on top), then bands.
pub fn traces(req: &PlotRequest, theme: &Theme) -> Result<(Vec<Trace>, Vec<Trace>)> {
    let s = req.spectra;
    let n_bands = s.bands.len();
    let wanted = |i: usize| req.show_contributions || req.highlight == Some(i);
    let band_width = |i: usize| if req.highlight == Some(i) { 2.4 } else { 1.0 };
    let band = |i: usize, values: Vec<f64>, secondary: bool| Trace {
        name: s.bands.get(i).map(|b| b.name.clone()).unwrap_or_default(),
        values,
        colour: band_colour(i),
        width: band_width(i),
        dashed: false,
        secondary,
    };
    let sum = |name: &str, values: Vec<f64>| Trace {
        name: name.to_string(),
        values,
        colour: theme.text,
        width: 2.0,
        dashed: false,
        secondary: false,
    };
    let mut bands = Vec::new();
    let sums = match req.kind {
        PlotKind::Cd => {
            let total = s.cd_in(req.cd_unit).map_err(|e| unit_error("view.cd_unit", e))?;
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                let v = s.band_cd_in(i, req.cd_unit).map_err(|e| unit_error("view.cd_unit", e))?;
                bands.push(band(i, v, false));
            }
            vec![sum(SUM_NAME, total)]
        }
        PlotKind::Ord => {
            let total = s.ord_in(req.ord_unit).map_err(|e| unit_error("view.ord_unit", e))?;
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                let v = s.band_ord_in(i, req.ord_unit).map_err(|e| unit_error("view.ord_unit", e))?;
                bands.push(band(i, v, false));
            }
            vec![sum(SUM_NAME, total)]
        }
        PlotKind::Absorption => {
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                bands.push(band(i, s.band_epsilon(i).map_err(|e| unit_error("bands", e))?, false));
            }
            vec![sum(SUM_NAME, s.epsilon.clone())]
        }
        PlotKind::Index => {
            for i in (0..n_bands).filter(|i| wanted(*i)) {
                bands.push(band(i, s.band_delta_n(i).map_err(|e| unit_error("bands", e))?, true));
            }
            // n_L and n_R differ by ~1e-8 beside n ~ 1.4: the plot shows what
            // the bands add to the solvent's index, and Δn on its own axis.
            let mean = s.n_left.iter().zip(&s.n_right).zip(&s.n_solvent).map(|((l, r), n0)| (l + r) / 2.0 - n0).collect();
            let mut dn = sum(DELTA_N_NAME, s.delta_n.clone());
            dn.colour = theme.muted;
            dn.width = 1.6;
            dn.secondary = true;
            vec![sum(MEAN_INDEX_NAME, mean), dn]
        }
    };
    Ok((sums, bands))
}

/// Axis positions of the grid points.
pub fn axis_positions(req: &PlotRequest) -> Vec<f64> {
    req.spectra.wavenumber_cm1.iter().map(|nu| req.axis.from_wavenumber(*nu)).collect()
}

/// Splits a trace into runs of finite points inside the shown range.
pub fn segments(xs: &[f64], values: &[f64], visible: &[bool], x_sign: f64, y_scale: f64) -> Vec<Vec<(f64, f64)>> {
    let mut out = Vec::new();
    let mut run = Vec::new();
    for ((x, v), vis) in xs.iter().zip(values).zip(visible) {
        let y = v * y_scale;
        if *vis && y.is_finite() {
            run.push((x * x_sign, y));
        } else if !run.is_empty() {
            out.push(std::mem::take(&mut run));
        }
    }
    if !run.is_empty() {
        out.push(run);
    }
    out
}

/// One entry of a plot's key for the summed traces (bands are named by the
/// band list, in their colours).
#[derive(Debug, Clone, PartialEq)]
pub struct KeyEntry {
    pub name: &'static str,
    pub colour: RGBColor,
    /// Drawn against the right axis.
    pub right_axis: bool,
}

/// The summed traces of a plot, as `traces` draws them.
pub fn sum_key(kind: PlotKind, theme: &Theme) -> Vec<KeyEntry> {
    let entry = |name, colour, right_axis| KeyEntry { name, colour, right_axis };
    match kind {
        PlotKind::Index => vec![entry(MEAN_INDEX_NAME, theme.text, false), entry(DELTA_N_NAME, theme.muted, true)],
        _ => vec![entry(SUM_NAME, theme.text, false)],
    }
}
