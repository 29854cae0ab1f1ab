//! Optimisation of a flowsheet's figures over one or more parameters with argmin:
//! Brent's method for one variable, Nelder–Mead for several. Cases that fail, or
//! break a constraint, are penalised rather than stopping the search.

use super::{split_range, Metrics};
use crate::error::{Error, Result};
use crate::flowsheet::{load_str, Override};
use crate::solve::{solve, Options, WarmStart};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::brent::BrentOpt;
use argmin::solver::neldermead::NelderMead;
use rayon::prelude::*;
use std::collections::HashMap;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Mutex;

/// What to optimise.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Objective {
    /// Maximise the liquid yield.
    MaximizeYield,
    /// Minimise the specific energy (with precooling).
    MinimizeSpecificEnergy,
    /// Maximise the figure of merit.
    MaximizeFigureOfMerit,
}

impl Objective {
    /// Reads `liquid_yield`, `specific_energy` or `figure_of_merit` with its sense.
    pub fn parse(maximize: Option<&str>, minimize: Option<&str>) -> Result<Objective> {
        match (maximize, minimize) {
            (Some("liquid_yield"), None) => Ok(Objective::MaximizeYield),
            (Some("figure_of_merit"), None) => Ok(Objective::MaximizeFigureOfMerit),
            (None, Some("specific_energy")) => Ok(Objective::MinimizeSpecificEnergy),
            _ => Err(Error::Input("give one objective: --maximize liquid_yield, --maximize figure_of_merit or --minimize specific_energy".into())),
        }
    }

    /// The figure, and the cost argmin minimises.
    fn value(self, m: &Metrics) -> f64 {
        match self {
            Objective::MaximizeYield => m.liquid_yield,
            Objective::MinimizeSpecificEnergy => m.specific_energy,
            Objective::MaximizeFigureOfMerit => m.figure_of_merit,
        }
    }

    fn cost(self, m: &Metrics) -> f64 {
        let v = self.value(m);
        match self {
            Objective::MinimizeSpecificEnergy => v,
            _ => -v,
        }
    }

    /// Its name in reports.
    pub fn name(self) -> &'static str {
        match self {
            Objective::MaximizeYield => "maximum liquid yield",
            Objective::MinimizeSpecificEnergy => "minimum specific energy",
            Objective::MaximizeFigureOfMerit => "maximum figure of merit",
        }
    }
}

/// A bounded variable: `id.key=LO..HI`.
#[derive(Debug, Clone, PartialEq)]
pub struct Bounded {
    /// Equipment id.
    pub target: String,
    /// Key.
    pub key: String,
    /// Lower bound, in `unit`.
    pub low: f64,
    /// Upper bound, in `unit`.
    pub high: f64,
    /// Unit as written.
    pub unit: String,
}

impl Bounded {
    /// Reads `id.key=LO..HI`.
    pub fn parse(text: &str) -> Result<Bounded> {
        let ((target, key, (low, unit)), (high, _), rest) = split_range(text)?;
        if !rest.is_empty() || !(high > low) {
            return Err(Error::Input(format!(
                "'{text}': write id.key=LO..HI with LO below HI"
            )));
        }
        Ok(Bounded {
            target,
            key,
            low,
            high,
            unit,
        })
    }

    fn set(&self, value: f64) -> Override {
        Override {
            target: self.target.clone(),
            key: self.key.clone(),
            value: format!("{value} {}", self.unit).trim().to_string(),
        }
    }
}

/// The result of an optimisation.
#[derive(Debug, Clone)]
pub struct Optimum {
    /// The best values found, in the variables' units.
    pub values: Vec<f64>,
    /// The objective there.
    pub objective: f64,
    /// The figures there.
    pub metrics: Metrics,
    /// Solver iterations.
    pub iterations: u64,
    /// Flowsheet solves made.
    pub solves: usize,
    /// Whether the constraint holds at the optimum (always: a point that breaks it
    /// is never taken as the optimum).
    pub constraint_met: bool,
    /// Whether the solver stopped at its iteration cap rather than on its tolerance.
    pub stopped_at_cap: bool,
    /// For each variable, the bound the optimum sits on (`lower` or `upper`), if any:
    /// the true optimum may then lie outside the range.
    pub on_bound: Vec<Option<&'static str>>,
    /// Cases solved that were infeasible (design errors or the constraint broken).
    pub infeasible_solves: usize,
}

struct Problem<'a> {
    text: &'a str,
    file: &'a str,
    overrides: &'a [Override],
    variables: &'a [Bounded],
    objective: Objective,
    min_approach: Option<f64>,
    solves: AtomicUsize,
    infeasible: AtomicUsize,
    best: Mutex<Option<(f64, Vec<f64>, Metrics)>>,
    /// Converged recycles of the cases so far (at box-scaled points): each case of
    /// the search starts from the nearest.
    warm: Mutex<Vec<(Vec<f64>, WarmStart)>>,
    /// The figures of every point solved (`None`: it could not be solved), by the
    /// bits of its clamped values: a search that steps outside the box comes back
    /// to the same clamped point often, and pays for it once.
    solved: Mutex<HashMap<Vec<u64>, Option<Metrics>>>,
}

const PENALTY: f64 = 1e6;

/// What each design error (or a broken constraint) adds to the cost: more than any
/// figure the objectives take, so that every infeasible case costs more than every
/// feasible one.
const INFEASIBLE_PENALTY: f64 = 1e4;

/// Where a case's recycle starts.
enum Start {
    /// From the nearest case solved so far (the search, one case at a time).
    Nearest,
    /// From the case before it in a run of the scan (`None`: the run's first case,
    /// which starts cold and estimates the recycle's Jacobian for the next).
    After(Option<WarmStart>),
}

impl Problem<'_> {
    fn evaluate(&self, x: &[f64]) -> f64 {
        self.evaluate_from(x, Start::Nearest).0
    }

    /// The cost at `x`, with the converged recycle for the next case of a run.
    fn evaluate_from(&self, x: &[f64], start: Start) -> (f64, Option<WarmStart>) {
        // Outside the box: penalised by the distance.
        let mut outside = 0.0;
        let clamped: Vec<f64> = x
            .iter()
            .zip(self.variables)
            .map(|(v, b)| {
                let c = v.clamp(b.low, b.high);
                outside += (v - c).abs() / (b.high - b.low);
                c
            })
            .collect();
        let (metrics, warm, fresh) = self.metrics_at(&clamped, start);
        let Some(m) = metrics else {
            return (PENALTY, warm);
        };
        let mut cost = self.objective.cost(&m);
        if !cost.is_finite() {
            return (PENALTY, warm);
        }
        // A case with design errors, or one that breaks the constraint, is a
        // constraint violation: penalised, and never taken as the optimum.
        let mut feasible = m.feasible();
        if !feasible {
            cost += INFEASIBLE_PENALTY * m.design_errors as f64;
        }
        if let Some(floor) = self.min_approach {
            if m.min_approach < floor {
                cost += INFEASIBLE_PENALTY + 1e3 * (floor - m.min_approach);
                feasible = false;
            }
        }
        // Counted once a point, as the solves are.
        if !feasible && fresh {
            self.infeasible.fetch_add(1, Ordering::Relaxed);
        }
        cost += PENALTY * outside;
        let mut best = self.best.lock().unwrap_or_else(|e| e.into_inner());
        if feasible && outside == 0.0 && best.as_ref().is_none_or(|b| cost < b.0) {
            *best = Some((cost, clamped, m));
        }
        (cost, warm)
    }
}

impl Problem<'_> {
    /// The figures at a point inside the box, solved once and remembered, with
    /// the converged recycle (`None` for a point solved before or not solved) and
    /// whether it was solved now (not remembered).
    fn metrics_at(
        &self,
        clamped: &[f64],
        start: Start,
    ) -> (Option<Metrics>, Option<WarmStart>, bool) {
        let key: Vec<u64> = clamped.iter().map(|v| v.to_bits()).collect();
        if let Some(known) = self
            .solved
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .get(&key)
        {
            return (*known, None, false);
        }
        self.solves.fetch_add(1, Ordering::Relaxed);
        let scaled = self.scaled(clamped);
        let warm_start = match start {
            Start::Nearest => self.nearest_warm_start(&scaled),
            Start::After(warm) => warm,
        };
        let options = Options {
            estimate_jacobian: warm_start.is_none(),
            warm_start,
            ..Options::default()
        };
        let solved = load_str(self.text, self.file, &self.overrides_at(clamped))
            .ok()
            .and_then(|plant| {
                let solution = solve(&plant, &options).ok()?;
                Some((Metrics::of(&plant, &solution), solution.warm_start))
            });
        let metrics = solved.as_ref().map(|(m, _)| *m);
        self.solved
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .insert(key, metrics);
        let warm = solved.map(|(_, w)| {
            self.warm
                .lock()
                .unwrap_or_else(|e| e.into_inner())
                .push((scaled, w.clone()));
            w
        });
        (metrics, warm, true)
    }

    /// The flowsheet's overrides with the variables set to `x`.
    fn overrides_at(&self, x: &[f64]) -> Vec<Override> {
        let mut set = self.overrides.to_vec();
        set.extend(self.variables.iter().zip(x).map(|(b, v)| b.set(*v)));
        set
    }

    /// A point in box-scaled coordinates (each variable's range 0 to 1).
    fn scaled(&self, x: &[f64]) -> Vec<f64> {
        x.iter()
            .zip(self.variables)
            .map(|(v, b)| (v - b.low) / (b.high - b.low))
            .collect()
    }

    /// The converged recycle of the nearest case solved so far in the search.
    fn nearest_warm_start(&self, scaled: &[f64]) -> Option<WarmStart> {
        let warm = self.warm.lock().unwrap_or_else(|e| e.into_inner());
        let distance =
            |p: &[f64]| -> f64 { p.iter().zip(scaled).map(|(a, b)| (a - b).powi(2)).sum() };
        // Ties go to the lower point, so that the choice does not depend on the
        // order in which the scan's threads finished.
        warm.iter()
            .min_by(|a, b| {
                distance(&a.0).total_cmp(&distance(&b.0)).then_with(|| {
                    a.0.iter()
                        .zip(&b.0)
                        .fold(std::cmp::Ordering::Equal, |o, (p, q)| {
                            o.then(p.total_cmp(q))
                        })
                })
            })
            .map(|(_, w)| w.clone())
    }
}

struct One<'a>(&'a Problem<'a>);
impl CostFunction for One<'_> {
    type Param = f64;
    type Output = f64;
    fn cost(&self, p: &f64) -> std::result::Result<f64, argmin::core::Error> {
        Ok(self.0.evaluate(&[*p]))
    }
}

struct Many<'a>(&'a Problem<'a>);
impl CostFunction for Many<'_> {
    type Param = Vec<f64>;
    type Output = f64;
    fn cost(&self, p: &Vec<f64>) -> std::result::Result<f64, argmin::core::Error> {
        Ok(self.0.evaluate(p))
    }
}

/// Scan points of a one-variable optimisation before Brent's method refines.
const SCAN_POINTS_ONE: usize = 13;

/// Scan points per variable of a several-variable optimisation before Nelder–Mead.
const SCAN_POINTS_MANY: usize = 4;

/// The error when no case solved was feasible.
fn no_feasible_point(problem: &Problem, min_approach: Option<f64>) -> Error {
    let solves = problem.solves.load(Ordering::Relaxed);
    let infeasible = problem.infeasible.load(Ordering::Relaxed);
    Error::Infeasible(format!(
        "no feasible point: of {solves} cases tried, {infeasible} had design errors{} and {} could not be solved",
        match min_approach {
            Some(floor) => format!(" or a smallest approach below {floor} K"),
            None => String::new(),
        },
        solves.saturating_sub(infeasible)
    ))
}

/// Optimises `objective` over `variables` within their bounds; `min_approach` is an
/// optional constraint on the smallest exchanger approach (K).
pub fn optimize(
    text: &str,
    file: &str,
    overrides: &[Override],
    variables: &[Bounded],
    objective: Objective,
    min_approach: Option<f64>,
    max_iterations: u64,
) -> Result<Optimum> {
    if variables.is_empty() {
        return Err(Error::Input(
            "optimize needs at least one --vary id.key=LO..HI".into(),
        ));
    }
    let problem = Problem {
        text,
        file,
        overrides,
        variables,
        objective,
        min_approach,
        solves: AtomicUsize::new(0),
        infeasible: AtomicUsize::new(0),
        best: Mutex::new(None),
        warm: Mutex::new(Vec::new()),
        solved: Mutex::new(HashMap::new()),
    };
    let fail = |e: argmin::core::Error| Error::NoConvergence {
        solver: "optimisation (argmin)",
        iterations: 0,
        residual: f64::NAN,
        context: format!(": {e}"),
    };
    // A coarse scan of the box first (in parallel): the search then starts from the
    // best feasible point found, so that a region of infeasible cases (penalised,
    // but with no measure of how far from feasible) cannot lead it astray.
    let steps = if variables.len() == 1 {
        SCAN_POINTS_ONE
    } else {
        SCAN_POINTS_MANY
    };
    let spacing: Vec<f64> = variables
        .iter()
        .map(|b| (b.high - b.low) / (steps - 1) as f64)
        .collect();
    let grid: Vec<Vec<f64>> = (0..steps.pow(variables.len() as u32))
        .map(|mut index| {
            variables
                .iter()
                .zip(&spacing)
                .map(|(b, h)| {
                    let k = index % steps;
                    index /= steps;
                    b.low + k as f64 * h
                })
                .collect()
        })
        .collect();
    // The scan runs along rows of the grid (the first variable changing), each case
    // starting from the one before; the runs do not depend on the number of threads.
    let run = if variables.len() == 1 {
        SCAN_POINTS_ONE.div_ceil(2)
    } else {
        steps
    };
    grid.par_chunks(run).for_each(|cases| {
        let mut warm = None;
        for x in cases {
            warm = problem.evaluate_from(x, Start::After(warm)).1;
        }
    });
    let Some(start) = problem
        .best
        .lock()
        .unwrap_or_else(|e| e.into_inner())
        .as_ref()
        .map(|b| b.1.clone())
    else {
        return Err(no_feasible_point(&problem, min_approach));
    };
    let iterations = if variables.len() == 1 {
        let b = &variables[0];
        let (low, high) = (
            (start[0] - spacing[0]).max(b.low),
            (start[0] + spacing[0]).min(b.high),
        );
        let solver = BrentOpt::new(low, high).set_tolerance(1e-10, 1e-7 * (b.high - b.low));
        let result = Executor::new(One(&problem), solver)
            .configure(|s| s.max_iters(max_iterations))
            .run()
            .map_err(fail)?;
        result.state().get_iter()
    } else {
        // A simplex of half the scan's spacing at the best point, stepping inwards.
        let mut simplex = vec![start.clone()];
        for (i, b) in variables.iter().enumerate() {
            let mut p = start.clone();
            let step = 0.5 * spacing[i];
            p[i] += if p[i] + step <= b.high { step } else { -step };
            simplex.push(p);
        }
        let solver = NelderMead::new(simplex)
            .with_sd_tolerance(1e-9)
            .map_err(fail)?;
        let result = Executor::new(Many(&problem), solver)
            .configure(|s| s.max_iters(max_iterations))
            .run()
            .map_err(fail)?;
        result.state().get_iter()
    };
    let best = problem
        .best
        .lock()
        .unwrap_or_else(|e| e.into_inner())
        .clone();
    let solves = problem.solves.load(Ordering::Relaxed);
    let infeasible_solves = problem.infeasible.load(Ordering::Relaxed);
    let (_, values, metrics) = best.ok_or_else(|| no_feasible_point(&problem, min_approach))?;
    let on_bound = variables
        .iter()
        .zip(&values)
        .map(|(b, v)| {
            let margin = 1e-4 * (b.high - b.low);
            if *v <= b.low + margin {
                Some("lower")
            } else if *v >= b.high - margin {
                Some("upper")
            } else {
                None
            }
        })
        .collect();
    Ok(Optimum {
        objective: objective.value(&metrics),
        constraint_met: min_approach.is_none_or(|f| metrics.min_approach >= f - 1e-9),
        values,
        metrics,
        iterations,
        solves,
        stopped_at_cap: iterations >= max_iterations,
        on_bound,
        infeasible_solves,
    })
}
