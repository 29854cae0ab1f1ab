//! Studies: sweeps over one to three parameters, optimisation, and side-by-side
//! comparison. Cases run in parallel (rayon); results do not depend on the number of
//! threads or their order, because each row of the grid (the cases along the last
//! variable) is solved in sequence with warm starts from its previous case, and rows
//! are independent. Shards split the rows, so merged shards equal the whole study.

pub mod compare;
pub mod optimize;

use crate::error::{Error, Result};
use crate::flowsheet::{load_str, Override};
use crate::quantity;
use crate::rules;
use crate::solve::{solve, Options, Solution, WarmStart};
use rayon::prelude::*;

const NO_STEPS: &str = "give the number of steps after ':' (2 to 100000), as in p=50bar..250bar:21";
const RANGE_FORM: &str =
    "write id.key=START..END, such as compressor.outlet_pressure=50bar..250bar";

/// One varied parameter and its values, in the unit the user wrote.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    /// Equipment id (or `settings` / `flowsheet`).
    pub target: String,
    /// Key.
    pub key: String,
    /// The values, as numbers in `unit`.
    pub values: Vec<f64>,
    /// The unit written by the user (may be empty for plain numbers).
    pub unit: String,
}

impl Variable {
    /// `id.key` for headers.
    pub fn name(&self) -> String {
        format!("{}.{}", self.target, self.key)
    }

    /// The override that sets this variable to `value`.
    pub fn override_for(&self, value: f64) -> Override {
        Override {
            target: self.target.clone(),
            key: self.key.clone(),
            value: format!("{value} {}", self.unit).trim().to_string(),
        }
    }

    /// Reads `id.key=START..END:STEPS` (optionally `:log`), both ends with the same
    /// unit, for example `compressor.outlet_pressure=50bar..250bar:21`.
    pub fn parse_range(text: &str) -> Result<Variable> {
        let (lo, hi, rest) = split_range(text)?;
        let mut parts = rest.split(':');
        let steps: usize = parts
            .next()
            .and_then(|s| s.trim().parse().ok())
            .filter(|n: &usize| (2..=100_000).contains(n))
            .ok_or_else(|| Error::Input(format!("'{text}': {NO_STEPS}")))?;
        let log = match parts.next().map(str::trim) {
            None | Some("linear") => false,
            Some("log") => true,
            Some(other) => {
                return Err(Error::Input(format!(
                    "'{text}': spacing '{other}' is not known; use linear or log"
                )))
            }
        };
        let (target, key, (a, unit_a), (b, _)) = (lo.0, lo.1, lo.2, hi);
        if log && (a <= 0.0 || b <= 0.0) {
            return Err(Error::Input(format!(
                "'{text}': log spacing needs positive ends"
            )));
        }
        let values = (0..steps)
            .map(|i| {
                let f = i as f64 / (steps - 1) as f64;
                // The ends are exactly the ends given (exp(ln a) need not be a).
                if i == 0 {
                    a
                } else if i == steps - 1 {
                    b
                } else if log {
                    (a.ln() + f * (b.ln() - a.ln())).exp()
                } else {
                    a + f * (b - a)
                }
            })
            .collect();
        Ok(Variable {
            target,
            key,
            values,
            unit: unit_a,
        })
    }
}

type End = (f64, String);

/// Splits `id.key=START..END<rest>` into (target, key, start), end and the rest.
pub(crate) fn split_range(text: &str) -> Result<((String, String, End), End, String)> {
    let bad = |why: &str| Error::Input(format!("'{text}': {why}; {RANGE_FORM}"));
    let (path, range) = text.split_once('=').ok_or_else(|| bad("no '='"))?;
    let (target, key) = path
        .trim()
        .split_once('.')
        .ok_or_else(|| bad("the parameter must be id.key"))?;
    let (start, tail) = range
        .split_once("..")
        .ok_or_else(|| bad("no '..' between the ends"))?;
    let (end, rest) = match tail.split_once(':') {
        Some((e, r)) => (e, r.to_string()),
        None => (tail, String::new()),
    };
    let number = |s: &str| -> Result<End> {
        let s = s.trim();
        let split = s
            .find(|c: char| !(c.is_ascii_digit() || matches!(c, '.' | '-' | '+' | 'e' | 'E')))
            .unwrap_or(s.len());
        // Keep an exponent only when digits follow it.
        let (n, u) = s.split_at(split);
        let value: f64 = n
            .parse()
            .map_err(|_| bad(&format!("'{s}' does not start with a number")))?;
        Ok((value, u.trim().to_string()))
    };
    let a = number(start)?;
    let b = number(end)?;
    if a.1 != b.1 {
        return Err(bad("write both ends in the same unit"));
    }
    if !a.1.is_empty() {
        // The unit must be a known one (of some dimension).
        let known = [
            quantity::Dimension::Pressure,
            quantity::Dimension::Temperature,
            quantity::Dimension::TemperatureDifference,
            quantity::Dimension::MassFlow,
            quantity::Dimension::Power,
            quantity::Dimension::SpecificEnergy,
            quantity::Dimension::Fraction,
            quantity::Dimension::Conductance,
        ]
        .iter()
        .any(|d| quantity::parse(&format!("1 {}", a.1), *d).is_ok());
        if !known {
            return Err(bad(&format!("'{}' is not a unit cryochain knows", a.1)));
        }
    }
    Ok((
        (target.trim().to_string(), key.trim().to_string(), a),
        b,
        rest,
    ))
}

/// The headline figures of one solved case.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Metrics {
    /// Liquid per mass compressed.
    pub liquid_yield: f64,
    /// kg/s.
    pub liquid_flow: f64,
    /// kWh per kg of liquid, with precooling (NaN without liquid).
    pub specific_energy: f64,
    /// Figure of merit (NaN without liquid).
    pub figure_of_merit: f64,
    /// W.
    pub shaft_power: f64,
    /// The smallest exchanger approach anywhere, K (infinite without exchangers).
    pub min_approach: f64,
    /// Design errors found.
    pub design_errors: usize,
    /// Recycle passes.
    pub iterations: usize,
}

impl Metrics {
    /// Whether the case can be built: no design check of error severity fails.
    /// Studies never rank an infeasible case best.
    pub fn feasible(&self) -> bool {
        self.design_errors == 0
    }

    /// The figures of a solution.
    pub fn of(plant: &crate::flowsheet::Plant, solution: &Solution) -> Metrics {
        let s = &solution.summary;
        let min_approach = solution
            .units
            .iter()
            .filter_map(|u| match &u.performance.details {
                crate::equipment::Details::Exchanger(x)
                    if u.performance.duty.unwrap_or(0.0) > 0.0 =>
                {
                    Some(x.min_approach)
                }
                _ => None,
            })
            .fold(f64::INFINITY, f64::min);
        Metrics {
            liquid_yield: s.liquid_yield.unwrap_or(0.0),
            liquid_flow: s.liquid_flow,
            specific_energy: s.specific_energy.unwrap_or(f64::NAN),
            figure_of_merit: s.figure_of_merit.unwrap_or(f64::NAN),
            shaft_power: s.shaft_power,
            min_approach,
            design_errors: rules::design_errors(plant, solution),
            iterations: solution.iterations,
        }
    }
}

/// One case of a sweep.
#[derive(Debug, Clone, PartialEq)]
pub struct CaseResult {
    /// Position in the whole grid (0-based, last variable fastest).
    pub index: usize,
    /// The varied values, in the users' units.
    pub coordinates: Vec<f64>,
    /// The figures, or why the case failed.
    pub outcome: std::result::Result<Metrics, String>,
}

/// A whole sweep (or one shard of it).
#[derive(Debug, Clone)]
pub struct Sweep {
    /// The varied parameters.
    pub variables: Vec<Variable>,
    /// Cases in grid order.
    pub cases: Vec<CaseResult>,
}

/// Runs of cases a sweep is cut into at least, so that a grid of few rows still
/// keeps every core busy (a fixed number, so that results never depend on the
/// machine).
const PARALLEL_RUNS: usize = 8;

/// Runs a sweep of the flowsheet `text` over `variables` (one to three), with fixed
/// `overrides` first. `shard` = (k, n), 1-based, runs every n-th row of the grid
/// starting at row k. `progress` is called with (cases done, cases total).
pub fn sweep(
    text: &str,
    file: &str,
    overrides: &[Override],
    variables: &[Variable],
    shard: Option<(usize, usize)>,
    progress: &(dyn Fn(usize, usize) + Sync),
) -> Result<Sweep> {
    if variables.is_empty() || variables.len() > 3 {
        return Err(Error::Input(
            "a sweep varies one to three parameters".into(),
        ));
    }
    // Check the flowsheet and the varied keys once, at their first values.
    let mut first = overrides.to_vec();
    first.extend(variables.iter().map(|v| v.override_for(v.values[0])));
    load_str(text, file, &first).map_err(|e| Error::Input(e.to_string()))?;
    let row_length = variables.last().map_or(1, |v| v.values.len());
    let total: usize = variables.iter().map(|v| v.values.len()).product();
    let rows = total / row_length;
    let (k, n) = shard.unwrap_or((1, 1));
    if !(n >= 1 && (1..=n).contains(&k)) {
        return Err(Error::Input(format!(
            "shard {k}/{n}: write K/N with 1 ≤ K ≤ N"
        )));
    }
    let my_rows: Vec<usize> = (0..rows).filter(|r| r % n == k - 1).collect();
    let done = std::sync::atomic::AtomicUsize::new(0);
    let my_total = my_rows.len() * row_length;
    // The unit of work is a run of cases along a row, each case warm-started from
    // the one before. A grid of few rows (a one-parameter sweep has one) is cut
    // into runs so that every core has work; the cut depends on the grid's shape
    // alone, so the results do not depend on the number of threads.
    let run_length = if rows >= PARALLEL_RUNS {
        row_length
    } else {
        row_length.div_ceil(PARALLEL_RUNS.div_ceil(rows)).max(1)
    };
    let runs: Vec<(usize, usize)> = my_rows
        .iter()
        .flat_map(|&row| {
            (0..row_length)
                .step_by(run_length)
                .map(move |start| (row, start))
        })
        .collect();
    let results: Vec<Vec<CaseResult>> = runs
        .par_iter()
        .map(|&(row, start)| {
            let mut warm: Option<WarmStart> = None;
            (start..(start + run_length).min(row_length))
                .map(|j| {
                    let index = row * row_length + j;
                    let coordinates = coordinates_of(variables, index);
                    let mut set = overrides.to_vec();
                    set.extend(
                        variables
                            .iter()
                            .zip(&coordinates)
                            .map(|(v, c)| v.override_for(*c)),
                    );
                    let outcome = load_str(text, file, &set)
                        .map_err(|e| e.to_string())
                        .and_then(|plant| {
                            // The first case of a run estimates the recycle's
                            // Jacobian for the cases after it.
                            let options = Options {
                                warm_start: warm.clone(),
                                estimate_jacobian: warm.is_none(),
                                ..Options::default()
                            };
                            let solved = solve(&plant, &options)
                                .or_else(|_| solve(&plant, &Options::default()));
                            solved
                                .map(|s| {
                                    warm = Some(s.warm_start.clone());
                                    Metrics::of(&plant, &s)
                                })
                                .map_err(|e| e.to_string())
                        });
                    let count = done.fetch_add(1, std::sync::atomic::Ordering::Relaxed) + 1;
                    progress(count, my_total);
                    CaseResult {
                        index,
                        coordinates,
                        outcome,
                    }
                })
                .collect()
        })
        .collect();
    let mut cases: Vec<CaseResult> = results.into_iter().flatten().collect();
    cases.sort_by_key(|c| c.index);
    Ok(Sweep {
        variables: variables.to_vec(),
        cases,
    })
}

/// The values of every variable at grid position `index` (last variable fastest).
fn coordinates_of(variables: &[Variable], index: usize) -> Vec<f64> {
    let mut rest = index;
    let mut out = vec![0.0; variables.len()];
    for (i, v) in variables.iter().enumerate().rev() {
        out[i] = v.values[rest % v.values.len()];
        rest /= v.values.len();
    }
    out
}

/// The CSV header of a sweep.
pub fn csv_header(variables: &[Variable]) -> Vec<String> {
    let mut h = vec!["case".to_string()];
    h.extend(variables.iter().map(|v| {
        if v.unit.is_empty() {
            v.name()
        } else {
            format!("{} [{}]", v.name(), v.unit)
        }
    }));
    h.extend(
        [
            "status",
            "liquid_yield [-]",
            "liquid_flow [kg/s]",
            "specific_energy [kWh/kg]",
            "figure_of_merit [-]",
            "shaft_power [W]",
            "min_approach [K]",
            "design_errors",
            "iterations",
            "reason",
        ]
        .iter()
        .map(|s| s.to_string()),
    );
    h
}

/// A number written exactly (the shortest decimal that reads back to the same
/// value, never in exponent form), or an empty cell where it does not exist (NaN:
/// the specific energy and figure of merit of a case without liquid; infinity: no
/// exchanger's approach).
fn exact_or_blank(value: f64) -> String {
    if value.is_finite() {
        format!("{value}")
    } else {
        String::new()
    }
}

/// One CSV row of a case, numbers written exactly (so merged shards compare equal).
pub fn csv_row(case: &CaseResult) -> Vec<String> {
    let mut row = vec![case.index.to_string()];
    row.extend(case.coordinates.iter().map(|c| format!("{c}")));
    match &case.outcome {
        Ok(m) => row.extend([
            if m.feasible() { "ok" } else { "infeasible" }.to_string(),
            exact_or_blank(m.liquid_yield),
            exact_or_blank(m.liquid_flow),
            exact_or_blank(m.specific_energy),
            exact_or_blank(m.figure_of_merit),
            exact_or_blank(m.shaft_power),
            exact_or_blank(m.min_approach),
            m.design_errors.to_string(),
            m.iterations.to_string(),
            String::new(),
        ]),
        Err(reason) => {
            row.push("failed".to_string());
            row.extend(std::iter::repeat_n(String::new(), 8));
            row.push(reason.clone());
        }
    }
    row
}

/// The sweep as CSV text.
pub fn to_csv(sweep: &Sweep) -> Result<String> {
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(csv_header(&sweep.variables))
        .map_err(|e| Error::Input(e.to_string()))?;
    for case in &sweep.cases {
        w.write_record(csv_row(case))
            .map_err(|e| Error::Input(e.to_string()))?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Input(e.to_string()))?;
    Ok(String::from_utf8_lossy(&bytes).into_owned())
}

/// Merges shard CSV files into one, rows ordered by case: the same text an unsharded
/// run writes. Headers must agree and no case may appear twice.
pub fn merge_csv(parts: &[String]) -> Result<String> {
    let mut header: Option<csv::StringRecord> = None;
    let mut rows: Vec<(usize, csv::StringRecord)> = Vec::new();
    for (i, part) in parts.iter().enumerate() {
        let mut reader = csv::Reader::from_reader(part.as_bytes());
        let h = reader
            .headers()
            .map_err(|e| Error::Input(format!("shard {}: {e}", i + 1)))?
            .clone();
        match &header {
            None => header = Some(h),
            Some(first) if *first != h => {
                return Err(Error::Input(format!(
                    "shard {} has another header: its study differs",
                    i + 1
                )))
            }
            _ => {}
        }
        for record in reader.records() {
            let record = record.map_err(|e| Error::Input(format!("shard {}: {e}", i + 1)))?;
            let case: usize = record.get(0).and_then(|c| c.parse().ok()).ok_or_else(|| {
                Error::Input(format!("shard {}: a row without a case number", i + 1))
            })?;
            rows.push((case, record));
        }
    }
    if parts.is_empty() {
        return Err(Error::Input("merge-shards needs the shard files".into()));
    }
    rows.sort_by_key(|r| r.0);
    if rows.windows(2).any(|w| w[0].0 == w[1].0) {
        return Err(Error::Input("a case appears in two shards".into()));
    }
    // Cases are numbered 0.. over the whole grid: a gap is a shard not given.
    let missing: Vec<usize> = rows
        .iter()
        .map(|r| r.0)
        .enumerate()
        .filter(|(i, case)| i != case)
        .map(|(i, _)| i)
        .take(1)
        .collect();
    if let Some(&first) = missing.first() {
        let next = rows
            .iter()
            .map(|r| r.0)
            .find(|&c| c > first)
            .unwrap_or(first);
        return Err(Error::Input(format!(
            "cases {first} to {} are in none of the {} files given: a shard is missing (each shard holds every N-th row of the grid)",
            next.saturating_sub(1),
            parts.len()
        )));
    }
    let mut w = csv::Writer::from_writer(Vec::new());
    if let Some(h) = header {
        w.write_record(&h)
            .map_err(|e| Error::Input(e.to_string()))?;
    }
    for (_, r) in rows {
        w.write_record(&r)
            .map_err(|e| Error::Input(e.to_string()))?;
    }
    let bytes = w.into_inner().map_err(|e| Error::Input(e.to_string()))?;
    Ok(String::from_utf8_lossy(&bytes).into_owned())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranges_parse_with_units_and_spacing() {
        let v = Variable::parse_range("compressor.outlet_pressure=50bar..250bar:5").unwrap();
        assert_eq!(v.values, vec![50.0, 100.0, 150.0, 200.0, 250.0]);
        assert_eq!(v.unit, "bar");
        assert_eq!(v.override_for(100.0).value, "100 bar");
        let l = Variable::parse_range("x.y=1bar..100bar:3:log").unwrap();
        assert!((l.values[1] - 10.0).abs() < 1e-12);
        // Log spacing ends exactly at the ends given (exp(ln 0.3) is not 0.3).
        let l = Variable::parse_range("x.y=0.3bar..7bar:5:log").unwrap();
        assert_eq!((l.values[0], l.values[4]), (0.3, 7.0));
        assert!(Variable::parse_range("x.y=1bar..100K:3").is_err());
        assert!(Variable::parse_range("x.y=1bar..2bar").is_err());
        assert!(Variable::parse_range("x.y=1 furlong..2 furlong:3").is_err());
    }

    #[test]
    fn grid_positions_run_last_variable_fastest() {
        let a = Variable {
            target: "a".into(),
            key: "k".into(),
            values: vec![1.0, 2.0],
            unit: String::new(),
        };
        let b = Variable {
            target: "b".into(),
            key: "k".into(),
            values: vec![10.0, 20.0, 30.0],
            unit: String::new(),
        };
        assert_eq!(coordinates_of(&[a.clone(), b.clone()], 0), vec![1.0, 10.0]);
        assert_eq!(coordinates_of(&[a.clone(), b.clone()], 2), vec![1.0, 30.0]);
        assert_eq!(coordinates_of(&[a, b], 4), vec![2.0, 20.0]);
    }
}
