//! The sequential-modular solver: units computed in order over the torn graph, the
//! tear streams and make-up flows converged by Wegstein (default) or Broyden.

pub mod converge;
pub mod order;
pub mod results;

pub use results::{Solution, Summary, UnitResult};

use crate::equipment::{Context, FeedFlow, Flow, Performance, PinchHint, Role};
use crate::error::{Error, Result};
use crate::flowsheet::plant::{flow_networks, static_pressures, Method};
use crate::flowsheet::Plant;
use crate::quantity::STANDARD_ATMOSPHERE;
use converge::FixedPoint;
use order::Sequence;

/// Options the caller may set beyond the flowsheet's settings.
#[derive(Debug, Clone, Default)]
pub struct Options {
    /// Starting temperature of every tear stream, K (overrides the settings).
    pub initial_temperature: Option<f64>,
    /// Starting mass flow of every tear stream as a fraction of the flow basis.
    pub initial_flow_fraction: Option<f64>,
    /// Iteration cap (overrides the settings).
    pub max_iterations: Option<usize>,
    /// Method (overrides the settings).
    pub method: Option<Method>,
    /// Start the recycle from a neighbouring case's converged recycle (used when
    /// its length matches this plant's; where it does not converge, the solve starts
    /// cold).
    pub warm_start: Option<WarmStart>,
    /// After converging, estimate the recycle's Jacobian by finite differences (one
    /// more pass per tear variable) and hand its inverse out in the solution's
    /// [`WarmStart`], so that the neighbouring cases of a study start from it.
    /// Done only where it pays: when converging took more passes than that.
    pub estimate_jacobian: bool,
    /// Leave out each two-stream exchanger's largest duty on the detailed pass
    /// (its search costs a profile or more): the report's largest duty and
    /// effectiveness are then NaN. For re-solves that read only the yield, the
    /// power and the design checks, none of which uses them.
    pub skip_largest_duty: bool,
}

/// A converged recycle, to start a neighbouring case from (a sweep's next case, an
/// optimiser's next point): the scaled tear vector and, where Broyden converged it,
/// its approximate inverse Jacobian, so that a small change of the case costs a few
/// passes instead of a solve from scratch.
#[derive(Debug, Clone, Default)]
pub struct WarmStart {
    /// The converged scaled tear vector.
    pub tear_vector: Vec<f64>,
    /// Broyden's inverse Jacobian of the residual there (row-major, n × n).
    pub inverse_jacobian: Option<Vec<f64>>,
}

/// What one pass produces: G(x), every stream, every unit's performance.
type PassOutput = (Vec<f64>, Vec<Option<Flow>>, Vec<Performance>);

/// A variable of the convergence vector.
#[derive(Debug, Clone, Copy)]
enum Variable {
    Pressure(usize),
    Enthalpy(usize),
    Flow(usize),
    /// The para fraction of a hydrogen tear stream of the ortho–para solution.
    ParaFraction(usize),
    MakeUp(usize),
}

struct Problem<'a> {
    plant: &'a Plant,
    sequence: &'a Sequence,
    variables: Vec<Variable>,
    scales: Vec<f64>,
    networks: Vec<usize>,
    context: Context,
    last: Option<(Vec<Option<Flow>>, Vec<Performance>)>,
    /// Each unit's duty on the last pass, to start the next from.
    duty_hints: std::cell::RefCell<Vec<Option<f64>>>,
    /// The largest scaled change of a tear variable over the last pass.
    last_change: std::cell::Cell<f64>,
    /// For each exchanger sized by its pinch, where it found it lately.
    pinch_places: std::cell::RefCell<Vec<Option<PinchPlace>>>,
    /// Whether passes pass on where each pinch lay (`Context::pinch_hint`); off
    /// once a converged point failed its check with every pinch found afresh.
    trusting: std::cell::Cell<bool>,
    /// [`LOOSE_ABOVE`], or infinite where the passes are never loose.
    loose_above: f64,
    /// Whether a pass has run loose, and whether one has run settled since: once
    /// the passes settle they stay settled (a pass going loose again would change
    /// the map under the accelerator's feet).
    ran_loose: std::cell::Cell<bool>,
    ran_settled: std::cell::Cell<bool>,
}

/// Where an exchanger sized by its pinch found it lately, as the next pass's hint.
#[derive(Debug, Clone, Copy, PartialEq)]
struct PinchPlace {
    /// At an end (else inside).
    at_end: bool,
    /// Passes since the exchanger last looked everywhere.
    passes: usize,
    /// Where an inside pinch lay, where the exchanger reports it.
    position: Option<f64>,
}

/// The hint a pass gives an exchanger from where it found its pinch lately: none
/// while hints are not trusted; on the detailed pass, which looks everywhere,
/// [`PinchHint::Whole`] where the pinch lay strictly inside (whole profiles show an
/// end pinch too) and [`PinchHint::Check`] otherwise (the ends are tried first).
fn pass_hint(place: Option<PinchPlace>, detailed: bool, trusting: bool) -> PinchHint {
    match place {
        _ if !trusting => PinchHint::Check,
        Some(place) if detailed && place.strictly_inside() => PinchHint::Whole,
        _ if detailed => PinchHint::Check,
        Some(place) => place.hint(),
        None => PinchHint::Check,
    }
}

impl PinchPlace {
    /// The hint for the next pass.
    fn hint(self) -> PinchHint {
        match self {
            PinchPlace { at_end: true, .. } => PinchHint::End,
            PinchPlace {
                at_end: false,
                passes,
                ..
            } if passes < HINTED_PASSES => PinchHint::Inside,
            // Lately inside, away from both ends: a search on whole profiles looks
            // everywhere (it finds an end pinch too) without the end's profile.
            place if place.strictly_inside() => PinchHint::Whole,
            _ => PinchHint::Check,
        }
    }

    /// Inside, away from both ends of the profile, where the exchanger reports
    /// where.
    fn strictly_inside(self) -> bool {
        !self.at_end && self.position.is_some_and(|p| p > 0.0 && p < 1.0)
    }
}

/// While the tear variables still change by more than this (scaled) from one pass
/// to the next, exchangers may size on their coarse profiles (`Context::loose`).
const LOOSE_ABOVE: f64 = 1e-4;

/// A pinch found inside is searched for directly for this many passes before a
/// pass tries the ends again (it may move to an end as the tear streams settle).
const HINTED_PASSES: usize = 4;

/// The detailed pass at the converged point may differ from the converging passes
/// by rounding (its exchangers draw their outlets from the profile: about 1e-11,
/// scaled); a change of a tear variable above this, or above ten tolerances, means
/// an end pinch taken from the hint did not hold.
const DETAILED_ROUNDING: f64 = 1e-9;

/// A temperature near the state of enthalpy `enthalpy` close to `near`: `near`'s,
/// moved along its heat capacity where it has a positive one, K.
fn temperature_guess(near: &crate::fluids::State, enthalpy: f64) -> f64 {
    near.cp()
        .filter(|cp| *cp > 0.0)
        .map(|cp| near.temperature + (enthalpy - near.enthalpy) / cp)
        .filter(|moved| moved.is_finite() && *moved > 0.0)
        .unwrap_or(near.temperature)
}

/// The largest scaled difference between two vectors.
fn largest_change(a: &[f64], b: &[f64]) -> f64 {
    a.iter()
        .zip(b)
        .map(|(x, y)| (x - y).abs())
        .fold(0.0, f64::max)
}

impl Problem<'_> {
    fn run_pass(&self, x: &[f64]) -> Result<PassOutput> {
        let plant = self.plant;
        let loose = !self.context.detailed
            && !self.ran_settled.get()
            && self.last_change.get() > self.loose_above;
        if !self.context.detailed {
            if loose {
                self.ran_loose.set(true);
            } else {
                self.ran_settled.set(true);
            }
        }
        let mut flows: Vec<Option<Flow>> = vec![None; plant.streams.len()];
        let value = |i: usize| x[i] * self.scales[i];
        // Tear streams and make-up flows from the iterate.
        let mut make_up = vec![0.0; plant.units.len()];
        let mut tear_values: Vec<(usize, f64, f64, f64, Option<f64>)> = Vec::new();
        let mut i = 0;
        while i < self.variables.len() {
            match self.variables[i] {
                Variable::Pressure(s) => {
                    let para = match self.variables.get(i + 3) {
                        Some(Variable::ParaFraction(t)) if *t == s => {
                            Some(value(i + 3).clamp(0.0, 1.0))
                        }
                        _ => None,
                    };
                    tear_values.push((s, value(i), value(i + 1), value(i + 2).max(0.0), para));
                    i += if para.is_some() { 4 } else { 3 };
                }
                Variable::MakeUp(u) => {
                    make_up[u] = value(i).max(0.0);
                    i += 1;
                }
                _ => i += 1,
            }
        }
        for &(s, p, h, m, para) in &tear_values {
            let fluid = match para {
                Some(x) => crate::fluids::Material::hydrogen_solution(x)?,
                None => crate::fluids::Material::plain(plant.streams[s].fluid),
            };
            // A hydrogen solution's search starts from the last pass's state of this
            // stream, moved along its heat capacity to the new enthalpy.
            let previous = self
                .last
                .as_ref()
                .and_then(|(flows, _)| flows[s].as_ref())
                .map(|f| &f.state);
            let first_try = match previous {
                Some(near) => fluid.state_ph_from(p, h, temperature_guess(near, h)),
                None => fluid.state_ph(p, h),
            };
            // An accelerated step may propose an enthalpy outside the fluid's range
            // at this pressure: hold it at the range's edge instead of failing.
            let state = match first_try {
                Ok(state) => state,
                Err(Error::OutOfRange { .. }) => {
                    let warmest = fluid.state_tp(fluid.temperature_max * 0.999, p)?;
                    let coldest = fluid
                        .state_tp(fluid.temperature_min * 1.001, p)
                        .or_else(|_| fluid.state_tp(fluid.temperature_min * 1.01, p))?;
                    fluid.state_ph(p, h.clamp(coldest.enthalpy, warmest.enthalpy))?
                }
                Err(e) => return Err(e),
            };
            flows[s] = Some(Flow { state, flow: m });
        }
        let mut computed: Vec<Option<Flow>> = vec![None; plant.streams.len()];
        let mut performances = vec![Performance::default(); plant.units.len()];
        for &u in &self.sequence.order {
            let unit = &plant.units[u];
            let inlets: Vec<Flow> = unit
                .inlets
                .iter()
                .map(|&s| {
                    flows[s].clone().ok_or_else(|| {
                        Error::Internal(format!(
                            "stream {} has no value yet",
                            plant.streams[s].name
                        ))
                    })
                })
                .collect::<Result<_>>()?;
            let role = unit.spec.role();
            let context = Context {
                feed_flow: match role {
                    Role::Feed(FeedFlow::Fixed(f)) => f,
                    Role::Feed(FeedFlow::Balance) => make_up[u],
                    _ => 0.0,
                },
                duty_hint: self.duty_hints.borrow()[u],
                outlet_hints: [0, 1].map(|k| {
                    let (flows, _) = self.last.as_ref()?;
                    let stream = *unit.outlets.get(k)?;
                    Some(flows[stream].as_ref()?.state.temperature)
                }),
                loose,
                pinch_hint: pass_hint(
                    self.pinch_places.borrow()[u],
                    self.context.detailed,
                    self.trusting.get(),
                ),
                ..self.context
            };
            let context = Context {
                pinch_position: match context.pinch_hint {
                    PinchHint::Inside => self.pinch_places.borrow()[u].and_then(|p| p.position),
                    _ => None,
                },
                ..context
            };
            let (mut outlets, performance) = unit
                .spec
                .run(&inlets, &context)
                .map_err(|e| e.in_equipment(&unit.id))?;
            self.duty_hints.borrow_mut()[u] = performance.duty;
            let mut places = self.pinch_places.borrow_mut();
            places[u] = match (performance.pinch_at_end, context.pinch_hint) {
                (None, _) => None,
                (Some(at_end), PinchHint::Check | PinchHint::Whole) => Some(PinchPlace {
                    at_end,
                    passes: 0,
                    position: performance.pinch_position,
                }),
                (Some(at_end), _) => places[u].map(|place| PinchPlace {
                    at_end,
                    passes: place.passes + 1,
                    position: performance.pinch_position,
                }),
            };
            drop(places);
            if let (Some(basis), Some(first)) = (unit.flow_basis, outlets.first_mut()) {
                if !matches!(role, Role::Feed(_)) {
                    first.flow = basis;
                }
            }
            for (&s, flow) in unit.outlets.iter().zip(outlets) {
                if self.sequence.tears.contains(&s) {
                    computed[s] = Some(flow);
                } else {
                    flows[s] = Some(flow.clone());
                    computed[s] = Some(flow);
                }
            }
            performances[u] = performance;
        }
        // G(x).
        let mut g = vec![0.0; self.variables.len()];
        for (k, variable) in self.variables.iter().enumerate() {
            let v = match *variable {
                Variable::Pressure(s) => computed[s].as_ref().map(|f| f.state.pressure),
                Variable::Enthalpy(s) => computed[s].as_ref().map(|f| f.state.enthalpy),
                Variable::Flow(s) => computed[s].as_ref().map(|f| f.flow),
                Variable::ParaFraction(s) => computed[s].as_ref().map(|f| {
                    f.state
                        .para_fraction
                        .unwrap_or(crate::fluids::spin::NORMAL_PARA_FRACTION)
                }),
                Variable::MakeUp(u) => Some(self.make_up_target(u, &computed)),
            }
            .ok_or_else(|| Error::Internal("a tear stream was not computed".into()))?;
            g[k] = v / self.scales[k];
        }
        self.last_change.set(largest_change(&g, x));
        Ok((g, computed, performances))
    }

    /// What leaves the feed's flow network through products, less its other feeds.
    fn make_up_target(&self, feed: usize, computed: &[Option<Flow>]) -> f64 {
        let plant = self.plant;
        let network = self.networks[plant.units[feed].outlets[0]];
        let mut out = 0.0;
        for unit in &plant.units {
            match unit.spec.role() {
                Role::Product(_) => {
                    let s = unit.inlets[0];
                    if self.networks[s] == network {
                        out += computed[s].as_ref().map_or(0.0, |f| f.flow);
                    }
                }
                Role::Feed(FeedFlow::Fixed(f)) if self.networks[unit.outlets[0]] == network => {
                    out -= f
                }
                _ => {}
            }
        }
        let balance_feeds = plant
            .units
            .iter()
            .filter(|u| {
                u.spec.role() == Role::Feed(FeedFlow::Balance)
                    && self.networks[u.outlets[0]] == network
            })
            .count()
            .max(1);
        (out / balance_feeds as f64).max(0.0)
    }
}

impl FixedPoint for Problem<'_> {
    fn pass(&mut self, x: &[f64]) -> Result<Vec<f64>> {
        let (g, flows, performances) = self.run_pass(x)?;
        self.last = Some((flows, performances));
        Ok(g)
    }

    /// 0 while the passes run loose (coarse exchanger profiles), 1 once they have
    /// settled.
    fn map(&self) -> usize {
        usize::from(self.ran_loose.get() && self.ran_settled.get())
    }
}

/// Solves the plant.
pub fn solve(plant: &Plant, options: &Options) -> Result<Solution> {
    solve_from(plant, options, FirstPass::default())
}

/// What the passes start from besides the tear streams: in use, no pinch hints and
/// the tear streams taken as far from converged; the tests give wrong hints to
/// settled passes, to check that the answer does not depend on them.
#[derive(Debug, Default)]
struct FirstPass {
    /// Each unit's pinch place, as `Problem::pinch_places` holds them.
    pinch_places: Option<Vec<Option<PinchPlace>>>,
    /// The tear streams taken as settled from the first pass on, and never loose
    /// (so that a wrong end hint is never corrected by a coarse pass, and only the
    /// detailed pass's check can find it).
    settled: bool,
}

/// [`solve`], the first pass starting from `first`.
fn solve_from(plant: &Plant, options: &Options, first: FirstPass) -> Result<Solution> {
    // Nothing of an earlier solve on this thread seeds this one's searches.
    crate::fluids::blend::forget_answers();
    let sequence = order::plan(plant);
    let networks = flow_networks(&plant.units, plant.streams.len());
    let pressures = static_pressures(&plant.units, plant.streams.len());
    let basis = plant
        .units
        .iter()
        .filter_map(|u| u.flow_basis)
        .fold(0.0f64, f64::max)
        .max(1e-6);
    let initial_t = options
        .initial_temperature
        .or(plant.settings.initial_temperature)
        .unwrap_or(plant.ambient);
    let fraction = options.initial_flow_fraction.unwrap_or(1.0);
    let mut variables = Vec::new();
    let mut scales = Vec::new();
    let mut start = Vec::new();
    let hydrogen_feeds: Vec<bool> = plant
        .units
        .iter()
        .filter_map(|u| u.spec.gives_para_fraction())
        .collect();
    let solution = hydrogen_feeds.iter().any(|given| *given);
    if solution && hydrogen_feeds.iter().any(|given| !given) {
        return Err(Error::Input(
            "some hydrogen feeds give a `para_fraction` and some do not: give every hydrogen feed one (0.25 for normal hydrogen) so that all hydrogen streams carry their para fraction".into(),
        ));
    }
    for &s in &sequence.tears {
        let stream = &plant.streams[s];
        let carries_para = solution && stream.fluid.name == "hydrogen";
        let fluid = if carries_para {
            crate::fluids::Material::hydrogen_solution(crate::fluids::spin::NORMAL_PARA_FRACTION)?
        } else {
            crate::fluids::Material::plain(stream.fluid)
        };
        let p = pressures[s].unwrap_or(STANDARD_ATMOSPHERE);
        let t = initial_t.clamp(fluid.temperature_min * 1.001, fluid.temperature_max);
        let guess = fluid
            .state_tp(t, p)
            .or_else(|_| fluid.state_tp(t * 1.001, p))
            .map_err(|e| Error::Input(format!("cannot start tear stream {}: {e}", stream.name)))?;
        let h_scale = fluid.gas_constant * plant.ambient;
        variables.extend([
            Variable::Pressure(s),
            Variable::Enthalpy(s),
            Variable::Flow(s),
        ]);
        scales.extend([p, h_scale, basis]);
        start.extend([1.0, guess.enthalpy / h_scale, fraction]);
        if carries_para {
            variables.push(Variable::ParaFraction(s));
            scales.push(1.0);
            start.push(crate::fluids::spin::NORMAL_PARA_FRACTION);
        }
    }
    for (u, unit) in plant.units.iter().enumerate() {
        if unit.spec.role() == Role::Feed(FeedFlow::Balance) {
            variables.push(Variable::MakeUp(u));
            scales.push(basis);
            start.push(0.1);
        }
    }
    let mut problem = Problem {
        plant,
        sequence: &sequence,
        variables: variables.clone(),
        scales,
        networks,
        context: Context {
            largest_duty: !options.skip_largest_duty,
            ..Context::new(plant.ambient)
        },
        last: None,
        duty_hints: std::cell::RefCell::new(vec![None; plant.units.len()]),
        last_change: std::cell::Cell::new(if first.settled { 0.0 } else { f64::INFINITY }),
        pinch_places: std::cell::RefCell::new(
            first
                .pinch_places
                .unwrap_or_else(|| vec![None; plant.units.len()]),
        ),
        trusting: std::cell::Cell::new(true),
        loose_above: if first.settled {
            f64::INFINITY
        } else {
            LOOSE_ABOVE
        },
        ran_loose: std::cell::Cell::new(false),
        ran_settled: std::cell::Cell::new(false),
    };
    let describe = |k: usize| -> String {
        let name = |s: usize| plant.streams[s].name.clone();
        let tears: Vec<String> = sequence.tears.iter().map(|&s| name(s)).collect();
        let which = match variables.get(k) {
            Some(Variable::Pressure(s)) => format!("the pressure of {}", name(*s)),
            Some(Variable::Enthalpy(s)) => format!("the enthalpy of {}", name(*s)),
            Some(Variable::Flow(s)) => format!("the mass flow of {}", name(*s)),
            Some(Variable::ParaFraction(s)) => format!("the para fraction of {}", name(*s)),
            Some(Variable::MakeUp(u)) => format!("the make-up flow of {}", plant.units[*u].id),
            None => "—".into(),
        };
        format!(
            "{which} (tear streams: {})",
            if tears.is_empty() {
                "none".into()
            } else {
                tears.join(", ")
            }
        )
    };
    let cap = options
        .max_iterations
        .unwrap_or(plant.settings.max_iterations);
    let tolerance = plant.settings.tolerance;
    let converged = if variables.is_empty() {
        problem.pass(&[])?;
        converge::Converged {
            x: vec![],
            iterations: 1,
            log: vec![0.0],
            inverse_jacobian: None,
        }
    } else {
        let method = options.method.unwrap_or(plant.settings.method);
        // A neighbouring case's converged vector, where one is given and fits, is
        // tried first; where it does not converge, the cold start follows.
        let warm = options.warm_start.as_ref().filter(|w| {
            w.tear_vector.len() == start.len() && w.tear_vector.iter().all(|v| v.is_finite())
        });
        // With a Jacobian to start from, the warm start takes Broyden's quasi-Newton
        // steps whatever the method (a result the same to the tolerance).
        let from_warm = warm.and_then(|w| {
            converge_from(
                &mut problem,
                match w.inverse_jacobian {
                    Some(_) => Method::Broyden,
                    None => method,
                },
                w.tear_vector.clone(),
                w.inverse_jacobian.as_deref(),
                tolerance,
                cap,
                &describe,
            )
            .ok()
        });
        match from_warm {
            Some(c) => c,
            None => converge_from(&mut problem, method, start, None, tolerance, cap, &describe)?,
        }
    };
    // The reported streams come from a pass at the converged point, in detail, where
    // every pinch is found afresh. Where that moves the tear streams (a pinch moved
    // inside while the passes took it at an end), the recycle converges again from
    // there without the passes' hints.
    problem.context.detailed = true;
    let detailed = problem.pass(&converged.x)?;
    let moved = largest_change(&detailed, &converged.x);
    let converged = if moved > (10.0 * tolerance).max(DETAILED_ROUNDING) {
        problem.trusting.set(false);
        problem.context.detailed = false;
        let method = options.method.unwrap_or(plant.settings.method);
        let again = converge_from(
            &mut problem,
            method,
            converged.x,
            converged.inverse_jacobian.as_deref(),
            tolerance,
            cap,
            &describe,
        )?;
        problem.context.detailed = true;
        problem.pass(&again.x)?;
        converge::Converged {
            iterations: converged.iterations + again.iterations,
            log: [converged.log, again.log].concat(),
            ..again
        }
    } else {
        converged
    };
    let (flows, performances) = problem
        .last
        .take()
        .ok_or_else(|| Error::Internal("no pass was made".into()))?;
    let flows: Vec<Flow> = flows
        .into_iter()
        .enumerate()
        .map(|(s, f)| {
            f.ok_or_else(|| {
                Error::Internal(format!("stream {} was not computed", plant.streams[s].name))
            })
        })
        .collect::<Result<_>>()?;
    let mut solution = results::assemble(
        plant,
        &sequence,
        flows,
        performances,
        converged.iterations,
        converged.log,
    )?;
    // The Jacobian for neighbouring cases: estimated when asked for (on the
    // converging passes' footing, not the detailed one), else Broyden's own.
    let pays = converged.iterations > converged.x.len() + 1;
    let inverse_jacobian = if options.estimate_jacobian && pays {
        problem.context.detailed = false;
        converge::finite_difference_inverse(&mut problem, &converged.x)
            .or(converged.inverse_jacobian)
    } else {
        converged.inverse_jacobian
    };
    solution.warm_start = WarmStart {
        tear_vector: converged.x,
        inverse_jacobian,
    };
    Ok(solution)
}

/// Converges the recycle from `start`: the chosen method first; where it fails, the
/// other from the same start (Wegstein is quick on smooth loops, Broyden surer where
/// a unit switches regime, as a coolant-limited precooler does), then a damped
/// substitution. All failing is the first method's error. Broyden starts from
/// `inverse_jacobian` where one is given.
fn converge_from(
    problem: &mut Problem,
    method: Method,
    start: Vec<f64>,
    inverse_jacobian: Option<&[f64]>,
    tolerance: f64,
    cap: usize,
    describe: &dyn Fn(usize) -> String,
) -> Result<converge::Converged> {
    let run = |problem: &mut Problem, method: Method, start: Vec<f64>| match method {
        Method::Wegstein => converge::wegstein(problem, start, tolerance, cap, describe),
        Method::Broyden => {
            converge::broyden(problem, start, inverse_jacobian, tolerance, cap, describe)
        }
    };
    match run(problem, method, start.clone()) {
        Ok(c) => Ok(c),
        Err(first @ Error::NoConvergence { .. }) => {
            let other = match method {
                Method::Wegstein => Method::Broyden,
                Method::Broyden => Method::Wegstein,
            };
            match run(problem, other, start.clone()) {
                Ok(c) => Ok(c),
                // Last, a damped substitution from the same start.
                Err(_) => converge::damped(problem, start, 0.3, tolerance, 2 * cap, describe)
                    .map_err(|_| first),
            }
        }
        Err(e) => Err(e),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// An end pinch is taken from its end flash on the passes after (the detailed
    /// pass checks it); an inside pinch is searched for near where it lay for a few
    /// passes, then looked for everywhere again: on whole profiles where it lay
    /// inside, by trying the ends first where it lay at one.
    #[test]
    fn pinch_places_give_their_hints() {
        let place = |at_end, passes| PinchPlace {
            at_end,
            passes,
            position: Some(0.4),
        };
        assert_eq!(place(true, 0).hint(), PinchHint::End);
        assert_eq!(place(true, 9).hint(), PinchHint::End);
        assert_eq!(place(false, 0).hint(), PinchHint::Inside);
        assert_eq!(place(false, HINTED_PASSES - 1).hint(), PinchHint::Inside);
        assert_eq!(place(false, HINTED_PASSES).hint(), PinchHint::Whole);
        // Lately at an end of the profile by the search, or without a position
        // (a two-stream exchanger): the ends are tried again.
        for position in [Some(0.0), Some(1.0), None] {
            let place = PinchPlace {
                position,
                ..place(false, HINTED_PASSES)
            };
            assert_eq!(place.hint(), PinchHint::Check);
        }
        // The detailed pass: whole profiles for a pinch strictly inside, else the
        // ends first; untrusted hints give none.
        assert_eq!(
            pass_hint(Some(place(false, 0)), true, true),
            PinchHint::Whole
        );
        assert_eq!(
            pass_hint(Some(place(true, 0)), true, true),
            PinchHint::Check
        );
        assert_eq!(pass_hint(None, true, true), PinchHint::Check);
        assert_eq!(
            pass_hint(Some(place(false, 0)), false, false),
            PinchHint::Check
        );
        assert_eq!(
            pass_hint(Some(place(false, 0)), false, true),
            PinchHint::Inside
        );
    }

    /// Hints that every pinch lies at an end, given to settled passes of the
    /// nitrogen Claude demo started from its converged tear streams: its
    /// exchangers' pinches do not all lie at an end, so the passes take wrong
    /// duties, and with no coarse pass to correct them they converge to a wrong
    /// point. The detailed pass finds that the pinches moved, and the recycle
    /// converges again without hints: the answer is the one solved without hints,
    /// to 1e-9, in more passes.
    #[test]
    fn wrong_pinch_hints_do_not_change_the_answer() {
        let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("flowsheets")
            .join("nitrogen-claude.yaml");
        let plant = crate::flowsheet::load(&path, &[]).unwrap();
        let reference = solve(&plant, &Options::default()).unwrap();
        let wrong = FirstPass {
            pinch_places: Some(vec![
                Some(PinchPlace {
                    at_end: true,
                    passes: 0,
                    position: None,
                });
                plant.units.len()
            ]),
            settled: true,
        };
        let options = Options {
            warm_start: Some(WarmStart {
                tear_vector: reference.warm_start.tear_vector.clone(),
                inverse_jacobian: None,
            }),
            ..Options::default()
        };
        let hinted = solve_from(&plant, &options, wrong).unwrap();
        let without = solve(&plant, &options).unwrap();
        assert!(
            hinted.iterations > without.iterations,
            "{} passes with wrong hints, {} without: the check did not converge again",
            hinted.iterations,
            without.iterations
        );
        let (a, b) = (&hinted.summary, &reference.summary);
        for (name, x, y) in [
            ("yield", a.liquid_yield.unwrap(), b.liquid_yield.unwrap()),
            ("shaft power", a.shaft_power, b.shaft_power),
            ("exergy destroyed", a.exergy_destroyed, b.exergy_destroyed),
        ] {
            assert!(
                (x - y).abs() <= 1e-9 * y.abs(),
                "{name}: {x} with wrong hints, {y} without"
            );
        }
    }
}
