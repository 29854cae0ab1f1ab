//! A two-stream counterflow heat exchanger, resolved along its duty on equal
//! segments so that an internal pinch is found with real-fluid heat capacities.
//!
//! Position along the exchanger is the duty transferred from the warm end (where the
//! hot stream enters and the cold stream leaves). Pressures fall linearly along each
//! side; a heat leak from ambient warms the cold stream evenly along its length.

use super::kind::{less_drop, Coupling, EquipmentKind, Ports, Reader};
use super::pinch::{self, Pinch, PinchSearch};
use super::{Context, Details, Equipment, Flow, Performance};
use std::ops::ControlFlow;
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
    /// Outlet temperatures of all a multistream exchanger's streams but one.
    OutletTemperatures,
}

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
    /// Duty over the largest duty the streams allow (pinch of zero); NaN where the
    /// solve was asked to leave the largest duty out (`Options::skip_largest_duty`).
    pub effectiveness: f64,
    /// The largest duty the streams allow, W (NaN where left out, as above).
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
    /// A multistream exchanger's streams (empty for a two-stream exchanger, whose
    /// profile is its two streams').
    pub streams: Vec<super::multistream::StreamRecord>,
}

/// How far a delivered approach may differ from the one specified and still meet
/// it, K.
pub const APPROACH_TOLERANCE: f64 = 1e-3;

/// A coarse profile's smallest difference at zero duty this far above the target,
/// K, settles that some duty meets the target.
const ZERO_DUTY_MARGIN: f64 = 0.05;

/// Below this smallest temperature difference, K, the pinch is taken as zero and the
/// conductance as unbounded.
pub const ZERO_PINCH: f64 = 1e-6;

/// A smallest difference at the end-limited duty within this of zero, K, is zero
/// there (the end's two temperatures come from different flashes, which agree to
/// about 1e-12 K): that duty is the largest.
const ZERO_AT_LIMIT: f64 = 1e-9;

impl ExchangerSpec {
    /// The specification in words, with its value.
    pub fn describe(&self) -> String {
        match *self {
            ExchangerSpec::MinimumApproach(dt) => format!("a minimum approach of {dt:.3} K"),
            ExchangerSpec::WarmEndApproach(dt) => format!("a warm-end approach of {dt:.3} K"),
            ExchangerSpec::ColdEndApproach(dt) => format!("a cold-end approach of {dt:.3} K"),
            ExchangerSpec::Effectiveness(e) => format!("an effectiveness of {e:.6}"),
            ExchangerSpec::Conductance(ua) => format!("a UA of {:.4} kW/K", ua / 1e3),
            ExchangerSpec::OutletTemperatures => {
                "outlet temperatures for all streams but one".to_string()
            }
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
            ExchangerSpec::OutletTemperatures => f64::NAN,
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

/// A two-stream profile: the duty from the warm end and both streams' states at
/// each node.
type TwoStreamProfile = Vec<(f64, State, State)>;

impl PinchSearch for Sides<'_> {
    type Profile = TwoStreamProfile;

    fn segments(&self) -> usize {
        self.design.segments
    }

    fn pinch_on(&self, q: f64, segments: usize) -> Result<Pinch<TwoStreamProfile>> {
        let profile = self.profile_on(q, segments)?;
        let n = profile.len() - 1;
        let positions: Vec<f64> = (0..=n).map(|k| k as f64 / n.max(1) as f64).collect();
        let differences: Vec<f64> = profile
            .iter()
            .map(|(_, h, c)| h.temperature - c.temperature)
            .collect();
        let (difference, position) = pinch::refined_minimum(&positions, &differences, |f, k| {
            self.difference_at(q, f, &profile[k])
        })?;
        Ok(Pinch {
            duty: q,
            difference,
            position,
            profile,
        })
    }

    /// By central differences at the pinch's position.
    fn pinch_slope(&self, pinch: &Pinch<TwoStreamProfile>) -> Result<f64> {
        let n = pinch.profile.len() - 1;
        let near = &pinch.profile[((pinch.position * n as f64).round() as usize).min(n)];
        let step = (1e-6 * pinch.duty).max(1e-9);
        let above = self.difference_at(pinch.duty + step, pinch.position, near)?;
        let below = self.difference_at(pinch.duty - step, pinch.position, near)?;
        Ok((above - below) / (2.0 * step))
    }

    /// Warm end: the cold outlet at the hot inlet's temperature less `target`; cold
    /// end: the hot outlet at the cold inlet's temperature plus `target`.
    fn end_duties(&self, target: f64) -> [Option<f64>; 2] {
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        [
            self.duty_for_cold_outlet(hot.temperature - target).ok(),
            self.duty_for_hot_outlet(cold.temperature + target).ok(),
        ]
    }
}

impl Sides<'_> {
    /// The duty at which the cold stream leaves at `temperature`, W.
    fn duty_for_cold_outlet(&self, temperature: f64) -> Result<f64> {
        let out = self
            .cold_path
            .state_at(temperature, self.cold_outlet_pressure())?;
        Ok(self.cold.flow * (out.enthalpy - self.cold.state.enthalpy) - self.design.heat_leak)
    }

    /// The duty at which the hot stream leaves at `temperature`, W.
    fn duty_for_hot_outlet(&self, temperature: f64) -> Result<f64> {
        let out = self
            .hot_path
            .state_at(temperature, self.hot_outlet_pressure())?;
        Ok(self.hot.flow * (self.hot.state.enthalpy - out.enthalpy))
    }

    /// The smallest difference at zero duty, on a coarse profile when that is
    /// clearly above `target` (it only decides whether any duty meets the target
    /// and gives the search's first guess), else on the full profile.
    fn difference_at_zero_duty(&self, target: f64) -> Result<f64> {
        let coarse = self.design.segments / 5;
        if coarse >= 8 {
            let at_zero = self.pinch_on(0.0, coarse)?.difference;
            if at_zero > target + ZERO_DUTY_MARGIN {
                return Ok(at_zero);
            }
        }
        Ok(self.pinch(0.0)?.difference)
    }

    fn hot_outlet_pressure(&self) -> f64 {
        self.hot.state.pressure - self.design.hot_pressure_drop
    }

    fn cold_outlet_pressure(&self) -> f64 {
        self.cold.state.pressure - self.design.cold_pressure_drop
    }

    /// The profile at duty `q`, warm end (index 0) to cold end, with the states of
    /// both streams at each segment boundary.
    fn profile(&self, q: f64) -> Result<Vec<(f64, State, State)>> {
        self.profile_on(q, self.design.segments)
    }

    /// The profile at duty `q` on `segments` equal segments, each state flashed
    /// from its neighbour towards the stream's inlet.
    fn profile_on(&self, q: f64, segments: usize) -> Result<Vec<(f64, State, State)>> {
        let n = segments.max(1);
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        let (mh, mc) = (self.hot.flow, self.cold.flow);
        let leak = self.design.heat_leak;
        let mut hot_states = Vec::with_capacity(n + 1);
        hot_states.push(hot.clone());
        for k in 1..=n {
            let f = k as f64 / n as f64;
            let p = hot.pressure - self.design.hot_pressure_drop * f;
            let h = hot.enthalpy - q * f / mh;
            let state = self.hot_path.state_along(p, h, &hot_states)?;
            hot_states.push(state);
        }
        let mut cold_states: Vec<State> = Vec::with_capacity(n + 1);
        cold_states.push(cold.clone());
        for k in (0..n).rev() {
            let f = k as f64 / n as f64;
            // From the cold end (k = n) towards the warm end (k = 0).
            let along = 1.0 - f;
            let p = cold.pressure - self.design.cold_pressure_drop * along;
            let h = cold.enthalpy + (q + leak) * along / mc;
            let state = self.cold_path.state_along(p, h, &cold_states)?;
            cold_states.push(state);
        }
        cold_states.reverse();
        Ok(hot_states
            .into_iter()
            .zip(cold_states)
            .enumerate()
            .map(|(k, (h, c))| (q * k as f64 / n as f64, h, c))
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

    /// The smallest temperature difference for duty `q`, where it lies (fraction
    /// of the duty from the warm end) and the profile it was found on.
    fn pinch(&self, q: f64) -> Result<Pinch<TwoStreamProfile>> {
        self.pinch_on(q, self.design.segments)
    }

    /// The duty at which either outlet would reach the other stream's inlet
    /// temperature: an upper bound on any duty.
    fn end_limited_duty(&self) -> Result<f64> {
        let Some((t_cold, t_hot)) = self.end_limits() else {
            return Ok(0.0);
        };
        let hot_limit = self.duty_for_hot_outlet(t_cold)?;
        let cold_limit = self.duty_for_cold_outlet(t_hot)?;
        Ok(hot_limit.min(cold_limit).max(0.0))
    }

    /// The duty an end-approach specification asks for, before any cap: the cold
    /// outlet at the hot inlet's temperature less the approach (warm end), or the
    /// hot outlet at the cold inlet's plus it (cold end), neither past the other
    /// inlet. `None` for another specification.
    fn end_approach_duty(&self) -> Option<Result<f64>> {
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        match self.design.spec {
            ExchangerSpec::WarmEndApproach(dt) => Some(
                self.duty_for_cold_outlet((hot.temperature - dt).max(cold.temperature)),
            ),
            ExchangerSpec::ColdEndApproach(dt) => Some(
                self.duty_for_hot_outlet((cold.temperature + dt).min(hot.temperature)),
            ),
            _ => None,
        }
    }

    /// The temperatures that bound the outlets, (coldest hot outlet, warmest cold
    /// outlet): the other stream's inlet, and neither outlet out of its fluid's
    /// range (the hot one not into the solid). `None` where the hot inlet is no
    /// warmer than the cold one (no duty at all).
    fn end_limits(&self) -> Option<(f64, f64)> {
        let (hot, cold) = (&self.hot.state, &self.cold.state);
        if hot.temperature <= cold.temperature {
            return None;
        }
        let hot_fluid = hot.fluid();
        let cold_fluid = cold.fluid();
        let coldest_hot = hot_fluid
            .melting_temperature(self.hot_outlet_pressure())
            .unwrap_or(hot_fluid.temperature_min)
            .max(hot_fluid.temperature_min)
            * (1.0 + 1e-6);
        Some((
            cold.temperature.max(coldest_hot),
            hot.temperature.min(cold_fluid.temperature_max),
        ))
    }

    /// The largest duty: where the smallest temperature difference reaches zero
    /// (at `upper`, the end-limited duty, where the difference there is zero to
    /// [`ZERO_AT_LIMIT`]),
    /// searched from `start` (a duty already known to leave a positive difference),
    /// or from the straight line between zero duty and `upper` without one.
    fn max_duty(&self, upper: f64, start: Option<f64>) -> Result<f64> {
        if upper <= 0.0 {
            return Ok(0.0);
        }
        // At `upper` an outlet reaches the other inlet's temperature: the
        // difference there is zero but for the flashes' rounding, or positive.
        let at_upper = self.pinch(upper)?.difference;
        if at_upper >= -ZERO_AT_LIMIT {
            return Ok(upper);
        }
        let start = match start {
            Some(q) => q,
            None => {
                let at_zero = self.pinch(0.0)?.difference;
                upper * at_zero / (at_zero - at_upper)
            }
        };
        pinch::duty_for_difference(
            self,
            "exchanger largest duty (zero pinch)",
            0.0,
            start,
            (0.0, upper),
            false,
            (None, false),
        )
        .map(|(duty, _)| duty)
    }

    fn ua(&self, q: f64) -> Result<f64> {
        Ok(conductance(&self.profile(q)?))
    }
}

/// The conductance of a two-stream profile, W/K.
fn conductance(profile: &[(f64, State, State)]) -> f64 {
    pinch::conductance(
        profile
            .iter()
            .map(|(q, h, c)| (*q, h.temperature - c.temperature)),
    )
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
    // A converging pass with an end approach: the duty the approach asks for is the
    // answer unless an outlet would pass the other stream's inlet (the end-limited
    // duty then caps it), which the outlets themselves show; the end-limited duty's
    // two flashes are spent only then (the same duty and outlets either way).
    if !context.detailed && !degenerate {
        // (A duty that is not a number, or an error, goes the whole way, to fail as
        // it did.)
        let asked = match sides.end_approach_duty() {
            Some(Ok(duty)) if duty.is_finite() => Some(duty.max(0.0)),
            _ => None,
        };
        if let Some(duty) = asked {
            if let (Ok((hot_out, cold_out)), Some((coldest_hot, warmest_cold))) =
                (converging_outlets(&sides, duty, context), sides.end_limits())
            {
                if hot_out.temperature >= coldest_hot && cold_out.temperature <= warmest_cold {
                    return Ok(converging_result(
                        &sides,
                        duty,
                        hot_out,
                        cold_out,
                        None,
                        context.ambient,
                    ));
                }
            }
        }
    }
    let upper = if degenerate {
        0.0
    } else {
        sides.end_limited_duty()?
    };
    // The largest duty, where a specification needed it.
    let mut known_max = None;
    // Where the pinch was found (for the next pass's hint).
    let mut pinch_at_end = None;
    let duty = match design.spec {
        ExchangerSpec::OutletTemperatures => {
            return Err(Error::Internal(
                "a two-stream exchanger given outlet temperatures".into(),
            ))
        }
        _ if upper <= 0.0 => 0.0,
        ExchangerSpec::WarmEndApproach(_) | ExchangerSpec::ColdEndApproach(_) => sides
            .end_approach_duty()
            .unwrap_or(Ok(0.0))?
            .clamp(0.0, upper),
        ExchangerSpec::MinimumApproach(dt) => {
            let (duty, at_end) = minimum_approach_duty(&sides, dt, upper, duty_hint, context)?;
            pinch_at_end = Some(at_end);
            duty
        }
        ExchangerSpec::Effectiveness(e) => {
            let q_max = sides.max_duty(upper, None)?;
            known_max = Some(q_max);
            e * q_max
        }
        ExchangerSpec::Conductance(ua) => {
            let q_max = sides.max_duty(upper, None)?;
            known_max = Some(q_max);
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
        let (hot_out, cold_out) = converging_outlets(&sides, duty, context)?;
        return Ok(converging_result(
            &sides,
            duty,
            hot_out,
            cold_out,
            pinch_at_end,
            context.ambient,
        ));
    }
    let pinch = if degenerate {
        let profile = sides
            .profile(0.0)
            .unwrap_or_else(|_| vec![(0.0, hot.state.clone(), cold.state.clone())]);
        let (difference, i) = profile
            .iter()
            .enumerate()
            .map(|(i, (_, h, c))| (h.temperature - c.temperature, i))
            .fold((f64::INFINITY, 0), |a, b| if b.0 < a.0 { b } else { a });
        let position = i as f64 / (profile.len().max(2) - 1) as f64;
        Pinch {
            duty: 0.0,
            difference,
            position,
            profile,
        }
    } else {
        sides.pinch(duty)?
    };
    let (min_approach, at) = (pinch.difference, pinch.position);
    let profile = &pinch.profile;
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
    let max_duty = match known_max {
        Some(q_max) => q_max,
        None if degenerate => 0.0,
        None if !context.largest_duty => f64::NAN,
        None => sides.max_duty(upper, Some(duty))?,
    };
    let ua = if degenerate {
        0.0
    } else if min_approach <= ZERO_PINCH {
        f64::INFINITY
    } else {
        conductance(profile)
    };
    let effectiveness = if max_duty > 0.0 {
        duty / max_duty
    } else if max_duty.is_nan() {
        f64::NAN
    } else {
        0.0
    };
    let warm_end_approach = hot.state.temperature - cold_out.temperature;
    let cold_end_approach = hot_out.temperature - cold.state.temperature;
    let (delivered, specification_met) = match design.spec {
        _ if degenerate => (0.0, true),
        ExchangerSpec::OutletTemperatures => (min_approach, true),
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
        streams: Vec::new(),
    };
    let performance = Performance {
        heat_in: vec![(design.heat_leak, context.ambient)],
        duty: Some(duty),
        details: Details::Exchanger(Box::new(report)),
        pinch_at_end,
        ..Performance::default()
    };
    Ok((outlets(hot, cold, hot_out, cold_out), performance))
}

/// A converging pass's outlets for `duty` (no profile): each outlet's search starts
/// where the specification sets its temperature, else where it left on the last
/// pass.
fn converging_outlets(sides: &Sides, duty: f64, context: &Context) -> Result<(State, State)> {
    let (hot, cold, design) = (sides.hot, sides.cold, sides.design);
    let hot_guess = match design.spec {
        ExchangerSpec::ColdEndApproach(dt) => Some(cold.state.temperature + dt),
        _ => context.outlet_hints[0],
    };
    let cold_guess = match design.spec {
        ExchangerSpec::WarmEndApproach(dt) => Some(hot.state.temperature - dt),
        _ => context.outlet_hints[1],
    };
    let hot_out = outlet_state(
        &sides.hot_path,
        sides.hot_outlet_pressure(),
        hot.state.enthalpy - duty / hot.flow,
        hot_guess,
    )?;
    let cold_out = outlet_state(
        &sides.cold_path,
        sides.cold_outlet_pressure(),
        cold.state.enthalpy + (duty + design.heat_leak) / cold.flow,
        cold_guess,
    )?;
    Ok((hot_out, cold_out))
}

/// A converging pass's outlets and performance (duty and heat leak, no profile).
fn converging_result(
    sides: &Sides,
    duty: f64,
    hot_out: State,
    cold_out: State,
    pinch_at_end: Option<bool>,
    ambient: f64,
) -> (Vec<Flow>, Performance) {
    let performance = Performance {
        heat_in: vec![(sides.design.heat_leak, ambient)],
        duty: Some(duty),
        pinch_at_end,
        ..Performance::default()
    };
    (outlets(sides.hot, sides.cold, hot_out, cold_out), performance)
}

/// The duty at which the smallest difference is `dt` (at most `upper`), and whether
/// the pinch lies at an end: an end pinch first ([`pinch::hinted_end_pinch`]), else
/// the search, from the last pass's duty where there is one.
fn minimum_approach_duty(
    sides: &Sides,
    dt: f64,
    upper: f64,
    duty_hint: Option<f64>,
    context: &Context,
) -> Result<(f64, bool)> {
    let bound = match pinch::hinted_end_pinch(sides, dt, (0.0, upper), context)? {
        ControlFlow::Break(duty) => return Ok((duty, true)),
        ControlFlow::Continue(bound) => bound,
    };
    let at_zero = sides.difference_at_zero_duty(dt)?;
    if at_zero <= dt {
        return Ok((0.0, false));
    }
    // Without the last pass's duty, start where the difference would reach the
    // target if it fell linearly to zero at `upper`.
    let start = duty_hint.unwrap_or(upper * (at_zero - dt) / at_zero);
    let (duty, _) = pinch::duty_for_difference(
        sides,
        "exchanger duty for a minimum approach",
        dt,
        start,
        (0.0, bound),
        context.loose,
        (None, false),
    )?;
    Ok((duty, false))
}

/// An outlet's state on its path at (p, h), its search started at `guess` where
/// there is one.
fn outlet_state(path: &StreamPath, pressure: f64, enthalpy: f64, guess: Option<f64>) -> Result<State> {
    match guess {
        Some(guess) => path.state_ph_guessed(pressure, enthalpy, guess),
        None => path.state_ph(pressure, enthalpy),
    }
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
