//! Compressors: isothermal with an isothermal efficiency, or adiabatic stages of
//! equal pressure ratio with intercooling after each stage.

use super::{Context, Details, Flow, Performance};
use crate::error::Result;
use crate::flowsheet::plant::CompressorModel;

/// Compresses `inlet` to `outlet_pressure`.
pub fn run(
    inlet: &Flow,
    outlet_pressure: f64,
    model: &CompressorModel,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let fluid = inlet.state.fluid();
    let m = inlet.flow;
    let s_in = &inlet.state;
    match *model {
        CompressorModel::Isothermal {
            efficiency,
            temperature,
        } => {
            // Ideal isothermal work at the compression temperature T: Δh − T Δs from
            // (T, p_in) to (T, p_out); the inlet is brought to T against ambient first.
            let start = fluid.state_tp(temperature, s_in.pressure)?;
            let out = fluid.state_tp(temperature, outlet_pressure)?;
            let ideal =
                (out.enthalpy - start.enthalpy) - temperature * (out.entropy - start.entropy);
            let work = m * ideal / efficiency;
            let rejected = work - m * (out.enthalpy - s_in.enthalpy);
            let performance = Performance {
                work_in: work,
                heat_in: vec![(-rejected, context.ambient)],
                duty: Some(rejected),
                details: Details::Compressor {
                    discharge_temperatures: vec![out.temperature],
                },
                ..Performance::default()
            };
            Ok((
                vec![Flow {
                    state: out,
                    flow: m,
                }],
                performance,
            ))
        }
        CompressorModel::Staged {
            stages,
            isentropic_efficiency,
            intercooler_temperature,
        } => {
            let ratio = (outlet_pressure / s_in.pressure).powf(1.0 / stages as f64);
            let mut state = s_in.clone();
            let mut work = 0.0;
            let mut rejected = 0.0;
            let mut discharge = Vec::with_capacity(stages);
            for stage in 1..=stages {
                let p = if stage == stages {
                    outlet_pressure
                } else {
                    s_in.pressure * ratio.powi(stage as i32)
                };
                let ideal = fluid.state_ps(p, state.entropy)?;
                let h = state.enthalpy + (ideal.enthalpy - state.enthalpy) / isentropic_efficiency;
                let hot = fluid.state_ph(p, h)?;
                discharge.push(hot.temperature);
                work += m * (hot.enthalpy - state.enthalpy);
                let cooled = fluid.state_tp(intercooler_temperature, p)?;
                rejected += m * (hot.enthalpy - cooled.enthalpy);
                state = cooled;
            }
            let performance = Performance {
                work_in: work,
                heat_in: vec![(-rejected, context.ambient)],
                duty: Some(rejected),
                details: Details::Compressor {
                    discharge_temperatures: discharge,
                },
                ..Performance::default()
            };
            Ok((vec![Flow { state, flow: m }], performance))
        }
    }
}
