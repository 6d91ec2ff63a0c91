//! Coupled chromophores: CD from geometry by the polarisability method of
//! DeVoe (J. Chem. Phys. 41, 393 (1964); 43, 3199 (1965)).
//!
//! Each transition i (direction e_i, position r_i, dipole strength D_i) is an
//! oscillator whose polarisability is alpha_i = (pi/hc) D_i s~_i(nu), s~ being
//! the band model's mean index shape (lineshape), so that far from the band
//! alpha_i = (2/hc) D_i nu_i/(nu_i^2 - nu^2), the oscillator's own. The
//! induced dipoles obey mu_i = alpha_i (E.e_i + sum_j G_ij mu_j) with
//! G_ij = e_i.T(r_ij).e_j, T = (3 r^ r^ - 1)/r^3 (over n^2 when screened; zero
//! between transitions of one chromophore), so the response is
//! A = (diag(1/alpha) - G)^-1. With a_i = D_i s~_i (A in these units):
//!
//! ```text
//! dn + i k   = ln10 c/(4 pi C_D) sum_ij A_ij e_i.e_j
//! Dn + i Dk  = ln10 c/(4 pi C_R) [ (pi nu/2) sum_ij A_ij (r_i - r_j).(e_i x e_j) + sum_i R_i s_i ]
//! ```
//!
//! Coupling off, A = diag(a): the first line is the band model's mean part
//! exactly, the geometric chiral term vanishes, and the intrinsic R_i enter
//! through the band model's own s_i. For weak coupling A is a sum over
//! exciton states k with amplitudes c: the chiral term becomes
//! sum_k R_k (nu/nu_k) s~_k with R_k = pi nu_k sum_ij c_i c_j r_j.(mu_j x mu_i),
//! the rotatory strength of R = Im(mu_0a . m_a0) with the magnetic moment
//! m_a0 = i pi nu r x mu_a0 of a displaced dipole; (nu/nu_k) s~_k has the
//! band's Drude tail and Im equal to Im s_k times nu/nu_k. This gives
//! R_+- = +-(pi nu_0/2)(r_1 - r_2).(mu_1 x mu_2) and the exciton chirality
//! rule (tests/coupled.rs). Only three right-hand sides are needed per point:
//! sum_ij A_ij e_i.e_j = sum_c p_c.(A p_c) and
//! sum_ij A_ij (r_i - r_j).(e_i x e_j) = 2 sum_c q_c.(A p_c), with p_c the
//! c-th components of e_i and q_i = r_i x e_i.

pub mod geometry;
pub mod solve;
pub mod table;

use crate::document::{BandDoc, Direction, SystemDoc};
use crate::error::{Error, ErrorKind, Result};
use crate::limits::{MAX_CHROMOPHORES, MAX_SYSTEMS, MAX_SYSTEM_TRANSITIONS, MAX_TRANSITIONS_PER_CHROMOPHORE};
use crate::lineshape::Lineshape;
use crate::units::{CM_PER_ANGSTROM, POLARISABILITY_PER_DIPOLE_SHAPE};
use num_complex::Complex64;
use std::f64::consts::PI;

/// Two chromophores closer than this (angstrom) are refused: the point-dipole
/// coupling has no meaning there.
pub const MIN_SEPARATION_ANGSTROM: f64 = 0.1;
/// A direction's length may differ from 1 by this much (tables round); it is
/// then normalised.
pub const DIRECTION_TOLERANCE: f64 = 1e-3;

/// One transition in canonical units (cm, cm^-1, esu^2 cm^2).
#[derive(Debug, Clone, PartialEq)]
pub struct Transition {
    pub chromophore: usize,
    pub position_cm: [f64; 3],
    pub direction: [f64; 3],
    pub lineshape: Lineshape,
    pub dipole_strength_esu2_cm2: f64,
    pub rotatory_strength_esu2_cm2: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct System {
    pub name: String,
    pub screened: bool,
    pub uncoupled: bool,
    pub transitions: Vec<Transition>,
}

fn dot(a: [f64; 3], b: [f64; 3]) -> f64 {
    a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

fn sub(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn unit_direction(field: &str, d: Direction) -> Result<[f64; 3]> {
    match d {
        Direction::Vector(v) => {
            for (c, x) in v.iter().enumerate() {
                crate::error::finite(&format!("{field}[{c}]"), *x)?;
            }
        }
        Direction::Angles(a) => {
            crate::error::finite(&format!("{field}.polar_deg"), a.polar_deg)?;
            crate::error::finite(&format!("{field}.azimuth_deg"), a.azimuth_deg)?;
        }
    }
    let d = d.vector();
    let len = dot(d, d).sqrt();
    if (len - 1.0).abs() > DIRECTION_TOLERANCE {
        return Err(Error::new(ErrorKind::OutOfRange, field, format!("a direction must be a unit vector (its length is {len})")));
    }
    Ok([d[0] / len, d[1] / len, d[2] / len])
}

impl System {
    pub fn all_from_docs(docs: &[SystemDoc]) -> Result<Vec<System>> {
        if docs.len() > MAX_SYSTEMS {
            return Err(Error::new(ErrorKind::TooLarge, "systems", format!("{} systems; the limit is {MAX_SYSTEMS}", docs.len())));
        }
        docs.iter().enumerate().map(|(i, d)| System::from_doc(i, d)).collect()
    }

    /// Validates a system; fields are named `systems[i].chromophores[j]...`.
    pub fn from_doc(i: usize, doc: &SystemDoc) -> Result<System> {
        let at = format!("systems[{i}]");
        if doc.chromophores.len() > MAX_CHROMOPHORES {
            return Err(Error::new(
                ErrorKind::TooLarge,
                format!("{at}.chromophores"),
                format!("{} chromophores; the limit is {MAX_CHROMOPHORES}", doc.chromophores.len()),
            ));
        }
        let mut transitions = Vec::new();
        let mut positions: Vec<[f64; 3]> = Vec::new();
        for (j, c) in doc.chromophores.iter().enumerate() {
            let cat = format!("{at}.chromophores[{j}]");
            for (k, v) in c.position_angstrom.iter().enumerate() {
                crate::error::finite(&format!("{cat}.position_angstrom[{k}]"), *v)?;
            }
            let direction = unit_direction(&format!("{cat}.direction"), c.direction)?;
            for (other, p) in positions.iter().enumerate() {
                let d = dot(sub(*p, c.position_angstrom), sub(*p, c.position_angstrom)).sqrt();
                if d < MIN_SEPARATION_ANGSTROM {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("{cat}.position_angstrom"),
                        format!(
                            "chromophores {} and {} (counted from 1) are {d:.3} Å apart; they must be at least {MIN_SEPARATION_ANGSTROM} Å apart",
                            other + 1,
                            j + 1
                        ),
                    ));
                }
            }
            positions.push(c.position_angstrom);
            if c.transitions.is_empty() || c.transitions.len() > MAX_TRANSITIONS_PER_CHROMOPHORE {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    format!("{cat}.transitions"),
                    format!("a chromophore needs 1 to {MAX_TRANSITIONS_PER_CHROMOPHORE} transitions (got {})", c.transitions.len()),
                ));
            }
            for (k, t) in c.transitions.iter().enumerate() {
                let tat = format!("{cat}.transitions[{k}]");
                let band = BandDoc {
                    name: String::new(),
                    shape: t.shape.clone(),
                    center_nm: t.center_nm,
                    fwhm_cm1: t.fwhm_cm1,
                    lorentz_fwhm_cm1: t.lorentz_fwhm_cm1,
                    rotatory_strength_1e40_cgs: t.rotatory_strength_1e40_cgs,
                    dipole_strength_debye2: t.dipole_strength_debye2,
                };
                let b = crate::model::band_from_doc(&tat, k, &band)?;
                let direction = match t.direction {
                    Some(d) => unit_direction(&format!("{tat}.direction"), d)?,
                    None => direction,
                };
                let p = c.position_angstrom;
                transitions.push(Transition {
                    chromophore: j,
                    position_cm: [p[0] * CM_PER_ANGSTROM, p[1] * CM_PER_ANGSTROM, p[2] * CM_PER_ANGSTROM],
                    direction,
                    lineshape: b.lineshape,
                    dipole_strength_esu2_cm2: b.dipole_strength_esu2_cm2,
                    rotatory_strength_esu2_cm2: b.rotatory_strength_esu2_cm2,
                });
            }
        }
        if transitions.len() > MAX_SYSTEM_TRANSITIONS {
            return Err(Error::new(
                ErrorKind::TooLarge,
                format!("{at}.chromophores"),
                format!("{} transitions; the limit is {MAX_SYSTEM_TRANSITIONS} per system", transitions.len()),
            ));
        }
        Ok(System { name: doc.name.clone(), screened: doc.screened, uncoupled: doc.uncoupled, transitions })
    }

    pub fn centers(&self) -> impl Iterator<Item = f64> + '_ {
        self.transitions.iter().map(|t| t.lineshape.center())
    }

    /// The point-dipole interaction G_ij = e_i.T(r_ij).e_j (cm^-3), zero on
    /// the diagonal and within a chromophore, and zero everywhere when the
    /// coupling is off.
    pub fn interaction(&self) -> Vec<f64> {
        let n = self.transitions.len();
        let mut g = vec![0.0; n * n];
        if self.uncoupled {
            return g;
        }
        for (i, a) in self.transitions.iter().enumerate() {
            for (j, b) in self.transitions.iter().enumerate() {
                if a.chromophore == b.chromophore {
                    continue;
                }
                let r = sub(a.position_cm, b.position_cm);
                let d2 = dot(r, r);
                let d = d2.sqrt();
                g[i * n + j] = (3.0 * dot(a.direction, r) * dot(b.direction, r) / d2 - dot(a.direction, b.direction)) / (d2 * d);
            }
        }
        g
    }

    /// Dn + i Dk and dn + i k of the system at each wavenumber, before the
    /// concentration scales (multiply by `spectra::chiral_scale` and
    /// `spectra::mean_scale`; the chiral part is in units of R, the mean in
    /// units of D). `n_solvent` is used when the coupling is screened.
    pub fn response(&self, nu: &[f64], n_solvent: &[f64]) -> Result<(Vec<Complex64>, Vec<Complex64>)> {
        self.response_with(nu, n_solvent, Solver::Auto)
    }

    /// [`System::response`] by a chosen method (the tests compare them).
    pub fn response_with(&self, nu: &[f64], n_solvent: &[f64], solver: Solver) -> Result<(Vec<Complex64>, Vec<Complex64>)> {
        let n = self.transitions.len();
        let points = nu.len();
        let ln_nu = crate::lineshape::ln_grid(nu);
        // Positions about the centroid: the result is origin-free, rounding less so.
        let centroid =
            self.transitions.iter().fold([0.0; 3], |c, t| [c[0] + t.position_cm[0], c[1] + t.position_cm[1], c[2] + t.position_cm[2]]);
        let centroid = centroid.map(|v| v / n.max(1) as f64);
        let mut chiral = vec![Complex64::new(0.0, 0.0); points];
        let mut mean = vec![Complex64::new(0.0, 0.0); points];
        // Each distinct shape once on the grid: s for the intrinsic R_i, and
        // sigma = (Re s~, Im s) for the polarisability a_i = D_i sigma_i.
        let mut shapes: Vec<(Lineshape, Vec<Complex64>, Vec<Complex64>)> = Vec::new();
        let mut shape_of = Vec::with_capacity(n);
        for t in &self.transitions {
            let k = match shapes.iter().position(|(l, _, _)| *l == t.lineshape) {
                Some(k) => k,
                None => {
                    let (s, mean_re) = t.lineshape.values_with_mean(nu, &ln_nu);
                    let sigma = s.iter().zip(&mean_re).map(|(s, m)| Complex64::new(*m, s.im)).collect();
                    shapes.push((t.lineshape, s, sigma));
                    shapes.len() - 1
                }
            };
            shape_of.push(k);
            if t.rotatory_strength_esu2_cm2 != 0.0 {
                for (c, s) in chiral.iter_mut().zip(&shapes[k].1) {
                    *c += t.rotatory_strength_esu2_cm2 * s;
                }
            }
        }
        // A transition with D = 0 has a_i = 0: it neither responds nor couples.
        let active: Vec<usize> = (0..n).filter(|&i| self.transitions[i].dipole_strength_esu2_cm2 > 0.0).collect();
        if active.is_empty() {
            return Ok((chiral, mean));
        }
        let sigma = |i: usize, point: usize| shapes[shape_of[i]].2[point];
        let p: Vec<[f64; 3]> = self.transitions.iter().map(|t| t.direction).collect();
        let q: Vec<[f64; 3]> = self.transitions.iter().map(|t| cross(sub(t.position_cm, centroid), t.direction)).collect();
        let g = self.interaction();
        let screen = |i: usize| if self.screened { 1.0 / (n_solvent[i] * n_solvent[i]) } else { 1.0 };
        let lambda = POLARISABILITY_PER_DIPOLE_SHAPE;
        let mut structured = match solver {
            Solver::Auto | Solver::Structured => solve::Partitioned::new(&self.transitions, &g, &active, &p, &q),
            Solver::Lu => None,
        };
        let na = active.len();
        let mut lu = solve::Lu::new(na);
        let mut x = vec![Complex64::new(0.0, 0.0); na];
        for i in 0..points {
            let f = lambda * screen(i);
            if let Some((m, c)) = structured.as_mut().and_then(|s| s.at(|t| sigma(t, i), f)) {
                mean[i] += m;
                chiral[i] += PI * nu[i] * c;
                continue;
            }
            if solver == Solver::Structured {
                return Err(Error::new(ErrorKind::OutOfRange, "systems", format!("the structured solve fails at {} cm⁻¹", nu[i])));
            }
            // (I - f diag(a) G) X = diag(a) p_c: no division by a.
            let a: Vec<Complex64> = active.iter().map(|&t| self.transitions[t].dipole_strength_esu2_cm2 * sigma(t, i)).collect();
            lu.factor(|r, c| {
                let delta = if r == c { 1.0 } else { 0.0 };
                Complex64::new(delta, 0.0) - f * a[r] * g[active[r] * n + active[c]]
            })
            .map_err(|_| {
                Error::new(
                    ErrorKind::OutOfRange,
                    "systems",
                    format!(
                        "system \"{}\": the coupled response is singular at {} cm⁻¹ (coupling too strong for the widths)",
                        self.name, nu[i]
                    ),
                )
            })?;
            for comp in 0..3 {
                for (r, xr) in x.iter_mut().enumerate() {
                    *xr = a[r] * p[active[r]][comp];
                }
                lu.solve(&mut x);
                for (r, xr) in x.iter().enumerate() {
                    mean[i] += p[active[r]][comp] * xr;
                    chiral[i] += PI * nu[i] * q[active[r]][comp] * xr;
                }
            }
        }
        Ok((chiral, mean))
    }
}

/// How the coupled response is solved at each point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Solver {
    /// The largest group of one shape diagonalised once, the rest by a Schur
    /// complement per point (`solve::Partitioned`); a full LU where that fails.
    Auto,
    /// The structured solve alone (an error where it fails; for the tests).
    Structured,
    /// A full complex LU with partial pivoting at every point.
    Lu,
}
