//! Property values checked against the CoolProp library (PyPI, version recorded in
//! the first line of each file), which implements the same published equations of
//! state. The data come from tests/reference/generate_coolprop.py.
//!
//! Tolerances (issue "done means" 3): density and saturation pressure 1e-7 relative;
//! enthalpy and entropy differences between states 1e-7 relative; cp, cv and speed of
//! sound 1e-6 relative. Differences are taken from one anchor state per fluid (its
//! first gas state), because the two programs may fix the zero of h and s
//! differently. A difference is compared relative to its own size, with a floor of
//! R·Tc (enthalpy) or R (entropy) so that a difference near zero is not divided by ~0.

// `!(err <= tol)` also fails on NaN, which `err > tol` would let through.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod common;
use common::{column, read_csv, relative};
use cryochain::fluids;
use std::collections::BTreeMap;

#[derive(Default, Debug)]
struct Worst {
    density: f64,
    enthalpy: f64,
    entropy: f64,
    cp: f64,
    cv: f64,
    sound: f64,
    count: usize,
}

#[test]
fn single_phase_states_match_coolprop() {
    let (header, rows) = read_csv("coolprop_states.csv");
    let c = |n: &str| column(&header, n);
    let (cf, ct, cpp, crho, ch, cs, ccp, ccv, cw) = (
        c("fluid"),
        c("T_K"),
        c("p_Pa"),
        c("rho_kg_m3"),
        c("h_J_kg"),
        c("s_J_kgK"),
        c("cp_J_kgK"),
        c("cv_J_kgK"),
        c("w_m_s"),
    );
    let mut anchors: BTreeMap<String, (f64, f64, f64, f64)> = BTreeMap::new();
    let mut worst: BTreeMap<String, Worst> = BTreeMap::new();
    let mut failures = Vec::new();
    for row in &rows {
        let name = row[cf].clone();
        let num = |i: usize| row[i].parse::<f64>().unwrap();
        let (t, p) = (num(ct), num(cpp));
        let fluid = fluids::fluid(&name).unwrap();
        let state = match fluid.state_tp(t, p) {
            Ok(s) => s,
            Err(e) => {
                failures.push(format!("{name} {} T={t} p={p}: {e}", row[1]));
                continue;
            }
        };
        let anchor = *anchors.entry(name.clone()).or_insert((
            state.enthalpy,
            state.entropy,
            num(ch),
            num(cs),
        ));
        let r = fluid.gas_constant;
        let tc = fluid.critical.temperature;
        let dh_ours = state.enthalpy - anchor.0;
        let dh_ref = num(ch) - anchor.2;
        let ds_ours = state.entropy - anchor.1;
        let ds_ref = num(cs) - anchor.3;
        let errors = [
            ("density", relative(state.density, num(crho)), 1e-7),
            (
                "enthalpy",
                (dh_ours - dh_ref).abs() / dh_ref.abs().max(r * tc),
                1e-7,
            ),
            (
                "entropy",
                (ds_ours - ds_ref).abs() / ds_ref.abs().max(r),
                1e-7,
            ),
            ("cp", relative(state.cp().unwrap(), num(ccp)), 1e-6),
            ("cv", relative(state.cv().unwrap(), num(ccv)), 1e-6),
            (
                "sound",
                relative(state.speed_of_sound().unwrap(), num(cw)),
                1e-6,
            ),
        ];
        let w = worst.entry(name.clone()).or_default();
        w.count += 1;
        for (what, err, tol) in errors {
            let slot = match what {
                "density" => &mut w.density,
                "enthalpy" => &mut w.enthalpy,
                "entropy" => &mut w.entropy,
                "cp" => &mut w.cp,
                "cv" => &mut w.cv,
                _ => &mut w.sound,
            };
            *slot = slot.max(err);
            if !(err <= tol) {
                failures.push(format!(
                    "{name} {} T={t} p={p}: {what} off by {err:.2e} (tolerance {tol:.0e})",
                    row[1]
                ));
            }
        }
    }
    for (name, w) in &worst {
        eprintln!(
            "{name:14} {:3} states  worst: rho {:.1e}  dh {:.1e}  ds {:.1e}  cp {:.1e}  cv {:.1e}  w {:.1e}",
            w.count, w.density, w.enthalpy, w.entropy, w.cp, w.cv, w.sound
        );
        assert!(w.count >= 150, "{name}: only {} states", w.count);
    }
    assert_eq!(worst.len(), 10, "every fluid checked");
    assert!(
        failures.is_empty(),
        "{} failures:\n{}",
        failures.len(),
        failures[..failures.len().min(40)].join("\n")
    );
}

#[test]
fn saturation_matches_coolprop() {
    let (header, rows) = read_csv("coolprop_saturation.csv");
    let c = |n: &str| column(&header, n);
    let mut failures = Vec::new();
    let mut per_fluid: BTreeMap<String, (usize, f64)> = BTreeMap::new();
    for row in &rows {
        let name = &row[c("fluid")];
        let num = |n: &str| row[c(n)].parse::<f64>().unwrap();
        let t = num("T_K");
        let fluid = fluids::fluid(name).unwrap();
        let sat = match fluid.saturation_at_temperature(t) {
            Ok(s) => s,
            Err(e) => {
                failures.push(format!("{name} T={t}: {e}"));
                continue;
            }
        };
        let checks = [
            ("p liquid", sat.liquid.pressure, num("p_liquid_Pa")),
            ("p vapour", sat.vapour.pressure, num("p_vapour_Pa")),
            ("rho liquid", sat.liquid.density, num("rho_liquid_kg_m3")),
            ("rho vapour", sat.vapour.density, num("rho_vapour_kg_m3")),
        ];
        let entry = per_fluid.entry(name.clone()).or_default();
        entry.0 += 1;
        for (what, ours, theirs) in checks {
            let err = relative(ours, theirs);
            entry.1 = entry.1.max(err);
            if !(err <= 1e-7) {
                failures.push(format!(
                    "{name} T={t}: {what} {ours} vs {theirs} ({err:.2e})"
                ));
            }
        }
        // Latent heat and entropy of vaporisation need no common reference state.
        let l = fluid.properties(t, sat.liquid.density);
        let v = fluid.properties(t, sat.vapour.density);
        for (what, ours, theirs) in [
            (
                "latent heat",
                v.enthalpy - l.enthalpy,
                num("h_vapour_J_kg") - num("h_liquid_J_kg"),
            ),
            (
                "entropy of vaporisation",
                v.entropy - l.entropy,
                num("s_vapour_J_kgK") - num("s_liquid_J_kgK"),
            ),
        ] {
            let err = relative(ours, theirs);
            if !(err <= 1e-7) {
                failures.push(format!(
                    "{name} T={t}: {what} {ours} vs {theirs} ({err:.2e})"
                ));
            }
        }
    }
    for (name, (count, worst)) in &per_fluid {
        eprintln!("{name:14} {count} saturation temperatures, worst relative error {worst:.1e}");
        assert!(*count >= 10);
    }
    assert_eq!(per_fluid.len(), 10);
    assert!(
        failures.is_empty(),
        "{} failures:\n{}",
        failures.len(),
        failures.join("\n")
    );
}
