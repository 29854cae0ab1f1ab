//! A precooler: takes a stream down to a temperature against a bath of boiling
//! cryogen, a refrigerator, or a coolant stream of the flowsheet.

use super::kind::{less_drop, Coupling, EquipmentKind, Ports, Reader, Role};
use super::{Context, Details, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::fluids::conversion::StreamPath;
use crate::fluids::{self, DeadState, Fluid, State};
use crate::quantity::{Dimension, STANDARD_ATMOSPHERE};

/// Where a precooler puts its heat.
#[derive(Debug, Clone, Copy)]
pub enum PrecoolerSource {
    /// A bath of boiling cryogen supplied from outside the flowsheet.
    Bath {
        /// The cryogen.
        fluid: &'static Fluid,
        /// Bath pressure, Pa.
        pressure: f64,
        /// Work equivalent of one kilogram of the cryogen's liquid, J/kg.
        liquid_work: f64,
        /// Work of the vacuum pump that holds a bath below one atmosphere, per
        /// kilogram boiled off, J/kg (0 at or above one atmosphere).
        pump_work: f64,
    },
    /// A refrigerator that rejects heat to ambient, at a fraction of Carnot.
    Refrigerator {
        /// Coefficient of performance over the Carnot value.
        fraction_of_carnot: f64,
    },
    /// A coolant stream of the flowsheet (its `coolant` inlet), boiled or warmed.
    Coolant,
}

/// A precooler's parameters.
#[derive(Debug, Clone)]
pub struct Precooler {
    /// Outlet temperature, K.
    pub outlet_temperature: f64,
    /// Pressure drop on the process side, Pa.
    pub pressure_drop: f64,
    /// Smallest allowed difference between outlet and bath or coolant, K.
    pub approach: f64,
    /// Heat sink.
    pub source: PrecoolerSource,
    /// Whether the process side carries an ortho–para catalyst.
    pub catalyst: bool,
    /// Whether a bath's boil-off leaves as a stream (its `boil-off` port is
    /// connected) instead of being vented.
    pub boil_off_routed: bool,
}

/// The optional outlet of a bath precooler: its cryogen's boil-off as a stream.
pub const BOIL_OFF_PORT: &str = "boil-off";

/// The figure of merit assumed for the plant that makes a bath's cryogen, when the
/// flowsheet gives no `liquid_work` (common practice for industrial liquefiers,
/// from memory).
pub const ASSUMED_CRYOGEN_PLANT_FIGURE_OF_MERIT: f64 = 0.25;

/// The default approach between a precooler's outlet and its sink, K (common
/// practice).
pub const DEFAULT_APPROACH: f64 = 1.0;

/// The default isothermal efficiency of the vacuum pump of a bath held below one
/// atmosphere (an assumed figure for roots-and-rotary-vane sets, from memory; state
/// your own with `vacuum_pump_efficiency`).
pub const DEFAULT_VACUUM_PUMP_EFFICIENCY: f64 = 0.5;

impl EquipmentKind for Precooler {
    const NAME: &'static str = "precooler";
    const KEYS: &'static [&'static str] = &[
        "inlet",
        "outlet_temperature",
        "pressure_drop",
        "approach",
        "bath",
        "bath_pressure",
        "liquid_work",
        "refrigerator",
        "coolant",
        "vacuum_pump_efficiency",
        "flow",
        "catalyst",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        use Dimension::*;
        let outlet_temperature = r.quantity("outlet_temperature", Temperature, 1.0, 2000.0)?;
        let approach = r
            .quantity_opt("approach", TemperatureDifference, 0.0, 100.0)?
            .unwrap_or(DEFAULT_APPROACH);
        r.inlet("in", "inlet")?;
        let bath = r.text_opt("bath")?;
        let refrigerator = r.quantity_opt("refrigerator", Fraction, 1e-3, 1.0)?;
        let coolant = r.text_opt("coolant")?;
        let bath_pressure = r.quantity_opt("bath_pressure", Pressure, 1.0, 1e8)?;
        let liquid_work = r.quantity_opt("liquid_work", SpecificEnergy, 0.0, 1e8)?;
        let sinks = [bath.is_some(), refrigerator.is_some(), coolant.is_some()];
        if sinks.iter().filter(|given| **given).count() != 1 {
            return Err(r.error("kind", ONE_SINK));
        }
        let source = if let Some(name) = bath {
            bath_source(r, &name, bath_pressure, liquid_work)?
        } else if let Some(fraction) = refrigerator {
            PrecoolerSource::Refrigerator {
                fraction_of_carnot: fraction,
            }
        } else {
            r.add_inlet("coolant-in", "coolant", coolant.unwrap_or_default());
            PrecoolerSource::Coolant
        };
        if bath_pressure.is_some() && !matches!(source, PrecoolerSource::Bath { .. }) {
            return Err(r.error("bath_pressure", "'bath_pressure' goes with 'bath'"));
        }
        let pressure_drop = r.pressure_drop("pressure_drop")?;
        r.flow_basis()?;
        Ok(Precooler {
            outlet_temperature,
            pressure_drop,
            approach,
            source,
            catalyst: r.choice("catalyst", "a catalyst setting", &["false", "true"])? == 1,
            boil_off_routed: false,
        })
    }
}

/// A bath of the cryogen `name` read from the keys `bath`, `bath_pressure`,
/// `liquid_work` and `vacuum_pump_efficiency` (shared by the units that boil a bath).
pub fn bath_source(
    r: &Reader,
    name: &str,
    bath_pressure: Option<f64>,
    liquid_work: Option<f64>,
) -> std::result::Result<PrecoolerSource, FlowsheetError> {
            let fluid = fluids::fluid(name).map_err(|e| r.error("bath", e.to_string()))?;
            let pressure =
                bath_pressure.ok_or_else(|| r.error("bath_pressure", MISSING_BATH_PRESSURE))?;
            // Cryogen is bought at one atmosphere or above; a bath below it is
            // held there by a vacuum pump, charged separately.
            let bought_at = pressure.max(STANDARD_ATMOSPHERE);
            let liquid_work = match liquid_work {
                Some(work) => work,
                None => default_liquid_work(fluid, bought_at, r.ambient)
                    .map_err(|e| r.error("bath_pressure", e.to_string()))?
                    .0,
            };
            let efficiency = r.efficiency(
                "vacuum_pump_efficiency",
                Some(DEFAULT_VACUUM_PUMP_EFFICIENCY),
            )?;
            let pump_work = if pressure < STANDARD_ATMOSPHERE {
                vacuum_pump_work(fluid, pressure, r.ambient)
                    .map_err(|e| r.error("bath_pressure", e.to_string()))?
                    / efficiency
            } else {
                0.0
            };
            Ok(PrecoolerSource::Bath {
                fluid,
                pressure,
                liquid_work,
                pump_work,
            })
}

const ONE_SINK: &str = "a precooler needs exactly one heat sink: 'bath' (a cryogen name, with bath_pressure), 'refrigerator' (its fraction of Carnot) or 'coolant' (a stream of the flowsheet)";
const MISSING_BATH_PRESSURE: &str =
    "'bath_pressure' is required with a bath: the pressure the cryogen boils at, such as 1.2 bar";

/// The ideal (isothermal, at ambient) work per kilogram of pumping a bath's
/// boil-off, warmed to ambient, from the bath pressure up to one atmosphere:
/// −e(T₀, p_bath), the negative of its flow exergy there, J/kg.
pub fn vacuum_pump_work(fluid: &'static Fluid, bath_pressure: f64, ambient: f64) -> Result<f64> {
    let warmed = fluid.state_tp(ambient.min(fluid.temperature_max), bath_pressure)?;
    Ok(-DeadState::of(fluid, ambient)?.exergy(&warmed))
}

/// The default work equivalent of a cryogen's liquid: the ideal (minimum) work of
/// liquefying it from the dead state (ambient, 1 atm) to saturated liquid at the bath
/// pressure, over [`ASSUMED_CRYOGEN_PLANT_FIGURE_OF_MERIT`] (state your own with
/// `liquid_work`). Returns (work J/kg, ideal work J/kg).
pub fn default_liquid_work(
    fluid: &'static Fluid,
    bath_pressure: f64,
    ambient: f64,
) -> Result<(f64, f64)> {
    let liquid = fluid.state_p_quality(bath_pressure, 0.0)?;
    let ideal = DeadState::of(fluid, ambient)?.exergy(&liquid);
    Ok((ideal / ASSUMED_CRYOGEN_PLANT_FIGURE_OF_MERIT, ideal))
}

impl Equipment for Precooler {
    fn ports(&self) -> Ports {
        match self.source {
            PrecoolerSource::Coolant => Ports {
                inlets: vec!["in", "coolant-in"],
                outlets: vec!["out", "coolant-out"],
            },
            PrecoolerSource::Bath { .. } if self.boil_off_routed => Ports {
                inlets: vec!["in"],
                outlets: vec!["out", BOIL_OFF_PORT],
            },
            _ => Ports::through(),
        }
    }

    fn coupling(&self) -> Coupling {
        match self.source {
            PrecoolerSource::Coolant => Coupling::Sides,
            PrecoolerSource::Bath { .. } if self.boil_off_routed => Coupling::WithSource,
            _ => Coupling::Joined,
        }
    }

    fn optional_outlets(&self) -> Vec<&'static str> {
        match self.source {
            PrecoolerSource::Bath { .. } => vec![BOIL_OFF_PORT],
            _ => Vec::new(),
        }
    }

    fn route(&mut self, port: &str) {
        if port == BOIL_OFF_PORT && matches!(self.source, PrecoolerSource::Bath { .. }) {
            self.boil_off_routed = true;
        }
    }

    fn source_fluid(&self, outlet_position: usize) -> Option<&'static Fluid> {
        match self.source {
            PrecoolerSource::Bath { fluid, .. } if self.boil_off_routed && outlet_position == 1 => {
                Some(fluid)
            }
            _ => None,
        }
    }

    fn role(&self) -> Role {
        Role::Precooling
    }

    fn utility_fluids(&self) -> Vec<&'static Fluid> {
        match self.source {
            PrecoolerSource::Bath { fluid, .. } => vec![fluid],
            _ => Vec::new(),
        }
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        let mut out = vec![less_drop(inlets[0], self.pressure_drop)];
        match self.source {
            PrecoolerSource::Bath { pressure, .. } if self.boil_off_routed => {
                out.push(Some(pressure))
            }
            _ => out.extend(inlets.get(1).copied()),
        }
        out
    }

    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let (mut outlets, mut performance) = precool(
            inlets,
            self.outlet_temperature,
            self.pressure_drop,
            &self.source,
            self.catalyst,
            context,
        )?;
        if self.boil_off_routed {
            let boil_off = route_boil_off(&self.source, &mut performance, context.detailed)?;
            outlets.push(boil_off);
        }
        Ok((outlets, performance))
    }
}

/// Turns a bath's vented boil-off into a stream: the liquid cryogen it boils enters
/// the plant through the unit (`utility_in`) and leaves as saturated vapour at the
/// bath pressure, carrying the duty, instead of the heat leaving to the bath. The
/// liquid is still charged at its work equivalent, and a vacuum pump (for a bath
/// below one atmosphere) still at its work: it pumps the vapour up to one atmosphere
/// once the flowsheet has warmed it. Returns the boil-off stream.
///
/// A stream arriving colder than the outlet temperature would condense vapour in the
/// bath: on the final pass that is an error; while the tear streams settle, the
/// boil-off is taken as none for that pass.
fn route_boil_off(
    source: &PrecoolerSource,
    performance: &mut Performance,
    final_pass: bool,
) -> Result<Flow> {
    let PrecoolerSource::Bath {
        fluid: cryogen,
        pressure,
        ..
    } = *source
    else {
        return Err(crate::error::Error::Internal(
            "a boil-off routed from a precooler without a bath".into(),
        ));
    };
    let Details::Precooler {
        boil_off: Some(boil_off),
        sink_temperature,
    } = performance.details
    else {
        return Err(crate::error::Error::Internal(
            "a bath precooler that reports no boil-off".into(),
        ));
    };
    if boil_off < 0.0 && !final_pass {
        let vapour = cryogen.state_p_quality(pressure, 1.0)?;
        return Ok(Flow {
            state: vapour,
            flow: 0.0,
        });
    }
    if boil_off < 0.0 {
        return Err(crate::error::Error::Input(format!(
            "the precooler's stream arrives colder than its outlet temperature, so the bath would condense {:.4} g/s of its vapour; a routed boil-off needs the bath to take heat",
            -boil_off * 1e3
        )));
    }
    let liquid = cryogen.state_p_quality(pressure, 0.0)?;
    let vapour = cryogen.state_p_quality(pressure, 1.0)?;
    // The heat goes into the boil-off stream, not out to the bath.
    performance
        .heat_in
        .retain(|(_, temperature)| *temperature != sink_temperature);
    performance.utility_in = Some(Flow {
        state: liquid,
        flow: boil_off,
    });
    Ok(Flow {
        state: vapour,
        flow: boil_off,
    })
}

/// Cools `inlets[0]` to `outlet_temperature` (over an ortho–para catalyst when
/// `catalyst`, so that a hydrogen stream leaves in equilibrium); `inlets[1]` is the
/// coolant stream, when there is one.
pub fn precool(
    inlets: &[Flow],
    outlet_temperature: f64,
    pressure_drop: f64,
    source: &PrecoolerSource,
    catalyst: bool,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let process = &inlets[0];
    let path = StreamPath::new(&process.state, catalyst, "precooler")?;
    let p_out = process.state.pressure - pressure_drop;
    let target = path.state_at(outlet_temperature, p_out)?;
    let m = process.flow;
    match *source {
        PrecoolerSource::Bath { .. } | PrecoolerSource::Refrigerator { .. } => {
            let performance = sink_charge(m, &process.state, &target, source, context)?;
            Ok((
                vec![Flow {
                    state: target,
                    flow: m,
                }],
                performance,
            ))
        }
        PrecoolerSource::Coolant => {
            let coolant = &inlets[1];
            let coolant_fluid = coolant.state.material();
            let needed = m * (process.state.enthalpy - target.enthalpy);
            // The coolant cannot be warmed past the process inlet temperature.
            let warmest = coolant_fluid
                .state_tp(
                    process.state.temperature.min(coolant_fluid.temperature_max),
                    coolant.state.pressure,
                )
                .or_else(|_| {
                    coolant_fluid.state_tp(
                        process.state.temperature * (1.0 + 1e-9),
                        coolant.state.pressure,
                    )
                })?;
            let capacity = (coolant.flow * (warmest.enthalpy - coolant.state.enthalpy)).max(0.0);
            let duty = needed.min(capacity).max(0.0);
            let process_out = if duty < needed {
                path.state(
                    p_out,
                    process.state.enthalpy - duty / m.max(1e-300),
                    &process.state,
                )?
            } else {
                target
            };
            let coolant_out = if coolant.flow > 0.0 {
                coolant_fluid.state_ph(
                    coolant.state.pressure,
                    coolant.state.enthalpy + duty / coolant.flow,
                )?
            } else {
                coolant.state.clone()
            };
            let performance = Performance {
                duty: Some(duty),
                details: Details::Precooler {
                    sink_temperature: coolant.state.temperature,
                    boil_off: None,
                },
                ..Performance::default()
            };
            Ok((
                vec![
                    Flow {
                        state: process_out,
                        flow: m,
                    },
                    Flow {
                        state: coolant_out,
                        flow: coolant.flow,
                    },
                ],
                performance,
            ))
        }
    }
}

/// What taking `inlet` down to `outlet` (flow `m`, kg/s) costs against a bath or a
/// refrigerator: the duty, the heat at the sink's temperature, the cryogen boiled
/// and its work equivalent, or the refrigerator's power.
pub fn sink_charge(
    m: f64,
    inlet: &State,
    outlet: &State,
    source: &PrecoolerSource,
    context: &Context,
) -> Result<Performance> {
    let duty = m * (inlet.enthalpy - outlet.enthalpy);
    match *source {
        PrecoolerSource::Bath {
            fluid: cryogen,
            pressure,
            liquid_work,
            pump_work,
        } => {
            let saturation = cryogen.saturation_at_pressure(pressure)?;
            let liquid =
                cryogen.properties(saturation.liquid.temperature, saturation.liquid.density);
            let vapour =
                cryogen.properties(saturation.vapour.temperature, saturation.vapour.density);
            let boil_off = duty / (vapour.enthalpy - liquid.enthalpy);
            // The bath boils at its bubble temperature (for air, between bubble and dew).
            let bath = 0.5 * (saturation.liquid.temperature + saturation.vapour.temperature);
            // The vacuum pump compresses the boil-off isothermally at ambient and
            // rejects its work there as heat.
            let pump = boil_off.max(0.0) * pump_work;
            Ok(Performance {
                work_in: pump,
                heat_in: vec![(-duty, bath), (-pump, context.ambient)],
                duty: Some(duty),
                precooling_work: boil_off.max(0.0) * liquid_work,
                details: Details::Precooler {
                    sink_temperature: bath,
                    boil_off: Some(boil_off),
                },
                ..Performance::default()
            })
        }
        PrecoolerSource::Refrigerator { fraction_of_carnot } => {
            let ds = inlet.entropy - outlet.entropy;
            // The thermodynamic mean temperature at which the heat is removed.
            let mean = if ds.abs() > 1e-12 {
                (inlet.enthalpy - outlet.enthalpy) / ds
            } else {
                outlet.temperature
            };
            let carnot = (context.ambient / mean - 1.0).max(0.0);
            let power = duty.max(0.0) * carnot / fraction_of_carnot;
            Ok(Performance {
                heat_in: vec![(-duty, mean)],
                duty: Some(duty),
                precooling_work: power,
                extra_destroyed: power - duty.max(0.0) * carnot,
                details: Details::Precooler {
                    sink_temperature: mean,
                    boil_off: None,
                },
                ..Performance::default()
            })
        }
        PrecoolerSource::Coolant => Err(crate::error::Error::Internal(
            "a coolant stream is not charged as a sink".into(),
        )),
    }
}
