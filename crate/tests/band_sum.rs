//! Many bands of one width summed through Chebyshev nodes (band_sum) against
//! the same sums made at every point: the interpolation (barycentric
//! formula on Chebyshev-Lobatto points, Berrut & Trefethen, SIAM Review 46
//! (2004) 501) must stay within 3e-10 of each sum's largest value, for every
//! shape and for narrow and wide bands. The direct sums themselves are the
//! library's lineshapes, checked against SciPy in tests/reference_functions.rs.

use chiroptic::band_sum::{band_sums, band_sums_direct, ShapeSums};
use chiroptic::lineshape::Lineshape;
use chiroptic::model::Band;
use chiroptic::units::AxisUnit;

/// 1200 bands (20 conformers × 60 states) at pseudo-random energies 3.5-7 eV.
fn bands(shape: &str, fwhm_ev: f64, count: usize) -> Vec<Band> {
    let mut seed = 7_u64;
    let mut uniform = move || {
        seed = seed.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (seed >> 11) as f64 / (1_u64 << 53) as f64
    };
    (0..count)
        .map(|_| {
            let nu = AxisUnit::ElectronVolt.to_wavenumber(3.5 + 3.5 * uniform());
            let w = AxisUnit::ElectronVolt.width_to_wavenumber(fwhm_ev, nu);
            let lineshape = match shape {
                "gaussian" => Lineshape::gaussian(nu, w),
                "lorentz" => Lineshape::lorentz(nu, w),
                _ => Lineshape::voigt(nu, w, w / 3.0),
            };
            Band {
                name: String::new(),
                lineshape,
                rotatory_strength_esu2_cm2: (uniform() - 0.5) * 1e-38,
                dipole_strength_esu2_cm2: uniform() * 1e-36,
            }
        })
        .collect()
}

fn grid(points: usize) -> Vec<f64> {
    (0..points).map(|i| AxisUnit::Nanometre.to_wavenumber(180.0 + 470.0 * i as f64 / (points - 1) as f64)).collect()
}

fn worst(fast: &ShapeSums, direct: &ShapeSums) -> f64 {
    let pairs = [
        (&fast.delta_n, &direct.delta_n),
        (&fast.delta_k, &direct.delta_k),
        (&fast.mean_n, &direct.mean_n),
        (&fast.mean_k, &direct.mean_k),
    ];
    pairs
        .iter()
        .map(|(a, b)| {
            let peak = b.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
            a.iter().zip(b.iter()).fold(0.0_f64, |e, (x, y)| e.max((x - y).abs())) / peak
        })
        .fold(0.0, f64::max)
}

#[test]
fn the_node_sums_match_the_direct_sums_for_every_shape_and_width() {
    let nu = grid(2000);
    for shape in ["gaussian", "lorentz", "voigt"] {
        // Voigt is slow to sum directly; fewer bands check the same thing.
        let count = if shape == "voigt" { 150 } else { 1200 };
        // 1.5 eV: wide enough that the Gaussians' mirror terms stay with their own.
        for fwhm_ev in [0.1, 0.25, 0.4, 1.5] {
            let b = bands(shape, fwhm_ev, count);
            let e = worst(&band_sums(&b, &nu), &band_sums_direct(&b, &nu));
            assert!(e < 3e-10, "{shape} {fwhm_ev} eV: {e:.2e} of the largest value");
        }
    }
}

#[test]
fn few_points_or_one_band_are_summed_directly_to_the_bit() {
    // Where nodes would not save work (a coarse grid, or one band), the
    // sums are the direct ones exactly.
    for (count, points) in [(1200, 150), (1, 2000)] {
        let b = bands("gaussian", 0.3, count);
        let nu = grid(points);
        assert_eq!(band_sums(&b, &nu), band_sums_direct(&b, &nu), "{count} bands on {points} points");
    }
}

#[test]
fn points_in_any_order_and_on_panel_ends_are_interpolated() {
    // A grid reversed and with repeated points (the panel ends and nodes
    // themselves are hit): the same values as the direct sums.
    let mut nu = grid(2001);
    nu.reverse();
    nu.extend_from_slice(&grid(2001)[..50]);
    let b = bands("gaussian", 0.3, 400);
    let e = worst(&band_sums(&b, &nu), &band_sums_direct(&b, &nu));
    assert!(e < 3e-10, "{e:.2e}");
    assert!(band_sums(&b, &nu).delta_k.iter().all(|v| v.is_finite()));
}
