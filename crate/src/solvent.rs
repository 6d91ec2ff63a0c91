//! The solvent's refractive index n_solvent(nu): a constant, a Cauchy series
//! or a Sellmeier series (wavelength in micrometres, as both are tabulated).

use crate::units::UM_PER_CM;

/// Sellmeier coefficients for water at 20 C (Daimon and Masumura, Applied
/// Optics 46, 3811 (2007); quoted from memory in the design notes).
/// Fitted over 182-1129 nm; it gives the absolute index (vacuum reference),
/// about 2.7e-4 above handbook values, which are relative to air.
pub const WATER_20C_B: [f64; 4] = [5.684027565e-1, 1.726177391e-1, 2.086189578e-2, 1.130748688e-1];
pub const WATER_20C_C_UM2: [f64; 4] = [5.101829712e-3, 1.821153936e-2, 2.620722293e-2, 1.069792721e1];

/// The wavelengths over which the water preset was fitted (same source).
pub const WATER_20C_RANGE: ValidRange = ValidRange { solvent: "water-20c", from_nm: 182.0, to_nm: 1129.0 };

/// Names of the presets a document may use.
pub const PRESETS: [&str; 1] = ["water-20c"];

/// Where a tabulated series is valid; outside it the series is refused, not
/// extrapolated (the water fit has a pole at 161.9 nm).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ValidRange {
    pub solvent: &'static str,
    pub from_nm: f64,
    pub to_nm: f64,
}

impl ValidRange {
    pub fn contains_nm(&self, nm: f64) -> bool {
        (self.from_nm..=self.to_nm).contains(&nm)
    }
}

#[derive(Debug, Clone, PartialEq)]
pub enum Solvent {
    Constant(f64),
    /// n = a + b / lambda^2 + c / lambda^4, lambda in um.
    Cauchy {
        a: f64,
        b_um2: f64,
        c_um4: f64,
    },
    /// n^2 - 1 = sum B_i lambda^2 / (lambda^2 - C_i), lambda in um; a preset
    /// carries the range it was fitted over.
    Sellmeier {
        b: Vec<f64>,
        c_um2: Vec<f64>,
        range: Option<ValidRange>,
    },
}

impl Solvent {
    pub fn preset(name: &str) -> Option<Solvent> {
        match name {
            "water-20c" => {
                Some(Solvent::Sellmeier { b: WATER_20C_B.to_vec(), c_um2: WATER_20C_C_UM2.to_vec(), range: Some(WATER_20C_RANGE) })
            }
            _ => None,
        }
    }

    /// The wavelength range the series is valid over, when it has one.
    pub fn valid_range(&self) -> Option<ValidRange> {
        match self {
            Solvent::Sellmeier { range, .. } => *range,
            _ => None,
        }
    }

    /// Refractive index at wavenumber nu (cm^-1). NaN where a Sellmeier
    /// series has no real index (beyond one of its poles).
    pub fn index(&self, nu: f64) -> f64 {
        match self {
            Solvent::Constant(n) => *n,
            Solvent::Cauchy { a, b_um2, c_um4 } => {
                let inv_l2 = (nu / UM_PER_CM).powi(2);
                a + b_um2 * inv_l2 + c_um4 * inv_l2 * inv_l2
            }
            Solvent::Sellmeier { b, c_um2, .. } => {
                let l2 = (UM_PER_CM / nu).powi(2);
                let n2 = 1.0 + b.iter().zip(c_um2).map(|(bi, ci)| bi * l2 / (l2 - ci)).sum::<f64>();
                n2.sqrt()
            }
        }
    }
}
