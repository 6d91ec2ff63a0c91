//! The linear algebra of the coupled response, written here rather than
//! taken from a crate: the systems are small (at most
//! `limits::MAX_SYSTEM_TRANSITIONS`), only an LU with partial pivoting and a
//! symmetric eigen-decomposition are needed, and a general linear-algebra
//! crate would cost the page's wasm (budget 600 kB) far more than these
//! hundred lines.

// Matrix index arithmetic reads as the algorithm is written.
#![allow(clippy::needless_range_loop)]

use super::Transition;
use num_complex::Complex64;

/// A complex LU factorisation with partial pivoting, reused across points.
pub struct Lu {
    n: usize,
    m: Vec<Complex64>,
    pivot: Vec<usize>,
}

/// The matrix has no usable pivot.
#[derive(Debug)]
pub struct Singular;

impl Lu {
    pub fn new(n: usize) -> Lu {
        Lu { n, m: vec![Complex64::new(0.0, 0.0); n * n], pivot: vec![0; n] }
    }

    /// Factors the matrix whose (row, column) entry `entry` gives.
    pub fn factor(&mut self, entry: impl Fn(usize, usize) -> Complex64) -> Result<(), Singular> {
        let n = self.n;
        for r in 0..n {
            for c in 0..n {
                self.m[r * n + c] = entry(r, c);
            }
        }
        for k in 0..n {
            let mut best = k;
            let mut size = self.m[k * n + k].norm_sqr();
            for r in k + 1..n {
                let v = self.m[r * n + k].norm_sqr();
                if v > size {
                    size = v;
                    best = r;
                }
            }
            if !(size > 0.0 && size.is_finite()) {
                return Err(Singular);
            }
            self.pivot[k] = best;
            if best != k {
                for c in 0..n {
                    self.m.swap(k * n + c, best * n + c);
                }
            }
            let inv = 1.0 / self.m[k * n + k];
            for r in k + 1..n {
                let l = self.m[r * n + k] * inv;
                self.m[r * n + k] = l;
                if l != Complex64::new(0.0, 0.0) {
                    for c in k + 1..n {
                        let u = self.m[k * n + c];
                        self.m[r * n + c] -= l * u;
                    }
                }
            }
        }
        Ok(())
    }

    /// Solves in place for the last factored matrix.
    pub fn solve(&self, x: &mut [Complex64]) {
        let n = self.n;
        for k in 0..n {
            x.swap(k, self.pivot[k]);
        }
        for r in 0..n {
            let mut s = x[r];
            for c in 0..r {
                s -= self.m[r * n + c] * x[c];
            }
            x[r] = s;
        }
        for r in (0..n).rev() {
            let mut s = x[r];
            for c in r + 1..n {
                s -= self.m[r * n + c] * x[c];
            }
            x[r] = s / self.m[r * n + r];
        }
    }
}

/// Eigenvalues and eigenvectors (columns of `vectors`, row-major n x n) of a
/// real symmetric matrix by cyclic Jacobi rotations.
pub fn symmetric_eigen(matrix: &[f64], n: usize) -> (Vec<f64>, Vec<f64>) {
    let mut a = matrix.to_vec();
    let mut v = vec![0.0; n * n];
    for i in 0..n {
        v[i * n + i] = 1.0;
    }
    let scale = a.iter().fold(0.0_f64, |m, x| m.max(x.abs()));
    for _sweep in 0..100 {
        let off: f64 = (0..n).flat_map(|i| (0..n).filter(move |j| *j != i).map(move |j| (i, j))).map(|(i, j)| a[i * n + j].powi(2)).sum();
        if off.sqrt() <= 1e-15 * scale || scale == 0.0 {
            break;
        }
        for p in 0..n {
            for q in p + 1..n {
                let apq = a[p * n + q];
                if apq == 0.0 {
                    continue;
                }
                let theta = (a[q * n + q] - a[p * n + p]) / (2.0 * apq);
                let t = theta.signum() / (theta.abs() + (theta * theta + 1.0).sqrt());
                let t = if theta == 0.0 { 1.0 } else { t };
                let c = 1.0 / (t * t + 1.0).sqrt();
                let s = t * c;
                for k in 0..n {
                    let (akp, akq) = (a[k * n + p], a[k * n + q]);
                    a[k * n + p] = c * akp - s * akq;
                    a[k * n + q] = s * akp + c * akq;
                }
                for k in 0..n {
                    let (apk, aqk) = (a[p * n + k], a[q * n + k]);
                    a[p * n + k] = c * apk - s * aqk;
                    a[q * n + k] = s * apk + c * aqk;
                }
                for k in 0..n {
                    let (vkp, vkq) = (v[k * n + p], v[k * n + q]);
                    v[k * n + p] = c * vkp - s * vkq;
                    v[k * n + q] = s * vkp + c * vkq;
                }
            }
        }
    }
    ((0..n).map(|i| a[i * n + i]).collect(), v)
}

/// When every transition has the same shape (centre and width), a_i = D_i
/// sigma(nu) and A = D^1/2 U diag(sigma/(1 - f sigma L_k)) U^T D^1/2 with
/// D^1/2 G D^1/2 = U L U^T, decomposed once: O(N) per point.
pub struct SharedShape {
    eigenvalues: Vec<f64>,
    /// Per mode: sum_c (U^T D^1/2 p_c)_k^2 and sum_c (U^T D^1/2 q_c)_k (U^T D^1/2 p_c)_k.
    mean_weight: Vec<f64>,
    chiral_weight: Vec<f64>,
}

impl SharedShape {
    pub fn new(t: &[Transition], g: &[f64], _lambda: f64, p: &[[f64; 3]], q: &[[f64; 3]]) -> Option<SharedShape> {
        let first = t.first()?;
        if t.iter().any(|x| x.lineshape != first.lineshape || x.dipole_strength_esu2_cm2 <= 0.0) {
            return None;
        }
        let n = t.len();
        let root: Vec<f64> = t.iter().map(|x| x.dipole_strength_esu2_cm2.sqrt()).collect();
        let b: Vec<f64> = (0..n * n).map(|ij| root[ij / n] * g[ij] * root[ij % n]).collect();
        let (eigenvalues, u) = symmetric_eigen(&b, n);
        let project = |w: &[[f64; 3]], k: usize, c: usize| (0..n).map(|i| u[i * n + k] * root[i] * w[i][c]).sum::<f64>();
        let mut mean_weight = vec![0.0; n];
        let mut chiral_weight = vec![0.0; n];
        for k in 0..n {
            for c in 0..3 {
                let pk = project(p, k, c);
                mean_weight[k] += pk * pk;
                chiral_weight[k] += project(q, k, c) * pk;
            }
        }
        Some(SharedShape { eigenvalues, mean_weight, chiral_weight })
    }

    /// (sum_ij A_ij e_i.e_j, sum_c q_c.A p_c) at a point of shape `sigma`
    /// with coupling factor `f` (pi/hc, over n^2 when screened).
    pub fn at(&self, sigma: Complex64, f: f64) -> (Complex64, Complex64) {
        let mut mean = Complex64::new(0.0, 0.0);
        let mut chiral = Complex64::new(0.0, 0.0);
        for k in 0..self.eigenvalues.len() {
            let w = sigma / (1.0 - f * self.eigenvalues[k] * sigma);
            mean += w * self.mean_weight[k];
            chiral += w * self.chiral_weight[k];
        }
        (mean, chiral)
    }
}
