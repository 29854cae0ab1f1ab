//! cryochain: plans Linde-Hampson liquefaction cycles for hydrogen, helium and the
//! precooling gases on reference-quality real-fluid properties.
//!
//! The library never prints; the `cryochain` binary decides what the user sees.

pub mod batch;
pub mod error;
pub mod fluids;
pub mod quantity;
pub mod report;

pub use error::{Error, Result};
