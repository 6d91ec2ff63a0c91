//! The validated model in canonical internal units (cm^-1, esu^2 cm^2):
//! built from a [`Document`], it is what the spectra are computed from.

use crate::document::{BandDoc, Document, SampleDoc, SellmeierDoc, SolventDoc};
use crate::error::{finite, positive, positive_at_most, Error, ErrorKind, Result};
use crate::limits::{MAX_CONCENTRATION_MOL_PER_L, MAX_DIPOLE_STRENGTH_DEBYE2, MAX_PATH_LENGTH_CM};
use crate::lineshape::Lineshape;
use crate::solvent::{Solvent, PRESETS};
use crate::units::{self, AxisUnit, SampleContext};

/// The band shapes a document may name, with the names a page shows.
pub const SHAPES: [(&str, &str); 3] = [("gaussian", "Gaussian"), ("lorentz", "Lorentzian"), ("voigt", "Voigt")];
/// The prefix of the names given to unnamed bands (B1, B2, ...).
pub const BAND_NAME_PREFIX: &str = "B";
/// Most terms an explicit Sellmeier series may have.
pub const MAX_SELLMEIER_TERMS: usize = 8;

/// Band centres must lie in 50 nm .. 50 um.
pub const MIN_CENTER_NM: f64 = 50.0;
pub const MAX_CENTER_NM: f64 = 50_000.0;

#[derive(Debug, Clone, PartialEq)]
pub struct Band {
    pub name: String,
    pub lineshape: Lineshape,
    pub rotatory_strength_esu2_cm2: f64,
    pub dipole_strength_esu2_cm2: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Sample {
    pub context: SampleContext,
    pub solvent: Solvent,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    pub sample: Sample,
    pub bands: Vec<Band>,
    /// Coupled chromophores, added to the bands' spectra (see `coupled`).
    pub systems: Vec<crate::coupled::System>,
    /// Computed excited states, broadened (see `states`).
    pub states: Option<crate::states::ComputedStates>,
}

impl Model {
    pub fn from_json(text: &str) -> Result<Model> {
        Model::from_document(&Document::from_json(text)?)
    }

    pub fn from_document(doc: &Document) -> Result<Model> {
        let sample = sample_from_doc(&doc.sample)?;
        let bands = doc.bands.iter().enumerate().map(|(i, b)| band_from_doc(&format!("bands[{i}]"), i, b)).collect::<Result<Vec<_>>>()?;
        let systems = crate::coupled::System::all_from_docs(&doc.systems)?;
        let states = doc.states.as_ref().map(crate::states::ComputedStates::from_doc).transpose()?;
        Ok(Model { sample, bands, systems, states })
    }

    /// The model with every band's (and computed state's) width times k.
    pub fn widened(&self, k: f64) -> Model {
        let mut m = self.clone();
        let states = m.states.iter_mut().flat_map(|s| s.bands.iter_mut());
        for b in m.bands.iter_mut().chain(states) {
            b.lineshape = b.lineshape.widened(k);
        }
        m
    }

    /// Band centres in cm^-1 (the coupled systems' transitions after the
    /// bands, then the computed states').
    pub fn centers(&self) -> impl Iterator<Item = f64> + '_ {
        let states = self.states.iter().flat_map(|s| s.bands.iter().map(|b| b.lineshape.center()));
        self.bands.iter().map(|b| b.lineshape.center()).chain(self.systems.iter().flat_map(|s| s.centers())).chain(states)
    }
}

fn sample_from_doc(s: &SampleDoc) -> Result<Sample> {
    let concentration =
        positive_at_most("sample.concentration_mol_per_l", s.concentration_mol_per_l, MAX_CONCENTRATION_MOL_PER_L, "concentration")?;
    let path = positive_at_most("sample.path_length_cm", s.path_length_cm, MAX_PATH_LENGTH_CM, "path length")?;
    let molar_mass = s.molar_mass_g_per_mol.map(|m| positive("sample.molar_mass_g_per_mol", m, "molar mass")).transpose()?;
    let mrw =
        s.mean_residue_weight_g_per_mol.map(|m| positive("sample.mean_residue_weight_g_per_mol", m, "mean residue weight")).transpose()?;
    Ok(Sample {
        context: SampleContext {
            concentration_mol_per_l: concentration,
            path_length_cm: path,
            molar_mass_g_per_mol: molar_mass,
            mean_residue_weight_g_per_mol: mrw,
        },
        solvent: solvent_from_doc(&s.solvent)?,
    })
}

fn solvent_from_doc(s: &SolventDoc) -> Result<Solvent> {
    match (s.constant, &s.cauchy, &s.sellmeier) {
        (Some(n), None, None) => {
            let n = positive("sample.solvent.constant", n, "refractive index")?;
            if !(1.0..=4.0).contains(&n) {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    "sample.solvent.constant",
                    format!("refractive index must lie in 1..4 (got {n})"),
                ));
            }
            Ok(Solvent::Constant(n))
        }
        (None, Some(c), None) => {
            positive("sample.solvent.cauchy.a", c.a, "Cauchy term a")?;
            finite("sample.solvent.cauchy.b_um2", c.b_um2)?;
            finite("sample.solvent.cauchy.c_um4", c.c_um4)?;
            Ok(Solvent::Cauchy { a: c.a, b_um2: c.b_um2, c_um4: c.c_um4 })
        }
        (None, None, Some(SellmeierDoc::Preset(name))) => Solvent::preset(name).ok_or_else(|| {
            Error::new(
                ErrorKind::UnknownName,
                "sample.solvent.sellmeier",
                format!("unknown preset \"{name}\" (known: {})", PRESETS.join(", ")),
            )
        }),
        (None, None, Some(SellmeierDoc::Coefficients { b, c_um2 })) => {
            if b.len() != c_um2.len() || b.is_empty() || b.len() > MAX_SELLMEIER_TERMS {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    "sample.solvent.sellmeier",
                    format!("needs 1 to {MAX_SELLMEIER_TERMS} terms with as many b as c_um2 (got {} and {})", b.len(), c_um2.len()),
                ));
            }
            for (i, (bi, ci)) in b.iter().zip(c_um2).enumerate() {
                finite(&format!("sample.solvent.sellmeier.b[{i}]"), *bi)?;
                finite(&format!("sample.solvent.sellmeier.c_um2[{i}]"), *ci)?;
            }
            Ok(Solvent::Sellmeier { b: b.clone(), c_um2: c_um2.clone(), range: None })
        }
        _ => Err(Error::new(ErrorKind::MissingField, "sample.solvent", "give exactly one of \"constant\", \"cauchy\" or \"sellmeier\"")),
    }
}

/// The smallest dipole strength (debye^2) a band of rotatory strength
/// `r_1e40` may have: |g| = 4|R|/D <= 2 gives D >= 2|R|.
pub fn dissymmetry_limited_dipole_strength(r_1e40: f64) -> f64 {
    MAX_DISSYMMETRY.recip() * 4.0 * units::rotatory_strength_esu2_cm2(r_1e40.abs()) / units::dipole_strength_esu2_cm2(1.0)
}

/// |g| = |De / e| cannot exceed 2 (e_L and e_R are both non-negative).
pub const MAX_DISSYMMETRY: f64 = 2.0;

/// Validates one band; `at` is its field path (`bands[2]`, or a coupled
/// transition's), `i` its index for a default name.
pub(crate) fn band_from_doc(at: &str, i: usize, b: &BandDoc) -> Result<Band> {
    let field = |name: &str| format!("{at}.{name}");
    // The field's path is made only for a refusal (a thousand computed
    // states are read on every edit).
    let finite_at = |name: &str, v: f64| if v.is_finite() { Ok(v) } else { finite(&field(name), v) };
    let center_nm = finite_at("center_nm", b.center_nm)?;
    if !(MIN_CENTER_NM..=MAX_CENTER_NM).contains(&center_nm) {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            field("center_nm"),
            format!("centre must lie between {MIN_CENTER_NM} nm and {MAX_CENTER_NM} nm (got {center_nm})"),
        ));
    }
    let center = AxisUnit::Nanometre.to_wavenumber(center_nm);
    let fwhm = if b.fwhm_cm1 > 0.0 && b.fwhm_cm1.is_finite() { b.fwhm_cm1 } else { positive(&field("fwhm_cm1"), b.fwhm_cm1, "width")? };
    if fwhm >= center {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            field("fwhm_cm1"),
            format!("width must be below the band's own wavenumber {center:.0} cm⁻¹ (got {fwhm})"),
        ));
    }
    let lineshape = match b.shape.as_str() {
        "lorentz" => Lineshape::lorentz(center, fwhm),
        "gaussian" => Lineshape::gaussian(center, fwhm),
        "voigt" => {
            let lf = b
                .lorentz_fwhm_cm1
                .ok_or_else(|| Error::new(ErrorKind::MissingField, field("lorentz_fwhm_cm1"), "a voigt band needs its Lorentzian width"))?;
            finite_at("lorentz_fwhm_cm1", lf)?;
            if lf < 0.0 || lf >= center {
                return Err(Error::new(
                    ErrorKind::OutOfRange,
                    field("lorentz_fwhm_cm1"),
                    format!("Lorentzian width must be 0 or more and below {center:.0} cm⁻¹ (got {lf})"),
                ));
            }
            Lineshape::voigt(center, fwhm, lf)
        }
        other => {
            return Err(Error::new(
                ErrorKind::UnknownName,
                field("shape"),
                format!("unknown shape \"{other}\" (use lorentz, gaussian or voigt)"),
            ))
        }
    };
    let r = finite_at("rotatory_strength_1e40_cgs", b.rotatory_strength_1e40_cgs)?;
    let d = finite_at("dipole_strength_debye2", b.dipole_strength_debye2)?;
    if d < 0.0 {
        return Err(Error::new(
            ErrorKind::NotPositive,
            field("dipole_strength_debye2"),
            format!("dipole strength cannot be negative (got {d})"),
        ));
    }
    if d > MAX_DIPOLE_STRENGTH_DEBYE2 {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            field("dipole_strength_debye2"),
            format!("dipole strength must be at most {MAX_DIPOLE_STRENGTH_DEBYE2} D² (got {d})"),
        ));
    }
    // |g| = |De/e| <= 2 because e_L, e_R >= 0: at the centre of a band g = 4R/D.
    let smallest_d = dissymmetry_limited_dipole_strength(r);
    if d < smallest_d {
        return Err(Error::new(
            ErrorKind::OutOfRange,
            field("dipole_strength_debye2"),
            format!(
                "dipole strength {} D² is too small for R = {}: 4|R|/D would exceed 2 (one circular polarisation absorbing negatively); the smallest D this R allows is {} D²",
                crate::table::number(d),
                crate::table::number(r),
                crate::table::number(smallest_d)
            ),
        ));
    }
    let name = if b.name.trim().is_empty() { format!("{BAND_NAME_PREFIX}{}", i + 1) } else { b.name.clone() };
    Ok(Band {
        name,
        lineshape,
        rotatory_strength_esu2_cm2: units::rotatory_strength_esu2_cm2(r),
        dipole_strength_esu2_cm2: units::dipole_strength_esu2_cm2(d),
    })
}
