//! Computed transitions as sticks on the CD and absorption plots: each at
//! its (shifted) excitation energy and as tall as its own broadened band's
//! peak in the plot's unit, so that sticks and curve share one axis (and a
//! lone transition's stick meets its curve's top).

use super::draw::{Chart, XAxis};
use super::layout::Layout;
use super::scale::AxisScale;
use super::style::Theme;
use super::{draw_error, PlotKind, PlotRequest};
use crate::error::Result;
use crate::spectra::{chiral_scale, epsilon_from_k, mean_scale};
use crate::units::CdUnit;
use plotters::prelude::*;

/// (x in axis units, height in the plot's unit) of each computed transition
/// the request's plot shows sticks for; none on ORD, index and g plots.
pub fn sticks(req: &PlotRequest) -> Vec<(f64, f64)> {
    let s = req.spectra;
    let Some(states) = &s.states else { return Vec::new() };
    let c = s.context.concentration_mol_per_l;
    let peak = |scale: f64, strength: f64, b: &crate::model::Band| {
        let nu = b.lineshape.center();
        (nu, epsilon_from_k(scale * strength * b.lineshape.value(nu).im, nu, c))
    };
    let at = |nu: f64| req.axis.from_wavenumber(nu);
    match req.kind {
        PlotKind::Cd if req.cd_unit != CdUnit::Dissymmetry => states
            .bands
            .iter()
            .filter_map(|b| {
                let (nu, de) = peak(chiral_scale(c), b.rotatory_strength_esu2_cm2, b);
                req.cd_unit.from_delta_epsilon(de, f64::NAN, &s.context).ok().map(|v| (at(nu), v))
            })
            .collect(),
        PlotKind::Absorption => states
            .bands
            .iter()
            .map(|b| {
                let (nu, e) = peak(mean_scale(c), b.dipole_strength_esu2_cm2, b);
                (at(nu), e)
            })
            .collect(),
        _ => Vec::new(),
    }
}

/// The value range widened to hold every visible stick.
pub fn widen((lo, hi): (f64, f64), sticks: &[(f64, f64)], (x_lo, x_hi): (f64, f64)) -> (f64, f64) {
    sticks.iter().filter(|(x, h)| *x >= x_lo && *x <= x_hi && h.is_finite()).fold((lo, hi), |(lo, hi), (_, h)| (lo.min(*h), hi.max(*h)))
}

/// Draws the visible sticks from the zero line, thin, in the muted colour,
/// as one path (up each stick, back down, along zero to the next): a path
/// per stick made the page stroke a thousand paths per plot. The path's runs
/// along zero lie under the zero line (or the frame), drawn after it.
pub fn draw<DB: DrawingBackend>(
    chart: &mut Chart<'_, DB>,
    layout: &Layout,
    theme: &Theme,
    sticks: &[(f64, f64)],
    x: &XAxis,
    y: &AxisScale,
) -> Result<()> {
    let mut shown: Vec<(f64, f64)> =
        sticks.iter().filter(|(px, h)| *px >= x.lo && *px <= x.hi && h.is_finite()).map(|(px, h)| (px * x.sign, h * y.factor)).collect();
    if shown.is_empty() {
        return Ok(());
    }
    shown.sort_by(|a, b| a.0.total_cmp(&b.0));
    let path: Vec<(f64, f64)> = shown.iter().flat_map(|&(px, h)| [(px, 0.0), (px, h), (px, 0.0)]).collect();
    let style = ShapeStyle::from(&theme.muted).stroke_width(layout.line_scale.round().max(1.0) as u32);
    chart.draw_series(std::iter::once(PathElement::new(path, style))).map_err(draw_error)?;
    Ok(())
}
