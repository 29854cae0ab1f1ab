//! The command line: clap definitions, dispatch, and the one place where errors
//! become messages and exit codes. Results go to stdout; progress and diagnostics
//! to stderr.

use clap::{Parser, Subcommand};
use cryochain::error::Error;
use cryochain::fluids::{self, Spec};
use cryochain::report;
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
        /// Print the full result as JSON (schema in docs/output.md).
        #[arg(long)]
        json: bool,
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
        /// Print the findings as JSON.
        #[arg(long)]
        json: bool,
        /// Override a parameter: id.key=value (repeatable).
        #[arg(long = "set", value_name = "ID.KEY=VALUE")]
        set: Vec<String>,
    },
    /// List the built-in fluids with their sources, critical and triple points and ranges.
    Fluids {
        /// Print JSON instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// Compute one state from two specifications, such as T=80K p=20bar.
    State {
        /// Fluid name (see `cryochain fluids`).
        fluid: String,
        /// First specification: T=…, p=…, h=…, s=…, x=… or rho=…, with units.
        first: String,
        /// Second specification.
        second: String,
        /// Print JSON with SI keys instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// The Joule-Thomson inversion curve of a fluid: maximum inversion temperature,
    /// Boyle temperature, pressure maximum, and the curve.
    Inversion {
        /// Fluid name.
        fluid: String,
        /// Print JSON (with the whole curve) instead of a table.
        #[arg(long)]
        json: bool,
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
        /// Print JSON instead of text.
        #[arg(long)]
        json: bool,
    },
    /// Property table in batch: a CSV of input pairs in, a CSV of properties out.
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

/// A failure with its exit code.
pub struct Failure {
    /// Message for stderr.
    pub message: String,
    /// Process exit code.
    pub code: i32,
}

impl From<Error> for Failure {
    fn from(error: Error) -> Failure {
        let code = match error {
            Error::NoConvergence { .. } => exit::NOT_CONVERGED,
            _ => exit::INPUT,
        };
        Failure {
            message: error.to_string(),
            code,
        }
    }
}

impl From<cryochain::flowsheet::FlowsheetError> for Failure {
    fn from(error: cryochain::flowsheet::FlowsheetError) -> Failure {
        Failure {
            message: error.to_string(),
            code: exit::INPUT,
        }
    }
}

/// The built-in demo flowsheet.
const DEMO: &str = include_str!("../flowsheets/hydrogen-ln2-precooled.yaml");
/// Its name in messages.
const DEMO_NAME: &str = "built-in demo (flowsheets/hydrogen-ln2-precooled.yaml)";

/// Reads a flowsheet (or the built-in demo) with overrides.
fn load_plant(
    file: &Option<PathBuf>,
    set: &[String],
) -> Result<cryochain::flowsheet::Plant, Failure> {
    let overrides = set
        .iter()
        .map(|s| cryochain::flowsheet::Override::parse(s))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(match file {
        Some(path) => cryochain::flowsheet::load(path, &overrides)?,
        None => {
            eprintln!("no flowsheet given: solving the {DEMO_NAME}");
            cryochain::flowsheet::load_str(DEMO, DEMO_NAME, &overrides)?
        }
    })
}

/// Runs the parsed command; returns what to print on stdout.
pub fn run(cli: Cli) -> Result<String, Failure> {
    match cli.command {
        Command::Solve {
            file,
            json,
            set,
            log,
            plot,
            csv,
        } => {
            let plant = load_plant(&file, &set)?;
            let solution = cryochain::solve::solve(&plant, &Default::default())?;
            if let Some(dir) = plot {
                let files = report::plot::cycle::write_all(&plant, &solution, &dir)?;
                eprintln!("wrote {} plot files to {}", files.len(), dir.display());
            }
            if let Some(dir) = csv {
                let files = report::tables_csv::write_all(&solution, &dir)?;
                eprintln!("wrote {} CSV files to {}", files.len(), dir.display());
            }
            if log {
                for (i, r) in solution.residual_log.iter().enumerate() {
                    eprintln!("pass {:>4}  largest scaled tear residual {r:.3e}", i + 1);
                }
            }
            let findings = cryochain::rules::check(&plant, &solution);
            Ok(if json {
                report::solution::json(&solution, &findings)
            } else {
                format!(
                    "{}\n{}\n{}\n",
                    report::solution::text(&solution),
                    report::solution::findings_text(&findings),
                    report::solution::CAUTION
                )
            })
        }
        Command::Check { file, json, set } => {
            let plant = load_plant(&file, &set)?;
            let solution = cryochain::solve::solve(&plant, &Default::default())?;
            let findings = cryochain::rules::check(&plant, &solution);
            let text = if json {
                serde_json::to_string_pretty(&findings).unwrap_or_default() + "\n"
            } else {
                format!(
                    "{}\n{}\n",
                    report::solution::findings_text(&findings),
                    report::solution::CAUTION
                )
            };
            let errors = findings
                .iter()
                .filter(|f| f.severity == cryochain::rules::Severity::Error)
                .count();
            if errors > 0 {
                print!("{text}");
                return Err(Failure {
                    message: format!(
                        "the design has {errors} error{}",
                        if errors == 1 { "" } else { "s" }
                    ),
                    code: exit::DESIGN,
                });
            }
            Ok(text)
        }
        Command::Fluids { json } => {
            let all = fluids::all()?;
            Ok(if json {
                report::fluids::json(&all)
            } else {
                report::fluids::text(&all)
            })
        }
        Command::State {
            fluid,
            first,
            second,
            json,
        } => {
            let fluid = fluids::fluid(&fluid)?;
            let state = fluid.state_from(Spec::parse(&first)?, Spec::parse(&second)?)?;
            Ok(if json {
                report::state::json(&state)
            } else {
                report::state::text(&state)
            })
        }
        Command::Inversion {
            fluid,
            json,
            plot,
            rows,
        } => {
            let fluid = fluids::fluid(&fluid)?;
            let curve = fluid.inversion()?;
            if let Some(path) = plot {
                let diagram = fluid.tp_diagram(9)?;
                report::plot::tp_diagram::write(&diagram, &[], &path)?;
                eprintln!("wrote {}", path.display());
            }
            Ok(if json {
                report::inversion::json(curve)
            } else {
                report::inversion::text(fluid, curve, rows)
            })
        }
        Command::Throttle {
            fluid,
            first,
            second,
            to,
            json,
        } => {
            let fluid = fluids::fluid(&fluid)?;
            let inlet = fluid.state_from(Spec::parse(&first)?, Spec::parse(&second)?)?;
            let outlet_pressure =
                cryochain::quantity::parse(&to, cryochain::quantity::Dimension::Pressure)
                    .map_err(Error::from)?;
            let result = fluid.throttle(&inlet, outlet_pressure)?;
            Ok(if json {
                report::inversion::throttle_json(&result)
            } else {
                report::inversion::throttle_text(&result)
            })
        }
        Command::Table {
            input,
            fluid,
            output,
        } => {
            let name = input.display().to_string();
            let text = std::fs::read_to_string(&input).map_err(|e| Failure {
                message: format!("cannot read {name}: {e}"),
                code: exit::IO,
            })?;
            let outcome = cryochain::batch::run(&text, &name, fluid.as_deref())?;
            for (_, message) in &outcome.failures {
                eprintln!("{name}: {message}");
            }
            let result = match output {
                Some(path) => {
                    std::fs::write(&path, &outcome.csv).map_err(|e| Failure {
                        message: format!("cannot write {}: {e}", path.display()),
                        code: exit::IO,
                    })?;
                    eprintln!("wrote {} rows to {}", outcome.rows, path.display());
                    String::new()
                }
                None => outcome.csv,
            };
            if outcome.failures.is_empty() {
                Ok(result)
            } else {
                // Print what was computed, then fail with the count.
                print!("{result}");
                Err(Failure {
                    message: format!(
                        "{} of {} rows failed (their reasons are in the error column)",
                        outcome.failures.len(),
                        outcome.rows
                    ),
                    code: exit::INPUT,
                })
            }
        }
    }
}
