//! A feed: a stream of fixed state entering the plant, with a fixed flow (a flow
//! basis) or a make-up flow found by balance.

use super::kind::{EquipmentKind, FeedFlow, Ports, Reader, Role};
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::fluids::Fluid;
use crate::quantity::Dimension;

/// A feed's parameters.
#[derive(Debug, Clone)]
pub struct Feed {
    /// Its fluid.
    pub fluid: &'static Fluid,
    /// Temperature, K.
    pub temperature: f64,
    /// Pressure, Pa.
    pub pressure: f64,
    /// How its flow is set.
    pub flow: FeedFlow,
}

impl EquipmentKind for Feed {
    const NAME: &'static str = "feed";
    const KEYS: &'static [&'static str] = &["fluid", "temperature", "pressure", "flow"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let fluid = r.fluid("fluid", &r.text("fluid")?)?;
        let temperature = r.quantity(
            "temperature",
            Dimension::Temperature,
            fluid.temperature_min,
            fluid.temperature_max,
        )?;
        let pressure = r.quantity("pressure", Dimension::Pressure, 1.0, fluid.pressure_max)?;
        let flow = match r.text_opt("flow")?.as_deref() {
            None => return Err(r.error("flow", MISSING_FLOW)),
            Some("balance") => FeedFlow::Balance,
            Some(_) => FeedFlow::Fixed(r.quantity("flow", Dimension::MassFlow, 1e-9, 1e5)?),
        };
        r.set_flow_basis(match flow {
            FeedFlow::Fixed(v) => Some(v),
            FeedFlow::Balance => None,
        });
        r.set_fluid(fluid, "fluid");
        Ok(Feed {
            fluid,
            temperature,
            pressure,
            flow,
        })
    }
}

const MISSING_FLOW: &str =
    "'flow' is required for a feed: a mass flow such as 0.05 kg/s, or 'balance' for make-up";

impl Equipment for Feed {
    fn ports(&self) -> Ports {
        Ports {
            inlets: vec![],
            outlets: vec!["out"],
        }
    }

    fn role(&self) -> Role {
        Role::Feed(self.flow)
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![Some(self.pressure)]
    }

    /// The outlet at (T, p) with the flow the solver gives the feed.
    fn run(&self, _inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let state = self.fluid.state_tp(self.temperature, self.pressure)?;
        Ok((
            vec![Flow {
                state,
                flow: context.feed_flow,
            }],
            Performance::default(),
        ))
    }
}
