//! Reading a flowsheet's text: the raw file as serde reads it ([`schema`]), where
//! each key was written ([`locate`]), and typed, unit-checked values read from one
//! equipment item's keys with every error located at its key ([`keys`]).
//!
//! This layer knows nothing of particular equipment kinds: each kind in
//! `crate::equipment` reads its own keys through [`keys::Params`].

pub mod keys;
pub mod locate;
pub mod schema;

pub use keys::{Params, Place};
pub use locate::Locator;
