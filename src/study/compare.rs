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
    /// Design errors found in the solved flowsheet (0 where it failed): a
    /// flowsheet with any is infeasible and never shown as best.
    pub design_errors: usize,
    /// The fluids it uses (canonical names), for cautions and sources.
    pub fluids: Vec<String>,
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
            let solved = flowsheet::load(file, &[]).and_then(|plant| {
                let solution = solve::solve(&plant, &Default::default())?;
                let errors = crate::rules::design_errors(&plant, &solution);
                Ok((solution, errors))
            });
            match solved {
                Ok((solution, design_errors)) => Compared {
                    name,
                    fluids: solution.fluids.clone(),
                    outcome: Ok(solution.summary),
                    design_errors,
                },
                Err(e) => Compared {
                    name,
                    outcome: Err(e),
                    design_errors: 0,
                    fluids: Vec::new(),
                },
            }
        })
        .collect())
}
