//! The rotational states of the hydrogen molecule: the equilibrium para fraction and
//! the ortho–para energy and Gibbs-energy differences of the ideal gas, from the
//! rotational partition functions.
//!
//! Parahydrogen (nuclear spins paired, weight 1) occupies the even rotational levels
//! J = 0, 2, 4, …; orthohydrogen (weight 3) the odd levels J = 1, 3, 5, …. With the
//! level energies E_J counted from J = 0,
//!
//! ```text
//! Z_even(T) = Σ_{J even} (2J+1) exp(−c₂E_J/T)     Z_odd(T) = Σ_{J odd} (2J+1) exp(−c₂E_J/T)
//! x_eq(T)   = Z_even / (Z_even + 3·Z_odd)                       (equilibrium para fraction)
//! ΔE(T)     = ⟨E⟩_odd − ⟨E⟩_even                    (ortho − para rotational energy, per mole)
//! μ°_o − μ°_p = −RT ln(3·Z_odd/Z_even)              (ortho − para ideal-gas Gibbs energy)
//! ```
//!
//! with c₂ = hc/k the second radiation constant (CODATA 2018, exact: 1.438776877 cm·K).
//! Level energies of the ground vibrational state of H₂, cm⁻¹, J = 0…7: the
//! spectroscopic term values tabulated by Dabrowski (Can. J. Phys. 62, 1639–1664,
//! 1984) and in Huber & Herzberg, *Constants of Diatomic Molecules* (1979); the values
//! below are from memory, and above J = 7 the Dunham form E = B₀J(J+1) − D₀[J(J+1)]²
//! with B₀ = 59.322 cm⁻¹, D₀ = 0.0471 cm⁻¹ (same sources, from memory) carries on. The
//! levels above J = 7 change nothing in the results below 1000 K by more than 1e-7.

/// The second radiation constant hc/k, cm·K (CODATA 2018, exact).
pub const SECOND_RADIATION_CONSTANT: f64 = 1.438_776_877;

/// Molar gas constant, J/(mol·K), as in the Leachman et al. (2009) equations.
pub const MOLAR_GAS_CONSTANT: f64 = 8.314_472;

/// Nuclear-spin weight of orthohydrogen (triplet).
pub const ORTHO_SPIN_WEIGHT: f64 = 3.0;

/// The para fraction of normal hydrogen: the high-temperature limit, 1/4.
pub const NORMAL_PARA_FRACTION: f64 = 0.25;

/// Rotational term values of H₂ (v = 0), J = 0…7, cm⁻¹ (Dabrowski 1984; from memory).
const TERM_VALUES: [f64; 8] = [
    0.0, 118.486, 354.373, 705.519, 1168.798, 1740.189, 2414.752, 3187.570,
];

/// The highest rotational level summed.
const TOP_LEVEL: usize = 30;

/// Rotational constant B₀ and centrifugal constant D₀ of H₂ (v = 0), cm⁻¹ (from memory).
const ROTATIONAL_CONSTANT: f64 = 59.322;
const CENTRIFUGAL_CONSTANT: f64 = 0.0471;

/// The energy of rotational level J, cm⁻¹.
pub fn level_energy(level: usize) -> f64 {
    if level < TERM_VALUES.len() {
        TERM_VALUES[level]
    } else {
        let j = level as f64;
        let n = j * (j + 1.0);
        ROTATIONAL_CONSTANT * n - CENTRIFUGAL_CONSTANT * n * n
    }
}

/// The rotational sums at T: the partition functions and the mean level energies
/// ⟨E⟩ (cm⁻¹, counted from J = 0) of each parity.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RotationalSums {
    /// Partition function over the even levels (para).
    pub even: f64,
    /// Partition function over the odd levels (ortho) with energies counted from
    /// J = 1: Z_odd = odd_from_first · exp(−c₂E₁/T).
    pub odd_from_first: f64,
    /// Mean energy of the even levels, cm⁻¹.
    pub even_energy: f64,
    /// Mean energy of the odd levels, cm⁻¹.
    pub odd_energy: f64,
}

/// The rotational sums at temperature T (K). Each parity is summed relative to its
/// own lowest level so that nothing underflows at low temperature.
pub fn rotational_sums(temperature: f64) -> RotationalSums {
    let beta = SECOND_RADIATION_CONSTANT / temperature;
    let sum = |first: usize| {
        let base = level_energy(first);
        let (mut z, mut e) = (0.0, 0.0);
        for level in (first..=TOP_LEVEL).step_by(2) {
            let energy = level_energy(level);
            let weight = (2 * level + 1) as f64 * (-(energy - base) * beta).exp();
            z += weight;
            e += weight * energy;
            // The levels fall off faster than geometrically: once a term is below
            // 1e-18 of the sum (past the peak), the rest cannot reach the last digit.
            if energy - base > 1.0 / beta && weight < 1e-18 * z {
                break;
            }
        }
        (z, e / z, base)
    };
    let (even, even_energy, _) = sum(0);
    let (odd_relative, odd_energy, _) = sum(1);
    RotationalSums {
        even,
        odd_from_first: odd_relative,
        even_energy,
        odd_energy,
    }
}

/// The equilibrium para fraction (mole fraction) at T.
pub fn equilibrium_para_fraction(temperature: f64) -> f64 {
    let beta = SECOND_RADIATION_CONSTANT / temperature;
    let sums = rotational_sums(temperature);
    let ratio =
        ORTHO_SPIN_WEIGHT * sums.odd_from_first * (-level_energy(1) * beta).exp() / sums.even;
    1.0 / (1.0 + ratio)
}

/// The derivative of the equilibrium para fraction with temperature, 1/K (central
/// difference of the analytic function, relative step 1e-5).
pub fn equilibrium_para_fraction_slope(temperature: f64) -> f64 {
    let step = 1e-5 * temperature;
    (equilibrium_para_fraction(temperature + step) - equilibrium_para_fraction(temperature - step))
        / (2.0 * step)
}

/// Converts an energy in cm⁻¹ per molecule to J/mol.
pub fn wavenumber_to_molar_energy(wavenumber: f64) -> f64 {
    wavenumber * SECOND_RADIATION_CONSTANT * MOLAR_GAS_CONSTANT
}

/// The ortho − para rotational energy difference of the ideal gas at T, J/mol.
pub fn ortho_para_energy_difference(temperature: f64) -> f64 {
    ortho_para_differences(temperature).0
}

/// The ortho − para ideal-gas Gibbs-energy difference at T, J/mol:
/// −RT ln(3·Z_odd/Z_even).
pub fn ortho_para_gibbs_difference(temperature: f64) -> f64 {
    ortho_para_differences(temperature).1
}

/// [`ortho_para_energy_difference`] and [`ortho_para_gibbs_difference`] at T from
/// one evaluation of the rotational sums, J/mol.
pub fn ortho_para_differences(temperature: f64) -> (f64, f64) {
    let beta = SECOND_RADIATION_CONSTANT / temperature;
    let sums = rotational_sums(temperature);
    // ln Z_odd = ln(Z_odd relative to J = 1) − c₂E₁/T, kept apart for low T.
    let log_odd = sums.odd_from_first.ln() - level_energy(1) * beta;
    (
        wavenumber_to_molar_energy(sums.odd_energy - sums.even_energy),
        -MOLAR_GAS_CONSTANT * temperature * (ORTHO_SPIN_WEIGHT.ln() + log_odd - sums.even.ln()),
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_low_temperature_limits_follow_from_the_first_level() {
        // At 5 K only J = 0 and J = 1 are occupied: ΔE → E₁, Δμ → E₁ − RT ln 9.
        let e1 = wavenumber_to_molar_energy(level_energy(1));
        assert!((ortho_para_energy_difference(5.0) - e1).abs() < 1e-6 * e1);
        let expected = e1 - MOLAR_GAS_CONSTANT * 5.0 * 9.0_f64.ln();
        assert!((ortho_para_gibbs_difference(5.0) - expected).abs() < 1e-6 * e1);
        assert!(equilibrium_para_fraction(5.0) > 0.999_999);
    }

    #[test]
    fn the_high_temperature_limit_is_normal_hydrogen() {
        // Hand check: at 1000 K the ratio Z_odd/Z_even is within 1e-4 of 1.
        assert!((equilibrium_para_fraction(1000.0) - 0.25).abs() < 1e-4);
    }

    #[test]
    fn the_slope_is_negative_and_matches_a_wide_difference() {
        for t in [20.0, 50.0, 77.0, 150.0] {
            let slope = equilibrium_para_fraction_slope(t);
            let wide =
                (equilibrium_para_fraction(t + 0.01) - equilibrium_para_fraction(t - 0.01)) / 0.02;
            assert!(slope < 0.0);
            assert!(
                (slope - wide).abs() < 1e-5 * wide.abs(),
                "{t}: {slope} {wide}"
            );
        }
    }
}
