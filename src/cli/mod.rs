//! The command line: clap definitions, the output format shared by every command,
//! dispatch to one function per command (`commands.rs`), and the one place where
//! errors become messages and exit codes. Nothing here prints: each command returns
//! what goes to stdout and the notes for stderr, and `main` writes them.

mod commands;
mod format;

use clap::{Parser, Subcommand};
use cryochain::error::Error;
pub use format::{Format, FormatArgs};

/// Exit codes, documented in docs/cli.md.
pub mod exit {
    /// Success.
    pub const OK: i32 = 0;
    /// Bad input: a flowsheet's content, values, units, names, states outside a
    /// range, a batch with failed rows.
    pub const INPUT: i32 = 1;
    /// The design has errors (`check`, `solve`), or no feasible point (`optimize`).
    pub const DESIGN: i32 = 2;
    /// A solver did not converge.
    pub const NOT_CONVERGED: i32 = 3;
    /// A file could not be read or written, or a folder made.
    pub const IO: i32 = 4;
    /// The command line itself is wrong: an unknown command or option, a missing
    /// argument.
    pub const USAGE: i32 = 5;
    /// A fault of cryochain itself.
    pub const INTERNAL: i32 = 6;
}

/// cryochain: plans Linde-Hampson liquefaction cycles on reference-quality
/// real-fluid properties.
#[derive(Debug, Parser)]
#[command(name = "cryochain", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Solve a flowsheet (with no file: the built-in demo, a liquid-nitrogen-precooled
    /// hydrogen liquefier) and report yield, power, precooling and exergy.
    Solve(commands::SolveArgs),
    /// Solve a flowsheet and hold it against the design checks (docs/checks.md);
    /// exits with code 2 when the design has errors.
    Check(commands::CheckArgs),
    /// Sweep one to three parameters over a grid; every case is solved (in parallel)
    /// and a failed case is recorded with its reason.
    Sweep(commands::SweepArgs),
    /// Merge shard CSV files of one sweep into the file the unsharded sweep writes
    /// (CSV only).
    MergeShards(commands::MergeShardsArgs),
    /// Optimise a figure over bounded parameters (argmin: Brent for one, Nelder–Mead
    /// for several).
    Optimize(commands::OptimizeArgs),
    /// Headline figures of several flowsheets side by side.
    Compare(commands::CompareArgs),
    /// List the built-in fluids with their sources, critical and triple points and ranges.
    Fluids(commands::FluidsArgs),
    /// Compute one state from two specifications, such as T=80K p=20bar.
    State(commands::StateArgs),
    /// The Joule-Thomson inversion curve of a fluid: maximum inversion temperature,
    /// Boyle temperature, pressure maximum, and the curve.
    Inversion(commands::InversionArgs),
    /// Throttle a state isenthalpically to a lower pressure.
    Throttle(commands::ThrottleArgs),
    /// Property table in batch: a CSV of input pairs in, a CSV of properties out
    /// (CSV only).
    Table(commands::TableArgs),
}

/// What a command produced: its results for stdout and its notes (files written,
/// progress) for stderr.
#[derive(Debug, Default)]
pub struct Output {
    /// Results, for stdout.
    pub stdout: String,
    /// Notes, one a line, for stderr.
    pub notes: Vec<String>,
}

impl Output {
    /// Results with no notes.
    pub fn of(stdout: String) -> Output {
        Output {
            stdout,
            notes: Vec::new(),
        }
    }
}

/// A failure with its exit code, and whatever was computed before it (printed on
/// stdout first, as `check` does with its findings).
#[derive(Debug)]
pub struct Failure {
    /// Message for stderr.
    pub message: String,
    /// Process exit code.
    pub code: i32,
    /// What the command computed before failing.
    pub partial: Output,
}

impl Failure {
    /// A failure with nothing computed before it.
    pub fn new(message: String, code: i32) -> Failure {
        Failure {
            message,
            code,
            partial: Output::default(),
        }
    }
}

impl From<Error> for Failure {
    fn from(error: Error) -> Failure {
        let code = match error {
            Error::NoConvergence { .. } => exit::NOT_CONVERGED,
            Error::Infeasible(_) => exit::DESIGN,
            Error::File { .. } => exit::IO,
            Error::Internal(_) => exit::INTERNAL,
            _ => exit::INPUT,
        };
        Failure::new(error.to_string(), code)
    }
}

impl From<cryochain::flowsheet::FlowsheetError> for Failure {
    fn from(error: cryochain::flowsheet::FlowsheetError) -> Failure {
        Failure::new(error.to_string(), exit::INPUT)
    }
}

/// Runs `work`, turning a panic (a fault of cryochain, never of the input) into
/// an internal failure, exit code 6, with the panic's message, instead of Rust's
/// exit code 101. The default panic report is silenced while `work` runs.
pub fn guarded(work: impl FnOnce() -> Result<Output, Failure>) -> Result<Output, Failure> {
    let previous = std::panic::take_hook();
    std::panic::set_hook(Box::new(|_| {}));
    let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(work));
    std::panic::set_hook(previous);
    outcome.unwrap_or_else(|payload| {
        let what = payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "no message".to_string());
        Err(Failure::new(
            format!("internal fault of cryochain ({what}); please report it with the flowsheet and the command"),
            exit::INTERNAL,
        ))
    })
}

/// Runs the parsed command.
pub fn run(cli: Cli) -> Result<Output, Failure> {
    match cli.command {
        Command::Solve(args) => commands::solve(&args),
        Command::Check(args) => commands::check(&args),
        Command::Sweep(args) => commands::sweep(&args),
        Command::MergeShards(args) => commands::merge_shards(&args),
        Command::Optimize(args) => commands::optimize(&args),
        Command::Compare(args) => commands::compare(&args),
        Command::Fluids(args) => commands::fluids(&args),
        Command::State(args) => commands::state(&args),
        Command::Inversion(args) => commands::inversion(&args),
        Command::Throttle(args) => commands::throttle(&args),
        Command::Table(args) => commands::table(&args),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The mapping behind exit code 6 (end to end in tests/cli_contract.rs with an
    /// injected fault): an internal error and a panic both leave with it, distinct
    /// from every other code.
    #[test]
    fn internal_faults_exit_with_their_own_code() {
        let failure = Failure::from(Error::Internal("a tear stream was not computed".into()));
        assert_eq!(failure.code, exit::INTERNAL);
        let failure = guarded(|| panic!("index out of bounds")).unwrap_err();
        assert_eq!(failure.code, exit::INTERNAL);
        assert!(failure.message.contains("index out of bounds"));
        assert!(failure.message.contains("internal fault"));
        let codes = [
            exit::OK,
            exit::INPUT,
            exit::DESIGN,
            exit::NOT_CONVERGED,
            exit::IO,
            exit::USAGE,
            exit::INTERNAL,
        ];
        for (i, a) in codes.iter().enumerate() {
            assert!(codes[i + 1..].iter().all(|b| a != b));
        }
        // Work that returns is passed through untouched.
        assert_eq!(guarded(|| Ok(Output::default())).unwrap().stdout, "");
    }
}
