//! An adiabatic mixer: the outlet at the lowest inlet pressure with the
//! flow-weighted enthalpy.

use super::{Flow, Performance};
use crate::error::Result;

/// Mixes the inlets.
pub fn run(inlets: &[Flow]) -> Result<(Vec<Flow>, Performance)> {
    let flow: f64 = inlets.iter().map(|f| f.flow).sum();
    let pressure = inlets
        .iter()
        .map(|f| f.state.pressure)
        .fold(f64::INFINITY, f64::min);
    let first = &inlets[0];
    if !(flow > 0.0) {
        return Ok((
            vec![Flow {
                state: first.state.clone(),
                flow: 0.0,
            }],
            Performance::default(),
        ));
    }
    let enthalpy = inlets
        .iter()
        .map(|f| f.flow * f.state.enthalpy)
        .sum::<f64>()
        / flow;
    let state = first.state.fluid().state_ph(pressure, enthalpy)?;
    Ok((vec![Flow { state, flow }], Performance::default()))
}
