//! Turning results into text people read and JSON or CSV that programs read. The
//! report never computes thermodynamics beyond reading states.

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
