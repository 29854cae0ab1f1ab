//! Real-fluid properties from reference multiparameter equations of state.
//!
//! The built-in fluids are compiled into the binary from `src/fluids/data/`. Look a
//! fluid up by name with [`fluid`], then build states with its named constructors
//! ([`Fluid::state_tp`], [`Fluid::state_ph`], [`Fluid::state_ps`],
//! [`Fluid::state_t_rho`], [`Fluid::state_t_quality`], [`Fluid::state_p_quality`]).

pub mod ancillary;
pub mod density;
pub mod diagram;
pub mod exergy;
pub mod file;
pub mod flash;
mod fluid;
pub mod helmholtz;
pub mod inversion;
pub mod saturation;
pub mod saturation_table;
pub mod spec;
pub mod state;
pub mod throttling;

pub use density::Branch;
pub use exergy::DeadState;
pub use fluid::{Fluid, Point, Properties};
pub use saturation::Saturation;
pub use spec::{Property, Spec};
pub use state::{Phase, SaturatedPair, State};

use crate::error::{Error, Result};
use std::sync::OnceLock;

/// The built-in fluid files: canonical name and text.
const FLUID_FILES: [(&str, &str); 10] = [
    ("nitrogen", include_str!("data/nitrogen.yaml")),
    ("hydrogen", include_str!("data/hydrogen.yaml")),
    ("parahydrogen", include_str!("data/parahydrogen.yaml")),
    ("orthohydrogen", include_str!("data/orthohydrogen.yaml")),
    ("helium", include_str!("data/helium.yaml")),
    ("neon", include_str!("data/neon.yaml")),
    ("argon", include_str!("data/argon.yaml")),
    ("methane", include_str!("data/methane.yaml")),
    ("oxygen", include_str!("data/oxygen.yaml")),
    ("air", include_str!("data/air.yaml")),
];

static LOADED: [OnceLock<std::result::Result<Fluid, Error>>; 10] = [
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
    OnceLock::new(),
];

/// Canonical names of the built-in fluids, in a stable order.
pub fn names() -> Vec<&'static str> {
    FLUID_FILES.iter().map(|(name, _)| *name).collect()
}

fn load(index: usize) -> Result<&'static Fluid> {
    let slot = LOADED[index].get_or_init(|| {
        let (name, text) = FLUID_FILES[index];
        let file_name = format!("src/fluids/data/{name}.yaml");
        let data: file::FluidFile = serde_yaml::from_str(text).map_err(|e| Error::FluidData {
            file: file_name.clone(),
            message: e.to_string(),
        })?;
        Fluid::from_file(data, &file_name)
    });
    slot.as_ref().map_err(Clone::clone)
}

/// Aliases accepted besides the canonical names (kept here so lookup needs no parsing).
fn alias_index(name: &str) -> Option<usize> {
    let canonical = match name {
        "n2" => "nitrogen",
        "h2" | "normal-hydrogen" | "normalhydrogen" | "n-h2" => "hydrogen",
        "para-hydrogen" | "p-h2" => "parahydrogen",
        "ortho-hydrogen" | "o-h2" => "orthohydrogen",
        "he" | "helium-4" | "he4" => "helium",
        "ne" => "neon",
        "ar" => "argon",
        "ch4" => "methane",
        "o2" => "oxygen",
        "dry-air" => "air",
        other => other,
    };
    FLUID_FILES.iter().position(|(n, _)| *n == canonical)
}

/// The built-in fluid with this name or alias (case-insensitive).
pub fn fluid(name: &str) -> Result<&'static Fluid> {
    let lower = name.trim().to_lowercase();
    match alias_index(&lower) {
        Some(index) => load(index),
        None => Err(Error::UnknownFluid {
            name: name.to_string(),
            known: names().join(", "),
        }),
    }
}

/// Every built-in fluid.
pub fn all() -> Result<Vec<&'static Fluid>> {
    (0..FLUID_FILES.len()).map(load).collect()
}
