//! Real-fluid properties from reference multiparameter equations of state.
//!
//! The built-in fluids are compiled into the binary from `src/fluids/data/`. Look a
//! fluid up by name with [`fluid`], then build states with its named constructors
//! ([`Fluid::state_tp`], [`Fluid::state_ph`], [`Fluid::state_ps`],
//! [`Fluid::state_t_rho`], [`Fluid::state_t_quality`], [`Fluid::state_p_quality`]).

pub mod ancillary;
pub mod blend;
pub mod conversion;
pub mod density;
pub mod diagram;
pub mod exergy;
mod fast_exp;
pub mod file;
pub mod flash;
mod fluid;
pub mod helmholtz;
pub mod inversion;
pub mod material;
mod recent;
pub mod saturation;
pub mod saturation_table;
mod seed_grid;
pub mod spec;
pub mod spin;
pub mod state;
pub mod storage;
pub mod throttling;

pub use density::Branch;
pub use exergy::DeadState;
pub use fluid::{Fluid, Point, Properties};
pub use material::Material;
pub use saturation::Saturation;
pub use spec::{Property, Spec};
pub use state::{Phase, SaturatedPair, State};

use crate::error::{Error, Result};
use std::sync::OnceLock;

/// The built-in fluid files, one a fluid. Each names itself (`name:`) and its
/// aliases (`aliases: [..]`) in its header; everything here is derived from them.
const FLUID_FILES: &[&str] = &[
    include_str!("data/nitrogen.yaml"),
    include_str!("data/hydrogen.yaml"),
    include_str!("data/parahydrogen.yaml"),
    include_str!("data/orthohydrogen.yaml"),
    include_str!("data/helium.yaml"),
    include_str!("data/neon.yaml"),
    include_str!("data/argon.yaml"),
    include_str!("data/methane.yaml"),
    include_str!("data/oxygen.yaml"),
    include_str!("data/air.yaml"),
];

/// The same files in JSON, written by src/fluids/data/build.rs (read several times faster than the
/// YAML; the same numbers: a unit test below compares the two readings of every
/// file), in the order of [`FLUID_FILES`].
const FLUID_DATA: &[&str] = &[
    include_str!(concat!(env!("OUT_DIR"), "/nitrogen.json")),
    include_str!(concat!(env!("OUT_DIR"), "/hydrogen.json")),
    include_str!(concat!(env!("OUT_DIR"), "/parahydrogen.json")),
    include_str!(concat!(env!("OUT_DIR"), "/orthohydrogen.json")),
    include_str!(concat!(env!("OUT_DIR"), "/helium.json")),
    include_str!(concat!(env!("OUT_DIR"), "/neon.json")),
    include_str!(concat!(env!("OUT_DIR"), "/argon.json")),
    include_str!(concat!(env!("OUT_DIR"), "/methane.json")),
    include_str!(concat!(env!("OUT_DIR"), "/oxygen.json")),
    include_str!(concat!(env!("OUT_DIR"), "/air.json")),
];

/// Each fluid, loaded and checked on first use.
static LOADED: [OnceLock<std::result::Result<Fluid, Error>>; FLUID_FILES.len()] =
    [const { OnceLock::new() }; FLUID_FILES.len()];

/// A top-level scalar or flow list of a data file's header (`key: value`), read
/// without parsing the whole file.
fn header_field<'t>(text: &'t str, key: &str) -> Option<&'t str> {
    text.lines()
        .take_while(|line| !line.starts_with("ideal_gas:"))
        .find_map(|line| line.strip_prefix(key)?.strip_prefix(':'))
        .map(str::trim)
}

/// The canonical name and aliases of every built-in fluid, from the files' headers.
fn registry() -> &'static [(String, Vec<String>)] {
    static REGISTRY: OnceLock<Vec<(String, Vec<String>)>> = OnceLock::new();
    REGISTRY.get_or_init(|| {
        FLUID_FILES
            .iter()
            .map(|text| {
                let name = header_field(text, "name").unwrap_or_default().to_string();
                let aliases = header_field(text, "aliases")
                    .map(|list| {
                        list.trim_start_matches('[')
                            .trim_end_matches(']')
                            .split(',')
                            .map(|a| a.trim().to_lowercase())
                            .filter(|a| !a.is_empty())
                            .collect()
                    })
                    .unwrap_or_default();
                (name, aliases)
            })
            .collect()
    })
}

/// Canonical names of the built-in fluids, in a stable order.
pub fn names() -> Vec<&'static str> {
    registry().iter().map(|(name, _)| name.as_str()).collect()
}

fn load(index: usize) -> Result<&'static Fluid> {
    let slot = LOADED[index].get_or_init(|| {
        let file_name = format!("src/fluids/data/{}.yaml", registry()[index].0);
        let data: file::FluidFile =
            serde_json::from_str(FLUID_DATA[index]).map_err(|e| Error::FluidData {
                file: file_name.clone(),
                message: e.to_string(),
            })?;
        Fluid::from_file(data, &file_name)
    });
    slot.as_ref().map_err(Clone::clone)
}

/// The index of the fluid with this canonical name or alias (lower case).
fn alias_index(name: &str) -> Option<usize> {
    registry()
        .iter()
        .position(|(canonical, aliases)| canonical == name || aliases.iter().any(|a| a == name))
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

#[cfg(test)]
mod tests {
    use super::*;

    /// The header scan agrees with the full parse of each file (the name the file
    /// is stored under, the name inside it and its aliases).
    #[test]
    fn the_registry_agrees_with_the_data_files() {
        for (index, fluid) in all().unwrap().into_iter().enumerate() {
            let data: file::FluidFile = serde_yaml::from_str(FLUID_FILES[index]).unwrap();
            let (name, aliases) = &registry()[index];
            assert_eq!(name, &fluid.name);
            assert_eq!(name, &data.name);
            let parsed: Vec<String> = data.aliases.iter().map(|a| a.to_lowercase()).collect();
            assert_eq!(aliases, &parsed, "{name}");
            for alias in aliases {
                assert_eq!(fluid_name(alias), Some(name.as_str()));
            }
        }
        assert_eq!(names().len(), FLUID_FILES.len());
    }

    fn fluid_name(alias: &str) -> Option<&'static str> {
        alias_index(alias).map(|i| registry()[i].0.as_str())
    }

    /// Every fluid file reads the same from its JSON form (what the program loads)
    /// as from the YAML itself: every field, every number to the bit.
    #[test]
    fn the_json_form_of_every_fluid_file_reads_the_same_as_the_yaml() {
        assert_eq!(FLUID_FILES.len(), FLUID_DATA.len());
        for (yaml, json) in FLUID_FILES.iter().zip(FLUID_DATA) {
            let from_yaml: file::FluidFile = serde_yaml::from_str(yaml).unwrap();
            let from_json: file::FluidFile = serde_json::from_str(json).unwrap();
            assert_eq!(format!("{from_yaml:?}"), format!("{from_json:?}"));
        }
    }
}
