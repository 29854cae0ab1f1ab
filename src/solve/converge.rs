//! Recycle convergence: bounded Wegstein acceleration of the fixed point x = G(x),
//! or Newton–Broyden on F(x) = G(x) − x, both on scaled variables, both capped, both
//! backing off when a pass fails from a poor iterate.

use crate::error::{Error, Result};
use nalgebra::{DMatrix, DVector};

/// One pass of the flowsheet: G(x), or an error when the pass cannot be computed.
pub trait FixedPoint {
    /// Computes G(x) (in the same scaled variables).
    fn pass(&mut self, x: &[f64]) -> Result<Vec<f64>>;

    /// Which map the last pass computed: a problem may pass coarsely while far
    /// from its fixed point and finely after, and a residual of one map is not
    /// comparable with the other's. By default always the same map.
    fn map(&self) -> usize {
        0
    }
}

/// The outcome of a convergence run.
#[derive(Debug, Clone)]
pub struct Converged {
    /// The converged variables.
    pub x: Vec<f64>,
    /// Passes made.
    pub iterations: usize,
    /// Largest scaled residual |G(x) − x| after each pass.
    pub log: Vec<f64>,
    /// Broyden's approximate inverse Jacobian of F(x) = G(x) − x at the end
    /// (row-major), to start a neighbouring case from; `None` from other methods.
    pub inverse_jacobian: Option<Vec<f64>>,
}

fn largest(a: &[f64], b: &[f64]) -> (f64, usize) {
    a.iter()
        .zip(b)
        .map(|(x, y)| (y - x).abs())
        .enumerate()
        .fold((0.0, 0), |best, (i, r)| {
            if r > best.0 || r.is_nan() {
                (r, i)
            } else {
                best
            }
        })
}

/// The error of a recycle solver that stopped: after a failed pass (`failed`), or at
/// its cap, naming the variable with the largest residual.
fn stopped(
    solver: &'static str,
    iterations: usize,
    residual: f64,
    worst: String,
    failed: Option<Error>,
) -> Error {
    Error::NoConvergence {
        solver,
        iterations,
        residual,
        context: match failed {
            Some(e) => format!(": a pass failed ({e}); largest residual was {worst}"),
            None => format!(" on {worst}"),
        },
    }
}

/// Times a failed pass steps back halfway towards the last good point.
const STEP_BACK_CAP: usize = 10;

/// Trial passes of one Broyden step before it gives up: the recomputed steps
/// ([`RECOMPUTED_STEPS`]) and then the halvings down to the shortest step taken.
const LINE_SEARCH_CAP: usize = 18;

/// A rejected Broyden trial corrects the inverse Jacobian along the step tried, and
/// this many times the step is recomputed from the corrected matrix at full length;
/// after that it is halved.
const RECOMPUTED_STEPS: usize = 6;

/// A pass at `x`; when it fails, steps back halfway towards `safe` up to
/// [`STEP_BACK_CAP`] times.
fn guarded_pass(problem: &mut impl FixedPoint, x: &mut [f64], safe: &[f64]) -> Result<Vec<f64>> {
    let mut last_error = None;
    for _ in 0..STEP_BACK_CAP {
        match problem.pass(x) {
            Ok(g) if g.iter().all(|v| v.is_finite()) => return Ok(g),
            Ok(_) => last_error = None,
            Err(e) => last_error = Some(e),
        }
        for (xi, si) in x.iter_mut().zip(safe) {
            *xi = 0.5 * (*xi + si);
        }
    }
    Err(last_error.unwrap_or(Error::Input(
        "a flowsheet pass gave non-finite values".into(),
    )))
}

/// Wegstein with q bounded to [−3, 0.9] per variable (negative q accelerates a
/// slow approach, positive q damps an oscillation), after two plain substitutions.
/// Where a step makes the largest residual grow (a recycle switching regime, as a
/// valve outlet turning two-phase), the history is dropped and a damped plain step
/// taken instead, more damped each time it recurs.
pub fn wegstein(
    problem: &mut impl FixedPoint,
    start: Vec<f64>,
    tolerance: f64,
    cap: usize,
    describe: &dyn Fn(usize) -> String,
) -> Result<Converged> {
    let mut x = start.clone();
    let mut g = guarded_pass(problem, &mut x, &start)?;
    let mut log = vec![largest(&x, &g).0];
    let mut previous: Option<(Vec<f64>, Vec<f64>)> = None;
    let mut plain_steps = 0usize;
    let mut damping = 1.0f64;
    let mut last_residual = f64::INFINITY;
    for iteration in 1..=cap {
        let (r, worst) = largest(&x, &g);
        if r <= tolerance {
            return Ok(Converged {
                x,
                iterations: iteration,
                log,
                inverse_jacobian: None,
            });
        }
        let grew = r > 1.5 * last_residual;
        if grew {
            previous = None;
            plain_steps = 0;
            damping = (damping * 0.7).max(0.1);
        } else if r < 0.5 * last_residual {
            damping = (damping * 1.2).min(1.0);
        }
        last_residual = r;
        let mut next: Vec<f64> = x
            .iter()
            .zip(&g)
            .map(|(xi, gi)| xi + damping * (gi - xi))
            .collect();
        if let Some((px, pg)) = &previous {
            if plain_steps >= 2 {
                for i in 0..x.len() {
                    let dx = x[i] - px[i];
                    if dx.abs() > 1e-300 {
                        let s = (g[i] - pg[i]) / dx;
                        let q = (s / (s - 1.0)).clamp(-3.0, 0.9);
                        if q.is_finite() {
                            next[i] = q * x[i] + (1.0 - q) * g[i];
                        }
                    }
                }
            }
        }
        plain_steps += 1;
        previous = Some((x.clone(), g.clone()));
        let safe = x.clone();
        x = next;
        g = match guarded_pass(problem, &mut x, &safe) {
            Ok(g) => g,
            Err(e) => {
                return Err(stopped(
                    "recycle convergence (Wegstein)",
                    iteration,
                    r,
                    describe(worst),
                    Some(e),
                ))
            }
        };
        log.push(largest(&x, &g).0);
    }
    let (r, worst) = largest(&x, &g);
    Err(stopped(
        "recycle convergence (Wegstein)",
        cap,
        r,
        describe(worst),
        None,
    ))
}

/// Plain substitution with a constant damping x ← x + ω(G(x) − x): slow, but it
/// walks through a kink (a separator switching between two-phase and vapour
/// outlets) where the accelerated methods bounce.
pub fn damped(
    problem: &mut impl FixedPoint,
    start: Vec<f64>,
    damping: f64,
    tolerance: f64,
    cap: usize,
    describe: &dyn Fn(usize) -> String,
) -> Result<Converged> {
    let mut x = start.clone();
    let mut g = guarded_pass(problem, &mut x, &start)?;
    let mut log = vec![largest(&x, &g).0];
    for iteration in 1..=cap {
        let (r, worst) = largest(&x, &g);
        if r <= tolerance {
            return Ok(Converged {
                x,
                iterations: iteration,
                log,
                inverse_jacobian: None,
            });
        }
        let safe = x.clone();
        x = x
            .iter()
            .zip(&g)
            .map(|(xi, gi)| xi + damping * (gi - xi))
            .collect();
        g = guarded_pass(problem, &mut x, &safe).map_err(|e| {
            stopped(
                "recycle convergence (damped substitution)",
                iteration,
                r,
                describe(worst),
                Some(e),
            )
        })?;
        log.push(largest(&x, &g).0);
    }
    let (r, worst) = largest(&x, &g);
    Err(stopped(
        "recycle convergence (damped substitution)",
        cap,
        r,
        describe(worst),
        None,
    ))
}

/// Broyden's good method on F(x) = G(x) − x, starting from J = −I (a plain
/// substitution) or from a neighbouring case's inverse Jacobian (`initial_inverse`,
/// row-major, n × n), with a backtracking step when the largest residual does not
/// fall. A rejected trial is a secant pair like an accepted one: it updates the
/// inverse Jacobian, and the step is recomputed from the corrected matrix (up to
/// [`RECOMPUTED_STEPS`] times) before steps are halved. Early on, where −I is a
/// poor guess, this learns the Jacobian from the passes a plain backtracking
/// search would discard: on the demos, a third to a quarter of the passes.
pub fn broyden(
    problem: &mut impl FixedPoint,
    start: Vec<f64>,
    initial_inverse: Option<&[f64]>,
    tolerance: f64,
    cap: usize,
    describe: &dyn Fn(usize) -> String,
) -> Result<Converged> {
    let n = start.len();
    let mut x = DVector::from_vec(start.clone());
    let mut xs = x.as_slice().to_vec();
    let g = guarded_pass(problem, &mut xs, &start)?;
    x = DVector::from_vec(xs);
    let mut f = DVector::from_vec(g) - &x;
    let mut inverse = match initial_inverse {
        Some(h) if h.len() == n * n && h.iter().all(|v| v.is_finite()) => {
            DMatrix::from_row_slice(n, n, h)
        }
        _ => -DMatrix::<f64>::identity(n, n),
    };
    let mut log = vec![f.amax()];
    let mut map = problem.map();
    for iteration in 1..=cap {
        let r = f.amax();
        if r <= tolerance {
            return Ok(Converged {
                x: x.as_slice().to_vec(),
                iterations: iteration,
                log,
                inverse_jacobian: Some(inverse.transpose().as_slice().to_vec()),
            });
        }
        let mut step = -(&inverse * &f);
        let mut lambda = 1.0;
        let mut accepted = None;
        let mut recomputed = 0;
        for _ in 0..LINE_SEARCH_CAP {
            let mut trial: Vec<f64> = (&x + &step * lambda).as_slice().to_vec();
            let safe = x.as_slice().to_vec();
            if let Ok(g) = guarded_pass(problem, &mut trial, &safe) {
                let t = DVector::from_vec(trial);
                let ft = DVector::from_vec(g) - &t;
                // The first pass on a new map is taken as it is: its residual is
                // not comparable with the last, nor the pair a secant of one map.
                if problem.map() != map {
                    map = problem.map();
                    accepted = Some((t, ft, false));
                    break;
                }
                if ft.amax() < r * (1.0 - 1e-4 * lambda) || lambda < 0.02 {
                    accepted = Some((t, ft, true));
                    break;
                }
                broyden_update(&mut inverse, &(&t - &x), &(&ft - &f));
                step = -(&inverse * &f);
                recomputed += 1;
                if recomputed <= RECOMPUTED_STEPS {
                    continue;
                }
            }
            lambda *= 0.5;
        }
        let Some((xn, fn_, secant)) = accepted else {
            let worst = f.iamax();
            return Err(Error::NoConvergence {
                solver: "recycle convergence (Broyden)",
                iterations: iteration,
                residual: r,
                context: format!(
                    ": no step reduced the residual; largest on {}",
                    describe(worst)
                ),
            });
        };
        if secant {
            broyden_update(&mut inverse, &(&xn - &x), &(&fn_ - &f));
        }
        x = xn;
        f = fn_;
        log.push(f.amax());
    }
    let worst = f.iamax();
    Err(Error::NoConvergence {
        solver: "recycle convergence (Broyden)",
        iterations: cap,
        residual: f.amax(),
        context: format!(" on {}", describe(worst)),
    })
}

/// Broyden's good update of the inverse Jacobian `inverse` for the secant pair: a
/// step `dx` that changed the residual by `df` (Sherman–Morrison form; skipped
/// where the pair is degenerate).
fn broyden_update(inverse: &mut DMatrix<f64>, dx: &DVector<f64>, df: &DVector<f64>) {
    let h_df = &*inverse * df;
    let denominator = dx.dot(&h_df);
    if denominator.abs() > 1e-300 {
        let correction = (dx - &h_df) * (dx.transpose() * &*inverse) / denominator;
        *inverse += correction;
    }
}

/// Relative step of the finite-difference Jacobian (on scaled variables of order
/// one): far above the passes' noise (about 1e-12), small against their curvature.
const DIFFERENCE_STEP: f64 = 1e-6;

/// The inverse of the Jacobian of F(x) = G(x) − x at `x`, by forward differences
/// (n + 1 passes), row-major; `None` when a pass fails or the matrix is singular.
pub fn finite_difference_inverse(problem: &mut impl FixedPoint, x: &[f64]) -> Option<Vec<f64>> {
    let n = x.len();
    let residual = |g: Vec<f64>, at: &[f64]| -> DVector<f64> {
        DVector::from_iterator(n, g.iter().zip(at).map(|(gi, xi)| gi - xi))
    };
    let f0 = residual(problem.pass(x).ok()?, x);
    let mut jacobian = DMatrix::<f64>::zeros(n, n);
    for k in 0..n {
        let mut shifted = x.to_vec();
        let h = DIFFERENCE_STEP * x[k].abs().max(1.0);
        shifted[k] += h;
        let fk = residual(problem.pass(&shifted).ok()?, &shifted);
        jacobian.set_column(k, &((fk - &f0) / h));
    }
    let inverse = jacobian.try_inverse()?;
    inverse
        .iter()
        .all(|v| v.is_finite())
        .then(|| inverse.transpose().as_slice().to_vec())
}

#[cfg(test)]
mod tests {
    use super::*;

    struct Linear;
    impl FixedPoint for Linear {
        /// x = 0.9 x + 1 with a strongly coupled second variable.
        fn pass(&mut self, x: &[f64]) -> Result<Vec<f64>> {
            Ok(vec![0.95 * x[0] + 1.0, 0.5 * x[0] - 0.9 * x[1]])
        }
    }

    /// The estimated inverse Jacobian of the linear map is exact, and Broyden started
    /// from it is Newton's method: one step to the fixed point.
    #[test]
    fn a_finite_difference_jacobian_makes_broyden_newton() {
        let describe = |i: usize| format!("x{i}");
        let inverse = finite_difference_inverse(&mut Linear, &[1.0, 2.0]).unwrap();
        // J = [[-0.05, 0], [0.5, -1.9]], so J⁻¹ = [[-20, 0], [-100/19, -10/19]].
        let expected = [-20.0, 0.0, -100.0 / 19.0, -10.0 / 19.0];
        for (got, want) in inverse.iter().zip(expected) {
            assert!(
                (got - want).abs() < 1e-6 * want.abs().max(1.0),
                "{inverse:?}"
            );
        }
        let solved = broyden(
            &mut Linear,
            vec![0.0, 0.0],
            Some(&inverse),
            1e-9,
            400,
            &describe,
        )
        .unwrap();
        assert!(solved.iterations <= 3, "{} passes", solved.iterations);
        assert!((solved.x[0] - 20.0).abs() < 1e-6, "{:?}", solved.x);
    }

    #[test]
    fn both_methods_find_the_fixed_point() {
        let describe = |i: usize| format!("x{i}");
        for solved in [
            wegstein(&mut Linear, vec![0.0, 0.0], 1e-11, 400, &describe).unwrap(),
            broyden(&mut Linear, vec![0.0, 0.0], None, 1e-11, 400, &describe).unwrap(),
        ] {
            assert!((solved.x[0] - 20.0).abs() < 1e-9, "{:?}", solved.x);
            assert!((solved.x[1] - 10.0 / 1.9).abs() < 1e-9, "{:?}", solved.x);
        }
    }

    /// x = √(x + 2) (fixed point 2), passed coarsely (0.05 high) until a pass's
    /// residual has fallen below 0.05, finely from the pass after on (as the
    /// flowsheet's passes settle).
    struct TwoMaps {
        fine: bool,
        last_residual: f64,
        passes: usize,
    }
    impl FixedPoint for TwoMaps {
        fn pass(&mut self, x: &[f64]) -> Result<Vec<f64>> {
            self.passes += 1;
            self.fine |= self.last_residual < 0.05;
            let offset = if self.fine { 0.0 } else { 0.05 };
            let g = (x[0] + 2.0).sqrt() + offset;
            self.last_residual = (g - x[0]).abs();
            Ok(vec![g])
        }
        fn map(&self) -> usize {
            usize::from(self.fine)
        }
    }

    /// The first fine pass is taken as it is, though its residual (about the
    /// maps' difference) exceeds the coarse one it follows, and Broyden goes on
    /// to the fine map's fixed point: 8 passes. Judged against the coarse residual
    /// (and learning a secant across the two maps) it took 21.
    #[test]
    fn a_new_map_is_taken_as_it_comes() {
        let mut problem = TwoMaps {
            fine: false,
            last_residual: f64::INFINITY,
            passes: 0,
        };
        let solved = broyden(&mut problem, vec![0.0], None, 1e-12, 50, &|_| "x".into()).unwrap();
        assert!((solved.x[0] - 2.0).abs() < 1e-10, "{:?}", solved.x);
        assert!(problem.passes <= 10, "{} passes", problem.passes);
    }

    struct Diverging;
    impl FixedPoint for Diverging {
        fn pass(&mut self, x: &[f64]) -> Result<Vec<f64>> {
            Ok(vec![x[0] * x[0] + 1.0])
        }
    }

    #[test]
    fn no_fixed_point_is_a_diagnostic_error() {
        let e = wegstein(&mut Diverging, vec![0.0], 1e-12, 30, &|_| "tear x".into()).unwrap_err();
        let text = e.to_string();
        assert!(
            text.contains("Wegstein") && text.contains("tear x"),
            "{text}"
        );
    }
}
