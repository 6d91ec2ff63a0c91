//! The document's `states` section to conformers and broadening, and back.

use super::{Broadening, Conformer, ConformerEnergy, Gauge, Transition};
use crate::document::{BroadeningDoc, ConformerDoc, ExcitedStateDoc, StatesDoc};
use crate::error::{finite, Error, ErrorKind, Result};
use crate::limits::{MAX_CONFORMERS, MAX_DOCUMENT_TRANSITIONS};
use crate::units::{AxisUnit, EnergyUnit};

/// The shapes a transition may be broadened into.
pub const SHAPES: [&str; 3] = ["gaussian", "lorentz", "voigt"];

/// Reads the section, naming the field of anything wrong.
pub fn from_doc(doc: &StatesDoc) -> Result<(Vec<Conformer>, Broadening)> {
    if doc.conformers.len() > MAX_CONFORMERS {
        return Err(Error::new(
            ErrorKind::TooLarge,
            "states.conformers",
            format!("{} conformers; the limit is {MAX_CONFORMERS}", doc.conformers.len()),
        ));
    }
    let total: usize = doc.conformers.iter().map(|c| c.transitions.len()).sum();
    if total > MAX_DOCUMENT_TRANSITIONS {
        return Err(Error::new(
            ErrorKind::TooLarge,
            "states.conformers",
            format!("{total} transitions; a document holds at most {MAX_DOCUMENT_TRANSITIONS}"),
        ));
    }
    let conformers =
        doc.conformers.iter().enumerate().map(|(i, c)| conformer(&format!("states.conformers[{i}]"), c)).collect::<Result<_>>()?;
    Ok((conformers, broadening(&doc.broadening, doc.temperature_k)?))
}

fn broadening(b: &BroadeningDoc, temperature_k: f64) -> Result<Broadening> {
    if !SHAPES.contains(&b.shape.as_str()) {
        return Err(Error::new(
            ErrorKind::UnknownName,
            "states.broadening.shape",
            format!("unknown shape \"{}\" (use {})", b.shape, SHAPES.join(", ")),
        ));
    }
    crate::error::positive("states.broadening.fwhm_ev", b.fwhm_ev, "width")?;
    crate::error::positive("states.broadening.scale", b.scale, "scale")?;
    finite("states.broadening.shift_ev", b.shift_ev)?;
    crate::error::positive("states.temperature_k", temperature_k, "temperature")?;
    let lorentz = match (b.shape.as_str(), b.lorentz_fwhm_ev) {
        ("voigt", None) => {
            return Err(Error::new(
                ErrorKind::MissingField,
                "states.broadening.lorentz_fwhm_ev",
                "a voigt broadening needs its Lorentzian width",
            ))
        }
        (_, Some(w)) => {
            finite("states.broadening.lorentz_fwhm_ev", w)?;
            if w < 0.0 {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    "states.broadening.lorentz_fwhm_ev",
                    "the Lorentzian width cannot be negative",
                ));
            }
            w
        }
        (_, None) => 0.0,
    };
    Ok(Broadening {
        shape: b.shape.clone(),
        fwhm_ev: b.fwhm_ev,
        lorentz_fwhm_ev: lorentz,
        shift_ev: b.shift_ev,
        scale: b.scale,
        gauge: if b.velocity_form { Gauge::Velocity } else { Gauge::Length },
        temperature_k,
        local_field: 1.0,
    })
}

fn conformer(at: &str, c: &ConformerDoc) -> Result<Conformer> {
    let energies = [
        (c.relative_energy_kcal_per_mol, EnergyUnit::KcalPerMol),
        (c.relative_energy_kj_per_mol, EnergyUnit::KjPerMol),
        (c.relative_energy_ev, EnergyUnit::ElectronVolt),
        (c.relative_energy_hartree, EnergyUnit::Hartree),
    ];
    let given: Vec<ConformerEnergy> = energies
        .iter()
        .filter_map(|(v, unit)| v.map(|value| ConformerEnergy::Relative { value, unit: *unit }))
        .chain(c.population.map(ConformerEnergy::Population))
        .collect();
    let energy = match given.as_slice() {
        [] => ConformerEnergy::Relative { value: 0.0, unit: EnergyUnit::KcalPerMol },
        [one] => *one,
        _ => {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                at.to_string(),
                format!("conformer {} gives its energy or population more than once", c.name),
            ))
        }
    };
    match energy {
        ConformerEnergy::Relative { value, .. } => finite(&format!("{at}.relative_energy"), value).map(|_| ())?,
        ConformerEnergy::Population(p) if !(p.is_finite() && p >= 0.0) => {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                format!("{at}.population"),
                format!("the population of {} must be 0 or more", c.name),
            ))
        }
        ConformerEnergy::Population(_) => {}
    }
    if let Some(s) = c.share {
        if !(0.0..=1.0).contains(&s) {
            return Err(Error::new(
                ErrorKind::OutOfRange,
                format!("{at}.share"),
                format!("the share of {} must lie in 0..1 (got {s})", c.name),
            ));
        }
    }
    if c.transitions.is_empty() {
        return Err(Error::new(ErrorKind::MissingField, format!("{at}.transitions"), format!("conformer {} has no transitions", c.name)));
    }
    let transitions =
        c.transitions.iter().enumerate().map(|(k, t)| transition(&format!("{at}.transitions[{k}]"), t)).collect::<Result<_>>()?;
    Ok(Conformer { name: c.name.clone(), energy, transitions, enabled: !c.off, share: c.share })
}

fn transition(at: &str, t: &ExcitedStateDoc) -> Result<Transition> {
    let energy_ev = match (t.energy_ev, t.wavelength_nm) {
        (Some(e), None) => e,
        (None, Some(nm)) if nm > 0.0 => AxisUnit::ElectronVolt.from_wavenumber(AxisUnit::Nanometre.to_wavenumber(nm)),
        (None, Some(nm)) => {
            return Err(Error::new(
                ErrorKind::NotPositive,
                format!("{at}.wavelength_nm"),
                format!("the wavelength must be positive (got {nm})"),
            ))
        }
        (None, None) => return Err(Error::new(ErrorKind::MissingField, at.to_string(), "a transition needs energy_ev or wavelength_nm")),
        (Some(_), Some(_)) => return Err(Error::new(ErrorKind::OutOfRange, at.to_string(), "give energy_ev or wavelength_nm, not both")),
    };
    if !(energy_ev.is_finite() && energy_ev > 0.0) {
        return Err(Error::new(
            ErrorKind::NotPositive,
            format!("{at}.energy_ev"),
            format!("the excitation energy must be positive (got {energy_ev})"),
        ));
    }
    for (name, v) in [("oscillator_strength", t.oscillator_strength), ("dipole_strength_debye2", t.dipole_strength_debye2)] {
        if let Some(v) = v {
            if !(v.is_finite() && v >= 0.0) {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    format!("{at}.{name}"),
                    format!("{} must be 0 or more (got {v})", name.replace('_', " ")),
                ));
            }
        }
    }
    if let Some(w) = t.fwhm_ev {
        crate::error::positive(&format!("{at}.fwhm_ev"), w, "width")?;
    }
    for (name, v) in
        [("rotatory_length_1e40_cgs", t.rotatory_length_1e40_cgs), ("rotatory_velocity_1e40_cgs", t.rotatory_velocity_1e40_cgs)]
    {
        if let Some(v) = v {
            finite(&format!("{at}.{name}"), v)?;
        }
    }
    Ok(Transition {
        energy_ev,
        oscillator: t.oscillator_strength,
        dipole_debye2: t.dipole_strength_debye2,
        rotatory_length: t.rotatory_length_1e40_cgs,
        rotatory_velocity: t.rotatory_velocity_1e40_cgs,
        fwhm_ev: t.fwhm_ev,
    })
}

/// The section for conformers read from a transition list.
pub fn to_doc(conformers: &[Conformer], b: &Broadening) -> StatesDoc {
    StatesDoc {
        temperature_k: b.temperature_k,
        broadening: BroadeningDoc {
            shape: b.shape.clone(),
            fwhm_ev: b.fwhm_ev,
            lorentz_fwhm_ev: (b.shape == "voigt").then_some(b.lorentz_fwhm_ev),
            shift_ev: b.shift_ev,
            scale: b.scale,
            velocity_form: b.gauge == Gauge::Velocity,
        },
        conformers: conformers
            .iter()
            .map(|c| {
                let mut d = ConformerDoc { name: c.name.clone(), share: c.share, off: !c.enabled, ..ConformerDoc::default() };
                match c.energy {
                    ConformerEnergy::Population(p) => d.population = Some(p),
                    ConformerEnergy::Relative { value, unit } => match unit {
                        EnergyUnit::KcalPerMol => d.relative_energy_kcal_per_mol = Some(value),
                        EnergyUnit::KjPerMol => d.relative_energy_kj_per_mol = Some(value),
                        EnergyUnit::ElectronVolt => d.relative_energy_ev = Some(value),
                        EnergyUnit::Hartree => d.relative_energy_hartree = Some(value),
                    },
                }
                d.transitions = c
                    .transitions
                    .iter()
                    .map(|t| ExcitedStateDoc {
                        energy_ev: Some(t.energy_ev),
                        wavelength_nm: None,
                        oscillator_strength: t.oscillator,
                        dipole_strength_debye2: t.dipole_debye2,
                        rotatory_length_1e40_cgs: t.rotatory_length,
                        rotatory_velocity_1e40_cgs: t.rotatory_velocity,
                        fwhm_ev: t.fwhm_ev,
                    })
                    .collect();
                d
            })
            .collect(),
    }
}
