//! Density seeds for the (T, p) flash: a grid over ln T and ln p whose nodes hold
//! ln ρ and its first derivatives, interpolated by cubic Hermite polynomials.
//!
//! The density iteration ([`Fluid::solve_density`]) converges in one Halley step
//! from a seed within about 1e-4 of the root, and so ends after two evaluations of
//! the equation (the seed's and the root's, which the properties reuse); from the
//! ideal-gas density or a saturated density it needs three to five. The seed only
//! starts the iteration: the density is still the root of p(T, ρ) = p to the same
//! tolerance, so no property depends on the grid beyond the last bits.
//!
//! Each node is computed the first time a flash needs it (one plain (T, p) flash),
//! then kept, so a process that flashes a few states pays for a few nodes. A node's
//! value is the same whichever flash asks first, so seeds, and so results, do not
//! depend on the order of the flashes or on the threads.
//!
//! A cell is used only where the density is smooth across it: its four corners on
//! one side of the saturation line (the vapour pressure rises with temperature, so
//! four vapour corners bound a cell of vapour, four liquid corners a cell of liquid),
//! or vapour and supercritical corners, or liquid and supercritical corners above
//! the critical pressure. Elsewhere (a cell the saturation or melting line crosses,
//! outside the grid) the flash seeds as before.

use super::fluid::Fluid;
use std::sync::OnceLock;

/// Grid spacing in ln T.
const STEP_LN_TEMPERATURE: f64 = 0.1;
/// Grid spacing in ln p.
const STEP_LN_PRESSURE: f64 = 0.25;
/// The lowest pressure of the grid, Pa; below it the ideal gas is a seed as good.
const LOWEST_PRESSURE: f64 = 1e3;

/// Where a node lies, as a bit: below the critical temperature and less dense than
/// critical (vapour), or denser (liquid), or at or above the top of the saturation
/// line (supercritical).
const VAPOUR: u8 = 1;
const LIQUID: u8 = 2;
const SUPERCRITICAL: u8 = 4;

/// One node: ln ρ, and its derivatives along ln T and ln p times the grid steps.
#[derive(Debug, Clone, Copy)]
struct Node {
    ln_density: f64,
    along_temperature: f64,
    along_pressure: f64,
    /// [`VAPOUR`], [`LIQUID`] or [`SUPERCRITICAL`].
    region: u8,
}

/// The grid of one fluid, its nodes filled on demand.
#[derive(Debug, Clone)]
pub(crate) struct DensitySeeds {
    ln_temperature_low: f64,
    step_temperature: f64,
    rows: usize,
    ln_pressure_low: f64,
    step_pressure: f64,
    columns: usize,
    /// 1/step in ln T and in ln p.
    inverse_steps: (f64, f64),
    /// The first column at or above the critical pressure.
    critical_column: usize,
    /// Row-major; `None` where the plain flash fails (the solid, the saturation
    /// line itself).
    nodes: Box<[OnceLock<Option<Node>>]>,
    /// Row-major, one fewer each way: the cell's interpolating polynomial (see
    /// [`Cell`]), `None` where the cell is not smooth or a corner failed.
    cells: Box<[OnceLock<Option<Cell>>]>,
}

/// A cell's interpolant ln ρ = Σ a[i][j] uⁱ vʲ (i, j = 0 … 3; u, v ∈ [0, 1] the
/// place in the cell along ln T and ln p), kept as a[4i + j].
type Cell = [f64; 16];

/// The cubic Hermite basis functions (value at 0, slope at 0, value at 1, slope at
/// 1) as coefficients of 1, t, t², t³.
const HERMITE: [[f64; 4]; 4] = [
    [1.0, 0.0, -3.0, 2.0],
    [0.0, 1.0, -2.0, 1.0],
    [0.0, 0.0, 3.0, -2.0],
    [0.0, 0.0, -1.0, 1.0],
];

impl DensitySeeds {
    /// An empty grid over the fluid's temperature range and from
    /// [`LOWEST_PRESSURE`] to its highest pressure.
    pub(crate) fn new(fluid: &Fluid) -> DensitySeeds {
        let span = |low: f64, high: f64, step: f64| {
            let (low, high) = (low.ln(), high.ln());
            let count = (((high - low) / step).ceil() as usize).max(1) + 1;
            (low, (high - low) / (count - 1) as f64, count)
        };
        let (ln_temperature_low, step_temperature, rows) = span(
            fluid.temperature_min,
            fluid.temperature_max,
            STEP_LN_TEMPERATURE,
        );
        let (ln_pressure_low, step_pressure, columns) =
            span(LOWEST_PRESSURE, fluid.pressure_max, STEP_LN_PRESSURE);
        DensitySeeds {
            ln_temperature_low,
            step_temperature,
            rows,
            ln_pressure_low,
            step_pressure,
            columns,
            inverse_steps: (1.0 / step_temperature, 1.0 / step_pressure),
            critical_column: ((fluid.critical.pressure.ln() - ln_pressure_low) / step_pressure)
                .ceil()
                .max(0.0) as usize,
            nodes: (0..rows * columns).map(|_| OnceLock::new()).collect(),
            cells: (0..(rows - 1) * (columns - 1))
                .map(|_| OnceLock::new())
                .collect(),
        }
    }

    /// Node (row, column), computed by a plain flash the first time.
    fn node(&self, fluid: &'static Fluid, row: usize, column: usize) -> Option<Node> {
        *self.nodes[row * self.columns + column].get_or_init(|| {
            let ln_temperature = self.ln_temperature_low + row as f64 * self.step_temperature;
            let ln_pressure = self.ln_pressure_low + column as f64 * self.step_pressure;
            let (temperature, pressure) = (ln_temperature.exp(), ln_pressure.exp());
            let state = fluid.state_tp_unseeded(temperature, pressure).ok()?;
            let props = state.single_phase?;
            let density = props.density;
            // (∂ ln ρ/∂ ln p)_T = p/(ρ ∂p/∂ρ); (∂ ln ρ/∂ ln T)_p = −T (∂p/∂T)_ρ/(ρ ∂p/∂ρ).
            let along_pressure = props.pressure / (density * props.dp_drho);
            let along_temperature = -temperature * props.dp_dt / (density * props.dp_drho);
            let region = if temperature >= fluid.saturation_temperature_max() {
                SUPERCRITICAL
            } else if density > fluid.critical.density {
                LIQUID
            } else {
                VAPOUR
            };
            let node = Node {
                ln_density: density.ln(),
                along_temperature: along_temperature * self.step_temperature,
                along_pressure: along_pressure * self.step_pressure,
                region,
            };
            [node.ln_density, node.along_temperature, node.along_pressure]
                .iter()
                .all(|v| v.is_finite())
                .then_some(node)
        })
    }

    /// A seed for the density at (T, p): `None` outside the grid or where the cell
    /// is not smooth (see the module's note).
    pub(crate) fn seed(
        &self,
        fluid: &'static Fluid,
        temperature: f64,
        pressure: f64,
    ) -> Option<f64> {
        let x = (temperature.ln() - self.ln_temperature_low) * self.inverse_steps.0;
        let y = (pressure.ln() - self.ln_pressure_low) * self.inverse_steps.1;
        // Also false for NaN.
        if !(x >= 0.0 && y >= 0.0) {
            return None;
        }
        let (row, column) = (x as usize, y as usize);
        if row + 1 >= self.rows || column + 1 >= self.columns {
            return None;
        }
        let a = (*self.cells[row * (self.columns - 1) + column]
            .get_or_init(|| self.cell(fluid, row, column)))?;
        let (u, v) = (x - row as f64, y - column as f64);
        // Estrin's scheme, for a short chain of dependent operations.
        let (u2, v2) = (u * u, v * v);
        let along_v =
            |i: usize| (a[4 * i] + v * a[4 * i + 1]) + v2 * (a[4 * i + 2] + v * a[4 * i + 3]);
        let ln_density = (along_v(0) + u * along_v(1)) + u2 * (along_v(2) + u * along_v(3));
        Some(super::fast_exp::exp(ln_density))
    }

    /// The interpolant of cell (row, column), whose low corner is node (row,
    /// column); `None` where a corner failed or the cell is not smooth. Cubic
    /// Hermite along ln p on the cell's two rows, the ln T slopes linear along ln p
    /// between the corners, then cubic Hermite along ln T.
    fn cell(&self, fluid: &'static Fluid, row: usize, column: usize) -> Option<Cell> {
        let corners = [
            self.node(fluid, row, column)?,
            self.node(fluid, row, column + 1)?,
            self.node(fluid, row + 1, column)?,
            self.node(fluid, row + 1, column + 1)?,
        ];
        let regions = corners.iter().fold(0, |all, c| all | c.region);
        // No phase boundary crosses the cell: not vapour and liquid corners both; and
        // liquid with supercritical corners only above the critical pressure (below
        // it the saturation line may cross the cell under the critical temperature).
        if regions & (VAPOUR | LIQUID) == VAPOUR | LIQUID
            || (regions == LIQUID | SUPERCRITICAL && column < self.critical_column)
        {
            return None;
        }
        // Polynomials in v: each row's value (Hermite on the two nodes' ln ρ and
        // ln p slopes) and ln T slope (linear between the nodes).
        let value = |low: &Node, high: &Node| {
            let ends = [
                low.ln_density,
                low.along_pressure,
                high.ln_density,
                high.along_pressure,
            ];
            let mut out = [0.0; 4];
            for (basis, end) in HERMITE.iter().zip(ends) {
                for (o, b) in out.iter_mut().zip(basis) {
                    *o += b * end;
                }
            }
            out
        };
        let slope = |low: &Node, high: &Node| {
            [
                low.along_temperature,
                high.along_temperature - low.along_temperature,
                0.0,
                0.0,
            ]
        };
        let in_v = [
            value(&corners[0], &corners[1]),
            slope(&corners[0], &corners[1]),
            value(&corners[2], &corners[3]),
            slope(&corners[2], &corners[3]),
        ];
        // Hermite along u on those four.
        let mut a = [0.0; 16];
        for (basis, polynomial) in HERMITE.iter().zip(&in_v) {
            for (i, b) in basis.iter().enumerate() {
                for (j, c) in polynomial.iter().enumerate() {
                    a[4 * i + j] += b * c;
                }
            }
        }
        a.iter().all(|c| c.is_finite()).then_some(a)
    }
}

#[cfg(test)]
mod tests {
    use super::super::{file::FluidFile, Fluid, FLUID_FILES};

    /// A fresh instance of built-in fluid file `index`, whose grid nothing has asked
    /// yet.
    fn fresh(index: usize) -> &'static Fluid {
        let data: FluidFile = serde_yaml::from_str(FLUID_FILES[index]).unwrap();
        Box::leak(Box::new(Fluid::from_file(data, "test").unwrap()))
    }

    /// A fixed, reproducible sequence in [0, 1).
    fn sequence(seed: u64) -> impl FnMut() -> f64 {
        let mut state = seed;
        move || {
            state ^= state >> 12;
            state ^= state << 25;
            state ^= state >> 27;
            (state.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
        }
    }

    /// (T, p) log-uniform over the fluid's whole range from 1 kPa, and some states
    /// 0.1 % to 3 % either side of the vapour pressure, and next to the critical
    /// point.
    fn states(fluid: &Fluid, count: usize) -> Vec<(f64, f64)> {
        let mut next = sequence(0x5EED_0000 + fluid.molar_mass.to_bits() % 997);
        let (t_low, t_high) = (fluid.temperature_min, fluid.temperature_max);
        let (p_low, p_high) = (1e3f64, fluid.pressure_max);
        let mut out = Vec::with_capacity(count);
        for i in 0..count {
            let t = t_low * (t_high / t_low).powf(next());
            let p = match i % 4 {
                0 if t < fluid.saturation_temperature_max() => {
                    match fluid.saturation_at_temperature(t) {
                        Ok(s) => {
                            let side = if next() < 0.5 { -1.0 } else { 1.0 };
                            s.vapour.pressure * (1.0 + side * (0.001 + 0.03 * next()))
                        }
                        Err(_) => continue,
                    }
                }
                1 => {
                    let tc = fluid.critical.temperature * (0.97 + 0.06 * next());
                    let pc = fluid.critical.pressure * (0.9 + 0.2 * next());
                    out.push((tc, pc));
                    continue;
                }
                _ => p_low * (p_high / p_low).powf(next()),
            };
            out.push((t, p));
        }
        out
    }

    /// The seeded flash finds the same state as the plain one (the seed only starts
    /// the density iteration): the same phase side and density within 1e-12, for
    /// every pure fluid over its whole range, across saturation and next to the
    /// critical point; where the plain flash fails (the solid, outside the range)
    /// the seeded one fails too.
    #[test]
    fn seeded_flashes_find_the_plain_flashes_states() {
        let mut compared = 0;
        for fluid in crate::fluids::all().unwrap() {
            if fluid.pseudo_pure {
                continue;
            }
            for (t, p) in states(fluid, 2_000) {
                // Seeded without the plain flash as a second try, which would hide
                // a seed that leads the iteration astray.
                let seeded = fluid.state_tp_from(t, p, true);
                let plain = fluid.state_tp_unseeded(t, p);
                match (seeded, plain) {
                    (Ok(a), Ok(b)) => {
                        assert_eq!(a.phase, b.phase, "{} at {t} K, {p} Pa", fluid.name);
                        // Both roots meet p within 1e-13 of it: their densities
                        // within about that times ρ(∂ ln ρ/∂ ln p), which is large next
                        // to the critical point.
                        let slope = b.single_phase.map_or(f64::INFINITY, |props| props.dp_drho);
                        let allowed = 1e-12 * (b.density + p / slope);
                        assert!(
                            (a.density - b.density).abs() <= allowed,
                            "{} at {t} K, {p} Pa: {} against {}",
                            fluid.name,
                            a.density,
                            b.density
                        );
                        compared += 1;
                    }
                    (Err(_), Err(_)) => {}
                    (a, b) => panic!(
                        "{} at {t} K, {p} Pa: seeded {:?}, plain {:?}",
                        fluid.name,
                        a.map(|s| s.density),
                        b.map(|s| s.density)
                    ),
                }
            }
        }
        assert!(compared > 10_000, "{compared} states compared");
    }

    /// The seeds are close enough to end the density iteration in one step: over
    /// the (T, p) flash benchmark's ranges (log-uniform 65/14.5/2.5 K to 500 K, 0.5
    /// to 200 bar) at least 90 % of the states have a seed, the median seed lies
    /// within 1e-5 of the density and 99 % within 1e-2 (measured: 94–99 % seeded,
    /// medians 6e-7 to 1.3e-6, 99th percentiles 7e-4 to 3e-3; the worst, next to the
    /// critical point, 5–33 %).
    #[test]
    fn seeds_are_close_to_the_density() {
        for (name, t_low) in [("nitrogen", 65.0f64), ("hydrogen", 14.5), ("helium", 2.5)] {
            let fluid = crate::fluids::fluid(name).unwrap();
            let mut next = sequence(0xC0FF_EE00);
            let (mut errors, mut tried) = (Vec::new(), 0);
            while tried < 4_000 {
                let t = t_low * (500.0 / t_low).powf(next());
                let p = 0.5e5 * 400f64.powf(next());
                let Ok(state) = fluid.state_tp_unseeded(t, p) else {
                    continue;
                };
                tried += 1;
                if let Some(seed) = fluid.density_seed(t, p) {
                    errors.push((seed / state.density - 1.0).abs());
                }
            }
            errors.sort_by(f64::total_cmp);
            let median = errors[errors.len() / 2];
            let worst = errors[errors.len() * 99 / 100];
            assert!(
                errors.len() * 10 >= tried * 9,
                "{name}: {} of {tried} seeded",
                errors.len()
            );
            assert!(median < 1e-5, "{name}: median seed error {median:e}");
            assert!(worst < 1e-2, "{name}: 99th percentile seed error {worst:e}");
        }
    }

    /// No seed where the saturation line crosses the cell: at the vapour pressure
    /// itself, at 30 temperatures below the critical point, for every fluid with a
    /// saturation line.
    #[test]
    fn no_seed_across_the_saturation_line() {
        for fluid in crate::fluids::all().unwrap() {
            if fluid.pseudo_pure {
                continue;
            }
            for k in 0..30 {
                let t = fluid.triple_temperature
                    + (fluid.saturation_temperature_max() - fluid.triple_temperature)
                        * (k as f64 + 0.5)
                        / 30.0;
                let psat = fluid.saturation_at_temperature(t).unwrap().vapour.pressure;
                if psat < 1e3 {
                    continue;
                }
                assert_eq!(
                    fluid.density_seed(t, psat),
                    None,
                    "{} at {t} K, {psat} Pa",
                    fluid.name
                );
            }
        }
    }

    /// A seed is the same bits whichever flashes filled the grid first: one fresh
    /// instance asked in order, another in reverse, for every pure fluid.
    #[test]
    fn seeds_do_not_depend_on_the_order_of_the_flashes() {
        for index in 0..FLUID_FILES.len() {
            let (forward, backward) = (fresh(index), fresh(index));
            if forward.pseudo_pure {
                continue;
            }
            let states = states(forward, 300);
            let ask = |fluid: &'static Fluid, (t, p): (f64, f64)| {
                fluid.density_seed(t, p).map(f64::to_bits)
            };
            let first: Vec<_> = states.iter().map(|s| ask(forward, *s)).collect();
            let second: Vec<_> = states.iter().rev().map(|s| ask(backward, *s)).collect();
            let second: Vec<_> = second.into_iter().rev().collect();
            assert_eq!(first, second, "{}", forward.name);
            assert!(
                first.iter().filter(|s| s.is_some()).count() > 100,
                "{}",
                forward.name
            );
        }
    }
}
