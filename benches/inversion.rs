//! Speed of tracing one whole inversion curve (no cache: `inversion_curve` traces
//! afresh each call). Run: `cargo bench --bench inversion`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::fluids;

fn inversion(c: &mut Criterion) {
    let mut group = c.benchmark_group("inversion curve");
    for name in ["nitrogen", "hydrogen", "helium"] {
        let fluid = fluids::fluid(name).unwrap();
        group.bench_function(name, |b| {
            b.iter(|| black_box(fluid.inversion_curve().unwrap()))
        });
    }
    group.finish();
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20);
    targets = inversion
}
criterion_main!(benches);
