//! The list of built-in fluids with their sources and ranges.

use super::state::reference_state_words;
use super::table::{Align, TextTable};
use crate::fluids::Fluid;
use serde::Serialize;

/// One fluid in the JSON listing.
#[derive(Debug, Serialize)]
pub struct FluidRecord {
    /// Canonical name.
    pub name: String,
    /// Other accepted names.
    pub aliases: Vec<String>,
    /// Formula or composition.
    pub formula: String,
    /// Molar mass, kg/mol.
    pub molar_mass_kg_mol: f64,
    /// Critical temperature, K.
    #[serde(rename = "critical_temperature_K")]
    pub critical_temperature_k: f64,
    /// Critical pressure, Pa.
    #[serde(rename = "critical_pressure_Pa")]
    pub critical_pressure_pa: f64,
    /// Critical density, kg/m³.
    pub critical_density_kg_m3: f64,
    /// Triple-point temperature, K.
    #[serde(rename = "triple_temperature_K")]
    pub triple_temperature_k: f64,
    /// Triple-point pressure, Pa.
    #[serde(rename = "triple_pressure_Pa")]
    pub triple_pressure_pa: f64,
    /// Lowest valid temperature, K.
    #[serde(rename = "temperature_min_K")]
    pub temperature_min_k: f64,
    /// Highest valid temperature, K.
    #[serde(rename = "temperature_max_K")]
    pub temperature_max_k: f64,
    /// Highest valid pressure, Pa.
    #[serde(rename = "pressure_max_Pa")]
    pub pressure_max_pa: f64,
    /// Reference-state convention.
    pub reference_state: String,
    /// Full citation.
    pub source: String,
}

impl FluidRecord {
    /// The record of a fluid.
    pub fn of(f: &Fluid) -> FluidRecord {
        FluidRecord {
            name: f.name.clone(),
            aliases: f.aliases.clone(),
            formula: f.formula.clone(),
            molar_mass_kg_mol: f.molar_mass,
            critical_temperature_k: f.critical.temperature,
            critical_pressure_pa: f.critical.pressure,
            critical_density_kg_m3: f.critical.density,
            triple_temperature_k: f.triple_temperature,
            triple_pressure_pa: f.triple_pressures.0,
            temperature_min_k: f.temperature_min,
            temperature_max_k: f.temperature_max,
            pressure_max_pa: f.pressure_max,
            reference_state: reference_state_words(f).to_string(),
            source: f.source.clone(),
        }
    }
}

/// The fluids as pretty JSON.
pub fn json(fluids: &[&Fluid]) -> String {
    let records: Vec<FluidRecord> = fluids.iter().map(|f| FluidRecord::of(f)).collect();
    serde_json::to_string_pretty(&records).unwrap_or_default() + "\n"
}

/// The fluids as a table, then their sources.
pub fn text(fluids: &[&Fluid]) -> String {
    let mut table = TextTable::new(&[
        ("fluid", Align::Left),
        ("Tc [K]", Align::Right),
        ("pc [bar]", Align::Right),
        ("ρc [kg/m³]", Align::Right),
        ("Ttriple [K]", Align::Right),
        ("ptriple [kPa]", Align::Right),
        ("valid T [K]", Align::Right),
        ("p max [MPa]", Align::Right),
    ]);
    for f in fluids {
        table.row(vec![
            f.name.clone(),
            format!("{:.4}", f.critical.temperature),
            format!("{:.4}", f.critical.pressure / 1e5),
            format!("{:.3}", f.critical.density),
            format!("{:.4}", f.triple_temperature),
            format!("{:.4}", f.triple_pressures.0 / 1e3),
            format!("{:.4}–{:.0}", f.temperature_min, f.temperature_max),
            format!("{:.0}", f.pressure_max / 1e6),
        ]);
    }
    let mut out = table.render();
    out.push_str("\nEquations of state:\n");
    for f in fluids {
        out.push_str(&format!("  {:<14}{}\n", f.name, f.source));
        let aliases = if f.aliases.is_empty() {
            String::new()
        } else {
            format!("; also called {}", f.aliases.join(", "))
        };
        out.push_str(&format!(
            "  {:<14}reference state: {}{}\n",
            "",
            reference_state_words(f),
            aliases
        ));
    }
    out.push_str("\nAir is pseudo-pure: its bubble and dew lines are the published ancillary equations, and a two-phase state at pressure p has T, h, s, u and specific volume linear in the quality between the bubble and dew states.\n");
    out
}
