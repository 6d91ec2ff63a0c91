//! Weighted residuals of a band model against measured sets, and their
//! analytic Jacobian: every observable is linear in R and D and goes
//! through one band shape, whose derivatives `lineshape` gives in closed form.

use super::lm::Problem;
use super::params::{Layout, Target};
use crate::data::DataSet;
use crate::import::Measured;
use crate::lineshape::Lineshape;
use crate::model::Model;
use crate::spectra::{chiral_scale, epsilon_from_k, mean_scale};
use crate::units::{self, CdUnit};
use num_complex::Complex64;

/// What an observation compares: Im s (CD, absorption) or Re s (ORD).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Part {
    /// R * Im s: De and every CD unit.
    ChiralIm,
    /// R * Re s: Dn and every ORD unit.
    ChiralRe,
    /// D * Im s: e and every absorption unit.
    MeanIm,
}

/// One point to fit: observable = scale * (factor * sum_j strength_j * part(s_j(nu))) + offset.
#[derive(Debug, Clone, PartialEq)]
struct Point {
    set: usize,
    nu: f64,
    /// Converts R (or D) in document units times the shape part into the set's unit.
    factor: f64,
    part: Part,
    y: f64,
    /// 1 / sigma.
    weight: f64,
}

/// Which band field a Target sets, for building shapes from values.
#[derive(Debug, Clone)]
pub struct FitProblem {
    pub layout: Layout,
    /// The band shapes' kinds (0 Lorentz, 1 Gaussian, 2 Voigt), per band.
    kinds: Vec<u8>,
    points: Vec<Point>,
    /// Index of each target's parameter, for quick lookup.
    index: std::collections::HashMap<Target, usize>,
    pub set_count: usize,
}

/// Observations from measured sets and lamp-line readings.
pub struct Observations<'a> {
    pub sets: &'a [DataSet],
    /// Each set's 1/sigma per point.
    pub weights: &'a [Vec<f64>],
    /// (wavenumber, rotation deg, 1/sigma, sample context) per reading.
    pub readings: &'a [(f64, f64, f64, units::SampleContext)],
}

impl FitProblem {
    pub fn new(model: &Model, layout: Layout, obs: &Observations) -> Result<FitProblem, String> {
        let kinds = model
            .bands
            .iter()
            .map(|b| match b.lineshape {
                Lineshape::Lorentz { .. } => 0,
                Lineshape::Gaussian { .. } => 1,
                Lineshape::Voigt { .. } => 2,
            })
            .collect();
        let mut points = Vec::new();
        for (s, (set, weights)) in obs.sets.iter().zip(obs.weights).enumerate() {
            let ctx = set.context;
            for ((x, y), w) in set.x.iter().zip(&set.y).zip(weights) {
                let nu = set.axis.to_wavenumber(*x);
                let (factor, part) = observable_factor(set.measured, nu, &ctx).map_err(|e| format!("{}: {e}", set.name))?;
                points.push(Point { set: s, nu, factor, part, y: *y, weight: *w });
            }
        }
        let reading_set = obs.sets.len();
        for (nu, phi, w, ctx) in obs.readings {
            let factor = units::degrees_from_delta_n(chiral_scale(ctx.concentration_mol_per_l), *nu, ctx.path_length_cm)
                * units::ESU2_CM2_PER_ROTATORY_UNIT;
            points.push(Point { set: reading_set, nu: *nu, factor, part: Part::ChiralRe, y: *phi, weight: *w });
        }
        let index = layout.parameters.iter().enumerate().map(|(i, p)| (p.target, i)).collect();
        let set_count = obs.sets.len() + usize::from(!obs.readings.is_empty());
        Ok(FitProblem { layout, kinds, points, index, set_count })
    }

    pub fn len(&self) -> usize {
        self.points.len()
    }

    pub fn is_empty(&self) -> bool {
        self.points.is_empty()
    }

    /// The set each residual belongs to (readings are the last set).
    pub fn point_sets(&self) -> Vec<usize> {
        self.points.iter().map(|p| p.set).collect()
    }

    fn value(&self, values: &[f64], t: Target, default: f64) -> f64 {
        self.index.get(&t).map(|i| values[*i]).unwrap_or(default)
    }

    fn shape(&self, values: &[f64], band: usize) -> Lineshape {
        let shift = self.value(values, Target::Shift, 0.0);
        let center = self.value(values, Target::Center(band), f64::NAN) + shift;
        let fwhm = self.value(values, Target::Fwhm(band), f64::NAN);
        match self.kinds[band] {
            0 => Lineshape::lorentz(center, fwhm),
            1 => Lineshape::gaussian(center, fwhm),
            _ => Lineshape::voigt(center, fwhm, self.value(values, Target::LorentzFwhm(band), 0.0)),
        }
    }

    /// Model values (in each set's unit) at every point, for the values v.
    pub fn model_values(&self, values: &[f64]) -> Vec<f64> {
        let shapes: Vec<Lineshape> = (0..self.kinds.len()).map(|b| self.shape(values, b)).collect();
        self.points
            .iter()
            .map(|p| {
                let mut sum = 0.0;
                for (b, shape) in shapes.iter().enumerate() {
                    let s = shape.value(p.nu);
                    sum += self.strength(values, b, p.part) * part_of(s, p.part);
                }
                self.value(values, Target::Scale(p.set), 1.0) * p.factor * sum + self.value(values, Target::Offset(p.set), 0.0)
            })
            .collect()
    }

    fn strength(&self, values: &[f64], band: usize, part: Part) -> f64 {
        match part {
            Part::ChiralIm | Part::ChiralRe => self.value(values, Target::Rotatory(band), 0.0),
            Part::MeanIm => self.value(values, Target::Dipole(band), 0.0),
        }
    }

    /// Residuals and the Jacobian with respect to the model's values
    /// (one column per parameter, fixed ones included).
    fn evaluate(&self, values: &[f64], r: &mut Vec<f64>, jv: Option<&mut Vec<f64>>) {
        let np = self.layout.parameters.len();
        let shapes: Vec<Lineshape> = (0..self.kinds.len()).map(|b| self.shape(values, b)).collect();
        r.clear();
        let mut jv = jv;
        if let Some(j) = jv.as_deref_mut() {
            j.clear();
            j.resize(self.points.len() * np, 0.0);
        }
        for (i, p) in self.points.iter().enumerate() {
            let scale = self.value(values, Target::Scale(p.set), 1.0);
            let offset = self.value(values, Target::Offset(p.set), 0.0);
            let mut sum = 0.0;
            match jv.as_deref_mut() {
                None => {
                    for (b, shape) in shapes.iter().enumerate() {
                        sum += self.strength(values, b, p.part) * part_of(shape.value(p.nu), p.part);
                    }
                }
                Some(j) => {
                    let row = &mut j[i * np..(i + 1) * np];
                    let k = p.weight * scale * p.factor;
                    for (b, shape) in shapes.iter().enumerate() {
                        let d = shape.derivatives(p.nu);
                        let strength = self.strength(values, b, p.part);
                        let part = part_of(d.value, p.part);
                        sum += strength * part;
                        let strength_target = match p.part {
                            Part::MeanIm => Target::Dipole(b),
                            _ => Target::Rotatory(b),
                        };
                        let mut put = |t: Target, v: f64| {
                            if let Some(col) = self.index.get(&t) {
                                row[*col] += k * v;
                            }
                        };
                        put(strength_target, part);
                        let dc = strength * part_of(d.d_center, p.part);
                        put(Target::Center(b), dc);
                        put(Target::Shift, dc);
                        put(Target::Fwhm(b), strength * part_of(d.d_fwhm, p.part));
                        put(Target::LorentzFwhm(b), strength * part_of(d.d_lorentz_fwhm, p.part));
                    }
                    if let Some(col) = self.index.get(&Target::Scale(p.set)) {
                        row[*col] = p.weight * p.factor * sum;
                    }
                    if let Some(col) = self.index.get(&Target::Offset(p.set)) {
                        row[*col] = p.weight;
                    }
                }
            }
            r.push(p.weight * (scale * p.factor * sum + offset - p.y));
        }
    }

    /// Residuals and Jacobian with respect to the model's values (for the
    /// standard errors, which are quoted in the model's values).
    pub fn value_jacobian(&self, values: &[f64], r: &mut Vec<f64>, jv: &mut Vec<f64>) {
        self.evaluate(values, r, Some(jv));
    }
}

fn part_of(s: Complex64, part: Part) -> f64 {
    match part {
        Part::ChiralIm | Part::MeanIm => s.im,
        Part::ChiralRe => s.re,
    }
}

/// The factor that turns R (1e-40 cgs) or D (debye^2) times the shape part
/// into a set's unit at nu: CD and absorption go through De or e, ORD
/// through the rotation in degrees (all linear in the strength).
fn observable_factor(measured: Measured, nu: f64, ctx: &units::SampleContext) -> Result<(f64, Part), String> {
    let c = ctx.concentration_mol_per_l;
    Ok(match measured {
        Measured::Cd(u) => {
            // De = epsilon_from_k(chiral_scale R s.im)
            let de_per = epsilon_from_k(chiral_scale(c) * units::ESU2_CM2_PER_ROTATORY_UNIT, nu, c);
            let unit_per_de = if u == CdUnit::Dissymmetry { return Err("g cannot be fitted".into()) } else { u.from_delta_epsilon(1.0, f64::NAN, ctx).map_err(|e| e.0)? };
            (de_per * unit_per_de, Part::ChiralIm)
        }
        Measured::Ord(u) => {
            let deg_per = units::degrees_from_delta_n(chiral_scale(c) * units::ESU2_CM2_PER_ROTATORY_UNIT, nu, ctx.path_length_cm);
            (deg_per * u.from_degrees(1.0, nu, ctx).map_err(|e| e.0)?, Part::ChiralRe)
        }
        Measured::Absorption(u) => {
            let eps_per = epsilon_from_k(mean_scale(c) * units::ESU2_CM2_PER_DEBYE2, nu, c);
            (eps_per * u.from_epsilon(1.0, ctx), Part::MeanIm)
        }
    })
}

impl Problem for FitProblem {
    fn residuals(&self, u: &[f64], r: &mut Vec<f64>) {
        let values = self.layout.values(u);
        self.evaluate(&values, r, None);
    }

    fn jacobian(&self, u: &[f64], r: &mut Vec<f64>, jac: &mut Vec<f64>) {
        let values = self.layout.values(u);
        let mut jv = Vec::new();
        self.evaluate(&values, r, Some(&mut jv));
        // Chain rule onto the free variables: dv_i/du_k = factor * slope_k.
        let np = self.layout.parameters.len();
        let nf = self.layout.free.len();
        let slopes = self.layout.slopes(u);
        jac.clear();
        jac.resize(r.len() * nf, 0.0);
        for i in 0..r.len() {
            for (p, m) in self.layout.map.iter().enumerate() {
                if let Some((k, factor, _)) = m {
                    jac[i * nf + k] += jv[i * np + p] * factor * slopes[*k];
                }
            }
        }
    }
}
