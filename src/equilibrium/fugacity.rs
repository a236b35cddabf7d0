//! The Peng-Robinson stage: the equilibrium conditions sum_i nu_ij ln(phi_i y_i P / P0) =
//! ln K_j solved by successive substitution on the fugacity coefficients around the convex
//! ideal-gas extent solve.
//!
//! With phi held at the values of the last composition, the conditions are those of an ideal
//! gas with ln K'_j = ln K_j - sum_i nu_ij ln phi_i, whose one physical root the extent solver
//! finds; phi is then evaluated at the new composition ([`crate::thermo::peng_robinson`]) and
//! the solve repeated from the last extents, until no ln phi of the stage's species moves by
//! more than [`SolverOptions::fugacity_tolerance`] (else, after
//! [`SolverOptions::fugacity_iteration_limit`] passes, the stage reports
//! [`StageTermination::FugacityIterationLimit`]). phi depends weakly on composition in a
//! reactor gas (ln phi of order 1e-2, its change with the extents a further order smaller), so
//! the substitution contracts fast: four to six passes to 1e-12, each a warm Newton solve of
//! one to three steps. The residuals reported are those of the real-gas conditions, with the
//! phi of the final composition. The ideal-gas path never enters this module.
//!
//! The energy balance takes the residual enthalpy H - H_ig of the whole mixture (inerts
//! included) at the inlet and at the outlet, so that adiabatic and fixed-duty stages close on
//! real-gas enthalpies.

use super::{Context, EquilibriumStage, FeedBuffers, RunBuffers, StageInlet, MAX_STAGE_SPECIES};
use crate::equilibrium::extents::ExtentProblem;
use crate::equilibrium::linalg::MAX_DIM;
use crate::equilibrium::options::{SolverOptions, StageTermination};
use crate::error::{Error, Result};
use crate::thermo::peng_robinson::{self, PrComponent};
use crate::thermo::{Species, SpeciesDb};

/// The Peng-Robinson constants of a species, or an error naming it when its record has no
/// critical constants.
pub(super) fn component(species: &Species) -> Result<PrComponent> {
    match &species.critical {
        Some(c) => Ok(PrComponent::new(c)),
        None => Err(Error::InvalidValue {
            field: format!("critical constants of {}", species.name),
            value: "none".into(),
            reason: "the gas model peng-robinson needs the critical temperature, critical \
                     pressure and acentric factor of every species in the stage; add a \
                     `critical:` block to its record or use the gas model ideal"
                .into(),
        }),
    }
}

/// Gather the Peng-Robinson constants of the stage's species and the inerts into
/// `feed.real_gas` (the inerts' constants already in `feed.real_gas_inerts`, in the order of
/// `feed.inerts`) and return the residual enthalpy of the inlet, W.
pub(super) fn prepare_inlet(
    stage: &EquilibriumStage,
    db: &SpeciesDb,
    inlet: StageInlet<'_>,
    feed: &mut FeedBuffers,
) -> Result<f64> {
    for &i in &stage.species {
        feed.real_gas.push(component(db.by_index(i))?);
    }
    feed.real_gas.extend_from_slice(&feed.real_gas_inerts);
    feed.real_gas_amounts.clear();
    feed.real_gas_amounts.extend_from_slice(&feed.local_inlet);
    feed.real_gas_amounts
        .extend(feed.inerts.iter().map(|(n, _)| *n));
    let total: f64 = feed.real_gas_amounts.iter().sum();
    if !(total > 0.0) {
        return Ok(0.0);
    }
    feed.real_gas_ln_phi.clear();
    feed.real_gas_ln_phi.resize(feed.real_gas.len(), 0.0);
    let state = peng_robinson::evaluate(
        &feed.real_gas,
        &feed.real_gas_amounts,
        inlet.temperature_k,
        inlet.pressure_pa,
        &mut feed.real_gas_ln_phi,
    )?;
    Ok(total * state.residual_enthalpy_j_per_mol)
}

impl EquilibriumStage {
    /// The real-gas equilibrium at stream temperature `t` with the ideal-gas `ln_k` of each
    /// reaction, into `run.solution`; its residual enthalpy into `run.residual_enthalpy_w`.
    pub(super) fn real_gas_equilibrium(
        &self,
        ctx: &Context<'_>,
        t: f64,
        ln_k: &[f64],
        options: &SolverOptions,
        run: &mut RunBuffers,
    ) -> Result<()> {
        let ns = self.species.len();
        let nr = self.reactions.len();
        let n_all = ctx.real_gas.len();
        run.real_gas_amounts.resize(n_all, 0.0);
        run.real_gas_ln_phi.resize(n_all, 0.0);
        // Start from phi at the composition of the starting extents (or of the inlet).
        let start_ok =
            run.has_guess && run.guess.len() == nr && self.guess_feasible(ctx, &run.guess);
        for k in 0..ns {
            let mut n = ctx.local_inlet[k];
            if start_ok {
                for j in 0..nr {
                    n += self.system.nu(j, k) * run.guess[j];
                }
            }
            run.real_gas_amounts[k] = n.max(0.0);
        }
        for (slot, (n, _)) in run.real_gas_amounts[ns..].iter_mut().zip(ctx.inerts) {
            *slot = *n;
        }
        let mut state = peng_robinson::evaluate(
            ctx.real_gas,
            &run.real_gas_amounts,
            t,
            ctx.inlet.pressure_pa,
            &mut run.real_gas_ln_phi,
        )?;
        let mut used = [0.0f64; MAX_STAGE_SPECIES];
        let mut ln_k_real = [0.0f64; MAX_DIM];
        let mut settled = false;
        for _ in 0..options.fugacity_iteration_limit {
            used[..ns].copy_from_slice(&run.real_gas_ln_phi[..ns]);
            for (j, out) in ln_k_real[..nr].iter_mut().enumerate() {
                let correction: f64 = (0..ns).map(|k| self.system.nu(j, k) * used[k]).sum();
                *out = ln_k[j] - correction;
            }
            let problem = ExtentProblem {
                inlet: ctx.local_inlet,
                inert: ctx.inert,
                ln_k: &ln_k_real[..nr],
                ln_p: ctx.ln_p,
                guess: run.has_guess.then_some(&run.guess[..]),
            };
            self.system
                .solve_into(problem, options, &mut run.extent, &mut run.solution)?;
            let sol = &run.solution;
            run.iterations += sol.iterations;
            if !sol.converged() {
                return Err(Error::NotConverged {
                    what: format!("real-gas equilibrium at {t:.3} K"),
                    iterations: sol.iterations,
                    residual: sol.max_residual(),
                    hint: format!(
                        " ({}); check the inlet composition and approach temperatures",
                        sol.termination
                    ),
                });
            }
            run.guess.clear();
            run.guess.extend_from_slice(&sol.extents);
            run.has_guess = true;
            run.real_gas_amounts[..ns].copy_from_slice(&sol.amounts);
            state = peng_robinson::evaluate(
                ctx.real_gas,
                &run.real_gas_amounts,
                t,
                ctx.inlet.pressure_pa,
                &mut run.real_gas_ln_phi,
            )?;
            run.fugacity_iterations += 1;
            let change = (0..ns)
                .map(|k| (run.real_gas_ln_phi[k] - used[k]).abs())
                .fold(0.0f64, f64::max);
            if !change.is_finite() {
                return Err(Error::NotConverged {
                    what: format!("fugacity coefficients at {t:.3} K"),
                    iterations: run.fugacity_iterations,
                    residual: change,
                    hint: format!(" ({})", StageTermination::NotFinite),
                });
            }
            if change <= options.fugacity_tolerance {
                settled = true;
                break;
            }
        }
        run.fugacity_limit_hit = !settled;
        // Residuals of the real-gas conditions, with phi of the final composition.
        let sol = &mut run.solution;
        for j in 0..nr {
            if !sol.frozen[j] {
                sol.residuals[j] += (0..ns)
                    .map(|k| self.system.nu(j, k) * (run.real_gas_ln_phi[k] - used[k]))
                    .sum::<f64>();
            }
        }
        let total: f64 = run.real_gas_amounts.iter().sum();
        run.residual_enthalpy_w = total * state.residual_enthalpy_j_per_mol;
        Ok(())
    }
}
