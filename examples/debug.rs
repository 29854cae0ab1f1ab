fn main() {
    let f = cryochain::fluids::fluid("orthohydrogen").unwrap();
    let sat = f.saturation_at_temperature(20.0).unwrap();
    let l = f.properties(20.0, sat.liquid.density);
    let v = f.properties(20.0, sat.vapour.density);
    println!("p {} rl {} rv {} cvl {} cvv {} cpl {} cpv {} wl {} wv {}", sat.vapour.pressure/1e3, l.density, v.density, l.cv/1e3, v.cv/1e3, l.cp/1e3, v.cp/1e3, l.speed_of_sound, v.speed_of_sound);
    let m = cryochain::fluids::fluid("methane").unwrap();
    println!("{:?}", m.state_tp(115.0, 0.1e6).map(|s| s.density));
}
