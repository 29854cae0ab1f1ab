//! A splitter: the inlet state to both outlets, `fraction` of the flow to `branch`.

use super::kind::{EquipmentKind, Ports, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::quantity::Dimension;

/// A splitter's parameters.
#[derive(Debug, Clone)]
pub struct Splitter {
    /// Share of the inlet flow sent to the `branch` port.
    pub fraction: f64,
}

impl EquipmentKind for Splitter {
    const NAME: &'static str = "splitter";
    const KEYS: &'static [&'static str] = &["inlet", "fraction"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let fraction = r.quantity("fraction", Dimension::Fraction, 0.0, 1.0)?;
        r.inlet("in", "inlet")?;
        Ok(Splitter { fraction })
    }
}

impl Equipment for Splitter {
    fn ports(&self) -> Ports {
        Ports {
            inlets: vec!["in"],
            outlets: vec!["main", "branch"],
        }
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![inlets[0], inlets[0]]
    }

    /// Splits the inlet: (main, branch).
    fn run(&self, inlets: &[Flow], _context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let inlet = &inlets[0];
        let main = Flow {
            state: inlet.state.clone(),
            flow: inlet.flow * (1.0 - self.fraction),
        };
        let branch = Flow {
            state: inlet.state.clone(),
            flow: inlet.flow * self.fraction,
        };
        Ok((vec![main, branch], Performance::default()))
    }
}
