//! The processing every CD user expects, as pure functions on sampled
//! spectra: blank subtraction, zeroing over a range, Savitzky-Golay
//! smoothing, dropping points above a detector-voltage limit, trimming.

/// Linear interpolation of (x, y) at `at`; x strictly monotonic (either
/// way). `None` outside the sampled range.
pub fn interpolate(x: &[f64], y: &[f64], at: f64) -> Option<f64> {
    if x.len() < 2 || x.len() != y.len() {
        return None;
    }
    let rising = x[1] > x[0];
    let (lo, hi) = if rising { (x[0], x[x.len() - 1]) } else { (x[x.len() - 1], x[0]) };
    if !(lo..=hi).contains(&at) {
        return None;
    }
    // First index whose x is at or beyond `at` in the direction of travel.
    let k = if rising { x.partition_point(|v| *v < at) } else { x.partition_point(|v| *v > at) };
    if k == 0 {
        return Some(y[0]);
    }
    let k = k.min(x.len() - 1);
    let (x0, x1, y0, y1) = (x[k - 1], x[k], y[k - 1], y[k]);
    Some(y0 + (y1 - y0) * (at - x0) / (x1 - x0))
}

/// y minus the blank interpolated at each x; `Err` with the first x the
/// blank does not cover.
pub fn subtract_blank(x: &[f64], y: &[f64], blank_x: &[f64], blank_y: &[f64]) -> Result<Vec<f64>, f64> {
    x.iter().zip(y).map(|(xi, yi)| interpolate(blank_x, blank_y, *xi).map(|b| yi - b).ok_or(*xi)).collect()
}

/// y minus its mean over [from, to] (either order); `None` when no point
/// lies in the range.
pub fn zero_at(x: &[f64], y: &[f64], from: f64, to: f64) -> Option<Vec<f64>> {
    let (lo, hi) = (from.min(to), from.max(to));
    let inside: Vec<f64> = x.iter().zip(y).filter(|(xi, _)| (lo..=hi).contains(*xi)).map(|(_, yi)| *yi).collect();
    if inside.is_empty() {
        return None;
    }
    let mean = inside.iter().sum::<f64>() / inside.len() as f64;
    Some(y.iter().map(|v| v - mean).collect())
}

/// Keeps the points inside [from, to] (either order).
pub fn keep_range(x: &[f64], from: f64, to: f64) -> Vec<bool> {
    let (lo, hi) = (from.min(to), from.max(to));
    x.iter().map(|v| (lo..=hi).contains(v)).collect()
}

/// Whether the points are evenly spaced (to 1 % of the step), as
/// Savitzky-Golay smoothing assumes.
pub fn evenly_spaced(x: &[f64]) -> bool {
    if x.len() < 3 {
        return true;
    }
    let step = (x[x.len() - 1] - x[0]) / (x.len() - 1) as f64;
    x.windows(2).all(|w| ((w[1] - w[0]) - step).abs() <= 0.01 * step.abs())
}

/// Savitzky-Golay smoothing (Savitzky and Golay, Anal. Chem. 36, 1627
/// (1964)) of evenly spaced data, with window 2m+1 and polynomial `order`.
/// The weights come from Gram polynomials (Gorry, Anal. Chem. 62, 570
/// (1990)), which also give the first and last m points their own
/// least-squares fit instead of leaving them unsmoothed. `window` must be
/// odd, greater than `order` and at most `y.len()`.
pub fn savitzky_golay(y: &[f64], window: usize, order: usize) -> Vec<f64> {
    let n = y.len();
    if window < 3 || window.is_multiple_of(2) || order >= window || window > n {
        return y.to_vec();
    }
    let m = (window / 2) as i64;
    let weights = |t: i64| -> Vec<f64> { (-m..=m).map(|i| gorry_weight(i, t, m, order)).collect() };
    let centre = weights(0);
    let mut out = vec![0.0; n];
    for (k, o) in out.iter_mut().enumerate() {
        let k = k as i64;
        // The window sits on the data; near the ends, evaluate its fit off-centre.
        let (start, t) = if k < m {
            (0, k - m)
        } else if k + m >= n as i64 {
            (n as i64 - 2 * m - 1, k - (n as i64 - m - 1))
        } else {
            (k - m, 0)
        };
        let w = if t == 0 { centre.clone() } else { weights(t) };
        *o = w.iter().zip(&y[start as usize..start as usize + window]).map(|(a, b)| a * b).sum();
    }
    out
}

/// Gorry's weight h_t(i) = sum_k (2k+1) [(2m)^(k) / (2m+k+1)^(k+1)] P_k(i) P_k(t),
/// a^(b) the generalised factorial a(a-1)...(a-b+1).
fn gorry_weight(i: i64, t: i64, m: i64, order: usize) -> f64 {
    let mut sum = 0.0;
    for k in 0..=order {
        let k_i = k as i64;
        let factor = generalised_factorial(2 * m, k_i) / generalised_factorial(2 * m + k_i + 1, k_i + 1);
        sum += (2 * k_i + 1) as f64 * factor * gram(i, m, k_i) * gram(t, m, k_i);
    }
    sum
}

fn generalised_factorial(a: i64, b: i64) -> f64 {
    (0..b).map(|j| (a - j) as f64).product()
}

/// Gram polynomial P_k^m(i) by its recurrence (Gorry 1990, eq. 10):
/// P_k = [2(2k-1)/(k(2m-k+1))] i P_{k-1} - [(k-1)(2m+k)/(k(2m-k+1))] P_{k-2}.
fn gram(i: i64, m: i64, k: i64) -> f64 {
    let (mut previous, mut current) = (0.0, 1.0);
    for j in 1..=k {
        let jf = j as f64;
        let denominator = jf * (2 * m - j + 1) as f64;
        let next = 2.0 * (2.0 * jf - 1.0) / denominator * i as f64 * current - (jf - 1.0) * (2 * m + j) as f64 / denominator * previous;
        previous = current;
        current = next;
    }
    current
}
