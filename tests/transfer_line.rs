//! The transfer line, the kind added by following docs/architecture.md ("Adding an
//! equipment kind"): one new file and one registration line. Checked against the
//! first law for a pipe (h_out = h_in + Q/ṁ, no work) and the textbook energy
//! balance of a Linde-Hampson cold box with a heat in-leak (Barron, Cryogenic
//! Systems, the simple Linde-Hampson analysis extended by a heat leak):
//! y = (h_return − h_high − Q/ṁ) / (h_return − h_liquid).

mod common;

use common::stream;
use cryochain::flowsheet::load;
use cryochain::solve::{solve, Options};
use std::path::Path;

const FILE: &str = "tests/flowsheets/nitrogen-with-transfer-line.yaml";

#[test]
fn a_transfer_line_adds_its_heat_leak_and_pressure_drop() {
    let plant = load(Path::new(FILE), &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let inlet = stream(&solution, "recuperator.hot-out");
    let outlet = stream(&solution, "line.out");
    assert!((outlet.state.pressure - (inlet.state.pressure - 0.5e5)).abs() < 1e-6);
    let gain = outlet.state.enthalpy - inlet.state.enthalpy;
    assert!(
        (gain - 15.0 / inlet.flow).abs() < 1e-9 * inlet.state.enthalpy.abs().max(1e3),
        "{gain} vs {}",
        15.0 / inlet.flow
    );
    // Cold-box balance: compressor outlet in, return gas and liquid out, leak in.
    let high = stream(&solution, "compressor.out");
    let warm_return = stream(&solution, "recuperator.cold-out");
    let liquid = stream(&solution, "separator.liquid");
    let m = high.flow;
    let y = (warm_return.state.enthalpy - high.state.enthalpy - 15.0 / m)
        / (warm_return.state.enthalpy - liquid.state.enthalpy);
    let reported = solution.summary.liquid_yield.unwrap();
    assert!((reported - y).abs() < 1e-9, "{reported} vs {y}");
    assert!(solution.summary.energy_closure.abs() < 1e-9);
    assert!(solution.summary.exergy_closure.abs() < 1e-9);
}

#[test]
fn the_heat_leak_costs_liquid() {
    let with_leak = load(Path::new(FILE), &[]).unwrap();
    let without = load(
        Path::new(FILE),
        &[
            cryochain::flowsheet::Override::parse("line.heat_leak=0W").unwrap(),
            cryochain::flowsheet::Override::parse("line.pressure_drop=0bar").unwrap(),
        ],
    )
    .unwrap();
    let y_leak = solve(&with_leak, &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    let y_none = solve(&without, &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    assert!(y_leak < y_none, "{y_leak} vs {y_none}");
}
