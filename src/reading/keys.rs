//! Reading one equipment item's keys: typed, unit-checked and range-checked, each
//! error located at its key; keys the kind does not know are errors too.

use super::locate::Locator;
use super::schema::EquipmentEntry;
use crate::error::FlowsheetError;
use crate::quantity::{self, Dimension};
use std::cell::RefCell;
use std::collections::BTreeSet;

/// Where errors are reported: the file's name and its locator.
pub struct Place<'a> {
    /// File name for messages.
    pub file: &'a str,
    /// Key positions.
    pub locator: &'a Locator,
    /// Keys replaced by `--set`, reported as such.
    pub overridden: &'a BTreeSet<(String, String)>,
    /// The ambient pressure gauge pressures are read above, Pa.
    pub ambient_pressure: f64,
}

/// The keys of one equipment item.
pub struct Params<'a> {
    entry: &'a EquipmentEntry,
    index: usize,
    place: &'a Place<'a>,
    used: RefCell<BTreeSet<&'static str>>,
}

/// Text of a YAML scalar as written.
fn scalar_text(value: &serde_yaml::Value) -> Option<String> {
    match value {
        serde_yaml::Value::String(s) => Some(s.clone()),
        serde_yaml::Value::Number(n) => Some(n.to_string()),
        serde_yaml::Value::Bool(b) => Some(b.to_string()),
        _ => None,
    }
}

impl<'a> Params<'a> {
    /// The keys of equipment item `index`.
    pub fn new(entry: &'a EquipmentEntry, index: usize, place: &'a Place<'a>) -> Self {
        Params {
            entry,
            index,
            place,
            used: RefCell::new(BTreeSet::new()),
        }
    }

    /// An error located at `key` (or at the item when the key is absent).
    pub fn error(&self, key: &str, message: impl Into<String>) -> FlowsheetError {
        let overridden = self
            .place
            .overridden
            .contains(&(self.entry.id.clone(), key.to_string()));
        FlowsheetError {
            file: if overridden {
                format!("--set {}.{key}", self.entry.id)
            } else {
                self.place.file.to_string()
            },
            position: if overridden {
                None
            } else {
                self.place.locator.key(self.index, key)
            },
            equipment: Some(self.entry.id.clone()),
            message: message.into(),
        }
    }

    fn raw(&self, key: &'static str) -> Option<&serde_yaml::Value> {
        self.used.borrow_mut().insert(key);
        self.entry.params.get(key)
    }

    /// A required text value.
    pub fn text(&self, key: &'static str) -> Result<String, FlowsheetError> {
        self.text_opt(key)?.ok_or_else(|| {
            self.error(
                key,
                format!("'{key}' is required for a {}", self.entry.kind),
            )
        })
    }

    /// An optional text value.
    pub fn text_opt(&self, key: &'static str) -> Result<Option<String>, FlowsheetError> {
        match self.raw(key) {
            None => Ok(None),
            Some(v) => scalar_text(v)
                .map(Some)
                .ok_or_else(|| self.error(key, format!("'{key}' must be a single value"))),
        }
    }

    /// A list of text values (a single value counts as a list of one).
    pub fn text_list(&self, key: &'static str) -> Result<Option<Vec<String>>, FlowsheetError> {
        match self.raw(key) {
            None => Ok(None),
            Some(serde_yaml::Value::Sequence(items)) => items
                .iter()
                .map(|v| {
                    scalar_text(v).ok_or_else(|| {
                        self.error(
                            key,
                            format!("'{key}' must list names of upstream equipment"),
                        )
                    })
                })
                .collect::<Result<Vec<_>, _>>()
                .map(Some),
            Some(v) => scalar_text(v)
                .map(|s| Some(vec![s]))
                .ok_or_else(|| self.error(key, format!("'{key}' must list upstream equipment"))),
        }
    }

    /// A required quantity with its unit, in SI, between `low` and `high`.
    pub fn quantity(
        &self,
        key: &'static str,
        dimension: Dimension,
        low: f64,
        high: f64,
    ) -> Result<f64, FlowsheetError> {
        self.quantity_opt(key, dimension, low, high)?
            .ok_or_else(|| {
                self.error(
                    key,
                    format!(
                        "'{key}' is required for a {}: give {}",
                        self.entry.kind,
                        dimension.describe()
                    ),
                )
            })
    }

    /// An optional quantity with its unit, in SI, between `low` and `high`.
    pub fn quantity_opt(
        &self,
        key: &'static str,
        dimension: Dimension,
        low: f64,
        high: f64,
    ) -> Result<Option<f64>, FlowsheetError> {
        let Some(raw) = self.raw(key) else {
            return Ok(None);
        };
        let text = scalar_text(raw)
            .ok_or_else(|| self.error(key, format!("'{key}' must be {}", dimension.describe())))?;
        let value = quantity::parse_with_ambient(&text, dimension, self.place.ambient_pressure)
            .map_err(|e| self.error(key, format!("{key}: {e}")))?;
        if !(value >= low && value <= high) {
            return Err(self.error(
                key,
                format!(
                    "{key} = {text} is outside the allowed range {} to {}",
                    quantity::format(low, dimension),
                    quantity::format(high, dimension)
                ),
            ));
        }
        Ok(Some(value))
    }

    /// An optional whole number between `low` and `high`.
    pub fn whole_opt(
        &self,
        key: &'static str,
        low: usize,
        high: usize,
    ) -> Result<Option<usize>, FlowsheetError> {
        let Some(raw) = self.raw(key) else {
            return Ok(None);
        };
        let value = raw.as_u64().map(|v| v as usize).ok_or_else(|| {
            self.error(
                key,
                format!("'{key}' must be a whole number from {low} to {high}"),
            )
        })?;
        if !(low..=high).contains(&value) {
            return Err(self.error(
                key,
                format!("{key} = {value} is outside the allowed range {low} to {high}"),
            ));
        }
        Ok(Some(value))
    }

    /// The kind written for this item.
    pub fn kind(&self) -> &str {
        &self.entry.kind
    }

    /// The item's id.
    pub fn id(&self) -> &str {
        &self.entry.id
    }

    /// Refuses the first key written that is not in `known` (the kind's keys), listing
    /// them; done before anything is read, so that a misspelt key is reported as such
    /// and not as a missing one.
    pub fn check_known(&self, known: &[&str]) -> Result<(), FlowsheetError> {
        match self
            .entry
            .params
            .keys()
            .find(|k| !known.contains(&k.as_str()))
        {
            None => Ok(()),
            Some(key) => Err(self.error(
                key,
                format!(
                    "unknown key '{key}' for a {}; its keys are: id, kind, {}",
                    self.entry.kind,
                    known.join(", ")
                ),
            )),
        }
    }

    /// Checks that every key written was read: a key of the kind that does not apply
    /// to the variant written (a staged compressor's `stages` on an isothermal one)
    /// is an error too.
    pub fn finish(&self) -> Result<(), FlowsheetError> {
        let used = self.used.borrow();
        for key in self.entry.params.keys() {
            if !used.contains(key.as_str()) {
                let mut known: Vec<&str> = used.iter().copied().collect();
                known.sort_unstable();
                return Err(self.error(
                    key,
                    format!(
                        "unknown key '{key}' for a {}; the keys of a {} are: id, kind, {}",
                        self.entry.kind,
                        self.entry.kind,
                        known.join(", ")
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// One mapping in a list under an item's key (a multistream exchanger's
/// `streams`): its fields read like an item's keys, each error located at the list's
/// key and naming the entry.
pub struct ListEntry<'p, 'a> {
    params: &'p Params<'a>,
    key: &'static str,
    index: usize,
    map: &'p serde_yaml::Mapping,
    used: RefCell<BTreeSet<String>>,
}

impl<'a> Params<'a> {
    /// The mappings listed under `key`, or `None` when the key is absent; anything
    /// but a list of mappings is an error.
    pub fn entries(
        &self,
        key: &'static str,
    ) -> Result<Option<Vec<ListEntry<'_, 'a>>>, FlowsheetError> {
        let Some(raw) = self.raw(key) else {
            return Ok(None);
        };
        let serde_yaml::Value::Sequence(items) = raw else {
            return Err(self.error(
                key,
                format!("'{key}' must be a list of entries, one per line starting with '- '"),
            ));
        };
        items
            .iter()
            .enumerate()
            .map(|(index, item)| match item {
                serde_yaml::Value::Mapping(map) => Ok(ListEntry {
                    params: self,
                    key,
                    index,
                    map,
                    used: RefCell::new(BTreeSet::new()),
                }),
                _ => Err(self.error(
                    key,
                    format!("entry {} of '{key}' must be a mapping such as {{name: hp, inlet: compressor, side: hot}}", index + 1),
                )),
            })
            .collect::<Result<Vec<_>, _>>()
            .map(Some)
    }
}

impl ListEntry<'_, '_> {
    /// An error about `field` of this entry, located at the list's key.
    pub fn error(&self, field: &str, message: impl Into<String>) -> FlowsheetError {
        let name = self
            .map
            .get("name")
            .and_then(scalar_text)
            .map_or(String::new(), |n| format!(" ('{n}')"));
        self.params.error(
            self.key,
            format!(
                "{} entry {}{name}, '{field}': {}",
                self.key,
                self.index + 1,
                message.into()
            ),
        )
    }

    fn raw(&self, field: &str) -> Option<&serde_yaml::Value> {
        self.used.borrow_mut().insert(field.to_string());
        self.map.get(field)
    }

    /// An optional text field.
    pub fn text_opt(&self, field: &str) -> Result<Option<String>, FlowsheetError> {
        match self.raw(field) {
            None => Ok(None),
            Some(v) => scalar_text(v)
                .map(Some)
                .ok_or_else(|| self.error(field, "must be a word or a name")),
        }
    }

    /// A required text field.
    pub fn text(&self, field: &str) -> Result<String, FlowsheetError> {
        self.text_opt(field)?
            .ok_or_else(|| self.error(field, "is required"))
    }

    /// An optional quantity with its unit, in SI, between `low` and `high`.
    pub fn quantity_opt(
        &self,
        field: &str,
        dimension: Dimension,
        low: f64,
        high: f64,
    ) -> Result<Option<f64>, FlowsheetError> {
        let Some(raw) = self.raw(field) else {
            return Ok(None);
        };
        let text = scalar_text(raw)
            .ok_or_else(|| self.error(field, format!("must be {}", dimension.describe())))?;
        let value =
            quantity::parse_with_ambient(&text, dimension, self.params.place.ambient_pressure)
                .map_err(|e| self.error(field, e.to_string()))?;
        if !(value >= low && value <= high) {
            return Err(self.error(
                field,
                format!(
                    "{text} is outside the allowed range {} to {}",
                    quantity::format(low, dimension),
                    quantity::format(high, dimension)
                ),
            ));
        }
        Ok(Some(value))
    }

    /// An optional true/false field (default false).
    pub fn flag(&self, field: &str) -> Result<bool, FlowsheetError> {
        match self.raw(field) {
            None => Ok(false),
            Some(serde_yaml::Value::Bool(b)) => Ok(*b),
            Some(_) => Err(self.error(field, "must be true or false")),
        }
    }

    /// Refuses a field that was not read, naming the fields an entry takes.
    pub fn finish(&self, known: &[&str]) -> Result<(), FlowsheetError> {
        let used = self.used.borrow();
        for field in self.map.keys().filter_map(scalar_text) {
            if !used.contains(&field) {
                return Err(self.error(
                    &field,
                    format!(
                        "is not a field of an entry; its fields are: {}",
                        known.join(", ")
                    ),
                ));
            }
        }
        Ok(())
    }
}
