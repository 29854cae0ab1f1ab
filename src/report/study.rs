//! Text, JSON and CSV of studies: a sweep's table and its best case, an
//! optimisation's result, and a comparison's table.

use super::table::{Align, TextTable};
use crate::error::{Error, Result};
use crate::study::compare::Compared;
use crate::study::optimize::{Bounded, Objective, Optimum};
use crate::study::Sweep;

/// The cases of a sweep as a table, then the case of highest yield and how many
/// failed.
pub fn sweep_text(study: &Sweep) -> String {
    let mut headers: Vec<(String, Align)> = study
        .variables
        .iter()
        .map(|v| (format!("{} [{}]", v.name(), v.unit), Align::Right))
        .collect();
    headers.extend([
        ("yield".to_string(), Align::Right),
        ("kWh/kg".to_string(), Align::Right),
        ("status".to_string(), Align::Left),
    ]);
    let refs: Vec<(&str, Align)> = headers.iter().map(|(h, a)| (h.as_str(), *a)).collect();
    let mut table = TextTable::new(&refs);
    for case in &study.cases {
        let mut row: Vec<String> = case.coordinates.iter().map(|c| format!("{c:.4}")).collect();
        match &case.outcome {
            Ok(m) => row.extend([
                format!("{:.5}", m.liquid_yield),
                if m.specific_energy.is_finite() {
                    format!("{:.3}", m.specific_energy)
                } else {
                    "—".into() // no liquid
                },
                if m.feasible() {
                    "ok".into()
                } else {
                    format!(
                        "INFEASIBLE: {} design error{}",
                        m.design_errors,
                        if m.design_errors == 1 { "" } else { "s" }
                    )
                },
            ]),
            Err(reason) => row.extend([
                String::new(),
                String::new(),
                format!("failed: {}", reason.chars().take(60).collect::<String>()),
            ]),
        }
        table.row(row);
    }
    let mut out = table.render();
    let failed = study.cases.iter().filter(|c| c.outcome.is_err()).count();
    let infeasible = study
        .cases
        .iter()
        .filter(|c| c.outcome.as_ref().is_ok_and(|m| !m.feasible()))
        .count();
    let tally = format!(
        "{infeasible} of {} cases infeasible (design errors), {failed} failed",
        study.cases.len()
    );
    // Only feasible cases can be best.
    match study
        .cases
        .iter()
        .filter_map(|c| c.outcome.as_ref().ok().map(|m| (c, m)))
        .filter(|(_, m)| m.feasible())
        .max_by(|a, b| a.1.liquid_yield.total_cmp(&b.1.liquid_yield))
    {
        Some((case, m)) => {
            let at: Vec<String> = study
                .variables
                .iter()
                .zip(&case.coordinates)
                .map(|(v, c)| {
                    format!("{} = {} {}", v.name(), readable(*c), v.unit)
                        .trim_end()
                        .to_string()
                })
                .collect();
            out.push_str(&format!(
                "\nhighest yield of the feasible cases {:.5} at {}; {tally}\n",
                m.liquid_yield,
                at.join(", ")
            ));
        }
        None => out.push_str(&format!("\nno feasible case: {tally}\n")),
    }
    out
}

/// A grid value as people read it: six significant digits, trailing zeros dropped
/// but one decimal kept (`144.444 bar`, `160.0 bar`, `0.3 bar`).
pub fn readable(value: f64) -> String {
    if value == 0.0 || !value.is_finite() {
        return format!("{value}");
    }
    let digits = (5 - value.abs().log10().floor() as i32).clamp(0, 12) as usize;
    let text = format!("{value:.digits$}");
    if !text.contains('.') {
        return format!("{text}.0");
    }
    let trimmed = text.trim_end_matches('0');
    if trimmed.ends_with('.') {
        format!("{trimmed}0")
    } else {
        trimmed.to_string()
    }
}

/// An optimisation's result: the best values, the figures there, the effort.
pub fn optimum_text(
    objective: Objective,
    file: &str,
    variables: &[Bounded],
    best: &Optimum,
) -> String {
    let mut out = format!("{} of {}\n", objective.name(), file);
    for (v, x) in variables.iter().zip(&best.values) {
        out.push_str(&format!("  {}.{} = {x:.6} {}\n", v.target, v.key, v.unit));
    }
    let m = &best.metrics;
    out.push_str(&format!(
        "  objective {:.6}; liquid yield {:.6}; specific energy {:.4} kWh/kg; smallest approach {:.3} K\n",
        best.objective, m.liquid_yield, m.specific_energy, m.min_approach
    ));
    out.push_str(&format!(
        "  {} solver iterations, {} flowsheet solves ({} infeasible, never taken as best); constraint {}\n",
        best.iterations,
        best.solves,
        best.infeasible_solves,
        if best.constraint_met { "met" } else { "NOT met" }
    ));
    if best.stopped_at_cap {
        out.push_str(&format!(
            "  stopped at the iteration cap ({}): the optimum may not be reached; raise --iterations\n",
            best.iterations
        ));
    }
    for (v, bound) in variables.iter().zip(&best.on_bound) {
        if let Some(bound) = bound {
            out.push_str(&format!(
                "  {}.{} sits on its {bound} bound: the optimum may lie outside the range\n",
                v.target, v.key
            ));
        }
    }
    out
}

/// An optimisation's result as one JSON object.
pub fn optimum_json(
    objective: Objective,
    file: &str,
    variables: &[Bounded],
    best: &Optimum,
) -> String {
    let values: Vec<serde_json::Value> = variables
        .iter()
        .zip(&best.values)
        .map(|(v, x)| {
            let name = format!("{}.{}", v.target, v.key);
            serde_json::json!({"name": name, "value": x, "unit": v.unit})
        })
        .collect();
    let m = &best.metrics;
    let json = serde_json::json!({
        "flowsheet": file,
        "objective": objective.name(),
        "objective_value": best.objective,
        "values": values,
        "liquid_yield": m.liquid_yield,
        "specific_energy_kWh_per_kg": m.specific_energy,
        "figure_of_merit": m.figure_of_merit,
        "min_approach_K": m.min_approach,
        "design_errors": m.design_errors,
        "iterations": best.iterations,
        "solves": best.solves,
        "constraint_met": best.constraint_met,
        "stopped_at_cap": best.stopped_at_cap,
        "on_bound": best.on_bound,
        "infeasible_solves": best.infeasible_solves,
    });
    pretty(&json)
}

/// The text cells of one flowsheet of a comparison: its figures, or its error.
fn comparison_cells(case: &Compared) -> Vec<String> {
    let s = match &case.outcome {
        Ok(s) => s,
        Err(e) => {
            let mut cells = vec![case.name.clone()];
            cells.push(format!(
                "failed: {}",
                e.to_string().chars().take(70).collect::<String>()
            ));
            cells.extend(std::iter::repeat_n(String::new(), 6));
            return cells;
        }
    };
    vec![
        case.name.clone(),
        s.liquid_yield.map_or("—".into(), |y| format!("{y:.4}")),
        format!("{:.3}", s.liquid_flow * 3600.0),
        format!("{:.2}", s.shaft_power / 1e3),
        format!("{:.2}", s.precooling_work / 1e3),
        s.cryogen_per_kg_liquid()
            .map_or("—".into(), |c| format!("{c:.3}")),
        s.specific_energy.map_or("—".into(), |e| format!("{e:.3}")),
        s.figure_of_merit.map_or("—".into(), |f| format!("{f:.4}")),
    ]
}

/// A comparison as a text table; a flowsheet that failed keeps its row with its
/// error.
pub fn comparison_text(cases: &[Compared]) -> String {
    let mut table = TextTable::new(&[
        ("flowsheet", Align::Left),
        ("yield", Align::Right),
        ("liquid [kg/h]", Align::Right),
        ("power [kW]", Align::Right),
        ("precool [kW]", Align::Right),
        ("cryogen [kg/kg]", Align::Right),
        ("kWh/kg", Align::Right),
        ("FOM", Align::Right),
    ]);
    for case in cases {
        table.row(comparison_cells(case));
    }
    table.render()
}

/// A comparison as CSV, SI units in the headers; empty cells where a figure does
/// not exist, and the reason in `error` where a flowsheet failed.
pub fn comparison_csv(cases: &[Compared]) -> Result<String> {
    let mut writer = csv::Writer::from_writer(Vec::new());
    let bad = |e: csv::Error| Error::Input(format!("cannot write the CSV: {e}"));
    writer
        .write_record([
            "flowsheet",
            "liquid_yield [-]",
            "liquid_flow [kg/s]",
            "shaft_power [W]",
            "precooling_work [W]",
            "cryogen_per_kg_liquid [kg/kg]",
            "specific_energy [kWh/kg]",
            "figure_of_merit [-]",
            "error",
        ])
        .map_err(bad)?;
    let cell = |v: Option<f64>| v.map_or(String::new(), |x| x.to_string());
    for case in cases {
        let row = match &case.outcome {
            Ok(s) => vec![
                case.name.clone(),
                cell(s.liquid_yield),
                s.liquid_flow.to_string(),
                s.shaft_power.to_string(),
                s.precooling_work.to_string(),
                cell(s.cryogen_per_kg_liquid()),
                cell(s.specific_energy),
                cell(s.figure_of_merit),
                String::new(),
            ],
            Err(e) => {
                let mut row = vec![case.name.clone()];
                row.extend(std::iter::repeat_n(String::new(), 7));
                row.push(e.to_string());
                row
            }
        };
        writer.write_record(row).map_err(bad)?;
    }
    let bytes = writer
        .into_inner()
        .map_err(|e| Error::Input(format!("cannot write the CSV: {e}")))?;
    String::from_utf8(bytes).map_err(|e| Error::Input(format!("cannot write the CSV: {e}")))
}

/// A comparison as a JSON array, SI units; a failed flowsheet carries `error`.
pub fn comparison_json(cases: &[Compared]) -> String {
    let rows: Vec<serde_json::Value> = cases
        .iter()
        .map(|case| match &case.outcome {
            Ok(s) => serde_json::json!({
                "flowsheet": case.name,
                "liquid_yield": s.liquid_yield,
                "liquid_flow_kg_s": s.liquid_flow,
                "shaft_power_W": s.shaft_power,
                "precooling_work_W": s.precooling_work,
                "cryogen_per_kg_liquid": s.cryogen_per_kg_liquid(),
                "specific_energy_kWh_per_kg": s.specific_energy,
                "figure_of_merit": s.figure_of_merit,
            }),
            Err(e) => serde_json::json!({"flowsheet": case.name, "error": e.to_string()}),
        })
        .collect();
    pretty(&serde_json::Value::Array(rows))
}

fn pretty(value: &serde_json::Value) -> String {
    serde_json::to_string_pretty(value).unwrap_or_default() + "\n"
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn grid_values_read_plainly() {
        assert_eq!(readable(144.44444444444446), "144.444");
        assert_eq!(readable(160.0), "160.0");
        assert_eq!(readable(0.3), "0.3");
        assert_eq!(readable(79.5), "79.5");
        assert_eq!(readable(2.5e-5), "0.000025");
    }
}
