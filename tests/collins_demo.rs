//! The Collins-type helium demo (flowsheets/helium-collins.yaml) against a cold-box
//! energy balance on CoolProp (tests/reference/generate_collins.py, CoolProp 8.0.0
//! from PyPI): the yield and each expander's work. The balance takes two figures
//! from the solution, the expanders' inlet temperatures, which this test pins; the
//! return's warm-end temperature comes from the warm exchanger's minimum approach,
//! whose position this test checks.

mod common;

use cryochain::equipment::Details;
use cryochain::flowsheet::load;
use cryochain::solve::{solve, Options};
use std::path::Path;

fn reference(quantity: &str) -> f64 {
    common::reference_value("coolprop_collins.csv", &[("quantity", quantity)], "value")
}

#[test]
fn the_collins_demo_matches_a_cold_box_balance_and_breaks_no_rule() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/helium-collins.yaml");
    let plant = load(&path, &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    // The script's inputs taken from the solution.
    for (stream, temperature) in [
        ("split1.branch", 55.93677304703026),
        ("split2.branch", 25.255670128375893),
    ] {
        let t = common::stream(&solution, stream).state.temperature;
        assert!(
            (t - temperature).abs() < 1e-6,
            "{stream} at {t} K; regenerate the reference"
        );
    }
    let unit = |id: &str| plant.units.iter().position(|u| u.id == id).unwrap();
    let Details::Exchanger(warm) = &solution.units[unit("hx1")].performance.details else {
        panic!("hx1 details");
    };
    assert!(warm.min_approach_position < 1e-9 && (warm.min_approach - 3.0).abs() < 1e-3);
    let yield_ = solution.summary.liquid_yield.unwrap();
    let want = reference("liquid_yield");
    assert!(
        common::relative(yield_, want) < 1e-7,
        "yield {yield_} against {want}"
    );
    for (id, quantity) in [("exp1", "exp1_work_W"), ("exp2", "exp2_work_W")] {
        let work = -solution.units[unit(id)].performance.work_in;
        let want = reference(quantity);
        assert!(
            common::relative(work, want) < 1e-7,
            "{id} {work} against {want}"
        );
    }
    // A demo follows good practice: no design error or warning.
    let serious = common::serious_findings(&plant, &solution);
    assert!(serious.is_empty(), "{serious:?}");
}
