//! Fuzzes the flowsheet reader and the solver: any bytes are read as a flowsheet;
//! whatever loads is solved with small caps and checked. No input may panic or
//! hang, and a solution's headline figures are never NaN.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let Ok(mut plant) = cryochain::flowsheet::load_str(text, "fuzz.yaml", &[]) else {
        return;
    };
    plant.settings.max_iterations = plant.settings.max_iterations.min(40);
    if let Ok(solution) = cryochain::solve::solve(&plant, &Default::default()) {
        let s = &solution.summary;
        assert!(!s.shaft_power.is_nan() && !s.liquid_flow.is_nan());
        assert!(s.liquid_yield.is_none_or(|y| !y.is_nan()));
        let _ = cryochain::rules::design_errors(&plant, &solution);
    }
});
