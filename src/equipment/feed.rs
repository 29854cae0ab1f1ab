//! A feed: a stream of fixed state entering the plant, with a fixed flow (a flow
//! basis) or a make-up flow found by balance.

use super::kind::{EquipmentKind, FeedFlow, Ports, Reader, Role};
use super::precooler::ASSUMED_CRYOGEN_PLANT_FIGURE_OF_MERIT;
use super::{Context, Equipment, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::fluids::{spin, DeadState, Fluid, Material};
use crate::quantity::Dimension;

/// A feed colder than ambient by more than this, K, is bought cryogen (common
/// practice: gas drawn from the atmosphere or a pipeline arrives at ambient).
pub const CRYOGEN_BELOW_AMBIENT: f64 = 1.0;

/// What a kilogram of a bought-cryogen feed is charged.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CryogenCharge {
    /// Work equivalent, J/kg.
    pub work_per_kg: f64,
    /// Whether it is the default (the feed's exergy over the assumed figure of
    /// merit of the plant that makes it) rather than the flowsheet's `liquid_work`.
    pub is_default: bool,
}

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
    /// Hydrogen given a `para_fraction`: the ortho–para solution with this para
    /// fraction (`None`: the fluid as it is, frozen normal for `hydrogen`).
    pub para_fraction: Option<f64>,
    /// The charge for bought cryogen: a feed colder than ambient, or one given a
    /// `liquid_work`.
    pub cryogen: Option<CryogenCharge>,
}

impl EquipmentKind for Feed {
    const NAME: &'static str = "feed";
    const KEYS: &'static [&'static str] =
        &["fluid", "temperature", "pressure", "flow", "liquid_work", "para_fraction"];

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
        let para_fraction = match r.text_opt("para_fraction")?.as_deref() {
            None => None,
            _ if fluid.name != "hydrogen" => {
                return Err(r.error(
                    "para_fraction",
                    format!(
                        "'para_fraction' belongs to a `hydrogen` feed; this feed is {}",
                        fluid.name
                    ),
                ))
            }
            Some("equilibrium") => Some(spin::equilibrium_para_fraction(temperature)),
            Some(_) => Some(r.quantity("para_fraction", Dimension::Fraction, 0.0, 1.0)?),
        };
        let material = match para_fraction {
            Some(x) => Material::hydrogen_solution(x)
                .map_err(|e| r.error("para_fraction", e.to_string()))?,
            None => Material::plain(fluid),
        };
        let liquid_work = r.quantity_opt("liquid_work", Dimension::SpecificEnergy, 0.0, 1e8)?;
        let cryogen = match liquid_work {
            Some(work_per_kg) => Some(CryogenCharge {
                work_per_kg,
                is_default: false,
            }),
            None if temperature < r.ambient - CRYOGEN_BELOW_AMBIENT => {
                let state = material
                    .state_tp(temperature, pressure)
                    .map_err(|e| r.error("temperature", e.to_string()))?;
                let dead = DeadState::of(fluid, r.ambient)
                    .map_err(|e| r.error("fluid", e.to_string()))?;
                Some(CryogenCharge {
                    work_per_kg: dead.exergy(&state) / ASSUMED_CRYOGEN_PLANT_FIGURE_OF_MERIT,
                    is_default: true,
                })
            }
            None => None,
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
            para_fraction,
            cryogen,
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

    fn gives_para_fraction(&self) -> Option<bool> {
        (self.fluid.name == "hydrogen").then_some(self.para_fraction.is_some())
    }

    fn outlet_pressures(&self, _inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![Some(self.pressure)]
    }

    /// The outlet at (T, p) with the flow the solver gives the feed; bought
    /// cryogen is charged its work equivalent as precooling work.
    fn run(&self, _inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        let material = match self.para_fraction {
            Some(x) => Material::hydrogen_solution(x)?,
            None => Material::plain(self.fluid),
        };
        let state = material.state_tp(self.temperature, self.pressure)?;
        let performance = Performance {
            precooling_work: self
                .cryogen
                .map_or(0.0, |c| c.work_per_kg * context.feed_flow.max(0.0)),
            ..Performance::default()
        };
        Ok((
            vec![Flow {
                state,
                flow: context.feed_flow,
            }],
            performance,
        ))
    }
}
