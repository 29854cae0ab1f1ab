//! Optimisation of a flowsheet's figures over one or more parameters with argmin:
//! Brent's method for one variable, Nelder–Mead for several. Cases that fail, or
//! break a constraint, are penalised rather than stopping the search.

use super::{split_range, Metrics};
use crate::error::{Error, Result};
use crate::flowsheet::{load_str, Override};
use crate::solve::{solve, Options};
use argmin::core::{CostFunction, Executor, State};
use argmin::solver::brent::BrentOpt;
use argmin::solver::neldermead::NelderMead;
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
    /// Whether the constraint holds at the optimum (true without a constraint).
    pub constraint_met: bool,
}

struct Problem<'a> {
    text: &'a str,
    file: &'a str,
    overrides: &'a [Override],
    variables: &'a [Bounded],
    objective: Objective,
    min_approach: Option<f64>,
    solves: AtomicUsize,
    best: Mutex<Option<(f64, Vec<f64>, Metrics)>>,
}

const PENALTY: f64 = 1e6;

impl Problem<'_> {
    fn evaluate(&self, x: &[f64]) -> f64 {
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
        let mut set = self.overrides.to_vec();
        set.extend(self.variables.iter().zip(&clamped).map(|(b, v)| b.set(*v)));
        self.solves.fetch_add(1, Ordering::Relaxed);
        let metrics = load_str(self.text, self.file, &set).ok().and_then(|plant| {
            solve(&plant, &Options::default())
                .ok()
                .map(|s| Metrics::of(&plant, &s))
        });
        let Some(m) = metrics else { return PENALTY };
        let mut cost = self.objective.cost(&m);
        if !cost.is_finite() {
            return PENALTY;
        }
        if let Some(floor) = self.min_approach {
            if m.min_approach < floor {
                cost += 1e3 * (floor - m.min_approach);
            }
        }
        cost += PENALTY * outside;
        let mut best = self.best.lock().unwrap_or_else(|e| e.into_inner());
        if outside == 0.0 && best.as_ref().is_none_or(|b| cost < b.0) {
            *best = Some((cost, clamped, m));
        }
        cost
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
        best: Mutex::new(None),
    };
    let fail = |e: argmin::core::Error| Error::NoConvergence {
        solver: "optimisation (argmin)",
        iterations: 0,
        residual: f64::NAN,
        context: format!(": {e}"),
    };
    let iterations = if variables.len() == 1 {
        let b = &variables[0];
        let solver = BrentOpt::new(b.low, b.high).set_tolerance(1e-10, 1e-7 * (b.high - b.low));
        let result = Executor::new(One(&problem), solver)
            .configure(|s| s.max_iters(max_iterations))
            .run()
            .map_err(fail)?;
        result.state().get_iter()
    } else {
        let start: Vec<f64> = variables.iter().map(|b| 0.5 * (b.low + b.high)).collect();
        let mut simplex = vec![start.clone()];
        for (i, b) in variables.iter().enumerate() {
            let mut p = start.clone();
            p[i] += 0.25 * (b.high - b.low);
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
    let (_, values, metrics) =
        best.ok_or_else(|| Error::Input("no case inside the bounds could be solved".into()))?;
    Ok(Optimum {
        objective: objective.value(&metrics),
        constraint_met: min_approach.is_none_or(|f| metrics.min_approach >= f - 1e-9),
        values,
        metrics,
        iterations,
        solves: problem.solves.load(Ordering::Relaxed),
    })
}
