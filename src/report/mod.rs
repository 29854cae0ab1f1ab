//! Turning results into text people read and JSON or CSV that programs read. The
//! report never computes thermodynamics beyond reading states.

/// The units of the text report and the HTML page (JSON and CSV are always SI,
/// their units in their keys and headers).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Units {
    /// SI and its decimal multiples: K, bar (10⁵ Pa), kJ/kg, g/s, kW.
    #[default]
    Si,
    /// As plants are run: °C beside K, bar, kg/h for flows and t/d beside kg/h
    /// for the product, kW and kWh/kg.
    Engineering,
}

impl Units {
    /// Reads `si` or `engineering`.
    pub fn parse(text: &str) -> crate::error::Result<Units> {
        match text {
            "si" => Ok(Units::Si),
            "engineering" => Ok(Units::Engineering),
            other => Err(crate::error::Error::Input(format!(
                "'{other}' is not a choice of units; use si or engineering"
            ))),
        }
    }
}

pub mod caution;
pub mod fluids;
pub mod html;
pub mod inversion;
pub mod plot;
pub mod solution;
pub mod state;
pub mod study;
pub mod table;
pub mod tables_csv;

pub use table::TextTable;

use crate::error::{Error, Result};
use std::path::Path;

/// Makes the folder `dir` for output files if it is missing: the folder itself
/// only, never a missing tree above it (a mistyped parent is an error that names
/// it).
pub fn output_folder(dir: &Path) -> Result<()> {
    if dir.is_dir() {
        return Ok(());
    }
    let parent = dir
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    if !parent.is_dir() {
        return Err(Error::file(
            "create",
            dir,
            format!("its parent folder {} does not exist", parent.display()),
        ));
    }
    std::fs::create_dir(dir).map_err(|e| Error::file("create", dir, e))
}
