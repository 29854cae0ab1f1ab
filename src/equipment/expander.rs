//! An expansion turbine with an isentropic efficiency; its work is recovered or
//! dissipated in a brake.

use super::{Context, Details, Flow, Performance};
use crate::error::Result;
use crate::flowsheet::plant::ExpanderWork;

/// Expands `inlet` to `outlet_pressure`.
pub fn run(
    inlet: &Flow,
    outlet_pressure: f64,
    efficiency: f64,
    work: ExpanderWork,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let fluid = inlet.state.fluid();
    let ideal = fluid.state_ps(outlet_pressure, inlet.state.entropy)?;
    let h = inlet.state.enthalpy - efficiency * (inlet.state.enthalpy - ideal.enthalpy);
    let out = fluid.state_ph(outlet_pressure, h)?;
    let power = inlet.flow * (inlet.state.enthalpy - out.enthalpy);
    let liquid = 1.0 - out.vapour_fraction();
    let mut performance = Performance {
        details: Details::Expander {
            outlet_liquid_fraction: liquid,
        },
        ..Performance::default()
    };
    match work {
        ExpanderWork::Recovered => performance.work_in = -power,
        // The brake turns the work into heat rejected to ambient.
        ExpanderWork::Dissipated => performance.heat_in = vec![(-power, context.ambient)],
    }
    Ok((
        vec![Flow {
            state: out,
            flow: inlet.flow,
        }],
        performance,
    ))
}
