//! An ortho–para converter: a bed of catalyst that takes a hydrogen stream to (or
//! towards) its equilibrium para fraction, either holding its temperature (the
//! conversion heat removed, by a bath when one is named) or letting it warm.

use super::kind::{less_drop, EquipmentKind, Ports, Reader, Role};
use super::precooler::{bath_source, sink_charge, PrecoolerSource};
use super::{Context, Details, Equipment, Flow, Performance};
use crate::error::{Error, FlowsheetError, Result};
use crate::fluids::blend::Blend;
use crate::fluids::conversion::catalysed_para_fraction;
use crate::fluids::spin::equilibrium_para_fraction;
use crate::fluids::{Fluid, State};
use crate::quantity::Dimension;

/// The para fraction a converter delivers.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ConverterTarget {
    /// The equilibrium fraction at the outlet temperature.
    Equilibrium,
    /// A fixed para fraction.
    Fraction(f64),
    /// This share of the way from the inlet fraction to equilibrium at the outlet
    /// temperature.
    Approach(f64),
}

/// How a converter handles the conversion heat.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ConverterMode {
    /// The outlet leaves at the inlet temperature; the heat is removed there.
    Isothermal,
    /// No heat leaves: the stream warms (or cools) by the conversion heat.
    Adiabatic,
}

/// A converter's parameters.
#[derive(Debug, Clone)]
pub struct Converter {
    /// What the outlet para fraction is.
    pub target: ConverterTarget,
    /// Isothermal or adiabatic.
    pub mode: ConverterMode,
    /// Pressure drop, Pa.
    pub pressure_drop: f64,
    /// The bath that takes an isothermal converter's heat, if one is named.
    pub bath: Option<PrecoolerSource>,
}

impl EquipmentKind for Converter {
    const NAME: &'static str = "converter";
    const KEYS: &'static [&'static str] = &[
        "inlet",
        "outlet_para_fraction",
        "approach",
        "mode",
        "pressure_drop",
        "bath",
        "bath_pressure",
        "liquid_work",
        "vacuum_pump_efficiency",
        "flow",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let approach = r.quantity_opt("approach", Dimension::Fraction, 0.0, 1.0)?;
        let fraction = r.text_opt("outlet_para_fraction")?;
        let target = match (fraction.as_deref(), approach) {
            (Some(_), Some(_)) => {
                return Err(r.error(
                    "approach",
                    "give either 'outlet_para_fraction' or 'approach', not both",
                ))
            }
            (None, Some(a)) => ConverterTarget::Approach(a),
            (None | Some("equilibrium"), None) => ConverterTarget::Equilibrium,
            (Some(_), None) => ConverterTarget::Fraction(r.quantity(
                "outlet_para_fraction",
                Dimension::Fraction,
                0.0,
                1.0,
            )?),
        };
        let mode = match r.choice("mode", "a converter mode", &["isothermal", "adiabatic"])? {
            0 => ConverterMode::Isothermal,
            _ => ConverterMode::Adiabatic,
        };
        let bath = match r.text_opt("bath")? {
            Some(name) => {
                if mode == ConverterMode::Adiabatic {
                    return Err(r.error(
                        "bath",
                        "an adiabatic converter has no bath; use 'mode: isothermal' with a bath",
                    ));
                }
                let bath_pressure = r.quantity_opt("bath_pressure", Dimension::Pressure, 1.0, 1e8)?;
                let liquid_work =
                    r.quantity_opt("liquid_work", Dimension::SpecificEnergy, 0.0, 1e8)?;
                Some(bath_source(r, &name, bath_pressure, liquid_work)?)
            }
            None => None,
        };
        let pressure_drop = r.pressure_drop("pressure_drop")?;
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(Converter {
            target,
            mode,
            pressure_drop,
            bath,
        })
    }
}

impl Converter {
    /// The outlet para fraction for an inlet fraction and an outlet temperature.
    fn para_fraction(&self, inlet: f64, temperature: f64) -> f64 {
        match self.target {
            ConverterTarget::Equilibrium => equilibrium_para_fraction(temperature),
            ConverterTarget::Fraction(x) => x,
            ConverterTarget::Approach(a) => {
                inlet + a * (equilibrium_para_fraction(temperature) - inlet)
            }
        }
    }

    /// The outlet state for the inlet.
    fn outlet(&self, inlet: &State, pressure: f64, unit: &str) -> Result<State> {
        let x_in = catalysed_para_fraction(inlet, unit)?;
        let blend = Blend::get()?;
        match self.mode {
            // A boiling or saturated inlet keeps its vapour quality: the heat taken
            // out is the conversion heat, and the boiling temperature follows the
            // new para fraction (a saturated liquid held at its old boiling
            // temperature would otherwise flash to vapour).
            ConverterMode::Isothermal => match inlet.quality {
                Some(quality) => blend.state_p_quality_path(pressure, quality, &|t| {
                    self.para_fraction(x_in, t)
                }),
                None => {
                    let x = self.para_fraction(x_in, inlet.temperature);
                    blend.state_tp(inlet.temperature, pressure, x)
                }
            },
            ConverterMode::Adiabatic => match self.target {
                ConverterTarget::Fraction(x) => blend.state_ph(pressure, inlet.enthalpy, x),
                _ => blend.state_ph_path(pressure, inlet.enthalpy, &|t| {
                    self.para_fraction(x_in, t)
                }),
            },
        }
    }
}

impl Equipment for Converter {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn role(&self) -> Role {
        if self.bath.is_some() {
            Role::Precooling
        } else {
            Role::Process
        }
    }

    fn utility_fluids(&self) -> Vec<&'static Fluid> {
        match self.bath {
            Some(PrecoolerSource::Bath { fluid, .. }) => vec![fluid],
            _ => Vec::new(),
        }
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![less_drop(inlets[0], self.pressure_drop)]
    }

    /// Converts the inlet: isothermal with its heat to a bath (charged as a bath
    /// is) or reported as a duty at the stream's temperature; or adiabatic.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let inlet = &inlets[0];
        let pressure = inlet.state.pressure - self.pressure_drop;
        let out = self.outlet(&inlet.state, pressure, "converter")?;
        let m = inlet.flow;
        let performance = match (&self.bath, self.mode) {
            (Some(source), _) => sink_charge(m, &inlet.state, &out, source, context)?,
            (None, ConverterMode::Isothermal) => {
                let duty = m * (inlet.state.enthalpy - out.enthalpy);
                Performance {
                    heat_in: vec![(-duty, inlet.state.temperature)],
                    duty: Some(duty),
                    details: Details::None,
                    ..Performance::default()
                }
            }
            (None, ConverterMode::Adiabatic) => Performance {
                duty: Some(0.0),
                ..Performance::default()
            },
        };
        if !out.enthalpy.is_finite() {
            return Err(Error::Internal("converter outlet without an enthalpy".into()));
        }
        Ok((vec![Flow { state: out, flow: m }], performance))
    }
}
