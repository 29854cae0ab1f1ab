//! A vapour-pressure estimate sharper than the ancillary equation: the ancillary
//! corrected by its deviation from the equation of state's own saturation, measured
//! at 65 temperatures when the fluid is loaded and interpolated linearly between
//! them. It decides phases quickly; the exact saturation still settles close calls.

use super::file::AncillaryEquation;

/// The corrected estimate of ln p_sat(T).
#[derive(Debug, Clone, Default)]
pub struct VapourPressureEstimate {
    /// (temperature K, ln p_exact − ln p_ancillary), ascending in temperature.
    nodes: Vec<(f64, f64)>,
    /// The saturated densities at the same temperatures (liquid, vapour), kg/m³.
    densities: Vec<(f64, f64)>,
}

impl VapourPressureEstimate {
    /// From correction nodes (temperature, ln p_exact − ln p_ancillary) and the
    /// saturated densities there.
    pub fn new(nodes: Vec<(f64, f64)>, densities: Vec<(f64, f64)>) -> Self {
        VapourPressureEstimate { nodes, densities }
    }

    /// The saturated liquid and vapour densities near T, interpolated between the
    /// nodes (the vapour's logarithmically): seeds for density searches.
    pub fn saturated_densities(&self, t: f64) -> Option<(f64, f64)> {
        let n = &self.nodes;
        if n.len() < 2 || self.densities.len() != n.len() || t < n[0].0 || t > n[n.len() - 1].0 {
            return None;
        }
        let i = n.partition_point(|(x, _)| *x <= t).clamp(1, n.len() - 1);
        let f = (t - n[i - 1].0) / (n[i].0 - n[i - 1].0);
        let (a, b) = (self.densities[i - 1], self.densities[i]);
        Some((
            a.0 + f * (b.0 - a.0),
            (a.1.ln() + f * (b.1.ln() - a.1.ln())).exp(),
        ))
    }

    /// The correction and its temperature slope at T (held at the end values outside).
    fn correction(&self, t: f64) -> (f64, f64) {
        let n = &self.nodes;
        if n.len() < 2 {
            return (0.0, 0.0);
        }
        if t <= n[0].0 {
            return (n[0].1, 0.0);
        }
        if t >= n[n.len() - 1].0 {
            return (n[n.len() - 1].1, 0.0);
        }
        let i = n.partition_point(|(x, _)| *x <= t).clamp(1, n.len() - 1);
        let (a, b) = (n[i - 1], n[i]);
        let slope = (b.1 - a.1) / (b.0 - a.0);
        (a.1 + slope * (t - a.0), slope)
    }

    /// ln p_sat and d ln p_sat/dT at T.
    pub fn log_value_and_slope(&self, equation: &AncillaryEquation, t: f64) -> (f64, f64) {
        let (ln_p, slope) = equation.log_value_and_slope(t);
        let (c, dc) = self.correction(t);
        (ln_p + c, slope + dc)
    }

    /// p_sat at T, Pa.
    pub fn value(&self, equation: &AncillaryEquation, t: f64) -> f64 {
        self.log_value_and_slope(equation, t).0.exp()
    }

    /// The temperature at which the estimate gives `pressure`, between `low` and `high`:
    /// Newton inside a bracket.
    pub fn temperature_at(
        &self,
        equation: &AncillaryEquation,
        pressure: f64,
        low: f64,
        high: f64,
    ) -> f64 {
        let target = pressure.ln();
        let (ln_low, _) = self.log_value_and_slope(equation, low);
        let (ln_high, _) = self.log_value_and_slope(equation, high);
        if target <= ln_low {
            return low;
        }
        if target >= ln_high {
            return high;
        }
        // Start from the plain ancillary's answer.
        let start = equation.temperature_at(pressure, low, high);
        crate::numeric::bracketed_newton(
            |t| {
                let (ln_p, slope) = self.log_value_and_slope(equation, t);
                (ln_p - target, slope)
            },
            start,
            low,
            high,
            1e-13,
        )
    }
}
