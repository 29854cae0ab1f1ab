//! Values with units: one parser and one printer used everywhere.
//!
//! Every dimensional number a user types carries its unit (`300 K`, `-196 °C`,
//! `20 bar`, `1.5 kg/s`). Internally everything is SI: K, Pa, kg/s, W, J/kg,
//! J/(kg·K), kg/m³. A missing unit, or a unit of the wrong kind, is an error that
//! says what was expected.

use std::fmt;

/// One standard atmosphere, Pa (exact by definition).
pub const STANDARD_ATMOSPHERE: f64 = 101_325.0;

/// The kind of physical quantity a value must have.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Dimension {
    /// Absolute temperature (K, °C, °F, °R).
    Temperature,
    /// A temperature difference (K, °C, °F, °R as intervals).
    TemperatureDifference,
    /// Absolute pressure (Pa, kPa, MPa, bar, mbar, atm, psi).
    Pressure,
    /// Mass flow rate (kg/s, g/s, kg/h, t/d).
    MassFlow,
    /// Power (W, kW, MW).
    Power,
    /// Energy per unit mass, such as enthalpy (J/kg, kJ/kg).
    SpecificEnergy,
    /// Entropy or heat capacity per unit mass (J/(kg·K), kJ/(kg·K)).
    SpecificEntropy,
    /// Mass density (kg/m³, g/cm³).
    Density,
    /// A pure number or fraction (no unit, or `%`).
    Fraction,
    /// A thermal conductance such as an exchanger's UA (W/K, kW/K).
    Conductance,
}

impl Dimension {
    /// A plain-words name with typical examples, for error messages.
    pub fn describe(self) -> &'static str {
        match self {
            Dimension::Temperature => {
                "a temperature such as 300 K, -196 °C (or degC), 70 °F or 540 °R"
            }
            Dimension::TemperatureDifference => "a temperature difference such as 2 K",
            Dimension::Pressure => {
                "a pressure such as 20 bar, 101.325 kPa, 3 MPa, 1 atm or 300 psi"
            }
            Dimension::MassFlow => "a mass flow such as 1.5 kg/s, 20 g/s, 300 kg/h or 5 t/d",
            Dimension::Power => "a power such as 250 kW, 1.2 MW or 800 W",
            Dimension::SpecificEnergy => "an energy per mass such as 450 kJ/kg or 2.1e5 J/kg",
            Dimension::SpecificEntropy => "an entropy per mass such as 5 kJ/kg/K or 5000 J/(kg·K)",
            Dimension::Density => "a density such as 70 kg/m3 or 0.8 g/cm3",
            Dimension::Fraction => "a number or a percentage such as 0.4 or 40 %",
            Dimension::Conductance => "a conductance such as 5 kW/K or 800 W/K",
        }
    }

    /// Short name of the quantity.
    pub fn name(self) -> &'static str {
        match self {
            Dimension::Temperature => "temperature",
            Dimension::TemperatureDifference => "temperature difference",
            Dimension::Pressure => "pressure",
            Dimension::MassFlow => "mass flow",
            Dimension::Power => "power",
            Dimension::SpecificEnergy => "energy per mass",
            Dimension::SpecificEntropy => "entropy per mass",
            Dimension::Density => "density",
            Dimension::Fraction => "fraction",
            Dimension::Conductance => "conductance",
        }
    }
}

/// A value that could not be read as the expected quantity.
#[derive(Debug, Clone, PartialEq)]
pub struct QuantityError {
    /// The text as given.
    pub text: String,
    /// What was expected.
    pub expected: Dimension,
    /// What is wrong.
    pub reason: String,
}

impl fmt::Display for QuantityError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "'{}': {}; expected {}",
            self.text,
            self.reason,
            self.expected.describe()
        )
    }
}

impl std::error::Error for QuantityError {}

/// How a unit maps onto SI: `si = value * scale + offset`.
#[derive(Debug, Clone, Copy)]
struct UnitRule {
    dimension: Dimension,
    scale: f64,
    offset: f64,
    /// A gauge pressure: the ambient pressure is added.
    gauge: bool,
}

const fn rule(dimension: Dimension, scale: f64, offset: f64) -> UnitRule {
    UnitRule {
        dimension,
        scale,
        offset,
        gauge: false,
    }
}

/// A gauge pressure unit: `scale` Pa per unit above the ambient pressure.
const fn gauge(scale: f64) -> UnitRule {
    UnitRule {
        dimension: Dimension::Pressure,
        scale,
        offset: 0.0,
        gauge: true,
    }
}

/// Normalises spelling variants: drops spaces, brackets, middle dots and `*`, and
/// writes superscript or caret powers as plain digits.
fn normalise_unit(unit: &str) -> String {
    unit.chars()
        .filter(|c| !matches!(c, ' ' | '(' | ')' | '·' | '*' | '^' | '⋅'))
        .map(|c| match c {
            '³' => '3',
            '²' => '2',
            'º' => '°',
            other => other,
        })
        .collect()
}

/// The unit table. Temperatures come in two flavours: absolute and difference.
fn lookup(unit: &str, expected: Dimension) -> Option<UnitRule> {
    use Dimension::*;
    let difference = expected == TemperatureDifference;
    let temperature = |scale: f64, offset: f64| {
        if difference {
            rule(TemperatureDifference, scale, 0.0)
        } else {
            rule(Temperature, scale, offset)
        }
    };
    let r = match unit {
        "K" => temperature(1.0, 0.0),
        "°C" | "degC" | "C" | "celsius" => temperature(1.0, 273.15),
        "°F" | "degF" | "F" => temperature(5.0 / 9.0, 459.67 * 5.0 / 9.0),
        "°R" | "degR" | "R" => temperature(5.0 / 9.0, 0.0),
        "Pa" | "Paa" => rule(Pressure, 1.0, 0.0),
        "hPa" => rule(Pressure, 1e2, 0.0),
        "kPa" => rule(Pressure, 1e3, 0.0),
        "MPa" => rule(Pressure, 1e6, 0.0),
        "GPa" => rule(Pressure, 1e9, 0.0),
        "bar" | "bara" => rule(Pressure, 1e5, 0.0),
        "barg" => gauge(1e5),
        "kPag" => gauge(1e3),
        "MPag" => gauge(1e6),
        "psig" => gauge(6_894.757_293_168_361),
        "mbar" => rule(Pressure, 1e2, 0.0),
        "atm" => rule(Pressure, STANDARD_ATMOSPHERE, 0.0),
        "psi" | "psia" => rule(Pressure, 6_894.757_293_168_361, 0.0),
        "torr" | "Torr" | "mmHg" => rule(Pressure, STANDARD_ATMOSPHERE / 760.0, 0.0),
        "kg/s" => rule(MassFlow, 1.0, 0.0),
        "g/s" => rule(MassFlow, 1e-3, 0.0),
        "kg/min" => rule(MassFlow, 1.0 / 60.0, 0.0),
        "kg/h" | "kg/hr" => rule(MassFlow, 1.0 / 3600.0, 0.0),
        "g/h" => rule(MassFlow, 1e-3 / 3600.0, 0.0),
        "t/h" => rule(MassFlow, 1000.0 / 3600.0, 0.0),
        "t/d" | "t/day" | "tpd" => rule(MassFlow, 1000.0 / 86_400.0, 0.0),
        "lb/h" | "lb/hr" => rule(MassFlow, 0.453_592_37 / 3600.0, 0.0),
        "W" => rule(Power, 1.0, 0.0),
        "kW" => rule(Power, 1e3, 0.0),
        "MW" => rule(Power, 1e6, 0.0),
        "GW" => rule(Power, 1e9, 0.0),
        "hp" => rule(Power, 745.699_871_582_270_2, 0.0),
        "J/kg" => rule(SpecificEnergy, 1.0, 0.0),
        "kJ/kg" => rule(SpecificEnergy, 1e3, 0.0),
        "MJ/kg" => rule(SpecificEnergy, 1e6, 0.0),
        "kWh/kg" => rule(SpecificEnergy, 3.6e6, 0.0),
        "J/kg/K" | "J/kgK" | "J/kg-K" => rule(SpecificEntropy, 1.0, 0.0),
        "kJ/kg/K" | "kJ/kgK" | "kJ/kg-K" => rule(SpecificEntropy, 1e3, 0.0),
        "kg/m3" => rule(Density, 1.0, 0.0),
        "g/cm3" | "kg/L" | "kg/l" => rule(Density, 1e3, 0.0),
        "g/L" | "g/l" => rule(Density, 1.0, 0.0),
        "lb/ft3" => rule(Density, 16.018_463_373_960_138, 0.0),
        "%" => rule(Fraction, 0.01, 0.0),
        "W/K" => rule(Conductance, 1.0, 0.0),
        "kW/K" => rule(Conductance, 1e3, 0.0),
        "MW/K" => rule(Conductance, 1e6, 0.0),
        _ => return None,
    };
    Some(r)
}

/// Splits `"-196 °C"` into the number and the unit text.
fn split_number(text: &str) -> Option<(f64, &str)> {
    let trimmed = text.trim();
    let bytes = trimmed.as_bytes();
    let mut end = 0;
    let mut seen_digit = false;
    let mut seen_exponent = false;
    while end < bytes.len() {
        let c = bytes[end] as char;
        let accept = match c {
            '0'..='9' => {
                seen_digit = true;
                true
            }
            '+' | '-' => end == 0 || matches!(bytes[end - 1] as char, 'e' | 'E'),
            '.' => !seen_exponent,
            'e' | 'E' => {
                // An exponent only when a digit or sign follows (so `5 e` is not eaten).
                let next = bytes.get(end + 1).map(|b| *b as char);
                let ok = seen_digit
                    && !seen_exponent
                    && matches!(next, Some('0'..='9') | Some('+') | Some('-'));
                if ok {
                    seen_exponent = true;
                }
                ok
            }
            _ => false,
        };
        if !accept {
            break;
        }
        end += 1;
    }
    if !seen_digit {
        return None;
    }
    let number: f64 = trimmed[..end].parse().ok()?;
    Some((number, trimmed[end..].trim()))
}

/// Reads `text` as a value of the `expected` dimension and returns it in SI units.
///
/// ```
/// use cryochain::quantity::{parse, Dimension};
/// assert!((parse("-196 °C", Dimension::Temperature).unwrap() - 77.15).abs() < 1e-12);
/// assert_eq!(parse("20 bar", Dimension::Pressure).unwrap(), 2.0e6);
/// assert!(parse("20", Dimension::Pressure).is_err());
/// ```
pub fn parse(text: &str, expected: Dimension) -> Result<f64, QuantityError> {
    parse_with_ambient(text, expected, STANDARD_ATMOSPHERE)
}

/// As [`parse`], with gauge pressures (`barg`, `kPag`, `MPag`, `psig`, also written
/// `bar(g)`) taken above `ambient_pressure` Pa (a flowsheet's
/// `settings.ambient_pressure`; [`parse`] takes one standard atmosphere).
///
/// ```
/// use cryochain::quantity::{parse, parse_with_ambient, Dimension};
/// assert_eq!(parse("2 barg", Dimension::Pressure).unwrap(), 2e5 + 101_325.0);
/// assert_eq!(parse_with_ambient("1 bar(g)", Dimension::Pressure, 90e3).unwrap(), 190e3);
/// ```
pub fn parse_with_ambient(
    text: &str,
    expected: Dimension,
    ambient_pressure: f64,
) -> Result<f64, QuantityError> {
    let error = |reason: String| QuantityError {
        text: text.to_string(),
        expected,
        reason,
    };
    let (number, unit) = split_number(text).ok_or_else(|| error("no number found".into()))?;
    if !number.is_finite() {
        return Err(error("the number is not finite".into()));
    }
    let unit = normalise_unit(unit);
    if unit.is_empty() {
        if expected == Dimension::Fraction {
            return Ok(number);
        }
        return Err(error("the value has no unit".into()));
    }
    let found = lookup(&unit, expected).ok_or_else(|| error(format!("unknown unit '{unit}'")))?;
    if found.dimension != expected {
        return Err(error(format!(
            "'{unit}' is a unit of {}, not of {}",
            found.dimension.name(),
            expected.name()
        )));
    }
    let value = if found.gauge {
        let value = number * found.scale + ambient_pressure;
        if value <= 0.0 {
            return Err(error(format!(
                "this is {value} Pa absolute (gauge pressure above an ambient of {ambient_pressure} Pa): below vacuum"
            )));
        }
        value
    } else {
        number * found.scale + found.offset
    };
    if expected == Dimension::Temperature && value <= 0.0 {
        return Err(error(format!(
            "this is {value} K, at or below absolute zero"
        )));
    }
    Ok(value)
}

/// Formats an SI value in the engineering unit usual for its dimension.
pub fn format(value: f64, dimension: Dimension) -> String {
    use Dimension::*;
    if !value.is_finite() {
        return "—".to_string();
    }
    match dimension {
        Temperature | TemperatureDifference => format!("{value:.3} K"),
        Pressure => {
            if value >= 1e4 {
                format!("{:.4} bar", value / 1e5)
            } else {
                format!("{:.4} kPa", value / 1e3)
            }
        }
        MassFlow => {
            if value.abs() >= 0.1 {
                format!("{value:.4} kg/s")
            } else {
                format!("{:.3} kg/h", value * 3600.0)
            }
        }
        Power => {
            if value.abs() >= 1e6 {
                format!("{:.4} MW", value / 1e6)
            } else {
                format!("{:.3} kW", value / 1e3)
            }
        }
        SpecificEnergy => format!("{:.4} kJ/kg", value / 1e3),
        SpecificEntropy => format!("{:.5} kJ/(kg·K)", value / 1e3),
        Density => format!("{value:.5} kg/m³"),
        Fraction => format!("{value:.6}"),
        Conductance => format!("{:.4} kW/K", value / 1e3),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temperatures_in_every_scale() {
        let t = |s| parse(s, Dimension::Temperature).unwrap();
        assert_eq!(t("300 K"), 300.0);
        assert!((t("-196 °C") - 77.15).abs() < 1e-12);
        assert!((t("-196degC") - 77.15).abs() < 1e-12);
        assert!((t("32 °F") - 273.15).abs() < 1e-12);
        assert!((t("491.67 °R") - 273.15).abs() < 1e-12);
        assert!(parse("-300 °C", Dimension::Temperature).is_err());
    }

    #[test]
    fn differences_have_no_offset() {
        assert_eq!(
            parse("2 °C", Dimension::TemperatureDifference).unwrap(),
            2.0
        );
        assert_eq!(parse("2 K", Dimension::TemperatureDifference).unwrap(), 2.0);
    }

    #[test]
    fn pressures_and_flows() {
        assert_eq!(parse("20 bar", Dimension::Pressure).unwrap(), 2e6);
        assert_eq!(parse("1 atm", Dimension::Pressure).unwrap(), 101_325.0);
        assert_eq!(parse("3.5MPa", Dimension::Pressure).unwrap(), 3.5e6);
        assert!((parse("14.6959488 psi", Dimension::Pressure).unwrap() - 101_325.0).abs() < 1e-3);
        assert_eq!(parse("3600 kg/h", Dimension::MassFlow).unwrap(), 1.0);
        assert!((parse("86.4 t/d", Dimension::MassFlow).unwrap() - 1.0).abs() < 1e-12);
    }

    #[test]
    fn compound_units_in_several_spellings() {
        for s in ["5 kJ/kg/K", "5 kJ/(kg·K)", "5 kJ/(kg K)", "5000 J/kgK"] {
            assert_eq!(parse(s, Dimension::SpecificEntropy).unwrap(), 5000.0, "{s}");
        }
        for s in ["70 kg/m3", "70 kg/m^3", "70 kg/m³", "0.07 g/cm3"] {
            assert!(
                (parse(s, Dimension::Density).unwrap() - 70.0).abs() < 1e-9,
                "{s}"
            );
        }
        assert_eq!(
            parse("1.2e5 J/kg", Dimension::SpecificEnergy).unwrap(),
            1.2e5
        );
    }

    #[test]
    fn missing_or_wrong_units_say_what_was_expected() {
        let e = parse("20", Dimension::Pressure).unwrap_err();
        assert!(e.to_string().contains("no unit"), "{e}");
        assert!(e.to_string().contains("pressure"), "{e}");
        let e = parse("20 K", Dimension::Pressure).unwrap_err();
        assert!(e.to_string().contains("unit of temperature"), "{e}");
        let e = parse("20 furlongs", Dimension::Pressure).unwrap_err();
        assert!(e.to_string().contains("unknown unit"), "{e}");
        assert!(parse("bar", Dimension::Pressure).is_err());
    }

    #[test]
    fn fractions_take_plain_numbers_and_percent() {
        assert_eq!(parse("0.4", Dimension::Fraction).unwrap(), 0.4);
        assert_eq!(parse("40 %", Dimension::Fraction).unwrap(), 0.4);
    }
}
