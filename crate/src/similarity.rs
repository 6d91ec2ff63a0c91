//! How well a computed spectrum matches a measured one: the normalised
//! overlap S = ∫ a b dE / sqrt(∫ a² dE ∫ b² dE) over a chosen range, in
//! [-1, 1] (1: the same shape, -1: the mirror image, 0: unrelated), on an
//! even energy grid; and the energy shift (and width) that maximise it. The
//! mirror image of a computed configuration has S of the opposite sign.

use crate::error::{Error, ErrorKind, Result};
use crate::model::Model;
use crate::processing::interpolate;
use crate::units::AxisUnit;

/// Grid step of the comparison, eV.
pub const COMPARE_STEP_EV: f64 = 0.005;
/// The shift search range, eV.
pub const MAX_SHIFT_EV: f64 = 1.0;
/// The scan step of the shift search, eV.
pub const SHIFT_SCAN_EV: f64 = 0.01;

/// One configuration's best match: S at its best shift (and width factor).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Match {
    pub score: f64,
    pub shift_ev: f64,
    pub width_factor: f64,
}

/// A model's CD against a measured one: S unshifted, and the best match of
/// the configuration and of its mirror image, over `range_ev`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Comparison {
    pub unshifted: f64,
    pub computed: Match,
    pub mirror: Match,
    pub range_ev: (f64, f64),
}

/// Below this best score neither configuration is said to match (common
/// practice puts a convincing assignment well above it).
pub const MATCH_THRESHOLD: f64 = 0.3;

impl Comparison {
    /// The verdict in plain words with its numbers, e.g. "the computed
    /// configuration (R) matches: 0.82 (shift +0.12 eV) against -0.79 (shift
    /// +0.10 eV) for its mirror image". `label` names the configuration.
    pub fn verdict(&self, label: &str, fit_width: bool) -> String {
        let text = |m: &Match| {
            let width = if fit_width { format!(", widths ×{:.2}", m.width_factor) } else { String::new() };
            format!("{:.2} (shift {:+.2} eV{width})", m.score, m.shift_ev)
        };
        let (computed, mirror) = (text(&self.computed), text(&self.mirror));
        let label = if label.is_empty() { String::new() } else { format!(" ({label})") };
        if self.computed.score.max(self.mirror.score) < MATCH_THRESHOLD {
            format!("neither the computed configuration{label}, {computed}, nor its mirror image, {mirror}, matches well")
        } else if self.computed.score >= self.mirror.score {
            format!("the computed configuration{label} matches: {computed} against {mirror} for its mirror image")
        } else {
            format!("the mirror image of the computed configuration{label} matches: {mirror} against {computed} for the computed one")
        }
    }
}

/// Compares the model's De with a measured De (at wavenumbers `nu`, any
/// order) between two wavelengths (nm; None: the data's end), each of the
/// configuration and its mirror at its own best shift within ±1 eV and,
/// with `fit_width`, its own best width factor on every band.
pub fn compare(
    model: &Model,
    nu: &[f64],
    measured_de: &[f64],
    range_nm: (Option<f64>, Option<f64>),
    fit_width: bool,
) -> Result<Comparison> {
    let ev: Vec<f64> = nu.iter().map(|n| AxisUnit::ElectronVolt.from_wavenumber(*n)).collect();
    let (lo_nm, hi_nm) = (range_nm.0.unwrap_or(f64::NEG_INFINITY), range_nm.1.unwrap_or(f64::INFINITY));
    let to_ev = |nm: f64| AxisUnit::ElectronVolt.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(nm));
    let (e_min, e_max) = (ev.iter().copied().fold(f64::INFINITY, f64::min), ev.iter().copied().fold(f64::NEG_INFINITY, f64::max));
    let e_lo = e_min.max(if hi_nm.is_finite() { to_ev(hi_nm) } else { e_min });
    let e_hi = e_max.min(if lo_nm.is_finite() { to_ev(lo_nm) } else { e_max });
    if e_hi.is_nan() || e_lo.is_nan() || e_hi <= e_lo {
        return Err(Error::new(ErrorKind::OutOfRange, "range", "the range leaves no measured point"));
    }
    let count = ((e_hi - e_lo) / COMPARE_STEP_EV).ceil() as usize + 1;
    let at: Vec<f64> = (0..count).map(|i| e_lo + (e_hi - e_lo) * i as f64 / (count - 1) as f64).collect();
    let mut pairs: Vec<(f64, f64)> = ev.iter().copied().zip(measured_de.iter().copied()).collect();
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    let (ev_sorted, de_sorted): (Vec<f64>, Vec<f64>) = pairs.into_iter().unzip();
    let measured: Vec<f64> = at.iter().map(|e| interpolate(&ev_sorted, &de_sorted, *e).unwrap_or(0.0)).collect();
    // The computed De on a grid wider by the shift range.
    let g_lo = (e_lo - MAX_SHIFT_EV).max(0.05);
    let g_count = ((e_hi + MAX_SHIFT_EV - g_lo) / COMPARE_STEP_EV).ceil() as usize + 1;
    let grid: Vec<f64> = (0..g_count).map(|i| g_lo + COMPARE_STEP_EV * i as f64).collect();
    let grid_nu: Vec<f64> = grid.iter().map(|e| AxisUnit::ElectronVolt.to_wavenumber(*e)).collect();
    // Solvent series outside their range do not matter for De: compare on a constant index.
    let mut plain = model.clone();
    plain.sample.solvent = crate::solvent::Solvent::Constant(1.0);
    let computed_at = |k: f64| -> Result<Vec<f64>> { Ok(crate::spectra::evaluate(&plain.widened(k), &grid_nu)?.delta_epsilon) };
    let computed = computed_at(1.0)?;
    let unshifted: Vec<f64> = at.iter().map(|e| interpolate(&grid, &computed, *e).unwrap_or(0.0)).collect();
    let best_for = |sign: f64| -> Result<Match> {
        if !fit_width {
            let (shift_ev, score) = best_shift(&grid, &computed, &at, &measured, MAX_SHIFT_EV, SHIFT_SCAN_EV, sign);
            return Ok(Match { score, shift_ev, width_factor: 1.0 });
        }
        let mut failure = None;
        let (k, _) = best_width(WIDTH_FACTOR_RANGE, |k| match computed_at(k) {
            Ok(c) => best_shift(&grid, &c, &at, &measured, MAX_SHIFT_EV, SHIFT_SCAN_EV, sign).1,
            Err(e) => {
                failure = Some(e);
                f64::NEG_INFINITY
            }
        });
        if let Some(e) = failure {
            return Err(e);
        }
        let (shift_ev, score) = best_shift(&grid, &computed_at(k)?, &at, &measured, MAX_SHIFT_EV, SHIFT_SCAN_EV, sign);
        Ok(Match { score, shift_ev, width_factor: k })
    };
    Ok(Comparison { unshifted: overlap(&unshifted, &measured), computed: best_for(1.0)?, mirror: best_for(-1.0)?, range_ev: (e_lo, e_hi) })
}

/// S of two spectra sampled at the same points (even spacing, so the
/// integrals' weights cancel).
pub fn overlap(a: &[f64], b: &[f64]) -> f64 {
    let (mut ab, mut aa, mut bb) = (0.0, 0.0, 0.0);
    for (x, y) in a.iter().zip(b) {
        if x.is_finite() && y.is_finite() {
            ab += x * y;
            aa += x * x;
            bb += y * y;
        }
    }
    if aa == 0.0 || bb == 0.0 {
        return 0.0;
    }
    ab / (aa * bb).sqrt()
}

/// The best shift: S(shift) for a computed spectrum `computed(E)` sampled on
/// a fine even grid `grid` (eV), against the measurement `measured` on the
/// even grid `at` (eV): the computed spectrum moved by +shift is read at
/// at - shift. A scan in `step` eV over [-max, max], then golden-section
/// refinement around the best scan point.
pub fn best_shift(grid: &[f64], computed: &[f64], at: &[f64], measured: &[f64], max_shift: f64, step: f64, sign: f64) -> (f64, f64) {
    let score = |shift: f64| -> f64 {
        let moved: Vec<f64> = at.iter().map(|e| interpolate(grid, computed, e - shift).map(|v| sign * v).unwrap_or(0.0)).collect();
        overlap(&moved, measured)
    };
    let steps = (max_shift / step).round() as i64;
    let (mut best_shift, mut best) = (0.0, f64::NEG_INFINITY);
    for k in -steps..=steps {
        let s = k as f64 * step;
        let v = score(s);
        if v > best {
            best = v;
            best_shift = s;
        }
    }
    // Golden section on [best - step, best + step].
    let (mut lo, mut hi) = ((best_shift - step).max(-max_shift), (best_shift + step).min(max_shift));
    let ratio = (5.0_f64.sqrt() - 1.0) / 2.0;
    for _ in 0..40 {
        let (m1, m2) = (hi - ratio * (hi - lo), lo + ratio * (hi - lo));
        if score(m1) > score(m2) {
            hi = m2;
        } else {
            lo = m1;
        }
    }
    let s = (lo + hi) / 2.0;
    let v = score(s);
    if v > best {
        (s, v)
    } else {
        (best_shift, best)
    }
}

/// Widths tried by [`best_width`]: factors on the computed bands' widths.
pub const WIDTH_FACTOR_RANGE: (f64, f64) = (0.5, 2.0);

/// The width factor k in `range` that maximises `score(k)` (the similarity at
/// its own best shift, for the bands' widths times k): a scan of 13 factors
/// even in ln k, then golden-section refinement in ln k around the best.
/// Returns (k, score).
pub fn best_width(range: (f64, f64), mut score: impl FnMut(f64) -> f64) -> (f64, f64) {
    let (a, b) = (range.0.ln(), range.1.ln());
    let steps = 12;
    let at = |i: usize| a + (b - a) * i as f64 / steps as f64;
    let (mut best_i, mut best) = (0, f64::NEG_INFINITY);
    for i in 0..=steps {
        let v = score(at(i).exp());
        if v > best {
            best = v;
            best_i = i;
        }
    }
    let (mut lo, mut hi) = (at(best_i.saturating_sub(1)), at((best_i + 1).min(steps)));
    let ratio = (5.0_f64.sqrt() - 1.0) / 2.0;
    let (mut m1, mut m2) = (hi - ratio * (hi - lo), lo + ratio * (hi - lo));
    let (mut s1, mut s2) = (score(m1.exp()), score(m2.exp()));
    // Each step reuses one score: ln k to 1e-4 in 20 steps.
    for _ in 0..20 {
        if s1 > s2 {
            hi = m2;
            (m2, s2) = (m1, s1);
            m1 = hi - ratio * (hi - lo);
            s1 = score(m1.exp());
        } else {
            lo = m1;
            (m1, s1) = (m2, s2);
            m2 = lo + ratio * (hi - lo);
            s2 = score(m2.exp());
        }
    }
    let (k, v) = if s1 > s2 { (m1.exp(), s1) } else { (m2.exp(), s2) };
    if v > best {
        (k, v)
    } else {
        (at(best_i).exp(), best)
    }
}
