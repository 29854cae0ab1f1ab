//! The saturation line tabulated from the fluid's own equation of state, for quick
//! phase decisions and close seeds.
//!
//! The table has [`SATURATION_TABLE_NODES`] nodes, exact saturated states at
//! temperatures evenly spaced from the triple point to the top of the saturation
//! range. Each node, and each cell's error, is solved the first time a lookup needs
//! it and kept (a run asks for a few cells of a few fluids; solving the whole table
//! when a fluid was loaded took 257 exact saturations a fluid). Every node is solved
//! by the fluid as it was before it had a table, seeded by its ancillary equations,
//! so each is the same whenever it is solved. Each node keeps ln p, ρ′, ln ρ″, h′, h″, s′ and s″ and
//! their exact slopes along the saturation line (Clausius–Clapeyron for ln p, the chain
//! rule through (∂/∂T)_ρ and (∂/∂ρ)_T for the rest), and cubic Hermite interpolation
//! joins the nodes. A lookup costs a few dozen multiplications and no transcendental
//! function beyond one `ln` or `exp`.
//!
//! The error of every cell is measured halfway between its nodes, where the Hermite
//! error peaks, against the exact saturation there; lookups report their cell's
//! measured error, and every decision made on the table keeps a margin of several
//! times it. Close calls go to the exact saturation.

use super::fluid::{Fluid, Properties};
use crate::error::Result;
use std::sync::OnceLock;

/// Number of nodes of the table.
pub const SATURATION_TABLE_NODES: usize = 129;

/// Columns kept at every node.
const LN_PRESSURE: usize = 0;
const LIQUID_DENSITY: usize = 1;
const LN_VAPOUR_DENSITY: usize = 2;
const LIQUID_ENTHALPY: usize = 3;
const VAPOUR_ENTHALPY: usize = 4;
const LIQUID_ENTROPY: usize = 5;
const VAPOUR_ENTROPY: usize = 6;
const COLUMNS: usize = 7;

/// Iteration cap of the inversion of ln p inside one cell.
const INVERSION_CAP: usize = 40;

/// One exact saturated state and its slopes along the saturation line.
#[derive(Debug, Clone, Copy)]
struct Node {
    temperature: f64,
    values: [f64; COLUMNS],
    /// d(value)/dT along the saturation line.
    slopes: [f64; COLUMNS],
}

/// The measured error of one cell of the table (absolute, in SI units), halfway
/// between its nodes.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct TableError {
    /// |ln p_table(T) − ln p(T)|.
    pub ln_pressure: f64,
    /// |T_table(p) − T(p)|, K.
    pub temperature: f64,
    /// Relative error of the saturated densities at T (the larger of the two).
    pub density: f64,
    /// Error of h′ and h″ at p (the larger), J/kg.
    pub enthalpy: f64,
    /// Error of s′ and s″ at p (the larger), J/(kg·K).
    pub entropy: f64,
}

impl TableError {
    fn max(self, other: TableError) -> TableError {
        TableError {
            ln_pressure: self.ln_pressure.max(other.ln_pressure),
            temperature: self.temperature.max(other.temperature),
            density: self.density.max(other.density),
            enthalpy: self.enthalpy.max(other.enthalpy),
            entropy: self.entropy.max(other.entropy),
        }
    }
}

/// The table's approximate saturated states at one temperature or pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ApproximateSaturation {
    /// Saturation temperature, K.
    pub temperature: f64,
    /// Saturation pressure, Pa.
    pub pressure: f64,
    /// d ln p/dT along the saturation line, 1/K.
    pub ln_pressure_slope: f64,
    /// Saturated-liquid density, kg/m³.
    pub liquid_density: f64,
    /// Saturated-vapour density, kg/m³.
    pub vapour_density: f64,
    /// Saturated-liquid enthalpy, J/kg.
    pub liquid_enthalpy: f64,
    /// Saturated-vapour enthalpy, J/kg.
    pub vapour_enthalpy: f64,
    /// Saturated-liquid entropy, J/(kg·K).
    pub liquid_entropy: f64,
    /// Saturated-vapour entropy, J/(kg·K).
    pub vapour_entropy: f64,
    /// The measured error of the cell the lookup fell in.
    pub error: TableError,
}

/// The tabulated saturation line of one pure fluid (empty for a pseudo-pure fluid and
/// while the fluid is being built).
#[derive(Debug, Clone, Default)]
pub struct SaturationTable {
    /// The fluid whose saturation the nodes are, as it was before it had a table.
    source: Option<Box<Fluid>>,
    /// The first node's temperature and the top of the range, K.
    low: f64,
    high: f64,
    /// The nodes, each solved when first needed (`None` where its solve failed).
    nodes: Vec<OnceLock<Option<Node>>>,
    /// Per cell (between node i and i + 1), its measured error, found when first
    /// needed.
    errors: Vec<OnceLock<Option<TableError>>>,
    /// Temperature step between nodes, K.
    step: f64,
}

impl SaturationTable {
    /// True when the table holds no nodes.
    pub fn is_empty(&self) -> bool {
        self.nodes.len() < 2
    }

    /// The temperature of node `i` (a half-integer `i` is the middle of a cell), K.
    fn temperature_at(&self, i: f64) -> f64 {
        (self.low + self.step * i).min(self.high)
    }

    /// Node `i`, solved and kept the first time it is asked for.
    fn node(&self, i: usize) -> Option<&Node> {
        self.nodes[i]
            .get_or_init(|| {
                let source = self.source.as_ref()?;
                source.saturation_node(self.temperature_at(i as f64)).ok()
            })
            .as_ref()
    }

    /// The measured error of cell `cell`, found and kept the first time it is asked
    /// for.
    fn error(&self, cell: usize) -> Option<TableError> {
        *self.errors[cell].get_or_init(|| self.measure_error(cell))
    }

    /// The temperature range the table covers, K.
    pub fn temperature_range(&self) -> Option<(f64, f64)> {
        (!self.is_empty()).then(|| {
            (
                self.temperature_at(0.0),
                self.temperature_at(self.last_index() as f64),
            )
        })
    }

    /// Whether every node and every cell's error can be solved (each is solved on
    /// the way, and kept).
    pub fn solves_whole(&self) -> bool {
        (0..self.nodes.len()).all(|i| self.node(i).is_some())
            && (0..self.errors.len()).all(|cell| self.error(cell).is_some())
    }

    /// The largest measured error over the cells whose saturation pressure lies below
    /// `pressure`.
    pub fn largest_error_below(&self, pressure: f64) -> TableError {
        let limit = pressure.ln();
        (0..self.errors.len())
            .filter(|&cell| {
                self.node(cell)
                    .is_some_and(|node| node.values[LN_PRESSURE] < limit)
            })
            .filter_map(|cell| self.error(cell))
            .fold(TableError::default(), |worst, error| worst.max(error))
    }

    fn last_index(&self) -> usize {
        self.nodes.len() - 1
    }

    /// Interpolates every column in cell `cell` at temperature T, reporting `error`.
    fn interpolate(
        &self,
        cell: usize,
        temperature: f64,
        error: TableError,
    ) -> Option<ApproximateSaturation> {
        let (a, b) = (self.node(cell)?, self.node(cell + 1)?);
        let t = (temperature - a.temperature) / self.step;
        let (weights, slope_weights) = crate::numeric::hermite_basis(t, self.step);
        let column = |c: usize, w: &[f64; 4]| {
            w[0] * a.values[c] + w[1] * a.slopes[c] + w[2] * b.values[c] + w[3] * b.slopes[c]
        };
        Some(ApproximateSaturation {
            temperature,
            pressure: column(LN_PRESSURE, &weights).exp(),
            ln_pressure_slope: column(LN_PRESSURE, &slope_weights),
            liquid_density: column(LIQUID_DENSITY, &weights),
            vapour_density: column(LN_VAPOUR_DENSITY, &weights).exp(),
            liquid_enthalpy: column(LIQUID_ENTHALPY, &weights),
            vapour_enthalpy: column(VAPOUR_ENTHALPY, &weights),
            liquid_entropy: column(LIQUID_ENTROPY, &weights),
            vapour_entropy: column(VAPOUR_ENTROPY, &weights),
            error,
        })
    }

    /// The cell holding temperature T, or `None` outside the table.
    fn cell_at_temperature(&self, temperature: f64) -> Option<usize> {
        if self.is_empty() {
            return None;
        }
        let first = self.temperature_at(0.0);
        let last = self.temperature_at(self.last_index() as f64);
        if !(temperature >= first && temperature <= last) {
            return None;
        }
        Some((((temperature - first) / self.step) as usize).min(self.nodes.len() - 2))
    }

    /// The approximate saturated states at temperature T (K); `None` outside the
    /// table.
    pub fn at_temperature(&self, temperature: f64) -> Option<ApproximateSaturation> {
        let cell = self.cell_at_temperature(temperature)?;
        self.interpolate(cell, temperature, self.error(cell)?)
    }

    /// [`SaturationTable::at_temperature`] without the cell's measured error (its
    /// `error` is zero): for seeds where every cell's error is known to be small.
    pub fn at_temperature_unmeasured(&self, temperature: f64) -> Option<ApproximateSaturation> {
        let cell = self.cell_at_temperature(temperature)?;
        self.interpolate(cell, temperature, TableError::default())
    }

    /// The measured error of the cell holding `temperature`; `None` outside the
    /// table.
    pub fn cell_error_at(&self, temperature: f64) -> Option<TableError> {
        self.error(self.cell_at_temperature(temperature)?)
    }

    /// The approximate saturated states at pressure p (Pa); `None` outside the table.
    /// The temperature solves the cell's cubic for ln p by Newton's method kept inside
    /// the cell (bisection when a step leaves it).
    pub fn at_pressure(&self, pressure: f64) -> Option<ApproximateSaturation> {
        let (cell, temperature) = self.cell_at_pressure(pressure)?;
        self.interpolate(cell, temperature, self.error(cell)?)
    }

    /// The temperatures of the two nodes whose exact saturation pressures enclose
    /// `pressure` (K), widened by 1e-9 of themselves for the nodes' own solve: a
    /// bracket of the saturation temperature one cell wide, from the nodes alone (no
    /// interpolation, no measured error). `None` outside the table.
    pub fn temperature_bracket(&self, pressure: f64) -> Option<(f64, f64)> {
        let (cell, _) = self.cell_index_at_pressure(pressure)?;
        let (a, b) = (self.node(cell)?, self.node(cell + 1)?);
        Some((a.temperature * (1.0 - 1e-9), b.temperature * (1.0 + 1e-9)))
    }

    /// The cell whose nodes' ln p enclose ln `pressure` (clamped to the table's
    /// ends within 1e-9), and that ln p; `None` outside the table.
    fn cell_index_at_pressure(&self, pressure: f64) -> Option<(usize, f64)> {
        if self.is_empty() || !(pressure > 0.0) {
            return None;
        }
        let first = self.node(0)?.values[LN_PRESSURE];
        let last = self.node(self.last_index())?.values[LN_PRESSURE];
        // Within rounding (1e-9 in ln p) of an end is that end.
        let target = pressure.ln();
        if !(target >= first - 1e-9 && target <= last + 1e-9) {
            return None;
        }
        let target = target.clamp(first, last);
        // How many nodes lie at or below the target (ln p rises with T): a binary
        // search, which solves only the nodes it looks at.
        let (mut below, mut above) = (0, self.nodes.len());
        while below < above {
            let middle = below + (above - below) / 2;
            if self.node(middle)?.values[LN_PRESSURE] <= target {
                below = middle + 1;
            } else {
                above = middle;
            }
        }
        Some((below.clamp(1, self.nodes.len() - 1) - 1, target))
    }

    /// The cell and temperature of [`SaturationTable::at_pressure`].
    fn cell_at_pressure(&self, pressure: f64) -> Option<(usize, f64)> {
        let (cell, target) = self.cell_index_at_pressure(pressure)?;
        let (a, b) = (self.node(cell)?, self.node(cell + 1)?);
        let (y0, y1) = (a.values[LN_PRESSURE], b.values[LN_PRESSURE]);
        let (m0, m1) = (a.slopes[LN_PRESSURE], b.slopes[LN_PRESSURE]);
        let (mut low, mut high) = (0.0f64, 1.0f64);
        let mut t = ((target - y0) / (y1 - y0)).clamp(0.0, 1.0);
        for _ in 0..INVERSION_CAP {
            let (w, ws) = crate::numeric::hermite_basis(t, self.step);
            let f = w[0] * y0 + w[1] * m0 + w[2] * y1 + w[3] * m1 - target;
            if f == 0.0 {
                break;
            }
            let slope = (ws[0] * y0 + ws[1] * m0 + ws[2] * y1 + ws[3] * m1) * self.step;
            if f < 0.0 {
                low = t;
            } else {
                high = t;
            }
            // A Newton step may land on the bracket's end it just set (a step that
            // rounds to nothing); only a step outside the bracket is replaced.
            let mut next = t - f / slope;
            if !(next >= low && next <= high) {
                next = 0.5 * (low + high);
            }
            let done = (next - t).abs() <= 1e-15;
            t = next;
            if done {
                break;
            }
        }
        // The loop ends within rounding of the cubic's root or on the cap with the
        // root bracketed in [low, high]; the measured cell error covers either.
        Some((cell, a.temperature + t * self.step))
    }

    /// Measures cell `cell`'s error halfway between its nodes against the exact
    /// saturation there.
    fn measure_error(&self, cell: usize) -> Option<TableError> {
        let middle = self.temperature_at(cell as f64 + 0.5);
        let exact = self.source.as_ref()?.saturation_node(middle).ok()?;
        let value = |c: usize| exact.values[c];
        let mut error = TableError::default();
        let by_temperature = self
            .cell_at_temperature(middle)
            .and_then(|c| self.interpolate(c, middle, TableError::default()));
        if let Some(by_temperature) = by_temperature {
            error.ln_pressure = (by_temperature.pressure.ln() - value(LN_PRESSURE)).abs();
            error.density = ((by_temperature.liquid_density / value(LIQUID_DENSITY) - 1.0).abs())
                .max((by_temperature.vapour_density.ln() - value(LN_VAPOUR_DENSITY)).abs());
        }
        let by_pressure = self
            .cell_at_pressure(value(LN_PRESSURE).exp())
            .and_then(|(c, t)| self.interpolate(c, t, TableError::default()));
        if let Some(by_pressure) = by_pressure {
            error.temperature = (by_pressure.temperature - middle).abs();
            error.enthalpy = (by_pressure.liquid_enthalpy - value(LIQUID_ENTHALPY))
                .abs()
                .max((by_pressure.vapour_enthalpy - value(VAPOUR_ENTHALPY)).abs());
            error.entropy = (by_pressure.liquid_entropy - value(LIQUID_ENTROPY))
                .abs()
                .max((by_pressure.vapour_entropy - value(VAPOUR_ENTROPY)).abs());
        }
        // No cell is sharper than the exact saturation it is compared with (solved
        // to about 1e-12): the errors are floored at 1e-10 of each quantity.
        let floor = 1e-10;
        error.ln_pressure = error.ln_pressure.max(floor);
        error.temperature = error.temperature.max(floor * middle);
        error.density = error.density.max(floor);
        error.enthalpy = error
            .enthalpy
            .max(floor * (value(VAPOUR_ENTHALPY) - value(LIQUID_ENTHALPY)).abs());
        error.entropy = error
            .entropy
            .max(floor * (value(VAPOUR_ENTROPY) - value(LIQUID_ENTROPY)).abs());
        Some(error)
    }
}

impl Fluid {
    /// One node: the exact saturation at T and its slopes along the line.
    fn saturation_node(&self, temperature: f64) -> Result<Node> {
        let saturation = self.saturation_at_temperature(temperature)?;
        let factors = self.tau_factors(temperature);
        let liquid = self.properties_with(&factors, temperature, saturation.liquid.density);
        let vapour = self.properties_with(&factors, temperature, saturation.vapour.density);
        let pressure = saturation.vapour.pressure;
        // Clausius–Clapeyron: dp/dT = Δs/Δv along the line.
        let dp_dt =
            (vapour.entropy - liquid.entropy) / (1.0 / vapour.density - 1.0 / liquid.density);
        // Along the line each phase's density moves so that p follows dp/dT:
        // dρ/dT = (dp/dT − (∂p/∂T)_ρ)/(∂p/∂ρ)_T; h and s follow by the chain rule.
        let along = |x: &Properties| {
            let rho = x.density;
            let drho = (dp_dt - x.dp_dt) / x.dp_drho;
            let dh = x.cv
                + x.dp_dt / rho
                + (x.dp_drho / rho - temperature * x.dp_dt / (rho * rho)) * drho;
            let ds = x.cv / temperature - x.dp_dt / (rho * rho) * drho;
            (drho, dh, ds)
        };
        let (liquid_drho, liquid_dh, liquid_ds) = along(&liquid);
        let (vapour_drho, vapour_dh, vapour_ds) = along(&vapour);
        let mut values = [0.0; COLUMNS];
        let mut slopes = [0.0; COLUMNS];
        values[LN_PRESSURE] = pressure.ln();
        slopes[LN_PRESSURE] = dp_dt / pressure;
        values[LIQUID_DENSITY] = liquid.density;
        slopes[LIQUID_DENSITY] = liquid_drho;
        values[LN_VAPOUR_DENSITY] = vapour.density.ln();
        slopes[LN_VAPOUR_DENSITY] = vapour_drho / vapour.density;
        values[LIQUID_ENTHALPY] = liquid.enthalpy;
        slopes[LIQUID_ENTHALPY] = liquid_dh;
        values[VAPOUR_ENTHALPY] = vapour.enthalpy;
        slopes[VAPOUR_ENTHALPY] = vapour_dh;
        values[LIQUID_ENTROPY] = liquid.entropy;
        slopes[LIQUID_ENTROPY] = liquid_ds;
        values[VAPOUR_ENTROPY] = vapour.entropy;
        slopes[VAPOUR_ENTROPY] = vapour_ds;
        Ok(Node {
            temperature,
            values,
            slopes,
        })
    }

    /// The saturation table, its nodes and cell errors to be solved when first
    /// needed, from the triple point to the top of the saturation range. Empty for
    /// a pseudo-pure fluid. Called last when the fluid is built: the nodes are solved
    /// by the fluid as it is then (its final reference state, no table yet).
    pub(crate) fn build_saturation_table(&self) -> Result<SaturationTable> {
        if self.pseudo_pure {
            return Ok(SaturationTable::default());
        }
        let low = self.triple_temperature;
        let high = self.saturation_temperature_max();
        let intervals = (SATURATION_TABLE_NODES - 1) as f64;
        Ok(SaturationTable {
            source: Some(Box::new(self.clone())),
            low,
            high,
            nodes: (0..SATURATION_TABLE_NODES)
                .map(|_| OnceLock::new())
                .collect(),
            errors: (0..SATURATION_TABLE_NODES - 1)
                .map(|_| OnceLock::new())
                .collect(),
            step: (high - low) / intervals,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::{file::FluidFile, Fluid, FLUID_FILES};

    /// A fresh instance of the built-in fluid file `index`, with a table of its own
    /// that nothing has asked yet.
    fn fresh(index: usize) -> Fluid {
        let data: FluidFile = serde_yaml::from_str(FLUID_FILES[index]).unwrap();
        Fluid::from_file(data, "test").unwrap()
    }

    /// The table answers the same, bit for bit, whatever order its nodes and cells
    /// were solved in: one instance solved whole first (as the table was built when
    /// a fluid was loaded), another asked lazily in a scattered order, for every
    /// fluid with a saturation line; and every node and cell can be solved.
    #[test]
    fn lookups_do_not_depend_on_the_order_nodes_are_solved_in() {
        for index in 0..FLUID_FILES.len() {
            let (whole, lazy) = (fresh(index), fresh(index));
            if whole.pseudo_pure {
                assert!(whole.saturation_table.is_empty());
                continue;
            }
            assert!(whole.saturation_table.solves_whole(), "{}", whole.name);
            let (low, high) = whole.saturation_table.temperature_range().unwrap();
            // A scattered order: a stride coprime to the count.
            let count = 997;
            for k in 0..count {
                let j = (k * 389) % count;
                let t = low + (high - low) * (j as f64 + 0.37) / count as f64;
                let same = |a: Option<_>, b: Option<_>, at: String| {
                    assert_eq!(format!("{a:?}"), format!("{b:?}"), "{} at {at}", whole.name);
                    assert!(a.is_some(), "{} at {at}: no answer", whole.name);
                    a.unwrap()
                };
                let by_temperature: super::ApproximateSaturation = same(
                    whole.saturation_table.at_temperature(t),
                    lazy.saturation_table.at_temperature(t),
                    format!("{t} K"),
                );
                let p = by_temperature.pressure;
                same(
                    whole.saturation_table.at_pressure(p),
                    lazy.saturation_table.at_pressure(p),
                    format!("{p} Pa"),
                );
            }
        }
    }
}
