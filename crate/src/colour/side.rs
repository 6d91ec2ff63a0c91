//! The tube seen from the side, by the light the sample scatters at right
//! angles out of the polarised beam.
//!
//! Model (single scattering only: light scattered twice, or reflected by the
//! tube's walls, is left out; refraction at the wall is ignored, rays go
//! straight): the beam fills the tube (radius R, axis z from 0 at the
//! polariser to l, the document's path length) and at depth z carries the
//! Jones vector E(z) of `polarimeter`. A small scatterer there sends towards
//! the eye, in direction n, the intensity of a dipole driven by E:
//!     |E x n|^2 = |E|^2 - |n . E|^2        (complex E: elliptical light)
//! with the Rayleigh factor nu^4 (scatterers much smaller than the
//! wavelength). On its way to the eye that light is dimmed by the sample's
//! mean absorption (its circular dichroism there, which only changes the
//! polarisation the eye does not see, is left out).
//!
//! Geometry: the polariser's axis p is vertical (up in the picture); the eye
//! is at distance D from the tube's axis, level with it, opposite the middle
//! of the tube, on the side a clockwise quarter turn of p does not point to
//! (so the light runs from left to right across the picture). Each pixel is
//! the ray from the eye through a point of the tube's vertical mid-plane;
//! the picture spans the tube's length and its silhouette's height at one
//! scale, so the tube's diameter is l x height / width. Along each ray the
//! scattered light is summed over the chord through the tube. Because the
//! direction to the eye tilts with the height of the point seen, the dark
//! bands, where E lies along that direction, come at other depths above
//! and below the axis: the bands look slanted.
//!
//! Brightness: Y = 1 where light polarised across the line of sight is seen
//! through the tube's full diameter with no absorption. Pixels off the tube
//! are transparent. Bands narrower than about two pixels are not resolved.

use super::polarimeter::{apply, Optics};
use super::tables::COUNT;
use super::{srgb, wavelength_nm, Illuminant, Weights};
use crate::error::{Error, ErrorKind, Result};
use crate::units::{AxisUnit, MM_PER_CM};
use num_complex::Complex64;

/// Largest picture: 2400 x 1200 pixels.
pub const MAX_WIDTH: u32 = 2400;
pub const MAX_HEIGHT: u32 = 1200;
/// The usual viewing distance, cm: the conventional least distance of
/// distinct vision (25 cm; common practice). A tube longer than half of
/// it is seen from twice its length instead.
pub const DEFAULT_VIEWER_DISTANCE_CM: f64 = 25.0;
/// Samples along each ray's chord through the tube (midpoint rule; the
/// chord's depth span is at most R l / D, a few band widths at most).
const CHORD_SAMPLES: usize = 4;
/// Exit-path absorption is tabulated at depths this many absorption
/// lengths apart (linear interpolation then errs by under 1 %).
const ABSORPTION_STEP: f64 = 0.25;
const MAX_ABSORPTION_LEVELS: usize = 33;
/// Quantities tabulated per depth: for X, Y, Z, the weighted |E_p|^2,
/// |E_c|^2 and Re(E_p conj E_c).
const TERMS: usize = 9;

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SideViewRequest {
    pub width: u32,
    pub height: u32,
    pub illuminant: Illuminant,
    /// From the eye to the tube's axis, cm; `None`: the default distance.
    pub viewer_distance_cm: Option<f64>,
}

/// The rendered picture, row by row from the top.
#[derive(Debug, Clone)]
pub struct SideView {
    pub width: u32,
    pub height: u32,
    pub length_cm: f64,
    pub diameter_cm: f64,
    pub viewer_distance_cm: f64,
    /// CIE XYZ per pixel; `None` off the tube.
    pub pixels: Vec<Option<[f64; 3]>>,
}

impl SideView {
    /// RGBA bytes (sRGB, clipped; alpha 0 off the tube).
    pub fn rgba(&self) -> Vec<u8> {
        let encoder = srgb::ByteEncoder::new();
        let mut out = Vec::with_capacity(self.pixels.len() * 4);
        for p in &self.pixels {
            match p {
                Some(xyz) => {
                    let [r, g, b] = srgb::linear_from_xyz(*xyz).map(|v| encoder.byte(v));
                    out.extend_from_slice(&[r, g, b, 255]);
                }
                None => out.extend_from_slice(&[0, 0, 0, 0]),
            }
        }
        out
    }

    pub fn at(&self, column: u32, row: u32) -> Option<[f64; 3]> {
        self.pixels.get((row as usize) * self.width as usize + column as usize).copied().flatten()
    }
}

fn check_size(name: &str, value: u32, max: u32) -> Result<()> {
    if (1..=max).contains(&value) {
        Ok(())
    } else {
        Err(Error::new(ErrorKind::OutOfRange, name, format!("the side view's {name} must be 1 to {max} pixels (got {value})")))
    }
}

/// The default viewing distance for a tube of this length.
pub fn default_distance_cm(length_cm: f64) -> f64 {
    DEFAULT_VIEWER_DISTANCE_CM.max(2.0 * length_cm)
}

pub fn render(optics: &Optics, req: &SideViewRequest) -> Result<SideView> {
    check_size("width", req.width, MAX_WIDTH)?;
    check_size("height", req.height, MAX_HEIGHT)?;
    let (w, h) = (req.width as usize, req.height as usize);
    let l = optics.path_cm;
    let radius = 0.5 * l * h as f64 / w as f64;
    let d = req.viewer_distance_cm.unwrap_or_else(|| default_distance_cm(l));
    if !(d.is_finite() && d > 1.01 * radius) {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            "viewer_distance_cm",
            format!("the viewer must stand outside the tube: more than {:.3} mm from its axis (got {d} cm)", 1.01 * radius * MM_PER_CM),
        ));
    }
    if !(l.is_finite() && l > 0.0 && (d * d).is_finite() && (l * l).is_finite()) {
        return Err(Error::new(ErrorKind::OutOfRange, "sample.path_length_cm", "the tube is too long to draw"));
    }

    let table = DepthTable::new(optics, req.illuminant, w, radius, d);
    // Eye at (p, c, z) = (0, -D, l/2); mid-plane point (v, 0, u).
    let v_edge = radius * d / (d * d - radius * radius).sqrt();
    let mut pixels = Vec::with_capacity(w * h);
    for row in 0..h {
        let v = v_edge * (1.0 - 2.0 * (row as f64 + 0.5) / h as f64);
        for col in 0..w {
            let u = l * (col as f64 + 0.5) / w as f64;
            pixels.push(ray(&table, v, u, l, radius, d));
        }
    }
    Ok(SideView { width: req.width, height: req.height, length_cm: l, diameter_cm: 2.0 * radius, viewer_distance_cm: d, pixels })
}

/// The light of one ray: from the eye through the mid-plane point (v, 0, u).
fn ray(table: &DepthTable, v: f64, u: f64, l: f64, radius: f64, d: f64) -> Option<[f64; 3]> {
    // Direction (v, D, u - l/2); p^2 + c^2 = R^2 at t: (v^2 + D^2) t^2 - 2 D^2 t + D^2 - R^2 = 0.
    let dz = u - 0.5 * l;
    let a = v * v + d * d;
    let disc = d * d * radius * radius - v * v * (d * d - radius * radius);
    if disc < 0.0 {
        return None;
    }
    let root = disc.sqrt();
    let (t_in, t_out) = ((d * d - root) / a, (d * d + root) / a);
    let speed = (a + dz * dz).sqrt();
    // The direction to the eye, n = -direction / |direction| (its z part
    // meets no field: E lies across the beam).
    let (np, nc) = (-v / speed, -d / speed);
    let (npp, ncc, npc) = (np * np, nc * nc, 2.0 * np * nc);
    let dt = (t_out - t_in) / CHORD_SAMPLES as f64;
    let weight = dt * speed / (2.0 * radius);
    // Sum the terms over the chord first: the direction factors are the
    // same all along the ray.
    let mut terms = [0.0; TERMS];
    for k in 0..CHORD_SAMPLES {
        let t = t_in + (k as f64 + 0.5) * dt;
        let z = 0.5 * l + t * dz;
        if (0.0..=l).contains(&z) {
            table.add(&mut terms, weight, z, (t - t_in) * speed);
        }
    }
    Some(std::array::from_fn(|c| {
        let [pp, cc, pc] = [terms[3 * c], terms[3 * c + 1], terms[3 * c + 2]];
        (1.0 - npp) * pp + (1.0 - ncc) * cc - npc * pc
    }))
}

/// For each depth on a fine grid and each exit path on a coarse one, the
/// illuminant- and colour-matching-weighted field terms (what stays the
/// same along the ray, so each pixel costs a few interpolations).
struct DepthTable {
    dz: f64,
    depths: usize,
    ds: f64,
    levels: usize,
    values: Vec<f64>,
}

impl DepthTable {
    fn new(optics: &Optics, illuminant: Illuminant, width: usize, radius: f64, d: f64) -> DepthTable {
        let l = optics.path_cm;
        let depths = (4 * width).clamp(64, 8192) + 1;
        let dz = l / (depths - 1) as f64;
        // The longest exit path: the tube's diameter along the most oblique ray.
        let s_max = 2.0 * radius * (d * d + 0.25 * l * l + radius * radius).sqrt() / d;
        let alpha: Vec<f64> = optics.attenuation_per_cm.iter().map(|a| 2.0 * a).collect();
        let worst = alpha.iter().fold(0.0_f64, |m, a| m.max(a * s_max));
        let levels = if worst < 1e-9 { 1 } else { ((worst / ABSORPTION_STEP).ceil() as usize + 1).clamp(2, MAX_ABSORPTION_LEVELS) };
        let ds = if levels > 1 { s_max / (levels - 1) as f64 } else { 0.0 };
        // Rayleigh scattering: nu^4, relative to 560 nm to keep numbers of order one.
        let nu_ref = AxisUnit::Nanometre.to_wavenumber(560.0);
        let rayleigh = |i: usize| (AxisUnit::Nanometre.to_wavenumber(wavelength_nm(i)) / nu_ref).powi(4);
        let base = Weights::with_factor(illuminant, rayleigh);
        // weights[(i * levels + m) * 3 + c]
        let mut weights = vec![0.0; COUNT * levels * 3];
        for i in 0..COUNT {
            for m in 0..levels {
                let dim = (-alpha[i] * ds * m as f64).exp();
                for c in 0..3 {
                    weights[(i * levels + m) * 3 + c] = base.xyz[c][i] * dim;
                }
            }
        }
        // E(z) by stepping: E(z + dz) = M(dz) E(z).
        let steps: Vec<_> = (0..COUNT).map(|i| optics.matrix(i, dz)).collect();
        let mut field: Vec<[Complex64; 2]> = vec![[Complex64::new(1.0, 0.0), Complex64::new(0.0, 0.0)]; COUNT];
        let mut values = vec![0.0; depths * levels * TERMS];
        for k in 0..depths {
            let row = &mut values[k * levels * TERMS..(k + 1) * levels * TERMS];
            for i in 0..COUNT {
                let e = field[i];
                let q = [e[0].norm_sqr(), e[1].norm_sqr(), (e[0] * e[1].conj()).re];
                for m in 0..levels {
                    let w = &weights[(i * levels + m) * 3..(i * levels + m) * 3 + 3];
                    let cell = &mut row[m * TERMS..(m + 1) * TERMS];
                    for c in 0..3 {
                        cell[3 * c] += w[c] * q[0];
                        cell[3 * c + 1] += w[c] * q[1];
                        cell[3 * c + 2] += w[c] * q[2];
                    }
                }
                field[i] = apply(&steps[i], e);
            }
        }
        DepthTable { dz, depths, ds, levels, values }
    }

    fn cell(&self, k: usize, m: usize) -> &[f64; TERMS] {
        let start = (k * self.levels + m) * TERMS;
        // In range by construction (k < depths, m < levels); a zero cell otherwise.
        self.values.get(start..start + TERMS).and_then(|c| c.try_into().ok()).unwrap_or(&[0.0; TERMS])
    }

    /// Adds `weight` x the terms at depth `z` with an exit path `s`,
    /// interpolated linearly, to `acc`.
    fn add(&self, acc: &mut [f64; TERMS], weight: f64, z: f64, s: f64) {
        let (k, fz) = split(z / self.dz, self.depths);
        let (a, b) = (self.cell(k, 0), self.cell(k + 1, 0));
        if self.levels == 1 {
            let (wa, wb) = (weight * (1.0 - fz), weight * fz);
            for j in 0..TERMS {
                acc[j] += wa * a[j] + wb * b[j];
            }
            return;
        }
        let (m, fs) = split(s / self.ds, self.levels);
        let (a, b, c, e) = (self.cell(k, m), self.cell(k + 1, m), self.cell(k, m + 1), self.cell(k + 1, m + 1));
        let (wa, wb, wc, we) = (weight * (1.0 - fz) * (1.0 - fs), weight * fz * (1.0 - fs), weight * (1.0 - fz) * fs, weight * fz * fs);
        for j in 0..TERMS {
            acc[j] += wa * a[j] + wb * b[j] + wc * c[j] + we * e[j];
        }
    }
}

/// A position on a grid of `n` nodes as (lower node, fraction), with the
/// lower node at most n - 2.
fn split(x: f64, n: usize) -> (usize, f64) {
    let x = x.clamp(0.0, (n - 1) as f64);
    let k = (x.floor() as usize).min(n - 2);
    (k, x - k as f64)
}
