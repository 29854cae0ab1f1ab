//! A two-stream counterflow heat exchanger, resolved along its duty on equal
//! segments so that an internal pinch is found with real-fluid heat capacities.
//!
//! Position along the exchanger is the duty transferred from the warm end (where the
//! hot stream enters and the cold stream leaves). Pressures fall linearly along each
//! side; a heat leak from ambient warms the cold stream evenly along its length.

use super::kind::{less_drop, Coupling, EquipmentKind, Ports, Reader};
use super::{Context, Details, Equipment, Flow, Performance};
use crate::error::{Error, FlowsheetError, Result};
use crate::fluids::conversion::StreamPath;
use crate::fluids::State;
use crate::numeric::bracketed_root;
use crate::quantity::Dimension;

/// How an exchanger's duty is fixed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ExchangerSpec {
    /// The smallest temperature difference anywhere along the exchanger, K.
    MinimumApproach(f64),
    /// Hot inlet minus cold outlet temperature, K.
    WarmEndApproach(f64),
    /// Hot outlet minus cold inlet temperature, K.
    ColdEndApproach(f64),
    /// Duty over the largest duty the two streams allow.
    Effectiveness(f64),
    /// Conductance UA, W/K.
    Conductance(f64),
}

/// Secant steps tried from the previous pass's duty before the bracketed search.
const SECANT_STEPS: usize = 8;

/// A two-stream exchanger's parameters.
#[derive(Debug, Clone, Copy)]
pub struct Exchanger {
    /// Duty specification.
    pub spec: ExchangerSpec,
    /// Pa.
    pub hot_pressure_drop: f64,
    /// Pa.
    pub cold_pressure_drop: f64,
    /// W into the cold stream.
    pub heat_leak: f64,
    /// Number of segments.
    pub segments: usize,
    /// The side that carries an ortho–para catalyst, if any.
    pub catalyst: Option<CatalystSide>,
}

/// Which side of an exchanger carries an ortho–para catalyst.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CatalystSide {
    /// The hot (cooled) side.
    Hot,
    /// The cold (warmed) side.
    Cold,
    /// Both sides.
    Both,
}

impl CatalystSide {
    fn hot(side: Option<CatalystSide>) -> bool {
        matches!(side, Some(CatalystSide::Hot | CatalystSide::Both))
    }

    fn cold(side: Option<CatalystSide>) -> bool {
        matches!(side, Some(CatalystSide::Cold | CatalystSide::Both))
    }
}

impl EquipmentKind for Exchanger {
    const NAME: &'static str = "exchanger";
    const KEYS: &'static [&'static str] = &[
        "hot",
        "cold",
        "minimum_approach",
        "warm_end_approach",
        "cold_end_approach",
        "effectiveness",
        "ua",
        "hot_pressure_drop",
        "cold_pressure_drop",
        "heat_leak",
        "segments",
        "catalyst",
    ];
    const ALTERNATIVE_KEYS: &'static [&'static str] = &[
        "minimum_approach",
        "warm_end_approach",
        "cold_end_approach",
        "effectiveness",
        "ua",
    ];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        use Dimension::*;
        use ExchangerSpec as Spec;
        let approach = |key| r.quantity_opt(key, TemperatureDifference, 0.0, 500.0);
        let effectiveness = r.quantity_opt("effectiveness", Fraction, 0.0, 1.0);
        let options = [
            ("minimum_approach", approach("minimum_approach")?.map(Spec::MinimumApproach)),
            ("warm_end_approach", approach("warm_end_approach")?.map(Spec::WarmEndApproach)),
            ("cold_end_approach", approach("cold_end_approach")?.map(Spec::ColdEndApproach)),
            ("effectiveness", effectiveness?.map(Spec::Effectiveness)),
            ("ua", r.quantity_opt("ua", Conductance, 0.0, 1e12)?.map(Spec::Conductance)),
        ];
        let given: Vec<(&str, ExchangerSpec)> = options
            .iter()
            .filter_map(|(key, spec)| spec.map(|s| (*key, s)))
            .collect();
        let spec = match given.as_slice() {
            [(_, spec)] => *spec,
            [] => return Err(r.error("kind", NO_SPECIFICATION)),
            many => {
                let keys: Vec<&str> = many.iter().map(|(k, _)| *k).collect();
                return Err(r.error(
                    many[1].0,
                    format!(
                        "an exchanger takes one duty specification, but {} are given: {}",
                        many.len(),
                        keys.join(", ")
                    ),
                ));
            }
        };
        r.inlet("hot-in", "hot")?;
        r.inlet("cold-in", "cold")?;
        Ok(Exchanger {
            spec,
            hot_pressure_drop: r.pressure_drop("hot_pressure_drop")?,
            cold_pressure_drop: r.pressure_drop("cold_pressure_drop")?,
            heat_leak: r.heat_leak()?,
            segments: r.whole_opt("segments", 10, 5000)?.unwrap_or(r.default_segments),
            catalyst: match r.choice(
                "catalyst",
                "a catalyst side",
                &["none", "hot", "cold", "both"],
            )? {
                1 => Some(CatalystSide::Hot),
                2 => Some(CatalystSide::Cold),
                3 => Some(CatalystSide::Both),
                _ => None,
            },
        })
    }
}

const NO_SPECIFICATION: &str = "an exchanger needs exactly one of minimum_approach, warm_end_approach, cold_end_approach, effectiveness or ua ";

impl Equipment for Exchanger {
    fn ports(&self) -> Ports {
        Ports {
            inlets: vec!["hot-in", "cold-in"],
            outlets: vec!["hot-out", "cold-out"],
        }
    }

    fn coupling(&self) -> Coupling {
        Coupling::Sides
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        vec![
            less_drop(inlets[0], self.hot_pressure_drop),
            less_drop(inlets[1], self.cold_pressure_drop),
        ]
    }

    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        exchange(&inlets[0], &inlets[1], self, context)
    }
}

/// One point of the temperature–duty profile.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProfilePoint {
    /// Duty transferred from the warm end to here, W.
    pub duty: f64,
    /// Hot-stream temperature, K.
    pub hot_temperature: f64,
    /// Cold-stream temperature, K.
    pub cold_temperature: f64,
}

/// The exchanger's results.
#[derive(Debug, Clone, PartialEq)]
pub struct ExchangerReport {
    /// Conductance UA = Σ dQ/ΔT_lm over the segments, W/K (infinite at a pinch of 0).
    pub ua: f64,
    /// Duty over the largest duty the streams allow (pinch of zero).
    pub effectiveness: f64,
    /// The largest duty the streams allow, W.
    pub max_duty: f64,
    /// The smallest hot-minus-cold temperature difference anywhere, K.
    pub min_approach: f64,
    /// Where it occurs, as the fraction of the duty from the warm end (0 warm, 1 cold).
    pub min_approach_position: f64,
    /// Hot inlet minus cold outlet temperature, K.
    pub warm_end_approach: f64,
    /// Hot outlet minus cold inlet temperature, K.
    pub cold_end_approach: f64,
    /// The temperature–duty profile, warm end first.
    pub profile: Vec<ProfilePoint>,
    /// The duty specification asked for.
    pub specified: ExchangerSpec,
    /// The specified quantity as delivered (K for approaches, a fraction for
    /// effectiveness, W/K for UA).
    pub delivered: f64,
    /// Whether the delivered value meets the specification (approaches within
    /// [`APPROACH_TOLERANCE`], effectiveness and UA within 1e-6 relative).
    pub specification_met: bool,
}

/// How far a delivered approach may differ from the one specified and still meet
/// it, K.
pub const APPROACH_TOLERANCE: f64 = 1e-3;

/// Below this smallest temperature difference, K, the pinch is taken as zero and the
/// conductance as unbounded.
pub const ZERO_PINCH: f64 = 1e-6;

impl ExchangerSpec {
    /// The specification in words, with its value.
    pub fn describe(&self) -> String {
        match *self {
            ExchangerSpec::MinimumApproach(dt) => format!("a minimum approach of {dt:.3} K"),
            ExchangerSpec::WarmEndApproach(dt) => format!("a warm-end approach of {dt:.3} K"),
            ExchangerSpec::ColdEndApproach(dt) => format!("a cold-end approach of {dt:.3} K"),
            ExchangerSpec::Effectiveness(e) => format!("an effectiveness of {e:.6}"),
            ExchangerSpec::Conductance(ua) => format!("a UA of {:.4} kW/K", ua / 1e3),
        }
    }

    /// The value asked for.
    pub fn value(&self) -> f64 {
        match *self {
            ExchangerSpec::MinimumApproach(v)
            | ExchangerSpec::WarmEndApproach(v)
            | ExchangerSpec::ColdEndApproach(v)
            | ExchangerSpec::Effectiveness(v)
            | ExchangerSpec::Conductance(v) => v,
        }
    }
}

struct Sides<'a> {
    hot: &'a Flow,
    cold: &'a Flow,
    design: &'a Exchanger,
    /// The states the hot side passes through (over a catalyst or frozen).
    hot_path: StreamPath,
    /// The states the cold side passes through.
    cold_path: StreamPath,
}

impl Sides<'_> {
    fn hot_outlet_pressure(&self) -> f64 {
        self.hot.state.pressure - self.design.hot_pressure_drop
    }

    fn cold_outlet_pressure(&self) -> f64 {
        self.cold.state.pressure - self.design.cold_pressure_drop
    }

    /// The profile at duty `q`, warm end (index 0) to cold end, with the states of
    /// both streams at each segment boundary.
    fn profile(&self, q: f64) -> Result<Vec<(f64, State, State)>> {
        let n = self.design.segments.max(1);
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        let (mh, mc) = (self.hot.flow, self.cold.flow);
        let leak = self.design.heat_leak;
        let mut hot_states = Vec::with_capacity(n + 1);
        hot_states.push(hot.clone());
        for k in 1..=n {
            let f = k as f64 / n as f64;
            let p = hot.pressure - self.design.hot_pressure_drop * f;
            let h = hot.enthalpy - q * f / mh;
            let previous = &hot_states[k - 1];
            hot_states.push(self.hot_path.state(p, h, previous)?);
        }
        let mut cold_states: Vec<State> = Vec::with_capacity(n + 1);
        cold_states.push(cold.clone());
        for k in (0..n).rev() {
            let f = k as f64 / n as f64;
            // From the cold end (k = n) towards the warm end (k = 0).
            let along = 1.0 - f;
            let p = cold.pressure - self.design.cold_pressure_drop * along;
            let h = cold.enthalpy + (q + leak) * along / mc;
            let previous = cold_states.last().unwrap_or(cold);
            let state = self.cold_path.state(p, h, previous)?;
            cold_states.push(state);
        }
        cold_states.reverse();
        Ok((0..=n)
            .map(|k| {
                (
                    q * k as f64 / n as f64,
                    hot_states[k].clone(),
                    cold_states[k].clone(),
                )
            })
            .collect())
    }

    /// The hot-minus-cold temperature difference at position `f` (0 at the warm end,
    /// 1 at the cold end) for duty `q`, flashing both sides from the given neighbours.
    fn difference_at(&self, q: f64, f: f64, near: &(f64, State, State)) -> Result<f64> {
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        let hot_state = self.hot_path.state(
            hot.pressure - self.design.hot_pressure_drop * f,
            hot.enthalpy - q * f / self.hot.flow,
            &near.1,
        )?;
        let along = 1.0 - f;
        let cold_state = self.cold_path.state(
            cold.pressure - self.design.cold_pressure_drop * along,
            cold.enthalpy + (q + self.design.heat_leak) * along / self.cold.flow,
            &near.2,
        )?;
        Ok(hot_state.temperature - cold_state.temperature)
    }

    /// The smallest temperature difference for duty `q` and where it lies (fraction
    /// of the duty from the warm end): the smallest at the profile's nodes, then
    /// refined between the neighbouring nodes by successive parabolic interpolation,
    /// since an internal pinch can fall between nodes.
    fn min_approach(&self, q: f64) -> Result<(f64, f64)> {
        let profile = self.profile(q)?;
        refined_minimum(&profile, |f, near| self.difference_at(q, f, near))
    }

    /// The duty at which either outlet would reach the other stream's inlet
    /// temperature: an upper bound on any duty.
    fn end_limited_duty(&self) -> Result<f64> {
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        if hot.temperature <= cold.temperature {
            return Ok(0.0);
        }
        let hot_fluid = hot.fluid();
        let cold_fluid = cold.fluid();
        // Neither outlet may leave its fluid's range: the hot one not into the solid.
        let coldest_hot = hot_fluid
            .melting_temperature(self.hot_outlet_pressure())
            .unwrap_or(hot_fluid.temperature_min)
            .max(hot_fluid.temperature_min)
            * (1.0 + 1e-6);
        let t_cold = cold.temperature.max(coldest_hot);
        let t_hot = hot.temperature.min(cold_fluid.temperature_max);
        let hot_limit = self.hot.flow
            * (hot.enthalpy
                - self
                    .hot_path
                    .state_at(t_cold, self.hot_outlet_pressure())?
                    .enthalpy);
        let cold_limit = self.cold.flow
            * (self
                .cold_path
                .state_at(t_hot, self.cold_outlet_pressure())?
                .enthalpy
                - cold.enthalpy)
            - self.design.heat_leak;
        Ok(hot_limit.min(cold_limit).max(0.0))
    }

    /// The largest duty: where the smallest temperature difference reaches zero.
    fn max_duty(&self, upper: f64) -> Result<f64> {
        if upper <= 0.0 {
            return Ok(0.0);
        }
        let (at_upper, _) = self.min_approach(upper)?;
        if at_upper >= 0.0 {
            return Ok(upper);
        }
        bracketed_root(
            "exchanger largest duty (zero pinch)",
            |q| self.min_approach(q).map(|m| m.0).unwrap_or(f64::NAN),
            0.0,
            upper,
            1e-12 * upper,
        )
    }

    fn ua(&self, q: f64) -> Result<f64> {
        let profile = self.profile(q)?;
        let mut ua = 0.0;
        for pair in profile.windows(2) {
            let a = pair[0].1.temperature - pair[0].2.temperature;
            let b = pair[1].1.temperature - pair[1].2.temperature;
            if a <= 0.0 || b <= 0.0 {
                return Ok(f64::INFINITY);
            }
            let lmtd = if (a - b).abs() < 1e-9 * a {
                0.5 * (a + b)
            } else {
                (a - b) / (a / b).ln()
            };
            ua += (pair[1].0 - pair[0].0) / lmtd;
        }
        Ok(ua)
    }
}

/// Steps of the parabolic refinement of the smallest temperature difference.
const REFINE_STEPS: usize = 12;

/// The refinement stops when the smallest difference changes by less than this, K
/// (well inside the 1 mK the reported minimum approach is held to).
const REFINE_TOLERANCE: f64 = 1e-6;

/// The smallest hot-minus-cold difference along `profile` and its position (0 warm,
/// 1 cold), refined between the nodes around the smallest node by successive
/// parabolic interpolation of `difference(position, nearest node)`.
fn refined_minimum(
    profile: &[(f64, State, State)],
    difference: impl Fn(f64, &(f64, State, State)) -> Result<f64>,
) -> Result<(f64, f64)> {
    let n = profile.len() - 1;
    let node = |k: usize| profile[k].1.temperature - profile[k].2.temperature;
    let position = |k: usize| k as f64 / n.max(1) as f64;
    let (mut fb, i) = (0..=n)
        .map(|k| (node(k), k))
        .fold((f64::INFINITY, 0), |a, b| if b.0 < a.0 { b } else { a });
    if n < 2 {
        return Ok((fb, position(i)));
    }
    // Three nodes around the smallest (at an end, the end three).
    let centre = i.clamp(1, n - 1);
    let (mut a, mut b, mut c) = (position(centre - 1), position(i), position(centre + 1));
    let (mut fa, mut fc) = (node(centre - 1), node(centre + 1));
    if i == 0 || i == n {
        // At an end, the smallest lies inside only if the parabola through the end
        // three has its vertex in the end segment.
        let (x0, x1, x2) = (a, position(centre), c);
        let (y0, y1, y2) = (fa, node(centre), fc);
        match parabola_vertex((x0, y0), (x1, y1), (x2, y2)) {
            Some(x) if i == 0 && x > x0 && x < x1 => {
                (a, b, c, fa, fc) = (x0, x0, x1, y0, y1);
            }
            Some(x) if i == n && x > x1 && x < x2 => {
                (a, b, c, fa, fc) = (x1, x2, x2, y1, y2);
            }
            _ => return Ok((fb, b)),
        }
    }
    let nearest = |x: f64| &profile[((x * n as f64).round() as usize).min(n)];
    for _ in 0..REFINE_STEPS {
        let Some(x) = parabola_vertex((a, fa), (b, fb), (c, fc)) else {
            break;
        };
        if !(x > a && x < c) || (x - b).abs() <= 1e-9 * (c - a) {
            break;
        }
        let fx = difference(x, nearest(x))?;
        let before = fb;
        if fx < fb {
            if x < b {
                (c, fc) = (b, fb);
            } else {
                (a, fa) = (b, fb);
            }
            (b, fb) = (x, fx);
        } else if x < b {
            (a, fa) = (x, fx);
        } else {
            (c, fc) = (x, fx);
        }
        if (before - fb).abs() < REFINE_TOLERANCE && fx >= before - REFINE_TOLERANCE {
            break;
        }
    }
    Ok((fb, b))
}

/// The abscissa of the vertex of the parabola through three points, where it has a
/// minimum (None for a maximum or a straight line).
fn parabola_vertex(p0: (f64, f64), p1: (f64, f64), p2: (f64, f64)) -> Option<f64> {
    let ((x0, y0), (x1, y1), (x2, y2)) = (p0, p1, p2);
    let numerator = (x1 - x0).powi(2) * (y1 - y2) - (x1 - x2).powi(2) * (y1 - y0);
    let denominator = (x1 - x0) * (y1 - y2) - (x1 - x2) * (y1 - y0);
    // The curvature's sign: a minimum needs the middle point below the chord.
    let chord = y0 + (y2 - y0) * (x1 - x0) / (x2 - x0);
    if !(denominator != 0.0 && y1 < chord) {
        return None;
    }
    Some(x1 - 0.5 * numerator / denominator)
}

/// A few secant steps on g from the previous pass's duty; `None` unless they settle
/// inside [0, upper] (the bracketed root then takes over).
fn secant_from(g: &dyn Fn(f64) -> f64, hint: f64, upper: f64) -> Option<f64> {
    let mut a = hint.clamp(0.0, upper);
    let mut b = (a * (1.0 - 1e-4)).max(0.0);
    if a == b {
        return None;
    }
    let (mut fa, mut fb) = (g(a), g(b));
    for _ in 0..SECANT_STEPS {
        if !(fa.is_finite() && fb.is_finite()) || fa == fb {
            return None;
        }
        let c = b - fb * (b - a) / (fb - fa);
        if !(0.0..=upper).contains(&c) {
            return None;
        }
        if (c - b).abs() <= 1e-12 * upper {
            return Some(c);
        }
        a = b;
        fa = fb;
        b = c;
        fb = g(c);
    }
    None
}

/// Solves the exchanger for its hot and cold inlets; the context's duty hint (the
/// last pass's duty) starts a duty search.
pub fn exchange(
    hot: &Flow,
    cold: &Flow,
    design: &Exchanger,
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let duty_hint = context.duty_hint;
    let unit = "exchanger";
    let sides = Sides {
        hot,
        cold,
        design,
        hot_path: StreamPath::new(&hot.state, CatalystSide::hot(design.catalyst), unit)?,
        cold_path: StreamPath::new(
            &cold.state,
            CatalystSide::cold(design.catalyst),
            unit,
        )?,
    };
    let (hot_material, cold_material) = (hot.state.material(), cold.state.material());
    let degenerate = !(hot.flow > 0.0 && cold.flow > 0.0);
    let upper = if degenerate {
        0.0
    } else {
        sides.end_limited_duty()?
    };
    let duty = match design.spec {
        _ if upper <= 0.0 => 0.0,
        ExchangerSpec::WarmEndApproach(dt) => {
            let out = sides.cold_path.state_at(
                (hot.state.temperature - dt).max(cold.state.temperature),
                sides.cold_outlet_pressure(),
            )?;
            (cold.flow * (out.enthalpy - cold.state.enthalpy) - design.heat_leak).clamp(0.0, upper)
        }
        ExchangerSpec::ColdEndApproach(dt) => {
            let out = sides.hot_path.state_at(
                (cold.state.temperature + dt).min(hot.state.temperature),
                sides.hot_outlet_pressure(),
            )?;
            (hot.flow * (hot.state.enthalpy - out.enthalpy)).clamp(0.0, upper)
        }
        ExchangerSpec::MinimumApproach(dt) => {
            let (at_zero, _) = sides.min_approach(0.0)?;
            if at_zero <= dt {
                0.0
            } else {
                let g = |q: f64| sides.min_approach(q).map(|m| m.0 - dt).unwrap_or(f64::NAN);
                match duty_hint.and_then(|hint| secant_from(&g, hint, upper)) {
                    Some(q) => q,
                    None => bracketed_root(
                        "exchanger duty for a minimum approach",
                        g,
                        0.0,
                        upper,
                        1e-12 * upper,
                    )?,
                }
            }
        }
        ExchangerSpec::Effectiveness(e) => e * sides.max_duty(upper)?,
        ExchangerSpec::Conductance(ua) => {
            let q_max = sides.max_duty(upper)?;
            let top = q_max * (1.0 - 1e-9);
            if sides.ua(top)? <= ua {
                top
            } else {
                bracketed_root(
                    "exchanger duty for a conductance",
                    |q| sides.ua(q).map(|v| v - ua).unwrap_or(f64::NAN),
                    0.0,
                    top,
                    1e-12 * q_max,
                )?
            }
        }
    };
    if !context.detailed && !degenerate {
        // Outlets only: no profile needed for this pass.
        let hot_out = sides.hot_path.state_ph(
            sides.hot_outlet_pressure(),
            hot.state.enthalpy - duty / hot.flow,
        )?;
        let cold_out = sides.cold_path.state_ph(
            sides.cold_outlet_pressure(),
            cold.state.enthalpy + (duty + design.heat_leak) / cold.flow,
        )?;
        let performance = Performance {
            heat_in: vec![(design.heat_leak, context.ambient)],
            duty: Some(duty),
            ..Performance::default()
        };
        return Ok((outlets(hot, cold, hot_out, cold_out), performance));
    }
    let profile = sides
        .profile(if degenerate { 0.0 } else { duty })
        .or_else(|e| {
            if degenerate {
                Ok(vec![(0.0, hot.state.clone(), cold.state.clone())])
            } else {
                Err(e)
            }
        })?;
    let (_, hot_out, _) = profile
        .last()
        .cloned()
        .ok_or_else(|| Error::Internal("empty exchanger profile".into()))?;
    let (_, _, cold_out) = profile
        .first()
        .cloned()
        .ok_or_else(|| Error::Internal("empty exchanger profile".into()))?;
    let hot_out = if degenerate {
        hot_material.state_ph(sides.hot_outlet_pressure(), hot.state.enthalpy)?
    } else {
        hot_out
    };
    let cold_out = if degenerate {
        cold_material.state_ph(
            sides.cold_outlet_pressure(),
            cold.state.enthalpy
                + if cold.flow > 0.0 {
                    design.heat_leak / cold.flow
                } else {
                    0.0
                },
        )?
    } else {
        cold_out
    };
    let points: Vec<ProfilePoint> = profile
        .iter()
        .map(|(q, h, c)| ProfilePoint {
            duty: *q,
            hot_temperature: h.temperature,
            cold_temperature: c.temperature,
        })
        .collect();
    let (min_approach, at) = if degenerate {
        let (d, i) = points
            .iter()
            .enumerate()
            .map(|(i, p)| (p.hot_temperature - p.cold_temperature, i))
            .fold((f64::INFINITY, 0), |a, b| if b.0 < a.0 { b } else { a });
        (d, i as f64 / (points.len().max(2) - 1) as f64)
    } else {
        refined_minimum(&profile, |f, near| sides.difference_at(duty, f, near))?
    };
    let max_duty = match design.spec {
        ExchangerSpec::Effectiveness(_) | ExchangerSpec::Conductance(_) => sides.max_duty(upper)?,
        _ if degenerate => 0.0,
        _ => sides.max_duty(upper)?,
    };
    let ua = if degenerate {
        0.0
    } else if min_approach <= ZERO_PINCH {
        f64::INFINITY
    } else {
        sides.ua(duty)?
    };
    let effectiveness = if max_duty > 0.0 { duty / max_duty } else { 0.0 };
    let warm_end_approach = hot.state.temperature - cold_out.temperature;
    let cold_end_approach = hot_out.temperature - cold.state.temperature;
    let (delivered, specification_met) = match design.spec {
        _ if degenerate => (0.0, true),
        ExchangerSpec::MinimumApproach(dt) => (
            min_approach,
            (min_approach - dt).abs() <= APPROACH_TOLERANCE,
        ),
        ExchangerSpec::WarmEndApproach(dt) => (
            warm_end_approach,
            (warm_end_approach - dt).abs() <= APPROACH_TOLERANCE,
        ),
        ExchangerSpec::ColdEndApproach(dt) => (
            cold_end_approach,
            (cold_end_approach - dt).abs() <= APPROACH_TOLERANCE,
        ),
        ExchangerSpec::Effectiveness(e) => (effectiveness, (effectiveness - e).abs() <= 1e-6),
        ExchangerSpec::Conductance(asked) => (ua, (ua - asked).abs() <= 1e-6 * asked.max(1.0)),
    };
    let report = ExchangerReport {
        ua,
        effectiveness,
        max_duty,
        min_approach,
        min_approach_position: at,
        warm_end_approach,
        cold_end_approach,
        profile: points,
        specified: design.spec,
        delivered,
        specification_met,
    };
    let performance = Performance {
        heat_in: vec![(design.heat_leak, context.ambient)],
        duty: Some(duty),
        details: Details::Exchanger(Box::new(report)),
        ..Performance::default()
    };
    Ok((outlets(hot, cold, hot_out, cold_out), performance))
}

/// The two outlet flows, each side keeping its mass flow.
fn outlets(hot: &Flow, cold: &Flow, hot_out: State, cold_out: State) -> Vec<Flow> {
    vec![
        Flow {
            state: hot_out,
            flow: hot.flow,
        },
        Flow {
            state: cold_out,
            flow: cold.flow,
        },
    ]
}
