//! Axis scales: the value range of the traces, 1-2-5 ticks, tick labels with
//! a true minus, and the power of ten written into the axis label. Each
//! axis's scale is computed once ([`AxisScale`]) and used by the mesh, the
//! traces and the frame alike; the primary and secondary axes share the code.

use super::traces::Trace;
use super::unlerp;
use plotters::coord::ranged1d::{DefaultFormatting, KeyPointHint};
use plotters::prelude::Ranged;

/// A linear axis whose ticks we choose (plotters' own pick cannot be told
/// the 1-2-5 steps that the labels are formatted for).
#[derive(Clone)]
pub struct TickedAxis {
    lo: f64,
    hi: f64,
    ticks: Vec<f64>,
}

impl Ranged for TickedAxis {
    type FormatOption = DefaultFormatting;
    type ValueType = f64;

    fn map(&self, v: &f64, limit: (i32, i32)) -> i32 {
        let t = unlerp((self.lo, self.hi), *v);
        let span = f64::from(limit.1 - limit.0);
        let p = f64::from(limit.0) + span * t;
        // Far-off values (a line leaving the box) are pinned, not overflowed.
        p.clamp(-1e6, 1e6).round() as i32
    }

    fn key_points<Hint: KeyPointHint>(&self, _hint: Hint) -> Vec<f64> {
        self.ticks.clone()
    }

    fn range(&self) -> std::ops::Range<f64> {
        self.lo..self.hi
    }
}

pub fn ticked(lo: f64, hi: f64, ticks: Vec<f64>) -> TickedAxis {
    TickedAxis { lo, hi, ticks }
}

/// One value axis: its range, the power of ten it is shown in, and its ticks.
#[derive(Debug, Clone)]
pub struct AxisScale {
    /// Range in the request's unit.
    pub lo: f64,
    pub hi: f64,
    /// Shown values are value × 10^-exponent.
    pub exponent: i32,
    pub factor: f64,
    /// Tick positions (shown values) and their spacing.
    pub ticks: Vec<f64>,
    pub step: f64,
}

impl AxisScale {
    /// The scale of a range with about `target` ticks.
    pub fn new((lo, hi): (f64, f64), target: usize) -> AxisScale {
        let exponent = scale_exponent(lo, hi);
        let factor = 10f64.powi(-exponent);
        let (ticks, step) = ticks(lo * factor, hi * factor, target);
        AxisScale { lo, hi, exponent, factor, ticks, step }
    }

    /// The coordinate of the chart: shown values with our ticks.
    pub fn coord(&self) -> TickedAxis {
        ticked(self.lo * self.factor, self.hi * self.factor, self.ticks.clone())
    }

    /// Shown range (scaled).
    pub fn shown(&self) -> (f64, f64) {
        (self.lo * self.factor, self.hi * self.factor)
    }

    /// The axis label with the scale's power of ten.
    pub fn label(&self, quantity: &str) -> String {
        scaled_label(quantity, self.exponent)
    }
}

/// A secondary range whose zero sits at the same height as the primary's,
/// so that one zero line serves both axes (the Index plot).
pub fn zero_aligned(primary: (f64, f64), (a, b): (f64, f64)) -> (f64, f64) {
    let f = unlerp(primary, 0.0);
    if !(f > 0.0 && f < 1.0) || a > 0.0 || b < 0.0 {
        return (a, b);
    }
    let span = (-a / f).max(b / (1.0 - f));
    (-f * span, (1.0 - f) * span)
}

/// Value range of the traces over the visible points, padded; `include` is
/// forced in (zero for signed quantities).
pub fn value_range<'t>(traces: impl Iterator<Item = &'t Trace>, visible: &[bool], include: Option<f64>) -> (f64, f64) {
    let mut lo = f64::INFINITY;
    let mut hi = f64::NEG_INFINITY;
    for t in traces {
        for (v, _) in t.values.iter().zip(visible).filter(|(v, vis)| **vis && v.is_finite()) {
            lo = lo.min(*v);
            hi = hi.max(*v);
        }
    }
    if let Some(z) = include {
        lo = lo.min(z);
        hi = hi.max(z);
    }
    if !(lo.is_finite() && hi.is_finite()) {
        return (-1.0, 1.0);
    }
    let span = hi - lo;
    let scale = hi.abs().max(lo.abs());
    if span <= scale * 1e-12 || span == 0.0 {
        // A flat line: centre it in a small band around its value.
        let half = if scale > 0.0 { scale * 0.1 } else { 1.0 };
        return (lo - half, hi + half);
    }
    let pad = span * 0.06;
    let lo = if include == Some(lo) && lo == 0.0 && hi > 0.0 && lo >= 0.0 { lo - pad * 0.5 } else { lo - pad };
    (lo, hi + pad)
}

/// Ticks at 1-2-5 multiples of a power of ten, about `target` of them.
pub fn ticks(lo: f64, hi: f64, target: usize) -> (Vec<f64>, f64) {
    let target = target.max(2) as f64;
    let raw = (hi - lo) / target;
    let mag = 10f64.powf(raw.log10().floor());
    // The 1-2-5 step whose tick count is nearest the target (by ratio).
    let off = |s: f64| ((hi - lo) / s / target).ln().abs();
    let step = [0.5, 1.0, 2.0, 5.0, 10.0].iter().map(|m| m * mag).min_by(|a, b| off(*a).total_cmp(&off(*b))).unwrap_or(mag);
    let first = (lo / step).ceil() as i64;
    let last = (hi / step).floor() as i64;
    let ticks = (first..=last).take(100).map(|k| k as f64 * step).collect();
    (ticks, step)
}

/// Tick label with just enough decimals for the step and a true minus sign.
pub fn tick_label(v: f64, step: f64) -> String {
    let decimals = if step >= 1.0 { 0 } else { (-step.log10() - 1e-9).ceil().max(0.0) as usize };
    let text = format!("{:.*}", decimals, v);
    // "-0.0" and the like are zero.
    let text =
        if text.trim_start_matches('-').chars().all(|c| c == '0' || c == '.') { text.trim_start_matches('-').to_string() } else { text };
    text.replace('-', "\u{2212}")
}

/// Power of ten (multiple of 3) that brings the values to a readable size.
pub fn scale_exponent(lo: f64, hi: f64) -> i32 {
    let m = lo.abs().max(hi.abs());
    if m == 0.0 || !m.is_finite() {
        return 0;
    }
    let e = m.log10().floor() as i32;
    if (-2..4).contains(&e) {
        0
    } else {
        // Bounded so that 10^-e stays a finite double.
        (e.div_euclid(3) * 3).clamp(-300, 300)
    }
}

fn superscript(n: i32) -> String {
    n.to_string()
        .chars()
        .map(|c| match c {
            '-' => '⁻',
            '0' => '⁰',
            '1' => '¹',
            '2' => '²',
            '3' => '³',
            '4' => '⁴',
            '5' => '⁵',
            '6' => '⁶',
            '7' => '⁷',
            '8' => '⁸',
            _ => '⁹',
        })
        .collect()
}

/// "Q / U" shown as Q/(10^e U): "Q / 10^e U"; "Q = def" becomes "Q / 10^e (Q = def)".
pub fn scaled_label(label: &str, exponent: i32) -> String {
    if exponent == 0 {
        return label.to_string();
    }
    let power = format!("10{}", superscript(exponent));
    if let Some((q, u)) = label.split_once(" / ") {
        format!("{q} / {power} {u}")
    } else if let Some((q, _)) = label.split_once(" = ") {
        format!("{q} / {power}  ({label})")
    } else {
        format!("{label} / {power}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::figures::DELTA_N_LABEL;

    #[test]
    fn ticks_are_1_2_5_multiples_inside_the_range() {
        let (t, step) = ticks(183.0, 647.0, 10);
        assert_eq!(step, 50.0);
        assert_eq!(t.first().copied(), Some(200.0));
        assert_eq!(t.last().copied(), Some(600.0));
    }

    #[test]
    fn tick_labels_use_a_true_minus_and_no_negative_zero() {
        assert_eq!(tick_label(-0.2, 0.1), "\u{2212}0.2");
        assert_eq!(tick_label(-1e-17, 0.1), "0.0");
        assert_eq!(tick_label(250.0, 50.0), "250");
    }

    #[test]
    fn scaled_labels_follow_quantity_calculus() {
        assert_eq!(scaled_label("ΔA", -3), "ΔA / 10⁻³");
        assert_eq!(scaled_label("θ / mdeg", 3), "θ / 10³ mdeg");
        assert_eq!(scaled_label(DELTA_N_LABEL, -6), "Δn / 10⁻⁶  (Δn = nₗ − nᵣ)");
        assert_eq!(scale_exponent(-2.0e-6, 3.1e-6), -6);
        assert_eq!(scale_exponent(-20.0, 31.0), 0);
    }

    #[test]
    fn a_secondary_axis_puts_zero_where_the_primary_does() {
        let (a, b) = zero_aligned((-1.0, 3.0), (-2.0, 2.0));
        assert!((unlerp((a, b), 0.0) - 0.25).abs() < 1e-12, "{a} {b}");
        assert!(a <= -2.0 && b >= 2.0, "the data still fit: {a} {b}");
    }
}
