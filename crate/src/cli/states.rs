//! `states`: transition lists of computed excited states to a document that
//! holds them (its `states` section), broadened as asked. `compare`: how well a document's CD
//! matches a measured CD, and its mirror image, at the best energy shift.

use super::measured::{read_table, ColumnFlags};
use super::{load, Failure};
use crate::data::{data_set_doc, data_sets};
use crate::document::{Document, SampleDoc, SolventDoc, SourceDoc};
use crate::error::{Error, ErrorKind};
use crate::import::{ColumnChoice, Measured};
use crate::states::{self, table, Broadening, Conformer, Gauge};
use std::path::{Path, PathBuf};

fn bad(origin: &str, kind: ErrorKind, message: impl Into<String>) -> Failure {
    Failure::input(origin, Error::new(kind, "", message))
}

pub struct StatesOptions<'a> {
    pub files: &'a [PathBuf],
    pub temperature_k: Option<f64>,
    pub fwhm_ev: Option<f64>,
    pub sigma_ev: Option<f64>,
    pub shift_ev: f64,
    pub shape: &'a str,
    pub velocity: bool,
    pub concentration: f64,
    pub output: &'a Path,
}

pub fn run_states(o: &StatesOptions, notes: &mut String) -> Result<(), Failure> {
    let mut conformers: Vec<Conformer> = Vec::new();
    for path in o.files {
        let origin = path.display().to_string();
        let meta = std::fs::metadata(path).map_err(|e| bad(&origin, ErrorKind::Io, format!("cannot read: {e}")))?;
        if meta.len() > crate::import::MAX_IMPORT_BYTES {
            return Err(bad(
                &origin,
                ErrorKind::TooLarge,
                format!("file is {} bytes; the limit is {}", meta.len(), crate::import::MAX_IMPORT_BYTES),
            ));
        }
        let text = std::fs::read_to_string(path).map_err(|e| bad(&origin, ErrorKind::Io, format!("cannot read: {e}")))?;
        conformers.extend(table::parse(&text).map_err(|e| bad(&origin, ErrorKind::Syntax, e.to_string()))?);
    }
    if !matches!(o.shape, "gaussian" | "lorentz" | "voigt") {
        return Err(bad("--shape", ErrorKind::UnknownName, format!("unknown shape \"{}\" (use gaussian, lorentz or voigt)", o.shape)));
    }
    let fwhm = match (o.fwhm_ev, o.sigma_ev) {
        (Some(_), Some(_)) => return Err(bad("--fwhm-ev/--sigma-ev", ErrorKind::OutOfRange, "give the width once, as FWHM or as sigma")),
        (Some(w), None) => w,
        (None, Some(s)) => states::fwhm_from_sigma(s),
        (None, None) => states::DEFAULT_FWHM_EV,
    };
    let b = Broadening {
        shape: o.shape.into(),
        fwhm_ev: fwhm,
        shift_ev: o.shift_ev,
        gauge: if o.velocity { Gauge::Velocity } else { Gauge::Length },
        temperature_k: o.temperature_k.unwrap_or(states::DEFAULT_TEMPERATURE_K),
        ..Broadening::default()
    };
    let populations = states::populations(&conformers, b.temperature_k).map_err(|e| Failure::input("conformers", e))?;
    notes.push_str(&format!("populations at {} K:\n", b.temperature_k));
    for (c, p) in conformers.iter().zip(&populations) {
        notes.push_str(&format!("  {:<24} {:6.2} %  ({} transitions)\n", c.name, 100.0 * p, c.transitions.len()));
    }
    let doc = Document {
        chiroptic: crate::document::FORMAT_VERSION,
        title: format!(
            "computed transitions ({}), {:.2} eV FWHM {}",
            o.files.iter().map(|p| p.display().to_string()).collect::<Vec<_>>().join(", "),
            fwhm,
            o.shape
        ),
        sample: SampleDoc {
            concentration_mol_per_l: o.concentration,
            path_length_cm: 1.0,
            molar_mass_g_per_mol: None,
            mean_residue_weight_g_per_mol: None,
            solvent: SolventDoc { constant: Some(1.0), ..SolventDoc::default() },
        },
        bands: Vec::new(),
        view: None,
        data: Vec::new(),
        readings: Vec::new(),
        fit: None,
        systems: Vec::new(),
        states: Some(states::doc::to_doc(&conformers, &b)),
    };
    crate::model::Model::from_document(&doc).map_err(|e| Failure::input("broadened model", e))?;
    notes.push_str(&format!("note: {}\n", states::SUM_OVER_STATES_CAUTION));
    std::fs::write(o.output, doc.to_json_pretty() + "\n")
        .map_err(|e| bad(&o.output.display().to_string(), ErrorKind::Io, format!("cannot write: {e}")))
}

pub struct CompareOptions<'a> {
    pub from_nm: Option<f64>,
    pub to_nm: Option<f64>,
    pub label: &'a str,
    /// Also find the common width factor on the bands that maximises S.
    pub fit_width: bool,
}

pub fn run_compare(doc_path: &Path, data_path: &Path, flags: &ColumnFlags, o: &CompareOptions, out: &mut Vec<u8>) -> Result<(), Failure> {
    let origin = data_path.display().to_string();
    let (mut doc, model) = load(doc_path)?;
    let table = read_table(data_path, flags.block)?;
    let r = table.recognise(&ColumnChoice::default()).map_err(|e| bad(&origin, ErrorKind::MissingField, e.to_string()))?;
    if !matches!(r.measured, Measured::Cd(_)) {
        return Err(bad(&origin, ErrorKind::OutOfRange, "compare needs measured CD"));
    }
    doc.data = vec![data_set_doc("measured", &r, SourceDoc::default())];
    let set = data_sets(&doc, &model).map_err(|e| Failure::input(&origin, e))?.remove(0);
    let de = set.delta_epsilon().map_err(|e| bad(&origin, ErrorKind::MissingField, e.0))?;
    let range = (o.from_nm, o.to_nm);
    let c = crate::similarity::compare(&model, &set.wavenumbers(), &de, range, o.fit_width).map_err(|e| Failure::input(&origin, e))?;
    let verdict = c.verdict(o.label, o.fit_width);
    let (computed, mirror) = (c.computed, c.mirror);
    let widths = if o.fit_width { format!("best_width_factor,{},{}\n", computed.width_factor, mirror.width_factor) } else { String::new() };
    let text = format!(
        "quantity,computed,mirror\nsimilarity_unshifted,{},{}\nsimilarity_best,{},{}\nbest_shift_ev,{},{}\n{widths}# {verdict} (range {:.3}-{:.3} eV; S = ∫ a b dE / sqrt(∫ a² dE ∫ b² dE))\n",
        c.unshifted, -c.unshifted, computed.score, mirror.score, computed.shift_ev, mirror.shift_ev, c.range_ev.0, c.range_ev.1
    );
    out.extend_from_slice(text.as_bytes());
    Ok(())
}
