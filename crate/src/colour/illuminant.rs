//! The light sources: relative spectral power on the table wavelengths.

use super::tables::{COUNT, D65, LED_B3};
use super::wavelength_nm;
use crate::units::{BOLTZMANN_ERG_PER_K, LIGHT_CM_PER_S, NM_PER_CM, PLANCK_ERG_S};

/// Colour temperature of CIE standard illuminant A, K (CIE 15: a Planckian
/// radiator of about 2856 K; the CIE formula uses 2848 K with the old c2 =
/// 1.435e-2 m K, which is the same spectrum).
pub const ILLUMINANT_A_KELVIN: f64 = 2856.0;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Illuminant {
    /// CIE standard illuminant D65 (average daylight), table.
    D65,
    /// CIE standard illuminant A (incandescent), Planck's law.
    A,
    /// CIE LED-B3, a phosphor-converted white LED, table.
    Led,
    /// Equal energy.
    E,
}

impl Illuminant {
    pub const ALL: [Illuminant; 4] = [Illuminant::D65, Illuminant::A, Illuminant::Led, Illuminant::E];

    pub fn key(self) -> &'static str {
        match self {
            Illuminant::D65 => "d65",
            Illuminant::A => "a",
            Illuminant::Led => "led",
            Illuminant::E => "e",
        }
    }

    pub fn parse(key: &str) -> Option<Illuminant> {
        Illuminant::ALL.into_iter().find(|i| i.key().eq_ignore_ascii_case(key))
    }

    pub fn label(self) -> &'static str {
        match self {
            Illuminant::D65 => "daylight (CIE D65)",
            Illuminant::A => "incandescent lamp, 2856 K (CIE A)",
            Illuminant::Led => "white LED, 4103 K (CIE LED-B3)",
            Illuminant::E => "equal energy (CIE E)",
        }
    }

    /// Relative spectral power at the table wavelengths (scale arbitrary:
    /// colours are normalised to the illuminant's own white).
    pub fn spectrum(self) -> [f64; COUNT] {
        match self {
            Illuminant::D65 => D65,
            Illuminant::Led => LED_B3,
            Illuminant::E => [1.0; COUNT],
            Illuminant::A => std::array::from_fn(|i| planck_relative(wavelength_nm(i), ILLUMINANT_A_KELVIN)),
        }
    }
}

/// Planck's law up to a constant factor: lambda^-5 / (exp(c2 / (lambda T)) - 1),
/// with the second radiation constant c2 = h c / k (cm K) and lambda in cm.
pub fn planck_relative(lambda_nm: f64, kelvin: f64) -> f64 {
    let c2_cm_k = PLANCK_ERG_S * LIGHT_CM_PER_S / BOLTZMANN_ERG_PER_K;
    let lambda_cm = lambda_nm / NM_PER_CM;
    // Scaled to 560 nm (as CIE 15 scales A) so that the values are of order one.
    (lambda_nm / 560.0).powi(-5) / (c2_cm_k / (lambda_cm * kelvin)).exp_m1()
}
