//! End-to-end tests of the property commands: the real binary in a temporary folder.

mod common;

fn cryochain(args: &[&str]) -> (i32, String, String) {
    common::run_in(&std::env::temp_dir(), args)
}

#[test]
fn state_json_has_the_documented_si_keys() {
    let (code, out, err) = cryochain(&["state", "nitrogen", "T=80K", "p=1bar", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    for key in [
        "temperature_K",
        "pressure_Pa",
        "density_kg_m3",
        "enthalpy_J_kg",
        "entropy_J_kgK",
        "cp_J_kgK",
        "cv_J_kgK",
        "speed_of_sound_m_s",
        "joule_thomson_K_Pa",
        "phase",
        "quality",
    ] {
        assert!(v.get(key).is_some(), "missing {key} in {out}");
    }
    assert_eq!(v["phase"], "vapour");
    assert!(v["quality"].is_null());
    // Span et al. (2000): 0.15633 mol/dm³ at 80 K, 0.1 MPa.
    let rho = v["density_kg_m3"].as_f64().unwrap();
    assert!((rho / 28.01348 - 0.15633).abs() < 5e-6);
}

#[test]
fn two_phase_state_in_json_has_quality_and_no_cp() {
    let (code, out, err) = cryochain(&["state", "helium", "p=1atm", "x=0.25", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["phase"], "two-phase");
    assert_eq!(v["quality"].as_f64().unwrap(), 0.25);
    assert!(v["cp_J_kgK"].is_null());
    // Helium's normal boiling point is about 4.22 K (common knowledge of the trade).
    let t = v["temperature_K"].as_f64().unwrap();
    assert!((t - 4.22).abs() < 0.01, "{t}");
}

#[test]
fn readable_table_for_people() {
    let (code, out, _) = cryochain(&["state", "parahydrogen", "T=20K", "p=10bar"]);
    assert_eq!(code, 0);
    assert!(out.contains("parahydrogen"));
    assert!(out.contains("liquid"));
    assert!(out.contains("kg/m³"));
    assert!(out.contains("Leachman"));
}

#[test]
fn every_input_pair_works() {
    for (a, b) in [
        ("T=300K", "p=20bar"),
        ("p=20bar", "T=300K"),
        ("T=300K", "rho=20kg/m3"),
        ("p=20bar", "h=300kJ/kg"),
        ("p=20bar", "s=4kJ/kg/K"),
        ("T=-196degC", "x=0.4"),
        ("p=1atm", "x=1"),
    ] {
        let (code, out, err) = cryochain(&["state", "nitrogen", a, b, "--json"]);
        assert_eq!(code, 0, "{a} {b}: {err}");
        assert!(!out.contains("NaN") && !out.contains("inf"), "{out}");
    }
}

#[test]
fn fluids_lists_every_fluid_with_its_source() {
    let (code, out, _) = cryochain(&["fluids"]);
    assert_eq!(code, 0);
    for name in [
        "nitrogen",
        "hydrogen",
        "parahydrogen",
        "orthohydrogen",
        "helium",
        "neon",
        "argon",
        "methane",
        "oxygen",
        "air",
    ] {
        assert!(out.contains(name), "{name}");
    }
    assert!(out.contains("Span"));
    assert!(out.contains("Tegeler"));
    let (code, json, _) = cryochain(&["fluids", "--json"]);
    assert_eq!(code, 0);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    assert_eq!(v.as_array().unwrap().len(), 10);
}

/// Each bad input gives its own clear message and exit code 1, never a panic.
#[test]
fn bad_input_is_a_clear_error() {
    let cases: [(&[&str], &str); 10] = [
        (
            &["state", "unobtainium", "T=80K", "p=1bar"],
            "known fluids: nitrogen",
        ),
        (&["state", "nitrogen", "T=80", "p=1bar"], "has no unit"),
        (&["state", "nitrogen", "T=80K", "p=1kg"], "unknown unit"),
        (
            &["state", "nitrogen", "T=80K", "p=20K"],
            "unit of temperature",
        ),
        (
            &["state", "nitrogen", "T=5000K", "p=1bar"],
            "valid from 63.151 K to 2000 K",
        ),
        (
            &["state", "nitrogen", "T=80K", "p=3000MPa"],
            "up to 2200 MPa",
        ),
        (
            &["state", "nitrogen", "T=80K", "h=10kJ/kg"],
            "not supported",
        ),
        (&["state", "nitrogen", "T=80K", "x=1.5"], "between 0 and 1"),
        (
            &["state", "nitrogen", "T=200K", "x=0.5"],
            "critical temperature",
        ),
        (&["state", "nitrogen", "T80K", "p=1bar"], "key=value"),
    ];
    for (args, expected) in cases {
        let (code, out, err) = cryochain(args);
        assert_eq!(code, 1, "{args:?}: {err}");
        assert!(out.is_empty(), "{args:?} printed {out}");
        assert!(
            err.contains(expected),
            "{args:?}: '{err}' lacks '{expected}'"
        );
        assert!(!err.contains("panicked"), "{args:?}: {err}");
    }
}

#[test]
fn batch_table_round_trip_through_files() {
    let dir = std::env::temp_dir().join(format!("cryochain-batch-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let input = dir.join("in.csv");
    let output = dir.join("out.csv");
    std::fs::write(
        &input,
        "fluid,T [K],p [bar]\nnitrogen,80,1\nhydrogen,30,20\nhelium,3000,1\n",
    )
    .unwrap();
    let (code, _, err) = cryochain(&[
        "table",
        input.to_str().unwrap(),
        "--output",
        output.to_str().unwrap(),
    ]);
    // The helium row is outside its range: reported, the others written.
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("line 4"), "{err}");
    let text = std::fs::read_to_string(&output).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines.len(), 4);
    assert!(lines[0].contains("density [kg/m3]"));
    assert!(lines[1].contains("vapour"));
    assert!(lines[2].contains("supercritical") || lines[2].contains("liquid"));
    assert!(lines[3].contains("outside the range"));
    std::fs::remove_dir_all(&dir).ok();
}
