//! Thermodynamic states: immutable values built by named constructors.

use super::fluid::{Fluid, Properties};
use serde::Serialize;

/// Where a state lies.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Phase {
    /// Below the critical temperature and above the saturation (bubble) pressure.
    Liquid,
    /// Below the critical temperature and below the saturation (dew) pressure.
    Vapour,
    /// Above the critical temperature and below the critical pressure.
    Gas,
    /// Above both the critical temperature and the critical pressure.
    Supercritical,
    /// Liquid and vapour in equilibrium.
    TwoPhase,
}

impl Phase {
    /// The plain-words name used in tables and JSON.
    pub fn name(self) -> &'static str {
        match self {
            Phase::Liquid => "liquid",
            Phase::Vapour => "vapour",
            Phase::Gas => "gas",
            Phase::Supercritical => "supercritical",
            Phase::TwoPhase => "two-phase",
        }
    }
}

/// The saturated liquid and vapour that make up a two-phase state (for a pseudo-pure
/// fluid, the bubble and dew states at the same pressure).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SaturatedPair {
    /// Saturated liquid.
    pub liquid: Properties,
    /// Saturated vapour.
    pub vapour: Properties,
}

/// A state of one fluid. Single-phase states carry every property; two-phase states
/// carry the quality and both saturated states, and leave cp, cv, speed of sound and
/// the Joule-Thomson coefficient undefined.
#[derive(Debug, Clone)]
pub struct State {
    pub(crate) fluid: &'static Fluid,
    /// Temperature, K.
    pub temperature: f64,
    /// Pressure, Pa.
    pub pressure: f64,
    /// Density, kg/m³.
    pub density: f64,
    /// Specific internal energy, J/kg.
    pub internal_energy: f64,
    /// Specific enthalpy, J/kg.
    pub enthalpy: f64,
    /// Specific entropy, J/(kg·K).
    pub entropy: f64,
    /// Phase.
    pub phase: Phase,
    /// Vapour mass fraction, two-phase states only.
    pub quality: Option<f64>,
    /// Full single-phase properties, single-phase states only.
    pub single_phase: Option<Properties>,
    /// The saturated states, two-phase states only.
    pub saturated: Option<SaturatedPair>,
    /// The para mole fraction of a hydrogen state of the ortho–para solution
    /// ([`super::blend`]); `None` for every other state, frozen normal `hydrogen`
    /// included.
    pub para_fraction: Option<f64>,
}

impl State {
    /// The fluid of this state.
    pub fn fluid(&self) -> &'static Fluid {
        self.fluid
    }

    /// Isobaric heat capacity, J/(kg·K) (single phase only).
    pub fn cp(&self) -> Option<f64> {
        self.single_phase.map(|p| p.cp)
    }

    /// Isochoric heat capacity, J/(kg·K) (single phase only).
    pub fn cv(&self) -> Option<f64> {
        self.single_phase.map(|p| p.cv)
    }

    /// Speed of sound, m/s (single phase only).
    pub fn speed_of_sound(&self) -> Option<f64> {
        self.single_phase.map(|p| p.speed_of_sound)
    }

    /// Joule-Thomson coefficient (∂T/∂p)ₕ, K/Pa (single phase only).
    pub fn joule_thomson(&self) -> Option<f64> {
        self.single_phase.map(|p| p.joule_thomson)
    }

    /// Compressibility factor Z = p/(ρRT).
    pub fn compressibility(&self) -> f64 {
        self.pressure / (self.density * self.fluid.gas_constant * self.temperature)
    }

    /// True when liquid and vapour coexist.
    pub fn is_two_phase(&self) -> bool {
        self.phase == Phase::TwoPhase
    }

    /// Vapour fraction in the widest sense: the quality in two phase, 0 for liquid,
    /// 1 for vapour, gas and supercritical states.
    pub fn vapour_fraction(&self) -> f64 {
        match self.phase {
            Phase::TwoPhase => self.quality.unwrap_or(0.0),
            Phase::Liquid => 0.0,
            _ => 1.0,
        }
    }

    /// Builds a single-phase state from its properties.
    pub(crate) fn single(
        fluid: &'static Fluid,
        properties: Properties,
        liquid_side: bool,
    ) -> State {
        let tc = fluid.critical.temperature;
        let pc = fluid.critical.pressure;
        let phase = if properties.temperature >= fluid.saturation_temperature_max()
            || properties.temperature >= tc
        {
            if properties.pressure >= pc {
                Phase::Supercritical
            } else {
                Phase::Gas
            }
        } else if liquid_side {
            Phase::Liquid
        } else {
            Phase::Vapour
        };
        State {
            fluid,
            temperature: properties.temperature,
            pressure: properties.pressure,
            density: properties.density,
            internal_energy: properties.internal_energy,
            enthalpy: properties.enthalpy,
            entropy: properties.entropy,
            phase,
            quality: None,
            single_phase: Some(properties),
            saturated: None,
            para_fraction: None,
        }
    }

    /// Builds a two-phase state by the lever rule.
    pub(crate) fn two_phase(fluid: &'static Fluid, pair: SaturatedPair, quality: f64) -> State {
        let (l, v) = (pair.liquid, pair.vapour);
        let mix = |a: f64, b: f64| a + quality * (b - a);
        let volume = mix(1.0 / l.density, 1.0 / v.density);
        State {
            fluid,
            temperature: mix(l.temperature, v.temperature),
            pressure: mix(l.pressure, v.pressure),
            density: 1.0 / volume,
            internal_energy: mix(l.internal_energy, v.internal_energy),
            enthalpy: mix(l.enthalpy, v.enthalpy),
            entropy: mix(l.entropy, v.entropy),
            phase: Phase::TwoPhase,
            quality: Some(quality),
            single_phase: None,
            saturated: Some(pair),
            para_fraction: None,
        }
    }

    /// This state marked as one of the ortho–para solution with para fraction x.
    pub(crate) fn with_para_fraction(mut self, para_fraction: f64) -> State {
        self.para_fraction = Some(para_fraction);
        self
    }

    /// The material of this state: its fluid and, for the ortho–para solution, its
    /// para fraction; new states built from it stay of the same kind.
    pub fn material(&self) -> super::Material {
        super::Material {
            fluid: self.fluid,
            para_fraction: self.para_fraction,
        }
    }

    /// The para fraction to show for a hydrogen state: the solution's own, or 0.25
    /// for frozen normal hydrogen; `None` for other fluids.
    pub fn shown_para_fraction(&self) -> Option<f64> {
        match self.para_fraction {
            Some(x) => Some(x),
            None if self.fluid.name == "hydrogen" => Some(super::spin::NORMAL_PARA_FRACTION),
            None if self.fluid.name == "parahydrogen" => Some(1.0),
            None if self.fluid.name == "orthohydrogen" => Some(0.0),
            None => None,
        }
    }
}
