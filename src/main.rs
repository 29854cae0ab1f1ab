fn main() {
    let f = cryochain::fluids::fluid("nitrogen").unwrap();
    let s = f.state_tp(80.0, 1e5).unwrap();
    println!("{:?}", s);
}
