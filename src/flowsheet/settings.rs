//! The flowsheet's `settings:` block: solver and design-check settings, each with
//! its allowed range.

use super::plant::{Method, Settings};
use super::resolve::Resolver;
use crate::error::FlowsheetError;
use crate::quantity::{self, Dimension};

/// The settings' names, in the order they are listed in messages.
/// The range of `settings.ambient_pressure`, Pa: from high mountain sites to the
/// highest sea-level pressures.
pub const AMBIENT_PRESSURE_RANGE: (f64, f64) = (30e3, 110e3);

const SETTING_NAMES: &str = "ambient_pressure, tolerance, max_iterations, segments, method, initial_temperature, approach_floor, approach_floor_fraction, mixer_temperature_limit, discharge_limit, expander_liquid_limit";

impl Resolver<'_> {
    pub(super) fn settings(&self) -> Result<Settings, FlowsheetError> {
        let mut s = Settings::default();
        for (key, value) in &self.raw.settings {
            let text = match value {
                serde_yaml::Value::String(t) => t.clone(),
                serde_yaml::Value::Number(n) => n.to_string(),
                other => format!("{other:?}"),
            };
            // A setting replaced by `--set settings.KEY=…` is blamed on the override.
            let overridden = self
                .place
                .overridden
                .contains(&("settings".to_string(), key.clone()));
            let bad = |m: String| FlowsheetError {
                file: if overridden {
                    format!("--set settings.{key}")
                } else {
                    self.place.file.to_string()
                },
                position: if overridden {
                    None
                } else {
                    self.place.locator.top("settings")
                },
                equipment: None,
                message: format!("settings.{key}: {m}"),
            };
            let number = |low: f64, high: f64| -> Result<f64, FlowsheetError> {
                let v: f64 = text
                    .trim()
                    .parse()
                    .map_err(|_| bad(format!("'{text}' is not a number")))?;
                if (low..=high).contains(&v) {
                    Ok(v)
                } else {
                    Err(bad(format!(
                        "{v} is outside the allowed range {low} to {high}"
                    )))
                }
            };
            let temperature =
                |dimension: Dimension, low: f64, high: f64| -> Result<f64, FlowsheetError> {
                    let v = quantity::parse(&text, dimension).map_err(|e| bad(e.to_string()))?;
                    if (low..=high).contains(&v) {
                        Ok(v)
                    } else {
                        Err(bad(format!(
                            "{text} is outside the allowed range {low} K to {high} K"
                        )))
                    }
                };
            match key.as_str() {
                "tolerance" => s.tolerance = number(1e-14, 1e-3)?,
                "ambient_pressure" => {
                    let v = quantity::parse(&text, Dimension::Pressure)
                        .map_err(|e| bad(e.to_string()))?;
                    let (low, high) = AMBIENT_PRESSURE_RANGE;
                    if !(low..=high).contains(&v) {
                        return Err(bad(format!(
                            "{text} is outside the allowed range {} to {} kPa",
                            low / 1e3,
                            high / 1e3
                        )));
                    }
                    s.ambient_pressure = v;
                }
                "max_iterations" => s.max_iterations = number(1.0, 100_000.0)? as usize,
                "segments" => s.segments = number(10.0, 5000.0)? as usize,
                "method" => {
                    s.method = match text.trim() {
                        "wegstein" => Method::Wegstein,
                        "broyden" => Method::Broyden,
                        other => {
                            return Err(bad(format!(
                                "'{other}' is not a method; use wegstein or broyden"
                            )))
                        }
                    }
                }
                "initial_temperature" => {
                    s.initial_temperature = Some(temperature(Dimension::Temperature, 1.0, 2000.0)?)
                }
                "approach_floor" => {
                    s.approach_floor = temperature(Dimension::TemperatureDifference, 0.0, 100.0)?
                }
                "approach_floor_fraction" => {
                    s.approach_floor_fraction = quantity::parse(&text, Dimension::Fraction)
                        .map_err(|e| bad(e.to_string()))?;
                    if !(0.0..=0.5).contains(&s.approach_floor_fraction) {
                        return Err(bad("must lie between 0 and 0.5".into()));
                    }
                }
                "mixer_temperature_limit" => {
                    s.mixer_temperature_limit =
                        temperature(Dimension::TemperatureDifference, 0.0, 1000.0)?
                }
                "discharge_limit" => {
                    s.discharge_limit = temperature(Dimension::Temperature, 250.0, 1000.0)?
                }
                "expander_liquid_limit" => {
                    s.expander_liquid_limit = quantity::parse(&text, Dimension::Fraction)
                        .map_err(|e| bad(e.to_string()))?;
                    if !(0.0..=1.0).contains(&s.expander_liquid_limit) {
                        return Err(bad("must lie between 0 and 1".into()));
                    }
                }
                other => {
                    return Err(bad(format!(
                        "unknown setting '{other}'; the settings are: {SETTING_NAMES}"
                    )))
                }
            }
        }
        Ok(s)
    }
}
