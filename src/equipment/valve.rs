//! A throttling (Joule-Thomson) valve: isenthalpic to the outlet pressure, with an
//! optional heat in-leak; the outlet may be two-phase.

use super::{Context, Flow, Performance};
use crate::error::Result;

/// Throttles `inlet` to `outlet_pressure`.
pub fn run(
    inlet: &Flow,
    outlet_pressure: f64,
    heat_leak: f64,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let fluid = inlet.state.fluid();
    let h = inlet.state.enthalpy
        + if inlet.flow > 0.0 {
            heat_leak / inlet.flow
        } else {
            0.0
        };
    let out = fluid.state_ph(outlet_pressure, h)?;
    let performance = Performance {
        heat_in: vec![(heat_leak, context.ambient)],
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
