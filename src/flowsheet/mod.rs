//! Flowsheet files: the YAML an engineer writes, read with every error located, and
//! resolved into a [`Plant`]: a petgraph graph of equipment with units, fluids and
//! flows checked before anything is solved. docs/flowsheet-format.md describes the
//! format.

mod locate;
mod params;
pub mod plant;
mod resolve;
pub mod schema;

pub use locate::Locator;
pub use plant::{Plant, PortRef, Settings, Stream, Unit, UnitSpec};
pub use resolve::{load, load_str, Override};

use std::fmt;

/// A flowsheet error with its place: file, line, column, equipment id.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowsheetError {
    /// The file (or `--set` override) the error is in.
    pub file: String,
    /// 1-based line and column, when known.
    pub position: Option<(usize, usize)>,
    /// The equipment concerned, when there is one.
    pub equipment: Option<String>,
    /// What is wrong and what was expected.
    pub message: String,
}

impl fmt::Display for FlowsheetError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some((line, column)) = self.position {
            write!(f, ":{line}:{column}")?;
        }
        write!(f, ": ")?;
        if let Some(id) = &self.equipment {
            write!(f, "equipment '{id}': ")?;
        }
        write!(f, "{}", self.message)
    }
}
