//! Malformed flowsheets: each gives its own clear message (file, line and column
//! where the fault is written, the equipment id, what was expected) and exit code 1,
//! and none panics. The real binary runs on each file in a temporary folder.

use std::process::Command;

const BASE: &str = "title: test loop
ambient: 300 K
fluids: [nitrogen]
equipment:
  - id: makeup
    kind: feed
    fluid: nitrogen
    temperature: 300 K
    pressure: 1 atm
    flow: balance
  - id: mixer
    kind: mixer
    inlets: [makeup, hx.cold-out]
  - id: compressor
    kind: compressor
    inlet: mixer
    outlet_pressure: 200 atm
    isothermal_efficiency: 0.6
    flow: 50 g/s
  - id: hx
    kind: exchanger
    hot: compressor
    cold: separator.vapor
    warm_end_approach: 2 K
  - id: valve
    kind: valve
    inlet: hx.hot-out
    outlet_pressure: 1 atm
  - id: separator
    kind: separator
    inlet: valve
  - id: liquid
    kind: product
    inlet: separator.liquid
";

fn run(text: &str, extra: &[&str]) -> (i32, String) {
    let dir = std::env::temp_dir().join(format!(
        "cryochain-malformed-{}-{}",
        std::process::id(),
        rand_name(text)
    ));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("plant.yaml");
    std::fs::write(&file, text).unwrap();
    let mut args = vec!["solve".to_string(), file.to_string_lossy().into_owned()];
    args.extend(extra.iter().map(|s| s.to_string()));
    let out = Command::new(env!("CARGO_BIN_EXE_cryochain"))
        .args(&args)
        .current_dir(&dir)
        .output()
        .unwrap();
    std::fs::remove_dir_all(&dir).ok();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn rand_name(text: &str) -> u64 {
    text.bytes().fold(1469598103934665603u64, |h, b| {
        (h ^ b as u64).wrapping_mul(1099511628211)
    })
}

fn replace(from: &str, to: &str) -> String {
    assert!(
        BASE.contains(from),
        "test setup: '{from}' not in the base flowsheet"
    );
    BASE.replacen(from, to, 1)
}

#[test]
fn the_base_flowsheet_is_valid() {
    let (code, err) = run(BASE, &[]);
    assert_eq!(code, 0, "{err}");
}

#[test]
fn malformed_flowsheets_give_specific_located_errors() {
    // (what is wrong, the flowsheet text, a fragment the message must hold, the
    // line:column it must point at, or "" where the fault has no single place)
    let cases: Vec<(&str, String, &str, &str)> = vec![
        ("YAML syntax", replace("  - id: valve\n", "  - id: valve\n   kind: [\n"), "plant.yaml:", ""),
        ("unknown top-level key", replace("ambient: 300 K\n", "ambient: 300 K\ncolour: blue\n"), "unknown field `colour`", ":3:"),
        ("missing title", replace("title: test loop\n", ""), "missing field `title`", ""),
        ("unknown kind", replace("kind: separator", "kind: cyclone"), "unknown kind 'cyclone'", ":29:"),
        ("unknown key", replace("outlet_pressure: 200 atm", "outlet_presure: 200 atm"), "unknown key 'outlet_presure'", ":17:5"),
        ("number without unit", replace("outlet_pressure: 200 atm", "outlet_pressure: 200"), "has no unit", ":17:5"),
        ("wrong kind of unit", replace("outlet_pressure: 200 atm", "outlet_pressure: 200 K"), "unit of temperature", ":17:5"),
        ("unknown reference", replace("inlet: mixer", "inlet: mixxer"), "'mixxer' names no equipment", ":16:5"),
        ("unknown port", replace("cold: separator.vapor", "cold: separator.gas"), "has no outlet 'gas'", ":23:5"),
        ("ambiguous port", replace("cold: separator.vapor", "cold: separator"), "has several outlets", ":23:5"),
        ("port used twice", replace("inlet: separator.liquid", "inlet: separator.vapor"), "already feeds", ":34:5"),
        ("outlet used by nobody", replace("  - id: liquid\n    kind: product\n    inlet: separator.liquid\n", ""), "goes nowhere", ":29:"),
        ("duplicate id", replace("  - id: valve", "  - id: hx"), "used twice", ":25:"),
        ("no flow basis", replace("    flow: 50 g/s\n", ""), "no flow basis", ""),
        ("over-specified flow", replace("flow: balance", "flow: 1 kg/s"), "over-specified", ""),
        ("valve raises pressure", replace("outlet_pressure: 1 atm", "outlet_pressure: 300 atm"), "not below the inlet pressure", ":28:5"),
        ("fluid not listed", replace("    fluid: nitrogen\n", "    fluid: helium\n"), "not in the flowsheet's fluids list", ":7:5"),
        ("unknown fluid", replace("fluids: [nitrogen]", "fluids: [unobtainium]"), "known fluids:", ":3:"),
        ("two fluids meet", replace("inlets: [makeup, hx.cold-out]", "inlets: [makeup, hx.cold-out, he]\n  - {id: he, kind: feed, fluid: helium, temperature: 300 K, pressure: 1 atm, flow: 1 g/s}").replacen("fluids: [nitrogen]", "fluids: [nitrogen, helium]", 1), "meet here", ":11:"),
        ("two exchanger specs", replace("warm_end_approach: 2 K", "warm_end_approach: 2 K\n    minimum_approach: 1 K"), "one duty specification", ":24:5"),
        ("no exchanger spec", replace("    warm_end_approach: 2 K\n", ""), "needs exactly one of", ":21:5"),
        ("efficiency out of range", replace("isothermal_efficiency: 0.6", "isothermal_efficiency: 1.5"), "outside the allowed range", ":18:5"),
        ("feed outside the fluid's range", replace("temperature: 300 K", "temperature: 5 K"), "outside the allowed range", ":8:5"),
        ("ambient out of range", replace("ambient: 300 K", "ambient: 50 K"), "allowed range 200 K to 400 K", ":2:"),
        ("unknown setting", replace("fluids: [nitrogen]\n", "fluids: [nitrogen]\nsettings:\n  speed: fast\n"), "unknown setting 'speed'", ""),
        ("mixer with one inlet", replace("inlets: [makeup, hx.cold-out]", "inlets: [makeup]"), "2 to 8 inlets", ":13:5"),
        ("fluid changes across a stream", replace("    kind: product\n", "    kind: product\n    fluid: helium\n").replacen("fluids: [nitrogen]", "fluids: [nitrogen, helium]", 1), "cannot change across a stream", ":34:5"),
        ("compressor lowers pressure", replace("outlet_pressure: 200 atm", "outlet_pressure: 0.5 atm"), "not above the inlet pressure", ":17:5"),
        ("bad feed flow", replace("flow: balance", "flow: plenty"), "no number found", ":10:5"),
        ("id with a dot", replace("  - id: valve", "  - id: valve.1"), "not a usable id", ":25:"),
        ("transfer line with a negative heat leak", replace("inlet: hx.hot-out\n", "inlet: line\n") + "  - {id: line, kind: transfer-line, inlet: hx.hot-out, heat_leak: -5 W}\n", "outside the allowed range", ":35:"),
        ("transfer line with a key of another kind", replace("inlet: hx.hot-out\n", "inlet: line\n") + "  - id: line\n    kind: transfer-line\n    inlet: hx.hot-out\n    outlet_pressure: 2 bar\n", "unknown key 'outlet_pressure' for a transfer-line", ":38:5"),
        ("transfer line without an inlet", replace("inlet: hx.hot-out\n", "inlet: line\n") + "  - id: line\n    kind: transfer-line\n    heat_leak: 5 W\n", "'inlet' is required for a transfer-line", ":35:"),
    ];
    assert!(cases.len() >= 20);
    for (what, text, fragment, place) in cases {
        let (code, err) = run(&text, &[]);
        assert_eq!(code, 1, "{what}: exit {code}: {err}");
        assert!(err.contains(fragment), "{what}: '{err}' lacks '{fragment}'");
        assert!(
            err.contains("plant.yaml"),
            "{what}: no file name in '{err}'"
        );
        if !place.is_empty() {
            assert!(
                err.contains(&format!("plant.yaml{place}")),
                "{what}: '{err}' does not point at {place}"
            );
        }
        assert!(!err.contains("panicked"), "{what}: {err}");
    }
}

#[test]
fn bad_overrides_are_clear_errors() {
    for (set, fragment) in [
        (
            "--set=pump.outlet_pressure=3bar",
            "there is no equipment 'pump'",
        ),
        ("--set=valve.outlet_pressure", "write --set id.key=value"),
        ("--set=valve.outlet_pressure=3", "has no unit"),
        ("--set=valve.kind=mixer", "cannot change an id or a kind"),
    ] {
        let (code, err) = run(BASE, &[set]);
        assert_eq!(code, 1, "{set}: {err}");
        assert!(err.contains(fragment), "{set}: '{err}' lacks '{fragment}'");
    }
}
