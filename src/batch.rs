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
use rayon::prelude::*;

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
    /// The SI value of one of the header's unit, where that unit is a plain factor
    /// (no offset, not gauge): a cell's number times it is the value, as the
    /// quantity parser would give. Cells are then read once, as numbers.
    factor: Option<f64>,
}

impl InputColumn {
    /// The column's specification in `cell`: by the header's factor where the cell
    /// is a plain finite number (and, for a temperature, above zero), else through
    /// the quantity parser, whose messages name what is wrong.
    fn spec(&self, cell: &str) -> Result<Spec> {
        if let (Some(factor), Ok(number)) = (self.factor, cell.parse::<f64>()) {
            let value = number * factor + 0.0;
            if value.is_finite() && (self.property != Property::Temperature || value > 0.0) {
                return Ok(Spec::si(self.property, value));
            }
        }
        let text = match &self.unit {
            Some(unit) => format!("{}={cell} {unit}", self.property.key()),
            None => format!("{}={cell}", self.property.key()),
        };
        Spec::parse(&text)
    }
}

/// The factor of a header's unit, where it is a plain factor (see [`InputColumn`]).
fn plain_factor(property: Property, unit: &Option<String>) -> Option<f64> {
    let unit = unit.as_ref()?;
    let key = property.key();
    let zero = Spec::parse(&format!("{key}=0 {unit}")).ok();
    let one = Spec::parse(&format!("{key}=1 {unit}")).ok()?;
    // A unit with an offset (°C) or a gauge pressure reads 0 as something else
    // (or, for a temperature, refuses it).
    match zero {
        Some(z) if z.value == 0.0 => Some(one.value),
        None if property == Property::Temperature => {
            // 0 K is refused; 2 of the unit is twice 1 of it for a plain factor.
            let two = Spec::parse(&format!("{key}=2 {unit}")).ok()?;
            (two.value == 2.0 * one.value).then_some(one.value)
        }
        _ => None,
    }
}

/// Appends `value` in the shortest form that reads back to the same number, with a
/// positive exponent written without its sign (`1e16`, `2.5e-7`).
fn push_number(out: &mut String, buffer: &mut zmij::Buffer, value: f64) {
    if value.is_finite() {
        let text = buffer.format_finite(value);
        // Only numbers from 1e16 up are written with a positive exponent.
        match (value.abs() >= 1e16).then(|| text.rfind('+')).flatten() {
            Some(plus) => {
                out.push_str(&text[..plus]);
                out.push_str(&text[plus + 1..]);
            }
            None => out.push_str(text),
        }
    } else if value.is_nan() {
        out.push_str("NaN");
    } else if value > 0.0 {
        out.push_str("inf");
    } else {
        out.push_str("-inf");
    }
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
            let factor = plain_factor(property, &unit);
            inputs.push(InputColumn {
                index,
                property,
                unit,
                factor,
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
    let mut out = String::with_capacity(input.len() * 4);
    let header_cells: Vec<&str> = headers
        .iter()
        .chain(OUTPUT_COLUMNS.iter().copied())
        .collect();
    for (i, cell) in header_cells.iter().enumerate() {
        if i > 0 {
            out.push(',');
        }
        push_cell(&mut out, cell);
    }
    out.push('\n');
    let width = headers.len();
    let text_lines: Vec<&str> = input.lines().collect();
    // Read every row first (with its line in the file, comment lines counted: the
    // reader's position can stand on comment lines just before the record), every
    // field into one shared buffer (a record of its own a row cost an allocation
    // and a free a row).
    let mut bytes: Vec<u8> = Vec::new();
    let mut ends: Vec<usize> = Vec::new();
    let mut records: Vec<Row> = Vec::new();
    let mut record = csv::ByteRecord::new();
    loop {
        match reader.read_byte_record(&mut record) {
            Ok(true) => {}
            Ok(false) => break,
            Err(e) => {
                return Err(Error::Input(format!(
                    "{source}: row {}: {e}",
                    records.len() + 1
                )))
            }
        }
        let mut line = record
            .position()
            .map_or(records.len() + 2, |p| p.line() as usize);
        while text_lines
            .get(line - 1)
            .is_some_and(|l| l.trim().is_empty() || l.trim_start().starts_with('#'))
        {
            line += 1;
        }
        let first = ends.len();
        for field in record.iter() {
            bytes.extend_from_slice(field);
            ends.push(bytes.len());
        }
        records.push(Row {
            first,
            count: record.len(),
            line,
        });
    }
    // The input is text and fields are cut at ASCII separators, so the fields are
    // text too; checked once here rather than field by field.
    let fields = Fields {
        text: String::from_utf8(bytes)
            .map_err(|e| Error::Input(format!("{source}: the table is not UTF-8 text: {e}")))?,
        ends,
    };
    // Then compute and write them in blocks on every core, each block into its own
    // text, joined in order: the output does not depend on the number of threads.
    let table = Table {
        inputs: &inputs,
        fluid_column,
        default_fluid,
        width,
        fields: &fields,
    };
    let blocks: Vec<(String, Vec<(usize, String)>)> = records
        .par_chunks(ROWS_PER_BLOCK)
        .map(|block| table.block(block))
        .collect();
    let mut failures = Vec::new();
    out.reserve(blocks.iter().map(|(text, _)| text.len()).sum());
    for (text, failed) in blocks {
        out.push_str(&text);
        failures.extend(failed);
    }
    Ok(BatchOutcome {
        csv: out,
        rows: records.len(),
        failures,
    })
}

/// Rows computed and written together by one thread.
const ROWS_PER_BLOCK: usize = 512;

/// Every row's fields, end to end: the text and where each field ends.
#[derive(Default)]
struct Fields {
    text: String,
    ends: Vec<usize>,
}

/// One row: its first field's number in [`Fields`], how many it has, and its line
/// in the file.
struct Row {
    first: usize,
    count: usize,
    line: usize,
}

/// What every row needs to know about the table.
struct Table<'a> {
    inputs: &'a [InputColumn],
    fluid_column: Option<usize>,
    default_fluid: Option<&'a str>,
    width: usize,
    fields: &'a Fields,
}

impl Table<'_> {
    /// Field `i` of `row` ("" past its end).
    fn field<'b>(&'b self, row: &Row, i: usize) -> &'b str {
        if i >= row.count {
            return "";
        }
        let k = row.first + i;
        let start = if k == 0 { 0 } else { self.fields.ends[k - 1] };
        self.fields
            .text
            .get(start..self.fields.ends[k])
            .unwrap_or("")
    }

    /// The fluid and the two input specifications of `row`; fluids named in the
    /// block are looked up once and kept in `known`.
    fn inputs_of<'b>(
        &'b self,
        row: &Row,
        known: &mut Vec<(&'b str, &'static fluids::Fluid)>,
    ) -> Result<(&'static fluids::Fluid, Spec, Spec)> {
        if row.count != self.width {
            return Err(Error::Input(format!(
                "this row has {} cells where the header has {}",
                row.count, self.width
            )));
        }
        let name = match self.fluid_column {
            Some(i) => self.field(row, i),
            None => self.default_fluid.unwrap_or(""),
        };
        let fluid = match known.iter().find(|(n, _)| *n == name) {
            Some((_, fluid)) => *fluid,
            None => {
                let fluid = fluids::fluid(name)?;
                known.push((name, fluid));
                fluid
            }
        };
        let first = self.inputs[0].spec(self.field(row, self.inputs[0].index))?;
        let second = self.inputs[1].spec(self.field(row, self.inputs[1].index))?;
        Ok((fluid, first, second))
    }

    /// The output lines of `rows` (each with its line in the file), and the rows
    /// that failed with their line and reason.
    fn block(&self, rows: &[Row]) -> (String, Vec<(usize, String)>) {
        let mut out = String::with_capacity(rows.len() * 256);
        let mut failures = Vec::new();
        let mut known: Vec<(&str, &'static fluids::Fluid)> = Vec::new();
        let mut buffer = zmij::Buffer::new();
        for row in rows {
            // The copied input cells, as many as the header names (a ragged row's
            // padded or cut, its error saying so).
            for i in 0..self.width {
                if i > 0 {
                    out.push(',');
                }
                push_cell(&mut out, self.field(row, i));
            }
            let computed = self
                .inputs_of(row, &mut known)
                .and_then(|(fluid, first, second)| fluid.state_from(first, second));
            match &computed {
                Ok(state) => write_state(&mut out, &mut buffer, state),
                Err(e) => {
                    for _ in 0..OUTPUT_COLUMNS.len() {
                        out.push(',');
                    }
                    let reason = e.to_string();
                    push_cell(&mut out, &reason);
                    let line = row.line;
                    failures.push((line, format!("line {line}: {reason}")));
                }
            }
            out.push('\n');
        }
        (out, failures)
    }
}

/// Appends the output columns of `state` (each after a comma; the error column
/// empty).
fn write_state(out: &mut String, buffer: &mut zmij::Buffer, state: &fluids::State) {
    for value in [
        state.temperature,
        state.pressure,
        state.density,
        state.enthalpy,
        state.entropy,
    ] {
        out.push(',');
        push_number(out, buffer, value);
    }
    for value in [
        state.cp(),
        state.cv(),
        state.speed_of_sound(),
        state.joule_thomson(),
    ] {
        out.push(',');
        if let Some(v) = value {
            push_number(out, buffer, v);
        }
    }
    out.push(',');
    push_number(out, buffer, state.compressibility());
    out.push(',');
    out.push_str(state.phase.name());
    out.push(',');
    if let Some(x) = state.quality {
        push_number(out, buffer, x);
    }
    out.push(',');
}

/// Appends `cell` as a CSV field: as it is, or quoted (inner quotes doubled) where
/// it holds a comma, a quote or a line break.
fn push_cell(out: &mut String, cell: &str) {
    let plain = !cell
        .bytes()
        .any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r'));
    if plain {
        out.push_str(cell);
    } else {
        out.push('"');
        out.push_str(&cell.replace('"', "\"\""));
        out.push('"');
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Numbers are written in the shortest form that reads back to the same bits,
    /// in the form tables have always had (`1e16`, no `+` in the exponent; `300.0`);
    /// checked against the `ryu` crate's formatting of the same numbers.
    #[test]
    fn numbers_read_back_exactly_in_the_table_form() {
        let mut buffer = zmij::Buffer::new();
        let mut reference = ryu::Buffer::new();
        let mut bits: u64 = 0x9e37_79b9_7f4a_7c15;
        let mut values = vec![
            0.0,
            -0.0,
            300.0,
            1e16,
            -2.5e-7,
            1.7976931348623157e308,
            5e-324,
        ];
        for _ in 0..200_000 {
            bits ^= bits << 13;
            bits ^= bits >> 7;
            bits ^= bits << 17;
            let value = f64::from_bits(bits);
            if value.is_finite() {
                values.push(value);
            }
        }
        for value in values {
            let mut out = String::new();
            push_number(&mut out, &mut buffer, value);
            assert_eq!(out, reference.format_finite(value), "{value:e}");
            assert_eq!(out.parse::<f64>().unwrap().to_bits(), value.to_bits());
        }
        let mut out = String::new();
        for value in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            push_number(&mut out, &mut buffer, value);
            out.push(' ');
        }
        assert_eq!(out, "NaN inf -inf ");
    }

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
