//! Ancillary equations (vapour pressure, saturated densities) used to seed the
//! saturation solver, and the melting line that bounds the fluid region.

use super::file::{AncillaryEquation, AncillaryForm, MeltingFile, MeltingForm, MeltingPart};
use crate::error::Result;

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

    /// ln of the value and its temperature derivative d ln(value)/dT, for the
    /// exponential form.
    pub fn log_value_and_slope(&self, t: f64) -> (f64, f64) {
        let tr = self.reducing_temperature_k;
        let theta = (1.0 - t / tr).max(1e-300);
        let mut sum = 0.0;
        let mut dsum_dtheta = 0.0;
        for (n, e) in self.n.iter().zip(&self.t) {
            let term = n * theta.powf(*e);
            sum += term;
            dsum_dtheta += term * e / theta;
        }
        // dθ/dT = −1/Tr.
        let (value, slope) = if self.divide_by_reduced_temperature {
            let factor = tr / t;
            (factor * sum, -factor * sum / t - factor * dsum_dtheta / tr)
        } else {
            (sum, -dsum_dtheta / tr)
        };
        (self.reducing_value.ln() + value, slope)
    }

    /// The temperature at which the (exponential, monotonic) pressure equation gives
    /// `value`, between `low` and `high` (K): Newton on ln p from a start that is
    /// linear in 1/T between the ends, kept inside the bracket.
    pub fn temperature_at(&self, value: f64, low: f64, high: f64) -> Result<f64> {
        let target = value.ln();
        let (ln_low, _) = self.log_value_and_slope(low);
        let (ln_high, _) = self.log_value_and_slope(high);
        if target <= ln_low {
            return Ok(low);
        }
        if target >= ln_high {
            return Ok(high);
        }
        let fraction = (target - ln_low) / (ln_high - ln_low);
        let start = 1.0 / (1.0 / low + fraction * (1.0 / high - 1.0 / low));
        crate::numeric::bracketed_newton(
            "ancillary saturation temperature",
            |t| {
                let (ln_p, slope) = self.log_value_and_slope(t);
                (ln_p - target, slope)
            },
            start,
            low,
            high,
            1e-14,
        )
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
