//! What residual ortho–para conversion does to stored liquid hydrogen.
//!
//! In the liquid, ortho converts to para by itself at a rate second order in the
//! ortho fraction, dx_o/dt = −k·x_o², so x_o(t) = x_o(0)/(1 + k·x_o(0)·t), with
//! k = 0.0114 h⁻¹ (the value quoted in Barron, *Cryogenic Systems*, 2nd ed. 1985,
//! for the uncatalysed liquid at its normal boiling point; from memory). Each
//! kilogram converted releases the ortho–para conversion enthalpy Δh_c of the liquid
//! (about 703 kJ/kg), which boils liquid of latent heat h_fg in a tank without other
//! heat in-leak; the boiling liquid and its vapour share one composition, so
//! dm/m = −(Δh_c/h_fg)·dx_p and the fraction left after time t is
//! exp(−(Δh_c/h_fg)·(x_p(t) − x_p(0))). Heat in-leak through the tank wall comes on
//! top and is not counted here. For normal liquid hydrogen this gives about 18 % lost
//! in the first day, the figure usually quoted (Barron; from memory).

use serde::Serialize;

/// Rate constant of the self-conversion of liquid hydrogen, 1/h (Barron 1985; from
/// memory).
pub const SELF_CONVERSION_RATE_PER_HOUR: f64 = 0.0114;

/// Storage times reported, h: one day and one week.
pub const STORAGE_HOURS: [f64; 2] = [24.0, 168.0];

/// A liquid hydrogen product's outlook in storage.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct StorageOutlook {
    /// The product's para fraction.
    pub para_fraction: f64,
    /// The equilibrium para fraction at the product's temperature.
    pub equilibrium_para_fraction: f64,
    /// Ortho–para conversion enthalpy of the liquid, J/kg converted.
    #[serde(rename = "conversion_enthalpy_J_kg")]
    pub conversion_enthalpy: f64,
    /// Latent heat of the product at its pressure, J/kg.
    #[serde(rename = "latent_heat_J_kg")]
    pub latent_heat: f64,
    /// The para fraction after one day and after one week.
    pub para_fraction_after: [f64; 2],
    /// Fraction of the liquid boiled off by conversion after one day and one week.
    pub boiled_off_after: [f64; 2],
}

impl StorageOutlook {
    /// The outlook of liquid with para fraction `para_fraction`, conversion
    /// enthalpy and latent heat per kg, at a temperature where equilibrium is
    /// `equilibrium`.
    pub fn of(
        para_fraction: f64,
        equilibrium: f64,
        conversion_enthalpy: f64,
        latent_heat: f64,
    ) -> StorageOutlook {
        let ortho = 1.0 - para_fraction;
        let after = STORAGE_HOURS.map(|hours| {
            // Conversion stops at equilibrium; below it, nothing converts.
            let excess = (ortho - (1.0 - equilibrium)).max(0.0);
            let remaining_excess = excess / (1.0 + SELF_CONVERSION_RATE_PER_HOUR * excess * hours);
            1.0 - (1.0 - equilibrium) - remaining_excess
        });
        let boiled = after.map(|x| {
            let converted = (x - para_fraction).max(0.0);
            1.0 - (-(conversion_enthalpy / latent_heat) * converted).exp()
        });
        StorageOutlook {
            para_fraction,
            equilibrium_para_fraction: equilibrium,
            conversion_enthalpy,
            latent_heat,
            para_fraction_after: after,
            boiled_off_after: boiled,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Normal liquid hydrogen loses about 18 % in the first day (the figure usually
    /// quoted; Barron 1985, from memory): with Δh_c = 703 kJ/kg and h_fg = 446 kJ/kg.
    #[test]
    fn normal_liquid_loses_about_eighteen_percent_in_a_day() {
        let outlook = StorageOutlook::of(0.25, 0.998, 703e3, 446e3);
        assert!(
            (outlook.boiled_off_after[0] - 0.18).abs() < 0.01,
            "{outlook:?}"
        );
        // By hand: x_o = 0.748/(1 + 0.0114·0.748·24) = 0.6186 left above equilibrium.
        let hand = 1.0 - 0.002 - 0.748 / (1.0 + 0.0114 * 0.748 * 24.0);
        assert!((outlook.para_fraction_after[0] - hand).abs() < 1e-12);
        assert!(outlook.boiled_off_after[1] > outlook.boiled_off_after[0]);
    }

    #[test]
    fn liquid_in_equilibrium_loses_nothing() {
        let outlook = StorageOutlook::of(0.998, 0.998, 703e3, 446e3);
        assert_eq!(outlook.boiled_off_after, [0.0, 0.0]);
    }
}
