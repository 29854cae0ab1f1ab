//! A phase separator: saturated liquid and vapour outlets at the inlet pressure, by
//! the lever rule. A single-phase inlet leaves by one outlet; the other carries no
//! flow (at the saturated state, where there is one).

use super::kind::{EquipmentKind, Ports, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::fluids::Phase;

/// A separator has no parameters.
#[derive(Debug, Clone)]
pub struct Separator;

impl EquipmentKind for Separator {
    const NAME: &'static str = "separator";
    const KEYS: &'static [&'static str] = &["inlet"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        r.inlet("in", "inlet")?;
        Ok(Separator)
    }
}

impl Equipment for Separator {
    fn ports(&self) -> Ports {
        Ports {
            inlets: vec!["in"],
            outlets: vec!["liquid", "vapor"],
        }
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![inlets[0], inlets[0]]
    }

    fn run(&self, inlets: &[Flow], _context: &Context) -> Result<(Vec<Flow>, Performance)> {
        separate(&inlets[0])
    }
}

/// Splits `inlet` into liquid and vapour.
pub fn separate(inlet: &Flow) -> Result<(Vec<Flow>, Performance)> {
    let state = &inlet.state;
    let fluid = state.material();
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
