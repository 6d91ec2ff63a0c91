//! Geometry helpers: the classic couplet and identical chromophores on a helix.

use crate::document::{ChromophoreDoc, Direction, SystemDoc, TransitionDoc};

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
