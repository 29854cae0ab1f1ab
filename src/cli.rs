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
    },
    /// Merge shard CSV files of one sweep into the file the unsharded sweep writes.
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
    },
    /// Headline figures of several flowsheets side by side.
    Compare {
        /// The flowsheet files.
        files: Vec<PathBuf>,
        /// Write a bar chart here (.svg or .png).
        #[arg(long)]
        plot: Option<PathBuf>,
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

fn read_text(path: &std::path::Path) -> Result<String, Failure> {
    std::fs::read_to_string(path).map_err(|e| Failure {
        message: format!("cannot read {}: {e}", path.display()),
        code: exit::IO,
    })
}

fn parse_overrides(set: &[String]) -> Result<Vec<cryochain::flowsheet::Override>, Failure> {
    Ok(set
        .iter()
        .map(|s| cryochain::flowsheet::Override::parse(s))
        .collect::<Result<Vec<_>, _>>()?)
}

fn sweep_command(
    file: &std::path::Path,
    vary: &[String],
    set: &[String],
    shard: Option<&str>,
    csv: Option<&std::path::Path>,
    plot: Option<&std::path::Path>,
) -> Result<String, Failure> {
    let text = read_text(file)?;
    let name = file.display().to_string();
    let overrides = parse_overrides(set)?;
    let variables = vary
        .iter()
        .map(|v| cryochain::study::Variable::parse_range(v))
        .collect::<Result<Vec<_>, _>>()?;
    let shard = match shard {
        None => None,
        Some(text) => {
            let (k, n) = text
                .split_once('/')
                .and_then(|(k, n)| Some((k.trim().parse().ok()?, n.trim().parse().ok()?)))
                .ok_or_else(|| Failure {
                    message: format!("--shard {text}: write K/N, such as 2/8"),
                    code: exit::INPUT,
                })?;
            Some((k, n))
        }
    };
    let total: usize = variables.iter().map(|v| v.values.len()).product();
    // A progress bar on stderr for long runs (hidden when stderr is not a terminal).
    let bar = indicatif::ProgressBar::with_draw_target(
        Some(total as u64),
        indicatif::ProgressDrawTarget::stderr(),
    );
    bar.set_style(
        indicatif::ProgressStyle::with_template(
            "{bar:40} {pos}/{len} cases, {elapsed} elapsed, {eta} left",
        )
        .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
    );
    if total < 20 {
        bar.set_draw_target(indicatif::ProgressDrawTarget::hidden());
    }
    let progress = |done: usize, of: usize| {
        bar.set_length(of as u64);
        bar.set_position(done as u64);
    };
    let study = cryochain::study::sweep(&text, &name, &overrides, &variables, shard, &progress)?;
    bar.finish_and_clear();
    let csv_text = cryochain::study::to_csv(&study)?;
    if let Some(path) = csv {
        std::fs::write(path, &csv_text).map_err(|e| Failure {
            message: format!("cannot write {}: {e}", path.display()),
            code: exit::IO,
        })?;
        eprintln!("wrote {} cases to {}", study.cases.len(), path.display());
    }
    if let Some(path) = plot {
        report::plot::study::sweep(&study, path)?;
        eprintln!("wrote {}", path.display());
    }
    // A table of the cases, and the best one.
    let mut headers: Vec<(String, report::table::Align)> = study
        .variables
        .iter()
        .map(|v| {
            (
                format!("{} [{}]", v.name(), v.unit),
                report::table::Align::Right,
            )
        })
        .collect();
    headers.extend([
        ("yield".to_string(), report::table::Align::Right),
        ("kWh/kg".to_string(), report::table::Align::Right),
        ("status".to_string(), report::table::Align::Left),
    ]);
    let refs: Vec<(&str, report::table::Align)> =
        headers.iter().map(|(h, a)| (h.as_str(), *a)).collect();
    let mut table = report::TextTable::new(&refs);
    for case in &study.cases {
        let mut row: Vec<String> = case.coordinates.iter().map(|c| format!("{c:.4}")).collect();
        match &case.outcome {
            Ok(m) => row.extend([
                format!("{:.5}", m.liquid_yield),
                format!("{:.3}", m.specific_energy),
                if m.design_errors > 0 {
                    format!("ok, {} design errors", m.design_errors)
                } else {
                    "ok".into()
                },
            ]),
            Err(reason) => row.extend([
                String::new(),
                String::new(),
                format!("failed: {}", reason.chars().take(60).collect::<String>()),
            ]),
        }
        table.row(row);
    }
    let mut out = table.render();
    let failed = study.cases.iter().filter(|c| c.outcome.is_err()).count();
    if let Some(best) = study
        .cases
        .iter()
        .filter_map(|c| c.outcome.as_ref().ok().map(|m| (c, m)))
        .max_by(|a, b| a.1.liquid_yield.total_cmp(&b.1.liquid_yield))
    {
        out.push_str(&format!(
            "\nhighest yield {:.5} at {:?}; {} of {} cases failed\n",
            best.1.liquid_yield,
            best.0.coordinates,
            failed,
            study.cases.len()
        ));
    }
    Ok(out)
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
        Command::Sweep {
            file,
            vary,
            set,
            shard,
            csv,
            plot,
        } => sweep_command(
            &file,
            &vary,
            &set,
            shard.as_deref(),
            csv.as_deref(),
            plot.as_deref(),
        ),
        Command::MergeShards { files, output } => {
            let parts = files
                .iter()
                .map(|f| {
                    std::fs::read_to_string(f).map_err(|e| Failure {
                        message: format!("cannot read {}: {e}", f.display()),
                        code: exit::IO,
                    })
                })
                .collect::<Result<Vec<_>, _>>()?;
            let merged = cryochain::study::merge_csv(&parts)?;
            match output {
                Some(path) => {
                    std::fs::write(&path, merged).map_err(|e| Failure {
                        message: format!("cannot write {}: {e}", path.display()),
                        code: exit::IO,
                    })?;
                    Ok(String::new())
                }
                None => Ok(merged),
            }
        }
        Command::Optimize {
            file,
            vary,
            maximize,
            minimize,
            min_approach,
            set,
            iterations,
        } => {
            let text = read_text(&file)?;
            let name = file.display().to_string();
            let overrides = parse_overrides(&set)?;
            let variables = vary
                .iter()
                .map(|v| cryochain::study::optimize::Bounded::parse(v))
                .collect::<Result<Vec<_>, _>>()?;
            let objective = cryochain::study::optimize::Objective::parse(
                maximize.as_deref(),
                minimize.as_deref(),
            )?;
            let floor = min_approach
                .map(|t| {
                    cryochain::quantity::parse(
                        &t,
                        cryochain::quantity::Dimension::TemperatureDifference,
                    )
                    .map_err(Error::from)
                })
                .transpose()?;
            let best = cryochain::study::optimize::optimize(
                &text, &name, &overrides, &variables, objective, floor, iterations,
            )?;
            let mut out = format!("{} of {}\n", objective.name(), name);
            for (v, x) in variables.iter().zip(&best.values) {
                out.push_str(&format!("  {}.{} = {x:.6} {}\n", v.target, v.key, v.unit));
            }
            out.push_str(&format!(
                "  objective {:.6}; liquid yield {:.6}; specific energy {:.4} kWh/kg; smallest approach {:.3} K\n",
                best.objective, best.metrics.liquid_yield, best.metrics.specific_energy, best.metrics.min_approach
            ));
            out.push_str(&format!(
                "  {} solver iterations, {} flowsheet solves; constraint {}\n",
                best.iterations,
                best.solves,
                if best.constraint_met {
                    "met"
                } else {
                    "NOT met"
                }
            ));
            Ok(out)
        }
        Command::Compare { files, plot } => {
            let mut table = report::TextTable::new(&[
                ("flowsheet", report::table::Align::Left),
                ("yield", report::table::Align::Right),
                ("liquid [kg/h]", report::table::Align::Right),
                ("power [kW]", report::table::Align::Right),
                ("precool [kW]", report::table::Align::Right),
                ("kWh/kg", report::table::Align::Right),
                ("FOM", report::table::Align::Right),
            ]);
            let (mut names, mut yields, mut energies) = (Vec::new(), Vec::new(), Vec::new());
            for file in &files {
                let plant = cryochain::flowsheet::load(file, &[])?;
                let solution = cryochain::solve::solve(&plant, &Default::default())?;
                let s = &solution.summary;
                let name = file.file_stem().map_or_else(
                    || file.display().to_string(),
                    |n| n.to_string_lossy().into_owned(),
                );
                table.row(vec![
                    name.clone(),
                    s.liquid_yield.map_or("—".into(), |y| format!("{y:.4}")),
                    format!("{:.3}", s.liquid_flow * 3600.0),
                    format!("{:.2}", s.shaft_power / 1e3),
                    format!("{:.2}", s.precooling_work / 1e3),
                    s.specific_energy.map_or("—".into(), |e| format!("{e:.3}")),
                    s.figure_of_merit.map_or("—".into(), |f| format!("{f:.4}")),
                ]);
                names.push(name);
                yields.push(s.liquid_yield.unwrap_or(f64::NAN));
                energies.push(s.specific_energy.unwrap_or(f64::NAN));
            }
            if let Some(path) = plot {
                report::plot::study::compare(&names, &yields, &energies, &path)?;
                eprintln!("wrote {}", path.display());
            }
            Ok(table.render())
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
