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

/// The structured solve. The transitions (those with D > 0; the others take
/// no part in the coupling) fall into groups of one shape each, so per point
/// H = diag(1/sigma_i) - f B with B = D^1/2 G D^1/2. The largest group's block
/// is diagonal in the eigenbasis of its B block, decomposed once:
/// H00 = U (1/sigma_0 - f L) U^T. Eliminating it leaves the Schur complement
/// S = H_JJ - f^2 C^T diag(z) C of the other m transitions (C = U^T B_0J,
/// z_k = 1/(1/sigma_0 - f L_k)), factored per point: O(n0 m^2 + m^3) in place
/// of the O(n^3) of a full LU, and O(n) when every transition shares the shape.
pub struct Partitioned {
    /// A transition of the diagonalised group (its shape is the group's).
    lead: usize,
    /// The other transitions, as indices into the system's list.
    rest: Vec<usize>,
    eigenvalues: Vec<f64>,
    /// C, n0 x m row-major.
    c: Vec<f64>,
    /// C_ka C_kb for a <= b (packed by pair, then k): the Schur products.
    pairs: Vec<f64>,
    /// B on the rest, m x m.
    b_rest: Vec<f64>,
    /// U^T D^1/2 p_c and U^T D^1/2 q_c on the group, D^1/2 p_c and D^1/2 q_c on the rest.
    p0: [Vec<f64>; 3],
    q0: [Vec<f64>; 3],
    pr: [Vec<f64>; 3],
    qr: [Vec<f64>; 3],
    lu: Lu,
    schur: Vec<Complex64>,
    z: Vec<Complex64>,
    y: Vec<Complex64>,
}

impl Partitioned {
    /// `active` lists the transitions with D > 0; `g` is the full n x n
    /// interaction; `p` and `q` are e_i and (r_i - centroid) x e_i.
    pub fn new(t: &[Transition], g: &[f64], active: &[usize], p: &[[f64; 3]], q: &[[f64; 3]]) -> Option<Partitioned> {
        let n = t.len();
        // The largest group of one shape (the first such on a tie).
        let mut best: Vec<usize> = Vec::new();
        for &i in active {
            let group: Vec<usize> = active.iter().copied().filter(|&j| t[j].lineshape == t[i].lineshape).collect();
            if group.len() > best.len() {
                best = group;
            }
        }
        let lead = *best.first()?;
        let rest: Vec<usize> = active.iter().copied().filter(|i| !best.contains(i)).collect();
        let (n0, m) = (best.len(), rest.len());
        let root = |i: usize| t[i].dipole_strength_esu2_cm2.sqrt();
        let b = |i: usize, j: usize| root(i) * g[i * n + j] * root(j);
        let b00: Vec<f64> = (0..n0 * n0).map(|ij| b(best[ij / n0], best[ij % n0])).collect();
        let (eigenvalues, u) = symmetric_eigen(&b00, n0);
        let mut c = vec![0.0; n0 * m];
        for k in 0..n0 {
            for a in 0..m {
                c[k * m + a] = (0..n0).map(|i| u[i * n0 + k] * b(best[i], rest[a])).sum();
            }
        }
        let mut pairs = Vec::with_capacity(n0 * m * (m + 1) / 2);
        for a in 0..m {
            for bb in a..m {
                pairs.extend((0..n0).map(|k| c[k * m + a] * c[k * m + bb]));
            }
        }
        let b_rest = (0..m * m).map(|ab| b(rest[ab / m], rest[ab % m])).collect();
        let on_group = |w: &[[f64; 3]], comp: usize| -> Vec<f64> {
            (0..n0).map(|k| (0..n0).map(|i| u[i * n0 + k] * root(best[i]) * w[best[i]][comp]).sum()).collect()
        };
        let on_rest = |w: &[[f64; 3]], comp: usize| -> Vec<f64> { rest.iter().map(|&i| root(i) * w[i][comp]).collect() };
        Some(Partitioned {
            lead,
            eigenvalues,
            c,
            pairs,
            b_rest,
            p0: [0, 1, 2].map(|comp| on_group(p, comp)),
            q0: [0, 1, 2].map(|comp| on_group(q, comp)),
            pr: [0, 1, 2].map(|comp| on_rest(p, comp)),
            qr: [0, 1, 2].map(|comp| on_rest(q, comp)),
            lu: Lu::new(m),
            schur: vec![Complex64::new(0.0, 0.0); m * m],
            z: vec![Complex64::new(0.0, 0.0); n0],
            y: vec![Complex64::new(0.0, 0.0); m],
            rest,
        })
    }

    /// (sum_c P_c^T H^-1 P_c, sum_c Q_c^T H^-1 P_c) at a point where
    /// transition i has shape `sigma(i)`, with coupling factor `f` (pi/hc,
    /// over n^2 when screened). None where a shape or pivot vanishes (the
    /// caller then takes the full LU, which needs no division by a shape).
    pub fn at(&mut self, sigma: impl Fn(usize) -> Complex64, f: f64) -> Option<(Complex64, Complex64)> {
        let zero = Complex64::new(0.0, 0.0);
        let (n0, m) = (self.eigenvalues.len(), self.rest.len());
        let inv0 = reciprocal(sigma(self.lead))?;
        for k in 0..n0 {
            self.z[k] = reciprocal(inv0 - f * self.eigenvalues[k])?;
        }
        let f2 = f * f;
        let mut pair = 0;
        for a in 0..m {
            let inv_a = reciprocal(sigma(self.rest[a]))?;
            for b in a..m {
                let w = &self.pairs[pair * n0..(pair + 1) * n0];
                pair += 1;
                let (mut re, mut im) = (0.0, 0.0);
                for (w, z) in w.iter().zip(&self.z) {
                    re += w * z.re;
                    im += w * z.im;
                }
                let mut v = Complex64::new(-f * self.b_rest[a * m + b] - f2 * re, -f2 * im);
                if a == b {
                    v += inv_a;
                }
                self.schur[a * m + b] = v;
                self.schur[b * m + a] = v;
            }
        }
        let schur = &self.schur;
        self.lu.factor(|r, c| schur[r * m + c]).ok()?;
        let (mut mean, mut chiral) = (zero, zero);
        for comp in 0..3 {
            let (p0, q0, pr, qr) = (&self.p0[comp], &self.q0[comp], &self.pr[comp], &self.qr[comp]);
            for a in 0..m {
                let mut s = zero;
                for k in 0..n0 {
                    s += self.c[k * m + a] * (self.z[k] * p0[k]);
                }
                self.y[a] = pr[a] + f * s;
            }
            self.lu.solve(&mut self.y);
            for k in 0..n0 {
                let mut s = zero;
                for a in 0..m {
                    s += self.c[k * m + a] * self.y[a];
                }
                let y0 = self.z[k] * (p0[k] + f * s);
                mean += p0[k] * y0;
                chiral += q0[k] * y0;
            }
            for a in 0..m {
                mean += pr[a] * self.y[a];
                chiral += qr[a] * self.y[a];
            }
        }
        Some((mean, chiral))
    }
}

fn reciprocal(x: Complex64) -> Option<Complex64> {
    let r = 1.0 / x;
    (r.re.is_finite() && r.im.is_finite()).then_some(r)
}
