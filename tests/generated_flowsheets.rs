//! Structurally valid flowsheets generated at random (a feed, a chain of one to six
//! units with random parameters, a vent), read and solved: each is either refused
//! with a clear error or solved with its mass and energy balances closed (mass
//! within 1e-9, energy within 1e-6, the tolerances of docs/checks.md). Nothing may
//! panic. Cases: 256 unless `PROPTEST_CASES` says otherwise (of 256, about 170
//! solve and the rest are refused at reading, most for a pressure a valve,
//! compressor or expander cannot reach).

use proptest::prelude::*;

const FLUIDS: [&str; 4] = ["nitrogen", "hydrogen", "helium", "argon"];

/// One unit of the chain, as YAML, fed by `inlet`.
fn unit(kind: u8, id: &str, inlet: &str, a: f64, b: f64) -> String {
    match kind % 6 {
        0 => format!(
            "  - {{id: {id}, kind: cooler, inlet: {inlet}, outlet_temperature: {:.3} K, pressure_drop: {:.4} bar}}\n",
            250.0 + 100.0 * a,
            0.5 * b
        ),
        1 => format!(
            "  - {{id: {id}, kind: valve, inlet: {inlet}, outlet_pressure: {:.4} bar, heat_leak: {:.3} W}}\n",
            1.0 + 50.0 * a,
            5.0 * b
        ),
        2 => format!(
            "  - {{id: {id}, kind: compressor, inlet: {inlet}, outlet_pressure: {:.3} bar, isothermal_efficiency: {:.3}}}\n",
            2.0 + 300.0 * a,
            0.3 + 0.7 * b
        ),
        3 => format!(
            "  - {{id: {id}, kind: expander, inlet: {inlet}, outlet_pressure: {:.4} bar, isentropic_efficiency: {:.3}}}\n",
            1.0 + 20.0 * a,
            0.4 + 0.6 * b
        ),
        4 => format!(
            "  - {{id: {id}, kind: precooler, inlet: {inlet}, outlet_temperature: {:.3} K, refrigerator: {:.3}}}\n",
            60.0 + 240.0 * a,
            0.05 + 0.9 * b
        ),
        _ => format!(
            "  - {{id: {id}, kind: transfer-line, inlet: {inlet}, pressure_drop: {:.4} bar, heat_leak: {:.3} W}}\n",
            0.2 * a,
            20.0 * b
        ),
    }
}

fn flowsheet(fluid: usize, t: f64, p: f64, chain: &[(u8, f64, f64)]) -> String {
    let fluid = FLUIDS[fluid % FLUIDS.len()];
    let mut text = format!(
        "title: generated\nambient: 300 K\nfluids: [{fluid}]\nequipment:\n  - {{id: feed, kind: feed, fluid: {fluid}, temperature: {:.3} K, pressure: {:.4} bar, flow: 10 g/s}}\n",
        150.0 + 200.0 * t,
        1.0 + 200.0 * p
    );
    let mut inlet = "feed".to_string();
    for (k, &(kind, a, b)) in chain.iter().enumerate() {
        let id = format!("u{k}");
        text.push_str(&unit(kind, &id, &inlet, a, b));
        inlet = id;
    }
    text.push_str(&format!(
        "  - {{id: out, kind: product, role: vent, inlet: {inlet}}}\n"
    ));
    text
}

fn cases() -> u32 {
    std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(256)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), ..ProptestConfig::default() })]

    #[test]
    fn a_generated_flowsheet_is_refused_or_balanced(
        fluid in 0usize..4,
        t in 0.0f64..=1.0,
        p in 0.0f64..=1.0,
        chain in prop::collection::vec((any::<u8>(), 0.0f64..=1.0, 0.0f64..=1.0), 1..=6),
    ) {
        let text = flowsheet(fluid, t, p, &chain);
        // Refused with a located error (a valve set above its inlet's pressure, say).
        let Ok(plant) = cryochain::flowsheet::load_str(&text, "generated.yaml", &[]) else {
            return Ok(());
        };
        match cryochain::solve::solve(&plant, &Default::default()) {
            Err(e) => prop_assert!(!e.to_string().is_empty()),
            Ok(solution) => {
                let s = &solution.summary;
                prop_assert!(s.mass_closure.abs() < 1e-9, "mass {} in\n{text}", s.mass_closure);
                prop_assert!(s.energy_closure.abs() < 1e-6, "energy {} in\n{text}", s.energy_closure);
                prop_assert!(s.shaft_power.is_finite(), "{text}");
                // The checks run on whatever solved.
                let _ = cryochain::rules::check(&plant, &solution);
            }
        }
    }
}
