//! Checks against the equation-of-state papers' own property tables, as collected in
//! shared/reference/published-check-values.md. Each check names its paper. The papers
//! print 4–5 significant figures; every comparison allows half a unit in the last
//! printed digit.

use cryochain::fluids::{self, Fluid};

/// Asserts |value − printed| ≤ half a unit of the printed value's last digit.
/// `printed` is the table's text, so its number of decimals is known exactly.
fn assert_printed(what: &str, value: f64, printed: &str) {
    let reference: f64 = printed.parse().unwrap();
    let decimals = printed.split('.').nth(1).map_or(0, str::len) as i32;
    let half_unit = 0.5 * 10f64.powi(-decimals);
    assert!(
        (value - reference).abs() <= half_unit * (1.0 + 1e-9),
        "{what}: computed {value}, table {printed} (allowed ±{half_unit})"
    );
}

/// Molar units of the nitrogen paper: mol/dm³, J/mol, J/(mol·K).
fn molar(fluid: &Fluid) -> (f64, f64) {
    // ρ [mol/dm³] = ρ [kg/m³] / (M [kg/mol] · 1000); per-mol = per-kg · M.
    (1.0 / (fluid.molar_mass * 1000.0), fluid.molar_mass)
}

/// Span, Lemmon, Jacobsen, Wagner, Yokozeki, J. Phys. Chem. Ref. Data 29 (2000) 1361,
/// single-phase table values.
#[test]
fn nitrogen_single_phase_span_2000() {
    let n2 = fluids::fluid("nitrogen").unwrap();
    let (to_mol_dm3, per_mol) = molar(n2);
    // (T K, p MPa, ρ, u, h, s, cv, cp, w) as printed.
    let rows = [
        (
            80.0, 0.1, "0.15633", "1605.7", "2245.4", "152.70", "21.48", "31.15", "178.3",
        ),
        (
            1000.0, 2.0, "0.23889", "21800", "30172", "203.24", "24.40", "32.75", "635.5",
        ),
        (
            100.0, 100.0, "31.793", "-3136.1", "9.22", "81.024", "31.89", "47.93", "1208",
        ),
    ];
    for (t, p, rho, u, h, s, cv, cp, w) in rows {
        let state = n2.state_tp(t, p * 1e6).unwrap();
        let at = format!("N2 {t} K {p} MPa");
        assert_printed(&format!("{at} ρ"), state.density * to_mol_dm3, rho);
        assert_printed(&format!("{at} u"), state.internal_energy * per_mol, u);
        assert_printed(&format!("{at} h"), state.enthalpy * per_mol, h);
        assert_printed(&format!("{at} s"), state.entropy * per_mol, s);
        assert_printed(&format!("{at} cv"), state.cv().unwrap() * per_mol, cv);
        assert_printed(&format!("{at} cp"), state.cp().unwrap() * per_mol, cp);
        assert_printed(&format!("{at} w"), state.speed_of_sound().unwrap(), w);
    }
}

/// Span et al. (2000), the triple point 63.151 K, and the paper's reference state
/// (ideal gas at 298.15 K and 0.101325 MPa: h = 8670 J/mol, s = 191.5 J/(mol·K)).
#[test]
fn nitrogen_triple_point_span_2000() {
    let n2 = fluids::fluid("nitrogen").unwrap();
    let (to_mol_dm3, per_mol) = molar(n2);
    let sat = n2.saturation_at_temperature(63.151).unwrap();
    assert_printed("N2 triple p [MPa]", sat.vapour.pressure / 1e6, "0.01252");
    let l = n2.properties(63.151, sat.liquid.density);
    let v = n2.properties(63.151, sat.vapour.density);
    assert_printed("N2 triple ρ′", l.density * to_mol_dm3, "30.957");
    assert_printed("N2 triple h′", l.enthalpy * per_mol, "-4222.6");
    assert_printed("N2 triple s′", l.entropy * per_mol, "67.951");
    assert_printed("N2 triple cv′", l.cv * per_mol, "32.95");
    assert_printed("N2 triple cp′", l.cp * per_mol, "56.03");
    assert_printed("N2 triple w′", l.speed_of_sound, "995.3");
    assert_printed("N2 triple ρ″", v.density * to_mol_dm3, "0.02407");
    assert_printed("N2 triple cv″", v.cv * per_mol, "21.01");
    assert_printed("N2 triple cp″", v.cp * per_mol, "29.65");
    assert_printed("N2 triple w″", v.speed_of_sound, "161.1");
    // Reference state of the paper, an ideal-gas point.
    let h0 = n2.ideal_gas_enthalpy(298.15) * per_mol;
    assert_printed("N2 ideal-gas h at 298.15 K", h0, "8670");
}

/// Leachman, Jacobsen, Penoncello, Lemmon, J. Phys. Chem. Ref. Data 38 (2009) 721,
/// saturation at 20 K: Table 13 (para), Table 14 (normal), Table 15 (ortho).
#[test]
fn hydrogen_saturation_at_20_k_leachman_2009() {
    // (fluid, p kPa, ρ′, ρ″ kg/m³, cv′, cv″, cp′, cp″ kJ/(kg·K), w′, w″ m/s)
    let rows = [
        (
            "parahydrogen",
            "93.414",
            "71.135",
            "1.2440",
            "5.6371",
            "6.4499",
            "9.5688",
            "11.920",
            "1118.6",
            "353.50",
        ),
        (
            "hydrogen", "90.717", "71.265", "1.2059", "5.6369", "6.4343", "9.5697", "11.892",
            "1129.1", "354.31",
        ),
        (
            "orthohydrogen",
            "90.417",
            "71.291",
            "1.1977",
            "5.6050",
            "6.4172",
            "9.5449",
            "11.813",
            "1137.1",
            "354.41",
        ),
    ];
    for (name, p, rl, rv, cvl, cvv, cpl, cpv, wl, wv) in rows {
        let fluid = fluids::fluid(name).unwrap();
        let sat = fluid.saturation_at_temperature(20.0).unwrap();
        let l = fluid.properties(20.0, sat.liquid.density);
        let v = fluid.properties(20.0, sat.vapour.density);
        assert_printed(&format!("{name} p"), sat.vapour.pressure / 1e3, p);
        assert_printed(&format!("{name} ρ′"), l.density, rl);
        assert_printed(&format!("{name} ρ″"), v.density, rv);
        assert_printed(&format!("{name} cv′"), l.cv / 1e3, cvl);
        assert_printed(&format!("{name} cv″"), v.cv / 1e3, cvv);
        assert_printed(&format!("{name} cp′"), l.cp / 1e3, cpl);
        assert_printed(&format!("{name} cp″"), v.cp / 1e3, cpv);
        assert_printed(&format!("{name} w′"), l.speed_of_sound, wl);
        assert_printed(&format!("{name} w″"), v.speed_of_sound, wv);
    }
    // Normal hydrogen enthalpies in the paper's normal-boiling-point convention.
    let h2 = fluids::fluid("hydrogen").unwrap();
    let sat = h2.saturation_at_temperature(20.0).unwrap();
    let l = h2.properties(20.0, sat.liquid.density);
    let v = h2.properties(20.0, sat.vapour.density);
    assert_printed("normal H2 h′ at 20 K", l.enthalpy / 1e3, "-3.6672");
    assert_printed("normal H2 h″ at 20 K", v.enthalpy / 1e3, "446.64");
}

/// Leachman et al. (2009): triple points of the three hydrogen forms.
#[test]
fn hydrogen_triple_points_leachman_2009() {
    for (name, t, p_kpa) in [
        ("parahydrogen", 13.8033, "7.041"),
        ("hydrogen", 13.957, "7.358"),
        ("orthohydrogen", 14.008, "7.56"),
    ] {
        let fluid = fluids::fluid(name).unwrap();
        assert_eq!(fluid.triple_temperature, t, "{name} triple temperature");
        let sat = fluid.saturation_at_temperature(t).unwrap();
        assert_printed(
            &format!("{name} triple p"),
            sat.vapour.pressure / 1e3,
            p_kpa,
        );
    }
}

/// Tegeler, Span, Wagner, J. Phys. Chem. Ref. Data 28 (1999) 779: triple point
/// 83.8058 K and the ideal-gas-like state at 700 K, 0.1 MPa.
#[test]
fn argon_tegeler_1999() {
    let ar = fluids::fluid("argon").unwrap();
    let t = 83.8058;
    let sat = ar.saturation_at_temperature(t).unwrap();
    let l = ar.properties(t, sat.liquid.density);
    let v = ar.properties(t, sat.vapour.density);
    assert_printed("Ar triple p [MPa]", sat.vapour.pressure / 1e6, "0.068891");
    assert_printed("Ar ρ′", l.density, "1416.77");
    assert_printed("Ar cv′", l.cv / 1e3, "0.54960");
    assert_printed("Ar cp′", l.cp / 1e3, "1.1157");
    assert_printed("Ar w′", l.speed_of_sound, "862.43");
    assert_printed("Ar ρ″", v.density, "4.0546");
    assert_printed("Ar cv″", v.cv / 1e3, "0.32471");
    assert_printed("Ar cp″", v.cp / 1e3, "0.55503");
    assert_printed("Ar w″", v.speed_of_sound, "168.12");
    let gas = ar.state_tp(700.0, 0.1e6).unwrap();
    assert_printed("Ar 700 K ρ", gas.density, "0.68619");
    assert_printed("Ar 700 K cv", gas.cv().unwrap() / 1e3, "0.31223");
    assert_printed("Ar 700 K cp", gas.cp().unwrap() / 1e3, "0.5205");
    assert_printed("Ar 700 K w", gas.speed_of_sound().unwrap(), "492.95");
}

/// Setzmann, Wagner, J. Phys. Chem. Ref. Data 20 (1991) 1061: triple point
/// 90.694 K (90.6941 K in the paper's text; the table prints it rounded) and the
/// vapour at 115 K, 0.1 MPa.
#[test]
fn methane_setzmann_wagner_1991() {
    let ch4 = fluids::fluid("methane").unwrap();
    let t = ch4.triple_temperature;
    assert_eq!(t, 90.6941);
    let sat = ch4.saturation_at_temperature(t).unwrap();
    let l = ch4.properties(t, sat.liquid.density);
    let v = ch4.properties(t, sat.vapour.density);
    assert_printed("CH4 triple p [MPa]", sat.vapour.pressure / 1e6, "0.011696");
    assert_printed("CH4 ρ′", l.density, "451.48");
    assert_printed("CH4 cv′", l.cv / 1e3, "2.1677");
    assert_printed("CH4 cp′", l.cp / 1e3, "3.3678");
    assert_printed("CH4 w′", l.speed_of_sound, "1538.6");
    assert_printed("CH4 ρ″", v.density, "0.25074");
    assert_printed("CH4 cv″", v.cv / 1e3, "1.5735");
    assert_printed("CH4 cp″", v.cp / 1e3, "2.1100");
    assert_printed("CH4 w″", v.speed_of_sound, "249.13");
    let gas = ch4.state_tp(115.0, 0.1e6).unwrap();
    assert_printed("CH4 115 K ρ", gas.density, "1.7341");
    assert_printed("CH4 115 K cv", gas.cv().unwrap() / 1e3, "1.6041");
    assert_printed("CH4 115 K cp", gas.cp().unwrap() / 1e3, "2.1957");
    assert_printed("CH4 115 K w", gas.speed_of_sound().unwrap(), "276.16");
}

/// Lemmon, Jacobsen, Penoncello, Friend, J. Phys. Chem. Ref. Data 29 (2000) 331:
/// air at 500 K, 0.2 MPa, and its bubble and dew pressures at 100 K.
#[test]
fn air_lemmon_2000() {
    let air = fluids::fluid("air").unwrap();
    let (to_mol_dm3, per_mol) = molar(air);
    let gas = air.state_tp(500.0, 0.2e6).unwrap();
    assert_printed("air ρ", gas.density * to_mol_dm3, "0.048077");
    assert_printed("air cv", gas.cv().unwrap() * per_mol, "21.51");
    assert_printed("air cp", gas.cp().unwrap() * per_mol, "29.84");
    assert_printed("air w", gas.speed_of_sound().unwrap(), "446.6");
    let sat = air.saturation_at_temperature(100.0).unwrap();
    assert_printed("air bubble p [MPa]", sat.liquid.pressure / 1e6, "0.66313");
    assert_printed("air dew p [MPa]", sat.vapour.pressure / 1e6, "0.56742");
}
