//! The transition-list format of chiroptic (plain text, our own):
//!
//! ```text
//! # comments start with '#'
//! conformer A, energy 0.00 kcal/mol          (or: population 0.35)
//! energy_eV   f        R_length   R_velocity
//! 4.52        0.012    -12.3      -11.8
//! 5.10        0.230     45.0       43.1
//! conformer B, energy 0.65 kcal/mol
//! wavelength_nm  D_debye2  R
//! 262.0          1.9       8.0
//! ```
//!
//! Each conformer starts with a `conformer NAME` line giving its relative
//! energy with a unit (kcal/mol, kJ/mol, eV, hartree) or a population; then
//! a header row and one row per excited state. Columns are separated by
//! commas, semicolons, tabs or spaces; headers are recognised as the trade
//! writes them: the excitation as `energy_eV`, `E (eV)`, `eV` or
//! `wavelength_nm`, `λ/nm`, `nm`; the strengths as `f` (oscillator strength)
//! and/or `D` (dipole strength, debye^2); rotatory strengths (1e-40 cgs) as
//! `R`, `R_length`/`R_len`/`R(length)` and `R_velocity`/`R_vel`/`R(velocity)`;
//! optionally a transition's own width as `fwhm_eV` or `sigma_eV` (`σ (eV)`),
//! in place of the broadening's (one width for all).
//! Any other column (a state number, a symmetry label) is ignored.

use super::{Conformer, ConformerEnergy, Transition};
use crate::units::EnergyUnit;

#[derive(Debug, Clone, PartialEq)]
pub struct TableError {
    pub line: usize,
    pub message: String,
}

impl std::fmt::Display for TableError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "line {}: {}", self.line, self.message)
    }
}

fn err<T>(line: usize, message: impl Into<String>) -> Result<T, TableError> {
    Err(TableError { line, message: message.into() })
}

pub use crate::limits::MAX_TRANSITIONS;

#[derive(Debug, Clone, Copy, PartialEq)]
enum Column {
    EnergyEv,
    WavelengthNm,
    Oscillator,
    Dipole,
    RotatoryLength,
    RotatoryVelocity,
    FwhmEv,
    SigmaEv,
    Ignored,
}

fn fields(line: &str) -> Vec<&str> {
    let d: &[char] = if line.contains('\t') {
        &['\t']
    } else if line.contains(';') {
        &[';']
    } else if line.contains(',') {
        &[',']
    } else {
        &[' ']
    };
    line.split(d).map(str::trim).filter(|f| !f.is_empty()).collect()
}

fn column(header: &str) -> Column {
    let h: String = header.to_lowercase().chars().filter(|c| !c.is_whitespace() && !"()[]_/".contains(*c)).collect();
    match h.as_str() {
        "energyev" | "eev" | "ev" | "excitationenergyev" | "energy" => Column::EnergyEv,
        "wavelengthnm" | "λnm" | "nm" | "lambdanm" | "wavelength" => Column::WavelengthNm,
        "f" | "osc" | "oscillatorstrength" | "fosc" => Column::Oscillator,
        "d" | "ddebye2" | "dipolestrength" | "ddebye²" => Column::Dipole,
        "r" | "rlength" | "rlen" | "rl" | "rotatorystrength" | "rlengthgauge" => Column::RotatoryLength,
        "rvelocity" | "rvel" | "rv" | "rvelocitygauge" => Column::RotatoryVelocity,
        "fwhmev" | "fwhm" => Column::FwhmEv,
        "sigmaev" | "sigma" | "σev" | "σ" => Column::SigmaEv,
        _ => Column::Ignored,
    }
}

/// Parses a conformer line: "conformer NAME, energy 0.65 kcal/mol" or
/// "conformer NAME, population 0.3".
fn conformer_line(rest: &str, line: usize) -> Result<(String, ConformerEnergy), TableError> {
    let (name, spec) = match rest.split_once(',') {
        Some((n, s)) => (n.trim(), s.trim()),
        None => (rest.trim(), ""),
    };
    if name.is_empty() {
        return err(line, "a conformer needs a name: \"conformer A, energy 0.0 kcal/mol\"");
    }
    let words: Vec<&str> = spec.split_whitespace().collect();
    let number = |w: Option<&&str>, what: &str| -> Result<f64, TableError> {
        match w.and_then(|w| w.parse::<f64>().ok()).filter(|v| v.is_finite()) {
            Some(v) => Ok(v),
            None => err(line, format!("{what} must be a number")),
        }
    };
    match words.first().map(|w| w.to_lowercase()) {
        Some(w) if w == "energy" => {
            let value = number(words.get(1), "the energy")?;
            let unit_text = words.get(2..).map(|u| u.join(" ")).unwrap_or_default();
            let unit = EnergyUnit::parse(&unit_text).ok_or_else(|| TableError {
                line,
                message: format!(
                    "the energy of {name} needs its unit ({}); got \"{unit_text}\"",
                    EnergyUnit::ALL.map(|u| u.key()).join(", ")
                ),
            })?;
            Ok((name.to_string(), ConformerEnergy::Relative { value, unit }))
        }
        Some(w) if w == "population" => {
            let p = number(words.get(1), "the population")?;
            if p < 0.0 {
                return err(line, format!("the population of {name} cannot be negative"));
            }
            Ok((name.to_string(), ConformerEnergy::Population(p)))
        }
        None => Ok((name.to_string(), ConformerEnergy::Relative { value: 0.0, unit: EnergyUnit::KcalPerMol })),
        Some(other) => err(line, format!("after the name give \"energy VALUE UNIT\" or \"population VALUE\" (got \"{other}\")")),
    }
}

/// Reads every conformer of a transition list.
pub fn parse(text: &str) -> Result<Vec<Conformer>, TableError> {
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    let mut conformers: Vec<Conformer> = Vec::new();
    let mut columns: Option<Vec<Column>> = None;
    let mut total = 0;
    for (i, raw) in text.lines().enumerate() {
        let line_no = i + 1;
        let line = raw.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let keyword = line.get(..9).is_some_and(|p| p.eq_ignore_ascii_case("conformer"));
        if let Some(rest) = line.get(9..).filter(|r| keyword && r.starts_with([' ', ':', '\t'])) {
            let (name, energy) = conformer_line(rest.trim_start_matches([':', ' ', '\t']), line_no)?;
            conformers.push(Conformer { name, energy, transitions: Vec::new(), enabled: true, share: None });
            columns = None;
            continue;
        }
        let Some(conformer) = conformers.last_mut() else {
            return err(line_no, "the list must start with a \"conformer NAME, energy VALUE UNIT\" line");
        };
        let f = fields(line);
        let numeric = f.iter().all(|v| v.parse::<f64>().is_ok());
        match &columns {
            None => {
                if numeric {
                    return err(line_no, "a header row must name the columns before the numbers (e.g. \"energy_eV f R_length\")");
                }
                let cols: Vec<Column> = f.iter().map(|h| column(h)).collect();
                if !cols.iter().any(|c| matches!(c, Column::EnergyEv | Column::WavelengthNm)) {
                    return err(line_no, "the header names no excitation column (energy_eV or wavelength_nm)");
                }
                if !cols.iter().any(|c| matches!(c, Column::RotatoryLength | Column::RotatoryVelocity)) {
                    return err(line_no, "the header names no rotatory strength column (R, R_length or R_velocity)");
                }
                columns = Some(cols);
            }
            Some(cols) => {
                if f.len() != cols.len() {
                    return err(line_no, format!("{} columns expected, found {}", cols.len(), f.len()));
                }
                total += 1;
                if total > MAX_TRANSITIONS {
                    return err(line_no, format!("more than {MAX_TRANSITIONS} transitions"));
                }
                conformer.transitions.push(row(cols, &f, line_no)?);
            }
        }
    }
    if conformers.is_empty() {
        return err(0, "no conformer found (the list starts with \"conformer NAME, energy VALUE UNIT\")");
    }
    if let Some(c) = conformers.iter().find(|c| c.transitions.is_empty()) {
        return err(0, format!("conformer {} has no transitions", c.name));
    }
    Ok(conformers)
}

fn row(cols: &[Column], f: &[&str], line: usize) -> Result<Transition, TableError> {
    let mut t = Transition {
        energy_ev: f64::NAN,
        oscillator: None,
        dipole_debye2: None,
        rotatory_length: None,
        rotatory_velocity: None,
        fwhm_ev: None,
    };
    for (k, (c, v)) in cols.iter().zip(f).enumerate() {
        if *c == Column::Ignored {
            continue;
        }
        let value = match v.parse::<f64>() {
            Ok(x) if x.is_finite() => x,
            _ => return err(line, format!("column {} is not a number: \"{v}\"", k + 1)),
        };
        match c {
            Column::EnergyEv => t.energy_ev = value,
            Column::WavelengthNm => {
                t.energy_ev = crate::units::AxisUnit::ElectronVolt.from_wavenumber(crate::units::AxisUnit::Nanometre.to_wavenumber(value))
            }
            Column::Oscillator => t.oscillator = Some(value),
            Column::Dipole => t.dipole_debye2 = Some(value),
            Column::RotatoryLength => t.rotatory_length = Some(value),
            Column::RotatoryVelocity => t.rotatory_velocity = Some(value),
            Column::FwhmEv => t.fwhm_ev = Some(value),
            Column::SigmaEv => t.fwhm_ev = Some(super::fwhm_from_sigma(value)),
            Column::Ignored => {}
        }
    }
    if t.energy_ev.is_nan() || t.energy_ev <= 0.0 {
        return err(line, "the excitation energy must be positive");
    }
    if t.oscillator.is_some_and(|f| f < 0.0) {
        return err(line, "an oscillator strength cannot be negative");
    }
    if t.dipole_debye2.is_some_and(|d| d < 0.0) {
        return err(line, "a dipole strength cannot be negative");
    }
    if t.fwhm_ev.is_some_and(|w| w <= 0.0) {
        return err(line, "a transition's width must be positive (eV)");
    }
    Ok(t)
}
