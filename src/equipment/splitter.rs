//! A splitter: the inlet state to both outlets, `fraction` of the flow to `branch`.

use super::{Flow, Performance};
use crate::error::Result;

/// Splits `inlet`: (main, branch).
pub fn run(inlet: &Flow, fraction: f64) -> Result<(Vec<Flow>, Performance)> {
    let main = Flow {
        state: inlet.state.clone(),
        flow: inlet.flow * (1.0 - fraction),
    };
    let branch = Flow {
        state: inlet.state.clone(),
        flow: inlet.flow * fraction,
    };
    Ok((vec![main, branch], Performance::default()))
}
