//! Speed of solving whole flowsheets from scratch (parse excluded, solve included),
//! and of the design checks on a solution.
//! Run: `cargo bench --bench solve`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::flowsheet::load;
use cryochain::solve::{solve, Options};
use std::path::Path;

fn solving(c: &mut Criterion) {
    let mut group = c.benchmark_group("solve");
    for name in [
        "hydrogen-ln2-precooled",
        "nitrogen-linde-hampson",
        "helium-lh2-precooled",
        "nitrogen-claude",
        "cascade-nitrogen-hydrogen",
    ] {
        let path = Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("flowsheets")
            .join(format!("{name}.yaml"));
        let plant = load(&path, &[]).unwrap();
        group.bench_function(name, |b| {
            b.iter(|| black_box(solve(&plant, &Options::default()).unwrap()))
        });
    }
    group.finish();
    // The design checks, including the high-pressure advice that re-solves the
    // flowsheet at the advised pressure to confirm it.
    let mut group = c.benchmark_group("check");
    for name in ["hydrogen-ln2-precooled", "nitrogen-claude"] {
        let path = Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("flowsheets")
            .join(format!("{name}.yaml"));
        let plant = load(&path, &[]).unwrap();
        let solution = solve(&plant, &Options::default()).unwrap();
        group.bench_function(name, |b| {
            b.iter(|| black_box(cryochain::rules::check(&plant, &solution)))
        });
    }
    group.finish();
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(30);
    targets = solving
}
criterion_main!(benches);
