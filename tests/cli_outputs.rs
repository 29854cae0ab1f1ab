//! Results people share: plots written as SVG and PNG holding the expected series,
//! CSV tables with headers and units, and JSON that round-trips into the documented
//! structure.

mod common;

use cryochain::report::solution::SolutionRecord;
use std::path::Path;

fn cryochain(args: &[&str]) -> (i32, String, String) {
    common::run_in(Path::new(env!("CARGO_MANIFEST_DIR")), args)
}

fn scratch(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("cryochain-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn png_size(path: &Path) -> (u32, u32) {
    let bytes = std::fs::read(path).unwrap();
    assert_eq!(
        &bytes[..8],
        b"\x89PNG\r\n\x1a\n",
        "{} is not a PNG",
        path.display()
    );
    (
        u32::from_be_bytes(bytes[16..20].try_into().unwrap()),
        u32::from_be_bytes(bytes[20..24].try_into().unwrap()),
    )
}

#[test]
fn plots_of_the_hydrogen_demo() {
    let dir = scratch("plots");
    let (code, _, err) = cryochain(&[
        "solve",
        "flowsheets/hydrogen-ln2-precooled.yaml",
        "--plot",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let svg = |name: &str| {
        std::fs::read_to_string(dir.join(name)).unwrap_or_else(|_| panic!("{name} missing"))
    };
    let ts = svg("ts-hydrogen.svg");
    for expected in [
        "saturation dome",
        "stream states",
        "specific entropy [kJ/(kg·K)]",
        "temperature [K]",
        "compressor.out",
        "separator.liquid",
        "jt-valve.out",
    ] {
        assert!(ts.contains(expected), "T–s diagram lacks '{expected}'");
    }
    let tp = svg("tp-hydrogen.svg");
    for expected in [
        "inversion curve (μJT = 0)",
        "saturation line",
        "valve jt-valve",
        "pressure [bar]",
    ] {
        assert!(tp.contains(expected), "T–p diagram lacks '{expected}'");
    }
    for hx in ["warm-hx", "cold-hx"] {
        let text = svg(&format!("exchanger-{hx}.svg"));
        for expected in [
            "hot stream",
            "cold stream",
            "pinch: ΔT min",
            "duty transferred from the warm end [kW]",
        ] {
            assert!(text.contains(expected), "{hx} curves lack '{expected}'");
        }
        assert!(text.matches("<polyline").count() >= 2);
    }
    let exergy = svg("exergy.svg");
    for expected in [
        "exergy destroyed [kW]",
        "compressor",
        "jt-valve",
        "warm-hx",
        "%",
    ] {
        assert!(exergy.contains(expected), "exergy chart lacks '{expected}'");
    }
    for name in [
        "ts-hydrogen",
        "tp-hydrogen",
        "exchanger-warm-hx",
        "exchanger-cold-hx",
        "exergy",
    ] {
        let (w, h) = png_size(&dir.join(format!("{name}.png")));
        assert!(w >= 1000 && h >= 700, "{name}: {w}×{h}");
        assert!(
            std::fs::metadata(dir.join(format!("{name}.png")))
                .unwrap()
                .len()
                > 15_000,
            "{name}.png too small to hold text"
        );
    }
    // And the exergy bars carry no signed zero.
    assert!(!exergy.contains("-0.0 %"));
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn cascade_plots_one_diagram_per_fluid() {
    let dir = scratch("cascade-plots");
    let (code, _, err) = cryochain(&[
        "solve",
        "flowsheets/cascade-nitrogen-hydrogen.yaml",
        "--plot",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    for name in [
        "ts-hydrogen.svg",
        "ts-nitrogen.svg",
        "tp-hydrogen.svg",
        "tp-nitrogen.svg",
        "exergy.png",
    ] {
        assert!(dir.join(name).exists(), "{name} missing");
    }
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn csv_tables_open_with_headers_and_units() {
    let dir = scratch("csv");
    let (code, _, err) = cryochain(&[
        "solve",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "--csv",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let mut streams = csv::Reader::from_path(dir.join("streams.csv")).unwrap();
    let headers = streams.headers().unwrap().clone();
    assert_eq!(&headers[0], "stream");
    assert!(
        headers.iter().any(|h| h == "temperature [K]")
            && headers.iter().any(|h| h == "mass flow [kg/s]")
    );
    let rows: Vec<_> = streams.records().map(|r| r.unwrap()).collect();
    assert_eq!(rows.len(), 8);
    for row in &rows {
        let t: f64 = row[2].parse().unwrap();
        assert!(t > 60.0 && t < 400.0);
    }
    let mut equipment = csv::Reader::from_path(dir.join("equipment.csv")).unwrap();
    assert!(equipment
        .headers()
        .unwrap()
        .iter()
        .any(|h| h == "exergy destroyed [W]"));
    assert_eq!(equipment.records().count(), 7);
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn json_round_trips_into_the_documented_structure() {
    let (code, out, err) = cryochain(&["solve", "flowsheets/helium-lh2-precooled.yaml", "--json"]);
    assert_eq!(code, 0, "{err}");
    let record: SolutionRecord = serde_json::from_str(&out).expect("the documented structure");
    assert!(record.converged);
    assert_eq!(record.streams.len(), 11);
    assert!(record.liquid_yield.unwrap() > 0.0);
    assert!(record.caution.contains("local codes"));
    let again = serde_json::to_string_pretty(&record).unwrap() + "\n";
    let back: SolutionRecord = serde_json::from_str(&again).unwrap();
    assert_eq!(back, record);
}
