//! One function per command: each reads its inputs, calls the library and returns
//! what to print. None of them prints.

use super::{exit, Failure, Format, FormatArgs, Output};
use clap::Args;
use cryochain::error::Error;
use cryochain::flowsheet::{self, Override, Plant};
use cryochain::fluids::{self, Spec};
use cryochain::quantity::{self, Dimension};
use cryochain::report;
use cryochain::rules::{self, Severity};
use cryochain::study;
use std::path::{Path, PathBuf};

/// The built-in demo flowsheet.
const DEMO: &str = include_str!("../../flowsheets/hydrogen-ln2-precooled.yaml");
/// Its name in messages.
const DEMO_NAME: &str = "built-in demo (flowsheets/hydrogen-ln2-precooled.yaml)";

fn parse_overrides(set: &[String]) -> Result<Vec<Override>, Failure> {
    Ok(set
        .iter()
        .map(|s| Override::parse(s))
        .collect::<Result<Vec<_>, _>>()?)
}

/// Reads a flowsheet (or the built-in demo, saying so in `notes`) with overrides.
fn load_plant(
    file: Option<&Path>,
    set: &[String],
    notes: &mut Vec<String>,
) -> Result<Plant, Failure> {
    let overrides = parse_overrides(set)?;
    Ok(match file {
        Some(path) => flowsheet::load(path, &overrides)?,
        None => {
            notes.push(format!("no flowsheet given: solving the {DEMO_NAME}"));
            flowsheet::load_str(DEMO, DEMO_NAME, &overrides)?
        }
    })
}

/// The text of the flowsheet a command solved: the file, or the built-in demo.
fn flowsheet_text(file: Option<&Path>) -> Result<String, Failure> {
    match file {
        Some(path) => read_text(path),
        None => Ok(DEMO.to_string()),
    }
}

/// Where a report came from: today's date and the command line as typed.
fn provenance() -> report::html::Provenance {
    let words: Vec<String> = std::env::args().skip(1).collect();
    report::html::Provenance::now(format!("cryochain {}", words.join(" ")))
}

/// Writes an HTML report and notes it.
fn write_report(path: &Path, page: &str, notes: &mut Vec<String>) -> Result<(), Failure> {
    write_text(path, page)?;
    notes.push(format!("wrote the report {}", path.display()));
    Ok(())
}

/// A solved flowsheet with its findings, as a report shows it.
struct Solved<'a> {
    plant: &'a Plant,
    solution: &'a cryochain::solve::Solution,
    findings: &'a [rules::Finding],
}

/// Writes the HTML page of a solved flowsheet (`solve` and `check --report`).
fn solution_report(
    path: &Path,
    file: Option<&Path>,
    units: report::Units,
    solved: &Solved,
    notes: &mut Vec<String>,
) -> Result<(), Failure> {
    let text = flowsheet_text(file)?;
    let page = report::html::solution_page(
        solved.plant,
        solved.solution,
        solved.findings,
        &text,
        &provenance(),
        units,
    )?;
    write_report(path, &page, notes)
}

fn read_text(path: &Path) -> Result<String, Failure> {
    std::fs::read_to_string(path)
        .map_err(|e| Failure::new(format!("cannot read {}: {e}", path.display()), exit::IO))
}

fn write_text(path: &Path, text: &str) -> Result<(), Failure> {
    std::fs::write(path, text)
        .map_err(|e| Failure::new(format!("cannot write {}: {e}", path.display()), exit::IO))
}

/// The options of `solve`.
#[derive(Debug, Args)]
pub struct SolveArgs {
    /// The flowsheet file (YAML); see docs/flowsheet-format.md.
    pub file: Option<PathBuf>,
    #[command(flatten)]
    pub format: FormatArgs,
    /// Override a parameter for a quick what-if: id.key=value (repeatable).
    #[arg(long = "set", value_name = "ID.KEY=VALUE")]
    pub set: Vec<String>,
    /// Print the largest tear residual of every pass on stderr.
    #[arg(long)]
    pub log: bool,
    /// Write the plots (T–s, T–p with the valves, exchanger curves, exergy) as SVG
    /// and PNG into this folder.
    #[arg(long, value_name = "DIR")]
    pub plot: Option<PathBuf>,
    /// Write streams.csv and equipment.csv into this folder.
    #[arg(long, value_name = "DIR")]
    pub csv: Option<PathBuf>,
    /// Write one self-contained HTML page (findings, figures, plots, tables,
    /// input, cautions) to this file.
    #[arg(long, value_name = "FILE")]
    pub report: Option<PathBuf>,
    /// Units of the text and the report: si (K, bar, g/s, kW) or engineering (°C
    /// beside K, kg/h and t/d, kW, kWh/kg). JSON and CSV stay SI.
    #[arg(long, value_name = "si|engineering", default_value = "si")]
    pub units: String,
}

/// `solve`: results of a flowsheet, with plots and CSV tables on request.
pub fn solve(args: &SolveArgs) -> Result<Output, Failure> {
    let format = args.format.choose("solve", &[Format::Text, Format::Json])?;
    let units = report::Units::parse(&args.units)?;
    let mut notes = Vec::new();
    let plant = load_plant(args.file.as_deref(), &args.set, &mut notes)?;
    // The text shows no exchanger's largest duty or effectiveness (their search
    // costs a profile each); the JSON, the CSV tables, the plots' files and the
    // HTML report are given them.
    let options = cryochain::solve::Options {
        skip_largest_duty: format == Format::Text
            && args.plot.is_none()
            && args.csv.is_none()
            && args.report.is_none(),
        ..Default::default()
    };
    let solution = cryochain::solve::solve(&plant, &options)?;
    if let Some(dir) = &args.plot {
        let files = report::plot::cycle::write_all(&plant, &solution, dir)?;
        notes.push(format!(
            "wrote {} plot files to {}",
            files.len(),
            dir.display()
        ));
    }
    if let Some(dir) = &args.csv {
        let files = report::tables_csv::write_all(&solution, dir)?;
        notes.push(format!(
            "wrote {} CSV files to {}",
            files.len(),
            dir.display()
        ));
    }
    if args.log {
        for (i, r) in solution.residual_log.iter().enumerate() {
            notes.push(format!(
                "pass {:>4}  largest scaled tear residual {r:.3e}",
                i + 1
            ));
        }
    }
    let findings = rules::check(&plant, &solution);
    let errors = design_errors(&findings);
    if let Some(path) = &args.report {
        let solved = Solved {
            plant: &plant,
            solution: &solution,
            findings: &findings,
        };
        solution_report(path, args.file.as_deref(), units, &solved, &mut notes)?;
    }
    let stdout = match format {
        Format::Json => report::solution::json(&solution, &findings),
        // A design with errors says so first.
        _ if errors > 0 => format!(
            "{}\n{}\n{}\n",
            report::solution::findings_text(&findings),
            report::solution::text_in(&solution, units),
            &report::caution::caution(&solution.fluids)
        ),
        _ => format!(
            "{}\n{}\n{}\n",
            report::solution::text_in(&solution, units),
            report::solution::findings_text(&findings),
            &report::caution::caution(&solution.fluids)
        ),
    };
    design_verdict(errors, Output { stdout, notes })
}

/// How many findings are design errors.
fn design_errors(findings: &[rules::Finding]) -> usize {
    findings
        .iter()
        .filter(|f| f.severity == Severity::Error)
        .count()
}

/// The output as it is when the design has no errors; otherwise a failure with the
/// design-error code that still prints it.
fn design_verdict(errors: usize, output: Output) -> Result<Output, Failure> {
    if errors == 0 {
        return Ok(output);
    }
    Err(Failure {
        message: format!(
            "the design has {errors} error{}",
            if errors == 1 { "" } else { "s" }
        ),
        code: exit::DESIGN,
        partial: output,
    })
}

/// The options of `check`.
#[derive(Debug, Args)]
pub struct CheckArgs {
    /// The flowsheet file (with no file: the built-in demo).
    pub file: Option<PathBuf>,
    #[command(flatten)]
    pub format: FormatArgs,
    /// Override a parameter: id.key=value (repeatable).
    #[arg(long = "set", value_name = "ID.KEY=VALUE")]
    pub set: Vec<String>,
    /// Write one self-contained HTML page with the findings and the results.
    #[arg(long, value_name = "FILE")]
    pub report: Option<PathBuf>,
    /// Units of the report: si or engineering.
    #[arg(long, value_name = "si|engineering", default_value = "si")]
    pub units: String,
}

/// `check`: the design checks; a design with errors fails with the design code,
/// after its findings are printed.
pub fn check(args: &CheckArgs) -> Result<Output, Failure> {
    let format = args.format.choose("check", &[Format::Text, Format::Json])?;
    let mut notes = Vec::new();
    let plant = load_plant(args.file.as_deref(), &args.set, &mut notes)?;
    let solution = cryochain::solve::solve(&plant, &Default::default())?;
    let findings = rules::check(&plant, &solution);
    if let Some(path) = &args.report {
        let solved = Solved {
            plant: &plant,
            solution: &solution,
            findings: &findings,
        };
        let units = report::Units::parse(&args.units)?;
        solution_report(path, args.file.as_deref(), units, &solved, &mut notes)?;
    }
    let stdout = match format {
        Format::Json => serde_json::to_string_pretty(&findings).unwrap_or_default() + "\n",
        _ => format!(
            "{}\n{}\n",
            report::solution::findings_text(&findings),
            &report::caution::caution(&solution.fluids)
        ),
    };
    design_verdict(design_errors(&findings), Output { stdout, notes })
}

/// The options of `sweep`.
#[derive(Debug, Args)]
pub struct SweepArgs {
    /// The flowsheet file.
    pub file: PathBuf,
    /// id.key=START..END:STEPS[:log], both ends with their unit (repeatable, 1–3).
    #[arg(long = "vary", required = true)]
    pub vary: Vec<String>,
    /// Fixed overrides applied to every case.
    #[arg(long = "set")]
    pub set: Vec<String>,
    /// Run only shard K of N (K/N): every N-th row of the grid from row K.
    #[arg(long)]
    pub shard: Option<String>,
    /// Write the cases as CSV here.
    #[arg(long)]
    pub csv: Option<PathBuf>,
    /// Write a plot (line or heat map) here (.svg or .png).
    #[arg(long)]
    pub plot: Option<PathBuf>,
    /// Write one self-contained HTML page with the headline, the plot and every case.
    #[arg(long, value_name = "FILE")]
    pub report: Option<PathBuf>,
    #[command(flatten)]
    pub format: FormatArgs,
}

/// The same parameter given to two `--vary` options is an error (the last would
/// silently replace the first).
fn refuse_repeats(names: impl Iterator<Item = String>) -> Result<(), Failure> {
    let mut seen: Vec<String> = Vec::new();
    for name in names {
        if seen.contains(&name) {
            return Err(Failure::new(
                format!("--vary {name} is given twice; give each parameter once"),
                exit::INPUT,
            ));
        }
        seen.push(name);
    }
    Ok(())
}

fn parse_shard(text: &str) -> Result<(usize, usize), Failure> {
    text.split_once('/')
        .and_then(|(k, n)| Some((k.trim().parse().ok()?, n.trim().parse().ok()?)))
        .ok_or_else(|| {
            Failure::new(
                format!("--shard {text}: write K/N, such as 2/8"),
                exit::INPUT,
            )
        })
}

/// A progress bar on stderr for long runs (hidden for short ones and when stderr
/// is not a terminal).
fn progress_bar(total: usize) -> indicatif::ProgressBar {
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
    bar
}

/// `sweep`: every case of a grid, solved in parallel.
pub fn sweep(args: &SweepArgs) -> Result<Output, Failure> {
    let format = args.format.choose("sweep", &[Format::Text, Format::Csv])?;
    let text = read_text(&args.file)?;
    let name = args.file.display().to_string();
    let overrides = parse_overrides(&args.set)?;
    let variables = args
        .vary
        .iter()
        .map(|v| study::Variable::parse_range(v))
        .collect::<Result<Vec<_>, _>>()?;
    refuse_repeats(variables.iter().map(|v| v.name()))?;
    let shard = args.shard.as_deref().map(parse_shard).transpose()?;
    let total: usize = variables.iter().map(|v| v.values.len()).product();
    let bar = progress_bar(total);
    let progress = |done: usize, of: usize| {
        bar.set_length(of as u64);
        bar.set_position(done as u64);
    };
    let result = study::sweep(&text, &name, &overrides, &variables, shard, &progress)?;
    bar.finish_and_clear();
    let mut notes = Vec::new();
    let csv_text = study::to_csv(&result)?;
    if let Some(path) = &args.csv {
        write_text(path, &csv_text)?;
        notes.push(format!(
            "wrote {} cases to {}",
            result.cases.len(),
            path.display()
        ));
    }
    if let Some(path) = &args.plot {
        report::plot::study::sweep(&result, path)?;
        notes.push(format!("wrote {}", path.display()));
    }
    if let Some(path) = &args.report {
        let mut chart = String::new();
        report::plot::study::sweep_on(&result, report::plot::Canvas::Svg(&mut chart))?;
        let plant = flowsheet::load_str(&text, &name, &overrides)?;
        let fluids = cryochain::solve::results::fluids_used(&plant);
        let page = report::html::sweep_page(&result, &name, &chart, &fluids, &provenance());
        write_report(path, &page, &mut notes)?;
    }
    let stdout = match format {
        Format::Csv => csv_text,
        _ => report::study::sweep_text(&result),
    };
    Ok(Output { stdout, notes })
}

/// The options of `merge-shards`.
#[derive(Debug, Args)]
pub struct MergeShardsArgs {
    /// The shard files.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
    /// Write here instead of stdout.
    #[arg(long, short)]
    pub output: Option<PathBuf>,
}

/// `merge-shards`: shard CSV files into the file the whole sweep writes.
pub fn merge_shards(args: &MergeShardsArgs) -> Result<Output, Failure> {
    let parts = args
        .files
        .iter()
        .map(|f| read_text(f))
        .collect::<Result<Vec<_>, _>>()?;
    let merged = study::merge_csv(&parts)?;
    match &args.output {
        Some(path) => {
            write_text(path, &merged)?;
            Ok(Output::default())
        }
        None => Ok(Output::of(merged)),
    }
}

/// The options of `optimize`.
#[derive(Debug, Args)]
pub struct OptimizeArgs {
    /// The flowsheet file.
    pub file: PathBuf,
    /// id.key=LO..HI with units (repeatable).
    #[arg(long = "vary", required = true)]
    pub vary: Vec<String>,
    /// liquid_yield or figure_of_merit.
    #[arg(long)]
    pub maximize: Option<String>,
    /// specific_energy.
    #[arg(long)]
    pub minimize: Option<String>,
    /// Keep the smallest exchanger approach at least this (for example 1K).
    #[arg(long = "min-approach")]
    pub min_approach: Option<String>,
    /// Fixed overrides.
    #[arg(long = "set")]
    pub set: Vec<String>,
    /// Solver iteration cap.
    #[arg(long, default_value_t = 100)]
    pub iterations: u64,
    #[command(flatten)]
    pub format: FormatArgs,
}

/// `optimize`: the best values of bounded parameters for one figure.
pub fn optimize(args: &OptimizeArgs) -> Result<Output, Failure> {
    use study::optimize::{Bounded, Objective};
    let format = args
        .format
        .choose("optimize", &[Format::Text, Format::Json])?;
    let text = read_text(&args.file)?;
    let name = args.file.display().to_string();
    let overrides = parse_overrides(&args.set)?;
    let variables = args
        .vary
        .iter()
        .map(|v| Bounded::parse(v))
        .collect::<Result<Vec<_>, _>>()?;
    refuse_repeats(variables.iter().map(|v| format!("{}.{}", v.target, v.key)))?;
    let objective = Objective::parse(args.maximize.as_deref(), args.minimize.as_deref())?;
    let floor = args
        .min_approach
        .as_deref()
        .map(|t| quantity::parse(t, Dimension::TemperatureDifference).map_err(Error::from))
        .transpose()?;
    let best = study::optimize::optimize(
        &text,
        &name,
        &overrides,
        &variables,
        objective,
        floor,
        args.iterations,
    )?;
    Ok(Output::of(match format {
        Format::Json => report::study::optimum_json(objective, &name, &variables, &best),
        _ => report::study::optimum_text(objective, &name, &variables, &best),
    }))
}

/// The options of `compare`.
#[derive(Debug, Args)]
pub struct CompareArgs {
    /// The flowsheet files.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
    /// Write a bar chart here (.svg or .png).
    #[arg(long)]
    pub plot: Option<PathBuf>,
    /// Write one self-contained HTML page with the flowsheets side by side.
    #[arg(long, value_name = "FILE")]
    pub report: Option<PathBuf>,
    #[command(flatten)]
    pub format: FormatArgs,
}

/// `compare`: headline figures of several flowsheets side by side.
pub fn compare(args: &CompareArgs) -> Result<Output, Failure> {
    let format = args
        .format
        .choose("compare", &[Format::Text, Format::Json, Format::Csv])?;
    let cases = study::compare::compare(&args.files)?;
    let mut notes = Vec::new();
    let names: Vec<String> = cases.iter().map(|c| c.name.clone()).collect();
    let figure = |f: fn(&cryochain::solve::Summary) -> Option<f64>| -> Vec<f64> {
        cases
            .iter()
            .map(|c| c.outcome.as_ref().ok().and_then(f).unwrap_or(f64::NAN))
            .collect()
    };
    let yields = figure(|s| s.liquid_yield);
    let energies = figure(|s| s.specific_energy);
    if let Some(path) = &args.plot {
        report::plot::study::compare(&names, &yields, &energies, path)?;
        notes.push(format!("wrote {}", path.display()));
    }
    if let Some(path) = &args.report {
        let mut chart = String::new();
        report::plot::study::compare_on(
            &names,
            &yields,
            &energies,
            report::plot::Canvas::Svg(&mut chart),
        )?;
        let mut fluids: Vec<String> = Vec::new();
        for name in cases.iter().flat_map(|c| &c.fluids) {
            if !fluids.contains(name) {
                fluids.push(name.clone());
            }
        }
        let page = report::html::comparison_page(&cases, &chart, &fluids, &provenance());
        write_report(path, &page, &mut notes)?;
    }
    let stdout = match format {
        Format::Json => report::study::comparison_json(&cases),
        Format::Csv => report::study::comparison_csv(&cases)?,
        Format::Text => report::study::comparison_text(&cases),
    };
    let output = Output { stdout, notes };
    // The table is printed whole; a flowsheet that failed then fails the command
    // with its own error's code.
    match cases
        .into_iter()
        .find_map(|c| c.outcome.err().map(|e| (c.name, e)))
    {
        None => Ok(output),
        Some((name, error)) => {
            let mut failure = Failure::from(error);
            failure.message = format!("{name}: {}", failure.message);
            failure.partial = output;
            Err(failure)
        }
    }
}

/// The options of `fluids`.
#[derive(Debug, Args)]
pub struct FluidsArgs {
    #[command(flatten)]
    pub format: FormatArgs,
}

/// `fluids`: the built-in fluids.
pub fn fluids(args: &FluidsArgs) -> Result<Output, Failure> {
    let format = args
        .format
        .choose("fluids", &[Format::Text, Format::Json])?;
    let all = fluids::all()?;
    Ok(Output::of(match format {
        Format::Json => report::fluids::json(&all),
        _ => report::fluids::text(&all),
    }))
}

/// The options of `state`.
#[derive(Debug, Args)]
pub struct StateArgs {
    /// Fluid name (see `cryochain fluids`).
    pub fluid: String,
    /// First specification: T=…, p=…, h=…, s=…, x=… or rho=…, with units.
    pub first: String,
    /// Second specification.
    pub second: String,
    /// For hydrogen: para=equilibrium or para=<fraction>, the ortho–para solution
    /// instead of frozen normal hydrogen.
    pub para: Option<String>,
    #[command(flatten)]
    pub format: FormatArgs,
}

/// `state`: one state from two specifications.
pub fn state(args: &StateArgs) -> Result<Output, Failure> {
    let format = args.format.choose("state", &[Format::Text, Format::Json])?;
    let fluid = fluids::fluid(&args.fluid)?;
    let (first, second) = (Spec::parse(&args.first)?, Spec::parse(&args.second)?);
    let state = match &args.para {
        None => fluid.state_from(first, second)?,
        Some(_) if fluid.name != "hydrogen" => {
            return Err(cryochain::error::Error::Input(format!(
                "para= applies to hydrogen only, not to {}",
                fluid.name
            ))
            .into())
        }
        Some(text) => fluids::blend::Blend::get()?.state_from(
            first,
            second,
            fluids::blend::ParaChoice::parse(text)?,
        )?,
    };
    Ok(Output::of(match format {
        Format::Json => report::state::json(&state),
        _ => report::state::text(&state),
    }))
}

/// The options of `inversion`.
#[derive(Debug, Args)]
pub struct InversionArgs {
    /// Fluid name.
    pub fluid: String,
    #[command(flatten)]
    pub format: FormatArgs,
    /// Also write a T–p diagram to this file (.svg or .png).
    #[arg(long)]
    pub plot: Option<PathBuf>,
    /// Rows of the curve shown in the table.
    #[arg(long, default_value_t = 24)]
    pub rows: usize,
}

/// `inversion`: a fluid's inversion curve, with its T–p diagram on request.
pub fn inversion(args: &InversionArgs) -> Result<Output, Failure> {
    let format = args
        .format
        .choose("inversion", &[Format::Text, Format::Json])?;
    let fluid = fluids::fluid(&args.fluid)?;
    let curve = fluid.inversion()?;
    let mut notes = Vec::new();
    if let Some(path) = &args.plot {
        let diagram = fluid.tp_diagram(9)?;
        report::plot::tp_diagram::write(&diagram, &[], path)?;
        notes.push(format!("wrote {}", path.display()));
    }
    let stdout = match format {
        Format::Json => report::inversion::json(curve),
        _ => report::inversion::text(fluid, curve, args.rows),
    };
    Ok(Output { stdout, notes })
}

/// The options of `throttle`.
#[derive(Debug, Args)]
pub struct ThrottleArgs {
    /// Fluid name.
    pub fluid: String,
    /// First inlet specification, such as T=80K.
    pub first: String,
    /// Second inlet specification, such as p=200bar.
    pub second: String,
    /// Outlet pressure, with its unit (for example 1bar).
    #[arg(long = "to")]
    pub to: String,
    #[command(flatten)]
    pub format: FormatArgs,
}

/// `throttle`: one isenthalpic expansion.
pub fn throttle(args: &ThrottleArgs) -> Result<Output, Failure> {
    let format = args
        .format
        .choose("throttle", &[Format::Text, Format::Json])?;
    let fluid = fluids::fluid(&args.fluid)?;
    let inlet = fluid.state_from(Spec::parse(&args.first)?, Spec::parse(&args.second)?)?;
    let outlet_pressure = quantity::parse(&args.to, Dimension::Pressure).map_err(Error::from)?;
    let result = fluid.throttle(&inlet, outlet_pressure)?;
    Ok(Output::of(match format {
        Format::Json => report::inversion::throttle_json(&result),
        _ => report::inversion::throttle_text(&result),
    }))
}

/// The options of `table`.
#[derive(Debug, Args)]
pub struct TableArgs {
    /// Input CSV (see docs/batch-tables.md).
    pub input: PathBuf,
    /// Fluid for rows without a `fluid` column.
    #[arg(long)]
    pub fluid: Option<String>,
    /// Write the output here instead of stdout.
    #[arg(long, short)]
    pub output: Option<PathBuf>,
}

/// `table`: property tables in batch; failed rows keep their place with their
/// error, and the command then fails with their count.
pub fn table(args: &TableArgs) -> Result<Output, Failure> {
    let name = args.input.display().to_string();
    let text = read_text(&args.input)?;
    let outcome = cryochain::batch::run(&text, &name, args.fluid.as_deref())?;
    let mut notes: Vec<String> = outcome
        .failures
        .iter()
        .map(|(_, message)| format!("{name}: {message}"))
        .collect();
    let stdout = match &args.output {
        Some(path) => {
            write_text(path, &outcome.csv)?;
            notes.push(format!("wrote {} rows to {}", outcome.rows, path.display()));
            String::new()
        }
        None => outcome.csv,
    };
    let result = Output { stdout, notes };
    if outcome.failures.is_empty() {
        return Ok(result);
    }
    Err(Failure {
        message: format!(
            "{} of {} rows failed (their reasons are in the error column)",
            outcome.failures.len(),
            outcome.rows
        ),
        code: exit::INPUT,
        partial: result,
    })
}
