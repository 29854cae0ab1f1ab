//! How the para fraction of a hydrogen stream follows its temperature while it is
//! heated or cooled over an ortho–para catalyst, and the states along that path.
//!
//! The catalyst is taken as active enough to hold the stream in equilibrium
//! everywhere past its inlet: x = x_eq(T) at every point. A stream that arrives out
//! of equilibrium equilibrates at the inlet before any heat has been exchanged, that
//! is adiabatically: at the inlet enthalpy it jumps to the equilibrium state, warmer
//! if it converts towards para (the conversion heat is released into it), colder if
//! it arrives over-converted (a catalyst converts back as readily). From there the
//! enthalpy on the equilibrium path rises with temperature, so every (p, h) has one
//! state.

use super::blend::Blend;
use super::material::Material;
use super::spin::equilibrium_para_fraction;
use super::state::State;
use crate::error::{Error, Result};

/// The states a stream passes through along one side of a unit.
#[derive(Debug, Clone, Copy)]
pub enum StreamPath {
    /// No catalyst: the material (and any para fraction) is unchanged.
    Frozen(Material),
    /// Over a catalyst: ortho–para equilibrium at every point past the inlet.
    Catalytic(&'static Blend),
}

impl StreamPath {
    /// The path of a stream from `inlet`, over a catalyst when `catalyst`; `unit`
    /// names the kind of unit in errors.
    pub fn new(inlet: &State, catalyst: bool, unit: &str) -> Result<StreamPath> {
        if !catalyst {
            return Ok(StreamPath::Frozen(inlet.material()));
        }
        catalysed_para_fraction(inlet, unit)?;
        Ok(StreamPath::Catalytic(Blend::get()?))
    }

    /// The state on the path at (p, h); `near` seeds a frozen flash.
    pub fn state(&self, pressure: f64, enthalpy: f64, near: &State) -> Result<State> {
        match self {
            StreamPath::Frozen(material) => material.state_ph_near(pressure, enthalpy, near),
            StreamPath::Catalytic(blend) => {
                blend.state_ph_equilibrium_near(pressure, enthalpy, near)
            }
        }
    }

    /// As [`StreamPath::state`] for the next point of a profile whose last two
    /// states are `earlier` and `near`: a hydrogen search starts at the temperature
    /// extrapolated through them, linearly in enthalpy (at `near`'s temperature
    /// where they give no rising slope), which is closer to the answer than
    /// `near`'s own by about the square of the step. A pure fluid's flash is
    /// seeded from `near` alone.
    pub fn state_along(
        &self,
        pressure: f64,
        enthalpy: f64,
        near: &State,
        earlier: Option<&State>,
    ) -> Result<State> {
        let guess = earlier
            .map(|earlier| {
                let slope =
                    (near.temperature - earlier.temperature) / (near.enthalpy - earlier.enthalpy);
                (slope, near.temperature + (enthalpy - near.enthalpy) * slope)
            })
            .filter(|(slope, guess)| *slope > 0.0 && guess.is_finite())
            .map_or(near.temperature, |(_, guess)| guess);
        match self {
            // A pure fluid's flash takes `near`'s density as well.
            StreamPath::Frozen(material) if material.para_fraction.is_none() => {
                material.state_ph_near(pressure, enthalpy, near)
            }
            _ => self.state_ph_guessed(pressure, enthalpy, guess),
        }
    }

    /// The state on the path at (p, h), a hydrogen search started at `guess`, a
    /// temperature near the answer (K); a pure fluid's a plain (p, h) flash.
    pub fn state_ph_guessed(&self, pressure: f64, enthalpy: f64, guess: f64) -> Result<State> {
        match self {
            StreamPath::Frozen(material) => material.state_ph_from(pressure, enthalpy, guess),
            StreamPath::Catalytic(blend) => {
                blend.state_ph_path_from(pressure, enthalpy, &equilibrium_para_fraction, guess)
            }
        }
    }

    /// The state on the path at (p, h) from no neighbour (a plain (p, h) flash).
    pub fn state_ph(&self, pressure: f64, enthalpy: f64) -> Result<State> {
        match self {
            StreamPath::Frozen(material) => material.state_ph(pressure, enthalpy),
            StreamPath::Catalytic(blend) => blend.state_ph_equilibrium(pressure, enthalpy),
        }
    }

    /// The state on the path at (T, p), nudged off the saturation line where (T, p)
    /// lies on it.
    pub fn state_at(&self, temperature: f64, pressure: f64) -> Result<State> {
        let material = match self {
            StreamPath::Frozen(material) => *material,
            StreamPath::Catalytic(_) => {
                Material::hydrogen_solution(equilibrium_para_fraction(temperature))?
            }
        };
        material
            .state_tp(temperature, pressure)
            .or_else(|_| material.state_tp(temperature * (1.0 + 1e-9), pressure))
    }
}

/// The para fraction of a stream that meets a catalyst; frozen normal hydrogen and
/// other fluids are refused with what to do.
pub fn catalysed_para_fraction(inlet: &State, unit: &str) -> Result<f64> {
    match inlet.para_fraction {
        Some(x) => Ok(x),
        None if inlet.fluid().name == "hydrogen" => Err(Error::Input(format!(
            "the {unit}'s ortho–para catalyst needs a hydrogen stream that carries its para fraction; this one is frozen normal hydrogen. Give the hydrogen feed `para_fraction: 0.25` (normal) or `para_fraction: equilibrium`"
        ))),
        None => Err(Error::Input(format!(
            "the {unit}'s ortho–para catalyst acts on hydrogen only; this stream is {}",
            inlet.fluid().name
        ))),
    }
}
