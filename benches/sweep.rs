//! A 1,000-case sweep of the hydrogen demo with frozen-normal hydrogen (40 high
//! pressures × 25 precooler temperatures), on all cores and on one thread for the
//! speed-up. (The converting demo solves each case about ten times slower; its
//! flashes are those of the ortho–para solution.)
//! Run: `cargo bench --bench sweep`.

use criterion::{criterion_group, criterion_main, Criterion};
use cryochain::study::{sweep, Variable};
use std::path::Path;

fn sweeping(c: &mut Criterion) {
    let file = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/flowsheets/hydrogen-ln2-precooled-frozen-normal.yaml");
    let text = std::fs::read_to_string(&file).unwrap();
    let vars = [
        Variable::parse_range("compressor.outlet_pressure=60bar..180bar:40").unwrap(),
        Variable::parse_range("ln2-bath.outlet_temperature=80K..92K:25").unwrap(),
    ];
    let mut group = c.benchmark_group("sweep of the hydrogen demo, 1000 cases");
    group
        .sample_size(10)
        .measurement_time(std::time::Duration::from_secs(20));
    group.bench_function("all cores", |b| {
        b.iter(|| sweep(&text, "demo", &[], &vars, None, &|_, _| {}).unwrap())
    });
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap();
    group.bench_function("one thread", |b| {
        b.iter(|| one.install(|| sweep(&text, "demo", &[], &vars, None, &|_, _| {}).unwrap()))
    });
    group.finish();
}

criterion_group!(benches, sweeping);
criterion_main!(benches);
