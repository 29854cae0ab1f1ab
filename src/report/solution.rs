//! A solved flowsheet as tables people read (fitting 100 columns) and as JSON with
//! the documented schema (docs/output.md).

use super::table::{fixed, Align, TextTable};
use crate::equipment::{Details, Role};
use crate::rules::Finding;
use crate::solve::Solution;
use serde::{Deserialize, Serialize};

/// One stream in the JSON output.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct StreamRecord {
    /// `source.port`.
    pub name: String,
    /// Fluid.
    pub fluid: String,
    /// K.
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    /// Pa.
    #[serde(rename = "pressure_Pa")]
    pub pressure_pa: f64,
    /// J/kg.
    #[serde(rename = "enthalpy_J_kg")]
    pub enthalpy_j_kg: f64,
    /// J/(kg·K).
    #[serde(rename = "entropy_J_kgK")]
    pub entropy_j_kgk: f64,
    /// kg/m³.
    pub density_kg_m3: f64,
    /// kg/s.
    pub mass_flow_kg_s: f64,
    /// Vapour mass fraction (0 liquid, 1 gas).
    pub vapour_fraction: f64,
    /// Phase name.
    pub phase: String,
    /// Para mole fraction of a hydrogen stream (0.25 for frozen normal hydrogen).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub para_fraction: Option<f64>,
}

/// A liquid hydrogen product's para fraction and its losses in storage.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct HydrogenStorageRecord {
    /// The product's para fraction.
    pub para_fraction: f64,
    /// Whether the product is frozen normal hydrogen (no para fraction followed).
    pub frozen_normal: bool,
    /// The equilibrium para fraction at the product's temperature.
    pub equilibrium_para_fraction: f64,
    /// Ortho–para conversion enthalpy of the liquid, J/kg.
    #[serde(rename = "conversion_enthalpy_J_kg")]
    pub conversion_enthalpy_j_kg: f64,
    /// Latent heat at the product's pressure, J/kg.
    #[serde(rename = "latent_heat_J_kg")]
    pub latent_heat_j_kg: f64,
    /// Storage times, h.
    pub storage_hours: Vec<f64>,
    /// Para fraction after each storage time.
    pub para_fraction_after: Vec<f64>,
    /// Fraction of the liquid boiled off by conversion after each storage time.
    pub boiled_off_after: Vec<f64>,
    /// Liquid yield counting only what is left after each storage time.
    pub effective_liquid_yield_after: Option<Vec<f64>>,
}

/// One unit in the JSON output.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct EquipmentRecord {
    /// Id.
    pub id: String,
    /// Kind.
    pub kind: String,
    /// Shaft power in, W (negative when recovered).
    #[serde(rename = "power_W")]
    pub power_w: f64,
    /// Heat transferred, W.
    #[serde(rename = "duty_W")]
    pub duty_w: Option<f64>,
    /// Work equivalent of precooling, W.
    #[serde(rename = "precooling_work_W")]
    pub precooling_work_w: f64,
    /// Exergy destroyed, W.
    #[serde(rename = "exergy_destroyed_W")]
    pub exergy_destroyed_w: f64,
    /// Exchangers: smallest temperature difference, K.
    #[serde(rename = "min_approach_K")]
    pub min_approach_k: Option<f64>,
    /// Exchangers: where it occurs, fraction of duty from the warm end.
    pub min_approach_position: Option<f64>,
    /// Exchangers: conductance, W/K.
    #[serde(rename = "ua_W_K")]
    pub ua_w_k: Option<f64>,
    /// Exchangers: effectiveness.
    pub effectiveness: Option<f64>,
    /// Compressors: discharge temperature of each stage, K.
    #[serde(rename = "discharge_temperatures_K")]
    pub discharge_temperatures_k: Option<Vec<f64>>,
    /// Precoolers: cryogen boiled, kg/s.
    pub boil_off_kg_s: Option<f64>,
    /// Expanders: liquid fraction at the outlet.
    pub outlet_liquid_fraction: Option<f64>,
    /// Multistream exchangers: each stream's temperatures and duty.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub exchanger_streams: Option<Vec<ExchangerStreamRecord>>,
}

/// One stream of a multistream exchanger.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct ExchangerStreamRecord {
    /// The stream's name (its outlet port).
    pub name: String,
    /// `hot` or `cold`.
    pub side: String,
    /// K.
    #[serde(rename = "inlet_temperature_K")]
    pub inlet_temperature_k: f64,
    /// K.
    #[serde(rename = "outlet_temperature_K")]
    pub outlet_temperature_k: f64,
    /// Heat exchanged with the other streams, W.
    #[serde(rename = "duty_W")]
    pub duty_w: f64,
    /// Whether its outlet temperature was specified (else set by the energy balance
    /// or the pinch).
    pub outlet_specified: bool,
}

/// One row of the exergy account.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct AccountRecord {
    /// What the row is: `minimum work`, `destroyed in <id>`, `lost in vents`,
    /// `precooling spent outside the plant`.
    pub item: String,
    /// Its exergy, W.
    #[serde(rename = "exergy_W")]
    pub exergy_w: f64,
}

/// Where the work the plant takes (shaft plus precooling work, the figure of
/// merit's denominator) goes: the minimum work, the exergy destroyed in each unit,
/// the exergy lost in vents and the precooling work spent outside the plant. The rows
/// sum to the work taken within the exergy balance's closure.
pub fn exergy_account(solution: &Solution) -> Vec<(String, f64)> {
    let s = &solution.summary;
    let mut rows = vec![("minimum work".to_string(), s.minimum_work)];
    for u in &solution.units {
        if !matches!(u.role, Role::Feed(_) | Role::Product(_)) {
            rows.push((format!("destroyed in {}", u.id), u.exergy_destroyed));
        }
    }
    rows.push(("lost in vents".to_string(), s.exergy_lost));
    rows.push((
        "precooling spent outside the plant".to_string(),
        s.precooling_exergy_outside,
    ));
    rows
}

/// Balances in the JSON output.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct BalanceRecord {
    /// (feeds − products)/feeds.
    pub mass: f64,
    /// Energy in − out over energy flows.
    pub energy: f64,
    /// Exergy supplied − (minimum work + lost + destroyed) over exergy supplied.
    pub exergy: f64,
}

/// The whole solution in the JSON output.
#[derive(Debug, Clone, Serialize, Deserialize, PartialEq)]
pub struct SolutionRecord {
    /// Title.
    pub title: String,
    /// Source file.
    pub source: String,
    /// K.
    #[serde(rename = "ambient_K")]
    pub ambient_k: f64,
    /// Always true: a case that does not converge is an error, not a result.
    pub converged: bool,
    /// Passes.
    pub iterations: usize,
    /// Largest scaled tear residual after each pass.
    pub residual_log: Vec<f64>,
    /// Tear streams.
    pub tear_streams: Vec<String>,
    /// Recycles as lists of unit ids.
    pub recycles: Vec<Vec<String>>,
    /// kg/s of liquid product.
    pub liquid_flow_kg_s: f64,
    /// Liquid per mass compressed.
    pub liquid_yield: Option<f64>,
    /// L/h of liquid product.
    pub liquid_flow_l_h: f64,
    /// W.
    #[serde(rename = "shaft_power_W")]
    pub shaft_power_w: f64,
    /// W.
    #[serde(rename = "precooling_work_W")]
    pub precooling_work_w: f64,
    /// W.
    #[serde(rename = "precooling_duty_W")]
    pub precooling_duty_w: f64,
    /// kg/s of cryogen boiled.
    pub cryogen_boil_off_kg_s: f64,
    /// Cryogen bought (boiled) per kg of liquid product, kg/kg.
    pub cryogen_per_kg_liquid: Option<f64>,
    /// Shaft power per kg liquid.
    #[serde(rename = "specific_energy_shaft_kWh_per_kg")]
    pub specific_energy_shaft: Option<f64>,
    /// Shaft plus precooling per kg liquid.
    #[serde(rename = "specific_energy_kWh_per_kg")]
    pub specific_energy: Option<f64>,
    /// W.
    #[serde(rename = "minimum_work_W")]
    pub minimum_work_w: f64,
    /// Minimum work over shaft plus precooling work.
    pub figure_of_merit: Option<f64>,
    /// W.
    #[serde(rename = "exergy_supplied_W")]
    pub exergy_supplied_w: f64,
    /// W.
    #[serde(rename = "exergy_destroyed_W")]
    pub exergy_destroyed_w: f64,
    /// W.
    #[serde(rename = "exergy_lost_W")]
    pub exergy_lost_w: f64,
    /// Exergy brought in by the feeds of raw gas, credited in the minimum work.
    #[serde(rename = "feed_exergy_W")]
    pub feed_exergy_w: f64,
    /// Precooling work beyond the cold exergy the plant draws from it.
    #[serde(rename = "precooling_exergy_outside_W")]
    pub precooling_exergy_outside_w: f64,
    /// Work equivalent of cryogen entering as feed streams (in the precooling work).
    #[serde(rename = "cryogen_feed_work_W")]
    pub cryogen_feed_work_w: f64,
    /// Where the work taken goes; the rows sum to `exergy_supplied_W`.
    pub exergy_account: Vec<AccountRecord>,
    /// Closures.
    pub balances: BalanceRecord,
    /// Streams.
    pub streams: Vec<StreamRecord>,
    /// Equipment.
    pub equipment: Vec<EquipmentRecord>,
    /// A liquid hydrogen product's para fraction and storage losses.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub hydrogen_storage: Option<HydrogenStorageRecord>,
    /// Design-check findings: `{id, severity, equipment, message, values, hint}`.
    pub findings: Vec<Finding>,
    /// The safety caution carried by every report.
    pub caution: String,
}

impl SolutionRecord {
    /// The record of a solution and its design-check findings.
    pub fn of(solution: &Solution, findings: &[Finding]) -> SolutionRecord {
        let s = &solution.summary;
        let streams = solution
            .stream_names
            .iter()
            .zip(&solution.streams)
            .map(|(name, f)| StreamRecord {
                name: name.clone(),
                fluid: f.state.fluid().name.clone(),
                temperature_k: f.state.temperature,
                pressure_pa: f.state.pressure,
                enthalpy_j_kg: f.state.enthalpy,
                entropy_j_kgk: f.state.entropy,
                density_kg_m3: f.state.density,
                mass_flow_kg_s: f.flow,
                vapour_fraction: f.state.vapour_fraction(),
                phase: f.state.phase.name().to_string(),
                para_fraction: f.state.shown_para_fraction(),
            })
            .collect();
        let equipment = solution
            .units
            .iter()
            .map(|u| {
                let p = &u.performance;
                let mut record = EquipmentRecord {
                    id: u.id.clone(),
                    kind: u.kind.to_string(),
                    power_w: p.work_in,
                    duty_w: p.duty,
                    precooling_work_w: p.precooling_work,
                    exergy_destroyed_w: u.exergy_destroyed,
                    min_approach_k: None,
                    min_approach_position: None,
                    ua_w_k: None,
                    effectiveness: None,
                    discharge_temperatures_k: None,
                    boil_off_kg_s: None,
                    outlet_liquid_fraction: None,
                    exchanger_streams: None,
                };
                match &p.details {
                    Details::Exchanger(x) => {
                        record.min_approach_k = Some(x.min_approach);
                        record.min_approach_position = Some(x.min_approach_position);
                        record.ua_w_k = x.ua.is_finite().then_some(x.ua);
                        record.effectiveness =
                            x.effectiveness.is_finite().then_some(x.effectiveness);
                        if !x.streams.is_empty() {
                            record.exchanger_streams = Some(
                                x.streams
                                    .iter()
                                    .map(|s| ExchangerStreamRecord {
                                        name: s.name.clone(),
                                        side: s.side.to_string(),
                                        inlet_temperature_k: s.inlet_temperature,
                                        outlet_temperature_k: s.outlet_temperature,
                                        duty_w: s.duty,
                                        outlet_specified: s.outlet_specified,
                                    })
                                    .collect(),
                            );
                        }
                    }
                    Details::Compressor {
                        discharge_temperatures,
                    } => record.discharge_temperatures_k = Some(discharge_temperatures.clone()),
                    Details::Precooler { boil_off, .. } => record.boil_off_kg_s = *boil_off,
                    Details::Expander {
                        outlet_liquid_fraction,
                    } => record.outlet_liquid_fraction = Some(*outlet_liquid_fraction),
                    Details::None => {}
                }
                record
            })
            .collect();
        SolutionRecord {
            title: solution.title.clone(),
            source: solution.source.clone(),
            ambient_k: solution.ambient,
            converged: true,
            iterations: solution.iterations,
            residual_log: solution.residual_log.clone(),
            tear_streams: solution.tears.clone(),
            recycles: solution.recycles.clone(),
            liquid_flow_kg_s: s.liquid_flow,
            liquid_yield: s.liquid_yield,
            liquid_flow_l_h: s.liquid_volume_flow_l_h,
            shaft_power_w: s.shaft_power,
            precooling_work_w: s.precooling_work,
            precooling_duty_w: s.precooling_duty,
            cryogen_boil_off_kg_s: s.cryogen_boil_off,
            cryogen_per_kg_liquid: s.cryogen_per_kg_liquid(),
            specific_energy_shaft: s.specific_energy_shaft,
            specific_energy: s.specific_energy,
            minimum_work_w: s.minimum_work,
            figure_of_merit: s.figure_of_merit,
            exergy_supplied_w: s.exergy_supplied,
            exergy_destroyed_w: s.exergy_destroyed,
            exergy_lost_w: s.exergy_lost,
            feed_exergy_w: s.feed_exergy,
            precooling_exergy_outside_w: s.precooling_exergy_outside,
            cryogen_feed_work_w: s.cryogen_feed_work,
            exergy_account: exergy_account(solution)
                .into_iter()
                .map(|(item, exergy_w)| AccountRecord { item, exergy_w })
                .collect(),
            balances: BalanceRecord {
                mass: s.mass_closure,
                energy: s.energy_closure,
                exergy: s.exergy_closure,
            },
            streams,
            equipment,
            hydrogen_storage: storage_record(solution),
            findings: findings.to_vec(),
            caution: super::caution::caution(&solution.fluids).replace('\n', " "),
        }
    }
}

/// The storage record of a solution's liquid hydrogen product, if it has one.
pub fn storage_record(solution: &Solution) -> Option<HydrogenStorageRecord> {
    let outlook = solution.summary.hydrogen_storage?;
    let frozen_normal = solution
        .streams
        .iter()
        .all(|f| f.state.para_fraction.is_none());
    Some(HydrogenStorageRecord {
        para_fraction: outlook.para_fraction,
        frozen_normal,
        equilibrium_para_fraction: outlook.equilibrium_para_fraction,
        conversion_enthalpy_j_kg: outlook.conversion_enthalpy,
        latent_heat_j_kg: outlook.latent_heat,
        storage_hours: crate::fluids::storage::STORAGE_HOURS.to_vec(),
        para_fraction_after: outlook.para_fraction_after.to_vec(),
        boiled_off_after: outlook.boiled_off_after.to_vec(),
        effective_liquid_yield_after: solution.summary.liquid_yield.map(|y| {
            outlook
                .boiled_off_after
                .iter()
                .map(|b| y * (1.0 - b))
                .collect()
        }),
    })
}

/// A stream's phase in a few letters for the stream table: liquid, vapour, gas,
/// `supercrit.`, `sat. liq.` or `sat. vap.`, or two-phase with its vapour quality
/// (`x 0.9298`).
pub fn phase_label(state: &crate::fluids::State) -> String {
    match state.quality {
        Some(x) if state.is_two_phase() && x <= 1e-12 => "sat. liq.".to_string(),
        Some(x) if state.is_two_phase() && x >= 1.0 - 1e-12 => "sat. vap.".to_string(),
        Some(x) if state.is_two_phase() => format!("x {x:.4}"),
        _ if state.phase == crate::fluids::Phase::Supercritical => "supercrit.".to_string(),
        _ => state.phase.name().to_string(),
    }
}

/// The solution as pretty JSON.
pub fn json(solution: &Solution, findings: &[Finding]) -> String {
    serde_json::to_string_pretty(&SolutionRecord::of(solution, findings)).unwrap_or_default() + "\n"
}

/// The design-check findings as text, each with its hint, wrapped to 100 columns.
pub fn findings_text(findings: &[Finding]) -> String {
    let mut out = String::from("Design checks\n");
    if findings.is_empty() {
        out.push_str("  none: no rule of docs/checks.md is broken\n");
        return out;
    }
    for f in findings {
        let head = format!(
            "  {:<7} {} [{}]: {}",
            f.severity.word(),
            f.equipment.as_deref().unwrap_or("plant"),
            f.id,
            f.message
        );
        out.push_str(&wrap(&head, 98, "          "));
        out.push_str(&wrap(
            &format!("          → {}", f.hint),
            98,
            "            ",
        ));
    }
    out
}

/// Wraps `text` at spaces to `width` characters, keeping its leading indentation
/// and indenting continuation lines by `indent`.
pub fn wrap(text: &str, width: usize, indent: &str) -> String {
    let body = text.trim_start();
    let lead = &text[..text.len() - body.len()];
    let mut out = String::new();
    let mut line = lead.to_string();
    let mut fresh = true;
    for word in body.split(' ').filter(|w| !w.is_empty()) {
        if !fresh && line.chars().count() + 1 + word.chars().count() > width {
            out.push_str(&line);
            out.push('\n');
            line = indent.to_string();
            fresh = true;
        }
        if !fresh {
            line.push(' ');
        }
        line.push_str(word);
        fresh = false;
    }
    out.push_str(&line);
    out.push('\n');
    out
}

fn or_dash(v: Option<f64>, f: impl Fn(f64) -> String) -> String {
    v.map_or("—".to_string(), f)
}

/// The solution as text: summary, streams, equipment.
pub fn text(solution: &Solution) -> String {
    text_in(solution, super::Units::Si)
}

/// The solution as text in the chosen units.
pub fn text_in(solution: &Solution, units: super::Units) -> String {
    let mut out = String::new();
    out.push_str(&format!("{}\n", solution.title));
    out.push_str(&format!("source: {}\n", solution.source));
    out.push_str(&format!(
        "ambient {:.2} K; converged in {} passes\n",
        solution.ambient, solution.iterations
    ));
    let tears = if solution.tears.is_empty() {
        "none".to_string()
    } else {
        solution.tears.join(", ")
    };
    out.push_str(&wrap(&format!("tear streams: {tears}"), 98, "  "));
    out.push('\n');
    out.push_str("Summary\n");
    for (label, value) in summary_rows(solution, units) {
        out.push_str(&format!("  {label:<26}{value}\n"));
    }
    for table in [
        Some(stream_table(solution, units)),
        spin_table(solution),
        Some(equipment_table(solution)),
        Some(account_table(solution)),
    ]
    .into_iter()
    .flatten()
    {
        out.push_str(&format!("\n{}\n", table.title));
        out.push_str(&table.text());
    }
    out
}

/// The headline figures as (label, value with its unit) rows, in reading order:
/// the summary of the text report and of the HTML page.
pub fn summary_rows(solution: &Solution, units: super::Units) -> Vec<(&'static str, String)> {
    let s = &solution.summary;
    let engineering = units == super::Units::Engineering;
    let mut rows: Vec<(&'static str, String)> = Vec::new();
    rows.push((
        "liquid product",
        if engineering {
            format!(
                "{:.3} kg/h = {:.4} t/d = {:.2} L/h",
                s.liquid_flow * 3600.0,
                s.liquid_flow * 86.4,
                s.liquid_volume_flow_l_h
            )
        } else {
            format!(
                "{:.4} g/s = {:.3} kg/h = {:.2} L/h",
                s.liquid_flow * 1e3,
                s.liquid_flow * 3600.0,
                s.liquid_volume_flow_l_h
            )
        },
    ));
    rows.push((
        "liquid yield",
        or_dash(s.liquid_yield, |y| {
            format!("{y:.5} (liquid per mass compressed)")
        }),
    ));
    if let Some(storage) = storage_record(solution) {
        let model = if storage.frozen_normal {
            " (frozen normal)"
        } else {
            ""
        };
        rows.push((
            "para fraction",
            format!(
                "{:.4}{model}; equilibrium {:.4} at the product's temperature",
                storage.para_fraction, storage.equilibrium_para_fraction
            ),
        ));
        rows.push((
            "storage boil-off",
            format!(
                "{:.1} % after a day, {:.1} % after a week (residual conversion)",
                storage.boiled_off_after[0] * 100.0,
                storage.boiled_off_after[1] * 100.0
            ),
        ));
        if let Some(y) = &storage.effective_liquid_yield_after {
            rows.push((
                "yield after storage",
                format!("{:.5} after a day, {:.5} after a week", y[0], y[1]),
            ));
        }
    }
    rows.push((
        "shaft power",
        format!(
            "{:.3} kW{}",
            s.shaft_power / 1e3,
            s.specific_energy_shaft
                .map_or(String::new(), |e| format!(" = {e:.3} kWh per kg liquid"))
        ),
    ));
    if s.precooling_duty > 0.0 || s.precooling_work > 0.0 {
        rows.push((
            "precooling",
            format!(
                "{:.3} kW removed; cryogen boiled {}; work equivalent {:.3} kW",
                s.precooling_duty / 1e3,
                if engineering {
                    format!("{:.3} kg/h", s.cryogen_boil_off * 3600.0)
                } else {
                    format!("{:.3} g/s", s.cryogen_boil_off * 1e3)
                },
                s.precooling_work / 1e3
            ),
        ));
    }
    if let Some(per_kg) = s.cryogen_per_kg_liquid() {
        rows.push(("cryogen bought", format!("{per_kg:.3} kg per kg liquid")));
    }
    rows.push((
        "specific energy",
        or_dash(s.specific_energy, |e| {
            format!("{e:.3} kWh/kg with precooling")
        }),
    ));
    rows.push((
        "minimum work",
        format!(
            "{:.3} kW (liquid less feed exergy); figure of merit {}",
            s.minimum_work / 1e3,
            or_dash(s.figure_of_merit, |f| format!("{f:.4}"))
        ),
    ));
    rows.push((
        "work taken",
        format!(
            "{:.3} kW = shaft {:.3} + precooling {:.3} kW",
            s.exergy_supplied / 1e3,
            s.shaft_power / 1e3,
            s.precooling_work / 1e3
        ),
    ));
    rows.push((
        "exergy",
        format!(
            "destroyed {:.3}, lost {}, precooling spent outside {} kW",
            s.exergy_destroyed / 1e3,
            fixed(s.exergy_lost / 1e3, 3),
            fixed(s.precooling_exergy_outside / 1e3, 3)
        ),
    ));
    if s.feed_exergy.abs() > 0.0 || s.cryogen_feed_work > 0.0 {
        rows.push((
            "feeds",
            format!(
                "exergy of raw gas {} kW (credited); cryogen fed in {} kW",
                fixed(s.feed_exergy / 1e3, 3),
                fixed(s.cryogen_feed_work / 1e3, 3)
            ),
        ));
    }
    rows.push((
        "balance closure",
        format!(
            "mass {:.1e}, energy {:.1e}, exergy {:.1e} (relative)",
            s.mass_closure, s.energy_closure, s.exergy_closure
        ),
    ));
    rows
}

/// A table of results: its title, its column headers and alignment, its rows as
/// text; drawn as text in the terminal and as HTML in the report.
#[derive(Debug, Clone)]
pub struct ResultTable {
    /// Title above it.
    pub title: String,
    /// Column headers with their alignment.
    pub headers: Vec<(&'static str, Align)>,
    /// Cells, row by row.
    pub rows: Vec<Vec<String>>,
}

impl ResultTable {
    /// The table as aligned text.
    pub fn text(&self) -> String {
        let mut table = TextTable::new(&self.headers);
        for row in &self.rows {
            table.row(row.clone());
        }
        table.render()
    }
}

/// Every stream's state and flow; in engineering units with °C beside K and the
/// flow in kg/h.
pub fn stream_table(solution: &Solution, units: super::Units) -> ResultTable {
    let engineering = units == super::Units::Engineering;
    let rows = solution
        .stream_names
        .iter()
        .zip(&solution.streams)
        .map(|(name, f)| {
            let mut row = vec![
                name.clone(),
                f.state.fluid().name.clone(),
                format!("{:.3}", f.state.temperature),
            ];
            if engineering {
                row.push(format!("{:.2}", f.state.temperature - 273.15));
            }
            row.extend([
                format!("{:.4}", f.state.pressure / 1e5),
                format!("{:.3}", f.state.enthalpy / 1e3),
                format!("{:.4}", f.state.entropy / 1e3),
                if engineering {
                    format!("{:.3}", f.flow * 3600.0)
                } else {
                    format!("{:.4}", f.flow * 1e3)
                },
                phase_label(&f.state),
            ]);
            row
        })
        .collect();
    let mut headers = vec![
        ("stream", Align::Left),
        ("fluid", Align::Left),
        ("T [K]", Align::Right),
    ];
    if engineering {
        headers.push(("T [°C]", Align::Right));
    }
    headers.extend([
        ("p [bar]", Align::Right),
        ("h [kJ/kg]", Align::Right),
        ("s [kJ/kgK]", Align::Right),
        (
            if engineering {
                "flow [kg/h]"
            } else {
                "flow [g/s]"
            },
            Align::Right,
        ),
        ("phase", Align::Left),
    ]);
    ResultTable {
        title: "Streams".into(),
        headers,
        rows,
    }
}

/// Each unit's power, duty, smallest approach and exergy destroyed.
pub fn equipment_table(solution: &Solution) -> ResultTable {
    let total = solution.summary.exergy_destroyed.max(1e-300);
    let rows = solution
        .units
        .iter()
        .filter(|u| !matches!(u.role, Role::Feed(_) | Role::Product(_)))
        .map(|u| {
            let p = &u.performance;
            let approach = match &p.details {
                Details::Exchanger(x) => format!("{:.3}", x.min_approach),
                _ => String::new(),
            };
            vec![
                u.id.clone(),
                u.kind.to_string(),
                if p.work_in != 0.0 {
                    format!("{:.3}", p.work_in / 1e3)
                } else {
                    String::new()
                },
                p.duty.map_or(String::new(), |d| format!("{:.3}", d / 1e3)),
                approach,
                fixed(u.exergy_destroyed / 1e3, 3),
                format!("{} %", fixed(100.0 * u.exergy_destroyed / total, 1)),
            ]
        })
        .collect();
    ResultTable {
        title: "Equipment".into(),
        headers: vec![
            ("id", Align::Left),
            ("kind", Align::Left),
            ("power [kW]", Align::Right),
            ("duty [kW]", Align::Right),
            ("ΔT min [K]", Align::Right),
            ("Xdest [kW]", Align::Right),
            ("share", Align::Right),
        ],
        rows,
    }
}

/// Where the work taken goes; the rows sum to it.
pub fn account_table(solution: &Solution) -> ResultTable {
    let s = &solution.summary;
    let taken = s.exergy_supplied.abs().max(1e-300);
    let mut rows: Vec<Vec<String>> = exergy_account(solution)
        .into_iter()
        .map(|(item, exergy)| {
            vec![
                item,
                fixed(exergy / 1e3, 3),
                format!("{} %", fixed(100.0 * exergy / taken, 1)),
            ]
        })
        .collect();
    rows.push(vec![
        "total".to_string(),
        fixed(s.exergy_supplied / 1e3, 3),
        "100.0 %".to_string(),
    ]);
    ResultTable {
        title: "Exergy account (the rows sum to the work taken: shaft plus precooling)".into(),
        headers: vec![
            ("where the work goes", Align::Left),
            ("exergy [kW]", Align::Right),
            ("share", Align::Right),
        ],
        rows,
    }
}

/// The para fraction of every hydrogen stream beside the equilibrium value at
/// its temperature, or nothing when the flowsheet carries no hydrogen.
pub fn spin_table(solution: &Solution) -> Option<ResultTable> {
    let mut rows = Vec::new();
    for (name, f) in solution.stream_names.iter().zip(&solution.streams) {
        let Some(para) = f.state.shown_para_fraction() else {
            continue;
        };
        let spin_state = match (f.state.para_fraction, f.state.fluid().name.as_str()) {
            (Some(_), _) => "followed",
            (None, "hydrogen") => "frozen normal",
            (None, "parahydrogen") => "pure para",
            _ => "pure ortho",
        };
        rows.push(vec![
            name.clone(),
            format!("{:.3}", f.state.temperature),
            format!("{para:.4}"),
            format!(
                "{:.4}",
                crate::fluids::spin::equilibrium_para_fraction(f.state.temperature)
            ),
            spin_state.to_string(),
        ]);
    }
    if rows.is_empty() {
        return None;
    }
    Some(ResultTable {
        title: "Hydrogen para fraction".into(),
        headers: vec![
            ("stream", Align::Left),
            ("T [K]", Align::Right),
            ("para", Align::Right),
            ("equilibrium", Align::Right),
            ("spin state", Align::Left),
        ],
        rows,
    })
}
