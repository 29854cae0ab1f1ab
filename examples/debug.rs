fn main() {
    let f = cryochain::fluids::fluid("methane").unwrap();
    let p = 4922055.142416269;
    for t in [185.0, 189.0, 190.0, 190.5, 190.545, 190.56, 190.6, 191.0, 193.0, 195.0, 200.0] {
        let s = f.state_tp(t, p).unwrap();
        println!("{t} rho {:.4} h {:.1} cp {:.1} {:?}", s.density, s.enthalpy, s.cp().unwrap(), s.phase);
    }
    println!("{:?}", f.state_ph(p, 506521.69195632363).map(|s| s.temperature));
}
