//! Spectra on a grid: n_L, n_R, k_L, k_R and everything derived from them in
//! the units of the trade, with each band's own contribution.

use crate::error::{Error, ErrorKind, Result};
use crate::lineshape::Lineshape;
use crate::model::Model;
use crate::units::{self, AxisUnit, CdUnit, OrdUnit, SampleContext, UnitError, DIPOLE_CONSTANT, ROTATORY_CONSTANT};
use num_complex::Complex64;
use std::f64::consts::{LN_10, PI};

pub use crate::limits::MAX_GRID_POINTS;

/// A spectral grid, stored as wavenumbers (cm^-1) in the order given.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    pub wavenumber_cm1: Vec<f64>,
}

impl Grid {
    /// Points from `from` to `to` (inclusive where the step lands on it) in
    /// steps of `step`, all in `unit`.
    pub fn stepped(from: f64, to: f64, step: f64, unit: AxisUnit) -> Result<Grid> {
        for (name, v) in [("from", from), ("to", to), ("step", step)] {
            crate::error::finite(name, v)?;
        }
        crate::error::positive("step", step, "step")?;
        let lo_ok = |v: f64| v > 0.0;
        if !lo_ok(from) || !lo_ok(to) {
            return Err(Error::new(ErrorKind::NotPositive, "from", "range ends must be positive"));
        }
        let span = (to - from).abs();
        let count = (span / step * (1.0 + 1e-12)).floor() as usize + 1;
        if count > MAX_GRID_POINTS {
            return Err(Error::new(ErrorKind::TooLarge, "step", format!("{count} points; the limit is {MAX_GRID_POINTS}")));
        }
        let dir = if to >= from { 1.0 } else { -1.0 };
        let wavenumber_cm1 = (0..count).map(|i| unit.to_wavenumber(from + dir * step * i as f64)).collect();
        Ok(Grid { wavenumber_cm1 })
    }

    /// `count` points evenly spaced in `unit` between two ends.
    pub fn linspace(from: f64, to: f64, count: usize, unit: AxisUnit) -> Result<Grid> {
        if !(2..=MAX_GRID_POINTS).contains(&count) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                "points",
                format!("number of points must lie in 2..{MAX_GRID_POINTS} (got {count})"),
            ));
        }
        if !(from.is_finite() && to.is_finite() && from > 0.0 && to > 0.0) {
            return Err(Error::new(ErrorKind::OutOfRange, "range", "range ends must be positive numbers"));
        }
        let d = (to - from) / (count - 1) as f64;
        Ok(Grid { wavenumber_cm1: (0..count).map(|i| unit.to_wavenumber(from + d * i as f64)).collect() })
    }

    /// A wavelength range that shows every band of the model with room on
    /// either side (at least 180-650 nm, the usual CD and polarimetry span),
    /// kept inside the solvent series' valid range when it has one.
    pub fn default_range_nm(model: &Model) -> (f64, f64) {
        let mut lo = 180.0_f64;
        let mut hi = 650.0_f64;
        for center in model.centers() {
            let nm = AxisUnit::Nanometre.from_wavenumber(center);
            lo = lo.min(0.9 * nm);
            hi = hi.max(1.25 * nm);
        }
        let (lo, hi) = ((lo / 10.0).floor() * 10.0, (hi / 10.0).ceil() * 10.0);
        match model.sample.solvent.valid_range() {
            Some(r) => (lo.max(r.from_nm), hi.min(r.to_nm)),
            None => (lo, hi),
        }
    }
}

/// One band's share of the spectra (the sum over bands gives the total):
/// its shape s on the grid and its two scaled strengths. The band's columns
/// are made from these when asked for ([`Spectra::band_delta_n`] ...), so
/// that `evaluate` costs little more than the shapes themselves.
#[derive(Debug, Clone, PartialEq)]
pub struct BandContribution {
    pub name: String,
    /// chiral_scale * R: Dn = chiral * Re s, Dk = chiral * Im s.
    pub chiral: f64,
    /// mean_scale * D: k = mean * Im s.
    pub mean: f64,
    pub lineshape: Lineshape,
    pub shape: Vec<Complex64>,
    /// Re s~, the mean index shape (see `lineshape`).
    pub mean_dispersion: Vec<f64>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Spectra {
    pub context: SampleContext,
    pub wavenumber_cm1: Vec<f64>,
    pub n_solvent: Vec<f64>,
    pub n_left: Vec<f64>,
    pub n_right: Vec<f64>,
    pub k_left: Vec<f64>,
    pub k_right: Vec<f64>,
    pub delta_n: Vec<f64>,
    pub delta_k: Vec<f64>,
    /// Observed rotation, degrees (positive: dextrorotatory).
    pub rotation_deg: Vec<f64>,
    /// Ellipticity as CD instruments report it, mdeg.
    pub ellipticity_mdeg: Vec<f64>,
    pub delta_epsilon: Vec<f64>,
    /// Mean molar absorption coefficient (e_L + e_R)/2, M^-1 cm^-1.
    pub epsilon: Vec<f64>,
    pub g_factor: Vec<f64>,
    pub bands: Vec<BandContribution>,
    /// Per point: e = epsilon_per_k * k and phi = degrees_per_delta_n * Dn.
    pub epsilon_per_k: Vec<f64>,
    pub degrees_per_delta_n: Vec<f64>,
    /// The computed states' summed shapes, kept so an edit elsewhere reuses them.
    pub states: Option<StatesPart>,
}

/// The broadened computed states' share of the spectra: the sums of their
/// bands' shapes times their strengths (before the concentration's scale),
/// with the bands they were made from.
#[derive(Debug, Clone, PartialEq)]
pub struct StatesPart {
    pub bands: Vec<crate::model::Band>,
    pub sums: crate::band_sum::ShapeSums,
}

/// Evaluates the model on a grid of wavenumbers (cm^-1).
pub fn evaluate(model: &Model, wavenumber_cm1: &[f64]) -> Result<Spectra> {
    evaluate_reusing(model, wavenumber_cm1, None)
}

/// [`evaluate`], taking a band's shape from `previous` where it holds a band
/// of the same lineshape on the same grid: after an edit of one band's R (or
/// of the sample) no shape is computed again, after an edit of its centre
/// only that band's. The numbers are those of `evaluate`, to the bit.
pub fn evaluate_reusing(model: &Model, wavenumber_cm1: &[f64], previous: Option<&Spectra>) -> Result<Spectra> {
    let previous = previous.filter(|p| p.wavenumber_cm1 == wavenumber_cm1);
    if wavenumber_cm1.len() > MAX_GRID_POINTS {
        return Err(Error::new(ErrorKind::TooLarge, "grid", format!("{} points; the limit is {MAX_GRID_POINTS}", wavenumber_cm1.len())));
    }
    if let Some(bad) = wavenumber_cm1.iter().find(|nu| !(nu.is_finite() && **nu > 0.0)) {
        return Err(Error::new(ErrorKind::OutOfRange, "grid", format!("wavenumbers must be positive (got {bad})")));
    }
    let n = wavenumber_cm1.len();
    let ctx = model.sample.context;
    let c = ctx.concentration_mol_per_l;
    let chiral_scale = chiral_scale(c);
    let mean_scale = mean_scale(c);

    let n_solvent = solvent_index(model, wavenumber_cm1)?;
    // Per-point factors, computed once: e = eps_per_k * k, phi = deg_per_dn * Dn.
    let eps_per_k: Vec<f64> = wavenumber_cm1.iter().map(|nu| epsilon_from_k(1.0, *nu, c)).collect();
    let deg_per_dn: Vec<f64> = wavenumber_cm1.iter().map(|nu| units::degrees_from_delta_n(1.0, *nu, ctx.path_length_cm)).collect();

    let mut delta_n = vec![0.0; n];
    let mut delta_k = vec![0.0; n];
    let mut dn_mean = vec![0.0; n];
    let mut k_mean = vec![0.0; n];
    let mut contributions = Vec::with_capacity(model.bands.len());
    let ln_nu = crate::lineshape::ln_grid(wavenumber_cm1);
    for band in &model.bands {
        let r = chiral_scale * band.rotatory_strength_esu2_cm2;
        let d = mean_scale * band.dipole_strength_esu2_cm2;
        // The chiral pair takes the odd-type shape s, the mean index the
        // even-type s~ (same Im on nu > 0; see lineshape).
        let known = previous.and_then(|p| p.bands.iter().find(|b| b.lineshape == band.lineshape));
        let (shape, mean_re) = match known {
            Some(b) => (b.shape.clone(), b.mean_dispersion.clone()),
            None => band.lineshape.values_with_mean(wavenumber_cm1, &ln_nu),
        };
        crate::lineshape::add_shape([&mut delta_n, &mut delta_k, &mut dn_mean, &mut k_mean], r, d, &shape, &mean_re);
        contributions.push(BandContribution {
            name: band.name.clone(),
            chiral: r,
            mean: d,
            lineshape: band.lineshape,
            shape,
            mean_dispersion: mean_re,
        });
    }

    // Coupled chromophores (coupled): their response joins the bands'.
    for system in &model.systems {
        let (chiral, mean) = system.response(wavenumber_cm1, &n_solvent)?;
        for i in 0..n {
            delta_n[i] += chiral_scale * chiral[i].re;
            delta_k[i] += chiral_scale * chiral[i].im;
            dn_mean[i] += mean_scale * mean[i].re;
            k_mean[i] += mean_scale * mean[i].im;
        }
    }

    // Computed states (states): many bands of one width, summed through nodes.
    let states = model.states.as_ref().map(|st| {
        let known = previous.and_then(|p| p.states.as_ref()).filter(|p| p.bands == st.bands);
        match known {
            Some(p) => p.clone(),
            None => StatesPart { bands: st.bands.clone(), sums: crate::band_sum::band_sums(&st.bands, wavenumber_cm1) },
        }
    });
    if let Some(part) = &states {
        let sums = &part.sums;
        for i in 0..n {
            delta_n[i] += chiral_scale * sums.delta_n[i];
            delta_k[i] += chiral_scale * sums.delta_k[i];
            dn_mean[i] += mean_scale * sums.mean_n[i];
            k_mean[i] += mean_scale * sums.mean_k[i];
        }
    }

    let mean_n: Vec<f64> = n_solvent.iter().zip(&dn_mean).map(|(a, b)| a + b).collect();
    let delta_epsilon: Vec<f64> = delta_k.iter().zip(&eps_per_k).map(|(k, f)| f * k).collect();
    let epsilon: Vec<f64> = k_mean.iter().zip(&eps_per_k).map(|(k, f)| f * k).collect();
    // mdeg needs no optional sample data, so this conversion cannot fail.
    let mdeg_per_de = CdUnit::Millidegrees.from_delta_epsilon(1.0, 1.0, &ctx).unwrap_or(f64::NAN);
    Ok(Spectra {
        context: ctx,
        wavenumber_cm1: wavenumber_cm1.to_vec(),
        n_left: mean_n.iter().zip(&delta_n).map(|(m, d)| m + d / 2.0).collect(),
        n_right: mean_n.iter().zip(&delta_n).map(|(m, d)| m - d / 2.0).collect(),
        k_left: k_mean.iter().zip(&delta_k).map(|(m, d)| m + d / 2.0).collect(),
        k_right: k_mean.iter().zip(&delta_k).map(|(m, d)| m - d / 2.0).collect(),
        rotation_deg: delta_n.iter().zip(&deg_per_dn).map(|(d, f)| f * d).collect(),
        ellipticity_mdeg: delta_epsilon.iter().map(|de| mdeg_per_de * de).collect(),
        g_factor: dissymmetry(&delta_epsilon, &epsilon),
        delta_epsilon,
        epsilon,
        n_solvent,
        delta_n,
        delta_k,
        bands: contributions,
        epsilon_per_k: eps_per_k,
        degrees_per_delta_n: deg_per_dn,
        states,
    })
}

pub(crate) fn solvent_index(model: &Model, wavenumber_cm1: &[f64]) -> Result<Vec<f64>> {
    if let Some(range) = model.sample.solvent.valid_range() {
        let outside = wavenumber_cm1.iter().map(|nu| AxisUnit::Nanometre.from_wavenumber(*nu)).find(|nm| !range.contains_nm(*nm));
        if let Some(nm) = outside {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                "sample.solvent",
                format!(
                    "the {} series is valid from {} to {} nm only; the range reaches {nm:.1} nm",
                    range.solvent, range.from_nm, range.to_nm
                ),
            ));
        }
    }
    wavenumber_cm1
        .iter()
        .map(|&nu| {
            let ns = model.sample.solvent.index(nu);
            if ns.is_finite() {
                Ok(ns)
            } else {
                Err(Error::new(
                    ErrorKind::OutOfRange,
                    "sample.solvent",
                    format!(
                        "the solvent series has no real index at {:.1} nm (outside its range)",
                        AxisUnit::Nanometre.from_wavenumber(nu)
                    ),
                ))
            }
        })
        .collect()
}

/// Dn + i Dk = chiral_scale(c) sum_j R_j s_j (R in esu^2 cm^2): ln10 c / (4 pi C_R).
pub fn chiral_scale(concentration_mol_per_l: f64) -> f64 {
    LN_10 * concentration_mol_per_l / (4.0 * PI * ROTATORY_CONSTANT)
}

/// dn + i k = mean_scale(c) sum_j D_j s~_j (D in esu^2 cm^2): ln10 c / (4 pi C_D).
pub fn mean_scale(concentration_mol_per_l: f64) -> f64 {
    LN_10 * concentration_mol_per_l / (4.0 * PI * DIPOLE_CONSTANT)
}

/// e = 4 pi nu k / (ln10 c), M^-1 cm^-1 (likewise De from Dk).
pub fn epsilon_from_k(k: f64, nu: f64, concentration_mol_per_l: f64) -> f64 {
    4.0 * PI * nu * k / (LN_10 * concentration_mol_per_l)
}

impl Spectra {
    pub fn len(&self) -> usize {
        self.wavenumber_cm1.len()
    }

    pub fn is_empty(&self) -> bool {
        self.wavenumber_cm1.is_empty()
    }

    /// Specific rotation [alpha] at each point, when the molar mass is known.
    pub fn specific_rotation(&self) -> Option<Vec<f64>> {
        self.context.molar_mass_g_per_mol?;
        self.ord_in(OrdUnit::SpecificRotation).ok()
    }

    /// Molar rotation [Phi] at each point.
    pub fn molar_rotation(&self) -> Vec<f64> {
        self.rotation_deg.iter().map(|p| units::molar_rotation_from_degrees(*p, &self.context)).collect()
    }

    /// The total CD in a chosen unit.
    pub fn cd_in(&self, unit: CdUnit) -> std::result::Result<Vec<f64>, UnitError> {
        cd_values(&self.delta_epsilon, &self.epsilon, unit, &self.context)
    }

    /// One band's CD in a chosen unit (g uses the band's own e).
    pub fn band_cd_in(&self, band: usize, unit: CdUnit) -> std::result::Result<Vec<f64>, UnitError> {
        cd_values(&self.band_delta_epsilon(band)?, &self.band_epsilon(band)?, unit, &self.context)
    }

    /// A band's Dn (each product as the sums take it, so the bands add to the total).
    pub fn band_delta_n(&self, band: usize) -> std::result::Result<Vec<f64>, UnitError> {
        let b = self.band(band)?;
        Ok(b.shape.iter().map(|s| b.chiral * s.re).collect())
    }

    pub fn band_delta_epsilon(&self, band: usize) -> std::result::Result<Vec<f64>, UnitError> {
        let b = self.band(band)?;
        Ok(b.shape.iter().zip(&self.epsilon_per_k).map(|(s, f)| f * b.chiral * s.im).collect())
    }

    pub fn band_epsilon(&self, band: usize) -> std::result::Result<Vec<f64>, UnitError> {
        let b = self.band(band)?;
        Ok(b.shape.iter().zip(&self.epsilon_per_k).map(|(s, f)| f * b.mean * s.im).collect())
    }

    pub fn band_rotation_deg(&self, band: usize) -> std::result::Result<Vec<f64>, UnitError> {
        let b = self.band(band)?;
        Ok(b.shape.iter().zip(&self.degrees_per_delta_n).map(|(s, f)| f * b.chiral * s.re).collect())
    }

    /// The total rotation in a chosen unit.
    pub fn ord_in(&self, unit: OrdUnit) -> std::result::Result<Vec<f64>, UnitError> {
        ord_values(&self.rotation_deg, &self.wavenumber_cm1, unit, &self.context)
    }

    pub fn band_ord_in(&self, band: usize, unit: OrdUnit) -> std::result::Result<Vec<f64>, UnitError> {
        ord_values(&self.band_rotation_deg(band)?, &self.wavenumber_cm1, unit, &self.context)
    }

    fn band(&self, band: usize) -> std::result::Result<&BandContribution, UnitError> {
        self.bands.get(band).ok_or_else(|| UnitError(format!("no band {} (the model has {})", band + 1, self.bands.len())))
    }
}

/// Below this fraction of its largest absorption the ratio De/e means
/// nothing (both are tails), so g is reported as missing (NaN).
pub const DISSYMMETRY_MIN_EPSILON_FRACTION: f64 = 1e-3;

/// g = De/e at each point, NaN where e is below
/// [`DISSYMMETRY_MIN_EPSILON_FRACTION`] of its largest value on the grid.
pub fn dissymmetry(de: &[f64], e: &[f64]) -> Vec<f64> {
    let floor = DISSYMMETRY_MIN_EPSILON_FRACTION * e.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
    de.iter().zip(e).map(|(de, e)| if e.abs() > floor { de / e } else { f64::NAN }).collect()
}

fn cd_values(de: &[f64], e: &[f64], unit: CdUnit, ctx: &SampleContext) -> std::result::Result<Vec<f64>, UnitError> {
    if unit == CdUnit::Dissymmetry {
        return Ok(dissymmetry(de, e));
    }
    de.iter().zip(e).map(|(de, e)| unit.from_delta_epsilon(*de, *e, ctx)).collect()
}

fn ord_values(phi: &[f64], nu: &[f64], unit: OrdUnit, ctx: &SampleContext) -> std::result::Result<Vec<f64>, UnitError> {
    phi.iter().zip(nu).map(|(p, nu)| unit.from_degrees(*p, *nu, ctx)).collect()
}
