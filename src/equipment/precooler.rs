//! A precooler: takes a stream down to a temperature against a bath of boiling
//! cryogen, a refrigerator, or a coolant stream of the flowsheet.

use super::{Context, Details, Flow, Performance};
use crate::error::Result;
use crate::flowsheet::plant::PrecoolerSource;

/// Cools `inlets[0]` to `outlet_temperature`; `inlets[1]` is the coolant stream,
/// when there is one.
pub fn run(
    inlets: &[Flow],
    outlet_temperature: f64,
    pressure_drop: f64,
    source: &PrecoolerSource,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let process = &inlets[0];
    let fluid = process.state.fluid();
    let p_out = process.state.pressure - pressure_drop;
    let target = fluid.state_tp(outlet_temperature, p_out)?;
    let m = process.flow;
    match *source {
        PrecoolerSource::Bath {
            fluid: cryogen,
            pressure,
            liquid_work,
            ..
        } => {
            let duty = m * (process.state.enthalpy - target.enthalpy);
            let saturation = cryogen.saturation_at_pressure(pressure)?;
            let liquid =
                cryogen.properties(saturation.liquid.temperature, saturation.liquid.density);
            let vapour =
                cryogen.properties(saturation.vapour.temperature, saturation.vapour.density);
            let boil_off = duty / (vapour.enthalpy - liquid.enthalpy);
            // The bath boils at its bubble temperature (for air, between bubble and dew).
            let bath = 0.5 * (saturation.liquid.temperature + saturation.vapour.temperature);
            let performance = Performance {
                heat_in: vec![(-duty, bath)],
                duty: Some(duty),
                precooling_work: boil_off.max(0.0) * liquid_work,
                details: Details::Precooler {
                    sink_temperature: bath,
                    boil_off: Some(boil_off),
                },
                ..Performance::default()
            };
            Ok((
                vec![Flow {
                    state: target,
                    flow: m,
                }],
                performance,
            ))
        }
        PrecoolerSource::Refrigerator { fraction_of_carnot } => {
            let duty = m * (process.state.enthalpy - target.enthalpy);
            let ds = process.state.entropy - target.entropy;
            // The thermodynamic mean temperature at which the heat is removed.
            let mean = if ds.abs() > 1e-12 {
                (process.state.enthalpy - target.enthalpy) / ds
            } else {
                outlet_temperature
            };
            let carnot = (context.ambient / mean - 1.0).max(0.0);
            let power = duty.max(0.0) * carnot / fraction_of_carnot;
            let performance = Performance {
                heat_in: vec![(-duty, mean)],
                duty: Some(duty),
                precooling_work: power,
                extra_destroyed: power - duty.max(0.0) * carnot,
                details: Details::Precooler {
                    sink_temperature: mean,
                    boil_off: None,
                },
                ..Performance::default()
            };
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
            let coolant_fluid = coolant.state.fluid();
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
                fluid.state_ph(p_out, process.state.enthalpy - duty / m.max(1e-300))?
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
