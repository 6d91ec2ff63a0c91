//! Computed excited states: conformers with their transitions, Boltzmann
//! populations, and broadening into the bands of an ordinary model (so the
//! computed spectrum is the same `Spectra` as any model: CD, ORD,
//! absorption, lamp lines).
//!
//! Conventions: each transition becomes one band whose rotatory and dipole
//! strengths are the computed ones times the conformer's population; f
//! converts to D by f = 4.702e-7 nu[cm^-1] D[debye^2] (`units`); no Lorentz
//! local-field factor is applied unless asked (`local_field`), in which case
//! R and D are multiplied by ((n^2 + 2)/3) at the solvent's index, as
//! physics.md describes for computed (vacuum) strengths compared with solution.

pub mod doc;
pub mod table;

use crate::document::BandDoc;
use crate::error::{Error, ErrorKind, Result};
use crate::units::{self, AxisUnit, EnergyUnit};

/// A conformer's weight: a relative energy (Boltzmann) or a given population.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ConformerEnergy {
    Relative { value: f64, unit: EnergyUnit },
    Population(f64),
}

#[derive(Debug, Clone, PartialEq)]
pub struct Transition {
    pub energy_ev: f64,
    pub oscillator: Option<f64>,
    pub dipole_debye2: Option<f64>,
    /// Rotatory strengths, 1e-40 cgs, in the length and velocity forms.
    pub rotatory_length: Option<f64>,
    pub rotatory_velocity: Option<f64>,
    /// Its own FWHM (of a Voigt's Gaussian part), eV, in place of the broadening's.
    pub fwhm_ev: Option<f64>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Conformer {
    pub name: String,
    pub energy: ConformerEnergy,
    pub transitions: Vec<Transition>,
    pub enabled: bool,
    /// A share (0..1) set by hand in place of the computed one.
    pub share: Option<f64>,
}

/// Which rotatory strength to use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Gauge {
    Length,
    Velocity,
}

/// How transitions become bands.
#[derive(Debug, Clone, PartialEq)]
pub struct Broadening {
    /// `gaussian`, `lorentz` or `voigt`.
    pub shape: String,
    /// Full width at half maximum, eV (for a Voigt: of its Gaussian part).
    pub fwhm_ev: f64,
    /// The Lorentzian FWHM of a Voigt band, eV.
    pub lorentz_fwhm_ev: f64,
    /// Added to every excitation energy, eV.
    pub shift_ev: f64,
    /// Multiplies every strength (R and D).
    pub scale: f64,
    pub gauge: Gauge,
    pub temperature_k: f64,
    /// The local-field factor (n^2 + 2)/3 to apply, or 1.
    pub local_field: f64,
}

/// Said wherever a rotation includes computed states (CLI and page).
pub const SUM_OVER_STATES_CAUTION: &str =
    "a truncated sum over computed states is a rough estimate of [α]_D; compare the CD, not the rotation alone";

/// Room temperature for populations, K (common practice).
pub const DEFAULT_TEMPERATURE_K: f64 = 298.15;
/// The usual width of broadened computed CD, eV FWHM (common practice: 0.2-0.4 eV).
pub const DEFAULT_FWHM_EV: f64 = 0.3;

impl Default for Broadening {
    fn default() -> Broadening {
        Broadening {
            shape: "gaussian".into(),
            fwhm_ev: DEFAULT_FWHM_EV,
            lorentz_fwhm_ev: 0.0,
            shift_ev: 0.0,
            scale: 1.0,
            gauge: Gauge::Length,
            temperature_k: DEFAULT_TEMPERATURE_K,
            local_field: 1.0,
        }
    }
}

/// FWHM = 2 sqrt(2 ln 2) sigma for a Gaussian (the trade quotes either).
pub fn fwhm_from_sigma(sigma: f64) -> f64 {
    2.0 * (2.0 * std::f64::consts::LN_2).sqrt() * sigma
}

/// Populations (summing to 1 over the enabled conformers): given ones as
/// given (normalised), relative energies by Boltzmann, p_i ∝ exp(-E_i/(k T)).
/// A list may not mix the two. A conformer with a share set by hand takes
/// it, and the others divide the rest in their own proportions; when every
/// enabled conformer has one, the shares are normalised.
pub fn populations(conformers: &[Conformer], temperature_k: f64) -> Result<Vec<f64>> {
    let set: Vec<Option<f64>> = conformers.iter().map(|c| c.share.filter(|_| c.enabled)).collect();
    if set.iter().all(Option::is_none) {
        let enabled: Vec<bool> = conformers.iter().map(|c| c.enabled).collect();
        return computed_populations(conformers, &enabled, temperature_k);
    }
    for (c, s) in conformers.iter().zip(&set) {
        if let Some(s) = s {
            if !(0.0..=1.0).contains(s) {
                return Err(Error::new(ErrorKind::OutOfRange, "share", format!("the share of {} must lie in 0..1 (got {s})", c.name)));
            }
        }
    }
    let fixed: f64 = set.iter().flatten().sum();
    let rest_enabled = conformers.iter().zip(&set).any(|(c, s)| c.enabled && s.is_none());
    if !rest_enabled {
        if fixed <= 0.0 {
            return Err(Error::new(ErrorKind::OutOfRange, "conformers", "every share is zero: no conformer is left"));
        }
        return Ok(set.iter().map(|s| s.unwrap_or(0.0) / fixed).collect());
    }
    if fixed > 1.0 + 1e-12 {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            "share",
            format!("the shares set by hand add to {:.1} %, more than 100 %", 100.0 * fixed),
        ));
    }
    // The others' proportions, as if the set ones were switched off.
    let others: Vec<bool> = conformers.iter().zip(&set).map(|(c, s)| c.enabled && s.is_none()).collect();
    let p = computed_populations(conformers, &others, temperature_k)?;
    Ok(set.iter().zip(&p).map(|(s, p)| s.unwrap_or((1.0 - fixed).max(0.0) * p)).collect())
}

fn computed_populations(conformers: &[Conformer], enabled: &[bool], temperature_k: f64) -> Result<Vec<f64>> {
    if !(temperature_k > 0.0 && temperature_k.is_finite()) {
        return Err(Error::new(ErrorKind::NotPositive, "temperature", "the temperature must be positive (K)"));
    }
    let given = conformers.iter().filter(|c| matches!(c.energy, ConformerEnergy::Population(_))).count();
    if given != 0 && given != conformers.len() {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            "conformers",
            "give every conformer either a relative energy or a population, not a mix",
        ));
    }
    let kt = units::BOLTZMANN_ERG_PER_K * temperature_k;
    let energies: Vec<f64> = conformers
        .iter()
        .map(|c| match c.energy {
            ConformerEnergy::Relative { value, unit } => value * unit.erg_per_molecule(),
            ConformerEnergy::Population(_) => 0.0,
        })
        .collect();
    let lowest = enabled.iter().zip(&energies).filter(|(on, _)| **on).map(|(_, e)| *e).fold(f64::INFINITY, f64::min);
    let weights: Vec<f64> = conformers
        .iter()
        .zip(&energies)
        .zip(enabled)
        .map(|((c, e), on)| match (*on, c.energy) {
            (false, _) => 0.0,
            (true, ConformerEnergy::Population(p)) => p,
            (true, ConformerEnergy::Relative { .. }) => (-(e - lowest) / kt).exp(),
        })
        .collect();
    let total: f64 = weights.iter().sum();
    if !(total > 0.0 && total.is_finite()) {
        return Err(Error::new(ErrorKind::OutOfRange, "conformers", "no conformer is switched on with a positive population"));
    }
    Ok(weights.iter().map(|w| w / total).collect())
}

/// Dipole strength (debye^2) of a transition: given, or from f.
pub fn dipole_strength(t: &Transition) -> Option<f64> {
    t.dipole_debye2.or_else(|| {
        let nu = AxisUnit::ElectronVolt.to_wavenumber(t.energy_ev);
        t.oscillator.map(|f| f / (units::OSCILLATOR_PER_WAVENUMBER_DEBYE2 * nu))
    })
}

/// The bands of the broadened spectrum, one per transition of every enabled
/// conformer with a positive population.
pub fn bands(conformers: &[Conformer], b: &Broadening) -> Result<Vec<BandDoc>> {
    Ok(owned_bands(conformers, b, true)?.into_iter().map(|(_, _, band)| band).collect())
}

/// A document's states made ready for the spectra: one band per transition
/// of every conformer with a share, its strengths weighted by population and
/// scale.
#[derive(Debug, Clone, PartialEq)]
pub struct ComputedStates {
    pub bands: Vec<crate::model::Band>,
}

impl ComputedStates {
    pub fn from_doc(section: &crate::document::StatesDoc) -> Result<ComputedStates> {
        let (conformers, b) = doc::from_doc(section)?;
        // Unnamed (the band list does not show them), the field path made
        // only for an error: a thousand transitions are read on every edit.
        let bands = owned_bands(&conformers, &b, false)
            .map_err(in_section)?
            .into_iter()
            .enumerate()
            .map(|(i, (c, k, band))| {
                let placed =
                    |e: Error| Error { field: e.field.replacen("states", &format!("states.conformers[{c}].transitions[{k}]"), 1), ..e };
                crate::model::band_from_doc("states", i, &band).map_err(placed)
            })
            .collect::<Result<_>>()?;
        Ok(ComputedStates { bands })
    }
}

/// A fault of the populations or the broadening, named by its place in the
/// document's `states` section (so the page shows it beside its control).
pub fn in_section(e: Error) -> Error {
    let field = match e.field.as_str() {
        "share" | "conformers" => "states.conformers".to_string(),
        "temperature" => "states.temperature_k".to_string(),
        f @ ("fwhm_ev" | "scale" | "shift_ev" | "local_field") => format!("states.broadening.{f}"),
        _ => return e,
    };
    Error { field, ..e }
}

fn owned_bands(conformers: &[Conformer], b: &Broadening, named: bool) -> Result<Vec<(usize, usize, BandDoc)>> {
    let p = populations(conformers, b.temperature_k)?;
    for (name, v) in [("fwhm_ev", b.fwhm_ev), ("scale", b.scale), ("local_field", b.local_field)] {
        crate::error::positive(name, v, name)?;
    }
    crate::error::finite("shift_ev", b.shift_ev)?;
    let mut out = Vec::new();
    for (ci, (c, pop)) in conformers.iter().zip(&p).enumerate() {
        if *pop == 0.0 {
            continue;
        }
        for (k, t) in c.transitions.iter().enumerate() {
            let r = match b.gauge {
                Gauge::Length => t.rotatory_length.or(t.rotatory_velocity),
                Gauge::Velocity => t.rotatory_velocity.or(t.rotatory_length),
            }
            .unwrap_or(0.0);
            let d = dipole_strength(t).unwrap_or(0.0);
            let energy = t.energy_ev + b.shift_ev;
            if energy <= 0.0 {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    "shift_ev",
                    format!("the shift moves {} state {} to {energy} eV", c.name, k + 1),
                ));
            }
            let nu = AxisUnit::ElectronVolt.to_wavenumber(energy);
            let weight = pop * b.scale * b.local_field;
            // A transition whose R exceeds what its D allows (|g| <= 2) is
            // kept at the limit rather than refused: computed strengths of a
            // weak state can break it by rounding.
            let r = r * weight;
            let d = (d * weight).max(crate::model::dissymmetry_limited_dipole_strength(r));
            out.push((
                ci,
                k,
                BandDoc {
                    name: if named { format!("{} {} {:.3} eV", c.name, k + 1, t.energy_ev) } else { String::new() },
                    shape: b.shape.clone(),
                    center_nm: AxisUnit::Nanometre.from_wavenumber(nu),
                    fwhm_cm1: AxisUnit::ElectronVolt.width_to_wavenumber(t.fwhm_ev.unwrap_or(b.fwhm_ev), nu),
                    lorentz_fwhm_cm1: (b.shape == "voigt").then(|| AxisUnit::ElectronVolt.width_to_wavenumber(b.lorentz_fwhm_ev, nu)),
                    rotatory_strength_1e40_cgs: r,
                    dipole_strength_debye2: d,
                },
            ));
        }
    }
    Ok(out)
}
