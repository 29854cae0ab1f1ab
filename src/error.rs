//! The one error type of the library, with structured details for every failure.

use thiserror::Error;

/// Everything that can go wrong in cryochain, from bad input to a solver that did
/// not converge. The CLI turns each variant into a message and an exit code.
#[derive(Debug, Error, Clone, PartialEq)]
pub enum Error {
    /// A fluid name that is not in the built-in set.
    #[error("unknown fluid '{name}'; known fluids: {known}")]
    UnknownFluid {
        /// The name as given.
        name: String,
        /// Comma-separated canonical names of the known fluids.
        known: String,
    },

    /// A value with a unit that could not be read, or had the wrong kind of unit.
    #[error("{0}")]
    Quantity(#[from] crate::quantity::QuantityError),

    /// A state outside the validity range of a fluid's equation of state.
    #[error("{what} is outside the range of the {fluid} equation of state: {detail}")]
    OutOfRange {
        /// Canonical fluid name.
        fluid: String,
        /// What was out of range, with its value (for example `T = 2.5 K`).
        what: String,
        /// The allowed range, in words and numbers.
        detail: String,
    },

    /// A pair of inputs that no state of the fluid satisfies, or that does not fix a state.
    #[error("impossible state for {fluid}: {detail}")]
    ImpossibleState {
        /// Canonical fluid name.
        fluid: String,
        /// Why the pair cannot be met.
        detail: String,
    },

    /// An iterative solve that hit its iteration cap or could not reduce its residual.
    #[error(
        "{solver} did not converge after {iterations} iterations (last residual {residual:.3e}){context}"
    )]
    NoConvergence {
        /// Which solver.
        solver: &'static str,
        /// Iterations made.
        iterations: usize,
        /// The residual at the last iterate, in the solver's own scaled measure.
        residual: f64,
        /// Where it happened (fluid and inputs), starting with a separator.
        context: String,
    },

    /// A fluid data file that does not describe a usable equation of state.
    #[error("fluid data '{file}': {message}")]
    FluidData {
        /// The data file.
        file: String,
        /// What is wrong with it.
        message: String,
    },

    /// Input that is malformed in some other way (command-line specs, CSV rows).
    #[error("{0}")]
    Input(String),

    /// A file that could not be read or written (or a folder that could not be
    /// made), with the path and the system's reason.
    #[error("cannot {action} {path}: {reason}")]
    File {
        /// `read`, `write` or `create`.
        action: &'static str,
        /// The path.
        path: String,
        /// Why, in the system's words.
        reason: String,
    },

    /// A fault of cryochain itself (a state the solver should never reach); please
    /// report it with the flowsheet.
    #[error("internal error (please report it with the flowsheet): {0}")]
    Internal(String),

    /// A study found no feasible case: every case solved broke a design check of
    /// error severity or the study's constraint.
    #[error("{0}")]
    Infeasible(String),

    /// A flowsheet that cannot be read or resolved, with the place of the fault.
    #[error("{0}")]
    Flowsheet(#[from] FlowsheetError),
}

/// A flowsheet error with its place: file, line, column, equipment id.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowsheetError {
    /// The file (or `--set` override) the error is in.
    pub file: String,
    /// 1-based line and column, when known.
    pub position: Option<(usize, usize)>,
    /// The equipment concerned, when there is one.
    pub equipment: Option<String>,
    /// What is wrong and what was expected.
    pub message: String,
}

impl std::fmt::Display for FlowsheetError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some((line, column)) = self.position {
            write!(f, ":{line}:{column}")?;
        }
        write!(f, ": ")?;
        if let Some(id) = &self.equipment {
            write!(f, "equipment '{id}': ")?;
        }
        write!(f, "{}", self.message)
    }
}

impl std::error::Error for FlowsheetError {}

impl Error {
    /// A file error for `path`.
    pub fn file(
        action: &'static str,
        path: &std::path::Path,
        reason: impl std::fmt::Display,
    ) -> Error {
        Error::File {
            action,
            path: path.display().to_string(),
            reason: reason.to_string(),
        }
    }

    /// The same error seen from inside equipment `id`: its kind (and so its exit
    /// code) kept, the equipment named.
    pub fn in_equipment(self, id: &str) -> Error {
        match self {
            Error::NoConvergence {
                solver,
                iterations,
                residual,
                context,
            } => Error::NoConvergence {
                solver,
                iterations,
                residual,
                context: format!("{context} in equipment '{id}'"),
            },
            Error::OutOfRange {
                fluid,
                what,
                detail,
            } => Error::OutOfRange {
                fluid,
                what: format!("in equipment '{id}', {what}"),
                detail,
            },
            Error::ImpossibleState { fluid, detail } => Error::ImpossibleState {
                fluid,
                detail: format!("in equipment '{id}': {detail}"),
            },
            Error::Input(message) => Error::Input(format!("equipment '{id}': {message}")),
            other => other,
        }
    }
}

/// Shorthand for results in this crate.
pub type Result<T> = std::result::Result<T, Error>;
