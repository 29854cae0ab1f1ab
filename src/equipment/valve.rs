//! A throttling (Joule-Thomson) valve: isenthalpic to the outlet pressure, with an
//! optional heat in-leak; the outlet may be two-phase.

use super::kind::{with_heat_leak, EquipmentKind, Ports, PressureConflict, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};

/// A valve's parameters.
#[derive(Debug, Clone)]
pub struct Valve {
    /// Outlet pressure, Pa.
    pub outlet_pressure: f64,
    /// Heat leaking in from ambient, W.
    pub heat_leak: f64,
}

impl EquipmentKind for Valve {
    const NAME: &'static str = "valve";
    const KEYS: &'static [&'static str] = &["inlet", "outlet_pressure", "heat_leak", "flow"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let valve = Valve {
            outlet_pressure: r.pressure("outlet_pressure")?,
            heat_leak: r.heat_leak()?,
        };
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(valve)
    }
}

/// The rule shared by the units that only lower the pressure (valves, expanders).
pub fn only_lowers(kind: &str, outlet: f64, inlet: f64) -> Option<PressureConflict> {
    (outlet >= inlet).then(|| PressureConflict {
        key: "outlet_pressure",
        message: format!(
            "the outlet pressure {:.4} bar is not below the inlet pressure {:.4} bar: a {kind} only lowers the pressure",
            outlet / 1e5,
            inlet / 1e5
        ),
    })
}

impl Equipment for Valve {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![Some(self.outlet_pressure)]
    }

    fn pressure_conflict(&self, inlet: f64) -> Option<PressureConflict> {
        only_lowers(Self::NAME, self.outlet_pressure, inlet)
    }

    /// Throttles the inlet to the outlet pressure at constant enthalpy plus the
    /// heat leak per unit of flow.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let (out, performance) =
            with_heat_leak(&inlets[0], self.outlet_pressure, self.heat_leak, context)?;
        Ok((vec![out], performance))
    }
}
