//! How well a computed spectrum matches a measured one: the normalised
//! overlap S = ∫ a b dE / sqrt(∫ a² dE ∫ b² dE) over a chosen range, in
//! [-1, 1] (1: the same shape, -1: the mirror image, 0: unrelated), on an
//! even energy grid; and the energy shift (and width) that maximise it. The
//! mirror image of a computed configuration has S of the opposite sign.

use crate::processing::interpolate;

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
