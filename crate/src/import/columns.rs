//! What a column holds, from its header as the trade writes it:
//! "Wavelength [nm]", "wavelength (nm)", "λ/nm", "Wavenumber (cm-1)", "eV",
//! "CD [mdeg]", "Ellipticity (mdeg)", "θ", "Δε", "delta epsilon (M-1 cm-1)",
//! "[θ]", "MRE", "rotation (deg)", "[α]", "Absorbance", "ε", "HT [V]",
//! "sd_mdeg", "sigma" ... (common practice of instrument exports).

use super::Measured;
use crate::units::{AbsorptionUnit, AxisUnit, CdUnit, OrdUnit};

/// What a recognised column holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnKind {
    Axis(AxisUnit),
    Measured(Measured),
    /// A standard deviation or uncertainty of the measurement, in its unit.
    Uncertainty,
    /// Detector (photomultiplier) high voltage, V.
    DetectorVolts,
}

/// A header split into its name and the unit it gives in brackets or after
/// a slash, both lower-cased with spacing normalised.
fn name_and_unit(header: &str) -> (String, String) {
    let h = header.trim().to_lowercase();
    let h = h.replace(['_', '\u{2009}', '\u{a0}'], " ");
    for (open, close) in [('[', ']'), ('(', ')'), ('{', '}')] {
        // "[θ]" and "[α]" are names, not units: only a bracket after a name is a unit.
        if let Some(start) = h.rfind(open) {
            if start > 0 {
                if let Some(len) = h[start..].find(close) {
                    let unit = h[start + open.len_utf8()..start + len].trim().to_string();
                    let name = h[..start].trim().to_string();
                    return (name, unit);
                }
            }
        }
    }
    if let Some((name, unit)) = h.split_once('/') {
        if !name.trim().is_empty() && !unit.trim().is_empty() && !name.contains("1") {
            return (name.trim().to_string(), unit.trim().to_string());
        }
    }
    (h.trim().to_string(), String::new())
}

fn compact(s: &str) -> String {
    s.chars().filter(|c| !c.is_whitespace() && *c != '^' && *c != '·' && *c != '*' && *c != '.').collect()
}

fn axis_from_unit(unit: &str) -> Option<AxisUnit> {
    match compact(unit).as_str() {
        "nm" | "nanometers" | "nanometres" | "nanometer" | "nanometre" => Some(AxisUnit::Nanometre),
        "cm-1" | "cm⁻¹" | "1/cm" | "wavenumbers" | "cm1" => Some(AxisUnit::Wavenumber),
        "ev" | "electronvolts" => Some(AxisUnit::ElectronVolt),
        _ => None,
    }
}

/// The column names chiroptic itself writes (`eval`, `import`, exports).
fn own_column(header: &str) -> Option<ColumnKind> {
    let h = header.trim();
    let axes = [AxisUnit::Nanometre, AxisUnit::Wavenumber, AxisUnit::ElectronVolt];
    if let Some(a) = axes.into_iter().find(|a| a.column_name() == h) {
        return Some(ColumnKind::Axis(a));
    }
    let cd = CdUnit::ALL.into_iter().filter(|u| *u != CdUnit::Dissymmetry).map(Measured::Cd);
    let ord = OrdUnit::ALL.into_iter().filter(|u| *u != OrdUnit::DeltaN).map(Measured::Ord);
    let abs = AbsorptionUnit::ALL.into_iter().map(Measured::Absorption);
    if let Some(m) = cd.chain(ord).chain(abs).find(|m| m.column_name() == h) {
        return Some(ColumnKind::Measured(m));
    }
    match h {
        "ht_v" => Some(ColumnKind::DetectorVolts),
        _ if h.starts_with("sd_") => Some(ColumnKind::Uncertainty),
        _ => None,
    }
}

/// Recognises a column from its header; `None` when it cannot tell.
pub fn recognise(header: &str) -> Option<ColumnKind> {
    if let Some(kind) = own_column(header) {
        return Some(kind);
    }
    let (name, unit) = name_and_unit(header);
    let n = compact(&name);
    let u = compact(&unit);
    // The axis, by name (its unit, when given, must be one we know) or by a
    // bare unit ("nm", "eV").
    let axis_named = |default: AxisUnit| -> Option<ColumnKind> {
        if u.is_empty() {
            Some(ColumnKind::Axis(default))
        } else {
            axis_from_unit(&unit).map(ColumnKind::Axis)
        }
    };
    if n.starts_with("wavelength") || ["λ", "lambda", "wl"].contains(&n.as_str()) {
        return axis_named(AxisUnit::Nanometre);
    }
    if n.starts_with("wavenumber") || n == "ν̃" {
        return axis_named(AxisUnit::Wavenumber);
    }
    if n == "energy" || n == "photonenergy" {
        return axis_named(AxisUnit::ElectronVolt);
    }
    if let Some(a) = axis_from_unit(&name) {
        return Some(ColumnKind::Axis(a));
    }
    if (n.is_empty() || n == "x") && !u.is_empty() {
        return axis_from_unit(&unit).map(ColumnKind::Axis);
    }
    // Uncertainties: "sd", "sd_mdeg", "sigma", "std", "uncertainty", "error".
    let first_word = name.split_whitespace().next().unwrap_or("");
    if ["sd", "sigma", "σ", "std", "stdev", "stddev", "uncertainty", "error", "err"].contains(&first_word) {
        return Some(ColumnKind::Uncertainty);
    }
    if ["ht", "hv", "ht voltage", "high voltage", "dynode", "dynode voltage", "pmt", "pmt voltage", "voltage"].contains(&name.as_str())
        || (u == "v" && (n.starts_with("ht") || n.starts_with("hv") || n.contains("voltage")))
    {
        return Some(ColumnKind::DetectorVolts);
    }
    measured(&n, &u).map(ColumnKind::Measured)
}

fn measured(n: &str, u: &str) -> Option<Measured> {
    let cd_unit = |default: CdUnit| -> Option<CdUnit> {
        Some(match u {
            "" => default,
            "mdeg" | "millidegrees" | "millidegree" => CdUnit::Millidegrees,
            "m-1cm-1" | "lmol-1cm-1" | "l/(molcm)" | "m⁻¹cm⁻¹" | "1/(mcm)" => CdUnit::DeltaEpsilon,
            "degcm2dmol-1" | "degcm2/dmol" | "degcm²dmol⁻¹" => {
                if default == CdUnit::MeanResidueEllipticity {
                    default
                } else {
                    CdUnit::MolarEllipticity
                }
            }
            _ => return None,
        })
    };
    match n {
        "cd" | "ellipticity" | "θ" | "theta" | "circulardichroism" => cd_unit(CdUnit::Millidegrees).map(Measured::Cd),
        "Δε" | "δε" | "deltaepsilon" | "de" | "deltaε" | "εl-εr" => cd_unit(CdUnit::DeltaEpsilon).map(Measured::Cd),
        "[θ]" | "[theta]" | "molarellipticity" => cd_unit(CdUnit::MolarEllipticity).map(Measured::Cd),
        "mre" | "meanresidueellipticity" | "[θ]mrw" | "[θ]mr" => cd_unit(CdUnit::MeanResidueEllipticity).map(Measured::Cd),
        "Δa" | "δa" | "deltaa" | "da" | "al-ar" => (u.is_empty()).then_some(Measured::Cd(CdUnit::DeltaAbsorbance)),
        "rotation" | "opticalrotation" | "α" | "alpha" | "ord" | "φ" | "phi" => {
            matches!(u, "" | "deg" | "degrees" | "°").then_some(Measured::Ord(OrdUnit::Degrees))
        }
        "[α]" | "[alpha]" | "specificrotation" => Some(Measured::Ord(OrdUnit::SpecificRotation)),
        "[φ]" | "[phi]" | "[Φ]" | "molarrotation" => Some(Measured::Ord(OrdUnit::MolarRotation)),
        "absorbance" | "abs" | "a" | "od" | "opticaldensity" => u.is_empty().then_some(Measured::Absorption(AbsorptionUnit::Absorbance)),
        "ε" | "epsilon" | "molarabsorptivity" | "molarabsorptioncoefficient" | "extinctioncoefficient" => {
            Some(Measured::Absorption(AbsorptionUnit::MolarAbsorption))
        }
        _ => None,
    }
}

/// The axis a JCAMP-DX XUNITS value names.
pub fn jcamp_axis(x_units: &str) -> Option<AxisUnit> {
    axis_from_unit(&x_units.to_lowercase())
}

/// The quantity a JCAMP-DX YUNITS value names (ABSORBANCE, MILLIDEGREES,
/// MDEG, DEGREES, DELTA EPSILON ...); others are kept by name, unconverted.
pub fn jcamp_kind(y_units: &str) -> Option<ColumnKind> {
    match compact(&y_units.to_lowercase()).as_str() {
        "absorbance" | "a" => Some(ColumnKind::Measured(Measured::Absorption(AbsorptionUnit::Absorbance))),
        "millidegrees" | "mdeg" | "ellipticity" => Some(ColumnKind::Measured(Measured::Cd(CdUnit::Millidegrees))),
        "degrees" | "deg" => Some(ColumnKind::Measured(Measured::Ord(OrdUnit::Degrees))),
        "deltaepsilon" | "Δε" => Some(ColumnKind::Measured(Measured::Cd(CdUnit::DeltaEpsilon))),
        "molarabsorptivity" | "epsilon" => Some(ColumnKind::Measured(Measured::Absorption(AbsorptionUnit::MolarAbsorption))),
        _ => None,
    }
}
