fn main() {
    let f = cryochain::fluids::fluid("hydrogen").unwrap();
    let t = 33.286379828404066;
    let s = f.state_tp(t, 1335248.3342369676).unwrap();
    println!("{:.17} {:.17}", s.density, s.cp().unwrap());
    let p = f.properties(t, 28.64034530227513);
    println!("{:.17} {:.17}", p.pressure, p.cp);
}
