//! Comparison: several flowsheets solved one after another, their headline
//! figures side by side.

use crate::error::Result;
use crate::flowsheet;
use crate::solve::{self, Summary};
use std::path::PathBuf;

/// One flowsheet of a comparison: its short name and its summary.
#[derive(Debug, Clone)]
pub struct Compared {
    /// The file's stem (or its whole path where it has none).
    pub name: String,
    /// The headline figures.
    pub summary: Summary,
}

/// Solves each file in turn; the first that fails ends the comparison with its error.
pub fn compare(files: &[PathBuf]) -> Result<Vec<Compared>> {
    let mut out = Vec::with_capacity(files.len());
    for file in files {
        let plant = flowsheet::load(file, &[])?;
        let solution = solve::solve(&plant, &Default::default())?;
        let name = file.file_stem().map_or_else(
            || file.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        out.push(Compared {
            name,
            summary: solution.summary,
        });
    }
    Ok(out)
}
