//! Design targets: adjust one input of a flowsheet so that one result meets a value (the
//! reformer outlet temperature that gives 4.5 % methane dry, the steam flow that gives a
//! steam-to-carbon ratio of 3.0).
//!
//! A target names an input path (`vary`), two bounds of that input (`between`, SI inside), a
//! result path (`so-that`), the value it must reach (`equals`, in the result path's own unit)
//! and a tolerance in that unit (default [`DEFAULT_TOLERANCE`]). It is solved by Brent's
//! bracketing root finder (Brent 1973, "Algorithms for Minimization without Derivatives",
//! ch. 4; the `argmin` crate's `BrentRoot`) on f(x) = result(x) - equals, each evaluation a
//! whole solve of the compiled flowsheet warm-started from the previous one. The search stops
//! as soon as |f| <= tolerance; whether a target is met is then read from the final solve, never
//! taken from the solver.
//!
//! Rules:
//! - A target whose result does not change sign over its bounds is out of reach: an error that
//!   says at which bound the result comes nearest, what it is there and how far from the goal.
//! - Several targets: they are taken in order (the file's, then those added in code), each
//!   solved by Brent with the inputs of the others held, and such rounds repeat until all are
//!   met at once, at most [`ROUND_LIMIT`] rounds; then an error names those not met. A target
//!   already met when its turn comes costs no solve. Two targets may not vary the same input.
//! - A steam-to-carbon target ([`Flowsheet::steam_to_carbon_target`]) scales the total of the
//!   steam feed. The ratio at a unit's inlet is affine in that flow as long as the steam reaches
//!   the inlet unreacted (mixers and heaters between), so its bracket is taken around the
//!   affine estimate from two solves (+-10 %), widened stepwise up to its bounds (a tenth and
//!   ten times the estimate from the file's values) when that does not hold.
//! - On an error the varied inputs of `params` are put back as they were given.
//!
//! The result path of a target is resolved once, on its first solve, and cached, so that many
//! cases never read result paths as text.

use std::cell::RefCell;
use std::sync::OnceLock;

use argmin::core::{CostFunction, Executor, State};
use argmin::solver::brent::BrentRoot;

use super::locate::{self, Step};
use super::paths::ResultPath;
use super::result::FlowsheetResult;
use super::solve::Workspace;
use super::yaml::{self, TargetModel};
use super::Flowsheet;
use crate::error::{Error, Position, Result};
use crate::thermo::SpeciesDb;
use crate::units::unit::Param;
use crate::units::FigureKind;

/// Tolerance of a target that gives none, in the result's unit.
pub const DEFAULT_TOLERANCE: f64 = 1e-4;
/// Most rounds over several targets before the ones not met are an error.
pub const ROUND_LIMIT: usize = 20;
/// Most Brent iterations of one search.
pub const BRENT_ITERATION_LIMIT: u64 = 100;
/// Relative half-width of the first bracket around an affine estimate.
const AFFINE_BRACKET: f64 = 0.1;

/// How a target's bracket is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Bracket {
    /// Its bounds.
    Bounds,
    /// Around the affine estimate from two solves, widened up to its bounds.
    Affine,
}

/// Where a target is written, for errors found when it is solved.
#[derive(Debug, Clone, PartialEq)]
struct WrittenAt {
    file: String,
    index: usize,
    so_that: Option<Position>,
}

/// A design target: vary one input (by slot) within bounds so that one result equals a value.
/// Build one with [`Flowsheet::target`] or [`Flowsheet::steam_to_carbon_target`], or read them
/// from the file ([`Flowsheet::targets`]); a target belongs to the flowsheet that made it.
#[derive(Debug, Clone)]
pub struct Target {
    vary: String,
    slot: Param,
    input_kind: FigureKind,
    lower: f64,
    upper: f64,
    so_that: String,
    /// The result path, resolved on the first solve and kept.
    result: OnceLock<ResultPath>,
    equals: f64,
    tolerance: f64,
    bracket: Bracket,
    written: Option<WrittenAt>,
}

impl Target {
    /// The input path varied.
    pub fn vary(&self) -> &str {
        &self.vary
    }

    /// Its slot in the parameter vector.
    pub fn slot(&self) -> Param {
        self.slot
    }

    /// How the input reads (for showing it in report units).
    pub fn input_kind(&self) -> FigureKind {
        self.input_kind
    }

    /// Lower bound of the input, SI.
    pub fn lower(&self) -> f64 {
        self.lower
    }

    /// Upper bound of the input, SI.
    pub fn upper(&self) -> f64 {
        self.upper
    }

    /// The result path to meet.
    pub fn so_that(&self) -> &str {
        &self.so_that
    }

    /// The value to reach, in the result path's unit.
    pub fn equals(&self) -> f64 {
        self.equals
    }

    /// How close, in the result path's unit.
    pub fn tolerance(&self) -> f64 {
        self.tolerance
    }

    /// Ask for another value of the same result (a study setting the target case by case; the
    /// bounds and the resolved result path stay).
    pub fn set_equals(&mut self, equals: f64) {
        self.equals = equals;
    }

    /// "target `X` -> `Y` = Z", for messages.
    fn label(&self) -> String {
        format!(
            "target: vary {} so that {} equals {}",
            self.vary, self.so_that, self.equals
        )
    }

    /// The input in report units with its unit ("851.20 degC").
    fn input_text(&self, si: f64) -> String {
        let unit = self.input_kind.report_unit();
        let v = self.input_kind.to_report(si);
        let text = significant(v, 6);
        if unit.is_empty() {
            text
        } else {
            format!("{text} {unit}")
        }
    }
}

/// What solving one target gave.
#[derive(Debug, Clone, PartialEq)]
pub struct TargetOutcome {
    /// The input path varied.
    pub input: String,
    /// The result path met.
    pub result: String,
    /// The value asked for, in the result path's unit.
    pub equals: f64,
    /// The value reached in the final solve, same unit.
    pub value: f64,
    /// |value - equals| <= tolerance in the final solve.
    pub met: bool,
    /// The input found, SI.
    pub input_value: f64,
    /// Flowsheet solves made for this target, over all rounds (bracket evaluations included).
    pub iterations: usize,
    /// How the input reads (report unit of `input_value`).
    pub input_kind: FigureKind,
    /// The tolerance, in the result path's unit.
    pub tolerance: f64,
}

/// Copy outcomes into `dst`, reusing its entries' text.
pub(crate) fn copy_outcomes(dst: &mut Vec<TargetOutcome>, src: &[TargetOutcome]) {
    dst.truncate(src.len());
    for (d, s) in dst.iter_mut().zip(src) {
        d.input.clone_from(&s.input);
        d.result.clone_from(&s.result);
        d.equals = s.equals;
        d.value = s.value;
        d.met = s.met;
        d.input_value = s.input_value;
        d.iterations = s.iterations;
        d.input_kind = s.input_kind;
        d.tolerance = s.tolerance;
    }
    let n = dst.len();
    dst.extend_from_slice(&src[n..]);
}

/// An error at a value of the file's `targets`.
fn file_error(origin: &str, text: &str, at: &[Step<'_>], input: String, message: String) -> Error {
    Error::Input {
        file: origin.to_string(),
        position: locate::locate(text, at),
        input,
        message,
    }
}

/// Check and build the file's targets (paths, units of the bounds, order of the bounds,
/// tolerance), each error with the file, line and column of the value.
pub(crate) fn from_file(
    fs: &Flowsheet,
    origin: &str,
    text: &str,
    models: &[TargetModel],
) -> Result<Vec<Target>> {
    let mut out: Vec<Target> = Vec::with_capacity(models.len());
    for (i, m) in models.iter().enumerate() {
        let entry = |key: &'static str| [Step::Key("targets"), Step::Index(i), Step::Key(key)];
        let name = |key: &str| format!("targets[{i}].{key}");
        let slot = fs
            .input(&m.vary)
            .map_err(|e| file_error(origin, text, &entry("vary"), name("vary"), reason_of(e)))?;
        let info = &fs.inputs()[slot.0];
        if m.between.len() != 2 {
            return Err(file_error(
                origin,
                text,
                &entry("between"),
                name("between"),
                format!(
                    "give two values, lower and upper, as [800 degC, 950 degC]; {} given",
                    m.between.len()
                ),
            ));
        }
        let mut bounds = [0.0; 2];
        for (j, (v, b)) in m.between.iter().zip(&mut bounds).enumerate() {
            let [a, b_, c] = entry("between");
            let at = [a, b_, c, Step::Index(j)];
            let text_value = yaml::scalar_text(v).ok_or_else(|| {
                file_error(
                    origin,
                    text,
                    &at,
                    name("between"),
                    "a bound is one value with its unit (`800 degC`)".into(),
                )
            })?;
            *b = info
                .value
                .parse(&m.vary, &text_value)
                .map_err(|e| file_error(origin, text, &at, name("between"), e.to_string()))?;
        }
        if !(bounds[0] < bounds[1]) {
            return Err(file_error(
                origin,
                text,
                &entry("between"),
                name("between"),
                "the lower bound must be below the upper bound".into(),
            ));
        }
        if !m.equals.is_finite() {
            return Err(file_error(
                origin,
                text,
                &entry("equals"),
                name("equals"),
                "give a finite number in the result path's unit".into(),
            ));
        }
        let tolerance = m.tolerance.unwrap_or(DEFAULT_TOLERANCE);
        if !(tolerance > 0.0 && tolerance.is_finite()) {
            return Err(file_error(
                origin,
                text,
                &entry("tolerance"),
                name("tolerance"),
                format!("value {tolerance} is not allowed: give a positive tolerance"),
            ));
        }
        if let Some(other) = out.iter().position(|t| t.slot == slot) {
            return Err(file_error(
                origin,
                text,
                &entry("vary"),
                name("vary"),
                format!(
                    "targets[{other}] varies {} already; each target varies its own input",
                    m.vary
                ),
            ));
        }
        out.push(Target {
            vary: m.vary.clone(),
            slot,
            input_kind: info.kind,
            lower: bounds[0],
            upper: bounds[1],
            so_that: m.so_that.clone(),
            result: OnceLock::new(),
            equals: m.equals,
            tolerance,
            bracket: Bracket::Bounds,
            written: Some(WrittenAt {
                file: origin.to_string(),
                index: i,
                so_that: locate::locate(text, &entry("so-that")),
            }),
        });
    }
    Ok(out)
}

/// The reason of an invalid-value error (the nearest paths), else the whole message.
fn reason_of(e: Error) -> String {
    match e {
        Error::InvalidValue { value, reason, .. } => format!("`{value}`: {reason}"),
        other => other.to_string(),
    }
}

/// The file's `steam-feed`, checked to be one of its feeds.
pub(crate) fn check_steam_feed(
    fs: &Flowsheet,
    origin: &str,
    text: &str,
    name: Option<&str>,
) -> Result<()> {
    match name {
        Some(n) if !fs.feeds().iter().any(|f| f.name == n) => {
            let known: Vec<&str> = fs.feeds().iter().map(|f| f.name.as_str()).collect();
            Err(file_error(
                origin,
                text,
                &[Step::Key("steam-feed")],
                "steam-feed".into(),
                format!("no feed '{n}'; the feeds are: {}", known.join(", ")),
            ))
        }
        _ => Ok(()),
    }
}

impl Flowsheet {
    /// The file's targets, in file order.
    pub fn targets(&self) -> &[Target] {
        &self.targets
    }

    /// The file's `steam-feed`, if any.
    pub fn steam_feed(&self) -> Option<&str> {
        self.steam_feed.as_deref()
    }

    /// A target built in code: vary the input `vary` between `lower` and `upper` (SI) so that
    /// the result path `so_that` equals `equals` within `tolerance` (both in the result path's
    /// unit). The input path is checked here, the result path on the first solve.
    pub fn target(
        &self,
        vary: &str,
        lower: f64,
        upper: f64,
        so_that: &str,
        equals: f64,
        tolerance: f64,
    ) -> Result<Target> {
        let slot = self.input(vary)?;
        let invalid = |field: &str, value: String, reason: &str| Error::InvalidValue {
            field: format!("target {vary}: {field}"),
            value,
            reason: reason.into(),
        };
        if !(lower.is_finite() && upper.is_finite() && lower < upper) {
            return Err(invalid(
                "bounds",
                format!("[{lower}, {upper}]"),
                "give finite bounds, the lower below the upper",
            ));
        }
        if !equals.is_finite() {
            return Err(invalid(
                "equals",
                equals.to_string(),
                "give a finite number",
            ));
        }
        if !(tolerance > 0.0 && tolerance.is_finite()) {
            return Err(invalid(
                "tolerance",
                tolerance.to_string(),
                "give a positive tolerance",
            ));
        }
        Ok(Target {
            vary: vary.to_string(),
            slot,
            input_kind: self.inputs()[slot.0].kind,
            lower,
            upper,
            so_that: so_that.to_string(),
            result: OnceLock::new(),
            equals,
            tolerance,
            bracket: Bracket::Bounds,
            written: None,
        })
    }

    /// A target setting the steam-to-carbon ratio at `unit`'s inlet to `ratio` by scaling the
    /// total of the steam feed: the file's `steam-feed`, else `steam_feed`, else the only feed
    /// that is all water. Varies `feeds.STEAM.total`, so that `summary.steam_to_carbon.UNIT`
    /// equals `ratio` (tolerance 1e-4). Solves the file's values twice (without its targets) to
    /// check the unit has the ratio and to set the bounds: a tenth and ten times the steam flow
    /// of the affine estimate.
    pub fn steam_to_carbon_target(
        &self,
        db: &SpeciesDb,
        unit: &str,
        ratio: f64,
        steam_feed: Option<&str>,
    ) -> Result<Target> {
        if !(ratio > 0.0 && ratio.is_finite()) {
            return Err(Error::InvalidValue {
                field: "steam-to-carbon ratio".into(),
                value: ratio.to_string(),
                reason: "give a positive ratio".into(),
            });
        }
        let steam = self.steam_feed_name(db, steam_feed)?;
        let vary = format!("feeds.{steam}.total");
        let slot = self.input(&vary)?;
        let so_that = format!("summary.steam_to_carbon.{unit}");
        let mut ws = self.workspace(db);
        let mut params = self.parameters();
        let x0 = params[slot.0];
        let r = self.solve_in(db, &params, &mut ws)?;
        let path = r.resolve(db, &so_that).map_err(|_| {
            let with: Vec<&str> = r
                .summary
                .steam_to_carbon
                .iter()
                .map(|(u, _)| u.as_str())
                .collect();
            Error::InvalidValue {
                field: "steam-to-carbon target".into(),
                value: unit.to_string(),
                reason: format!(
                    "this unit has no steam-to-carbon ratio; the units that have one are: {}",
                    if with.is_empty() {
                        "none".to_string()
                    } else {
                        with.join(", ")
                    }
                ),
            }
        })?;
        let r0 = read(db, &path, r)?;
        params[slot.0] = x0 * (1.0 + AFFINE_BRACKET);
        let r1 = read(db, &path, self.solve_in(db, &params, &mut ws)?)?;
        let slope = (r1 - r0) / (params[slot.0] - x0);
        let estimate = if slope > 0.0 && slope.is_finite() {
            x0 + (ratio - r0) / slope
        } else {
            x0
        };
        let estimate = if estimate > 0.0 { estimate } else { x0 };
        let target = Target {
            vary,
            slot,
            input_kind: self.inputs()[slot.0].kind,
            lower: estimate / 10.0,
            upper: estimate * 10.0,
            so_that,
            result: OnceLock::new(),
            equals: ratio,
            tolerance: DEFAULT_TOLERANCE,
            bracket: Bracket::Affine,
            written: None,
        };
        let _ = target.result.set(path);
        Ok(target)
    }

    /// The feed a steam-to-carbon target scales.
    fn steam_feed_name(&self, db: &SpeciesDb, given: Option<&str>) -> Result<String> {
        if let Some(name) = self.steam_feed().or(given) {
            if self.feeds().iter().any(|f| f.name == name) {
                return Ok(name.to_string());
            }
            return Err(Error::InvalidValue {
                field: "steam feed".into(),
                value: name.to_string(),
                reason: format!("no such feed; the feeds are: {}", self.feed_names()),
            });
        }
        let water = db.water();
        let all_water: Vec<&str> = self
            .feeds()
            .iter()
            .filter(|f| {
                water.is_some_and(|w| {
                    f.stream.flows[w] > 0.0
                        && f.stream
                            .flows
                            .iter()
                            .enumerate()
                            .all(|(i, n)| i == w || *n == 0.0)
                })
            })
            .map(|f| f.name.as_str())
            .collect();
        match all_water.as_slice() {
            [one] => Ok(one.to_string()),
            _ => Err(Error::InvalidValue {
                field: "steam feed".into(),
                value: format!("{} feeds of pure water", all_water.len()),
                reason: format!(
                    "say which feed is the steam: `steam-feed: NAME` in the file, or name it \
                     here; the feeds are: {}",
                    self.feed_names()
                ),
            }),
        }
    }

    fn feed_names(&self) -> String {
        let names: Vec<&str> = self.feeds().iter().map(|f| f.name.as_str()).collect();
        names.join(", ")
    }

    /// Solve with `params`, meeting the file's targets and then `extra` ones together (the
    /// rule of the module docs); the slots of the varied inputs in `params` are left at the
    /// values found (put back on an error); the outcomes (file targets first, then `extra`) are
    /// written into `outcomes` (cleared first) and into the result. Without any target it is
    /// exactly one [`Flowsheet::solve_in`].
    pub fn solve_targets_in<'w>(
        &self,
        db: &SpeciesDb,
        params: &mut [f64],
        extra: &[Target],
        ws: &'w mut Workspace,
        outcomes: &mut Vec<TargetOutcome>,
    ) -> Result<&'w FlowsheetResult> {
        outcomes.clear();
        if self.targets.is_empty() && extra.is_empty() {
            return self.solve_in(db, params, ws);
        }
        let targets: Vec<&Target> = self.targets.iter().chain(extra).collect();
        for (k, t) in targets.iter().enumerate() {
            if t.slot.0 >= params.len() {
                return Err(Error::InvalidValue {
                    field: "parameter vector".into(),
                    value: format!("{} values", params.len()),
                    reason: format!(
                        "the flowsheet has {} inputs; start from Flowsheet::parameters()",
                        self.inputs().len()
                    ),
                });
            }
            if let Some(other) = targets[..k].iter().find(|o| o.slot == t.slot) {
                return Err(Error::InvalidValue {
                    field: "targets".into(),
                    value: t.vary.clone(),
                    reason: format!(
                        "two targets vary this input ({} and {}); each target varies its own",
                        other.label(),
                        t.label()
                    ),
                });
            }
        }
        let start: Vec<f64> = targets.iter().map(|t| params[t.slot.0]).collect();
        let mut solves = vec![0usize; targets.len()];
        if let Err(e) = meet(self, db, params, &targets, ws, &mut solves) {
            for (t, x) in targets.iter().zip(&start) {
                params[t.slot.0] = *x;
            }
            return Err(e);
        }
        for (t, n) in targets.iter().zip(&solves) {
            let value = read(db, resolved(t)?, ws.result())?;
            outcomes.push(TargetOutcome {
                input: t.vary.clone(),
                result: t.so_that.clone(),
                equals: t.equals,
                value,
                met: (value - t.equals).abs() <= t.tolerance,
                input_value: params[t.slot.0],
                iterations: *n,
                input_kind: t.input_kind,
                tolerance: t.tolerance,
            });
        }
        ws.set_targets(outcomes);
        let ws: &'w Workspace = ws;
        Ok(ws.result())
    }
}

/// The value of a result path in a result.
fn read(db: &SpeciesDb, path: &ResultPath, r: &FlowsheetResult) -> Result<f64> {
    path.get(db, r).ok_or_else(|| Error::InvalidValue {
        field: "result path".into(),
        value: path.path.clone(),
        reason: "this solve holds no value there (a figure the unit did not publish)".into(),
    })
}

/// The cached result path of a target (resolved by [`meet`] before any read).
fn resolved(t: &Target) -> Result<&ResultPath> {
    t.result.get().ok_or_else(|| Error::Flowsheet {
        reason: format!("{}: result path not resolved (internal error)", t.label()),
    })
}

/// Resolve a target's result path against a result once; an unknown path is an error with the
/// nearest valid ones, at its place in the file for a file target.
fn resolve(t: &Target, db: &SpeciesDb, r: &FlowsheetResult) -> Result<()> {
    if t.result.get().is_some() {
        return Ok(());
    }
    let path = r.resolve(db, &t.so_that).map_err(|e| match &t.written {
        Some(w) => Error::Input {
            file: w.file.clone(),
            position: w.so_that,
            input: format!("targets[{}].so-that", w.index),
            message: reason_of(e),
        },
        None => e,
    })?;
    let _ = t.result.set(path);
    Ok(())
}

/// Solve, then meet every target by rounds of Brent searches; `solves` counts the flowsheet
/// solves made for each. On return `ws` holds the solve at `params`.
fn meet(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &mut [f64],
    targets: &[&Target],
    ws: &mut Workspace,
    solves: &mut [usize],
) -> Result<()> {
    let r = fs.solve_in(db, params, ws)?;
    for t in targets {
        resolve(t, db, r)?;
    }
    for _round in 0..ROUND_LIMIT {
        for (k, t) in targets.iter().enumerate() {
            let value = read(db, resolved(t)?, ws.result())?;
            if (value - t.equals).abs() <= t.tolerance {
                continue;
            }
            let search = Search {
                fs,
                db,
                target: t,
                path: resolved(t)?,
            };
            let state = RefCell::new(SearchState {
                params: &mut *params,
                ws: &mut *ws,
                solves: 0,
                last_x: f64::NAN,
                known: Vec::new(),
                error: None,
            });
            let found = search.run(&state);
            let s = state.into_inner();
            solves[k] += s.solves;
            found?;
        }
        let all_met = targets.iter().try_fold(true, |all, t| {
            let v = read(db, resolved(t)?, ws.result())?;
            Ok::<bool, Error>(all && (v - t.equals).abs() <= t.tolerance)
        })?;
        if all_met {
            return Ok(());
        }
    }
    let mut missed = Vec::new();
    for t in targets {
        let v = read(db, resolved(t)?, ws.result())?;
        if (v - t.equals).abs() > t.tolerance {
            missed.push(format!(
                "{} ({} reached, {} asked, tolerance {})",
                t.label(),
                v,
                t.equals,
                t.tolerance
            ));
        }
    }
    Err(Error::Flowsheet {
        reason: format!(
            "the targets were not met together after {ROUND_LIMIT} rounds (each met in turn \
             with the others held): {}; they may pull against each other: check that each \
             input acts mainly on its own result",
            missed.join("; ")
        ),
    })
}

/// The mutable side of one search (argmin's cost function takes `&self`).
struct SearchState<'p> {
    params: &'p mut [f64],
    ws: &'p mut Workspace,
    solves: usize,
    /// The input of the last solve made (the one `ws` holds).
    last_x: f64,
    /// f at inputs already solved in this search (the bracket ends), so Brent's first two
    /// evaluations cost no solve.
    known: Vec<(f64, f64)>,
    /// The error of a failed solve, kept whole (argmin carries only a message).
    error: Option<Error>,
}

/// One Brent search for one target.
struct Search<'a> {
    fs: &'a Flowsheet,
    db: &'a SpeciesDb,
    target: &'a Target,
    path: &'a ResultPath,
}

/// argmin's view of a search: f(x) = result(x) - equals.
struct Problem<'a, 's, 'p> {
    search: &'s Search<'a>,
    state: &'s RefCell<SearchState<'p>>,
}

impl CostFunction for Problem<'_, '_, '_> {
    type Param = f64;
    type Output = f64;

    fn cost(&self, x: &f64) -> std::result::Result<f64, argmin::core::Error> {
        let mut s = self.state.borrow_mut();
        if let Some((_, f)) = s.known.iter().find(|(k, _)| k.to_bits() == x.to_bits()) {
            return Ok(*f);
        }
        match self.search.f(&mut s, *x) {
            Ok(f) => Ok(f),
            Err(e) => {
                s.error = Some(e);
                Err(argmin::core::Error::msg("a flowsheet solve failed"))
            }
        }
    }
}

impl Search<'_> {
    /// Solve at input `x` (SI); f = result - equals.
    fn f(&self, s: &mut SearchState<'_>, x: f64) -> Result<f64> {
        let t = self.target;
        s.params[t.slot.0] = x;
        s.solves += 1;
        s.last_x = f64::NAN;
        let r = self
            .fs
            .solve_in(self.db, s.params, s.ws)
            .map_err(|e| e.context(format!("{}: solving at {}", t.label(), t.input_text(x))))?;
        s.last_x = x;
        Ok(read(self.db, self.path, r)? - t.equals)
    }

    /// Find the root: bracket it, run Brent, leave `params` and the workspace at the input found.
    fn run(&self, state: &RefCell<SearchState<'_>>) -> Result<()> {
        let t = self.target;
        let (a, b) = {
            let mut s = state.borrow_mut();
            let (a, fa, b, fb) = match t.bracket {
                Bracket::Bounds => {
                    let fa = self.f(&mut s, t.lower)?;
                    let fb = self.f(&mut s, t.upper)?;
                    (t.lower, fa, t.upper, fb)
                }
                Bracket::Affine => self.affine_bracket(&mut s)?,
            };
            for (x, f) in [(a, fa), (b, fb)] {
                if f.abs() <= t.tolerance {
                    // A bracket end meets it already.
                    if s.last_x.to_bits() != x.to_bits() {
                        self.f(&mut s, x)?;
                    }
                    return Ok(());
                }
            }
            if fa.signum() == fb.signum() || !(fa.is_finite() && fb.is_finite()) {
                return Err(self.out_of_reach(a, fa, b, fb));
            }
            s.known.clear();
            s.known.extend([(a, fa), (b, fb)]);
            (a, b)
        };
        let x_tolerance = 1e-12 * (b - a).abs().max(a.abs().max(b.abs()));
        let problem = Problem {
            search: self,
            state,
        };
        let outcome = Executor::new(problem, BrentRoot::new(a, b, x_tolerance))
            .configure(|st| st.max_iters(BRENT_ITERATION_LIMIT).target_cost(t.tolerance))
            .timer(false)
            .run();
        let mut s = state.borrow_mut();
        let best = match outcome {
            Ok(res) => res.state().get_best_param().copied(),
            Err(e) => {
                return Err(s.error.take().unwrap_or_else(|| Error::NotConverged {
                    what: t.label(),
                    iterations: s.solves,
                    residual: f64::NAN,
                    hint: format!("; the root finder stopped: {e}"),
                }))
            }
        };
        let best = best.unwrap_or(s.last_x);
        if s.last_x.to_bits() != best.to_bits() {
            self.f(&mut s, best)?;
        }
        Ok(())
    }

    /// A bracket around the affine estimate from the current input and one 10 % above it,
    /// +-10 % wide, its half-width doubled until f changes sign, and at last the bounds.
    fn affine_bracket(&self, s: &mut SearchState<'_>) -> Result<(f64, f64, f64, f64)> {
        let t = self.target;
        let clamp = |x: f64| x.clamp(t.lower, t.upper);
        let x0 = clamp(s.params[t.slot.0]);
        let f0 = self.f(s, x0)?;
        let up = clamp(x0 * (1.0 + AFFINE_BRACKET));
        let x1 = if up != x0 {
            up
        } else {
            clamp(x0 * (1.0 - AFFINE_BRACKET))
        };
        let f1 = self.f(s, x1)?;
        let slope = (f1 - f0) / (x1 - x0);
        let estimate = if slope != 0.0 && slope.is_finite() {
            clamp(x0 - f0 / slope)
        } else {
            x0
        };
        let mut half = AFFINE_BRACKET;
        while half < 1.0 {
            let (a, b) = (
                clamp(estimate * (1.0 - half)),
                clamp(estimate * (1.0 + half)),
            );
            let fa = self.f(s, a)?;
            let fb = self.f(s, b)?;
            if fa.signum() != fb.signum() || fa.abs().min(fb.abs()) <= t.tolerance {
                return Ok((a, fa, b, fb));
            }
            half *= 2.0;
        }
        let fa = self.f(s, t.lower)?;
        let fb = self.f(s, t.upper)?;
        Ok((t.lower, fa, t.upper, fb))
    }

    /// The error of a target that the result does not cross within its bounds: the bound where
    /// it comes nearest, its value there, how far and on which side of the goal.
    fn out_of_reach(&self, a: f64, fa: f64, b: f64, fb: f64) -> Error {
        let t = self.target;
        let (x, f, other_x, other_f) = if fa.abs() <= fb.abs() {
            (a, fa, b, fb)
        } else {
            (b, fb, a, fa)
        };
        let side = if f > 0.0 { "above" } else { "below" };
        let value = f + t.equals;
        let hint = match &t.written {
            Some(w) => format!(
                "widen `between` of targets[{}] or change its `equals`",
                w.index
            ),
            None => "widen the bounds or change the value asked".into(),
        };
        Error::Flowsheet {
            reason: format!(
                "{} is out of reach between {} and {}: at {} {} is still {}, {} {} {} (at {} it \
                 is {}); {hint}",
                t.label(),
                t.input_text(a),
                t.input_text(b),
                t.input_text(x),
                t.so_that,
                significant(value, 6),
                significant(f.abs(), 3),
                side,
                t.equals,
                t.input_text(other_x),
                significant(other_f + t.equals, 6),
            ),
        }
    }
}

/// A number with about `digits` significant digits, for messages ("851.234", "0.000125").
fn significant(value: f64, digits: usize) -> String {
    if !value.is_finite() || value == 0.0 {
        return format!("{value}");
    }
    let magnitude = value.abs().log10().floor() as i32;
    if !(-4..7).contains(&magnitude) {
        return format!("{value:.prec$e}", prec = digits.saturating_sub(1));
    }
    let decimals = (digits as i32 - 1 - magnitude).max(0) as usize;
    format!("{value:.decimals$}")
}

#[cfg(test)]
mod tests {
    use super::*;

    const DEMO: &str = include_str!("../../flowsheets/targets-demo.yaml");

    fn outcome(input: &str, value: f64) -> TargetOutcome {
        TargetOutcome {
            input: input.into(),
            result: "r".into(),
            equals: 1.0,
            value,
            met: true,
            input_value: 2.0,
            iterations: 3,
            input_kind: FigureKind::Temperature,
            tolerance: 1e-4,
        }
    }

    #[test]
    fn outcomes_are_copied_whole_and_truncated() {
        let mut dst = vec![outcome("a", 0.0), outcome("b", 0.0), outcome("c", 0.0)];
        let src = [outcome("x", 1.5), outcome("y", 2.5)];
        copy_outcomes(&mut dst, &src);
        assert_eq!(dst, src);
        let mut grow = vec![outcome("a", 0.0)];
        copy_outcomes(&mut grow, &src);
        assert_eq!(grow, src);
    }

    #[test]
    fn numbers_in_messages_keep_six_significant_digits() {
        assert_eq!(significant(1140.556789, 6), "1140.56");
        assert_eq!(significant(3.292241, 6), "3.29224");
        assert_eq!(significant(0.0456, 3), "0.0456");
        assert_eq!(significant(2.5e-6, 3), "2.50e-6");
        assert_eq!(significant(0.0, 3), "0");
    }

    #[test]
    fn the_file_targets_are_read_in_si_and_targets_in_code_are_checked() {
        let db = SpeciesDb::embedded().unwrap();
        let fs = Flowsheet::from_yaml_str("demo.yaml", DEMO, &db).unwrap();
        let t = fs.targets();
        assert_eq!(t.len(), 3);
        // ISO 80000-5: 830 degC = 1103.15 K; 2500 kmol/h = 694.44 mol/s.
        assert!((t[0].lower() - 1103.15).abs() < 1e-9);
        assert!((t[2].upper() - 4000.0 / 3.6).abs() < 1e-9);
        assert_eq!(t[0].tolerance(), 1e-4);
        assert_eq!(t[1].equals(), 0.4);
        assert_eq!(t[2].input_kind(), FigureKind::MolarFlow);
        assert_eq!(t[0].slot(), fs.input(t[0].vary()).unwrap());
        let vary = "units.reformer.outlet-temperature";
        let so = "summary.methane_slip_percent_dry.reformer";
        assert!(fs.target(vary, 1100.0, 1000.0, so, 4.5, 1e-4).is_err());
        assert!(fs.target(vary, 1000.0, 1100.0, so, 4.5, 0.0).is_err());
        assert!(fs.target(vary, 1000.0, 1100.0, so, f64::NAN, 1e-4).is_err());
        assert!(fs.target(vary, f64::NAN, 1100.0, so, 4.5, 1e-4).is_err());
        let e = fs
            .target("units.reformer.outlet", 1000.0, 1100.0, so, 4.5, 1e-4)
            .unwrap_err()
            .to_string();
        assert!(e.contains("units.reformer.outlet-temperature"), "{e}");
        assert!(fs.target(vary, 1000.0, 1100.0, so, 4.5, 1e-4).is_ok());
    }

    #[test]
    fn a_between_that_is_not_two_scalars_is_refused_at_its_place() {
        let db = SpeciesDb::embedded().unwrap();
        let text = DEMO.replace("[830 degC, 920 degC]", "[830 degC, {a: 1}]");
        let e = Flowsheet::from_yaml_str("demo.yaml", &text, &db)
            .unwrap_err()
            .to_string();
        let line = text[..text.find("{a: 1}").unwrap()].matches('\n').count() + 1;
        assert!(e.starts_with(&format!("demo.yaml:{line}:")), "{e}");
        assert!(e.contains("one value with its unit"), "{e}");
    }
}
