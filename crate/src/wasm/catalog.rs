//! The catalog: every name, key, cap and default the page builds its
//! controls from, so that none is written twice.

use super::reply;
use crate::document::{Document, DEFAULT_VIEW_POINTS, MAX_BANDS, MAX_DOCUMENT_BYTES};
use crate::figures;
use crate::lines::STANDARD_LINES;
use crate::units::{self, CdUnit, ConcentrationUnit, OrdUnit};
use crate::view::{self, PlotKind, AXIS_UNITS};
use serde::Serialize;
use serde_json::json;
use wasm_bindgen::prelude::*;

pub fn concentration_unit(key: &str) -> Option<ConcentrationUnit> {
    ConcentrationUnit::parse(key)
}

pub fn cm_per_path_unit(key: &str) -> Option<f64> {
    units::PathUnit::parse(key).map(|u| u.cm())
}

/// The ORD units offered on the ORD plot (Δn has its own plot).
const ORD_MENU: [OrdUnit; 3] = [OrdUnit::Degrees, OrdUnit::SpecificRotation, OrdUnit::MolarRotation];

use crate::model::{BAND_NAME_PREFIX, MAX_SELLMEIER_TERMS, SHAPES};

/// Round steps offered for the CSV export, per axis unit, and the usual one.
fn csv_steps(key: &str) -> (&'static [f64], f64) {
    match key {
        "nm" => (&[0.1, 0.2, 0.5, 1.0, 2.0], 1.0),
        "cm-1" => (&[1.0, 2.0, 5.0, 10.0, 20.0, 50.0], 10.0),
        _ => (&[0.001, 0.002, 0.005, 0.01, 0.02], 0.005),
    }
}

/// A new, empty model: a millimolar sample in a 1 cm cell of water, no bands.
fn empty_document() -> serde_json::Value {
    json!({
        "chiroptic": crate::document::FORMAT_VERSION,
        "sample": { "concentration_mol_per_l": 0.001, "path_length_cm": 1.0, "solvent": { "sellmeier": crate::solvent::PRESETS[0] } },
        "bands": []
    })
}

#[derive(Serialize)]
struct Choice {
    key: &'static str,
    label: &'static str,
}

/// Every unit, plot, shape, cap and default the page offers: `{ ok, ... }`.
#[wasm_bindgen]
pub fn catalog() -> JsValue {
    let empty = empty_document();
    // The empty model must itself be a document the core reads.
    if let Err(e) = Document::from_value(empty.clone()) {
        return reply::failed(&e);
    }
    let choices = |all: &[(&'static str, &'static str)]| all.iter().map(|(key, label)| Choice { key, label }).collect::<Vec<_>>();
    let axis: Vec<_> = AXIS_UNITS
        .into_iter()
        .map(|u| {
            let key = view::axis_key(u);
            let (steps, usual) = csv_steps(key);
            json!({ "key": key, "label": u.label(), "csv_steps": steps, "csv_step": usual })
        })
        .collect();
    let concentration: Vec<_> = ConcentrationUnit::ALL
        .iter()
        .map(|u| json!({ "key": u.key(), "label": u.label(), "needs_molar_mass": u.to_mol_per_l(1.0, None).is_err() }))
        .collect();
    let start = (crate::solvent::WATER_20C_B.to_vec(), crate::solvent::WATER_20C_C_UM2.to_vec());
    reply::ok(&json!({
        "axis": axis,
        "cd": CdUnit::ALL.map(|u| Choice { key: u.key(), label: u.label() }),
        "ord": ORD_MENU.map(|u| Choice { key: u.key(), label: u.label() }),
        "concentration": concentration,
        "path": choices(&units::PathUnit::ALL.map(|u| (u.key(), u.key()))),
        "plots": PlotKind::ALL.map(|k| json!({ "key": k.key(), "title": k.title(), "name": k.name() })),
        "shapes": choices(&SHAPES),
        "lines": STANDARD_LINES.iter().map(|l| json!({ "name": l.name, "wavelength_nm": l.wavelength_nm })).collect::<Vec<_>>(),
        "palette": (0..figures::BAND_PALETTE.len()).map(figures::band_colour_hex).collect::<Vec<_>>(),
        "default_points": DEFAULT_VIEW_POINTS,
        "max_points": crate::spectra::MAX_GRID_POINTS,
        "max_bands": MAX_BANDS,
        "max_document_bytes": MAX_DOCUMENT_BYTES,
        "min_center_nm": crate::model::MIN_CENTER_NM,
        "max_center_nm": crate::model::MAX_CENTER_NM,
        "band_name_prefix": BAND_NAME_PREFIX,
        "new_band": { "shape": "gaussian", "fwhm_cm1": 3000.0, "rotatory_strength_1e40_cgs": 5.0, "dipole_strength_debye2": 1.0 },
        "new_band_window_nm": [200.0, 400.0],
        "empty_document": empty,
        "solvent_start": {
            "constant": { "constant": 1.333 },
            "preset": { "sellmeier": crate::solvent::PRESETS[0] },
            "sellmeier": { "sellmeier": { "b": start.0, "c_um2": start.1 } },
            "cauchy": { "cauchy": { "a": 1.324, "b_um2": 0.0031, "c_um4": 0.0 } },
        },
        "max_sellmeier_terms": MAX_SELLMEIER_TERMS,
        "presets": crate::solvent::PRESETS,
        "mdeg_per_delta_a": units::MDEG_PER_DEG * units::ELLIPTICITY_DEG_PER_DELTA_A,
    }))
}
