//! Flash speed over many random single-phase states, the cryochain side of the
//! side-by-side comparison with the CoolProp library that
//! `benches/flash_speed_vs_coolprop.py` runs (it writes the states, runs this
//! benchmark and times CoolProp on the same states).
//!
//! Each criterion iteration flashes every state of a fluid once: (T, p), then
//! (p, h) and (p, s) with the enthalpy and entropy of those states on cryochain's
//! own reference (CoolProp's may differ by a constant). With
//! `CRYOCHAIN_FLASH_STATES=DIR` the states are read from `DIR/<fluid>.csv` (columns
//! `T [K],p [Pa],rho [kg/m3]`, the density CoolProp's) and the accuracy against
//! CoolProp is written to `DIR/<fluid>-accuracy.csv`; without it, 20 000 states a
//! fluid are drawn here from the same ranges.
//!
//! Run: `cargo bench --bench flash_states` (or the script). Figures go in
//! docs/performance.md.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use cryochain::fluids;
use std::path::PathBuf;

/// The three fluids of the comparison.
const FLUIDS: [&str; 3] = ["nitrogen", "hydrogen", "helium"];

/// States drawn when no file is given.
const DRAWN: usize = 20_000;

/// A (T, p) state and, when read from the script's file, CoolProp's density there.
struct Sample {
    temperature: f64,
    pressure: f64,
    reference_density: Option<f64>,
}

fn states_directory() -> Option<PathBuf> {
    std::env::var_os("CRYOCHAIN_FLASH_STATES").map(PathBuf::from)
}

/// The script's states for `name`.
fn read_states(directory: &std::path::Path, name: &str) -> Vec<Sample> {
    let path = directory.join(format!("{name}.csv"));
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("cannot read {}: {e}", path.display()));
    text.lines()
        .skip(1)
        .filter(|line| !line.trim().is_empty())
        .map(|line| {
            let cells: Vec<f64> = line
                .split(',')
                .map(|c| c.trim().parse().expect("a number"))
                .collect();
            Sample {
                temperature: cells[0],
                pressure: cells[1],
                reference_density: cells.get(2).copied(),
            }
        })
        .collect()
}

/// States drawn from the script's ranges (log-uniform in T and p) with a fixed
/// linear congruential sequence, keeping single-phase states of the fluid's range
/// at least 2 % in pressure away from saturation.
fn drawn_states(name: &str) -> Vec<Sample> {
    let fluid = fluids::fluid(name).unwrap();
    let (t_low, t_high) = match name {
        "nitrogen" => (65.0f64, 500.0),
        "hydrogen" => (14.5, 500.0),
        _ => (2.5, 500.0),
    };
    let (p_low, p_high) = (0.5e5f64, 200e5);
    let mut seed: u64 = 2026;
    let mut uniform = move || {
        seed = seed
            .wrapping_mul(6_364_136_223_846_793_005)
            .wrapping_add(1_442_695_040_888_963_407);
        (seed >> 11) as f64 / (1u64 << 53) as f64
    };
    let mut out = Vec::with_capacity(DRAWN);
    while out.len() < DRAWN {
        let t = t_low * (t_high / t_low).powf(uniform());
        let p = p_low * (p_high / p_low).powf(uniform());
        if t < fluid.critical.temperature {
            match fluid.saturation_at_temperature(t) {
                Ok(sat) if (p / sat.vapour.pressure - 1.0).abs() < 0.02 => continue,
                Err(_) => continue,
                _ => {}
            }
        }
        if fluid.state_tp(t, p).is_ok() {
            out.push(Sample {
                temperature: t,
                pressure: p,
                reference_density: None,
            });
        }
    }
    out
}

/// Largest relative differences: density against CoolProp's, and the temperature
/// of the (p, h) and (p, s) flashes against the state's own.
fn write_accuracy(directory: &std::path::Path, name: &str, samples: &[Sample]) {
    let fluid = fluids::fluid(name).unwrap();
    let (mut density, mut from_ph, mut from_ps) = (0.0f64, 0.0f64, 0.0f64);
    for sample in samples {
        let state = fluid.state_tp(sample.temperature, sample.pressure).unwrap();
        if let Some(reference) = sample.reference_density {
            density = density.max((state.density / reference - 1.0).abs());
        }
        let ph = fluid.state_ph(state.pressure, state.enthalpy).unwrap();
        let ps = fluid.state_ps(state.pressure, state.entropy).unwrap();
        from_ph = from_ph.max((ph.temperature / state.temperature - 1.0).abs());
        from_ps = from_ps.max((ps.temperature / state.temperature - 1.0).abs());
    }
    let path = directory.join(format!("{name}-accuracy.csv"));
    std::fs::write(
        &path,
        format!("density_vs_coolprop,ph_temperature,ps_temperature\n{density:e},{from_ph:e},{from_ps:e}\n"),
    )
    .unwrap_or_else(|e| panic!("cannot write {}: {e}", path.display()));
}

fn flash_states(c: &mut Criterion) {
    let directory = states_directory();
    for name in FLUIDS {
        let fluid = fluids::fluid(name).unwrap();
        let samples = match &directory {
            Some(d) => read_states(d, name),
            None => drawn_states(name),
        };
        if let Some(d) = &directory {
            write_accuracy(d, name, &samples);
        }
        let tp: Vec<(f64, f64)> = samples
            .iter()
            .map(|s| (s.temperature, s.pressure))
            .collect();
        let built: Vec<_> = tp
            .iter()
            .map(|&(t, p)| fluid.state_tp(t, p).unwrap())
            .collect();
        let ph: Vec<(f64, f64)> = built.iter().map(|s| (s.pressure, s.enthalpy)).collect();
        let ps: Vec<(f64, f64)> = built.iter().map(|s| (s.pressure, s.entropy)).collect();
        let mut group = c.benchmark_group(format!("flash states {name}"));
        group.bench_function("(T, p)", |b| {
            b.iter(|| {
                for &(t, p) in &tp {
                    black_box(fluid.state_tp(black_box(t), black_box(p)).unwrap());
                }
            })
        });
        group.bench_function("(p, h)", |b| {
            b.iter(|| {
                for &(p, h) in &ph {
                    black_box(fluid.state_ph(black_box(p), black_box(h)).unwrap());
                }
            })
        });
        group.bench_function("(p, s)", |b| {
            b.iter(|| {
                for &(p, s) in &ps {
                    black_box(fluid.state_ps(black_box(p), black_box(s)).unwrap());
                }
            })
        });
        group.finish();
    }
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10).warm_up_time(std::time::Duration::from_secs(1)).measurement_time(std::time::Duration::from_secs(4));
    targets = flash_states
}
criterion_main!(benches);
