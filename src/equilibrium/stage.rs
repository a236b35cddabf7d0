//! The equilibrium stage: a set of reactions, each with its own approach temperature, at a fixed
//! outlet temperature, adiabatic, or at a fixed duty.
//!
//! Approach convention: reaction j takes its equilibrium constant at T_eq,j = T - s_j dT_j with
//! s_j = +1 when it runs in its endothermic direction in the stage and -1 when it runs in its
//! exothermic direction, so a positive approach always leaves the outlet short of equilibrium.
//! Adiabatic and fixed-duty stages wrap the extent solve in Newton's method on temperature with
//! the exact derivative dH/dT = sum n_i Cp_i + sum_i H_i sum_j nu_ji dxi_j/dT, where
//! dxi/dT = H^-1 d lnK/dT and d lnK/dT = dH_r / (R T_eq^2) (van 't Hoff), kept inside a bracket
//! that bisection narrows when a Newton step would leave it.

use super::extents::{ExtentSolution, ExtentSystem};
use crate::error::{Error, Result};
use crate::quantity::{R_GAS, STANDARD_PRESSURE_PA};
use crate::reaction::Reaction;
use crate::thermo::{Nasa7, Phase, SpeciesDb};

/// Which way a reaction is taken to run when its approach temperature is applied.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Direction {
    /// Decided from a solve at zero approach: the sign of the extent there.
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

/// The result of a stage solve.
#[derive(Debug, Clone, PartialEq)]
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
    /// Energy balance residual |H_out - H_in - duty| relative to max(|H_in|, |H_out|).
    pub energy_residual: f64,
    /// Newton iterations of the extent solves, summed.
    pub iterations: usize,
    /// Temperature iterations (zero for a fixed outlet temperature).
    pub temperature_iterations: usize,
    /// True when every residual is within tolerance.
    pub converged: bool,
}

impl StageResult {
    /// Largest equilibrium residual magnitude.
    pub fn max_residual(&self) -> f64 {
        self.residuals.iter().fold(0.0f64, |m, r| m.max(r.abs()))
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

const TEMPERATURE_TOLERANCE_K: f64 = 1e-9;
const ENERGY_TOLERANCE: f64 = 1e-12;
const MAX_TEMPERATURE_ITERATIONS: usize = 100;
/// Most species the reactions of one stage may involve.
pub const MAX_STAGE_SPECIES: usize = 32;

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

    /// Solve the stage. `guess`: the extents (mol/s) of a neighbouring solution to start from.
    pub fn solve(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        guess: Option<&[f64]>,
    ) -> Result<StageResult> {
        let needs_auto = self
            .reactions
            .iter()
            .any(|r| r.direction == Direction::Auto && r.approach_k != 0.0);
        let single = self.single_reaction_direction(inlet, mode);
        let directions: Vec<f64> = if let (true, Some(d)) = (needs_auto, single) {
            vec![d]
        } else if needs_auto {
            let zero = self.solve_with(
                db,
                inlet,
                mode,
                guess,
                &vec![1.0; self.reactions.len()],
                true,
            )?;
            self.reactions
                .iter()
                .zip(&zero.extents)
                .map(|(r, x)| match r.direction {
                    Direction::Forward => 1.0,
                    Direction::Backward => -1.0,
                    Direction::Auto => {
                        if *x < 0.0 {
                            -1.0
                        } else {
                            1.0
                        }
                    }
                })
                .collect()
        } else {
            self.reactions
                .iter()
                .map(|r| {
                    if r.direction == Direction::Backward {
                        -1.0
                    } else {
                        1.0
                    }
                })
                .collect()
        };
        self.solve_with(db, inlet, mode, guess, &directions, false)
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
            ln_k -= nu * self.nasa[k].g_rt(t);
        }
        Some(match (reactant_absent, product_absent) {
            (_, true) => 1.0,
            (true, false) => -1.0,
            (false, false) if ln_k >= ln_q => 1.0,
            _ => -1.0,
        })
    }

    fn solve_with(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        guess: Option<&[f64]>,
        directions: &[f64],
        zero_approach: bool,
    ) -> Result<StageResult> {
        let ctx = Context::new(self, db, inlet)?;
        let mut state = StageState {
            guess: guess.map(|g| g.to_vec()),
            iterations: 0,
            equilibrium_temperatures_k: vec![0.0; self.reactions.len()],
            approach_signs: vec![0.0; self.reactions.len()],
        };
        let (temperature_k, solution, t_iter) = match mode {
            EnergyMode::FixedTemperature { temperature_k } => {
                ctx.check_temperature(temperature_k)?;
                let sol = self.equilibrium_at(
                    &ctx,
                    temperature_k,
                    directions,
                    zero_approach,
                    &mut state,
                )?;
                (temperature_k, sol.0, 0)
            }
            EnergyMode::Adiabatic => {
                self.temperature_search(&ctx, 0.0, directions, zero_approach, &mut state)?
            }
            EnergyMode::FixedDuty { duty_w } => {
                if !duty_w.is_finite() {
                    return Err(Error::InvalidValue {
                        field: "duty".into(),
                        value: duty_w.to_string(),
                        reason: "must be finite".into(),
                    });
                }
                self.temperature_search(&ctx, duty_w, directions, zero_approach, &mut state)?
            }
        };
        let mut outlet = inlet.flows.to_vec();
        for (k, &i) in self.species.iter().enumerate() {
            outlet[i] = solution.amounts[k];
        }
        let h_in = ctx.inlet_enthalpy;
        let h_out = self.enthalpy_of(&ctx, &solution.amounts, temperature_k);
        let duty_w = match mode {
            EnergyMode::FixedTemperature { .. } => h_out - h_in,
            EnergyMode::Adiabatic => 0.0,
            EnergyMode::FixedDuty { duty_w } => duty_w,
        };
        let energy_residual =
            (h_out - h_in - duty_w).abs() / h_in.abs().max(h_out.abs()).max(1e-300);
        let converged = solution.converged
            && (matches!(mode, EnergyMode::FixedTemperature { .. }) || energy_residual <= 1e-9);
        Ok(StageResult {
            outlet_flows: outlet,
            outlet_temperature_k: temperature_k,
            duty_w,
            extents: solution.extents,
            equilibrium_temperatures_k: state.equilibrium_temperatures_k,
            approach_signs: state.approach_signs,
            frozen: solution.frozen,
            residuals: solution.residuals,
            energy_residual,
            iterations: state.iterations,
            temperature_iterations: t_iter,
            converged,
        })
    }

    /// Enthalpy (W) of the stage's species at `amounts` plus the inerts, at `t` (in range).
    fn enthalpy_of(&self, ctx: &Context<'_>, amounts: &[f64], t: f64) -> f64 {
        let rt = R_GAS * t;
        let local: f64 = amounts
            .iter()
            .zip(&self.nasa)
            .map(|(n, nasa)| n * nasa.h_rt(t))
            .sum();
        let inert: f64 = ctx.inerts.iter().map(|(n, nasa)| n * nasa.h_rt(t)).sum();
        rt * (local + inert)
    }

    /// Equilibrium at stream temperature `t`; also returns d lnK/dT of each reaction.
    fn equilibrium_at(
        &self,
        ctx: &Context<'_>,
        t: f64,
        directions: &[f64],
        zero_approach: bool,
        state: &mut StageState,
    ) -> Result<(ExtentSolution, Vec<f64>)> {
        let nr = self.reactions.len();
        let ns = self.species.len();
        let mut ln_k = vec![0.0; nr];
        let mut dlnk_dt = vec![0.0; nr];
        // Species values at the stream temperature, shared by reactions without an approach.
        let mut h_rt = [0.0f64; MAX_STAGE_SPECIES];
        let mut g_rt = [0.0f64; MAX_STAGE_SPECIES];
        for k in 0..ns {
            h_rt[k] = self.nasa[k].h_rt(t);
            g_rt[k] = self.nasa[k].g_rt(t);
        }
        for (j, r) in self.reactions.iter().enumerate() {
            // Sign from the direction and the sign of dH at the stream temperature.
            let dh_rt: f64 = (0..ns).map(|k| self.system.nu(j, k) * h_rt[k]).sum();
            let s = if dh_rt * directions[j] >= 0.0 {
                1.0
            } else {
                -1.0
            };
            let approach = if zero_approach { 0.0 } else { r.approach_k };
            state.approach_signs[j] = s;
            state.equilibrium_temperatures_k[j] = t - s * approach;
            if approach == 0.0 {
                ln_k[j] = -(0..ns).map(|k| self.system.nu(j, k) * g_rt[k]).sum::<f64>();
                dlnk_dt[j] = dh_rt / t; // dH/(R T^2) = (H/RT)/T
                continue;
            }
            let t_eq = t - s * approach;
            if !(t_eq > 0.0) || !self.nasa.iter().all(|n| n.in_range(t_eq)) {
                return Err(Error::InvalidValue {
                    field: format!("approach of {}", r.reaction.name),
                    value: format!("{approach} K"),
                    reason: format!(
                        "gives an equilibrium temperature of {t_eq:.2} K, outside the species data"
                    ),
                });
            }
            let mut g = 0.0;
            let mut h = 0.0;
            for k in 0..ns {
                let nu = self.system.nu(j, k);
                if nu != 0.0 {
                    g += nu * self.nasa[k].g_rt(t_eq);
                    h += nu * self.nasa[k].h_rt(t_eq);
                }
            }
            ln_k[j] = -g;
            dlnk_dt[j] = h / t_eq;
        }
        let local = &ctx.local_inlet;
        let sol = self
            .system
            .solve(local, ctx.inert, &ln_k, ctx.ln_p, state.guess.as_deref())?;
        state.iterations += sol.iterations;
        if !sol.converged {
            return Err(Error::NotConverged {
                what: format!("equilibrium at {t:.3} K"),
                iterations: sol.iterations,
                residual: sol.max_residual(),
                hint: "; check the inlet composition and approach temperatures".into(),
            });
        }
        Ok((sol, dlnk_dt))
    }

    /// Newton on temperature for H_out(T) = H_in + duty, inside a shrinking bracket.
    fn temperature_search(
        &self,
        ctx: &Context<'_>,
        duty_w: f64,
        directions: &[f64],
        zero_approach: bool,
        state: &mut StageState,
    ) -> Result<(f64, ExtentSolution, usize)> {
        let target = ctx.inlet_enthalpy + duty_w;
        let (t_min, t_max) = ctx.valid_range();
        let margin = self.approach_margin(zero_approach);
        let (mut lo, mut hi) = (t_min + margin, t_max - margin);
        let mut t = ctx.inlet.temperature_k.clamp(lo, hi);
        let scale = target.abs().max(ctx.enthalpy_scale);
        let mut last_residual = f64::INFINITY;
        for iteration in 1..=MAX_TEMPERATURE_ITERATIONS {
            let (sol, dlnk_dt) = self.equilibrium_at(ctx, t, directions, zero_approach, state)?;
            let (h, dh_dt, dxi) = self.outlet_enthalpy(ctx, &sol, t, &dlnk_dt);
            let f = h - target;
            last_residual = f.abs() / scale;
            if f.abs() <= ENERGY_TOLERANCE * scale {
                return Ok((t, sol, iteration));
            }
            if f > 0.0 {
                hi = t;
            } else {
                lo = t;
            }
            let mut t_new = t - f / dh_dt;
            let newton_ok = dh_dt.is_finite() && dh_dt > 0.0 && t_new > lo && t_new < hi;
            if !newton_ok {
                t_new = 0.5 * (lo + hi);
            }
            if (t_new - t).abs() <= TEMPERATURE_TOLERANCE_K * t.max(1.0) * 1e-3 || hi - lo < 1e-12 {
                let (sol, _) = self.equilibrium_at(ctx, t_new, directions, zero_approach, state)?;
                return Ok((t_new, sol, iteration + 1));
            }
            // Predict the extents at the new temperature from the sensitivity.
            let predicted: Vec<f64> = sol
                .extents
                .iter()
                .zip(&dxi)
                .map(|(x, d)| x + d * (t_new - t))
                .collect();
            state.guess = Some(predicted);
            if !self.guess_feasible(ctx, state.guess.as_deref()) {
                state.guess = Some(sol.extents.clone());
            }
            t = t_new;
        }
        Err(Error::NotConverged {
            what: "stage temperature (energy balance)".into(),
            iterations: MAX_TEMPERATURE_ITERATIONS,
            residual: last_residual,
            hint: "; the energy balance has no solution inside the species data range".into(),
        })
    }

    fn approach_margin(&self, zero_approach: bool) -> f64 {
        if zero_approach {
            0.0
        } else {
            self.reactions
                .iter()
                .fold(0.0f64, |m, r| m.max(r.approach_k.abs()))
        }
    }

    fn guess_feasible(&self, ctx: &Context<'_>, guess: Option<&[f64]>) -> bool {
        let Some(g) = guess else { return false };
        (0..self.species.len()).all(|k| {
            let n0 = ctx.inlet.flows[self.species[k]];
            let n = n0
                + (0..self.reactions.len())
                    .map(|j| self.system.nu(j, k) * g[j])
                    .sum::<f64>();
            n > 0.0 || (n0 == 0.0 && n == 0.0)
        })
    }

    /// Outlet enthalpy (W) at `t`, its total derivative along the equilibrium (W/K), and the
    /// sensitivity of the extents to temperature (mol/s per K).
    fn outlet_enthalpy(
        &self,
        ctx: &Context<'_>,
        sol: &ExtentSolution,
        t: f64,
        dlnk_dt: &[f64],
    ) -> (f64, f64, Vec<f64>) {
        let rt = R_GAS * t;
        let mut h = 0.0;
        let mut cp = 0.0;
        let mut h_i = vec![0.0; self.species.len()];
        for (k, n) in sol.amounts.iter().enumerate() {
            h_i[k] = rt * self.nasa[k].h_rt(t);
            h += n * h_i[k];
            cp += n * R_GAS * self.nasa[k].cp_r(t);
        }
        for (n, nasa) in &ctx.inerts {
            h += n * rt * nasa.h_rt(t);
            cp += n * R_GAS * nasa.cp_r(t);
        }
        let dxi = self.system.sensitivity(sol, ctx.inert, dlnk_dt);
        let mut dh = cp;
        for (j, d) in dxi.iter().enumerate() {
            let mut dh_r = 0.0;
            for (k, hk) in h_i.iter().enumerate() {
                dh_r += self.system.nu(j, k) * hk;
            }
            dh += dh_r * d;
        }
        (h, dh, dxi)
    }
}

struct StageState {
    guess: Option<Vec<f64>>,
    iterations: usize,
    /// T_eq,j of the last equilibrium evaluated, K.
    equilibrium_temperatures_k: Vec<f64>,
    /// s_j of the last equilibrium evaluated.
    approach_signs: Vec<f64>,
}

/// What a solve needs to know about the inlet, computed once.
struct Context<'a> {
    inlet: StageInlet<'a>,
    /// Gas species not in any reaction: (amount, polynomial).
    inerts: Vec<(f64, &'a Nasa7)>,
    inert: f64,
    /// Inlet amounts of the stage's species, in the stage's order.
    local_inlet: Vec<f64>,
    ln_p: f64,
    inlet_enthalpy: f64,
    enthalpy_scale: f64,
    t_min: f64,
    t_max: f64,
}

impl<'a> Context<'a> {
    fn new(
        stage: &EquilibriumStage,
        db: &'a SpeciesDb,
        inlet: StageInlet<'a>,
    ) -> Result<Context<'a>> {
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
        if !(inlet.temperature_k > 0.0 && inlet.temperature_k.is_finite()) {
            return Err(Error::InvalidValue {
                field: "inlet temperature".into(),
                value: format!("{} K", inlet.temperature_k),
                reason: "must be positive and finite".into(),
            });
        }
        let mut inerts = Vec::new();
        let mut inert = 0.0;
        let mut t_min: f64 = 0.0;
        let mut t_max: f64 = f64::INFINITY;
        for (i, n) in inlet.flows.iter().enumerate() {
            if !(*n >= 0.0 && n.is_finite()) {
                return Err(Error::InvalidValue {
                    field: format!("inlet flow of {}", db.by_index(i).name),
                    value: format!("{n} mol/s"),
                    reason: "must be finite and non-negative".into(),
                });
            }
            let sp = db.by_index(i);
            let member = stage.member[i];
            if *n > 0.0 || member {
                t_min = t_min.max(sp.nasa7.t_min_k);
                t_max = t_max.min(sp.nasa7.t_max_k);
            }
            if *n > 0.0 && !member {
                if sp.phase != Phase::Gas {
                    return Err(Error::InvalidValue {
                        field: format!("inlet flow of {}", sp.name),
                        value: format!("{n} mol/s"),
                        reason: "a solid cannot pass through a gas equilibrium stage".into(),
                    });
                }
                inerts.push((*n, &sp.nasa7));
                inert += n;
            }
        }
        let inlet_enthalpy =
            crate::thermo::mixture::enthalpy(db, inlet.flows, inlet.temperature_k)?;
        let total: f64 = inlet.flows.iter().sum();
        let enthalpy_scale = total * R_GAS * inlet.temperature_k;
        let local_inlet = stage.species.iter().map(|&i| inlet.flows[i]).collect();
        Ok(Context {
            inlet,
            inerts,
            inert,
            local_inlet,
            ln_p: (inlet.pressure_pa / STANDARD_PRESSURE_PA).ln(),
            inlet_enthalpy,
            enthalpy_scale,
            t_min,
            t_max,
        })
    }

    fn valid_range(&self) -> (f64, f64) {
        (self.t_min, self.t_max)
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

#[cfg(test)]
#[path = "stage_tests.rs"]
mod tests;
