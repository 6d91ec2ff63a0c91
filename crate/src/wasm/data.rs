//! Measured data for the page: a file's table previewed, a data-set entry
//! made from it and the user's column choice, each set's state after its
//! processing (points, residual, what smoothing removed), Kramers-Kronig
//! predictions as derived sets, and rotations at the lamp lines from measured
//! CD and from typed readings. Every number comes from the core (`import`,
//! `data`, `overlay`, `kk`, `units`); nothing here converts a unit.

use super::document_from_js;
use super::reply::{reply, reply_one};
use crate::data::{axis_doc, data_set_doc, data_sets, DataSet};
use crate::document::{ConditionsDoc, DataSetDoc, Document, SourceDoc};
use crate::error::{Error, ErrorKind};
use crate::import::{self, ColumnChoice, ColumnKind, Measured, Table};
use crate::kk;
use crate::lines::STANDARD_LINES;
use crate::model::Model;
use crate::overlay::{self, rms, DERIVED_FORMAT};
use crate::units::{AbsorptionUnit, AxisUnit, CdUnit, OrdUnit, SampleContext};
use crate::view::View;
use serde::{Deserialize, Serialize};
use serde_json::{json, Value};
use wasm_bindgen::prelude::*;

/// Rows of the table shown in the preview.
const PREVIEW_ROWS: usize = 6;
/// Metadata lines kept with a data set (the rest stay in the file).
const KEPT_METADATA: usize = 40;

fn file_error(name: &str, e: import::ImportError) -> Error {
    Error::new(ErrorKind::Syntax, "file", format!("{name}: {e}"))
}

/// The last table read, with what identifies its text: the page previews a
/// file and then makes its data set from the same text, which need not be
/// read twice.
struct LastTable {
    key: (usize, u64, Option<usize>),
    table: Table,
}

thread_local! {
    static LAST_TABLE: std::cell::RefCell<Option<LastTable>> = const { std::cell::RefCell::new(None) };
}

fn text_hash(text: &str) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::collections::hash_map::DefaultHasher::new();
    text.hash(&mut h);
    h.finish()
}

fn read_table(text: &str, name: &str, block: Option<usize>) -> Result<Table, Error> {
    let key = (text.len(), text_hash(text), block);
    let cached = LAST_TABLE.with(|c| c.borrow().as_ref().filter(|last| last.key == key).map(|last| last.table.clone()));
    if let Some(table) = cached {
        return Ok(table);
    }
    let table = import::read(text, block).map_err(|e| file_error(name, e))?;
    LAST_TABLE.with(|c| *c.borrow_mut() = Some(LastTable { key, table: table.clone() }));
    Ok(table)
}

fn kind_value(kind: Option<ColumnKind>) -> Value {
    match kind {
        Some(ColumnKind::Measured(m)) => json!({ "role": "measured", "quantity": m.quantity(), "unit": m.unit_key() }),
        Some(ColumnKind::Uncertainty) => json!({ "role": "sd" }),
        Some(ColumnKind::DetectorVolts) => json!({ "role": "ht" }),
        Some(ColumnKind::Axis(a)) => json!({ "role": "axis", "unit": a.key() }),
        None => Value::Null,
    }
}

/// The quantities and units a measured column may hold, for the picker.
fn measured_units() -> Value {
    let menu = |units: Vec<(&'static str, &'static str)>| {
        units.into_iter().map(|(key, label)| json!({ "key": key, "label": label })).collect::<Vec<_>>()
    };
    json!({
        "cd": menu(CdUnit::ALL.into_iter().filter(|u| *u != CdUnit::Dissymmetry).map(|u| (u.key(), u.label())).collect()),
        "ord": menu(OrdUnit::ALL.into_iter().filter(|u| *u != OrdUnit::DeltaN).map(|u| (u.key(), u.label())).collect()),
        "absorption": menu(AbsorptionUnit::ALL.into_iter().map(|u| (u.key(), u.label())).collect()),
        "axis": menu([AxisUnit::Nanometre, AxisUnit::Wavenumber, AxisUnit::ElectronVolt].into_iter().map(|a| (a.key(), a.label())).collect()),
    })
}

/// A file's table as the picker shows it: `{ ok, format, x_label, axis,
/// columns: [{ label, kind }], rows, points, notes, metadata, recognised,
/// problem, units }`. `recognised` says whether the header alone tells
/// axis and measurement (`problem` says what is missing when it does not).
#[wasm_bindgen]
pub fn import_preview(text: &str, name: &str, block: Option<usize>) -> JsValue {
    reply(read_table(text, name, block).map(|t| {
        let rows: Vec<Vec<f64>> = (0..t.x.len().min(PREVIEW_ROWS))
            .map(|i| std::iter::once(t.x[i]).chain(t.columns.iter().map(|c| c.values[i])).collect())
            .collect();
        let recognised = t.recognise(&ColumnChoice::default());
        json!({
            "format": t.format,
            "x_label": t.x_label,
            "axis": t.axis.map(|a| a.key()),
            "columns": t.columns.iter().map(|c| json!({ "label": c.label, "kind": kind_value(c.kind) })).collect::<Vec<_>>(),
            "rows": rows,
            "points": t.x.len(),
            "notes": t.notes,
            "metadata": t.metadata.iter().take(KEPT_METADATA).collect::<Vec<_>>(),
            "recognised": recognised.is_ok(),
            "problem": recognised.err().map(|e| e.to_string()),
            "units": measured_units(),
        })
    }))
}

/// The user's column choice from the picker (every part optional).
#[derive(Debug, Default, Deserialize)]
#[serde(default)]
struct ChoiceIn {
    axis: Option<String>,
    column: Option<usize>,
    quantity: Option<String>,
    unit: Option<String>,
}

fn column_choice(choice: JsValue) -> Result<ColumnChoice, Error> {
    let c: ChoiceIn = if choice.is_undefined() || choice.is_null() {
        ChoiceIn::default()
    } else {
        serde_wasm_bindgen::from_value(choice).map_err(|e| Error::new(ErrorKind::Syntax, "choice", format!("not a column choice: {e}")))?
    };
    let axis = match &c.axis {
        Some(k) => Some(
            AxisUnit::parse(k).ok_or_else(|| Error::new(ErrorKind::UnknownName, "choice.axis", format!("unknown axis unit \"{k}\"")))?,
        ),
        None => None,
    };
    let measured = match (&c.quantity, &c.unit) {
        (Some(q), Some(u)) => Some(
            Measured::parse(q, u)
                .ok_or_else(|| Error::new(ErrorKind::UnknownName, "choice.unit", format!("\"{u}\" is not a unit of {q}")))?,
        ),
        _ => None,
    };
    Ok(ColumnChoice { axis, column: c.column, measured })
}

/// A name no set of `doc` has yet: `stem`, else `stem (2)`, `stem (3)` ...
fn unique_name(doc: &Document, stem: &str) -> String {
    let taken = |n: &str| doc.data.iter().any(|d| d.name == n);
    let stem = if stem.trim().is_empty() { "data" } else { stem.trim() };
    (1..).map(|k| if k == 1 { stem.to_string() } else { format!("{stem} ({k})") }).find(|n| !taken(n)).unwrap_or_default()
}

fn stem_of(file: &str) -> &str {
    file.rsplit_once('.').map_or(file, |(s, _)| s)
}

/// The data-set entry for a file and the user's column choice, named after
/// the file (and unique in `doc`): `{ ok, set }`.
#[wasm_bindgen]
pub fn import_data_set(doc: JsValue, text: &str, name: &str, block: Option<usize>, choice: JsValue) -> JsValue {
    reply_one(
        "set",
        (|| {
            let doc = document_from_js(doc)?;
            let table = read_table(text, name, block)?;
            let recognised = table.recognise(&column_choice(choice)?).map_err(|e| file_error(name, e))?;
            let metadata = table.metadata.iter().take(KEPT_METADATA).cloned().collect();
            let source = SourceDoc { file: name.to_string(), format: table.format.to_string(), metadata };
            Ok(data_set_doc(&unique_name(&doc, stem_of(name)), &recognised, source))
        })(),
    )
}

fn model_and_sets(doc: &Document) -> Result<(Model, Vec<DataSet>), Error> {
    let model = Model::from_document(doc)?;
    let sets = data_sets(doc, &model)?;
    Ok((model, sets))
}

/// Each data set after its processing, for the data list: `{ ok, sets: [{
/// name, quantity, unit, plot, points, x_range, residual_rms, smoothed_rms,
/// derived }] }` (residual in the plot's current unit; smoothed: what
/// Savitzky-Golay smoothing removed, in the set's own unit).
#[wasm_bindgen]
pub fn data_rows(doc: JsValue) -> JsValue {
    reply_one(
        "sets",
        (|| {
            let doc = document_from_js(doc)?;
            let (model, sets) = model_and_sets(&doc)?;
            let view = View::resolve(doc.view.as_ref(), &model)?;
            let shown = overlay::point_sets(&doc, &model, &view)?;
            Ok(sets
                .iter()
                .enumerate()
                .map(|(i, s)| {
                    let drawn = shown.iter().find(|p| p.index == i);
                    let (lo, hi) = s.x.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(*v), b.max(*v)));
                    json!({
                        "name": s.name,
                        "quantity": s.measured.quantity(),
                        "unit": s.measured.unit_key(),
                        "plot": overlay::plot_of(s.measured).key(),
                        "points": s.x.len(),
                        "x_range": [lo, hi],
                        "residual_rms": drawn.and_then(|p| p.residual.as_deref()).and_then(rms),
                        "smoothed_rms": s.smoothing_removed.as_deref().and_then(rms),
                        "derived": doc.data[i].source.as_ref().is_some_and(|s| s.format == DERIVED_FORMAT),
                    })
                })
                .collect::<Vec<_>>())
        })(),
    )
}

fn set_at(sets: &[DataSet], index: usize) -> Result<&DataSet, Error> {
    sets.get(index).ok_or_else(|| Error::new(ErrorKind::OutOfRange, "data", format!("there is no data set {}", index + 1)))
}

/// Six significant digits: a Kramers-Kronig prediction carries no more, and
/// links stay short.
fn six_digits(v: f64) -> f64 {
    format!("{v:.5e}").parse().unwrap_or(v)
}

/// The set's conditions written out, so that a derived set keeps them.
fn conditions_of(set: &DataSet) -> ConditionsDoc {
    ConditionsDoc {
        concentration_mol_per_l: Some(set.context.concentration_mol_per_l),
        path_length_cm: Some(set.context.path_length_cm),
        temperature_c: set.temperature_c,
    }
}

/// ORD predicted from a CD set (or CD from an ORD set) on the set's own
/// points by Kramers-Kronig, the model's bands standing for what lies
/// outside the measured range: `{ ok, set }`, a derived set for `doc.data`.
#[wasm_bindgen]
pub fn kk_predict(doc: JsValue, index: usize) -> JsValue {
    reply_one(
        "set",
        (|| {
            let doc = document_from_js(doc)?;
            let (model, sets) = model_and_sets(&doc)?;
            let set = set_at(&sets, index)?;
            let nu = set.wavenumbers();
            let (quantity, unit, values, what) = match set.measured {
                Measured::Cd(_) => ("ord", OrdUnit::Degrees.key(), kk::rotation_from_cd(set, &model.bands, &nu)?, "ORD"),
                Measured::Ord(_) => ("cd", CdUnit::Millidegrees.key(), kk::ellipticity_from_ord(set, &model.bands, &nu)?, "CD"),
                Measured::Absorption(_) => {
                    return Err(Error::new(
                        ErrorKind::OutOfRange,
                        format!("data[{index}]"),
                        "Kramers-Kronig applies to CD and ORD sets, not absorption",
                    ))
                }
            };
            let note = format!(
                "{what} by Kramers-Kronig (Maclaurin's formula) from data set \"{}\"; the model's bands stand for what lies outside its measured range",
                set.name
            );
            Ok(DataSetDoc {
                name: unique_name(&doc, &format!("{what} from {}", set.name)),
                quantity: quantity.into(),
                unit: unit.into(),
                axis_unit: set.axis.key().into(),
                conditions: Some(conditions_of(set)),
                x: axis_doc(&set.x),
                y: values.into_iter().map(six_digits).collect(),
                sd: None,
                ht_v: None,
                source: Some(SourceDoc { file: String::new(), format: DERIVED_FORMAT.into(), metadata: vec![note] }),
                processing: Vec::new(),
                hidden: false,
            })
        })(),
    )
}

/// An observed rotation at `from` conditions, as it would read at `to`'s
/// (through the molar rotation, which is intensive).
fn rotation_at(phi: f64, nu: f64, from: &SampleContext, to: &SampleContext) -> Result<f64, Error> {
    let unit = |e: crate::units::UnitError| Error::new(ErrorKind::OutOfRange, "readings", e.0);
    let molar = OrdUnit::MolarRotation.from_degrees(phi, nu, from).map_err(unit)?;
    OrdUnit::MolarRotation.to_degrees(molar, nu, to).map_err(unit)
}

#[derive(Serialize)]
struct LineValue {
    name: &'static str,
    wavelength_nm: f64,
    /// At the document's sample conditions, as the model's column.
    rotation_deg: f64,
}

/// The rotation at every lamp line that a measured CD set predicts (the
/// model's bands standing for what lies outside its range), at the
/// document's sample conditions: `{ ok, lines }`.
#[wasm_bindgen]
pub fn kk_lines(doc: JsValue, index: usize) -> JsValue {
    reply_one(
        "lines",
        (|| {
            let doc = document_from_js(doc)?;
            let (model, sets) = model_and_sets(&doc)?;
            let set = set_at(&sets, index)?;
            let nu: Vec<f64> = STANDARD_LINES.iter().map(|l| AxisUnit::Nanometre.to_wavenumber(l.wavelength_nm)).collect();
            let phi = kk::rotation_from_cd(set, &model.bands, &nu)?;
            STANDARD_LINES
                .iter()
                .zip(phi.iter().zip(&nu))
                .map(|(l, (p, n))| {
                    Ok(LineValue {
                        name: l.name,
                        wavelength_nm: l.wavelength_nm,
                        rotation_deg: rotation_at(*p, *n, &set.context, &model.sample.context)?,
                    })
                })
                .collect::<Result<Vec<_>, Error>>()
        })(),
    )
}

/// Typed readings at the document's sample conditions, beside the model's
/// values: `{ ok, readings: [{ wavelength_nm, rotation_deg, at_sample_deg }] }`.
#[wasm_bindgen]
pub fn reading_rows(doc: JsValue) -> JsValue {
    reply_one(
        "readings",
        (|| {
            let doc = document_from_js(doc)?;
            let model = Model::from_document(&doc)?;
            crate::data::readings(&doc, &model)?
                .iter()
                .map(|r| {
                    let at_sample = rotation_at(r.rotation_deg, r.wavenumber_cm1, &r.context, &model.sample.context)?;
                    Ok(json!({ "wavelength_nm": r.wavelength_nm, "rotation_deg": r.rotation_deg, "at_sample_deg": at_sample }))
                })
                .collect::<Result<Vec<_>, Error>>()
        })(),
    )
}

/// How long the share link of `doc` is, and whether it fits the cap links
/// are read with: `{ ok, chars, limit, fits }`.
#[wasm_bindgen]
pub fn link_size(doc: JsValue) -> JsValue {
    reply(document_from_js(doc).and_then(|d| {
        let chars = crate::link::encode(&d)?.len();
        Ok(json!({ "chars": chars, "limit": crate::link::MAX_LINK_CHARS, "fits": chars <= crate::link::MAX_LINK_CHARS }))
    }))
}

/// The limits the page's data controls need: `{ ok, max_import_bytes,
/// max_link_chars, max_smoothing_order }`.
#[wasm_bindgen]
pub fn data_catalog() -> JsValue {
    super::reply::ok(&json!({
        "max_import_bytes": import::MAX_IMPORT_BYTES,
        "max_link_chars": crate::link::MAX_LINK_CHARS,
        "max_smoothing_order": crate::data::MAX_SMOOTHING_ORDER,
    }))
}

/// The data blocks of a JCAMP-DX file, for the page's block choice (a LINK
/// file holds several): `{ ok, blocks: [{ number, title, points, x_units, y_units }] }`,
/// numbered from 1 as the CLI's `--block` counts them.
#[wasm_bindgen]
pub fn jcamp_blocks(text: &str, name: &str) -> JsValue {
    reply_one(
        "blocks",
        (|| {
            let blocks = import::jcamp::parse(text).map_err(|e| Error::new(ErrorKind::Syntax, "file", format!("{name}: {e}")))?;
            Ok(blocks
                .iter()
                .enumerate()
                .map(|(i, b)| json!({ "number": i + 1, "title": b.title, "points": b.y.len(), "x_units": b.x_units, "y_units": b.y_units }))
                .collect::<Vec<_>>())
        })(),
    )
}
