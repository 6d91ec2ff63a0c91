//! `render`: one plot as SVG for wikis that take no iframes; it draws the
//! figure of the page through the same `figures::draw`.
//! `link` / `open`: share links made and read by the codec the page uses.

use super::{load, Failure};
use crate::document::{ViewDoc, DEFAULT_VIEW_POINTS};
use crate::error::{Error, ErrorKind};
use crate::figures::{self, PlotKind, PlotRequest};
use crate::link;
use crate::spectra::{evaluate, Grid};
use crate::units::{AxisUnit, CdUnit, OrdUnit};
use std::path::Path;


pub struct RenderOptions {
    pub plot: String,
    pub unit: Option<String>,
    pub axis: Option<String>,
    pub from: Option<f64>,
    pub to: Option<f64>,
    pub width: u32,
    pub height: u32,
    pub dark: bool,
    pub contributions: bool,
    pub legend: bool,
}

fn bad(origin: &str, kind: ErrorKind, message: String) -> Failure {
    Failure::input(origin, Error::new(kind, "", message))
}

fn keys<T: Copy>(all: &[T], key: fn(T) -> &'static str) -> String {
    all.iter().map(|u| key(*u)).collect::<Vec<_>>().join(", ")
}

pub fn render(path: &Path, o: &RenderOptions, output: &Path, out: &mut Vec<u8>) -> Result<(), Failure> {
    let origin = path.display().to_string();
    let kind = PlotKind::parse(&o.plot).ok_or_else(|| {
        bad("--plot", ErrorKind::UnknownName, format!("unknown plot \"{}\" (use cd, ord, abs or index)", o.plot))
    })?;
    let (doc, model) = load(path)?;
    let view = doc.view.clone().unwrap_or_default();

    let axis_key = o.axis.clone().or(view.axis_unit.clone()).unwrap_or_else(|| "nm".into());
    let axis = AxisUnit::parse(&axis_key).ok_or_else(|| {
        bad("--axis", ErrorKind::UnknownName, format!("unknown axis unit \"{axis_key}\" (use nm, cm-1 or ev)"))
    })?;

    let mut req_units = (CdUnit::DeltaEpsilon, OrdUnit::Degrees);
    if let Some(k) = view.cd_unit.as_deref().and_then(CdUnit::parse) {
        req_units.0 = k;
    }
    if let Some(k) = view.ord_unit.as_deref().and_then(OrdUnit::parse) {
        req_units.1 = k;
    }
    if let Some(u) = &o.unit {
        match kind {
            PlotKind::Cd => {
                req_units.0 = CdUnit::parse(u).ok_or_else(|| {
                    let known = keys(&CdUnit::ALL, CdUnit::key);
                    bad("--unit", ErrorKind::UnknownName, format!("unknown CD unit \"{u}\" (use one of {known})"))
                })?
            }
            PlotKind::Ord => {
                req_units.1 = OrdUnit::parse(u).ok_or_else(|| {
                    let known = keys(&OrdUnit::ALL, OrdUnit::key);
                    bad("--unit", ErrorKind::UnknownName, format!("unknown ORD unit \"{u}\" (use one of {known})"))
                })?
            }
            PlotKind::Absorption | PlotKind::Index => {
                return Err(bad(
                    "--unit",
                    ErrorKind::UnknownName,
                    format!("the {} plot has one unit; --unit applies to cd and ord", kind.key()),
                ))
            }
        }
    }

    let x_range = match (o.from, o.to) {
        (Some(a), Some(b)) => (a, b),
        (None, None) => default_range(&view, &model, axis),
        _ => return Err(bad("--from", ErrorKind::MissingField, "give both --from and --to, or neither".into())),
    };
    let points = view.points.unwrap_or(DEFAULT_VIEW_POINTS) as usize;
    let grid = Grid::linspace(x_range.0, x_range.1, points, axis).map_err(|e| Failure::input("--from/--to", e))?;
    let spectra = evaluate(&model, &grid.wavenumber_cm1).map_err(|e| Failure::input(&origin, e))?;

    let mut req = PlotRequest::new(kind, &spectra, axis, x_range);
    req.cd_unit = req_units.0;
    req.ord_unit = req_units.1;
    req.dark = o.dark;
    req.show_contributions = o.contributions;
    req.legend = o.legend;
    let text = figures::svg(&req, o.width, o.height).map_err(|e| match e.field.as_str() {
        "width" | "height" => Failure::input(&format!("--{}", e.field), Error::new(e.kind, "", e.message)),
        _ => Failure::input(&origin, e),
    })?;

    if output.as_os_str() == "-" {
        out.extend_from_slice(text.as_bytes());
        return Ok(());
    }
    std::fs::write(output, text).map_err(|e| Failure {
        code: 1,
        message: format!("{}: cannot write: {e}", output.display()),
    })
}

/// The view's range in the chosen axis (ascending), else one showing every band.
fn default_range(view: &ViewDoc, model: &crate::Model, axis: AxisUnit) -> (f64, f64) {
    let (lo_nm, hi_nm) = match view.range_nm {
        Some([a, b]) if a.is_finite() && b.is_finite() && a > 0.0 && b > 0.0 && a != b => (a.min(b), a.max(b)),
        _ => Grid::default_range_nm(model),
    };
    let ends = [lo_nm, hi_nm].map(|nm| axis.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(nm)));
    (ends[0].min(ends[1]), ends[0].max(ends[1]))
}

pub fn link(path: &Path, base: &str, out: &mut Vec<u8>) -> Result<(), Failure> {
    let (doc, _) = load(path)?;
    let origin = path.display().to_string();
    link::validate(&doc).map_err(|e| Failure::input(&origin, e))?;
    let url = link::share_url(base, &doc).map_err(|e| Failure::input(&origin, e))?;
    out.extend_from_slice(url.as_bytes());
    out.push(b'\n');
    Ok(())
}

pub fn open(text: &str, out: &mut Vec<u8>) -> Result<(), Failure> {
    let text = if text == "-" {
        use std::io::Read;
        let mut buf = String::new();
        // One byte over the cap is enough to know the link is too long.
        let cap = link::MAX_LINK_CHARS as u64 + 1;
        std::io::stdin().take(cap).read_to_string(&mut buf).map_err(|e| {
            bad("standard input", ErrorKind::Io, format!("cannot read the link: {e}"))
        })?;
        buf
    } else {
        text.to_string()
    };
    let doc = link::decode(&text).map_err(|e| Failure::input("link", Error::new(e.kind, field_of(&e), e.message.clone())))?;
    out.extend_from_slice(doc.to_json_pretty().as_bytes());
    out.push(b'\n');
    Ok(())
}

/// The codec names every link-level problem "link"; the origin says so already.
fn field_of(e: &Error) -> String {
    if e.field == "link" {
        String::new()
    } else {
        e.field.clone()
    }
}
