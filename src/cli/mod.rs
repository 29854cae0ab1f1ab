//! The command line: clap definitions, the output format shared by every command,
//! dispatch to one function per command (`commands.rs`), and the one place where
//! errors become messages and exit codes. Nothing here prints: each command returns
//! what goes to stdout and the notes for stderr, and `main` writes them.

mod commands;
mod format;

use clap::{Parser, Subcommand};
use cryochain::error::Error;
pub use format::{Format, FormatArgs};
use std::path::PathBuf;

/// Exit codes, documented in docs/cli.md.
pub mod exit {
    /// Success.
    pub const OK: i32 = 0;
    /// Bad input: arguments, files, units, names, states outside a range.
    pub const INPUT: i32 = 1;
    /// `check` found errors in the design.
    pub const DESIGN: i32 = 2;
    /// A solver did not converge.
    pub const NOT_CONVERGED: i32 = 3;
    /// A file could not be read or written.
    pub const IO: i32 = 4;
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
    Solve {
        /// The flowsheet file (YAML); see docs/flowsheet-format.md.
        file: Option<PathBuf>,
        #[command(flatten)]
        format: FormatArgs,
        /// Override a parameter for a quick what-if: id.key=value (repeatable).
        #[arg(long = "set", value_name = "ID.KEY=VALUE")]
        set: Vec<String>,
        /// Print the largest tear residual of every pass on stderr.
        #[arg(long)]
        log: bool,
        /// Write the plots (T–s, T–p with the valves, exchanger curves, exergy) as SVG
        /// and PNG into this folder.
        #[arg(long, value_name = "DIR")]
        plot: Option<PathBuf>,
        /// Write streams.csv and equipment.csv into this folder.
        #[arg(long, value_name = "DIR")]
        csv: Option<PathBuf>,
    },
    /// Solve a flowsheet and hold it against the design checks (docs/checks.md);
    /// exits with code 2 when the design has errors.
    Check {
        /// The flowsheet file (with no file: the built-in demo).
        file: Option<PathBuf>,
        #[command(flatten)]
        format: FormatArgs,
        /// Override a parameter: id.key=value (repeatable).
        #[arg(long = "set", value_name = "ID.KEY=VALUE")]
        set: Vec<String>,
    },
    /// Sweep one to three parameters over a grid; every case is solved (in parallel)
    /// and a failed case is recorded with its reason.
    Sweep {
        /// The flowsheet file.
        file: PathBuf,
        /// id.key=START..END:STEPS[:log], both ends with their unit (repeatable, 1–3).
        #[arg(long = "vary", required = true)]
        vary: Vec<String>,
        /// Fixed overrides applied to every case.
        #[arg(long = "set")]
        set: Vec<String>,
        /// Run only shard K of N (K/N): every N-th row of the grid from row K.
        #[arg(long)]
        shard: Option<String>,
        /// Write the cases as CSV here.
        #[arg(long)]
        csv: Option<PathBuf>,
        /// Write a plot (line or heat map) here (.svg or .png).
        #[arg(long)]
        plot: Option<PathBuf>,
        #[command(flatten)]
        format: FormatArgs,
    },
    /// Merge shard CSV files of one sweep into the file the unsharded sweep writes
    /// (CSV only).
    MergeShards {
        /// The shard files.
        files: Vec<PathBuf>,
        /// Write here instead of stdout.
        #[arg(long, short)]
        output: Option<PathBuf>,
    },
    /// Optimise a figure over bounded parameters (argmin: Brent for one, Nelder–Mead
    /// for several).
    Optimize {
        /// The flowsheet file.
        file: PathBuf,
        /// id.key=LO..HI with units (repeatable).
        #[arg(long = "vary", required = true)]
        vary: Vec<String>,
        /// liquid_yield or figure_of_merit.
        #[arg(long)]
        maximize: Option<String>,
        /// specific_energy.
        #[arg(long)]
        minimize: Option<String>,
        /// Keep the smallest exchanger approach at least this (for example 1K).
        #[arg(long = "min-approach")]
        min_approach: Option<String>,
        /// Fixed overrides.
        #[arg(long = "set")]
        set: Vec<String>,
        /// Solver iteration cap.
        #[arg(long, default_value_t = 100)]
        iterations: u64,
        #[command(flatten)]
        format: FormatArgs,
    },
    /// Headline figures of several flowsheets side by side.
    Compare {
        /// The flowsheet files.
        files: Vec<PathBuf>,
        /// Write a bar chart here (.svg or .png).
        #[arg(long)]
        plot: Option<PathBuf>,
        #[command(flatten)]
        format: FormatArgs,
    },
    /// List the built-in fluids with their sources, critical and triple points and ranges.
    Fluids {
        #[command(flatten)]
        format: FormatArgs,
    },
    /// Compute one state from two specifications, such as T=80K p=20bar.
    State {
        /// Fluid name (see `cryochain fluids`).
        fluid: String,
        /// First specification: T=…, p=…, h=…, s=…, x=… or rho=…, with units.
        first: String,
        /// Second specification.
        second: String,
        #[command(flatten)]
        format: FormatArgs,
    },
    /// The Joule-Thomson inversion curve of a fluid: maximum inversion temperature,
    /// Boyle temperature, pressure maximum, and the curve.
    Inversion {
        /// Fluid name.
        fluid: String,
        #[command(flatten)]
        format: FormatArgs,
        /// Also write a T–p diagram to this file (.svg or .png).
        #[arg(long)]
        plot: Option<PathBuf>,
        /// Rows of the curve shown in the table.
        #[arg(long, default_value_t = 24)]
        rows: usize,
    },
    /// Throttle a state isenthalpically to a lower pressure.
    Throttle {
        /// Fluid name.
        fluid: String,
        /// First inlet specification, such as T=80K.
        first: String,
        /// Second inlet specification, such as p=200bar.
        second: String,
        /// Outlet pressure, with its unit (for example 1bar).
        #[arg(long = "to")]
        to: String,
        #[command(flatten)]
        format: FormatArgs,
    },
    /// Property table in batch: a CSV of input pairs in, a CSV of properties out
    /// (CSV only).
    Table {
        /// Input CSV (see docs/batch-tables.md).
        input: PathBuf,
        /// Fluid for rows without a `fluid` column.
        #[arg(long)]
        fluid: Option<String>,
        /// Write the output here instead of stdout.
        #[arg(long, short)]
        output: Option<PathBuf>,
    },
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

/// Runs the parsed command.
pub fn run(cli: Cli) -> Result<Output, Failure> {
    use commands as c;
    match cli.command {
        Command::Solve {
            file,
            format,
            set,
            log,
            plot,
            csv,
        } => c::solve(
            file.as_deref(),
            &set,
            log,
            plot.as_deref(),
            csv.as_deref(),
            format,
        ),
        Command::Check { file, format, set } => c::check(file.as_deref(), &set, format),
        Command::Sweep {
            file,
            vary,
            set,
            shard,
            csv,
            plot,
            format,
        } => c::sweep(&c::SweepArgs {
            file: &file,
            vary: &vary,
            set: &set,
            shard: shard.as_deref(),
            csv: csv.as_deref(),
            plot: plot.as_deref(),
            format,
        }),
        Command::MergeShards { files, output } => c::merge_shards(&files, output.as_deref()),
        Command::Optimize {
            file,
            vary,
            maximize,
            minimize,
            min_approach,
            set,
            iterations,
            format,
        } => c::optimize(&c::OptimizeArgs {
            file: &file,
            vary: &vary,
            maximize: maximize.as_deref(),
            minimize: minimize.as_deref(),
            min_approach: min_approach.as_deref(),
            set: &set,
            iterations,
            format,
        }),
        Command::Compare {
            files,
            plot,
            format,
        } => c::compare(&files, plot.as_deref(), format),
        Command::Fluids { format } => c::fluids(format),
        Command::State {
            fluid,
            first,
            second,
            format,
        } => c::state(&fluid, &first, &second, format),
        Command::Inversion {
            fluid,
            format,
            plot,
            rows,
        } => c::inversion(&fluid, plot.as_deref(), rows, format),
        Command::Throttle {
            fluid,
            first,
            second,
            to,
            format,
        } => c::throttle(&fluid, &first, &second, &to, format),
        Command::Table {
            input,
            fluid,
            output,
        } => c::table(&input, fluid.as_deref(), output.as_deref()),
    }
}
