//! Equipment models, one file per kind. Each takes its inlet flows and returns its
//! outlet flows with what it did (work, heat, duty). None parses files or prints.

pub mod compressor;
pub mod cooler;
pub mod exchanger;
pub mod expander;
pub mod feed;
pub mod mixer;
pub mod precooler;
pub mod separator;
pub mod splitter;
pub mod valve;

use crate::error::Result;
use crate::flowsheet::UnitSpec;
use crate::fluids::State;

/// A stream's state and mass flow.
#[derive(Debug, Clone)]
pub struct Flow {
    /// Thermodynamic state.
    pub state: State,
    /// Mass flow, kg/s.
    pub flow: f64,
}

/// What the solver passes every model.
#[derive(Debug, Clone, Copy)]
pub struct Context {
    /// Ambient (dead-state) temperature, K.
    pub ambient: f64,
    /// Work out everything reported (exchanger profiles, conductance, largest duty),
    /// not only what the outlets need; the solver asks for it on its final pass.
    pub detailed: bool,
}

/// Kind-specific results.
#[derive(Debug, Clone, Default)]
pub enum Details {
    /// Nothing beyond the common figures.
    #[default]
    None,
    /// Compressor: discharge temperature of each stage, K.
    Compressor {
        /// Per stage.
        discharge_temperatures: Vec<f64>,
    },
    /// Exchanger: conductance, effectiveness, the smallest temperature difference and
    /// where it occurs, and the profile.
    Exchanger(Box<exchanger::ExchangerReport>),
    /// Precooler: bath temperature and boil-off, or refrigerator figures.
    Precooler {
        /// Bath (or coolant inlet) temperature, K.
        sink_temperature: f64,
        /// Cryogen evaporated, kg/s (bath only).
        boil_off: Option<f64>,
    },
    /// Expander: the liquid mass fraction at the outlet.
    Expander {
        /// Liquid fraction.
        outlet_liquid_fraction: f64,
    },
}

/// What one unit did.
#[derive(Debug, Clone, Default)]
pub struct Performance {
    /// Shaft power into the unit, W (negative: recovered from it).
    pub work_in: f64,
    /// Heat exchanged with reservoirs outside the streams: (heat into the plant W,
    /// reservoir temperature K). Ambient coolers reject at the ambient temperature.
    pub heat_in: Vec<(f64, f64)>,
    /// Heat transferred, W (cooler, precooler, exchanger).
    pub duty: Option<f64>,
    /// The work equivalent of precooling, W (cryogen or refrigerator).
    pub precooling_work: f64,
    /// Exergy destroyed outside the streams' own entropy balance, W (the
    /// refrigerator's internal losses).
    pub extra_destroyed: f64,
    /// Kind-specific figures.
    pub details: Details,
}

/// Runs the model of `spec` on its inlets. `feed_flow` is the flow the solver gives
/// a feed; `duty_hint` is the unit's duty on the previous pass, which exchangers
/// solved for their duty start from.
pub fn run(
    spec: &UnitSpec,
    inlets: &[Flow],
    feed_flow: f64,
    context: &Context,
    duty_hint: Option<f64>,
) -> Result<(Vec<Flow>, Performance)> {
    match spec {
        UnitSpec::Feed {
            fluid,
            temperature,
            pressure,
            ..
        } => feed::run(fluid, *temperature, *pressure, feed_flow),
        UnitSpec::Product { .. } => Ok((vec![], Performance::default())),
        UnitSpec::Compressor {
            outlet_pressure,
            model,
        } => compressor::run(&inlets[0], *outlet_pressure, model, context),
        UnitSpec::Cooler {
            outlet_temperature,
            pressure_drop,
        } => cooler::run(&inlets[0], *outlet_temperature, *pressure_drop, context),
        UnitSpec::Exchanger {
            spec,
            hot_pressure_drop,
            cold_pressure_drop,
            heat_leak,
            segments,
        } => exchanger::run(
            &inlets[0],
            &inlets[1],
            &exchanger::Design {
                spec: *spec,
                hot_pressure_drop: *hot_pressure_drop,
                cold_pressure_drop: *cold_pressure_drop,
                heat_leak: *heat_leak,
                segments: *segments,
            },
            context,
            duty_hint,
        ),
        UnitSpec::Precooler {
            outlet_temperature,
            pressure_drop,
            source,
            ..
        } => precooler::run(inlets, *outlet_temperature, *pressure_drop, source, context),
        UnitSpec::Valve {
            outlet_pressure,
            heat_leak,
        } => valve::run(&inlets[0], *outlet_pressure, *heat_leak, context),
        UnitSpec::Separator => separator::run(&inlets[0]),
        UnitSpec::Mixer => mixer::run(inlets),
        UnitSpec::Splitter { fraction } => splitter::run(&inlets[0], *fraction),
        UnitSpec::Expander {
            outlet_pressure,
            isentropic_efficiency,
            work,
        } => expander::run(
            &inlets[0],
            *outlet_pressure,
            *isentropic_efficiency,
            *work,
            context,
        ),
    }
}
