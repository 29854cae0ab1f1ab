//! From file text to a checked [`Plant`]: parse, apply `--set` overrides, read
//! each item through its kind's reader, then connect the streams and carry fluids
//! (`connect.rs`) and check flow bases and pressures (`presolve.rs`) before anything
//! is solved. Settings are read in `settings.rs`.

use super::plant::*;
use super::settings::AMBIENT_PRESSURE_RANGE;
use crate::equipment::{self, Reader, WrittenInlet};
use crate::error::FlowsheetError;
use crate::fluids::{self, Fluid};
use crate::quantity::{self, Dimension};
use crate::reading::schema::FlowsheetFile;
use crate::reading::{Locator, Params, Place};
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

/// Reads and resolves the flowsheet file at `path`: a file that cannot be read is
/// a file error, anything wrong inside it a flowsheet error.
pub fn load(path: &std::path::Path, overrides: &[Override]) -> crate::error::Result<Plant> {
    let name = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|e| crate::error::Error::file("read", path, e))?;
    let text = std::str::from_utf8(&bytes).map_err(|e| {
        let good = &bytes[..e.valid_up_to()];
        let line = good.iter().filter(|b| **b == b'\n').count() + 1;
        let column = good.iter().rev().take_while(|b| **b != b'\n').count() + 1;
        FlowsheetError {
            file: name.clone(),
            position: Some((line, column)),
            equipment: None,
            message: format!(
                "the file stops being UTF-8 text here (byte {}): a flowsheet is plain text",
                e.valid_up_to()
            ),
        }
    })?;
    Ok(load_str(text, &name, overrides)?)
}

/// The largest flowsheet file read, bytes (a hand-written flowsheet is a few KB).
pub const MAX_FILE_BYTES: usize = 1 << 20;

/// The deepest nesting of `[` and `{` accepted (a flowsheet needs two or three).
pub const MAX_NESTING: usize = 32;

/// Refuses oversized text and deep bracket nesting quickly, before the YAML parser
/// spends long on them.
fn check_shape(text: &str, file: &str) -> Result<(), FlowsheetError> {
    let refuse = |position: Option<(usize, usize)>, message: String| FlowsheetError {
        file: file.to_string(),
        position,
        equipment: None,
        message,
    };
    if text.len() > MAX_FILE_BYTES {
        return Err(refuse(
            None,
            format!(
                "the file is {} bytes; a flowsheet may be at most {MAX_FILE_BYTES} bytes",
                text.len()
            ),
        ));
    }
    let (mut depth, mut line, mut column) = (0usize, 1usize, 0usize);
    let mut quote: Option<char> = None;
    let mut comment = false;
    for c in text.chars() {
        column += 1;
        match c {
            '\n' => {
                line += 1;
                column = 0;
                comment = false;
                quote = None;
            }
            _ if comment => {}
            '"' | '\'' if quote == Some(c) => quote = None,
            '"' | '\'' if quote.is_none() => quote = Some(c),
            _ if quote.is_some() => {}
            '#' => comment = true,
            '[' | '{' => {
                depth += 1;
                if depth > MAX_NESTING {
                    return Err(refuse(
                        Some((line, column)),
                        format!("brackets nest deeper than {MAX_NESTING} levels here; a flowsheet needs two or three"),
                    ));
                }
            }
            ']' | '}' => depth = depth.saturating_sub(1),
            _ => {}
        }
    }
    Ok(())
}

/// The YAML reader's message, with its words for the whole file put plainly.
fn plain_yaml_message(message: &str) -> String {
    if let Some(rest) = message.strip_prefix("invalid type: ") {
        if let Some((found, _)) = rest.split_once(", expected struct FlowsheetFile") {
            return format!(
                "the file holds a {}; a flowsheet is a mapping of title, ambient, fluids, settings (optional) and equipment (docs/flowsheet-format.md)",
                if found == "sequence" { "list" } else { found }
            );
        }
    }
    message.to_string()
}

/// Resolves flowsheet `text`; `file` names it in errors.
pub fn load_str(text: &str, file: &str, overrides: &[Override]) -> Result<Plant, FlowsheetError> {
    check_shape(text, file)?;
    let mut raw: FlowsheetFile = serde_yaml::from_str(text).map_err(|e| FlowsheetError {
        file: file.to_string(),
        position: e.location().map(|l| (l.line(), l.column())),
        equipment: None,
        message: plain_yaml_message(&e.to_string()),
    })?;
    let mut overridden = BTreeSet::new();
    for o in overrides {
        apply_override(&mut raw, o)?;
        overridden.insert((o.target.clone(), o.key.clone()));
    }
    let locator = Locator::new(text);
    // Gauge pressures are read above the ambient pressure; a bad value is
    // reported, located, when the settings are read.
    let ambient_pressure = raw
        .settings
        .get("ambient_pressure")
        .and_then(|v| match v {
            serde_yaml::Value::String(s) => Some(s.clone()),
            _ => None,
        })
        .and_then(|text| crate::quantity::parse(&text, crate::quantity::Dimension::Pressure).ok())
        .filter(|p| (AMBIENT_PRESSURE_RANGE.0..=AMBIENT_PRESSURE_RANGE.1).contains(p))
        .unwrap_or(crate::quantity::STANDARD_ATMOSPHERE);
    let place = Place {
        file,
        locator: &locator,
        overridden: &overridden,
        ambient_pressure,
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
    // Switching an alternative (an exchanger's duty specification) replaces the
    // one the file gives.
    let alternatives = equipment::kind_named(&entry.kind).map_or(&[][..], |k| k.alternative_keys);
    if alternatives.contains(&o.key.as_str()) {
        entry
            .params
            .retain(|key, _| key == &o.key || !alternatives.contains(&key.as_str()));
    }
    entry.params.insert(o.key.clone(), value);
    Ok(())
}

/// An inlet written in the file, before it is connected: the unit it belongs to.
pub(super) struct PendingInlet {
    pub(super) unit: usize,
    pub(super) inlet: WrittenInlet,
}

/// The raw file and where its errors are reported, shared by the resolution steps.
pub(super) struct Resolver<'a> {
    pub(super) raw: &'a FlowsheetFile,
    pub(super) place: &'a Place<'a>,
}

impl<'a> Resolver<'a> {
    fn new(raw: &'a FlowsheetFile, place: &'a Place<'a>) -> Self {
        Resolver { raw, place }
    }

    pub(super) fn top_error(&self, key: &str, message: impl Into<String>) -> FlowsheetError {
        // A value replaced by `--set flowsheet.KEY=…` is blamed on the override.
        if self
            .place
            .overridden
            .contains(&("flowsheet".to_string(), key.to_string()))
        {
            return FlowsheetError {
                file: format!("--set flowsheet.{key}"),
                position: None,
                equipment: None,
                message: message.into(),
            };
        }
        FlowsheetError {
            file: self.place.file.to_string(),
            position: self.place.locator.top(key),
            equipment: None,
            message: message.into(),
        }
    }

    pub(super) fn item_error(&self, index: usize, message: impl Into<String>) -> FlowsheetError {
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
            serde_yaml::Value::Number(n) => n.to_string(),
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
        // A key given twice in one item: YAML would keep the last silently.
        for index in 0..self.raw.equipment.len() {
            if let Some((key, first, second)) = self.place.locator.duplicate_key(index) {
                return Err(FlowsheetError {
                    file: self.place.file.to_string(),
                    position: Some(second),
                    equipment: self.raw.equipment.get(index).map(|e| e.id.clone()),
                    message: format!(
                        "'{key}' is given twice, on lines {} and {}; keep one",
                        first.0, second.0
                    ),
                });
            }
        }
        // Each item read by its kind; the inlets each names.
        let mut units = Vec::new();
        let mut pending = Vec::new();
        let mut declared_fluid: Vec<Option<(&'static Fluid, &'static str)>> = Vec::new();
        for (index, entry) in self.raw.equipment.iter().enumerate() {
            let params = Params::new(entry, index, self.place);
            let Some(kind) = equipment::kind_named(&entry.kind) else {
                return Err(self.item_error(
                    index,
                    format!(
                        "unknown kind '{}'; the kinds are {}",
                        entry.kind,
                        equipment::kind_names()
                    ),
                ));
            };
            // Unknown keys first: a misspelt key would otherwise show as a missing one.
            let mut known = kind.keys.to_vec();
            if !known.contains(&"fluid") {
                known.push("fluid");
            }
            params.check_known(&known)?;
            let mut reader = Reader::new(&params, &declared, ambient, settings.segments);
            // A kind that does not read `fluid` itself takes it as an assertion of
            // the fluid that arrives, read before its own keys.
            if !kind.keys.contains(&"fluid") {
                if let Some(name) = params.text_opt("fluid")? {
                    let fluid = reader.fluid("fluid", &name)?;
                    reader.set_fluid(fluid, "fluid");
                }
            }
            let spec = (kind.read)(&mut reader)?;
            let reading = reader.into_reading();
            params.finish()?;
            pending.extend(
                reading
                    .inlets
                    .into_iter()
                    .map(|inlet| PendingInlet { unit: index, inlet }),
            );
            declared_fluid.push(reading.fluid);
            units.push(Unit {
                id: entry.id.clone(),
                spec,
                inlets: Vec::new(),
                outlets: Vec::new(),
                flow_basis: reading.flow_basis,
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
        plant.streams = self.carry_fluids(&plant.units, streams, &declared_fluid)?;
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
}
