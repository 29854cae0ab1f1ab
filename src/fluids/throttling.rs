//! Throttling: the isenthalpic expansion of a state through a valve, the outlet
//! state, the temperature change, and where the inlet lies against the inversion
//! curve.

use super::fluid::Fluid;
use super::inversion::InversionTemperatures;
use super::state::State;
use crate::error::{Error, Result};

/// Where a valve's inlet lies against the inversion curve.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum InletVerdict {
    /// μJT > 0 at the inlet: a small pressure drop cools.
    InsideCools,
    /// μJT < 0 at the inlet, below the maximum inversion temperature: outside the
    /// curve at this pressure (above its upper branch's pressure, or on the liquid
    /// side of the lower branch); a small drop warms.
    OutsideWarms,
    /// Above the maximum inversion temperature: throttling warms at every pressure.
    AboveMaximumInversionTemperature,
    /// The inlet is already two-phase: the temperature follows the saturation line
    /// and falls with the pressure.
    TwoPhaseInlet,
}

impl InletVerdict {
    /// A plain-words name.
    pub fn words(self) -> &'static str {
        match self {
            InletVerdict::InsideCools => {
                "the inlet lies inside the inversion curve: a small pressure drop there cools"
            }
            InletVerdict::OutsideWarms => {
                "the inlet lies outside the inversion curve: a small pressure drop there warms"
            }
            InletVerdict::AboveMaximumInversionTemperature => {
                "the inlet lies above the maximum inversion temperature: throttling warms from any pressure"
            }
            InletVerdict::TwoPhaseInlet => {
                "two-phase inlet: the temperature follows saturation down"
            }
        }
    }

    /// A stable key for JSON.
    pub fn key(self) -> &'static str {
        match self {
            InletVerdict::InsideCools => "inside-cools",
            InletVerdict::OutsideWarms => "outside-warms",
            InletVerdict::AboveMaximumInversionTemperature => "above-maximum-inversion-temperature",
            InletVerdict::TwoPhaseInlet => "two-phase-inlet",
        }
    }
}

/// The result of throttling a state to a lower pressure.
#[derive(Debug, Clone)]
pub struct Throttling {
    /// The inlet state.
    pub inlet: State,
    /// The outlet state, at the same enthalpy.
    pub outlet: State,
    /// Outlet minus inlet temperature, K.
    pub temperature_change: f64,
    /// Vapour mass fraction at the outlet (1 for gas, 0 for liquid).
    pub vapour_fraction: f64,
    /// Where the inlet lies against the inversion curve.
    pub verdict: InletVerdict,
    /// The fluid's maximum inversion temperature, K.
    pub max_inversion_temperature: f64,
    /// The inversion temperatures at the inlet pressure.
    pub inversion_at_inlet: InversionTemperatures,
}

impl Fluid {
    /// Throttles `inlet` isenthalpically to `outlet_pressure` (Pa).
    pub fn throttle(&'static self, inlet: &State, outlet_pressure: f64) -> Result<Throttling> {
        if !(outlet_pressure > 0.0) {
            return Err(Error::Input(format!(
                "the outlet pressure must be positive, not {outlet_pressure} Pa"
            )));
        }
        if !(outlet_pressure < inlet.pressure) {
            return Err(Error::Input(format!(
                "a throttling valve lowers the pressure: the outlet {:.4} bar is not below the inlet {:.4} bar",
                outlet_pressure / 1e5,
                inlet.pressure / 1e5
            )));
        }
        let outlet = self.state_ph(outlet_pressure, inlet.enthalpy)?;
        let curve = self.inversion()?;
        let inversion_at_inlet = curve.temperatures_at(self, inlet.pressure)?;
        let verdict = match inlet.joule_thomson() {
            None => InletVerdict::TwoPhaseInlet,
            Some(_) if inlet.temperature > curve.max_inversion_temperature => {
                InletVerdict::AboveMaximumInversionTemperature
            }
            Some(mu) if mu > 0.0 => InletVerdict::InsideCools,
            Some(_) => InletVerdict::OutsideWarms,
        };
        Ok(Throttling {
            temperature_change: outlet.temperature - inlet.temperature,
            vapour_fraction: outlet.vapour_fraction(),
            inlet: inlet.clone(),
            outlet,
            verdict,
            max_inversion_temperature: curve.max_inversion_temperature,
            inversion_at_inlet,
        })
    }

    /// The fluid's inversion curve, traced once and kept.
    pub fn inversion(&self) -> Result<&super::inversion::InversionCurve> {
        self.inversion_cache
            .get_or_init(|| self.inversion_curve())
            .as_ref()
            .map_err(Clone::clone)
    }

    /// States along the isenthalp through (p_start, h): the temperature at each of
    /// `pressures` (Pa), skipping pressures where the state is out of range.
    pub fn isenthalp(&'static self, enthalpy: f64, pressures: &[f64]) -> Vec<State> {
        pressures
            .iter()
            .filter_map(|p| self.state_ph(*p, enthalpy).ok())
            .collect()
    }
}
