//! Any bytes as a document: read, validate, and when valid evaluate on a
//! small grid and process its data sets; outputs must be finite or a typed error.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(doc) = chiroptic::Document::from_json(text) else { return };
    let Ok(model) = chiroptic::Model::from_document(&doc) else { return };
    let grid = [20_000.0, 35_000.0, 50_000.0];
    if let Ok(s) = chiroptic::evaluate(&model, &grid) {
        for v in s.rotation_deg.iter().chain(&s.delta_epsilon).chain(&s.epsilon) {
            assert!(!v.is_nan(), "evaluate gave NaN for a valid document");
        }
    }
    let _ = chiroptic::data::data_sets(&doc, &model);
});
