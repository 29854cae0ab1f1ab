//! Small numerical tools shared by the solvers: a bracketed root finder and a
//! golden-section maximiser, each capped and checked.

use crate::error::{Error, Result};

/// The root of `f` between `a` and `b`, where f(a) and f(b) differ in sign, by the
/// Illinois variant of regula falsi (superlinear, never leaves the bracket). Stops
/// when the bracket is narrower than `tolerance` (absolute) or f is exactly zero.
pub fn bracketed_root(
    solver: &'static str,
    mut f: impl FnMut(f64) -> f64,
    a: f64,
    b: f64,
    tolerance: f64,
) -> Result<f64> {
    const CAP: usize = 200;
    let (mut a, mut b) = (a, b);
    let (mut fa, mut fb) = (f(a), f(b));
    if fa == 0.0 {
        return Ok(a);
    }
    if fb == 0.0 {
        return Ok(b);
    }
    if !(fa.is_finite() && fb.is_finite()) || fa.signum() == fb.signum() {
        return Err(Error::NoConvergence {
            solver,
            iterations: 0,
            residual: fa.abs().min(fb.abs()),
            context: format!(": no sign change between {a} and {b}"),
        });
    }
    let mut side = 0i32;
    for _ in 0..CAP {
        let c = (a * fb - b * fa) / (fb - fa);
        let fc = f(c);
        if !fc.is_finite() {
            break;
        }
        if fc == 0.0 || (b - a).abs() < tolerance {
            return Ok(c);
        }
        if fc.signum() == fa.signum() {
            a = c;
            fa = fc;
            if side == -1 {
                fb *= 0.5;
            }
            side = -1;
        } else {
            b = c;
            fb = fc;
            if side == 1 {
                fa *= 0.5;
            }
            side = 1;
        }
        if (b - a).abs() < tolerance {
            return Ok(0.5 * (a + b));
        }
    }
    Err(Error::NoConvergence {
        solver,
        iterations: CAP,
        residual: fa.abs().min(fb.abs()),
        context: format!(": bracket [{a}, {b}]"),
    })
}

/// Steps of [`bracketed_newton`] before it gives up (bisection alone would narrow
/// any bracket by 2⁻⁶⁰ in as many).
pub const BRACKETED_NEWTON_CAP: usize = 60;

/// The root of an increasing `f` (returning value and slope) between `low` and
/// `high`, by Newton from `start`, with bisection whenever a step leaves the bracket
/// that the iterates keep. Stops when a step is below `relative` of the iterate; not
/// stopping within [`BRACKETED_NEWTON_CAP`] steps is an error naming `solver`.
pub fn bracketed_newton(
    solver: &'static str,
    f: impl Fn(f64) -> (f64, f64),
    start: f64,
    low: f64,
    high: f64,
    relative: f64,
) -> Result<f64> {
    let with_nothing = |t: f64| {
        let (value, slope) = f(t);
        (value, slope, ())
    };
    newton_search(solver, with_nothing, start, low, high, relative).map(|found| found.next)
}

/// A Newton step within the rounding of its iterate (relative): the iterate is the
/// root as closely as the function can tell.
const ROUNDING_STEP: f64 = 1e-15;

/// As [`bracketed_newton`], with what `f` computed at the answer (its third
/// output). Where the last point evaluated is already the root to rounding (its own
/// step within [`ROUNDING_STEP`]) it is the answer, and no evaluation is spent past
/// it; else the answer is one step on, evaluated there, as accurate as the plain
/// search's and never less: the answers are as smooth in the inputs as theirs.
pub fn bracketed_newton_settled<P>(
    solver: &'static str,
    f: impl Fn(f64) -> (f64, f64, P),
    start: f64,
    low: f64,
    high: f64,
    relative: f64,
) -> Result<(f64, P)> {
    let found = newton_search(solver, &f, start, low, high, relative)?;
    if (found.next - found.point).abs() <= ROUNDING_STEP * found.point {
        return Ok((found.point, found.payload));
    }
    let (_, _, payload) = f(found.next);
    Ok((found.next, payload))
}

/// Where a Newton search stopped: the last point evaluated, what was computed
/// there, and the step on from it (the answer to the search's tolerance).
struct Found<P> {
    point: f64,
    payload: P,
    next: f64,
}

/// The search of [`bracketed_newton`].
fn newton_search<P>(
    solver: &'static str,
    f: impl Fn(f64) -> (f64, f64, P),
    start: f64,
    low: f64,
    high: f64,
    relative: f64,
) -> Result<Found<P>> {
    let (mut a, mut b) = (low, high);
    let mut t = start;
    let mut last = f64::NAN;
    for _ in 0..BRACKETED_NEWTON_CAP {
        let (value, slope, payload) = f(t);
        last = value;
        // An exact root is the answer (it would otherwise become a bracket's end,
        // and a step of zero onto it would be taken for one leaving the bracket).
        if value == 0.0 {
            return Ok(Found {
                point: t,
                payload,
                next: t,
            });
        }
        if value < 0.0 {
            a = t;
        } else {
            b = t;
        }
        let newton = t - value / slope;
        if (newton - t).abs() <= relative * t {
            return Ok(Found {
                point: t,
                payload,
                next: newton,
            });
        }
        t = if newton > a && newton < b {
            newton
        } else {
            0.5 * (a + b)
        };
    }
    Err(Error::NoConvergence {
        solver,
        iterations: BRACKETED_NEWTON_CAP,
        residual: last.abs(),
        context: format!(": bracket [{a}, {b}], last iterate {t}"),
    })
}

/// The maximiser of a unimodal `f` on [a, b] by golden-section search, to an
/// interval narrower than `tolerance`.
pub fn golden_maximum(mut f: impl FnMut(f64) -> f64, a: f64, b: f64, tolerance: f64) -> f64 {
    let ratio = 0.5 * (5f64.sqrt() - 1.0);
    let (mut a, mut b) = (a, b);
    let mut c = b - ratio * (b - a);
    let mut d = a + ratio * (b - a);
    let (mut fc, mut fd) = (f(c), f(d));
    for _ in 0..200 {
        if (b - a).abs() < tolerance {
            break;
        }
        if fc > fd {
            b = d;
            d = c;
            fd = fc;
            c = b - ratio * (b - a);
            fc = f(c);
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + ratio * (b - a);
            fd = f(d);
        }
    }
    0.5 * (a + b)
}

/// The cubic Hermite basis at t ∈ [0, 1] for a cell of width `width`: weights of
/// (f₀, f₀′, f₁, f₁′) for the value, and for the slope (d/dx, x = t·width).
#[inline(always)]
pub fn hermite_basis(t: f64, width: f64) -> ([f64; 4], [f64; 4]) {
    let t2 = t * t;
    let t3 = t2 * t;
    let value = [
        2.0 * t3 - 3.0 * t2 + 1.0,
        (t3 - 2.0 * t2 + t) * width,
        -2.0 * t3 + 3.0 * t2,
        (t3 - t2) * width,
    ];
    let slope = [
        (6.0 * t2 - 6.0 * t) / width,
        3.0 * t2 - 4.0 * t + 1.0,
        (-6.0 * t2 + 6.0 * t) / width,
        3.0 * t2 - 2.0 * t,
    ];
    (value, slope)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_a_root_and_refuses_a_bracket_without_one() {
        let root = bracketed_root("test", |x| x * x - 2.0, 0.0, 2.0, 1e-14).unwrap();
        assert!((root - 2f64.sqrt()).abs() < 1e-12);
        assert!(bracketed_root("test", |x| x * x + 1.0, -1.0, 1.0, 1e-12).is_err());
    }

    /// An iterate that is an exact root ends the search there, at once (it used to
    /// become the bracket's end and send the search bisecting away from it).
    #[test]
    fn bracketed_newton_stops_on_an_exact_root() {
        let calls = std::cell::Cell::new(0);
        let f = |x: f64| {
            calls.set(calls.get() + 1);
            (x - 0.5, 1.0)
        };
        let root = bracketed_newton("test", f, 0.5, 0.0, 1.0, 1e-14).unwrap();
        assert_eq!((root, calls.get()), (0.5, 1));
    }

    /// The settled search answers with what was computed at its answer: the last
    /// point evaluated where that is the root to rounding, else one step on,
    /// evaluated there. Either way it is as accurate as the plain search's answer
    /// and costs at most one evaluation more.
    #[test]
    fn bracketed_newton_settled_answers_with_what_was_computed_there() {
        let calls = std::cell::Cell::new(0);
        let f = |x: f64| {
            calls.set(calls.get() + 1);
            (x * x - 2.0, 2.0 * x, x * x)
        };
        for start in [1.0, 1.4, 1.9] {
            calls.set(0);
            let (root, square) =
                bracketed_newton_settled("test", f, start, 0.0, 2.0, 1e-13).unwrap();
            let settled_calls = calls.get();
            assert!((root - 2f64.sqrt()).abs() <= 4e-16 * root, "{root}");
            assert_eq!(square, root * root);
            calls.set(0);
            let plain = bracketed_newton(
                "test",
                |x| {
                    let (value, slope, _) = f(x);
                    (value, slope)
                },
                start,
                0.0,
                2.0,
                1e-13,
            )
            .unwrap();
            assert!(settled_calls <= calls.get() + 1);
            assert!((plain - root).abs() <= 4e-16 * root);
        }
    }

    #[test]
    fn bracketed_newton_converges_and_reports_its_cap() {
        let root =
            bracketed_newton("test", |x| (x * x - 2.0, 2.0 * x), 1.0, 0.0, 2.0, 1e-14).unwrap();
        assert!((root - 2f64.sqrt()).abs() < 1e-12);
        // A stopping rule that can never be met (a negative relative step) ends in
        // NoConvergence at the cap, not in the last guess.
        let error =
            bracketed_newton("test", |x| (x * x - 2.0, 2.0 * x), 1.0, 0.0, 2.0, -1.0).unwrap_err();
        let capped = matches!(
            error,
            Error::NoConvergence { iterations, .. } if iterations == BRACKETED_NEWTON_CAP
        );
        assert!(capped, "{error}");
    }

    #[test]
    fn golden_section_finds_the_peak() {
        let x = golden_maximum(|x| -(x - 0.3) * (x - 0.3), 0.0, 1.0, 1e-10);
        assert!((x - 0.3).abs() < 1e-8);
    }
}
