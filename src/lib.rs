//! cryochain: plans Linde-Hampson liquefaction cycles for hydrogen, helium and the
//! precooling gases on reference-quality real-fluid properties.
//!
//! The library never prints; the `cryochain` binary decides what the user sees.

// `!(x > 0.0)` is deliberate throughout: unlike `x <= 0.0` it is also true for NaN,
// so a NaN can never pass a check.
#![allow(clippy::neg_cmp_op_on_partial_ord)]
#![warn(missing_docs)]

pub mod batch;
pub mod equipment;
pub mod error;
pub mod flowsheet;
pub mod fluids;
pub mod numeric;
pub mod quantity;
pub mod reading;
pub mod report;
pub mod rules;
pub mod solve;
pub mod study;

pub use error::{Error, Result};
