//! Inversion-curve figures and throttling results as text and JSON.

use super::solution::wrap;
use super::table::{Align, TextTable};
use crate::fluids::inversion::InversionCurve;
use crate::fluids::throttling::Throttling;
use crate::fluids::Fluid;
use serde::Serialize;

/// The inversion figures and the curve as a table.
pub fn text(fluid: &Fluid, curve: &InversionCurve, rows: usize) -> String {
    let mut out = format!(
        "{}: Joule-Thomson inversion ({})\n\n",
        fluid.name, fluid.source_key
    );
    let range_note = if curve.max_inversion_temperature_within_range {
        String::new()
    } else {
        format!(
            "   (above the equation's range, {} K: extrapolated)",
            fluid.temperature_max
        )
    };
    out.push_str(&format!(
        "  maximum inversion temperature   {:.2} K  ({:.2} °C){range_note}\n",
        curve.max_inversion_temperature,
        curve.max_inversion_temperature - 273.15
    ));
    out.push_str(&format!(
        "  Boyle temperature               {:.2} K\n",
        curve.boyle_temperature
    ));
    out.push_str(&format!(
        "  inversion-curve pressure max.   {:.3} bar at {:.2} K\n",
        curve.max_inversion_pressure / 1e5,
        curve.temperature_at_max_pressure
    ));
    let end = curve.curve.last();
    if let Some(p) = end {
        out.push_str(&format!(
            "  cold end of the curve           {:.2} K, {:.3} bar ({})\n",
            p.temperature,
            p.pressure / 1e5,
            match curve.cold_end {
                crate::fluids::inversion::CurveEnd::SaturatedLiquid =>
                    "on the saturated-liquid line",
                crate::fluids::inversion::CurveEnd::LowestTemperature =>
                    "at the lowest valid temperature",
                crate::fluids::inversion::CurveEnd::HighestPressure =>
                    "at the highest valid pressure",
            }
        ));
    }
    out.push_str("\n  Throttling cools inside the curve (between its lower and upper branch) and warms outside.\n\n");
    let mut table = TextTable::new(&[
        ("T [K]", Align::Right),
        ("p [bar]", Align::Right),
        ("ρ [kg/m³]", Align::Right),
        ("branch", Align::Left),
    ]);
    let n = curve.curve.len();
    let step = (n / rows.max(1)).max(1);
    // The upper branch runs from the zero-pressure limit to the pressure maximum.
    let top = curve
        .curve
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.pressure.total_cmp(&b.1.pressure))
        .map_or(0, |(i, _)| i);
    for (i, p) in curve.curve.iter().enumerate() {
        if i % step != 0 && i != n - 1 {
            continue;
        }
        let branch = if i <= top { "upper" } else { "lower" };
        let mark = if p.within_range {
            ""
        } else {
            " (outside range)"
        };
        table.row(vec![
            format!("{:.3}", p.temperature),
            format!("{:.4}", p.pressure / 1e5),
            format!("{:.3}", p.density),
            format!("{branch}{mark}"),
        ]);
    }
    out.push_str(&table.render());
    out
}

/// The inversion figures as JSON (the full curve included).
pub fn json(curve: &InversionCurve) -> String {
    serde_json::to_string_pretty(curve).unwrap_or_default() + "\n"
}

/// JSON form of a throttling result.
#[derive(Debug, Serialize)]
pub struct ThrottleRecord {
    /// The inlet state.
    pub inlet: super::state::StateRecord,
    /// The outlet state.
    pub outlet: super::state::StateRecord,
    /// Outlet minus inlet temperature, K.
    #[serde(rename = "temperature_change_K")]
    pub temperature_change_k: f64,
    /// Vapour mass fraction at the outlet.
    pub vapour_fraction: f64,
    /// What the whole expansion does (the integral effect): `cools`, `warms` or
    /// `no-change`.
    pub verdict: String,
    /// The verdict in words.
    pub verdict_words: String,
    /// Where the inlet lies against the inversion curve, which decides what a small
    /// pressure drop there does (the differential effect, the sign of μJT):
    /// `inside-cools`, `outside-warms`, `above-maximum-inversion-temperature`,
    /// `two-phase-inlet`.
    pub inlet_effect: String,
    /// The inlet effect in words.
    pub inlet_effect_words: String,
    /// Maximum inversion temperature, K.
    #[serde(rename = "max_inversion_temperature_K")]
    pub max_inversion_temperature_k: f64,
    /// Upper inversion temperature at the inlet pressure, K.
    #[serde(rename = "upper_inversion_temperature_at_inlet_pressure_K")]
    pub upper_inversion_k: Option<f64>,
    /// Lower inversion temperature at the inlet pressure, K.
    #[serde(rename = "lower_inversion_temperature_at_inlet_pressure_K")]
    pub lower_inversion_k: Option<f64>,
}

/// What the whole expansion does to the temperature: the integral effect.
fn expansion_key(t: &Throttling) -> &'static str {
    if t.temperature_change < 0.0 {
        "cools"
    } else if t.temperature_change > 0.0 {
        "warms"
    } else {
        "no-change"
    }
}

/// The whole expansion's effect in words, reconciled with the inlet's: an inlet
/// outside the curve whose expansion still cools is said so, not contradicted.
fn expansion_words(t: &Throttling) -> String {
    let change = t.temperature_change.abs();
    let whole = match expansion_key(t) {
        "cools" => format!("the expansion as a whole cools the stream by {change:.4} K"),
        "warms" => format!("the expansion as a whole warms the stream by {change:.4} K"),
        _ => "the expansion leaves the temperature unchanged".to_string(),
    };
    use crate::fluids::throttling::InletVerdict::*;
    match (t.verdict, expansion_key(t)) {
        (OutsideWarms, "cools") => format!(
            "{whole}: its first part warms, but the path crosses into the inversion curve, where the rest cools more"
        ),
        (InsideCools, "warms") => format!(
            "{whole}: its first part cools, but the path leaves the inversion curve, where the rest warms more"
        ),
        _ => whole,
    }
}

/// The throttling result as JSON.
pub fn throttle_json(t: &Throttling) -> String {
    let record = ThrottleRecord {
        inlet: super::state::StateRecord::of(&t.inlet),
        outlet: super::state::StateRecord::of(&t.outlet),
        temperature_change_k: t.temperature_change,
        vapour_fraction: t.vapour_fraction,
        verdict: expansion_key(t).to_string(),
        verdict_words: expansion_words(t),
        inlet_effect: t.verdict.key().to_string(),
        inlet_effect_words: t.verdict.words().to_string(),
        max_inversion_temperature_k: t.max_inversion_temperature,
        upper_inversion_k: t.inversion_at_inlet.upper,
        lower_inversion_k: t.inversion_at_inlet.lower,
    };
    serde_json::to_string_pretty(&record).unwrap_or_default() + "\n"
}

/// The throttling result as text.
pub fn throttle_text(t: &Throttling) -> String {
    let fluid = t.inlet.fluid();
    let mut out = format!(
        "{}: isenthalpic throttling ({})\n",
        fluid.name, fluid.source_key
    );
    let line = |label: &str, s: &crate::fluids::State| {
        format!(
            "  {label:<8}T {:>10.4} K   p {:>11.5} bar   h {:>11.4} kJ/kg   {}{}\n",
            s.temperature,
            s.pressure / 1e5,
            s.enthalpy / 1e3,
            s.phase.name(),
            s.quality
                .map_or(String::new(), |x| format!(", vapour fraction {x:.5}"))
        )
    };
    out.push_str(&line("inlet", &t.inlet));
    out.push_str(&line("outlet", &t.outlet));
    out.push_str(&format!("  ΔT      {:+.4} K\n", t.temperature_change));
    out.push_str(&wrap(
        &format!("  verdict: {}", expansion_words(t)),
        98,
        "    ",
    ));
    let mu = t
        .inlet
        .joule_thomson()
        .map_or(String::new(), |mu| format!(" (μJT {:+.5} K/bar)", mu * 1e5));
    out.push_str(&wrap(
        &format!("  at the inlet: {}{mu}", t.verdict.words()),
        98,
        "    ",
    ));
    let inv = &t.inversion_at_inlet;
    match (inv.lower, inv.upper) {
        (_, None) => out.push_str(&format!(
            "  at {:.3} bar the inlet is above the inversion curve's pressure maximum: no temperature cools on a small drop\n",
            inv.pressure / 1e5
        )),
        (lower, Some(upper)) => out.push_str(&format!(
            "  inversion temperatures at the inlet pressure: upper {upper:.2} K{}\n",
            lower.map_or(String::from(", lower branch already ended on the saturation line"), |l| format!(", lower {l:.2} K"))
        )),
    }
    use crate::fluids::throttling::InletVerdict::*;
    match t.verdict {
        AboveMaximumInversionTemperature => out.push_str(&format!(
            "  maximum inversion temperature {:.2} K: precool the stream below it (for example in a recuperator against the cold return gas, or in a liquid-nitrogen bath) before the valve\n",
            t.max_inversion_temperature
        )),
        OutsideWarms => out.push_str(&wrap(
            &format!(
                "  maximum inversion temperature {:.2} K. An inlet outside the curve is normal in a recuperative loop; there the best high pressure is the inversion pressure at the recuperator's warm end (the design checks work it out)",
                t.max_inversion_temperature
            ),
            98,
            "    ",
        )),
        _ => out.push_str(&format!(
            "  maximum inversion temperature {:.2} K\n",
            t.max_inversion_temperature
        )),
    }
    out
}
