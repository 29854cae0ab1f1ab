//! Exchanger specifications are met or refused, never replaced silently: an
//! unreachable duty specification is an error naming what was asked and delivered,
//! UA at a zero pinch is unbounded, and a `--set` of one specification replaces the
//! file's. (Definitions: warm-end approach = hot inlet − cold outlet temperature;
//! minimum approach = smallest hot − cold difference along the exchanger;
//! effectiveness = duty over the largest duty the streams allow; textbook terms.)

use cryochain::equipment::Details;
use cryochain::flowsheet::{load, Override, Plant};
use cryochain::rules::{check, Severity};
use cryochain::solve::{solve, Solution};
use std::path::Path;

const CASCADE: &str = "flowsheets/cascade-nitrogen-hydrogen.yaml";
/// The cascade as it was when its old specification was found unreachable.
const FROZEN_CASCADE: &str = "tests/flowsheets/cascade-nitrogen-hydrogen-frozen-normal.yaml";

fn solved(file: &str, set: &[&str]) -> (Plant, Solution) {
    let overrides: Vec<Override> = set.iter().map(|s| Override::parse(s).unwrap()).collect();
    let plant = load(Path::new(file), &overrides).unwrap();
    let solution = solve(&plant, &Default::default()).unwrap();
    (plant, solution)
}

fn exchanger<'a>(
    solution: &'a Solution,
    id: &str,
) -> &'a cryochain::equipment::exchanger::ExchangerReport {
    let unit = solution.units.iter().find(|u| u.id == id).unwrap();
    let Details::Exchanger(report) = &unit.performance.details else {
        panic!("{id} is no exchanger")
    };
    report
}

/// The cascade demo's old specification (a 3 K warm-end approach on the nitrogen
/// recuperator; the cascade with frozen-normal hydrogen) cannot be met: an error with what was asked and delivered; UA is
/// unbounded at the zero pinch.
#[test]
fn the_cascades_old_specification_is_refused() {
    let (plant, solution) = solved(FROZEN_CASCADE, &["n2-hx.warm_end_approach=3K"]);
    let findings = check(&plant, &solution);
    let refused = findings
        .iter()
        .find(|f| f.id == "exchanger-spec-not-met")
        .expect("no exchanger-spec-not-met");
    assert_eq!(refused.severity, Severity::Error);
    assert_eq!(refused.equipment.as_deref(), Some("n2-hx"));
    assert_eq!(refused.values["specified"], 3.0);
    assert!(refused.values["delivered"] > 10.0);
    assert!(refused.message.contains("warm-end approach of 3.000 K"));
    let report = exchanger(&solution, "n2-hx");
    assert!(report.min_approach.abs() < 1e-5);
    assert!(report.ua.is_infinite());
    // The same at 10 K, which the streams cannot reach either (about 10.66 K).
    let (plant, solution) = solved(FROZEN_CASCADE, &["n2-hx.warm_end_approach=10K"]);
    assert!(check(&plant, &solution)
        .iter()
        .any(|f| f.id == "exchanger-spec-not-met"));
    // And at 11 K it is met.
    let (plant, solution) = solved(FROZEN_CASCADE, &["n2-hx.warm_end_approach=11K"]);
    assert!(!check(&plant, &solution)
        .iter()
        .any(|f| f.id == "exchanger-spec-not-met"));
    assert!((exchanger(&solution, "n2-hx").warm_end_approach - 11.0).abs() < 1e-3);
}

/// The fixed cascade demo meets every exchanger's specification.
#[test]
fn the_cascade_demo_meets_its_specifications() {
    let (plant, solution) = solved(CASCADE, &[]);
    for unit in &solution.units {
        if let Details::Exchanger(report) = &unit.performance.details {
            assert!(report.specification_met, "{}: {report:?}", unit.id);
        }
    }
    assert!(check(&plant, &solution)
        .iter()
        .all(|f| f.severity != Severity::Error));
    let report = exchanger(&solution, "n2-hx");
    assert!((report.min_approach - 2.0).abs() < 1e-3);
}

/// A `--set` of another specification replaces the file's: the demo's warm-end
/// approach becomes an effectiveness or a minimum approach, and is met.
#[test]
fn a_specification_can_be_switched_by_override() {
    let file = "flowsheets/hydrogen-ln2-precooled.yaml";
    let (_, solution) = solved(file, &["cold-hx.effectiveness=0.95"]);
    let report = exchanger(&solution, "cold-hx");
    assert!(
        (report.effectiveness - 0.95).abs() < 1e-6,
        "{}",
        report.effectiveness
    );
    assert!(report.specification_met);
    let (_, solution) = solved(file, &["cold-hx.minimum_approach=1.5K"]);
    let report = exchanger(&solution, "cold-hx");
    assert!(
        (report.min_approach - 1.5).abs() < 1e-3,
        "{}",
        report.min_approach
    );
    // The swept value changes the result.
    let (_, other) = solved(file, &["cold-hx.minimum_approach=3K"]);
    assert!(other.summary.liquid_yield < solution.summary.liquid_yield);
}
