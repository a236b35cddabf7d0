//! Recycles: converging the tear streams of a flowsheet with cycles ([`super::tears`] chooses
//! them) by bounded Wegstein acceleration.
//!
//! Each tear stream has a slot of its own in the workspace: the value the units downstream of
//! the tear read. One iteration solves the units from the first to the last unit on a cycle (in
//! solve order) with the slots as they are, then compares each tear as computed, g, with its
//! slot, x. The change is scaled per tear:
//!
//! - flows: max_i |g_i - x_i| / S, with S the smaller of the tear's total flow and the total
//!   flow of all feeds (floored at 1e-12 of the feeds), so that a small recycle is converged
//!   relative to itself and a large one relative to what the plant is fed (which is what the
//!   element balance of the flowsheet compares);
//! - temperature |g_T - x_T| / g_T and pressure |g_P - x_P| / g_P.
//!
//! The iteration has converged when the largest scaled change is at most `recycle-tolerance`
//! (default [`DEFAULT_TOLERANCE`]); after `recycle-iterations` (default
//! [`DEFAULT_ITERATION_LIMIT`]) without that it is an error. Otherwise the slots are updated:
//! the first iteration by direct substitution (x <- g), later ones by Wegstein's method
//! (Wegstein 1958, "Accelerating convergence of iterative processes", Communications of the
//! ACM 1(6)) for each flow and the temperature on its own: with the slope
//! s = (g_k - g_{k-1}) / (x_k - x_{k-1}) of the last two iterations, q = s / (s - 1) bounded to
//! [[`Q_MIN`], [`Q_MAX`]] = [-5, 0] by default (`solver: wegstein-bounds`; the usual bounds
//! of process simulation, common practice; q = 0 is direct substitution, negative q
//! accelerates, 0 < q < 1 damps), x <- q x + (1 - q) g, flows kept non-negative. For a linear
//! loop of slope s the error shrinks by q (1 - s) + s a pass: a splitter returning 90 % of its
//! flow (s = 0.9, q = -9 bounded to -5) converges by 0.4 a pass, one returning 99 % by only
//! 0.94; a lower bound of -100 or more iterations suits such loops. The
//! pressure is taken by direct substitution (it follows from the units' pressure rules, not
//! from a slowly converging balance).
//!
//! First guess: zero flow at the temperature and pressure of the first feed (file order), as
//! vapour. A workspace that converged before starts from its converged tears (warm start);
//! [`super::Workspace::forget`] clears them.

use super::result::{RecycleRecord, RecycleTermination};
use crate::error::Error;
use crate::units::Stream;

/// Default largest scaled change of a converged recycle (see the module docs).
pub const DEFAULT_TOLERANCE: f64 = 1e-10;
/// Default number of recycle iterations allowed.
pub const DEFAULT_ITERATION_LIMIT: usize = 100;
/// Lower bound of the Wegstein factor q (the strongest acceleration allowed).
pub const Q_MIN: f64 = -5.0;
/// Upper bound of the Wegstein factor q (0: direct substitution, no damping).
pub const Q_MAX: f64 = 0.0;

/// How a flowsheet's recycles are solved (`solver:` keys `recycle-tolerance`,
/// `recycle-iterations`, `tear-streams`).
#[derive(Debug, Clone, PartialEq)]
pub struct RecycleOptions {
    /// Largest scaled change of every tear at which the iteration stops (dimensionless).
    /// Default [`DEFAULT_TOLERANCE`].
    pub tolerance: f64,
    /// Iterations allowed (count). Default [`DEFAULT_ITERATION_LIMIT`].
    pub iteration_limit: usize,
    /// Tear streams named by the user; empty: chosen ([`super::tears`]).
    pub tear_streams: Vec<String>,
    /// Bounds of Wegstein's factor q, lower and upper. Default [[`Q_MIN`], [`Q_MAX`]].
    pub wegstein_bounds: [f64; 2],
}

impl Default for RecycleOptions {
    fn default() -> Self {
        RecycleOptions {
            tolerance: DEFAULT_TOLERANCE,
            iteration_limit: DEFAULT_ITERATION_LIMIT,
            tear_streams: Vec::new(),
            wegstein_bounds: [Q_MIN, Q_MAX],
        }
    }
}

impl RecycleOptions {
    /// True when the tolerance is positive and finite, the limit at least one, and the
    /// Wegstein bounds finite with lower <= upper < 1.
    pub fn is_valid(&self) -> bool {
        let [low, high] = self.wegstein_bounds;
        self.tolerance > 0.0
            && self.tolerance.is_finite()
            && self.iteration_limit >= 1
            && low.is_finite()
            && low <= high
            && high < 1.0
    }
}

/// What a flowsheet with cycles needs to iterate, fixed when it is built.
#[derive(Debug, Clone)]
pub(crate) struct RecyclePlan {
    /// Options from the file.
    pub options: RecycleOptions,
    /// Tear stream names.
    pub tears: Vec<String>,
    /// For each tear: its index among the streams of a result (where its maker writes it).
    pub stream_index: Vec<usize>,
    /// First and last solve-order position iterated (the units on cycles and any between).
    pub first: usize,
    pub last: usize,
    /// First guess of each tear (`solver: tear-guess`); `None`: zero flow at the first feed's
    /// temperature and pressure.
    pub guesses: Vec<Option<Stream>>,
}

/// Which variable changed most in the last iteration.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub(crate) enum Worst {
    #[default]
    Nothing,
    Flow(usize, usize),
    Temperature(usize),
    Pressure(usize),
}

/// The recycle iteration's work memory, kept in the workspace: the tear slots and the last
/// iteration's values for Wegstein's slopes. Sized once; no allocation per iteration.
#[derive(Debug, Clone, Default)]
pub(crate) struct RecycleState {
    /// The value of each tear the units read.
    pub slots: Vec<Stream>,
    /// Per tear: the flows and temperature of the previous slot (species count + 1 values).
    previous_x: Vec<f64>,
    /// Per tear: the flows and temperature computed from the previous slot.
    previous_g: Vec<f64>,
    /// Whether the slots hold a converged solution to start from.
    pub warm: bool,
    /// The variable that changed most in the last iteration.
    pub worst: Worst,
    /// Passes in a row in which the pressure of a tear fell, that tear and its last fall, Pa.
    pressure_falls: (usize, usize, f64),
}

impl RecycleState {
    /// Work memory for `tears` tears of `species` species.
    pub fn new(tears: usize, species: usize) -> RecycleState {
        RecycleState {
            slots: (0..tears)
                .map(|_| Stream::vapour(vec![0.0; species], 0.0, 0.0))
                .collect(),
            previous_x: vec![0.0; tears * (species + 1)],
            previous_g: vec![0.0; tears * (species + 1)],
            warm: false,
            worst: Worst::Nothing,
            pressure_falls: (0, 0, 0.0),
        }
    }

    /// Set the slots to the first guess, unless they hold a converged solution: the stream of
    /// `solver: tear-guess` where given (`guesses`, one per slot), else zero flow at the
    /// temperature and pressure of `first` (the first feed).
    pub fn start(&mut self, first: &Stream, guesses: &[Option<Stream>]) {
        if self.warm {
            return;
        }
        for (k, s) in self.slots.iter_mut().enumerate() {
            match guesses.get(k).and_then(Option::as_ref) {
                Some(g) => {
                    s.flows.clear();
                    s.flows.extend_from_slice(&g.flows);
                    s.temperature_k = g.temperature_k;
                    s.pressure_pa = g.pressure_pa;
                    s.phase = g.phase;
                }
                None => {
                    s.flows.iter_mut().for_each(|n| *n = 0.0);
                    s.temperature_k = first.temperature_k;
                    s.pressure_pa = first.pressure_pa;
                    s.phase = crate::units::StreamPhase::Vapour;
                }
            }
        }
    }

    /// Compare each tear as computed (`computed(t)`) with its slot and return the largest
    /// scaled change (module docs); `feed_total` is the total flow of all feeds, mol/s.
    pub fn residual<'s>(&mut self, computed: impl Fn(usize) -> &'s Stream, feed_total: f64) -> f64 {
        let mut worst = 0.0f64;
        self.worst = Worst::Nothing;
        let floor = (1e-12 * feed_total).max(f64::MIN_POSITIVE);
        let mut fell = None;
        for (t, x) in self.slots.iter().enumerate() {
            let g = computed(t);
            if g.pressure_pa < x.pressure_pa * (1.0 - 1e-12) && fell.is_none() {
                fell = Some((t, x.pressure_pa - g.pressure_pa));
            }
            let scale = g.total().min(feed_total).max(floor);
            let mut note = |r: f64, w: Worst| {
                if !(r <= worst) {
                    worst = r;
                    self.worst = w;
                }
            };
            for (i, (gi, xi)) in g.flows.iter().zip(&x.flows).enumerate() {
                note((gi - xi).abs() / scale, Worst::Flow(t, i));
            }
            let rel = |a: f64, b: f64| (a - b).abs() / a.abs().max(f64::MIN_POSITIVE);
            note(rel(g.temperature_k, x.temperature_k), Worst::Temperature(t));
            note(rel(g.pressure_pa, x.pressure_pa), Worst::Pressure(t));
        }
        self.pressure_falls = match fell {
            Some((t, dp)) => (self.pressure_falls.0 + 1, t, dp),
            None => (0, 0, 0.0),
        };
        worst
    }

    /// Why a loop whose tear pressure fell on each of the last three or more passes cannot
    /// converge (a loop whose inlet takes the lowest pressure loses its pressure drops on every
    /// pass); `None` otherwise.
    pub fn pressure_note(&self, tears: &[String]) -> Option<String> {
        let (passes, t, dp) = self.pressure_falls;
        (passes >= 3).then(|| {
            format!(
                "the pressure of tear stream '{}' fell on each of the last {passes} passes (by \
                 {:.4} bar on the last): the pressure drops around the loop are never made up (a \
                 mixer leaves at its lowest inlet pressure); take them out of the loop",
                tears.get(t).map_or("?", String::as_str),
                dp / 1e5
            )
        })
    }

    /// Update the slots from the tears as computed: direct substitution when `direct`, else
    /// bounded Wegstein per flow and temperature (pressure always by direct substitution).
    pub fn update<'s>(
        &mut self,
        computed: impl Fn(usize) -> &'s Stream,
        direct: bool,
        bounds: [f64; 2],
    ) {
        for (t, x) in self.slots.iter_mut().enumerate() {
            let g = computed(t);
            let n = g.flows.len();
            let base = t * (n + 1);
            let px = &mut self.previous_x[base..base + n + 1];
            let pg = &mut self.previous_g[base..base + n + 1];
            for j in 0..=n {
                let (xj, gj) = if j < n {
                    (x.flows[j], g.flows[j])
                } else {
                    (x.temperature_k, g.temperature_k)
                };
                let q = if direct {
                    0.0
                } else {
                    wegstein_q(xj - px[j], gj - pg[j], bounds)
                };
                px[j] = xj;
                pg[j] = gj;
                let next = q * xj + (1.0 - q) * gj;
                if j < n {
                    x.flows[j] = next.max(0.0);
                } else {
                    // A temperature never goes below half the computed one.
                    x.temperature_k = next.max(0.5 * gj);
                }
            }
            x.pressure_pa = g.pressure_pa;
            x.phase = g.phase;
        }
    }

    /// The variable that changed most, in words (`flow of CO2 in 'recycle'`).
    pub fn describe_worst(&self, tears: &[String], species: impl Fn(usize) -> String) -> String {
        let name = |t: usize| tears.get(t).map_or("?", String::as_str);
        match self.worst {
            Worst::Nothing => "no variable".into(),
            Worst::Flow(t, i) => format!("the flow of {} in '{}'", species(i), name(t)),
            Worst::Temperature(t) => format!("the temperature of '{}'", name(t)),
            Worst::Pressure(t) => format!("the pressure of '{}'", name(t)),
        }
    }
}

/// Wegstein's factor from the last change of a variable (`dx`) and of its computed value
/// (`dg`), bounded to `bounds` (lower, upper); direct substitution (0) where the slope is
/// undefined.
pub(crate) fn wegstein_q(dx: f64, dg: f64, bounds: [f64; 2]) -> f64 {
    if dx == 0.0 || !dx.is_finite() || !dg.is_finite() {
        return 0.0;
    }
    let s = dg / dx;
    let q = s / (s - 1.0);
    if q.is_nan() {
        0.0
    } else {
        q.clamp(bounds[0], bounds[1])
    }
}

/// The error of a recycle that did not converge.
pub(crate) fn not_converged(record: &RecycleRecord, tolerance: f64, worst: String) -> Error {
    Error::RecycleNotConverged {
        tear_streams: record
            .tear_streams
            .iter()
            .map(|s| format!("'{s}'"))
            .collect::<Vec<_>>()
            .join(", "),
        iterations: record.iterations,
        residual: record.residual,
        tolerance,
        worst,
    }
}

/// Record a finished iteration.
pub(crate) fn finish(
    record: &mut RecycleRecord,
    iterations: usize,
    residual: f64,
    converged: bool,
) {
    record.iterations = iterations;
    record.residual = residual;
    record.termination = if converged {
        RecycleTermination::Converged
    } else {
        RecycleTermination::IterationLimit
    };
}

#[cfg(test)]
mod tests {
    use super::*;

    const B: [f64; 2] = [Q_MIN, Q_MAX];

    #[test]
    fn options_refuse_a_wegstein_factor_of_one() {
        // x' = q x + (1 - q) g(x): q = 1 never moves the guess, and the slope form
        // q = s / (s - 1) reaches 1 only for an infinite slope (Wegstein 1958); the upper
        // bound must stay below 1, and the lower bound may equal it.
        let with = |bounds: [f64; 2]| RecycleOptions {
            wegstein_bounds: bounds,
            ..RecycleOptions::default()
        };
        assert!(with([-5.0, 0.999]).is_valid());
        assert!(with([0.5, 0.5]).is_valid());
        assert!(!with([-5.0, 1.0]).is_valid());
        assert!(!with([0.6, 0.5]).is_valid());
        assert!(!with([f64::NEG_INFINITY, 0.0]).is_valid());
        assert!(RecycleOptions::default().is_valid());
    }

    #[test]
    fn wegstein_is_exact_for_a_linear_map_within_its_bounds() {
        // x = g(x) = a + s x has the fixed point a / (1 - s); with the slope known, one
        // Wegstein step lands on it (Wegstein 1958): x' = q x + (1 - q) g, q = s / (s - 1).
        let (a, s) = (3.0, 0.6);
        let g = |x: f64| a + s * x;
        let (x0, x1) = (0.0, g(0.0));
        let q = wegstein_q(x1 - x0, g(x1) - g(x0), B);
        assert!((q - s / (s - 1.0)).abs() < 1e-15);
        let x2 = q * x1 + (1.0 - q) * g(x1);
        assert!((x2 - a / (1.0 - s)).abs() < 1e-12, "{x2}");
    }

    #[test]
    fn the_factor_is_bounded() {
        // s = 0.9: q = -9 unbounded, -5 bounded; s = 2 (diverging): q = 2 -> 0; s = 1: q
        // infinite -> bound; no slope: direct substitution.
        assert_eq!(wegstein_q(1.0, 0.9, B), Q_MIN);
        assert_eq!(wegstein_q(1.0, 2.0, B), Q_MAX);
        assert_eq!(wegstein_q(1.0, 1.0, B), Q_MAX);
        assert_eq!(wegstein_q(0.0, 1.0, B), 0.0);
        assert_eq!(wegstein_q(1.0, f64::NAN, B), 0.0);
        assert!((wegstein_q(1.0, 0.5, B) + 1.0).abs() < 1e-15);
    }

    #[test]
    fn the_residual_is_scaled_and_names_the_worst_variable() {
        let mut st = RecycleState::new(1, 2);
        st.slots[0] = Stream::vapour(vec![1.0, 2.0], 500.0, 1e6);
        let g = Stream::vapour(vec![1.0, 2.003], 500.0, 1e6);
        // Tear total 3.003, feed total 10: scaled by 3.003.
        let r = st.residual(|_| &g, 10.0);
        assert!((r - 0.003 / 3.003).abs() < 1e-12, "{r}");
        assert_eq!(st.worst, Worst::Flow(0, 1));
        // Feed total 1: scaled by it.
        let r = st.residual(|_| &g, 1.0);
        assert!((r - 0.003).abs() < 1e-12, "{r}");
        let g = Stream::vapour(vec![1.0, 2.0], 550.0, 1e6);
        let r = st.residual(|_| &g, 1.0);
        assert!((r - 50.0 / 550.0).abs() < 1e-12);
        let words = st.describe_worst(&["back".into()], |i| format!("s{i}"));
        assert_eq!(words, "the temperature of 'back'");
        // A pressure falling by 0.3 bar on three passes in a row is named.
        let tears = ["back".to_string()];
        for k in 0..3 {
            st.slots[0].pressure_pa = 1e6 - k as f64 * 0.3e5;
            let g = Stream::vapour(vec![1.0, 2.0], 550.0, st.slots[0].pressure_pa - 0.3e5);
            assert_eq!(st.pressure_note(&tears).is_some(), k == 3);
            st.residual(|_| &g, 1.0);
        }
        let note = st.pressure_note(&tears).unwrap();
        assert!(note.contains("'back' fell on each of the last 3 passes (by 0.3000 bar"));
    }

    #[test]
    fn updates_keep_flows_non_negative_and_take_the_pressure() {
        let mut st = RecycleState::new(1, 1);
        st.start(&Stream::vapour(vec![5.0], 400.0, 2e6), &[]);
        assert_eq!(st.slots[0].flows, vec![0.0]);
        assert_eq!(st.slots[0].pressure_pa, 2e6);
        let g1 = Stream::vapour(vec![4.0], 400.0, 1.9e6);
        st.update(|_| &g1, true, B);
        assert_eq!(st.slots[0].flows, vec![4.0]);
        assert_eq!(st.slots[0].pressure_pa, 1.9e6);
        // Slope (1 - 4) / (4 - 0) = -0.75: q = 0.43 bounded to 0, direct substitution to 1.
        let g2 = Stream::vapour(vec![1.0], 400.0, 1.9e6);
        st.update(|_| &g2, false, B);
        assert_eq!(st.slots[0].flows, vec![1.0]);
        // Slope (3 - 1)/(1 - 4) = -2/3, q = 0.4 -> 0. A steep rise (s = 0.9) extrapolates by
        // q = -5 and could go negative; it is held at zero.
        let g3 = Stream::vapour(vec![1.0 - 0.9 * 3.0], 400.0, 1.9e6);
        st.update(|_| &g3, false, B);
        assert!(st.slots[0].flows[0] >= 0.0);
    }
}
