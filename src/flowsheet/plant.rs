//! The resolved plant: equipment with parameters in SI units, streams with their
//! fluids, and the petgraph graph that connects them.

use crate::fluids::Fluid;
use petgraph::graph::{DiGraph, NodeIndex};

/// A port of a unit: the unit's index and the port's name.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct PortRef {
    /// Index of the unit in [`Plant::units`].
    pub unit: usize,
    /// Port name (`out`, `hot-out`, `liquid`, …).
    pub port: &'static str,
}

/// A stream: a connection from an outlet port to an inlet port, carrying one fluid.
#[derive(Debug, Clone)]
pub struct Stream {
    /// Where it comes from.
    pub from: PortRef,
    /// Where it goes.
    pub to: PortRef,
    /// The fluid it carries.
    pub fluid: &'static Fluid,
    /// A readable name, `source.port`.
    pub name: String,
}

/// How a feed's flow is set.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FeedFlow {
    /// A fixed mass flow, kg/s: a flow basis.
    Fixed(f64),
    /// Make-up: equal to what leaves the plant's flow network, less other feeds.
    Balance,
}

/// What a product stands for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ProductRole {
    /// Liquid drawn off: counts towards the liquid yield.
    Liquid,
    /// A vent or other sink: its exergy is counted as lost.
    Vent,
}

/// The compressor models.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum CompressorModel {
    /// Isothermal at a temperature (default ambient), with an isothermal efficiency:
    /// the gas is brought to that temperature, compressed isothermally and delivered
    /// at it, as a machine with inter- and aftercoolers approaches.
    Isothermal {
        /// Ideal isothermal work over actual work.
        efficiency: f64,
        /// The compression temperature, K.
        temperature: f64,
    },
    /// Adiabatic stages of equal pressure ratio with intercooling after each stage.
    Staged {
        /// Number of stages.
        stages: usize,
        /// Isentropic efficiency of each stage.
        isentropic_efficiency: f64,
        /// Temperature after each intercooler and the aftercooler, K.
        intercooler_temperature: f64,
    },
}

/// How an exchanger's duty is fixed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ExchangerSpec {
    /// The smallest temperature difference anywhere along the exchanger, K.
    MinimumApproach(f64),
    /// Hot inlet minus cold outlet temperature, K.
    WarmEndApproach(f64),
    /// Hot outlet minus cold inlet temperature, K.
    ColdEndApproach(f64),
    /// Duty over the largest duty the two streams allow.
    Effectiveness(f64),
    /// Conductance UA, W/K.
    Conductance(f64),
}

/// Where a precooler puts its heat.
#[derive(Debug, Clone, Copy)]
pub enum PrecoolerSource {
    /// A bath of boiling cryogen supplied from outside the flowsheet.
    Bath {
        /// The cryogen.
        fluid: &'static Fluid,
        /// Bath pressure, Pa.
        pressure: f64,
        /// Work equivalent of one kilogram of the cryogen's liquid, J/kg.
        liquid_work: f64,
        /// Whether `liquid_work` was the default.
        liquid_work_is_default: bool,
    },
    /// A refrigerator that rejects heat to ambient, at a fraction of Carnot.
    Refrigerator {
        /// Coefficient of performance over the Carnot value.
        fraction_of_carnot: f64,
    },
    /// A coolant stream of the flowsheet (its `coolant` inlet), boiled or warmed.
    Coolant,
}

/// What an expander does with its work.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ExpanderWork {
    /// Recovered and credited against the compressor power.
    Recovered,
    /// Dissipated in a brake (counted as exergy destroyed).
    Dissipated,
}

/// Equipment parameters, in SI units.
#[derive(Debug, Clone)]
pub enum UnitSpec {
    /// A stream entering the plant.
    Feed {
        /// Fluid.
        fluid: &'static Fluid,
        /// K.
        temperature: f64,
        /// Pa.
        pressure: f64,
        /// Flow.
        flow: FeedFlow,
    },
    /// A stream leaving the plant.
    Product {
        /// Liquid or vent.
        role: ProductRole,
    },
    /// A compressor.
    Compressor {
        /// Pa.
        outlet_pressure: f64,
        /// Model.
        model: CompressorModel,
    },
    /// A cooler against ambient air or cooling water.
    Cooler {
        /// K.
        outlet_temperature: f64,
        /// Pa.
        pressure_drop: f64,
    },
    /// A two-stream counterflow heat exchanger.
    Exchanger {
        /// Duty specification.
        spec: ExchangerSpec,
        /// Pa.
        hot_pressure_drop: f64,
        /// Pa.
        cold_pressure_drop: f64,
        /// Heat leaking in from ambient into the cold stream, W.
        heat_leak: f64,
        /// Segments along the enthalpy for the internal profile.
        segments: usize,
    },
    /// A precooler that takes a stream down to a temperature.
    Precooler {
        /// K.
        outlet_temperature: f64,
        /// Pa.
        pressure_drop: f64,
        /// Smallest allowed difference between outlet and bath or coolant, K.
        approach: f64,
        /// Heat sink.
        source: PrecoolerSource,
    },
    /// A throttling (Joule-Thomson) valve.
    Valve {
        /// Pa.
        outlet_pressure: f64,
        /// Heat leaking in from ambient, W.
        heat_leak: f64,
    },
    /// A phase separator.
    Separator,
    /// A mixer.
    Mixer,
    /// A splitter sending `fraction` of its inlet to `branch`.
    Splitter {
        /// Share of the inlet flow sent to the `branch` port.
        fraction: f64,
    },
    /// An expansion turbine.
    Expander {
        /// Pa.
        outlet_pressure: f64,
        /// Isentropic efficiency.
        isentropic_efficiency: f64,
        /// Recovered or dissipated.
        work: ExpanderWork,
    },
}

impl UnitSpec {
    /// The kind's name as written in files.
    pub fn kind(&self) -> &'static str {
        match self {
            UnitSpec::Feed { .. } => "feed",
            UnitSpec::Product { .. } => "product",
            UnitSpec::Compressor { .. } => "compressor",
            UnitSpec::Cooler { .. } => "cooler",
            UnitSpec::Exchanger { .. } => "exchanger",
            UnitSpec::Precooler { .. } => "precooler",
            UnitSpec::Valve { .. } => "valve",
            UnitSpec::Separator => "separator",
            UnitSpec::Mixer => "mixer",
            UnitSpec::Splitter { .. } => "splitter",
            UnitSpec::Expander { .. } => "expander",
        }
    }
}

/// One piece of equipment.
#[derive(Debug, Clone)]
pub struct Unit {
    /// Its id.
    pub id: String,
    /// Its parameters.
    pub spec: UnitSpec,
    /// Inlet streams, in the kind's port order.
    pub inlets: Vec<usize>,
    /// Outlet streams, in the kind's port order.
    pub outlets: Vec<usize>,
    /// A mass flow fixed at this unit's outlet (the flow basis), kg/s.
    pub flow_basis: Option<f64>,
    /// The graph node of this unit.
    pub node: NodeIndex,
}

/// Solver and design-check settings, with documented defaults.
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    /// Convergence tolerance on the scaled tear residual.
    pub tolerance: f64,
    /// Iteration cap of the recycle loop.
    pub max_iterations: usize,
    /// `wegstein` or `broyden`.
    pub method: Method,
    /// Default number of exchanger segments.
    pub segments: usize,
    /// Starting temperature of every tear stream, K (default: ambient).
    pub initial_temperature: Option<f64>,
    /// Smallest acceptable exchanger approach, K (common practice: 1 K).
    pub approach_floor: f64,
    /// Highest acceptable compressor discharge temperature, K (common practice: 420 K).
    pub discharge_limit: f64,
    /// Highest acceptable liquid mass fraction at an expander outlet (common
    /// practice: 0.05).
    pub expander_liquid_limit: f64,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            tolerance: 1e-11,
            max_iterations: 400,
            method: Method::Wegstein,
            segments: 50,
            initial_temperature: None,
            approach_floor: 1.0,
            discharge_limit: 420.0,
            expander_liquid_limit: 0.05,
        }
    }
}

/// Recycle convergence methods.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    /// Bounded Wegstein acceleration of the fixed point, per variable.
    Wegstein,
    /// Newton–Broyden on all tear variables together.
    Broyden,
}

/// A resolved flowsheet.
#[derive(Debug, Clone)]
pub struct Plant {
    /// Where it came from (a file name, or `built-in demo`).
    pub source: String,
    /// Title.
    pub title: String,
    /// Notes.
    pub notes: String,
    /// Ambient temperature, K.
    pub ambient: f64,
    /// Settings.
    pub settings: Settings,
    /// Equipment, in file order.
    pub units: Vec<Unit>,
    /// Streams.
    pub streams: Vec<Stream>,
    /// The graph: nodes are unit indices, edges stream indices.
    pub graph: DiGraph<usize, usize>,
}

impl Plant {
    /// The unit with this id.
    pub fn unit(&self, id: &str) -> Option<&Unit> {
        self.units.iter().find(|u| u.id == id)
    }

    /// The index of the unit with this id.
    pub fn unit_index(&self, id: &str) -> Option<usize> {
        self.units.iter().position(|u| u.id == id)
    }
}

/// The inlet and outlet port names of each kind, in order.
pub fn ports(kind: &str, inlet_count: usize) -> (Vec<&'static str>, Vec<&'static str>) {
    const MIXER_INLETS: [&str; 8] = [
        "in-1", "in-2", "in-3", "in-4", "in-5", "in-6", "in-7", "in-8",
    ];
    match kind {
        "feed" => (vec![], vec!["out"]),
        "product" => (vec!["in"], vec![]),
        "exchanger" => (vec!["hot-in", "cold-in"], vec!["hot-out", "cold-out"]),
        "separator" => (vec!["in"], vec!["liquid", "vapor"]),
        "splitter" => (vec!["in"], vec!["main", "branch"]),
        "mixer" => (MIXER_INLETS[..inlet_count.min(8)].to_vec(), vec!["out"]),
        "precooler" if inlet_count == 2 => (vec!["in", "coolant-in"], vec!["out", "coolant-out"]),
        _ => (vec!["in"], vec!["out"]),
    }
}

/// The flow network of each stream: streams joined through units (the two sides of
/// an exchanger or a coolant precooler kept apart) share a network number.
pub fn flow_networks(units: &[Unit], stream_count: usize) -> Vec<usize> {
    let mut parent: Vec<usize> = (0..stream_count).collect();
    fn find(parent: &mut [usize], i: usize) -> usize {
        let mut r = i;
        while parent[r] != r {
            r = parent[r];
        }
        let mut j = i;
        while parent[j] != r {
            let next = parent[j];
            parent[j] = r;
            j = next;
        }
        r
    }
    let mut join = |a: usize, b: usize| {
        let (ra, rb) = (find(&mut parent, a), find(&mut parent, b));
        parent[ra] = rb;
    };
    for unit in units {
        let two_sided = matches!(
            unit.spec,
            UnitSpec::Exchanger { .. }
                | UnitSpec::Precooler {
                    source: PrecoolerSource::Coolant,
                    ..
                }
        );
        if two_sided {
            for (i, o) in unit.inlets.iter().zip(&unit.outlets) {
                join(*i, *o);
            }
        } else {
            let all: Vec<usize> = unit.inlets.iter().chain(&unit.outlets).copied().collect();
            for w in all.windows(2) {
                join(w[0], w[1]);
            }
        }
    }
    (0..stream_count).map(|i| find(&mut parent, i)).collect()
}

/// Pressures known before solving: set by feeds, compressors, valves and expanders
/// and carried through the other units less their pressure drops. `None` where a
/// stream's pressure depends on the solution.
pub fn static_pressures(units: &[Unit], stream_count: usize) -> Vec<Option<f64>> {
    let mut pressure: Vec<Option<f64>> = vec![None; stream_count];
    for _ in 0..=units.len() {
        let mut changed = false;
        for unit in units {
            let inlet = |k: usize| unit.inlets.get(k).and_then(|&i| pressure[i]);
            let all_in: Option<f64> = unit
                .inlets
                .iter()
                .map(|&i| pressure[i])
                .collect::<Option<Vec<_>>>()
                .and_then(|v| v.into_iter().reduce(f64::min));
            let outs: Vec<Option<f64>> = match &unit.spec {
                UnitSpec::Feed { pressure, .. } => vec![Some(*pressure)],
                UnitSpec::Compressor {
                    outlet_pressure, ..
                }
                | UnitSpec::Valve {
                    outlet_pressure, ..
                }
                | UnitSpec::Expander {
                    outlet_pressure, ..
                } => vec![Some(*outlet_pressure)],
                UnitSpec::Cooler { pressure_drop, .. } => vec![inlet(0).map(|p| p - pressure_drop)],
                UnitSpec::Precooler { pressure_drop, .. } => {
                    vec![inlet(0).map(|p| p - pressure_drop), inlet(1)]
                }
                UnitSpec::Exchanger {
                    hot_pressure_drop,
                    cold_pressure_drop,
                    ..
                } => vec![
                    inlet(0).map(|p| p - hot_pressure_drop),
                    inlet(1).map(|p| p - cold_pressure_drop),
                ],
                UnitSpec::Separator | UnitSpec::Splitter { .. } => vec![inlet(0), inlet(0)],
                UnitSpec::Mixer => vec![all_in],
                UnitSpec::Product { .. } => vec![],
            };
            for (&o, value) in unit.outlets.iter().zip(outs) {
                if pressure[o].is_none() && value.is_some() {
                    pressure[o] = value;
                    changed = true;
                }
            }
        }
        if !changed {
            break;
        }
    }
    pressure
}
