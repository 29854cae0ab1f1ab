//! Density from temperature and pressure on a chosen branch (liquid, vapour or
//! supercritical), by a safeguarded Halley iteration (Newton's with the curvature).

use super::fluid::Fluid;
use super::helmholtz::TauFactors;
use super::saturation::UNMEASURED_SEED_FRACTION;
use crate::error::{Error, Result};

/// Which root of p(T, ρ) = p is wanted.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Branch {
    /// The dense root, above the saturated-liquid density.
    Liquid,
    /// The dilute root, below the saturated-vapour density.
    Vapour,
    /// Above the critical temperature, where the root is unique.
    Supercritical,
}

/// Iteration cap of the density solver.
pub const DENSITY_ITERATION_CAP: usize = 100;

impl Fluid {
    /// The density (kg/m³) at which p(T, ρ) = `pressure`, searched between `low` and
    /// `high` from `guess`, by Halley's method on p(ρ) at fixed T. p must increase
    /// with ρ over the bracket for the root to be unique; steps that leave the
    /// bracket, or meet a falling slope, are replaced by bisection (or by doubling
    /// while the upper end is open).
    #[allow(clippy::too_many_arguments)]
    pub fn solve_density(
        &self,
        factors: &TauFactors,
        temperature: f64,
        pressure: f64,
        guess: f64,
        low: f64,
        high: f64,
    ) -> Result<f64> {
        let (mut low, mut high) = (low, high);
        let mut x = guess;
        if !(x > low && x < high) {
            x = if high.is_finite() {
                0.5 * (low + high)
            } else {
                // Just inside an open bracket: a saturated density as the lower end
                // is itself the best seed for the compressed liquid.
                low.max(1e-12) * (1.0 + 1e-6)
            };
        }
        let scale = pressure.max(1e-300);
        let mut last_residual = f64::INFINITY;
        for _ in 0..DENSITY_ITERATION_CAP {
            let (p, slope, curvature) = self.pressure_slope_curvature(factors, temperature, x);
            let f = p - pressure;
            last_residual = f.abs() / scale;
            // Pressure is computed as ρRT(1 + δ∂αʳ/∂δ): rounding limits its accuracy to
            // a few ulps of ρRT, which for a liquid can be far above p itself.
            let noise = 1e-14 * x * self.gas_constant * temperature;
            if f.abs() <= 1e-13 * pressure + noise {
                return Ok(x);
            }
            if f < 0.0 {
                low = low.max(x);
            } else {
                high = high.min(x);
            }
            // Halley's step, f/f′ divided by 1 − f f″/(2f′²), taken as
            // f f′/(f′² − f f″/2) with one division: third-order convergence for one
            // more sum in the evaluation (a quarter fewer evaluations over the
            // benchmark's states). Where the divisor strays far from 1 (an
            // inflection, a slope near zero) the plain Newton step is taken. A step
            // may change the density by at most half; far beyond the physical
            // densities some equations turn to negative pressures.
            let square = slope * slope;
            let denominator = square - 0.5 * f * curvature;
            let step = if denominator > 0.5 * square && denominator < 2.0 * square {
                f * slope / denominator
            } else {
                f / slope
            };
            let mut next = (x - step).clamp(0.5 * x, 1.5 * x);
            if !(slope > 0.0 && next > low && next < high) {
                next = if high.is_finite() {
                    0.5 * (low + high)
                } else {
                    1.5 * x
                };
            }
            if next > self.density_ceiling {
                break;
            }
            if (next - x).abs() <= 1e-15 * x {
                let (p, _) = self.pressure_and_slope(factors, temperature, next);
                if (p - pressure).abs() <= 1e-9 * pressure + 1e3 * noise {
                    return Ok(next);
                }
                break;
            }
            x = next;
        }
        Err(Error::NoConvergence {
            solver: "density from temperature and pressure",
            iterations: DENSITY_ITERATION_CAP,
            residual: last_residual,
            context: format!(
                " for {} at T = {temperature} K, p = {pressure} Pa",
                self.name
            ),
        })
    }

    /// The ideal-gas density p/(RT), kg/m³.
    pub fn ideal_gas_density(&self, temperature: f64, pressure: f64) -> f64 {
        pressure / (self.gas_constant * temperature)
    }

    /// The saturated-liquid density from the ancillary equation, kg/m³.
    pub fn ancillary_liquid_density(&self, temperature: f64) -> f64 {
        self.ancillaries.liquid_density.value(temperature) * self.molar_mass
    }

    /// The saturated-vapour density from the ancillary equation, kg/m³.
    pub fn ancillary_vapour_density(&self, temperature: f64) -> f64 {
        self.ancillaries.vapour_density.value(temperature) * self.molar_mass
    }

    /// Approximate saturated densities (liquid, vapour) at T, kg/m³: from the
    /// saturation table where it covers T closely, else from the ancillary equations.
    /// Below [`UNMEASURED_SEED_FRACTION`] of the table's top its cells are close
    /// without measuring them (the same densities, without an exact saturation
    /// solved for each cell a run touches).
    pub fn approximate_saturated_densities(&self, temperature: f64) -> (f64, f64) {
        let line = match self.saturation_table.temperature_range() {
            Some((_, top)) if temperature <= UNMEASURED_SEED_FRACTION * top => {
                self.saturation_table.at_temperature_unmeasured(temperature)
            }
            _ => self.saturation_table.at_temperature(temperature),
        };
        match line {
            Some(line)
                if line.error.density < super::saturation::SEED_DENSITY_ERROR
                    && line.liquid_density > line.vapour_density =>
            {
                (line.liquid_density, line.vapour_density)
            }
            _ => (
                self.ancillary_liquid_density(temperature),
                self.ancillary_vapour_density(temperature),
            ),
        }
    }

    /// Saturated densities (liquid, vapour) at T that bound the liquid and vapour
    /// branches: the table's where it is sharp; next to the critical point, where the
    /// table's cell and the ancillary equations can miss by percents, the exact
    /// saturation; the ancillaries only where neither serves (air, or T outside the
    /// saturation range).
    fn branch_bounds(&self, temperature: f64) -> (f64, f64) {
        if let Some(line) = self.saturation_table.at_temperature(temperature) {
            if line.error.density < super::saturation::SEED_DENSITY_ERROR
                && line.liquid_density > line.vapour_density
            {
                return (line.liquid_density, line.vapour_density);
            }
            if let Ok(exact) = self.saturation_at_temperature(temperature) {
                return (exact.liquid.density, exact.vapour.density);
            }
        }
        (
            self.ancillary_liquid_density(temperature),
            self.ancillary_vapour_density(temperature),
        )
    }

    /// Density at (T, p) on a branch, seeded from `guess` or from the saturated
    /// densities at T.
    /// `saturated` gives the exact saturated densities (liquid, vapour) at T when the
    /// caller has them; they bound the liquid and vapour branches.
    pub fn density_on_branch(
        &self,
        factors: &TauFactors,
        temperature: f64,
        pressure: f64,
        branch: Branch,
        guess: Option<f64>,
        saturated: Option<(f64, f64)>,
    ) -> Result<f64> {
        match branch {
            Branch::Vapour => {
                let upper = match saturated {
                    Some((_, vapour)) => vapour,
                    None => self.branch_bounds(temperature).1 * 1.02,
                };
                let seed = guess.unwrap_or_else(|| {
                    self.ideal_gas_density(temperature, pressure)
                        .min(0.9 * upper)
                });
                self.solve_density(factors, temperature, pressure, seed, 0.0, upper)
            }
            Branch::Liquid => {
                let (lower, seed) = match saturated {
                    Some((liquid, _)) => (liquid, guess.unwrap_or(liquid)),
                    None => {
                        let liquid = self.branch_bounds(temperature).0;
                        (
                            0.8 * liquid.max(self.critical.density),
                            guess.unwrap_or(liquid),
                        )
                    }
                };
                self.solve_density(factors, temperature, pressure, seed, lower, f64::INFINITY)
            }
            Branch::Supercritical => {
                // The ideal-gas density overshoots wildly at high pressure; no fluid
                // state is denser than a fifth of the ceiling by much.
                let seed = guess.unwrap_or_else(|| {
                    self.ideal_gas_density(temperature, pressure)
                        .min(0.2 * self.density_ceiling)
                });
                self.solve_density(factors, temperature, pressure, seed, 0.0, f64::INFINITY)
            }
        }
    }
}
