//! What a stream is made of: a fluid, or hydrogen as an ortho–para solution of a
//! given para fraction. Equipment builds new states through the material of its
//! inlet so that a solution stays a solution with its para fraction.

use super::blend::Blend;
use super::fluid::Fluid;
use super::state::State;
use crate::error::Result;

/// A fluid and, for the ortho–para hydrogen solution, its para mole fraction.
#[derive(Debug, Clone, Copy)]
pub struct Material {
    /// The fluid (normal `hydrogen` for the solution).
    pub fluid: &'static Fluid,
    /// The para fraction of the solution; `None` for a plain fluid.
    pub para_fraction: Option<f64>,
}

impl std::ops::Deref for Material {
    type Target = Fluid;
    fn deref(&self) -> &Fluid {
        self.fluid
    }
}

impl Material {
    /// A plain fluid.
    pub fn plain(fluid: &'static Fluid) -> Material {
        Material {
            fluid,
            para_fraction: None,
        }
    }

    /// Hydrogen as the ortho–para solution with para fraction x.
    pub fn hydrogen_solution(para_fraction: f64) -> Result<Material> {
        Ok(Material {
            fluid: Blend::get()?.normal,
            para_fraction: Some(para_fraction),
        })
    }

    /// The same material with another para fraction (a plain fluid stays plain).
    pub fn with_para_fraction(self, para_fraction: f64) -> Material {
        match self.para_fraction {
            Some(_) => Material {
                para_fraction: Some(para_fraction),
                ..self
            },
            None => self,
        }
    }

    /// The state at (T, p).
    pub fn state_tp(&self, temperature: f64, pressure: f64) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_tp(temperature, pressure, x),
            None => self.fluid.state_tp(temperature, pressure),
        }
    }

    /// The state at (p, h).
    pub fn state_ph(&self, pressure: f64, enthalpy: f64) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_ph(pressure, enthalpy, x),
            None => self.fluid.state_ph(pressure, enthalpy),
        }
    }

    /// The state at (p, h), seeded from a nearby state where that helps.
    pub fn state_ph_near(&self, pressure: f64, enthalpy: f64, near: &State) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_ph_near(pressure, enthalpy, x, near),
            None => self.fluid.state_ph_near(pressure, enthalpy, near),
        }
    }

    /// The state at (p, h), a hydrogen solution's search started at `guess`, a
    /// temperature near the answer (K); a pure fluid's a plain (p, h) flash.
    pub fn state_ph_from(&self, pressure: f64, enthalpy: f64, guess: f64) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_ph_from(pressure, enthalpy, x, guess),
            None => self.fluid.state_ph(pressure, enthalpy),
        }
    }

    /// The state at (p, s).
    pub fn state_ps(&self, pressure: f64, entropy: f64) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_ps(pressure, entropy, x),
            None => self.fluid.state_ps(pressure, entropy),
        }
    }

    /// The saturated state at p with vapour quality q.
    pub fn state_p_quality(&self, pressure: f64, quality: f64) -> Result<State> {
        match self.para_fraction {
            Some(x) => Blend::get()?.state_p_quality(pressure, quality, x),
            None => self.fluid.state_p_quality(pressure, quality),
        }
    }
}
