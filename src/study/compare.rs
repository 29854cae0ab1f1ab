//! Comparison: several flowsheets solved one after another, their headline
//! figures side by side.

use crate::error::{Error, Result};
use crate::flowsheet;
use crate::solve::{self, Summary};
use std::path::PathBuf;

/// One flowsheet of a comparison: its short name and its summary, or why it could
/// not be solved.
#[derive(Debug, Clone)]
pub struct Compared {
    /// The file's stem (or its whole path where it has none).
    pub name: String,
    /// The headline figures, or the error that stopped this flowsheet.
    pub outcome: std::result::Result<Summary, Error>,
}

/// Solves each file in turn; a file that fails keeps its place with its error and
/// the others are still solved. No files at all is an error.
pub fn compare(files: &[PathBuf]) -> Result<Vec<Compared>> {
    if files.is_empty() {
        return Err(Error::Input(
            "compare needs at least one flowsheet file".into(),
        ));
    }
    Ok(files
        .iter()
        .map(|file| {
            let name = file.file_stem().map_or_else(
                || file.display().to_string(),
                |n| n.to_string_lossy().into_owned(),
            );
            let outcome = flowsheet::load(file, &[])
                .and_then(|plant| solve::solve(&plant, &Default::default()))
                .map(|solution| solution.summary);
            Compared { name, outcome }
        })
        .collect())
}
