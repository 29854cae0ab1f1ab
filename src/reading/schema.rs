//! The raw file as serde reads it. Equipment parameters stay as written (text or
//! numbers) until resolution checks them against each kind's allowed keys and units.

use serde::Deserialize;
use std::collections::BTreeMap;

/// A whole flowsheet file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FlowsheetFile {
    /// One-line title.
    pub title: String,
    /// Free notes.
    #[serde(default)]
    pub notes: Option<String>,
    /// Ambient (dead-state) temperature, such as `300 K`.
    pub ambient: serde_yaml::Value,
    /// The fluids the flowsheet uses.
    pub fluids: Vec<String>,
    /// Solver and design-check settings.
    #[serde(default)]
    pub settings: BTreeMap<String, serde_yaml::Value>,
    /// The equipment, each with an `id` and a `kind`.
    pub equipment: Vec<EquipmentEntry>,
}

/// One equipment item: its id, kind and the rest of its keys.
#[derive(Debug, Clone, Deserialize)]
pub struct EquipmentEntry {
    /// Unique name.
    pub id: String,
    /// feed, product, compressor, cooler, exchanger, precooler, valve, separator,
    /// mixer, splitter or expander.
    pub kind: String,
    /// Every other key, checked during resolution.
    #[serde(flatten)]
    pub params: BTreeMap<String, serde_yaml::Value>,
}
