//! `colour`: what the eye sees through the sample between two polarisers:
//! the end-on colour (XYZ, xy, luminance, sRGB), the strip over analyser
//! angles, and the picture of the tube seen from the side.

use super::{load, Failure};
use crate::colour::side::{self, SideViewRequest};
use crate::colour::{self, Colour, Illuminant, Optics};
use crate::error::{Error, ErrorKind};
use base64::Engine;
use std::path::{Path, PathBuf};

mod png;

/// Polariser -> sample -> analyser, per wavelength by the Jones calculus
/// (rotation and circular dichroism), weighted by the illuminant and the CIE
/// 1931 2 degree observer (380-780 nm, 5 nm). XYZ has Y = 1 for the
/// illuminant through parallel ideal polarisers with no sample; sRGB per IEC
/// 61966-2-1, clipped to its gamut, no chromatic adaptation.
/// The side view is the light scattered out of the beam (single scattering
/// by small particles only; no multiple scattering, refraction at the wall
/// ignored), seen from the side.
#[derive(clap::Args)]
pub struct ColourArgs {
    /// The model document (JSON).
    doc: PathBuf,
    /// Analyser angle from the polariser's axis, degrees, clockwise as seen
    /// facing the light (the sense of positive rotation).
    #[arg(long, default_value_t = 0.0, allow_negative_numbers = true)]
    analyser: f64,
    /// Light source: d65 (daylight), a (incandescent, 2856 K), led (CIE
    /// LED-B3 white LED) or e (equal energy).
    #[arg(long, default_value = "d65")]
    illuminant: String,
    /// Print the colours seen while the analyser turns 0-180 degrees (CSV)
    /// instead of one colour.
    #[arg(long)]
    strip: bool,
    /// Analyser angles in the strip, 0 and 180 included (at most 3601).
    #[arg(long, default_value_t = colour::DEFAULT_STRIP_SAMPLES)]
    samples: usize,
    /// Write the tube seen from the side (single scattering) to -o.
    #[arg(long)]
    side_view: bool,
    /// Output picture: .png or .svg (with --side-view).
    #[arg(short = 'o', long)]
    output: Option<PathBuf>,
    /// Side view width, pixels (at most 2400).
    #[arg(long, default_value_t = 600)]
    width: u32,
    /// Side view height, pixels (at most 1200).
    #[arg(long, default_value_t = 150)]
    height: u32,
    /// From the eye to the tube's axis, cm (default 25, or twice the tube's
    /// length if that is more).
    #[arg(long, allow_negative_numbers = true)]
    distance_cm: Option<f64>,
}

fn flag(name: &str, e: Error) -> Failure {
    Failure::input(name, Error::new(e.kind, "", e.message))
}

fn six(v: f64) -> String {
    if v.is_nan() {
        "-".to_string()
    } else {
        format!("{v:.6}")
    }
}

fn triple(v: [f64; 3]) -> String {
    v.map(six).join(", ")
}

pub fn run(a: &ColourArgs, out: &mut Vec<u8>) -> Result<(), Failure> {
    let illuminant = colour::parse_illuminant(&a.illuminant).map_err(|e| flag("--illuminant", e))?;
    if !a.analyser.is_finite() {
        return Err(flag("--analyser", Error::new(ErrorKind::NotFinite, "", "the analyser angle must be a finite number of degrees")));
    }
    let picture = match (a.side_view, &a.output) {
        (true, Some(p)) => Some(Picture::of(p)?),
        (true, None) => {
            return Err(flag(
                "--side-view",
                Error::new(ErrorKind::MissingField, "", "give the picture's file with -o FILE.png or FILE.svg"),
            ))
        }
        (false, Some(_)) => return Err(flag("-o", Error::new(ErrorKind::MissingField, "", "-o writes the side view: add --side-view"))),
        (false, None) => None,
    };
    let origin = a.doc.display().to_string();
    let (_, model) = load(&a.doc)?;
    let optics = Optics::of_model(&model).map_err(|e| Failure::input(&origin, e))?;

    if let Some(p) = picture {
        let req = SideViewRequest { width: a.width, height: a.height, illuminant, viewer_distance_cm: a.distance_cm };
        let view = side::render(&optics, &req).map_err(|e| match e.field.as_str() {
            "width" | "height" => flag(&format!("--{}", e.field), e),
            "viewer_distance_cm" => flag("--distance-cm", e),
            _ => Failure::input(&origin, e),
        })?;
        p.write(&view)?;
        out.extend_from_slice(
            format!(
                "side view: {} x {} px, tube {} cm long, {} cm across, eye {} cm from its axis, {}\n",
                view.width,
                view.height,
                six(view.length_cm),
                six(view.diameter_cm),
                six(view.viewer_distance_cm),
                illuminant.label()
            )
            .as_bytes(),
        );
        return Ok(());
    }

    if a.strip {
        let strip = colour::strip_optics(&optics, illuminant, a.samples).map_err(|e| flag("--samples", e))?;
        let mut text = String::from("analyser_deg,X,Y,Z,x,y,srgb_r,srgb_g,srgb_b,hex\n");
        for s in strip {
            let c = s.colour;
            text.push_str(&format!(
                "{},{},{},{},{},{},{},{},{},{}\n",
                six(s.analyser_deg),
                six(c.xyz[0]),
                six(c.xyz[1]),
                six(c.xyz[2]),
                six(c.xy[0]),
                six(c.xy[1]),
                c.srgb_8bit[0],
                c.srgb_8bit[1],
                c.srgb_8bit[2],
                c.hex()
            ));
        }
        out.extend_from_slice(text.as_bytes());
        return Ok(());
    }

    let c = colour::end_on_optics(&optics, a.analyser, illuminant).map_err(|e| flag("--analyser", e))?;
    out.extend_from_slice(swatch_text(&c, a.analyser, illuminant).as_bytes());
    Ok(())
}

fn swatch_text(c: &Colour, beta: f64, illuminant: Illuminant) -> String {
    format!(
        "light: {}\nanalyser_deg: {}\nXYZ: {}\nxy: {}\nluminance_Y: {}\nsrgb_linear: {}\nsrgb: {}\nsrgb_8bit: {}, {}, {}\nhex: {}\ngamut: {}\n",
        illuminant.label(),
        six(beta),
        triple(c.xyz),
        c.xy.map(six).join(", "),
        six(c.luminance()),
        triple(c.srgb_linear),
        triple(c.srgb),
        c.srgb_8bit[0],
        c.srgb_8bit[1],
        c.srgb_8bit[2],
        c.hex(),
        if c.clipped { "outside sRGB, clipped" } else { "inside sRGB" }
    )
}

enum Format {
    Png,
    Svg,
}

struct Picture<'a> {
    path: &'a Path,
    format: Format,
}

impl<'a> Picture<'a> {
    fn of(path: &'a Path) -> Result<Picture<'a>, Failure> {
        let ext = path.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase);
        let format = match ext.as_deref() {
            Some("png") => Format::Png,
            Some("svg") => Format::Svg,
            _ => {
                return Err(flag(
                    "-o",
                    Error::new(ErrorKind::UnknownName, "", format!("{}: the picture's name must end in .png or .svg", path.display())),
                ))
            }
        };
        Ok(Picture { path, format })
    }

    fn write(&self, view: &side::SideView) -> Result<(), Failure> {
        let png = png::encode_rgba(view.width, view.height, &view.rgba());
        let bytes = match self.format {
            Format::Png => png,
            // The pixels as an embedded PNG: an SVG of one image.
            Format::Svg => format!(
                "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\">\
                 <title>The tube seen from the side (single scattering)</title>\
                 <image width=\"{w}\" height=\"{h}\" href=\"data:image/png;base64,{data}\"/></svg>\n",
                w = view.width,
                h = view.height,
                data = base64::engine::general_purpose::STANDARD.encode(&png)
            )
            .into_bytes(),
        };
        std::fs::write(self.path, bytes).map_err(|e| Failure { code: 1, message: format!("{}: cannot write: {e}", self.path.display()) })
    }
}
