//! A bath precooler's optional `boil-off` outlet: unconnected, the vapour is vented
//! as before; routed, it is a stream of the bath's cryogen at its saturated-vapour
//! state. Recovering it in the warm exchanger of the hydrogen test liquefier leaves
//! the yield as it was and cuts the liquid nitrogen bought by about half; both
//! figures against hand balances on CoolProp (tests/reference/generate_boil_off.py,
//! CoolProp 8.0.0 from PyPI), whose inputs are the flowsheets' specifications only.

mod common;

use cryochain::flowsheet::load;
use cryochain::solve::{solve, Options, Solution};
use std::path::Path;

fn solved(file: &str) -> (cryochain::flowsheet::Plant, Solution) {
    let plant = load(&Path::new(env!("CARGO_MANIFEST_DIR")).join(file), &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    (plant, solution)
}

fn reference(quantity: &str) -> f64 {
    common::reference_value("coolprop_boil_off.csv", &[("quantity", quantity)], "value")
}

const VENTED: &str = "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml";
const RECOVERED: &str = "tests/flowsheets/hydrogen-ln2-boil-off-recovered.yaml";

#[test]
fn recovering_the_boil_off_keeps_the_yield_and_halves_the_nitrogen_bought() {
    let (_, vented) = solved(VENTED);
    let (plant, recovered) = solved(RECOVERED);
    let y = reference("liquid_yield");
    for s in [&vented, &recovered] {
        let yield_ = s.summary.liquid_yield.unwrap();
        assert!(
            common::relative(yield_, y) < 1e-7,
            "yield {yield_} against {y}"
        );
    }
    let (a, b) = (
        vented.summary.cryogen_boil_off,
        recovered.summary.cryogen_boil_off,
    );
    let (want_a, want_b) = (
        reference("nitrogen_boiled_vented_kg_s"),
        reference("nitrogen_boiled_recovered_kg_s"),
    );
    assert!(
        common::relative(a, want_a) < 1e-7,
        "vented {a} against {want_a}"
    );
    assert!(
        common::relative(b, want_b) < 1e-7,
        "recovered {b} against {want_b}"
    );
    // The saving the recovery brings: more than half here.
    assert!(b < 0.5 * a, "recovered {b} against vented {a}");
    // The liquid bought per kg of product falls in proportion, and so does the
    // precooling work charged for it.
    assert!(recovered.summary.precooling_work < 0.5 * vented.summary.precooling_work);
    // The hand balance took the warm exchanger's pinch at its warm end.
    let index = plant.units.iter().position(|u| u.id == "warm-hx").unwrap();
    let cryochain::equipment::Details::Exchanger(report) =
        &recovered.units[index].performance.details
    else {
        panic!("warm-hx details");
    };
    assert!((report.min_approach - 3.0).abs() < 1e-3);
    assert!(
        report.min_approach_position < 1e-9,
        "pinch at {}",
        report.min_approach_position
    );
}

#[test]
fn a_routed_boil_off_keeps_every_balance_closed() {
    let (_, s) = solved(RECOVERED);
    let summary = &s.summary;
    for (what, closure) in [
        ("mass", summary.mass_closure),
        ("energy", summary.energy_closure),
        ("exergy", summary.exergy_closure),
    ] {
        assert!(closure.abs() < 1e-9, "{what} closes to {closure:e}");
    }
    let vapour = common::stream(&s, "ln2-bath.boil-off");
    assert_eq!(vapour.state.fluid().name, "nitrogen");
    assert_eq!(vapour.state.quality, Some(1.0));
    assert!(common::relative(vapour.flow, summary.cryogen_boil_off) < 1e-12);
}

#[test]
fn only_a_bath_has_a_boil_off_outlet() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let text = std::fs::read_to_string(root.join(RECOVERED)).unwrap();
    let edited = text.replace(
        "    bath: nitrogen\n    bath_pressure: 1.2 bar   # boils at about 78.8 K\n",
        "    refrigerator: 0.3\n",
    );
    assert_ne!(text, edited);
    let dir = std::env::temp_dir().join(format!("cryochain-boil-off-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("refrigerated.yaml");
    std::fs::write(&file, edited).unwrap();
    let (code, _, err) = common::run_in(&dir, &["solve", file.to_str().unwrap()]);
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("has no outlet 'boil-off'"), "{err}");
}
