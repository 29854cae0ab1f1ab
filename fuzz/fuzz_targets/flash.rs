//! Fuzzes the flashes: a random fluid and a random pair of inputs, over and beyond
//! their ranges. No input may panic or hang; a state returned is finite.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if data.len() < 17 {
        return;
    }
    let names = cryochain::fluids::names();
    let fluid = cryochain::fluids::fluid(names[data[0] as usize % names.len()]).unwrap();
    let a = f64::from_le_bytes(data[1..9].try_into().unwrap());
    let b = f64::from_le_bytes(data[9..17].try_into().unwrap());
    let state = match data.get(17).copied().unwrap_or(0) % 6 {
        0 => fluid.state_tp(a, b),
        1 => fluid.state_ph(a, b),
        2 => fluid.state_ps(a, b),
        3 => fluid.state_t_rho(a, b),
        4 => fluid.state_t_quality(a, b),
        _ => fluid.state_p_quality(a, b),
    };
    if let Ok(state) = state {
        assert!(state.temperature.is_finite() && state.pressure.is_finite());
        assert!(
            state.enthalpy.is_finite() && state.entropy.is_finite() && state.density.is_finite()
        );
    }
});
