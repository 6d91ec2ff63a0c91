//! Spectra as CSV: one row per grid point, header names that carry units.

use crate::spectra::Spectra;
use crate::units::{AbsorptionUnit, AxisUnit, CdUnit, OrdUnit};
use std::fmt::Write;

/// Formats a number so that it reads back to the same f64, in plain notation
/// for everyday magnitudes and in exponent notation otherwise; a missing
/// value (NaN, e.g. g where there is no absorption) is an empty cell.
pub fn number(x: f64) -> String {
    if x == 0.0 || (1e-4..1e15).contains(&x.abs()) {
        format!("{x}")
    } else if x.is_finite() {
        format!("{x:e}")
    } else if x.is_nan() {
        String::new()
    } else {
        "NaN".to_string()
    }
}

/// The CSV table of every output column.
pub fn spectra_csv(s: &Spectra) -> String {
    let specific = s.specific_rotation();
    let molar = s.molar_rotation();
    // Every CD unit the page shows, so each can be checked from the command line.
    let molar_ellipticity = s.cd_in(CdUnit::MolarEllipticity).unwrap_or_default();
    let mean_residue = s.cd_in(CdUnit::MeanResidueEllipticity).ok();
    let mut header = vec![
        AxisUnit::Nanometre.column_name(),
        AxisUnit::Wavenumber.column_name(),
        "n_L",
        "n_R",
        "k_L",
        "k_R",
        OrdUnit::DeltaN.column_name(),
        "delta_k",
        OrdUnit::Degrees.column_name(),
    ];
    if specific.is_some() {
        header.push(OrdUnit::SpecificRotation.column_name());
    }
    header.extend([
        OrdUnit::MolarRotation.column_name(),
        CdUnit::Millidegrees.column_name(),
        CdUnit::DeltaEpsilon.column_name(),
        CdUnit::MolarEllipticity.column_name(),
    ]);
    if mean_residue.is_some() {
        header.push(CdUnit::MeanResidueEllipticity.column_name());
    }
    header.extend([AbsorptionUnit::MolarAbsorption.column_name(), CdUnit::Dissymmetry.column_name()]);
    let mut out = header.join(",");
    out.push('\n');
    for i in 0..s.len() {
        let nu = s.wavenumber_cm1[i];
        let mut row = vec![
            AxisUnit::Nanometre.from_wavenumber(nu),
            nu,
            s.n_left[i],
            s.n_right[i],
            s.k_left[i],
            s.k_right[i],
            s.delta_n[i],
            s.delta_k[i],
            s.rotation_deg[i],
        ];
        if let Some(sp) = &specific {
            row.push(sp[i]);
        }
        row.extend([molar[i], s.ellipticity_mdeg[i], s.delta_epsilon[i], molar_ellipticity[i]]);
        if let Some(mre) = &mean_residue {
            row.push(mre[i]);
        }
        row.extend([s.epsilon[i], s.g_factor[i]]);
        let cells: Vec<String> = row.into_iter().map(number).collect();
        // Writing to a String cannot fail.
        let _ = writeln!(out, "{}", cells.join(","));
    }
    out
}
