//! Starting bands from measured CD: one Gaussian band per lobe
//! (`propose_bands`), and the document's bands after a proposal from one of
//! its data sets, in place of its bands or after them (`propose_in_document`,
//! the page's "Propose bands").

use crate::data::{data_sets, DataSet};
use crate::document::{BandDoc, Document};
use crate::error::{Error, ErrorKind, Result};
use crate::limits::MAX_BANDS;
use crate::model::{Model, BAND_NAME_PREFIX};
use crate::units::AxisUnit;
use serde::Serialize;

/// How many bands are proposed unless asked otherwise (the CLI's `--bands`, the page's box).
pub const PROPOSED_DEFAULT_BANDS: usize = 6;

/// A typical dissymmetry of a band proposed from CD alone (common practice:
/// allowed transitions have |g| of 1e-3 to 1e-2), to give it a dipole strength.
pub const PROPOSED_DISSYMMETRY: f64 = 0.01;
/// Lobes smaller than this fraction of the largest are not proposed.
pub const PROPOSED_MIN_LOBE: f64 = 0.1;

/// Starting bands from a measured CD set: one Gaussian band per lobe (a run
/// of one sign), centred at its extremum, as wide as the lobe at half its
/// height, with R = C_R ∫ Δε/ν over the lobe (physics.md) and D from a
/// typical dissymmetry. Lobes under a tenth of the largest are left out;
/// at most `max_bands`, the largest first.
pub fn propose_bands(set: &DataSet, max_bands: usize) -> Result<Vec<BandDoc>> {
    let de = set.delta_epsilon().map_err(|e| Error::new(ErrorKind::OutOfRange, "data", e.0))?;
    let mut points: Vec<(f64, f64)> = set.wavenumbers().into_iter().zip(de).collect();
    points.sort_by(by_first);
    let largest = points.iter().fold(0.0_f64, |m, p| m.max(p.1.abs()));
    if largest.is_nan() || largest <= 0.0 {
        return Err(Error::new(ErrorKind::OutOfRange, "data", format!("\"{}\" has no CD to propose bands from", set.name)));
    }
    // Lobes: maximal runs of one sign.
    let mut lobes: Vec<&[(f64, f64)]> = Vec::new();
    let mut start = 0;
    for i in 1..=points.len() {
        if i == points.len() || points[i].1.signum() != points[start].1.signum() {
            lobes.push(&points[start..i]);
            start = i;
        }
    }
    let mut bands: Vec<BandDoc> = Vec::new();
    // (−|peak|, band index), to order the bands by size.
    let mut sizes: Vec<(f64, f64)> = Vec::new();
    for lobe in lobes {
        let (k, peak) =
            lobe.iter().enumerate().max_by(|a, b| a.1 .1.abs().total_cmp(&b.1 .1.abs())).map(|(k, p)| (k, *p)).unwrap_or((0, (0.0, 0.0)));
        if peak.1.abs() < PROPOSED_MIN_LOBE * largest || lobe.len() < 3 {
            continue;
        }
        // Half height on each side (the lobe's ends where it stays above).
        let half = peak.1.abs() / 2.0;
        let lo = lobe[..=k].iter().rev().find(|p| p.1.abs() < half).map(|p| p.0).unwrap_or(lobe[0].0);
        let hi = lobe[k..].iter().find(|p| p.1.abs() < half).map(|p| p.0).unwrap_or(lobe[lobe.len() - 1].0);
        let fwhm = (hi - lo).max(2.0 * (lobe[1].0 - lobe[0].0).abs());
        let integral: f64 = lobe.windows(2).map(|w| 0.5 * (w[0].1 / w[0].0 + w[1].1 / w[1].0) * (w[1].0 - w[0].0)).sum();
        let r = crate::units::ROTATORY_CONSTANT * integral / crate::units::ESU2_CM2_PER_ROTATORY_UNIT;
        let d = (r.abs() * crate::model::dissymmetry_limited_dipole_strength(1.0) * crate::model::MAX_DISSYMMETRY / PROPOSED_DISSYMMETRY)
            .max(crate::model::dissymmetry_limited_dipole_strength(r));
        let center_nm = AxisUnit::Nanometre.from_wavenumber(peak.0);
        sizes.push((-peak.1.abs(), bands.len() as f64));
        bands.push(BandDoc {
            name: String::new(),
            shape: "gaussian".into(),
            center_nm,
            fwhm_cm1: fwhm.min(0.9 * peak.0),
            lorentz_fwhm_cm1: None,
            rotatory_strength_1e40_cgs: r,
            dipole_strength_debye2: d,
        });
    }
    // The largest first (ties in lobe order), at most `max_bands`.
    sizes.sort_by(by_first);
    sizes.truncate(max_bands);
    // Named in wavelength order, long to short, as a CD spectrum is read.
    let mut kept: Vec<(f64, f64)> = sizes.iter().map(|&(_, k)| (-bands[k as usize].center_nm, k)).collect();
    kept.sort_by(by_first);
    Ok(kept
        .iter()
        .enumerate()
        .map(|(i, &(_, k))| BandDoc { name: format!("{BAND_NAME_PREFIX}{}", i + 1), ..bands[k as usize].clone() })
        .collect())
}

/// Pairs in the order of their first values: the one sort of this module
/// (one comparator, so one copy of the sort's code in the wasm module).
fn by_first(a: &(f64, f64), b: &(f64, f64)) -> std::cmp::Ordering {
    a.0.total_cmp(&b.0)
}

/// The bands a document has after a proposal, and what was proposed.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Proposal {
    /// Every band of the document afterwards.
    pub bands: Vec<BandDoc>,
    /// How many of them are new (the last ones).
    pub proposed: usize,
    /// The data set they come from.
    pub set: String,
}

/// Bands proposed from the document's data set `index` (after its
/// processing), at most `max_bands`: in place of the document's bands, or
/// with `add` after them, each new band under the first name `B<k>` that no
/// band has. A set that is not CD, has no CD or too few points for a lobe,
/// a set that does not exist, or a count outside 1 to the band cap is an
/// error that names it; the document is never changed.
pub fn propose_in_document(doc: &Document, index: usize, max_bands: usize, add: bool) -> Result<Proposal> {
    if !(1..=MAX_BANDS).contains(&max_bands) {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            "max_bands",
            format!("the number of bands to propose must be from 1 to {MAX_BANDS} (got {max_bands})"),
        ));
    }
    let model = Model::from_document(doc)?;
    let sets = data_sets(doc, &model)?;
    let set = sets.get(index).ok_or_else(|| Error::new(ErrorKind::OutOfRange, "data", format!("there is no data set {}", index + 1)))?;
    let new = propose_bands(set, max_bands)?;
    if new.is_empty() {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            format!("data[{index}]"),
            format!("\"{}\" has no lobe of three points or more above a tenth of its largest CD to propose a band from", set.name),
        ));
    }
    let proposed = new.len();
    let mut bands = if add { doc.bands.clone() } else { Vec::new() };
    if bands.len() + proposed > MAX_BANDS {
        return Err(Error::new(
            ErrorKind::TooLarge,
            "bands",
            format!("{} bands and {proposed} proposed would be more than the {MAX_BANDS} a model may hold", bands.len()),
        ));
    }
    let mut k = bands.len();
    for mut b in new {
        let name = loop {
            k += 1;
            let name = format!("{BAND_NAME_PREFIX}{k}");
            if !bands.iter().any(|o: &BandDoc| o.name == name) {
                break name;
            }
        };
        b.name = name;
        bands.push(b);
    }
    Ok(Proposal { bands, proposed, set: set.name.clone() })
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    /// An invented document: bands `names` and one data set of `quantity`
    /// whose values are two lobes (+ near 300 nm, − near 250 nm), or all zero.
    fn document(names: &[&str], quantity: &str, unit: &str, lobes: bool) -> Document {
        let x: Vec<f64> = (200..=350).map(f64::from).collect();
        let y: Vec<f64> = x
            .iter()
            .map(|nm| if lobes { 4.0 * (-((nm - 300.0) / 12.0).powi(2)).exp() - 6.0 * (-((nm - 250.0) / 10.0).powi(2)).exp() } else { 0.0 })
            .collect();
        let bands: Vec<_> = names
            .iter()
            .map(|n| json!({ "name": n, "shape": "gaussian", "center_nm": 280.0, "fwhm_cm1": 3000.0, "rotatory_strength_1e40_cgs": 1.0, "dipole_strength_debye2": 1.0 }))
            .collect();
        let value = json!({
            "chiroptic": 1,
            "sample": { "concentration_mol_per_l": 0.001, "path_length_cm": 1.0, "solvent": { "constant": 1.333 } },
            "bands": bands,
            "data": [{ "name": "set", "quantity": quantity, "unit": unit, "axis_unit": "nm", "x": x, "y": y }],
        });
        Document::from_value(value).expect("an invented document")
    }

    #[test]
    fn replaces_or_adds_under_free_names() {
        let doc = document(&["B1", "B3"], "cd", "delta_epsilon", true);
        let replaced = propose_in_document(&doc, 0, 6, false).expect("proposed");
        assert_eq!(replaced.proposed, 2);
        assert_eq!(replaced.set, "set");
        let names: Vec<&str> = replaced.bands.iter().map(|b| b.name.as_str()).collect();
        assert_eq!(names, ["B1", "B2"], "in place of the bands, named long wavelength first");
        assert!((replaced.bands[0].center_nm - 300.0).abs() < 1.0 && replaced.bands[0].rotatory_strength_1e40_cgs > 0.0);
        assert!((replaced.bands[1].center_nm - 250.0).abs() < 1.0 && replaced.bands[1].rotatory_strength_1e40_cgs < 0.0);

        let added = propose_in_document(&doc, 0, 6, true).expect("proposed");
        let names: Vec<&str> = added.bands.iter().map(|b| b.name.as_str()).collect();
        assert_eq!(names, ["B1", "B3", "B4", "B5"], "the bands kept, the new ones under names no band has");
        assert_eq!(added.bands[..2], doc.bands[..]);
        assert_eq!(added.bands[2].center_nm, replaced.bands[0].center_nm);

        let one = propose_in_document(&doc, 0, 1, false).expect("proposed");
        assert_eq!(one.proposed, 1);
        assert!((one.bands[0].center_nm - 250.0).abs() < 1.0, "the largest lobe first");
    }

    #[test]
    fn refuses_what_it_cannot_propose_from_with_a_named_reason() {
        let says = |r: Result<Proposal>, kind: ErrorKind, field: &str, words: &str| {
            let e = r.expect_err("refused");
            assert_eq!((e.kind, e.field.as_str()), (kind, field), "{e:?}");
            assert!(e.message.contains(words), "{}", e.message);
        };
        let cd = document(&["B1"], "cd", "delta_epsilon", true);
        says(
            propose_in_document(&document(&["B1"], "ord", "deg", true), 0, 6, false),
            ErrorKind::OutOfRange,
            "data",
            "is ord data, not CD",
        );
        says(
            propose_in_document(&document(&["B1"], "cd", "delta_epsilon", false), 0, 6, false),
            ErrorKind::OutOfRange,
            "data",
            "has no CD",
        );
        says(propose_in_document(&cd, 1, 6, false), ErrorKind::OutOfRange, "data", "there is no data set 2");
        says(propose_in_document(&cd, 0, 0, false), ErrorKind::OutOfRange, "max_bands", "from 1 to 500 (got 0)");
        says(propose_in_document(&cd, 0, MAX_BANDS + 1, false), ErrorKind::OutOfRange, "max_bands", "(got 501)");
        let mut full = cd.clone();
        full.bands = (1..=MAX_BANDS).map(|k| BandDoc { name: format!("B{k}"), ..cd.bands[0].clone() }).collect();
        says(propose_in_document(&full, 0, 6, true), ErrorKind::TooLarge, "bands", "more than the 500");
        assert_eq!(propose_in_document(&full, 0, 6, false).expect("in place of them").bands.len(), 2);
    }
}
