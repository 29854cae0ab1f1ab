//! End-to-end: the real binary solves every demo flowsheet and the built-in default,
//! prints readable tables within 100 columns, and JSON with the documented keys.

mod common;

use std::path::Path;

fn cryochain(args: &[&str]) -> (i32, String, String) {
    common::run_in(Path::new(env!("CARGO_MANIFEST_DIR")), args)
}

#[test]
fn every_demo_solves_from_the_command_line() {
    for entry in
        std::fs::read_dir(Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets")).unwrap()
    {
        let path = entry.unwrap().path();
        if path.extension().and_then(|e| e.to_str()) != Some("yaml") {
            continue;
        }
        let file = path.to_str().unwrap();
        let (code, out, err) = cryochain(&["solve", file, "--json"]);
        assert_eq!(code, 0, "{file}: {err}");
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        for key in [
            "liquid_yield",
            "liquid_flow_kg_s",
            "specific_energy_kWh_per_kg",
            "converged",
            "iterations",
            "streams",
            "equipment",
            "balances",
        ] {
            assert!(v.get(key).is_some(), "{file}: missing {key}");
        }
        assert_eq!(v["converged"], true);
        assert!(v["liquid_yield"].as_f64().unwrap() > 0.0);
        let (code, text, err) = cryochain(&["solve", file]);
        assert_eq!(code, 0, "{file}: {err}");
        for line in text.lines() {
            assert!(
                line.chars().count() <= 100,
                "{file}: line over 100 columns: {line}"
            );
        }
        assert!(text.contains("Caution"));
        assert!(text.contains("liquid yield"));
    }
}

#[test]
fn with_no_file_it_solves_the_built_in_demo_and_says_so() {
    let (code, out, err) = cryochain(&["solve"]);
    assert_eq!(code, 0, "{err}");
    assert!(err.contains("built-in demo"), "{err}");
    assert!(
        out.contains("LN2-precooled hydrogen Linde-Hampson liquefier with ortho-para conversion")
    );
}

#[test]
fn set_overrides_a_parameter() {
    let (_, base, _) = cryochain(&["solve", "--json"]);
    let (code, changed, err) = cryochain(&[
        "solve",
        "--json",
        "--set",
        "ln2-bath.outlet_temperature=90K",
    ]);
    assert_eq!(code, 0, "{err}");
    let y = |s: &str| {
        serde_json::from_str::<serde_json::Value>(s).unwrap()["liquid_yield"]
            .as_f64()
            .unwrap()
    };
    // A warmer precooler outlet leaves less liquid.
    assert!(y(&changed) < y(&base));
}

#[test]
fn log_prints_residuals_on_stderr() {
    let (code, out, err) = cryochain(&["solve", "--log", "--json"]);
    assert_eq!(code, 0);
    assert!(err.contains("largest scaled tear residual"));
    assert!(
        serde_json::from_str::<serde_json::Value>(&out).is_ok(),
        "stdout must stay clean JSON"
    );
}
