//! Design checks: a solved flowsheet held against the rules of the trade. Each
//! finding has a stable id, a severity, the equipment it concerns, the numbers
//! behind it and a hint that says what to change. docs/checks.md lists them all.

mod checks;
pub mod pressure;

pub use checks::{check, design_errors};

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// How serious a finding is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    /// The design cannot work as drawn.
    Error,
    /// It works, but breaks a rule of practice.
    Warning,
    /// Worth knowing.
    Note,
}

impl Severity {
    /// The word printed.
    pub fn word(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Note => "note",
        }
    }
}

/// One finding.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Finding {
    /// Stable id, such as `valve-above-inversion-temperature`.
    pub id: String,
    /// Severity.
    pub severity: Severity,
    /// The equipment concerned, if any.
    pub equipment: Option<String>,
    /// What is wrong, in words, with the numbers.
    pub message: String,
    /// The numbers behind it, SI units in the key names.
    pub values: BTreeMap<String, f64>,
    /// What to change.
    pub hint: String,
}

impl Finding {
    pub(crate) fn new(
        id: &str,
        severity: Severity,
        equipment: Option<&str>,
        message: String,
        hint: String,
    ) -> Finding {
        Finding {
            id: id.to_string(),
            severity,
            equipment: equipment.map(str::to_string),
            message,
            values: BTreeMap::new(),
            hint,
        }
    }

    pub(crate) fn value(mut self, key: &str, v: f64) -> Finding {
        self.values.insert(key.to_string(), v);
        self
    }
}
