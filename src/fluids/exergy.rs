//! The dead state and flow exergy. Exergy of a flowing stream is
//! e = (h − h₀) − T₀ (s − s₀), with the dead state at the ambient temperature T₀
//! and one standard atmosphere (textbook definition of flow exergy, for example
//! Bejan, Advanced Engineering Thermodynamics; 1 atm is the usual dead-state pressure).

use super::{Fluid, State};
use crate::error::Result;
use crate::quantity::STANDARD_ATMOSPHERE;

/// The dead-state pressure, Pa: one standard atmosphere.
pub const DEAD_STATE_PRESSURE: f64 = STANDARD_ATMOSPHERE;

/// A fluid's dead state: ambient temperature (held inside the equation's range) and
/// one atmosphere.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DeadState {
    /// Ambient temperature T₀, K.
    pub ambient: f64,
    /// h₀, J/kg.
    pub enthalpy: f64,
    /// s₀, J/(kg K).
    pub entropy: f64,
}

impl DeadState {
    /// The dead state of `fluid` at `ambient` K and one atmosphere.
    pub fn of(fluid: &'static Fluid, ambient: f64) -> Result<DeadState> {
        let dead = fluid.state_tp(ambient.min(fluid.temperature_max), DEAD_STATE_PRESSURE)?;
        Ok(DeadState {
            ambient,
            enthalpy: dead.enthalpy,
            entropy: dead.entropy,
        })
    }

    /// The flow exergy of `state` (of the same fluid), J/kg.
    pub fn exergy(&self, state: &State) -> f64 {
        (state.enthalpy - self.enthalpy) - self.ambient * (state.entropy - self.entropy)
    }
}
