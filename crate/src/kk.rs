//! Numerical Kramers-Kronig transforms between the circular birefringence
//! Dn (odd in nu) and the circular extinction Dk (even in nu):
//!
//!   Dn(nu) =  (2 nu / pi) P int_0^inf Dk(nu') / (nu'^2 - nu^2) dnu'
//!   Dk(nu) = -(2 / pi)    P int_0^inf nu' Dn(nu') / (nu'^2 - nu^2) dnu'
//!
//! The sampled function is taken as piecewise linear between grid points and
//! zero outside the grid; each segment's principal-value integral is done in
//! closed form, so the result is exact for that interpolant.

use std::f64::consts::PI;

/// P int f(x) / (x - t) dx over the piecewise-linear interpolant of (x, f).
/// x must be strictly increasing.
fn principal_value(x: &[f64], f: &[f64], t: f64) -> f64 {
    // On [a, b] with f = fa + m (x - a):
    //   int f/(x - t) = m (b - a) + (fa + m (t - a)) (ln|b - t| - ln|a - t|)
    // The log at a node that coincides with t cancels between its two
    // segments (f is continuous), so it is dropped.
    if x.len() < 2 {
        return 0.0;
    }
    let ln_abs = |v: f64| if v == 0.0 { 0.0 } else { v.abs().ln() };
    let mut total = 0.0;
    let mut ln_a = ln_abs(x[0] - t);
    for k in 0..x.len() - 1 {
        let (a, b) = (x[k], x[k + 1]);
        let m = (f[k + 1] - f[k]) / (b - a);
        let ln_b = ln_abs(b - t);
        total += m * (b - a) + (f[k] + m * (t - a)) * (ln_b - ln_a);
        ln_a = ln_b;
    }
    total
}

/// Circular birefringence Dn at each `at` wavenumber from Dk sampled on `nu`.
pub fn delta_n_from_delta_k(nu: &[f64], delta_k: &[f64], at: &[f64]) -> Vec<f64> {
    at.iter().map(|&t| (principal_value(nu, delta_k, t) - principal_value(nu, delta_k, -t)) / PI).collect()
}

/// Circular extinction Dk at each `at` wavenumber from Dn sampled on `nu`.
pub fn delta_k_from_delta_n(nu: &[f64], delta_n: &[f64], at: &[f64]) -> Vec<f64> {
    at.iter().map(|&t| -(principal_value(nu, delta_n, t) + principal_value(nu, delta_n, -t)) / PI).collect()
}

// ---------------------------------------------------------------------------
// Measured spectra: Maclaurin's formula on an even wavenumber grid.

/// A spectrum on evenly spaced wavenumbers (cm^-1), ascending.
#[derive(Debug, Clone, PartialEq)]
pub struct EvenGrid {
    pub first: f64,
    pub step: f64,
    pub values: Vec<f64>,
}

impl EvenGrid {
    pub fn last(&self) -> f64 {
        self.first + self.step * (self.values.len().saturating_sub(1)) as f64
    }

    pub fn node(&self, j: usize) -> f64 {
        self.first + self.step * j as f64
    }

    /// Samples (nu, y), in any order, at `count` even points across their
    /// range by linear interpolation; `None` with fewer than 2 points.
    pub fn resample(nu: &[f64], y: &[f64], count: usize) -> Option<EvenGrid> {
        if nu.len() < 2 || nu.len() != y.len() || count < 2 {
            return None;
        }
        let mut pairs: Vec<(f64, f64)> = nu.iter().copied().zip(y.iter().copied()).collect();
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
        let xs: Vec<f64> = pairs.iter().map(|p| p.0).collect();
        let ys: Vec<f64> = pairs.iter().map(|p| p.1).collect();
        let (first, last) = (xs[0], xs[xs.len() - 1]);
        let step = (last - first) / (count - 1) as f64;
        let values =
            (0..count).map(|j| crate::processing::interpolate(&xs, &ys, (first + step * j as f64).min(last)).unwrap_or(0.0)).collect();
        Some(EvenGrid { first, step, values })
    }
}

/// Which transform: Dk -> Dn (the chiral pair's kernel 2nu/(nu'^2 - nu^2)) or
/// Dn -> Dk (kernel -2nu'/(nu'^2 - nu^2)); see the module header.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Direction {
    DeltaNFromDeltaK,
    DeltaKFromDeltaN,
}

/// The transform of a spectrum sampled on an even grid, at any wavenumbers.
///
/// At the grid's nodes, Maclaurin's formula (Ohta and Ishida, Appl.
/// Spectrosc. 42, 952 (1988)): the principal value is summed over every
/// other node, those an odd number of steps away, with weight 2h, which
/// steps over the pole symmetrically; between nodes the node values are
/// interpolated linearly. Outside the grid the integral has no pole and the
/// trapezoidal rule is used. The function is zero outside the grid (the
/// caller adds what lies beyond, e.g. model bands).
pub fn transform_even(grid: &EvenGrid, direction: Direction, at: &[f64]) -> Vec<f64> {
    let n = grid.values.len();
    let mut nodes: Vec<Option<f64>> = vec![None; n];
    let kernel = |nu_j: f64, t: f64| -> f64 {
        let d = nu_j * nu_j - t * t;
        match direction {
            Direction::DeltaNFromDeltaK => 2.0 * t / (PI * d),
            Direction::DeltaKFromDeltaN => -2.0 * nu_j / (PI * d),
        }
    };
    // At node i the kernel splits by partial fractions into
    // 1/(nu_j - nu_i) = 1/((j - i) h) and 1/(nu_j + nu_i) = 1/(2 nu_0 + (i + j) h):
    // Dn: (2t/pi)/(nu_j^2 - t^2) = (1/pi) [1/(nu_j - t) - 1/(nu_j + t)],
    // Dk: -(2/pi) nu_j/(nu_j^2 - t^2) = -(1/pi) [1/(nu_j - t) + 1/(nu_j + t)].
    // Both reciprocals come from tables, so the sums need no division.
    let sign = match direction {
        Direction::DeltaNFromDeltaK => -1.0,
        Direction::DeltaKFromDeltaN => 1.0,
    };
    let scale = match direction {
        Direction::DeltaNFromDeltaK => 1.0 / PI,
        Direction::DeltaKFromDeltaN => -1.0 / PI,
    };
    let mut tables: Option<(Vec<f64>, Vec<f64>)> = None;
    let mut at_node = |i: usize| -> f64 {
        if let Some(v) = nodes[i] {
            return v;
        }
        let (difference, sum) = tables.get_or_insert_with(|| {
            // difference[k] = 1/(k h) for k = 1..n (odd k are the ones used);
            // sum[m] = 1/(2 nu_0 + m h) for m = 0..2n.
            let difference = (0..=n).map(|k| if k == 0 { 0.0 } else { 1.0 / (k as f64 * grid.step) }).collect();
            let sum = (0..=2 * n).map(|m| 1.0 / (2.0 * grid.first + m as f64 * grid.step)).collect();
            (difference, sum)
        });
        // Nodes an odd number of steps below i, then above it.
        let mut total = 0.0;
        let mut j = if i.is_multiple_of(2) { 1 } else { 0 };
        while j < i {
            total += grid.values[j] * (sign * sum[i + j] - difference[i - j]);
            j += 2;
        }
        let mut j = i + 1;
        while j < n {
            total += grid.values[j] * (difference[j - i] + sign * sum[i + j]);
            j += 2;
        }
        let v = 2.0 * grid.step * scale * total;
        nodes[i] = Some(v);
        v
    };
    at.iter()
        .map(|&t| {
            if n < 2 || !t.is_finite() {
                return f64::NAN;
            }
            if t < grid.first || t > grid.last() {
                let mut sum = 0.0;
                for (j, v) in grid.values.iter().enumerate() {
                    let w = if j == 0 || j == n - 1 { 0.5 } else { 1.0 };
                    sum += w * v * kernel(grid.node(j), t);
                }
                return grid.step * sum;
            }
            let pos = (t - grid.first) / grid.step;
            let i = (pos.floor() as usize).min(n - 2);
            let frac = pos - i as f64;
            let (a, b) = (at_node(i), at_node(i + 1));
            a + (b - a) * frac
        })
        .collect()
}

// ---------------------------------------------------------------------------
// Measured CD <-> ORD, with model bands for what lies outside the range.

/// Bands that stand for what lies outside a measured range: inside it the
/// measurement stands, so their own Dk there is taken out before the
/// numerical transform, and their analytic Dn (or Dk) is added back.
fn outside_model(set: &crate::data::DataSet, bands: &[crate::model::Band]) -> crate::model::Model {
    crate::model::Model {
        sample: crate::model::Sample { context: set.context, solvent: crate::solvent::Solvent::Constant(1.0) },
        bands: bands.to_vec(),
        systems: Vec::new(),
        states: None,
    }
}

fn even_grid_of(set: &crate::data::DataSet, values: &[f64]) -> crate::error::Result<EvenGrid> {
    EvenGrid::resample(&set.wavenumbers(), values, set.x.len().max(MIN_KK_POINTS)).ok_or_else(|| {
        crate::error::Error::new(crate::error::ErrorKind::OutOfRange, "data", format!("\"{}\" needs at least 2 points", set.name))
    })
}

/// Points of the even grid at least (coarser data are interpolated).
const MIN_KK_POINTS: usize = 512;

fn unit_error(e: crate::units::UnitError) -> crate::error::Error {
    crate::error::Error::new(crate::error::ErrorKind::OutOfRange, "data", e.0)
}

/// The transform of a measured set's Dk (or Dn), `measured`, sampled at
/// the set's points, with `bands` standing for what lies outside the
/// measured range: their own part inside the range is taken out before the
/// numerical transform, and their analytic partner added after, so inside
/// the range the measurement stands.
fn with_outside_bands(
    set: &crate::data::DataSet,
    bands: &[crate::model::Band],
    mut measured: Vec<f64>,
    direction: Direction,
    at: &[f64],
) -> crate::error::Result<Vec<f64>> {
    let model = outside_model(set, bands);
    // (the part transformed, its partner) of the bands' spectra.
    let pick = |s: &crate::spectra::Spectra| -> (Vec<f64>, Vec<f64>) {
        match direction {
            Direction::DeltaNFromDeltaK => (s.delta_k.clone(), s.delta_n.clone()),
            Direction::DeltaKFromDeltaN => (s.delta_n.clone(), s.delta_k.clone()),
        }
    };
    if !bands.is_empty() {
        let (inside, _) = pick(&crate::spectra::evaluate(&model, &set.wavenumbers())?);
        measured.iter_mut().zip(&inside).for_each(|(v, b)| *v -= b);
    }
    let grid = even_grid_of(set, &measured)?;
    let mut out = transform_even(&grid, direction, at);
    if !bands.is_empty() {
        let (_, partner) = pick(&crate::spectra::evaluate(&model, at)?);
        out.iter_mut().zip(&partner).for_each(|(v, b)| *v += b);
    }
    Ok(out)
}

/// The observed rotation (deg, at the set's own concentration and path)
/// that a measured CD spectrum predicts at wavenumbers `at`.
pub fn rotation_from_cd(set: &crate::data::DataSet, bands: &[crate::model::Band], at: &[f64]) -> crate::error::Result<Vec<f64>> {
    let c = set.context.concentration_mol_per_l;
    let de = set.delta_epsilon().map_err(unit_error)?;
    // Dk = De ln10 c / (4 pi nu), the inverse of spectra::epsilon_from_k.
    let dk: Vec<f64> = de.iter().zip(set.wavenumbers()).map(|(d, n)| d / crate::spectra::epsilon_from_k(1.0, n, c)).collect();
    let dn = with_outside_bands(set, bands, dk, Direction::DeltaNFromDeltaK, at)?;
    Ok(dn.iter().zip(at).map(|(d, n)| crate::units::degrees_from_delta_n(*d, *n, set.context.path_length_cm)).collect())
}

/// The ellipticity (mdeg, at the set's own concentration and path) that a
/// measured ORD spectrum predicts at wavenumbers `at`.
pub fn ellipticity_from_ord(set: &crate::data::DataSet, bands: &[crate::model::Band], at: &[f64]) -> crate::error::Result<Vec<f64>> {
    let l = set.context.path_length_cm;
    let phi = set.rotation_deg().map_err(unit_error)?;
    let dn: Vec<f64> = phi.iter().zip(set.wavenumbers()).map(|(p, n)| crate::units::delta_n_from_degrees(*p, n, l)).collect();
    let dk = with_outside_bands(set, bands, dn, Direction::DeltaKFromDeltaN, at)?;
    let c = set.context.concentration_mol_per_l;
    let ctx = set.context;
    dk.iter()
        .zip(at)
        .map(|(k, n)| {
            let de = crate::spectra::epsilon_from_k(*k, *n, c);
            crate::units::CdUnit::Millidegrees.from_delta_epsilon(de, f64::NAN, &ctx).map_err(unit_error)
        })
        .collect()
}
