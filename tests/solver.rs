//! The sequential-modular solver against the textbook closed form of the ideal
//! Linde-Hampson cycle, its balances on every demo flowsheet, its convergence from
//! poor starting guesses, its diagnostics, and the exchanger's internal pinch.

use cryochain::equipment::exchanger::{self, ExchangerSpec};
use cryochain::equipment::{Context, Details, Flow};
use cryochain::flowsheet::{load, load_str, Override};
use cryochain::fluids;
use cryochain::report::solution::text_in;
use cryochain::report::Units;
use cryochain::solve::{solve, Options};
use std::path::Path;

/// An ideal simple Linde-Hampson loop: isothermal compression at T1 with no losses,
/// a perfect recuperator (the return gas leaves at the hot inlet temperature) and a
/// throttle back to p1.
fn ideal_loop(fluid: &str, t1: &str, p1: &str, p2: &str) -> String {
    format!(
        "title: ideal Linde-Hampson test loop
ambient: 300 K
fluids: [{fluid}]
equipment:
  - {{id: makeup, kind: feed, fluid: {fluid}, temperature: {t1}, pressure: {p1}, flow: balance}}
  - {{id: mixer, kind: mixer, inlets: [makeup, hx.cold-out]}}
  - {{id: compressor, kind: compressor, inlet: mixer, outlet_pressure: {p2}, temperature: {t1}, isothermal_efficiency: 1, flow: 1 kg/s}}
  - {{id: hx, kind: exchanger, hot: compressor, cold: separator.vapor, warm_end_approach: 0 K}}
  - {{id: valve, kind: valve, inlet: hx.hot-out, outlet_pressure: {p1}}}
  - {{id: separator, kind: separator, inlet: valve}}
  - {{id: liquid, kind: product, inlet: separator.liquid}}
"
    )
}

/// The textbook relation for the ideal simple Linde-Hampson cycle (for example
/// Barron, Cryogenic Systems, 2nd ed., chapter 3, from memory):
/// y = (h(T1,p1) − h(T1,p2)) / (h(T1,p1) − h_f(p1)), evaluated on our equation of state.
fn closed_form(fluid: &str, t1: f64, p1: f64, p2: f64) -> f64 {
    let f = fluids::fluid(fluid).unwrap();
    let h1 = f.state_tp(t1, p1).unwrap().enthalpy;
    let h2 = f.state_tp(t1, p2).unwrap().enthalpy;
    let hf = f.state_p_quality(p1, 0.0).unwrap().enthalpy;
    (h1 - h2) / (h1 - hf)
}

#[test]
fn ideal_yields_equal_the_textbook_closed_form() {
    // (fluid, T1, p1, p2, the same closed form evaluated with CoolProp 8.0.0 from PyPI)
    let cases = [
        (
            "nitrogen",
            "300 K",
            "1 atm",
            "200 atm",
            300.0,
            101_325.0,
            200.0 * 101_325.0,
            0.07462666038879263,
        ),
        (
            "hydrogen",
            "80 K",
            "1 atm",
            "100 bar",
            80.0,
            101_325.0,
            100e5,
            0.15028976937616265,
        ),
        (
            "helium",
            "20 K",
            "1 atm",
            "30 bar",
            20.0,
            101_325.0,
            30e5,
            0.09157313271346128,
        ),
    ];
    for (fluid, t, p1, p2, t1, p1v, p2v, coolprop) in cases {
        let text = ideal_loop(fluid, t, p1, p2);
        let plant = load_str(&text, "ideal loop", &[]).unwrap();
        let solution = solve(&plant, &Options::default()).unwrap();
        let y = solution.summary.liquid_yield.unwrap();
        let expected = closed_form(fluid, t1, p1v, p2v);
        assert!(
            (y - expected).abs() < 1e-6,
            "{fluid}: solver {y}, closed form {expected}"
        );
        assert!(
            (expected - coolprop).abs() < 1e-7,
            "{fluid}: closed form {expected}, CoolProp {coolprop}"
        );
        // Textbook worked examples (from memory) give about 0.07–0.08 for nitrogen.
        if fluid == "nitrogen" {
            assert!((0.07..0.08).contains(&y));
        }
    }
}

fn demo(name: &str) -> std::path::PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
}

const DEMOS: [&str; 5] = [
    "nitrogen-linde-hampson.yaml",
    "hydrogen-ln2-precooled.yaml",
    "helium-lh2-precooled.yaml",
    "nitrogen-claude.yaml",
    "cascade-nitrogen-hydrogen.yaml",
];

#[test]
fn every_demo_solves_and_its_balances_close() {
    for name in DEMOS {
        let plant = load(&demo(name), &[]).unwrap_or_else(|e| panic!("{e}"));
        let solution = solve(&plant, &Options::default()).unwrap_or_else(|e| panic!("{name}: {e}"));
        let s = &solution.summary;
        assert!(
            s.mass_closure.abs() < 1e-9,
            "{name}: mass {}",
            s.mass_closure
        );
        assert!(
            s.energy_closure.abs() < 1e-6,
            "{name}: energy {}",
            s.energy_closure
        );
        // Work taken (shaft plus precooling) = minimum work + exergy destroyed +
        // exergy lost + precooling work spent outside the plant.
        let rebuilt =
            s.minimum_work + s.exergy_destroyed + s.exergy_lost + s.precooling_exergy_outside;
        assert!((s.exergy_supplied - (s.shaft_power + s.precooling_work)).abs() < 1e-9);
        assert!(
            (s.exergy_supplied - rebuilt).abs() < 1e-6 * s.exergy_supplied,
            "{name}: exergy {} vs {rebuilt}",
            s.exergy_supplied
        );
        assert!(s.liquid_flow > 0.0, "{name}: no liquid");
        let y = s.liquid_yield.unwrap();
        assert!(y > 0.0 && y < 1.0, "{name}: yield {y}");
        // Second law: no unit creates exergy.
        for u in &solution.units {
            assert!(
                u.exergy_destroyed > -1e-6 * s.exergy_supplied,
                "{name}: {} destroys {}",
                u.id,
                u.exergy_destroyed
            );
        }
        assert!(s.figure_of_merit.unwrap() < 1.0);
    }
}

#[test]
fn recycle_converges_from_poor_starting_guesses() {
    let plant = load(&demo("nitrogen-linde-hampson.yaml"), &[]).unwrap();
    let reference = solve(&plant, &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    for (temperature, fraction) in [
        (20.0, 1.0),
        (2000.0, 1.0),
        (300.0, 0.01),
        (300.0, 5.0),
        (70.0, 0.1),
    ] {
        let options = Options {
            initial_temperature: Some(temperature),
            initial_flow_fraction: Some(fraction),
            ..Options::default()
        };
        let y = solve(&plant, &options)
            .unwrap_or_else(|e| panic!("start {temperature} K, {fraction}: {e}"))
            .summary
            .liquid_yield
            .unwrap();
        assert!(
            (y - reference).abs() < 1e-8,
            "start {temperature} K: {y} vs {reference}"
        );
    }
    // The hydrogen demo from a start far below its inversion curve's cold end.
    let h2 = load(&demo("hydrogen-ln2-precooled.yaml"), &[]).unwrap();
    let reference = solve(&h2, &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    let cold = Options {
        initial_temperature: Some(25.0),
        ..Options::default()
    };
    let y = solve(&h2, &cold).unwrap().summary.liquid_yield.unwrap();
    assert!((y - reference).abs() < 1e-8);
}

/// A neighbouring case started from a converged recycle and its estimated Jacobian
/// converges in a few passes to the cold solve's answer (the nitrogen Claude demo,
/// Broyden, 18 or 19 passes cold, 4 to 8 warm). The figures agree to the tear
/// tolerance's reach.
#[test]
fn a_warm_start_converges_in_a_few_passes_to_the_cold_answer() {
    let text = std::fs::read_to_string(demo("nitrogen-claude.yaml")).unwrap();
    let at = |fraction: f64| {
        let set = [Override::parse(&format!("split.fraction={fraction}")).unwrap()];
        load_str(&text, "nitrogen-claude.yaml", &set).unwrap()
    };
    let estimated = Options {
        estimate_jacobian: true,
        ..Options::default()
    };
    let mut warm = solve(&at(0.25), &estimated).unwrap().warm_start;
    assert!(warm.inverse_jacobian.is_some(), "no Jacobian estimated");
    for fraction in [0.251, 0.26, 0.28] {
        let plant = at(fraction);
        let cold = solve(&plant, &Options::default()).unwrap();
        let started = solve(
            &plant,
            &Options {
                warm_start: Some(warm.clone()),
                ..Options::default()
            },
        )
        .unwrap();
        assert!(
            started.iterations * 2 <= cold.iterations,
            "split {fraction}: {} passes warm, {} cold",
            started.iterations,
            cold.iterations
        );
        let (a, b) = (&started.summary, &cold.summary);
        for (name, x, y) in [
            ("yield", a.liquid_yield.unwrap(), b.liquid_yield.unwrap()),
            (
                "specific energy",
                a.specific_energy.unwrap(),
                b.specific_energy.unwrap(),
            ),
            ("shaft power", a.shaft_power, b.shaft_power),
        ] {
            assert!(
                (x - y).abs() <= 1e-9 * y.abs(),
                "split {fraction}: {name} {x} warm, {y} cold"
            );
        }
        warm = started.warm_start;
    }
}

#[test]
fn broyden_agrees_with_wegstein() {
    use cryochain::flowsheet::plant::Method;
    for name in ["nitrogen-linde-hampson.yaml", "hydrogen-ln2-precooled.yaml"] {
        let plant = load(&demo(name), &[]).unwrap();
        let w = solve(&plant, &Options::default())
            .unwrap()
            .summary
            .liquid_yield
            .unwrap();
        let b = solve(
            &plant,
            &Options {
                method: Some(Method::Broyden),
                ..Options::default()
            },
        )
        .unwrap_or_else(|e| panic!("{name}: {e}"))
        .summary
        .liquid_yield
        .unwrap();
        assert!((w - b).abs() < 1e-8, "{name}: Wegstein {w}, Broyden {b}");
    }
}

#[test]
fn a_case_that_cannot_converge_names_its_tears_and_residual() {
    let plant = load(&demo("hydrogen-ln2-precooled.yaml"), &[]).unwrap();
    let e = solve(
        &plant,
        &Options {
            max_iterations: Some(3),
            ..Options::default()
        },
    )
    .unwrap_err();
    let text = e.to_string();
    assert!(
        text.contains("did not converge after 3 iterations"),
        "{text}"
    );
    assert!(
        text.contains("tear streams:") && text.contains("warm-hx.cold-out"),
        "{text}"
    );
    assert!(text.contains("last residual"), "{text}");
}

#[test]
fn overrides_change_the_answer_as_expected() {
    let path = demo("nitrogen-linde-hampson.yaml");
    let base = solve(&load(&path, &[]).unwrap(), &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    let set = [Override::parse("compressor.outlet_pressure=150 atm").unwrap()];
    let lower = solve(&load(&path, &set).unwrap(), &Options::default())
        .unwrap()
        .summary
        .liquid_yield
        .unwrap();
    // Below the inversion pressure at 300 K, a lower high pressure gives less liquid.
    assert!(lower < base, "{lower} vs {base}");
}

/// High-pressure nitrogen cooled against low-pressure nitrogen: the hot stream's
/// heat capacity peaks near its pseudo-critical temperature, so the smallest
/// difference lies inside the exchanger. The segmented model must find it; an
/// independent fine calculation (2000 segments, plain flashes) confirms it.
#[test]
fn exchanger_finds_an_internal_pinch() {
    let n2 = fluids::fluid("nitrogen").unwrap();
    let hot = Flow {
        state: n2.state_tp(300.0, 50e5).unwrap(),
        flow: 1.0,
    };
    // More cold flow than hot: the hot stream's capacity rate is the smaller at the ends
    // and the larger around its heat-capacity peak.
    let cold = Flow {
        state: n2.state_tp(90.0, 1.5e5).unwrap(),
        flow: 1.25,
    };
    let design = exchanger::Exchanger {
        spec: ExchangerSpec::MinimumApproach(2.0),
        hot_pressure_drop: 0.0,
        cold_pressure_drop: 0.0,
        heat_leak: 0.0,
        segments: 50,
        catalyst: None,
    };
    let context = Context {
        detailed: true,
        ..Context::new(300.0)
    };
    let (outlets, performance) = exchanger::exchange(&hot, &cold, &design, &context).unwrap();
    let Details::Exchanger(report) = performance.details else {
        panic!("no report")
    };
    assert!(
        (report.min_approach - 2.0).abs() < 1e-6,
        "{}",
        report.min_approach
    );
    assert!(
        report.min_approach_position > 0.05 && report.min_approach_position < 0.95,
        "pinch at {}",
        report.min_approach_position
    );
    assert!(report.warm_end_approach > 2.5 && report.cold_end_approach > 2.5);
    // Independent fine profile at the same duty.
    let duty = performance.duty.unwrap();
    let n = 2000;
    let mut fine_min = f64::INFINITY;
    for k in 0..=n {
        let q = duty * k as f64 / n as f64;
        let th = n2
            .state_ph(50e5, hot.state.enthalpy - q)
            .unwrap()
            .temperature;
        let tc = n2
            .state_ph(1.5e5, outlets[1].state.enthalpy - q / cold.flow)
            .unwrap()
            .temperature;
        fine_min = fine_min.min(th - tc);
    }
    // The reported pinch is refined between the nodes: within 1 mK of the fine
    // profile (it was within 0.02 K when read off the 50 nodes alone).
    assert!(
        (fine_min - report.min_approach).abs() < 1e-3,
        "fine {fine_min} vs segmented {}",
        report.min_approach
    );
    assert!((fine_min - 2.0).abs() < 1e-3, "fine {fine_min}");
    // Energy balance across the exchanger.
    let dh_hot = hot.state.enthalpy - outlets[0].state.enthalpy;
    let dh_cold = cold.flow * (outlets[1].state.enthalpy - cold.state.enthalpy);
    assert!((dh_hot - dh_cold).abs() < 1e-6 * dh_hot);
}

/// A solve that leaves out the exchangers' largest duty (as the pressure advice's
/// re-solve and the text output of `cryochain solve` do) gives the same streams and
/// yield to the bit; only the largest duty and the effectiveness are missing (NaN),
/// the design checks count the same errors, and the text report reads the same in
/// both systems of units (it shows neither figure).
#[test]
fn leaving_out_the_largest_duty_changes_nothing_else() {
    for name in DEMOS {
        let plant = load(&demo(name), &[]).unwrap();
        let full = solve(&plant, &Options::default()).unwrap();
        let lean = solve(
            &plant,
            &Options {
                skip_largest_duty: true,
                ..Options::default()
            },
        )
        .unwrap();
        assert_eq!(
            full.summary.liquid_yield, lean.summary.liquid_yield,
            "{name}"
        );
        assert_eq!(full.iterations, lean.iterations, "{name}");
        for (a, b) in full.streams.iter().zip(&lean.streams) {
            assert_eq!(a.state.temperature, b.state.temperature, "{name}");
            assert_eq!(a.state.enthalpy, b.state.enthalpy, "{name}");
            assert_eq!(a.flow, b.flow, "{name}");
        }
        let mut exchangers = 0;
        for (a, b) in full.units.iter().zip(&lean.units) {
            if let (Details::Exchanger(a), Details::Exchanger(b)) =
                (&a.performance.details, &b.performance.details)
            {
                exchangers += 1;
                assert!(
                    a.max_duty.is_finite() && a.effectiveness.is_finite(),
                    "{name}"
                );
                assert!(b.max_duty.is_nan() && b.effectiveness.is_nan(), "{name}");
                assert_eq!((a.min_approach, a.ua), (b.min_approach, b.ua), "{name}");
            }
        }
        assert!(exchangers > 0, "{name}");
        assert_eq!(
            cryochain::rules::design_errors(&plant, &full),
            cryochain::rules::design_errors(&plant, &lean),
            "{name}"
        );
        for units in [Units::Si, Units::Engineering] {
            assert_eq!(text_in(&full, units), text_in(&lean, units), "{name}");
        }
    }
}
