//! Helpers shared by the integration tests.
#![allow(dead_code)]

use std::path::PathBuf;

/// Path of a file under tests/reference/.
pub fn reference_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests")
        .join("reference")
        .join(name)
}

/// Reads a reference CSV: skips `#` comment lines, returns the header and the rows.
pub fn read_csv(name: &str) -> (Vec<String>, Vec<Vec<String>>) {
    let text = std::fs::read_to_string(reference_path(name)).expect("reference file");
    let mut lines = text
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty());
    let header = lines
        .next()
        .expect("header")
        .split(',')
        .map(str::to_string)
        .collect();
    let rows = lines
        .map(|l| l.split(',').map(str::to_string).collect())
        .collect();
    (header, rows)
}

/// The column index of `name` in `header`.
pub fn column(header: &[String], name: &str) -> usize {
    header
        .iter()
        .position(|h| h == name)
        .unwrap_or_else(|| panic!("column {name}"))
}

/// The number in column `value` of the reference CSV `name` on the row whose
/// columns hold the given keys (`[("quantity", "liquid_yield")]`).
pub fn reference_value(name: &str, keys: &[(&str, &str)], value: &str) -> f64 {
    let (header, rows) = read_csv(name);
    let key_columns: Vec<(usize, &str)> =
        keys.iter().map(|(c, k)| (column(&header, c), *k)).collect();
    let v = column(&header, value);
    rows.iter()
        .find(|r| key_columns.iter().all(|(c, k)| r[*c] == *k))
        .unwrap_or_else(|| panic!("{name}: no row {keys:?}"))[v]
        .parse()
        .unwrap()
}

/// Relative difference |a − b| / |b|.
pub fn relative(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

/// Runs the real `cryochain` binary in `dir`: (exit code, stdout, stderr).
pub fn run_in(dir: &std::path::Path, args: &[&str]) -> (i32, String, String) {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_cryochain"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("run cryochain");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

/// The stream named `name` (`unit.port`) of a solution.
pub fn stream<'a>(
    solution: &'a cryochain::solve::Solution,
    name: &str,
) -> &'a cryochain::equipment::Flow {
    let index = solution
        .stream_names
        .iter()
        .position(|n| n == name)
        .unwrap_or_else(|| panic!("no stream {name}"));
    &solution.streams[index]
}

/// The ids of a solution's design findings that are errors or warnings: a demo
/// follows good practice and has none.
pub fn serious_findings(
    plant: &cryochain::flowsheet::Plant,
    solution: &cryochain::solve::Solution,
) -> Vec<String> {
    cryochain::rules::check(plant, solution)
        .into_iter()
        .filter(|f| {
            matches!(
                f.severity,
                cryochain::rules::Severity::Error | cryochain::rules::Severity::Warning
            )
        })
        .map(|f| f.id)
        .collect()
}
