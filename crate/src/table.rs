//! Spectra as CSV: one row per grid point, header names that carry units.

use crate::spectra::Spectra;
use crate::units::{AxisUnit, CdUnit};
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
        "wavelength_nm",
        "wavenumber_cm1",
        "n_L",
        "n_R",
        "k_L",
        "k_R",
        "delta_n",
        "delta_k",
        "rotation_deg",
    ];
    if specific.is_some() {
        header.push("specific_rotation_deg_dm-1_(g/mL)-1");
    }
    header.extend(["molar_rotation_deg_cm2_dmol-1", "ellipticity_mdeg", "delta_epsilon_M-1_cm-1", "molar_ellipticity_deg_cm2_dmol-1"]);
    if mean_residue.is_some() {
        header.push("mean_residue_ellipticity_deg_cm2_dmol-1");
    }
    header.extend(["epsilon_M-1_cm-1", "g_factor"]);
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
