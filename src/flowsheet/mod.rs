//! Flowsheet files: the YAML an engineer writes, read with every error located, and
//! resolved into a [`Plant`]: a petgraph graph of equipment with units, fluids and
//! flows checked before anything is solved. docs/flowsheet-format.md describes the
//! format.

mod connect;
pub mod plant;
mod presolve;
mod resolve;
mod settings;

pub use crate::error::FlowsheetError;
pub use crate::reading::{schema, Locator};
pub use plant::{Plant, PortRef, Settings, Stream, Unit, UnitSpec};
pub use resolve::{load, load_str, Override};
