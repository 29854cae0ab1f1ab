//! Ancillary equations (vapour pressure, saturated densities) used to seed the
//! saturation solver, and the melting line that bounds the fluid region.

use super::file::{AncillaryEquation, AncillaryForm, MeltingFile, MeltingForm, MeltingPart};

impl AncillaryEquation {
    /// The value at temperature `t` (K): a pressure in Pa or a density in mol/m³.
    pub fn value(&self, t: f64) -> f64 {
        let theta = (1.0 - t / self.reducing_temperature_k).max(0.0);
        let mut sum: f64 = self
            .n
            .iter()
            .zip(&self.t)
            .map(|(n, e)| n * theta.powf(*e))
            .sum();
        if self.divide_by_reduced_temperature {
            sum *= self.reducing_temperature_k / t;
        }
        match self.form {
            AncillaryForm::Exponential => self.reducing_value * sum.exp(),
            AncillaryForm::Linear => self.reducing_value * (1.0 + sum),
        }
    }

    /// The temperature at which the equation gives `value`, by bisection on the
    /// monotonic pressure ancillary between `low` and `high` (K).
    pub fn temperature_at(&self, value: f64, low: f64, high: f64) -> f64 {
        let (mut a, mut b) = (low, high);
        let target = value.ln();
        let f = |t: f64| self.value(t).ln() - target;
        let fa = f(a);
        if fa > 0.0 {
            return a;
        }
        if f(b) < 0.0 {
            return b;
        }
        // Secant-bisection hybrid (Illinois); the function is smooth and monotonic.
        let (mut ya, mut yb) = (fa, f(b));
        let mut side = 0;
        for _ in 0..100 {
            let c = (a * yb - b * ya) / (yb - ya);
            let yc = f(c);
            if yc.abs() < 1e-15 || (b - a).abs() < 1e-13 * b {
                return c;
            }
            if (yc < 0.0) == (ya < 0.0) {
                a = c;
                ya = yc;
                if side == -1 {
                    yb *= 0.5;
                }
                side = -1;
            } else {
                b = c;
                yb = yc;
                if side == 1 {
                    ya *= 0.5;
                }
                side = 1;
            }
        }
        0.5 * (a + b)
    }
}

/// The melting line p_melt(T) of a fluid.
#[derive(Debug, Clone)]
pub struct MeltingLine {
    form: MeltingForm,
    parts: Vec<MeltingPart>,
}

impl MeltingLine {
    /// From the file's description.
    pub fn from_file(file: &MeltingFile) -> Self {
        MeltingLine {
            form: file.form,
            parts: file.parts.clone(),
        }
    }

    /// The melting pressure at `t` (K), or `None` outside the line's range.
    pub fn pressure(&self, t: f64) -> Option<f64> {
        let part = self
            .parts
            .iter()
            .find(|p| t >= p.temperature_min_k && t <= p.temperature_max_k)?;
        let t0 = part.reference_temperature_k;
        let p0 = part.reference_pressure_pa;
        let p = match self.form {
            MeltingForm::Simon => p0 + part.a[0] * ((t / t0).powf(part.t[0]) - 1.0),
            MeltingForm::PolynomialInTr => {
                let sum: f64 = part
                    .a
                    .iter()
                    .zip(&part.t)
                    .map(|(a, e)| a * ((t / t0).powf(*e) - 1.0))
                    .sum();
                p0 * (1.0 + sum)
            }
            MeltingForm::PolynomialInTheta => {
                let sum: f64 = part
                    .a
                    .iter()
                    .zip(&part.t)
                    .map(|(a, e)| a * (t / t0 - 1.0).powf(*e))
                    .sum();
                p0 * (1.0 + sum)
            }
        };
        Some(p)
    }

    /// The lowest temperature the line covers.
    pub fn temperature_min(&self) -> f64 {
        self.parts
            .iter()
            .map(|p| p.temperature_min_k)
            .fold(f64::INFINITY, f64::min)
    }

    /// The highest temperature the line covers.
    pub fn temperature_max(&self) -> f64 {
        self.parts
            .iter()
            .map(|p| p.temperature_max_k)
            .fold(f64::NEG_INFINITY, f64::max)
    }
}
