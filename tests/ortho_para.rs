//! Ortho–para hydrogen checked against sources outside the project:
//!
//! * CoolProp 8.0.0 (PyPI): its Leachman et al. (2009) para, ortho and normal
//!   equations, aligned and mixed by tests/reference/generate_ortho_para.py, with a
//!   rotational partition function written out there from the Dunham constants of
//!   H₂ (not from cryochain's term values);
//! * published figures quoted from memory, each named where it is used;
//! * textbook relations: the heat of conversion of a gas is the change in para
//!   fraction times the ortho–para energy difference; a cold box's energy balance.

mod common;

use common::{column, read_csv, relative, stream};
use cryochain::equipment::Details;
use cryochain::flowsheet::load;
use cryochain::fluids::blend::Blend;
use cryochain::fluids::{fluid, spin};
use cryochain::rules::check;
use cryochain::solve::{solve, Options, Solution};
use std::path::Path;

const ATMOSPHERE: f64 = 101_325.0;
const CATALYTIC: &str = "tests/flowsheets/hydrogen-catalytic-coldbox.yaml";
const FROZEN: &str = "tests/flowsheets/hydrogen-catalytic-coldbox-frozen.yaml";
const DEMO: &str = "flowsheets/hydrogen-ln2-precooled.yaml";
const FROZEN_DEMO: &str = "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml";

fn solved(file: &str) -> (cryochain::flowsheet::Plant, Solution) {
    let plant = load(Path::new(file), &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    (plant, solution)
}

fn number(text: &str) -> f64 {
    text.parse().unwrap()
}

// --- 1. Equilibrium para fraction and conversion heat -----------------------------

/// Within 0.001 of the partition-function value (CoolProp script, Dunham constants)
/// at 20–300 K; the ideal-gas energy difference within 0.1 % (the two sides use
/// different level energies: cryochain the tabulated term values, the script a
/// three-term Dunham series; they differ by up to 0.13 cm⁻¹ at J = 2).
#[test]
fn equilibrium_para_fraction_matches_the_partition_function() {
    let (header, rows) = read_csv("coolprop_para_equilibrium.csv");
    let (t, x, e) = (
        column(&header, "temperature_K"),
        column(&header, "equilibrium_para_fraction"),
        column(&header, "energy_difference_J_mol"),
    );
    let mut worst: f64 = 0.0;
    for row in &rows {
        let temperature = number(&row[t]);
        let ours = spin::equilibrium_para_fraction(temperature);
        worst = worst.max((ours - number(&row[x])).abs());
        let energy = spin::ortho_para_energy_difference(temperature);
        assert!(
            relative(energy, number(&row[e])) < 1e-3,
            "{temperature} K: {energy} vs {}",
            row[e]
        );
    }
    assert!(rows.len() >= 50);
    // Measured: 1.9e-5 at most (the two sides use different level energies).
    assert!(worst < 1e-3, "worst {worst}");
}

/// Published equilibrium fractions (from memory, as usually tabulated, e.g. Barron,
/// Cryogenic Systems, after Woolley, Scott and Brickwedde 1948): 0.2507 at 300 K,
/// about 0.50 at 77 K, 0.998 at the normal boiling point (20.3 K).
#[test]
fn equilibrium_para_fraction_matches_published_values() {
    assert!((spin::equilibrium_para_fraction(300.0) - 0.2507).abs() < 2e-4);
    assert!((spin::equilibrium_para_fraction(77.0) - 0.50).abs() < 0.01);
    assert!((spin::equilibrium_para_fraction(20.3) - 0.998).abs() < 1e-3);
    // The Woolley, Scott and Brickwedde (1948) table as recalled (from memory):
    // within 5e-4 (measured: 2e-4 at most).
    for (t, x) in [
        (20.0, 0.99821),
        (30.0, 0.97021),
        (40.0, 0.88727),
        (50.0, 0.77054),
        (100.0, 0.38620),
        (150.0, 0.28603),
        (200.0, 0.25974),
        (300.0, 0.25072),
    ] {
        let ours = spin::equilibrium_para_fraction(t);
        assert!((ours - x).abs() < 5e-4, "{t} K: {ours} vs {x}");
    }
}

/// The ortho–para energy difference at low temperature is about 703 kJ/kg (from
/// memory: 1417 J/mol, the energy of the J = 1 level); converting normal liquid
/// to equilibrium at the normal boiling point releases about 527 kJ/kg (from
/// memory, the figure usually quoted), more than the latent heat of about 446 kJ/kg
/// (from memory). The liquid's conversion enthalpy agrees with CoolProp's ortho and
/// para equations on the aligned datum.
#[test]
fn conversion_heat_at_the_normal_boiling_point() {
    let blend = Blend::get().unwrap();
    let molar_mass = blend.normal.molar_mass;
    let gas = spin::ortho_para_energy_difference(20.0) / molar_mass;
    assert!((gas - 703e3).abs() < 0.002 * 703e3, "{gas}");
    let (header, rows) = read_csv("coolprop_para_minimum_work.csv");
    let (label, temperature, value) = (
        column(&header, "label"),
        column(&header, "temperature_K"),
        column(&header, "value"),
    );
    let row = rows
        .iter()
        .find(|r| r[label] == "liquid-ortho-minus-para-J_kg")
        .unwrap();
    let t_nbp = number(&row[temperature]);
    let ours = blend.liquid_conversion_enthalpy(t_nbp, ATMOSPHERE).unwrap();
    assert!(
        relative(ours, number(&row[value])) < 5e-4, // the alignment follows the levels
        "{ours} vs {}",
        row[value]
    );
    // Normal liquid to equilibrium liquid at the same T and p.
    let x_eq = spin::equilibrium_para_fraction(t_nbp);
    let normal = blend.state_tp(t_nbp, ATMOSPHERE, 0.25).unwrap();
    let converted = blend.state_tp(t_nbp, ATMOSPHERE, x_eq).unwrap();
    let heat = normal.enthalpy - converted.enthalpy;
    assert!((heat - 527e3).abs() < 0.01 * 527e3, "{heat}");
    let pair = blend.saturated_pair(ATMOSPHERE, x_eq).unwrap();
    let latent = pair.vapour.enthalpy - pair.liquid.enthalpy;
    assert!((latent - 446e3).abs() < 0.01 * 446e3, "{latent}");
    assert!(heat > latent);
}

/// The textbook relation for a gas: converting from x₁ to x₂ at fixed T and p
/// releases (x₂ − x₁)·ΔE_rot/M, the rotational energy difference (ideal gas; at 1 bar
/// and 77 K the real-gas part is a small correction). An isothermal converter
/// reports that as its duty.
#[test]
fn an_isothermal_converter_removes_the_conversion_heat() {
    let blend = Blend::get().unwrap();
    let (t, p) = (77.0, 1.0e5);
    let x_eq = spin::equilibrium_para_fraction(t);
    let normal = blend.state_tp(t, p, 0.25).unwrap();
    let converted = blend.state_tp(t, p, x_eq).unwrap();
    let heat = normal.enthalpy - converted.enthalpy;
    let ideal = (x_eq - 0.25) * spin::ortho_para_energy_difference(t) / blend.normal.molar_mass;
    assert!(relative(heat, ideal) < 0.005, "{heat} vs {ideal}");

    let text = "title: converter check\nambient: 300 K\nfluids: [hydrogen]\nequipment:\n  - id: feed\n    kind: feed\n    fluid: hydrogen\n    temperature: 77 K\n    pressure: 1 bar\n    flow: 1 g/s\n    para_fraction: 0.25\n  - id: bed\n    kind: converter\n    inlet: feed\n    mode: isothermal\n  - id: out\n    kind: product\n    role: vent\n    inlet: bed\n";
    let path = std::env::temp_dir().join("cryochain-isothermal-converter.yaml");
    std::fs::write(&path, text).unwrap();
    let plant = load(&path, &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let bed = solution.units.iter().find(|u| u.id == "bed").unwrap();
    let duty = bed.performance.duty.unwrap();
    assert!(relative(duty, 1e-3 * heat) < 1e-9, "{duty}");
    let out = stream(&solution, "bed.out");
    assert!((out.state.temperature - t).abs() < 1e-9);
    assert!((out.state.para_fraction.unwrap() - x_eq).abs() < 1e-12);

    // Adiabatic: the stream warms, and ends in equilibrium at its new temperature.
    let adiabatic = load(
        &path,
        &[cryochain::flowsheet::Override::parse("bed.mode=adiabatic").unwrap()],
    )
    .unwrap();
    let solution = solve(&adiabatic, &Options::default()).unwrap();
    let out = stream(&solution, "bed.out");
    assert!(out.state.temperature > t + 5.0, "{}", out.state.temperature);
    let x = out.state.para_fraction.unwrap();
    assert!((x - spin::equilibrium_para_fraction(out.state.temperature)).abs() < 1e-9);
    assert!((out.state.enthalpy - normal.enthalpy).abs() < 1e-6 * normal.enthalpy.abs());
}

// --- 2. The aligned solution against the normal-hydrogen equation ------------------

/// cryochain's solution states agree with the same model built on CoolProp's
/// equations by an independent script.
#[test]
fn solution_states_match_the_coolprop_construction() {
    let blend = Blend::get().unwrap();
    let (header, rows) = read_csv("coolprop_blend_states.csv");
    let c = |name: &str| column(&header, name);
    let (t, p, x, rho, h, s) = (
        c("temperature_K"),
        c("pressure_Pa"),
        c("para_fraction"),
        c("density_kg_m3"),
        c("enthalpy_J_kg"),
        c("entropy_J_kgK"),
    );
    for row in &rows {
        let state = blend
            .state_tp(number(&row[t]), number(&row[p]), number(&row[x]))
            .unwrap();
        let label = format!("{} K, {} Pa, x = {}", row[t], row[p], row[x]);
        // Density within 1e-5: cryochain's orthohydrogen takes the paper's critical
        // density where CoolProp's copy differs (docs/methods.md), which moves
        // ortho densities by 2e-6 in the gas and 2e-5 in the dense fluid (50 K, 20 MPa).
        assert!(
            relative(state.density, number(&row[rho])) < 5e-5,
            "{label}: ρ {}",
            state.density
        );
        // Enthalpy and entropy: the ortho equations differ as above (up to 5 J/kg
        // and 0.15 J/(kg K), in the liquid at 20 K), and the two sides' ortho shifts
        // differ by about 185 J/kg and 0.5 J/(kg K) because their rotational levels
        // differ in the fifth digit; that shift enters with the ortho share less
        // the datum's 0.75.
        let ortho_change = (number(&row[x]) - 0.25).abs();
        let (dh, ds) = (
            (state.enthalpy - number(&row[h])).abs(),
            (state.entropy - number(&row[s])).abs(),
        );
        assert!(
            dh < 5.0 + 200.0 * ortho_change,
            "{label}: h {}",
            state.enthalpy
        );
        assert!(
            ds < 0.15 + 1.0 * ortho_change,
            "{label}: s {}",
            state.entropy
        );
    }
    assert_eq!(rows.len(), 54);
}

/// The 25 % solution against the normal-hydrogen equation (both Leachman et al.
/// 2009) from 15 K to 300 K and 0.05 to 100 MPa, where both give the same phase.
/// Measured: density within 0.28 % away from the critical region (28–40 K at
/// 0.5–3 MPa) and 0.64 % inside it; enthalpy within 2.2 kJ/kg up to 30 MPa and
/// 3.7 kJ/kg up to 100 MPa; entropy within 52 J/(kg K) (at the dew line, 20.5 K);
/// at 300 K, 1 atm both are equal by construction of the datum.
#[test]
fn the_normal_solution_is_close_to_the_normal_equation() {
    let blend = Blend::get().unwrap();
    let normal = fluid("hydrogen").unwrap();
    let near_critical = |t: f64, p: f64| (28.0..=40.0).contains(&t) && (0.5e6..=3e6).contains(&p);
    let (mut density_away, mut density_near, mut enthalpy_30, mut enthalpy_100, mut entropy) =
        (0.0_f64, 0.0_f64, 0.0_f64, 0.0_f64, 0.0_f64);
    let mut count = 0;
    for step in 0..=570 {
        let t = 15.0 + 0.5 * f64::from(step);
        for p in [
            0.05e6, 0.101325e6, 0.5e6, 1e6, 2e6, 5e6, 10e6, 20e6, 30e6, 50e6, 100e6,
        ] {
            let (Ok(solution), Ok(reference)) = (blend.state_tp(t, p, 0.25), normal.state_tp(t, p))
            else {
                continue;
            };
            if solution.phase != reference.phase {
                continue; // between the two boiling points
            }
            count += 1;
            let d = relative(solution.density, reference.density);
            if near_critical(t, p) {
                density_near = density_near.max(d);
            } else {
                density_away = density_away.max(d);
            }
            let dh = (solution.enthalpy - reference.enthalpy).abs();
            if p <= 30e6 {
                enthalpy_30 = enthalpy_30.max(dh);
            }
            enthalpy_100 = enthalpy_100.max(dh);
            entropy = entropy.max((solution.entropy - reference.entropy).abs());
        }
    }
    assert!(count > 6000, "{count}");
    assert!(density_away < 0.003, "{density_away}");
    assert!(density_near < 0.007, "{density_near}");
    assert!(enthalpy_30 < 2.5e3, "{enthalpy_30}");
    assert!(enthalpy_100 < 4.0e3, "{enthalpy_100}");
    assert!(entropy < 55.0, "{entropy}");
    let (a, b) = (
        blend.state_tp(300.0, ATMOSPHERE, 0.25).unwrap(),
        normal.state_tp(300.0, ATMOSPHERE).unwrap(),
    );
    assert!((a.enthalpy - b.enthalpy).abs() < 1e-6 && (a.entropy - b.entropy).abs() < 1e-9);
}

/// The frozen-normal demo and the same demo carrying a 25 % solution that never
/// meets a catalyst give nearly the same yield (the model difference above, seen in
/// a plant): within 0.3 %.
#[test]
fn a_solution_that_never_converts_behaves_as_normal_hydrogen() {
    let frozen = solved(FROZEN_DEMO).1.summary.liquid_yield.unwrap();
    let plant = load(
        Path::new(FROZEN_DEMO),
        &[cryochain::flowsheet::Override::parse("makeup.para_fraction=0.25").unwrap()],
    )
    .unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let carried = solution.summary.liquid_yield.unwrap();
    assert!(relative(carried, frozen) < 0.003, "{carried} vs {frozen}");
    assert!(solution
        .streams
        .iter()
        .filter(|f| f.state.fluid().name == "hydrogen")
        .all(|f| f.state.para_fraction == Some(0.25)));
}

// --- 3. Minimum work ---------------------------------------------------------------

/// Normal gas at 300 K, 1 atm to saturated liquid at 1 atm, T₀ = 300 K: about
/// 14.3 MJ/kg to parahydrogen and 12.1 MJ/kg normal to normal; within 0.2 % of the
/// CoolProp construction (measured: 1e-6).
#[test]
fn minimum_work_counts_the_conversion() {
    let blend = Blend::get().unwrap();
    let (header, rows) = read_csv("coolprop_para_minimum_work.csv");
    let (label, x, value) = (
        column(&header, "label"),
        column(&header, "para_fraction"),
        column(&header, "value"),
    );
    let feed = blend.state_tp(300.0, ATMOSPHERE, 0.25).unwrap();
    let work = |s: &cryochain::fluids::State| {
        (s.enthalpy - feed.enthalpy) - 300.0 * (s.entropy - feed.entropy)
    };
    for name in [
        "para-liquid",
        "equilibrium-liquid",
        "normal-liquid-solution",
    ] {
        let row = rows.iter().find(|r| r[label] == name).unwrap();
        let liquid = blend
            .state_p_quality(ATMOSPHERE, 0.0, number(&row[x]))
            .unwrap();
        let ours = work(&liquid);
        assert!(
            relative(ours, number(&row[value])) < 0.002,
            "{name}: {ours} vs {}",
            row[value]
        );
        assert!(relative(ours, number(&row[value])) < 1e-5);
    }
    let para = work(&blend.state_p_quality(ATMOSPHERE, 0.0, 1.0).unwrap());
    let normal = work(&blend.state_p_quality(ATMOSPHERE, 0.0, 0.25).unwrap());
    assert!((para - 14.3e6).abs() < 0.05e6, "{para}");
    assert!((normal - 12.1e6).abs() < 0.05e6, "{normal}");
}

/// The demo's minimum work is its product's (equilibrium liquid at 1.3 bar) exergy
/// less its normal feed's (300 K, 1.2 bar), per kg as CoolProp gives it.
#[test]
fn the_demo_minimum_work_is_that_of_a_para_product() {
    let (_, solution) = solved(DEMO);
    let (header, rows) = read_csv("coolprop_para_minimum_work.csv");
    let row = rows
        .iter()
        .find(|r| r[column(&header, "label")] == "equilibrium-liquid-1.3bar-from-1.2bar")
        .unwrap();
    let expected = number(&row[column(&header, "value")]);
    let s = &solution.summary;
    let per_kg = s.minimum_work / s.liquid_flow;
    assert!(relative(per_kg, expected) < 1e-5, "{per_kg} vs {expected}");
    let product = stream(&solution, "receiver.liquid");
    let x = product.state.para_fraction.unwrap();
    assert!((x - number(&row[column(&header, "para_fraction")])).abs() < 1e-4);
}

// --- 4. A catalytic cold exchanger -------------------------------------------------

/// Once-through cold box with and without a catalyst on the exchanger's hot side:
/// the energy balance closes including the conversion heat, and the yield and the
/// hot-side profile agree with the CoolProp segment-wise calculation.
#[test]
fn a_catalytic_exchanger_matches_an_independent_calculation() {
    let (header, rows) = read_csv("coolprop_catalytic_coldbox.csv");
    let c = |name: &str| column(&header, name);
    let reference = |case: &str| rows.iter().find(|r| r[c("case")] == case).unwrap().clone();
    let mut yields = Vec::new();
    for (file, case) in [(FROZEN, "frozen"), (CATALYTIC, "catalytic")] {
        let (_, solution) = solved(file);
        let row = reference(case);
        let feed = stream(&solution, "feed.out");
        let liquid = stream(&solution, "separator.liquid");
        let hot_out = stream(&solution, "cold-hx.hot-out");
        let cold_in = stream(&solution, "separator.vapor");
        let cold_out = stream(&solution, "cold-hx.cold-out");
        // The exchanger's balance, conversion heat included in the enthalpies.
        let hot = feed.flow * (feed.state.enthalpy - hot_out.state.enthalpy);
        let cold = cold_in.flow * (cold_out.state.enthalpy - cold_in.state.enthalpy);
        assert!(relative(hot, cold) < 1e-9, "{case}: {hot} vs {cold}");
        // The whole box: feed in, liquid and warm vapour out.
        let closure = (feed.flow * feed.state.enthalpy
            - liquid.flow * liquid.state.enthalpy
            - cold_out.flow * cold_out.state.enthalpy)
            / (feed.flow * feed.state.enthalpy).abs();
        assert!(closure.abs() < 1e-9, "{case}: {closure}");
        assert!(solution.summary.energy_closure.abs() < 1e-9);
        let y = liquid.flow / feed.flow;
        let expected = number(&row[c("liquid_yield")]);
        assert!(
            (y - expected).abs() < 2e-5,
            "{case}: yield {y} vs {expected}"
        );
        let x = liquid.state.para_fraction.unwrap();
        assert!(
            (x - number(&row[c("product_para_fraction")])).abs() < 3e-4, // x_eq(40 K) differs by 1e-4
            "{case}: {x}"
        );
        assert!(
            (hot_out.state.temperature - number(&row[c("hot_outlet_temperature_K")])).abs() < 2e-3,
            "{case}: {}",
            hot_out.state.temperature
        );
        // The hot side's temperature at each tenth of the duty.
        let unit = solution.units.iter().find(|u| u.id == "cold-hx").unwrap();
        let Details::Exchanger(report) = &unit.performance.details else {
            panic!("no exchanger report")
        };
        let total = report.profile.last().unwrap().duty;
        for k in 0..=10 {
            let q = total * f64::from(k) / 10.0;
            let i = report
                .profile
                .windows(2)
                .position(|w| w[1].duty >= q - 1e-12)
                .unwrap();
            let (a, b) = (&report.profile[i], &report.profile[i + 1]);
            let share = if b.duty > a.duty {
                (q - a.duty) / (b.duty - a.duty)
            } else {
                0.0
            };
            let t = a.hot_temperature + share * (b.hot_temperature - a.hot_temperature);
            let expected = number(&row[c(&format!("hot_temperature_at_{k}0pct_K"))]);
            // Linear interpolation between 100 segments: within 5 mK.
            assert!(
                (t - expected).abs() < 5e-3,
                "{case} at {k}0 %: {t} vs {expected}"
            );
        }
        yields.push(y);
    }
    let fall = yields[0] - yields[1];
    let expected = number(&reference("frozen")[c("liquid_yield")])
        - number(&reference("catalytic")[c("liquid_yield")]);
    assert!(fall > 0.05, "{fall}");
    assert!((fall - expected).abs() < 3e-5, "fall {fall} vs {expected}");
}

// --- Products, storage and the finding ---------------------------------------------

/// The converting demo's product is above 95 % para and keeps in storage; the
/// frozen-normal demo's is normal, flagged, and loses about 18 % in a day (the
/// figure usually quoted; from memory), so that after a week it keeps less liquid
/// than the converting plant makes.
#[test]
fn the_demo_makes_a_storable_product() {
    let (plant, converting) = solved(DEMO);
    let storage = converting.summary.hydrogen_storage.unwrap();
    assert!(storage.para_fraction > 0.95, "{storage:?}");
    assert!(storage.boiled_off_after[1] < 0.001);
    assert!(!check(&plant, &converting)
        .iter()
        .any(|f| f.id == "hydrogen-product-unconverted"));

    let (plant, frozen) = solved(FROZEN_DEMO);
    let storage = frozen.summary.hydrogen_storage.unwrap();
    assert_eq!(storage.para_fraction, 0.25);
    assert!(
        (storage.boiled_off_after[0] - 0.18).abs() < 0.01,
        "{storage:?}"
    );
    let finding = check(&plant, &frozen)
        .into_iter()
        .find(|f| f.id == "hydrogen-product-unconverted")
        .expect("the frozen demo's product is flagged");
    assert_eq!(finding.equipment.as_deref(), Some("lh2"));
    assert!(finding.message.contains("18.1 %"), "{}", finding.message);
    let week = |s: &Solution| {
        let outlook = s.summary.hydrogen_storage.unwrap();
        s.summary.liquid_yield.unwrap() * (1.0 - outlook.boiled_off_after[1])
    };
    assert!(week(&converting) > week(&frozen));
    // Conversion costs liquid made: the converting plant makes less at once.
    assert!(converting.summary.liquid_yield.unwrap() < frozen.summary.liquid_yield.unwrap());
}

// --- The command line ----------------------------------------------------------------

#[test]
fn state_takes_a_para_fraction() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let (code, out, err) = common::run_in(
        root,
        &[
            "state",
            "hydrogen",
            "T=77K",
            "p=1bar",
            "para=equilibrium",
            "--json",
        ],
    );
    assert_eq!(code, 0, "{err}");
    let value: serde_json::Value = serde_json::from_str(&out).unwrap();
    let x = value["para_fraction"].as_f64().unwrap();
    assert!((x - spin::equilibrium_para_fraction(77.0)).abs() < 1e-12);
    assert_eq!(value["equilibrium_para_fraction"].as_f64().unwrap(), x);

    let (code, out, _) = common::run_in(
        root,
        &["state", "hydrogen", "T=77K", "p=1bar", "para=0.5", "--json"],
    );
    assert_eq!(code, 0);
    let value: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(value["para_fraction"].as_f64(), Some(0.5));
    let expected = Blend::get().unwrap().state_tp(77.0, 1e5, 0.5).unwrap();
    assert_eq!(value["enthalpy_J_kg"].as_f64(), Some(expected.enthalpy));

    // Without para= nothing changes: no para keys.
    let (code, out, _) = common::run_in(root, &["state", "hydrogen", "T=77K", "p=1bar", "--json"]);
    assert_eq!(code, 0);
    assert!(!out.contains("para_fraction"));

    // Out of range, or on another fluid: an input error (exit 1) that says why.
    let (code, _, err) =
        common::run_in(root, &["state", "hydrogen", "T=77K", "p=1bar", "para=1.5"]);
    assert_eq!(code, 1);
    assert!(err.contains("0 to 1"), "{err}");
    let (code, _, err) =
        common::run_in(root, &["state", "nitrogen", "T=77K", "p=1bar", "para=0.5"]);
    assert_eq!(code, 1);
    assert!(err.contains("hydrogen only"), "{err}");
}

/// Hydrogen streams show their para fraction in the text, JSON and CSV outputs.
#[test]
fn streams_show_their_para_fraction() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let (code, out, err) = common::run_in(root, &["solve", DEMO]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("Hydrogen para fraction"));
    let (_, json, _) = common::run_in(root, &["solve", DEMO, "--json"]);
    let value: serde_json::Value = serde_json::from_str(&json).unwrap();
    let streams = value["streams"].as_array().unwrap();
    assert!(streams
        .iter()
        .all(|s| s["para_fraction"].as_f64().is_some()));
    let folder = std::env::temp_dir().join("cryochain-ortho-para-csv");
    let _ = std::fs::remove_dir_all(&folder);
    let (code, _, err) = common::run_in(root, &["solve", DEMO, "--csv", folder.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    let csv = std::fs::read_to_string(folder.join("streams.csv")).unwrap();
    let header: Vec<&str> = csv.lines().next().unwrap().split(',').collect();
    let column = header
        .iter()
        .position(|h| h.starts_with("para fraction"))
        .unwrap();
    for line in csv.lines().skip(1) {
        let x: f64 = line.split(',').nth(column).unwrap().parse().unwrap();
        assert!((0.25..=1.0).contains(&x), "{line}");
    }
}

/// (p, h) and (p, s) flashes of the solution return the (T, p) state they came from
/// (a round trip: the flash's own consistency), at fixed fractions and on the
/// equilibrium path, in the gas, the compressed liquid, near saturation and at
/// high pressure.
#[test]
fn solution_flashes_round_trip() {
    let blend = Blend::get().unwrap();
    let mut count = 0;
    for t in [
        14.5, 18.0, 20.0, 22.0, 25.0, 30.0, 35.0, 45.0, 60.0, 80.0, 150.0, 300.0, 900.0,
    ] {
        for p in [
            0.08e6, 0.101325e6, 0.13e6, 0.5e6, 1.0e6, 2.0e6, 12.0e6, 50.0e6,
        ] {
            for x in [0.0, 0.25, 0.5, 0.9, 1.0] {
                let Ok(state) = blend.state_tp(t, p, x) else {
                    continue; // the solid, or the window between the critical points
                };
                count += 1;
                let back = blend.state_ph(p, state.enthalpy, x).unwrap();
                assert!(
                    (back.temperature - t).abs() < 1e-9 * t,
                    "(p, h) at {t} K, {p} Pa, x = {x}: {}",
                    back.temperature
                );
                let back = blend.state_ps(p, state.entropy, x).unwrap();
                assert!(
                    (back.temperature - t).abs() < 1e-9 * t,
                    "(p, s) at {t} K, {p} Pa, x = {x}: {}",
                    back.temperature
                );
            }
            let x = spin::equilibrium_para_fraction(t);
            if let Ok(state) = blend.state_tp(t, p, x) {
                let back = blend.state_ph_equilibrium(p, state.enthalpy).unwrap();
                assert!(
                    (back.temperature - t).abs() < 1e-9 * t,
                    "equilibrium (p, h) at {t} K, {p} Pa: {}",
                    back.temperature
                );
                assert!((back.para_fraction.unwrap() - x).abs() < 1e-9);
                // Seeded from a far state, the same answer.
                let far = blend.state_tp(300.0, p, 0.25).unwrap();
                let seeded = blend
                    .state_ph_equilibrium_near(p, state.enthalpy, &far)
                    .unwrap();
                assert!((seeded.temperature - t).abs() < 1e-9 * t);
            }
        }
    }
    assert!(count > 350, "{count}");
    // Two phase: a quality in, the same quality out.
    for p in [0.08e6, 0.101325e6, 0.5e6, 1.1e6] {
        for x in [0.25, 0.9, 1.0] {
            let state = blend.state_p_quality(p, 0.3, x).unwrap();
            let back = blend.state_ph(p, state.enthalpy, x).unwrap();
            assert!(
                (back.quality.unwrap() - 0.3).abs() < 1e-9,
                "{p} Pa, x = {x}"
            );
        }
    }
    // An enthalpy no state has at that pressure is refused, not extrapolated.
    assert!(blend.state_ph(0.1e6, 1e9, 0.5).is_err());
    assert!(blend.state_ph(12e6, -1e9, 0.5).is_err());
}

/// A search started from a guess (a profile's extrapolated temperature, a mixer's
/// weighted inlet temperature, the last pass's tear stream) finds the same state as
/// one from no guess, whatever the guess: far off, on the other side of the
/// two-phase band, inside it, or at the answer. Compared with the plain (p, h)
/// flash to 1e-13 of the temperature (both end within rounding of the root).
#[test]
fn a_search_from_any_guess_finds_the_same_state() {
    use cryochain::fluids::conversion::StreamPath;
    let blend = Blend::get().unwrap();
    let mut count = 0;
    for p in [0.08e6, 0.13e6, 1.0e6, 2.0e6, 12.0e6] {
        for t in [15.0, 20.0, 21.0, 24.0, 35.0, 60.0, 80.0, 150.0, 300.0] {
            for x in [0.25, 0.5, 0.9985] {
                let Ok(state) = blend.state_tp(t, p, x) else {
                    continue;
                };
                let plain = blend.state_ph(p, state.enthalpy, x).unwrap();
                for guess in [14.2, 20.8, 0.5 * t, t, 1.5 * t, 900.0] {
                    let from = blend.state_ph_from(p, state.enthalpy, x, guess).unwrap();
                    assert!(
                        (from.temperature - plain.temperature).abs() < 1e-13 * t,
                        "{t} K, {p} Pa, x = {x}, guess {guess} K: {} against {}",
                        from.temperature,
                        plain.temperature
                    );
                    count += 1;
                }
            }
            // Along a catalyst: the equilibrium path, from guesses and from one, two
            // or three neighbours on either side.
            let x = spin::equilibrium_para_fraction(t);
            let Ok(state) = blend.state_tp(t, p, x) else {
                continue;
            };
            let path = StreamPath::new(&state, true, "test").unwrap();
            let plain = path.state_ph(p, state.enthalpy).unwrap();
            assert!((plain.temperature - t).abs() < 1e-9 * t);
            let neighbours = [0.97, 0.99, 1.01, 1.03]
                .map(|f| blend.state_tp(f * t, p, spin::equilibrium_para_fraction(f * t)));
            for guess in [14.2, 20.8, 0.5 * t, 1.5 * t, 900.0] {
                let from = path.state_ph_guessed(p, state.enthalpy, guess).unwrap();
                assert!((from.temperature - plain.temperature).abs() < 1e-13 * t);
                count += 1;
            }
            for order in [&[0, 1][..], &[3, 2], &[1, 0], &[0, 1, 2], &[3, 2, 1], &[2]] {
                let Ok(previous) = order
                    .iter()
                    .map(|&i| neighbours[i].clone())
                    .collect::<Result<Vec<_>, _>>()
                else {
                    continue;
                };
                let near = previous.last().unwrap();
                let along = path.state_along(p, state.enthalpy, &previous).unwrap();
                assert!(
                    (along.temperature - plain.temperature).abs() < 1e-13 * t,
                    "{t} K, {p} Pa along from {} K: {}",
                    near.temperature,
                    along.temperature
                );
                count += 1;
            }
        }
    }
    assert!(count > 500, "{count}");
}

/// Robustness of the converting demo across a wide design space (20–300 bar,
/// 79.5–200 K after the bath). Measured: 96 of 100 cases converge; the four left,
/// all at 300 bar, are refused because the high-pressure stream leaves the cold
/// exchanger in the parahydrogen solid (29.9 MPa at about 21.15 K, where it melts at
/// 27.7 MPa), the equipment, pressure, temperature and melting pressure named. (Until
/// the converging passes stopped flashing each end-approach exchanger's end-limited
/// outlets, the same four failed as non-convergence: those flashes, at the cold
/// inlet's temperature, fell into the solid and failed the passes.) A failure that
/// is neither a named non-convergence nor that refusal fails the test.
/// A case solved after another, on the same thread, gives the same figures to the
/// bit as solved first: what one solve leaves behind on its thread (the memories
/// of its flashes, the species' states its searches start from) never changes the
/// next one's answers, so that a study's cases do not depend on which thread ran
/// them. (Common practice for reproducible studies; no source.)
#[test]
fn a_case_solved_after_another_is_the_same_to_the_bit() {
    let bits = |solution: &Solution| -> Vec<u64> {
        solution
            .streams
            .iter()
            .flat_map(|s| {
                [
                    s.state.temperature,
                    s.state.enthalpy,
                    s.state.density,
                    s.flow,
                ]
            })
            .map(f64::to_bits)
            .collect()
    };
    for (file, change) in [
        (DEMO, "compressor.outlet_pressure=125 bar"),
        (CATALYTIC, "feed.temperature=41 K"),
    ] {
        let plant = load(Path::new(file), &[]).unwrap();
        let other = load(
            Path::new(file),
            &[cryochain::flowsheet::Override::parse(change).unwrap()],
        )
        .unwrap();
        let first = bits(&solve(&plant, &Options::default()).unwrap());
        solve(&other, &Options::default()).unwrap();
        let again = bits(&solve(&plant, &Options::default()).unwrap());
        assert!(
            first == again,
            "{file}: the figures changed after another case was solved"
        );
    }
}

#[test]
fn the_converting_demo_converges_across_a_wide_sweep() {
    use cryochain::study::{sweep, Variable};
    let text = std::fs::read_to_string(DEMO).unwrap();
    let vars = [
        Variable::parse_range("compressor.outlet_pressure=20bar..300bar:10").unwrap(),
        Variable::parse_range("ln2-bath.outlet_temperature=79.5K..200K:10").unwrap(),
    ];
    let study = sweep(&text, DEMO, &[], &vars, None, &|_, _| {}).unwrap();
    let failed: Vec<&String> = study
        .cases
        .iter()
        .filter_map(|c| c.outcome.as_ref().err())
        .collect();
    assert!(failed.len() <= 8, "{} of 100 failed", failed.len());
    for reason in failed {
        let unconverged = reason.contains("did not converge after")
            && reason.contains("last residual")
            && reason.contains("tear streams");
        let frozen = reason.contains("in equipment 'cold-hx'")
            && reason.contains("this is in the solid")
            && reason.contains("melting pressure");
        assert!(unconverged || frozen, "{reason}");
    }
    // Cold after the bath and near 150 bar it makes the most liquid.
    let best = study
        .cases
        .iter()
        .filter_map(|c| c.outcome.as_ref().ok().map(|m| (c, m)))
        .filter(|(_, m)| m.feasible())
        .max_by(|a, b| a.1.liquid_yield.total_cmp(&b.1.liquid_yield))
        .unwrap();
    assert!(best.0.coordinates[1] < 80.0, "{:?}", best.0.coordinates);
    // Coordinates in the units of the --vary ranges: bar and K.
    assert!(
        (100.0..=200.0).contains(&best.0.coordinates[0]),
        "{:?}",
        best.0.coordinates
    );
}

/// A valve's path on the T–p diagram starts at its inlet and ends at its outlet
/// for hydrogen that carries its para fraction (flashed on the solution, not on the
/// normal equation at the same enthalpy, which put it 30 K off).
#[test]
fn a_valve_path_follows_the_solution() {
    let (_, solution) = solved(DEMO);
    let inlet = &stream(&solution, "cold-hx.hot-out").state;
    let outlet = &stream(&solution, "jt-valve.out").state;
    let path = cryochain::fluids::diagram::throttling_path(inlet, outlet.pressure, 40);
    let (first, last) = (path[0], *path.last().unwrap());
    assert!((first.0 - inlet.temperature).abs() < 1e-6, "{first:?}");
    assert!((last.0 - outlet.temperature).abs() < 1e-6, "{last:?}");
    assert!(path.len() >= 35, "{}", path.len());
}
