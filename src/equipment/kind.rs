//! What every equipment kind provides: its name and keys, how it reads them, its
//! ports, how its streams are joined, its part in the plant's balances, its static
//! pressure rule and its model. The resolver, the solver, the checks and the reports
//! call these; none of them matches on kinds.

use super::{Context, Flow, Performance};
use crate::error::{FlowsheetError, Result};
use crate::fluids::{self, Fluid};
use crate::quantity::Dimension;
use crate::reading::Params;

/// The port names of one unit, inlets and outlets, each in the kind's order.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Ports {
    /// Inlet ports, in order.
    pub inlets: Vec<&'static str>,
    /// Outlet ports, in order.
    pub outlets: Vec<&'static str>,
}

impl Ports {
    /// One inlet `in` and one outlet `out`: the usual case.
    pub fn through() -> Ports {
        Ports {
            inlets: vec!["in"],
            outlets: vec!["out"],
        }
    }
}

/// How a unit joins its streams into flow networks and carries fluids through.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Coupling {
    /// Every inlet and outlet belongs to one flow network and carries one fluid.
    Joined,
    /// Inlet k passes to outlet k only: the sides of an exchanger, each with its own
    /// flow and fluid.
    Sides,
    /// Every inlet and the first outlet belong to one flow network; each further
    /// outlet starts a network of its own, of the unit's own fluid (a bath's routed
    /// boil-off).
    WithSource,
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

/// A unit's part in the plant's balances and figures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Role {
    /// A stream entering the plant, with its flow rule.
    Feed(FeedFlow),
    /// A stream leaving the plant.
    Product(ProductRole),
    /// Raises a loop's pressure: its suction flow is the loop's compressed flow.
    Compression,
    /// Takes heat out to a precooling sink: its duty counts as precooling duty.
    Precooling,
    /// Anything else.
    Process,
}

/// A static pressure rule broken before solving: the key to blame and why.
#[derive(Debug, Clone, PartialEq)]
pub struct PressureConflict {
    /// The key that sets the offending pressure.
    pub key: &'static str,
    /// What is wrong.
    pub message: String,
}

/// The behaviour of one unit, whatever its kind.
pub trait Equipment: std::fmt::Debug + Send + Sync {
    /// Its ports, in order.
    fn ports(&self) -> Ports;

    /// How its streams are joined (default: one network through the unit).
    fn coupling(&self) -> Coupling {
        Coupling::Joined
    }

    /// Its part in the plant's balances (default: a process unit).
    fn role(&self) -> Role {
        Role::Process
    }

    /// Outlet pressures known before solving, from the inlet pressures known then
    /// (`None` where a pressure depends on the solution).
    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>>;

    /// A pressure rule broken by an inlet at `inlet` Pa (a valve that would raise
    /// the pressure), found before solving.
    fn pressure_conflict(&self, _inlet: f64) -> Option<PressureConflict> {
        None
    }

    /// Fluids the unit uses that are not streams of the flowsheet (a bath's
    /// cryogen), so that reports can name their hazards.
    fn utility_fluids(&self) -> Vec<&'static Fluid> {
        Vec::new()
    }

    /// For a hydrogen feed, whether it gives the stream a para fraction (the
    /// ortho–para solution) rather than frozen normal hydrogen; `None` otherwise.
    fn gives_para_fraction(&self) -> Option<bool> {
        None
    }

    /// Outlet ports that may be left unconnected (a bath's `boil-off`, vented when
    /// it is not routed).
    fn optional_outlets(&self) -> Vec<&'static str> {
        Vec::new()
    }

    /// Marks the optional outlet `port` as connected: it becomes one of
    /// [`Equipment::ports`].
    fn route(&mut self, _port: &str) {}

    /// The fluid an outlet that starts its own flow network carries (see
    /// [`Coupling::WithSource`]).
    fn source_fluid(&self, _outlet_position: usize) -> Option<&'static Fluid> {
        None
    }

    /// The model: outlet flows, in port order, and what the unit did.
    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)>;
}

/// What a kind declares about itself to the flowsheet reader.
pub trait EquipmentKind: Equipment + Sized {
    /// The kind's name as written in files (`kind: compressor`).
    const NAME: &'static str;
    /// The keys it accepts besides `id` and `kind`. A kind that does not list
    /// `fluid` still accepts it: there it asserts the fluid that arrives.
    const KEYS: &'static [&'static str];
    /// Keys of which one is given (an exchanger's duty specifications): a `--set` of
    /// one replaces whichever the file gives.
    const ALTERNATIVE_KEYS: &'static [&'static str] = &[];

    /// Reads the parameters from the item's keys; records its inlets and any flow
    /// basis in `reader`.
    fn read(reader: &mut Reader) -> std::result::Result<Self, FlowsheetError>;
}

/// An inlet as written, before it is connected: the port, the key it was written
/// under and the reference (`id` or `id.port`).
#[derive(Debug, Clone, PartialEq)]
pub struct WrittenInlet {
    /// The inlet port it fills.
    pub port: &'static str,
    /// The key it was written under.
    pub key: &'static str,
    /// The upstream `id` or `id.port`.
    pub reference: String,
}

/// What reading one item gives besides its parameters.
#[derive(Debug, Clone, Default)]
pub struct Reading {
    /// Its inlets as written.
    pub inlets: Vec<WrittenInlet>,
    /// A mass flow fixed at its outlet (the flow basis), kg/s.
    pub flow_basis: Option<f64>,
    /// A fluid it declares (a feed) or asserts (`fluid:` on other kinds), with the key.
    pub fluid: Option<(&'static Fluid, &'static str)>,
}

/// Reads one item's keys for its kind: the located key reader (through `Deref`),
/// what the flowsheet declares, and the inlets and flow basis found so far.
pub struct Reader<'a> {
    keys: &'a Params<'a>,
    declared: &'a [&'static Fluid],
    /// Ambient (dead-state) temperature, K.
    pub ambient: f64,
    /// The flowsheet's default number of exchanger segments.
    pub default_segments: usize,
    reading: Reading,
}

impl<'a> std::ops::Deref for Reader<'a> {
    type Target = Params<'a>;
    fn deref(&self) -> &Params<'a> {
        self.keys
    }
}

type Located<T> = std::result::Result<T, FlowsheetError>;

impl<'a> Reader<'a> {
    /// A reader over `keys`; `declared` are the flowsheet's fluids.
    pub fn new(
        keys: &'a Params<'a>,
        declared: &'a [&'static Fluid],
        ambient: f64,
        default_segments: usize,
    ) -> Self {
        Reader {
            keys,
            declared,
            ambient,
            default_segments,
            reading: Reading::default(),
        }
    }

    /// Records an inlet read from the required key `key`, for port `port`.
    pub fn inlet(&mut self, port: &'static str, key: &'static str) -> Located<()> {
        let reference = self.keys.text(key)?;
        self.add_inlet(port, key, reference);
        Ok(())
    }

    /// Records an inlet whose reference was read already.
    pub fn add_inlet(&mut self, port: &'static str, key: &'static str, reference: String) {
        self.reading.inlets.push(WrittenInlet {
            port,
            key,
            reference,
        });
    }

    /// Reads the optional `flow` key: a mass flow fixed at the unit's outlet.
    pub fn flow_basis(&mut self) -> Located<()> {
        self.reading.flow_basis = self
            .keys
            .quantity_opt("flow", Dimension::MassFlow, 1e-9, 1e5)?;
        Ok(())
    }

    /// Sets the flow basis directly (a feed of fixed flow).
    pub fn set_flow_basis(&mut self, flow: Option<f64>) {
        self.reading.flow_basis = flow;
    }

    /// The fluid named `name` under `key`, which must be in the flowsheet's list.
    pub fn fluid(&self, key: &'static str, name: &str) -> Located<&'static Fluid> {
        let fluid = fluids::fluid(name).map_err(|e| self.keys.error(key, e.to_string()))?;
        if !self.declared.iter().any(|d| std::ptr::eq(*d, fluid)) {
            return Err(self.keys.error(
                key,
                format!(
                    "'{}' is not in the flowsheet's fluids list; add it there",
                    fluid.name
                ),
            ));
        }
        Ok(fluid)
    }

    /// Declares (a feed) or asserts (other kinds) the fluid of the unit's streams.
    pub fn set_fluid(&mut self, fluid: &'static Fluid, key: &'static str) {
        self.reading.fluid = Some((fluid, key));
    }

    /// Whether a fluid was declared or asserted.
    pub fn has_fluid(&self) -> bool {
        self.reading.fluid.is_some()
    }

    /// A required absolute pressure, 1 Pa to 2 GPa.
    pub fn pressure(&self, key: &'static str) -> Located<f64> {
        self.keys.quantity(key, Dimension::Pressure, 1.0, 2e9)
    }

    /// An optional pressure drop, 0 to 1000 bar (default 0).
    pub fn pressure_drop(&self, key: &'static str) -> Located<f64> {
        Ok(self
            .keys
            .quantity_opt(key, Dimension::Pressure, 0.0, 1e8)?
            .unwrap_or(0.0))
    }

    /// An optional heat in-leak from ambient, 0 to 1 GW (default 0).
    pub fn heat_leak(&self) -> Located<f64> {
        Ok(self
            .keys
            .quantity_opt("heat_leak", Dimension::Power, 0.0, 1e9)?
            .unwrap_or(0.0))
    }

    /// An efficiency between 0.001 and 1, with a default when one exists.
    pub fn efficiency(&self, key: &'static str, default: Option<f64>) -> Located<f64> {
        match self
            .keys
            .quantity_opt(key, Dimension::Fraction, 1e-3, 1.0)?
        {
            Some(v) => Ok(v),
            None => default.ok_or_else(|| {
                self.keys.error(
                    key,
                    format!("'{key}' is required: a fraction such as 0.8 or 80 %"),
                )
            }),
        }
    }

    /// One of the words in `choices` under `key` (the first is the default), as its
    /// index; anything else is an error naming the choices.
    pub fn choice(&self, key: &'static str, what: &str, choices: &[&str]) -> Located<usize> {
        match self.keys.text_opt(key)? {
            None => Ok(0),
            Some(word) => choices.iter().position(|c| *c == word).ok_or_else(|| {
                self.keys.error(
                    key,
                    format!("{what} '{word}' is not known; use {}", or_list(choices)),
                )
            }),
        }
    }

    /// What was read besides the parameters.
    pub fn into_reading(self) -> Reading {
        self.reading
    }
}

/// `a`, `a or b`, `a, b or c`.
fn or_list(words: &[&str]) -> String {
    match words {
        [] => String::new(),
        [one] => one.to_string(),
        [rest @ .., last] => format!("{} or {last}", rest.join(", ")),
    }
}

/// The outlet of a unit that does no work and only takes in `heat_leak` W from
/// ambient: the inlet's enthalpy plus the leak per unit of flow, at `pressure`.
/// Returns the outlet flow and the heat taken in (as a `Performance`).
pub fn with_heat_leak(
    inlet: &Flow,
    pressure: f64,
    heat_leak: f64,
    context: &Context,
) -> Result<(Flow, Performance)> {
    let gain = if inlet.flow > 0.0 {
        heat_leak / inlet.flow
    } else {
        0.0
    };
    let state = inlet
        .state
        .material()
        .state_ph(pressure, inlet.state.enthalpy + gain)?;
    let performance = Performance {
        heat_in: vec![(heat_leak, context.ambient)],
        ..Performance::default()
    };
    Ok((
        Flow {
            state,
            flow: inlet.flow,
        },
        performance,
    ))
}

/// The outlet pressure of a unit that passes its one inlet's pressure on, less a drop.
pub fn less_drop(inlet: Option<f64>, drop: f64) -> Option<f64> {
    inlet.map(|p| p - drop)
}

/// A name read from a flowsheet (a multistream exchanger's stream) as a port name
/// that lives as long as the program: each distinct name is stored once, so reading
/// the same flowsheet again, as a study does, stores nothing new.
pub fn intern(name: &str) -> &'static str {
    use std::collections::BTreeSet;
    use std::sync::Mutex;
    static NAMES: Mutex<BTreeSet<&'static str>> = Mutex::new(BTreeSet::new());
    let mut names = NAMES
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    if let Some(known) = names.get(name) {
        return known;
    }
    let stored: &'static str = Box::leak(name.to_string().into_boxed_str());
    names.insert(stored);
    stored
}
