//! Fitting for the page, called from its fit workers (www/js/fitworker.js):
//! the core's `fit` on a document and its data sets, with progress through
//! JS callbacks, whole (`fit_document`) or split over workers by start
//! (`fit_starts` on each, `fit_finish` on the page). The loop is
//! synchronous, so Cancel is the page terminating the workers; nothing here
//! needs to read a message. Also starting bands proposed from a measured CD
//! set (`propose_bands`, called on the page itself: it is quick).

use super::document_value;
use super::reply::{ok, reply};
use crate::data::data_sets;
use crate::document::{BandDoc, Document, FitReportDoc, SystemDoc};
use crate::error::{Error, ErrorKind};
use crate::fit;
use crate::fit::lm::{Outcome, Stop};
use crate::model::Model;
use js_sys::Function;
use serde::{Deserialize, Serialize};
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

/// The snapshot callback's call after an accepted step, when `progress` asks for it.
fn report_step(step: &fit::Step, progress: &Function, snapshot: &Function) -> bool {
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
}

fn prepared_from_js(doc: JsValue) -> Result<(Document, Model, Vec<crate::data::DataSet>), Error> {
    let doc = super::document_from_js(doc)?;
    let model = Model::from_document(&doc)?;
    let sets = data_sets(&doc, &model)?;
    Ok((doc, model, sets))
}

/// One start's outcome as it crosses to the page and back (a NaN chi-square crosses as null).
#[derive(Serialize, Deserialize)]
struct StartOutcome {
    start: usize,
    u: Vec<f64>,
    chi_square: Option<f64>,
    iterations: usize,
    stop: String,
}

#[derive(Serialize)]
struct Outcomes {
    outcomes: Vec<StartOutcome>,
}

/// Part of a fit, for one of several workers: the local fits from starts
/// `first`, `first + stride`, ... of the document's fit (progress as in
/// `fit_document`). Replies `{ ok, outcomes: [{ start, u, chi_square,
/// iterations, stop }] }` or the core's error; `fit_finish` joins them.
#[wasm_bindgen]
pub fn fit_starts(doc: JsValue, first: usize, stride: usize, progress: &Function, snapshot: &Function) -> JsValue {
    let result = (|| -> Result<Outcomes, Error> {
        let (doc, model, sets) = prepared_from_js(doc)?;
        let prepared = fit::prepare(&doc, &model, &sets)?;
        let outcomes = prepared
            .run_starts(first, stride, &mut |step| report_step(step, progress, snapshot))
            .into_iter()
            .map(|(start, o)| StartOutcome {
                start,
                u: o.u,
                chi_square: Some(o.chi_square).filter(|c| c.is_finite()),
                iterations: o.iterations,
                stop: o.stop.key().into(),
            })
            .collect();
        Ok(Outcomes { outcomes })
    })();
    reply(result)
}

/// The fit from every start's outcome (from `fit_starts` on each worker):
/// `{ ok, document, report }` as `fit_document` gives, or the core's error
/// (also when the outcomes do not match the document's starts).
#[wasm_bindgen]
pub fn fit_finish(doc: JsValue, outcomes: JsValue) -> JsValue {
    let result = (|| -> Result<Fitted, Error> {
        let (doc, model, sets) = prepared_from_js(doc)?;
        let prepared = fit::prepare(&doc, &model, &sets)?;
        let mut given: Vec<StartOutcome> = serde_wasm_bindgen::from_value(outcomes)
            .map_err(|e| Error::new(ErrorKind::Syntax, "fit", format!("the starts' outcomes are unreadable: {e}")))?;
        given.sort_by_key(|o| o.start);
        if given.iter().enumerate().any(|(k, o)| o.start != k) {
            return Err(Error::new(ErrorKind::OutOfRange, "fit", "the starts' outcomes do not number every start once"));
        }
        let all = given
            .into_iter()
            .map(|o| {
                let stop = Stop::from_key(&o.stop)
                    .ok_or_else(|| Error::new(ErrorKind::UnknownName, "fit", format!("unknown stop \"{}\"", o.stop)))?;
                Ok(Outcome { u: o.u, chi_square: o.chi_square.unwrap_or(f64::NAN), iterations: o.iterations, stop })
            })
            .collect::<Result<Vec<_>, Error>>()?;
        let fitted = prepared.finish(all)?;
        Ok(Fitted { document: document_value(&fitted.document), report: fitted.report })
    })();
    reply(result)
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
        let (doc, model, sets) = prepared_from_js(doc)?;
        let fitted = fit::fit_watched(&doc, &model, &sets, &mut |step| report_step(step, progress, snapshot))?;
        Ok(Fitted { document: document_value(&fitted.document), report: fitted.report })
    })();
    reply(result)
}

/// Starting bands from the document's data set `index` (a CD set, after its
/// processing), at most `max_bands`, one per lobe: `{ ok, bands, proposed,
/// set }` with `bands` every band the document has afterwards (the
/// proposal in place of its bands, or with `add` after them), or the core's
/// error naming what is wrong (a set that is not CD or has no CD ...).
#[wasm_bindgen]
pub fn propose_bands(doc: JsValue, index: usize, max_bands: usize, add: bool) -> JsValue {
    let result = super::document_from_js(doc).and_then(|doc| fit::propose_in_document(&doc, index, max_bands, add));
    reply(result)
}

/// What the fit panel builds its controls from: the band fields a fit can
/// set (document key, short name), those free by default, the default and
/// largest number of starts and iterations, the correlation named strong,
/// and how many bands "Propose bands" offers by default.
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
        "propose_default_bands": fit::PROPOSED_DEFAULT_BANDS,
    }))
}
