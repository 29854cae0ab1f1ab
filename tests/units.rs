//! Units people use: gauge pressures above the site's ambient pressure, checked by
//! hand (gauge = absolute − ambient, the definition; 1 bar = 100 kPa and 1 psi =
//! 6.894757 kPa exactly by definition of the units).

use cryochain::flowsheet::load_str;
use cryochain::quantity::{parse, parse_with_ambient, Dimension};
use cryochain::solve::{solve, Options};

#[test]
fn gauge_units_add_the_ambient_pressure() {
    let p = Dimension::Pressure;
    assert_eq!(parse("2 barg", p).unwrap(), 301_325.0);
    assert_eq!(parse("2 bar(g)", p).unwrap(), 301_325.0);
    assert_eq!(parse("2 bara", p).unwrap(), 200_000.0);
    assert!((parse("100 psig", p).unwrap() - (689_475.729_316_836_1 + 101_325.0)).abs() < 1e-6);
    assert!((parse("14.6959488 psia", p).unwrap() - 101_325.0).abs() < 1e-3);
    assert_eq!(parse_with_ambient("50 kPag", p, 90e3).unwrap(), 140e3);
    assert_eq!(parse_with_ambient("0.1 MPag", p, 95e3).unwrap(), 195e3);
    // Below vacuum, refused with the reason.
    let error = parse("-2 barg", p).unwrap_err().to_string();
    assert!(error.contains("below vacuum"), "{error}");
    // A gauge unit is a pressure unit only.
    assert!(parse("2 barg", Dimension::Temperature).is_err());
}

fn flowsheet(ambient_pressure: Option<&str>, feed_pressure: &str) -> String {
    let settings = ambient_pressure.map_or(String::new(), |p| {
        format!("settings:\n  ambient_pressure: {p}\n")
    });
    format!(
        "title: gauge check\nambient: 300 K\nfluids: [nitrogen]\n{settings}equipment:\n  - id: feed\n    kind: feed\n    fluid: nitrogen\n    temperature: 300 K\n    pressure: {feed_pressure}\n    flow: 1 g/s\n  - id: out\n    kind: product\n    role: vent\n    inlet: feed\n"
    )
}

#[test]
fn a_flowsheet_reads_gauge_pressures_above_its_site() {
    let pressure = |text: &str| {
        let plant = load_str(text, "gauge.yaml", &[]).unwrap();
        let solution = solve(&plant, &Options::default()).unwrap();
        solution.streams[0].state.pressure
    };
    // At sea level by default.
    assert!((pressure(&flowsheet(None, "10 barg")) - 1_101_325.0).abs() < 1e-6);
    // A site at 85 kPa (about 1500 m up): 10 barg is 1.085 MPa absolute.
    assert!((pressure(&flowsheet(Some("85 kPa"), "10 barg")) - 1_085_000.0).abs() < 1e-6);
    // Absolute units ignore the site.
    assert!((pressure(&flowsheet(Some("85 kPa"), "10 bar")) - 1_000_000.0).abs() < 1e-6);
    // An ambient pressure outside 30–110 kPa is refused, located at its key.
    let error = load_str(&flowsheet(Some("2 bar"), "10 barg"), "gauge.yaml", &[])
        .unwrap_err()
        .to_string();
    assert!(
        error.contains("ambient_pressure") && error.contains("30 to 110 kPa"),
        "{error}"
    );
}

/// `--units engineering`: °C beside K (T − 273.15, the definition), flows in kg/h
/// (g/s × 3.6) and the product in t/d (kg/h × 0.024) too; SI stays the default and
/// JSON stays SI.
#[test]
fn engineering_units_in_the_text_and_the_report() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let run = |args: &[&str]| {
        let out = std::process::Command::new(env!("CARGO_BIN_EXE_cryochain"))
            .args(args)
            .current_dir(root)
            .output()
            .unwrap();
        (
            out.status.code().unwrap_or(-1),
            String::from_utf8_lossy(&out.stdout).into_owned(),
            String::from_utf8_lossy(&out.stderr).into_owned(),
        )
    };
    let file = "flowsheets/nitrogen-linde-hampson.yaml";
    let (_, json, _) = run(&["solve", file, "--json"]);
    let value: serde_json::Value = serde_json::from_str(&json).unwrap();
    let liquid = value["liquid_flow_kg_s"].as_f64().unwrap();
    let first = &value["streams"][0];
    let (t, flow) = (
        first["temperature_K"].as_f64().unwrap(),
        first["mass_flow_kg_s"].as_f64().unwrap(),
    );
    let (code, text, err) = run(&["solve", file, "--units", "engineering"]);
    assert_eq!(code, 0, "{err}");
    assert!(
        text.contains("T [°C]") && text.contains("flow [kg/h]"),
        "{text}"
    );
    let row = text
        .lines()
        .find(|l| l.starts_with(first["name"].as_str().unwrap()))
        .unwrap();
    assert!(row.contains(&format!("{:.2}", t - 273.15)), "{row}");
    assert!(row.contains(&format!("{:.3}", flow * 3600.0)), "{row}");
    assert!(
        text.contains(&format!(
            "{:.3} kg/h = {:.4} t/d",
            liquid * 3600.0,
            liquid * 86.4
        )),
        "{text}"
    );
    let (_, si, _) = run(&["solve", file]);
    assert!(si.contains("flow [g/s]") && !si.contains("T [°C]"));
    let page = std::env::temp_dir().join(format!("cryochain-units-{}.html", std::process::id()));
    let (code, _, _) = run(&[
        "solve",
        file,
        "--units",
        "engineering",
        "--report",
        page.to_str().unwrap(),
    ]);
    assert_eq!(code, 0);
    let html = std::fs::read_to_string(&page).unwrap();
    assert!(html.contains("t/d") && html.contains("T [°C]"));
    let (code, _, err) = run(&["solve", file, "--units", "imperial"]);
    assert_eq!(code, 1);
    assert!(err.contains("si or engineering"), "{err}");
}
