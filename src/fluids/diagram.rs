//! The data of a temperature–pressure diagram: the saturation line, the inversion
//! curve, and a family of isenthalps around it.

use super::fluid::Fluid;
use super::inversion::InversionCurve;
use crate::error::Result;

/// One isenthalp: its enthalpy and its (T, p) points from high to low pressure.
#[derive(Debug, Clone)]
pub struct Isenthalp {
    /// Specific enthalpy, J/kg.
    pub enthalpy: f64,
    /// (temperature K, pressure Pa), in falling pressure.
    pub points: Vec<(f64, f64)>,
}

/// Everything a T–p diagram of a fluid shows.
#[derive(Debug, Clone)]
pub struct TpDiagram {
    /// Canonical fluid name.
    pub fluid: String,
    /// Literature key of the equation of state.
    pub source_key: String,
    /// The source as cited in a caption ("Leachman et al. 2009").
    pub citation: String,
    /// The vapour-pressure line (T K, p Pa) from the triple point to the top of the
    /// saturation range (the bubble line for air).
    pub saturation: Vec<(f64, f64)>,
    /// The inversion curve.
    pub inversion: InversionCurve,
    /// Isenthalps crossing the diagram.
    pub isenthalps: Vec<Isenthalp>,
    /// The highest pressure drawn, Pa.
    pub pressure_top: f64,
}

impl Fluid {
    /// Builds the T–p diagram data: `count` isenthalps from just above the cold end
    /// of the inversion curve to past its maximum inversion temperature.
    pub fn tp_diagram(&'static self, count: usize) -> Result<TpDiagram> {
        let inversion = self.inversion()?.clone();
        let pressure_top = (1.15 * inversion.max_inversion_pressure).min(self.pressure_max);
        let (t_low, t_high) = (self.triple_temperature, self.saturation_temperature_max());
        let saturation: Vec<(f64, f64)> = (0..=80)
            .filter_map(|i| {
                let t = t_low + (t_high - t_low) * i as f64 / 80.0;
                let s = self.saturation_at_temperature(t.min(t_high)).ok()?;
                Some((t, s.liquid.pressure))
            })
            .collect();
        let cold = inversion
            .curve
            .last()
            .map_or(self.critical.temperature, |p| p.temperature);
        let hot = (1.25 * inversion.max_inversion_temperature).min(self.temperature_max);
        let pressures: Vec<f64> = (0..=90)
            .map(|i| pressure_top * (1.0 - 0.998 * i as f64 / 90.0))
            .collect();
        let mut isenthalps = Vec::new();
        for j in 0..count {
            let fraction = j as f64 / (count.max(2) - 1) as f64;
            let t = (cold * 1.05) * ((hot / (cold * 1.05)).powf(fraction));
            let Ok(start) = self.state_tp(t, pressure_top) else {
                continue;
            };
            let points = self
                .isenthalp(start.enthalpy, &pressures)
                .iter()
                .map(|s| (s.temperature, s.pressure))
                .collect();
            isenthalps.push(Isenthalp {
                enthalpy: start.enthalpy,
                points,
            });
        }
        Ok(TpDiagram {
            fluid: self.name.clone(),
            source_key: self.source_key.clone(),
            citation: self.citation(),
            saturation,
            inversion,
            isenthalps,
            pressure_top,
        })
    }
}

/// The saturation dome on the T–s plane: (entropy J/(kg·K), temperature K) of the
/// saturated liquid from the triple point up, then of the saturated vapour back down.
pub fn saturation_dome(fluid: &'static Fluid, points: usize) -> Vec<(f64, f64)> {
    let (low, high) = (fluid.triple_temperature, fluid.saturation_temperature_max());
    let mut liquid = Vec::new();
    let mut vapour = Vec::new();
    for i in 0..=points {
        let t = (low + (high - low) * i as f64 / points as f64).min(high);
        if let (Ok(l), Ok(v)) = (fluid.state_t_quality(t, 0.0), fluid.state_t_quality(t, 1.0)) {
            liquid.push((l.entropy, l.temperature));
            vapour.push((v.entropy, v.temperature));
        }
    }
    vapour.reverse();
    liquid.extend(vapour);
    liquid
}

/// The saturation dome of hydrogen in ortho–para equilibrium (the solution at
/// x_eq of its boiling temperature), as (s, T) points from the liquid at the lowest
/// pressure over the top to the vapour there, on the common datum; up to the
/// solution's highest two-phase pressure (the top is open: the critical region of
/// the solution is not modelled). Empty where the solution model cannot be built.
pub fn equilibrium_hydrogen_dome(points: usize) -> Vec<(f64, f64)> {
    let Ok(blend) = super::blend::Blend::get() else {
        return Vec::new();
    };
    let low = blend
        .para
        .triple_pressures
        .0
        .max(blend.ortho.triple_pressures.0)
        * 1.001;
    let high = super::blend::BLEND_SATURATION_PRESSURE_MAX;
    let path = &super::spin::equilibrium_para_fraction;
    let mut liquid = Vec::new();
    let mut vapour = Vec::new();
    for i in 0..=points {
        let p = low * (high / low).powf(i as f64 / points as f64);
        if let (Ok(l), Ok(v)) = (
            blend.state_p_quality_path(p, 0.0, path),
            blend.state_p_quality_path(p, 1.0, path),
        ) {
            liquid.push((l.entropy, l.temperature));
            vapour.push((v.entropy, v.temperature));
        }
    }
    vapour.reverse();
    liquid.extend(vapour);
    liquid
}

/// The (T, p) path of an isenthalpic expansion from `inlet` to `outlet_pressure`.
pub fn throttling_path(
    inlet: &super::State,
    outlet_pressure: f64,
    points: usize,
) -> Vec<(f64, f64)> {
    let fluid = inlet.fluid();
    let pressures: Vec<f64> = (0..=points)
        .map(|i| inlet.pressure + (outlet_pressure - inlet.pressure) * i as f64 / points as f64)
        .collect();
    if inlet.para_fraction.is_some() {
        // Hydrogen of a given para fraction: its enthalpy is on the solution's
        // datum, so the path is flashed on the solution (at the fixed fraction: a
        // valve carries no catalyst). Points the solution refuses (between the
        // species' critical points) are left out.
        let material = inlet.material();
        return pressures
            .iter()
            .filter_map(|&p| material.state_ph(p, inlet.enthalpy).ok())
            .map(|s| (s.temperature, s.pressure))
            .collect();
    }
    fluid
        .isenthalp(inlet.enthalpy, &pressures)
        .iter()
        .map(|s| (s.temperature, s.pressure))
        .collect()
}
