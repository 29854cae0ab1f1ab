//! Round trips over the whole validity range of every fluid: a state from (T, p) or
//! (T, quality) gives h and s; the (p, h) and (p, s) flashes must recover T within
//! 1e-7 K, the quality within 1e-8 and the phase label. States are drawn by proptest.

use cryochain::fluids::{self, Fluid};
use proptest::prelude::*;

/// How many fluids are registered: the round trips draw from every one of them.
fn fluid_count() -> usize {
    fluids::names().len()
}

/// The registered fluid at `index` (0 to `fluid_count() - 1`).
fn fluid_at(index: usize) -> &'static Fluid {
    fluids::fluid(fluids::names()[index]).unwrap()
}

/// An `ImpossibleState` from (T, p) is right only on the saturation line, where T
/// and p do not fix a state (the flash refuses within 1e-12 of the vapour pressure).
/// Anywhere else it is a failure: a non-finite property inside the equation also
/// surfaces as this error, and must not pass as a refusal.
fn refusal_is_genuine(
    fluid: &'static Fluid,
    temperature: f64,
    pressure: f64,
    error: &cryochain::Error,
) -> Result<(), TestCaseError> {
    let on_line = fluid
        .saturation_at_temperature(temperature)
        .is_ok_and(|s| ((pressure - s.vapour.pressure) / s.vapour.pressure).abs() <= 1e-11);
    if on_line {
        Ok(())
    } else {
        Err(TestCaseError::fail(format!(
            "{} T={temperature} p={pressure} is off the saturation line, yet: {error}",
            fluid.name
        )))
    }
}

/// Maps u ∈ [0, 1] onto a pressure, log-uniform from 100 Pa to the highest pressure
/// valid at T (the equation's limit, or just under the melting pressure).
fn pressure_for(fluid: &Fluid, temperature: f64, u: f64) -> f64 {
    let mut top = fluid.pressure_max;
    if let Some(melting) = fluid.melting_pressure(temperature) {
        top = top.min(0.999 * melting);
    }
    let low: f64 = 100.0;
    (low.ln() + u * (top.ln() - low.ln())).exp()
}

fn check_recovers(
    fluid: &'static Fluid,
    temperature: f64,
    pressure: f64,
) -> Result<(), TestCaseError> {
    let state = match fluid.state_tp(temperature, pressure) {
        Ok(s) => s,
        // Exactly on the saturation line: (T, p) does not fix a state.
        Err(e @ cryochain::Error::ImpossibleState { .. }) => {
            return refusal_is_genuine(fluid, temperature, pressure, &e)
        }
        Err(e) => {
            return Err(TestCaseError::fail(format!(
                "{} T={temperature} p={pressure}: {e}",
                fluid.name
            )))
        }
    };
    let from_h = fluid
        .state_ph(state.pressure, state.enthalpy)
        .map_err(|e| {
            TestCaseError::fail(format!(
                "{} (p,h) from T={temperature} p={pressure}: {e}",
                fluid.name
            ))
        })?;
    let from_s = fluid.state_ps(state.pressure, state.entropy).map_err(|e| {
        TestCaseError::fail(format!(
            "{} (p,s) from T={temperature} p={pressure}: {e}",
            fluid.name
        ))
    })?;
    prop_assert!(
        (from_h.temperature - temperature).abs() < 1e-7,
        "{} (p,h) T={} vs {temperature} at p={pressure}",
        fluid.name,
        from_h.temperature
    );
    prop_assert!(
        (from_s.temperature - temperature).abs() < 1e-7,
        "{} (p,s) T={} vs {temperature} at p={pressure}",
        fluid.name,
        from_s.temperature
    );
    // The same phase label, unless T or p lies within rounding of a boundary
    // between labels (the top of the saturation line, the critical point).
    let near = |a: f64, b: f64| (a / b - 1.0).abs() < 1e-9;
    let on_boundary = near(temperature, fluid.saturation_temperature_max())
        || near(temperature, fluid.critical.temperature)
        || near(pressure, fluid.critical.pressure);
    if !on_boundary {
        prop_assert_eq!(
            from_h.phase,
            state.phase,
            "{} (p,h) at T={} p={}",
            fluid.name,
            temperature,
            pressure
        );
        prop_assert_eq!(
            from_s.phase,
            state.phase,
            "{} (p,s) at T={} p={}",
            fluid.name,
            temperature,
            pressure
        );
    }
    // Air, whose bubble and dew lines are apart, has two-phase (T, p) states.
    prop_assert_eq!(from_h.is_two_phase(), state.is_two_phase());
    prop_assert_eq!(from_s.is_two_phase(), state.is_two_phase());
    if let Some(quality) = state.quality {
        prop_assert!((from_h.quality.unwrap() - quality).abs() < 1e-8);
        prop_assert!((from_s.quality.unwrap() - quality).abs() < 1e-8);
    }
    Ok(())
}

/// Cases per property: 100 000 (about two seconds) unless `PROPTEST_CASES` asks for
/// more or fewer. Seeds are random per run (`PROPTEST_RNG_SEED` fixes one); a failure
/// found is kept in `round_trips.proptest-regressions` and replayed first.
fn cases() -> u32 {
    std::env::var("PROPTEST_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(100_000)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: cases(), ..ProptestConfig::default() })]

    #[test]
    fn single_phase_round_trips(index in 0..fluid_count(), ut in 0.0f64..=1.0, up in 0.0f64..=1.0) {
        let fluid = fluid_at(index);
        let temperature = fluid.temperature_min + ut * (fluid.temperature_max - fluid.temperature_min);
        let pressure = pressure_for(fluid, temperature, up);
        check_recovers(fluid, temperature, pressure)?;
    }

    /// The cold end, where cryogenic cycles live, sampled more densely: T from the
    /// triple point to three times the critical temperature.
    #[test]
    fn cold_single_phase_round_trips(index in 0..fluid_count(), ut in 0.0f64..=1.0, up in 0.0f64..=1.0) {
        let fluid = fluid_at(index);
        let high = (3.0 * fluid.critical.temperature).min(fluid.temperature_max);
        let temperature = fluid.temperature_min + ut * (high - fluid.temperature_min);
        let pressure = pressure_for(fluid, temperature, up);
        check_recovers(fluid, temperature, pressure)?;
    }

    /// Single-phase states a hair off the saturation line (relative offsets in
    /// pressure from 1e-2 down to 1e-8), where the quick phase decision must hand over
    /// to the exact saturation. For air: above the bubble or below the dew pressure.
    #[test]
    fn near_saturation_round_trips(
        index in 0..fluid_count(),
        ut in 0.0f64..=1.0,
        exponent in 2.0f64..8.0,
        above in any::<bool>(),
    ) {
        let fluid = fluid_at(index);
        let low = fluid.triple_temperature;
        let temperature = low + ut * (0.999 * fluid.critical.temperature - low);
        let saturation = fluid.saturation_at_temperature(temperature).unwrap();
        let offset = 10f64.powf(-exponent);
        let pressure = if above {
            saturation.liquid.pressure * (1.0 + offset)
        } else {
            saturation.vapour.pressure * (1.0 - offset)
        };
        // Just above the triple point the compressed liquid may already be solid.
        if fluid.melting_pressure(temperature).is_some_and(|m| pressure > m) {
            return Ok(());
        }
        check_recovers(fluid, temperature, pressure)?;
    }

    #[test]
    fn two_phase_round_trips(index in 0..fluid_count(), ut in 0.0f64..=1.0, quality in 0.0f64..=1.0) {
        let fluid = fluid_at(index);
        // Up to 0.999 Tc (air, whose bubble and dew lines end apart, to 0.99 Tc).
        let high = if fluid.pseudo_pure { 0.99 } else { 0.999 } * fluid.critical.temperature;
        // Air's bubble and dew lines are apart: near its triple point only the dew
        // side exists, so its two-phase range starts at the dew temperature of the
        // triple-point bubble pressure.
        let low = if fluid.pseudo_pure {
            fluid.saturation_at_pressure(fluid.triple_pressures.0).unwrap().vapour.temperature
        } else {
            fluid.triple_temperature
        };
        let temperature = low + ut * (high - low);
        let state = fluid.state_t_quality(temperature, quality)
            .map_err(|e| TestCaseError::fail(format!("{} T={temperature} x={quality}: {e}", fluid.name)))?;
        for (label, back) in [
            ("(p,h)", fluid.state_ph(state.pressure, state.enthalpy)),
            ("(p,s)", fluid.state_ps(state.pressure, state.entropy)),
        ] {
            let back = back.map_err(|e| TestCaseError::fail(format!("{} {label} from T={temperature} x={quality}: {e}", fluid.name)))?;
            prop_assert!((back.temperature - temperature).abs() < 1e-7,
                "{} {label} T={} vs {temperature} (x={quality})", fluid.name, back.temperature);
            let x = back.quality.unwrap_or(if back.enthalpy < state.enthalpy { 0.0 } else { 1.0 });
            prop_assert!((x - quality).abs() < 1e-8,
                "{} {label} x={x} vs {quality} at T={temperature}", fluid.name);
        }
    }
}

/// (T, ρ) flashes agree with (T, p) ones, including in two phase.
#[test]
fn temperature_density_flash_agrees() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        let tc = fluid.critical.temperature;
        for (t, p) in [
            (0.7 * tc, fluid.critical.pressure * 2.0),
            (1.5 * tc, 1e5),
            (0.8 * tc, 1e3),
        ] {
            let a = fluid.state_tp(t, p).unwrap();
            let b = fluid.state_t_rho(t, a.density).unwrap();
            assert!((b.pressure - p).abs() < 1e-8 * p, "{name} {t} {p}");
            assert_eq!(a.phase, b.phase, "{name} {t} {p}");
        }
        let wet = fluid.state_t_quality(0.8 * tc, 0.3).unwrap();
        let back = fluid.state_t_rho(0.8 * tc, wet.density).unwrap();
        assert!(
            (back.quality.unwrap() - 0.3).abs() < 1e-9,
            "{name}: {:?}",
            back.quality
        );
    }
}

/// A compressed liquid a hair above its saturation pressure (found by proptest): the
/// density search must start at the saturated liquid, not far above it.
#[test]
fn liquid_just_above_saturation() {
    let o2 = fluids::fluid("oxygen").unwrap();
    let (t, p) = (76.93933967675495, 19535.2703707319);
    let sat = o2.saturation_at_temperature(t).unwrap();
    assert!(p > sat.liquid.pressure && p < sat.liquid.pressure * 1.001);
    let s = o2.state_tp(t, p).unwrap();
    assert_eq!(s.phase, cryochain::fluids::Phase::Liquid);
    assert!((s.density - sat.liquid.density).abs() < 1e-3 * sat.liquid.density);
    let back = o2.state_ph(p, s.enthalpy).unwrap();
    assert!((back.temperature - t).abs() < 1e-7);
}

/// Helium vapour 1.4e-5 below its dew pressure at 0.9987 Tc (found by proptest): next
/// to the critical point the ancillary saturated-vapour density missed by enough that
/// the vapour-branch bracket excluded the root, and the (p, h) and (p, s) flashes
/// failed to converge. The branch bounds there now come from the exact saturation.
#[test]
fn vapour_next_to_the_critical_point() {
    let helium = fluids::fluid("helium").unwrap();
    let (t, p) = (5.18857723302275, 227130.1052216596);
    let state = helium.state_tp(t, p).unwrap();
    assert_eq!(state.phase, cryochain::fluids::Phase::Vapour);
    let from_h = helium.state_ph(p, state.enthalpy).unwrap();
    let from_s = helium.state_ps(p, state.entropy).unwrap();
    assert!(
        (from_h.temperature - t).abs() < 1e-7,
        "{}",
        from_h.temperature
    );
    assert!(
        (from_s.temperature - t).abs() < 1e-7,
        "{}",
        from_s.temperature
    );
}

/// The melting temperature inverts the melting line: T_melt(p_melt(T)) = T within
/// 1e-10 relative (the line is steep, so this is the sharp statement), at 40
/// temperatures spaced quadratically from just above the triple point to three times
/// it (or to the line's data or the equation's pressure limit), for every fluid.
#[test]
fn melting_line_round_trip() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        let low = fluid.triple_temperature;
        let mut checked = 0;
        for k in 1..=40 {
            let t = low * (1.0 + 2.0 * (k as f64 / 40.0).powi(2));
            let Some(pressure) = fluid.melting_pressure(t) else {
                continue;
            };
            if pressure > fluid.pressure_max {
                break;
            }
            let back = fluid.melting_temperature(pressure).unwrap();
            assert!(
                (back / t - 1.0).abs() < 1e-10,
                "{name}: T = {t} K → p = {pressure} Pa → T = {back} K"
            );
            checked += 1;
        }
        assert!(checked >= 5, "{name}: only {checked} temperatures checked");
    }
}

/// Compressed liquid helium 0.72 % above its vapour pressure at 4.879 K (found by
/// proptest at a million cases): the saturation temperature at this pressure lies on
/// a node of the saturation table, where the table's lookup once returned the middle
/// of the cell below (4.8765 K instead of 4.8882 K), so the flash started on the wrong
/// side of saturation and returned a liquid 36 J/kg off the target.
#[test]
fn liquid_whose_saturation_lies_on_a_table_node() {
    let helium = fluids::fluid("helium").unwrap();
    let (t, p) = (4.879209811922618, 179639.4531999784);
    let state = helium.state_tp(t, p).unwrap();
    assert_eq!(state.phase, cryochain::fluids::Phase::Liquid);
    let exact = helium.saturation_at_pressure(p).unwrap();
    let table = helium.saturation_table.at_pressure(p).unwrap();
    assert!((table.temperature - exact.liquid.temperature).abs() < 1e-6);
    for back in [
        helium.state_ph(p, state.enthalpy).unwrap(),
        helium.state_ps(p, state.entropy).unwrap(),
    ] {
        assert!((back.temperature - t).abs() < 1e-7, "{}", back.temperature);
    }
}

/// Air at 155.49 K and 37.52 bar (found by proptest at a million cases): the (p, s)
/// flash seeds itself with the state at its ideal-gas estimate, 132.49997 K, which
/// lies in a sliver next to air's critical point, above the top of its two-phase
/// range (the dew pressure at 0.9999 Tc) but below its bubble pressure. There the
/// (T, p) flash forced the liquid branch, which has no root, and failed; the one root
/// of that isotherm is now taken.
#[test]
fn air_next_to_its_critical_point() {
    let air = fluids::fluid("air").unwrap();
    let p = 3751999.8096171333;
    assert!(p > air.saturation_pressure_range().1 && p < air.critical.pressure);
    let sliver = air.state_tp(132.4999716974151, p).unwrap();
    let back = air.state_t_rho(132.4999716974151, sliver.density).unwrap();
    assert!((back.pressure / p - 1.0).abs() < 1e-9, "{}", back.pressure);
    let t = 155.49101080328822;
    let gas = air.state_tp(t, p).unwrap();
    for back in [
        air.state_ph(p, gas.enthalpy).unwrap(),
        air.state_ps(p, gas.entropy).unwrap(),
    ] {
        assert!((back.temperature - t).abs() < 1e-7, "{}", back.temperature);
    }
}

/// A deterministic grid around every fluid's critical point, where cp peaks, the
/// phases merge and air's bubble and dew lines meet: 40 × 40 states in each of the
/// windows ±10 %, ±1 % and ±0.1 % of T_c and p_c, each built from (T, p) and
/// recovered through (p, h) and (p, s) within 1e-7 K (two-phase air by its quality).
/// The code before the saturation table failed up to 8 % of these states (helium,
/// neon and air, their density searches bounded by ancillary densities).
#[test]
fn near_critical_grid_round_trips() {
    let mut failures = Vec::new();
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        let (tc, pc) = (fluid.critical.temperature, fluid.critical.pressure);
        for width in [0.1, 0.01, 0.001] {
            for i in 0..40 {
                for j in 0..40 {
                    let t = tc * (1.0 - width + 2.0 * width * (i as f64 + 0.37) / 40.0);
                    let p = pc * (1.0 - width + 2.0 * width * (j as f64 + 0.61) / 40.0);
                    if let Err(e) = check_recovers(fluid, t, p) {
                        failures.push(format!("{name} ±{width}: {e}"));
                    }
                }
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} failures, first: {:#?}",
        failures.len(),
        &failures[..failures.len().min(5)]
    );
}

/// The refusal check above fails an `ImpossibleState` off the saturation line (the
/// old check passed any) and passes one on it.
#[test]
fn a_refusal_off_the_saturation_line_fails_the_round_trip() {
    let nitrogen = fluids::fluid("nitrogen").unwrap();
    let fake = cryochain::Error::ImpossibleState {
        fluid: "nitrogen".into(),
        detail: "the equation gave a non-finite property".into(),
    };
    assert!(refusal_is_genuine(nitrogen, 80.0, 5e5, &fake).is_err());
    let psat = nitrogen
        .saturation_at_temperature(80.0)
        .unwrap()
        .vapour
        .pressure;
    let genuine = nitrogen.state_tp(80.0, psat).unwrap_err();
    assert!(refusal_is_genuine(nitrogen, 80.0, psat, &genuine).is_ok());
}

/// Every registered fluid is drawn: the index range is the registry's size and each
/// index names a different fluid (a fixed range would miss a fluid added later).
#[test]
fn the_round_trips_draw_every_registered_fluid() {
    let drawn: std::collections::BTreeSet<&str> = (0..fluid_count())
        .map(|i| fluid_at(i).name.as_str())
        .collect();
    let registered: std::collections::BTreeSet<&str> = fluids::names().into_iter().collect();
    assert_eq!(drawn, registered);
}
