//! Property tables in batch: a CSV of input pairs in, a CSV of properties out.
//!
//! The input has a header row. Two columns name the input properties (`T`, `p`, `h`,
//! `s`, `x`, `rho`), each either with its unit in brackets in the header (`T [K]`,
//! `p [bar]`), so that its cells are plain numbers, or without, so that every cell
//! carries its own unit (`80 K`). An optional `fluid` column names the fluid of each
//! row; otherwise every row uses the fluid given to the command. Other columns are
//! copied through. A row that fails keeps its place, with the reason in the `error`
//! column; the other rows are still computed. docs/batch-tables.md has examples.

use crate::error::{Error, Result};
use crate::fluids::{self, Property, Spec};

/// The output columns after the copied input columns, with units.
pub const OUTPUT_COLUMNS: [&str; 13] = [
    "temperature [K]",
    "pressure [Pa]",
    "density [kg/m3]",
    "enthalpy [J/kg]",
    "entropy [J/(kg K)]",
    "cp [J/(kg K)]",
    "cv [J/(kg K)]",
    "speed_of_sound [m/s]",
    "joule_thomson [K/Pa]",
    "compressibility [-]",
    "phase",
    "quality [-]",
    "error",
];

/// What a batch produced.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchOutcome {
    /// The output CSV text.
    pub csv: String,
    /// Rows computed.
    pub rows: usize,
    /// Rows that failed, with their line number and reason.
    pub failures: Vec<(usize, String)>,
}

struct InputColumn {
    index: usize,
    property: Property,
    unit: Option<String>,
}

/// Reads `name` or `name [unit]`.
fn header_parts(header: &str) -> (String, Option<String>) {
    let header = header.trim();
    match (header.find('['), header.rfind(']')) {
        (Some(open), Some(close)) if close > open => (
            header[..open].trim().to_string(),
            Some(header[open + 1..close].trim().to_string()),
        ),
        _ => (header.to_string(), None),
    }
}

/// Computes the property table for `input` (CSV text). `source` names the input in
/// messages; `default_fluid` is used where there is no `fluid` column.
pub fn run(input: &str, source: &str, default_fluid: Option<&str>) -> Result<BatchOutcome> {
    let mut reader = csv::ReaderBuilder::new()
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        // Ragged rows are read, then refused one by one (keeping their place).
        .flexible(true)
        .from_reader(input.as_bytes());
    let headers = reader
        .headers()
        .map_err(|e| Error::Input(format!("{source}: cannot read the header row: {e}")))?
        .clone();
    let mut fluid_column = None;
    let mut inputs: Vec<InputColumn> = Vec::new();
    for (index, header) in headers.iter().enumerate() {
        let (name, unit) = header_parts(header);
        if name.eq_ignore_ascii_case("fluid") {
            fluid_column = Some(index);
        } else if let Some(property) = Property::from_key(&name) {
            inputs.push(InputColumn {
                index,
                property,
                unit,
            });
        }
    }
    if inputs.len() != 2 {
        return Err(Error::Input(format!(
            "{source}: line 1: the header must name exactly two input properties (T, p, h, s, x or rho, optionally with a unit in brackets such as 'T [K]'); found {}",
            inputs.len()
        )));
    }
    if fluid_column.is_none() && default_fluid.is_none() {
        return Err(Error::Input(format!(
            "{source}: there is no 'fluid' column; name the fluid with --fluid"
        )));
    }
    if let Some(name) = default_fluid {
        fluids::fluid(name)?;
    }
    let mut writer = csv::Writer::from_writer(Vec::new());
    let mut out_header: Vec<String> = headers.iter().map(str::to_string).collect();
    out_header.extend(OUTPUT_COLUMNS.iter().map(|s| s.to_string()));
    writer
        .write_record(&out_header)
        .map_err(|e| Error::Input(e.to_string()))?;
    let mut rows = 0;
    let mut failures = Vec::new();
    let width = headers.len();
    let text_lines: Vec<&str> = input.lines().collect();
    for (number, record) in reader.records().enumerate() {
        let record =
            record.map_err(|e| Error::Input(format!("{source}: row {}: {e}", number + 1)))?;
        // The line in the file, comment lines counted: the reader's position can
        // stand on comment lines just before the record, so step past them.
        let mut line = record.position().map_or(number + 2, |p| p.line() as usize);
        while text_lines
            .get(line - 1)
            .is_some_and(|l| l.trim().is_empty() || l.trim_start().starts_with('#'))
        {
            line += 1;
        }
        rows += 1;
        let computed = (|| -> Result<Vec<String>> {
            if record.len() != width {
                return Err(Error::Input(format!(
                    "this row has {} cells where the header has {width}",
                    record.len()
                )));
            }
            let name = match fluid_column {
                Some(i) => record.get(i).unwrap_or(""),
                None => default_fluid.unwrap_or(""),
            };
            let fluid = fluids::fluid(name)?;
            let spec = |c: &InputColumn| -> Result<Spec> {
                let cell = record.get(c.index).unwrap_or("");
                let text = match &c.unit {
                    Some(unit) => format!("{}={cell} {unit}", c.property.key()),
                    None => format!("{}={cell}", c.property.key()),
                };
                Spec::parse(&text)
            };
            let state = fluid.state_from(spec(&inputs[0])?, spec(&inputs[1])?)?;
            let opt = |v: Option<f64>| v.map_or(String::new(), |v| format!("{v:.10e}"));
            Ok(vec![
                format!("{:.10}", state.temperature),
                format!("{:.6}", state.pressure),
                format!("{:.10e}", state.density),
                format!("{:.10e}", state.enthalpy),
                format!("{:.10e}", state.entropy),
                opt(state.cp()),
                opt(state.cv()),
                opt(state.speed_of_sound()),
                opt(state.joule_thomson()),
                format!("{:.10}", state.compressibility()),
                state.phase.name().to_string(),
                state.quality.map_or(String::new(), |x| format!("{x:.10}")),
                String::new(),
            ])
        })();
        // The copied input cells, as many as the header names (a ragged row's
        // padded or cut, its error saying so).
        let mut row: Vec<String> = (0..width)
            .map(|i| record.get(i).unwrap_or("").to_string())
            .collect();
        match computed {
            Ok(cells) => row.extend(cells),
            Err(e) => {
                let message = format!("line {line}: {e}");
                row.extend(std::iter::repeat_n(String::new(), OUTPUT_COLUMNS.len() - 1));
                row.push(e.to_string());
                failures.push((line, message));
            }
        }
        writer
            .write_record(&row)
            .map_err(|e| Error::Input(e.to_string()))?;
    }
    let bytes = writer
        .into_inner()
        .map_err(|e| Error::Input(e.to_string()))?;
    Ok(BatchOutcome {
        csv: String::from_utf8_lossy(&bytes).into_owned(),
        rows,
        failures,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn units_in_header_or_cells() {
        let input = "T [K],p [bar],note\n80,1,cold gas\n300,200,warm\n";
        let out = run(input, "test.csv", Some("nitrogen")).unwrap();
        assert_eq!(out.rows, 2);
        assert!(out.failures.is_empty(), "{:?}", out.failures);
        let lines: Vec<&str> = out.csv.lines().collect();
        assert!(lines[0].starts_with("T [K],p [bar],note,temperature [K]"));
        assert!(lines[1].contains("vapour"));
        let cells = "fluid,T,x\nhydrogen,20 K,0.5\nhelium,4.2 K,0\n";
        let out = run(cells, "cells.csv", None).unwrap();
        assert!(out.failures.is_empty(), "{:?}", out.failures);
        assert!(out.csv.contains("two-phase"));
    }

    #[test]
    fn a_bad_row_is_reported_and_the_rest_computed() {
        let input = "T [K],p [bar]\n80,1\n5000,1\n90,2\n";
        let out = run(input, "t.csv", Some("nitrogen")).unwrap();
        assert_eq!(out.rows, 3);
        assert_eq!(out.failures.len(), 1);
        assert_eq!(out.failures[0].0, 3);
        assert!(
            out.failures[0].1.contains("outside the range"),
            "{:?}",
            out.failures
        );
    }

    /// A ragged row keeps its place with its error; line numbers count comment
    /// lines (both failed before: the first aborted the batch, the second was off).
    #[test]
    fn ragged_rows_and_comments() {
        let input =
            "# made by hand\nT [K],p [bar]\n80,1\n# a note\n90\n100,1,extra\n5000,1\n95,1\n";
        let out = run(input, "t.csv", Some("nitrogen")).unwrap();
        assert_eq!(out.rows, 5);
        let lines: Vec<usize> = out.failures.iter().map(|f| f.0).collect();
        assert_eq!(lines, vec![5, 6, 7], "{:?}", out.failures);
        assert!(out.failures[0].1.contains("1 cells where the header has 2"));
        let csv: Vec<&str> = out.csv.lines().collect();
        assert_eq!(csv.len(), 6);
        assert!(csv[5].starts_with("95,1,95.0"), "{}", csv[5]);
    }

    #[test]
    fn header_must_name_two_properties() {
        let e = run("T [K],note\n1,2\n", "t.csv", Some("nitrogen")).unwrap_err();
        assert!(e.to_string().contains("exactly two"), "{e}");
    }
}
