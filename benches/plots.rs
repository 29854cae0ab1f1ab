//! Speed of writing every plot of the hydrogen demo (T–s, T–p with the valve, two
//! exchangers, exergy; SVG and PNG each), solve excluded. Run: `cargo bench --bench plots`.

use criterion::{criterion_group, criterion_main, Criterion};
use cryochain::flowsheet::load;
use cryochain::report::plot::cycle::write_all;
use cryochain::solve::{solve, Options};
use std::path::Path;

fn plots(c: &mut Criterion) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/hydrogen-ln2-precooled.yaml");
    let plant = load(&path, &[]).unwrap();
    let solution = solve(&plant, &Options::default()).unwrap();
    let dir = std::env::temp_dir().join(format!("cryochain-plot-bench-{}", std::process::id()));
    c.bench_function("plots/hydrogen demo, all ten files", |b| {
        b.iter(|| write_all(&plant, &solution, &dir).unwrap())
    });
    std::fs::remove_dir_all(&dir).ok();
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = plots
}
criterion_main!(benches);
