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

use crate::lineshape::{ln_grid, Lineshape};
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

    /// Adds each band's strength times its shapes at the points `nu`.
    fn add_bands(&mut self, bands: &[Band], nu: &[f64]) {
        let ln_nu = ln_grid(nu);
        for b in bands {
            let sums = [&mut self.delta_n[..], &mut self.delta_k[..], &mut self.mean_n[..], &mut self.mean_k[..]];
            b.lineshape.accumulate(nu, &ln_nu, b.rotatory_strength_esu2_cm2, b.dipole_strength_esu2_cm2, sums);
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

/// The length over which a band's shape changes appreciably, cm^-1, and the
/// panel fitting it. A Voigt is smoother than its Gaussian part alone (its
/// Fourier transform is the Gaussian's times the Lorentzian's).
fn panel_for(shape: &Lineshape) -> (usize, f64) {
    match *shape {
        Lineshape::Gaussian { delta, .. } | Lineshape::Voigt { delta, .. } => (GAUSSIAN_PANEL.0, GAUSSIAN_PANEL.1 * delta),
        Lineshape::Lorentz { gamma, .. } => (LORENTZ_PANEL.0, LORENTZ_PANEL.1 * gamma / 2.0),
    }
}

/// The sums of `bands` at the points `nu` (cm^-1, any order), through nodes
/// where that saves work.
pub fn band_sums(bands: &[Band], nu: &[f64]) -> ShapeSums {
    let mut sums = ShapeSums::zeros(nu.len());
    let (lo, hi) = nu.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), x| (a.min(*x), b.max(*x)));
    // The narrowest band sets the panels for all.
    let panel = bands.iter().map(|b| panel_for(&b.lineshape)).min_by(|a, b| a.1.total_cmp(&b.1));
    let Some((per_panel, length)) = panel.filter(|_| hi > lo) else {
        sums.add_bands(bands, nu);
        return sums;
    };
    let panels = ((hi - lo) / length).ceil().max(1.0);
    let node_count = panels * (per_panel - 1) as f64 + 1.0;
    // Interpolating costs about a band's evaluation per point; the nodes
    // pay off only when they are far fewer than the points.
    if node_count * 2.0 >= nu.len() as f64 || bands.len() < 2 {
        sums.add_bands(bands, nu);
        return sums;
    }
    let panels = panels as usize;
    let length = (hi - lo) / panels as f64;
    let reference: Vec<f64> = (0..per_panel).map(|j| -(std::f64::consts::PI * j as f64 / (per_panel - 1) as f64).cos()).collect();
    // Nodes shared at panel ends: node k * (per_panel - 1) + j of panel k.
    let nodes: Vec<f64> = (0..panels)
        .flat_map(|k| {
            let start = lo + length * k as f64;
            let first = if k == 0 { 0 } else { 1 };
            reference[first..].iter().map(move |t| start + length * (t + 1.0) / 2.0).collect::<Vec<_>>()
        })
        .collect();
    let mut at_nodes = ShapeSums::zeros(nodes.len());
    at_nodes.add_bands(bands, &nodes);
    // Barycentric weights of Chebyshev-Lobatto points: (-1)^j, halved at the ends.
    let weights: Vec<f64> = (0..per_panel)
        .map(|j| {
            let w = if j % 2 == 0 { 1.0 } else { -1.0 };
            if j == 0 || j == per_panel - 1 {
                w / 2.0
            } else {
                w
            }
        })
        .collect();
    let mut c = vec![0.0; per_panel];
    for (i, x) in nu.iter().enumerate() {
        let k = (((x - lo) / length) as usize).min(panels - 1);
        let t = 2.0 * (x - lo - length * k as f64) / length - 1.0;
        let base = k * (per_panel - 1);
        let on_node = reference.iter().position(|r| *r == t);
        if on_node.is_none() {
            let mut total = 0.0;
            for ((c, w), r) in c.iter_mut().zip(&weights).zip(&reference) {
                *c = w / (t - r);
                total += *c;
            }
            c.iter_mut().for_each(|c| *c /= total);
        }
        let values = |v: &[f64]| -> f64 {
            match on_node {
                Some(j) => v[base + j],
                None => c.iter().zip(&v[base..base + per_panel]).map(|(c, v)| c * v).sum::<f64>(),
            }
        };
        sums.delta_n[i] = values(&at_nodes.delta_n);
        sums.delta_k[i] = values(&at_nodes.delta_k);
        sums.mean_n[i] = values(&at_nodes.mean_n);
        sums.mean_k[i] = values(&at_nodes.mean_k);
    }
    sums
}

/// The sums made at the points themselves, for checks.
pub fn band_sums_direct(bands: &[Band], nu: &[f64]) -> ShapeSums {
    let mut sums = ShapeSums::zeros(nu.len());
    sums.add_bands(bands, nu);
    sums
}
