//! Weighted residuals of a band model against measured sets, and their
//! analytic Jacobian: every observable is linear in R and D and goes
//! through one band shape, whose derivatives `lineshape` gives in closed form.

use super::lm::Problem;
use super::params::{Layout, Target};
use crate::data::DataSet;
use crate::document::{Document, SystemDoc};
use crate::import::Measured;
use crate::lineshape::{Lineshape, PartColumns};
use crate::model::Model;
use crate::spectra::{chiral_scale, epsilon_from_k, mean_scale};
use crate::units::{self, CdUnit};

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
    /// Each point's wavenumber, and the runs of points of one set (so of one
    /// part): the bands are evaluated run by run, a column at a time.
    nu: Vec<f64>,
    runs: Vec<Run>,
    /// Each band's parameter indices, looked up once (the inner loops run
    /// per point and band).
    bands: Vec<BandColumns>,
    shift: Option<usize>,
    /// Per set: (offset, scale) parameter indices.
    set_columns: Vec<(Option<usize>, Option<usize>)>,
    pub set_count: usize,
    /// The coupled systems' share of each point (see [`CoupledTerm`]).
    coupled: Vec<CoupledTerm>,
    /// The solvent's index at each point, for the coupled systems' response
    /// (empty when there are none).
    n_solvent: Vec<f64>,
}

/// A coupled system in the fit. Its response is not linear in anything the
/// fit sets, so a free distance or twist takes central differences of the
/// whole response (`GEOMETRY_STEP`); a system with neither free is
/// evaluated once, at construction.
#[derive(Debug, Clone)]
struct CoupledTerm {
    index: usize,
    doc: SystemDoc,
    distance: Option<usize>,
    twist: Option<usize>,
    /// Each point's part when the geometry is fixed.
    fixed: Option<Vec<f64>>,
}

/// Central-difference steps for a system's distance (relative) and twist (degrees).
const GEOMETRY_STEP: (f64, f64) = (1e-5, 1e-3);

/// Consecutive points of one set.
#[derive(Debug, Clone)]
struct Run {
    set: usize,
    part: Part,
    points: std::ops::Range<usize>,
}

/// Which parameter sets each field of a band.
#[derive(Debug, Clone, Copy, PartialEq)]
struct BandColumns {
    center: Option<usize>,
    fwhm: Option<usize>,
    lorentz: Option<usize>,
    rotatory: Option<usize>,
    dipole: Option<usize>,
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
    pub fn new(doc: &Document, model: &Model, layout: Layout, obs: &Observations) -> Result<FitProblem, String> {
        let kinds = model
            .bands
            .iter()
            .map(|b| match b.lineshape {
                Lineshape::Lorentz { .. } => 0,
                Lineshape::Gaussian { .. } => 1,
                Lineshape::Voigt { .. } => 2,
            })
            .collect();
        let (mut points, mut nu) = (Vec::new(), Vec::new());
        for (s, (set, weights)) in obs.sets.iter().zip(obs.weights).enumerate() {
            let ctx = set.context;
            for ((x, y), w) in set.x.iter().zip(&set.y).zip(weights) {
                let at = set.axis.to_wavenumber(*x);
                let (factor, part) = observable_factor(set.measured, at, &ctx).map_err(|e| format!("{}: {e}", set.name))?;
                points.push(Point { set: s, factor, part, y: *y, weight: *w });
                nu.push(at);
            }
        }
        let reading_set = obs.sets.len();
        for (at, phi, w, ctx) in obs.readings {
            let factor = units::degrees_from_delta_n(chiral_scale(ctx.concentration_mol_per_l), *at, ctx.path_length_cm)
                * units::ESU2_CM2_PER_ROTATORY_UNIT;
            points.push(Point { set: reading_set, factor, part: Part::ChiralRe, y: *phi, weight: *w });
            nu.push(*at);
        }
        let index: std::collections::HashMap<Target, usize> = layout.parameters.iter().enumerate().map(|(i, p)| (p.target, i)).collect();
        let bands = (0..model.bands.len())
            .map(|b| BandColumns {
                center: index.get(&Target::Center(b)).copied(),
                fwhm: index.get(&Target::Fwhm(b)).copied(),
                lorentz: index.get(&Target::LorentzFwhm(b)).copied(),
                rotatory: index.get(&Target::Rotatory(b)).copied(),
                dipole: index.get(&Target::Dipole(b)).copied(),
            })
            .collect();
        let set_count = obs.sets.len() + usize::from(!obs.readings.is_empty());
        let set_columns = (0..set_count).map(|s| (index.get(&Target::Offset(s)).copied(), index.get(&Target::Scale(s)).copied())).collect();
        let shift = index.get(&Target::Shift).copied();
        // Only a coupled system needs the solvent's index (its screening).
        let n_solvent =
            if doc.systems.is_empty() { Vec::new() } else { crate::spectra::solvent_index(model, &nu).map_err(|e| e.to_string())? };
        let mut runs: Vec<Run> = Vec::new();
        for (i, p) in points.iter().enumerate() {
            match runs.last_mut() {
                Some(run) if run.set == p.set && run.part == p.part => run.points.end = i + 1,
                _ => runs.push(Run { set: p.set, part: p.part, points: i..i + 1 }),
            }
        }
        let mut problem =
            FitProblem { layout, kinds, points, nu, runs, bands, shift, set_columns, set_count, coupled: Vec::new(), n_solvent };
        for (s, system) in doc.systems.iter().enumerate() {
            let distance = index.get(&Target::Distance(s)).copied();
            let twist = index.get(&Target::Twist(s)).copied();
            let mut term = CoupledTerm { index: s, doc: system.clone(), distance, twist, fixed: None };
            let moves = |c: Option<usize>| c.is_some_and(|c| problem.layout.map[c].is_some());
            if !moves(distance) && !moves(twist) {
                let values = problem.layout.values(&problem.layout.start());
                term.fixed = Some(problem.coupled_parts(&term, &values, (0.0, 0.0))?);
            }
            problem.coupled.push(term);
        }
        Ok(problem)
    }

    /// A system's (distance, twist) at the given values, where the fit has them.
    pub fn geometry(&self, values: &[f64], system: usize) -> (Option<f64>, Option<f64>) {
        self.coupled.get(system).map_or((None, None), |t| (t.distance.map(|c| values[c]), t.twist.map(|c| values[c])))
    }

    /// Each point's part of a system's response (in the units of R or D in
    /// the document, as the bands' strengths), at the values' geometry moved
    /// by `step` (angstrom, degrees).
    fn coupled_parts(&self, term: &CoupledTerm, values: &[f64], step: (f64, f64)) -> Result<Vec<f64>, String> {
        let mut doc = term.doc.clone();
        if let Some(c) = term.distance {
            let twist = term.twist.map(|t| values[t] + step.1);
            crate::coupled::geometry::set_distance_and_twist(&mut doc, values[c] + step.0, twist);
        }
        let system = crate::coupled::System::from_doc(term.index, &doc).map_err(|e| e.to_string())?;
        let (chiral, mean) = system.response(&self.nu, &self.n_solvent).map_err(|e| e.to_string())?;
        Ok(self
            .points
            .iter()
            .zip(chiral.iter().zip(&mean))
            .map(|(p, (c, m))| match p.part {
                Part::ChiralIm => c.im / units::ESU2_CM2_PER_ROTATORY_UNIT,
                Part::ChiralRe => c.re / units::ESU2_CM2_PER_ROTATORY_UNIT,
                Part::MeanIm => m.im / units::ESU2_CM2_PER_DEBYE2,
            })
            .collect())
    }

    /// Every system's parts at the values and, when asked, their derivatives
    /// in each free geometry column: (parts, [(column, d parts)]). A geometry
    /// the model refuses (e.g. two chromophores too close) gives NaN, which
    /// the solver rejects as a step.
    fn coupled_terms(&self, values: &[f64], derivatives: bool) -> (Vec<f64>, Vec<(usize, Vec<f64>)>) {
        let mut total = vec![0.0; self.points.len()];
        let mut columns = Vec::new();
        let nan = || vec![f64::NAN; self.points.len()];
        for term in &self.coupled {
            let moved;
            let parts: &[f64] = match &term.fixed {
                Some(p) => p,
                None => {
                    moved = self.coupled_parts(term, values, (0.0, 0.0)).unwrap_or_else(|_| nan());
                    &moved
                }
            };
            for (t, p) in total.iter_mut().zip(parts) {
                *t += p;
            }
            if !derivatives || term.fixed.is_some() {
                continue;
            }
            for (column, is_distance) in [(term.distance, true), (term.twist, false)] {
                let Some(c) = column.filter(|c| self.layout.map[*c].is_some()) else { continue };
                let h = if is_distance { GEOMETRY_STEP.0 * values[c].abs().max(1.0) } else { GEOMETRY_STEP.1 };
                let step = |sign: f64| if is_distance { (sign * h, 0.0) } else { (0.0, sign * h) };
                let plus = self.coupled_parts(term, values, step(1.0)).unwrap_or_else(|_| nan());
                let minus = self.coupled_parts(term, values, step(-1.0)).unwrap_or_else(|_| nan());
                columns.push((c, plus.iter().zip(&minus).map(|(a, b)| (a - b) / (2.0 * h)).collect()));
            }
        }
        (total, columns)
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

    fn shape(&self, values: &[f64], band: usize) -> Lineshape {
        let at = |c: Option<usize>, default: f64| c.map(|i| values[i]).unwrap_or(default);
        let cols = &self.bands[band];
        let center = at(cols.center, f64::NAN) + at(self.shift, 0.0);
        let fwhm = at(cols.fwhm, f64::NAN);
        match self.kinds[band] {
            0 => Lineshape::lorentz(center, fwhm),
            1 => Lineshape::gaussian(center, fwhm),
            _ => Lineshape::voigt(center, fwhm, at(cols.lorentz, 0.0)),
        }
    }

    fn offset_scale(&self, values: &[f64], set: usize) -> (f64, f64) {
        let (o, k) = self.set_columns[set];
        (o.map(|i| values[i]).unwrap_or(0.0), k.map(|i| values[i]).unwrap_or(1.0))
    }

    fn strength_column(&self, band: usize, part: Part) -> Option<usize> {
        match part {
            Part::ChiralIm | Part::ChiralRe => self.bands[band].rotatory,
            Part::MeanIm => self.bands[band].dipole,
        }
    }

    fn strength(&self, values: &[f64], band: usize, part: Part) -> f64 {
        self.strength_column(band, part).map(|i| values[i]).unwrap_or(0.0)
    }

    /// Residuals and, when `jac` is given, their Jacobian in the free
    /// variables, column-major (`jac[k * rows + i]`). `slopes` are dv/du
    /// of each free variable (None: the variables are the free parameters'
    /// own values); a linked parameter adds its factor times its free
    /// variable's slope to that column.
    fn evaluate(&self, values: &[f64], r: &mut Vec<f64>, jac: Option<(&mut Vec<f64>, Option<&[f64]>)>) {
        let shapes: Vec<Lineshape> = (0..self.kinds.len()).map(|b| self.shape(values, b)).collect();
        let (coupled, coupled_columns) = self.coupled_terms(values, jac.is_some());
        // Band by band, run by run: each band's shape and part are chosen
        // once per run, and its strengths read once.
        let mut sums = coupled;
        let strength = |b: usize, part: Part| self.strength(values, b, part);
        let Some((j, slopes)) = jac else {
            for (b, shape) in shapes.iter().enumerate() {
                for run in &self.runs {
                    let range = run.points.clone();
                    shape.add_part(&self.nu[range.clone()], run.part != Part::ChiralRe, strength(b, run.part), &mut sums[range]);
                }
            }
            self.residuals_from(values, &sums, r);
            return;
        };
        let rows = self.points.len();
        j.clear();
        j.resize(rows * self.layout.free.len(), 0.0);
        // Where a parameter's derivative goes: (start of its free variable's
        // column, dv/du of the parameter), None when it is fixed.
        let column = |c: Option<usize>| {
            let (k, factor, _) = self.layout.map[c?]?;
            Some((k * rows, factor * slopes.map_or(1.0, |s| s[k])))
        };
        // column[i] += factor * k[i] * d[i] over a run, where
        // d observable / d value = weight * scale * factor * (d sum / d value).
        let k: Vec<f64> = self.points.iter().map(|p| p.weight * self.offset_scale(values, p.set).1 * p.factor).collect();
        let mut add = |c: Option<(usize, f64)>, factor: f64, range: &std::ops::Range<usize>, d: &[f64]| {
            if let Some((start, slope)) = c {
                let f = slope * factor;
                for ((jv, ki), di) in j[start + range.start..start + range.end].iter_mut().zip(&k[range.clone()]).zip(d) {
                    *jv += ki * f * di;
                }
            }
        };
        let shift = column(self.shift);
        let mut parts = PartColumns::default();
        for (b, shape) in shapes.iter().enumerate() {
            let cols = self.bands[b];
            let (center, fwhm, lorentz) = (column(cols.center), column(cols.fwhm), column(cols.lorentz));
            for run in &self.runs {
                let range = run.points.clone();
                shape.part_columns(&self.nu[range.clone()], run.part != Part::ChiralRe, &mut parts);
                let a = strength(b, run.part);
                for (s, v) in sums[range.clone()].iter_mut().zip(&parts.value) {
                    *s += a * v;
                }
                add(column(self.strength_column(b, run.part)), 1.0, &range, &parts.value);
                add(center, a, &range, &parts.d_center);
                add(shift, a, &range, &parts.d_center);
                add(fwhm, a, &range, &parts.d_fwhm);
                add(lorentz, a, &range, &parts.d_lorentz_fwhm);
            }
        }
        for (c, d) in &coupled_columns {
            add(column(Some(*c)), 1.0, &(0..rows), d);
        }
        for run in &self.runs {
            let (o, sc) = self.set_columns[run.set];
            let (o, sc) = (column(o), column(sc));
            for i in run.points.clone() {
                let p = &self.points[i];
                if let Some((start, slope)) = sc {
                    j[start + i] += slope * p.weight * p.factor * sums[i];
                }
                if let Some((start, slope)) = o {
                    j[start + i] += slope * p.weight;
                }
            }
        }
        self.residuals_from(values, &sums, r);
    }

    /// r_i = weight * (scale * factor * sum + offset - y).
    fn residuals_from(&self, values: &[f64], sums: &[f64], r: &mut Vec<f64>) {
        r.clear();
        r.extend(self.points.iter().zip(sums).map(|(p, sum)| {
            let (offset, scale) = self.offset_scale(values, p.set);
            p.weight * (scale * p.factor * sum + offset - p.y)
        }));
    }

    /// Residuals and the Jacobian with respect to the free parameters'
    /// own values, linked ones moving with theirs (for the standard errors,
    /// which are quoted in the model's values); column-major.
    pub fn free_value_jacobian(&self, values: &[f64], r: &mut Vec<f64>, jac: &mut Vec<f64>) {
        self.evaluate(values, r, Some((jac, None)));
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
            let unit_per_de = if u == CdUnit::Dissymmetry {
                return Err("g cannot be fitted".into());
            } else {
                u.from_delta_epsilon(1.0, f64::NAN, ctx).map_err(|e| e.0)?
            };
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
        self.evaluate(&values, r, Some((jac, Some(&self.layout.slopes(u)))));
    }
}
