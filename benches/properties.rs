//! Speed of the property engine: one call per iteration, cycling through a fixed set
//! of states that spans gas, vapour, compressed liquid, supercritical and two-phase
//! states, so that no result can be reused from the previous call.
//!
//! Run: `cargo bench --bench properties`. Figures go in docs/performance.md.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::fluids::{self, Fluid};

/// (T, p) pairs over a fluid's range, typical of liquefier streams.
fn states(fluid: &Fluid) -> Vec<(f64, f64)> {
    let tc = fluid.critical.temperature;
    let pc = fluid.critical.pressure;
    let tt = fluid.triple_temperature;
    let mut out = Vec::new();
    for &tf in &[0.3f64, 0.6, 0.9] {
        // Liquid and vapour below the critical temperature.
        let t = tt + tf * (0.95 * tc - tt);
        let psat = fluid.saturation_at_temperature(t).unwrap().vapour.pressure;
        out.push((t, 0.5 * psat));
        out.push((t, 2.0 * psat.max(0.2 * pc)));
    }
    for &t in &[1.2 * tc, 2.5 * tc, 300.0f64.min(fluid.temperature_max)] {
        for &p in &[1e5, 0.8 * pc, 3.0 * pc, 2e7] {
            out.push((t, p));
        }
    }
    out
}

fn bench_fluid(c: &mut Criterion, name: &str) {
    let fluid = fluids::fluid(name).unwrap();
    let tp = states(fluid);
    let built: Vec<_> = tp
        .iter()
        .map(|&(t, p)| fluid.state_tp(t, p).unwrap())
        .collect();
    // (p, h) and (p, s) targets include two-phase states at 1 atm.
    let mut ph: Vec<(f64, f64)> = built.iter().map(|s| (s.pressure, s.enthalpy)).collect();
    let mut ps: Vec<(f64, f64)> = built.iter().map(|s| (s.pressure, s.entropy)).collect();
    for x in [0.1, 0.5, 0.9] {
        let wet = fluid.state_p_quality(101_325.0, x).unwrap();
        ph.push((wet.pressure, wet.enthalpy));
        ps.push((wet.pressure, wet.entropy));
    }
    let temperatures: Vec<f64> = (0..16)
        .map(|i| {
            let low = fluid.triple_temperature;
            let high = 0.98 * fluid.critical.temperature;
            low + (high - low) * i as f64 / 15.0
        })
        .collect();

    let mut group = c.benchmark_group(name);
    let mut i = 0;
    group.bench_function("state from (T, p)", |b| {
        b.iter(|| {
            i = (i + 1) % tp.len();
            let (t, p) = tp[i];
            black_box(fluid.state_tp(black_box(t), black_box(p)).unwrap())
        })
    });
    let mut i = 0;
    group.bench_function("state from (p, h)", |b| {
        b.iter(|| {
            i = (i + 1) % ph.len();
            let (p, h) = ph[i];
            black_box(fluid.state_ph(black_box(p), black_box(h)).unwrap())
        })
    });
    let mut i = 0;
    group.bench_function("state from (p, s)", |b| {
        b.iter(|| {
            i = (i + 1) % ps.len();
            let (p, s) = ps[i];
            black_box(fluid.state_ps(black_box(p), black_box(s)).unwrap())
        })
    });
    let mut i = 0;
    group.bench_function("saturation from T", |b| {
        b.iter(|| {
            i = (i + 1) % temperatures.len();
            black_box(
                fluid
                    .saturation_at_temperature(black_box(temperatures[i]))
                    .unwrap(),
            )
        })
    });
    group.finish();
}

fn properties(c: &mut Criterion) {
    for name in ["nitrogen", "hydrogen", "helium"] {
        bench_fluid(c, name);
    }
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(60).warm_up_time(std::time::Duration::from_millis(500)).measurement_time(std::time::Duration::from_secs(2));
    targets = properties
}
criterion_main!(benches);
