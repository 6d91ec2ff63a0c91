//! `fit`: a start document and measured files in, the fitted document (same
//! format, band names kept, a `fit` section with the report) out, and the
//! report table on standard error.

use super::measured::{read_table, ColumnFlags};
use super::{load, Failure};
use crate::data::{data_set_doc, data_sets};
use crate::document::{FitParameterDoc, FitReportDoc, SourceDoc};
use crate::error::{Error, ErrorKind};
use crate::fit::{self, Field, GeometryField};
use crate::import::ColumnChoice;
use crate::model::Model;
use crate::units::AxisUnit;
use std::path::{Path, PathBuf};

pub struct FitOptions<'a> {
    pub data: &'a [PathBuf],
    pub free: Option<String>,
    pub fix: &'a [String],
    pub starts: Option<u32>,
    pub max_iterations: Option<u32>,
    pub shift: bool,
    pub offsets: bool,
    pub scales: bool,
    pub output: &'a Path,
}

fn bad(origin: &str, kind: ErrorKind, message: impl Into<String>) -> Failure {
    Failure::input(origin, Error::new(kind, "", message))
}

pub fn run(start: &Path, flags: &ColumnFlags, o: &FitOptions, report_out: &mut String) -> Result<(), Failure> {
    let origin = start.display().to_string();
    let (mut doc, _) = load(start)?;
    for (i, path) in o.data.iter().enumerate() {
        let table = read_table(path, flags.block)?;
        let r = table
            .recognise(&ColumnChoice::default())
            .map_err(|e| bad(&path.display().to_string(), ErrorKind::MissingField, e.to_string()))?;
        let name = path.file_stem().map(|s| s.to_string_lossy().into_owned()).unwrap_or_else(|| format!("data {}", i + 1));
        let name = if doc.data.iter().any(|d| d.name == name) { format!("{name} ({})", i + 1) } else { name };
        doc.data.push(data_set_doc(
            &name,
            &r,
            SourceDoc { file: path.display().to_string(), format: table.format.into(), metadata: table.metadata.clone() },
        ));
    }
    let mut settings = doc.fit.clone().unwrap_or_default();
    if let Some(free) = &o.free {
        settings.free = free.split(',').map(|s| s.trim().to_string()).filter(|s| !s.is_empty()).collect();
        for f in &settings.free {
            if Field::parse(f).is_none() && GeometryField::parse(f).is_none() {
                return Err(bad("--free", ErrorKind::UnknownName, format!("unknown field \"{f}\" (use {})", fit::FREE_NAMES)));
            }
        }
    }
    for name in o.fix {
        settings.parameters.retain(|p| &p.parameter != name);
        settings.parameters.push(FitParameterDoc { parameter: name.clone(), fixed: true, min: None, max: None, link: None });
    }
    settings.starts = o.starts.or(settings.starts);
    settings.max_iterations = o.max_iterations.or(settings.max_iterations);
    settings.shift |= o.shift;
    settings.offsets |= o.offsets;
    settings.scales |= o.scales;
    settings.report = None;
    doc.fit = Some(settings);

    let model = Model::from_document(&doc).map_err(|e| Failure::input(&origin, e))?;
    let sets = data_sets(&doc, &model).map_err(|e| Failure::input(&origin, e))?;
    let fitted = fit::fit(&doc, &model, &sets, &mut |_, _, _| true).map_err(|e| Failure::input(&origin, e))?;
    report_out.push_str(&table(&fitted.report));
    if fitted.report.stop == "iteration_limit" {
        report_out.push_str("note: the fit stopped at the iteration limit; raise --max-iterations or start closer\n");
    }
    let text = fitted.document.to_json_pretty() + "\n";
    if o.output.as_os_str() == "-" {
        return Err(bad("-o", ErrorKind::OutOfRange, "give a file name for the fitted document (the report goes to standard error)"));
    }
    std::fs::write(o.output, text).map_err(|e| bad(&o.output.display().to_string(), ErrorKind::Io, format!("cannot write: {e}")))?;
    Ok(())
}

/// The report as a table for people: centres in nm, as the document gives them.
pub fn table(r: &FitReportDoc) -> String {
    let mut out = format!(
        "fit: {} after {} iterations; {} of {} starts reached the best minimum\n",
        r.stop_reason, r.iterations, r.starts_at_best, r.starts
    );
    out.push_str(&format!("{:<44} {:>16}   {}\n", "parameter", "value", "standard error"));
    for p in &r.parameters {
        let (name, value, se) = match p.name.strip_suffix(".center_cm1") {
            Some(band) => {
                let nm = AxisUnit::Nanometre.from_wavenumber(p.value);
                (format!("{band}.center_nm"), nm, p.standard_error.map(|s| s * nm / p.value))
            }
            None => (p.name.clone(), p.value, p.standard_error),
        };
        let se = match (p.mode.as_str(), se) {
            ("fixed", _) => "fixed".to_string(),
            (_, Some(s)) => format!(
                "± {}{}{}",
                significant(s),
                if p.mode == "linked" { " (linked)" } else { "" },
                if p.at_bound { " (at its bound)" } else { "" }
            ),
            (_, None) => "undetermined".to_string(),
        };
        out.push_str(&format!("{name:<44} {:>16}   {se}\n", significant(value)));
    }
    out.push_str(&format!(
        "chi-square {}, reduced {} ({} degrees of freedom, {} points, {} free); AIC {}, BIC {}; weights {}\n",
        significant(r.chi_square),
        significant(r.reduced_chi_square),
        r.degrees_of_freedom,
        r.points,
        r.free_parameters,
        significant(r.aic),
        significant(r.bic),
        r.weights
    ));
    for s in &r.sets {
        out.push_str(&format!("set {}: {} points, chi-square {}\n", s.name, s.points, significant(s.chi_square)));
    }
    for p in &r.strong_correlations {
        out.push_str(&format!("strongly correlated: {} and {} (r = {:.3})\n", p.a, p.b, p.r));
    }
    for w in &r.warnings {
        out.push_str(&format!("warning: {w}\n"));
    }
    out
}

fn significant(v: f64) -> String {
    if !v.is_finite() {
        return "—".into();
    }
    if v != 0.0 && (v.abs() >= 1e6 || v.abs() < 1e-3) {
        format!("{v:.5e}")
    } else {
        let digits = (6 - (v.abs().max(1e-300).log10().floor() as i32 + 1)).clamp(0, 9) as usize;
        format!("{v:.digits$}")
    }
}

/// `propose`: starting bands from a measured CD file, one per lobe, as a
/// start document for `fit` (the sample from `--add`'s document, or a
/// notional 1 mol/L in 1 cm when the data are in a molar unit).
pub fn propose(data: &Path, flags: &ColumnFlags, add: Option<&Path>, max_bands: usize, output: &Path) -> Result<(), Failure> {
    let origin = data.display().to_string();
    let table = read_table(data, flags.block)?;
    let r = table.recognise(&ColumnChoice::default()).map_err(|e| bad(&origin, ErrorKind::MissingField, e.to_string()))?;
    let (mut doc, model) = match add {
        Some(p) => load(p)?,
        None => {
            let d = super::measured::notional_document();
            let m = Model::from_document(&d).map_err(|e| Failure::input("notional sample", e))?;
            (d, m)
        }
    };
    doc.data = vec![data_set_doc("measured", &r, SourceDoc::default())];
    let set = data_sets(&doc, &model).map_err(|e| Failure::input(&origin, e))?.remove(0);
    doc.bands = fit::propose_bands(&set, max_bands).map_err(|e| Failure::input(&origin, e))?;
    doc.data.clear();
    doc.title = format!("bands proposed from {origin} (a start for fit)");
    Model::from_document(&doc).map_err(|e| Failure::input("proposed model", e))?;
    std::fs::write(output, doc.to_json_pretty() + "\n")
        .map_err(|e| bad(&output.display().to_string(), ErrorKind::Io, format!("cannot write: {e}")))
}
