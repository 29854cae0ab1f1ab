//! Vapour–liquid saturation: from temperature by equal pressure and Gibbs energy
//! (Newton in the two densities, after Akasaka 2008), and from pressure by Newton on
//! temperature with the Clausius–Clapeyron slope. A pseudo-pure fluid (air) has no
//! single saturation line; its bubble and dew lines come from the published
//! ancillary equations, with densities from the equation of state.

use super::density::Branch;
use super::fluid::{Fluid, Point, Properties};
use super::state::SaturatedPair;
use crate::error::{Error, Result};

/// The two saturated states in equilibrium (for a pseudo-pure fluid, the bubble and
/// dew states at the same temperature or pressure).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Saturation {
    /// Saturated liquid (bubble point).
    pub liquid: Point,
    /// Saturated vapour (dew point).
    pub vapour: Point,
}

/// Iteration cap of the saturation solvers.
pub const SATURATION_ITERATION_CAP: usize = 60;

/// The largest measured relative error of the saturation table's densities for which
/// they seed the exact solvers; beyond it (next to the critical point) the ancillary
/// equations do.
pub(crate) const SEED_DENSITY_ERROR: f64 = 1e-3;

/// Below this fraction of the top of the saturation table's range, the seeds take
/// the table's densities without measuring the cell's error: every such cell of
/// every built-in fluid is within 2e-7 (measured at each cell's midpoint, where the
/// Hermite error peaks), four thousand times inside [`SEED_DENSITY_ERROR`];
/// tests/saturation_table.rs holds every one of them below 1e-5.
pub const UNMEASURED_SEED_FRACTION: f64 = 0.95;

impl Fluid {
    /// The highest temperature at which saturation is solved, K: 0.9999 Tc. Closer
    /// to the critical point the two phases differ too little for a robust solve;
    /// states there are treated as single-phase.
    pub fn saturation_temperature_max(&self) -> f64 {
        self.critical.temperature * (1.0 - 1e-4)
    }

    fn check_saturation_temperature(&self, temperature: f64) -> Result<()> {
        let low = self.triple_temperature * (1.0 - 1e-9);
        let high = self.saturation_temperature_max();
        if !(temperature >= low && temperature <= high) {
            return Err(Error::OutOfRange {
                fluid: self.name.clone(),
                what: format!("saturation at T = {temperature} K"),
                detail: format!(
                    "saturation exists from the triple point {} K up to the critical temperature {} K",
                    self.triple_temperature, self.critical.temperature
                ),
            });
        }
        Ok(())
    }

    /// Saturation at temperature T (K).
    pub fn saturation_at_temperature(&self, temperature: f64) -> Result<Saturation> {
        self.check_saturation_temperature(temperature)?;
        if self.pseudo_pure {
            return self.pseudo_pure_saturation_at_temperature(temperature);
        }
        let seeds = self.approximate_saturated_densities(temperature);
        self.pure_saturation_at_temperature(temperature, seeds)
    }

    /// Newton iteration on (δ′, δ″) for equal pressure and equal Gibbs energy at T,
    /// in the dimensionless form J = δ(1 + δαʳ_δ), K = δαʳ_δ + αʳ + ln δ.
    fn pure_saturation_at_temperature(
        &self,
        temperature: f64,
        seeds: (f64, f64),
    ) -> Result<Saturation> {
        let factors = self.tau_factors(temperature);
        let rho_r = self.reducing_density;
        let mut liquid = seeds.0 / rho_r;
        let mut vapour = seeds.1 / rho_r;
        let mut residual = f64::INFINITY;
        let mut first_residual = f64::INFINITY;
        for iteration in 0..SATURATION_ITERATION_CAP {
            let rl = self.residual.evaluate(&factors, liquid);
            let rv = self.residual.evaluate(&factors, vapour);
            let jl = liquid * (1.0 + liquid * rl.alpha_delta);
            let jv = vapour * (1.0 + vapour * rv.alpha_delta);
            let kl = liquid * rl.alpha_delta + rl.alpha + liquid.ln();
            let kv = vapour * rv.alpha_delta + rv.alpha + vapour.ln();
            let jl_d = 1.0 + 2.0 * liquid * rl.alpha_delta + liquid * liquid * rl.alpha_delta_delta;
            let jv_d = 1.0 + 2.0 * vapour * rv.alpha_delta + vapour * vapour * rv.alpha_delta_delta;
            let kl_d = 2.0 * rl.alpha_delta + liquid * rl.alpha_delta_delta + 1.0 / liquid;
            let kv_d = 2.0 * rv.alpha_delta + vapour * rv.alpha_delta_delta + 1.0 / vapour;
            residual = (jv - jl).abs() / jv.abs() + (kv - kl).abs();
            if iteration == 0 {
                first_residual = residual;
            } else if residual > 1.0 && residual > 1e3 * first_residual {
                // Thrown far off: the seeds were outside Newton's reach.
                break;
            }
            let det = jv_d * kl_d - jl_d * kv_d;
            let step_l = ((kv - kl) * jv_d - (jv - jl) * kv_d) / det;
            let step_v = ((kv - kl) * jl_d - (jv - jl) * kl_d) / det;
            // Damp steps that would cross the phases or leave positive densities.
            let mut damping = 1.0;
            while damping > 1e-4
                && !(vapour + damping * step_v > 0.0
                    && liquid + damping * step_l > vapour + damping * step_v)
            {
                damping *= 0.5;
            }
            let next_l = liquid + damping * step_l;
            let next_v = vapour + damping * step_v;
            if !(next_l.is_finite() && next_v.is_finite()) {
                break;
            }
            // Near the critical point rounding keeps the steps from shrinking below
            // about 1e-12; the residual is then the better test.
            let small = (next_l - liquid).abs() <= 1e-12 * liquid
                && (next_v - vapour).abs() <= 1e-12 * vapour;
            liquid = next_l;
            vapour = next_v;
            if (liquid - vapour).abs() < 1e-7 * liquid {
                // Collapsed onto the trivial solution δ′ = δ″.
                break;
            }
            if small || (residual < 1e-13 && iteration > 0) {
                let p = self
                    .pressure_and_slope(&factors, temperature, vapour * rho_r)
                    .0;
                let pl = self
                    .pressure_and_slope(&factors, temperature, liquid * rho_r)
                    .0;
                let rt_scale = 1e-12 * liquid * rho_r * self.gas_constant * temperature;
                if (pl - p).abs() <= 1e-9 * p + rt_scale {
                    let point = |density: f64, pressure: f64| Point {
                        temperature,
                        pressure,
                        density,
                    };
                    return Ok(Saturation {
                        liquid: point(liquid * rho_r, p),
                        vapour: point(vapour * rho_r, p),
                    });
                }
            }
        }
        Err(Error::NoConvergence {
            solver: "saturation from temperature",
            iterations: SATURATION_ITERATION_CAP,
            residual,
            context: format!(" for {} at T = {temperature} K", self.name),
        })
    }

    fn pseudo_pure_saturation_at_temperature(&self, temperature: f64) -> Result<Saturation> {
        let factors = self.tau_factors(temperature);
        let bubble = self.ancillaries.bubble_pressure.value(temperature);
        let dew = self.ancillaries.dew_pressure.value(temperature);
        let liquid =
            self.density_on_branch(&factors, temperature, bubble, Branch::Liquid, None, None)?;
        let vapour =
            self.density_on_branch(&factors, temperature, dew, Branch::Vapour, None, None)?;
        Ok(Saturation {
            liquid: Point {
                temperature,
                pressure: bubble,
                density: liquid,
            },
            vapour: Point {
                temperature,
                pressure: dew,
                density: vapour,
            },
        })
    }

    /// The range of pressures over which saturation is solved, Pa: from the triple
    /// point to the saturation pressure at [`Fluid::saturation_temperature_max`] (for
    /// a pseudo-pure fluid, where both bubble and dew temperatures exist: up to the
    /// dew pressure there).
    pub fn saturation_pressure_range(&self) -> (f64, f64) {
        self.saturation_pressures
    }

    /// Computes [`Fluid::saturation_pressure_range`] once, when the fluid is built.
    pub(crate) fn compute_saturation_pressure_range(&self) -> Result<(f64, f64)> {
        let high = self.saturation_temperature_max();
        if self.pseudo_pure {
            Ok((
                self.ancillaries.dew_pressure.value(self.triple_temperature),
                self.ancillaries.dew_pressure.value(high),
            ))
        } else {
            let top = self.saturation_at_temperature(high)?.vapour.pressure;
            let bottom = self.saturation_at_temperature(self.triple_temperature)?;
            Ok((bottom.vapour.pressure, top))
        }
    }

    /// Saturation at pressure p (Pa).
    pub fn saturation_at_pressure(&self, pressure: f64) -> Result<Saturation> {
        let pair = self.saturated_pair_at_pressure(pressure)?;
        let point = |x: &Properties| Point {
            temperature: x.temperature,
            pressure,
            density: x.density,
        };
        Ok(Saturation {
            liquid: point(&pair.liquid),
            vapour: point(&pair.vapour),
        })
    }

    /// The saturated liquid and vapour at pressure p (Pa) with all their properties.
    pub fn saturated_pair_at_pressure(&self, pressure: f64) -> Result<SaturatedPair> {
        let (low, high) = self.saturation_pressure_range();
        if !(pressure >= low * (1.0 - 1e-6) && pressure < high) {
            return Err(Error::OutOfRange {
                fluid: self.name.clone(),
                what: format!("saturation at p = {} kPa", pressure / 1e3),
                detail: format!(
                    "saturation is solved from the triple-point pressure {:.4} kPa up to {:.4} kPa, its pressure at 0.9999 of the critical temperature (the critical pressure is {:.4} kPa)",
                    low / 1e3,
                    high / 1e3,
                    self.critical.pressure / 1e3
                ),
            });
        }
        let t_low = self.triple_temperature;
        let t_high = self.saturation_temperature_max();
        if self.pseudo_pure {
            let bubble_t = self
                .ancillaries
                .bubble_pressure
                .temperature_at(pressure, t_low, t_high)?;
            let dew_t = self
                .ancillaries
                .dew_pressure
                .temperature_at(pressure, t_low, t_high)?;
            let on_branch = |temperature: f64, branch: Branch| -> Result<Properties> {
                let factors = self.tau_factors(temperature);
                let density =
                    self.density_on_branch(&factors, temperature, pressure, branch, None, None)?;
                Ok(self.properties_with(&factors, temperature, density))
            };
            return Ok(SaturatedPair {
                liquid: on_branch(bubble_t, Branch::Liquid)?,
                vapour: on_branch(dew_t, Branch::Vapour)?,
            });
        }
        let seeds = match self.saturation_table.at_pressure(pressure) {
            Some(line) if line.error.density < SEED_DENSITY_ERROR => {
                (line.temperature, line.liquid_density, line.vapour_density)
            }
            _ => {
                let start = self
                    .ancillaries
                    .bubble_pressure
                    .temperature_at(pressure, t_low, t_high)?;
                (
                    start,
                    self.ancillary_liquid_density(start),
                    self.ancillary_vapour_density(start),
                )
            }
        };
        if let Some(found) = self.saturation_at_pressure_direct(pressure, seeds) {
            return Ok(found);
        }
        let saturation = self.saturation_at_pressure_nested(pressure, seeds.0)?;
        let factors = self.tau_factors(saturation.liquid.temperature);
        let at = |point: &Point| self.properties_with(&factors, point.temperature, point.density);
        Ok(SaturatedPair {
            liquid: at(&saturation.liquid),
            vapour: at(&saturation.vapour),
        })
    }

    /// The saturated pair at pressure p from seeds (T, ρ′, ρ″) close to the answer,
    /// such as a flash's approximate saturated states; falls back to
    /// [`Fluid::saturated_pair_at_pressure`].
    pub fn saturated_pair_at_pressure_seeded(
        &self,
        pressure: f64,
        seeds: (f64, f64, f64),
    ) -> Result<SaturatedPair> {
        if !self.pseudo_pure {
            if let Some(found) = self.saturation_at_pressure_direct(pressure, seeds) {
                return Ok(found);
            }
        }
        self.saturated_pair_at_pressure(pressure)
    }

    /// Newton in (T, ρ′, ρ″) together on p(T, ρ′) = p, p(T, ρ″) = p and
    /// g(T, ρ′) = g(T, ρ″), from seeds (T, ρ′, ρ″). Fast; `None` when it does not
    /// settle (then the nested solve takes over). The properties it returns are those
    /// evaluated at the converged point.
    fn saturation_at_pressure_direct(
        &self,
        pressure: f64,
        seeds: (f64, f64, f64),
    ) -> Option<SaturatedPair> {
        let (t_low, t_high) = (
            self.triple_temperature * (1.0 - 1e-9),
            self.saturation_temperature_max(),
        );
        let (mut t, mut liquid, mut vapour) = seeds;
        for _ in 0..20 {
            let factors = self.tau_factors(t);
            let l = self.properties_with(&factors, t, liquid);
            let v = self.properties_with(&factors, t, vapour);
            let rt = self.gas_constant * t;
            let f = [
                l.pressure / pressure - 1.0,
                v.pressure / pressure - 1.0,
                (l.gibbs - v.gibbs) / rt,
            ];
            // Rows: ∂F/∂(T, ρ′, ρ″). (∂g/∂ρ)_T = (∂p/∂ρ)_T/ρ; (∂g/∂T)_ρ = −s + (∂p/∂T)_ρ/ρ.
            let dg_dt = |x: &Properties| -x.entropy + x.dp_dt / x.density;
            let jacobian = [
                [l.dp_dt / pressure, l.dp_drho / pressure, 0.0],
                [v.dp_dt / pressure, 0.0, v.dp_drho / pressure],
                [
                    (dg_dt(&l) - dg_dt(&v)) / rt - f[2] / t,
                    l.dp_drho / (l.density * rt),
                    -v.dp_drho / (v.density * rt),
                ],
            ];
            let step = solve3(jacobian, [-f[0], -f[1], -f[2]])?;
            // The liquid pressure carries rounding of a few ulps of ρ′RT.
            let liquid_noise = 1e-13 * liquid * rt / pressure;
            let converged =
                f[0].abs() < 1e-12 + liquid_noise && f[1].abs() < 1e-12 && f[2].abs() < 1e-12;
            if converged {
                return Some(SaturatedPair {
                    liquid: l,
                    vapour: v,
                });
            }
            // Damp steps that would cross the phases or leave the range.
            let mut damping = 1.0;
            loop {
                let (nt, nl, nv) = (
                    t + damping * step[0],
                    liquid + damping * step[1],
                    vapour + damping * step[2],
                );
                if nv > 0.0 && nl > nv * 1.0001 && nt >= t_low && nt <= t_high {
                    t = nt;
                    liquid = nl;
                    vapour = nv;
                    break;
                }
                damping *= 0.5;
                if damping < 1e-3 {
                    return None;
                }
            }
        }
        None
    }

    /// Newton on T with the Clausius–Clapeyron slope, a full saturation solve at each
    /// temperature: slower, but sure where the direct solve is not.
    fn saturation_at_pressure_nested(&self, pressure: f64, start: f64) -> Result<Saturation> {
        let (t_low, t_high) = (self.triple_temperature, self.saturation_temperature_max());
        let mut temperature = start;
        let ancillary = |t: f64| {
            (
                self.ancillary_liquid_density(t),
                self.ancillary_vapour_density(t),
            )
        };
        let mut seeds = ancillary(temperature);
        let mut residual = f64::INFINITY;
        for _ in 0..SATURATION_ITERATION_CAP {
            // Seeded from the last solution, scaled along the ancillary curves; should
            // that fail (close to the critical point), from the ancillaries alone.
            let saturation = match self.pure_saturation_at_temperature(temperature, seeds) {
                Ok(s) => s,
                Err(_) => {
                    self.pure_saturation_at_temperature(temperature, ancillary(temperature))?
                }
            };
            let p = saturation.liquid.pressure;
            residual = (p / pressure).ln();
            let factors = self.tau_factors(temperature);
            let l = self.properties_with(&factors, temperature, saturation.liquid.density);
            let v = self.properties_with(&factors, temperature, saturation.vapour.density);
            // Clausius–Clapeyron: dp/dT = Δs/Δv, so d ln p/dT = Δs/(p Δv).
            let slope = (v.entropy - l.entropy)
                / (p * (1.0 / saturation.vapour.density - 1.0 / saturation.liquid.density));
            let step = -residual / slope;
            if residual.abs() < 1e-14 || step.abs() < 1e-13 * temperature {
                if residual.abs() < 1e-10 {
                    return Ok(saturation);
                }
                break;
            }
            let next = (temperature + step).clamp(t_low * (1.0 - 1e-9), t_high);
            // Seed the next densities along the saturation line: the ancillary values
            // at the new temperature, corrected by their error at this one.
            let (now, then) = (ancillary(temperature), ancillary(next));
            seeds = (
                saturation.liquid.density * then.0 / now.0,
                saturation.vapour.density * then.1 / now.1,
            );
            if next == temperature {
                break;
            }
            temperature = next;
        }
        Err(Error::NoConvergence {
            solver: "saturation from pressure",
            iterations: SATURATION_ITERATION_CAP,
            residual,
            context: format!(" for {} at p = {pressure} Pa", self.name),
        })
    }
}

/// Solves the 3×3 system a·x = b by Gaussian elimination with partial pivoting;
/// `None` when it is singular.
fn solve3(mut a: [[f64; 3]; 3], mut b: [f64; 3]) -> Option<[f64; 3]> {
    for col in 0..3 {
        let pivot = (col..3).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[pivot][col].abs() < 1e-300 || !a[pivot][col].is_finite() {
            return None;
        }
        a.swap(col, pivot);
        b.swap(col, pivot);
        for row in col + 1..3 {
            let factor = a[row][col] / a[col][col];
            let pivot_row = a[col];
            for (target, source) in a[row].iter_mut().zip(pivot_row).skip(col) {
                *target -= factor * source;
            }
            b[row] -= factor * b[col];
        }
    }
    let mut x = [0.0; 3];
    for row in (0..3).rev() {
        let mut sum = b[row];
        for k in row + 1..3 {
            sum -= a[row][k] * x[k];
        }
        x[row] = sum / a[row][row];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}
