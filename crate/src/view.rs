//! How a model is shown: the plots, the spectral axis, the window, the grid
//! and the CD and ORD units. A document's `view` is checked and resolved
//! here, once, with one set of defaults, for the page, share links and
//! `chiroptic render` alike. This module knows nothing of drawing.

use crate::document::{Document, ViewDoc, DEFAULT_VIEW_POINTS};
use crate::error::{positive, Error, ErrorKind, Result};
use crate::model::{Model, MAX_CENTER_NM, MIN_CENTER_NM};
use crate::spectra::{Grid, MAX_GRID_POINTS};
use crate::units::{AxisUnit, CdUnit, OrdUnit};

/// The four plots of the workbench.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PlotKind {
    Cd,
    Ord,
    Absorption,
    Index,
}

impl PlotKind {
    pub const ALL: [PlotKind; 4] = [PlotKind::Cd, PlotKind::Ord, PlotKind::Absorption, PlotKind::Index];

    /// Short machine name used in documents, links and the CLI.
    pub fn key(self) -> &'static str {
        match self {
            PlotKind::Cd => "cd",
            PlotKind::Ord => "ord",
            PlotKind::Absorption => "abs",
            PlotKind::Index => "index",
        }
    }

    pub fn parse(key: &str) -> Option<PlotKind> {
        PlotKind::ALL.into_iter().find(|k| k.key() == key)
    }

    /// A human name for headings and menus.
    pub fn title(self) -> &'static str {
        match self {
            PlotKind::Cd => "Circular dichroism",
            PlotKind::Ord => "Optical rotatory dispersion",
            PlotKind::Absorption => "Absorption",
            PlotKind::Index => "Refractive indices",
        }
    }

    /// A short name for toggles and buttons.
    pub fn name(self) -> &'static str {
        match self {
            PlotKind::Cd => "CD",
            PlotKind::Ord => "ORD",
            PlotKind::Absorption => "Absorption",
            PlotKind::Index => "Indices",
        }
    }
}

/// The keys of `all`, for "known: ..." messages.
fn known<T: Copy, const N: usize>(all: [T; N], key: fn(T) -> &'static str) -> String {
    all.map(key).join(", ")
}

fn unknown(field: &str, value: &str, known: String) -> Error {
    Error::new(ErrorKind::UnknownName, field, format!("unknown name \"{value}\" (known: {known})"))
}

/// The axis units a view may name.
pub const AXIS_UNITS: [AxisUnit; 3] = [AxisUnit::Nanometre, AxisUnit::Wavenumber, AxisUnit::ElectronVolt];

/// The key of an axis unit in documents and links (`nm`, `cm-1`, `ev`).
pub fn axis_key(u: AxisUnit) -> &'static str {
    match u {
        AxisUnit::Nanometre => "nm",
        AxisUnit::Wavenumber => "cm-1",
        AxisUnit::ElectronVolt => "ev",
    }
}

/// Checks the names and numbers of a view, naming the field at fault.
pub fn check(view: &ViewDoc) -> Result<()> {
    if let Some(a) = &view.axis_unit {
        AxisUnit::parse(a).ok_or_else(|| unknown("view.axis_unit", a, known(AXIS_UNITS, axis_key)))?;
    }
    if let Some(u) = &view.cd_unit {
        CdUnit::parse(u).ok_or_else(|| unknown("view.cd_unit", u, known(CdUnit::ALL, CdUnit::key)))?;
    }
    if let Some(u) = &view.ord_unit {
        OrdUnit::parse(u).ok_or_else(|| unknown("view.ord_unit", u, known(OrdUnit::ALL, OrdUnit::key)))?;
    }
    if let Some(plots) = &view.plots {
        check_plots(plots)?;
    }
    if let Some([a, b]) = view.range_nm {
        for (i, v) in [a, b].into_iter().enumerate() {
            positive(&format!("view.range_nm[{i}]"), v, "range end")?;
        }
        if a == b {
            return Err(Error::new(ErrorKind::OutOfRange, "view.range_nm", format!("the range is empty ({a} to {b} nm)")));
        }
    }
    if let Some(p) = view.points {
        if !(2..=MAX_GRID_POINTS).contains(&(p as usize)) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                "view.points",
                format!("number of points must lie in 2..{MAX_GRID_POINTS} (got {p})"),
            ));
        }
    }
    Ok(())
}

fn check_plots(plots: &[String]) -> Result<()> {
    if plots.len() > PlotKind::ALL.len() {
        return Err(Error::new(ErrorKind::TooLarge, "view.plots", format!("at most {} plots", PlotKind::ALL.len())));
    }
    for (i, p) in plots.iter().enumerate() {
        let field = format!("view.plots[{i}]");
        PlotKind::parse(p).ok_or_else(|| unknown(&field, p, known(PlotKind::ALL, PlotKind::key)))?;
        if plots[..i].contains(p) {
            return Err(Error::new(ErrorKind::OutOfRange, field, format!("\"{p}\" is listed twice")));
        }
    }
    Ok(())
}

/// A view with every choice made.
#[derive(Debug, Clone, PartialEq)]
pub struct View {
    pub axis: AxisUnit,
    /// Shown range in axis units, smaller value first.
    pub x_range: (f64, f64),
    /// Shown range in nm, shorter wavelength first.
    pub range_nm: (f64, f64),
    pub points: usize,
    pub cd_unit: CdUnit,
    pub ord_unit: OrdUnit,
    pub plots: Vec<PlotKind>,
}

/// Sample data a unit may need that a model can lack.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NeedsSample {
    MolarMass,
    MeanResidueWeight,
}

impl NeedsSample {
    /// A stable key (`needs_molar_mass`, `needs_mean_residue_weight`).
    pub fn key(self) -> &'static str {
        match self {
            NeedsSample::MolarMass => "needs_molar_mass",
            NeedsSample::MeanResidueWeight => "needs_mean_residue_weight",
        }
    }
}

/// The defaults of a view that names nothing.
pub const DEFAULT_CD_UNIT: CdUnit = CdUnit::Millidegrees;
pub const DEFAULT_ORD_UNIT: OrdUnit = OrdUnit::Degrees;
pub const DEFAULT_AXIS: AxisUnit = AxisUnit::Nanometre;

impl View {
    /// Checks `view` and makes every choice it leaves open. A unit that needs
    /// sample data the model lacks (a molar mass, a mean residue weight) is
    /// refused here, naming the view field, before anything is drawn.
    pub fn resolve(view: Option<&ViewDoc>, model: &Model) -> Result<View> {
        let view = View::choose(view, model)?;
        view.check_units(model)?;
        Ok(view)
    }

    /// Checks `view` and makes its choices, without asking whether the model
    /// has the sample data its units need (see [`View::lacking`]).
    pub fn choose(view: Option<&ViewDoc>, model: &Model) -> Result<View> {
        let empty = ViewDoc::default();
        let v = view.unwrap_or(&empty);
        check(v)?;
        let axis = v.axis_unit.as_deref().and_then(AxisUnit::parse).unwrap_or(DEFAULT_AXIS);
        let (a, b) = match v.range_nm {
            Some([a, b]) => (a, b),
            None => Grid::default_range_nm(model),
        };
        let (lo_nm, hi_nm) = (a.min(b), a.max(b));
        // Stricter than "two different ends": a window too narrow to draw.
        if hi_nm - lo_nm < hi_nm * 1e-6 {
            return Err(Error::new(ErrorKind::OutOfRange, "view.range_nm", format!("the range is empty ({a} to {b} nm)")));
        }
        let view = View {
            axis,
            x_range: axis_range(axis, (lo_nm, hi_nm)),
            range_nm: (lo_nm, hi_nm),
            points: v.points.unwrap_or(DEFAULT_VIEW_POINTS) as usize,
            cd_unit: v.cd_unit.as_deref().and_then(CdUnit::parse).unwrap_or(DEFAULT_CD_UNIT),
            ord_unit: v.ord_unit.as_deref().and_then(OrdUnit::parse).unwrap_or(DEFAULT_ORD_UNIT),
            plots: match &v.plots {
                None => PlotKind::ALL.to_vec(),
                Some(keys) => keys.iter().filter_map(|k| PlotKind::parse(k)).collect(),
            },
        };
        Ok(view)
    }

    /// The unit conversions that need sample data fail here, not mid-drawing.
    fn check_units(&self, model: &Model) -> Result<()> {
        let ctx = model.sample.context;
        self.cd_unit.from_delta_epsilon(1.0, 1.0, &ctx).map_err(|e| Error::new(ErrorKind::MissingField, "view.cd_unit", e.to_string()))?;
        self.ord_unit.from_degrees(1.0, 1.0, &ctx).map_err(|e| Error::new(ErrorKind::MissingField, "view.ord_unit", e.to_string()))?;
        Ok(())
    }

    /// The sample data the view's CD or ORD unit needs and the model lacks:
    /// (the view field that chose the unit, the unit's quantity as labelled,
    /// what is missing), for each face to word in its own way.
    pub fn lacking(&self, model: &Model) -> Option<(&'static str, &'static str, NeedsSample)> {
        let ctx = &model.sample.context;
        let quantity = |label: &'static str| label.split(" / ").next().unwrap_or(label);
        if self.cd_unit.from_delta_epsilon(1.0, 1.0, ctx).is_err() {
            let needs = if ctx.mean_residue_weight_g_per_mol.is_none() { NeedsSample::MeanResidueWeight } else { NeedsSample::MolarMass };
            return Some(("view.cd_unit", quantity(self.cd_unit.label()), needs));
        }
        if self.ord_unit.from_degrees(1.0, 1.0, ctx).is_err() {
            return Some(("view.ord_unit", quantity(self.ord_unit.label()), NeedsSample::MolarMass));
        }
        None
    }

    /// The view's grid: `points` evenly spaced in the axis unit.
    pub fn grid(&self) -> Result<Grid> {
        Grid::linspace(self.x_range.0, self.x_range.1, self.points, self.axis)
    }

    /// The same window with a given x range (in axis units, either order).
    pub fn with_x_range(&self, (a, b): (f64, f64)) -> View {
        let to_nm = |x: f64| AxisUnit::Nanometre.from_wavenumber(self.axis.to_wavenumber(x));
        let (p, q) = (to_nm(a), to_nm(b));
        View { x_range: (a.min(b), a.max(b)), range_nm: (p.min(q), p.max(q)), ..self.clone() }
    }
}

/// A range in nm as axis values, smaller first.
fn axis_range(axis: AxisUnit, (lo_nm, hi_nm): (f64, f64)) -> (f64, f64) {
    let at = |nm: f64| axis.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(nm));
    let (a, b) = (at(lo_nm), at(hi_nm));
    (a.min(b), a.max(b))
}

/// How far either side of a band centre "Frame bands" shows, in band widths.
pub const FRAME_WIDTHS: f64 = 3.0;

/// A window that shows every band: each centre ± FRAME_WIDTHS full widths
/// (in wavenumber, where the shapes are symmetric), joined, rounded outward
/// to whole nm, and kept inside the centres the model accepts and the
/// solvent series' valid range. The computed states' bands count too. With
/// no bands, the default range.
pub fn frame_bands(doc: &Document, model: &Model) -> (f64, f64) {
    let nm = |nu: f64| AxisUnit::Nanometre.from_wavenumber(nu);
    let mut span: Option<(f64, f64)> = None;
    // The document's own numbers for its bands (as typed); the model's for the states'.
    let own = doc.bands.iter().map(|b| (AxisUnit::Nanometre.to_wavenumber(b.center_nm), b.fwhm_cm1 + b.lorentz_fwhm_cm1.unwrap_or(0.0)));
    let states = model.states.iter().flat_map(|s| s.bands.iter().map(|b| (b.lineshape.center(), b.lineshape.full_width())));
    for (nu, width) in own.chain(states) {
        let reach = FRAME_WIDTHS * width;
        // The long-wavelength end stays at a positive wavenumber.
        let (lo, hi) = (nm(nu + reach), nm((nu - reach).max(nu / 4.0)));
        span = Some(span.map_or((lo, hi), |(a, c)| (a.min(lo), c.max(hi))));
    }
    let Some((lo, hi)) = span.filter(|(a, b)| a.is_finite() && b.is_finite()) else {
        return Grid::default_range_nm(model);
    };
    let (mut lo, mut hi) = (lo.floor().max(MIN_CENTER_NM), hi.ceil().min(MAX_CENTER_NM));
    if let Some(r) = model.sample.solvent.valid_range() {
        lo = lo.max(r.from_nm);
        hi = hi.min(r.to_nm);
    }
    if hi <= lo {
        return Grid::default_range_nm(model);
    }
    (lo, hi)
}
