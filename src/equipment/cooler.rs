//! A cooler: takes a stream to a temperature against ambient air or cooling water.

use super::{Context, Flow, Performance};
use crate::error::Result;

/// Cools `inlet` to `outlet_temperature`, with a pressure drop.
pub fn run(
    inlet: &Flow,
    outlet_temperature: f64,
    pressure_drop: f64,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let fluid = inlet.state.fluid();
    let out = fluid.state_tp(outlet_temperature, inlet.state.pressure - pressure_drop)?;
    let duty = inlet.flow * (inlet.state.enthalpy - out.enthalpy);
    let performance = Performance {
        heat_in: vec![(-duty, context.ambient)],
        duty: Some(duty),
        ..Performance::default()
    };
    Ok((
        vec![Flow {
            state: out,
            flow: inlet.flow,
        }],
        performance,
    ))
}
