//! The command line: the same core, for scripts, batch work and wiki pipelines.
//!
//! Every verb exits 0 on success, 2 on bad input with one line naming the file
//! and the field at fault, and 1 when output cannot be written. Never a panic.

use crate::document::Document;
use crate::error::{Error, ErrorKind};
use crate::lines::rotation_at_lines;
use crate::model::Model;
use crate::spectra::{evaluate, Grid};
use crate::table::{number, spectra_csv};
use crate::units::AxisUnit;
use clap::{Parser, Subcommand};
use std::ffi::OsString;
use std::io::Write;
use std::path::{Path, PathBuf};

/// What the eye sees between polarisers.
mod colour;
/// The export and share verbs (render, link, open).
mod fitting;
/// Coupled-system geometry tables.
mod geometry;
mod measured;
mod share;
mod states;

#[derive(Parser)]
#[command(name = "chiroptic", version, about = "Chiral band models: CD and ORD from n_L and n_R")]
struct Cli {
    #[command(subcommand)]
    verb: Verb,
}

#[derive(Subcommand)]
enum Verb {
    /// Spectra on a grid as CSV on stdout.
    Eval {
        /// The model document (JSON).
        doc: PathBuf,
        #[command(flatten)]
        grid: GridArgs,
    },
    /// Rotation and specific rotation at the standard lamp lines.
    Lines {
        /// The model document (JSON).
        doc: PathBuf,
    },
    /// One plot as SVG, the same figure the page draws.
    Render {
        /// The model document (JSON).
        doc: PathBuf,
        /// Which plot: cd, ord, abs or index.
        #[arg(long)]
        plot: String,
        /// Unit of the plotted quantity: a CD unit key (mdeg, delta_epsilon,
        /// molar_ellipticity, mean_residue_ellipticity, delta_a, g) or an ORD
        /// unit key (deg, specific_rotation, molar_rotation, delta_n);
        /// default: the document's view, else delta_epsilon / deg.
        #[arg(long)]
        unit: Option<String>,
        /// Spectral axis: nm, cm-1 or ev (default: the document's view, else nm).
        #[arg(long)]
        axis: Option<String>,
        /// Left edge of the plot in --axis units (default: the view's range,
        /// else a range showing every band).
        #[arg(long, allow_negative_numbers = true)]
        from: Option<f64>,
        /// Right edge of the plot in --axis units.
        #[arg(long, allow_negative_numbers = true)]
        to: Option<f64>,
        /// Width in pixels.
        #[arg(long, default_value_t = 800)]
        width: u32,
        /// Height in pixels.
        #[arg(long, default_value_t = 500)]
        height: u32,
        /// Dark background.
        #[arg(long)]
        dark: bool,
        /// Leave out the per-band contributions.
        #[arg(long)]
        no_contributions: bool,
        /// Leave out the legend.
        #[arg(long)]
        no_legend: bool,
        /// Output file (SVG); "-" writes to standard output.
        #[arg(short = 'o', long)]
        output: PathBuf,
    },
    /// Print a share link that carries the whole document.
    Link {
        /// The model document (JSON).
        doc: PathBuf,
        /// Address of the page the link opens (the fragment is added after '#').
        #[arg(long, default_value = "index.html")]
        base: String,
    },
    /// Print the document a share link holds (pretty JSON).
    Open {
        /// The link, its fragment, or "-" to read it from standard input.
        link: String,
    },
    /// A coupled system from a geometry table (chromophore x y z ex ey ez
    /// shape center_nm fwhm_cm1 dipole_debye2 [rotatory_1e40]; angstrom),
    /// added to a document (or a new one), written as JSON.
    GeometryImport {
        table: PathBuf,
        /// The document to add the system to.
        #[arg(long)]
        into: Option<PathBuf>,
        #[arg(long, default_value = "")]
        name: String,
    },
    /// One coupled system of a document as a geometry table.
    GeometryExport {
        doc: PathBuf,
        /// Which system (from 0).
        #[arg(long, default_value_t = 0)]
        system: usize,
    },
    /// What the tool understood of a data file (delimited text or JCAMP-DX), as CSV.
    Import {
        file: PathBuf,
        #[command(flatten)]
        columns: ColumnArgs,
    },
    /// Fit the start document's bands to measured files; writes the fitted
    /// document and prints the report on standard error.
    Fit {
        start: PathBuf,
        #[arg(required = true)]
        data: Vec<PathBuf>,
        #[command(flatten)]
        options: FitArgs,
        #[command(flatten)]
        columns: ColumnArgs,
    },
    /// The colour seen through the sample between polarisers: end-on, over
    /// analyser angles, or the tube from the side (single scattering only).
    Colour(colour::ColourArgs),
    /// Starting bands from measured CD (one per lobe), as a start document for fit.
    Propose {
        data: PathBuf,
        /// A document whose sample the start document keeps: the conditions the
        /// data were measured at (without it, a notional 1 mol/L in 1 cm).
        #[arg(long)]
        add: Option<PathBuf>,
        /// At most this many bands, the largest lobes first.
        #[arg(long, default_value_t = crate::fit::PROPOSED_DEFAULT_BANDS)]
        bands: usize,
        #[command(flatten)]
        columns: ColumnArgs,
        #[arg(short = 'o', long)]
        output: PathBuf,
    },
    /// Transition lists of computed excited states to a document of broadened bands.
    States {
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Temperature of the Boltzmann populations, K (default 298.15).
        #[arg(long)]
        temperature: Option<f64>,
        /// Band width as FWHM, eV (default 0.3).
        #[arg(long)]
        fwhm_ev: Option<f64>,
        /// Band width as the Gaussian sigma, eV.
        #[arg(long)]
        sigma_ev: Option<f64>,
        /// Added to every excitation energy, eV.
        #[arg(long, default_value_t = 0.0, allow_negative_numbers = true)]
        shift_ev: f64,
        #[arg(long, default_value = "gaussian")]
        shape: String,
        /// Use the velocity-form rotatory strengths (default: length form).
        #[arg(long)]
        velocity: bool,
        /// The concentration of the document's sample, mol/L.
        #[arg(long, default_value_t = 0.001)]
        concentration: f64,
        #[arg(short = 'o', long)]
        output: PathBuf,
    },
    /// Similarity of a document's CD, and of its mirror image, to measured CD.
    Compare {
        doc: PathBuf,
        data: PathBuf,
        /// The range compared, nm.
        #[arg(long)]
        from: Option<f64>,
        #[arg(long)]
        to: Option<f64>,
        /// The computed configuration's name in the verdict (e.g. R or S).
        #[arg(long, default_value = "")]
        label: String,
        /// Also find the factor (0.5 to 2) on every band's width that maximises the similarity.
        #[arg(long)]
        fit_width: bool,
        #[command(flatten)]
        columns: ColumnArgs,
    },
    /// Measured CD to ORD, or ORD to CD, by Kramers-Kronig.
    Kk {
        data: PathBuf,
        #[command(flatten)]
        columns: ColumnArgs,
        /// A document whose sample gives the conditions and whose bands stand
        /// for what lies outside the measured range.
        #[arg(long)]
        add: Option<PathBuf>,
        #[command(flatten)]
        grid: GridArgs,
        /// The transformed value at the polarimeter lamp lines instead of a grid.
        #[arg(long)]
        lines: bool,
    },
}

/// A grid: all of --from, --to and --step, or none (a default range).
#[derive(clap::Args)]
struct GridArgs {
    /// First grid point (in --unit); default: a range showing every band (eval) or the data's own points (kk).
    #[arg(long, allow_negative_numbers = true)]
    from: Option<f64>,
    /// Last grid point (in --unit).
    #[arg(long, allow_negative_numbers = true)]
    to: Option<f64>,
    /// Grid step (in --unit).
    #[arg(long, allow_negative_numbers = true)]
    step: Option<f64>,
    /// Unit of --from, --to and --step: nm, cm-1 or ev.
    #[arg(long, default_value = "nm")]
    unit: String,
}

/// The flags of `fit`.
#[derive(clap::Args)]
struct FitArgs {
    /// Fields free in the fit, comma-separated: band fields (centre, width,
    /// lorentz, R, D; default centre,width,R) and, for a coupled system of two
    /// chromophores, its distance and twist (fixed unless named).
    #[arg(long)]
    free: Option<String>,
    /// Hold a parameter at its start value: BAND.FIELD (e.g. "B1.center_nm") or
    /// SYSTEM.distance / SYSTEM.twist; repeatable.
    #[arg(long)]
    fix: Vec<String>,
    /// Local fits from this many starts (the given one and perturbed ones); default 8.
    #[arg(long)]
    starts: Option<u32>,
    #[arg(long)]
    max_iterations: Option<u32>,
    /// Fit one energy shift of every band centre (cm-1).
    #[arg(long)]
    shift: bool,
    /// Fit a baseline offset per data set.
    #[arg(long)]
    offsets: bool,
    /// Fit a scale factor per data set.
    #[arg(long)]
    scales: bool,
    /// The fitted document.
    #[arg(short = 'o', long)]
    output: PathBuf,
}

/// The flags that name a data file's columns where its header does not.
#[derive(clap::Args)]
struct ColumnArgs {
    /// JCAMP-DX LINK files: the data block, counted from 1 in file order.
    #[arg(long)]
    block: Option<usize>,
    /// The axis unit: nm, cm-1 or ev.
    #[arg(long)]
    x_unit: Option<String>,
    /// What the measured column holds: cd, ord or absorption (with --data-unit).
    #[arg(long)]
    quantity: Option<String>,
    /// Its unit key, e.g. mdeg, delta_epsilon, deg, absorbance.
    #[arg(long = "data-unit")]
    data_unit: Option<String>,
    /// Which column is the measurement, counted from 1 after the axis.
    #[arg(long)]
    column: Option<usize>,
}

impl ColumnArgs {
    fn flags(&self) -> measured::ColumnFlags {
        measured::ColumnFlags {
            block: self.block,
            x_unit: self.x_unit.clone(),
            quantity: self.quantity.clone(),
            unit: self.data_unit.clone(),
            column: self.column,
        }
    }
}

/// A failure: the exit code and the one line to print.
pub struct Failure {
    pub code: i32,
    pub message: String,
}

impl Failure {
    fn input(origin: &str, e: Error) -> Failure {
        Failure { code: 2, message: format!("{origin}: {e}") }
    }
}

/// Runs the command line and returns the process exit code.
pub fn run<I: IntoIterator<Item = OsString>>(args: I) -> i32 {
    let cli = match Cli::try_parse_from(args) {
        Ok(cli) => cli,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return code;
        }
    };
    let mut out = Vec::new();
    let result = match cli.verb {
        Verb::Eval { doc, grid } => eval(&doc, grid.from, grid.to, grid.step, &grid.unit, &mut out),
        Verb::Lines { doc } => lines(&doc, &mut out),
        Verb::Render { doc, plot, unit, axis, from, to, width, height, dark, no_contributions, no_legend, output } => {
            let options = share::RenderOptions {
                plot,
                unit,
                axis,
                from,
                to,
                width,
                height,
                dark,
                contributions: !no_contributions,
                legend: !no_legend,
            };
            share::render(&doc, &options, &output, &mut out)
        }
        Verb::Link { doc, base } => share::link(&doc, &base, &mut out),
        Verb::Open { link } => share::open(&link, &mut out),
        Verb::GeometryImport { table, into, name } => geometry::import(&table, into.as_deref(), &name, &mut out),
        Verb::GeometryExport { doc, system } => geometry::export(&doc, system, &mut out),
        Verb::Import { file, columns } => {
            let mut notes = Vec::new();
            let result = measured::import(&file, &columns.flags(), &mut out, &mut notes);
            for n in notes {
                eprintln!("chiroptic: {}: {n}", file.display());
            }
            result
        }
        Verb::Fit { start, data, options, columns } => {
            let o = fitting::FitOptions {
                data: &data,
                free: options.free,
                fix: &options.fix,
                starts: options.starts,
                max_iterations: options.max_iterations,
                shift: options.shift,
                offsets: options.offsets,
                scales: options.scales,
                output: &options.output,
            };
            let mut report = String::new();
            let result = fitting::run(&start, &columns.flags(), &o, &mut report);
            eprint!("{report}");
            result
        }
        Verb::Colour(args) => colour::run(&args, &mut out),
        Verb::States { files, temperature, fwhm_ev, sigma_ev, shift_ev, shape, velocity, concentration, output } => {
            let o = states::StatesOptions {
                files: &files,
                temperature_k: temperature,
                fwhm_ev,
                sigma_ev,
                shift_ev,
                shape: &shape,
                velocity,
                concentration,
                output: &output,
            };
            let mut notes = String::new();
            let result = states::run_states(&o, &mut notes);
            eprint!("{notes}");
            result
        }
        Verb::Propose { data, add, bands, columns, output } => fitting::propose(&data, &columns.flags(), add.as_deref(), bands, &output),
        Verb::Compare { doc, data, from, to, label, fit_width, columns } => {
            let o = states::CompareOptions { from_nm: from, to_nm: to, label: &label, fit_width };
            states::run_compare(&doc, &data, &columns.flags(), &o, &mut out)
        }
        Verb::Kk { data, columns, add, grid, lines } => {
            let options =
                measured::KkOptions { add: add.as_deref(), from: grid.from, to: grid.to, step: grid.step, unit: &grid.unit, lines };
            measured::kk(&data, &columns.flags(), &options, &mut out)
        }
    };
    match result {
        Ok(()) => {
            let mut stdout = std::io::stdout().lock();
            if stdout.write_all(&out).and_then(|_| stdout.flush()).is_err() {
                eprintln!("chiroptic: cannot write to standard output");
                return 1;
            }
            0
        }
        Err(f) => {
            eprintln!("chiroptic: {}", f.message);
            f.code
        }
    }
}

/// Reads and validates a document file.
pub fn load(path: &Path) -> Result<(Document, Model), Failure> {
    let origin = path.display().to_string();
    let meta = std::fs::metadata(path).map_err(|e| Failure::input(&origin, Error::new(ErrorKind::Io, "", format!("cannot read: {e}"))))?;
    if meta.len() > crate::document::MAX_DOCUMENT_BYTES as u64 {
        return Err(Failure::input(
            &origin,
            Error::new(
                ErrorKind::TooLarge,
                "",
                format!("file is {} bytes; the limit is {}", meta.len(), crate::document::MAX_DOCUMENT_BYTES),
            ),
        ));
    }
    let text =
        std::fs::read_to_string(path).map_err(|e| Failure::input(&origin, Error::new(ErrorKind::Io, "", format!("cannot read: {e}"))))?;
    let doc = Document::from_json(&text).map_err(|e| Failure::input(&origin, e))?;
    let model = Model::from_document(&doc).map_err(|e| Failure::input(&origin, e))?;
    Ok((doc, model))
}

fn eval(path: &Path, from: Option<f64>, to: Option<f64>, step: Option<f64>, unit: &str, out: &mut Vec<u8>) -> Result<(), Failure> {
    let (_, model) = load(path)?;
    let unit = AxisUnit::parse(unit).ok_or_else(|| {
        Failure::input("--unit", Error::new(ErrorKind::UnknownName, "", format!("unknown unit \"{unit}\" (use nm, cm-1 or ev)")))
    })?;
    let grid = match (from, to, step) {
        (None, None, None) => {
            let (lo, hi) = Grid::default_range_nm(&model);
            Grid::stepped(lo, hi, 1.0, AxisUnit::Nanometre)
        }
        (Some(f), Some(t), Some(s)) => Grid::stepped(f, t, s, unit),
        _ => Err(Error::new(ErrorKind::MissingField, "", "give all of --from, --to and --step, or none")),
    }
    .map_err(|e| Failure::input("grid", e))?;
    let spectra = evaluate(&model, &grid.wavenumber_cm1).map_err(|e| Failure::input(&path.display().to_string(), e))?;
    out.extend_from_slice(spectra_csv(&spectra).as_bytes());
    Ok(())
}

fn lines(path: &Path, out: &mut Vec<u8>) -> Result<(), Failure> {
    let (_, model) = load(path)?;
    if model.states.is_some() {
        eprintln!("chiroptic: note: these rotations include computed states: {}", crate::states::SUM_OVER_STATES_CAUTION);
    }
    let rows = rotation_at_lines(&model).map_err(|e| Failure::input(&path.display().to_string(), e))?;
    let mut text = String::from("line,wavelength_nm,rotation_deg,specific_rotation_deg_dm-1_(g/mL)-1,molar_rotation_deg_cm2_dmol-1\n");
    for r in rows {
        let specific = r.specific_rotation.map(number).unwrap_or_default();
        text.push_str(&format!(
            "{},{},{},{},{}\n",
            r.line.name,
            number(r.line.wavelength_nm),
            number(r.rotation_deg),
            specific,
            number(r.molar_rotation)
        ));
    }
    out.extend_from_slice(text.as_bytes());
    Ok(())
}
