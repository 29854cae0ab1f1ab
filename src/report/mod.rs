//! Turning results into text people read and JSON or CSV that programs read. The
//! report never computes thermodynamics beyond reading states.

pub mod caution;
pub mod fluids;
pub mod inversion;
pub mod plot;
pub mod solution;
pub mod state;
pub mod study;
pub mod table;
pub mod tables_csv;

pub use table::TextTable;
