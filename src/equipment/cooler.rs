//! A cooler: takes a stream to a temperature against ambient air or cooling water.

use super::kind::{less_drop, EquipmentKind, Ports, Reader};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::quantity::Dimension;

/// A cooler's parameters.
#[derive(Debug, Clone)]
pub struct Cooler {
    /// Outlet temperature, K.
    pub outlet_temperature: f64,
    /// Pressure drop, Pa.
    pub pressure_drop: f64,
}

impl EquipmentKind for Cooler {
    const NAME: &'static str = "cooler";
    const KEYS: &'static [&'static str] = &[
        "inlet",
        "outlet_temperature",
        "pressure_drop",
        "medium",
        "flow",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        // The medium is recorded for the reader of the file; both reject at ambient.
        r.choice("medium", "medium", &["ambient", "cooling-water"])?;
        let cooler = Cooler {
            outlet_temperature: r.quantity(
                "outlet_temperature",
                Dimension::Temperature,
                1.0,
                2000.0,
            )?,
            pressure_drop: r.pressure_drop("pressure_drop")?,
        };
        r.inlet("in", "inlet")?;
        r.flow_basis()?;
        Ok(cooler)
    }
}

impl Equipment for Cooler {
    fn ports(&self) -> Ports {
        Ports::through()
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![less_drop(inlets[0], self.pressure_drop)]
    }

    /// Cools the inlet to the outlet temperature, with the pressure drop; the heat
    /// goes to ambient.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let inlet = &inlets[0];
        let fluid = inlet.state.material();
        let out = fluid.state_tp(
            self.outlet_temperature,
            inlet.state.pressure - self.pressure_drop,
        )?;
        let duty = inlet.flow * (inlet.state.enthalpy - out.enthalpy);
        let performance = Performance {
            heat_in: vec![(-duty, context.ambient)],
            duty: Some(duty),
            ..Performance::default()
        };
        Ok((
            vec![Flow {
                state: out,
                flow: inlet.flow,
            }],
            performance,
        ))
    }
}
