//! End-to-end tests of `cryochain inversion` and `cryochain throttle`: the real
//! binary, its files, its JSON and its errors.

mod common;

fn cryochain(args: &[&str]) -> (i32, String, String) {
    common::run_in(&std::env::temp_dir(), args)
}

fn scratch(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("cryochain-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

#[test]
fn inversion_json_has_the_documented_keys() {
    let (code, out, err) = cryochain(&["inversion", "hydrogen", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    for key in [
        "max_inversion_temperature_K",
        "boyle_temperature_K",
        "max_inversion_pressure_Pa",
        "temperature_at_max_pressure_K",
        "curve",
    ] {
        assert!(v.get(key).is_some(), "missing {key}");
    }
    let curve = v["curve"].as_array().unwrap();
    assert!(curve.len() > 100);
    assert!(curve[10]["temperature_K"].is_f64() && curve[10]["pressure_Pa"].is_f64());
    let t = v["max_inversion_temperature_K"].as_f64().unwrap();
    assert!((195.0..210.0).contains(&t), "{t}");
}

/// The diagram as SVG holds every element by name, with units on the axes; the PNG
/// is a real PNG of the stated size.
#[test]
fn inversion_plot_files_hold_the_expected_elements() {
    let dir = scratch("plot");
    let svg = dir.join("n2.svg");
    let (code, out, err) = cryochain(&["inversion", "nitrogen", "--plot", svg.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("maximum inversion temperature"));
    let text = std::fs::read_to_string(&svg).unwrap();
    for expected in [
        "inversion curve (μJT = 0)",
        "saturation line",
        "isenthalps (constant h)",
        "throttling cools (μJT &gt; 0)",
        "throttling warms (μJT &lt; 0)",
        "pressure [bar]",
        "temperature [K]",
        "max. inversion temperature",
        "pressure maximum",
    ] {
        assert!(text.contains(expected), "SVG lacks '{expected}'");
    }
    // At least nine isenthalps, the curve and the saturation line are drawn as paths.
    assert!(
        text.matches("<polyline").count() >= 11,
        "{}",
        text.matches("<polyline").count()
    );
    let png = dir.join("he.png");
    let (code, _, err) = cryochain(&["inversion", "helium", "--plot", png.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let bytes = std::fs::read(&png).unwrap();
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    let width = u32::from_be_bytes(bytes[16..20].try_into().unwrap());
    let height = u32::from_be_bytes(bytes[20..24].try_into().unwrap());
    assert_eq!((width, height), (1100, 800));
    assert!(
        bytes.len() > 20_000,
        "PNG suspiciously small: {} bytes",
        bytes.len()
    );
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn throttle_reports_outlet_and_verdict() {
    let (code, out, err) = cryochain(&[
        "throttle", "nitrogen", "T=150K", "p=100bar", "--to", "1bar", "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["verdict"], "cools");
    assert_eq!(v["inlet_effect"], "inside-cools");
    assert_eq!(v["outlet"]["phase"], "two-phase");
    let dt = v["temperature_change_K"].as_f64().unwrap();
    assert!(dt < -50.0, "{dt}");
    let (code, out, _) = cryochain(&["throttle", "hydrogen", "T=300K", "p=150bar", "--to", "1bar"]);
    assert_eq!(code, 0);
    assert!(out.contains("above the maximum inversion temperature"));
    assert!(out.contains("precool"));
}

/// Hydrogen at 70 K and 150 bar lies outside the curve (below its lower branch at
/// that pressure), yet the expansion to 1 bar cools by about 21 K: the verdict is
/// about the whole expansion, the inlet's differential effect is stated apart, and
/// the two never contradict (the old text said "the expansion cools" above
/// "throttling warms").
#[test]
fn the_verdict_and_the_inlet_effect_never_contradict() {
    let (code, out, err) = cryochain(&[
        "throttle", "hydrogen", "T=70K", "p=150bar", "--to", "1bar", "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["verdict"], "cools");
    assert_eq!(v["inlet_effect"], "outside-warms");
    assert!((v["temperature_change_K"].as_f64().unwrap() + 21.08).abs() < 0.01);
    let (_, text, _) = cryochain(&["throttle", "hydrogen", "T=70K", "p=150bar", "--to", "1bar"]);
    let flat = text.replace("\n   ", "");
    assert!(
        flat.contains("the expansion as a whole cools the stream"),
        "{text}"
    );
    assert!(!flat.contains("throttling warms"), "{text}");
}

#[test]
fn bad_input_gives_clear_errors() {
    let cases: [(&[&str], &str); 5] = [
        (&["inversion", "kryptonite"], "known fluids"),
        (
            &["throttle", "nitrogen", "T=150K", "p=10bar", "--to", "20bar"],
            "lowers the pressure",
        ),
        (
            &["throttle", "nitrogen", "T=3000K", "p=10bar", "--to", "1bar"],
            "outside the range",
        ),
        (
            &["throttle", "nitrogen", "T=150K", "p=10bar", "--to", "1"],
            "no unit",
        ),
        (
            &["inversion", "nitrogen", "--plot", "diagram.gif"],
            ".svg or .png",
        ),
    ];
    for (args, expected) in cases {
        let (code, _, err) = cryochain(args);
        assert_eq!(code, 1, "{args:?}: {err}");
        assert!(
            err.contains(expected),
            "{args:?}: '{err}' lacks '{expected}'"
        );
        assert!(!err.contains("panicked"));
    }
}
