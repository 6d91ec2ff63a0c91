//! The summed shapes of many bands at once, for the broadened computed
//! states (hundreds to thousands of bands of one width).
//!
//! A sum of bands no narrower than h is an analytic function that varies on
//! the scale of h, so it is computed exactly at Chebyshev-Lobatto nodes on
//! panels a few widths long and interpolated to the grid (barycentric
//! formula, Berrut & Trefethen, SIAM Review 46 (2004) 501). The number of
//! band evaluations falls from bands × points to bands × nodes, about
//! 8 nodes per width; where that would not save work the sum is made at the
//! points themselves. The interpolated sums agree with the direct ones to
//! about 1e-10 of their largest value (tested).

use crate::lineshape::{ln_grid, Lineshape, Terms};
use crate::model::Band;

/// The four sums every spectrum is made from (see `spectra`): the chiral
/// pair Σ R_j s_j (Re: Dn, Im: Dk) and the mean pair Σ D_j s~_j.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ShapeSums {
    pub delta_n: Vec<f64>,
    pub delta_k: Vec<f64>,
    pub mean_n: Vec<f64>,
    pub mean_k: Vec<f64>,
}

impl ShapeSums {
    fn zeros(n: usize) -> ShapeSums {
        ShapeSums { delta_n: vec![0.0; n], delta_k: vec![0.0; n], mean_n: vec![0.0; n], mean_k: vec![0.0; n] }
    }

    /// Adds each band's strength times its shapes (the chosen terms) at the points `nu`.
    fn add_bands(&mut self, bands: &[Band], nu: &[f64], terms: Terms) {
        let ln_nu = ln_grid(nu);
        for b in bands {
            let sums = [&mut self.delta_n[..], &mut self.delta_k[..], &mut self.mean_n[..], &mut self.mean_k[..]];
            b.lineshape.accumulate(nu, &ln_nu, b.rotatory_strength_esu2_cm2, b.dipole_strength_esu2_cm2, sums, terms);
        }
    }
}

/// Nodes per panel and the panel's length in units of the narrowest band's
/// scale: a Gaussian's 1/e half width (its sums are entire functions, so a
/// long panel with many nodes is cheapest), a Lorentzian's half width at
/// half maximum (poles at that distance from the real axis limit the
/// polynomial's reach). Chosen so the interpolation error stays near 1e-10
/// of the largest value (tests/band_sum.rs measures it).
const GAUSSIAN_PANEL: (usize, f64) = (41, 8.0);
const LORENTZ_PANEL: (usize, f64) = (29, 2.0);
/// Nodes of the one panel over the whole grid that takes the Gaussians'
/// mirror terms F((nu + nu_j)/Delta): |x| >= 2 nu_min/Delta there, a smooth
/// 1/x-like function whose pole at x = 0 lies well outside the panel.
const MIRROR_NODES: usize = 33;
/// The smallest (nu + nu_j)/Delta for which the mirror terms take that panel.
const MIRROR_APART_FROM: f64 = 20.0;

/// The length over which a band's shape changes appreciably, cm^-1, and the
/// panel fitting it. A Voigt is smoother than its Gaussian part alone (its
/// Fourier transform is the Gaussian's times the Lorentzian's).
fn panel_for(shape: &Lineshape) -> (usize, f64) {
    match *shape {
        Lineshape::Gaussian { delta, .. } | Lineshape::Voigt { delta, .. } => (GAUSSIAN_PANEL.0, GAUSSIAN_PANEL.1 * delta),
        Lineshape::Lorentz { gamma, .. } => (LORENTZ_PANEL.0, LORENTZ_PANEL.1 * gamma / 2.0),
    }
}

/// Equal panels over [lo, hi], each with the same Chebyshev-Lobatto nodes
/// (shared at panel ends).
struct Panels {
    lo: f64,
    length: f64,
    count: usize,
    /// The nodes on [-1, 1] and their barycentric weights, (-1)^j halved at the ends.
    reference: Vec<f64>,
    weights: Vec<f64>,
}

impl Panels {
    fn new(lo: f64, hi: f64, count: usize, per_panel: usize) -> Panels {
        let reference = (0..per_panel).map(|j| -(std::f64::consts::PI * j as f64 / (per_panel - 1) as f64).cos()).collect();
        let weights = (0..per_panel)
            .map(|j| {
                let w = if j % 2 == 0 { 1.0 } else { -1.0 };
                if j == 0 || j == per_panel - 1 {
                    w / 2.0
                } else {
                    w
                }
            })
            .collect();
        Panels { lo, length: (hi - lo) / count as f64, count, reference, weights }
    }

    /// Node k * (per_panel - 1) + j is node j of panel k.
    fn nodes(&self) -> Vec<f64> {
        (0..self.count)
            .flat_map(|k| {
                let start = self.lo + self.length * k as f64;
                let first = if k == 0 { 0 } else { 1 };
                self.reference[first..].iter().map(move |t| start + self.length * (t + 1.0) / 2.0).collect::<Vec<_>>()
            })
            .collect()
    }

    /// Adds the interpolant of the node values to `out` at the points `nu`.
    fn add_interpolated(&self, at_nodes: &ShapeSums, nu: &[f64], out: &mut ShapeSums) {
        let per_panel = self.reference.len();
        let mut c = vec![0.0; per_panel];
        for (i, x) in nu.iter().enumerate() {
            let k = (((x - self.lo) / self.length) as usize).min(self.count - 1);
            let t = 2.0 * (x - self.lo - self.length * k as f64) / self.length - 1.0;
            let base = k * (per_panel - 1);
            let on_node = self.reference.iter().position(|r| *r == t);
            if on_node.is_none() {
                let mut total = 0.0;
                for ((c, w), r) in c.iter_mut().zip(&self.weights).zip(&self.reference) {
                    *c = w / (t - r);
                    total += *c;
                }
                c.iter_mut().for_each(|c| *c /= total);
            }
            let value = |v: &[f64]| -> f64 {
                match on_node {
                    Some(j) => v[base + j],
                    None => c.iter().zip(&v[base..base + per_panel]).map(|(c, v)| c * v).sum::<f64>(),
                }
            };
            out.delta_n[i] += value(&at_nodes.delta_n);
            out.delta_k[i] += value(&at_nodes.delta_k);
            out.mean_n[i] += value(&at_nodes.mean_n);
            out.mean_k[i] += value(&at_nodes.mean_k);
        }
    }

    /// The bands' chosen terms at the nodes, interpolated and added to `out`.
    fn add_through_nodes(&self, bands: &[Band], terms: Terms, nu: &[f64], out: &mut ShapeSums) {
        let nodes = self.nodes();
        let mut at_nodes = ShapeSums::zeros(nodes.len());
        at_nodes.add_bands(bands, &nodes, terms);
        self.add_interpolated(&at_nodes, nu, out);
    }
}

/// The sums of `bands` at the points `nu` (cm^-1, any order), through nodes
/// where that saves work.
pub fn band_sums(bands: &[Band], nu: &[f64]) -> ShapeSums {
    let (lo, hi) = nu.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| (a.min(*x), b.max(*x)));
    // The narrowest band sets the panels for all.
    let panel = bands.iter().map(|b| panel_for(&b.lineshape)).min_by(|a, b| a.1.total_cmp(&b.1));
    let Some((per_panel, length)) = panel.filter(|_| hi > lo) else {
        return band_sums_direct(bands, nu);
    };
    let panels = ((hi - lo) / length).ceil().max(1.0);
    let node_count = panels * (per_panel - 1) as f64 + 1.0 + MIRROR_NODES as f64;
    // Interpolating costs about a band's evaluation per point; the nodes
    // pay off only when they are far fewer than the points.
    if node_count * 2.0 >= nu.len() as f64 || bands.len() < 2 {
        return band_sums_direct(bands, nu);
    }
    let mut sums = ShapeSums::zeros(nu.len());
    // The mirror terms go apart only where every Gaussian's lies in Dawson's
    // asymptotic range (exp(-x^2) nil, F ~ 1/2x), as it does for any band
    // narrower than about a tenth of its wavenumber.
    let apart = bands.iter().all(|b| match b.lineshape {
        Lineshape::Gaussian { center, delta } => (lo + center) / delta >= MIRROR_APART_FROM,
        _ => true,
    });
    let own = if apart { Terms::Own } else { Terms::All };
    Panels::new(lo, hi, panels as usize, per_panel).add_through_nodes(bands, own, nu, &mut sums);
    if apart && bands.iter().any(|b| matches!(b.lineshape, Lineshape::Gaussian { .. })) {
        Panels::new(lo, hi, 1, MIRROR_NODES).add_through_nodes(bands, Terms::Mirror, nu, &mut sums);
    }
    sums
}

/// The sums made at the points themselves, for checks.
pub fn band_sums_direct(bands: &[Band], nu: &[f64]) -> ShapeSums {
    let mut sums = ShapeSums::zeros(nu.len());
    sums.add_bands(bands, nu, Terms::All);
    sums
}
