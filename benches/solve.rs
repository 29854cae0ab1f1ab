//! Speed of solving whole flowsheets from scratch (parse excluded, solve included),
//! and of the design checks on a solution.
//! Run: `cargo bench --bench solve`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::flowsheet::load;
use cryochain::solve::{solve, Options};
use std::path::Path;

fn solving(c: &mut Criterion) {
    let mut group = c.benchmark_group("solve");
    for file in [
        "flowsheets/hydrogen-ln2-precooled.yaml",
        "flowsheets/nitrogen-linde-hampson.yaml",
        "flowsheets/helium-lh2-precooled.yaml",
        "flowsheets/nitrogen-claude.yaml",
        "flowsheets/cascade-nitrogen-hydrogen.yaml",
        "flowsheets/helium-collins.yaml",
        "flowsheets/hydrogen-claude.yaml",
        // The hydrogen demos with frozen-normal hydrogen, and a once-through cold box
        // whose exchanger carries an ortho–para catalyst, beside its frozen twin.
        "tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml",
        "tests/flowsheets/cascade-nitrogen-hydrogen-frozen-normal.yaml",
        "tests/flowsheets/hydrogen-catalytic-coldbox.yaml",
        "tests/flowsheets/hydrogen-catalytic-coldbox-frozen.yaml",
        // The hydrogen demos with both exchangers sized by their minimum approach
        // instead of their warm-end approach (frozen normal, and converting).
        "tests/flowsheets/hydrogen-ln2-precooled-minimum-approach.yaml",
        "tests/flowsheets/hydrogen-ln2-precooled-converting-minimum-approach.yaml",
    ] {
        let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(file);
        let name = path.file_stem().unwrap().to_string_lossy().into_owned();
        let plant = load(&path, &[]).unwrap();
        group.bench_function(&name, |b| {
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
