//! A phase separator: saturated liquid and vapour outlets at the inlet pressure, by
//! the lever rule. A single-phase inlet leaves by one outlet; the other carries no
//! flow (at the saturated state, where there is one).

use super::{Flow, Performance};
use crate::error::Result;
use crate::fluids::Phase;

/// Splits `inlet` into liquid and vapour.
pub fn run(inlet: &Flow) -> Result<(Vec<Flow>, Performance)> {
    let state = &inlet.state;
    let fluid = state.fluid();
    let p = state.pressure;
    let saturated = |x: f64| {
        fluid
            .state_p_quality(p, x)
            .unwrap_or_else(|_| state.clone())
    };
    let (liquid, vapour) = match state.phase {
        Phase::TwoPhase => {
            let x = state.quality.unwrap_or(0.0);
            (
                Flow {
                    state: fluid.state_p_quality(p, 0.0)?,
                    flow: inlet.flow * (1.0 - x),
                },
                Flow {
                    state: fluid.state_p_quality(p, 1.0)?,
                    flow: inlet.flow * x,
                },
            )
        }
        Phase::Liquid => (
            inlet.clone(),
            Flow {
                state: saturated(1.0),
                flow: 0.0,
            },
        ),
        _ => (
            Flow {
                state: saturated(0.0),
                flow: 0.0,
            },
            inlet.clone(),
        ),
    };
    Ok((vec![liquid, vapour], Performance::default()))
}
