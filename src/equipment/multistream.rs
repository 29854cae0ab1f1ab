//! A multistream (plate-fin) counterflow exchanger: any number of hot and cold
//! streams, each of its own fluid, with its own pressure drop and heat leak.
//!
//! The exchanger is treated through its composite curves: at each temperature the
//! hot streams passing it pool the heat they give, and the cold streams the heat they
//! take. Position along the exchanger is the heat exchanged from the warm end. A
//! stream's pressure falls linearly with the heat it has exchanged, and its heat
//! leak is spread in proportion to it, so that a stream running the whole length is
//! treated exactly as a side of the two-stream exchanger (`exchanger.rs`).
//!
//! Specification: the exchanger has as many degrees of freedom as streams less one
//! (the energy balance). Either every stream but one has an outlet temperature and
//! the last follows from the energy balance, or `minimum_approach` is given with
//! outlet temperatures for every stream but one hot and one cold, whose duties are
//! set by the pinch on the composite curves and the energy balance.

use super::exchanger::{ExchangerReport, ExchangerSpec, ProfilePoint, APPROACH_TOLERANCE};
use super::kind::{intern, Coupling, EquipmentKind, Ports, Reader};
use super::pinch::{self, Moving, Pinch, PinchSearch};
use super::{Context, Details, Equipment, Flow, Performance, PinchHint};
use std::ops::ControlFlow;
use crate::error::{Error, FlowsheetError, Result};
use crate::fluids::conversion::StreamPath;
use crate::fluids::State;
use crate::quantity::Dimension;

/// The most streams one multistream exchanger takes.
pub const MOST_STREAMS: usize = 12;

/// Which way a stream's heat flows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    /// Gives heat (cooled).
    Hot,
    /// Takes heat (warmed).
    Cold,
}

impl Side {
    /// `hot` or `cold`.
    pub fn word(self) -> &'static str {
        match self {
            Side::Hot => "hot",
            Side::Cold => "cold",
        }
    }
}

/// One stream through a multistream exchanger.
#[derive(Debug, Clone)]
pub struct StreamSpec {
    /// Its name, which is also its outlet port.
    pub name: &'static str,
    /// Its inlet port (`<name>-in`).
    pub inlet_port: &'static str,
    /// Hot or cold.
    pub side: Side,
    /// Outlet temperature asked for, K (`None` for a stream set by the balance or
    /// the pinch).
    pub outlet_temperature: Option<f64>,
    /// Pa.
    pub pressure_drop: f64,
    /// W into the stream from ambient.
    pub heat_leak: f64,
    /// Whether the stream's passage carries an ortho–para catalyst.
    pub catalyst: bool,
}

/// A multistream exchanger's parameters.
#[derive(Debug, Clone)]
pub struct MultistreamExchanger {
    /// The streams, in the order written.
    pub streams: Vec<StreamSpec>,
    /// The smallest temperature difference between the composite curves, K, when
    /// it sets two streams' duties.
    pub minimum_approach: Option<f64>,
    /// Segments of the composite curves' duty grid.
    pub segments: usize,
}

const STREAM_FIELDS: &[&str] = &[
    "name",
    "inlet",
    "side",
    "outlet_temperature",
    "pressure_drop",
    "heat_leak",
    "catalyst",
];

impl EquipmentKind for MultistreamExchanger {
    const NAME: &'static str = "multistream-exchanger";
    const KEYS: &'static [&'static str] = &["streams", "minimum_approach", "segments"];

    fn read(r: &mut Reader) -> std::result::Result<Self, FlowsheetError> {
        let entries = r.entries("streams")?.ok_or_else(|| {
            r.error(
                "streams",
                "'streams' is required: a list such as - {name: hp, inlet: compressor, side: hot}",
            )
        })?;
        if !(2..=MOST_STREAMS).contains(&entries.len()) {
            return Err(r.error(
                "streams",
                format!(
                    "a multistream exchanger takes 2 to {MOST_STREAMS} streams, not {}",
                    entries.len()
                ),
            ));
        }
        let mut streams: Vec<StreamSpec> = Vec::new();
        let mut inlets = Vec::new();
        for entry in &entries {
            let name = entry.text("name")?;
            let plain = !name.is_empty()
                && name
                    .chars()
                    .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_');
            if !plain {
                return Err(entry.error(
                    "name",
                    "a stream's name is its outlet port: letters, digits, '-' and '_' only",
                ));
            }
            if streams.iter().any(|s| s.name == name) {
                return Err(entry.error("name", format!("'{name}' names two streams")));
            }
            let side = match entry.text("side")?.as_str() {
                "hot" => Side::Hot,
                "cold" => Side::Cold,
                other => {
                    return Err(entry.error("side", format!("'{other}' is not a side; use hot or cold")))
                }
            };
            let inlet = entry.text("inlet")?;
            let spec = StreamSpec {
                name: intern(&name),
                inlet_port: intern(&format!("{name}-in")),
                side,
                outlet_temperature: entry.quantity_opt(
                    "outlet_temperature",
                    Dimension::Temperature,
                    1.0,
                    2000.0,
                )?,
                pressure_drop: entry
                    .quantity_opt("pressure_drop", Dimension::Pressure, 0.0, 1e8)?
                    .unwrap_or(0.0),
                heat_leak: entry
                    .quantity_opt("heat_leak", Dimension::Power, 0.0, 1e9)?
                    .unwrap_or(0.0),
                catalyst: entry.flag("catalyst")?,
            };
            entry.finish(STREAM_FIELDS)?;
            inlets.push((spec.inlet_port, inlet));
            streams.push(spec);
        }
        drop(entries);
        for (port, reference) in inlets {
            r.add_inlet(port, "streams", reference);
        }
        let minimum_approach =
            r.quantity_opt("minimum_approach", Dimension::TemperatureDifference, 0.0, 500.0)?;
        let segments = r.whole_opt("segments", 10, 5000)?.unwrap_or(r.default_segments);
        if let Some(message) = specification_problem(&streams, minimum_approach.is_some()) {
            return Err(r.error("streams", message));
        }
        Ok(MultistreamExchanger {
            streams,
            minimum_approach,
            segments,
        })
    }
}

/// What is wrong with the count of specifications, in words, or `None` when the
/// streams are specified exactly.
fn specification_problem(streams: &[StreamSpec], by_approach: bool) -> Option<String> {
    let n = streams.len();
    let hot = streams.iter().filter(|s| s.side == Side::Hot).count();
    if hot == 0 || hot == n {
        return Some(format!(
            "a multistream exchanger needs at least one hot and one cold stream; all {n} are {}",
            streams[0].side.word()
        ));
    }
    let free: Vec<&StreamSpec> = streams
        .iter()
        .filter(|s| s.outlet_temperature.is_none())
        .collect();
    let given = n - free.len() + usize::from(by_approach);
    let freedom = format!(
        "{n} streams leave {} degrees of freedom (one outlet each, less the energy balance), and {given} {} given ({} outlet temperature{}{})",
        n - 1,
        if given == 1 { "is" } else { "are" },
        n - free.len(),
        if n - free.len() == 1 { "" } else { "s" },
        if by_approach { " and minimum_approach" } else { "" }
    );
    let names = |list: &[&StreamSpec]| {
        list.iter()
            .map(|s| s.name)
            .collect::<Vec<_>>()
            .join(", ")
    };
    if given < n - 1 {
        return Some(format!(
            "{freedom}: the specification is short by {}; give outlet_temperature to all but one of {}{}",
            n - 1 - given,
            names(&free),
            if by_approach { " hot and one cold stream" } else { " (or minimum_approach)" }
        ));
    }
    if given > n - 1 {
        return Some(format!(
            "{freedom}: the specification is over-complete by {}; leave one stream's outlet_temperature out{}",
            given - (n - 1),
            if by_approach {
                " on each side (the pinch and the energy balance set those two)"
            } else {
                " (the energy balance sets it)"
            }
        ));
    }
    if by_approach && free[0].side == free[1].side {
        return Some(format!(
            "with minimum_approach, the two streams without an outlet temperature must be one hot and one cold, but {} are both {}",
            names(&free),
            free[0].side.word()
        ));
    }
    None
}

impl Equipment for MultistreamExchanger {
    fn ports(&self) -> Ports {
        Ports {
            inlets: self.streams.iter().map(|s| s.inlet_port).collect(),
            outlets: self.streams.iter().map(|s| s.name).collect(),
        }
    }

    fn coupling(&self) -> Coupling {
        Coupling::Sides
    }

    fn outlet_pressures(&self, inlets: &[Option<f64>]) -> Vec<Option<f64>> {
        self.streams
            .iter()
            .zip(inlets)
            .map(|(s, p)| p.map(|p| p - s.pressure_drop))
            .collect()
    }

    fn run(&self, inlets: &[Flow], context: &Context) -> Result<(Vec<Flow>, Performance)> {
        exchange(self, inlets, context)
    }
}

/// One stream with its inlet, as the model sees it.
struct Member<'a> {
    spec: &'a StreamSpec,
    inlet: &'a Flow,
    path: StreamPath,
}

impl Member<'_> {
    fn hot(&self) -> bool {
        self.spec.side == Side::Hot
    }

    /// The outlet pressure, Pa.
    fn outlet_pressure(&self) -> f64 {
        self.inlet.state.pressure - self.spec.pressure_drop
    }

    /// The enthalpy after exchanging `e` of a duty `q`, J/kg: the heat exchanged plus
    /// the leak's share, spread in proportion.
    fn enthalpy_after(&self, e: f64, q: f64) -> f64 {
        let m = self.inlet.flow;
        let leak = self.spec.heat_leak;
        let h = self.inlet.state.enthalpy;
        if q <= 0.0 {
            return h + leak / m;
        }
        if self.hot() {
            h - e * (q - leak) / q / m
        } else {
            h + e * (q + leak) / q / m
        }
    }

    /// The pressure after exchanging `e` of `q`, Pa.
    fn pressure_after(&self, e: f64, q: f64) -> f64 {
        let fraction = if q > 0.0 { e / q } else { 1.0 };
        self.inlet.state.pressure - self.spec.pressure_drop * fraction
    }

    /// The exchanged duty for an outlet at `temperature`, W.
    fn duty_for_outlet(&self, temperature: f64) -> Result<f64> {
        let out = self.path.state_at(temperature, self.outlet_pressure())?;
        let m = self.inlet.flow;
        let change = m * (out.enthalpy - self.inlet.state.enthalpy);
        Ok(if self.hot() {
            -change + self.spec.heat_leak
        } else {
            change - self.spec.heat_leak
        })
    }

    /// The largest duty the stream can exchange without passing `temperature` (the
    /// other side's extreme inlet temperature), W.
    fn duty_limit(&self, temperature: f64) -> Result<f64> {
        let fluid = self.inlet.state.fluid();
        let t = if self.hot() {
            let coldest = fluid
                .melting_temperature(self.outlet_pressure())
                .unwrap_or(fluid.temperature_min)
                .max(fluid.temperature_min)
                * (1.0 + 1e-6);
            temperature.max(coldest)
        } else {
            temperature.min(fluid.temperature_max)
        };
        Ok(self.duty_for_outlet(t)?.max(0.0))
    }
}

/// One stream's part in a composite curve at set duties.
struct Curve<'m, 'a> {
    member: &'m Member<'a>,
    /// Its exchanged duty, W.
    duty: f64,
    /// Inlet and outlet temperatures, K.
    inlet_temperature: f64,
    outlet_temperature: f64,
}

impl Curve<'_, '_> {
    fn warm(&self) -> f64 {
        self.inlet_temperature.max(self.outlet_temperature)
    }

    fn cold(&self) -> f64 {
        self.inlet_temperature.min(self.outlet_temperature)
    }

    /// The state after exchanging `e`, flashed from `near` when given.
    fn state_after(&self, e: f64, near: Option<&State>) -> Result<State> {
        let p = self.member.pressure_after(e, self.duty);
        let h = self.member.enthalpy_after(e, self.duty);
        match near {
            Some(near) => self.member.path.state(p, h, near),
            None => self.member.path.state_ph(p, h),
        }
    }

    /// The heat this stream accounts for on its composite, counted from the warm
    /// end, when the composite is at `temperature`: for a hot stream what it has
    /// given cooling to there, for a cold stream what it takes above there.
    fn share_at(&self, temperature: f64) -> Result<f64> {
        if temperature >= self.warm() {
            return Ok(0.0);
        }
        if temperature <= self.cold() {
            return Ok(self.duty);
        }
        let exchanged = self.exchanged_at(temperature)?;
        Ok(if self.member.hot() {
            exchanged
        } else {
            self.duty - exchanged
        })
    }

    /// The heat exchanged from the inlet to `temperature`, W, from one flash at the
    /// pressure where `exchanged` W have been exchanged, corrected to first order for
    /// the pressure where the answer lies: the pressure falls by Δp/q per watt
    /// exchanged, and the enthalpy moves with it at (∂h/∂p)_T = −c_p·μ_JT, so one
    /// Newton step on e = g(e) is taken from `exchanged` (its error is of second
    /// order in how far `exchanged` was off). Repeated, it is the substitution of
    /// [`Curve::exchanged_at`], which then settles in a step or two.
    fn exchanged_with_pressure_from(&self, temperature: f64, exchanged: f64) -> Result<f64> {
        let m = self.member.inlet.flow;
        let q = self.duty;
        let per_exchanged = if self.member.hot() {
            (q - self.member.spec.heat_leak) / q / m
        } else {
            (q + self.member.spec.heat_leak) / q / m
        };
        let p = self.member.pressure_after(exchanged, q);
        let state = self.member.path.state_at(temperature, p)?;
        let change = state.enthalpy - self.member.inlet.state.enthalpy;
        let plain = (change / per_exchanged).abs();
        let drop = self.member.spec.pressure_drop;
        let (Some(cp), Some(joule_thomson)) = (state.cp(), state.joule_thomson()) else {
            return Ok(plain);
        };
        if drop == 0.0 || q <= 0.0 {
            return Ok(plain);
        }
        // dg/de: the change's sign, (∂h/∂p)_T and dp/de = −Δp/q.
        let slope = change.signum() * (-cp * joule_thomson) * (-drop / q) / per_exchanged;
        if slope.is_finite() && slope.abs() < 0.5 {
            Ok((plain - slope * exchanged) / (1.0 - slope))
        } else {
            Ok(plain)
        }
    }

    /// The heat exchanged from the inlet to `temperature`, W, with the pressure
    /// along the stream found by substitution (it moves the enthalpy only slightly).
    fn exchanged_at(&self, temperature: f64) -> Result<f64> {
        let q = self.duty;
        let mut e = 0.5 * q;
        for _ in 0..PRESSURE_STEPS {
            let next = self.exchanged_with_pressure_from(temperature, e)?;
            let settled = (next - e).abs() <= 1e-12 * q;
            e = next;
            if settled || self.member.spec.pressure_drop == 0.0 {
                return Ok(e.min(q));
            }
        }
        Ok(e.min(q))
    }
}

/// Local minima of a profile tried, smallest first, for one that falls with the
/// duty where the pinch sits on a plateau.
const MOVING_CANDIDATES: usize = 3;

/// Nodes either side of the last pass's pinch that a hinted search draws.
const NEAR_NODES: usize = 2;

/// Substitution steps for a stream's pressure at a temperature.
const PRESSURE_STEPS: usize = 30;

/// Temperature bisection-and-secant steps for a composite with several streams
/// active at a duty.
const COMPOSITE_STEPS: usize = 100;

/// One side's composite curve at set duties.
struct Composite<'m, 'a> {
    curves: Vec<Curve<'m, 'a>>,
    /// (temperature K, heat from the warm end W) at every stream's ends, warm end
    /// first.
    breakpoints: Vec<(f64, f64)>,
    total: f64,
}

impl<'m, 'a> Composite<'m, 'a> {
    fn new(curves: Vec<Curve<'m, 'a>>) -> Result<Self> {
        let total: f64 = curves.iter().map(|c| c.duty).sum();
        let mut temperatures: Vec<f64> = curves.iter().flat_map(|c| [c.warm(), c.cold()]).collect();
        temperatures.sort_by(|a, b| b.total_cmp(a));
        temperatures.dedup_by(|a, b| (*a - *b).abs() <= 1e-9 * b.abs());
        let mut breakpoints = Vec::with_capacity(temperatures.len());
        for t in temperatures {
            let mut heat = 0.0;
            for c in &curves {
                heat += c.share_at(t)?;
            }
            breakpoints.push((t, heat));
        }
        // The ends are exact.
        if let Some(first) = breakpoints.first_mut() {
            first.1 = 0.0;
        }
        if let Some(last) = breakpoints.last_mut() {
            last.1 = total;
        }
        Ok(Composite {
            curves,
            breakpoints,
            total,
        })
    }

    /// The composite's temperature where `heat` W has been exchanged from the warm
    /// end; `seeds` hold each stream's last state, to flash from.
    fn temperature_at(&self, heat: f64, seeds: &mut [Option<State>]) -> Result<f64> {
        let heat = heat.clamp(0.0, self.total);
        let points = &self.breakpoints;
        let k = points
            .windows(2)
            .position(|w| heat <= w[1].1)
            .unwrap_or(points.len().saturating_sub(2));
        let (warm, cold) = (points[k].0, points[(k + 1).min(points.len() - 1)].0);
        let active: Vec<usize> = (0..self.curves.len())
            .filter(|&i| {
                let c = &self.curves[i];
                c.duty > 0.0 && c.warm() >= warm - 1e-9 * warm && c.cold() <= cold + 1e-9 * cold
            })
            .collect();
        // Streams not active here count their whole duty (already passed) or none.
        let fixed: f64 = (0..self.curves.len())
            .filter(|i| !active.contains(i))
            .map(|i| {
                let c = &self.curves[i];
                if c.cold() >= warm - 1e-9 * warm {
                    c.duty
                } else {
                    0.0
                }
            })
            .sum();
        if let [only] = active.as_slice() {
            let c = &self.curves[*only];
            let share = (heat - fixed).clamp(0.0, c.duty);
            let exchanged = if c.member.hot() { share } else { c.duty - share };
            let state = c.state_after(exchanged, seeds[*only].as_ref())?;
            let t = state.temperature;
            seeds[*only] = Some(state);
            return Ok(t);
        }
        if active.is_empty() {
            return Ok(warm);
        }
        // Several streams: the temperature where their shares add up, by secant
        // steps kept inside the interval (exact at its ends). Each stream's pressure
        // there is taken from its last step's exchanged heat, so a step costs one
        // flash a stream; the pressures settle with the temperature (they move the
        // enthalpy only slightly).
        let (mut a, mut b) = (cold, warm);
        let (fa, fb) = (points[(k + 1).min(points.len() - 1)].1 - heat, points[k].1 - heat);
        if fa <= 0.0 {
            return Ok(cold);
        }
        if fb >= 0.0 {
            return Ok(warm);
        }
        // Each active stream's exchanged heat, first on a straight line in temperature.
        let mut exchanged: Vec<f64> = active
            .iter()
            .map(|&i| {
                let c = &self.curves[i];
                let span = c.outlet_temperature - c.inlet_temperature;
                let along = if span != 0.0 {
                    (((cold + warm) * 0.5 - c.inlet_temperature) / span).clamp(0.0, 1.0)
                } else {
                    1.0
                };
                along * c.duty
            })
            .collect();
        let mut residual = |t: f64| -> Result<(f64, bool)> {
            let mut sum = fixed;
            let mut settled = true;
            for (&i, e) in active.iter().zip(exchanged.iter_mut()) {
                let c = &self.curves[i];
                let next = c.exchanged_with_pressure_from(t, *e)?;
                settled &= (next - *e).abs() <= 1e-12 * c.duty;
                *e = next;
                let e = next.min(c.duty);
                sum += if c.member.hot() { e } else { c.duty - e };
            }
            Ok((sum - heat, settled))
        };
        let (mut x0, mut f0, mut x1, mut f1) = (warm, fb, cold, fa);
        let mut last = f64::NAN;
        for _ in 0..COMPOSITE_STEPS {
            let secant = x1 - f1 * (x1 - x0) / (f1 - f0);
            let t = if secant > a && secant < b && secant.is_finite() {
                secant
            } else {
                0.5 * (a + b)
            };
            let (ft, settled) = residual(t)?;
            last = ft;
            if ft > 0.0 {
                a = t;
            } else if ft < 0.0 {
                b = t;
            }
            let step = (t - x1).abs();
            (x0, f0, x1, f1) = (x1, f1, t, ft);
            if settled && (ft == 0.0 || step <= 1e-12 * t || b - a <= 1e-12 * b) {
                return Ok(t);
            }
        }
        Err(Error::NoConvergence {
            solver: "multistream composite temperature",
            iterations: COMPOSITE_STEPS,
            residual: last.abs(),
            context: format!(": bracket [{a}, {b}] K at {heat} W"),
        })
    }
}

/// The exchanger's streams and how the duties follow from the one unknown.
struct Arrangement<'a> {
    members: Vec<Member<'a>>,
    /// Duties of streams with an outlet temperature (None for the free ones), W.
    fixed: Vec<Option<f64>>,
    segments: usize,
    /// Each stream's last outlet state, to flash the next from (the duty search
    /// moves the duties only a little between calls).
    outlet_seeds: std::cell::RefCell<Vec<Option<State>>>,
    /// Each composite's streams' last states at a single position (the slope's
    /// two evaluations are at the same position), hot then cold.
    position_seeds: std::cell::RefCell<[Vec<Option<State>>; 2]>,
    /// The last whole profile drawn and its segments: the report at the duty the
    /// search or the end check settled on takes it instead of drawing it again.
    last_whole: std::cell::RefCell<Option<(usize, Pinch<Curves>)>>,
}

/// Composite curves drawn on a duty grid: node positions (fraction of the duty
/// from the warm end), duties and both composites' temperatures.
#[derive(Debug, Clone)]
struct Curves {
    positions: Vec<f64>,
    duties: Vec<f64>,
    hot: Vec<f64>,
    cold: Vec<f64>,
}

impl Curves {
    /// The hot-minus-cold difference at every node, K.
    fn differences(&self) -> Vec<f64> {
        self.hot.iter().zip(&self.cold).map(|(h, c)| h - c).collect()
    }
}

impl<'a> Arrangement<'a> {
    /// Every stream's duty when `total` W passes from the hot streams to the cold:
    /// the free streams take what the others leave.
    fn duties(&self, total: f64) -> Vec<f64> {
        let mut duties: Vec<f64> = self.fixed.iter().map(|d| d.unwrap_or(0.0)).collect();
        for side in [Side::Hot, Side::Cold] {
            if let Some(free) = self.free(side) {
                duties[free] = (total - self.known(side)).max(0.0);
            }
        }
        duties
    }

    /// The heat of a side's streams with an outlet temperature, W.
    fn known(&self, side: Side) -> f64 {
        self.members
            .iter()
            .zip(&self.fixed)
            .filter(|(m, _)| m.spec.side == side)
            .filter_map(|(_, d)| *d)
            .sum()
    }

    /// The warmest hot inlet and the coldest cold inlet among the streams that flow,
    /// K.
    fn inlet_extremes(&self) -> (f64, f64) {
        let flowing = |hot: bool| {
            self.members
                .iter()
                .filter(move |m| m.hot() == hot && m.inlet.flow > 0.0)
                .map(|m| m.inlet.state.temperature)
        };
        (
            flowing(true).fold(f64::NEG_INFINITY, f64::max),
            flowing(false).fold(f64::INFINITY, f64::min),
        )
    }

    /// The index of a side's free stream (the one without an outlet temperature).
    fn free(&self, side: Side) -> Option<usize> {
        self.members
            .iter()
            .zip(&self.fixed)
            .position(|(m, d)| m.spec.side == side && d.is_none())
    }

    /// Both composites for a total duty.
    fn composites(&self, total: f64) -> Result<(Composite<'_, 'a>, Composite<'_, 'a>)> {
        let duties = self.duties(total);
        let mut hot = Vec::new();
        let mut cold = Vec::new();
        let mut seeds = self.outlet_seeds.borrow_mut();
        for ((member, duty), seed) in self.members.iter().zip(duties).zip(seeds.iter_mut()) {
            let inlet_temperature = member.inlet.state.temperature;
            let outlet_temperature = if duty > 0.0 {
                let (p, h) = (member.outlet_pressure(), member.enthalpy_after(duty, duty));
                let state = match seed.as_ref() {
                    Some(near) => member.path.state(p, h, near)?,
                    None => member.path.state_ph(p, h)?,
                };
                let t = state.temperature;
                *seed = Some(state);
                t
            } else {
                inlet_temperature
            };
            let curve = Curve {
                member,
                duty,
                inlet_temperature,
                outlet_temperature,
            };
            if member.hot() {
                hot.push(curve);
            } else {
                cold.push(curve);
            }
        }
        Ok((Composite::new(hot)?, Composite::new(cold)?))
    }

    /// The composite curves for `total` W on `segments` equal duty steps, with every
    /// stream's ends added as nodes; with `window` (a range of node numbers), only
    /// the nodes from the first to the last of it, ends included.
    fn curves(
        &self,
        total: f64,
        segments: usize,
        window: Option<(usize, usize)>,
    ) -> Result<(Curves, [Composite<'_, 'a>; 2])> {
        let (hot, cold) = self.composites(total)?;
        let n = segments.max(1);
        let (first, last) = window.unwrap_or((0, n));
        let mut positions: Vec<f64> = (first..=last).map(|k| k as f64 / n as f64).collect();
        let (from, to) = (first as f64 / n as f64, last as f64 / n as f64);
        if total > 0.0 {
            for (_, heat) in hot.breakpoints.iter().chain(&cold.breakpoints) {
                let f = heat / total;
                if positions.iter().all(|p| (p - f).abs() > 1e-9) && f > from && f < to {
                    positions.push(f);
                }
            }
        }
        positions.sort_by(|a, b| a.total_cmp(b));
        let duties: Vec<f64> = positions.iter().map(|f| total * f).collect();
        let mut seeds: Vec<Option<State>> = vec![None; self.members.len()];
        let hot_t = duties
            .iter()
            .map(|q| hot.temperature_at(*q, &mut seeds))
            .collect::<Result<Vec<f64>>>()?;
        // The cold composite from its cold end, as the two-stream exchanger draws it.
        let mut seeds: Vec<Option<State>> = vec![None; self.members.len()];
        let mut cold_t = duties
            .iter()
            .rev()
            .map(|q| cold.temperature_at(*q, &mut seeds))
            .collect::<Result<Vec<f64>>>()?;
        cold_t.reverse();
        Ok((
            Curves {
                positions,
                duties,
                hot: hot_t,
                cold: cold_t,
            },
            [hot, cold],
        ))
    }

    /// The difference between the composites at position `f` for `total` W.
    fn difference_at(&self, total: f64, f: f64) -> Result<f64> {
        let (hot, cold) = self.composites(total)?;
        let mut seeds = self.position_seeds.borrow_mut();
        let [hot_seeds, cold_seeds] = &mut *seeds;
        let t_hot = hot.temperature_at(f * total, hot_seeds)?;
        let t_cold = cold.temperature_at(f * total, cold_seeds)?;
        Ok(t_hot - t_cold)
    }
}

impl<'a> Arrangement<'a> {
    /// The refined pinch on the composite curves for `total` W on `segments`
    /// segments, all of them or only the nodes of `window`.
    fn pinch_in(
        &self,
        total: f64,
        segments: usize,
        window: Option<(usize, usize)>,
    ) -> Result<Pinch<Curves>> {
        let (curves, [hot, cold]) = self.curves(total, segments, window)?;
        let differences = curves.differences();
        let mut hot_seeds: Vec<Option<State>> = vec![None; self.members.len()];
        let mut cold_seeds: Vec<Option<State>> = vec![None; self.members.len()];
        let (difference, position) =
            pinch::refined_minimum(&curves.positions, &differences, |f, _| {
                Ok(hot.temperature_at(f * total, &mut hot_seeds)?
                    - cold.temperature_at(f * total, &mut cold_seeds)?)
            })?;
        let pinch = Pinch {
            duty: total,
            difference,
            position,
            profile: curves,
        };
        if window.is_none() {
            *self.last_whole.borrow_mut() = Some((segments, pinch.clone()));
        }
        Ok(pinch)
    }

    /// The whole profile at `total` W on `segments` segments: the last one drawn
    /// where it is for that very duty, else drawn afresh.
    fn whole_pinch(&self, total: f64, segments: usize) -> Result<Pinch<Curves>> {
        let last = self.last_whole.borrow_mut().take();
        match last {
            Some((drawn, pinch)) if drawn == segments && pinch.duty == total => Ok(pinch),
            _ => self.pinch_on(total, segments),
        }
    }
}

impl PinchSearch for Arrangement<'_> {
    type Profile = Curves;

    fn segments(&self) -> usize {
        self.segments
    }

    fn pinch_on(&self, total: f64, segments: usize) -> Result<Pinch<Curves>> {
        self.pinch_in(total, segments, None)
    }

    /// On the nodes two either side of the one nearest `position` (and the stream
    /// ends between them): where the smallest of them lies inside that stretch, or
    /// at the exchanger's end, the refinement starts from the same three nodes as
    /// on the whole profile and gives the same pinch.
    fn pinch_near(&self, total: f64, segments: usize, position: Option<f64>) -> Result<Pinch<Curves>> {
        let Some(position) = position.filter(|p| p.is_finite()) else {
            return self.pinch_on(total, segments);
        };
        let n = segments.max(1);
        let centre = (position.clamp(0.0, 1.0) * n as f64).round() as usize;
        let window = (centre.saturating_sub(NEAR_NODES), (centre + NEAR_NODES).min(n));
        let pinch = self.pinch_in(total, segments, Some(window))?;
        let smallest = pinch
            .profile
            .differences()
            .into_iter()
            .enumerate()
            .fold((0, f64::INFINITY), |a, (k, d)| if d < a.1 { (k, d) } else { a })
            .0;
        let edge = pinch.profile.positions.len() - 1;
        let inside = (smallest > 0 || window.0 == 0) && (smallest < edge || window.1 == n);
        if inside {
            Ok(pinch)
        } else {
            self.pinch_on(total, segments)
        }
    }

    /// By a forward difference at the pinch's position: the difference at the
    /// pinch's own duty is known, so one more point is drawn. The slope only steers
    /// the Newton steps (its error of about 1e-6 of itself leaves the answer's error
    /// near 1e-6 of the last step, far below the tolerance).
    fn pinch_slope(&self, pinch: &Pinch<Curves>) -> Result<f64> {
        let step = (1e-6 * pinch.duty).max(1e-9);
        let above = self.difference_at(pinch.duty + step, pinch.position)?;
        Ok((above - pinch.difference) / step)
    }

    /// From the nodes of the whole profile: its local minima other than the node
    /// nearest the pinch, smallest first, each with its slope by a forward
    /// difference at its position, until one falls with the duty.
    fn moving_minimum(&self, pinch: &Pinch<Curves>, segments: usize) -> Result<Option<Moving>> {
        let whole;
        let curves = match (pinch.profile.positions.first(), pinch.profile.positions.last()) {
            (Some(&first), Some(&last)) if first == 0.0 && last == 1.0 => &pinch.profile,
            _ => {
                whole = self.curves(pinch.duty, segments, None)?.0;
                &whole
            }
        };
        let differences = curves.differences();
        let n = differences.len();
        let own = (0..n)
            .min_by(|&a, &b| {
                (curves.positions[a] - pinch.position)
                    .abs()
                    .total_cmp(&(curves.positions[b] - pinch.position).abs())
            })
            .unwrap_or(0);
        let mut minima: Vec<usize> = (0..n)
            .filter(|&k| k != own)
            .filter(|&k| {
                (k == 0 || differences[k] <= differences[k - 1])
                    && (k + 1 == n || differences[k] <= differences[k + 1])
            })
            .collect();
        minima.sort_by(|&a, &b| differences[a].total_cmp(&differences[b]));
        let step = (1e-6 * pinch.duty).max(1e-9);
        for k in minima.into_iter().take(MOVING_CANDIDATES) {
            let position = curves.positions[k];
            let above = self.difference_at(pinch.duty + step, position)?;
            let slope = (above - differences[k]) / step;
            if slope < 0.0 {
                return Ok(Some(Moving {
                    difference: differences[k],
                    slope,
                    position,
                }));
            }
        }
        Ok(None)
    }

    /// Warm end: the free cold stream leaving at the warmest hot inlet's temperature
    /// less `target`; cold end: the free hot stream leaving at the coldest cold
    /// inlet's temperature plus `target` (the free stream need not be the one that
    /// sets the end; the search's check on a profile decides).
    fn end_duties(&self, target: f64) -> [Option<f64>; 2] {
        // A side's flowing free stream's duty for an outlet at `temperature`, plus
        // the side's known duties.
        let total_for = |side: Side, temperature: f64| {
            let member = &self.members[self.free(side)?];
            let duty = (member.inlet.flow > 0.0)
                .then(|| member.duty_for_outlet(temperature).ok())??;
            Some(self.known(side) + duty)
        };
        let (warmest_hot, coldest_cold) = self.inlet_extremes();
        [
            total_for(Side::Cold, warmest_hot - target),
            total_for(Side::Hot, coldest_cold + target),
        ]
    }
}

/// One stream's figures in the exchanger's report.
#[derive(Debug, Clone, PartialEq)]
pub struct StreamRecord {
    /// The stream's name.
    pub name: String,
    /// `hot` or `cold`.
    pub side: &'static str,
    /// K.
    pub inlet_temperature: f64,
    /// K.
    pub outlet_temperature: f64,
    /// Heat exchanged, W.
    pub duty: f64,
    /// Whether its outlet temperature was specified.
    pub outlet_specified: bool,
}

/// The total duty that leaves a smallest difference of `dt` where the pinch lies
/// inside: none above `low` if the difference is already below `dt` there, else
/// the Newton search on the duty below `bound` (the smaller end duty, or `upper`);
/// with where the last profile drawn had its pinch.
fn searched_duty(
    arrangement: &Arrangement<'_>,
    dt: f64,
    (low, upper): (f64, f64),
    bound: f64,
    context: &Context,
) -> Result<(f64, Option<f64>)> {
    let segments = arrangement.segments;
    // Where the pinch lay inside on the pass before, a settled pass's search draws
    // its full profiles around there only (the solver's detailed pass draws every
    // profile whole, and follows no pinch). Loose passes draw their coarse
    // profiles whole: they are cheap, and a coarse stretch that missed a narrow
    // inside pinch one pass and caught it the next would make the passes disagree
    // and the recycle take longer.
    let near = context.pinch_position.filter(|_| !context.loose);
    let search = |start: f64, follow: bool| {
        pinch::duty_for_difference(
            arrangement,
            "multistream exchanger duty for a minimum approach",
            dt,
            start,
            (low, bound),
            context.loose,
            (near, follow),
        )
    };
    let hinted = matches!(context.pinch_hint, PinchHint::Inside | PinchHint::Whole);
    if let (true, Some(start)) = (hinted, context.duty_hint) {
        // The pass before found a duty with the pinch inside: the search starts
        // there without first looking at the lowest duty. Where the difference is
        // below the target even there, the search's bracket closes on `low`.
        let (duty, position) = search(start, !context.detailed)?;
        return Ok((if duty - low <= 1e-9 * bound { low } else { duty }, position));
    }
    // On a coarse profile when clearly above the target (it decides only whether
    // some duty meets it, and the first guess).
    let coarse = arrangement.pinch_on(low, (segments / 5).max(8))?;
    let at_low = if coarse.difference > dt + 0.05 {
        coarse
    } else {
        arrangement.pinch_on(low, segments)?
    };
    if at_low.difference <= dt {
        return Ok((low, Some(at_low.position)));
    }
    let start = context.duty_hint.unwrap_or_else(|| {
        let at_upper = arrangement
            .pinch_on(upper, segments / 5)
            .map(|p| p.difference)
            .unwrap_or(0.0);
        low + (upper - low) * (at_low.difference - dt)
            / (at_low.difference - at_upper).max(1e-300)
    });
    search(start, false)
}

/// Solves the multistream exchanger for its inlets (in stream order).
pub fn exchange(
    design: &MultistreamExchanger,
    inlets: &[Flow],
    context: &Context,
) -> Result<(Vec<Flow>, Performance)> {
    let unit = "multistream exchanger";
    let members = design
        .streams
        .iter()
        .zip(inlets)
        .map(|(spec, inlet)| {
            Ok(Member {
                spec,
                inlet,
                path: StreamPath::new(&inlet.state, spec.catalyst, unit)?,
            })
        })
        .collect::<Result<Vec<_>>>()?;
    // Streams without flow take no part; the specification still counts them.
    let mut fixed = Vec::with_capacity(members.len());
    for member in &members {
        fixed.push(match member.spec.outlet_temperature {
            _ if member.inlet.flow <= 0.0 => Some(0.0),
            Some(t) => {
                let duty = member.duty_for_outlet(t)?;
                // While the tear streams settle, an inlet may pass for a moment on
                // the wrong side of its outlet temperature: no duty then. On the
                // final pass it is an error.
                if duty < 0.0 && !context.detailed {
                    Some(0.0)
                } else if duty < 0.0 {
                    return Err(Error::Input(format!(
                        "{unit}: the {} stream '{}' enters at {:.3} K and cannot leave at {t:.3} K{}",
                        member.spec.side.word(),
                        member.spec.name,
                        member.inlet.state.temperature,
                        if member.hot() { ": a hot stream is cooled" } else { ": a cold stream is warmed" }
                    )));
                } else {
                    Some(duty)
                }
            }
            None => None,
        });
    }
    let count = members.len();
    let arrangement = Arrangement {
        members,
        fixed,
        segments: design.segments,
        outlet_seeds: std::cell::RefCell::new(vec![None; count]),
        position_seeds: std::cell::RefCell::new([vec![None; count], vec![None; count]]),
        last_whole: std::cell::RefCell::new(None),
    };
    let (known_hot, known_cold) = (arrangement.known(Side::Hot), arrangement.known(Side::Cold));
    let free_of = |side: Side| arrangement.free(side).map(|i| &arrangement.members[i]);
    // Where the pinch was found (for the next pass's hint).
    let mut pinch_at_end = None;
    let mut pinch_position = None;
    let total = match design.minimum_approach {
        None => {
            // One free stream takes what the energy balance leaves.
            let (free, own, other) = match (free_of(Side::Hot), free_of(Side::Cold)) {
                (Some(free), None) => (free, known_hot, known_cold),
                (None, Some(free)) => (free, known_cold, known_hot),
                _ => {
                    return Err(Error::Internal(
                        "a multistream exchanger set by outlet temperatures needs one free stream"
                            .into(),
                    ))
                }
            };
            if other < own && free.inlet.flow > 0.0 {
                return Err(Error::Input(format!(
                    "{unit}: the energy balance leaves the {side} stream '{name}' a negative duty of {:.3} kW: the other {side} streams exchange {:.3} kW, the {opposite} streams only {:.3} kW; change an outlet temperature",
                    (other - own) / 1e3,
                    own / 1e3,
                    other / 1e3,
                    side = free.spec.side.word(),
                    name = free.spec.name,
                    opposite = if free.hot() { "cold" } else { "hot" }
                )));
            }
            other.max(own)
        }
        Some(dt) => {
            let hot = free_of(Side::Hot);
            let cold = free_of(Side::Cold);
            let (Some(hot), Some(cold)) = (hot, cold) else {
                return Err(Error::Internal(
                    "a multistream exchanger sized by its approach needs one free stream a side".into(),
                ));
            };
            let (warmest_hot, coldest_cold) = arrangement.inlet_extremes();
            let low = known_hot.max(known_cold);
            let upper = if hot.inlet.flow > 0.0 && cold.inlet.flow > 0.0 {
                (known_hot + hot.duty_limit(coldest_cold)?)
                    .min(known_cold + cold.duty_limit(warmest_hot)?)
            } else {
                low
            };
            if upper <= low {
                low
            } else {
                match pinch::hinted_end_pinch(&arrangement, dt, (low, upper), context)? {
                    ControlFlow::Break(duty) => {
                        pinch_at_end = Some(true);
                        duty
                    }
                    ControlFlow::Continue(bound) => {
                        pinch_at_end = Some(false);
                        let duty;
                        (duty, pinch_position) =
                            searched_duty(&arrangement, dt, (low, upper), bound, context)?;
                        duty
                    }
                }
            }
        }
    };
    let duties = arrangement.duties(total);
    let outlets = arrangement
        .members
        .iter()
        .zip(&duties)
        .map(|(m, q)| {
            let state = m
                .path
                .state_ph(m.outlet_pressure(), m.enthalpy_after(*q, *q))?;
            Ok(Flow {
                state,
                flow: m.inlet.flow,
            })
        })
        .collect::<Result<Vec<Flow>>>()?;
    let leak: f64 = design.streams.iter().map(|s| s.heat_leak).sum();
    let mut performance = Performance {
        heat_in: vec![(leak, context.ambient)],
        duty: Some(total),
        pinch_at_end,
        pinch_position,
        ..Performance::default()
    };
    if context.detailed && total > 0.0 {
        let pinch = arrangement.whole_pinch(total, design.segments)?;
        let curves = &pinch.profile;
        let profile: Vec<ProfilePoint> = (0..curves.duties.len())
            .map(|k| ProfilePoint {
                duty: curves.duties[k],
                hot_temperature: curves.hot[k],
                cold_temperature: curves.cold[k],
            })
            .collect();
        let ua = if pinch.difference <= super::exchanger::ZERO_PINCH {
            f64::INFINITY
        } else {
            pinch::conductance(profile.iter().map(|p| (p.duty, p.hot_temperature - p.cold_temperature)))
        };
        let (specified, delivered, specification_met) = match design.minimum_approach {
            Some(dt) => (
                ExchangerSpec::MinimumApproach(dt),
                pinch.difference,
                (pinch.difference - dt).abs() <= APPROACH_TOLERANCE,
            ),
            None => (ExchangerSpec::OutletTemperatures, pinch.difference, true),
        };
        let streams = arrangement
            .members
            .iter()
            .zip(&duties)
            .zip(&outlets)
            .map(|((m, q), out)| StreamRecord {
                name: m.spec.name.to_string(),
                side: m.spec.side.word(),
                inlet_temperature: m.inlet.state.temperature,
                outlet_temperature: out.state.temperature,
                duty: *q,
                outlet_specified: m.spec.outlet_temperature.is_some(),
            })
            .collect();
        let first = profile.first().copied();
        let last = profile.last().copied();
        let report = ExchangerReport {
            ua,
            effectiveness: f64::NAN,
            max_duty: f64::NAN,
            min_approach: pinch.difference,
            min_approach_position: pinch.position,
            warm_end_approach: first.map_or(f64::NAN, |p| p.hot_temperature - p.cold_temperature),
            cold_end_approach: last.map_or(f64::NAN, |p| p.hot_temperature - p.cold_temperature),
            profile,
            specified,
            delivered,
            specification_met,
            streams,
        };
        performance.details = Details::Exchanger(Box::new(report));
    }
    Ok((outlets, performance))
}
