//! Hydrogen of any para fraction: an ideal solution of the parahydrogen and
//! orthohydrogen equations of Leachman et al. (2009) on one datum.
//!
//! Each species keeps its published equation. The ortho equation's enthalpy and
//! entropy are shifted by constants (A, B) so that, in the ideal gas, h_o − h_p is the
//! rotational energy difference and μ_o − μ_p = −RT ln(3 Z_odd/Z_even) (see
//! [`super::spin`]); A and B are the least-squares constants over 20–300 K and the
//! largest misfit is kept in [`Alignment`]. A common shift then puts the 25 % solution
//! on the normal-hydrogen equation's value at 300 K and 101.325 kPa, so that blend
//! states and frozen-normal `hydrogen` states share one datum.
//!
//! At (T, p) and para mole fraction x, each species sits at its own density on the
//! same branch; volumes, enthalpies, heat capacities add by mass fraction, and the
//! ideal mixing entropy −R Σ xᵢ ln xᵢ (per mole) is added. Two phases share one
//! composition (no fractionation): the blend boils at the temperature where the
//! mole-weighted Gibbs energies of liquid and vapour are equal, between the two
//! species' saturation temperatures. Between the two critical points the model is
//! refused (see [`Blend::check`]).

use super::density::Branch;
use super::fluid::{Fluid, Properties};
use super::recent::{remembered, Recent};
use super::spec::{Property, Spec};
use super::spin;
use super::state::{SaturatedPair, State};
use crate::error::{Error, Result};
use std::cell::RefCell;
use std::sync::OnceLock;

/// The highest pressure at which the blend is given two phases, Pa: below the
/// parahydrogen critical pressure (1.2858 MPa) by a margin, since the pseudo-pure
/// saturation of the solution loses meaning as the para liquid vanishes.
pub const BLEND_SATURATION_PRESSURE_MAX: f64 = 1.2e6;

/// How well the aligned equations meet the two ideal-gas conditions, J/mol: the
/// largest misfit over the fit's temperatures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Alignment {
    /// The ortho enthalpy shift A, J/mol.
    pub ortho_enthalpy_shift: f64,
    /// The ortho entropy shift B, J/(mol·K).
    pub ortho_entropy_shift: f64,
    /// Largest |h_o − h_p − ΔE_rot| over 20–300 K, J/mol.
    pub enthalpy_misfit: f64,
    /// Largest |μ_o − μ_p + RT ln(3 Z_odd/Z_even)| over 20–300 K, J/mol.
    pub gibbs_misfit: f64,
}

/// The ortho–para solution model: the two species' equations, the normal-hydrogen
/// equation whose datum it shares, and the shifts.
#[derive(Debug)]
pub struct Blend {
    /// The parahydrogen equation.
    pub para: &'static Fluid,
    /// The orthohydrogen equation.
    pub ortho: &'static Fluid,
    /// The normal-hydrogen equation (the fluid blend states report as theirs).
    pub normal: &'static Fluid,
    /// The alignment constants and their misfit.
    pub alignment: Alignment,
    /// Added to every ortho enthalpy, J/kg (A/M_o).
    ortho_enthalpy: f64,
    /// Added to every ortho entropy, J/(kg·K) (B/M_o).
    ortho_entropy: f64,
    /// Added to every blend enthalpy, J/kg.
    common_enthalpy: f64,
    /// Added to every blend entropy, J/(kg·K).
    common_entropy: f64,
}

thread_local! {
    /// The last few pressures (their bits) whose species' boiling temperatures
    /// were found, with them ([`Blend::boiling_temperatures`]); there is one blend.
    static LAST_BOILING: RefCell<Recent<u64, (f64, f64)>> =
        const { RefCell::new(Recent::new(KEPT_PRESSURES)) };
    /// The last few (pressure, para fraction) pairs' saturation temperatures with
    /// both species on both sides there ([`Blend::saturation`]).
    static LAST_SATURATION: RefCell<Recent<(u64, u64), Saturation>> =
        const { RefCell::new(Recent::new(KEPT_COMPOSITIONS)) };
    /// The last few (pressure, para fraction) pairs' saturated liquid and vapour
    /// ([`Blend::saturated_pair`]).
    static LAST_SATURATED_PAIR: RefCell<Recent<(u64, u64), SaturatedPair>> =
        const { RefCell::new(Recent::new(KEPT_COMPOSITIONS)) };
    /// Both species at this thread's last two single-phase answers of (p, h) or
    /// (p, s) searches, [the one before, the last], each with its side (`true` for
    /// the liquid side): the next search nearby starts its species' densities from
    /// them ([`Blend::joint_search`]).
    static LAST_SPECIES: std::cell::Cell<[Option<Answer>; 2]> =
        const { std::cell::Cell::new([None, None]) };
}

/// How far (relative, in temperature and in pressure) a search may start from the
/// last answer's species for their densities to seed it.
const JOINT_REACH: f64 = 0.05;

/// Step cap of the joint search; past it the nested search takes over.
const JOINT_STEPS: usize = 8;

/// A joint step within this fraction of every variable ends the joint search (one
/// more evaluation, one step on, unless it is within rounding): the temperature
/// search's own tolerance.
const JOINT_TOLERANCE: f64 = 1e-13;

/// A joint step within this fraction of every variable: the point is the root as
/// closely as the equations can tell.
const JOINT_ROUNDING: f64 = 1e-15;

/// A saturation temperature of the solution (K) and both species' properties
/// there, [liquid, vapour], each (para, ortho).
type Saturation = (f64, [(Properties, Properties); 2]);

/// Both species' boiling temperatures at a pressure with their molar entropies of
/// vaporisation, [(T, Δs) of para, of ortho], and bounds (below both, above both).
type BoilingEstimates = ([(f64, f64); 2], (f64, f64));

/// How many pressures' boiling temperatures are kept: a flowsheet's two-phase
/// hydrogen sits at a few pressures (valve outlets, separators, feeds).
const KEPT_PRESSURES: usize = 8;

/// How many (pressure, para fraction) pairs' saturation answers are kept: each
/// two-phase stream of a pass asks its own, and settled passes ask them again.
const KEPT_COMPOSITIONS: usize = 16;

/// The ideal-gas enthalpy and entropy of one species at (T, p), per mole.
fn ideal_gas_molar(fluid: &Fluid, temperature: f64, pressure: f64) -> (f64, f64) {
    let (enthalpy, entropy) = fluid.ideal_gas_enthalpy_entropy(temperature, pressure);
    (enthalpy * fluid.molar_mass, entropy * fluid.molar_mass)
}

/// Temperatures over which the alignment constants are fitted, K.
fn fit_temperatures() -> impl Iterator<Item = f64> {
    (20..=300).map(f64::from)
}

impl Blend {
    /// The model, built on first use.
    pub fn get() -> Result<&'static Blend> {
        static BLEND: OnceLock<std::result::Result<Blend, Error>> = OnceLock::new();
        BLEND
            .get_or_init(|| {
                Blend::build(
                    super::fluid("parahydrogen")?,
                    super::fluid("orthohydrogen")?,
                    super::fluid("hydrogen")?,
                )
            })
            .as_ref()
            .map_err(Clone::clone)
    }

    fn build(para: &'static Fluid, ortho: &'static Fluid, normal: &'static Fluid) -> Result<Blend> {
        let pressure = 1.0; // Pa; the ideal-gas parts do not depend on it except by ln p.

        // (T, Δh and Δs of the equations' ideal gases, ΔE and Δμ of the rotational
        // sums), ortho less para, per mole.
        let differences: Vec<(f64, f64, f64, f64, f64)> = fit_temperatures()
            .map(|t| {
                let (hp, sp) = ideal_gas_molar(para, t, pressure);
                let (ho, so) = ideal_gas_molar(ortho, t, pressure);
                let (energy, gibbs) = spin::ortho_para_differences(t);
                (t, ho - hp, so - sp, energy, gibbs)
            })
            .collect();
        let count = differences.len() as f64;
        let a = differences
            .iter()
            .map(|&(_, dh, _, energy, _)| energy - dh)
            .sum::<f64>()
            / count;
        // μ_o − μ_p = (Δh + A) − T(Δs + B) = Δμ_rot: least squares for B in T·B.
        let (mut numerator, mut denominator) = (0.0, 0.0);
        for &(t, dh, ds, _, gibbs) in &differences {
            let residual = dh + a - t * ds - gibbs;
            numerator += t * residual;
            denominator += t * t;
        }
        let b = numerator / denominator;
        let mut enthalpy_misfit: f64 = 0.0;
        let mut gibbs_misfit: f64 = 0.0;
        for &(t, dh, ds, energy, gibbs) in &differences {
            enthalpy_misfit = enthalpy_misfit.max((dh + a - energy).abs());
            gibbs_misfit = gibbs_misfit.max((dh + a - t * (ds + b) - gibbs).abs());
        }
        let mut blend = Blend {
            para,
            ortho,
            normal,
            alignment: Alignment {
                ortho_enthalpy_shift: a,
                ortho_entropy_shift: b,
                enthalpy_misfit,
                gibbs_misfit,
            },
            ortho_enthalpy: a / ortho.molar_mass,
            ortho_entropy: b / ortho.molar_mass,
            common_enthalpy: 0.0,
            common_entropy: 0.0,
        };
        // The common datum: the 25 % solution equals normal hydrogen at 300 K, 1 atm.
        let (t0, p0) = (300.0, crate::quantity::STANDARD_ATMOSPHERE);
        let reference = blend.tp_properties(t0, p0, spin::NORMAL_PARA_FRACTION, false)?;
        let normal_state = normal.state_tp(t0, p0)?;
        blend.common_enthalpy = normal_state.enthalpy - reference.enthalpy;
        blend.common_entropy = normal_state.entropy - reference.entropy;
        Ok(blend)
    }

    /// The para mass fraction of a para mole fraction x.
    pub fn para_mass_fraction(&self, para_fraction: f64) -> f64 {
        let para = para_fraction * self.para.molar_mass;
        para / (para + (1.0 - para_fraction) * self.ortho.molar_mass)
    }

    /// The para mole fraction of a para mass fraction w.
    pub fn para_mole_fraction(&self, mass_fraction: f64) -> f64 {
        let para = mass_fraction / self.para.molar_mass;
        para / (para + (1.0 - mass_fraction) / self.ortho.molar_mass)
    }

    /// The molar mass of the solution, kg/mol.
    pub fn molar_mass(&self, para_fraction: f64) -> f64 {
        para_fraction * self.para.molar_mass + (1.0 - para_fraction) * self.ortho.molar_mass
    }

    /// The ideal mixing entropy, J/(kg·K).
    fn mixing_entropy(&self, para_fraction: f64) -> f64 {
        let term = |x: f64| if x > 0.0 { x * x.ln() } else { 0.0 };
        -spin::MOLAR_GAS_CONSTANT * (term(para_fraction) + term(1.0 - para_fraction))
            / self.molar_mass(para_fraction)
    }

    /// An ortho enthalpy difference at equal T and p: h_o − h_p on the aligned datum,
    /// J/kg, from two species' properties.
    fn ortho_minus_para(&self, para: &Properties, ortho: &Properties) -> f64 {
        ortho.enthalpy + self.ortho_enthalpy - para.enthalpy
    }

    /// Checks a para fraction and the (T, p) against both species' ranges and the
    /// window between the critical points where the model is refused.
    pub fn check(&self, temperature: f64, pressure: f64, para_fraction: f64) -> Result<()> {
        if !(0.0..=1.0).contains(&para_fraction) {
            return Err(Error::OutOfRange {
                fluid: "hydrogen".into(),
                what: format!("para fraction {para_fraction}"),
                detail: "a para fraction is a mole fraction from 0 to 1".into(),
            });
        }
        self.para.check_range(temperature, pressure)?;
        self.ortho.check_range(temperature, pressure)?;
        let t_high = self
            .ortho
            .critical
            .temperature
            .max(self.para.critical.temperature);
        let p_high = self
            .ortho
            .critical
            .pressure
            .max(self.para.critical.pressure);
        if temperature < t_high && pressure > BLEND_SATURATION_PRESSURE_MAX && pressure < p_high {
            return Err(Error::OutOfRange {
                fluid: "hydrogen (ortho–para solution)".into(),
                what: format!(
                    "T = {temperature:.4} K, p = {:.4} MPa",
                    pressure / 1e6
                ),
                detail: format!(
                    "next to the critical points of parahydrogen and orthohydrogen (below {t_high} K at {:.2}–{:.4} MPa) the solution model is not defined; move the pressure or use frozen normal `hydrogen`",
                    BLEND_SATURATION_PRESSURE_MAX / 1e6,
                    p_high / 1e6
                ),
            });
        }
        Ok(())
    }

    /// One species' properties at (T, p) on the liquid or vapour side (metastable
    /// where the other species' saturation has been crossed), or at its unique root
    /// above its critical temperature; the τ factors are computed once for the
    /// density search and the properties.
    fn species_properties(
        fluid: &Fluid,
        temperature: f64,
        pressure: f64,
        liquid: bool,
        near: Option<f64>,
    ) -> Result<Properties> {
        let factors = fluid.tau_factors(temperature);
        let density = Self::species_density(fluid, &factors, temperature, pressure, liquid, near)?;
        // The density search's last evaluation, kept per thread, serves these.
        Ok(Self::at_pressure(
            fluid.properties_with(&factors, temperature, density),
            pressure,
        ))
    }

    /// A species' properties at the density found for `pressure`, labelled with that
    /// pressure: the equation's own pressure there differs from it only by the
    /// density search's tolerance (1e-13), and a state keeps the pressure it was
    /// asked at, so that streams at one pressure carry the same bits (and the
    /// solution's saturation at that pressure is solved once).
    fn at_pressure(properties: Properties, pressure: f64) -> Properties {
        Properties {
            pressure,
            ..properties
        }
    }

    /// One species' density at (T, p); see [`Blend::species_properties`].
    fn species_density(
        fluid: &Fluid,
        factors: &super::helmholtz::TauFactors,
        temperature: f64,
        pressure: f64,
        liquid: bool,
        near: Option<f64>,
    ) -> Result<f64> {
        // Above the critical temperature the isotherm has one root.
        let Some(((low, high), (liquid_density, vapour_density))) =
            Self::density_bracket(fluid, temperature, pressure, liquid)
        else {
            return fluid.density_on_branch(
                factors,
                temperature,
                pressure,
                Branch::Supercritical,
                near,
                None,
            );
        };
        let seed = near.filter(|rho| *rho > low && *rho < high);
        let seed = if high.is_finite() {
            seed.unwrap_or_else(|| {
                fluid
                    .ideal_gas_density(temperature, pressure)
                    .min(vapour_density)
            })
        } else {
            seed.unwrap_or(liquid_density)
        };
        fluid.solve_density(factors, temperature, pressure, seed, low, high)
    }

    /// The bracket (low, high) of a species' density search at (T, p) on side
    /// `liquid`, with the approximate saturated densities (liquid, vapour) it is
    /// drawn from: below the critical temperature and above the critical pressure,
    /// or on the liquid side, the compressed liquid, denser than the saturated
    /// liquid (a search from the ideal-gas density can land inside the equation's
    /// loop); else the vapour, below the saturated vapour. `None` at or above the
    /// critical temperature, where the isotherm has one root.
    fn density_bracket(
        fluid: &Fluid,
        temperature: f64,
        pressure: f64,
        liquid: bool,
    ) -> Option<((f64, f64), (f64, f64))> {
        if temperature >= fluid.saturation_temperature_max() {
            return None;
        }
        let (liquid_density, vapour_density) = fluid.approximate_saturated_densities(temperature);
        let critical = fluid.critical.density;
        let bracket = if liquid || pressure >= fluid.critical.pressure {
            ((0.8 * liquid_density).max(critical), f64::INFINITY)
        } else {
            (0.0, (1.6 * vapour_density).min(critical))
        };
        Some((bracket, (liquid_density, vapour_density)))
    }

    /// Both species' properties at (T, p) on both sides, [liquid, vapour], each
    /// species' τ factors computed once; `near` seeds each side's density searches
    /// as in [`Blend::species_near`].
    fn species_both_sides(
        &self,
        temperature: f64,
        pressure: f64,
        near: Option<[(f64, f64); 2]>,
    ) -> Result<[(Properties, Properties); 2]> {
        let one = |fluid: &Fluid, pick: fn(&(f64, f64)) -> f64| -> Result<[Properties; 2]> {
            let factors = fluid.tau_factors(temperature);
            let side = |index: usize, liquid: bool| -> Result<Properties> {
                let seed = near.map(|n| pick(&n[index]));
                let density =
                    Self::species_density(fluid, &factors, temperature, pressure, liquid, seed)?;
                Ok(Self::at_pressure(
                    fluid.properties_with(&factors, temperature, density),
                    pressure,
                ))
            };
            Ok([side(0, true)?, side(1, false)?])
        };
        let [para_liquid, para_vapour] = one(self.para, |n| n.0)?;
        let [ortho_liquid, ortho_vapour] = one(self.ortho, |n| n.1)?;
        Ok([(para_liquid, ortho_liquid), (para_vapour, ortho_vapour)])
    }

    /// Both species' properties at (T, p) on one side.
    fn species(
        &self,
        temperature: f64,
        pressure: f64,
        liquid: bool,
    ) -> Result<(Properties, Properties)> {
        self.species_near(temperature, pressure, liquid, None)
    }

    /// As [`Blend::species`], each density solve started from `near`'s densities
    /// (para, ortho) when given: the species' states at a nearby temperature on
    /// the same side.
    fn species_near(
        &self,
        temperature: f64,
        pressure: f64,
        liquid: bool,
        near: Option<(f64, f64)>,
    ) -> Result<(Properties, Properties)> {
        let para =
            Self::species_properties(self.para, temperature, pressure, liquid, near.map(|n| n.0))?;
        let ortho =
            Self::species_properties(self.ortho, temperature, pressure, liquid, near.map(|n| n.1))?;
        Ok((para, ortho))
    }

    /// The solution's properties from its species' properties at one (T, p).
    fn mix(&self, para_fraction: f64, para: &Properties, ortho: &Properties) -> Properties {
        let w = self.para_mass_fraction(para_fraction);
        let wo = 1.0 - w;
        let (t, p) = (para.temperature, para.pressure);
        let volume = w / para.density + wo / ortho.density;
        let dv_dt = |x: &Properties| (x.dp_dt / x.dp_drho) / (x.density * x.density);
        let dv_dp = |x: &Properties| -1.0 / (x.density * x.density * x.dp_drho);
        let volume_t = w * dv_dt(para) + wo * dv_dt(ortho);
        let volume_p = w * dv_dp(para) + wo * dv_dp(ortho);
        let enthalpy =
            w * para.enthalpy + wo * (ortho.enthalpy + self.ortho_enthalpy) + self.common_enthalpy;
        let entropy = w * para.entropy
            + wo * (ortho.entropy + self.ortho_entropy)
            + self.mixing_entropy(para_fraction)
            + self.common_entropy;
        let cp = w * para.cp + wo * ortho.cp;
        let cv = cp + t * volume_t * volume_t / volume_p;
        let dp_drho = -volume * volume / volume_p;
        let gas_constant = spin::MOLAR_GAS_CONSTANT / self.molar_mass(para_fraction);
        Properties {
            temperature: t,
            density: 1.0 / volume,
            pressure: p,
            internal_energy: enthalpy - p * volume,
            enthalpy,
            entropy,
            gibbs: enthalpy - t * entropy,
            cv,
            cp,
            speed_of_sound: ((cp / cv) * dp_drho).max(0.0).sqrt(),
            joule_thomson: (t * volume_t - volume) / cp,
            compressibility: p * volume / (gas_constant * t),
            dp_drho,
            dp_dt: -volume_t / volume_p,
        }
    }

    /// The boiling temperatures of pure para- and orthohydrogen at `pressure`, K.
    /// The last few pressures' pairs are kept per thread: flashes and saturation
    /// temperatures ask for the same pressures' again and again, and each is a
    /// saturation solve of each species.
    fn boiling_temperatures(&self, pressure: f64) -> Result<(f64, f64)> {
        remembered(&LAST_BOILING, pressure.to_bits(), || {
            Ok((
                self.para
                    .saturation_at_pressure(pressure)?
                    .liquid
                    .temperature,
                self.ortho
                    .saturation_at_pressure(pressure)?
                    .liquid
                    .temperature,
            ))
        })
    }

    /// Bounds on both species' boiling temperatures at `pressure`, (below both,
    /// above both), K: the temperatures of the saturation tables' nodes (exact
    /// saturated states) on either side of the pressure. `None` where either table
    /// does not reach it.
    fn boiling_bounds(&self, pressure: f64) -> Option<(f64, f64)> {
        let para = self.para.saturation_table.temperature_bracket(pressure)?;
        let ortho = self.ortho.saturation_table.temperature_bracket(pressure)?;
        Some((para.0.min(ortho.0), para.1.max(ortho.1)))
    }

    /// Both species' boiling temperatures at `pressure` interpolated by their
    /// saturation tables, each with its entropy of vaporisation per mole (J/(mol·K)),
    /// and [`Blend::boiling_bounds`]; `None` where either table does not reach the
    /// pressure.
    fn boiling_estimates(&self, pressure: f64) -> Option<BoilingEstimates> {
        let bounds = self.boiling_bounds(pressure)?;
        let estimate = |fluid: &Fluid| {
            let line = fluid.saturation_table.at_pressure(pressure)?;
            let vaporisation = (line.vapour_entropy - line.liquid_entropy) * fluid.molar_mass;
            Some((line.temperature, vaporisation))
        };
        Some(([estimate(self.para)?, estimate(self.ortho)?], bounds))
    }

    /// The blend's saturation temperature at p for para fraction x (K), where the
    /// mole-weighted Gibbs energies of the liquid and vapour solutions are equal.
    /// The last few pairs' answers are kept per thread (the same bits in give the
    /// same bits out).
    pub fn saturation_temperature(&self, pressure: f64, para_fraction: f64) -> Result<f64> {
        self.saturation(pressure, para_fraction).map(|(t, _)| t)
    }

    /// The saturation temperature at p for para fraction x with both species on
    /// both sides there; the last few answers are kept per thread.
    fn saturation(&self, pressure: f64, para_fraction: f64) -> Result<Saturation> {
        remembered(
            &LAST_SATURATION,
            (pressure.to_bits(), para_fraction.to_bits()),
            || self.solve_saturation(pressure, para_fraction),
        )
    }

    /// [`Blend::saturation`], solved: the species' properties are those of the
    /// search's last evaluation, at its answer.
    fn solve_saturation(&self, pressure: f64, para_fraction: f64) -> Result<Saturation> {
        if para_fraction >= 1.0 || para_fraction <= 0.0 {
            let (tp, to) = self.boiling_temperatures(pressure)?;
            let t = if para_fraction >= 1.0 { tp } else { to };
            return Ok((t, self.species_both_sides(t, pressure, None)?));
        }
        // The species' boiling temperatures bracket the solution's: bounded by the
        // saturation tables' nodes and estimated by their interpolation, or solved
        // where a table does not reach the pressure. Each species' g_liquid −
        // g_vapour rises through zero at its boiling temperature with the slope Δs
        // of vaporisation, so the mole-weighted gap is about zero at the Δs-weighted
        // mean of the boiling temperatures: the start.
        let (start, (low, high)) = match self.boiling_estimates(pressure) {
            Some(([(tp, sp), (to, so)], bounds)) => {
                let (wp, wo) = (para_fraction * sp, (1.0 - para_fraction) * so);
                let start = (wp * tp + wo * to) / (wp + wo);
                let linear = para_fraction * tp + (1.0 - para_fraction) * to;
                (if start.is_finite() { start } else { linear }, bounds)
            }
            None => {
                let (tp, to) = self.boiling_temperatures(pressure)?;
                (
                    para_fraction * tp + (1.0 - para_fraction) * to,
                    (tp.min(to), tp.max(to)),
                )
            }
        };
        // g_liquid − g_vapour of the solution per mole, rising with T at the slope
        // s_vapour − s_liquid: Newton steps from the start. Each step's species
        // densities seed the next step's.
        let last: std::cell::Cell<Option<[(f64, f64); 2]>> = std::cell::Cell::new(None);
        let gap = |t: f64| -> (f64, f64, Option<[(Properties, Properties); 2]>) {
            match self.species_both_sides(t, pressure, last.get()) {
                Ok(species) => {
                    let [(pl, ol), (pv, ov)] = &species;
                    last.set(Some([(pl.density, ol.density), (pv.density, ov.density)]));
                    let (wp, wo) = (
                        para_fraction * self.para.molar_mass,
                        (1.0 - para_fraction) * self.ortho.molar_mass,
                    );
                    (
                        wp * (pl.gibbs - pv.gibbs) + wo * (ol.gibbs - ov.gibbs),
                        wp * (pv.entropy - pl.entropy) + wo * (ov.entropy - ol.entropy),
                        Some(species),
                    )
                }
                _ => (f64::NAN, f64::NAN, None),
            }
        };
        let (t, species) = crate::numeric::bracketed_newton_settled(
            "ortho–para solution saturation temperature",
            gap,
            start.clamp(low, high),
            low,
            high,
            1e-13,
        )?;
        match species {
            Some(species) => Ok((t, species)),
            None => Ok((t, self.species_both_sides(t, pressure, None)?)),
        }
    }

    /// The saturated liquid and vapour solutions at p for para fraction x.
    /// The last few pairs' answers are kept per thread.
    pub fn saturated_pair(&self, pressure: f64, para_fraction: f64) -> Result<SaturatedPair> {
        self.check_saturation_pressure(pressure)?;
        remembered(
            &LAST_SATURATED_PAIR,
            (pressure.to_bits(), para_fraction.to_bits()),
            || {
                let (_, [(pl, ol), (pv, ov)]) = self.saturation(pressure, para_fraction)?;
                Ok(SaturatedPair {
                    liquid: self.mix(para_fraction, &pl, &ol),
                    vapour: self.mix(para_fraction, &pv, &ov),
                })
            },
        )
    }

    fn check_saturation_pressure(&self, pressure: f64) -> Result<()> {
        let low = self
            .para
            .triple_pressures
            .0
            .max(self.ortho.triple_pressures.0);
        if !(pressure >= low && pressure <= BLEND_SATURATION_PRESSURE_MAX) {
            return Err(Error::OutOfRange {
                fluid: "hydrogen (ortho–para solution)".into(),
                what: format!("saturation at p = {:.4} kPa", pressure / 1e3),
                detail: format!(
                    "the solution has two phases from {:.3} kPa to {:.0} kPa",
                    low / 1e3,
                    BLEND_SATURATION_PRESSURE_MAX / 1e3
                ),
            });
        }
        Ok(())
    }

    /// True when (T, p) lies where the blend can have two phases.
    fn has_saturation(&self, temperature: f64, pressure: f64) -> bool {
        let t_high = self
            .ortho
            .critical
            .temperature
            .max(self.para.critical.temperature);
        temperature < t_high && pressure <= BLEND_SATURATION_PRESSURE_MAX
    }

    /// The solution's properties at (T, p, x); `liquid` chooses the side below the
    /// saturation temperature (ignored where there is no saturation).
    fn tp_properties(&self, t: f64, p: f64, x: f64, liquid: bool) -> Result<Properties> {
        let (para, ortho) = self.species(t, p, liquid)?;
        let properties = self.mix(x, &para, &ortho);
        if [
            properties.enthalpy,
            properties.entropy,
            properties.density,
            properties.cp,
        ]
        .iter()
        .all(|v| v.is_finite())
        {
            Ok(properties)
        } else {
            Err(Error::ImpossibleState {
                fluid: "hydrogen (ortho–para solution)".into(),
                detail: format!("no finite properties at T = {t} K, p = {p} Pa, para fraction {x}"),
            })
        }
    }

    /// Which side of saturation (T, p) lies on, for para fraction x: `true` for the
    /// liquid side. Above the saturation range, the dense side (false is returned for
    /// gas-like states above the critical temperature).
    fn liquid_side(&self, t: f64, p: f64, x: f64) -> Result<bool> {
        if !self.has_saturation(t, p) {
            return Ok(p > self.normal.critical.pressure && t < self.normal.critical.temperature);
        }
        let (below, above) = match self.boiling_bounds(p) {
            Some(bounds) => bounds,
            None => {
                let (para_sat, ortho_sat) = self.boiling_temperatures(p)?;
                (para_sat.min(ortho_sat), para_sat.max(ortho_sat))
            }
        };
        if t < below {
            return Ok(true);
        }
        if t > above {
            return Ok(false);
        }
        Ok(t < self.saturation_temperature(p, x)?)
    }

    fn state(&self, properties: Properties, liquid_side: bool, x: f64) -> State {
        State::single(self.normal, properties, liquid_side).with_para_fraction(x)
    }

    /// The state at (T, p) with para fraction x.
    pub fn state_tp(&self, temperature: f64, pressure: f64, para_fraction: f64) -> Result<State> {
        self.check(temperature, pressure, para_fraction)?;
        let liquid = self.liquid_side(temperature, pressure, para_fraction)?;
        let properties = self.tp_properties(temperature, pressure, para_fraction, liquid)?;
        Ok(self.state(properties, liquid, para_fraction))
    }

    /// The saturated state at p with vapour quality q and para fraction x.
    pub fn state_p_quality(
        &self,
        pressure: f64,
        quality: f64,
        para_fraction: f64,
    ) -> Result<State> {
        if !(0.0..=1.0).contains(&quality) {
            return Err(Error::OutOfRange {
                fluid: "hydrogen".into(),
                what: format!("quality {quality}"),
                detail: "a quality lies from 0 to 1".into(),
            });
        }
        let pair = self.saturated_pair(pressure, para_fraction)?;
        Ok(State::two_phase(self.normal, pair, quality).with_para_fraction(para_fraction))
    }

    /// The temperature range of single-phase searches at p: both species' ranges.
    fn temperature_range(&self) -> (f64, f64) {
        (
            self.para.temperature_min.max(self.ortho.temperature_min),
            self.para.temperature_max.min(self.ortho.temperature_max),
        )
    }

    /// The state at p where `property` equals `target`, with the para fraction a
    /// function of temperature; `seed`, a temperature near the answer if one is
    /// known (the neighbouring node of an exchanger profile).
    ///
    /// The two species' boiling temperatures at p bracket the solution's, so a
    /// target above the vapour's value at the higher one (or below the liquid's at
    /// the lower one) is single phase without finding the solution's saturation.
    /// The temperature is then found by Newton steps on the property, its slope
    /// from cp (plus the change of para fraction along the path), kept inside the
    /// bracket by bisection, and the result's residual is checked.
    fn state_p_property(
        &self,
        pressure: f64,
        target: f64,
        para_at: &dyn Fn(f64) -> f64,
        property: Target,
        seed: Option<f64>,
    ) -> Result<State> {
        let (mut low, mut high) = self.temperature_range();
        // Not into the solid of either species.
        for species in [self.para, self.ortho] {
            if let Some(melting) = species.melting_temperature(pressure) {
                low = low.max(melting);
            }
        }
        low *= 1.0 + 1e-6;
        // The last evaluation's side and species' densities, the next one's seeds.
        let last: std::cell::Cell<Option<(bool, (f64, f64))>> = std::cell::Cell::new(None);
        let seeds = |liquid: bool| match last.get() {
            Some((side, densities)) if side == liquid => Some(densities),
            _ => None,
        };
        // The property less the target, its slope along the path, and the solution's
        // properties with their para fraction, at T on a side.
        let evaluate_with = |t: f64, liquid: bool| -> (f64, f64, Option<Found>) {
            let x = para_at(t);
            let Ok((para, ortho)) = self.species_near(t, pressure, liquid, seeds(liquid)) else {
                return (f64::NAN, f64::NAN, None);
            };
            let mixed = self.mix(x, &para, &ortho);
            last.set(Some((liquid, (para.density, ortho.density))));
            let along_path = self.along_path(property, para_at, t, x, (&para, &ortho), &mixed);
            (
                property.pick(&mixed) - target,
                property.slope(&mixed) + along_path,
                Some((mixed, x, (para, ortho))),
            )
        };
        let evaluate = |t: f64, liquid: bool| -> (f64, f64) {
            let (value, slope, _) = evaluate_with(t, liquid);
            (value, slope)
        };
        // The state at the search's answer from what was computed there (see
        // `numeric::bracketed_newton_settled`); a residual beyond rounding is refused.
        let finish = |t: f64, liquid: bool, found: Option<Found>| -> Option<State> {
            let (properties, x, (para, ortho)) = found?;
            self.check(t, pressure, x).ok()?;
            let residual = property.pick(&properties) - target;
            (residual.abs() <= 1e-9 * property.slope(&properties).abs() * t).then(|| {
                remember_answer((liquid, para, ortho));
                self.state(properties, liquid, x)
            })
        };
        // The joint search from a seed on side `liquid` inside `bounds`, its answer
        // finished as the nested search's is.
        let joint = |seed: f64, liquid: bool, bounds: (f64, f64), side_at: &dyn Fn(f64) -> bool| {
            let (t, found) = self.joint_search(
                pressure, target, para_at, property, seed, liquid, bounds, side_at,
            )?;
            finish(t, liquid, Some(found))
        };
        let mut liquid_below = false;
        // A point of the bracket's end with its value and slope, to start from.
        let mut anchor: Option<(f64, (f64, f64))> = None;
        if pressure <= BLEND_SATURATION_PRESSURE_MAX {
            self.check_saturation_pressure(pressure)?;
            let bounds = self.boiling_bounds(pressure);
            // From a seed clearly on one side, Newton on that side first: an answer
            // inside it is single phase, and the bracket's ends are not needed. The
            // side's end is a bound on both species' boiling temperatures from their
            // saturation tables, so that no saturation is solved on the way.
            if let Some((seed, (first, last))) = seed.zip(bounds) {
                let side = if seed > last && seed < high {
                    Some((false, last, high))
                } else if seed < first && seed > low {
                    Some((true, low, first))
                } else {
                    None
                };
                if let Some((liquid, a, b)) = side {
                    if let Some(state) = joint(seed, liquid, (a, b), &|_| liquid) {
                        return Ok(state);
                    }
                    let found = crate::numeric::bracketed_newton_settled(
                        "ortho–para solution temperature from pressure",
                        |t| evaluate_with(t, liquid),
                        seed,
                        a,
                        b,
                        1e-13,
                    );
                    if let Ok((t, at)) = found {
                        if t > a && t < b {
                            if let Some(state) = finish(t, liquid, at) {
                                return Ok(state);
                            }
                        }
                    }
                }
            }
            // Above both species' boiling temperatures the solution is vapour, below
            // both liquid; the bounds from the tables' nodes serve as well as the
            // exact temperatures (a target between them is found from the solution's
            // saturation below either way).
            let (first, last) = match bounds {
                Some(bounds) => bounds,
                None => {
                    let (para_boiling, ortho_boiling) = self.boiling_temperatures(pressure)?;
                    (
                        para_boiling.min(ortho_boiling),
                        para_boiling.max(ortho_boiling),
                    )
                }
            };
            let at_last = evaluate(last, false);
            if at_last.0 < 0.0 {
                low = last;
                anchor = Some((last, at_last));
            } else {
                let (value, slope) = evaluate(first, true);
                if value > 0.0 {
                    high = first;
                    liquid_below = true;
                    anchor = Some((first, (value, slope)));
                } else {
                    let x = self.two_phase_para_fraction(pressure, para_at)?;
                    let pair = self.saturated_pair(pressure, x)?;
                    let (l, v) = (property.pick(&pair.liquid), property.pick(&pair.vapour));
                    if target >= l && target <= v {
                        let quality = (target - l) / (v - l);
                        return Ok(
                            State::two_phase(self.normal, pair, quality).with_para_fraction(x)
                        );
                    }
                    let t_sat = pair.liquid.temperature;
                    if target < l {
                        high = t_sat;
                        liquid_below = true;
                        anchor = Some((t_sat, (l - target, property.slope(&pair.liquid))));
                    } else {
                        low = t_sat;
                        anchor = Some((t_sat, (v - target, property.slope(&pair.vapour))));
                    }
                }
            }
        }
        // Below the solution's two-phase limit the side is known from the
        // bracket: liquid below the boiling temperature, vapour above it.
        let side = |t: f64| {
            if pressure <= BLEND_SATURATION_PRESSURE_MAX {
                liquid_below
            } else {
                self.liquid_side(t, pressure, para_at(t)).unwrap_or(false)
            }
        };
        let value_and_slope = |t: f64| evaluate(t, side(t));
        let value_slope_and_state = |t: f64| evaluate_with(t, side(t));
        let out_of_range = || Error::OutOfRange {
            fluid: "hydrogen (ortho–para solution)".into(),
            what: format!(
                "{} {target:.6} at p = {:.6} MPa",
                property.name(),
                pressure / 1e6
            ),
            detail: format!(
                "no state between {low:.4} K and {high:.4} K has that {}",
                property.name()
            ),
        };
        let inside = |t: f64| t > low && t < high;
        // Above the solution's two-phase limit, from a seed: the joint search first
        // (on the seed's side, which the answer must share).
        if let Some(seed) = seed.filter(|t| pressure > BLEND_SATURATION_PRESSURE_MAX && inside(*t))
        {
            if let Some(state) = joint(seed, side(seed), (low, high), &side) {
                return Ok(state);
            }
        }
        let start = match (seed, anchor) {
            (Some(t), _) if inside(t) => t,
            (_, Some((t, (value, slope)))) if inside(t - value / slope) => t - value / slope,
            _ => {
                // No start known: the ends must bracket the target.
                let (f_low, f_high) = (value_and_slope(low), value_and_slope(high));
                if !(f_low.0 <= 0.0 && f_high.0 >= 0.0) {
                    return Err(out_of_range());
                }
                let start = if -f_low.0 < f_high.0 {
                    low - f_low.0 / f_low.1
                } else {
                    high - f_high.0 / f_high.1
                };
                if inside(start) {
                    start
                } else {
                    0.5 * (low + high)
                }
            }
        };
        let (t, at) = crate::numeric::bracketed_newton_settled(
            "ortho–para solution temperature from pressure",
            value_slope_and_state,
            start,
            low,
            high,
            1e-13,
        )?;
        self.check(t, pressure, para_at(t))?;
        // A target outside [low, high] ends at an edge with a residual: refused.
        finish(t, side(t), at).ok_or_else(out_of_range)
    }

    /// The path's share of a property's temperature slope at T: d(property)/dx ·
    /// dx/dT, both by differences (the mix is arithmetic on the species'
    /// properties); none along a path of fixed composition.
    fn along_path(
        &self,
        property: Target,
        para_at: &dyn Fn(f64) -> f64,
        t: f64,
        x: f64,
        (para, ortho): (&Properties, &Properties),
        mixed: &Properties,
    ) -> f64 {
        let dt = 1e-6 * t;
        let dx_dt = (para_at(t + dt) - para_at(t - dt)) / (2.0 * dt);
        if dx_dt == 0.0 {
            return 0.0;
        }
        let step = 1e-6;
        let x_other = if x + step <= 1.0 { x + step } else { x - step };
        let along_x =
            (property.pick(&self.mix(x_other, para, ortho)) - property.pick(mixed)) / (x_other - x);
        along_x * dx_dt
    }

    /// The (p, property) search by Newton in temperature and both species'
    /// densities together, one evaluation of each species a step and no nested
    /// density search, from `seed` and the densities of this thread's last answer
    /// moved to (seed, p) along their slopes. For a start on side `liquid` within
    /// [`JOINT_REACH`] of that answer; the answer must lie inside `bounds` (open), on
    /// the side `side_at` gives there, with each species on the root its own
    /// density search would find (the same bracket, a rising isotherm) and its
    /// pressure met as that search meets it. `None` otherwise: the nested search
    /// then takes over. Ends as [`crate::numeric::bracketed_newton_settled`] does:
    /// once a step is within [`JOINT_TOLERANCE`] of every variable, at the point one
    /// step on (evaluated) unless the step is within rounding.
    #[allow(clippy::too_many_arguments)]
    fn joint_search(
        &self,
        pressure: f64,
        target: f64,
        para_at: &dyn Fn(f64) -> f64,
        property: Target,
        seed: f64,
        liquid: bool,
        bounds: (f64, f64),
        side_at: &dyn Fn(f64) -> bool,
    ) -> Option<(f64, Found)> {
        let [before, last] = LAST_SPECIES.get();
        let (side, last_para, last_ortho) = last?;
        let (t_last, p_last) = (last_para.temperature, last_para.pressure);
        let near = |t: f64, p: f64| {
            (t - t_last).abs() <= JOINT_REACH * t_last && (p - p_last).abs() <= JOINT_REACH * p_last
        };
        if side != liquid || !near(seed, pressure) {
            return None;
        }
        // Each density moved along its isotherm and isobar to (T, p), to first
        // order; then, where the answer before lies on the same side nearby, with
        // the curvature in T that it shows, where that changes the move by less
        // than half (the species' states are smooth there).
        let linear = |s: &Properties, t: f64, p: f64| {
            s.density + ((p - p_last) - s.dp_dt * (t - t_last)) / s.dp_drho
        };
        let earlier = before.filter(|(side, para, _)| {
            *side == liquid
                && near(para.temperature, para.pressure)
                && (para.temperature - t_last).abs() > 1e-9 * t_last
        });
        let moved = |s: &Properties, e: Option<&Properties>| {
            let first = linear(s, seed, pressure);
            let Some(e) = e else {
                return first;
            };
            let span = e.temperature - t_last;
            let curvature = (e.density - linear(s, e.temperature, e.pressure)) / (span * span);
            let bend = curvature * (seed - t_last) * (seed - t_last);
            if bend.abs() <= 0.5 * (first - s.density).abs() {
                first + bend
            } else {
                first
            }
        };
        let species = [self.para, self.ortho];
        let mut t = seed;
        let mut densities = [
            moved(&last_para, earlier.as_ref().map(|e| &e.1)),
            moved(&last_ortho, earlier.as_ref().map(|e| &e.2)),
        ];
        let mut last_step = false;
        for _ in 0..JOINT_STEPS {
            if !(t > bounds.0 && t < bounds.1 && densities.iter().all(|rho| *rho > 0.0)) {
                return None;
            }
            let raw = [0, 1].map(|i| {
                let fluid = species[i];
                fluid.properties_with(&fluid.tau_factors(t), t, densities[i])
            });
            // The species' own pressures, then their states labelled with the
            // pressure asked, as the nested search labels them.
            let pressures = raw.map(|s| s.pressure);
            let [para, ortho] = raw.map(|s| Self::at_pressure(s, pressure));
            let x = para_at(t);
            let mixed = self.mix(x, &para, &ortho);
            // The answer here, where its species lie on their branches and meet the
            // pressure as their density searches accept a root: within their
            // tolerance, or (in a stiff liquid, where the pressure's own rounding
            // is larger) with a Newton step within the density's rounding and the
            // pressure within the looser bound. A point on its branch that does not
            // yet meet the pressure takes another step.
            let met = (0..2).all(|i| {
                let rho = densities[i];
                let noise = 1e-14 * rho * species[i].gas_constant * t;
                let residual = (pressures[i] - pressure).abs();
                let dp_drho = [&para, &ortho][i].dp_drho;
                residual <= 1e-13 * pressure + noise
                    || (residual / dp_drho <= 1e-15 * rho
                        && residual <= 1e-9 * pressure + 1e3 * noise)
            });
            let answer = |para: Properties, ortho: Properties, mixed: Properties| {
                let on_branch = side_at(t) == liquid
                    && Self::species_on_branch(self.para, t, pressure, liquid, &para)
                    && Self::species_on_branch(self.ortho, t, pressure, liquid, &ortho);
                on_branch.then_some((t, (mixed, x, (para, ortho))))
            };
            if last_step && met {
                return answer(para, ortho, mixed);
            }
            let weight = self.para_mass_fraction(x);
            let weights = [weight, 1.0 - weight];
            // The property's derivatives in each species' (T, ρ), and the mix's
            // temperature slope along the isobar with the path's share.
            let derivatives = |s: &Properties| match property {
                Target::Enthalpy => (
                    s.cv + s.dp_dt / s.density,
                    s.dp_drho / s.density - t * s.dp_dt / (s.density * s.density),
                ),
                Target::Entropy => (s.cv / t, -s.dp_dt / (s.density * s.density)),
            };
            let residual = property.pick(&mixed) - target;
            let mut numerator = residual;
            let mut denominator = self.along_path(property, para_at, t, x, (&para, &ortho), &mixed);
            for (i, s) in [&para, &ortho].into_iter().enumerate() {
                let (by_t, by_density) = derivatives(s);
                let pressure_residual = pressures[i] - pressure;
                numerator -= weights[i] * by_density * pressure_residual / s.dp_drho;
                denominator += weights[i] * (by_t - by_density * s.dp_dt / s.dp_drho);
            }
            let dt = -numerator / denominator;
            let steps = [0, 1].map(|i| {
                let s = [&para, &ortho][i];
                -((pressures[i] - pressure) + s.dp_dt * dt) / s.dp_drho
            });
            if !(dt.is_finite() && steps.iter().all(|d| d.is_finite()))
                || dt.abs() > 0.2 * t
                || (0..2).any(|i| steps[i].abs() > 0.5 * densities[i])
            {
                return None;
            }
            let within = |fraction: f64| {
                dt.abs() <= fraction * t
                    && (0..2).all(|i| steps[i].abs() <= fraction * densities[i])
            };
            if within(JOINT_ROUNDING) && met {
                return answer(para, ortho, mixed);
            }
            last_step = within(JOINT_TOLERANCE);
            t += dt;
            densities = [densities[0] + steps[0], densities[1] + steps[1]];
        }
        None
    }

    /// Whether a species' state at (T, p) lies on the root its density search on
    /// side `liquid` would find (inside [`Blend::density_bracket`]), on a rising
    /// isotherm.
    fn species_on_branch(
        fluid: &Fluid,
        temperature: f64,
        pressure: f64,
        liquid: bool,
        state: &Properties,
    ) -> bool {
        let rho = state.density;
        state.dp_drho > 0.0
            && rho > 0.0
            && rho < fluid.density_ceiling
            && Self::density_bracket(fluid, temperature, pressure, liquid)
                .is_none_or(|((low, high), _)| rho > low && rho < high)
    }

    /// The para fraction of the two-phase solution at p along a para-fraction path:
    /// a fixed point x = path(T_sat(p, x)) (one step for a fixed fraction). The
    /// answer is the last x whose saturation was solved (kept per thread, so the
    /// saturated pair that follows is not solved again), once the path moves it by
    /// at most 1e-14. From the second step on, the next x is the secant's root of
    /// path(T_sat(p, x)) − x through the last two: the map is nearly linear, so
    /// that one secant step lands about where many plain steps would.
    fn two_phase_para_fraction(&self, pressure: f64, para_at: &dyn Fn(f64) -> f64) -> Result<f64> {
        // From normal hydrogen's boiling temperature (its table's, or solved).
        let boiling = match self.normal.saturation_table.at_pressure(pressure) {
            Some(line) => Ok(line.temperature),
            None => self
                .normal
                .saturation_at_pressure(pressure)
                .map(|s| s.liquid.temperature),
        };
        let mut x = para_at(boiling.unwrap_or(20.0));
        let mut previous: Option<(f64, f64)> = None;
        const CAP: usize = 40;
        for _ in 0..CAP {
            let next = para_at(self.saturation_temperature(pressure, x)?);
            let change = next - x;
            if change.abs() <= 1e-14 {
                return Ok(x);
            }
            let secant = previous
                .filter(|(_, last_change)| *last_change != change)
                .map(|(last_x, last_change)| x - change * (x - last_x) / (change - last_change))
                .filter(|proposal| (0.0..=1.0).contains(proposal));
            previous = Some((x, change));
            x = secant.unwrap_or(next);
        }
        Err(Error::NoConvergence {
            solver: "para fraction of a boiling solution on an equilibrium path",
            iterations: CAP,
            residual: (para_at(self.saturation_temperature(pressure, x)?) - x).abs(),
            context: format!(" at p = {pressure} Pa"),
        })
    }

    /// The state at (p, h) with para fraction x.
    pub fn state_ph(&self, pressure: f64, enthalpy: f64, para_fraction: f64) -> Result<State> {
        self.check(self.temperature_range().1, pressure, para_fraction)?;
        self.state_p_property(
            pressure,
            enthalpy,
            &|_| para_fraction,
            Target::Enthalpy,
            None,
        )
    }

    /// The state at (p, s) with para fraction x.
    pub fn state_ps(&self, pressure: f64, entropy: f64, para_fraction: f64) -> Result<State> {
        self.check(self.temperature_range().1, pressure, para_fraction)?;
        self.state_p_property(pressure, entropy, &|_| para_fraction, Target::Entropy, None)
    }

    /// The state at (p, h) in ortho–para equilibrium (x = x_eq(T)), as on a catalyst.
    pub fn state_ph_equilibrium(&self, pressure: f64, enthalpy: f64) -> Result<State> {
        self.state_ph_path(pressure, enthalpy, &spin::equilibrium_para_fraction)
    }

    /// As [`Blend::state_ph_equilibrium`], the search started at `near`'s
    /// temperature (a neighbouring state).
    pub fn state_ph_equilibrium_near(
        &self,
        pressure: f64,
        enthalpy: f64,
        near: &State,
    ) -> Result<State> {
        self.state_ph_path_near(pressure, enthalpy, &spin::equilibrium_para_fraction, near)
    }

    /// As [`Blend::state_ph`], the search started at `near`'s temperature.
    pub fn state_ph_near(
        &self,
        pressure: f64,
        enthalpy: f64,
        para_fraction: f64,
        near: &State,
    ) -> Result<State> {
        self.state_ph_from(pressure, enthalpy, para_fraction, near.temperature)
    }

    /// As [`Blend::state_ph`], the search started at `guess`, a temperature near
    /// the answer, K.
    pub fn state_ph_from(
        &self,
        pressure: f64,
        enthalpy: f64,
        para_fraction: f64,
        guess: f64,
    ) -> Result<State> {
        self.check(self.temperature_range().1, pressure, para_fraction)?;
        self.state_ph_path_from(pressure, enthalpy, &|_| para_fraction, guess)
    }

    /// As [`Blend::state_ph_path`], the search started at `near`'s temperature.
    pub fn state_ph_path_near(
        &self,
        pressure: f64,
        enthalpy: f64,
        para_at: &dyn Fn(f64) -> f64,
        near: &State,
    ) -> Result<State> {
        self.state_ph_path_from(pressure, enthalpy, para_at, near.temperature)
    }

    /// As [`Blend::state_ph_path`], the search started at `guess`, a temperature
    /// near the answer, K.
    pub fn state_ph_path_from(
        &self,
        pressure: f64,
        enthalpy: f64,
        para_at: &dyn Fn(f64) -> f64,
        guess: f64,
    ) -> Result<State> {
        self.check(self.temperature_range().1, pressure, 0.5)?;
        self.state_p_property(pressure, enthalpy, para_at, Target::Enthalpy, Some(guess))
    }

    /// The state at (p, h) whose para fraction is the given function of its
    /// temperature (a fraction of the way to equilibrium, for instance). The
    /// enthalpy along the path must rise with temperature, as it does for any path
    /// between the frozen and the equilibrium fraction.
    pub fn state_ph_path(
        &self,
        pressure: f64,
        enthalpy: f64,
        para_at: &dyn Fn(f64) -> f64,
    ) -> Result<State> {
        self.check(self.temperature_range().1, pressure, 0.5)?;
        self.state_p_property(pressure, enthalpy, para_at, Target::Enthalpy, None)
    }

    /// The ortho − para enthalpy difference at (T, p) in the phase the blend of
    /// para fraction x would have there, J/kg.
    pub fn ortho_para_enthalpy_difference(
        &self,
        temperature: f64,
        pressure: f64,
        para_fraction: f64,
    ) -> Result<f64> {
        self.check(temperature, pressure, para_fraction)?;
        let liquid = self.liquid_side(temperature, pressure, para_fraction)?;
        let (para, ortho) = self.species(temperature, pressure, liquid)?;
        Ok(self.ortho_minus_para(&para, &ortho))
    }

    /// The ortho − para enthalpy difference of the liquid at (T, p), J/kg: what a
    /// kilogram of ortho converting in the liquid releases.
    pub fn liquid_conversion_enthalpy(&self, temperature: f64, pressure: f64) -> Result<f64> {
        let (para, ortho) = self.species(temperature, pressure, true)?;
        Ok(self.ortho_minus_para(&para, &ortho))
    }

    /// The state at (p, s) whose para fraction is the given function of temperature.
    pub fn state_ps_path(
        &self,
        pressure: f64,
        entropy: f64,
        para_at: &dyn Fn(f64) -> f64,
    ) -> Result<State> {
        self.check(self.temperature_range().1, pressure, 0.5)?;
        self.state_p_property(pressure, entropy, para_at, Target::Entropy, None)
    }

    /// The saturated state at p with quality q whose para fraction is the given
    /// function of temperature (the boiling temperature depends on the fraction).
    pub fn state_p_quality_path(
        &self,
        pressure: f64,
        quality: f64,
        para_at: &dyn Fn(f64) -> f64,
    ) -> Result<State> {
        self.check_saturation_pressure(pressure)?;
        let x = self.two_phase_para_fraction(pressure, para_at)?;
        self.state_p_quality(pressure, quality, x)
    }

    /// The state from two specifications with a para fraction: fixed, or the
    /// equilibrium one at the state's temperature. Supported pairs: (T, p), (p, h),
    /// (p, s) and (p, x).
    pub fn state_from(&self, first: Spec, second: Spec, para: ParaChoice) -> Result<State> {
        use super::spec::Property::*;
        let pair = |x: Property, y: Property| Spec::pair(first, second, x, y);
        let path = |t: f64| match para {
            ParaChoice::Fixed(x) => x,
            ParaChoice::Equilibrium => spin::equilibrium_para_fraction(t),
        };
        if let Some((t, p)) = pair(Temperature, Pressure) {
            return self.state_tp(t, p, path(t));
        }
        if let Some((p, h)) = pair(Pressure, Enthalpy) {
            return self.state_ph_path(p, h, &path);
        }
        if let Some((p, s)) = pair(Pressure, Entropy) {
            return self.state_ps_path(p, s, &path);
        }
        if let Some((p, x)) = pair(Pressure, Quality) {
            return self.state_p_quality_path(p, x, &path);
        }
        Err(Error::Input(format!(
            "with a para fraction, the pair {} and {} is not supported; give T and p, p and h, p and s, or p and x",
            first.property.key(),
            second.property.key()
        )))
    }
}

/// A single-phase answer's side (`true` for the liquid side) and its species'
/// properties (para, ortho).
type Answer = (bool, Properties, Properties);

/// Remembers a single-phase answer as this thread's last (see `LAST_SPECIES`).
fn remember_answer(answer: Answer) {
    LAST_SPECIES.set([LAST_SPECIES.get()[1], Some(answer)]);
}

/// Forgets the answers this thread remembers for the joint search's starts. A
/// solve starts from none, so that its figures do not depend on what the thread
/// solved before (a study's cases run on whichever thread is free): the joint
/// search lands on the nested search's answer only to its tolerance, not to the
/// bit.
pub fn forget_answers() {
    LAST_SPECIES.set([None, None]);
}

/// What a search found at its answer: the solution's properties, its para
/// fraction and both species' properties (para, ortho).
type Found = (Properties, f64, (Properties, Properties));

/// The property a (p, property) flash of the solution matches.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Target {
    Enthalpy,
    Entropy,
}

impl Target {
    fn pick(self, properties: &Properties) -> f64 {
        match self {
            Target::Enthalpy => properties.enthalpy,
            Target::Entropy => properties.entropy,
        }
    }

    /// Its temperature derivative at fixed p and composition.
    fn slope(self, properties: &Properties) -> f64 {
        match self {
            Target::Enthalpy => properties.cp,
            Target::Entropy => properties.cp / properties.temperature,
        }
    }

    fn name(self) -> &'static str {
        match self {
            Target::Enthalpy => "enthalpy",
            Target::Entropy => "entropy",
        }
    }
}

/// How the para fraction of a hydrogen state is given.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ParaChoice {
    /// A fixed para mole fraction.
    Fixed(f64),
    /// The equilibrium fraction at the state's temperature.
    Equilibrium,
}

impl ParaChoice {
    /// Reads `para=equilibrium` or `para=0.5` (also `para=50%`).
    pub fn parse(text: &str) -> Result<ParaChoice> {
        let bad = || {
            Error::Input(format!(
                "'{text}': give the para fraction as para=equilibrium or para=<fraction 0 to 1>, such as para=0.5"
            ))
        };
        let value = text.trim().strip_prefix("para=").ok_or_else(bad)?.trim();
        if value == "equilibrium" {
            return Ok(ParaChoice::Equilibrium);
        }
        let number = match value.strip_suffix('%') {
            Some(percent) => percent.trim().parse::<f64>().map(|v| v / 100.0),
            None => value.parse::<f64>(),
        }
        .map_err(|_| bad())?;
        if !(0.0..=1.0).contains(&number) {
            return Err(Error::OutOfRange {
                fluid: "hydrogen".into(),
                what: format!("para fraction {number}"),
                detail: "a para fraction lies from 0 to 1".into(),
            });
        }
        Ok(ParaChoice::Fixed(number))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A (p, property) answer from the nested search alone (no remembered species).
    fn nested(
        blend: &Blend,
        pressure: f64,
        target: f64,
        para_at: &dyn Fn(f64) -> f64,
        property: Target,
        seed: f64,
    ) -> State {
        forget_answers();
        blend
            .state_p_property(pressure, target, para_at, property, Some(seed))
            .unwrap()
    }

    /// Along an exchanger-like sweep, each answer of the joint search (from the
    /// last answer's species) is the nested search's: the temperature to 1e-12 and
    /// the properties with it, on the vapour side at low pressure (along the
    /// catalyst's equilibrium path), the liquid side, and above the two-phase limit
    /// (at a fixed para fraction, by enthalpy and by entropy). Fails if a term of
    /// the joint step is wrong (the search then does not converge, or converges
    /// elsewhere) or if the search is not taken.
    #[test]
    fn joint_search_lands_where_the_nested_search_does() {
        let blend = Blend::get().unwrap();
        let fixed = |_: f64| 0.471;
        let equilibrium = spin::equilibrium_para_fraction;
        // (pressure, warm end, cold end, para-fraction path, property, liquid side)
        type Case<'a> = (f64, f64, f64, &'a dyn Fn(f64) -> f64, Target, bool);
        let cases: [Case; 5] = [
            (119.5e5, 117.0, 46.0, &fixed, Target::Enthalpy, false),
            (119.5e5, 117.0, 46.0, &fixed, Target::Entropy, false),
            (1.28e5, 290.0, 80.0, &equilibrium, Target::Enthalpy, false),
            (1.3e5, 20.5, 16.0, &fixed, Target::Enthalpy, true),
            (30e5, 25.0, 16.0, &equilibrium, Target::Enthalpy, true),
        ];
        for (pressure, warm, cold, para_at, property, liquid) in cases {
            let steps = 12;
            let at = |t: f64| {
                let x = para_at(t);
                let side = blend.liquid_side(t, pressure, x).unwrap();
                assert_eq!(side, liquid, "case at {pressure} Pa, {t} K");
                property.pick(&blend.tp_properties(t, pressure, x, side).unwrap())
            };
            let (first, last) = (at(warm), at(cold));
            let mut previous = nested(blend, pressure, first, para_at, property, warm);
            let mut joined = 0;
            for k in 1..=steps {
                let target = first + (last - first) * k as f64 / steps as f64;
                let seed = previous.temperature;
                let (low, high) = (10.0, 400.0);
                let side_at = |t: f64| blend.liquid_side(t, pressure, para_at(t)).unwrap_or(liquid);
                let joint = blend.joint_search(
                    pressure,
                    target,
                    para_at,
                    property,
                    seed,
                    liquid,
                    (low, high),
                    &side_at,
                );
                let expected = nested(blend, pressure, target, para_at, property, seed);
                if let Some((t, (mixed, x, _))) = joint {
                    joined += 1;
                    let close = |a: f64, b: f64| (a - b).abs() <= 1e-12 * a.abs().max(1.0);
                    assert!(
                        close(t, expected.temperature),
                        "{t} against {}",
                        expected.temperature
                    );
                    assert!(close(x, expected.para_fraction.unwrap()));
                    for (a, b) in [
                        (mixed.enthalpy, expected.enthalpy),
                        (mixed.entropy, expected.entropy),
                        (mixed.density, expected.density),
                        (mixed.cp, expected.cp().unwrap()),
                    ] {
                        assert!(close(a, b), "{a} against {b} at {pressure} Pa, {t} K");
                    }
                }
                previous = expected;
            }
            // Steps of a few kelvin lie within reach of the last answer.
            assert!(
                joined >= steps - 1,
                "the joint search was taken {joined} times of {steps} at {pressure} Pa"
            );
        }
    }
}
