//! Fit parameters: what each one is, whether it is free, fixed, bounded or
//! linked, and the map between the solver's unconstrained variables and the
//! model's values.
//!
//! Bounds are enforced by a smooth transform of an unconstrained variable u
//! (two-sided: v = lo + (hi - lo)(1 + sin u)/2; one-sided: v = lo - 1 +
//! sqrt(u^2 + 1) and its mirror), as MINUIT does (James and Roos, Comput.
//! Phys. Commun. 10, 343 (1975)). It keeps the Levenberg-Marquardt step
//! unconstrained and every value inside its bounds exactly; the price is a
//! flat direction at a bound, so standard errors are computed in the model's
//! own values and a parameter at its bound is reported as such.
//!
//! A linked parameter is factor * (the value of another) + offset: one width
//! shared by several bands (factor 1), a couplet with R2 = -R1 (factor -1;
//! negation is exact, so R1 = -R2 to the last bit), a vibronic progression
//! with fixed spacing (centre = centre of the origin band + k * spacing, in cm^-1).

/// What a parameter sets. Centres and widths are in cm^-1 (the model's own
/// units, in which a vibronic spacing is constant), strengths in the
/// document's units (1e-40 cgs, debye^2).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Target {
    Center(usize),
    Fwhm(usize),
    LorentzFwhm(usize),
    Rotatory(usize),
    Dipole(usize),
    /// One shift of every band centre, cm^-1 (an energy shift).
    Shift,
    /// A data set's baseline offset, in the set's own unit.
    Offset(usize),
    /// A data set's scale factor (concentration uncertainty).
    Scale(usize),
    /// A two-chromophore coupled system's distance, angstrom.
    Distance(usize),
    /// A two-chromophore coupled system's twist, degrees.
    Twist(usize),
}

/// How a parameter takes part in the fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Mode {
    Fixed,
    Free { min: Option<f64>, max: Option<f64> },
    Linked { to: Target, factor: f64, offset: f64 },
}

#[derive(Debug, Clone, PartialEq)]
pub struct Parameter {
    pub target: Target,
    pub name: String,
    /// The starting value (and the value, when fixed).
    pub start: f64,
    pub mode: Mode,
}

/// The unconstrained variable of a free parameter and back.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Transform {
    None,
    Both { lo: f64, hi: f64 },
    Lower(f64),
    Upper(f64),
}

impl Transform {
    pub fn of(min: Option<f64>, max: Option<f64>) -> Transform {
        match (min, max) {
            (Some(lo), Some(hi)) => Transform::Both { lo, hi },
            (Some(lo), None) => Transform::Lower(lo),
            (None, Some(hi)) => Transform::Upper(hi),
            (None, None) => Transform::None,
        }
    }

    /// The value for an unconstrained u.
    pub fn value(self, u: f64) -> f64 {
        match self {
            Transform::None => u,
            Transform::Both { lo, hi } => lo + (hi - lo) * (1.0 + u.sin()) / 2.0,
            Transform::Lower(lo) => lo - 1.0 + (u * u + 1.0).sqrt(),
            Transform::Upper(hi) => hi + 1.0 - (u * u + 1.0).sqrt(),
        }
    }

    /// dv/du.
    pub fn slope(self, u: f64) -> f64 {
        match self {
            Transform::None => 1.0,
            Transform::Both { lo, hi } => (hi - lo) * u.cos() / 2.0,
            Transform::Lower(_) => u / (u * u + 1.0).sqrt(),
            Transform::Upper(_) => -u / (u * u + 1.0).sqrt(),
        }
    }

    /// The u for a value (clipped into the bounds).
    pub fn variable(self, v: f64) -> f64 {
        match self {
            Transform::None => v,
            Transform::Both { lo, hi } => (2.0 * (v - lo) / (hi - lo) - 1.0).clamp(-1.0, 1.0).asin(),
            Transform::Lower(lo) => {
                let t = (v - lo + 1.0).max(1.0);
                (t * t - 1.0).sqrt()
            }
            Transform::Upper(hi) => {
                let t = (hi - v + 1.0).max(1.0);
                (t * t - 1.0).sqrt()
            }
        }
    }

    /// Whether v sits at a bound (within a millionth of the bounded span).
    pub fn at_bound(self, v: f64) -> bool {
        let near = |b: f64, scale: f64| (v - b).abs() <= 1e-6 * scale.max(b.abs()).max(1e-300);
        match self {
            Transform::None => false,
            Transform::Both { lo, hi } => near(lo, hi - lo) || near(hi, hi - lo),
            Transform::Lower(lo) => near(lo, 1.0),
            Transform::Upper(hi) => near(hi, 1.0),
        }
    }
}

/// Every parameter resolved to either a fixed value or an affine function
/// a * u_value(k) + b of one free variable k.
#[derive(Debug, Clone, PartialEq)]
pub struct Layout {
    pub parameters: Vec<Parameter>,
    /// For each free variable: its parameter index and transform.
    pub free: Vec<(usize, Transform)>,
    /// For each parameter: Some((variable, factor, offset)) or None (fixed).
    pub map: Vec<Option<(usize, f64, f64)>>,
}

impl Layout {
    /// Resolves links (chains included); `Err` names a parameter whose link
    /// leads to no free parameter or loops.
    pub fn new(parameters: Vec<Parameter>) -> Result<Layout, String> {
        let mut free = Vec::new();
        let mut map = vec![None; parameters.len()];
        for (i, p) in parameters.iter().enumerate() {
            if let Mode::Free { min, max } = p.mode {
                if let (Some(lo), Some(hi)) = (min, max) {
                    if lo.is_nan() || hi.is_nan() || lo >= hi {
                        return Err(format!("{}: the lower bound {lo} must be below the upper bound {hi}", p.name));
                    }
                }
                if min.is_some_and(|lo| p.start < lo) || max.is_some_and(|hi| p.start > hi) {
                    return Err(format!("{}: the start value {} lies outside its bounds", p.name, p.start));
                }
                map[i] = Some((free.len(), 1.0, 0.0));
                free.push((i, Transform::of(min, max)));
            }
        }
        for i in 0..parameters.len() {
            if let Mode::Linked { .. } = parameters[i].mode {
                let (mut factor, mut offset, mut at) = (1.0, 0.0, i);
                for _ in 0..=parameters.len() {
                    match parameters[at].mode {
                        Mode::Linked { to, factor: f, offset: o } => {
                            // value(at) = f * value(to) + o
                            offset += factor * o;
                            factor *= f;
                            at = parameters
                                .iter()
                                .position(|p| p.target == to)
                                .ok_or_else(|| format!("{}: linked to a parameter that is not in the fit", parameters[i].name))?;
                        }
                        Mode::Free { .. } => break,
                        Mode::Fixed => return Err(format!("{}: linked to a fixed parameter (fix it instead)", parameters[i].name)),
                    }
                }
                match map[at] {
                    Some((k, _, _)) if matches!(parameters[at].mode, Mode::Free { .. }) => map[i] = Some((k, factor, offset)),
                    _ => return Err(format!("{}: its links go round in a circle", parameters[i].name)),
                }
            }
        }
        Ok(Layout { parameters, free, map })
    }

    /// The starting unconstrained variables.
    pub fn start(&self) -> Vec<f64> {
        self.free.iter().map(|(i, t)| t.variable(self.parameters[*i].start)).collect()
    }

    /// The value of every parameter for the variables u.
    pub fn values(&self, u: &[f64]) -> Vec<f64> {
        let free_values: Vec<f64> = self.free.iter().zip(u).map(|((_, t), u)| t.value(*u)).collect();
        self.parameters
            .iter()
            .zip(&self.map)
            .map(|(p, m)| match m {
                None => p.start,
                Some((k, 1.0, 0.0)) => free_values[*k],
                Some((k, factor, offset)) => factor * free_values[*k] + offset,
            })
            .collect()
    }

    /// dv/du of each free variable at u.
    pub fn slopes(&self, u: &[f64]) -> Vec<f64> {
        self.free.iter().zip(u).map(|((_, t), u)| t.slope(*u)).collect()
    }
}
