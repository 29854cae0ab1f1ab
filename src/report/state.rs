//! A state as a readable table and as JSON with SI keys.

use crate::fluids::State;
use serde::{Deserialize, Serialize};

/// The JSON form of a state. Keys carry their SI unit; quality is null in single
/// phase, and cp, cv, speed of sound and the Joule-Thomson coefficient are null in
/// two phase, where they are not defined.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct StateRecord {
    /// Canonical fluid name.
    pub fluid: String,
    /// K.
    #[serde(rename = "temperature_K")]
    pub temperature_k: f64,
    /// Pa.
    #[serde(rename = "pressure_Pa")]
    pub pressure_pa: f64,
    /// kg/m³.
    pub density_kg_m3: f64,
    /// J/kg.
    #[serde(rename = "enthalpy_J_kg")]
    pub enthalpy_j_kg: f64,
    /// J/(kg·K).
    #[serde(rename = "entropy_J_kgK")]
    pub entropy_j_kgk: f64,
    /// J/kg.
    #[serde(rename = "internal_energy_J_kg")]
    pub internal_energy_j_kg: f64,
    /// J/(kg·K).
    #[serde(rename = "cp_J_kgK")]
    pub cp_j_kgk: Option<f64>,
    /// J/(kg·K).
    #[serde(rename = "cv_J_kgK")]
    pub cv_j_kgk: Option<f64>,
    /// m/s.
    pub speed_of_sound_m_s: Option<f64>,
    /// K/Pa.
    #[serde(rename = "joule_thomson_K_Pa")]
    pub joule_thomson_k_pa: Option<f64>,
    /// Z = p/(ρRT).
    pub compressibility: f64,
    /// `liquid`, `vapour`, `gas`, `supercritical` or `two-phase`.
    pub phase: String,
    /// Vapour mass fraction in two phase.
    pub quality: Option<f64>,
    /// Para mole fraction, for a state of the ortho–para solution only.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub para_fraction: Option<f64>,
    /// The equilibrium para fraction at the state's temperature, with
    /// `para_fraction` only.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub equilibrium_para_fraction: Option<f64>,
}

impl StateRecord {
    /// The record of a state.
    pub fn of(state: &State) -> StateRecord {
        StateRecord {
            fluid: state.fluid().name.clone(),
            temperature_k: state.temperature,
            pressure_pa: state.pressure,
            density_kg_m3: state.density,
            enthalpy_j_kg: state.enthalpy,
            entropy_j_kgk: state.entropy,
            internal_energy_j_kg: state.internal_energy,
            cp_j_kgk: state.cp(),
            cv_j_kgk: state.cv(),
            speed_of_sound_m_s: state.speed_of_sound(),
            joule_thomson_k_pa: state.joule_thomson(),
            compressibility: state.compressibility(),
            phase: state.phase.name().to_string(),
            quality: state.quality,
            para_fraction: state.para_fraction,
            equilibrium_para_fraction: state
                .para_fraction
                .map(|_| crate::fluids::spin::equilibrium_para_fraction(state.temperature)),
        }
    }
}

/// The state as pretty JSON.
pub fn json(state: &State) -> String {
    serde_json::to_string_pretty(&StateRecord::of(state)).unwrap_or_default() + "\n"
}

/// The state as a two-column table in engineering units.
pub fn text(state: &State) -> String {
    let fluid = state.fluid();
    let mut out = String::new();
    out.push_str(&format!(
        "{} ({}), {}\n",
        fluid.name,
        fluid.formula,
        state.phase.name()
    ));
    let optional =
        |v: Option<f64>, f: &dyn Fn(f64) -> String| v.map_or("— (two-phase)".to_string(), f);
    let rows: Vec<(&str, String)> = vec![
        (
            "temperature",
            format!(
                "{:.4} K   ({:.3} °C)",
                state.temperature,
                state.temperature - 273.15
            ),
        ),
        (
            "pressure",
            format!(
                "{:.6} bar   ({:.4} kPa)",
                state.pressure / 1e5,
                state.pressure / 1e3
            ),
        ),
        ("density", format!("{:.6} kg/m³", state.density)),
        ("enthalpy", format!("{:.4} kJ/kg", state.enthalpy / 1e3)),
        ("entropy", format!("{:.6} kJ/(kg·K)", state.entropy / 1e3)),
        (
            "internal energy",
            format!("{:.4} kJ/kg", state.internal_energy / 1e3),
        ),
        (
            "cp",
            optional(state.cp(), &|v| format!("{:.6} kJ/(kg·K)", v / 1e3)),
        ),
        (
            "cv",
            optional(state.cv(), &|v| format!("{:.6} kJ/(kg·K)", v / 1e3)),
        ),
        (
            "speed of sound",
            optional(state.speed_of_sound(), &|v| format!("{v:.3} m/s")),
        ),
        (
            "Joule-Thomson coeff.",
            optional(state.joule_thomson(), &|v| {
                format!("{:.6} K/bar   ({v:.4e} K/Pa)", v * 1e5)
            }),
        ),
        (
            "compressibility Z",
            format!("{:.6}", state.compressibility()),
        ),
        (
            "quality",
            state
                .quality
                .map_or("— (single phase)".to_string(), |x| format!("{x:.6}")),
        ),
    ];
    let mut rows = rows;
    if let Some(x) = state.para_fraction {
        rows.push(("para fraction", format!("{x:.6}")));
        rows.push((
            "equilibrium para",
            format!(
                "{:.6} at {:.4} K",
                crate::fluids::spin::equilibrium_para_fraction(state.temperature),
                state.temperature
            ),
        ));
    }
    for (name, value) in rows {
        out.push_str(&format!("  {name:<22}{value}\n"));
    }
    if let Some(pair) = &state.saturated {
        out.push_str(&format!(
            "  saturated liquid      T {:.4} K, ρ {:.5} kg/m³, h {:.4} kJ/kg, s {:.6} kJ/(kg·K)\n",
            pair.liquid.temperature,
            pair.liquid.density,
            pair.liquid.enthalpy / 1e3,
            pair.liquid.entropy / 1e3
        ));
        out.push_str(&format!(
            "  saturated vapour      T {:.4} K, ρ {:.5} kg/m³, h {:.4} kJ/kg, s {:.6} kJ/(kg·K)\n",
            pair.vapour.temperature,
            pair.vapour.density,
            pair.vapour.enthalpy / 1e3,
            pair.vapour.entropy / 1e3
        ));
    }
    if state.para_fraction.is_some() {
        out.push_str(
            "  equation of state     ideal solution of Leachman et al. 2009 para and ortho\n",
        );
        out.push_str(
            "  reference state       aligned datum: the 25 % solution equals normal hydrogen at 300 K, 1 atm\n",
        );
    } else {
        out.push_str(&format!("  equation of state     {}\n", fluid.source_key));
        out.push_str(&format!(
            "  reference state       {}\n",
            reference_state_words(fluid)
        ));
    }
    out
}

/// The reference-state convention in words.
pub fn reference_state_words(fluid: &crate::fluids::Fluid) -> &'static str {
    use crate::fluids::file::ReferenceStateName::*;
    match fluid.reference_state {
        Published => "as in the published equation",
        NormalBoilingPoint => "h = 0, s = 0 for saturated liquid at 101.325 kPa",
    }
}
