//! State specifications as people type them: `T=80K`, `p=20bar`, `h=450kJ/kg`,
//! `s=5kJ/kg/K`, `x=0.4`, `rho=70kg/m3`; and the state that two of them fix.

use super::fluid::Fluid;
use super::state::State;
use crate::error::{Error, Result};
use crate::quantity::{self, Dimension};

/// Which property a specification fixes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Property {
    /// Temperature.
    Temperature,
    /// Pressure.
    Pressure,
    /// Specific enthalpy.
    Enthalpy,
    /// Specific entropy.
    Entropy,
    /// Vapour quality.
    Quality,
    /// Density.
    Density,
}

impl Property {
    /// The key a user types.
    pub fn key(self) -> &'static str {
        match self {
            Property::Temperature => "T",
            Property::Pressure => "p",
            Property::Enthalpy => "h",
            Property::Entropy => "s",
            Property::Quality => "x",
            Property::Density => "rho",
        }
    }

    fn dimension(self) -> Dimension {
        match self {
            Property::Temperature => Dimension::Temperature,
            Property::Pressure => Dimension::Pressure,
            Property::Enthalpy => Dimension::SpecificEnergy,
            Property::Entropy => Dimension::SpecificEntropy,
            Property::Quality => Dimension::Fraction,
            Property::Density => Dimension::Density,
        }
    }

    /// Reads a key (`T`, `p`, `h`, `s`, `x`, `rho`, and a few spelled-out forms).
    pub fn from_key(key: &str) -> Option<Property> {
        Some(match key.trim() {
            "T" | "t" | "temperature" => Property::Temperature,
            "p" | "P" | "pressure" => Property::Pressure,
            "h" | "H" | "enthalpy" => Property::Enthalpy,
            "s" | "S" | "entropy" => Property::Entropy,
            "x" | "q" | "Q" | "quality" => Property::Quality,
            "rho" | "d" | "D" | "density" => Property::Density,
            _ => return None,
        })
    }
}

/// One specification: a property and its SI value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Spec {
    /// The property.
    pub property: Property,
    /// Its value in SI units.
    pub value: f64,
}

/// The accepted input pairs, in words, for error messages.
pub const SUPPORTED_PAIRS: &str = "T and p, T and rho, p and h, p and s, T and x, p and x";

impl Spec {
    /// Reads `key=value unit`, for example `T=80K` or `p = 20 bar`.
    pub fn parse(text: &str) -> Result<Spec> {
        let (key, value) = text.split_once('=').ok_or_else(|| {
            Error::Input(format!(
                "'{text}' is not a specification; write key=value with a unit, such as T=80K, p=20bar, h=450kJ/kg, s=5kJ/kg/K, x=0.4 or rho=70kg/m3"
            ))
        })?;
        let property = Property::from_key(key).ok_or_else(|| {
            Error::Input(format!(
                "'{key}' in '{text}' is not a property key; use T, p, h, s, x or rho"
            ))
        })?;
        let value = quantity::parse(value, property.dimension())?;
        Ok(Spec { property, value })
    }

    /// The values of two specifications as the pair (x, y), given in either
    /// order, or None when they are not that pair.
    pub fn pair(first: Spec, second: Spec, x: Property, y: Property) -> Option<(f64, f64)> {
        if first.property == x && second.property == y {
            Some((first.value, second.value))
        } else if first.property == y && second.property == x {
            Some((second.value, first.value))
        } else {
            None
        }
    }

    /// Builds a specification from a property and a number already in SI units.
    pub fn si(property: Property, value: f64) -> Spec {
        Spec { property, value }
    }
}

impl Fluid {
    /// The state fixed by two specifications, in either order.
    pub fn state_from(&'static self, first: Spec, second: Spec) -> Result<State> {
        use Property::*;
        let pair = |x: Property, y: Property| Spec::pair(first, second, x, y);
        if let Some((t, p)) = pair(Temperature, Pressure) {
            return self.state_tp(t, p);
        }
        if let Some((t, rho)) = pair(Temperature, Density) {
            return self.state_t_rho(t, rho);
        }
        if let Some((p, h)) = pair(Pressure, Enthalpy) {
            return self.state_ph(p, h);
        }
        if let Some((p, s)) = pair(Pressure, Entropy) {
            return self.state_ps(p, s);
        }
        if let Some((t, x)) = pair(Temperature, Quality) {
            return self.state_t_quality(t, x);
        }
        if let Some((p, x)) = pair(Pressure, Quality) {
            return self.state_p_quality(p, x);
        }
        Err(Error::Input(format!(
            "the pair {} and {} is not supported; give one of: {SUPPORTED_PAIRS}",
            first.property.key(),
            second.property.key()
        )))
    }
}
