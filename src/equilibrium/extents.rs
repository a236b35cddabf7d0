//! The ideal-gas equilibrium of a set of independent reactions, solved in their extents.
//!
//! With amounts n = n0 + nu^T xi, the conditions sum_i nu_ji ln(y_i P / P0) = ln K_j are the
//! stationary point of the strictly convex function
//!
//! ```text
//! F(xi) = -sum_j xi_j ln K_j + sum_i n_i ln(n_i P / (n_T P0))
//! ```
//!
//! over the region where every amount is non-negative (the Gibbs energy of an ideal-gas mixture
//! divided by RT, up to a constant; e.g. Smith & Missen, Chemical Reaction Equilibrium Analysis,
//! 1982, ch. 4), so there is exactly one physical root. It is found by Newton's method on the
//! gradient, g_j = sum_i nu_ji ln(n_i/n_T) + dnu_j ln(P/P0) - ln K_j, with the exact Hessian
//! H_jk = sum_i nu_ji nu_ki / n_i - dnu_j dnu_k / n_T, a fraction-to-boundary rule that keeps
//! every amount positive, and a backtracking line search on |g|^2 (Nocedal & Wright, Numerical
//! Optimization, 2nd ed., ch. 3 and 11). The amounts are updated directly, so a species driven
//! to 1e-15 of the total keeps its full relative precision.
//!
//! This module is pure numerics: it knows nothing of species data, units or files.

pub use super::basis::MAX_SPECIES;
use super::basis::{Basis, FRACTION_TO_BOUNDARY};
use super::linalg;
use super::options::{SolverOptions, StageTermination};
use super::small::{Prepared, SmallState};
use crate::error::{Error, Result};

/// Default convergence tolerance on the largest equilibrium residual of the working equations,
/// ln-space ([`SolverOptions::extent_tolerance`]).
pub const RESIDUAL_TOLERANCE: f64 = 1e-11;
/// Default largest residual of the original reactions a converged solution may report, ln-space
/// ([`SolverOptions::extent_reported_tolerance`]).
pub const REPORTED_TOLERANCE: f64 = 1e-10;
/// Smallest line-search step; below it the step is taken as failed (round-off bound).
const MIN_STEP: f64 = 1e-10;

/// Stoichiometry of a set of independent reactions over a set of species.
#[derive(Debug, Clone)]
pub struct ExtentSystem {
    n_species: usize,
    n_reactions: usize,
    /// Row-major coefficients, `nu[j * n_species + i]`, products positive.
    nu: Vec<f64>,
    /// Gas mole change per unit extent of each reaction.
    dnu: Vec<f64>,
    /// For each reaction, the species with a non-zero coefficient.
    members: Vec<Vec<usize>>,
    /// For each species: does a reaction change it?
    used: Vec<bool>,
    /// Identity of this system's coefficients (shared by its clones), so that a workspace can
    /// keep the rows it loaded from it.
    id: u64,
    /// The stack kernel of the Newton iteration, for a system of its size.
    small: Option<Prepared>,
}

/// Source of [`ExtentSystem`] identities.
static NEXT_SYSTEM_ID: std::sync::atomic::AtomicU64 = std::sync::atomic::AtomicU64::new(1);

/// The answer of an extent solve.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ExtentSolution {
    /// Equilibrium amounts of the system's species (same units as the inlet).
    pub amounts: Vec<f64>,
    /// Extent of each reaction (same units as the inlet).
    pub extents: Vec<f64>,
    /// Equilibrium residual of each reaction, sum nu ln(y P/P0) - ln K (zero for frozen ones).
    pub residuals: Vec<f64>,
    /// Reactions that could not proceed in either direction because a species on each side is
    /// absent and cannot be formed; their extent stays zero.
    pub frozen: Vec<bool>,
    /// Newton iterations taken.
    pub iterations: usize,
    /// Why the Newton iteration stopped: [`StageTermination::Converged`] when every active
    /// residual is within the reported tolerance.
    pub termination: StageTermination,
}

impl ExtentSolution {
    /// Largest residual magnitude over the active reactions.
    pub fn max_residual(&self) -> f64 {
        self.residuals.iter().fold(0.0f64, |m, r| m.max(r.abs()))
    }

    /// True when the solve converged.
    pub fn converged(&self) -> bool {
        self.termination.is_converged()
    }
}

/// One extent problem: inlet amounts of the system's species, the amount of other gas species
/// (they count in the total only), ln K of each reaction, ln(P / P0), and the extents to start
/// from (used when they give positive amounts).
#[derive(Debug, Clone, Copy)]
pub struct ExtentProblem<'a> {
    /// Amounts of the system's species.
    pub inlet: &'a [f64],
    /// Amount of gas species in no reaction.
    pub inert: f64,
    /// ln K of each reaction.
    pub ln_k: &'a [f64],
    /// ln(P / P0).
    pub ln_p: f64,
    /// Extents to start from (same units as `inlet`).
    pub guess: Option<&'a [f64]>,
}

/// Buffers of the extent solver, kept between solves so that a warm solve does not allocate.
#[derive(Debug, Clone, Default)]
pub struct ExtentWork {
    buffer: Vec<f64>,
    basis: Basis,
}

impl ExtentSystem {
    /// Build from one coefficient row per reaction (each `n_species` long). The reactions must
    /// be linearly independent.
    pub fn new(n_species: usize, rows: &[Vec<f64>]) -> Result<ExtentSystem> {
        let n_reactions = rows.len();
        if n_reactions == 0 {
            return Err(Error::Reaction {
                reaction: "(none)".into(),
                reason: "an equilibrium stage needs at least one reaction".into(),
            });
        }
        if n_species > MAX_SPECIES {
            return Err(Error::Reaction {
                reaction: "(set)".into(),
                reason: format!("{n_species} species; at most {MAX_SPECIES} are supported"),
            });
        }
        if n_reactions > linalg::MAX_DIM {
            return Err(Error::Reaction {
                reaction: "(set)".into(),
                reason: format!(
                    "{n_reactions} reactions in one stage; at most {} are supported",
                    linalg::MAX_DIM
                ),
            });
        }
        let mut nu = Vec::with_capacity(n_reactions * n_species);
        for row in rows {
            if row.len() != n_species {
                return Err(Error::Reaction {
                    reaction: "(set)".into(),
                    reason: "coefficient row length differs from the species count".into(),
                });
            }
            nu.extend_from_slice(row);
        }
        if linalg::rank(&nu, n_reactions, n_species) < n_reactions {
            return Err(Error::Reaction {
                reaction: "(set)".into(),
                reason: "the reactions are not independent (one is a combination of others); \
                         drop the redundant one"
                    .into(),
            });
        }
        let dnu: Vec<f64> = rows.iter().map(|r| r.iter().sum()).collect();
        let members = rows
            .iter()
            .map(|r| (0..n_species).filter(|&i| r[i] != 0.0).collect())
            .collect();
        let small = Prepared::new(&nu, &dnu, n_reactions, n_species);
        Ok(ExtentSystem {
            small,
            n_species,
            n_reactions,
            nu,
            dnu,
            members,
            used: (0..n_species)
                .map(|i| rows.iter().any(|r| r[i] != 0.0))
                .collect(),
            id: NEXT_SYSTEM_ID.fetch_add(1, std::sync::atomic::Ordering::Relaxed),
        })
    }

    /// Coefficient of species `i` in reaction `j`.
    #[inline]
    pub fn nu(&self, j: usize, i: usize) -> f64 {
        self.nu[j * self.n_species + i]
    }

    /// Solve for equilibrium with the default options (allocates its result; see
    /// [`ExtentSystem::solve_into`]).
    ///
    /// `inlet`: amounts of the system's species; `inert`: amount of other gas species (they count
    /// in the total only); `ln_k`: ln K of each reaction; `ln_p`: ln(P / P0).
    /// `guess`: extents to start from (same units as `inlet`), used when they give positive
    /// amounts. A failure to converge is reported in the solution (its termination), not as an
    /// error; an error is returned only for input that cannot be solved at all.
    pub fn solve(
        &self,
        inlet: &[f64],
        inert: f64,
        ln_k: &[f64],
        ln_p: f64,
        guess: Option<&[f64]>,
    ) -> Result<ExtentSolution> {
        let mut out = ExtentSolution::default();
        self.solve_into(
            ExtentProblem {
                inlet,
                inert,
                ln_k,
                ln_p,
                guess,
            },
            &SolverOptions::default(),
            &mut ExtentWork::default(),
            &mut out,
        )?;
        Ok(out)
    }

    /// Solve for equilibrium into `out`, with the buffers of `work`; no allocation once both
    /// have grown to the system's size. See [`ExtentSystem::solve`].
    pub fn solve_into(
        &self,
        problem: ExtentProblem<'_>,
        options: &SolverOptions,
        work: &mut ExtentWork,
        out: &mut ExtentSolution,
    ) -> Result<()> {
        let ExtentProblem {
            inlet,
            inert,
            ln_k,
            ln_p,
            guess,
        } = problem;
        let ns = self.n_species;
        let nr = self.n_reactions;
        if inlet.len() != ns || ln_k.len() != nr {
            return Err(Error::InvalidValue {
                field: "equilibrium inlet".into(),
                value: format!("{} amounts, {} ln K", inlet.len(), ln_k.len()),
                reason: format!("expected {ns} amounts and {nr} ln K values"),
            });
        }
        // One pass: a negative amount shows in the smallest, one that is not finite in the
        // total (NaN and infinities propagate), and likewise for ln K.
        let (mut total, mut smallest) = (0.0f64, 0.0f64);
        for &v in inlet {
            total += v;
            smallest = if v < smallest { v } else { smallest };
        }
        let scale = total + inert;
        let ln_k_sum: f64 = ln_k.iter().sum();
        let valid = scale > 0.0
            && scale.is_finite()
            && smallest >= 0.0
            && inert >= 0.0
            && (ln_k_sum + ln_p).is_finite();
        if !valid {
            return Err(Error::InvalidValue {
                field: "equilibrium inlet".into(),
                value: format!("{inlet:?} (+{inert} inert), ln K {ln_k:?}, ln(P/P0) {ln_p}"),
                reason: "amounts must be finite and non-negative with a positive total, and \
                         ln K and pressure finite"
                    .into(),
            });
        }
        if let Some(kernel) = &self.small {
            // A start the kernel can take: the caller's, or the inlet itself for a reaction
            // solved in closed form (the shift).
            const NO_EXTENTS: [f64; linalg::MAX_DIM] = [0.0; linalg::MAX_DIM];
            let start = match guess.filter(|g| g.len() == nr) {
                Some(g) => Some(g),
                None => kernel.closed_form().then_some(&NO_EXTENTS[..nr]),
            };
            if let Some(start) = start {
                let problem = (inlet, inert, scale, ln_k, ln_p, start);
                if Self::warm_small(kernel, problem, options, out) {
                    return Ok(());
                }
            }
        }
        // One buffer for every work vector: n0 | ln_n | dn | trial | g | trial_g | step |
        // hessian; the amounts and extents live in `out`.
        let ExtentWork { buffer, basis } = work;
        buffer.resize(4 * ns + 4 * nr + nr * nr, 0.0);
        let (n0, rest) = buffer.split_at_mut(ns);
        let (ln_n, rest) = rest.split_at_mut(ns);
        let (dn, rest) = rest.split_at_mut(ns);
        let (trial, rest) = rest.split_at_mut(ns);
        let (g, rest) = rest.split_at_mut(nr);
        let (trial_g, rest) = rest.split_at_mut(nr);
        let (step, hessian) = rest.split_at_mut(nr);
        out.amounts.resize(ns, 0.0);
        out.extents.resize(nr, 0.0);
        let n = &mut out.amounts[..];
        let xi = &mut out.extents[..];
        // One division: the rest are multiplications (divisions lie on the solve's critical
        // path).
        let inv_scale = 1.0 / scale;
        for i in 0..ns {
            n0[i] = inlet[i] * inv_scale;
        }
        let inert = inert * inv_scale;

        let mut warm = false;
        if let Some(guess) = guess.filter(|g| g.len() == nr) {
            for j in 0..nr {
                xi[j] = guess[j] * inv_scale;
            }
            n.copy_from_slice(n0);
            for (row, x) in self.nu.chunks_exact(ns).zip(xi.iter()) {
                for (v, nu) in n.iter_mut().zip(row) {
                    *v += nu * x;
                }
            }
            warm = n.iter().zip(&self.used).all(|(v, used)| *v > 0.0 || !used);
        }
        if !warm {
            n.copy_from_slice(n0);
            xi.fill(0.0);
            self.make_interior(n, xi);
        }
        out.frozen.clear();
        out.frozen
            .extend((0..nr).map(|j| self.members[j].iter().any(|&i| n[i] <= 0.0)));
        let frozen = &out.frozen;
        let mut active_list = [0usize; linalg::MAX_DIM];
        let mut na = 0;
        for j in 0..nr {
            if !frozen[j] {
                active_list[na] = j;
                na += 1;
            }
        }
        let active = &active_list[..na];
        let g = &mut g[..na];
        let trial_g = &mut trial_g[..na];
        let step = &mut step[..na];
        let scratch = &mut hessian[..na * na];
        self.load_basis(basis, active, ln_k);
        // Working extents, in the working basis (added to xi at the end).
        let mut w = [0.0f64; linalg::MAX_DIM];
        let w = &mut w[..na];
        if !warm {
            basis.log_relaxation(n, w, inert, ln_p);
        }

        let tolerance = options.extent_tolerance;
        let mut iterations = 0;
        let mut merit;
        match &self.small {
            // Every reaction active: every species is in a working reaction and present.
            Some(kernel) if na == nr && !basis.rebased() => {
                let mut state = SmallState {
                    n,
                    g,
                    w,
                    merit: 0.0,
                    iterations,
                };
                let limit = options.extent_iteration_limit;
                kernel.iterate((ln_k, inert, ln_p), &mut state, tolerance, limit, MIN_STEP);
                merit = state.merit;
                iterations = state.iterations;
            }
            _ => merit = basis.gradient(n, inert, ln_p, ln_n, g),
        }
        let mut converged = max_abs(g) <= tolerance;
        // Why the last step failed, if it did.
        let mut last_failure = None;
        while !converged && iterations < options.extent_iteration_limit {
            iterations += 1;
            // Newton direction: H d = -g.
            for k in 0..na {
                step[k] = -g[k];
            }
            let mut accepted = false;
            let mut alpha: f64 = 1.0;
            if basis.newton_solve(n, inert, step, scratch) {
                // Change of amounts and the largest step that keeps them positive.
                dn.fill(0.0);
                for k in 0..na {
                    for (d, nu) in dn.iter_mut().zip(basis.row(k)) {
                        *d += nu * step[k];
                    }
                }
                for (d, ni) in dn.iter().zip(n.iter()) {
                    if *d < 0.0 && *ni > 0.0 {
                        alpha = alpha.min(FRACTION_TO_BOUNDARY * ni / -d);
                    }
                }
                // Backtracking on |g|^2 (the Newton direction always decreases it).
                while alpha > MIN_STEP {
                    for ((t, ni), d) in trial.iter_mut().zip(n.iter()).zip(dn.iter()) {
                        *t = ni + alpha * d;
                    }
                    // Species present stay present (absent ones are in no active reaction).
                    if trial
                        .iter()
                        .zip(n.iter())
                        .all(|(t, ni)| *t > 0.0 || *ni <= 0.0)
                    {
                        let m = basis.gradient(trial, inert, ln_p, ln_n, trial_g);
                        if m < (1.0 - 1e-4 * alpha) * merit || m == 0.0 {
                            merit = m;
                            accepted = true;
                            break;
                        }
                    }
                    alpha *= 0.5;
                }
                if !accepted {
                    last_failure = Some(StageTermination::LineSearchFailed);
                }
            } else {
                last_failure = Some(StageTermination::SingularStep);
            }
            if !accepted {
                // Round-off: a species far below the others and changed by several reactions
                // cannot follow a joint step. Rebuild the basis so that it is changed by one
                // reaction only; failing that, take one-reaction steps in log space.
                if !basis.rebase(n, inert, w) {
                    basis.log_relaxation(n, w, inert, ln_p);
                }
                merit = basis.gradient(n, inert, ln_p, ln_n, g);
                converged = max_abs(g) <= tolerance;
                continue;
            }
            last_failure = None;
            n.copy_from_slice(trial);
            g.copy_from_slice(trial_g);
            for k in 0..na {
                w[k] += alpha * step[k];
            }
            converged = max_abs(g) <= tolerance;
        }
        // Extents and residuals of the original reactions.
        let mut extents_active = [0.0f64; linalg::MAX_DIM];
        basis.original_extents(w, &mut extents_active[..na]);
        for (k, &j) in active.iter().enumerate() {
            xi[j] += extents_active[k];
        }
        if basis.rebased() {
            self.load_basis(basis, active, ln_k);
            basis.gradient(n, inert, ln_p, ln_n, g);
        }
        out.residuals.clear();
        out.residuals.resize(nr, 0.0);
        for (k, &j) in active.iter().enumerate() {
            out.residuals[j] = g[k];
        }
        out.termination = if !converged {
            last_failure.unwrap_or(StageTermination::ExtentIterationLimit)
        } else if max_abs(g) <= options.extent_reported_tolerance {
            StageTermination::Converged
        } else {
            StageTermination::ResidualAboveTolerance
        };
        out.iterations = iterations;
        for v in out.amounts.iter_mut() {
            *v *= scale;
        }
        for v in out.extents.iter_mut() {
            *v *= scale;
        }
        Ok(())
    }

    /// A warm start by the stack kernel alone, without the general loop's buffers and basis:
    /// true when it converged (`out` then holds the answer, as the general loop would have
    /// written it); false, with `out` to be overwritten, when the start leaves an amount at zero
    /// or below or the kernel stops short (the general loop then solves from the start).
    fn warm_small(
        kernel: &Prepared,
        (inlet, inert, scale, ln_k, ln_p, guess): (&[f64], f64, f64, &[f64], f64, &[f64]),
        options: &SolverOptions,
        out: &mut ExtentSolution,
    ) -> bool {
        let (ns, nr) = (inlet.len(), guess.len());
        let rows = kernel.rows();
        let inv_scale = 1.0 / scale;
        let mut w = [0.0f64; linalg::MAX_DIM];
        let mut g = [0.0f64; linalg::MAX_DIM];
        out.amounts.resize(ns, 0.0);
        for (i, n) in out.amounts.iter_mut().enumerate() {
            let mut v = inlet[i] * inv_scale;
            for j in 0..nr {
                v += rows[j * ns + i] * (guess[j] * inv_scale);
            }
            *n = v;
        }
        if !out.amounts.iter().all(|v| *v > 0.0) {
            return false;
        }
        let mut state = SmallState {
            n: &mut out.amounts,
            g: &mut g[..nr],
            w: &mut w[..nr],
            merit: 0.0,
            iterations: 0,
        };
        let tolerance = options.extent_tolerance;
        let limit = options.extent_iteration_limit;
        let at = (ln_k, inert * inv_scale, ln_p);
        if !kernel.iterate(at, &mut state, tolerance, limit, MIN_STEP) {
            return false;
        }
        out.iterations = state.iterations;
        out.extents.clear();
        out.extents
            .extend((0..nr).map(|j| (guess[j] * inv_scale + w[j]) * scale));
        for v in out.amounts.iter_mut() {
            *v *= scale;
        }
        out.residuals.clear();
        out.residuals.extend_from_slice(&g[..nr]);
        out.frozen.clear();
        out.frozen.resize(nr, false);
        out.termination = if max_abs(&g[..nr]) <= options.extent_reported_tolerance {
            StageTermination::Converged
        } else {
            StageTermination::ResidualAboveTolerance
        };
        true
    }

    /// Load the working basis of the given active reactions with their ln K.
    fn load_basis(&self, basis: &mut Basis, active: &[usize], ln_k: &[f64]) {
        let mask = active.iter().fold(0u64, |m, &j| m | (1 << j));
        let source = (self.id, mask);
        if !basis.reload_ln_k(source, active.iter().map(|&j| ln_k[j])) {
            basis.load(
                source,
                active.iter().map(|&j| (self.row(j), self.dnu[j], ln_k[j])),
                self.n_species,
            );
        }
    }

    #[inline]
    fn row(&self, j: usize) -> &[f64] {
        &self.nu[j * self.n_species..(j + 1) * self.n_species]
    }

    /// Sensitivity of the equilibrium extents to the ln K values: solves H x = rhs at the given
    /// equilibrium amounts (dxi/dT = H^-1 d lnK/dT) into `out` (frozen reactions get zero).
    /// Returns false, with `out` zeroed, when the Hessian cannot be factorised (a species so
    /// scarce that H is numerically singular); the caller must then do without the sensitivity.
    /// `work` lends its basis buffers (no allocation once grown).
    #[must_use]
    pub fn sensitivity(
        &self,
        solution: &ExtentSolution,
        inert: f64,
        rhs: &[f64],
        out: &mut [f64],
        work: &mut ExtentWork,
    ) -> bool {
        let nr = self.n_reactions;
        if rhs.len() < nr
            || out.len() < nr
            || solution.frozen.len() != nr
            || solution.amounts.len() != self.n_species
        {
            return false;
        }
        out[..nr].fill(0.0);
        if let Some(kernel) = &self.small {
            // Every reaction active: the kernel's closed form, without the basis; where it
            // gives up (amounts over eight decades), the general way below.
            if !solution.frozen.iter().any(|f| *f)
                && kernel.solve_hessian(&solution.amounts, inert, &rhs[..nr], &mut out[..nr])
            {
                return true;
            }
        }
        let mut active = [0usize; linalg::MAX_DIM];
        let mut na = 0;
        for j in 0..nr {
            if !solution.frozen[j] {
                active[na] = j;
                na += 1;
            }
        }
        let active = &active[..na];
        if na == 0 {
            return true;
        }
        const NO_LN_K: [f64; linalg::MAX_DIM] = [0.0; linalg::MAX_DIM];
        let basis = &mut work.basis;
        self.load_basis(basis, active, &NO_LN_K[..nr]);
        let mut scratch = [0.0f64; linalg::MAX_DIM * linalg::MAX_DIM];
        let mut x = [0.0f64; linalg::MAX_DIM];
        for (k, &j) in active.iter().enumerate() {
            x[k] = rhs[j];
        }
        if !basis.newton_solve(
            &solution.amounts,
            inert,
            &mut x[..na],
            &mut scratch[..na * na],
        ) {
            return false;
        }
        for (k, &j) in active.iter().enumerate() {
            out[j] = x[k];
        }
        true
    }

    /// Move from the inlet to a point where every species of every reaction that can proceed is
    /// present: a reaction whose products are partly absent is run forward by half of what its
    /// scarcest reactant allows, one whose reactants are partly absent backward likewise;
    /// repeated so that species formed by one reaction can feed the next.
    fn make_interior(&self, n: &mut [f64], xi: &mut [f64]) {
        for _pass in 0..=self.n_reactions {
            let mut changed = false;
            for j in 0..self.n_reactions {
                let members = &self.members[j];
                if members.iter().all(|&i| n[i] > 0.0) {
                    continue;
                }
                let reactants_present = members.iter().all(|&i| self.nu(j, i) > 0.0 || n[i] > 0.0);
                let products_present = members.iter().all(|&i| self.nu(j, i) < 0.0 || n[i] > 0.0);
                let direction = if reactants_present {
                    1.0
                } else if products_present {
                    -1.0
                } else {
                    continue;
                };
                let limit = members
                    .iter()
                    .filter(|&&i| self.nu(j, i) * direction < 0.0)
                    .map(|&i| n[i] / self.nu(j, i).abs())
                    .fold(f64::INFINITY, f64::min);
                if !(limit.is_finite() && limit > 0.0) {
                    continue;
                }
                let step = 0.5 * limit * direction;
                for &i in members {
                    n[i] += self.nu(j, i) * step;
                    if n[i] < 0.0 {
                        n[i] = 0.0;
                    }
                }
                xi[j] += step;
                changed = true;
            }
            if !changed {
                break;
            }
        }
    }
}

fn max_abs(v: &[f64]) -> f64 {
    v.iter().fold(0.0f64, |m, x| m.max(x.abs()))
}

#[cfg(test)]
#[path = "extents_tests.rs"]
mod tests;
