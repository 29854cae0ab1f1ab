//! Design checks: a flowsheet per check that triggers it, and a clean demo that
//! triggers none. docs/checks.md lists the checks and their sources.

use cryochain::flowsheet::{load, load_str, Override};
use cryochain::rules::{check, Finding, Severity};
use cryochain::solve::{solve, Options};
use std::path::Path;

fn findings_of(text: &str) -> (Vec<Finding>, cryochain::solve::Solution) {
    let plant = load_str(text, "check test", &[]).unwrap_or_else(|e| panic!("{e}"));
    let solution = solve(&plant, &Options::default()).unwrap_or_else(|e| panic!("{e}"));
    (check(&plant, &solution), solution)
}

fn find<'a>(findings: &'a [Finding], id: &str) -> &'a Finding {
    findings.iter().find(|f| f.id == id).unwrap_or_else(|| {
        panic!(
            "no {id} among {:?}",
            findings.iter().map(|f| &f.id).collect::<Vec<_>>()
        )
    })
}

/// Issue 5, done means 1: hydrogen throttled from room temperature makes no liquid,
/// and the valve is flagged as above the maximum inversion temperature (about 200 K).
#[test]
fn hydrogen_loop_without_precooling_makes_no_liquid() {
    let text = "title: hydrogen loop with no precooling
ambient: 300 K
fluids: [hydrogen]
equipment:
  - {id: makeup, kind: feed, fluid: hydrogen, temperature: 300 K, pressure: 1.2 bar, flow: balance}
  - {id: suction, kind: mixer, inlets: [makeup, hx.cold-out]}
  - {id: compressor, kind: compressor, inlet: suction, outlet_pressure: 150 bar, isothermal_efficiency: 0.6, flow: 10 g/s}
  - {id: hx, kind: exchanger, hot: compressor, cold: separator.vapor, warm_end_approach: 2 K}
  - {id: valve, kind: valve, inlet: hx.hot-out, outlet_pressure: 1.3 bar}
  - {id: separator, kind: separator, inlet: valve}
  - {id: lh2, kind: product, inlet: separator.liquid}
";
    let (findings, solution) = findings_of(text);
    assert_eq!(solution.summary.liquid_flow, 0.0);
    assert_eq!(
        solution.summary.liquid_yield,
        Some(0.0),
        "not negative, not missing"
    );
    let valve = find(&findings, "valve-above-inversion-temperature");
    assert_eq!(valve.severity, Severity::Error);
    assert_eq!(valve.equipment.as_deref(), Some("valve"));
    let t_max = valve.values["max_inversion_temperature_K"];
    assert!((195.0..210.0).contains(&t_max), "{t_max}");
    assert!(valve.values["inlet_temperature_K"] > t_max);
    assert!(valve.hint.contains("liquid-nitrogen"), "{}", valve.hint);
    let none = find(&findings, "no-liquid");
    assert!(
        none.message.contains("maximum inversion temperature"),
        "{}",
        none.message
    );
}

#[test]
fn valve_that_warms_the_stream() {
    // Nitrogen at 300 K above its inversion pressure there (about 370 bar).
    let text = "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {id: feed, kind: feed, fluid: nitrogen, temperature: 300 K, pressure: 700 bar, flow: 1 kg/s}
  - {id: valve, kind: valve, inlet: feed, outlet_pressure: 450 bar}
  - {id: vent, kind: product, role: vent, inlet: valve}
";
    let (findings, _) = findings_of(text);
    let f = find(&findings, "valve-warms");
    assert!(f.values["temperature_change_K"] > 0.0);
    let p_inv = f.values["inversion_pressure_Pa"];
    assert!((300e5..450e5).contains(&p_inv), "{p_inv}");
}

/// The demo's valve inlet lies outside the inversion curve (45 K at 119 bar, above
/// the curve's pressure there): normal in a recuperative loop, whose expansion still
/// cools, so it is information inside the pressure advice, not a warning of its own.
#[test]
fn valve_inlet_outside_the_curve_is_information() {
    let plant = load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/hydrogen-ln2-precooled.yaml"),
        &[],
    )
    .unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let findings = check(&plant, &solution);
    assert!(!findings
        .iter()
        .any(|f| f.equipment.as_deref() == Some("jt-valve")));
    let advice = find(&findings, "high-pressure-off-optimum");
    assert_eq!(advice.values["valve_inlet_outside_curve"], 1.0);
    assert!(advice.message.contains("normal in a recuperative loop"));
}

/// Two open streams through one exchanger; high-pressure nitrogen's heat capacity
/// peak makes the profiles bow, so a small warm-end approach crosses inside.
fn exchanger_test(spec: &str) -> Vec<Finding> {
    let text = format!(
        "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {{id: hot, kind: feed, fluid: nitrogen, temperature: 300 K, pressure: 50 bar, flow: 1 kg/s}}
  - {{id: cold, kind: feed, fluid: nitrogen, temperature: 90 K, pressure: 1.5 bar, flow: 1.25 kg/s}}
  - {{id: hx, kind: exchanger, hot: hot, cold: cold, {spec}}}
  - {{id: hot-vent, kind: product, role: vent, inlet: hx.hot-out}}
  - {{id: cold-vent, kind: product, role: vent, inlet: hx.cold-out}}
"
    );
    findings_of(&text).0
}

#[test]
fn exchanger_temperature_cross() {
    let findings = exchanger_test("warm_end_approach: 0.5 K");
    let f = find(&findings, "exchanger-temperature-cross");
    assert!(f.values["min_approach_K"] < 0.0);
    let position = f.values["position"];
    assert!(
        position > 0.0 && position < 1.0,
        "an internal cross: {position}"
    );
}

#[test]
fn exchanger_approach_below_floor() {
    let findings = exchanger_test("minimum_approach: 0.5 K");
    let f = find(&findings, "exchanger-approach-below-floor");
    assert!((f.values["min_approach_K"] - 0.5).abs() < 1e-6);
    // The floor is 0.5 % of the temperature at the pinch (common practice).
    let floor = 0.005 * f.values["pinch_temperature_K"];
    assert!((f.values["approach_floor_K"] - floor).abs() < 1e-12);
    assert!(floor > 0.5);
}

#[test]
fn state_near_the_triple_point() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/nitrogen-linde-hampson.yaml");
    let set = [
        Override::parse("valve.outlet_pressure=0.13 bar").unwrap(),
        Override::parse("makeup.pressure=0.13 bar").unwrap(),
    ];
    let plant = load(&path, &set).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let findings = check(&plant, &solution);
    let f = find(&findings, "state-near-range-limit");
    assert!(f.values["temperature_K"] < 63.151 * 1.01);
}

#[test]
fn liquid_at_a_compressor_suction() {
    let text = "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {id: feed, kind: feed, fluid: nitrogen, temperature: 80 K, pressure: 5 bar, flow: 1 kg/s}
  - {id: valve, kind: valve, inlet: feed, outlet_pressure: 1.2 bar}
  - {id: compressor, kind: compressor, inlet: valve, outlet_pressure: 5 bar}
  - {id: vent, kind: product, role: vent, inlet: compressor}
";
    let (findings, _) = findings_of(text);
    let f = find(&findings, "liquid-at-compressor-suction");
    assert_eq!(f.severity, Severity::Error);
    assert!(f.values["vapour_fraction"] < 1.0);
}

#[test]
fn compressor_discharge_too_hot() {
    let text = "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {id: feed, kind: feed, fluid: nitrogen, temperature: 300 K, pressure: 1 bar, flow: 1 kg/s}
  - {id: compressor, kind: compressor, inlet: feed, outlet_pressure: 20 bar, model: staged, stages: 1, isentropic_efficiency: 0.8}
  - {id: vent, kind: product, role: vent, inlet: compressor}
";
    let (findings, _) = findings_of(text);
    let f = find(&findings, "discharge-temperature-high");
    assert!(f.values["discharge_temperature_K"] > 420.0);
}

#[test]
fn wet_expander_outlet() {
    let text = "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {id: feed, kind: feed, fluid: nitrogen, temperature: 130 K, pressure: 40 bar, flow: 1 kg/s}
  - {id: expander, kind: expander, inlet: feed, outlet_pressure: 1.1 bar, isentropic_efficiency: 0.8}
  - {id: vent, kind: product, role: vent, inlet: expander}
";
    let (findings, _) = findings_of(text);
    let f = find(&findings, "wet-expander-outlet");
    assert!(f.values["outlet_liquid_fraction"] > 0.05);
}

fn precooler_test(feed_temperature: &str, target: &str) -> Vec<Finding> {
    let text = format!(
        "title: t
ambient: 300 K
fluids: [hydrogen, nitrogen]
equipment:
  - {{id: feed, kind: feed, fluid: hydrogen, temperature: {feed_temperature}, pressure: 20 bar, flow: 10 g/s}}
  - {{id: bath, kind: precooler, inlet: feed, outlet_temperature: {target}, bath: nitrogen, bath_pressure: 1.2 bar}}
  - {{id: vent, kind: product, role: vent, inlet: bath}}
"
    );
    findings_of(&text).0
}

#[test]
fn precooler_colder_than_its_bath() {
    let findings = precooler_test("300 K", "78 K");
    let f = find(&findings, "precooler-colder-than-bath");
    // Nitrogen boils at about 78.8 K at 1.2 bar (our Span et al. equation).
    assert!(
        (f.values["sink_temperature_K"] - 78.82).abs() < 0.05,
        "{:?}",
        f.values
    );
}

#[test]
fn precooler_that_would_heat() {
    let findings = precooler_test("50 K", "82 K");
    find(&findings, "precooler-heats");
}

#[test]
fn precooler_short_of_its_target() {
    let path =
        Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/cascade-nitrogen-hydrogen.yaml");
    let plant = load(
        &path,
        &[Override::parse("n2-compressor.flow=120 g/s").unwrap()],
    )
    .unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let findings = check(&plant, &solution);
    let f = find(&findings, "precooler-short-of-target");
    assert!(f.values["outlet_temperature_K"] > f.values["target_K"]);
}

#[test]
fn cooler_below_ambient() {
    let text = "title: t
ambient: 300 K
fluids: [nitrogen]
equipment:
  - {id: feed, kind: feed, fluid: nitrogen, temperature: 320 K, pressure: 10 bar, flow: 1 kg/s}
  - {id: cooler, kind: cooler, inlet: feed, outlet_temperature: 250 K}
  - {id: vent, kind: product, role: vent, inlet: cooler}
";
    let (findings, _) = findings_of(text);
    find(&findings, "cooler-below-ambient");
}

/// The simple nitrogen demo breaks no rule; the one finding is the (verified)
/// advice that its 200 atm lies below the inversion pressure at its warm end.
#[test]
fn the_simple_nitrogen_demo_is_clean() {
    let plant = load(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/nitrogen-linde-hampson.yaml"),
        &[],
    )
    .unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let findings = check(&plant, &solution);
    let ids: Vec<&str> = findings.iter().map(|f| f.id.as_str()).collect();
    assert_eq!(ids, ["high-pressure-off-optimum"], "{findings:?}");
}

#[test]
fn check_command_exit_codes_and_json() {
    use std::process::Command;
    let bin = env!("CARGO_BIN_EXE_cryochain");
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"));
    let clean = Command::new(bin)
        .args(["check", "flowsheets/nitrogen-linde-hampson.yaml"])
        .current_dir(dir)
        .output()
        .unwrap();
    assert_eq!(clean.status.code(), Some(0));
    let file = std::env::temp_dir().join(format!("cryochain-check-{}.yaml", std::process::id()));
    std::fs::write(
        &file,
        "title: t\nambient: 300 K\nfluids: [nitrogen]\nequipment:\n  - {id: feed, kind: feed, fluid: nitrogen, temperature: 320 K, pressure: 10 bar, flow: 1 kg/s}\n  - {id: cooler, kind: cooler, inlet: feed, outlet_temperature: 250 K}\n  - {id: vent, kind: product, role: vent, inlet: cooler}\n",
    )
    .unwrap();
    let bad = Command::new(bin)
        .args(["check", file.to_str().unwrap(), "--json"])
        .output()
        .unwrap();
    assert_eq!(
        bad.status.code(),
        Some(2),
        "design errors exit 2, input errors 1"
    );
    let list: serde_json::Value = serde_json::from_slice(&bad.stdout).unwrap();
    let first = &list[0];
    for key in ["id", "severity", "equipment", "message", "values", "hint"] {
        assert!(first.get(key).is_some(), "missing {key}");
    }
    assert_eq!(first["id"], "cooler-below-ambient");
    std::fs::remove_file(&file).ok();
}
