//! Computed excited states for the page: reading a transition list into a
//! document's `states` section, the populations the table shows, and the
//! comparison of the model's CD (and its mirror image) with a measured set.

use super::reply;
use crate::error::{Error, ErrorKind};
use crate::similarity::{compare, MAX_SHIFT_EV};
use crate::states::{self, doc::SHAPES, table, Broadening};
use crate::units::EnergyUnit;
use serde_json::json;
use wasm_bindgen::prelude::*;

/// The Lorentzian FWHM a broadening starts with when it is switched to
/// Voigt: a third of the usual Gaussian width, so that the Gaussian part
/// still sets the band's width (a starting value, changed at will).
const VOIGT_START_LORENTZ_FWHM_EV: f64 = states::DEFAULT_FWHM_EV / 3.0;

/// The panel's defaults: `{ ok, shapes, temperature_k, fwhm_ev, shift_ev,
/// scale, voigt_lorentz_fwhm_ev, max_shift_ev, max_transitions,
/// energy_fields: [{ key, unit }], caution }` (a conformer's energy fields
/// in the document and the unit each is in; the caution about the rotation
/// from a sum over states).
#[wasm_bindgen]
pub fn states_catalog() -> JsValue {
    let usual = crate::document::BroadeningDoc::default();
    let energy_fields: Vec<_> = [
        ("relative_energy_kcal_per_mol", EnergyUnit::KcalPerMol),
        ("relative_energy_kj_per_mol", EnergyUnit::KjPerMol),
        ("relative_energy_ev", EnergyUnit::ElectronVolt),
        ("relative_energy_hartree", EnergyUnit::Hartree),
    ]
    .iter()
    .map(|(key, unit)| json!({ "key": key, "unit": unit.key() }))
    .collect();
    reply::ok(&json!({
        "shapes": SHAPES,
        "temperature_k": states::DEFAULT_TEMPERATURE_K,
        "fwhm_ev": usual.fwhm_ev,
        "shift_ev": usual.shift_ev,
        "scale": usual.scale,
        "voigt_lorentz_fwhm_ev": VOIGT_START_LORENTZ_FWHM_EV,
        "max_shift_ev": MAX_SHIFT_EV,
        "fwhm_per_sigma": states::fwhm_from_sigma(1.0),
        "max_transitions": crate::limits::MAX_DOCUMENT_TRANSITIONS,
        "energy_fields": energy_fields,
        "caution": states::SUM_OVER_STATES_CAUTION,
    }))
}

/// A transition list (chiroptic's plain format, see `states::table`) as a
/// `states` section with the usual broadening: `{ ok, states }`, or the
/// line and what is wrong with it.
#[wasm_bindgen]
pub fn states_from_text(text: &str) -> JsValue {
    let result = (|| {
        if text.len() as u64 > crate::import::MAX_IMPORT_BYTES {
            return Err(Error::new(
                ErrorKind::TooLarge,
                "",
                format!("the list is {} bytes; the limit is {}", text.len(), crate::import::MAX_IMPORT_BYTES),
            ));
        }
        let conformers = table::parse(text).map_err(|e| Error::new(ErrorKind::Syntax, "", e.to_string()))?;
        let section = states::doc::to_doc(&conformers, &Broadening::default());
        // Checked as the model will check it (the document's own caps).
        states::ComputedStates::from_doc(&section)?;
        Ok(section)
    })();
    reply::reply_one("states", result)
}

/// Each conformer's population as the spectra use it (0 when switched off):
/// `{ ok, populations: [p] }`, or why the section is refused.
#[wasm_bindgen]
pub fn states_populations(doc: JsValue) -> JsValue {
    let result = super::document_from_js(doc).and_then(|doc| {
        let section =
            doc.states.as_ref().ok_or_else(|| Error::new(ErrorKind::MissingField, "states", "the model holds no computed states"))?;
        let (conformers, b) = states::doc::from_doc(section)?;
        states::populations(&conformers, b.temperature_k).map_err(states::in_section)
    });
    reply::reply_one("populations", result)
}

/// The model's CD against measured set `data_index` between two wavelengths
/// (nm; absent: the data's ends), each of the configuration and its mirror
/// image at its own best shift (and, with `fit_width`, width factor):
/// `{ ok, unshifted, computed: { score, shift_ev, width_factor }, mirror,
/// range_ev, verdict }`.
#[wasm_bindgen]
pub fn states_compare(doc: JsValue, data_index: usize, from_nm: Option<f64>, to_nm: Option<f64>, fit_width: bool, label: &str) -> JsValue {
    let result = super::document_from_js(doc).and_then(|doc| {
        let model = crate::model::Model::from_document(&doc)?;
        let sets = crate::data::data_sets(&doc, &model)?;
        let set = sets
            .get(data_index)
            .ok_or_else(|| Error::new(ErrorKind::OutOfRange, "data", format!("the model has no data set {}", data_index + 1)))?;
        let de = set.delta_epsilon().map_err(|e| Error::new(ErrorKind::MissingField, "data", format!("\"{}\": {}", set.name, e.0)))?;
        let c = compare(&model, &set.wavenumbers(), &de, (from_nm, to_nm), fit_width)?;
        let m = |m: &crate::similarity::Match| json!({ "score": m.score, "shift_ev": m.shift_ev, "width_factor": m.width_factor });
        Ok(json!({
            "unshifted": c.unshifted, "computed": m(&c.computed), "mirror": m(&c.mirror),
            "range_ev": [c.range_ev.0, c.range_ev.1], "verdict": c.verdict(label, fit_width),
        }))
    });
    reply::reply(result)
}
