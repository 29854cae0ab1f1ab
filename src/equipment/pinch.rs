//! Finding an exchanger's pinch and sizing it by its smallest temperature
//! difference, shared by the two-stream and the multistream exchanger.
//!
//! A profile is a list of nodes along the exchanger, each at a position (the
//! fraction of the duty from the warm end) with its hot-minus-cold temperature
//! difference. The smallest difference is found at the nodes and refined between
//! them by successive parabolic interpolation of the exact difference; the duty that
//! gives a smallest difference asked for is found by Newton steps on the duty.

use super::{Context, PinchHint};
use crate::error::{Error, Result};

/// Steps of the parabolic refinement of the smallest temperature difference.
const REFINE_STEPS: usize = 12;

/// The refinement stops when the smallest difference changes by less than this, K
/// (well inside the 1 mK the reported minimum approach is held to).
const REFINE_TOLERANCE: f64 = 1e-6;

/// The smallest of `differences` (hot minus cold, K, at the increasing `positions`,
/// 0 at the warm end and 1 at the cold end) and its position, refined between the
/// nodes around the smallest node by successive parabolic interpolation of
/// `difference(position, index of the nearest node)`.
pub fn refined_minimum(
    positions: &[f64],
    differences: &[f64],
    mut difference: impl FnMut(f64, usize) -> Result<f64>,
) -> Result<(f64, f64)> {
    let n = differences.len() - 1;
    let node = |k: usize| differences[k];
    let position = |k: usize| positions[k];
    let (mut fb, i) = (0..=n)
        .map(|k| (node(k), k))
        .fold((f64::INFINITY, 0), |a, b| if b.0 < a.0 { b } else { a });
    if n < 2 {
        return Ok((fb, position(i)));
    }
    // Three nodes around the smallest (at an end, the end three).
    let centre = i.clamp(1, n - 1);
    let (mut a, mut b, mut c) = (position(centre - 1), position(i), position(centre + 1));
    let (mut fa, mut fc) = (node(centre - 1), node(centre + 1));
    if i == 0 || i == n {
        // At an end, the smallest lies inside only if the parabola through the end
        // three has its vertex in the end segment.
        let (x0, x1, x2) = (a, position(centre), c);
        let (y0, y1, y2) = (fa, node(centre), fc);
        match parabola_vertex((x0, y0), (x1, y1), (x2, y2)) {
            Some(x) if i == 0 && x > x0 && x < x1 => {
                (a, b, c, fa, fc) = (x0, x0, x1, y0, y1);
            }
            Some(x) if i == n && x > x1 && x < x2 => {
                (a, b, c, fa, fc) = (x1, x2, x2, y1, y2);
            }
            _ => return Ok((fb, b)),
        }
    }
    let nearest = |x: f64| {
        let k = positions.partition_point(|p| *p < x).min(n);
        if k > 0 && (x - positions[k - 1]) <= (positions[k] - x) {
            k - 1
        } else {
            k
        }
    };
    for _ in 0..REFINE_STEPS {
        let Some(x) = parabola_vertex((a, fa), (b, fb), (c, fc)) else {
            break;
        };
        if !(x > a && x < c) || (x - b).abs() <= 1e-9 * (c - a) {
            break;
        }
        let fx = difference(x, nearest(x))?;
        let before = fb;
        if fx < fb {
            if x < b {
                (c, fc) = (b, fb);
            } else {
                (a, fa) = (b, fb);
            }
            (b, fb) = (x, fx);
        } else if x < b {
            (a, fa) = (x, fx);
        } else {
            (c, fc) = (x, fx);
        }
        if (before - fb).abs() < REFINE_TOLERANCE && fx >= before - REFINE_TOLERANCE {
            break;
        }
    }
    Ok((fb, b))
}

/// The abscissa of the vertex of the parabola through three points, where it has a
/// minimum (None for a maximum or a straight line).
fn parabola_vertex(p0: (f64, f64), p1: (f64, f64), p2: (f64, f64)) -> Option<f64> {
    let ((x0, y0), (x1, y1), (x2, y2)) = (p0, p1, p2);
    let numerator = (x1 - x0).powi(2) * (y1 - y2) - (x1 - x2).powi(2) * (y1 - y0);
    let denominator = (x1 - x0) * (y1 - y2) - (x1 - x2) * (y1 - y0);
    // The curvature's sign: a minimum needs the middle point below the chord.
    let chord = y0 + (y2 - y0) * (x1 - x0) / (x2 - x0);
    if !(denominator != 0.0 && y1 < chord) {
        return None;
    }
    Some(x1 - 0.5 * numerator / denominator)
}

/// A profile at one duty and its smallest temperature difference.
#[derive(Debug, Clone)]
pub struct Pinch<P> {
    /// The duty the profile is drawn for, W.
    pub duty: f64,
    /// The smallest hot-minus-cold temperature difference, K.
    pub difference: f64,
    /// Where it lies, as the fraction of the duty from the warm end.
    pub position: f64,
    /// The profile, warm end first.
    pub profile: P,
}

/// A local minimum of a profile's temperature difference other than its pinch
/// ([`PinchSearch::moving_minimum`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moving {
    /// Its temperature difference, K.
    pub difference: f64,
    /// How the difference there changes with the duty, K/W (negative).
    pub slope: f64,
    /// Where it lies, as the fraction of the duty from the warm end.
    pub position: f64,
}

/// An exchanger whose smallest temperature difference can be found at a duty.
pub trait PinchSearch {
    /// The exchanger's profile.
    type Profile;

    /// The exchanger's number of segments.
    fn segments(&self) -> usize;

    /// The profile at `duty` on `segments` segments and its refined pinch.
    fn pinch_on(&self, duty: f64, segments: usize) -> Result<Pinch<Self::Profile>>;

    /// The pinch at `duty` where it lay near `position` (the fraction of the duty
    /// from the warm end) on the pass before: where the exchanger can, it draws only
    /// the nodes of the `segments`-segment profile around there and refines the
    /// smallest of them as [`PinchSearch::pinch_on`] would, so that the answer is
    /// the same wherever the pinch has stayed near `position`; the profile returned
    /// is then only that stretch. Without a position, or where the smallest node
    /// lies at the stretch's edge, the whole profile. By default, the whole profile.
    fn pinch_near(
        &self,
        duty: f64,
        segments: usize,
        position: Option<f64>,
    ) -> Result<Pinch<Self::Profile>> {
        let _ = position;
        self.pinch_on(duty, segments)
    }

    /// The slope of the smallest temperature difference with the duty, K/W: the
    /// difference at the pinch's position, differentiated. Where the pinch lies
    /// inside, the difference is smallest there, so the pinch moving with the duty
    /// changes it only to second order.
    fn pinch_slope(&self, pinch: &Pinch<Self::Profile>) -> Result<f64>;

    /// Where the pinch's difference does not fall with the duty (a stream whose
    /// outlet temperature is set holds that end's difference fixed, a plateau a
    /// Newton step cannot leave), the smallest other local minimum of the
    /// `segments`-segment profile at the pinch's duty whose difference does fall:
    /// its difference, its slope with the duty (K/W) and its position, for a Newton
    /// step on it. The whole profile is drawn where `pinch` holds only a stretch.
    /// None where there is none; by default always None (the search then bisects).
    fn moving_minimum(
        &self,
        pinch: &Pinch<Self::Profile>,
        segments: usize,
    ) -> Result<Option<Moving>> {
        let _ = (pinch, segments);
        Ok(None)
    }

    /// The duties at which the difference at the warm end and at the cold end
    /// would equal `target`, each from one flash of the outlet that sets it (None
    /// where an end cannot be computed so). Only a guess: the search confirms one
    /// on a profile before it takes it.
    fn end_duties(&self, target: f64) -> [Option<f64>; 2];
}

/// How far, K, a profile's smallest difference may lie from the target at an end
/// duty for the end to be taken as the pinch (the flashes' own agreement is about
/// 1e-12 K; the minimum approach is held to 1 mK).
const END_TOLERANCE: f64 = 1e-9;

/// Where the pinch lies at an end, the duty is the smaller of the two end duties:
/// the smallest difference falls as the duty rises, so it reaches the target no
/// later than at either end duty, and at the smaller one exactly when the profile
/// there has no difference below the target. That is checked on a profile (a
/// coarse one while `loose`, else the full one): confirmed, the duty is
/// returned; otherwise the pinch lies inside, and the smaller end duty, where the
/// difference is below the target, bounds the search from above.
///
/// Tried before anything else: where it confirms an end, not even the difference
/// at zero duty is needed (it is larger, the difference falling with the duty).
/// Returns `Break(duty)` where an end is the pinch, else `Continue(bound)`, the
/// upper end of the bracket for the search. With `lately` (the end was the pinch on
/// the pass before) and the tear streams settling (not `loose`, so that they move
/// by less than 1e-4 of themselves a pass and the pinch with them), the end duty
/// is taken from the end flash alone; the solver's detailed pass confirms every
/// end pinch on the full profile at the converged point.
pub fn end_pinch<S: PinchSearch>(
    search: &S,
    target: f64,
    (low, upper): (f64, f64),
    loose: bool,
    lately: bool,
) -> Result<std::ops::ControlFlow<f64, f64>> {
    use std::ops::ControlFlow::{Break, Continue};
    let Some(end) = search
        .end_duties(target)
        .into_iter()
        .flatten()
        .filter(|q| q.is_finite() && *q > low && *q < upper)
        .min_by(f64::total_cmp)
    else {
        return Ok(Continue(upper));
    };
    let segments = search.segments();
    let coarse = segments / COARSE_FRACTION;
    // While loose, a profile of a tenth of the segments (at least four) decides:
    // such a pass is inexact anyway, and an internal pinch it misses is found once
    // the tear streams settle. Otherwise the full profile decides.
    if lately && !loose {
        return Ok(Break(end));
    }
    let checked_on = if loose && coarse >= COARSE_MINIMUM {
        (segments / 10).max(4)
    } else {
        segments
    };
    let pinch = search.pinch_on(end, checked_on)?;
    Ok(if pinch.difference < target - END_TOLERANCE {
        Continue(end)
    } else if pinch.difference > target + END_TOLERANCE {
        // The end was not computed as the profile draws it: no shortcut.
        Continue(upper)
    } else {
        Break(end)
    })
}

/// The pinch at an end where the hint allows ([`end_pinch`]): tried and confirmed
/// without a hint, taken from the end flash where the pinch lay at that end on the
/// pass before, not tried where it lay inside lately.
pub fn hinted_end_pinch<S: PinchSearch>(
    search: &S,
    target: f64,
    (low, upper): (f64, f64),
    context: &Context,
) -> Result<std::ops::ControlFlow<f64, f64>> {
    match context.pinch_hint {
        PinchHint::Inside | PinchHint::Whole => Ok(std::ops::ControlFlow::Continue(upper)),
        hint => end_pinch(
            search,
            target,
            (low, upper),
            context.loose,
            hint == PinchHint::End,
        ),
    }
}

/// The largest number of steps of each stage of the duty search.
const DUTY_STEPS: usize = 60;

/// A Newton step on the duty below this fraction of the duty is the last one.
const ACCEPTED_STEP: f64 = 1e-8;

/// The same on a loose pass, whose answer is the coarse stage's: the tear streams
/// still move by more than 1e-4 of themselves a pass. The duty returned is the one
/// after that last step, whose error is about the square of the step over the duty
/// (1e-8 of it), so the loose passes still agree with one another closely.
const LOOSE_ACCEPTED_STEP: f64 = 1e-4;

/// The duty search's first stage uses this fraction of the segments…
const COARSE_FRACTION: usize = 5;

/// …when that leaves at least this many.
const COARSE_MINIMUM: usize = 8;

/// The duty in (`low`, `upper`) at which the smallest temperature difference equals
/// `target`, where it exceeds `target` at `low`. The search runs first on profiles
/// of a fifth of the segments, where each step is cheap, and then on the
/// exchanger's own profile from there: the refined pinch of the coarse profile is
/// the same pinch to within the refinement's tolerance, so the second stage usually
/// ends after one profile. Only the second stage's answer counts.
///
/// With `loose` (the tear streams still far from converged), the coarse stage's
/// answer is returned as it is. With `follow` (the pinch lay inside on the pass
/// before), each profile after the first is drawn only around the last step's
/// pinch ([`PinchSearch::pinch_near`]), and the first too where `near` gives where
/// it lay; the second stage's first around the first stage's last pinch.
///
/// Returns the duty and where the last profile drawn had its pinch (fraction of
/// the duty from the warm end), for the next pass's hint.
///
/// Callers try [`end_pinch`] first, which needs no search.
pub fn duty_for_difference<S: PinchSearch>(
    search: &S,
    solver: &'static str,
    target: f64,
    start: f64,
    (low, upper): (f64, f64),
    loose: bool,
    (near, follow): (Option<f64>, bool),
) -> Result<(f64, Option<f64>)> {
    let segments = search.segments();
    let coarse = segments / COARSE_FRACTION;
    let stage = |start: f64, segments: usize, accepted: f64, near: Option<f64>| {
        let stage = Stage {
            segments,
            near,
            follow,
            accepted,
        };
        duty_search(search, solver, target, start, (low, upper), stage)
    };
    let (start, near) = if coarse >= COARSE_MINIMUM {
        let accepted = if loose {
            LOOSE_ACCEPTED_STEP
        } else {
            ACCEPTED_STEP
        };
        let (rough, position) = stage(start, coarse, accepted, near)?;
        if loose {
            return Ok((rough, position));
        }
        // Following, the second stage starts around the first's last pinch.
        (rough, if follow { position.or(near) } else { near })
    } else {
        (start, near)
    };
    stage(start, segments, ACCEPTED_STEP, near)
}

/// Where the start lies beyond the bracket, the first duty tried lies this
/// fraction of the bracket inside the nearer end.
const BEYOND_BRACKET: f64 = 0.01;

/// How one stage of the duty search draws its profiles and when it stops.
struct Stage {
    /// Segments of each profile.
    segments: usize,
    /// Where the pinch lay on the pass before, to draw only the stretch around it
    /// ([`PinchSearch::pinch_near`]).
    near: Option<f64>,
    /// Each step draws the stretch around the pinch of the step before (the first
    /// step the whole profile, without `near`).
    follow: bool,
    /// A Newton step below this fraction of the duty is the last.
    accepted: f64,
}

/// One stage of [`duty_for_difference`], on profiles of `stage.segments` segments:
/// Newton steps on the duty with the slope at the pinch, from `start` (the last
/// pass's duty when there is one, or near the bracket's end it has passed), inside
/// a bracket that every step narrows; a step that would leave the bracket bisects
/// it, unless the pinch sits on a plateau above the target and another local
/// minimum falls with the duty ([`PinchSearch::moving_minimum`]): the step is then
/// Newton's on that one. A Newton step this small leaves an error
/// of the order of its square over the duty (the slope changes on the scale of the
/// duty itself), far below the tolerance, so it is taken without a further profile.
/// Stops when a step is below `stage.accepted` of the duty or 1e-12 of `upper`, or
/// the bracket below the latter; not stopping within [`DUTY_STEPS`] steps is an error
/// naming `solver`.
fn duty_search<S: PinchSearch>(
    search: &S,
    solver: &'static str,
    target: f64,
    start: f64,
    (low, upper): (f64, f64),
    stage: Stage,
) -> Result<(f64, Option<f64>)> {
    let Stage {
        segments,
        mut near,
        follow,
        accepted,
    } = stage;
    let tolerance = 1e-12 * upper;
    let (mut low, mut high) = (low, upper);
    // A start beyond the bracket (the last pass's duty, where the bracket has
    // since moved past it) says the answer lies near that end.
    let mut q = if start > low && start < upper {
        start
    } else if start >= upper {
        upper - BEYOND_BRACKET * (upper - low)
    } else if start <= low {
        low + BEYOND_BRACKET * (upper - low)
    } else {
        0.5 * (low + upper)
    };
    let mut last = f64::NAN;
    for _ in 0..DUTY_STEPS {
        let pinch = search.pinch_near(q, segments, near)?;
        if follow {
            near = Some(pinch.position);
        }
        let residual = pinch.difference - target;
        last = residual;
        if !residual.is_finite() {
            break;
        }
        if residual == 0.0 {
            return Ok((q, Some(pinch.position)));
        }
        if residual > 0.0 {
            low = q;
        } else {
            high = q;
        }
        let slope = search.pinch_slope(&pinch)?;
        let mut next = q - residual / slope;
        if !(slope < 0.0 && next > low && next < high) {
            next = 0.5 * (low + high);
            // Above the target with a pinch that does not fall far enough within
            // the bracket (a plateau): the step aims at the other minimum that
            // falls with the duty, where the pinch will move.
            if residual > 0.0 {
                if let Some(other) = search.moving_minimum(&pinch, segments)? {
                    let aimed = q - (other.difference - target) / other.slope;
                    if aimed > low && aimed < high {
                        next = aimed;
                        if follow {
                            near = Some(other.position);
                        }
                    }
                }
            }
        }
        // A step within the tolerance leaves the duty whose profile was drawn
        // (the caller may report that profile as it is).
        if (next - q).abs() <= tolerance {
            return Ok((q, Some(pinch.position)));
        }
        if (next - q).abs() <= accepted * q || high - low <= tolerance {
            return Ok((next, Some(pinch.position)));
        }
        q = next;
    }
    Err(Error::NoConvergence {
        solver,
        iterations: DUTY_STEPS,
        residual: last.abs(),
        context: format!(": duty bracket [{low}, {high}] W, last duty {q} W"),
    })
}

/// The conductance UA = Σ dQ/ΔT_lm over a profile's segments, from the duty and
/// the hot-minus-cold difference at each node, W/K (infinite where the hot stream
/// is not warmer than the cold one).
pub fn conductance(nodes: impl Iterator<Item = (f64, f64)>) -> f64 {
    let mut ua = 0.0;
    let mut previous: Option<(f64, f64)> = None;
    for (duty, b) in nodes {
        if let Some((q0, a)) = previous {
            if a <= 0.0 || b <= 0.0 {
                return f64::INFINITY;
            }
            let lmtd = if (a - b).abs() < 1e-9 * a {
                0.5 * (a + b)
            } else {
                (a - b) / (a / b).ln()
            };
            ua += (duty - q0) / lmtd;
        }
        previous = Some((duty, b));
    }
    ua
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::cell::Cell;
    use std::ops::ControlFlow::{Break, Continue};

    /// Straight-line differences: the warm end 10 − q, the cold end 10 − q/2, and
    /// an inside point 9 − 0.9 q, so that for a 2 K target the warm end's duty is
    /// 8 W but the inside is then at 1.8 K: the pinch lies inside.
    struct Lines {
        profiles: Cell<usize>,
    }

    impl PinchSearch for Lines {
        type Profile = ();
        fn segments(&self) -> usize {
            50
        }
        fn pinch_on(&self, duty: f64, _segments: usize) -> Result<Pinch<()>> {
            self.profiles.set(self.profiles.get() + 1);
            let (warm, cold, inside) = (10.0 - duty, 10.0 - 0.5 * duty, 9.0 - 0.9 * duty);
            let (difference, position) = [(warm, 0.0), (inside, 0.5), (cold, 1.0)]
                .into_iter()
                .fold((f64::INFINITY, 0.0), |a, b| if b.0 < a.0 { b } else { a });
            Ok(Pinch {
                duty,
                difference,
                position,
                profile: (),
            })
        }
        fn pinch_slope(&self, pinch: &Pinch<()>) -> Result<f64> {
            Ok(if pinch.position == 0.5 { -0.9 } else { -1.0 })
        }
        fn end_duties(&self, target: f64) -> [Option<f64>; 2] {
            [Some(10.0 - target), Some(2.0 * (10.0 - target))]
        }
    }

    fn context(pinch_hint: PinchHint, loose: bool) -> Context {
        Context {
            pinch_hint,
            loose,
            ..Context::new(300.0)
        }
    }

    /// Without a hint the end is tried and refused on its profile; a hint that the
    /// pinch lay inside skips the ends; a hint that it lay at an end is taken from
    /// the end flash alone once the tear streams settle (the solver's detailed pass
    /// then finds the pinch afresh), but still checked while they move.
    #[test]
    fn hints_save_profiles_and_only_settled_passes_trust_an_end() {
        let lines = Lines {
            profiles: Cell::new(0),
        };
        let run = |hint, loose| {
            lines.profiles.set(0);
            let flow = hinted_end_pinch(&lines, 2.0, (0.0, 20.0), &context(hint, loose)).unwrap();
            (flow, lines.profiles.get())
        };
        assert_eq!(run(PinchHint::Check, false), (Continue(8.0), 1));
        assert_eq!(run(PinchHint::Inside, false), (Continue(20.0), 0));
        assert_eq!(run(PinchHint::Whole, false), (Continue(20.0), 0));
        assert_eq!(run(PinchHint::End, false), (Break(8.0), 0));
        assert_eq!(run(PinchHint::End, true), (Continue(8.0), 1));
        // The search itself finds the inside pinch: 9 − 0.9 q = 2 at q = 70/9.
        let (duty, _) =
            duty_for_difference(&lines, "test", 2.0, 5.0, (0.0, 8.0), false, (None, false))
                .unwrap();
        assert!((duty - 70.0 / 9.0).abs() < 1e-9, "{duty}");
    }

    /// A warm end held at 5 K by a stream with a set outlet (it does not move with
    /// the duty) and a cold end at 12 − q/2 that does: for a 3 K target the answer
    /// is q = 18, where the cold end takes over as the pinch.
    struct Plateau {
        profiles: Cell<usize>,
        moving: bool,
    }

    impl PinchSearch for Plateau {
        type Profile = ();
        fn segments(&self) -> usize {
            5
        }
        fn pinch_on(&self, duty: f64, _segments: usize) -> Result<Pinch<()>> {
            self.profiles.set(self.profiles.get() + 1);
            let cold = 12.0 - 0.5 * duty;
            let (difference, position) = if cold < 5.0 { (cold, 1.0) } else { (5.0, 0.0) };
            Ok(Pinch {
                duty,
                difference,
                position,
                profile: (),
            })
        }
        fn pinch_slope(&self, pinch: &Pinch<()>) -> Result<f64> {
            Ok(if pinch.position == 1.0 { -0.5 } else { 0.0 })
        }
        fn moving_minimum(&self, pinch: &Pinch<()>, _segments: usize) -> Result<Option<Moving>> {
            Ok((self.moving && pinch.position == 0.0).then(|| Moving {
                difference: 12.0 - 0.5 * pinch.duty,
                slope: -0.5,
                position: 1.0,
            }))
        }
        fn end_duties(&self, _target: f64) -> [Option<f64>; 2] {
            [None, None]
        }
    }

    /// On the plateau the search steps by Newton on the minimum that moves and
    /// lands in two profiles; bisecting instead takes several times as many. A
    /// start beyond the bracket starts near the end it passed.
    #[test]
    fn a_plateau_is_left_by_the_minimum_that_moves() {
        let run = |moving: bool, start: f64| {
            let plateau = Plateau {
                profiles: Cell::new(0),
                moving,
            };
            let (duty, _) = duty_for_difference(
                &plateau,
                "test",
                3.0,
                start,
                (0.0, 24.0),
                false,
                (None, false),
            )
            .unwrap();
            assert!((duty - 18.0).abs() < 1e-9, "{duty}");
            plateau.profiles.get()
        };
        let aimed = run(true, 4.0);
        let bisected = run(false, 4.0);
        assert!(aimed <= 3, "{aimed} profiles");
        assert!(bisected >= 2 * aimed, "{bisected} against {aimed}");
        // From beyond the bracket: the first duty is 1 % inside its upper end, on
        // the falling side, and Newton lands at once.
        assert!(run(false, 40.0) <= 3);
    }
}
