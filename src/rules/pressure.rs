//! High-pressure advice for Joule-Thomson stages, checked by re-solving.
//!
//! The textbook rule (for example Barron, Cryogenic Systems, on the simple
//! Linde-Hampson cycle): with the recuperator's warm end held at T_w, the liquid
//! yield y = (h(T_w, p_low) − h(T_w, p_high)) / (h(T_w, p_low) − h_liquid) is
//! greatest where (∂h/∂p)_T = 0 at T_w, that is where the high pressure equals the
//! inversion pressure at the warm-end temperature of the recuperator that feeds the
//! valve. For each valve fed through a recuperator, the advice names the compressor
//! that sets the pressure, gives that pressure, and re-solves the flowsheet there:
//! it is given only where the re-solved yield is higher, and otherwise says the rule
//! does not help this flowsheet. The re-solve starts from the plant's converged
//! recycle (tear vector and Broyden's inverse Jacobian), which saves about a third of
//! its passes; where that start does not converge, the solve starts cold.

use super::{Finding, Severity};
use crate::equipment::UnitSpec;
use crate::flowsheet::Plant;
use crate::fluids::Phase;
use crate::solve::{solve, Options, Solution, WarmStart};

/// A high pressure within this fraction of the inversion pressure at the warm end
/// is at the optimum already (the rule's own precision, common practice).
pub const PRESSURE_TOLERANCE: f64 = 0.05;

/// A yield gain at least this fraction of the current yield makes the advice a
/// warning; a smaller one, a note.
pub const WARNING_GAIN: f64 = 0.02;

/// What the rule says for one compressor, after re-solving.
#[derive(Debug, Clone)]
pub struct PressureAdvice {
    /// The compressor that sets the high pressure.
    pub compressor: String,
    /// The valve it was traced from.
    pub valve: String,
    /// The recuperator whose warm end decides.
    pub exchanger: String,
    /// Its warm-end (hot inlet) temperature, K.
    pub warm_end_temperature: f64,
    /// The high pressure there now, Pa.
    pub warm_end_pressure: f64,
    /// The inversion pressure at the warm-end temperature, Pa.
    pub inversion_pressure: f64,
    /// The compressor outlet pressure that puts the warm end there, Pa.
    pub best_high_pressure: f64,
    /// The yield now.
    pub current_yield: f64,
    /// The yield re-solved at `best_high_pressure`, or why it could not be found.
    pub yield_at_best: Result<f64, String>,
    /// Specific energy now and at the best pressure, kWh/kg (where there is liquid).
    pub specific_energy: (Option<f64>, Option<f64>),
}

impl PressureAdvice {
    /// Whether re-solving confirms the advice: a higher yield at the best pressure.
    pub fn confirmed(&self) -> bool {
        matches!(self.yield_at_best, Ok(y) if y > self.current_yield * (1.0 + 1e-9) && y > 0.0)
    }
}

/// The exchanger whose hot outlet reaches the valve (through transfer lines and
/// splitters), as a unit index.
fn feeding_recuperator(plant: &Plant, valve: usize) -> Option<usize> {
    let mut stream = *plant.units[valve].inlets.first()?;
    for _ in 0..plant.units.len() {
        let from = plant.streams[stream].from;
        let unit = &plant.units[from.unit];
        match &unit.spec {
            UnitSpec::Exchanger(_) if from.port == "hot-out" => return Some(from.unit),
            UnitSpec::TransferLine(_) | UnitSpec::Splitter(_) => stream = *unit.inlets.first()?,
            _ => return None,
        }
    }
    None
}

/// The compressor that sets the pressure of `stream`, following units that pass
/// their inlet's pressure on (less drops); None where a valve, expander or feed
/// sets it instead.
fn pressure_setter(plant: &Plant, mut stream: usize) -> Option<usize> {
    for _ in 0..plant.units.len() {
        let from = plant.streams[stream].from;
        let unit = &plant.units[from.unit];
        let ports = unit.spec.ports();
        let k = ports.outlets.iter().position(|p| *p == from.port)?;
        let unknown = vec![None; unit.inlets.len()];
        if unit
            .spec
            .outlet_pressures(&unknown)
            .get(k)
            .copied()
            .flatten()
            .is_some()
        {
            return matches!(unit.spec, UnitSpec::Compressor(_)).then_some(from.unit);
        }
        stream = match unit.spec.coupling() {
            crate::equipment::Coupling::Sides => *unit.inlets.get(k)?,
            crate::equipment::Coupling::Joined => *unit.inlets.first()?,
            crate::equipment::Coupling::WithSource if k == 0 => *unit.inlets.first()?,
            crate::equipment::Coupling::WithSource => return None,
        };
    }
    None
}

/// The yield and specific energy of `plant` with `compressor` set to `pressure`,
/// solved from the plant's converged recycle `warm`.
fn resolve_at(
    plant: &Plant,
    warm: &WarmStart,
    compressor: usize,
    pressure: f64,
) -> Result<(f64, Option<f64>), String> {
    let mut trial = plant.clone();
    let UnitSpec::Compressor(c) = &mut trial.units[compressor].spec else {
        return Err("not a compressor".into());
    };
    c.outlet_pressure = pressure;
    // Neither the yield nor the design checks use the exchangers' largest duty.
    let options = Options {
        warm_start: Some(warm.clone()),
        skip_largest_duty: true,
        ..Options::default()
    };
    let solution = solve(&trial, &options).map_err(|e| e.to_string())?;
    let errors = super::design_errors(&trial, &solution);
    if errors > 0 {
        return Err(format!("the design has {errors} error(s) there"));
    }
    Ok((
        solution.summary.liquid_yield.unwrap_or(0.0),
        solution.summary.specific_energy,
    ))
}

/// The advice for every compressor that feeds a valve through a recuperator whose
/// warm end sits more than [`PRESSURE_TOLERANCE`] off the inversion pressure there,
/// each re-solved at the advised pressure.
pub fn advice(plant: &Plant, solution: &Solution) -> Vec<PressureAdvice> {
    let mut out: Vec<PressureAdvice> = Vec::new();
    let current_yield = solution.summary.liquid_yield.unwrap_or(0.0);
    for (v, unit) in plant.units.iter().enumerate() {
        if !matches!(unit.spec, UnitSpec::Valve(_)) {
            continue;
        }
        let Some(x) = feeding_recuperator(plant, v) else {
            continue;
        };
        let hot_in = plant.units[x].inlets[0];
        let Some(c) = pressure_setter(plant, hot_in) else {
            continue;
        };
        let compressor = &plant.units[c];
        if out.iter().any(|a| a.compressor == compressor.id) {
            continue;
        }
        let warm = &solution.streams[hot_in].state;
        let Ok(Some(p_inv)) = warm
            .fluid()
            .inversion_pressure_at_temperature(warm.temperature)
        else {
            continue;
        };
        if ((warm.pressure - p_inv) / p_inv).abs() <= PRESSURE_TOLERANCE {
            continue;
        }
        let set_now = solution.streams[compressor.outlets[0]].state.pressure;
        let best = p_inv + (set_now - warm.pressure);
        let resolved = resolve_at(plant, &solution.warm_start, c, best);
        out.push(PressureAdvice {
            compressor: compressor.id.clone(),
            valve: unit.id.clone(),
            exchanger: plant.units[x].id.clone(),
            warm_end_temperature: warm.temperature,
            warm_end_pressure: warm.pressure,
            inversion_pressure: p_inv,
            best_high_pressure: best,
            current_yield,
            specific_energy: (
                solution.summary.specific_energy,
                resolved.as_ref().ok().and_then(|r| r.1),
            ),
            yield_at_best: resolved.map(|r| r.0),
        });
    }
    out
}

/// The valve's inlet against the curve, as information: normal in a recuperative
/// loop when the whole expansion still cools. Empty for a liquid inlet below the
/// curve's lower end, or an inlet inside the curve.
fn inlet_note(plant: &Plant, solution: &Solution, valve: &str) -> (String, f64) {
    let Some(unit) = plant.unit(valve) else {
        return (String::new(), 0.0);
    };
    let inlet = &solution.streams[unit.inlets[0]].state;
    let outlet = &solution.streams[unit.outlets[0]].state;
    let outside = inlet.joule_thomson().is_some_and(|mu| mu < 0.0);
    if !outside || inlet.phase == Phase::Liquid {
        return (String::new(), 0.0);
    }
    let change = outlet.temperature - inlet.temperature;
    let words = if change < 0.0 {
        format!(
            " The valve inlet ({:.2} K, {:.1} bar) lies outside the inversion curve, which is normal in a recuperative loop: the expansion as a whole cools it by {:.2} K.",
            inlet.temperature,
            inlet.pressure / 1e5,
            -change
        )
    } else {
        String::new()
    };
    (words, 1.0)
}

/// The findings for the advice: `high-pressure-off-optimum` where re-solving
/// confirms it, `high-pressure-advice-not-confirmed` where it does not.
pub fn findings(plant: &Plant, solution: &Solution, advice: &[PressureAdvice]) -> Vec<Finding> {
    let bar = |p: f64| p / 1e5;
    advice
        .iter()
        .map(|a| {
            let direction = if a.warm_end_pressure > a.inversion_pressure {
                "above"
            } else {
                "below"
            };
            let off = 100.0 * (a.warm_end_pressure / a.inversion_pressure - 1.0).abs();
            let (inlet, outside) = inlet_note(plant, solution, &a.valve);
            let rule = format!(
                "the high pressure at the warm end of {} ({:.2} K) is {:.1} bar, {off:.0} % {direction} the inversion pressure there, {:.1} bar, where a Joule-Thomson stage's yield peaks.{inlet}",
                a.exchanger,
                a.warm_end_temperature,
                bar(a.warm_end_pressure),
                bar(a.inversion_pressure)
            );
            let energy = |e: Option<f64>| e.map_or("—".to_string(), |e| format!("{e:.3}"));
            let finding = match &a.yield_at_best {
                Ok(y) if a.confirmed() => {
                    let gain = if a.current_yield > 0.0 {
                        (y - a.current_yield) / a.current_yield
                    } else {
                        f64::INFINITY
                    };
                    Finding::new(
                        "high-pressure-off-optimum",
                        if gain >= WARNING_GAIN { Severity::Warning } else { Severity::Note },
                        Some(&a.compressor),
                        format!(
                            "{rule} Re-solved with {} at {:.1} bar, the yield is {y:.5} against {:.5} now (specific energy {} against {} kWh/kg).",
                            a.compressor,
                            bar(a.best_high_pressure),
                            a.current_yield,
                            energy(a.specific_energy.1),
                            energy(a.specific_energy.0)
                        ),
                        format!(
                            "set {}.outlet_pressure to about {:.0} bar",
                            a.compressor,
                            bar(a.best_high_pressure)
                        ),
                    )
                }
                Ok(y) => Finding::new(
                    "high-pressure-advice-not-confirmed",
                    Severity::Note,
                    Some(&a.compressor),
                    format!(
                        "{rule} Re-solved with {} at {:.1} bar, the yield is {y:.5}, no better than {:.5} now, so the rule does not help this flowsheet.",
                        a.compressor,
                        bar(a.best_high_pressure),
                        a.current_yield
                    ),
                    "keep the pressure; the yield here is limited elsewhere (precooling, exchanger approaches, flow split)".to_string(),
                ),
                Err(why) => Finding::new(
                    "high-pressure-advice-not-confirmed",
                    Severity::Note,
                    Some(&a.compressor),
                    format!(
                        "{rule} Re-solving with {} at {:.1} bar failed ({why}), so no change is advised.",
                        a.compressor,
                        bar(a.best_high_pressure)
                    ),
                    "keep the pressure, or study it with cryochain sweep".to_string(),
                ),
            };
            let mut finding = finding
                .value("best_high_pressure_Pa", a.best_high_pressure)
                .value("inversion_pressure_Pa", a.inversion_pressure)
                .value("warm_end_temperature_K", a.warm_end_temperature)
                .value("warm_end_pressure_Pa", a.warm_end_pressure)
                .value("current_yield", a.current_yield)
                .value("valve_inlet_outside_curve", outside);
            if let Ok(y) = a.yield_at_best {
                finding = finding.value("yield_at_best_pressure", y);
            }
            finding
        })
        .collect()
}
