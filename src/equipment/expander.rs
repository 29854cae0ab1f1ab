//! An expansion turbine with an isentropic efficiency; its work is recovered or
//! dissipated in a brake.

use super::kind::{EquipmentKind, Ports, PressureConflict, Reader};
use super::valve::only_lowers;
use super::{Context, Details, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};

/// What an expander does with its work.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ExpanderWork {
    /// Recovered and credited against the compressor power.
    Recovered,
    /// Dissipated in a brake (counted as exergy destroyed).
    Dissipated,
}

/// An expander's parameters.
#[derive(Debug, Clone)]
pub struct Expander {
    /// Outlet pressure, Pa.
    pub outlet_pressure: f64,
    /// Isentropic efficiency.
    pub isentropic_efficiency: f64,
    /// Recovered or dissipated.
    pub work: ExpanderWork,
}

impl EquipmentKind for Expander {
    const NAME: &'static str = "expander";
    const KEYS: &'static [&'static str] = &[
        "inlet",
        "outlet_pressure",
        "isentropic_efficiency",
        "work",
        "flow",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let expander = Expander {
            outlet_pressure: r.pressure("outlet_pressure")?,
            isentropic_efficiency: r.efficiency("isentropic_efficiency", None)?,
            work: match r.choice("work", "work", &["recovered", "dissipated"])? {
                0 => ExpanderWork::Recovered,
                _ => ExpanderWork::Dissipated,
            },
        };
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(expander)
    }
}

impl Equipment for Expander {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![Some(self.outlet_pressure)]
    }

    fn pressure_conflict(&self, inlet: f64) -> Option<PressureConflict> {
        only_lowers(Self::NAME, self.outlet_pressure, inlet)
    }

    /// Expands the inlet to the outlet pressure with the isentropic efficiency.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let inlet = &inlets[0];
        let fluid = inlet.state.material();
        let ideal = fluid.state_ps(self.outlet_pressure, inlet.state.entropy)?;
        let h = inlet.state.enthalpy
            - self.isentropic_efficiency * (inlet.state.enthalpy - ideal.enthalpy);
        let out = fluid.state_ph(self.outlet_pressure, h)?;
        let power = inlet.flow * (inlet.state.enthalpy - out.enthalpy);
        let liquid = 1.0 - out.vapour_fraction();
        let mut performance = Performance {
            details: Details::Expander {
                outlet_liquid_fraction: liquid,
            },
            ..Performance::default()
        };
        match self.work {
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
}
