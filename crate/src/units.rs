//! The one home of physical constants and unit factors.
//!
//! Everything is CGS-Gaussian, the system in which rotatory and dipole
//! strengths are quoted by the trade. Constants are the exact SI-2019 defining
//! values (CODATA) written in CGS; the derived factors (C_R, C_D, 32.98 ...)
//! are computed from them here and nowhere else.

use std::f64::consts::{LN_10, PI};

/// Planck constant, erg s (exact, SI 2019 / CODATA).
pub const PLANCK_ERG_S: f64 = 6.626_070_15e-27;
/// Speed of light, cm/s (exact).
pub const LIGHT_CM_PER_S: f64 = 2.997_924_58e10;
/// Avogadro constant, 1/mol (exact).
pub const AVOGADRO_PER_MOL: f64 = 6.022_140_76e23;
/// Electron volt, erg (exact).
pub const ELECTRON_VOLT_ERG: f64 = 1.602_176_634e-12;
/// Boltzmann constant, erg/K (exact; Planck's law of the incandescent source).
pub const BOLTZMANN_ERG_PER_K: f64 = 1.380_649e-16;

/// cm^3 per litre: concentrations are mol/L, CGS volumes are cm^3.
pub const CM3_PER_LITRE: f64 = 1000.0;
/// Nanometres per centimetre: lambda[nm] = NM_PER_CM / nu[cm^-1].
pub const NM_PER_CM: f64 = 1e7;
/// Micrometres per centimetre (Sellmeier and Cauchy series use um).
pub const UM_PER_CM: f64 = 1e4;
/// One "1e-40 cgs" unit of rotatory strength, in esu^2 cm^2.
pub const ESU2_CM2_PER_ROTATORY_UNIT: f64 = 1e-40;
/// One debye^2, in esu^2 cm^2.
pub const ESU2_CM2_PER_DEBYE2: f64 = 1e-36;
/// Millidegrees per degree.
pub const MDEG_PER_DEG: f64 = 1000.0;
/// Centimetres per decimetre (polarimeter tubes are specified in dm).
pub const CM_PER_DM: f64 = 10.0;
/// Millimetres per centimetre.
pub const MM_PER_CM: f64 = 10.0;
/// Molar quantities of the trade ([theta], [Phi], [theta]_MRW, in
/// deg cm^2 dmol^-1) are 100 X / (l_cm c_mol_per_l) for an observed angle X
/// in degrees: the 100 turns mol/L * cm into dmol/cm^2.
pub const MOLAR_PER_OBSERVED: f64 = 100.0;

/// Degrees per radian.
pub const DEG_PER_RAD: f64 = 180.0 / PI;

/// Rotatory-strength constant C_R in R = C_R * int (De/nu) dnu, esu^2 cm^2
/// per (M^-1 cm^-1): 3 h c ln10 * 1000 / (32 pi^3 N_A), about 2.296e-39.
pub const ROTATORY_CONSTANT: f64 = 3.0 * PLANCK_ERG_S * LIGHT_CM_PER_S * LN_10 * CM3_PER_LITRE / (32.0 * PI * PI * PI * AVOGADRO_PER_MOL);

/// Dipole-strength constant C_D = 4 C_R in D = C_D * int (e/nu) dnu.
pub const DIPOLE_CONSTANT: f64 = 4.0 * ROTATORY_CONSTANT;

/// Centimetres per angstrom (positions of coupled chromophores are given in angstrom).
pub const CM_PER_ANGSTROM: f64 = 1e-8;

/// Polarisability (cm^3) per unit of dipole strength (esu^2 cm^2) times the
/// mean index shape s~ (cm): alpha = pi/(h c) D s~, because far from a band
/// s~ -> (2/pi) nu_j/(nu_j^2 - nu^2) and the oscillator's polarisability is
/// (2/(h c)) D nu_j/(nu_j^2 - nu^2) (see coupled).
pub const POLARISABILITY_PER_DIPOLE_SHAPE: f64 = PI / (PLANCK_ERG_S * LIGHT_CM_PER_S);

/// Coupling energy in cm^-1 per (debye^2 / nm^3): (1e-36 esu^2 cm^2) / (1e-7 cm)^3 / (h c),
/// about 5.034 (the "5.04" of exciton texts).
pub const WAVENUMBER_PER_DEBYE2_PER_NM3: f64 = ESU2_CM2_PER_DEBYE2 * NM_PER_CM * NM_PER_CM * NM_PER_CM / (PLANCK_ERG_S * LIGHT_CM_PER_S);

/// Ellipticity in degrees per unit DA: (ln10/4)(180/pi), about 32.98.
pub const ELLIPTICITY_DEG_PER_DELTA_A: f64 = LN_10 / 4.0 * DEG_PER_RAD;

/// Molar ellipticity [theta] (deg cm^2 dmol^-1) per De (M^-1 cm^-1): the
/// factor 100 turns mol/L * cm into dmol/cm^2; about 3298.2.
pub const MOLAR_ELLIPTICITY_PER_DELTA_EPSILON: f64 = MOLAR_PER_OBSERVED * ELLIPTICITY_DEG_PER_DELTA_A;

/// Electron mass (g): CODATA 2018.
pub const ELECTRON_MASS_G: f64 = 9.109_383_701_5e-28;
/// Elementary charge (esu): 1.602176634e-19 C times c/10 (exact SI 2019).
pub const ELEMENTARY_CHARGE_ESU: f64 = 4.803_204_712_570_263e-10;

/// Oscillator strength per integrated absorption: f = F * int e dnu with
/// F = 1000 ln10 m_e c^2 / (pi N_A e^2), about 4.319e-9 (cgs).
pub fn oscillator_strength_factor() -> f64 {
    CM3_PER_LITRE * LN_10 * ELECTRON_MASS_G * LIGHT_CM_PER_S * LIGHT_CM_PER_S
        / (PI * AVOGADRO_PER_MOL * ELEMENTARY_CHARGE_ESU * ELEMENTARY_CHARGE_ESU)
}

/// f = K nu D for a transition at nu (cm^-1) of dipole strength D
/// (debye^2): K = 8 pi^2 m_e c / (3 h e^2) per debye^2, about 4.702e-7
/// (f = (8 pi^2 m_e c nu / 3 h e^2) |mu|^2, standard photophysics texts).
pub const OSCILLATOR_PER_WAVENUMBER_DEBYE2: f64 = 8.0 * PI * PI * ELECTRON_MASS_G * LIGHT_CM_PER_S
    / (3.0 * PLANCK_ERG_S * ELEMENTARY_CHARGE_ESU * ELEMENTARY_CHARGE_ESU)
    * ESU2_CM2_PER_DEBYE2;

/// Joules per erg.
pub const JOULE_PER_ERG: f64 = 1e-7;
/// The thermochemical calorie, J (exact by definition).
pub const JOULE_PER_CALORIE: f64 = 4.184;
/// Hartree energy, J (CODATA 2018).
pub const HARTREE_JOULE: f64 = 4.359_744_722_207_1e-18;

/// Energy units of conformer energies.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EnergyUnit {
    KcalPerMol,
    KjPerMol,
    ElectronVolt,
    Hartree,
}

impl EnergyUnit {
    pub const ALL: [EnergyUnit; 4] = [EnergyUnit::KcalPerMol, EnergyUnit::KjPerMol, EnergyUnit::ElectronVolt, EnergyUnit::Hartree];

    pub fn key(self) -> &'static str {
        match self {
            EnergyUnit::KcalPerMol => "kcal/mol",
            EnergyUnit::KjPerMol => "kJ/mol",
            EnergyUnit::ElectronVolt => "eV",
            EnergyUnit::Hartree => "hartree",
        }
    }

    pub fn parse(s: &str) -> Option<EnergyUnit> {
        let c: String = s.chars().filter(|c| !c.is_whitespace()).collect::<String>().to_lowercase();
        match c.as_str() {
            "kcal/mol" | "kcalmol-1" | "kcal" => Some(EnergyUnit::KcalPerMol),
            "kj/mol" | "kjmol-1" | "kj" => Some(EnergyUnit::KjPerMol),
            "ev" => Some(EnergyUnit::ElectronVolt),
            "hartree" | "eh" | "au" | "a.u." => Some(EnergyUnit::Hartree),
            _ => None,
        }
    }

    /// One unit of this energy per molecule, erg.
    pub fn erg_per_molecule(self) -> f64 {
        match self {
            EnergyUnit::KcalPerMol => 1000.0 * JOULE_PER_CALORIE / JOULE_PER_ERG / AVOGADRO_PER_MOL,
            EnergyUnit::KjPerMol => 1000.0 / JOULE_PER_ERG / AVOGADRO_PER_MOL,
            EnergyUnit::ElectronVolt => ELECTRON_VOLT_ERG,
            EnergyUnit::Hartree => HARTREE_JOULE / JOULE_PER_ERG,
        }
    }
}

/// eV per cm^-1: h c / (1 eV), about 1.2398e-4.
pub const EV_PER_WAVENUMBER: f64 = PLANCK_ERG_S * LIGHT_CM_PER_S / ELECTRON_VOLT_ERG;

/// The spectral axis units a user may enter and view.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AxisUnit {
    Nanometre,
    Wavenumber,
    ElectronVolt,
}

impl AxisUnit {
    pub fn parse(s: &str) -> Option<AxisUnit> {
        match s {
            "nm" => Some(AxisUnit::Nanometre),
            "cm-1" | "cm^-1" | "cm1" => Some(AxisUnit::Wavenumber),
            "ev" | "eV" => Some(AxisUnit::ElectronVolt),
            _ => None,
        }
    }

    pub fn label(self) -> &'static str {
        match self {
            AxisUnit::Nanometre => "nm",
            AxisUnit::Wavenumber => "cm⁻¹",
            AxisUnit::ElectronVolt => "eV",
        }
    }

    /// Converts a position on this axis to wavenumber (cm^-1).
    pub fn to_wavenumber(self, value: f64) -> f64 {
        match self {
            AxisUnit::Nanometre => NM_PER_CM / value,
            AxisUnit::Wavenumber => value,
            AxisUnit::ElectronVolt => value / EV_PER_WAVENUMBER,
        }
    }

    /// Converts a wavenumber (cm^-1) to a position on this axis.
    pub fn from_wavenumber(self, nu: f64) -> f64 {
        match self {
            AxisUnit::Nanometre => NM_PER_CM / nu,
            AxisUnit::Wavenumber => nu,
            AxisUnit::ElectronVolt => nu * EV_PER_WAVENUMBER,
        }
    }

    /// Converts a band width (FWHM) given at a band centre `center_nu` on this
    /// axis into cm^-1. Widths in nm depend on where the band is: a width w nm
    /// centred at lambda spans 1e7/(lambda - w/2) - 1e7/(lambda + w/2).
    pub fn width_to_wavenumber(self, width: f64, center_nu: f64) -> f64 {
        match self {
            AxisUnit::Nanometre => {
                let lambda = NM_PER_CM / center_nu;
                NM_PER_CM / (lambda - width / 2.0) - NM_PER_CM / (lambda + width / 2.0)
            }
            AxisUnit::Wavenumber => width,
            AxisUnit::ElectronVolt => width / EV_PER_WAVENUMBER,
        }
    }

    /// Inverse of [`AxisUnit::width_to_wavenumber`].
    pub fn width_from_wavenumber(self, width_cm1: f64, center_nu: f64) -> f64 {
        match self {
            AxisUnit::Nanometre => {
                // Solve 1e7/(L - w/2) - 1e7/(L + w/2) = W for w (positive root).
                let lambda = NM_PER_CM / center_nu;
                let a = NM_PER_CM / width_cm1;
                // w^2/4 + a w - L^2 = 0  ->  w = 2(-a + sqrt(a^2 + L^2))
                2.0 * (-a + (a * a + lambda * lambda).sqrt())
            }
            AxisUnit::Wavenumber => width_cm1,
            AxisUnit::ElectronVolt => width_cm1 * EV_PER_WAVENUMBER,
        }
    }
}

/// What a CD or ORD unit conversion needs to know about the sample and point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SampleContext {
    pub concentration_mol_per_l: f64,
    pub path_length_cm: f64,
    pub molar_mass_g_per_mol: Option<f64>,
    pub mean_residue_weight_g_per_mol: Option<f64>,
}

impl SampleContext {
    /// Mass concentration in g/mL (needs the molar mass).
    pub fn mass_concentration_g_per_ml(&self) -> Option<f64> {
        self.molar_mass_g_per_mol.map(|m| self.concentration_mol_per_l * m / CM3_PER_LITRE)
    }
}

/// The circular dichroism units of the trade.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CdUnit {
    /// Ellipticity of the sample as instruments report it, mdeg.
    Millidegrees,
    /// De = e_L - e_R, M^-1 cm^-1.
    DeltaEpsilon,
    /// Molar ellipticity [theta], deg cm^2 dmol^-1.
    MolarEllipticity,
    /// Mean residue ellipticity, deg cm^2 dmol^-1 (per residue).
    MeanResidueEllipticity,
    /// DA = A_L - A_R, dimensionless.
    DeltaAbsorbance,
    /// Dissymmetry g = De / e.
    Dissymmetry,
}

/// Why a unit conversion cannot be done.
#[derive(Debug, Clone, PartialEq)]
pub struct UnitError(pub String);

impl std::fmt::Display for UnitError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl CdUnit {
    pub const ALL: [CdUnit; 6] = [
        CdUnit::Millidegrees,
        CdUnit::DeltaEpsilon,
        CdUnit::MolarEllipticity,
        CdUnit::MeanResidueEllipticity,
        CdUnit::DeltaAbsorbance,
        CdUnit::Dissymmetry,
    ];

    /// Short machine name used in documents, links and the CLI.
    pub fn key(self) -> &'static str {
        match self {
            CdUnit::Millidegrees => "mdeg",
            CdUnit::DeltaEpsilon => "delta_epsilon",
            CdUnit::MolarEllipticity => "molar_ellipticity",
            CdUnit::MeanResidueEllipticity => "mean_residue_ellipticity",
            CdUnit::DeltaAbsorbance => "delta_a",
            CdUnit::Dissymmetry => "g",
        }
    }

    pub fn parse(key: &str) -> Option<CdUnit> {
        CdUnit::ALL.into_iter().find(|u| u.key() == key)
    }

    /// Axis label as the trade typesets it.
    pub fn label(self) -> &'static str {
        match self {
            CdUnit::Millidegrees => "θ / mdeg",
            CdUnit::DeltaEpsilon => "Δε / M⁻¹ cm⁻¹",
            CdUnit::MolarEllipticity => "[θ] / deg cm² dmol⁻¹",
            CdUnit::MeanResidueEllipticity => "[θ]MRW / deg cm² dmol⁻¹",
            CdUnit::DeltaAbsorbance => "ΔA",
            CdUnit::Dissymmetry => "g = Δε/ε",
        }
    }

    /// CSV column name, with its unit, as `chiroptic eval` and `import` write it.
    pub fn column_name(self) -> &'static str {
        match self {
            CdUnit::Millidegrees => "ellipticity_mdeg",
            CdUnit::DeltaEpsilon => "delta_epsilon_M-1_cm-1",
            CdUnit::MolarEllipticity => "molar_ellipticity_deg_cm2_dmol-1",
            CdUnit::MeanResidueEllipticity => "mean_residue_ellipticity_deg_cm2_dmol-1",
            CdUnit::DeltaAbsorbance => "delta_absorbance",
            CdUnit::Dissymmetry => "g_factor",
        }
    }

    /// Converts De (with e at the same point, for g) into this unit.
    pub fn from_delta_epsilon(self, de: f64, epsilon: f64, s: &SampleContext) -> Result<f64, UnitError> {
        let delta_a = de * s.concentration_mol_per_l * s.path_length_cm;
        Ok(match self {
            CdUnit::Millidegrees => MDEG_PER_DEG * ELLIPTICITY_DEG_PER_DELTA_A * delta_a,
            CdUnit::DeltaEpsilon => de,
            CdUnit::MolarEllipticity => MOLAR_ELLIPTICITY_PER_DELTA_EPSILON * de,
            CdUnit::MeanResidueEllipticity => {
                let factor = mean_residue_factor(s)?;
                ELLIPTICITY_DEG_PER_DELTA_A * delta_a * factor
            }
            CdUnit::DeltaAbsorbance => delta_a,
            CdUnit::Dissymmetry => de / epsilon,
        })
    }

    /// Converts a value in this unit back to De.
    pub fn to_delta_epsilon(self, value: f64, epsilon: f64, s: &SampleContext) -> Result<f64, UnitError> {
        let cl = s.concentration_mol_per_l * s.path_length_cm;
        Ok(match self {
            CdUnit::Millidegrees => value / (MDEG_PER_DEG * ELLIPTICITY_DEG_PER_DELTA_A) / cl,
            CdUnit::DeltaEpsilon => value,
            CdUnit::MolarEllipticity => value / MOLAR_ELLIPTICITY_PER_DELTA_EPSILON,
            CdUnit::MeanResidueEllipticity => {
                let factor = mean_residue_factor(s)?;
                value / factor / ELLIPTICITY_DEG_PER_DELTA_A / cl
            }
            CdUnit::DeltaAbsorbance => value / cl,
            CdUnit::Dissymmetry => value * epsilon,
        })
    }
}

/// Mean residue ellipticity is the molar ellipticity per residue:
/// [theta]_MRW = 100 theta_deg / (l_cm c_residue_mol_per_l), with
/// c_residue = c_g_per_ml * 1000 / MRW, i.e. theta_deg MRW / (10 l_cm c_g_per_ml)
/// = [theta] MRW / M (standard CD texts). Returns the factor on theta_deg.
fn mean_residue_factor(s: &SampleContext) -> Result<f64, UnitError> {
    let mrw = s
        .mean_residue_weight_g_per_mol
        .ok_or_else(|| UnitError("mean residue ellipticity needs sample.mean_residue_weight_g_per_mol".into()))?;
    let c_g_per_ml =
        s.mass_concentration_g_per_ml().ok_or_else(|| UnitError("mean residue ellipticity needs sample.molar_mass_g_per_mol".into()))?;
    let residue_mol_per_l = c_g_per_ml * CM3_PER_LITRE / mrw;
    Ok(MOLAR_PER_OBSERVED / (s.path_length_cm * residue_mol_per_l))
}

/// The optical rotation units of the trade.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OrdUnit {
    /// Observed rotation of the sample, degrees.
    Degrees,
    /// Specific rotation [alpha], deg dm^-1 (g/mL)^-1.
    SpecificRotation,
    /// Molar rotation [Phi] = [alpha] M / 100, deg cm^2 dmol^-1.
    MolarRotation,
    /// Circular birefringence Dn = n_L - n_R.
    DeltaN,
}

impl OrdUnit {
    pub const ALL: [OrdUnit; 4] = [OrdUnit::Degrees, OrdUnit::SpecificRotation, OrdUnit::MolarRotation, OrdUnit::DeltaN];

    pub fn key(self) -> &'static str {
        match self {
            OrdUnit::Degrees => "deg",
            OrdUnit::SpecificRotation => "specific_rotation",
            OrdUnit::MolarRotation => "molar_rotation",
            OrdUnit::DeltaN => "delta_n",
        }
    }

    pub fn parse(key: &str) -> Option<OrdUnit> {
        OrdUnit::ALL.into_iter().find(|u| u.key() == key)
    }

    pub fn label(self) -> &'static str {
        match self {
            OrdUnit::Degrees => "φ / deg",
            OrdUnit::SpecificRotation => "[α] / deg dm⁻¹ (g/mL)⁻¹",
            OrdUnit::MolarRotation => "[Φ] / deg cm² dmol⁻¹",
            OrdUnit::DeltaN => "Δn = n_L − n_R",
        }
    }

    /// CSV column name, with its unit.
    pub fn column_name(self) -> &'static str {
        match self {
            OrdUnit::Degrees => "rotation_deg",
            OrdUnit::SpecificRotation => "specific_rotation_deg_dm-1_(g/mL)-1",
            OrdUnit::MolarRotation => "molar_rotation_deg_cm2_dmol-1",
            OrdUnit::DeltaN => "delta_n",
        }
    }

    /// Converts a rotation in degrees (observed, at wavenumber `nu`) into this unit.
    pub fn from_degrees(self, phi_deg: f64, nu: f64, s: &SampleContext) -> Result<f64, UnitError> {
        Ok(match self {
            OrdUnit::Degrees => phi_deg,
            OrdUnit::SpecificRotation => specific_rotation(phi_deg, s)?,
            OrdUnit::MolarRotation => molar_rotation_from_degrees(phi_deg, s),
            OrdUnit::DeltaN => delta_n_from_degrees(phi_deg, nu, s.path_length_cm),
        })
    }

    /// Converts a value in this unit back to a rotation in degrees.
    pub fn to_degrees(self, value: f64, nu: f64, s: &SampleContext) -> Result<f64, UnitError> {
        Ok(match self {
            OrdUnit::Degrees => value,
            OrdUnit::SpecificRotation => value / specific_rotation(1.0, s)?,
            OrdUnit::MolarRotation => value / molar_rotation_from_degrees(1.0, s),
            OrdUnit::DeltaN => degrees_from_delta_n(value, nu, s.path_length_cm),
        })
    }
}

/// Path length units offered for entry.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PathUnit {
    Millimetre,
    Centimetre,
    Decimetre,
}

impl PathUnit {
    pub const ALL: [PathUnit; 3] = [PathUnit::Millimetre, PathUnit::Centimetre, PathUnit::Decimetre];

    pub fn key(self) -> &'static str {
        match self {
            PathUnit::Millimetre => "mm",
            PathUnit::Centimetre => "cm",
            PathUnit::Decimetre => "dm",
        }
    }

    pub fn parse(key: &str) -> Option<PathUnit> {
        PathUnit::ALL.into_iter().find(|u| u.key() == key)
    }

    /// Centimetres per one of this unit.
    pub fn cm(self) -> f64 {
        match self {
            PathUnit::Millimetre => 1.0 / MM_PER_CM,
            PathUnit::Centimetre => 1.0,
            PathUnit::Decimetre => CM_PER_DM,
        }
    }
}

/// The absorption units of measured spectra.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AbsorptionUnit {
    /// Absorbance A = e c l (decadic).
    Absorbance,
    /// Molar absorption coefficient e, M^-1 cm^-1.
    MolarAbsorption,
}

impl AbsorptionUnit {
    pub const ALL: [AbsorptionUnit; 2] = [AbsorptionUnit::Absorbance, AbsorptionUnit::MolarAbsorption];

    pub fn key(self) -> &'static str {
        match self {
            AbsorptionUnit::Absorbance => "absorbance",
            AbsorptionUnit::MolarAbsorption => "epsilon",
        }
    }

    pub fn parse(key: &str) -> Option<AbsorptionUnit> {
        AbsorptionUnit::ALL.into_iter().find(|u| u.key() == key)
    }

    pub fn label(self) -> &'static str {
        match self {
            AbsorptionUnit::Absorbance => "A",
            AbsorptionUnit::MolarAbsorption => "ε / M⁻¹ cm⁻¹",
        }
    }

    pub fn column_name(self) -> &'static str {
        match self {
            AbsorptionUnit::Absorbance => "absorbance",
            AbsorptionUnit::MolarAbsorption => "epsilon_M-1_cm-1",
        }
    }

    /// Converts a value in this unit to e (M^-1 cm^-1).
    pub fn to_epsilon(self, value: f64, s: &SampleContext) -> f64 {
        match self {
            AbsorptionUnit::Absorbance => value / (s.concentration_mol_per_l * s.path_length_cm),
            AbsorptionUnit::MolarAbsorption => value,
        }
    }

    pub fn from_epsilon(self, epsilon: f64, s: &SampleContext) -> f64 {
        match self {
            AbsorptionUnit::Absorbance => epsilon * s.concentration_mol_per_l * s.path_length_cm,
            AbsorptionUnit::MolarAbsorption => epsilon,
        }
    }
}

impl AxisUnit {
    /// Key used in documents and the CLI.
    pub fn key(self) -> &'static str {
        match self {
            AxisUnit::Nanometre => "nm",
            AxisUnit::Wavenumber => "cm-1",
            AxisUnit::ElectronVolt => "ev",
        }
    }

    /// CSV column name of the axis.
    pub fn column_name(self) -> &'static str {
        match self {
            AxisUnit::Nanometre => "wavelength_nm",
            AxisUnit::Wavenumber => "wavenumber_cm1",
            AxisUnit::ElectronVolt => "energy_ev",
        }
    }
}

/// phi[deg] = (180/pi) * pi * l * Dn / lambda = 180 l nu Dn.
pub fn degrees_from_delta_n(delta_n: f64, nu: f64, path_length_cm: f64) -> f64 {
    DEG_PER_RAD * PI * path_length_cm * nu * delta_n
}

pub fn delta_n_from_degrees(phi_deg: f64, nu: f64, path_length_cm: f64) -> f64 {
    phi_deg / (DEG_PER_RAD * PI * path_length_cm * nu)
}

/// [alpha] = 100 phi / (l_dm c_g_per_100ml) = phi / (l_dm c_g_per_ml).
pub fn specific_rotation(phi_deg: f64, s: &SampleContext) -> Result<f64, UnitError> {
    let c = s.mass_concentration_g_per_ml().ok_or_else(|| UnitError("specific rotation needs sample.molar_mass_g_per_mol".into()))?;
    Ok(phi_deg / (s.path_length_cm / CM_PER_DM * c))
}

/// [Phi] = [alpha] M / 100 = 100 phi / (l_cm c_mol_per_l); needs no molar mass.
pub fn molar_rotation_from_degrees(phi_deg: f64, s: &SampleContext) -> f64 {
    MOLAR_PER_OBSERVED * phi_deg / (s.path_length_cm * s.concentration_mol_per_l)
}

/// Converts the 1e-40 cgs unit of rotatory strength to esu^2 cm^2.
pub fn rotatory_strength_esu2_cm2(r_1e40: f64) -> f64 {
    r_1e40 * ESU2_CM2_PER_ROTATORY_UNIT
}

/// Converts debye^2 to esu^2 cm^2.
pub fn dipole_strength_esu2_cm2(d_debye2: f64) -> f64 {
    d_debye2 * ESU2_CM2_PER_DEBYE2
}

/// Concentration units offered for entry; all convert to mol/L.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ConcentrationUnit {
    MolPerLitre,
    MillimolPerLitre,
    MgPerMl,
    GramPer100Ml,
}

impl ConcentrationUnit {
    pub const ALL: [ConcentrationUnit; 4] =
        [ConcentrationUnit::MolPerLitre, ConcentrationUnit::MillimolPerLitre, ConcentrationUnit::MgPerMl, ConcentrationUnit::GramPer100Ml];

    /// The key a page or document uses.
    pub fn key(self) -> &'static str {
        match self {
            ConcentrationUnit::MolPerLitre => "mol/L",
            ConcentrationUnit::MillimolPerLitre => "mmol/L",
            ConcentrationUnit::MgPerMl => "mg/mL",
            ConcentrationUnit::GramPer100Ml => "g/100mL",
        }
    }

    pub fn label(self) -> &'static str {
        match self {
            ConcentrationUnit::GramPer100Ml => "g/100 mL",
            other => other.key(),
        }
    }

    pub fn parse(key: &str) -> Option<ConcentrationUnit> {
        ConcentrationUnit::ALL.into_iter().find(|u| u.key() == key)
    }

    pub fn to_mol_per_l(self, value: f64, molar_mass: Option<f64>) -> Result<f64, UnitError> {
        let needs_mass = || UnitError("a mass concentration needs sample.molar_mass_g_per_mol".into());
        Ok(match self {
            ConcentrationUnit::MolPerLitre => value,
            ConcentrationUnit::MillimolPerLitre => value / 1000.0,
            ConcentrationUnit::MgPerMl => value / molar_mass.ok_or_else(needs_mass)?,
            ConcentrationUnit::GramPer100Ml => value * 10.0 / molar_mass.ok_or_else(needs_mass)?,
        })
    }

    pub fn from_mol_per_l(self, c: f64, molar_mass: Option<f64>) -> Result<f64, UnitError> {
        Ok(c / self.to_mol_per_l(1.0, molar_mass)?)
    }
}
