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

    /// As [`StreamPath::state`] for the next point of a profile whose states so far
    /// are `previous` (the last is the nearest): a hydrogen search starts at the
    /// temperature extrapolated in enthalpy through the last two (at the last one's
    /// temperature where they give no rising slope), or through the last three
    /// where their parabola changes the straight line's guess by less than half the
    /// line's own step (the profile is smooth there): closer to the answer than
    /// the nearest state's temperature by about the square, and the cube, of the
    /// step. A pure fluid's flash is seeded from the nearest state alone.
    pub fn state_along(&self, pressure: f64, enthalpy: f64, previous: &[State]) -> Result<State> {
        let Some(near) = previous.last() else {
            return self.state_ph(pressure, enthalpy);
        };
        match self {
            // A pure fluid's flash takes `near`'s density as well.
            StreamPath::Frozen(material) if material.para_fraction.is_none() => {
                material.state_ph_near(pressure, enthalpy, near)
            }
            _ => self.state_ph_guessed(pressure, enthalpy, extrapolated(previous, enthalpy)),
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

/// The temperature at `enthalpy` extrapolated from the last states of a profile
/// (see [`StreamPath::state_along`]).
fn extrapolated(previous: &[State], enthalpy: f64) -> f64 {
    let point = |state: &State| (state.enthalpy, state.temperature);
    let count = previous.len();
    let near = point(&previous[count - 1]);
    if count < 2 {
        return near.1;
    }
    let earlier = point(&previous[count - 2]);
    let slope = (near.1 - earlier.1) / (near.0 - earlier.0);
    let linear = near.1 + (enthalpy - near.0) * slope;
    if !(slope > 0.0 && linear.is_finite()) {
        return near.1;
    }
    if count < 3 {
        return linear;
    }
    // Newton's form: the parabola adds the second divided difference's term.
    let earliest = point(&previous[count - 3]);
    let earlier_slope = (earlier.1 - earliest.1) / (earlier.0 - earliest.0);
    let curvature = (slope - earlier_slope) / (near.0 - earliest.0);
    let parabola = linear + curvature * (enthalpy - near.0) * (enthalpy - earlier.0);
    if parabola.is_finite() && (parabola - linear).abs() <= 0.5 * (linear - near.1).abs() {
        parabola
    } else {
        linear
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Along a hydrogen isobar at equal steps of enthalpy (as a profile's nodes
    /// lie), the start extrapolated through three states is closer to the flash's
    /// answer than the straight line through two, which is closer than the last
    /// state's temperature; where the parabola would move the line's guess by more
    /// than half the line's own step, the line is kept.
    #[test]
    fn profile_starts_come_closer_with_more_states() {
        let material = Material::hydrogen_solution(0.5).unwrap();
        let pressure = 1.25e5;
        let warm = material.state_tp(290.0, pressure).unwrap();
        let cold = material.state_tp(60.0, pressure).unwrap();
        let steps = 50;
        let enthalpy =
            |k: usize| warm.enthalpy - (warm.enthalpy - cold.enthalpy) * k as f64 / steps as f64;
        let states: Vec<State> = (0..=steps)
            .map(|k| material.state_ph(pressure, enthalpy(k)).unwrap())
            .collect();
        let (mut parabola_total, mut line_total, mut near_total) = (0.0, 0.0, 0.0);
        for k in 3..=steps {
            let answer = states[k].temperature;
            let parabola = extrapolated(&states[k - 3..k], enthalpy(k));
            let line = extrapolated(&states[k - 2..k], enthalpy(k));
            let near = extrapolated(&states[k - 1..k], enthalpy(k));
            assert_eq!(near, states[k - 1].temperature);
            parabola_total += (parabola - answer).abs();
            line_total += (line - answer).abs();
            near_total += (near - answer).abs();
        }
        assert!(
            parabola_total < 0.2 * line_total && line_total < 0.05 * near_total,
            "{parabola_total} {line_total} {near_total}"
        );
        // A kink: the third state off the smooth curve by five kelvin, more than the
        // line's step of about 4.6 K.
        let mut kinked = states[..3].to_vec();
        kinked[0].temperature += 5.0;
        assert_eq!(
            extrapolated(&kinked, enthalpy(3)),
            extrapolated(&kinked[1..], enthalpy(3))
        );
    }
}
