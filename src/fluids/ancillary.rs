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
    /// Pressures surely below the line, one per cell of [`FLOOR_CELLS`] equal cells
    /// over the line's temperatures (see [`MeltingLine::surely_below`]).
    floors: Vec<f64>,
}

/// Cells of the melting line's table of floors.
const FLOOR_CELLS: usize = 128;

/// Points sampled in each cell, ends included, to find its floor.
const FLOOR_SAMPLES: usize = 5;

/// The margin under the smallest sampled pressure of a cell: a melting line rises
/// smoothly with temperature, so over a cell it cannot fall below its sampled
/// minimum by anything like a part in a thousand.
const FLOOR_MARGIN: f64 = 1e-3;

impl MeltingLine {
    /// From the file's description.
    pub fn from_file(file: &MeltingFile) -> Self {
        let mut line = MeltingLine {
            form: file.form,
            parts: file.parts.clone(),
            floors: Vec::new(),
        };
        let (low, width) = line.cells();
        line.floors = (0..FLOOR_CELLS)
            .map(|cell| {
                (0..FLOOR_SAMPLES)
                    .map(|k| {
                        let fraction = (cell as f64 + k as f64 / (FLOOR_SAMPLES - 1) as f64)
                            / FLOOR_CELLS as f64;
                        line.pressure((low + fraction * width).min(line.temperature_max()))
                    })
                    // A cell that reaches outside the line (or between its parts)
                    // has no floor: its states are always checked exactly.
                    .try_fold(f64::INFINITY, |floor, p| {
                        p.filter(|p| p.is_finite()).map(|p| floor.min(p))
                    })
                    .map_or(f64::NEG_INFINITY, |floor| floor * (1.0 - FLOOR_MARGIN))
            })
            .collect();
        line
    }

    /// The first temperature of the table of floors and its width, K.
    fn cells(&self) -> (f64, f64) {
        let low = self.temperature_min();
        (low, self.temperature_max() - low)
    }

    /// True when `p` lies below the melting pressure at every temperature of `t`'s
    /// cell, so that no solid needs to be ruled out by evaluating the line at `t`
    /// (a quick test before the exact one; false says nothing).
    pub fn surely_below(&self, t: f64, p: f64) -> bool {
        let (low, width) = self.cells();
        let position = (t - low) / width * FLOOR_CELLS as f64;
        if !(position >= 0.0 && position < FLOOR_CELLS as f64) {
            return false;
        }
        p < self.floors[position as usize]
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

#[cfg(test)]
mod tests {
    /// The quick test never clears a pressure the exact line puts in the solid: for
    /// every fluid, at 20 000 temperatures over its melting line, a pressure at each
    /// cell's floor is below the exact melting pressure; and it clears ordinary
    /// states (it is not vacuous).
    #[test]
    fn a_pressure_cleared_by_the_floors_is_below_the_melting_line() {
        for fluid in crate::fluids::all().unwrap() {
            let line = &fluid.ancillaries.melting;
            let (low, high) = (line.temperature_min(), line.temperature_max());
            let mut cleared = 0;
            for k in 0..20_000 {
                let t = low + (high - low) * k as f64 / 19_999.0;
                let Some(exact) = line.pressure(t) else {
                    continue;
                };
                for p in [
                    exact * 0.5,
                    exact * 0.99,
                    exact * 0.9985,
                    exact * (1.0 - 1e-9),
                    exact,
                ] {
                    if line.surely_below(t, p) {
                        assert!(
                            p < exact,
                            "{} at {t} K: {p} Pa cleared, melting at {exact} Pa",
                            fluid.name
                        );
                        cleared += 1;
                    }
                }
            }
            assert!(cleared > 20_000, "{}: {cleared} cleared", fluid.name);
        }
    }
}
