//! Geometry as a plain table: one transition per line,
//!
//! ```text
//! chromophore x_angstrom y_angstrom z_angstrom ex ey ez shape center_nm fwhm_cm1 dipole_debye2 [rotatory_1e40]
//! ```
//!
//! separated by spaces, tabs or commas; `#` starts a comment; a first line
//! starting with `chromophore` is the header. Rows of one name make one
//! chromophore (at one position); a row whose direction differs from its
//! chromophore's first row keeps it as the transition's own.

use crate::document::{ChromophoreDoc, Direction, SystemDoc, TransitionDoc};
use crate::error::{Error, ErrorKind, Result};
use crate::table::number;

pub const HEADER: &str = "chromophore x_angstrom y_angstrom z_angstrom ex ey ez shape center_nm fwhm_cm1 dipole_debye2 rotatory_1e40";

/// Reads a table into a system (validated later, with the document).
pub fn parse(text: &str, name: &str) -> Result<SystemDoc> {
    let mut chromophores: Vec<ChromophoreDoc> = Vec::new();
    for (i, raw) in text.lines().enumerate() {
        let line = raw.split('#').next().unwrap_or("").trim();
        if line.is_empty() || line.starts_with("chromophore") {
            continue;
        }
        let at = format!("line {}", i + 1);
        let f: Vec<&str> = line.split(|c: char| c == ',' || c.is_whitespace()).filter(|s| !s.is_empty()).collect();
        if !(11..=12).contains(&f.len()) {
            return Err(Error::new(ErrorKind::Syntax, at, format!("expected 11 or 12 fields ({HEADER}), got {}", f.len())));
        }
        let num = |k: usize, what: &str| -> Result<f64> {
            f[k].parse::<f64>()
                .ok()
                .filter(|v| v.is_finite())
                .ok_or_else(|| Error::new(ErrorKind::Syntax, at.clone(), format!("{what} \"{}\" is not a finite number", f[k])))
        };
        let position = [num(1, "x")?, num(2, "y")?, num(3, "z")?];
        let direction = [num(4, "ex")?, num(5, "ey")?, num(6, "ez")?];
        let transition = TransitionDoc {
            shape: f[7].to_string(),
            center_nm: num(8, "center_nm")?,
            fwhm_cm1: num(9, "fwhm_cm1")?,
            lorentz_fwhm_cm1: None,
            dipole_strength_debye2: num(10, "dipole_debye2")?,
            rotatory_strength_1e40_cgs: if f.len() == 12 { num(11, "rotatory_1e40")? } else { 0.0 },
            direction: None,
        };
        match chromophores.iter_mut().find(|c| c.name == f[0]) {
            Some(c) => {
                if c.position_angstrom != position {
                    return Err(Error::new(ErrorKind::OutOfRange, at, format!("chromophore \"{}\" appears at two positions", f[0])));
                }
                let direction = if Direction::Vector(direction) == c.direction { None } else { Some(Direction::Vector(direction)) };
                c.transitions.push(TransitionDoc { direction, ..transition });
            }
            None => chromophores.push(ChromophoreDoc {
                name: f[0].to_string(),
                position_angstrom: position,
                direction: Direction::Vector(direction),
                transitions: vec![transition],
            }),
        }
    }
    if chromophores.is_empty() {
        return Err(Error::new(ErrorKind::MissingField, "", "no chromophore rows in the table"));
    }
    Ok(SystemDoc { name: name.to_string(), screened: false, uncoupled: false, chromophores })
}

/// Writes a system as the table [`parse`] reads (numbers round-trip).
pub fn write(system: &SystemDoc) -> String {
    let mut out = format!("{HEADER}\n");
    for (j, c) in system.chromophores.iter().enumerate() {
        let name =
            if c.name.trim().is_empty() { format!("C{}", j + 1) } else { c.name.replace(|ch: char| ch.is_whitespace() || ch == ',', "_") };
        for t in &c.transitions {
            let d = t.direction.unwrap_or(c.direction).vector();
            let p = c.position_angstrom;
            let cells = [p[0], p[1], p[2], d[0], d[1], d[2]].map(number).join(" ");
            out.push_str(&format!(
                "{name} {cells} {} {} {} {} {}\n",
                t.shape,
                number(t.center_nm),
                number(t.fwhm_cm1),
                number(t.dipole_strength_debye2),
                number(t.rotatory_strength_1e40_cgs)
            ));
        }
    }
    out
}
