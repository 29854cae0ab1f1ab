//! A transfer line: a pipe that carries a stream with a pressure drop and a heat
//! in-leak from ambient (a vacuum-jacketed cryogenic line's few W/m add up), and
//! no work.

use super::kind::{less_drop, with_heat_leak, EquipmentKind, Ports, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};

/// A transfer line's parameters.
#[derive(Debug, Clone)]
pub struct TransferLine {
    /// Pressure drop, Pa.
    pub pressure_drop: f64,
    /// Heat leaking in from ambient, W.
    pub heat_leak: f64,
}

impl EquipmentKind for TransferLine {
    const NAME: &'static str = "transfer-line";
    const KEYS: &'static [&'static str] = &["inlet", "pressure_drop", "heat_leak", "flow"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let line = TransferLine {
            pressure_drop: r.pressure_drop("pressure_drop")?,
            heat_leak: r.heat_leak()?,
        };
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(line)
    }
}

impl Equipment for TransferLine {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![less_drop(inlets[0], self.pressure_drop)]
    }

    /// The outlet at the inlet enthalpy plus the heat leak per unit of flow, at the
    /// inlet pressure less the drop.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let inlet = &inlets[0];
        let pressure = inlet.state.pressure - self.pressure_drop;
        let (out, performance) = with_heat_leak(inlet, pressure, self.heat_leak, context)?;
        let performance = Performance {
            duty: Some(self.heat_leak),
            ..performance
        };
        Ok((vec![out], performance))
    }
}
