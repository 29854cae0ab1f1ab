//! Impossible cases never look best: a case with an error-severity finding is
//! infeasible; sweeps never headline it, the optimiser treats it as a constraint
//! violation and fails when nothing is feasible, and `solve` puts the errors first
//! and exits with the design-error code. (The bath limit used below: a precooler's
//! target must lie at least its approach above the bath's boiling temperature;
//! nitrogen at 1.2 bar boils at 78.82 K, so the demo's bath (approach 0.5 K) cannot
//! go below 79.32 K.)

use cryochain::error::Error;
use cryochain::study::optimize::{optimize, Bounded, Objective};
use cryochain::study::{sweep, to_csv, Variable};
use std::process::Command;

/// The hydrogen demo with frozen-normal hydrogen, the case these figures were measured on.
const DEMO: &str = "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml";

fn demo() -> String {
    std::fs::read_to_string(DEMO).unwrap()
}

fn maximize_yield() -> Objective {
    Objective::parse(Some("liquid_yield"), None).unwrap()
}

/// The bath's boiling temperature at 1.2 bar from the property engine, plus the
/// demo's approach: the coldest feasible target.
fn coldest_target() -> f64 {
    let n2 = cryochain::fluids::fluid("nitrogen").unwrap();
    n2.saturation_at_pressure(1.2e5).unwrap().liquid.temperature + 0.5
}

#[test]
fn a_sweep_never_headlines_an_infeasible_case() {
    let variable = Variable::parse_range("ln2-bath.outlet_temperature=60K..90K:4").unwrap();
    let study = sweep(&demo(), DEMO, &[], &[variable], None, &|_, _| {}).unwrap();
    let text = cryochain::report::study::sweep_text(&study);
    assert!(text.contains("INFEASIBLE"), "{text}");
    assert!(
        text.contains(
            "highest yield of the feasible cases 0.14474 at ln2-bath.outlet_temperature = 80.0 K"
        ),
        "{text}"
    );
    assert!(text.contains("2 of 4 cases infeasible"), "{text}");
    let csv = to_csv(&study).unwrap();
    let statuses: Vec<&str> = csv
        .lines()
        .skip(1)
        .map(|l| l.split(',').nth(2).unwrap())
        .collect();
    assert_eq!(statuses, ["infeasible", "infeasible", "ok", "ok"]);
}

#[test]
fn the_optimiser_stays_feasible() {
    let bounded = Bounded::parse("ln2-bath.outlet_temperature=60K..90K").unwrap();
    let best = optimize(&demo(), DEMO, &[], &[bounded], maximize_yield(), None, 100).unwrap();
    let limit = coldest_target();
    assert!(
        best.values[0] >= limit - 1e-9,
        "{} below {limit}",
        best.values[0]
    );
    assert!(
        best.values[0] < limit + 0.05,
        "{} far above {limit}",
        best.values[0]
    );
    assert_eq!(best.metrics.design_errors, 0);
    assert!(best.infeasible_solves > 0);
    // Each point is solved once, and its infeasibility counted once.
    assert!(
        best.infeasible_solves <= best.solves,
        "{} infeasible of {} solves",
        best.infeasible_solves,
        best.solves
    );

    // Over 2 to 2000 bar, where both ends make no liquid: the feasible optimum.
    let bounded = Bounded::parse("compressor.outlet_pressure=2bar..2000bar").unwrap();
    let best = optimize(&demo(), DEMO, &[], &[bounded], maximize_yield(), None, 100).unwrap();
    assert!(best.metrics.liquid_yield > 0.149, "{:?}", best.metrics);
    assert!(
        best.values[0] > 140.0 && best.values[0] < 180.0,
        "{}",
        best.values[0]
    );
    assert_eq!(best.metrics.design_errors, 0);
}

#[test]
fn the_optimiser_says_when_it_stops_on_a_bound_or_at_its_cap() {
    // The yield still rises at 100 bar (its peak is near 158 bar): on the bound.
    let bounded = Bounded::parse("compressor.outlet_pressure=40bar..100bar").unwrap();
    let best = optimize(&demo(), DEMO, &[], &[bounded], maximize_yield(), None, 100).unwrap();
    assert_eq!(best.on_bound, vec![Some("upper")]);
    assert!(!best.stopped_at_cap);
    let bounded = Bounded::parse("compressor.outlet_pressure=40bar..200bar").unwrap();
    let best = optimize(&demo(), DEMO, &[], &[bounded], maximize_yield(), None, 2).unwrap();
    assert!(best.stopped_at_cap);
}

#[test]
fn no_feasible_point_is_an_error() {
    let bounded = Bounded::parse("compressor.outlet_pressure=40bar..200bar").unwrap();
    let result = optimize(
        &demo(),
        DEMO,
        &[],
        &[bounded],
        maximize_yield(),
        Some(50.0),
        50,
    );
    assert!(matches!(result, Err(Error::Infeasible(_))), "{result:?}");
    // From the command line: the design-error exit code.
    let out = Command::new(env!("CARGO_BIN_EXE_cryochain"))
        .args([
            "optimize",
            DEMO,
            "--vary",
            "compressor.outlet_pressure=40bar..200bar",
        ])
        .args(["--maximize", "liquid_yield", "--min-approach", "50K"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("no feasible point"));
}

#[test]
fn solve_puts_design_errors_first_and_exits_with_the_design_code() {
    let out = Command::new(env!("CARGO_BIN_EXE_cryochain"))
        .args(["solve", "flowsheets/cascade-nitrogen-hydrogen.yaml"])
        .args(["--set", "n2-hx.warm_end_approach=3K"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(
        stdout.starts_with("Design checks\n  error n2-hx [exchanger-spec-not-met]"),
        "{stdout}"
    );
    assert!(stdout.contains("Summary"));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("the design has 1 error"), "{stderr}");
}
