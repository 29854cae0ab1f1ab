//! The resolved plant: equipment with parameters in SI units, streams with their
//! fluids, and the petgraph graph that connects them.

pub use crate::equipment::UnitSpec;
use crate::equipment::{Coupling, ProductRole, Role};
use crate::fluids::Fluid;
use petgraph::graph::{DiGraph, NodeIndex};
use petgraph::unionfind::UnionFind;

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
    /// The site's ambient pressure, Pa, above which gauge pressures (`barg`,
    /// `psig`) are read (default one standard atmosphere; the dead state of the
    /// exergy account stays at 1 atm by definition).
    pub ambient_pressure: f64,
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
    /// Smallest acceptable exchanger approach, K, on top of the relative floor
    /// (default 0 K: the relative floor alone judges).
    pub approach_floor: f64,
    /// Smallest acceptable exchanger approach as a fraction of the temperature where
    /// it occurs, ΔT/T (common practice: 0.005, so 1.5 K at 300 K, 0.4 K at 80 K,
    /// 0.1 K at 20 K; a fixed floor in kelvin would flag normal helium approaches).
    pub approach_floor_fraction: f64,
    /// Largest acceptable temperature difference between a mixer's inlets, K (common
    /// practice: 10 K; mixing streams at different temperatures destroys exergy).
    pub mixer_temperature_limit: f64,
    /// Highest acceptable compressor discharge temperature, K (common practice: 420 K).
    pub discharge_limit: f64,
    /// Highest acceptable liquid mass fraction at an expander outlet (common
    /// practice: 0.05).
    pub expander_liquid_limit: f64,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            ambient_pressure: crate::quantity::STANDARD_ATMOSPHERE,
            tolerance: 1e-11,
            max_iterations: 400,
            method: Method::Wegstein,
            segments: 50,
            initial_temperature: None,
            approach_floor: 0.0,
            approach_floor_fraction: 0.005,
            mixer_temperature_limit: 10.0,
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

    /// The products that draw off liquid (they count towards the yield).
    pub fn liquid_products(&self) -> impl Iterator<Item = &Unit> {
        self.units
            .iter()
            .filter(|u| u.spec.role() == Role::Product(ProductRole::Liquid))
    }
}

/// The flow network of each stream: streams joined through units (the two sides of
/// an exchanger or a coolant precooler kept apart) share a network number, the
/// index of the network's first stream.
pub fn flow_networks(units: &[Unit], stream_count: usize) -> Vec<usize> {
    let mut networks = UnionFind::<usize>::new(stream_count);
    for unit in units {
        match unit.spec.coupling() {
            Coupling::Sides => {
                for (i, o) in unit.inlets.iter().zip(&unit.outlets) {
                    networks.union(*i, *o);
                }
            }
            Coupling::Joined => {
                let all: Vec<usize> = unit.inlets.iter().chain(&unit.outlets).copied().collect();
                for pair in all.windows(2) {
                    networks.union(pair[0], pair[1]);
                }
            }
            Coupling::WithSource => {
                let joined: Vec<usize> = unit
                    .inlets
                    .iter()
                    .chain(unit.outlets.first())
                    .copied()
                    .collect();
                for pair in joined.windows(2) {
                    networks.union(pair[0], pair[1]);
                }
            }
        }
    }
    let mut first_stream = std::collections::HashMap::new();
    (0..stream_count)
        .map(|i| *first_stream.entry(networks.find(i)).or_insert(i))
        .collect()
}

/// Pressures known before solving: set by feeds, compressors, valves and expanders
/// and carried through the other units less their pressure drops. `None` where a
/// stream's pressure depends on the solution.
pub fn static_pressures(units: &[Unit], stream_count: usize) -> Vec<Option<f64>> {
    let mut pressure: Vec<Option<f64>> = vec![None; stream_count];
    for _ in 0..=units.len() {
        let mut changed = false;
        for unit in units {
            let inlets: Vec<Option<f64>> = unit.inlets.iter().map(|&i| pressure[i]).collect();
            let outs = unit.spec.outlet_pressures(&inlets);
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
