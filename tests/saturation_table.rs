//! The tabulated saturation line against the equation of state's own exact
//! saturation (itself checked against CoolProp 8.0.0 in `coolprop_reference.rs`).
//! The flashes decide phases on the table with a margin of `TABLE_MARGIN` times each
//! cell's error measured at its midpoint; these tests sample every cell, at its
//! nodes, beside them and inside, and require the true error to stay inside that
//! margin.

use cryochain::fluids::{self, flash::QUICK_PRESSURE_LIMIT, flash::TABLE_MARGIN};

/// Where each cell is sampled, as fractions of the cell: the node itself, points a
/// hair and a little from either node (where a lookup by pressure must pick the
/// right cell and land on the root the linear start nearly hits), and nine interior
/// points (besides the midpoint, where the error is measured).
const POSITIONS: [f64; 15] = [
    0.0,
    1e-12,
    1e-9,
    1e-3,
    0.1,
    0.2,
    0.3,
    0.4,
    0.6,
    0.7,
    0.8,
    0.9,
    0.999,
    0.999999999,
    0.999999999999,
];

#[test]
fn table_error_stays_inside_its_margin_in_every_cell() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        let table = &fluid.saturation_table;
        if fluid.pseudo_pure {
            assert!(
                table.is_empty(),
                "{name}: air has no single saturation line"
            );
            continue;
        }
        let (low, high) = table.temperature_range().unwrap();
        let cells = cryochain::fluids::saturation_table::SATURATION_TABLE_NODES - 1;
        let step = (high - low) / cells as f64;
        let limit = QUICK_PRESSURE_LIMIT * fluid.critical.pressure;
        let mut checked = 0;
        for cell in 0..cells {
            for fraction in POSITIONS {
                let temperature = (low + step * (cell as f64 + fraction)).min(high);
                let exact = fluid.saturation_at_temperature(temperature).unwrap();
                let pressure = exact.vapour.pressure;
                if pressure > limit {
                    continue;
                }
                let factors_liquid = fluid.properties(temperature, exact.liquid.density);
                let factors_vapour = fluid.properties(temperature, exact.vapour.density);
                let by_t = table.at_temperature(temperature).unwrap();
                let by_p = table.at_pressure(pressure).unwrap();
                let e = by_t.error;
                let ln_p_error = (by_t.pressure / pressure).ln().abs();
                assert!(
                    ln_p_error <= TABLE_MARGIN * e.ln_pressure + 1e-12,
                    "{name} T={temperature}: ln p off by {ln_p_error:e}, cell error {:e}",
                    e.ln_pressure
                );
                let t_error = (by_p.temperature - temperature).abs();
                assert!(
                    t_error <= TABLE_MARGIN * by_p.error.temperature + 1e-12 * temperature,
                    "{name} p={pressure}: T off by {t_error:e} K, cell error {:e}",
                    by_p.error.temperature
                );
                let latent = factors_vapour.enthalpy - factors_liquid.enthalpy;
                let h_error = (by_p.liquid_enthalpy - factors_liquid.enthalpy)
                    .abs()
                    .max((by_p.vapour_enthalpy - factors_vapour.enthalpy).abs());
                assert!(
                    h_error <= TABLE_MARGIN * by_p.error.enthalpy + 1e-9 * latent,
                    "{name} p={pressure}: h off by {h_error:e} J/kg, cell error {:e}",
                    by_p.error.enthalpy
                );
                let s_jump = factors_vapour.entropy - factors_liquid.entropy;
                let s_error = (by_p.liquid_entropy - factors_liquid.entropy)
                    .abs()
                    .max((by_p.vapour_entropy - factors_vapour.entropy).abs());
                assert!(
                    s_error <= TABLE_MARGIN * by_p.error.entropy + 1e-9 * s_jump,
                    "{name} p={pressure}: s off by {s_error:e} J/(kg K), cell error {:e}",
                    by_p.error.entropy
                );
                let rho_error = (by_t.liquid_density / exact.liquid.density - 1.0)
                    .abs()
                    .max((by_t.vapour_density / exact.vapour.density - 1.0).abs());
                assert!(
                    rho_error <= TABLE_MARGIN * e.density + 1e-12,
                    "{name} T={temperature}: densities off by {rho_error:e}, cell error {:e}",
                    e.density
                );
                checked += 1;
            }
        }
        assert!(
            checked > 100,
            "{name}: only {checked} points below the limit"
        );
    }
}

/// Below the quick-decision limit the table is sharp: ln p within 1e-6 and h′, h″
/// within 1e-4 of the latent heat, so that few targets are close calls.
#[test]
fn table_is_sharp_below_the_quick_decision_limit() {
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        if fluid.pseudo_pure {
            continue;
        }
        let worst = fluid
            .saturation_table
            .largest_error_below(QUICK_PRESSURE_LIMIT * fluid.critical.pressure);
        let boiling = fluid
            .saturated_pair_at_pressure(fluid.saturation_pressure_range().0 * 2.0)
            .unwrap();
        let latent = boiling.vapour.enthalpy - boiling.liquid.enthalpy;
        assert!(worst.ln_pressure < 1e-6, "{name}: {worst:?}");
        assert!(
            worst.enthalpy < 1e-4 * latent,
            "{name}: {worst:?}, latent {latent}"
        );
        assert!(worst.density < 1e-3, "{name}: {worst:?}");
    }
}

/// The slope d ln p/dT the table carries is the Clausius–Clapeyron slope Δs/(pΔv)
/// of the exact saturation; compare with a central difference of exact saturation
/// pressures (a textbook relation; step 1e-4 K, truncation error about 1e-9).
#[test]
fn table_slope_is_the_clausius_clapeyron_slope() {
    for name in ["nitrogen", "hydrogen", "helium", "neon", "methane"] {
        let fluid = fluids::fluid(name).unwrap();
        let (low, high) = fluid.saturation_table.temperature_range().unwrap();
        for fraction in [0.05, 0.3, 0.6, 0.9] {
            let t = low + fraction * (high - low);
            let step = 1e-4;
            let ln_p = |t: f64| {
                fluid
                    .saturation_at_temperature(t)
                    .unwrap()
                    .vapour
                    .pressure
                    .ln()
            };
            let difference = (ln_p(t + step) - ln_p(t - step)) / (2.0 * step);
            let table = fluid.saturation_table.at_temperature(t).unwrap();
            assert!(
                (table.ln_pressure_slope / difference - 1.0).abs() < 1e-6,
                "{name} T={t}: {} vs {difference}",
                table.ln_pressure_slope
            );
        }
    }
}

/// The seeds take the table's densities without measuring the cell's error below
/// `UNMEASURED_SEED_FRACTION` of the table's top: every cell that holds such a
/// temperature (its lower node at or below that) measures within 1e-5, a hundred
/// times inside the error up to which measured cells seed (1e-3).
#[test]
fn seeds_below_the_unmeasured_fraction_lie_in_close_cells() {
    use cryochain::fluids::saturation::UNMEASURED_SEED_FRACTION;
    let mut checked = 0;
    for name in fluids::names() {
        let fluid = fluids::fluid(name).unwrap();
        if fluid.pseudo_pure {
            continue;
        }
        let table = &fluid.saturation_table;
        let (low, high) = table.temperature_range().unwrap();
        let cells = cryochain::fluids::saturation_table::SATURATION_TABLE_NODES - 1;
        let step = (high - low) / cells as f64;
        for cell in 0..cells {
            let lower = low + step * cell as f64;
            if lower > UNMEASURED_SEED_FRACTION * high {
                break;
            }
            let error = table.cell_error_at(lower + 0.5 * step).unwrap();
            assert!(
                error.density < 1e-5,
                "{name}: the cell from {lower} K measures {:e}",
                error.density
            );
            checked += 1;
        }
    }
    assert!(checked > 900, "{checked} cells");
}
