use cryochain::fluids::{blend::Blend, fluid, spin};
#[test]
fn explore() {
    for t in [20.271, 20.369, 50.0, 77.0, 100.0, 200.0, 300.0] {
        println!(
            "T {t} xeq {:.6} dE {:.3} J/mol = {:.2} kJ/kg",
            spin::equilibrium_para_fraction(t),
            spin::ortho_para_energy_difference(t),
            spin::ortho_para_energy_difference(t) / 2.01588e-3 / 1e3
        );
    }
    let b = Blend::get().unwrap();
    println!("{:?}", b.alignment);
    let n = fluid("hydrogen").unwrap();
    for (t, p) in [
        (300.0, 1e5),
        (300.0, 1e7),
        (100.0, 1e5),
        (77.0, 1e7),
        (40.0, 1e5),
        (25.0, 1e5),
        (20.0, 1e5),
        (20.0, 5e6),
        (50.0, 2e7),
    ] {
        let s = b.state_tp(t, p, 0.25).unwrap();
        let r = n.state_tp(t, p).unwrap();
        println!(
            "{t} {p}: rho {:.3e} h {:.3} kJ/kg s {:.4} J/kgK cp {:.3e}",
            s.density / r.density - 1.0,
            (s.enthalpy - r.enthalpy) / 1e3,
            s.entropy - r.entropy,
            s.cp().unwrap() / r.cp().unwrap() - 1.0
        );
    }
    let p = 101325.0;
    for x in [0.25, 0.5, 0.998, 1.0] {
        let l = b.state_p_quality(p, 0.0, x).unwrap();
        let v = b.state_p_quality(p, 1.0, x).unwrap();
        println!(
            "x {x}: Tsat {:.4} hL {:.3} kJ/kg latent {:.3}",
            l.temperature,
            l.enthalpy / 1e3,
            (v.enthalpy - l.enthalpy) / 1e3
        );
    }
    let nl = n.state_p_quality(p, 0.0).unwrap();
    println!(
        "normal Tsat {:.4} hL {:.3} ",
        nl.temperature,
        nl.enthalpy / 1e3
    );
    let f = b.state_tp(300.0, p, 0.25).unwrap();
    let prod = b.state_p_quality(p, 0.0, 1.0).unwrap();
    let prodn = b.state_p_quality(p, 0.0, 0.25).unwrap();
    let w =
        |s: &cryochain::fluids::State| (s.enthalpy - f.enthalpy) - 300.0 * (s.entropy - f.entropy);
    println!(
        "Wmin para {:.4} MJ/kg normal {:.4}",
        w(&prod) / 1e6,
        w(&prodn) / 1e6
    );
    let e = b
        .state_ph_equilibrium(p, b.state_tp(77.0, p, 0.5).unwrap().enthalpy)
        .unwrap();
    println!("eq at 77: T {} x {:?}", e.temperature, e.para_fraction);
}
#[test]
fn explore_flash() {
    let b = Blend::get().unwrap();
    for (t, p) in [
        (80.0, 11.95e6),
        (300.0, 11.95e6),
        (30.0, 11.95e6),
        (25.0, 1.3e5),
        (20.0, 1.3e5),
    ] {
        let s = b.state_tp(t, p, 0.25).unwrap();
        let back = b.state_ph(p, s.enthalpy, 0.25);
        println!(
            "{t} {p}: h {} back {:?}",
            s.enthalpy,
            back.map(|x| x.temperature)
        );
    }
}
