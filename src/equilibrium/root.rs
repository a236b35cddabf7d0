//! One equation in one unknown, f(x) = 0, for a function known to be non-decreasing on a
//! bracket (an enthalpy against temperature): Newton's method safeguarded by bisection.
//!
//! The method is the Newton-bisection hybrid of Press, Teukolsky, Vetterling & Flannery,
//! Numerical Recipes, 3rd ed. (2007), section 9.4: every evaluation narrows the bracket by the
//! sign of f; a Newton step is taken only when it stays strictly inside the bracket, the slope is
//! known and positive, and the previous Newton step at least halved |f|; otherwise the bracket is
//! bisected. Two steps in a row therefore halve either |f| or the bracket, so the search cannot
//! cycle between two points as plain Newton does on an S-shaped curve.
//!
//! The ends of the bracket are validated lazily: an end is evaluated only when a Newton step
//! points beyond it, and the search stops with [`Termination::RootBelowBracket`] or
//! [`Termination::RootAboveBracket`] when f has the wrong sign there. An end that is never
//! needed is never evaluated (in a stage, each evaluation is an equilibrium solve).
//!
//! This module is pure numerics: it knows nothing of species, units or files.

/// Why a root search stopped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Termination {
    /// |f| reached the residual tolerance.
    Converged,
    /// The bracket became shorter than the step tolerance before |f| reached its tolerance (the
    /// round-off floor of f); the residual says how close the best point is.
    BracketNarrowed,
    /// The iteration limit was reached.
    IterationLimit,
    /// f is positive at the lower end: the root lies below the bracket.
    RootBelowBracket,
    /// f is negative at the upper end: the root lies above the bracket.
    RootAboveBracket,
    /// The bracket or the start is not usable (ends not finite or not increasing, start not
    /// finite, tolerances not positive).
    InvalidBracket,
    /// f returned a value that is not finite.
    NotFinite,
}

impl std::fmt::Display for Termination {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(match self {
            Termination::Converged => "converged",
            Termination::BracketNarrowed => "bracket narrowed to round-off",
            Termination::IterationLimit => "iteration limit reached",
            Termination::RootBelowBracket => "root below the bracket",
            Termination::RootAboveBracket => "root above the bracket",
            Termination::InvalidBracket => "no usable bracket",
            Termination::NotFinite => "a value that is not finite",
        })
    }
}

/// Tolerances and limits of a root search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RootOptions {
    /// Stop when |f| is at most this (in the units of f; callers pass a normalised f).
    pub residual_tolerance: f64,
    /// Stop when the bracket is at most this long (in the units of x).
    pub step_tolerance: f64,
    /// Evaluations of f allowed.
    pub max_iterations: usize,
}

/// One evaluation of f: its value and, when it could be computed, its slope df/dx.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Evaluation {
    /// f(x).
    pub value: f64,
    /// df/dx at x; `None` when it could not be computed (the search then bisects).
    pub slope: Option<f64>,
}

/// The outcome of a root search.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Root {
    /// The evaluated point with the smallest |f| (the start when nothing was evaluated).
    pub x: f64,
    /// |f(x)|; infinite when nothing was evaluated, never NaN.
    pub residual: f64,
    /// Evaluations of f.
    pub iterations: usize,
    /// Steps taken by Newton's method.
    pub newton_steps: usize,
    /// Steps taken by bisection (including those forced by a missing slope).
    pub bisection_steps: usize,
    /// Evaluations whose slope could not be computed.
    pub slope_unavailable: usize,
    /// Why the search stopped.
    pub termination: Termination,
}

impl Root {
    /// True when the search ended with |f| within `tolerance`.
    pub fn within(&self, tolerance: f64) -> bool {
        self.residual <= tolerance
    }
}

/// Find x in [lo, hi] with f(x) = 0 for a non-decreasing f, starting at `start` (moved into the
/// bracket). `f` may fail; its error is returned as is.
pub fn solve_increasing<E>(
    lo: f64,
    hi: f64,
    start: f64,
    options: RootOptions,
    mut f: impl FnMut(f64) -> Result<Evaluation, E>,
) -> Result<Root, E> {
    let mut root = Root {
        x: start,
        residual: f64::INFINITY,
        iterations: 0,
        newton_steps: 0,
        bisection_steps: 0,
        slope_unavailable: 0,
        termination: Termination::InvalidBracket,
    };
    let usable = lo.is_finite()
        && hi.is_finite()
        && lo < hi
        && start.is_finite()
        && options.residual_tolerance > 0.0
        && options.step_tolerance > 0.0;
    if !usable {
        return Ok(root);
    }
    let (bottom, top) = (lo, hi);
    let (mut lo, mut hi) = (lo, hi);
    // Signs known at the ends (an end is known once evaluated).
    let (mut lo_known, mut hi_known) = (false, false);
    let mut x = start.max(lo).min(hi);
    // |f| before the last Newton step; infinite after a bisection.
    let mut before_newton = f64::INFINITY;
    root.termination = Termination::IterationLimit;
    while root.iterations < options.max_iterations {
        let e = f(x)?;
        root.iterations += 1;
        if !e.value.is_finite() {
            root.termination = Termination::NotFinite;
            return Ok(root);
        }
        if e.slope.is_none() {
            root.slope_unavailable += 1;
        }
        let r = e.value.abs();
        if r < root.residual || root.residual.is_infinite() {
            root.x = x;
            root.residual = r;
        }
        if r <= options.residual_tolerance {
            root.termination = Termination::Converged;
            return Ok(root);
        }
        if e.value > 0.0 {
            if x <= bottom {
                root.termination = Termination::RootBelowBracket;
                return Ok(root);
            }
            hi = x;
            hi_known = true;
        } else {
            if x >= top {
                root.termination = Termination::RootAboveBracket;
                return Ok(root);
            }
            lo = x;
            lo_known = true;
        }
        if hi - lo <= options.step_tolerance {
            root.termination = Termination::BracketNarrowed;
            return Ok(root);
        }
        let slope = e.slope.filter(|s| s.is_finite() && *s > 0.0);
        let halved = r <= 0.5 * before_newton;
        let newton = slope.map(|s| x - e.value / s);
        x = match newton {
            Some(n) if halved && n > lo && n < hi => {
                root.newton_steps += 1;
                before_newton = r;
                n
            }
            // Newton points beyond an end not yet evaluated: evaluate that end (it validates
            // the bracket, or shows the root is outside it).
            Some(n) if halved && n >= hi && !hi_known => {
                before_newton = f64::INFINITY;
                hi
            }
            Some(n) if halved && n <= lo && !lo_known => {
                before_newton = f64::INFINITY;
                lo
            }
            _ => {
                root.bisection_steps += 1;
                before_newton = f64::INFINITY;
                0.5 * (lo + hi)
            }
        };
    }
    Ok(root)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn options() -> RootOptions {
        RootOptions {
            residual_tolerance: 1e-13,
            step_tolerance: 1e-12,
            max_iterations: 100,
        }
    }

    fn run(lo: f64, hi: f64, start: f64, mut f: impl FnMut(f64) -> (f64, Option<f64>)) -> Root {
        solve_increasing::<()>(lo, hi, start, options(), |x| {
            let (value, slope) = f(x);
            Ok(Evaluation { value, slope })
        })
        .unwrap()
    }

    #[test]
    fn newton_cycle_on_an_s_curve_is_broken_by_bisection() {
        // f = atan(x): plain Newton from |x0| > 1.3917452 (the root of
        // 2 x = (1 + x^2) atan(x)) alternates sign and diverges, and from x0 = 1.3917452 it
        // cycles between +-x0 (a classic counter-example, from memory; the cycle point is
        // checked here by the alternation itself). The safeguarded search converges to 0.
        let x0 = 1.391_745_200_270_735;
        let newton = |x: f64| x - x.atan() * (1.0 + x * x);
        assert!((newton(x0) + x0).abs() < 1e-9, "{}", newton(x0));
        let r = run(-10.0, 10.0, x0, |x| (x.atan(), Some(1.0 / (1.0 + x * x))));
        assert_eq!(r.termination, Termination::Converged);
        assert!(r.x.abs() < 1e-13 && r.iterations < 15, "{r:?}");
        assert!(r.bisection_steps >= 1);
        let far = run(-10.0, 10.0, 9.0, |x| (x.atan(), Some(1.0 / (1.0 + x * x))));
        assert_eq!(far.termination, Termination::Converged);
        assert!(far.x.abs() < 1e-13 && far.iterations < 20, "{far:?}");
    }

    #[test]
    fn a_square_root_is_found_to_round_off() {
        // x^2 - 2 = 0 on [0, 4] against sqrt(2) (IEEE-754 correctly rounded): |f| <= 1e-13
        // means |x - sqrt 2| <= 1e-13 / (2 sqrt 2) < 3.6e-14.
        let r = run(0.0, 4.0, 3.0, |x| (x * x - 2.0, Some(2.0 * x)));
        assert_eq!(r.termination, Termination::Converged);
        assert!((r.x - std::f64::consts::SQRT_2).abs() <= 3.6e-14, "{r:?}");
        assert!(r.newton_steps >= 3 && r.bisection_steps == 0, "{r:?}");
    }

    #[test]
    fn a_missing_slope_falls_back_to_bisection_and_says_so() {
        let r = run(0.0, 4.0, 3.0, |x| (x * x - 2.0, None));
        assert!(
            matches!(
                r.termination,
                Termination::Converged | Termination::BracketNarrowed
            ),
            "{r:?}"
        );
        assert!((r.x - std::f64::consts::SQRT_2).abs() < 1e-12);
        assert_eq!(r.newton_steps, 0);
        assert_eq!(r.slope_unavailable, r.iterations);
        // Bisection of a bracket of 4 to 1e-12 takes about 42 halvings.
        assert!((38..=46).contains(&r.bisection_steps), "{r:?}");
    }

    #[test]
    fn a_root_outside_the_bracket_is_reported_with_its_side() {
        // x - 10 on [0, 4]: Newton points above 4, the end is evaluated and f(4) < 0.
        let above = run(0.0, 4.0, 1.0, |x| (x - 10.0, Some(1.0)));
        assert_eq!(above.termination, Termination::RootAboveBracket);
        assert_eq!(above.x, 4.0);
        assert_eq!(above.residual, 6.0);
        assert_eq!(above.iterations, 2);
        let below = run(0.0, 4.0, 1.0, |x| (x + 10.0, Some(1.0)));
        assert_eq!(below.termination, Termination::RootBelowBracket);
        assert_eq!(below.residual, 10.0);
    }

    #[test]
    fn invalid_brackets_and_values_are_reported_never_nan() {
        let id = |x: f64| (x, Some(1.0));
        for (lo, hi, start) in [(1.0, 0.0, 0.5), (f64::NAN, 1.0, 0.5), (0.0, 1.0, f64::NAN)] {
            let r = run(lo, hi, start, id);
            assert_eq!(r.termination, Termination::InvalidBracket);
            assert_eq!(r.iterations, 0);
            assert!(!r.residual.is_nan());
        }
        let r = run(-1.0, 1.0, 0.5, |_| (f64::NAN, None));
        assert_eq!(r.termination, Termination::NotFinite);
        assert!(!r.residual.is_nan());
        // A start outside the bracket is moved to its nearest end.
        let r = run(-1.0, 1.0, 7.0, id);
        assert_eq!(r.termination, Termination::Converged);
        assert_eq!(r.x, 0.0);
    }

    #[test]
    fn errors_of_the_function_pass_through() {
        let r = solve_increasing(0.0, 1.0, 0.5, options(), |_| Err::<Evaluation, _>("no"));
        assert_eq!(r, Err("no"));
    }

    #[test]
    fn the_iteration_limit_is_a_termination_reason() {
        let mut o = options();
        o.max_iterations = 3;
        let r = solve_increasing::<()>(0.0, 4.0, 3.0, o, |x| {
            Ok(Evaluation {
                value: x * x - 2.0,
                slope: None,
            })
        })
        .unwrap();
        assert_eq!(r.termination, Termination::IterationLimit);
        assert_eq!(r.iterations, 3);
        assert!(r.residual.is_finite());
    }
}
