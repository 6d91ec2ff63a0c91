//! Coupled chromophores for the page: the defaults of its panel, the couplet
//! helper (`coupled::geometry::couplet`) and the geometry the table and the
//! 3-D view show (directions as vectors and as angles, a pair's distance and
//! twist by `distance_and_twist`), so that no geometry is written in JavaScript.

use super::reply;
use crate::coupled::geometry::{couplet, distance_and_twist};
use crate::coupled::{System, MIN_SEPARATION_ANGSTROM};
use crate::document::{ChromophoreDoc, Direction, Document, SystemDoc, TransitionDoc};
use crate::error::{Error, ErrorKind};
use crate::limits::{MAX_CHROMOPHORES, MAX_SYSTEMS, MAX_TRANSITIONS_PER_CHROMOPHORE};
use serde_json::json;
use wasm_bindgen::prelude::*;

/// A couplet's starting distance and twist: an invented, clearly chiral pair.
const NEW_COUPLET_DISTANCE_ANGSTROM: f64 = 8.0;
const NEW_COUPLET_TWIST_DEG: f64 = 45.0;
/// Slider spans (the boxes take any value the core accepts).
const DISTANCE_SLIDER_ANGSTROM: [f64; 2] = [2.0, 30.0];
const TWIST_SLIDER_DEG: [f64; 2] = [-180.0, 180.0];
/// A chromophore added to a system sits this far beyond the last one along z.
const NEW_CHROMOPHORE_STEP_ANGSTROM: f64 = 6.0;

/// The panel's defaults and caps: `{ ok, new_transition, couplet, ... }`.
#[wasm_bindgen]
pub fn coupled_catalog() -> JsValue {
    let transition = TransitionDoc {
        shape: "gaussian".into(),
        center_nm: 250.0,
        fwhm_cm1: 3000.0,
        lorentz_fwhm_cm1: None,
        dipole_strength_debye2: 25.0,
        rotatory_strength_1e40_cgs: 0.0,
        direction: None,
    };
    let chromophore = ChromophoreDoc {
        name: String::new(),
        position_angstrom: [0.0; 3],
        direction: Direction::Vector([1.0, 0.0, 0.0]),
        transitions: vec![transition.clone()],
    };
    reply::ok(&json!({
        "new_transition": transition,
        "new_chromophore": chromophore,
        "new_chromophore_step_angstrom": NEW_CHROMOPHORE_STEP_ANGSTROM,
        "chromophore_name_prefix": "C",
        "couplet": { "distance_angstrom": NEW_COUPLET_DISTANCE_ANGSTROM, "twist_deg": NEW_COUPLET_TWIST_DEG },
        "distance_slider_angstrom": DISTANCE_SLIDER_ANGSTROM,
        "twist_slider_deg": TWIST_SLIDER_DEG,
        "min_separation_angstrom": MIN_SEPARATION_ANGSTROM,
        "max_systems": MAX_SYSTEMS,
        "max_chromophores": MAX_CHROMOPHORES,
        "max_transitions_per_chromophore": MAX_TRANSITIONS_PER_CHROMOPHORE,
    }))
}

/// Two chromophores of one transition (shape, centre, widths, dipole
/// strength; no intrinsic rotatory strength) at `distance_angstrom` and
/// `twist_deg` (see `couplet`), checked as the model will check them:
/// `{ ok, system }`, or the core's refusal (too close, a bad transition).
/// Plain arguments, not an object, keep the module small (no second reader).
#[wasm_bindgen]
pub fn couplet_system(
    distance_angstrom: f64,
    twist_deg: f64,
    shape: &str,
    center_nm: f64,
    fwhm_cm1: f64,
    lorentz_fwhm_cm1: Option<f64>,
    dipole_strength_debye2: f64,
) -> JsValue {
    let transition = TransitionDoc {
        shape: shape.into(),
        center_nm,
        fwhm_cm1,
        lorentz_fwhm_cm1,
        dipole_strength_debye2,
        rotatory_strength_1e40_cgs: 0.0,
        direction: None,
    };
    let result = (|| {
        check_distance(distance_angstrom)?;
        crate::error::finite("twist_deg", twist_deg)?;
        let system = couplet(distance_angstrom, twist_deg, &transition);
        System::from_doc(0, &system)?;
        Ok(system)
    })();
    reply::reply_one("system", result)
}

/// Polar (from +z) and azimuth (from +x towards +y) angles of a vector, degrees.
fn angles(v: [f64; 3]) -> Option<(f64, f64)> {
    let len = v.iter().map(|c| c * c).sum::<f64>().sqrt();
    (len.is_finite() && len > 0.0).then(|| ((v[2] / len).clamp(-1.0, 1.0).acos().to_degrees(), v[1].atan2(v[0]).to_degrees()))
}

/// A direction as a unit vector, or None when it has no length or is not finite.
fn unit(d: Direction) -> Option<[f64; 3]> {
    let v = d.vector();
    let len = v.iter().map(|c| c * c).sum::<f64>().sqrt();
    (len.is_finite() && len > 0.0).then(|| v.map(|c| c / len))
}

fn system_of(doc: &Document, index: usize) -> Result<&SystemDoc, Error> {
    doc.systems.get(index).ok_or_else(|| Error::new(ErrorKind::OutOfRange, "systems", format!("the document has no system {}", index + 1)))
}

/// The distance must keep the pair apart (said of the distance typed, before
/// the model names the chromophores).
fn check_distance(distance_angstrom: f64) -> Result<(), Error> {
    crate::error::finite("distance_angstrom", distance_angstrom)?;
    if distance_angstrom < MIN_SEPARATION_ANGSTROM {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            "distance_angstrom",
            format!("the two chromophores must be at least {MIN_SEPARATION_ANGSTROM} Å apart (got {distance_angstrom} Å)"),
        ));
    }
    Ok(())
}

/// What the page shows of system `index` of a document: `{ ok, chromophores:
/// [{ position, direction, polar_deg, azimuth_deg, transitions: [direction] }],
/// pair }`, a direction being a unit vector or null, `pair` `{
/// distance_angstrom, twist_deg }` for two chromophores (else null; the
/// twist null where a direction lies along the axis). The document is read
/// as files are (names and types, not values).
#[wasm_bindgen]
pub fn system_geometry(doc: JsValue, index: usize) -> JsValue {
    let result = super::document_from_js(doc).and_then(|doc| {
        let system = system_of(&doc, index)?;
        let chromophores: Vec<_> = system
            .chromophores
            .iter()
            .map(|c| {
                let direction = unit(c.direction);
                let (polar, azimuth) = match c.direction {
                    Direction::Angles(a) => (Some(a.polar_deg), Some(a.azimuth_deg)),
                    Direction::Vector(v) => angles(v).unzip(),
                };
                let transitions: Vec<_> = c.transitions.iter().map(|t| t.direction.map_or(direction, unit)).collect();
                json!({ "position": c.position_angstrom, "direction": direction, "polar_deg": polar,
                        "azimuth_deg": azimuth, "transitions": transitions })
            })
            .collect();
        let pair = distance_and_twist(system).map(|(d, t)| json!({ "distance_angstrom": d, "twist_deg": t }));
        Ok(json!({ "chromophores": chromophores, "pair": pair }))
    });
    reply::reply(result)
}
