//! A feed: a stream of fixed state entering the plant.

use super::{Flow, Performance};
use crate::error::Result;
use crate::fluids::Fluid;

/// The feed's outlet at (T, p) with the given flow.
pub fn run(
    fluid: &'static Fluid,
    temperature: f64,
    pressure: f64,
    flow: f64,
) -> Result<(Vec<Flow>, Performance)> {
    let state = fluid.state_tp(temperature, pressure)?;
    Ok((vec![Flow { state, flow }], Performance::default()))
}
