//! `render`: one plot as SVG for wikis that take no iframes; it draws the
//! figure of the page through the same `figures::draw`.
//! `link` / `open`: share links made and read by the codec the page uses.

use super::{load, Failure};
use crate::error::{Error, ErrorKind};
use crate::figures::{self, PlotRequest};
use crate::link;
use crate::spectra::evaluate;
use crate::units::{AxisUnit, CdUnit, OrdUnit};
use crate::view::{axis_key, PlotKind, View, AXIS_UNITS};
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
        bad("--plot", ErrorKind::UnknownName, format!("unknown plot \"{}\" (use {})", o.plot, keys(&PlotKind::ALL, PlotKind::key)))
    })?;
    let (doc, model) = load(path)?;
    // The document's view, checked as a link checks it, with the page's defaults.
    let mut view = View::resolve(doc.view.as_ref(), &model).map_err(|e| Failure::input(&origin, e))?;
    apply_overrides(&mut view, kind, o)?;
    let grid = view.grid().map_err(|e| Failure::input("--from/--to", e))?;
    let spectra = evaluate(&model, &grid.wavenumber_cm1).map_err(|e| Failure::input(&origin, e))?;

    // Measured data drawn as the page draws them.
    let points = crate::overlay::point_sets(&doc, &model, &view).map_err(|e| Failure::input(&origin, e))?;
    let mut req = PlotRequest::new(kind, &spectra, view.axis, view.x_range);
    req.points = &points;
    req.cd_unit = view.cd_unit;
    req.ord_unit = view.ord_unit;
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
    std::fs::write(output, text).map_err(|e| Failure { code: 1, message: format!("{}: cannot write: {e}", output.display()) })
}

/// The command line's choices over the document's view: --axis, --unit, --from/--to.
fn apply_overrides(view: &mut View, kind: PlotKind, o: &RenderOptions) -> Result<(), Failure> {
    if let Some(key) = &o.axis {
        let axis = AxisUnit::parse(key).ok_or_else(|| {
            bad("--axis", ErrorKind::UnknownName, format!("unknown axis unit \"{key}\" (use {})", keys(&AXIS_UNITS, axis_key)))
        })?;
        *view = View { axis, ..view.clone() }.with_x_range(axis_range_of(view, axis));
    }
    if let Some(u) = &o.unit {
        match kind {
            PlotKind::Cd => {
                view.cd_unit = CdUnit::parse(u).ok_or_else(|| {
                    let known = keys(&CdUnit::ALL, CdUnit::key);
                    bad("--unit", ErrorKind::UnknownName, format!("unknown CD unit \"{u}\" (use one of {known})"))
                })?
            }
            PlotKind::Ord => {
                view.ord_unit = OrdUnit::parse(u).ok_or_else(|| {
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
    match (o.from, o.to) {
        (Some(a), Some(b)) => *view = view.with_x_range((a, b)),
        (None, None) => {}
        _ => return Err(bad("--from", ErrorKind::MissingField, "give both --from and --to, or neither".into())),
    }
    Ok(())
}

/// The view's window in nm, as values of another axis unit.
fn axis_range_of(view: &View, axis: AxisUnit) -> (f64, f64) {
    let at = |nm: f64| axis.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(nm));
    (at(view.range_nm.0), at(view.range_nm.1))
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
        std::io::stdin()
            .take(cap)
            .read_to_string(&mut buf)
            .map_err(|e| bad("standard input", ErrorKind::Io, format!("cannot read the link: {e}")))?;
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
