//! The checks themselves, one function each, run over a solved plant.

use super::{Finding, Severity};
use crate::equipment::compressor::CompressorModel;
use crate::equipment::exchanger::{ExchangerReport, ExchangerSpec};
use crate::equipment::precooler::{Precooler, PrecoolerSource};
use crate::equipment::{Details, Flow, Performance};
use crate::flowsheet::{Plant, UnitSpec};
use crate::fluids::{Fluid, Phase};
use crate::solve::Solution;

/// Every finding for a solved plant, errors first: the checks of the solution as
/// it is, then the high-pressure advice, which re-solves the flowsheet to confirm
/// itself (see [`super::pressure`]).
pub fn check(plant: &Plant, solution: &Solution) -> Vec<Finding> {
    let mut findings = local_checks(plant, solution);
    let advice = super::pressure::advice(plant, solution);
    // A plant that makes no liquid: point at a confirmed better pressure.
    for finding in findings.iter_mut().filter(|f| f.id == "no-liquid") {
        if let Some(a) = advice.iter().find(|a| a.confirmed()) {
            finding.hint = format!(
                "set {}.outlet_pressure to about {:.0} bar, the inversion pressure at the warm end of {} (re-solved there the yield is {:.5}), or precool further",
                a.compressor,
                a.best_high_pressure / 1e5,
                a.exchanger,
                a.yield_at_best.clone().unwrap_or(0.0)
            );
        }
    }
    findings.extend(super::pressure::findings(plant, solution, &advice));
    findings.sort_by_key(|f| f.severity);
    findings
}

/// How many design errors the solution has. The high-pressure advice, which never
/// gives an error, is left out, so this costs no re-solve (studies call it for
/// every case).
pub fn design_errors(plant: &Plant, solution: &Solution) -> usize {
    local_checks(plant, solution)
        .iter()
        .filter(|f| f.severity == Severity::Error)
        .count()
}

/// The checks of the solution as it is.
fn local_checks(plant: &Plant, solution: &Solution) -> Vec<Finding> {
    let mut findings = Vec::new();
    valves(plant, solution, &mut findings);
    no_liquid(plant, solution, &mut findings);
    exchangers(plant, solution, &mut findings);
    compressors(plant, solution, &mut findings);
    coolers_and_precoolers(plant, solution, &mut findings);
    expanders(plant, solution, &mut findings);
    cryogen_feeds(plant, solution, &mut findings);
    mixers(plant, solution, &mut findings);
    ranges(plant, solution, &mut findings);
    hydrogen_product(plant, solution, &mut findings);
    balances(solution, &mut findings);
    findings.sort_by_key(|f| f.severity);
    findings
}

fn precooling_advice(fluid: &Fluid) -> &'static str {
    match fluid.name.as_str() {
        "hydrogen" | "parahydrogen" | "orthohydrogen" => {
            "precool it first: a liquid-nitrogen bath (about 80 K) ahead of a cold recuperator is the usual way, or an expander stage"
        }
        "helium" => "precool it first: a liquid-hydrogen bath (about 20 K) or expander stages ahead of the cold recuperator",
        "neon" => "precool it first, for example with liquid nitrogen",
        _ => "precool it first in a recuperator or a bath",
    }
}

fn valves(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for unit in &plant.units {
        let UnitSpec::Valve(_) = unit.spec else {
            continue;
        };
        let inlet = &solution.streams[unit.inlets[0]];
        let outlet = &solution.streams[unit.outlets[0]];
        let fluid = inlet.state.fluid();
        let Ok(max_inversion_temperature) = fluid.max_inversion_temperature_kept() else {
            continue;
        };
        let t_in = inlet.state.temperature;
        let id = unit.id.as_str();
        if t_in > max_inversion_temperature && inlet.state.phase != Phase::TwoPhase {
            out.push(
                Finding::new(
                    "valve-above-inversion-temperature",
                    Severity::Error,
                    Some(id),
                    format!(
                        "the valve inlet is at {t_in:.2} K, above {}'s maximum inversion temperature {:.1} K: throttling can only warm it",
                        fluid.name, max_inversion_temperature
                    ),
                    format!("bring the inlet below {max_inversion_temperature:.0} K — {}", precooling_advice(fluid)),
                )
                .value("inlet_temperature_K", t_in)
                .value("max_inversion_temperature_K", max_inversion_temperature),
            );
            continue;
        }
        // The integral effect: an expansion that warms the stream as a whole.
        // (An inlet outside the curve whose expansion still cools is normal in a
        // recuperative loop; the high-pressure advice mentions it.)
        if outlet.state.temperature > t_in + 1e-9 {
            let mut finding = Finding::new(
                    "valve-warms",
                    Severity::Warning,
                    Some(id),
                    format!(
                        "the expansion from {t_in:.2} K, {:.2} bar warms the stream by {:.3} K: the valve gives no cooling",
                        inlet.state.pressure / 1e5,
                        outlet.state.temperature - t_in
                    ),
                    format!("precool the stream further before the valve — {}", precooling_advice(fluid)),
                )
                .value("inlet_temperature_K", t_in)
                .value("inlet_pressure_Pa", inlet.state.pressure)
                .value("temperature_change_K", outlet.state.temperature - t_in);
            if let Ok(Some(p)) = fluid.inversion_pressure_at_temperature(t_in) {
                finding = finding.value("inversion_pressure_Pa", p);
            }
            out.push(finding);
        }
    }
}

/// How far below equilibrium a liquid hydrogen product's para fraction may lie
/// before it is flagged (common practice: stored liquid is made above 95 % para).
pub const PARA_SHORTFALL_LIMIT: f64 = 0.05;

/// A liquid hydrogen product far from ortho–para equilibrium boils itself off in
/// storage.
fn hydrogen_product(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    let Some(storage) = crate::report::solution::storage_record(solution) else {
        return;
    };
    let shortfall = storage.equilibrium_para_fraction - storage.para_fraction;
    if shortfall <= PARA_SHORTFALL_LIMIT {
        return;
    }
    let product = plant
        .liquid_products()
        .find(|u| solution.streams[u.inlets[0]].state.fluid().name == "hydrogen")
        .map(|u| u.id.as_str());
    let effective = storage
        .effective_liquid_yield_after
        .as_ref()
        .map_or(String::new(), |y| {
            format!(
                "; the yield that remains is {:.5} after a day and {:.5} after a week",
                y[0], y[1]
            )
        });
    let what = if storage.frozen_normal {
        "normal hydrogen (frozen at 25 % para: no conversion is followed in this flowsheet)"
            .to_string()
    } else {
        format!("hydrogen of para fraction {:.4}", storage.para_fraction)
    };
    let hint = if storage.frozen_normal {
        "give the hydrogen feed `para_fraction: 0.25` so that the streams carry their para fraction, then convert on catalyst where the conversion heat is cheapest to remove: the liquid-nitrogen bath (`catalyst: true`), the cold exchangers (`catalyst: hot`, or `both` where the return gas comes back over-converted) and a final converter in the liquid (`kind: converter`); this is the usual practice, not re-solved here"
    } else {
        "convert further on catalyst at the lowest temperatures the plant reaches: the cold exchangers (`catalyst: hot` or `both`) and a final converter in the liquid (`kind: converter`); this is the usual practice, not re-solved here"
    };
    let mut finding = Finding::new(
        "hydrogen-product-unconverted",
        Severity::Warning,
        product,
        format!(
            "the liquid product is {what}, {shortfall:.3} below equilibrium ({:.4} at its temperature): residual ortho–para conversion boils off {:.1} % of it in a day and {:.1} % in a week of storage{effective}",
            storage.equilibrium_para_fraction,
            storage.boiled_off_after[0] * 100.0,
            storage.boiled_off_after[1] * 100.0,
        ),
        hint.to_string(),
    )
    .value("para_fraction", storage.para_fraction)
    .value("equilibrium_para_fraction", storage.equilibrium_para_fraction)
    .value("boiled_off_after_one_day", storage.boiled_off_after[0])
    .value("boiled_off_after_one_week", storage.boiled_off_after[1]);
    if let Some(y) = &storage.effective_liquid_yield_after {
        finding = finding
            .value("effective_yield_after_one_day", y[0])
            .value("effective_yield_after_one_week", y[1]);
    }
    out.push(finding);
}

fn no_liquid(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    let liquid_products: Vec<_> = plant.liquid_products().collect();
    if liquid_products.is_empty()
        || solution.summary.liquid_flow > 1e-12 * solution.summary.compressed_flow.max(1e-300)
    {
        return;
    }
    // Trace the cause back: valves feeding separators.
    let above: Vec<&str> = plant
        .units
        .iter()
        .filter(|u| matches!(u.spec, UnitSpec::Valve(_)))
        .filter(|u| {
            let s = &solution.streams[u.inlets[0]];
            s.state
                .fluid()
                .max_inversion_temperature_kept()
                .is_ok_and(|t| s.state.temperature > t)
        })
        .map(|u| u.id.as_str())
        .collect();
    let cause = if !above.is_empty() {
        format!("the valve {} throttles above the maximum inversion temperature, so it warms the gas instead of cooling it", above.join(", "))
    } else {
        let vapour_valves: Vec<String> = plant
            .units
            .iter()
            .filter(|u| matches!(u.spec, UnitSpec::Valve(_)))
            .map(|u| &solution.streams[u.outlets[0]])
            .filter(|s| s.state.phase != Phase::TwoPhase)
            .map(|s| format!("{:.2} K", s.state.temperature))
            .collect();
        format!(
            "no valve outlet reaches the two-phase region (outlets at {})",
            vapour_valves.join(", ")
        )
    };
    out.push(
        Finding::new(
            "no-liquid",
            Severity::Error,
            liquid_products.first().map(|u| u.id.as_str()),
            format!("the plant makes no liquid: {cause}"),
            "precool the high-pressure stream further before the valve or improve the recuperators; the high pressure is best at the inversion pressure at the recuperator's warm end".to_string(),
        )
        .value("liquid_flow_kg_s", solution.summary.liquid_flow),
    );
}

fn exchangers(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let Details::Exchanger(report) = &result.performance.details else {
            continue;
        };
        if result.performance.duty.unwrap_or(0.0) <= 0.0 {
            continue;
        }
        let position = report.min_approach_position;
        let where_ = format!("{:.0} % of the duty from the warm end", 100.0 * position);
        if !report.specification_met {
            out.push(spec_not_met(&unit.id, report, &where_));
        }
        if report.min_approach < -1e-9 {
            out.push(
                Finding::new(
                    "exchanger-temperature-cross",
                    Severity::Error,
                    Some(&unit.id),
                    format!("the hot stream is {:.3} K colder than the cold one at {where_}: heat cannot flow that way", -report.min_approach),
                    "reduce the duty (a larger approach) or change the flow ratio; a real exchanger needs a positive difference all along".to_string(),
                )
                .value("min_approach_K", report.min_approach)
                .value("position", position),
            );
        } else if report.specification_met {
            let at = temperature_at_pinch(report);
            let floor = plant
                .settings
                .approach_floor
                .max(plant.settings.approach_floor_fraction * at);
            if report.min_approach < floor {
                out.push(
                    Finding::new(
                        "exchanger-approach-below-floor",
                        Severity::Warning,
                        Some(&unit.id),
                        format!(
                            "the smallest temperature difference is {:.3} K at {where_} (cold side at {at:.2} K), below the floor of {floor:.3} K there ({:.2} % of the temperature)",
                            report.min_approach,
                            100.0 * plant.settings.approach_floor_fraction
                        ),
                        "an approach this small needs a very large exchanger; allow more (the floor is settings.approach_floor_fraction of the temperature, and settings.approach_floor in kelvin)".to_string(),
                    )
                    .value("min_approach_K", report.min_approach)
                    .value("approach_floor_K", floor)
                    .value("pinch_temperature_K", at)
                    .value("position", position),
                );
            }
        }
    }
}

/// The cold-side temperature where the smallest difference lies, interpolated on
/// the profile.
fn temperature_at_pinch(report: &ExchangerReport) -> f64 {
    let profile = &report.profile;
    let Some(last) = profile.last() else {
        return f64::NAN;
    };
    let duty = report.min_approach_position * last.duty;
    profile
        .windows(2)
        .find(|w| duty >= w[0].duty && duty <= w[1].duty && w[1].duty > w[0].duty)
        .map_or(last.cold_temperature, |w| {
            let f = (duty - w[0].duty) / (w[1].duty - w[0].duty);
            w[0].cold_temperature + f * (w[1].cold_temperature - w[0].cold_temperature)
        })
}

/// A mixer joining streams at very different temperatures destroys exergy; warn
/// above the flowsheet's limit, with what is destroyed.
fn mixers(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let UnitSpec::Mixer(_) = unit.spec else {
            continue;
        };
        let temperatures: Vec<f64> = unit
            .inlets
            .iter()
            .map(|&i| &solution.streams[i])
            .filter(|f| f.flow > 0.0)
            .map(|f| f.state.temperature)
            .collect();
        let (low, high) = temperatures
            .iter()
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), t| {
                (a.min(*t), b.max(*t))
            });
        let spread = high - low;
        let limit = plant.settings.mixer_temperature_limit;
        if spread > limit {
            out.push(
                Finding::new(
                    "mixer-temperature-difference",
                    Severity::Warning,
                    Some(&unit.id),
                    format!(
                        "the mixer joins streams at {low:.2} K and {high:.2} K, {spread:.2} K apart (limit {limit:.1} K), destroying {:.3} kW of exergy",
                        result.exergy_destroyed / 1e3
                    ),
                    "join the colder stream where the other is as cold (for an expander's exhaust, at the cold end of the return through the exchangers), or raise settings.mixer_temperature_limit".to_string(),
                )
                .value("temperature_difference_K", spread)
                .value("limit_K", limit)
                .value("exergy_destroyed_W", result.exergy_destroyed),
            );
        }
    }
}

/// An exchanger whose duty specification the streams cannot meet: what was asked,
/// what was delivered and where the pinch sits.
fn spec_not_met(id: &str, report: &ExchangerReport, where_: &str) -> Finding {
    let delivered = match report.specified {
        ExchangerSpec::Effectiveness(_) => format!("{:.6}", report.delivered),
        ExchangerSpec::Conductance(_) if report.delivered.is_infinite() => {
            "an unbounded UA (zero pinch)".to_string()
        }
        ExchangerSpec::Conductance(_) => format!("{:.4} kW/K", report.delivered / 1e3),
        _ => format!("{:.3} K", report.delivered),
    };
    Finding::new(
        "exchanger-spec-not-met",
        Severity::Error,
        Some(id),
        format!(
            "asked for {}, the streams deliver {delivered}: the smallest difference is {:.3} K at {where_}",
            report.specified.describe(),
            report.min_approach
        ),
        "the duty is held where the pinch reaches zero; ask for less (a larger approach), change the flow ratio, or specify a minimum_approach".to_string(),
    )
    .value("specified", report.specified.value())
    .value("delivered", report.delivered)
    .value("min_approach_K", report.min_approach)
    .value("position", report.min_approach_position)
}

fn compressors(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let UnitSpec::Compressor(compressor) = &unit.spec else {
            continue;
        };
        let inlet = &solution.streams[unit.inlets[0]];
        if inlet.state.vapour_fraction() < 1.0 - 1e-9 {
            out.push(
                Finding::new(
                    "liquid-at-compressor-suction",
                    Severity::Error,
                    Some(&unit.id),
                    format!("the suction carries liquid (vapour fraction {:.4}); liquid damages a compressor", inlet.state.vapour_fraction()),
                    "warm the suction stream in a recuperator or separate the liquid before the compressor".to_string(),
                )
                .value("vapour_fraction", inlet.state.vapour_fraction()),
            );
        }
        if let (
            CompressorModel::Staged { .. },
            Details::Compressor {
                discharge_temperatures,
            },
        ) = (&compressor.model, &result.performance.details)
        {
            let hottest = discharge_temperatures
                .iter()
                .copied()
                .fold(f64::NEG_INFINITY, f64::max);
            if hottest > plant.settings.discharge_limit {
                out.push(
                    Finding::new(
                        "discharge-temperature-high",
                        Severity::Warning,
                        Some(&unit.id),
                        format!(
                            "a stage discharges at {hottest:.1} K, above the limit of {:.1} K",
                            plant.settings.discharge_limit
                        ),
                        "add a stage or intercool more (the limit is settings.discharge_limit)"
                            .to_string(),
                    )
                    .value("discharge_temperature_K", hottest)
                    .value("discharge_limit_K", plant.settings.discharge_limit),
                );
            }
        }
    }
}

fn coolers_and_precoolers(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let inlet = unit.inlets.first().map(|&i| &solution.streams[i]);
        let outlet = unit.outlets.first().map(|&o| &solution.streams[o]);
        let (Some(inlet), Some(outlet)) = (inlet, outlet) else {
            continue;
        };
        match &unit.spec {
            UnitSpec::Cooler(cooler) if cooler.outlet_temperature < plant.ambient => out.push(
                cooler_below_ambient(&unit.id, cooler.outlet_temperature, plant.ambient),
            ),
            UnitSpec::Precooler(precooler) => {
                precooler_findings(&unit.id, precooler, inlet, outlet, &result.performance, out)
            }
            _ => {}
        }
    }
}

fn cooler_below_ambient(id: &str, target: f64, ambient: f64) -> Finding {
    Finding::new(
        "cooler-below-ambient",
        Severity::Error,
        Some(id),
        format!(
            "a cooler against ambient air or cooling water cannot reach {target:.2} K, below the ambient {ambient:.2} K"
        ),
        "use a precooler (bath or refrigerator) for temperatures below ambient".to_string(),
    )
    .value("outlet_temperature_K", target)
    .value("ambient_K", ambient)
}

fn precooler_findings(
    id: &str,
    precooler: &Precooler,
    inlet: &Flow,
    outlet: &Flow,
    performance: &Performance,
    out: &mut Vec<Finding>,
) {
    let target = precooler.outlet_temperature;
    let approach = precooler.approach;
    let heats = outlet.state.temperature > inlet.state.temperature + 1e-9
        || performance.duty.unwrap_or(0.0) < 0.0;
    if heats {
        out.push(
            Finding::new(
                "precooler-heats",
                Severity::Error,
                Some(id),
                format!(
                    "the stream arrives at {:.2} K, colder than the target {target:.2} K: the precooler would heat it",
                    inlet.state.temperature
                ),
                "remove the precooler or lower its target".to_string(),
            )
            .value("inlet_temperature_K", inlet.state.temperature)
            .value("outlet_temperature_K", outlet.state.temperature),
        );
    }
    let sink = match (&precooler.source, &performance.details) {
        (PrecoolerSource::Refrigerator { .. }, _) => None,
        (
            _,
            Details::Precooler {
                sink_temperature, ..
            },
        ) => Some(*sink_temperature),
        _ => None,
    };
    if let Some(sink) = sink.filter(|sink| target < sink + approach - 1e-9) {
        out.push(
            Finding::new(
                "precooler-colder-than-bath",
                Severity::Error,
                Some(id),
                format!(
                    "the target {target:.2} K is colder than the bath or coolant at {sink:.2} K plus the approach {approach:.2} K allows"
                ),
                format!(
                    "raise the target to at least {:.2} K, or lower the bath pressure",
                    sink + approach
                ),
            )
            .value("outlet_temperature_K", target)
            .value("sink_temperature_K", sink)
            .value("approach_K", approach),
        );
    }
    if let PrecoolerSource::Bath {
        fluid, pressure, ..
    } = precooler.source
    {
        bath_findings(id, fluid, pressure, performance, out);
    }
    let short = matches!(precooler.source, PrecoolerSource::Coolant)
        && outlet.state.temperature > target + 1e-6;
    if short {
        out.push(
            Finding::new(
                "precooler-short-of-target",
                Severity::Warning,
                Some(id),
                format!(
                    "the coolant can take only part of the duty: the stream leaves at {:.2} K instead of {target:.2} K",
                    outlet.state.temperature
                ),
                "send more coolant (a larger flow in the coolant's loop) or accept the warmer outlet"
                    .to_string(),
            )
            .value("outlet_temperature_K", outlet.state.temperature)
            .value("target_K", target),
        );
    }
}

/// Margin between a bath's boiling temperature and its cryogen's triple point below
/// which the bath may freeze, K (common practice).
pub const BATH_TRIPLE_POINT_MARGIN: f64 = 1.0;

fn bath_findings(
    id: &str,
    cryogen: &Fluid,
    pressure: f64,
    performance: &Performance,
    out: &mut Vec<Finding>,
) {
    let Details::Precooler {
        sink_temperature, ..
    } = performance.details
    else {
        return;
    };
    let margin = sink_temperature - cryogen.triple_temperature;
    if margin < BATH_TRIPLE_POINT_MARGIN {
        out.push(
            Finding::new(
                "bath-near-triple-point",
                Severity::Warning,
                Some(id),
                format!(
                    "the {} bath boils at {sink_temperature:.3} K, only {margin:.3} K above its triple point {:.3} K: it may freeze where the pressure dips",
                    cryogen.name, cryogen.triple_temperature
                ),
                format!(
                    "raise the bath pressure so that it boils at least {BATH_TRIPLE_POINT_MARGIN:.0} K above the triple point"
                ),
            )
            .value("bath_temperature_K", sink_temperature)
            .value("triple_temperature_K", cryogen.triple_temperature)
            .value("bath_pressure_Pa", pressure),
        );
    }
    if performance.work_in > 0.0 {
        out.push(
            Finding::new(
                "bath-vacuum-pump",
                Severity::Note,
                Some(id),
                format!(
                    "the bath is held at {:.4} bar, below one atmosphere: its vacuum pump takes {:.3} kW to return the boil-off to atmospheric pressure, counted in the shaft power",
                    pressure / 1e5,
                    performance.work_in / 1e3
                ),
                "the pump's efficiency is the precooler's vacuum_pump_efficiency (default 0.5, assumed)".to_string(),
            )
            .value("vacuum_pump_power_W", performance.work_in),
        );
    }
}

/// Bought cryogen that enters as a feed stream is charged its work equivalent, as
/// a bath's is; say so, with the figure.
fn cryogen_feeds(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let UnitSpec::Feed(feed) = &unit.spec else {
            continue;
        };
        let Some(charge) = feed.cryogen else {
            continue;
        };
        let how = if charge.is_default {
            "its exergy over an assumed figure of merit of 0.25 for the plant that makes it (state your own with liquid_work)"
        } else {
            "the flowsheet's liquid_work"
        };
        out.push(
            Finding::new(
                "cryogen-feed-charged",
                Severity::Note,
                Some(&unit.id),
                format!(
                    "{} enters at {:.2} K as bought cryogen: charged {:.1} kJ/kg ({how}), {:.3} kW in the precooling work",
                    feed.fluid.name,
                    feed.temperature,
                    charge.work_per_kg / 1e3,
                    result.performance.precooling_work / 1e3
                ),
                "reuse the cryogen's cold vapour (warm it against a process stream) to get the most from what is bought".to_string(),
            )
            .value("work_per_kg_J", charge.work_per_kg)
            .value("precooling_work_W", result.performance.precooling_work),
        );
    }
}

fn expanders(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (unit, result) in plant.units.iter().zip(&solution.units) {
        let Details::Expander {
            outlet_liquid_fraction,
        } = result.performance.details
        else {
            continue;
        };
        if outlet_liquid_fraction > plant.settings.expander_liquid_limit {
            out.push(
                Finding::new(
                    "wet-expander-outlet",
                    Severity::Warning,
                    Some(&unit.id),
                    format!(
                        "the expander exhausts {:.1} % liquid, above the limit of {:.1} %",
                        100.0 * outlet_liquid_fraction,
                        100.0 * plant.settings.expander_liquid_limit
                    ),
                    "expand from a warmer inlet, to a higher outlet pressure, or send less flow through the expander (the limit is settings.expander_liquid_limit)".to_string(),
                )
                .value("outlet_liquid_fraction", outlet_liquid_fraction)
                .value("limit", plant.settings.expander_liquid_limit),
            );
        }
    }
}

/// Streams near the edge of their equation's range: within 1 % of the lowest
/// temperature (close to the triple point, where solid may form) or of the highest
/// pressure. States outside the range never get this far: the flash refuses them.
fn ranges(plant: &Plant, solution: &Solution, out: &mut Vec<Finding>) {
    for (s, flow) in solution.streams.iter().enumerate() {
        let f = flow.state.fluid();
        let t = flow.state.temperature;
        let near_triple = t < f.temperature_min * 1.01;
        let near_pressure = flow.state.pressure > 0.99 * f.pressure_max;
        if near_triple || near_pressure {
            let limit = if near_triple {
                format!(
                    "lowest temperature {:.3} K (solid may form)",
                    f.temperature_min
                )
            } else {
                format!("highest pressure {:.0} MPa", f.pressure_max / 1e6)
            };
            out.push(
                Finding::new(
                    "state-near-range-limit",
                    Severity::Warning,
                    Some(&plant.units[plant.streams[s].from.unit].id),
                    format!(
                        "the stream {} ({t:.3} K, {:.4} bar) lies within 1 % of the {} equation's {}",
                        solution.stream_names[s],
                        flow.state.pressure / 1e5,
                        f.name,
                        limit
                    ),
                    "keep streams clear of the triple point (raise the pressure there) and of the equation's pressure limit".to_string(),
                )
                .value("temperature_K", t)
                .value("pressure_Pa", flow.state.pressure),
            );
        }
    }
}

/// Balance tolerances: mass 1e-9, energy 1e-6, exergy 1e-6 (relative).
pub(crate) fn balances(solution: &Solution, out: &mut Vec<Finding>) {
    let s = &solution.summary;
    for (name, value, tolerance) in [
        ("mass", s.mass_closure, 1e-9),
        ("energy", s.energy_closure, 1e-6),
        ("exergy", s.exergy_closure, 1e-6),
    ] {
        if !(value.abs() <= tolerance) {
            out.push(
                Finding::new(
                    "balance-not-closed",
                    Severity::Error,
                    None,
                    format!(
                        "the {name} balance closes only to {value:.3e} (tolerance {tolerance:.0e})"
                    ),
                    "tighten settings.tolerance; if it persists, report the flowsheet as a bug"
                        .to_string(),
                )
                .value("closure", value)
                .value("tolerance", tolerance),
            );
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_open_balance_is_reported() {
        let plant = crate::flowsheet::load_str(
            "title: t\nambient: 300 K\nfluids: [nitrogen]\nequipment:\n  - {id: f, kind: feed, fluid: nitrogen, temperature: 300 K, pressure: 1 bar, flow: 1 kg/s}\n  - {id: p, kind: product, inlet: f, role: vent}\n",
            "t",
            &[],
        )
        .unwrap();
        let mut solution = crate::solve::solve(&plant, &Default::default()).unwrap();
        let mut findings = Vec::new();
        balances(&solution, &mut findings);
        assert!(findings.is_empty());
        solution.summary.energy_closure = 3e-4;
        balances(&solution, &mut findings);
        assert_eq!(findings.len(), 1);
        assert_eq!(findings[0].id, "balance-not-closed");
        assert!(findings[0].message.contains("energy"));
    }
}
