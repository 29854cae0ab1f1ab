//! From file text to a checked [`Plant`]: parse, apply `--set` overrides, read each
//! kind's keys, connect the streams, carry fluids along them, and check flow bases
//! and pressures before anything is solved.

use super::locate::Locator;
use super::params::{Params, Place};
use super::plant::*;
use super::schema::{EquipmentEntry, FlowsheetFile};
use super::FlowsheetError;
use crate::fluids::{self, Fluid};
use crate::quantity::{self, Dimension};
use petgraph::graph::DiGraph;
use std::collections::{BTreeMap, BTreeSet};

/// One `--set id.key=value` override.
#[derive(Debug, Clone, PartialEq)]
pub struct Override {
    /// Equipment id, or `settings` / `flowsheet` for top-level values.
    pub target: String,
    /// Key.
    pub key: String,
    /// New value as text, with its unit.
    pub value: String,
}

impl Override {
    /// Reads `id.key=value`.
    pub fn parse(text: &str) -> Result<Override, FlowsheetError> {
        let bad = |message: String| FlowsheetError {
            file: format!("--set {text}"),
            position: None,
            equipment: None,
            message,
        };
        let (path, value) = text.split_once('=').ok_or_else(|| {
            bad("write --set id.key=value, for example --set comp.outlet_pressure=180bar".into())
        })?;
        let (target, key) = path.trim().split_once('.').ok_or_else(|| {
            bad(format!(
                "'{path}' must be id.key, such as valve.outlet_pressure"
            ))
        })?;
        Ok(Override {
            target: target.trim().to_string(),
            key: key.trim().to_string(),
            value: value.trim().to_string(),
        })
    }
}

/// Reads and resolves the flowsheet file at `path`.
pub fn load(path: &std::path::Path, overrides: &[Override]) -> Result<Plant, FlowsheetError> {
    let name = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| FlowsheetError {
        file: name.clone(),
        position: None,
        equipment: None,
        message: format!("cannot read the file: {e}"),
    })?;
    load_str(&text, &name, overrides)
}

/// Resolves flowsheet `text`; `file` names it in errors.
pub fn load_str(text: &str, file: &str, overrides: &[Override]) -> Result<Plant, FlowsheetError> {
    let mut raw: FlowsheetFile = serde_yaml::from_str(text).map_err(|e| FlowsheetError {
        file: file.to_string(),
        position: e.location().map(|l| (l.line(), l.column())),
        equipment: None,
        message: e.to_string(),
    })?;
    let mut overridden = BTreeSet::new();
    for o in overrides {
        apply_override(&mut raw, o)?;
        overridden.insert((o.target.clone(), o.key.clone()));
    }
    let locator = Locator::new(text);
    let place = Place {
        file,
        locator: &locator,
        overridden: &overridden,
    };
    Resolver::new(&raw, &place).resolve()
}

fn apply_override(raw: &mut FlowsheetFile, o: &Override) -> Result<(), FlowsheetError> {
    let value = serde_yaml::Value::String(o.value.clone());
    if o.target == "settings" {
        raw.settings.insert(o.key.clone(), value);
        return Ok(());
    }
    if o.target == "flowsheet" && o.key == "ambient" {
        raw.ambient = value;
        return Ok(());
    }
    let entry = raw
        .equipment
        .iter_mut()
        .find(|e| e.id == o.target)
        .ok_or_else(|| FlowsheetError {
            file: format!("--set {}.{}", o.target, o.key),
            position: None,
            equipment: None,
            message: format!(
                "there is no equipment '{}' (use settings.key or flowsheet.ambient for top-level values)",
                o.target
            ),
        })?;
    if matches!(o.key.as_str(), "id" | "kind") {
        return Err(FlowsheetError {
            file: format!("--set {}.{}", o.target, o.key),
            position: None,
            equipment: Some(o.target.clone()),
            message: "an override cannot change an id or a kind".into(),
        });
    }
    entry.params.insert(o.key.clone(), value);
    Ok(())
}

/// The keys each kind accepts besides `id` and `kind`.
fn allowed_keys(kind: &str) -> Option<&'static [&'static str]> {
    Some(match kind {
        "feed" => &["fluid", "temperature", "pressure", "flow"],
        "product" => &["inlet", "role", "fluid"],
        "compressor" => &[
            "inlet",
            "outlet_pressure",
            "model",
            "isothermal_efficiency",
            "temperature",
            "stages",
            "isentropic_efficiency",
            "intercooler_temperature",
            "flow",
            "fluid",
        ],
        "cooler" => &[
            "inlet",
            "outlet_temperature",
            "pressure_drop",
            "medium",
            "flow",
            "fluid",
        ],
        "exchanger" => &[
            "hot",
            "cold",
            "minimum_approach",
            "warm_end_approach",
            "cold_end_approach",
            "effectiveness",
            "ua",
            "hot_pressure_drop",
            "cold_pressure_drop",
            "heat_leak",
            "segments",
            "fluid",
        ],
        "precooler" => &[
            "inlet",
            "outlet_temperature",
            "pressure_drop",
            "approach",
            "bath",
            "bath_pressure",
            "liquid_work",
            "refrigerator",
            "coolant",
            "flow",
            "fluid",
        ],
        "valve" => &["inlet", "outlet_pressure", "heat_leak", "flow", "fluid"],
        "separator" => &["inlet", "fluid"],
        "mixer" => &["inlets", "fluid"],
        "splitter" => &["inlet", "fraction", "fluid"],
        "expander" => &[
            "inlet",
            "outlet_pressure",
            "isentropic_efficiency",
            "work",
            "flow",
            "fluid",
        ],
        _ => return None,
    })
}

/// An inlet written in the file, before it is connected.
struct PendingInlet {
    unit: usize,
    port: &'static str,
    key: &'static str,
    reference: String,
}

struct Resolver<'a> {
    raw: &'a FlowsheetFile,
    place: &'a Place<'a>,
}

impl<'a> Resolver<'a> {
    fn new(raw: &'a FlowsheetFile, place: &'a Place<'a>) -> Self {
        Resolver { raw, place }
    }

    fn top_error(&self, key: &str, message: impl Into<String>) -> FlowsheetError {
        FlowsheetError {
            file: self.place.file.to_string(),
            position: self.place.locator.top(key),
            equipment: None,
            message: message.into(),
        }
    }

    fn item_error(&self, index: usize, message: impl Into<String>) -> FlowsheetError {
        FlowsheetError {
            file: self.place.file.to_string(),
            position: self.place.locator.item(index),
            equipment: self.raw.equipment.get(index).map(|e| e.id.clone()),
            message: message.into(),
        }
    }

    fn resolve(&self) -> Result<Plant, FlowsheetError> {
        let ambient_text = match &self.raw.ambient {
            serde_yaml::Value::String(s) => s.clone(),
            other => format!("{other:?}"),
        };
        let ambient = quantity::parse(&ambient_text, Dimension::Temperature)
            .map_err(|e| self.top_error("ambient", format!("ambient: {e}")))?;
        if !(200.0..=400.0).contains(&ambient) {
            return Err(self.top_error(
                "ambient",
                format!("ambient = {ambient_text} is outside the allowed range 200 K to 400 K"),
            ));
        }
        let mut declared = Vec::new();
        for name in &self.raw.fluids {
            declared
                .push(fluids::fluid(name).map_err(|e| self.top_error("fluids", e.to_string()))?);
        }
        if declared.is_empty() {
            return Err(self.top_error(
                "fluids",
                "list the fluids the flowsheet uses, such as [hydrogen, nitrogen]",
            ));
        }
        let settings = self.settings()?;
        if self.raw.equipment.is_empty() {
            return Err(self.top_error("equipment", "the flowsheet has no equipment"));
        }
        // Ids.
        let mut seen = BTreeMap::new();
        for (index, entry) in self.raw.equipment.iter().enumerate() {
            if entry.id.trim().is_empty() || entry.id.contains(['.', ' ', '=']) {
                return Err(self.item_error(
                    index,
                    format!(
                        "'{}' is not a usable id: use letters, digits, - and _ (no dots or spaces)",
                        entry.id
                    ),
                ));
            }
            if let Some(first) = seen.insert(entry.id.clone(), index) {
                return Err(self.item_error(
                    index,
                    format!(
                        "the id '{}' is used twice (first on line {})",
                        entry.id,
                        self.place.locator.item(first).map_or(0, |p| p.0)
                    ),
                ));
            }
        }
        // Specs and the inlets each names.
        let mut units = Vec::new();
        let mut pending = Vec::new();
        let mut declared_fluid: Vec<Option<(&'static Fluid, &'static str)>> = Vec::new();
        for (index, entry) in self.raw.equipment.iter().enumerate() {
            let params = Params::new(entry, index, self.place);
            // Unknown keys first: a misspelt key would otherwise show as a missing one.
            if let Some(allowed) = allowed_keys(&entry.kind) {
                if let Some(key) = entry.params.keys().find(|k| !allowed.contains(&k.as_str())) {
                    return Err(params.error(
                        key,
                        format!(
                            "unknown key '{key}' for a {}; its keys are: id, kind, {}",
                            entry.kind,
                            allowed.join(", ")
                        ),
                    ));
                }
            }
            let (spec, inlets, flow_basis, fluid) =
                self.read_unit(entry, index, &params, &declared, &settings, ambient)?;
            params.finish()?;
            for (port, key, reference) in inlets {
                pending.push(PendingInlet {
                    unit: index,
                    port,
                    key,
                    reference,
                });
            }
            declared_fluid.push(fluid);
            units.push(Unit {
                id: entry.id.clone(),
                spec,
                inlets: Vec::new(),
                outlets: Vec::new(),
                flow_basis,
                node: Default::default(),
            });
        }
        let streams = self.connect(&mut units, &pending)?;
        let mut plant = Plant {
            source: self.place.file.to_string(),
            title: self.raw.title.clone(),
            notes: self.raw.notes.clone().unwrap_or_default(),
            ambient,
            settings,
            units,
            streams: Vec::new(),
            graph: DiGraph::new(),
        };
        plant.streams = self.carry_fluids(&plant.units, streams, &declared_fluid, &declared)?;
        self.check_flow_bases(&plant)?;
        self.check_pressures(&plant)?;
        let mut graph = DiGraph::new();
        for (i, unit) in plant.units.iter_mut().enumerate() {
            unit.node = graph.add_node(i);
        }
        for (i, s) in plant.streams.iter().enumerate() {
            graph.add_edge(
                plant.units[s.from.unit].node,
                plant.units[s.to.unit].node,
                i,
            );
        }
        plant.graph = graph;
        Ok(plant)
    }

    fn settings(&self) -> Result<Settings, FlowsheetError> {
        let mut s = Settings::default();
        for (key, value) in &self.raw.settings {
            let text = match value {
                serde_yaml::Value::String(t) => t.clone(),
                serde_yaml::Value::Number(n) => n.to_string(),
                other => format!("{other:?}"),
            };
            let bad = |m: String| FlowsheetError {
                file: self.place.file.to_string(),
                position: self.place.locator.top("settings"),
                equipment: None,
                message: format!("settings.{key}: {m}"),
            };
            let number = |low: f64, high: f64| -> Result<f64, FlowsheetError> {
                let v: f64 = text
                    .trim()
                    .parse()
                    .map_err(|_| bad(format!("'{text}' is not a number")))?;
                if (low..=high).contains(&v) {
                    Ok(v)
                } else {
                    Err(bad(format!(
                        "{v} is outside the allowed range {low} to {high}"
                    )))
                }
            };
            let temperature =
                |dimension: Dimension, low: f64, high: f64| -> Result<f64, FlowsheetError> {
                    let v = quantity::parse(&text, dimension).map_err(|e| bad(e.to_string()))?;
                    if (low..=high).contains(&v) {
                        Ok(v)
                    } else {
                        Err(bad(format!(
                            "{text} is outside the allowed range {low} K to {high} K"
                        )))
                    }
                };
            match key.as_str() {
                "tolerance" => s.tolerance = number(1e-14, 1e-3)?,
                "max_iterations" => s.max_iterations = number(1.0, 100_000.0)? as usize,
                "segments" => s.segments = number(10.0, 5000.0)? as usize,
                "method" => {
                    s.method = match text.trim() {
                        "wegstein" => Method::Wegstein,
                        "broyden" => Method::Broyden,
                        other => return Err(bad(format!("'{other}' is not a method; use wegstein or broyden"))),
                    }
                }
                "initial_temperature" => s.initial_temperature = Some(temperature(Dimension::Temperature, 1.0, 2000.0)?),
                "approach_floor" => s.approach_floor = temperature(Dimension::TemperatureDifference, 0.0, 100.0)?,
                "discharge_limit" => s.discharge_limit = temperature(Dimension::Temperature, 250.0, 1000.0)?,
                "expander_liquid_limit" => {
                    s.expander_liquid_limit = quantity::parse(&text, Dimension::Fraction).map_err(|e| bad(e.to_string()))?;
                    if !(0.0..=1.0).contains(&s.expander_liquid_limit) {
                        return Err(bad("must lie between 0 and 1".into()));
                    }
                }
                other => {
                    return Err(bad(format!(
                        "unknown setting '{other}'; the settings are: tolerance, max_iterations, segments, method, initial_temperature, approach_floor, discharge_limit, expander_liquid_limit"
                    )))
                }
            }
        }
        Ok(s)
    }

    #[allow(clippy::type_complexity)]
    fn read_unit(
        &self,
        entry: &EquipmentEntry,
        index: usize,
        p: &Params,
        declared: &[&'static Fluid],
        settings: &Settings,
        ambient: f64,
    ) -> Result<
        (
            UnitSpec,
            Vec<(&'static str, &'static str, String)>,
            Option<f64>,
            Option<(&'static Fluid, &'static str)>,
        ),
        FlowsheetError,
    > {
        use Dimension::*;
        let fluid_named =
            |key: &'static str, name: &str| -> Result<&'static Fluid, FlowsheetError> {
                let f = fluids::fluid(name).map_err(|e| p.error(key, e.to_string()))?;
                if !declared.iter().any(|d| std::ptr::eq(*d, f)) {
                    return Err(p.error(
                        key,
                        format!(
                            "'{}' is not in the flowsheet's fluids list; add it there",
                            f.name
                        ),
                    ));
                }
                Ok(f)
            };
        let assertion = match p.text_opt("fluid")? {
            Some(name) if entry.kind != "feed" => Some((fluid_named("fluid", &name)?, "fluid")),
            _ => None,
        };
        let one_inlet = |key: &'static str| -> Result<Vec<(&'static str, &'static str, String)>, FlowsheetError> {
            Ok(vec![("in", key, p.text(key)?)])
        };
        let pressure = |key: &'static str| p.quantity(key, Pressure, 1.0, 2e9);
        let drop = |key: &'static str| {
            Ok::<f64, FlowsheetError>(p.quantity_opt(key, Pressure, 0.0, 1e8)?.unwrap_or(0.0))
        };
        let efficiency = |key: &'static str, default: Option<f64>| -> Result<f64, FlowsheetError> {
            match p.quantity_opt(key, Fraction, 1e-3, 1.0)? {
                Some(v) => Ok(v),
                None => default.ok_or_else(|| {
                    p.error(
                        key,
                        format!("'{key}' is required: a fraction such as 0.8 or 80 %"),
                    )
                }),
            }
        };
        let basis = |p: &Params| p.quantity_opt("flow", MassFlow, 1e-9, 1e5);
        let spec = match entry.kind.as_str() {
            "feed" => {
                let fluid = fluid_named("fluid", &p.text("fluid")?)?;
                let temperature = p.quantity("temperature", Temperature, fluid.temperature_min, fluid.temperature_max)?;
                let pressure = p.quantity("pressure", Pressure, 1.0, fluid.pressure_max)?;
                let flow = match p.text_opt("flow")?.as_deref() {
                    None => return Err(p.error("flow", "'flow' is required for a feed: a mass flow such as 0.05 kg/s, or 'balance' for make-up")),
                    Some("balance") => FeedFlow::Balance,
                    Some(_) => FeedFlow::Fixed(p.quantity("flow", MassFlow, 1e-9, 1e5)?),
                };
                let basis = match flow {
                    FeedFlow::Fixed(v) => Some(v),
                    FeedFlow::Balance => None,
                };
                return Ok((UnitSpec::Feed { fluid, temperature, pressure, flow }, vec![], basis, Some((fluid, "fluid"))));
            }
            "product" => {
                let role = match p.text_opt("role")?.as_deref() {
                    None | Some("liquid") => ProductRole::Liquid,
                    Some("vent") => ProductRole::Vent,
                    Some(other) => return Err(p.error("role", format!("role '{other}' is not known; use liquid or vent"))),
                };
                return Ok((UnitSpec::Product { role }, one_inlet("inlet")?, None, assertion));
            }
            "compressor" => {
                let outlet_pressure = pressure("outlet_pressure")?;
                let model = match p.text_opt("model")?.as_deref() {
                    None | Some("isothermal") => CompressorModel::Isothermal {
                        efficiency: efficiency("isothermal_efficiency", Some(1.0))?,
                        temperature: p.quantity_opt("temperature", Temperature, 1.0, 2000.0)?.unwrap_or(ambient),
                    },
                    Some("staged") => {
                        let stages = p.whole_opt("stages", 1, 20)?.ok_or_else(|| p.error("stages", "'stages' is required for a staged compressor: a whole number from 1 to 20"))?;
                        CompressorModel::Staged {
                            stages,
                            isentropic_efficiency: efficiency("isentropic_efficiency", None)?,
                            intercooler_temperature: p
                                .quantity_opt("intercooler_temperature", Temperature, 150.0, 500.0)?
                                .unwrap_or(ambient),
                        }
                    }
                    Some(other) => return Err(p.error("model", format!("model '{other}' is not known; use isothermal or staged"))),
                };
                UnitSpec::Compressor { outlet_pressure, model }
            }
            "cooler" => {
                match p.text_opt("medium")?.as_deref() {
                    None | Some("ambient") | Some("cooling-water") => {}
                    Some(other) => return Err(p.error("medium", format!("medium '{other}' is not known; use ambient or cooling-water"))),
                }
                UnitSpec::Cooler { outlet_temperature: p.quantity("outlet_temperature", Temperature, 1.0, 2000.0)?, pressure_drop: drop("pressure_drop")? }
            }
            "exchanger" => {
                let options = [
                    ("minimum_approach", p.quantity_opt("minimum_approach", TemperatureDifference, 0.0, 500.0)?.map(ExchangerSpec::MinimumApproach)),
                    ("warm_end_approach", p.quantity_opt("warm_end_approach", TemperatureDifference, 0.0, 500.0)?.map(ExchangerSpec::WarmEndApproach)),
                    ("cold_end_approach", p.quantity_opt("cold_end_approach", TemperatureDifference, 0.0, 500.0)?.map(ExchangerSpec::ColdEndApproach)),
                    ("effectiveness", p.quantity_opt("effectiveness", Fraction, 0.0, 1.0)?.map(ExchangerSpec::Effectiveness)),
                    ("ua", p.quantity_opt("ua", Conductance, 0.0, 1e12)?.map(ExchangerSpec::Conductance)),
                ];
                let given: Vec<_> = options.iter().filter(|(_, v)| v.is_some()).collect();
                let spec = match given.as_slice() {
                    [(_, Some(spec))] => *spec,
                    [] => return Err(p.error("kind", "an exchanger needs exactly one of minimum_approach, warm_end_approach, cold_end_approach, effectiveness or ua ")),
                    many => return Err(p.error(many[1].0, format!("an exchanger takes one duty specification, but {} are given: {}", many.len(), many.iter().map(|(k, _)| *k).collect::<Vec<_>>().join(", ")))),
                };
                let inlets = vec![("hot-in", "hot", p.text("hot")?), ("cold-in", "cold", p.text("cold")?)];
                let spec = UnitSpec::Exchanger {
                    spec,
                    hot_pressure_drop: drop("hot_pressure_drop")?,
                    cold_pressure_drop: drop("cold_pressure_drop")?,
                    heat_leak: p.quantity_opt("heat_leak", Dimension::Power, 0.0, 1e9)?.unwrap_or(0.0),
                    segments: p.whole_opt("segments", 10, 5000)?.unwrap_or(settings.segments),
                };
                return Ok((spec, inlets, None, assertion));
            }
            "precooler" => {
                let outlet_temperature = p.quantity("outlet_temperature", Temperature, 1.0, 2000.0)?;
                let approach = p.quantity_opt("approach", TemperatureDifference, 0.0, 100.0)?.unwrap_or(1.0);
                let mut inlets = one_inlet("inlet")?;
                let bath = p.text_opt("bath")?;
                let refrigerator = p.quantity_opt("refrigerator", Fraction, 1e-3, 1.0)?;
                let coolant = p.text_opt("coolant")?;
                let bath_pressure = p.quantity_opt("bath_pressure", Pressure, 1.0, 1e8)?;
                let liquid_work = p.quantity_opt("liquid_work", SpecificEnergy, 0.0, 1e8)?;
                let count = [bath.is_some(), refrigerator.is_some(), coolant.is_some()].iter().filter(|b| **b).count();
                if count != 1 {
                    return Err(p.error("kind", "a precooler needs exactly one heat sink: 'bath' (a cryogen name, with bath_pressure), 'refrigerator' (its fraction of Carnot) or 'coolant' (a stream of the flowsheet)"));
                }
                let source = if let Some(name) = bath {
                    let fluid = fluids::fluid(&name).map_err(|e| p.error("bath", e.to_string()))?;
                    let pressure = bath_pressure.ok_or_else(|| p.error("bath_pressure", "'bath_pressure' is required with a bath: the pressure the cryogen boils at, such as 1.2 bar"))?;
                    let (default_work, _) = default_liquid_work(fluid, pressure, ambient).map_err(|e| p.error("bath_pressure", e.to_string()))?;
                    PrecoolerSource::Bath { fluid, pressure, liquid_work: liquid_work.unwrap_or(default_work), liquid_work_is_default: liquid_work.is_none() }
                } else if let Some(fraction) = refrigerator {
                    PrecoolerSource::Refrigerator { fraction_of_carnot: fraction }
                } else {
                    inlets.push(("coolant-in", "coolant", coolant.unwrap_or_default()));
                    PrecoolerSource::Coolant
                };
                if bath_pressure.is_some() && !matches!(source, PrecoolerSource::Bath { .. }) {
                    return Err(p.error("bath_pressure", "'bath_pressure' goes with 'bath'"));
                }
                let spec = UnitSpec::Precooler { outlet_temperature, pressure_drop: drop("pressure_drop")?, approach, source };
                return Ok((spec, inlets, basis(p)?, assertion));
            }
            "valve" => UnitSpec::Valve {
                outlet_pressure: pressure("outlet_pressure")?,
                heat_leak: p.quantity_opt("heat_leak", Dimension::Power, 0.0, 1e9)?.unwrap_or(0.0),
            },
            "separator" => {
                return Ok((UnitSpec::Separator, one_inlet("inlet")?, None, assertion));
            }
            "mixer" => {
                let list = p.text_list("inlets")?.ok_or_else(|| p.error("inlets", "'inlets' is required for a mixer: a list such as [makeup, hx.cold-out]"))?;
                if !(2..=8).contains(&list.len()) {
                    return Err(p.error("inlets", format!("a mixer takes 2 to 8 inlets, not {}", list.len())));
                }
                let (ports, _) = ports("mixer", list.len());
                let inlets = ports.into_iter().zip(list).map(|(port, r)| (port, "inlets", r)).collect();
                return Ok((UnitSpec::Mixer, inlets, None, assertion));
            }
            "splitter" => {
                let fraction = p.quantity("fraction", Fraction, 0.0, 1.0)?;
                return Ok((UnitSpec::Splitter { fraction }, one_inlet("inlet")?, None, assertion));
            }
            "expander" => UnitSpec::Expander {
                outlet_pressure: pressure("outlet_pressure")?,
                isentropic_efficiency: efficiency("isentropic_efficiency", None)?,
                work: match p.text_opt("work")?.as_deref() {
                    None | Some("recovered") => ExpanderWork::Recovered,
                    Some("dissipated") => ExpanderWork::Dissipated,
                    Some(other) => return Err(p.error("work", format!("work '{other}' is not known; use recovered or dissipated"))),
                },
            },
            other => {
                return Err(self.item_error(index, format!(
                    "unknown kind '{other}'; the kinds are feed, product, compressor, cooler, exchanger, precooler, valve, separator, mixer, splitter and expander"
                )))
            }
        };
        // Single-inlet, single-outlet kinds that may carry the flow basis.
        Ok((spec, one_inlet("inlet")?, basis(p)?, assertion))
    }

    /// Connects every inlet to the outlet it names; each outlet feeds exactly one inlet.
    fn connect(
        &self,
        units: &mut [Unit],
        pending: &[PendingInlet],
    ) -> Result<Vec<(PortRef, PortRef)>, FlowsheetError> {
        let ids: BTreeMap<&str, usize> = units
            .iter()
            .enumerate()
            .map(|(i, u)| (u.id.as_str(), i))
            .collect();
        let inlet_counts: Vec<usize> = (0..units.len())
            .map(|i| pending.iter().filter(|p| p.unit == i).count())
            .collect();
        let mut used: BTreeMap<(usize, &'static str), usize> = BTreeMap::new();
        let mut streams = Vec::new();
        for inlet in pending {
            let entry = &self.raw.equipment[inlet.unit];
            let params = Params::new(entry, inlet.unit, self.place);
            let (id, port) = match inlet.reference.split_once('.') {
                Some((id, port)) => (id.trim(), Some(port.trim())),
                None => (inlet.reference.trim(), None),
            };
            let source = *ids.get(id).ok_or_else(|| {
                params.error(
                    inlet.key,
                    format!(
                        "'{id}' names no equipment; the ids are: {}",
                        units
                            .iter()
                            .map(|u| u.id.as_str())
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
            })?;
            if source == inlet.unit {
                return Err(params.error(inlet.key, "a unit cannot feed itself"));
            }
            let (_, outlets) = ports(units[source].spec.kind(), inlet_counts[source]);
            if outlets.is_empty() {
                return Err(params.error(
                    inlet.key,
                    format!(
                        "'{id}' is a {} and has no outlet",
                        units[source].spec.kind()
                    ),
                ));
            }
            let port: &'static str = match port {
                Some(name) => outlets
                    .iter()
                    .copied()
                    .find(|o| *o == name || (name == "vapour" && *o == "vapor"))
                    .ok_or_else(|| {
                        params.error(
                            inlet.key,
                            format!(
                                "'{id}' has no outlet '{name}'; its outlets are: {}",
                                outlets.join(", ")
                            ),
                        )
                    })?,
                None if outlets.len() == 1 => outlets[0],
                None => {
                    return Err(params.error(
                        inlet.key,
                        format!(
                            "'{id}' has several outlets; name one: {}",
                            outlets
                                .iter()
                                .map(|o| format!("{id}.{o}"))
                                .collect::<Vec<_>>()
                                .join(" or ")
                        ),
                    ))
                }
            };
            if let Some(first) = used.insert((source, port), inlet.unit) {
                return Err(params.error(inlet.key, format!("the outlet {id}.{port} already feeds '{}'; use a splitter to send a stream to two places", units[first].id)));
            }
            streams.push((
                PortRef { unit: source, port },
                PortRef {
                    unit: inlet.unit,
                    port: inlet.port,
                },
            ));
        }
        for (index, unit) in units.iter().enumerate() {
            let (_, outlets) = ports(unit.spec.kind(), inlet_counts[index]);
            for port in outlets {
                if !used.contains_key(&(index, port)) {
                    return Err(self.item_error(index, format!(
                        "the outlet {}.{port} goes nowhere; route it to a product (role: vent for a vent), a mixer or another unit",
                        unit.id
                    )));
                }
            }
        }
        // Order each unit's inlets and outlets by port.
        for (index, unit) in units.iter_mut().enumerate() {
            let (ins, outs) = ports(unit.spec.kind(), inlet_counts[index]);
            unit.inlets = ins
                .iter()
                .filter_map(|port| {
                    streams
                        .iter()
                        .position(|(_, to)| to.unit == index && to.port == *port)
                })
                .collect();
            unit.outlets = outs
                .iter()
                .filter_map(|port| {
                    streams
                        .iter()
                        .position(|(from, _)| from.unit == index && from.port == *port)
                })
                .collect();
        }
        Ok(streams)
    }

    /// Carries each feed's fluid along the streams; two fluids meeting, or a stream
    /// no fluid reaches, is an error.
    fn carry_fluids(
        &self,
        units: &[Unit],
        links: Vec<(PortRef, PortRef)>,
        declared: &[Option<(&'static Fluid, &'static str)>],
        _list: &[&'static Fluid],
    ) -> Result<Vec<Stream>, FlowsheetError> {
        let mut fluid: Vec<Option<&'static Fluid>> = vec![None; links.len()];
        // The inlet stream whose fluid an outlet carries.
        let source_inlet = |unit: &Unit, outlet_position: usize| -> Vec<usize> {
            match unit.spec {
                UnitSpec::Exchanger { .. }
                | UnitSpec::Precooler {
                    source: PrecoolerSource::Coolant,
                    ..
                } => unit
                    .inlets
                    .get(outlet_position)
                    .copied()
                    .into_iter()
                    .collect(),
                _ => unit.inlets.clone(),
            }
        };
        for _ in 0..=links.len() {
            let mut changed = false;
            for (ui, unit) in units.iter().enumerate() {
                for (position, &out) in unit.outlets.iter().enumerate() {
                    let from_inlets: Vec<&'static Fluid> = source_inlet(unit, position)
                        .iter()
                        .filter_map(|&i| fluid[i])
                        .collect();
                    let own = if matches!(unit.spec, UnitSpec::Feed { .. }) {
                        declared[ui].map(|d| d.0)
                    } else {
                        None
                    };
                    let candidate = own
                        .or_else(|| from_inlets.first().copied())
                        .or_else(|| declared[ui].map(|d| d.0));
                    if let Some(f) = candidate {
                        for other in &from_inlets {
                            if !std::ptr::eq(*other, f) {
                                return Err(self.item_error(ui, format!("{} and {} meet here; a stream carries one fluid (use an exchanger or a coolant precooler to couple two fluids)", other.name, f.name)));
                            }
                        }
                        if fluid[out].is_none() {
                            fluid[out] = Some(f);
                            changed = true;
                        }
                    }
                }
            }
            if !changed {
                break;
            }
        }
        // Declared fluids must match what arrives.
        for (ui, unit) in units.iter().enumerate() {
            if let (Some((want, key)), false) =
                (declared[ui], matches!(unit.spec, UnitSpec::Feed { .. }))
            {
                for &i in &unit.inlets {
                    if let Some(have) = fluid[i] {
                        let is_coolant = matches!(
                            unit.spec,
                            UnitSpec::Precooler {
                                source: PrecoolerSource::Coolant,
                                ..
                            }
                        ) && unit.inlets.get(1) == Some(&i);
                        if !std::ptr::eq(have, want) && !is_coolant {
                            let params = Params::new(&self.raw.equipment[ui], ui, self.place);
                            return Err(params.error(key, format!("the stream arriving here carries {}, not {}: a fluid cannot change across a stream", have.name, want.name)));
                        }
                    }
                }
            }
        }
        let mut streams = Vec::new();
        for (i, (from, to)) in links.into_iter().enumerate() {
            let f = fluid[i].ok_or_else(|| self.item_error(from.unit, format!(
                "no feed's fluid reaches the stream {}.{}; a closed loop needs 'fluid: <name>' on one of its units",
                units[from.unit].id, from.port
            )))?;
            streams.push(Stream {
                from,
                to,
                fluid: f,
                name: format!("{}.{}", units[from.unit].id, from.port),
            });
        }
        Ok(streams)
    }

    /// Each flow network (streams joined through units, the two sides of an exchanger
    /// or coolant precooler kept apart) needs exactly one flow basis.
    fn check_flow_bases(&self, plant: &Plant) -> Result<(), FlowsheetError> {
        let n = plant.streams.len();
        let network = flow_networks(&plant.units, n);
        // Bases per network.
        let mut bases: BTreeMap<usize, Vec<usize>> = BTreeMap::new();
        for (ui, unit) in plant.units.iter().enumerate() {
            if unit.flow_basis.is_some() {
                let stream = unit.outlets.first().or(unit.inlets.first()).copied();
                if let Some(s) = stream {
                    bases.entry(network[s]).or_default().push(ui);
                }
            }
        }
        let mut reported = BTreeSet::new();
        for (s, &root) in network.iter().enumerate() {
            if !reported.insert(root) {
                continue;
            }
            let unit = plant.streams[s].from.unit;
            match bases.get(&root).map(Vec::as_slice) {
                None | Some([]) => {
                    return Err(self.item_error(unit, format!(
                        "the flow network through {} has no flow basis: give one feed a fixed 'flow', or one compressor (or cooler, precooler, valve, expander) a 'flow'",
                        plant.streams[s].name
                    )))
                }
                Some([_]) => {}
                Some(many) => {
                    let names: Vec<&str> = many.iter().map(|&u| plant.units[u].id.as_str()).collect();
                    return Err(self.item_error(many[1], format!(
                        "the flow is over-specified: {} all fix the flow of the same network; keep one and make feeds 'flow: balance'",
                        names.join(", ")
                    )));
                }
            }
        }
        Ok(())
    }

    /// Static pressures from the pressure-setting units, to catch a valve or expander
    /// that would raise the pressure, or a compressor that would lower it.
    fn check_pressures(&self, plant: &Plant) -> Result<(), FlowsheetError> {
        let pressure = static_pressures(&plant.units, plant.streams.len());
        for (ui, unit) in plant.units.iter().enumerate() {
            let Some(p_in) = unit.inlets.first().and_then(|&i| pressure[i]) else {
                continue;
            };
            let params = Params::new(&self.raw.equipment[ui], ui, self.place);
            let bar = |p: f64| p / 1e5;
            match &unit.spec {
                UnitSpec::Valve {
                    outlet_pressure, ..
                }
                | UnitSpec::Expander {
                    outlet_pressure, ..
                } if *outlet_pressure >= p_in => {
                    return Err(params.error("outlet_pressure", format!(
                        "the outlet pressure {:.4} bar is not below the inlet pressure {:.4} bar: a {} only lowers the pressure",
                        bar(*outlet_pressure), bar(p_in), unit.spec.kind()
                    )));
                }
                UnitSpec::Compressor {
                    outlet_pressure, ..
                } if *outlet_pressure <= p_in => {
                    return Err(params.error(
                        "outlet_pressure",
                        format!(
                        "the outlet pressure {:.4} bar is not above the inlet pressure {:.4} bar",
                        bar(*outlet_pressure), bar(p_in)
                    ),
                    ));
                }
                _ => {}
            }
            if let Some(&bad) = unit
                .outlets
                .iter()
                .find(|&&o| pressure[o].is_some_and(|p| p <= 0.0))
            {
                return Err(self.item_error(
                    ui,
                    format!(
                        "pressure drops take the stream {} to zero or below",
                        plant.streams[bad].name
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// The default work equivalent of a cryogen's liquid: the ideal (minimum) work of
/// liquefying it from ambient at 1 atm to saturated liquid at the bath pressure,
/// over an assumed figure of merit of 0.25 for the plant that makes it (common
/// practice for industrial liquefiers, from memory; state your own with
/// `liquid_work`). Returns (work J/kg, ideal work J/kg).
pub fn default_liquid_work(
    fluid: &'static Fluid,
    bath_pressure: f64,
    ambient: f64,
) -> crate::error::Result<(f64, f64)> {
    let liquid = fluid.state_p_quality(bath_pressure, 0.0)?;
    let dead = fluid.state_tp(ambient, 101_325.0)?;
    let ideal = (liquid.enthalpy - dead.enthalpy) - ambient * (liquid.entropy - dead.entropy);
    Ok((ideal / 0.25, ideal))
}
