//! The analytic derivatives of the Helmholtz energy agree with central finite
//! differences, and the thermodynamic identities that tie the properties together
//! hold (textbook relations: cp − cv, the Joule-Thomson coefficient from the
//! equation of state, the virial limit of the residual part).

use cryochain::fluids::{self, Fluid};

/// States spread over each fluid's range: gas, liquid, supercritical, near-critical.
fn sample_states(fluid: &Fluid) -> Vec<(f64, f64)> {
    let tc = fluid.critical.temperature;
    let rc = fluid.critical.density;
    vec![
        (0.75 * tc, 0.01 * rc),
        (0.75 * tc, 2.4 * rc),
        (1.02 * tc, 1.05 * rc),
        (2.5 * tc, 0.5 * rc),
        (4.0 * tc, 1.8 * rc),
    ]
}

fn central(f: impl Fn(f64) -> f64, x: f64, h: f64) -> f64 {
    (f(x + h) - f(x - h)) / (2.0 * h)
}

#[test]
fn residual_derivatives_match_finite_differences() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        let residual = &fluid_residual(fluid);
        for (t, rho) in sample_states(fluid) {
            let tau = fluid.tau(t);
            let delta = fluid.delta(rho);
            let at = |tau: f64, delta: f64| residual(tau, delta);
            let a = at(tau, delta);
            let (hd, ht) = (1e-5 * delta, 1e-5 * tau);
            let checks = [
                (
                    "∂αʳ/∂δ",
                    a.alpha_delta,
                    central(|d| at(tau, d).alpha, delta, hd),
                ),
                (
                    "∂²αʳ/∂δ²",
                    a.alpha_delta_delta,
                    central(|d| at(tau, d).alpha_delta, delta, hd),
                ),
                (
                    "∂αʳ/∂τ",
                    a.alpha_tau,
                    central(|x| at(x, delta).alpha, tau, ht),
                ),
                (
                    "∂²αʳ/∂τ²",
                    a.alpha_tau_tau,
                    central(|x| at(x, delta).alpha_tau, tau, ht),
                ),
                (
                    "∂²αʳ/∂δ∂τ",
                    a.alpha_delta_tau,
                    central(|x| at(x, delta).alpha_delta, tau, ht),
                ),
            ];
            for (what, analytic, numeric) in checks {
                let scale = analytic.abs().max(1e-3);
                assert!(
                    (analytic - numeric).abs() <= 1e-6 * scale,
                    "{name} {what} at T={t} ρ={rho}: analytic {analytic}, finite difference {numeric}"
                );
            }
        }
    }
}

/// The pressure's first and second density derivatives at constant temperature,
/// which the density iteration (Halley's method) steps with, against central finite
/// differences of the pressure and of its slope.
#[test]
fn pressure_slope_and_curvature_match_finite_differences() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        for (t, rho) in sample_states(fluid) {
            let factors = fluid.tau_factors(t);
            let at = |density: f64| fluid.pressure_slope_curvature(&factors, t, density);
            let (_, slope, curvature) = at(rho);
            let h = 1e-5 * rho;
            let checks = [
                ("(∂p/∂ρ)_T", slope, central(|r| at(r).0, rho, h)),
                ("(∂²p/∂ρ²)_T", curvature, central(|r| at(r).1, rho, h)),
            ];
            for (what, analytic, numeric) in checks {
                // Scale: the slope's own size over the density, so that a curvature
                // near its zero is not held to a relative bound.
                let scale = analytic.abs().max(1e-3 * slope.abs() / rho);
                assert!(
                    (analytic - numeric).abs() <= 1e-6 * scale,
                    "{name} {what} at T={t} ρ={rho}: analytic {analytic}, finite difference {numeric}"
                );
            }
        }
    }
}

fn fluid_residual(
    fluid: &'static Fluid,
) -> impl Fn(f64, f64) -> cryochain::fluids::helmholtz::ResidualDerivatives {
    move |tau, delta| {
        let t = fluid.reducing_temperature / tau;
        let factors = fluid.tau_factors(t);
        fluid.residual_at(&factors, delta * fluid.reducing_density)
    }
}

/// The ideal-gas part: cp⁰ from the analytic second τ derivative against a finite
/// difference of the ideal-gas enthalpy.
#[test]
fn ideal_gas_heat_capacity_matches_enthalpy_slope() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        for t in [0.5, 1.0, 3.0, 8.0].map(|k| k * fluid.critical.temperature) {
            if t > fluid.temperature_max || t < fluid.temperature_min {
                continue;
            }
            let numeric = central(|x| fluid.ideal_gas_enthalpy(x), t, 1e-4 * t);
            let analytic = fluid.ideal_gas_cp(t);
            assert!(
                (numeric - analytic).abs() < 1e-7 * analytic,
                "{name} at {t} K: cp0 {analytic} vs dh0/dT {numeric}"
            );
        }
    }
}

/// Properties against finite differences of other properties: p from −∂a/∂v, h and
/// s slopes against cp, and μJT against (∂T/∂p)ₕ by a finite isenthalpic step.
#[test]
fn properties_are_consistent_with_each_other() {
    let mut checked = 0;
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        for (t, rho) in sample_states(fluid) {
            if t > fluid.temperature_max {
                continue;
            }
            let p = fluid.properties(t, rho);
            if fluid.check_range(t * 1.001, p.pressure * 1.001).is_err() {
                continue;
            }
            // (∂h/∂T)_p = cp, with ρ moved to keep p fixed.
            let at_fixed_p = |x: f64| {
                let state = fluid.state_tp(x, p.pressure).unwrap();
                (state.enthalpy, state.entropy)
            };
            let h = 1e-5 * t;
            let dh_dt = (at_fixed_p(t + h).0 - at_fixed_p(t - h).0) / (2.0 * h);
            let ds_dt = (at_fixed_p(t + h).1 - at_fixed_p(t - h).1) / (2.0 * h);
            assert!(
                (dh_dt - p.cp).abs() < 2e-5 * p.cp,
                "{name} {t} {rho}: cp {} vs {dh_dt}",
                p.cp
            );
            assert!(
                (ds_dt * t - p.cp).abs() < 2e-5 * p.cp,
                "{name} {t} {rho}: T ds/dT {} vs cp {}",
                ds_dt * t,
                p.cp
            );
            // μJT = (∂T/∂p)_h from the (p, h) flash.
            let dp = 1e-5 * p.pressure;
            let t_up = fluid
                .state_ph(p.pressure + dp, p.enthalpy)
                .unwrap()
                .temperature;
            let t_down = fluid
                .state_ph(p.pressure - dp, p.enthalpy)
                .unwrap()
                .temperature;
            let mu = (t_up - t_down) / (2.0 * dp);
            let scale = p.joule_thomson.abs().max(1e-3 * t / p.pressure);
            assert!(
                (mu - p.joule_thomson).abs() < 1e-4 * scale,
                "{name} {t} {rho}: μJT {} vs finite difference {mu}",
                p.joule_thomson
            );
            checked += 1;
            // The Helmholtz identity h = u + p/ρ and g = h − Ts.
            assert!(
                (p.enthalpy - (p.internal_energy + p.pressure / p.density)).abs()
                    < 1e-9 * (p.enthalpy.abs() + p.pressure / p.density)
            );
            assert!(
                (p.gibbs - (p.enthalpy - t * p.entropy)).abs()
                    < 1e-9 * (p.gibbs.abs() + t * p.entropy.abs())
            );
        }
    }
    assert!(checked >= 40, "only {checked} states checked");
}

/// The second virial coefficient from the zero-density limit equals the slope of
/// Z with density at very low density: Z = 1 + Bρ + O(ρ²).
#[test]
fn second_virial_coefficient_is_the_low_density_limit() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        for t in [1.2, 2.0, 5.0].map(|k| k * fluid.critical.temperature) {
            if t > fluid.temperature_max {
                continue;
            }
            let [b, db, d2b] = fluid.second_virial(t);
            let rho = 1e-6 * fluid.critical.density;
            let z = fluid.properties(t, rho).compressibility;
            let slope = (z - 1.0) / rho;
            assert!(
                (slope - b).abs() < 1e-4 * b.abs().max(1e-6 / fluid.critical.density),
                "{name} {t}: B {b} vs {slope}"
            );
            let num_db = central(|x| fluid.second_virial(x)[0], t, 1e-4 * t);
            assert!(
                (num_db - db).abs() < 1e-6 * db.abs().max(1e-9),
                "{name} {t}: dB/dT {db} vs {num_db}"
            );
            let num_d2b = central(|x| fluid.second_virial(x)[1], t, 1e-4 * t);
            assert!(
                (num_d2b - d2b).abs() < 1e-5 * d2b.abs().max(1e-12),
                "{name} {t}: d2B/dT2 {d2b} vs {num_d2b}"
            );
        }
    }
}
