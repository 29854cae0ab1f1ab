//! Flowsheets without para settings give the results they gave before ortho–para
//! hydrogen was modelled. The reference JSON in tests/reference/before_ortho_para/
//! was written by cryochain at commit 34a069b (`generate.sh` there); the hydrogen and
//! cascade demos of that commit are kept as tests/flowsheets/*-frozen-normal.yaml.
//! Every number of the old result must be in the new one within 1e-9 relative (with
//! an absolute floor of 1e-9 for figures that are round-off, such as the exergy
//! destroyed in a mixer of equal temperatures); new keys may be added. Iteration
//! counts, residual logs, titles and paths are not compared.

mod common;

use serde_json::Value;

const IGNORED: &[&str] = &["iterations", "residual_log", "title", "source", "findings"];

fn compare(old: &Value, new: &Value, path: &str, differences: &mut Vec<String>) {
    match (old, new) {
        (Value::Object(a), Value::Object(b)) => {
            for (key, value) in a {
                if IGNORED.contains(&key.as_str()) {
                    continue;
                }
                match b.get(key) {
                    Some(other) => compare(value, other, &format!("{path}/{key}"), differences),
                    None => differences.push(format!("{path}/{key} is missing")),
                }
            }
        }
        (Value::Array(a), Value::Array(b)) => {
            if a.len() != b.len() {
                differences.push(format!("{path}: {} items, now {}", a.len(), b.len()));
                return;
            }
            for (i, (x, y)) in a.iter().zip(b).enumerate() {
                compare(x, y, &format!("{path}[{i}]"), differences);
            }
        }
        (Value::Number(a), Value::Number(b)) => {
            let (a, b) = (a.as_f64().unwrap(), b.as_f64().unwrap());
            if (a - b).abs() > 1e-9 * a.abs().max(b.abs()) + 1e-9 {
                differences.push(format!("{path}: {a} now {b}"));
            }
        }
        (a, b) if a == b => {}
        (a, b) => differences.push(format!("{path}: {a} now {b}")),
    }
}

/// Each old finding is still reported, with the same values.
fn findings_kept(old: &Value, new: &Value, differences: &mut Vec<String>) {
    let empty = Vec::new();
    let now = new["findings"].as_array().unwrap_or(&empty);
    for finding in old["findings"].as_array().unwrap_or(&empty) {
        match now
            .iter()
            .find(|f| f["id"] == finding["id"] && f["equipment"] == finding["equipment"])
        {
            Some(kept) => compare(
                finding,
                kept,
                &format!("finding {}", finding["id"]),
                differences,
            ),
            None => differences.push(format!("finding {} is gone", finding["id"])),
        }
    }
}

#[test]
fn flowsheets_without_para_settings_give_the_results_they_gave_before() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    for (reference, file) in [
        (
            "nitrogen-linde-hampson",
            "flowsheets/nitrogen-linde-hampson.yaml",
        ),
        (
            "helium-lh2-precooled",
            "flowsheets/helium-lh2-precooled.yaml",
        ),
        ("nitrogen-claude", "flowsheets/nitrogen-claude.yaml"),
        (
            "hydrogen-ln2-precooled",
            "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml",
        ),
        (
            "cascade-nitrogen-hydrogen",
            "tests/flowsheets/cascade-nitrogen-hydrogen-frozen-normal.yaml",
        ),
    ] {
        let text = std::fs::read_to_string(
            root.join("tests/reference/before_ortho_para")
                .join(format!("{reference}.json")),
        )
        .unwrap();
        let old: Value = serde_json::from_str(&text).unwrap();
        let (_, out, err) = common::run_in(root, &["solve", file, "--json"]);
        let new: Value = serde_json::from_str(&out).unwrap_or_else(|e| panic!("{file}: {e} {err}"));
        let mut differences = Vec::new();
        compare(&old, &new, "", &mut differences);
        findings_kept(&old, &new, &mut differences);
        assert!(
            differences.is_empty(),
            "{file}: {} differences, first {:?}",
            differences.len(),
            &differences[..differences.len().min(10)]
        );
    }
}
