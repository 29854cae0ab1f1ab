//! Checks of good practice: mixing streams at different temperatures, approaches
//! judged against the temperature they occur at, and cautions that name the hazards
//! of the fluids present. Limits are common practice (docs/checks.md): a mixer's
//! inlets within 10 K; an exchanger approach of at least 0.5 % of the temperature.

use cryochain::flowsheet::{load, load_str, Override};
use cryochain::rules::{check, Finding};
use cryochain::solve::{solve, Solution};
use std::path::Path;

fn run(file: &str, set: &[&str]) -> (Vec<Finding>, Solution) {
    let overrides: Vec<Override> = set.iter().map(|s| Override::parse(s).unwrap()).collect();
    let plant = load(Path::new(file), &overrides).unwrap();
    let solution = solve(&plant, &Default::default()).unwrap();
    (check(&plant, &solution), solution)
}

/// The Claude cycle as first drawn mixes 78 K exhaust into 169 K return gas: a
/// warning with the exergy destroyed. The demo joins the exhaust at the cold end of
/// the return (same split, same compressor) and makes 0.101 instead of 0.062 (the
/// figure of merit rises from 0.09 to 0.18), with no warning.
#[test]
fn warm_mixing_is_warned_and_the_demo_avoids_it() {
    let (findings, bad) = run("tests/flowsheets/nitrogen-claude-warm-mixing.yaml", &[]);
    let mixing = findings
        .iter()
        .find(|f| f.id == "mixer-temperature-difference")
        .expect("no mixing warning");
    assert_eq!(mixing.equipment.as_deref(), Some("return"));
    assert!(mixing.values["temperature_difference_K"] > 80.0);
    let destroyed = bad
        .units
        .iter()
        .find(|u| u.id == "return")
        .unwrap()
        .exergy_destroyed;
    assert_eq!(mixing.values["exergy_destroyed_W"], destroyed);
    assert!(destroyed > 1e3);
    let (findings, good) = run("flowsheets/nitrogen-claude.yaml", &[]);
    // Nothing but the (re-solved) high-pressure advice.
    assert!(
        findings.iter().all(|f| f.id == "high-pressure-off-optimum"),
        "{findings:?}"
    );
    let (y_bad, y_good) = (
        bad.summary.liquid_yield.unwrap(),
        good.summary.liquid_yield.unwrap(),
    );
    assert!((y_bad - 0.062).abs() < 0.001, "{y_bad}");
    assert!((y_good - 0.101).abs() < 0.001, "{y_good}");
}

/// A 0.5 K cold-end approach at about 7 K (the helium demo) is normal; a 1 K warm-end
/// approach at 300 K is below 0.5 % and flagged; 3 K at 300 K is not.
#[test]
fn approaches_are_judged_against_temperature() {
    let (findings, _) = run("flowsheets/helium-lh2-precooled.yaml", &[]);
    assert!(
        !findings
            .iter()
            .any(|f| f.id == "exchanger-approach-below-floor"),
        "{findings:?}"
    );
    let file = "flowsheets/nitrogen-linde-hampson.yaml";
    let (findings, _) = run(file, &["recuperator.warm_end_approach=1K"]);
    let floor = findings
        .iter()
        .find(|f| f.id == "exchanger-approach-below-floor")
        .expect("1 K at 300 K not flagged");
    assert!(
        (floor.values["approach_floor_K"] - 0.005 * floor.values["pinch_temperature_K"]).abs()
            < 1e-9
    );
    let (findings, _) = run(file, &["recuperator.warm_end_approach=3K"]);
    assert!(!findings
        .iter()
        .any(|f| f.id == "exchanger-approach-below-floor"));
}

/// The caution names the hazards of the fluids in the flowsheet, baths included.
#[test]
fn cautions_name_the_fluids_present() {
    let caution = |file: &str| {
        let (_, solution) = run(file, &[]);
        cryochain::report::caution::caution(&solution.fluids).replace('\n', " ")
    };
    let nitrogen = caution("flowsheets/nitrogen-linde-hampson.yaml");
    assert!(!nitrogen.contains("hydrogen"), "{nitrogen}");
    assert!(nitrogen.contains("nitrogen boiling off displaces oxygen"));
    let hydrogen = caution("flowsheets/hydrogen-ln2-precooled.yaml");
    assert!(
        hydrogen.contains("flammable") && hydrogen.contains("nitrogen"),
        "{hydrogen}"
    );
    let helium = caution("flowsheets/helium-lh2-precooled.yaml");
    assert!(helium.contains("helium boiling off") && helium.contains("hydrogen is flammable"));
    // An air plant: oxygen enrichment and oxygen-compatible materials.
    let air = load_str(
        "title: t\nambient: 300 K\nfluids: [air]\nequipment:\n  - {id: f, kind: feed, fluid: air, temperature: 300 K, pressure: 2 bar, flow: 1 g/s}\n  - {id: p, kind: product, inlet: f, role: vent}\n",
        "air.yaml",
        &[],
    )
    .unwrap();
    let solution = solve(&air, &Default::default()).unwrap();
    let text = cryochain::report::caution::caution(&solution.fluids).replace('\n', " ");
    assert!(text.contains("oxygen-compatible"), "{text}");
    assert!(!text.contains("hydrogen"));
}
