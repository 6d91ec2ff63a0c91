//! Geometry helpers: the classic couplet and identical chromophores on a helix.

use super::{cross, dot, sub};
use crate::document::{ChromophoreDoc, Direction, DirectionAngles, SystemDoc, TransitionDoc};

/// Two chromophores `distance_angstrom` apart on the z axis, the one at
/// -d/2 along x, the one at +d/2 turned by `twist_deg` about z. Seen from +z
/// (the +d/2 one in front), 0 < twist < 90 deg turns the front dipole
/// clockwise onto the back one: a positive exciton chirality.
pub fn couplet(distance_angstrom: f64, twist_deg: f64, transition: &TransitionDoc) -> SystemDoc {
    let t = twist_deg.to_radians();
    let unit = |name: &str, z: f64, d: [f64; 3]| ChromophoreDoc {
        name: name.into(),
        position_angstrom: [0.0, 0.0, z],
        direction: Direction::Vector(d),
        transitions: vec![TransitionDoc { direction: None, ..transition.clone() }],
    };
    SystemDoc {
        name: "couplet".into(),
        screened: false,
        uncoupled: false,
        chromophores: vec![
            unit("back", -distance_angstrom / 2.0, [1.0, 0.0, 0.0]),
            unit("front", distance_angstrom / 2.0, [t.cos(), t.sin(), 0.0]),
        ],
    }
}

/// Which way a helix turns going up its axis (+z).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Handedness {
    Right,
    Left,
}

/// `count` identical chromophores on a helix about z: unit k at angle
/// phi_k = +-k twist (+ for right-handed), radius `radius_angstrom`, height
/// k rise. `local_direction` is the transition direction in each unit's own
/// frame (radial, tangential, axial), normalised here.
pub fn helix(
    count: usize,
    radius_angstrom: f64,
    rise_angstrom: f64,
    twist_deg: f64,
    hand: Handedness,
    local_direction: [f64; 3],
    transitions: &[TransitionDoc],
) -> SystemDoc {
    let sign = if hand == Handedness::Right { 1.0 } else { -1.0 };
    let len = (local_direction.iter().map(|v| v * v).sum::<f64>()).sqrt();
    let l = local_direction.map(|v| v / len);
    let chromophores = (0..count)
        .map(|k| {
            let phi = sign * (k as f64 * twist_deg).to_radians();
            let (s, c) = phi.sin_cos();
            // Radial (c, s, 0), tangential along increasing path sign*(-s, c, 0), axial z.
            let dir = [l[0] * c - l[1] * sign * s, l[0] * s + l[1] * sign * c, l[2]];
            ChromophoreDoc {
                name: format!("U{}", k + 1),
                position_angstrom: [radius_angstrom * c, radius_angstrom * s, k as f64 * rise_angstrom],
                direction: Direction::Vector(dir),
                transitions: transitions.to_vec(),
            }
        })
        .collect();
    SystemDoc { name: "helix".into(), screened: false, uncoupled: false, chromophores }
}

/// The geometry a fit can refine in a system of two chromophores: their
/// distance (angstrom) and the twist (deg) of the second one's transition
/// direction about the axis from the first to the second, measured from the
/// first one's (the dihedral angle, in (-180, 180]). For [`couplet`] these are
/// its `distance_angstrom` and `twist_deg`. The twist is None where either
/// first direction lies along the axis (no dihedral is defined).
pub fn distance_and_twist(system: &SystemDoc) -> Option<(f64, Option<f64>)> {
    let [a, b] = system.chromophores.as_slice() else { return None };
    let r = sub(b.position_angstrom, a.position_angstrom);
    let d = norm(r);
    if d.is_nan() || d <= 0.0 {
        return None;
    }
    let axis = r.map(|v| v / d);
    let across = |e: [f64; 3]| {
        let along = dot(e, axis);
        let u = [e[0] - along * axis[0], e[1] - along * axis[1], e[2] - along * axis[2]];
        (norm(u) > 1e-9 * norm(e)).then_some(u)
    };
    let twist = match (across(a.direction.vector()), across(b.direction.vector())) {
        (Some(u0), Some(u1)) => Some(dot(axis, cross(u0, u1)).atan2(dot(u0, u1)).to_degrees()),
        _ => None,
    };
    Some((d, twist))
}

/// Moves the second chromophore along the axis to `distance_angstrom` from
/// the first and turns its directions (its own and its transitions') about
/// that axis until the twist is `twist_deg` (left as it is when None). Each
/// direction keeps the form it was written in.
pub fn set_distance_and_twist(system: &mut SystemDoc, distance_angstrom: f64, twist_deg: Option<f64>) {
    let Some((d, now)) = distance_and_twist(system) else { return };
    let (p0, p1) = (system.chromophores[0].position_angstrom, system.chromophores[1].position_angstrom);
    let axis = sub(p1, p0).map(|v| v / d);
    let second = &mut system.chromophores[1];
    second.position_angstrom = [0, 1, 2].map(|c| p0[c] + distance_angstrom * axis[c]);
    if let (Some(now), Some(want)) = (now, twist_deg) {
        let turn = (want - now).to_radians();
        second.direction = rotated(second.direction, axis, turn);
        for t in &mut second.transitions {
            t.direction = t.direction.map(|e| rotated(e, axis, turn));
        }
    }
}

/// Rodrigues' rotation of a direction about a unit axis, in the form given.
fn rotated(e: Direction, axis: [f64; 3], angle: f64) -> Direction {
    let v = e.vector();
    let (s, c) = angle.sin_cos();
    let k = cross(axis, v);
    let along = dot(axis, v) * (1.0 - c);
    let w = [0, 1, 2].map(|i| v[i] * c + k[i] * s + axis[i] * along);
    match e {
        Direction::Vector(_) => Direction::Vector(w),
        Direction::Angles(_) => {
            let len = norm(w);
            Direction::Angles(DirectionAngles {
                polar_deg: (w[2] / len).clamp(-1.0, 1.0).acos().to_degrees(),
                azimuth_deg: w[1].atan2(w[0]).to_degrees(),
            })
        }
    }
}

fn norm(a: [f64; 3]) -> f64 {
    dot(a, a).sqrt()
}
