//! The equilibrium stage: a set of reactions, each with its own approach temperature, at a fixed
//! outlet temperature, adiabatic, or at a fixed duty.
//!
//! Approach convention: reaction j takes its equilibrium constant at T_eq,j = T - s_j dT_j with
//! s_j = +1 when it runs in its endothermic direction in the stage and -1 when it runs in its
//! exothermic direction, so a positive approach always leaves the outlet short of equilibrium.
//! Adiabatic and fixed-duty stages wrap the extent solve in a search on temperature for
//! H_out(T) = H_in + duty: Newton's method with the exact derivative
//! dH/dT = sum n_i Cp_i + sum_i H_i sum_j nu_ji dxi_j/dT, where dxi/dT = H^-1 d lnK/dT and
//! d lnK/dT = dH_r / (R T_eq^2) (van 't Hoff), safeguarded by bisection ([`super::root`]). The
//! energy residual is normalised by n_in R T_in, in the search and in the reported residual
//! alike, so that a stream whose total enthalpy is near zero is judged like any other.

use std::cell::RefCell;

use super::approach::approach_sign;
use super::extents::{ExtentProblem, ExtentSolution, ExtentSystem, ExtentWork};
use super::linalg::MAX_DIM;
use super::options::{SolverOptions, StageTermination};
use super::root::{self, Evaluation, Root, RootOptions, Termination};
use crate::error::{Error, Result};
use crate::quantity::{R_GAS, STANDARD_PRESSURE_PA};
use crate::reaction::Reaction;
use crate::thermo::peng_robinson::PrComponent;
use crate::thermo::{GasModel, Nasa7, Phase, SpeciesDb};

/// Which way a reaction is taken to run when its approach temperature is applied.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Direction {
    /// Decided from a solve at zero approach: the sign of the extent there. An extent within
    /// [`EXTENT_SIGN_TOLERANCE`] of the largest flow of the reaction's species is taken as zero
    /// (the reaction is at equilibrium at the inlet) and the reaction as running as written.
    Auto,
    /// Runs as written (reforming: toward CO and H2).
    Forward,
    /// Runs against the writing (methanation in a methanator).
    Backward,
}

/// One reaction of a stage with its approach temperature.
#[derive(Debug, Clone)]
pub struct StageReaction {
    /// The reaction.
    pub reaction: Reaction,
    /// Approach temperature, K (positive: short of equilibrium).
    pub approach_k: f64,
    /// Direction used for the approach sign.
    pub direction: Direction,
}

/// How the stage's energy balance is closed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EnergyMode {
    /// Outlet temperature given; the duty follows.
    FixedTemperature {
        /// Outlet temperature, K.
        temperature_k: f64,
    },
    /// No heat exchanged; the outlet temperature follows.
    Adiabatic,
    /// Heat added to the process stream given (negative: removed); the temperature follows.
    FixedDuty {
        /// Heat added, W.
        duty_w: f64,
    },
}

/// A stage inlet: amounts per database species, temperature and pressure.
#[derive(Debug, Clone, Copy)]
pub struct StageInlet<'a> {
    /// Flow of every database species, mol/s (indexed like the database).
    pub flows: &'a [f64],
    /// Inlet temperature, K.
    pub temperature_k: f64,
    /// Stage pressure, Pa.
    pub pressure_pa: f64,
}

/// What one solve may set without rebuilding the stage.
#[derive(Debug, Clone, Copy, Default)]
pub struct SolveSettings<'a> {
    /// Extents (mol/s) of a neighbouring solution to start from; ignored unless one per
    /// reaction.
    pub guess: Option<&'a [f64]>,
    /// Approach temperature of each reaction for this solve, K, in the stage's reaction order;
    /// `None` takes the approaches the stage was built with.
    pub approaches_k: Option<&'a [f64]>,
    /// Tolerances and limits.
    pub options: SolverOptions,
}

/// The result of a stage solve.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct StageResult {
    /// Outlet flow of every database species, mol/s.
    pub outlet_flows: Vec<f64>,
    /// Outlet temperature, K.
    pub outlet_temperature_k: f64,
    /// Heat added to the process stream, W (negative: removed).
    pub duty_w: f64,
    /// Extent of each reaction, mol/s (positive: as written).
    pub extents: Vec<f64>,
    /// Temperature at which each reaction's equilibrium constant was taken, K.
    pub equilibrium_temperatures_k: Vec<f64>,
    /// Sign s_j used for each approach: +1 endothermic direction, -1 exothermic direction.
    pub approach_signs: Vec<f64>,
    /// Reactions that could not proceed (a species on each side absent and not formable).
    pub frozen: Vec<bool>,
    /// Equilibrium residual of each reaction, sum nu ln(y P/P0) - ln K(T_eq).
    pub residuals: Vec<f64>,
    /// Energy balance residual |H_out - H_in - duty| / (n_in R T_in), with n_in the total inlet
    /// flow and T_in the inlet temperature (the normalisation of the temperature search).
    pub energy_residual: f64,
    /// Newton iterations of the extent solves, summed.
    pub iterations: usize,
    /// Temperature iterations (zero for a fixed outlet temperature).
    pub temperature_iterations: usize,
    /// How the temperature search ended (`None` for a fixed outlet temperature): termination
    /// reason, Newton and bisection steps, and evaluations whose slope dH/dT was unavailable.
    pub temperature_search: Option<Root>,
    /// Why the solve stopped: [`StageTermination::Converged`] when every residual is within
    /// tolerance (the extent solve's, and the energy residual within
    /// [`SolverOptions::energy_tolerance`] for adiabatic and fixed-duty stages).
    pub termination: StageTermination,
    /// The gas model of the solve ([`SolverOptions::gas_model`]).
    pub gas_model: GasModel,
    /// Passes of the fugacity loop, summed over the equilibria evaluated (zero for an ideal
    /// gas).
    pub fugacity_iterations: usize,
    /// Residual enthalpy of the outlet less that of the inlet, W (zero for an ideal gas): what
    /// the real-gas energy balance holds beyond the ideal-gas enthalpies. A unit whose stage
    /// inlet differs from its own inlet sets it against its own inlet.
    pub residual_enthalpy_change_w: f64,
}

impl StageResult {
    /// Largest equilibrium residual magnitude.
    pub fn max_residual(&self) -> f64 {
        self.residuals.iter().fold(0.0f64, |m, r| m.max(r.abs()))
    }

    /// True when the solve converged (its termination says so).
    pub fn converged(&self) -> bool {
        self.termination.is_converged()
    }
}

/// Buffers of a stage solve, kept between solves: one per thread, reused for every stage and
/// every solve, so that a warm solve makes no heap allocation.
#[derive(Debug, Clone, Default)]
pub struct StageWorkspace {
    feed: FeedBuffers,
    run: RunBuffers,
    /// Result of the zero-approach solve that decides [`Direction::Auto`].
    zero: StageResult,
}

impl StageWorkspace {
    /// An empty workspace (its buffers grow on first use).
    pub fn new() -> StageWorkspace {
        StageWorkspace::default()
    }
}

/// What a solve needs to know about the inlet, per solve.
#[derive(Debug, Clone, Default)]
struct FeedBuffers {
    /// Inlet amounts of the stage's species, in the stage's order.
    local_inlet: Vec<f64>,
    /// Gas species not in any reaction: (amount, polynomial).
    inerts: Vec<(f64, Nasa7)>,
    /// Peng-Robinson constants of the stage's species and then of the inerts (empty for an
    /// ideal gas), and of the inerts alone while they are gathered.
    real_gas: Vec<PrComponent>,
    real_gas_inerts: Vec<PrComponent>,
    /// Amounts and ln phi of the inlet in the order of `real_gas`.
    real_gas_amounts: Vec<f64>,
    real_gas_ln_phi: Vec<f64>,
}

/// The state of one solve.
#[derive(Debug, Clone, Default)]
struct RunBuffers {
    /// Extents the next extent solve starts from (valid when `has_guess`).
    guess: Vec<f64>,
    has_guess: bool,
    /// The last point of the temperature search, for the next start: x(T') ~ x + slope (T' - T)
    /// (valid when `has_tangent`).
    tangent_extents: Vec<f64>,
    tangent_slope: Vec<f64>,
    tangent_temperature_k: f64,
    has_tangent: bool,
    /// Extent solve iterations, summed.
    iterations: usize,
    /// T_eq,j of the last equilibrium evaluated, K.
    equilibrium_temperatures_k: [f64; MAX_DIM],
    /// s_j of the last equilibrium evaluated.
    approach_signs: [f64; MAX_DIM],
    extent: ExtentWork,
    /// H/RT of the stage's species at the stream temperature of the last equilibrium evaluated.
    h_rt: [f64; MAX_STAGE_SPECIES],
    /// The last equilibrium evaluated, and its stream temperature.
    solution: ExtentSolution,
    solution_temperature_k: f64,
    /// Peng-Robinson: amounts (stage species, then inerts) and ln phi of the last equilibrium
    /// evaluated, its residual enthalpy (W, all species), fugacity passes summed, and whether
    /// the last equilibrium's fugacity loop stopped at its limit.
    real_gas_amounts: Vec<f64>,
    real_gas_ln_phi: Vec<f64>,
    residual_enthalpy_w: f64,
    fugacity_iterations: usize,
    fugacity_limit_hit: bool,
}

/// The settings of one pass of a solve (the zero-approach pass or the real one).
struct Pass<'p> {
    inlet: StageInlet<'p>,
    mode: EnergyMode,
    guess: Option<&'p [f64]>,
    /// Running direction of each reaction: +1 as written, -1 against.
    directions: &'p [f64],
    /// Approach of each reaction, K.
    approaches: &'p [f64],
    zero_approach: bool,
    options: &'p SolverOptions,
}

impl Pass<'_> {
    fn approach(&self, j: usize) -> f64 {
        if self.zero_approach {
            0.0
        } else {
            self.approaches[j]
        }
    }
}

/// A prepared equilibrium stage; build once, solve many times.
#[derive(Debug, Clone)]
pub struct EquilibriumStage {
    reactions: Vec<StageReaction>,
    /// Database indices of the species that take part in any reaction.
    species: Vec<usize>,
    nasa: Vec<Nasa7>,
    system: ExtentSystem,
    /// For each database species: does it take part in a reaction of the stage?
    member: Vec<bool>,
}

/// Default largest energy residual |H_out - H_in - duty| / (n_in R T_in) of a converged
/// adiabatic or fixed-duty stage ([`SolverOptions::energy_tolerance`]).
pub const ENERGY_TOLERANCE: f64 = 1e-10;
/// An extent at zero approach below this fraction of the largest flow (inlet or outlet) of the
/// reaction's species is taken as zero when [`Direction::Auto`] is decided; the same bound on
/// |ln K - ln Q| decides a lone reaction at its inlet. Both are scale-free.
pub const EXTENT_SIGN_TOLERANCE: f64 = 1e-9;
/// Most species the reactions of one stage may involve (the extent solver's limit).
pub const MAX_STAGE_SPECIES: usize = super::extents::MAX_SPECIES;

impl EquilibriumStage {
    /// Prepare a stage. Only gas-phase reactions are allowed (carbon formation is judged by
    /// carbon activity, not by a solid in the stage); they must be independent.
    pub fn new(db: &SpeciesDb, reactions: Vec<StageReaction>) -> Result<EquilibriumStage> {
        let mut species: Vec<usize> = Vec::new();
        for r in &reactions {
            if r.reaction.has_solid(db) {
                return Err(Error::Reaction {
                    reaction: r.reaction.name.clone(),
                    reason: "has a solid species; an equilibrium stage takes gas reactions only \
                             (check carbon formation with the carbon activity instead)"
                        .into(),
                });
            }
            if !r.approach_k.is_finite() {
                return Err(Error::InvalidValue {
                    field: format!("approach of {}", r.reaction.name),
                    value: r.approach_k.to_string(),
                    reason: "must be a finite temperature difference".into(),
                });
            }
            for (i, _) in &r.reaction.stoichiometry {
                if !species.contains(i) {
                    species.push(*i);
                }
            }
        }
        if species.len() > MAX_STAGE_SPECIES {
            return Err(Error::Reaction {
                reaction: "(set)".into(),
                reason: format!(
                    "{} species take part; at most {MAX_STAGE_SPECIES} are supported in one stage",
                    species.len()
                ),
            });
        }
        let rows: Vec<Vec<f64>> = reactions
            .iter()
            .map(|r| species.iter().map(|&i| r.reaction.coefficient(i)).collect())
            .collect();
        let system = ExtentSystem::new(species.len(), &rows).map_err(|e| {
            e.context(format!(
                "reactions {}",
                reactions
                    .iter()
                    .map(|r| r.reaction.name.as_str())
                    .collect::<Vec<_>>()
                    .join(", ")
            ))
        })?;
        let nasa = species
            .iter()
            .map(|&i| db.by_index(i).nasa7.clone())
            .collect();
        let mut member = vec![false; db.len()];
        for &i in &species {
            member[i] = true;
        }
        Ok(EquilibriumStage {
            reactions,
            species,
            nasa,
            system,
            member,
        })
    }

    /// The stage's reactions.
    pub fn reactions(&self) -> &[StageReaction] {
        &self.reactions
    }

    /// Solve the stage with the default [`SolverOptions`]. `guess`: the extents (mol/s) of a
    /// neighbouring solution to start from.
    pub fn solve(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        guess: Option<&[f64]>,
    ) -> Result<StageResult> {
        self.solve_with_options(db, inlet, mode, guess, &SolverOptions::default())
    }

    /// Solve the stage with the given tolerances and limits: a fresh result, solved with this
    /// thread's own workspace (so only the result's vectors are allocated; a loop of solves
    /// that keeps its result should use [`EquilibriumStage::solve_into`]).
    pub fn solve_with_options(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        guess: Option<&[f64]>,
        options: &SolverOptions,
    ) -> Result<StageResult> {
        thread_local! {
            static WORKSPACE: RefCell<StageWorkspace> = RefCell::new(StageWorkspace::new());
        }
        let mut out = StageResult::default();
        let settings = SolveSettings {
            guess,
            approaches_k: None,
            options: *options,
        };
        WORKSPACE.with(|ws| match ws.try_borrow_mut() {
            Ok(mut ws) => self.solve_into(db, inlet, mode, settings, &mut ws, &mut out),
            // Not reachable today (a solve calls no solve); a fresh workspace keeps it safe.
            Err(_) => self.solve_into(
                db,
                inlet,
                mode,
                settings,
                &mut StageWorkspace::new(),
                &mut out,
            ),
        })?;
        Ok(out)
    }

    /// Solve the stage into `out` with the buffers of `ws`: the entry for loops of solves. Once
    /// `ws` and `out` have served one solve of a stage of this size, a solve makes no heap
    /// allocation (errors excepted). `settings` carries the start, the approaches of this solve
    /// and the options. On an error `out` holds nothing meaningful.
    pub fn solve_into(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        settings: SolveSettings<'_>,
        ws: &mut StageWorkspace,
        out: &mut StageResult,
    ) -> Result<()> {
        let options = &settings.options;
        if !options.is_valid() {
            return Err(Error::InvalidValue {
                field: "solver options".into(),
                value: format!("{options:?}"),
                reason: "tolerances must be positive and finite and limits at least one".into(),
            });
        }
        let nr = self.reactions.len();
        let mut approaches = [0.0f64; MAX_DIM];
        match settings.approaches_k {
            Some(given) => {
                if given.len() != nr {
                    return Err(Error::InvalidValue {
                        field: "approaches".into(),
                        value: format!("{} values", given.len()),
                        reason: format!("expected one per reaction of the stage ({nr})"),
                    });
                }
                for (j, a) in given.iter().enumerate() {
                    if !a.is_finite() {
                        return Err(Error::InvalidValue {
                            field: format!("approach of {}", self.reactions[j].reaction.name),
                            value: a.to_string(),
                            reason: "must be a finite temperature difference".into(),
                        });
                    }
                    approaches[j] = *a;
                }
            }
            None => {
                for (a, r) in approaches.iter_mut().zip(&self.reactions) {
                    *a = r.approach_k;
                }
            }
        }
        let approaches = &approaches[..nr];
        let needs_auto = self
            .reactions
            .iter()
            .zip(approaches)
            .any(|(r, a)| r.direction == Direction::Auto && *a != 0.0);
        let mut directions = [1.0f64; MAX_DIM];
        let single = if needs_auto {
            self.single_reaction_direction(inlet, mode)
        } else {
            None
        };
        if let (true, Some(d)) = (needs_auto, single) {
            directions[0] = d;
        } else if needs_auto {
            let mut zero = std::mem::take(&mut ws.zero);
            let all_forward = [1.0f64; MAX_DIM];
            let pass = Pass {
                inlet,
                mode,
                guess: settings.guess,
                directions: &all_forward[..nr],
                approaches,
                zero_approach: true,
                options,
            };
            self.solve_with(db, &pass, &mut ws.feed, &mut ws.run, &mut zero)?;
            for (j, r) in self.reactions.iter().enumerate() {
                directions[j] = match r.direction {
                    Direction::Forward => 1.0,
                    Direction::Backward => -1.0,
                    Direction::Auto => {
                        let x = zero.extents[j];
                        if x < -EXTENT_SIGN_TOLERANCE * self.largest_flow(j, inlet.flows, &zero) {
                            -1.0
                        } else {
                            1.0
                        }
                    }
                };
            }
            ws.zero = zero;
        } else {
            for (d, r) in directions.iter_mut().zip(&self.reactions) {
                if r.direction == Direction::Backward {
                    *d = -1.0;
                }
            }
        }
        let pass = Pass {
            inlet,
            mode,
            guess: settings.guess,
            directions: &directions[..nr],
            approaches,
            zero_approach: false,
            options,
        };
        self.solve_with(db, &pass, &mut ws.feed, &mut ws.run, out)
    }

    /// Largest flow, inlet or outlet of `zero`, of the species of reaction `j` (mol/s).
    fn largest_flow(&self, j: usize, inlet: &[f64], zero: &StageResult) -> f64 {
        let mut largest = 0.0f64;
        for (k, &i) in self.species.iter().enumerate() {
            if self.system.nu(j, k) != 0.0 {
                let out = zero.outlet_flows.get(i).copied().unwrap_or(0.0);
                largest = largest.max(inlet[i]).max(out);
            }
        }
        largest
    }

    /// The direction of a lone reaction without solving: the sign of its extent is that of
    /// ln K(T) - ln Q at the inlet, with T the outlet temperature of a fixed-temperature stage or
    /// the inlet temperature of an adiabatic one (the heat the reaction releases or takes moves
    /// K toward Q, so the sign cannot change on the way). `None` for several reactions, a fixed
    /// duty, or a temperature outside the data (the zero-approach solve then decides).
    fn single_reaction_direction(&self, inlet: StageInlet<'_>, mode: EnergyMode) -> Option<f64> {
        if self.reactions.len() != 1 || inlet.flows.len() != self.member.len() {
            return None;
        }
        let t = match mode {
            EnergyMode::FixedTemperature { temperature_k } => temperature_k,
            EnergyMode::Adiabatic => inlet.temperature_k,
            EnergyMode::FixedDuty { .. } => return None,
        };
        if !(t > 0.0) || !self.nasa.iter().all(|n| n.in_range(t)) {
            return None;
        }
        let total: f64 = inlet.flows.iter().sum();
        let ln_p = (inlet.pressure_pa / STANDARD_PRESSURE_PA).ln();
        let (mut ln_q, mut ln_k) = (0.0, 0.0);
        let (mut reactant_absent, mut product_absent) = (false, false);
        let ln_t = t.ln();
        for (k, &i) in self.species.iter().enumerate() {
            let nu = self.system.nu(0, k);
            let n = inlet.flows[i];
            if n > 0.0 {
                ln_q += nu * ((n / total).ln() + ln_p);
            } else if nu < 0.0 {
                reactant_absent = true;
            } else {
                product_absent = true;
            }
            ln_k -= nu * self.nasa[k].g_rt_ln(t, ln_t);
        }
        Some(match (reactant_absent, product_absent) {
            (_, true) => 1.0,
            (true, false) => -1.0,
            (false, false) if ln_k - ln_q >= -EXTENT_SIGN_TOLERANCE => 1.0,
            _ => -1.0,
        })
    }

    fn solve_with(
        &self,
        db: &SpeciesDb,
        pass: &Pass<'_>,
        feed: &mut FeedBuffers,
        run: &mut RunBuffers,
        out: &mut StageResult,
    ) -> Result<()> {
        let inlet = pass.inlet;
        let mode = pass.mode;
        let ctx = Context::new(self, db, inlet, pass.options.gas_model, feed)?;
        let nr = self.reactions.len();
        run.iterations = 0;
        run.fugacity_iterations = 0;
        run.fugacity_limit_hit = false;
        run.residual_enthalpy_w = 0.0;
        run.has_tangent = false;
        run.solution_temperature_k = f64::NAN;
        run.has_guess = false;
        if let Some(g) = pass.guess.filter(|g| g.len() == nr) {
            run.guess.clear();
            run.guess.extend_from_slice(g);
            run.has_guess = true;
        }
        run.equilibrium_temperatures_k = [0.0; MAX_DIM];
        run.approach_signs = [0.0; MAX_DIM];
        let (temperature_k, search) = match mode {
            EnergyMode::FixedTemperature { temperature_k } => {
                ctx.check_temperature(temperature_k)?;
                let mut dlnk_dt = [0.0; MAX_DIM];
                self.equilibrium_at(&ctx, temperature_k, pass, run, &mut dlnk_dt)?;
                (temperature_k, None)
            }
            EnergyMode::Adiabatic => {
                let (t, root) = self.temperature_search(&ctx, 0.0, pass, run)?;
                (t, Some(root))
            }
            EnergyMode::FixedDuty { duty_w } => {
                if !duty_w.is_finite() {
                    return Err(Error::InvalidValue {
                        field: "duty".into(),
                        value: duty_w.to_string(),
                        reason: "must be finite".into(),
                    });
                }
                let (t, root) = self.temperature_search(&ctx, duty_w, pass, run)?;
                (t, Some(root))
            }
        };
        let solution = &run.solution;
        out.outlet_flows.clear();
        out.outlet_flows.extend_from_slice(inlet.flows);
        for (k, &i) in self.species.iter().enumerate() {
            out.outlet_flows[i] = solution.amounts[k];
        }
        let h_in = ctx.inlet_enthalpy;
        // H/RT of the stage's species at the outlet: those of the last equilibrium evaluated
        // when it was there (it always is once solved), else evaluated again.
        let h_rt = (run.solution_temperature_k == temperature_k).then_some(&run.h_rt);
        let h_out = self.enthalpy_of(&ctx, &solution.amounts, temperature_k, h_rt)
            + if ctx.real_gas.is_empty() {
                0.0
            } else {
                run.residual_enthalpy_w
            };
        let duty_w = match mode {
            EnergyMode::FixedTemperature { .. } => h_out - h_in,
            EnergyMode::Adiabatic => 0.0,
            EnergyMode::FixedDuty { duty_w } => duty_w,
        };
        let energy_residual = (h_out - h_in - duty_w).abs() / ctx.enthalpy_scale;
        out.termination = if !solution.converged() {
            solution.termination
        } else if run.fugacity_limit_hit {
            StageTermination::FugacityIterationLimit
        } else if matches!(mode, EnergyMode::FixedTemperature { .. })
            || energy_residual <= pass.options.energy_tolerance
        {
            StageTermination::Converged
        } else {
            StageTermination::ResidualAboveTolerance
        };
        out.outlet_temperature_k = temperature_k;
        out.duty_w = duty_w;
        out.extents.clear();
        out.extents.extend_from_slice(&solution.extents);
        out.equilibrium_temperatures_k.clear();
        out.equilibrium_temperatures_k
            .extend_from_slice(&run.equilibrium_temperatures_k[..nr]);
        out.approach_signs.clear();
        out.approach_signs
            .extend_from_slice(&run.approach_signs[..nr]);
        out.frozen.clear();
        out.frozen.extend_from_slice(&solution.frozen);
        out.residuals.clear();
        out.residuals.extend_from_slice(&solution.residuals);
        out.energy_residual = energy_residual;
        out.iterations = run.iterations;
        out.temperature_iterations = search.map_or(0, |r| r.iterations);
        out.temperature_search = search;
        out.gas_model = pass.options.gas_model;
        out.residual_enthalpy_change_w = if ctx.real_gas.is_empty() {
            0.0
        } else {
            run.residual_enthalpy_w - ctx.inlet_residual_enthalpy_w
        };
        out.fugacity_iterations = run.fugacity_iterations;
        Ok(())
    }

    /// Enthalpy (W) of the stage's species at `amounts` plus the inerts, at `t` (in range);
    /// `h_rt`: H/RT of the stage's species at `t` when already known.
    fn enthalpy_of(
        &self,
        ctx: &Context<'_>,
        amounts: &[f64],
        t: f64,
        h_rt: Option<&[f64; MAX_STAGE_SPECIES]>,
    ) -> f64 {
        let rt = R_GAS * t;
        let local: f64 = match h_rt {
            Some(h_rt) => amounts.iter().zip(h_rt).map(|(n, h)| n * h).sum(),
            None => amounts
                .iter()
                .zip(&self.nasa)
                .map(|(n, nasa)| n * nasa.h_rt(t))
                .sum(),
        };
        let inert: f64 = ctx.inerts.iter().map(|(n, nasa)| n * nasa.h_rt(t)).sum();
        rt * (local + inert)
    }

    /// Equilibrium at stream temperature `t` into `run.solution`; `dlnk_dt` receives d lnK/dT of
    /// each reaction. The extent solve starts from the tangent prediction of the last evaluation
    /// when there is one and it keeps every flow positive, else from the last extents or the
    /// caller's guess.
    fn equilibrium_at(
        &self,
        ctx: &Context<'_>,
        t: f64,
        pass: &Pass<'_>,
        run: &mut RunBuffers,
        dlnk_dt: &mut [f64; MAX_DIM],
    ) -> Result<()> {
        let nr = self.reactions.len();
        let ns = self.species.len();
        let mut ln_k = [0.0f64; MAX_DIM];
        // Species values at the stream temperature, shared by reactions without an approach.
        let h_rt = &mut run.h_rt;
        let mut g_rt = [0.0f64; MAX_STAGE_SPECIES];
        let (ln_t, inv_t) = (t.ln(), 1.0 / t);
        for k in 0..ns {
            (h_rt[k], g_rt[k]) = self.nasa[k].h_rt_and_g_rt(t, ln_t, inv_t);
        }
        let h_rt = &run.h_rt;
        for (j, r) in self.reactions.iter().enumerate() {
            // Sign from the direction and the sign of dH at the stream temperature.
            let dh_rt: f64 = (0..ns).map(|k| self.system.nu(j, k) * h_rt[k]).sum();
            let s = approach_sign(dh_rt, pass.directions[j]);
            let approach = pass.approach(j);
            run.approach_signs[j] = s;
            run.equilibrium_temperatures_k[j] = t - s * approach;
            if approach == 0.0 {
                ln_k[j] = -(0..ns).map(|k| self.system.nu(j, k) * g_rt[k]).sum::<f64>();
                dlnk_dt[j] = dh_rt * inv_t; // dH/(R T^2) = (H/RT)/T
                continue;
            }
            let t_eq = t - s * approach;
            if !(t_eq >= ctx.t_min && t_eq <= ctx.t_max) {
                return Err(Error::InvalidValue {
                    field: format!("approach of {}", r.reaction.name),
                    value: format!("{approach} K"),
                    reason: format!(
                        "gives an equilibrium temperature of {t_eq:.2} K at a stream \
                         temperature of {t:.2} K, outside the species data range \
                         {:.2}-{:.2} K; give a smaller approach",
                        ctx.t_min, ctx.t_max
                    ),
                });
            }
            let mut g = 0.0;
            let mut h = 0.0;
            let ln_t_eq = t_eq.ln();
            for k in 0..ns {
                let nu = self.system.nu(j, k);
                if nu != 0.0 {
                    g += nu * self.nasa[k].g_rt_ln(t_eq, ln_t_eq);
                    h += nu * self.nasa[k].h_rt(t_eq);
                }
            }
            ln_k[j] = -g;
            dlnk_dt[j] = h / t_eq;
        }
        if run.has_tangent {
            run.guess.resize(nr, 0.0);
            for j in 0..nr {
                run.guess[j] =
                    run.tangent_extents[j] + run.tangent_slope[j] * (t - run.tangent_temperature_k);
            }
            if !self.guess_feasible(ctx, &run.guess) {
                run.guess.copy_from_slice(&run.tangent_extents);
            }
            run.has_guess = true;
        }
        if !ctx.real_gas.is_empty() {
            self.real_gas_equilibrium(ctx, t, &ln_k[..nr], pass.options, run)?;
            run.solution_temperature_k = t;
            return Ok(());
        }
        let problem = ExtentProblem {
            inlet: ctx.local_inlet,
            inert: ctx.inert,
            ln_k: &ln_k[..nr],
            ln_p: ctx.ln_p,
            guess: run.has_guess.then_some(&run.guess[..]),
        };
        let result =
            self.system
                .solve_into(problem, pass.options, &mut run.extent, &mut run.solution);
        run.solution_temperature_k = f64::NAN;
        result?;
        let sol = &run.solution;
        run.iterations += sol.iterations;
        if !sol.converged() {
            return Err(Error::NotConverged {
                what: format!("equilibrium at {t:.3} K"),
                iterations: sol.iterations,
                residual: sol.max_residual(),
                hint: format!(
                    " ({}); check the inlet composition and approach temperatures",
                    sol.termination
                ),
            });
        }
        run.solution_temperature_k = t;
        Ok(())
    }

    /// The temperature at which H_out(T) = H_in + duty, by the safeguarded Newton search of
    /// [`root::solve_increasing`] on the residual (H_out - H_in - duty) / (n_in R T_in), inside
    /// the species data range narrowed by the largest approach. The equilibrium there is left in
    /// `run.solution`.
    fn temperature_search(
        &self,
        ctx: &Context<'_>,
        duty_w: f64,
        pass: &Pass<'_>,
        run: &mut RunBuffers,
    ) -> Result<(f64, Root)> {
        let target = ctx.inlet_enthalpy + duty_w;
        let range = self.search_range(ctx, pass)?;
        let (lo, hi) = (range.lo, range.hi);
        let scale = ctx.enthalpy_scale;
        let limit = pass.options.temperature_iteration_limit;
        let options = RootOptions {
            residual_tolerance: pass.options.energy_tolerance,
            step_tolerance: pass.options.temperature_step_tolerance_k,
            max_iterations: limit,
        };
        let nr = self.reactions.len();
        let root = root::solve_increasing(lo, hi, ctx.inlet.temperature_k, options, |t| {
            let mut dlnk_dt = [0.0; MAX_DIM];
            self.equilibrium_at(ctx, t, pass, run, &mut dlnk_dt)?;
            if !run.has_tangent {
                run.tangent_extents.resize(nr, 0.0);
                run.tangent_slope.resize(nr, 0.0);
                run.has_tangent = true;
            }
            let (h, dh_dt) = self.outlet_enthalpy(ctx, t, &dlnk_dt, run);
            run.tangent_temperature_k = t;
            run.tangent_extents.copy_from_slice(&run.solution.extents);
            if dh_dt.is_none() {
                // No sensitivity: the next solve starts from these extents, not a prediction.
                run.tangent_slope.fill(0.0);
            }
            Ok::<_, Error>(Evaluation {
                value: (h - target) / scale,
                slope: dh_dt.map(|d| d / scale),
            })
        })?;
        let stop = |hint: String| Error::NotConverged {
            what: "stage temperature (energy balance)".into(),
            iterations: root.iterations,
            residual: root.residual,
            hint,
        };
        match root.termination {
            Termination::Converged | Termination::BracketNarrowed => {}
            Termination::RootAboveBracket => {
                return Err(stop(format!(
                    "; the outlet would lie above {hi:.2} K, {}; check the duty, the feed and \
                     the approaches",
                    self.range_end(ctx, range.hi_set_by, pass)
                )))
            }
            Termination::RootBelowBracket => {
                return Err(stop(format!(
                    "; the outlet would lie below {lo:.2} K, {}; check the duty, the feed and \
                     the approaches",
                    self.range_end(ctx, range.lo_set_by, pass)
                )))
            }
            Termination::IterationLimit => {
                return Err(stop(format!(
                    "; the temperature search reached its limit of {limit} equilibrium \
                     evaluations"
                )))
            }
            Termination::NotFinite => {
                return Err(stop(
                    "; the energy balance gave a value that is not finite".into(),
                ))
            }
            Termination::InvalidBracket => {
                return Err(stop(format!(
                    "; no usable temperature range ({lo:.2}-{hi:.2} K)"
                )))
            }
        }
        // The best point is usually the last one evaluated; otherwise solve there again.
        if run.solution_temperature_k != root.x {
            run.has_tangent = false;
            let mut dlnk_dt = [0.0; MAX_DIM];
            self.equilibrium_at(ctx, root.x, pass, run, &mut dlnk_dt)?;
        }
        Ok((root.x, root))
    }

    /// Stream temperatures at which every reaction's equilibrium temperature T - s_j dT_j lies
    /// inside the species data range, with s_j taken at the inlet temperature: the range and,
    /// for each end, the reaction whose approach set it (if any). An error names the approach
    /// and the data range when nothing is left.
    fn search_range(&self, ctx: &Context<'_>, pass: &Pass<'_>) -> Result<SearchRange> {
        let (t_min, t_max) = (ctx.t_min, ctx.t_max);
        let mut range = SearchRange {
            lo: t_min,
            hi: t_max,
            lo_set_by: None,
            hi_set_by: None,
        };
        if pass.zero_approach {
            return Ok(range);
        }
        let t_ref = ctx.inlet.temperature_k.max(t_min).min(t_max);
        for (j, r) in self.reactions.iter().enumerate() {
            let approach = pass.approaches[j];
            if approach == 0.0 {
                continue;
            }
            let dh_rt: f64 = (0..self.species.len())
                .map(|k| self.system.nu(j, k) * self.nasa[k].h_rt(t_ref))
                .sum();
            let shift = approach_sign(dh_rt, pass.directions[j]) * approach;
            if t_min + shift > range.lo {
                range.lo = t_min + shift;
                range.lo_set_by = Some(j);
            }
            if t_max + shift < range.hi {
                range.hi = t_max + shift;
                range.hi_set_by = Some(j);
            }
            if !(range.lo < range.hi) {
                return Err(Error::InvalidValue {
                    field: format!("approach of {}", r.reaction.name),
                    value: format!("{approach} K"),
                    reason: format!(
                        "leaves no outlet temperature whose equilibrium temperatures lie inside \
                         the species data range {t_min:.2}-{t_max:.2} K; give a smaller approach"
                    ),
                });
            }
        }
        Ok(range)
    }

    /// Why the search range ends where it does, for messages.
    fn range_end(&self, ctx: &Context<'_>, set_by: Option<usize>, pass: &Pass<'_>) -> String {
        match set_by {
            Some(j) => format!(
                "where the equilibrium temperature of {} (approach {} K) leaves the species \
                 data range {:.2}-{:.2} K",
                self.reactions[j].reaction.name, pass.approaches[j], ctx.t_min, ctx.t_max
            ),
            None => format!(
                "the end of the species data range {:.2}-{:.2} K",
                ctx.t_min, ctx.t_max
            ),
        }
    }

    fn guess_feasible(&self, ctx: &Context<'_>, g: &[f64]) -> bool {
        (0..self.species.len()).all(|k| {
            let n0 = ctx.local_inlet[k];
            let n = n0
                + (0..self.reactions.len())
                    .map(|j| self.system.nu(j, k) * g[j])
                    .sum::<f64>();
            n > 0.0 || (n0 == 0.0 && n == 0.0)
        })
    }

    /// Outlet enthalpy (W) of `run.solution` at `t` and its total derivative along the
    /// equilibrium (W/K); `run.tangent_slope` receives the sensitivity of the extents to
    /// temperature (mol/s per K). The derivative is `None` when the sensitivity could not be
    /// solved (the search then bisects).
    fn outlet_enthalpy(
        &self,
        ctx: &Context<'_>,
        t: f64,
        dlnk_dt: &[f64; MAX_DIM],
        run: &mut RunBuffers,
    ) -> (f64, Option<f64>) {
        let sol = &run.solution;
        let rt = R_GAS * t;
        let mut h = 0.0;
        let mut cp = 0.0;
        let mut h_i = [0.0f64; MAX_STAGE_SPECIES];
        // H/RT of the stage's species at `t` from the equilibrium evaluated there.
        for (k, n) in sol.amounts.iter().enumerate() {
            h_i[k] = rt * run.h_rt[k];
            h += n * h_i[k];
            cp += n * R_GAS * self.nasa[k].cp_r(t);
        }
        for (n, nasa) in ctx.inerts {
            h += n * rt * nasa.h_rt(t);
            cp += n * R_GAS * nasa.cp_r(t);
        }
        if !ctx.real_gas.is_empty() {
            // The slope leaves out dH_res/dT and the temperature dependence of phi: a few
            // per cent of dH/dT at plant pressure, which the safeguarded search tolerates.
            h += run.residual_enthalpy_w;
        }
        let dxi = &mut run.tangent_slope;
        if !self
            .system
            .sensitivity(sol, ctx.inert, dlnk_dt, dxi, &mut run.extent)
        {
            return (h, None);
        }
        let mut dh = cp;
        for (j, d) in dxi.iter().enumerate() {
            let mut dh_r = 0.0;
            for (k, hk) in h_i[..self.species.len()].iter().enumerate() {
                dh_r += self.system.nu(j, k) * hk;
            }
            dh += dh_r * d;
        }
        (h, dh.is_finite().then_some(dh))
    }
}

/// The stream temperatures a search may visit, and the reaction whose approach set each end.
struct SearchRange {
    lo: f64,
    hi: f64,
    lo_set_by: Option<usize>,
    hi_set_by: Option<usize>,
}

/// What a solve needs to know about the inlet, computed once per solve.
struct Context<'a> {
    inlet: StageInlet<'a>,
    /// Gas species not in any reaction: (amount, polynomial).
    inerts: &'a [(f64, Nasa7)],
    inert: f64,
    /// Inlet amounts of the stage's species, in the stage's order.
    local_inlet: &'a [f64],
    ln_p: f64,
    inlet_enthalpy: f64,
    enthalpy_scale: f64,
    t_min: f64,
    t_max: f64,
    /// Peng-Robinson constants of the stage's species and then of the inerts (empty for an
    /// ideal gas).
    real_gas: &'a [PrComponent],
    /// Residual enthalpy of the inlet, W (zero for an ideal gas).
    inlet_residual_enthalpy_w: f64,
}

impl<'a> Context<'a> {
    fn new(
        stage: &EquilibriumStage,
        db: &SpeciesDb,
        inlet: StageInlet<'a>,
        gas_model: GasModel,
        feed: &'a mut FeedBuffers,
    ) -> Result<Context<'a>> {
        let real_gas = gas_model == GasModel::PengRobinson;
        if inlet.flows.len() != db.len() || stage.member.len() != db.len() {
            return Err(Error::InvalidValue {
                field: "stage inlet".into(),
                value: format!("{} flows", inlet.flows.len()),
                reason: format!("expected one flow per database species ({})", db.len()),
            });
        }
        if !(inlet.pressure_pa > 0.0 && inlet.pressure_pa.is_finite()) {
            return Err(Error::InvalidValue {
                field: "pressure".into(),
                value: format!("{} Pa", inlet.pressure_pa),
                reason: "must be positive and finite".into(),
            });
        }
        let t_in = inlet.temperature_k;
        if !(t_in > 0.0 && t_in.is_finite()) {
            return Err(Error::InvalidValue {
                field: "inlet temperature".into(),
                value: format!("{} K", t_in),
                reason: "must be positive and finite".into(),
            });
        }
        // One pass over the flows: a negative flow shows in the smallest, one that is not
        // finite in the sum (NaN and infinities propagate); the culprit is named in a second
        // pass, so the common case stays a plain sum.
        let mut smallest = 0.0f64;
        let mut total = 0.0;
        for &n in inlet.flows {
            total += n;
            smallest = if n < smallest { n } else { smallest };
        }
        if !(smallest >= 0.0 && total.is_finite()) {
            for (i, n) in inlet.flows.iter().enumerate() {
                if !(*n >= 0.0 && n.is_finite()) {
                    return Err(Error::InvalidValue {
                        field: format!("inlet flow of {}", db.by_index(i).name),
                        value: format!("{n} mol/s"),
                        reason: "must be finite and non-negative".into(),
                    });
                }
            }
        }
        feed.inerts.clear();
        feed.real_gas.clear();
        feed.real_gas_inerts.clear();
        let mut inert = 0.0;
        let mut t_min: f64 = 0.0;
        let mut t_max: f64 = f64::INFINITY;
        // Inlet enthalpy, W, over the species present (their ranges checked after the loop).
        let rt_in = R_GAS * t_in;
        let inv_t_in = 1.0 / t_in;
        let mut h = 0.0;
        let mut out_of_range = None;
        // The stage's own species bound the range whether present or not; the others only
        // when present.
        for nasa in &stage.nasa {
            t_min = t_min.max(nasa.t_min_k);
            t_max = t_max.min(nasa.t_max_k);
        }
        for (i, (n, &member)) in inlet.flows.iter().zip(&stage.member).enumerate() {
            if !(*n > 0.0) {
                continue;
            }
            let sp = db.by_index(i);
            if !member {
                t_min = t_min.max(sp.nasa7.t_min_k);
                t_max = t_max.min(sp.nasa7.t_max_k);
            }
            if !sp.nasa7.in_range(t_in) && out_of_range.is_none() {
                out_of_range = Some(i);
            }
            h += n * (rt_in * sp.nasa7.h_rt_with_inverse(t_in, inv_t_in));
            if !member {
                if sp.phase != Phase::Gas {
                    return Err(Error::InvalidValue {
                        field: format!("inlet flow of {}", sp.name),
                        value: format!("{n} mol/s"),
                        reason: "a solid cannot pass through a gas equilibrium stage".into(),
                    });
                }
                feed.inerts.push((*n, sp.nasa7.clone()));
                if real_gas {
                    feed.real_gas_inerts.push(fugacity::component(sp)?);
                }
                inert += n;
            }
        }
        if let Some(i) = out_of_range {
            db.by_index(i).check_range(t_in)?;
        }
        feed.local_inlet.clear();
        feed.local_inlet
            .extend(stage.species.iter().map(|&i| inlet.flows[i]));
        let enthalpy_scale = total * R_GAS * t_in;
        let inlet_residual_enthalpy_w = if real_gas {
            fugacity::prepare_inlet(stage, db, inlet, feed)?
        } else {
            0.0
        };
        if real_gas {
            h += inlet_residual_enthalpy_w;
        }
        Ok(Context {
            inlet,
            inerts: &feed.inerts,
            inert,
            local_inlet: &feed.local_inlet,
            ln_p: (inlet.pressure_pa / STANDARD_PRESSURE_PA).ln(),
            inlet_enthalpy: h,
            enthalpy_scale,
            t_min,
            t_max,
            real_gas: &feed.real_gas,
            inlet_residual_enthalpy_w,
        })
    }

    fn check_temperature(&self, t: f64) -> Result<()> {
        if t >= self.t_min && t <= self.t_max && t.is_finite() {
            Ok(())
        } else {
            Err(Error::InvalidValue {
                field: "outlet temperature".into(),
                value: format!("{t:.2} K"),
                reason: format!(
                    "outside the species data range {:.2}-{:.2} K",
                    self.t_min, self.t_max
                ),
            })
        }
    }
}

#[path = "fugacity.rs"]
mod fugacity;

#[cfg(test)]
#[path = "stage_tests.rs"]
mod tests;
