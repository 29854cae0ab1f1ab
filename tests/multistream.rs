//! The multistream exchanger: written with two streams it is the two-stream
//! exchanger; with three, its energy balance closes and its composite curves'
//! pinch agrees with an independent calculation on CoolProp
//! (tests/reference/generate_multistream.py, CoolProp 8.0.0 from PyPI); its
//! specification is counted; the design checks cover it.

mod common;

use cryochain::equipment::Details;
use cryochain::flowsheet::{load, Override};
use cryochain::solve::{solve, Options, Solution};
use std::path::{Path, PathBuf};

fn path(file: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(file)
}

fn solved(file: &str, overrides: &[&str]) -> (cryochain::flowsheet::Plant, Solution) {
    let overrides: Vec<Override> = overrides
        .iter()
        .map(|o| Override::parse(o).unwrap())
        .collect();
    let plant = load(&path(file), &overrides).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    (plant, solution)
}

fn exchanger<'a>(
    plant: &cryochain::flowsheet::Plant,
    solution: &'a Solution,
    id: &str,
) -> &'a cryochain::equipment::exchanger::ExchangerReport {
    let index = plant.units.iter().position(|u| u.id == id).unwrap();
    match &solution.units[index].performance.details {
        Details::Exchanger(report) => report,
        _ => panic!("{id} reports no exchanger details"),
    }
}

fn close(a: f64, b: f64, relative: f64) -> bool {
    (a - b).abs() <= relative * a.abs().max(b.abs()) + 1e-12
}

#[test]
fn two_streams_written_as_a_multistream_exchanger_give_the_two_stream_result() {
    // Both exchangers sized by their minimum approach, with pressure drops on both
    // sides and a heat leak into one cold stream, in a recycle loop.
    let (plant, two) = solved(
        "tests/flowsheets/hydrogen-ln2-precooled-minimum-approach.yaml",
        &["cold-hx.heat_leak=5 W"],
    );
    let (multi_plant, multi) = solved(
        "tests/flowsheets/hydrogen-ln2-precooled-multistream-pair.yaml",
        &[],
    );
    assert_eq!(two.stream_names, multi.stream_names);
    for (k, (a, b)) in two.streams.iter().zip(&multi.streams).enumerate() {
        let name = &two.stream_names[k];
        assert!(close(a.flow, b.flow, 1e-9), "{name} flow");
        assert!(
            close(a.state.temperature, b.state.temperature, 1e-9),
            "{name} T {} {}",
            a.state.temperature,
            b.state.temperature
        );
        assert!(close(a.state.pressure, b.state.pressure, 1e-9), "{name} p");
        assert!(close(a.state.enthalpy, b.state.enthalpy, 1e-9), "{name} h");
    }
    assert!(close(
        two.summary.liquid_yield.unwrap(),
        multi.summary.liquid_yield.unwrap(),
        1e-9
    ));
    for id in ["warm-hx", "cold-hx"] {
        let (a, b) = (
            exchanger(&plant, &two, id),
            exchanger(&multi_plant, &multi, id),
        );
        assert!(close(a.min_approach, b.min_approach, 1e-9), "{id} pinch");
        assert!(
            close(a.min_approach_position, b.min_approach_position, 1e-9),
            "{id} position"
        );
        assert!(close(a.ua, b.ua, 1e-9), "{id} UA {} {}", a.ua, b.ua);
        assert_eq!(a.profile.len(), b.profile.len());
        assert_eq!(b.streams.len(), 2);
    }
}

/// The CoolProp-based figures for `case`.
fn reference(case: &str, quantity: &str) -> f64 {
    common::reference_value(
        "coolprop_multistream.csv",
        &[("case", case), ("quantity", quantity)],
        "value",
    )
}

/// Σ m (h_out − h_in) over the box's streams against the heat leaks, relative to
/// the duty.
fn balance(plant: &cryochain::flowsheet::Plant, solution: &Solution) -> f64 {
    let index = plant.units.iter().position(|u| u.id == "box").unwrap();
    let unit = &plant.units[index];
    let mut change = 0.0;
    for (&i, &o) in unit.inlets.iter().zip(&unit.outlets) {
        let (a, b) = (&solution.streams[i], &solution.streams[o]);
        change += a.flow * (b.state.enthalpy - a.state.enthalpy);
    }
    let leak = 20.0; // the nitrogen stream's heat leak in both files
    let duty = solution.units[index].performance.duty.unwrap();
    (change - leak).abs() / duty
}

#[test]
fn three_streams_set_by_outlet_temperatures_match_an_independent_composite_curve() {
    let (plant, solution) = solved("tests/flowsheets/three-stream-exchanger.yaml", &[]);
    let closure = balance(&plant, &solution);
    assert!(closure < 1e-9, "energy balance closes to {closure:e}");
    let report = exchanger(&plant, &solution, "box");
    let duty = solution.units[3].performance.duty.unwrap();
    assert!(
        close(duty, reference("outlets", "duty_W"), 1e-7),
        "duty {duty}"
    );
    let he = common::stream(&solution, "box.he").state.temperature;
    assert!(
        (he - reference("outlets", "he_outlet_K")).abs() < 1e-3,
        "helium out {he}"
    );
    // The pinch lies inside, where the nitrogen joins the cold composite.
    let pinch = reference("outlets", "pinch_K");
    assert!(
        (report.min_approach - pinch).abs() < 1e-3,
        "pinch {} against {pinch}",
        report.min_approach
    );
    let position = reference("outlets", "pinch_position");
    assert!(
        position > 0.05 && position < 0.995,
        "an internal pinch ({position})"
    );
    assert!((report.min_approach_position - position).abs() < 1e-3);
    assert_eq!(report.streams.len(), 3);
}

#[test]
fn three_streams_set_by_their_minimum_approach_match_an_independent_composite_curve() {
    let (plant, solution) = solved("tests/flowsheets/three-stream-exchanger-approach.yaml", &[]);
    let closure = balance(&plant, &solution);
    assert!(closure < 1e-9, "energy balance closes to {closure:e}");
    let report = exchanger(&plant, &solution, "box");
    assert!(report.specification_met);
    assert!((report.min_approach - 2.0).abs() < 1e-3);
    assert!((reference("approach", "pinch_K") - 2.0).abs() < 1e-3);
    let duty = solution.units[3].performance.duty.unwrap();
    let expected = reference("approach", "duty_W");
    assert!(
        close(duty, expected, 1e-5),
        "duty {duty} against {expected}"
    );
    for (stream, quantity) in [("box.hp", "hp_outlet_K"), ("box.he", "he_outlet_K")] {
        let t = common::stream(&solution, stream).state.temperature;
        let want = reference("approach", quantity);
        assert!((t - want).abs() < 5e-3, "{stream} {t} against {want}");
    }
    assert!((report.min_approach_position - reference("approach", "pinch_position")).abs() < 1e-3);
}

/// The flowsheet text of `file` with `from` replaced by `to`, solved through the
/// command line: (exit code, stdout, stderr).
fn run_edited(file: &str, from: &str, to: &str, args: &[&str]) -> (i32, String, String) {
    let text = std::fs::read_to_string(path(file)).unwrap();
    assert!(text.contains(from), "{from}");
    let dir = std::env::temp_dir().join(format!("cryochain-multistream-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let edited = dir.join(format!("{}.yaml", from.len() + to.len()));
    std::fs::write(&edited, text.replace(from, to)).unwrap();
    let mut all = vec!["solve", edited.to_str().unwrap()];
    all.extend_from_slice(args);
    common::run_in(&dir, &all)
}

#[test]
fn a_short_or_over_complete_specification_is_counted_and_explained() {
    let file = "tests/flowsheets/three-stream-exchanger.yaml";
    // Short: the hydrogen's outlet removed leaves two free streams.
    let (code, _, err) = run_edited(file, "outlet_temperature: 85 K, ", "", &[]);
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("3 streams leave 2 degrees of freedom") && err.contains("short by 1"),
        "{err}"
    );
    assert!(err.contains("box"), "{err}");
    // Over-complete: the helium given an outlet too.
    let (code, _, err) = run_edited(
        file,
        "side: cold, pressure_drop: 0.05 bar}",
        "side: cold, pressure_drop: 0.05 bar, outlet_temperature: 200 K}",
        &[],
    );
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("over-complete by 1"), "{err}");
    // With the approach, the two free streams must be on opposite sides.
    let approach = "tests/flowsheets/three-stream-exchanger-approach.yaml";
    let (code, _, err) = run_edited(
        approach,
        "outlet_temperature: 280 K, heat_leak: 20 W}",
        "heat_leak: 20 W}",
        &[],
    );
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("short by 1"), "{err}");
}

#[test]
fn a_temperature_cross_and_a_tight_approach_are_found() {
    let file = "tests/flowsheets/three-stream-exchanger.yaml";
    // The hydrogen asked to leave at 73 K: where the nitrogen joins the cold
    // composite at 80 K, the hydrogen is then colder, so the composites cross inside
    // (both ends are still warmer on the hot side).
    let (code, out, _) = run_edited(
        file,
        "outlet_temperature: 85 K",
        "outlet_temperature: 73 K",
        &["--json"],
    );
    assert_eq!(code, 2, "a design error");
    assert!(out.contains("exchanger-temperature-cross"), "{out}");
    // A minimum approach of 0.1 K at about 80 K is below the default floor.
    let approach = "tests/flowsheets/three-stream-exchanger-approach.yaml";
    let (_, out, _) = run_edited(
        approach,
        "minimum_approach: 2 K",
        "minimum_approach: 0.1 K",
        &["--json"],
    );
    assert!(out.contains("exchanger-approach-below-floor"), "{out}");
}
