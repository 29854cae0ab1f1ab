//! The Joule-Thomson inversion curve: the locus μJT = 0, its zero-pressure limit
//! (the maximum inversion temperature, where B = T·dB/dT for the second virial
//! coefficient B), the Boyle temperature (B = 0), the curve's pressure maximum, and
//! the inversion temperatures at a pressure.
//!
//! μJT = 0 where T(∂p/∂T)_ρ = ρ(∂p/∂ρ)_T, which in the reduced Helmholtz energy reads
//! F(τ, δ) = δαʳ_δ + δ²αʳ_δδ + δτ αʳ_δτ = 0. The curve is traced in density: from the
//! zero-density limit (the fluid's own maximum inversion temperature, the start of
//! every trace) towards the liquid, solving F = 0 for T at each density, until it meets
//! the saturated-liquid line, the melting line, the lowest temperature or the highest
//! pressure of the equation.

use super::fluid::Fluid;
use super::helmholtz::TauFactors;
use crate::error::{Error, Result};
use crate::numeric::{bracketed_root, golden_maximum};
use serde::Serialize;

/// One point of the inversion curve.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct InversionPoint {
    /// Temperature, K.
    #[serde(rename = "temperature_K")]
    pub temperature: f64,
    /// Pressure, Pa.
    #[serde(rename = "pressure_Pa")]
    pub pressure: f64,
    /// Density, kg/m³.
    #[serde(rename = "density_kg_m3")]
    pub density: f64,
    /// Inside the equation's validity range.
    pub within_range: bool,
}

/// Where the traced curve stops at its cold end.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CurveEnd {
    /// On the saturated-liquid line.
    SaturatedLiquid,
    /// At the lowest valid temperature (triple point or melting line).
    LowestTemperature,
    /// At the highest valid pressure.
    HighestPressure,
}

/// The whole inversion analysis of a fluid.
#[derive(Debug, Clone, Serialize)]
pub struct InversionCurve {
    /// Canonical fluid name.
    pub fluid: String,
    /// The zero-pressure limit of the curve, K.
    #[serde(rename = "max_inversion_temperature_K")]
    pub max_inversion_temperature: f64,
    /// Whether that limit lies inside the equation's temperature range.
    pub max_inversion_temperature_within_range: bool,
    /// The Boyle temperature (B = 0), K.
    #[serde(rename = "boyle_temperature_K")]
    pub boyle_temperature: f64,
    /// The curve's highest pressure, Pa.
    #[serde(rename = "max_inversion_pressure_Pa")]
    pub max_inversion_pressure: f64,
    /// The temperature at that pressure, K.
    #[serde(rename = "temperature_at_max_pressure_K")]
    pub temperature_at_max_pressure: f64,
    /// How the cold end stops.
    pub cold_end: CurveEnd,
    /// The traced points, from the zero-pressure limit to the cold end.
    pub curve: Vec<InversionPoint>,
}

/// The inversion temperatures at one pressure.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct InversionTemperatures {
    /// Pressure, Pa.
    #[serde(rename = "pressure_Pa")]
    pub pressure: f64,
    /// The upper (gas-side) inversion temperature, K; `None` above the curve's
    /// pressure maximum.
    #[serde(rename = "upper_K")]
    pub upper: Option<f64>,
    /// The lower (liquid-side) inversion temperature, K; `None` above the pressure
    /// maximum, or where the lower branch has already ended on the saturation line.
    #[serde(rename = "lower_K")]
    pub lower: Option<f64>,
}

/// The dimensionless inversion function F(τ, δ) = δαʳ_δ + δ²αʳ_δδ + δτ αʳ_δτ; μJT
/// is zero where F is, and has the sign of −F... times a positive factor.
pub fn inversion_function(fluid: &Fluid, temperature: f64, density: f64) -> f64 {
    inversion_function_with(fluid, &fluid.tau_factors(temperature), density)
}

/// [`inversion_function`] from τ factors already computed (for many densities at
/// one temperature).
fn inversion_function_with(fluid: &Fluid, factors: &TauFactors, density: f64) -> f64 {
    let tau = factors.tau();
    let delta = fluid.delta(density);
    let r = fluid.residual_at(factors, density);
    delta * r.alpha_delta + delta * delta * r.alpha_delta_delta + delta * tau * r.alpha_delta_tau
}

/// Finds the highest temperature below `high` where `g` changes sign, scanning down a
/// logarithmic grid to `low`, then refines it.
fn highest_sign_change(
    solver: &'static str,
    g: impl Fn(f64) -> f64,
    low: f64,
    high: f64,
) -> Result<f64> {
    let steps = 400;
    let ratio = (low / high).powf(1.0 / steps as f64);
    let mut t_prev = high;
    let mut g_prev = g(high);
    for _ in 0..steps {
        let t = t_prev * ratio;
        let value = g(t);
        if value.signum() != g_prev.signum() {
            return bracketed_root(solver, &g, t, t_prev, 1e-12 * t);
        }
        t_prev = t;
        g_prev = value;
    }
    Err(Error::NoConvergence {
        solver,
        iterations: steps,
        residual: g_prev.abs(),
        context: format!(": no sign change between {low} K and {high} K"),
    })
}

impl Fluid {
    /// Upper end of the temperature scans: well above any inversion temperature of
    /// these fluids, and past the validity range where the equation is smooth.
    fn scan_ceiling(&self) -> f64 {
        (40.0 * self.critical.temperature).max(self.temperature_max)
    }

    /// The maximum inversion temperature: the zero-pressure limit of μJT = 0, where
    /// B = T·dB/dT, K.
    pub fn max_inversion_temperature(&self) -> Result<f64> {
        // With B·ρr = b(τ): B − T dB/dT = (b + τ b_τ)/ρr.
        let g = |t: f64| {
            let tau = self.tau(t);
            let [b, b_tau, _] = self.residual.virial_b(tau);
            b + tau * b_tau
        };
        highest_sign_change(
            "maximum inversion temperature (B = T dB/dT)",
            g,
            self.triple_temperature * 0.5,
            self.scan_ceiling(),
        )
    }

    /// The Boyle temperature, where the second virial coefficient is zero, K.
    pub fn boyle_temperature(&self) -> Result<f64> {
        let g = |t: f64| self.residual.virial_b(self.tau(t))[0];
        highest_sign_change(
            "Boyle temperature (B = 0)",
            g,
            self.triple_temperature * 0.5,
            self.scan_ceiling(),
        )
    }

    /// The inversion temperature at density ρ, near `guess`.
    fn inversion_temperature_at_density(&self, density: f64, guess: f64) -> Result<f64> {
        let f = |t: f64| inversion_function(self, t, density);
        // Widen a bracket around the guess until F changes sign.
        let f_guess = f(guess);
        let mut step = 0.01 * guess;
        for _ in 0..60 {
            for candidate in [guess - step, guess + step] {
                if candidate <= 0.2 * self.triple_temperature {
                    continue;
                }
                let value = f(candidate);
                if value.signum() != f_guess.signum() {
                    let (a, b) = if candidate < guess {
                        (candidate, guess)
                    } else {
                        (guess, candidate)
                    };
                    return bracketed_root(
                        "inversion temperature at a density",
                        f,
                        a,
                        b,
                        1e-12 * guess,
                    );
                }
            }
            step *= 1.5;
            if step > guess {
                break;
            }
        }
        Err(Error::NoConvergence {
            solver: "inversion temperature at a density",
            iterations: 60,
            residual: f_guess.abs(),
            context: format!(
                " for {} at ρ = {density} kg/m³ near T = {guess} K",
                self.name
            ),
        })
    }

    fn inversion_point(&self, temperature: f64, density: f64) -> InversionPoint {
        let pressure = self.pressure(temperature, density);
        InversionPoint {
            temperature,
            pressure,
            density,
            within_range: self.check_range(temperature, pressure).is_ok(),
        }
    }

    /// True when (T, ρ) lies inside the two-phase dome, on the liquid side of which
    /// the curve ends.
    fn inside_dome(&self, temperature: f64, density: f64) -> bool {
        if temperature >= self.saturation_temperature_max() || temperature < self.triple_temperature
        {
            return false;
        }
        match self.saturation_at_temperature(temperature) {
            Ok(s) => density < s.liquid.density && density > s.vapour.density,
            Err(_) => false,
        }
    }

    /// Which stop applies at a traced point, if any.
    fn curve_stop(&self, point: &InversionPoint) -> Option<CurveEnd> {
        let coldest = self
            .melting_temperature(point.pressure)
            .unwrap_or(self.temperature_min)
            .max(self.temperature_min);
        if point.temperature < coldest {
            Some(CurveEnd::LowestTemperature)
        } else if point.pressure > self.pressure_max {
            Some(CurveEnd::HighestPressure)
        } else if self.inside_dome(point.temperature, point.density) {
            Some(CurveEnd::SaturatedLiquid)
        } else {
            None
        }
    }

    /// The maximum inversion temperature, found once per fluid and kept (see
    /// [`Fluid::max_inversion_temperature`]).
    pub fn max_inversion_temperature_kept(&self) -> Result<f64> {
        self.max_inversion_cache
            .get_or_init(|| self.max_inversion_temperature())
            .clone()
    }

    /// The inversion pressure at temperature `t` (Pa): the point of the inversion
    /// curve at that temperature on its gas side, which is where a walk along the
    /// curve from its zero-pressure end first reaches `t`. Solved at `t` alone,
    /// without tracing the curve: at fixed T, F(τ, δ) keeps the sign it has in the
    /// dilute gas up to the curve's density (stepping over the two-phase dome), so
    /// the density is bracketed by steps of 2 % of the critical density from a
    /// millionth of it and refined (to 1e-13 of the critical
    /// density). `None` where the curve does not reach `t`: at or above the maximum
    /// inversion temperature, or where its point at `t` would lie beyond the traced
    /// curve's stops (the saturated liquid, the melting line, the lowest
    /// temperature or the highest pressure of the equation).
    pub fn inversion_pressure_at_temperature(&self, temperature: f64) -> Result<Option<f64>> {
        if !(temperature > 0.0 && temperature < self.max_inversion_temperature_kept()?) {
            return Ok(None);
        }
        let factors = self.tau_factors(temperature);
        let function = |density: f64| inversion_function_with(self, &factors, density);
        let rho_c = self.critical.density;
        let step = 0.02 * rho_c;
        let limit = 6.0 * rho_c;
        // The sign in the dilute gas, where F ≈ δ(b + τ b_τ) (F itself vanishes
        // with δ); next to the maximum inversion temperature the curve's density
        // is below the first step.
        let mut low = 1e-6 * rho_c;
        let dilute = function(low).signum();
        // The dilute gas lies inside the curve at every temperature the curve
        // reaches from its zero-pressure end; near some triple points the equations'
        // virial terms turn the other way, which makes a separate locus of F = 0 in
        // the dilute vapour, off the curve.
        let just_below_top = 0.999 * self.max_inversion_temperature_kept()?;
        let inside = inversion_function(self, just_below_top, low).signum();
        if dilute != inside {
            return Ok(None);
        }
        // Below the critical temperature the search steps over the two-phase dome,
        // where the equation's F can change sign without meaning (the traced curve
        // stops where it would enter the dome): where the curve reaches the
        // temperature on the liquid side, the saturated liquid lies on the dilute
        // gas's side of it.
        let dome = if temperature < self.saturation_temperature_max()
            && temperature >= self.triple_temperature
        {
            self.saturation_at_temperature(temperature)
                .ok()
                .map(|s| (s.vapour.density, s.liquid.density))
        } else {
            None
        };
        let mut bracket = None;
        while low < limit {
            let mut high = if low < step { step } else { low + step };
            if let Some((vapour, liquid)) = dome {
                if high > vapour && low < liquid {
                    if low < vapour && function(vapour).signum() != dilute {
                        bracket = Some((low, vapour));
                        break;
                    }
                    // A saturated liquid already across the curve: the curve meets
                    // this temperature inside the dome, where the trace has ended.
                    if function(liquid).signum() != dilute {
                        return Ok(None);
                    }
                    low = liquid;
                    high = liquid + step;
                }
            }
            if function(high).signum() != dilute {
                bracket = Some((low, high));
                break;
            }
            low = high;
        }
        let Some((low, high)) = bracket else {
            return Ok(None);
        };
        let density = bracketed_root(
            "inversion density at a temperature",
            function,
            low,
            high,
            1e-13 * rho_c,
        )?;
        let point = self.inversion_point(temperature, density);
        Ok(self.curve_stop(&point).is_none().then_some(point.pressure))
    }

    /// Traces the whole inversion curve and its characteristic figures.
    pub fn inversion_curve(&self) -> Result<InversionCurve> {
        let t0 = self.max_inversion_temperature_kept()?;
        let boyle = self.boyle_temperature()?;
        let rho_c = self.critical.density;
        let mut curve = vec![InversionPoint {
            temperature: t0,
            pressure: 0.0,
            density: 0.0,
            within_range: t0 <= self.temperature_max,
        }];
        // Density steps adapt so that each step moves T by at most 1 % of the maximum
        // inversion temperature and p by at most 1 % of the highest pressure so far
        // (at least of 1 % of the critical pressure).
        let mut step = 0.01 * rho_c;
        let (min_step, max_step) = (1e-6 * rho_c, 0.02 * rho_c);
        let mut density = 0.0;
        let mut temperature = t0;
        let mut highest = 0.0f64;
        let mut end = CurveEnd::LowestTemperature;
        let limit = 6.0 * rho_c;
        while density < limit {
            let next_density = density + step;
            let next_t = match self.inversion_temperature_at_density(next_density, temperature) {
                Ok(t) => t,
                Err(_) if step > min_step => {
                    step *= 0.5;
                    continue;
                }
                Err(_) => break,
            };
            let point = self.inversion_point(next_t, next_density);
            let last_pressure = curve.last().map_or(0.0, |p| p.pressure);
            let dt = (next_t - temperature).abs() / (0.01 * t0);
            let dp = (point.pressure - last_pressure).abs()
                / (0.01 * highest.max(self.critical.pressure));
            let change = dt.max(dp);
            if change > 1.0 && step > min_step && self.curve_stop(&point).is_none() {
                step = (step * 0.5).max(min_step);
                continue;
            }
            highest = highest.max(point.pressure);
            if let Some(stop) = self.curve_stop(&point) {
                end = stop;
                // Refine the end by bisection on density between the last good point
                // and this one.
                let (mut a, mut b) = (density, next_density);
                let mut t_a = temperature;
                let mut last = None;
                for _ in 0..40 {
                    let mid = 0.5 * (a + b);
                    let Ok(t_mid) = self.inversion_temperature_at_density(mid, t_a) else {
                        break;
                    };
                    let p_mid = self.inversion_point(t_mid, mid);
                    if self.curve_stop(&p_mid).is_some() {
                        b = mid;
                    } else {
                        a = mid;
                        t_a = t_mid;
                        last = Some(p_mid);
                    }
                    if b - a < 1e-9 * rho_c {
                        break;
                    }
                }
                if let Some(p) = last {
                    curve.push(p);
                }
                break;
            }
            curve.push(point);
            density = next_density;
            temperature = next_t;
            if change < 0.3 {
                step = (step * 1.5).min(max_step);
            }
        }
        if curve.len() < 10 {
            return Err(Error::NoConvergence {
                solver: "inversion-curve tracer",
                iterations: curve.len(),
                residual: f64::NAN,
                context: format!(
                    " for {}: the curve ended after {} points",
                    self.name,
                    curve.len()
                ),
            });
        }
        // The pressure maximum, refined by golden section on density.
        let (index, _) = curve
            .iter()
            .enumerate()
            .max_by(|a, b| a.1.pressure.total_cmp(&b.1.pressure))
            .unwrap_or((0, &curve[0]));
        let lo = curve[index.saturating_sub(1)];
        let hi = curve[(index + 1).min(curve.len() - 1)];
        let pressure_on_curve = |rho: f64| {
            self.inversion_temperature_at_density(rho, curve[index].temperature)
                .map(|t| self.pressure(t, rho))
                .unwrap_or(f64::NEG_INFINITY)
        };
        let rho_max = golden_maximum(pressure_on_curve, lo.density, hi.density, 1e-10 * rho_c);
        let t_max_p = self.inversion_temperature_at_density(rho_max, curve[index].temperature)?;
        Ok(InversionCurve {
            fluid: self.name.clone(),
            max_inversion_temperature: t0,
            max_inversion_temperature_within_range: t0 <= self.temperature_max,
            boyle_temperature: boyle,
            max_inversion_pressure: self.pressure(t_max_p, rho_max),
            temperature_at_max_pressure: t_max_p,
            cold_end: end,
            curve,
        })
    }
}

impl InversionCurve {
    /// The inversion temperatures at pressure p: the upper and lower branch
    /// crossings of the curve, refined between traced points.
    pub fn temperatures_at(&self, fluid: &Fluid, pressure: f64) -> Result<InversionTemperatures> {
        let mut out = InversionTemperatures {
            pressure,
            upper: None,
            lower: None,
        };
        if pressure > self.max_inversion_pressure {
            return Ok(out);
        }
        let refine = |a: &InversionPoint, b: &InversionPoint| -> Result<f64> {
            let p_of = |rho: f64| -> f64 {
                let guess = a.temperature
                    + (b.temperature - a.temperature) * (rho - a.density)
                        / (b.density - a.density).max(1e-300);
                fluid
                    .inversion_temperature_at_density(rho, guess)
                    .map(|t| fluid.pressure(t, rho) - pressure)
                    .unwrap_or(f64::NAN)
            };
            let rho = bracketed_root(
                "inversion temperature at a pressure",
                p_of,
                a.density,
                b.density,
                1e-12 * fluid.critical.density,
            )?;
            let guess = a.temperature
                + (b.temperature - a.temperature) * (rho - a.density)
                    / (b.density - a.density).max(1e-300);
            fluid.inversion_temperature_at_density(rho, guess)
        };
        for pair in self.curve.windows(2) {
            let (a, b) = (&pair[0], &pair[1]);
            let rising =
                a.pressure <= pressure && b.pressure >= pressure && b.pressure > a.pressure;
            let falling =
                a.pressure >= pressure && b.pressure <= pressure && a.pressure > b.pressure;
            if rising && out.upper.is_none() {
                out.upper = Some(if pressure == 0.0 {
                    self.max_inversion_temperature
                } else {
                    refine(a, b)?
                });
            } else if falling && out.upper.is_some() && out.lower.is_none() {
                out.lower = Some(refine(a, b)?);
            }
        }
        Ok(out)
    }
}
