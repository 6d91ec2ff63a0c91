//! A Levenberg-Marquardt solver for weighted least squares.
//!
//! Written here rather than taken from the `levenberg-marquardt` crate: the
//! fit must report progress after every iteration and stop when the page's
//! Cancel asks (that crate runs to completion without a callback), bounds
//! come through the variable transform of `params`, and the dense normal
//! equations of a few dozen parameters need only a Cholesky factorisation,
//! which keeps the wasm module small (no nalgebra).
//!
//! The method is Marquardt's (J. Soc. Indust. Appl. Math. 11, 431 (1963))
//! with scaling by the diagonal of J^T J and the damping update of Nielsen
//! (Technical Report IMM-REP-1999-05, Technical University of Denmark).

/// Why the solver stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Stop {
    /// Chi-square changed by less than the relative tolerance.
    Converged,
    /// The gradient vanished.
    Gradient,
    IterationLimit,
    Cancelled,
    /// No step reduced chi-square (damping ran away).
    Stalled,
}

impl Stop {
    pub fn describe(self) -> &'static str {
        match self {
            Stop::Converged => "converged (chi-square changes by less than 1e-10 relative)",
            Stop::Gradient => "converged (the gradient vanishes)",
            Stop::IterationLimit => "stopped at the iteration limit before converging",
            Stop::Cancelled => "cancelled",
            Stop::Stalled => "stopped: no step lowers chi-square further",
        }
    }

    pub const ALL: [Stop; 5] = [Stop::Converged, Stop::Gradient, Stop::IterationLimit, Stop::Cancelled, Stop::Stalled];

    /// The stop named by its key.
    pub fn from_key(key: &str) -> Option<Stop> {
        Stop::ALL.into_iter().find(|s| s.key() == key)
    }

    pub fn key(self) -> &'static str {
        match self {
            Stop::Converged => "converged",
            Stop::Gradient => "gradient",
            Stop::IterationLimit => "iteration_limit",
            Stop::Cancelled => "cancelled",
            Stop::Stalled => "stalled",
        }
    }
}

/// A least-squares problem in unconstrained variables: residuals r(u) and
/// their Jacobian, column-major (`jac[k * rows + i]` = d r_i / d u_k): the
/// model fills it band by band, column by column, and the normal equations
/// are dot products of its contiguous columns.
pub trait Problem {
    fn residuals(&self, u: &[f64], r: &mut Vec<f64>);
    fn jacobian(&self, u: &[f64], r: &mut Vec<f64>, jac: &mut Vec<f64>);
}

#[derive(Debug, Clone, PartialEq)]
pub struct Outcome {
    pub u: Vec<f64>,
    pub chi_square: f64,
    pub iterations: usize,
    pub stop: Stop,
}

pub const RELATIVE_TOLERANCE: f64 = 1e-10;
/// Damping (relative to the diagonal of J^T J) below which a step is close
/// to the Gauss-Newton step.
const LIGHT_DAMPING: f64 = 1e-2;

/// Minimises sum r^2 from u0. `progress(iteration, chi_square, u)` is called
/// after every accepted step (u: the variables reached); returning false cancels.
pub fn minimise(problem: &dyn Problem, u0: &[f64], max_iterations: usize, progress: &mut dyn FnMut(usize, f64, &[f64]) -> bool) -> Outcome {
    let n = u0.len();
    let mut u = u0.to_vec();
    let (mut r, mut jac) = (Vec::new(), Vec::new());
    problem.jacobian(&u, &mut r, &mut jac);
    let mut chi = sum_sq(&r);
    if n == 0 || r.is_empty() || !chi.is_finite() {
        return Outcome { u, chi_square: chi, iterations: 0, stop: if chi.is_finite() { Stop::Converged } else { Stop::Stalled } };
    }
    let mut lambda = -1.0;
    let mut grow = 2.0;
    // An accepted step near the Gauss-Newton step (little damping) that
    // barely lowers chi-square means a minimum; under heavy damping it may
    // only be a short step, so two in a row are asked for.
    let mut small_steps = 0;
    let mut trial = Vec::new();
    for iteration in 1..=max_iterations {
        // Normal equations A = J^T J, g = J^T r.
        let a = normal_matrix(&jac, n);
        let g: Vec<f64> = jac.chunks_exact(r.len()).map(|column| dot(column, &r)).collect();
        let gmax = g.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
        if gmax <= 1e-14 * chi.max(1e-300) {
            return Outcome { u, chi_square: chi, iterations: iteration - 1, stop: Stop::Gradient };
        }
        if lambda < 0.0 {
            // Dimensionless: the damping is lambda times the diagonal of J^T J.
            lambda = 1e-3;
        }
        let scale: Vec<f64> = (0..n).map(|p| a[p * n + p].max(1e-30)).collect();
        let mut accepted = false;
        for _ in 0..60 {
            let mut damped = a.clone();
            for p in 0..n {
                damped[p * n + p] += lambda * scale[p];
            }
            let step = match solve_cholesky(&damped, &g, n) {
                Some(s) => s,
                None => {
                    lambda *= grow;
                    grow *= 2.0;
                    continue;
                }
            };
            let candidate: Vec<f64> = u.iter().zip(&step).map(|(x, s)| x - s).collect();
            problem.residuals(&candidate, &mut trial);
            let new_chi = sum_sq(&trial);
            // Predicted reduction of the quadratic model.
            let predicted: f64 = step.iter().zip(&g).zip(&scale).map(|((s, gp), d)| s * (lambda * d * s + gp)).sum();
            let rho = (chi - new_chi) / predicted.max(1e-300);
            if new_chi.is_finite() && new_chi < chi && rho > 0.0 {
                let old = chi;
                let lightly_damped = lambda < LIGHT_DAMPING;
                u = candidate;
                problem.jacobian(&u, &mut r, &mut jac);
                chi = sum_sq(&r);
                // A step the quadratic model predicted well earns less
                // damping at once (Marquardt's factor 10), a poor one more.
                if rho > 0.75 {
                    lambda /= 10.0;
                } else if rho < 0.25 {
                    lambda *= 2.0;
                }
                grow = 2.0;
                accepted = true;
                if !progress(iteration, chi, &u) {
                    return Outcome { u, chi_square: chi, iterations: iteration, stop: Stop::Cancelled };
                }
                if (old - chi) <= RELATIVE_TOLERANCE * old {
                    small_steps += 1;
                    if small_steps >= 2 || lightly_damped {
                        return Outcome { u, chi_square: chi, iterations: iteration, stop: Stop::Converged };
                    }
                } else {
                    small_steps = 0;
                }
                break;
            }
            lambda *= grow;
            grow *= 2.0;
            if !lambda.is_finite() {
                break;
            }
        }
        if !accepted {
            return Outcome { u, chi_square: chi, iterations: iteration, stop: Stop::Stalled };
        }
    }
    Outcome { u, chi_square: chi, iterations: max_iterations, stop: Stop::IterationLimit }
}

/// J^T J for a column-major Jacobian of `n` columns: each entry a dot
/// product of two contiguous columns.
pub fn normal_matrix(jac: &[f64], n: usize) -> Vec<f64> {
    let mut a = vec![0.0; n * n];
    if n == 0 {
        return a;
    }
    let rows = jac.len() / n;
    for p in 0..n {
        let cp = &jac[p * rows..(p + 1) * rows];
        for q in p..n {
            let v = dot(cp, &jac[q * rows..(q + 1) * rows]);
            a[p * n + q] = v;
            a[q * n + p] = v;
        }
    }
    a
}

/// Summed in four interleaved lanes, which the compiler vectorises (a
/// running sum in one lane cannot be reordered).
fn dot(x: &[f64], y: &[f64]) -> f64 {
    let mut lanes = [0.0; 4];
    let (xc, yc) = (x.chunks_exact(4), y.chunks_exact(4));
    let tail: f64 = xc.remainder().iter().zip(yc.remainder()).map(|(a, b)| a * b).sum();
    for (a, b) in xc.zip(yc) {
        for k in 0..4 {
            lanes[k] += a[k] * b[k];
        }
    }
    (lanes[0] + lanes[1]) + (lanes[2] + lanes[3]) + tail
}

pub fn sum_sq(r: &[f64]) -> f64 {
    r.iter().map(|v| v * v).sum()
}

/// Solves A x = b for symmetric positive definite A (n x n, row-major) by
/// Cholesky; `None` when A is not positive definite.
pub fn solve_cholesky(a: &[f64], b: &[f64], n: usize) -> Option<Vec<f64>> {
    let l = cholesky(a, n)?;
    let mut y = b.to_vec();
    for i in 0..n {
        for k in 0..i {
            y[i] -= l[i * n + k] * y[k];
        }
        y[i] /= l[i * n + i];
    }
    for i in (0..n).rev() {
        for k in i + 1..n {
            y[i] -= l[k * n + i] * y[k];
        }
        y[i] /= l[i * n + i];
    }
    Some(y)
}

fn cholesky(a: &[f64], n: usize) -> Option<Vec<f64>> {
    let mut l = vec![0.0; n * n];
    for i in 0..n {
        for j in 0..=i {
            let mut s = a[i * n + j];
            for k in 0..j {
                s -= l[i * n + k] * l[j * n + k];
            }
            if i == j {
                if s.is_nan() || s <= 0.0 || !s.is_finite() {
                    return None;
                }
                l[i * n + i] = s.sqrt();
            } else {
                l[i * n + j] = s / l[j * n + j];
            }
        }
    }
    Some(l)
}

/// The inverse of a symmetric positive definite matrix; `None` if singular.
pub fn inverse_spd(a: &[f64], n: usize) -> Option<Vec<f64>> {
    let mut inv = vec![0.0; n * n];
    for c in 0..n {
        let mut e = vec![0.0; n];
        e[c] = 1.0;
        let col = solve_cholesky(a, &e, n)?;
        for r in 0..n {
            inv[r * n + c] = col[r];
        }
    }
    Some(inv)
}
