//! Flashes: the state that meets a pair of inputs — (T, p), (T, ρ), (p, h), (p, s),
//! (T, quality) and (p, quality) — with the phase decided first and each loop capped.
//!
//! For a pseudo-pure fluid (air) a two-phase state at pressure p lies between the
//! bubble state (T′, p) and the dew state (T″, p); its temperature, enthalpy,
//! entropy, internal energy and specific volume are linear in the quality between
//! the two. The same rule serves every input pair, so all flashes agree.

use super::density::Branch;
use super::fluid::{Fluid, Properties};
use super::saturation::{Saturation, SEED_DENSITY_ERROR};
use super::seed_grid::Quantity;
use super::state::{Phase, SaturatedPair, State};
use crate::error::{Error, Result};

/// Iteration cap of the temperature search at fixed pressure.
pub const TEMPERATURE_ITERATION_CAP: usize = 100;

/// Bisection steps on the quality of a pseudo-pure two-phase state at (T, ρ).
const PSEUDO_PURE_DENSITY_CAP: usize = 80;

/// Bisection steps (on ln p) for a pseudo-pure two-phase state at (T, quality);
/// 200 halvings narrow any pressure range far below rounding.
const PSEUDO_PURE_BISECTION_CAP: usize = 200;

/// Newton steps of the quick single-phase flash in temperature before it hands over
/// to the bracketed search.
const QUICK_NEWTON_STEPS: usize = 8;

/// Newton steps of the two-variable (T, ρ) flash near a known state before it
/// hands over to the bracketed search.
const NEAR_NEWTON_STEPS: usize = 12;

/// How far (relative) the density a (p, h) or (p, s) flash finds from the seed
/// grid's start may lie from the grid's density at its temperature: a root of
/// p(T, ρ) = p on another branch lies tens of percent away; the grid's own error
/// is below a percent outside the critical region (`seed_grid` tests).
const ISOBAR_BRANCH_TOLERANCE: f64 = 0.05;

/// Newton steps of the ideal-gas temperature estimate (a seed, not a result).
const IDEAL_GAS_ESTIMATE_STEPS: usize = 30;

/// Decisions made on the saturation table keep this many times the measured error of
/// the table's cell between the target and the saturation line.
pub const TABLE_MARGIN: f64 = 4.0;

/// The quick phase decision at fixed pressure is made up to this fraction of the
/// critical pressure; above it the exact saturation always decides.
pub const QUICK_PRESSURE_LIMIT: f64 = 0.95;

/// Which property is held at fixed pressure.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Held {
    /// Specific enthalpy.
    Enthalpy,
    /// Specific entropy.
    Entropy,
}

impl Held {
    fn of(self, p: &Properties) -> f64 {
        match self {
            Held::Enthalpy => p.enthalpy,
            Held::Entropy => p.entropy,
        }
    }

    /// d(value)/dT at fixed pressure: cp, or cp/T.
    fn slope(self, p: &Properties) -> f64 {
        match self {
            Held::Enthalpy => p.cp,
            Held::Entropy => p.cp / p.temperature,
        }
    }

    fn name(self) -> &'static str {
        match self {
            Held::Enthalpy => "h",
            Held::Entropy => "s",
        }
    }

    /// The size below which a difference in the held property is rounding: R·T for
    /// enthalpy, R for entropy, times 1e-12.
    fn rounding(self, fluid: &Fluid, temperature: f64) -> f64 {
        match self {
            Held::Enthalpy => 1e-12 * fluid.gas_constant * temperature,
            Held::Entropy => 1e-12 * fluid.gas_constant,
        }
    }

    fn unit_value(self, value: f64) -> String {
        match self {
            Held::Enthalpy => format!("{:.6} kJ/kg", value / 1e3),
            Held::Entropy => format!("{:.6} kJ/(kg·K)", value / 1e3),
        }
    }
}

/// What the quick phase decision at fixed pressure found.
enum Quick {
    /// The single-phase state.
    Found(Box<State>),
    /// Too close to saturation to tell; the exact saturation must decide, seeded by
    /// the table's (T, ρ′, ρ″) where the table covers the pressure.
    Unclear(Option<(f64, f64, f64)>),
}

/// The region searched at fixed pressure.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Region {
    Liquid,
    Vapour,
    AboveCritical,
}

fn finite(fluid: &Fluid, props: &Properties) -> Result<()> {
    let all = [
        props.temperature,
        props.density,
        props.pressure,
        props.enthalpy,
        props.entropy,
        props.internal_energy,
        props.cp,
        props.cv,
        props.speed_of_sound,
        props.joule_thomson,
    ];
    if all.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(Error::ImpossibleState {
            fluid: fluid.name.clone(),
            detail: format!(
                "the equation gave a non-finite property at T = {} K, ρ = {} kg/m³",
                props.temperature, props.density
            ),
        })
    }
}

impl Fluid {
    /// The saturated pair at a temperature (both phases share it for a pure fluid).
    fn pair(&self, saturation: &Saturation) -> SaturatedPair {
        let (liquid, vapour) = (&saturation.liquid, &saturation.vapour);
        let factors = self.tau_factors(liquid.temperature);
        let vapour_factors = (vapour.temperature != liquid.temperature)
            .then(|| self.tau_factors(vapour.temperature));
        SaturatedPair {
            liquid: self.properties_with(&factors, liquid.temperature, liquid.density),
            vapour: self.properties_with(
                vapour_factors.as_ref().unwrap_or(&factors),
                vapour.temperature,
                vapour.density,
            ),
        }
    }

    fn single_state(&'static self, props: Properties, liquid_side: bool) -> Result<State> {
        finite(self, &props)?;
        Ok(State::single(self, props, liquid_side))
    }

    /// The state at temperature T (K) and pressure p (Pa).
    pub fn state_tp(&'static self, temperature: f64, pressure: f64) -> Result<State> {
        // A seed only starts the density iteration; should one ever lead it astray
        // (none is known to), the plain flash decides. Where there was no seed the
        // error stands (no second try of the same work).
        self.state_tp_from(temperature, pressure, true)
            .or_else(|error| {
                if !self.pseudo_pure && self.density_seed(temperature, pressure).is_some() {
                    self.state_tp_from(temperature, pressure, false)
                } else {
                    Err(error)
                }
            })
    }

    /// [`Fluid::state_tp`] with the density iteration seeded as without the seed
    /// grid: what the grid's own nodes are computed by.
    pub(crate) fn state_tp_unseeded(
        &'static self,
        temperature: f64,
        pressure: f64,
    ) -> Result<State> {
        self.state_tp_from(temperature, pressure, false)
    }

    /// [`Fluid::state_tp`], its density iteration seeded from the seed grid (see
    /// `seed_grid`) when `from_grid` and the grid has a seed there; no second
    /// try without it.
    pub(crate) fn state_tp_from(
        &'static self,
        temperature: f64,
        pressure: f64,
        from_grid: bool,
    ) -> Result<State> {
        self.check_range(temperature, pressure)?;
        let (seed, side) = if from_grid && !self.pseudo_pure {
            self.density_seed_and_side(temperature, pressure)
                .map_or((None, None), |(density, side)| (Some(density), side))
        } else {
            (None, None)
        };
        let factors = self.tau_factors(temperature);
        // Below the critical temperature in a cell wholly on one side of the
        // saturation line: that side's branch, bounded by the critical density
        // instead of the saturated one (no saturation table needed), and the root
        // kept where it is mechanically stable (∂p/∂ρ > 0, so not between the
        // spinodals); a stable root on the cell's side of the critical density is the
        // stable state. Else the search below decides.
        if let Some(branch) = side.filter(|_| temperature < self.saturation_temperature_max()) {
            let critical = self.critical.density;
            let bounds = Some((critical, critical));
            if let Ok(rho) =
                self.density_on_branch(&factors, temperature, pressure, branch, seed, bounds)
            {
                let props = self.properties_with(&factors, temperature, rho);
                if props.dp_drho > 0.0 {
                    return self.single_state(props, branch == Branch::Liquid);
                }
            }
        }
        // The density on a branch, seeded and bounded by the saturated densities at T.
        let on_branch = |branch: Branch| {
            self.density_on_branch(&factors, temperature, pressure, branch, seed, None)
        };
        if temperature >= self.saturation_temperature_max() {
            let rho = on_branch(Branch::Supercritical)?;
            return self.single_state(self.properties_with(&factors, temperature, rho), false);
        }
        if self.pseudo_pure {
            let bubble = self.ancillaries.bubble_pressure.value(temperature);
            let dew = self.ancillaries.dew_pressure.value(temperature);
            let top = self.saturation_pressure_range().1;
            if pressure >= bubble || pressure <= dew || pressure >= top {
                let branch = if pressure >= bubble || pressure >= top {
                    Branch::Liquid
                } else {
                    Branch::Vapour
                };
                let rho = match on_branch(branch) {
                    Ok(rho) => rho,
                    // Above the top of the two-phase range but below the bubble
                    // pressure (a sliver next to the critical point), the isotherm
                    // may have no liquid root: its one root is found from the ideal gas.
                    Err(_) if pressure < bubble => on_branch(Branch::Supercritical)?,
                    Err(e) => return Err(e),
                };
                return self.single_state(
                    self.properties_with(&factors, temperature, rho),
                    rho > self.critical.density,
                );
            }
            // Between the dew and bubble pressures: two-phase, quality from the
            // temperature's place between the bubble and dew temperatures at p.
            let pair = self.saturated_pair_at_pressure(pressure)?;
            let (tb, td) = (pair.liquid.temperature, pair.vapour.temperature);
            let quality = ((temperature - tb) / (td - tb)).clamp(0.0, 1.0);
            return Ok(State::two_phase(self, pair, quality));
        }
        // The table's vapour pressure decides unless p lies within a few times the
        // cell's measured error of it, or the table's densities, which seed and bound
        // the density search, are poor there (next to the critical point).
        let clear = self
            .saturation_table
            .at_temperature(temperature)
            .filter(|line| line.error.density < SEED_DENSITY_ERROR)
            .and_then(|line| {
                let margin = TABLE_MARGIN * line.error.ln_pressure + 1e-9;
                let distance = (pressure / line.pressure).ln();
                if distance > margin {
                    Some(Branch::Liquid)
                } else if distance < -margin {
                    Some(Branch::Vapour)
                } else {
                    None
                }
            });
        let (branch, saturated) = if let Some(branch) = clear {
            (branch, None)
        } else {
            let saturation = self.saturation_at_temperature(temperature)?;
            let psat = saturation.vapour.pressure;
            if (pressure - psat).abs() <= 1e-12 * psat {
                return Err(Error::ImpossibleState {
                    fluid: self.name.clone(),
                    detail: format!(
                        "T = {temperature} K and p = {pressure} Pa lie on the saturation line, where they do not fix the state; give the quality instead"
                    ),
                });
            }
            let branch = if pressure > psat {
                Branch::Liquid
            } else {
                Branch::Vapour
            };
            (
                branch,
                Some((saturation.liquid.density, saturation.vapour.density)),
            )
        };
        let rho =
            self.density_on_branch(&factors, temperature, pressure, branch, seed, saturated)?;
        self.single_state(
            self.properties_with(&factors, temperature, rho),
            branch == Branch::Liquid,
        )
    }

    /// The state at temperature T (K) and density ρ (kg/m³).
    pub fn state_t_rho(&'static self, temperature: f64, density: f64) -> Result<State> {
        if !(density > 0.0 && density.is_finite()) {
            return Err(Error::ImpossibleState {
                fluid: self.name.clone(),
                detail: format!("density {density} kg/m³ must be positive"),
            });
        }
        if temperature < self.saturation_temperature_max() && temperature >= self.triple_temperature
        {
            let saturation = self.saturation_at_temperature(temperature)?;
            let (rl, rv) = (saturation.liquid.density, saturation.vapour.density);
            let inside = density > rv && density < rl;
            // Air above the top of its two-phase range (a sliver next to the critical
            // point, between its bubble and dew densities) is single-phase, as the
            // (T, p) flash takes it.
            let above_two_phase = inside
                && self.pseudo_pure
                && self.pressure(temperature, density) >= self.saturation_pressure_range().1;
            if inside && !above_two_phase {
                if self.pseudo_pure {
                    return self.pseudo_pure_two_phase_t_rho(temperature, density);
                }
                let volume = 1.0 / density;
                let quality = (volume - 1.0 / rl) / (1.0 / rv - 1.0 / rl);
                return Ok(State::two_phase(self, self.pair(&saturation), quality));
            }
            let props = self.properties(temperature, density);
            self.check_range(temperature, props.pressure)?;
            let liquid_side = if above_two_phase {
                density > self.critical.density
            } else {
                density >= rl
            };
            return self.single_state(props, liquid_side);
        }
        let props = self.properties(temperature, density);
        self.check_range(temperature, props.pressure)?;
        self.single_state(props, false)
    }

    /// Air between its bubble and dew densities at T: the quality whose two-phase
    /// state (see [`Fluid::state_t_quality`]) has density ρ, by bisection.
    fn pseudo_pure_two_phase_t_rho(&'static self, temperature: f64, density: f64) -> Result<State> {
        let (mut low, mut high) = (0.0, 1.0);
        let mut last = f64::INFINITY;
        for _ in 0..PSEUDO_PURE_DENSITY_CAP {
            let mid = 0.5 * (low + high);
            let state = self.state_t_quality(temperature, mid)?;
            last = (state.density - density) / density;
            if last.abs() < 1e-13 || high - low < 1e-15 {
                return Ok(state);
            }
            if state.density > density {
                low = mid;
            } else {
                high = mid;
            }
        }
        Err(Error::NoConvergence {
            solver: "two-phase quality from temperature and density",
            iterations: PSEUDO_PURE_DENSITY_CAP,
            residual: last,
            context: format!(
                " for {} at T = {temperature} K, ρ = {density} kg/m³",
                self.name
            ),
        })
    }

    fn check_quality(&self, quality: f64) -> Result<()> {
        if (0.0..=1.0).contains(&quality) {
            Ok(())
        } else {
            Err(Error::ImpossibleState {
                fluid: self.name.clone(),
                detail: format!("quality {quality} must lie between 0 and 1"),
            })
        }
    }

    /// The two-phase state at temperature T (K) and quality x.
    pub fn state_t_quality(&'static self, temperature: f64, quality: f64) -> Result<State> {
        self.check_quality(quality)?;
        if !self.pseudo_pure {
            let saturation = self.saturation_at_temperature(temperature)?;
            return Ok(State::two_phase(self, self.pair(&saturation), quality));
        }
        // Air: the pressure at which T′(p) + x(T″(p) − T′(p)) = T, on the ancillaries.
        let bubble = &self.ancillaries.bubble_pressure;
        let dew = &self.ancillaries.dew_pressure;
        self.saturation_at_temperature(temperature)?; // range check
        let (t_low, t_high) = (self.triple_temperature, self.saturation_temperature_max());
        let target = |p: f64| -> Result<f64> {
            let tb = bubble.temperature_at(p, t_low, t_high)?;
            let td = dew.temperature_at(p, t_low, t_high)?;
            Ok(tb + quality * (td - tb) - temperature)
        };
        // The root lies between the dew and bubble pressures at T.
        let (mut a, mut b) = (dew.value(temperature), bubble.value(temperature));
        let mut fa = target(a)?;
        for _ in 0..PSEUDO_PURE_BISECTION_CAP {
            let mid = (a * b).sqrt();
            let fm = target(mid)?;
            if (fm < 0.0) == (fa < 0.0) {
                a = mid;
                fa = fm;
            } else {
                b = mid;
            }
            if (b - a).abs() < 1e-15 * b {
                break;
            }
        }
        let pair = self.saturated_pair_at_pressure((a * b).sqrt())?;
        let state = State::two_phase(self, pair, quality);
        if (state.temperature - temperature).abs() > 1e-9 * temperature {
            return Err(Error::OutOfRange {
                fluid: self.name.clone(),
                what: format!("T = {temperature} K with quality {quality}"),
                detail: format!(
                    "no two-phase state of this pseudo-pure fluid has them both: its bubble point would lie below the triple point {} K",
                    self.triple_temperature
                ),
            });
        }
        Ok(state)
    }

    /// The two-phase state at pressure p (Pa) and quality x.
    pub fn state_p_quality(&'static self, pressure: f64, quality: f64) -> Result<State> {
        self.check_quality(quality)?;
        let pair = self.saturated_pair_at_pressure(pressure)?;
        Ok(State::two_phase(self, pair, quality))
    }

    /// The state at pressure p (Pa) and specific enthalpy h (J/kg).
    pub fn state_ph(&'static self, pressure: f64, enthalpy: f64) -> Result<State> {
        self.state_at_pressure(pressure, enthalpy, Held::Enthalpy)
    }

    /// The state at (p, h) when a nearby single-phase state is known, as along an
    /// exchanger's profile: a few Newton steps in T from it, accepted only when the
    /// answer lies clearly on the same side of saturation; otherwise the full
    /// [`Fluid::state_ph`].
    pub fn state_ph_near(
        &'static self,
        pressure: f64,
        enthalpy: f64,
        near: &State,
    ) -> Result<State> {
        if let Some(state) = self.near_single_phase(pressure, enthalpy, Held::Enthalpy, near) {
            return Ok(state);
        }
        self.state_ph(pressure, enthalpy)
    }

    fn near_single_phase(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
        near: &State,
    ) -> Option<State> {
        let start = near.single_phase?;
        if !std::ptr::eq(near.fluid, self) || self.pseudo_pure {
            return None;
        }
        let region = match near.phase {
            Phase::Liquid => Region::Liquid,
            Phase::Vapour => Region::Vapour,
            Phase::Gas | Phase::Supercritical => Region::AboveCritical,
            Phase::TwoPhase => return None,
        };
        if pressure > self.pressure_max || pressure <= 0.0 {
            return None;
        }
        // Newton in (T, ρ) together, one property evaluation a step; a root on the
        // other side of the critical density is refused (a metastable branch), and
        // the temperature-only Newton below is the fallback.
        let joint = self
            .joint_newton(
                pressure,
                target,
                held,
                &start,
                (self.temperature_min, self.temperature_max),
            )
            .filter(|props| match region {
                Region::Liquid => props.density > self.critical.density,
                Region::Vapour => props.density < self.critical.density,
                Region::AboveCritical => {
                    props.temperature > self.critical.temperature
                        || pressure > self.critical.pressure
                }
            });
        let mut current = start;
        if let Some(props) = joint {
            current = props;
        } else if (current.pressure - pressure).abs() > 1e-12 * pressure {
            current = self
                .properties_near(region, current.temperature, pressure, &current)
                .ok()?;
        }
        for _ in 0..if joint.is_some() {
            0
        } else {
            QUICK_NEWTON_STEPS
        } {
            let g = held.of(&current) - target;
            let t = current.temperature;
            if g.abs() <= 0.1 * held.rounding(self, t) {
                break;
            }
            let next = t - g / held.slope(&current);
            if !(next > self.temperature_min && next < self.temperature_max)
                || (next - t).abs() > 0.2 * t
            {
                return None;
            }
            current = self
                .properties_near(region, next, pressure, &current)
                .ok()?;
            if (next - t).abs() <= 1e-12 * t {
                break;
            }
        }
        if (held.of(&current) - target).abs() > held.rounding(self, current.temperature) {
            return None;
        }
        let t = current.temperature;
        // Clearly away from saturation at this pressure (by a few times the table's
        // measured error, as a temperature), or above the critical point.
        let (sat_low, sat_high) = self.saturation_pressure_range();
        if pressure >= sat_low && pressure < sat_high {
            let line = self.saturation_table.at_pressure(pressure)?;
            let t_sat = line.temperature;
            let margin = TABLE_MARGIN * line.error.temperature + 1e-6 * t_sat;
            let clear = match region {
                Region::Liquid => t < t_sat - margin,
                Region::Vapour => t > t_sat + margin,
                Region::AboveCritical => t > self.critical.temperature,
            };
            if !clear {
                return None;
            }
        } else if pressure < sat_low && region == Region::Liquid {
            return None;
        }
        let liquid_side = region == Region::Liquid
            || (region == Region::AboveCritical && t < self.critical.temperature);
        self.single_state(current, liquid_side).ok()
    }

    /// The state at pressure p (Pa) and specific entropy s (J/(kg·K)).
    pub fn state_ps(&'static self, pressure: f64, entropy: f64) -> Result<State> {
        self.state_at_pressure(pressure, entropy, Held::Entropy)
    }

    fn state_at_pressure(&'static self, pressure: f64, target: f64, held: Held) -> Result<State> {
        if !(pressure > 0.0 && pressure <= self.pressure_max * (1.0 + 1e-9) && target.is_finite()) {
            return Err(Error::OutOfRange {
                fluid: self.name.clone(),
                what: format!("p = {pressure} Pa with {} = {target}", held.name()),
                detail: format!(
                    "pressure must be above 0 and up to {} MPa, and {} finite",
                    self.pressure_max / 1e6,
                    held.name()
                ),
            });
        }
        if let Some(state) = self.state_from_isobar_start(pressure, target, held) {
            return Ok(state);
        }
        let (sat_low, sat_high) = self.saturation_pressure_range();
        // The triple-point pressure itself, within rounding, still has both phases.
        if pressure >= sat_low * (1.0 - 1e-9) && pressure < sat_high {
            let pair = match self.clearly_single_phase(pressure, target, held)? {
                Quick::Found(state) => return Ok(*state),
                Quick::Unclear(Some(seeds)) => {
                    self.saturated_pair_at_pressure_seeded(pressure, seeds)?
                }
                Quick::Unclear(None) => self.saturated_pair_at_pressure(pressure)?,
            };
            let (at_liquid, at_vapour) = (held.of(&pair.liquid), held.of(&pair.vapour));
            // A target within rounding of a saturated state is that saturated state.
            let slack = 1e-11 * (at_vapour - at_liquid);
            if target >= at_liquid - slack && target <= at_vapour + slack {
                let quality = ((target - at_liquid) / (at_vapour - at_liquid)).clamp(0.0, 1.0);
                return Ok(State::two_phase(self, pair, quality));
            }
            if target < at_liquid {
                return self.search_temperature(
                    pressure,
                    target,
                    held,
                    Region::Liquid,
                    pair.liquid,
                );
            }
            return self.search_temperature(pressure, target, held, Region::Vapour, pair.vapour);
        }
        let region = if pressure < sat_low {
            Region::Vapour
        } else {
            Region::AboveCritical
        };
        let coldest = self
            .melting_temperature(pressure)
            .unwrap_or(self.temperature_min)
            .max(self.temperature_min);
        let start_t = self
            .ideal_gas_estimate(pressure, target, held, 2.0 * self.critical.temperature)
            .clamp(coldest * (1.0 + 1e-6), self.temperature_max);
        // First straight from the ideal-gas start: above the saturation range the
        // stable root is unique, so a converged joint Newton is the answer.
        if region == Region::AboveCritical && start_t > self.critical.temperature {
            let guess = self.properties(
                start_t,
                self.ideal_gas_density(start_t, pressure)
                    .min(0.2 * self.density_ceiling),
            );
            if let Some(found) = self.newton_in_temperature_and_density(
                pressure,
                target,
                held,
                region,
                &guess,
                (coldest, f64::INFINITY),
            ) {
                return found;
            }
        }
        let start = self.state_tp(start_t, pressure)?;
        let props = start.single_phase.ok_or_else(|| Error::ImpossibleState {
            fluid: self.name.clone(),
            detail: "starting state is two-phase".into(),
        })?;
        // Above the saturation range the stable root is unique: try the joint Newton.
        self.newton_in_temperature_and_density(
            pressure,
            target,
            held,
            region,
            &props,
            (coldest, f64::INFINITY),
        )
        .unwrap_or_else(|| self.search_temperature(pressure, target, held, region, props))
    }

    /// The state at (p, target) by the joint Newton from the seed grid's start (see
    /// `seed_grid`), accepted only inside the start's cell, where no phase boundary
    /// lies, on the side of the critical density the cell's corners are, and within
    /// [`ISOBAR_BRANCH_TOLERANCE`] of the density the cell interpolates (not another
    /// root of p(T, ρ) = p); `None` otherwise, and for air.
    fn state_from_isobar_start(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
    ) -> Option<State> {
        if self.pseudo_pure {
            return None;
        }
        let quantity = match held {
            Held::Enthalpy => Quantity::Enthalpy,
            Held::Entropy => Quantity::Entropy,
        };
        let start = self.isobar_start(pressure, target, quantity)?;
        let props = self.properties(start.temperature, start.density);
        let found = self.joint_newton(pressure, target, held, &props, start.temperatures)?;
        // Below the critical temperature a root on the other side of the critical
        // density than the cell's corners is metastable (the joint Newton refuses
        // unstable ones, where ∂p/∂ρ ≤ 0).
        if found.temperature < self.saturation_temperature_max() {
            let denser = found.density > self.critical.density;
            if (start.vapour && denser) || (start.liquid && !denser) {
                return None;
            }
        }
        let interpolated = self.density_seed(found.temperature, pressure)?;
        if (found.density / interpolated - 1.0).abs() > ISOBAR_BRANCH_TOLERANCE {
            return None;
        }
        // A stable single-phase state below the critical temperature is a liquid
        // where denser than critical, as the (T, p) flash labels it.
        let liquid_side = found.temperature < self.saturation_temperature_max()
            && found.density > self.critical.density;
        self.single_state(found, liquid_side).ok()
    }

    /// The state at (p, target) when it clearly lies away from saturation, judged by
    /// the tabulated saturation line: the target must lie beyond the table's saturated
    /// value at p by [`TABLE_MARGIN`] times the cell's measured error. Then a joint
    /// Newton from the table's saturated state (or, far into the gas, from the
    /// ideal-gas estimate) finds it. `Unclear` otherwise, with the table's saturated
    /// states as seeds; `Unclear(None)` near the critical point and for air.
    fn clearly_single_phase(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
    ) -> Result<Quick> {
        if self.pseudo_pure || pressure > QUICK_PRESSURE_LIMIT * self.critical.pressure {
            return Ok(Quick::Unclear(None));
        }
        let Some(line) = self.saturation_table.at_pressure(pressure) else {
            return Ok(Quick::Unclear(None));
        };
        let temperature = line.temperature;
        let (at_liquid, at_vapour, error) = match held {
            Held::Enthalpy => (
                line.liquid_enthalpy,
                line.vapour_enthalpy,
                line.error.enthalpy,
            ),
            Held::Entropy => (line.liquid_entropy, line.vapour_entropy, line.error.entropy),
        };
        let margin = TABLE_MARGIN * error + 1e-9 * (at_vapour - at_liquid);
        let slack = TABLE_MARGIN * line.error.temperature + 1e-9 * temperature;
        // A single-phase state below the critical pressure is a vapour less dense than
        // critical, or a liquid denser than critical; a converged Newton on the other
        // side is a metastable root and is refused.
        let newton_on_side = |region: Region, start: &Properties, bounds: (f64, f64)| match self
            .newton_in_temperature_and_density(pressure, target, held, region, start, bounds)
        {
            Some(Ok(state))
                if (state.density < self.critical.density) == (region == Region::Vapour) =>
            {
                Some(state)
            }
            _ => None,
        };
        // The joint Newton from the table's saturated state, else the bracketed search.
        let settle = |region: Region, start: Properties, bounds: (f64, f64)| {
            match newton_on_side(region, &start, bounds) {
                Some(state) => Ok(state),
                None => self.search_temperature(pressure, target, held, region, start),
            }
            .map(|state| Quick::Found(Box::new(state)))
        };
        if target > at_vapour + margin {
            let bounds = (temperature - slack, f64::INFINITY);
            // Far into the gas (judged by the ideal-gas estimate), start from the
            // ideal gas.
            let estimate = self.ideal_gas_estimate(pressure, target, held, temperature);
            if estimate > 1.5 * temperature {
                let t0 = estimate.min(self.temperature_max * 0.999);
                let start = self.properties(t0, self.ideal_gas_density(t0, pressure));
                if let Some(state) = newton_on_side(Region::Vapour, &start, bounds) {
                    return Ok(Quick::Found(Box::new(state)));
                }
            }
            let start = self.properties(temperature, line.vapour_density);
            return settle(Region::Vapour, start, bounds);
        }
        if target < at_liquid - margin {
            let start = self.properties(temperature, line.liquid_density);
            return settle(Region::Liquid, start, (0.0, temperature + slack));
        }
        // Too close to call: the table's saturated states seed the exact solve.
        Ok(Quick::Unclear(Some((
            temperature,
            line.liquid_density,
            line.vapour_density,
        ))))
    }

    /// Newton in (T, ρ) together on p(T, ρ) = p and h (or s)(T, ρ) = target, from a
    /// single-phase start: one property evaluation a step, no nested density solve.
    /// `None` unless it converges with T inside `bounds` (open), on a stable branch
    /// and in range; the bracketed search then takes over.
    fn newton_in_temperature_and_density(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
        region: Region,
        start: &Properties,
        bounds: (f64, f64),
    ) -> Option<Result<State>> {
        let props = self.joint_newton(pressure, target, held, start, bounds)?;
        // Above the saturation range but below the critical temperature: a liquid
        // where denser than critical (a pure fluid's compressed liquid), as the
        // (T, p) flash labels it.
        let liquid_side = region == Region::Liquid
            || (region == Region::AboveCritical
                && props.temperature < self.critical.temperature
                && props.density > self.critical.density);
        Some(self.single_state(props, liquid_side))
    }

    /// The properties where p(T, ρ) = p and h (or s)(T, ρ) = target, by Newton in
    /// (T, ρ) together from `start`; `None` unless it converges with T inside
    /// `bounds` (open), mechanically stable (∂p/∂ρ > 0) and in range.
    fn joint_newton(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
        start: &Properties,
        bounds: (f64, f64),
    ) -> Option<Properties> {
        let (mut t, mut rho) = (start.temperature, start.density);
        let mut props = *start;
        for _ in 0..NEAR_NEWTON_STEPS {
            let f1 = props.pressure - pressure;
            let f2 = held.of(&props) - target;
            let (a, b) = (props.dp_dt, props.dp_drho);
            let (c, d) = match held {
                Held::Enthalpy => (
                    props.cv + props.dp_dt / rho,
                    props.dp_drho / rho - t * props.dp_dt / (rho * rho),
                ),
                Held::Entropy => (props.cv / t, -props.dp_dt / (rho * rho)),
            };
            let det = a * d - b * c;
            if !(det.is_finite() && det != 0.0) {
                return None;
            }
            let dt = (-f1 * d + f2 * b) / det;
            let drho = (-a * f2 + c * f1) / det;
            // Keep steps modest: at most half of T, half of ρ.
            let scale = (1.0f64)
                .min(0.5 * t / dt.abs().max(1e-300))
                .min(0.5 * rho / drho.abs().max(1e-300));
            t += scale * dt;
            rho += scale * drho;
            if !(t > bounds.0
                && t < bounds.1
                && t > self.temperature_min
                && t < self.temperature_max
                && rho > 0.0)
            {
                return None;
            }
            props = self.properties_with(&self.tau_factors(t), t, rho);
            let converged = (props.pressure - pressure).abs()
                <= 1e-14 * pressure + 1e-14 * rho * self.gas_constant * t
                && (held.of(&props) - target).abs() <= 0.1 * held.rounding(self, t);
            if converged {
                if !(props.dp_drho > 0.0) || self.check_range(t, pressure).is_err() {
                    return None;
                }
                return Some(props);
            }
        }
        None
    }

    /// A temperature from the ideal-gas relations (Newton from `start`), clamped to
    /// the range.
    fn ideal_gas_estimate(&self, pressure: f64, target: f64, held: Held, start: f64) -> f64 {
        let (low, high) = (self.temperature_min, self.temperature_max);
        let mut t = start.clamp(low, high);
        for _ in 0..IDEAL_GAS_ESTIMATE_STEPS {
            let tau = self.tau(t);
            // An enthalpy needs no α⁰ itself (nor its logarithms).
            let i = match held {
                Held::Enthalpy => self.ideal.evaluate_tau_derivatives(tau),
                Held::Entropy => self.ideal.evaluate(tau),
            };
            let r = self.gas_constant;
            let cp = r * (1.0 - tau * tau * i.alpha_tau_tau);
            // Newton in T for an enthalpy (nearly linear in T), in ln T for an
            // entropy (nearly linear in ln T: ds/d(ln T) = cp), each a step or two
            // from a start far off where the other would creep.
            let next = match held {
                Held::Enthalpy => {
                    let value = r * t * (1.0 + tau * i.alpha_tau);
                    t - (value - target) / cp
                }
                Held::Entropy => {
                    let delta = self.delta(self.ideal_gas_density(t, pressure));
                    let value = r * (tau * i.alpha_tau - i.alpha - delta.ln());
                    t * super::fast_exp::exp((-(value - target) / cp).clamp(-2.0, 2.0))
                }
            }
            .clamp(low, high);
            // A start for the real-gas search, whose own first step corrects by
            // far more than this.
            if (next - t).abs() < 1e-6 * t {
                return next;
            }
            t = next;
        }
        t
    }

    fn branch_for(&self, region: Region, temperature: f64) -> Branch {
        let above = temperature >= self.saturation_temperature_max();
        match region {
            Region::Liquid => Branch::Liquid,
            Region::Vapour if above => Branch::Supercritical,
            Region::Vapour => Branch::Vapour,
            Region::AboveCritical if above => Branch::Supercritical,
            Region::AboveCritical => Branch::Liquid,
        }
    }

    /// Single-phase properties at (T, p) on the region's branch, seeded from a nearby
    /// state.
    fn properties_near(
        &self,
        region: Region,
        temperature: f64,
        pressure: f64,
        near: &Properties,
    ) -> Result<Properties> {
        let factors = self.tau_factors(temperature);
        let branch = self.branch_for(region, temperature);
        let drho_dt = -near.dp_dt / near.dp_drho;
        let guess = near.density + drho_dt * (temperature - near.temperature);
        let guess = if guess > 0.0 { guess } else { near.density };
        // A guess extrapolated far along a steep saturated-liquid curve can fall outside
        // Newton's reach; the ancillary seeds are the fallback.
        let rho = match self.density_on_branch(
            &factors,
            temperature,
            pressure,
            branch,
            Some(guess),
            None,
        ) {
            Ok(rho) => rho,
            Err(_) => {
                self.density_on_branch(&factors, temperature, pressure, branch, None, None)?
            }
        };
        Ok(self.properties_with(&factors, temperature, rho))
    }

    /// Newton search in T at fixed p for the held property, kept inside a bracket.
    fn search_temperature(
        &'static self,
        pressure: f64,
        target: f64,
        held: Held,
        region: Region,
        start: Properties,
    ) -> Result<State> {
        let limit_low = match region {
            Region::Vapour => self.temperature_min,
            _ => self
                .melting_temperature(pressure)
                .unwrap_or(self.temperature_min)
                .max(self.temperature_min),
        };
        let limit_high = self.temperature_max;
        // Bracket ends: (temperature, known to bound the root).
        let mut low = (limit_low, false);
        let mut high = (limit_high, false);
        let g_start = held.of(&start) - target;
        match region {
            Region::Liquid => high = (start.temperature, true),
            Region::Vapour if start.temperature > limit_low && g_start < 0.0 => {
                low = (start.temperature, true)
            }
            _ => {}
        }
        let out_of_range = |end: &str, t: f64| Error::OutOfRange {
            fluid: self.name.clone(),
            what: format!(
                "{} = {} at p = {:.6} MPa",
                held.name(),
                held.unit_value(target),
                pressure / 1e6
            ),
            detail: format!(
                "it would need a temperature {end} {t:.4} K, the equation's limit at this pressure"
            ),
        };
        let mut current = start;
        let mut residual = g_start;
        let mut previous = f64::INFINITY;
        for _ in 0..TEMPERATURE_ITERATION_CAP {
            let g = held.of(&current) - target;
            residual = g;
            // Newton bounces across an S-shaped stretch (near the critical point cp
            // peaks): when a step fails to halve the residual inside a closed
            // bracket, bisect instead.
            let slow = g.abs() > 0.5 * previous;
            previous = g.abs();
            let t = current.temperature;
            if g < 0.0 {
                if t > low.0 || !low.1 {
                    low = (t, true);
                }
            } else if t < high.0 || !high.1 {
                high = (t, true);
            }
            let slope = held.slope(&current);
            let mut next = t - g / slope;
            if slow && low.1 && high.1 {
                next = 0.5 * (low.0 + high.0);
            } else if !(slope > 0.0) || !next.is_finite() || next <= low.0 || next >= high.0 {
                // Outside the bracket: probe an unchecked limit, or bisect.
                let liquid_side = |t: f64| {
                    matches!(region, Region::Liquid)
                        || (region == Region::AboveCritical && t < self.critical.temperature)
                };
                if next >= high.0 && !high.1 {
                    let props = self.properties_near(region, high.0, pressure, &current)?;
                    if (held.of(&props) - target).abs() <= held.rounding(self, high.0) {
                        return self.single_state(props, liquid_side(high.0));
                    }
                    if held.of(&props) < target {
                        return Err(out_of_range("above", high.0));
                    }
                    high.1 = true;
                    current = props;
                    continue;
                }
                if next <= low.0 && !low.1 {
                    let props = self.properties_near(region, low.0, pressure, &current)?;
                    if (held.of(&props) - target).abs() <= held.rounding(self, low.0) {
                        return self.single_state(props, liquid_side(low.0));
                    }
                    if held.of(&props) > target {
                        return Err(out_of_range("below", low.0));
                    }
                    low.1 = true;
                    current = props;
                    continue;
                }
                next = 0.5 * (low.0 + high.0);
            }
            let converged = (next - t).abs() <= 1e-12 * t;
            current = self.properties_near(region, next, pressure, &current)?;
            if converged || (held.of(&current) - target).abs() <= 0.1 * held.rounding(self, next) {
                let liquid_side = matches!(region, Region::Liquid)
                    || (region == Region::AboveCritical && next < self.critical.temperature);
                return self.single_state(current, liquid_side);
            }
        }
        Err(Error::NoConvergence {
            solver: "temperature from pressure and enthalpy or entropy",
            iterations: TEMPERATURE_ITERATION_CAP,
            residual,
            context: format!(
                " for {} at p = {pressure} Pa, {} = {target}",
                self.name,
                held.name()
            ),
        })
    }
}
