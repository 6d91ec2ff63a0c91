//! Fitting for the page, called from its fit worker (www/js/fitworker.js):
//! the core's `fit` on a document and its data sets, with progress through
//! JS callbacks. The loop is synchronous, so Cancel is the page terminating
//! the worker; nothing here needs to read a message.

use super::document_value;
use super::reply::{ok, reply};
use crate::data::data_sets;
use crate::document::{BandDoc, FitReportDoc, SystemDoc};
use crate::error::Error;
use crate::fit;
use crate::model::Model;
use js_sys::Function;
use serde::Serialize;
use wasm_bindgen::prelude::*;

/// The values a running fit has reached.
#[derive(Serialize)]
struct Snapshot<'a> {
    bands: &'a [BandDoc],
    systems: &'a [SystemDoc],
}

#[derive(Serialize)]
struct Fitted {
    document: serde_json::Value,
    report: FitReportDoc,
}

/// Fits the document's bands to its shown data sets and readings, as its
/// `fit` section says. After each accepted step `progress(start, iteration,
/// chi_square)` is called; when it returns true, `snapshot({ ok, bands,
/// systems })` gets the values reached, so the curves can follow (the page
/// throttles, since building them costs a document copy). Replies
/// `{ ok, document, report }` (the fitted document holds the report in
/// `fit.report` too) or the core's error.
#[wasm_bindgen]
pub fn fit_document(doc: JsValue, progress: &Function, snapshot: &Function) -> JsValue {
    let result = (|| -> Result<Fitted, Error> {
        let doc = super::document_from_js(doc)?;
        let model = Model::from_document(&doc)?;
        let sets = data_sets(&doc, &model)?;
        let fitted = fit::fit_watched(&doc, &model, &sets, &mut |step| {
            let asked = progress.call3(
                &JsValue::NULL,
                &JsValue::from(step.start as f64),
                &JsValue::from(step.iteration as f64),
                &JsValue::from(step.chi_square),
            );
            // A callback that throws is not the fit's business: it goes on.
            if asked.is_ok_and(|v| v.is_truthy()) {
                let now = step.document();
                let _ = snapshot.call1(&JsValue::NULL, &ok(&Snapshot { bands: &now.bands, systems: &now.systems }));
            }
            true
        })?;
        Ok(Fitted { document: document_value(&fitted.document), report: fitted.report })
    })();
    reply(result)
}

/// What the fit panel builds its controls from: the band fields a fit can
/// set (document key, short name), those free by default, the default and
/// largest number of starts and iterations, and the correlation named strong.
#[wasm_bindgen]
pub fn fit_catalog() -> JsValue {
    let fields: Vec<serde_json::Value> = fit::Field::ALL
        .iter()
        .map(|f| {
            let short = match f {
                fit::Field::Center => "centre",
                fit::Field::Width => "width",
                fit::Field::LorentzWidth => "lorentz",
                fit::Field::Rotatory => "R",
                fit::Field::Dipole => "D",
            };
            serde_json::json!({ "key": f.key(), "short": short })
        })
        .collect();
    ok(&serde_json::json!({
        "fields": fields,
        "default_free": fit::DEFAULT_FREE.map(|f| f.key()),
        "default_starts": fit::DEFAULT_STARTS,
        "max_starts": fit::MAX_STARTS,
        "default_max_iterations": fit::DEFAULT_MAX_ITERATIONS,
        "max_iterations": fit::MAX_ITERATIONS,
        "strong_correlation": fit::STRONG_CORRELATION,
    }))
}
