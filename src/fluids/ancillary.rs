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
    /// over the line's temperatures (see [`MeltingLine::surely_below`]), each
    /// sampled the first time a state in its cell is checked (a run checks a few
    /// cells; sampling all of them was a tenth of loading a fluid).
    floors: Vec<std::sync::OnceLock<f64>>,
    /// The melting pressure at each cell's ends ([`FLOOR_CELLS`] + 1 of them; NaN
    /// outside the line or between its parts), to bracket the melting temperature of
    /// a pressure within one cell (see [`MeltingLine::cell_bracket`]).
    nodes: Vec<f64>,
    /// The line's lowest and highest temperatures, K, and cells per kelvin of the
    /// tables, computed once.
    span: (f64, f64, f64),
}

/// One cell of the melting line's table: its ends as (temperature K, melting
/// pressure Pa).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MeltingCell {
    /// The colder end.
    pub low: (f64, f64),
    /// The warmer end.
    pub high: (f64, f64),
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
            nodes: Vec::new(),
            span: (0.0, 0.0, 0.0),
        };
        let low = file
            .parts
            .iter()
            .map(|p| p.temperature_min_k)
            .fold(f64::INFINITY, f64::min);
        let high = file
            .parts
            .iter()
            .map(|p| p.temperature_max_k)
            .fold(f64::NEG_INFINITY, f64::max);
        line.span = (low, high, FLOOR_CELLS as f64 / (high - low));
        line.nodes = (0..=FLOOR_CELLS)
            .map(|k| {
                line.pressure(line.node_temperature(k))
                    .filter(|p| p.is_finite())
                    .unwrap_or(f64::NAN)
            })
            .collect();
        line.floors = (0..FLOOR_CELLS)
            .map(|_| std::sync::OnceLock::new())
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
        let position = (t - self.span.0) * self.span.2;
        if !(position >= 0.0 && position < FLOOR_CELLS as f64) {
            return false;
        }
        let cell = position as usize;
        p < *self.floors[cell].get_or_init(|| self.floor(cell))
    }

    /// The floor of cell `cell`: the smallest of the line's pressures at
    /// [`FLOOR_SAMPLES`] points across it, less [`FLOOR_MARGIN`]; −∞ for a cell that
    /// reaches outside the line (or between its parts), whose states are always
    /// checked exactly.
    fn floor(&self, cell: usize) -> f64 {
        let (low, width) = self.cells();
        (0..FLOOR_SAMPLES)
            .map(|k| {
                let fraction =
                    (cell as f64 + k as f64 / (FLOOR_SAMPLES - 1) as f64) / FLOOR_CELLS as f64;
                self.pressure((low + fraction * width).min(self.temperature_max()))
            })
            .try_fold(f64::INFINITY, |floor, p| {
                p.filter(|p| p.is_finite()).map(|p| floor.min(p))
            })
            .map_or(f64::NEG_INFINITY, |floor| floor * (1.0 - FLOOR_MARGIN))
    }

    /// The temperature of the table's node `k` (the cells' ends), K.
    fn node_temperature(&self, k: usize) -> f64 {
        let (low, width) = self.cells();
        (low + k as f64 / FLOOR_CELLS as f64 * width).min(self.temperature_max())
    }

    /// The ends of the cell whose melting pressures at its ends enclose `p`, each as
    /// (temperature K, melting pressure Pa), where the line rises through that cell's
    /// ends: a bracket of the melting temperature one cell wide. `None` where no
    /// cell's ends enclose `p`.
    pub fn cell_bracket(&self, p: f64) -> Option<MeltingCell> {
        // The nodes rise along a rising line; NaN (outside the line) compares false.
        let k = self.nodes.partition_point(|node| *node < p);
        if k == 0 || k >= self.nodes.len() {
            return None;
        }
        let (below, above) = (self.nodes[k - 1], self.nodes[k]);
        if !(below <= p && p <= above) {
            return None;
        }
        Some(MeltingCell {
            low: (self.node_temperature(k - 1), below),
            high: (self.node_temperature(k), above),
        })
    }

    /// The melting pressure at `t` (K), or `None` outside the line's range.
    pub fn pressure(&self, t: f64) -> Option<f64> {
        self.pressure_and_slope(t).map(|(p, _)| p)
    }

    /// The melting pressure at `t` (K) and its slope dp/dT (Pa/K), or `None`
    /// outside the line's range. The slope is not finite at a polynomial-in-θ
    /// part's reference temperature.
    pub fn pressure_and_slope(&self, t: f64) -> Option<(f64, f64)> {
        let part = self
            .parts
            .iter()
            .find(|p| t >= p.temperature_min_k && t <= p.temperature_max_k)?;
        let t0 = part.reference_temperature_k;
        let p0 = part.reference_pressure_pa;
        let pair = match self.form {
            MeltingForm::Simon => {
                let power = (t / t0).powf(part.t[0]);
                (
                    p0 + part.a[0] * (power - 1.0),
                    part.a[0] * part.t[0] * power / t,
                )
            }
            MeltingForm::PolynomialInTr => {
                let (mut sum, mut slope) = (0.0, 0.0);
                for (a, e) in part.a.iter().zip(&part.t) {
                    let power = (t / t0).powf(*e);
                    sum += a * (power - 1.0);
                    slope += a * e * power;
                }
                (p0 * (1.0 + sum), p0 * slope / t)
            }
            MeltingForm::PolynomialInTheta => {
                let theta = t / t0 - 1.0;
                let (mut sum, mut slope) = (0.0, 0.0);
                for (a, e) in part.a.iter().zip(&part.t) {
                    let power = theta.powf(*e);
                    sum += a * power;
                    slope += a * e * power;
                }
                (p0 * (1.0 + sum), p0 * slope / (theta * t0))
            }
        };
        Some(pair)
    }

    /// The melting pressures at the line's lowest and highest temperatures (NaN where
    /// the line gives none there).
    pub fn end_pressures(&self) -> (f64, f64) {
        (
            self.nodes.first().copied().unwrap_or(f64::NAN),
            self.nodes.last().copied().unwrap_or(f64::NAN),
        )
    }

    /// The melting temperature of `p` inside `cell` (from
    /// [`MeltingLine::cell_bracket`]): Newton steps on the line from the linear
    /// interpolation between the cell's ends, each held inside the cell, until a
    /// step is below `tolerance` (K). `None` where a step meets a slope that is not
    /// positive, or after 30 steps (the caller then searches by bracketing).
    pub fn temperature_in_cell(&self, p: f64, cell: &MeltingCell, tolerance: f64) -> Option<f64> {
        let ((a, pa), (b, pb)) = (cell.low, cell.high);
        if !(pb > pa) {
            return None;
        }
        let mut t = (a + (p - pa) / (pb - pa) * (b - a)).clamp(a, b);
        for _ in 0..30 {
            let (pressure, slope) = self.pressure_and_slope(t)?;
            let f = pressure - p;
            if f == 0.0 {
                return Some(t);
            }
            if !(slope > 0.0 && slope.is_finite()) {
                return None;
            }
            let next = (t - f / slope).clamp(a, b);
            if (next - t).abs() <= tolerance {
                return Some(next);
            }
            t = next;
        }
        None
    }

    /// The lowest temperature the line covers.
    pub fn temperature_min(&self) -> f64 {
        self.span.0
    }

    /// The highest temperature the line covers.
    pub fn temperature_max(&self) -> f64 {
        self.span.1
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

    /// The melting temperature found by Newton steps inside one cell of the table is
    /// the one a bracketed search over the whole line finds, for every fluid at 2 000
    /// pressures along its line, within the search's tolerance; the line's pressure
    /// there is the pressure asked; and the slope used is the line's (against a
    /// central difference).
    #[test]
    fn melting_temperatures_from_one_cell_match_the_whole_line_search() {
        for fluid in crate::fluids::all().unwrap() {
            let line = &fluid.ancillaries.melting;
            let low = fluid.triple_temperature.max(line.temperature_min());
            let high = line.temperature_max();
            let tolerance = 1e-12 * high;
            let mut by_cell = 0;
            for k in 1..2_000 {
                let t = low + (high - low) * k as f64 / 2_000.0;
                let Some((p, slope)) = line.pressure_and_slope(t) else {
                    continue;
                };
                if !p.is_finite() {
                    continue;
                }
                let h = 1e-6 * t;
                if let (Some(up), Some(down)) = (line.pressure(t + h), line.pressure(t - h)) {
                    let difference = (up - down) / (2.0 * h);
                    assert!(
                        (slope / difference - 1.0).abs() < 1e-6,
                        "{}: slope {slope} against {difference} at {t} K",
                        fluid.name
                    );
                }
                let Some(found) = fluid.melting_temperature(p) else {
                    panic!("{}: no melting temperature at {p} Pa", fluid.name)
                };
                let whole = crate::numeric::bracketed_root(
                    "test",
                    |t| line.pressure(t).map_or(f64::NAN, |m| m - p),
                    low,
                    high,
                    tolerance,
                )
                .unwrap();
                let there = line.pressure(found).unwrap();
                assert!(
                    (found - whole).abs() <= 2.0 * tolerance
                        && (there - p).abs() <= 1e-9 * p.abs() + 1e-6,
                    "{}: {found} K by the cell, {whole} K by the whole line ({t} K asked), \
                     line pressure {there} against {p} Pa",
                    fluid.name
                );
                by_cell += usize::from(line.cell_bracket(p).is_some());
            }
            assert!(
                by_cell > 1_500,
                "{}: only {by_cell} found by a cell",
                fluid.name
            );
        }
    }
}
