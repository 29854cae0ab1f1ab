//! Speed of `cryochain table` on 100 000 rows against the flashes alone: the same
//! (T, p) states of nitrogen, hydrogen and helium, first through the whole table
//! (CSV read, cells parsed, states computed, every output column formatted and the
//! CSV written), then as bare (T, p) flashes on numbers already in SI units.
//! Run: `cargo bench --bench table`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::fluids;

/// 100 000 rows spread over each fluid's gas, liquid and supercritical states.
fn rows() -> Vec<(&'static str, f64, f64)> {
    let grids: [(&str, f64, f64, f64, f64); 3] = [
        ("nitrogen", 65.0, 600.0, 0.5, 200.0),
        ("hydrogen", 15.0, 400.0, 0.5, 200.0),
        ("helium", 3.0, 300.0, 0.5, 100.0),
    ];
    (0..100_000)
        .map(|i| {
            let (name, t_low, t_high, p_low, p_high) = grids[i % 3];
            let a = ((i / 3) % 331) as f64 / 330.0;
            let b = ((i / 3) / 331 % 101) as f64 / 100.0;
            (
                name,
                t_low + (t_high - t_low) * a,
                p_low * (p_high / p_low).powf(b),
            )
        })
        .collect()
}

fn table(c: &mut Criterion) {
    let rows = rows();
    let mut csv = String::from("fluid,T [K],p [bar]\n");
    for (name, t, p) in &rows {
        csv.push_str(&format!("{name},{t},{p}\n"));
    }
    let states: Vec<(&'static fluids::Fluid, f64, f64)> = rows
        .iter()
        .map(|(name, t, p)| (fluids::fluid(name).unwrap(), *t, *p * 1e5))
        .collect();
    let mut group = c.benchmark_group("table");
    group.sample_size(10);
    group.bench_function("whole table, 100000 rows", |b| {
        b.iter(|| black_box(cryochain::batch::run(&csv, "bench", None).unwrap()))
    });
    group.bench_function("flashes alone, 100000 states", |b| {
        b.iter(|| {
            for (fluid, t, p) in &states {
                let _ = black_box(fluid.state_tp(*t, *p));
            }
        })
    });
    group.bench_function("flashes with every output property, 100000 states", |b| {
        b.iter(|| {
            for (fluid, t, p) in &states {
                if let Ok(state) = fluid.state_tp(*t, *p) {
                    black_box((
                        state.cp(),
                        state.cv(),
                        state.speed_of_sound(),
                        state.joule_thomson(),
                        state.compressibility(),
                    ));
                }
            }
        })
    });
    group.finish();
}

criterion_group!(benches, table);
criterion_main!(benches);
