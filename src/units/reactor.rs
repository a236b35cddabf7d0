//! The core the four equilibrium reactors (reformer, pre-reformer, shift converter, methanator)
//! share: their name, the key species, the equilibrium stage of their reactions with its
//! approach temperatures, and the solve steps around it (the stage solved into the unit's result
//! with no heap allocation once warm, the outlet written from it, the warnings every reactor
//! gives: carbon-bearing species it cannot convert, reactions that cannot proceed, approach
//! temperatures below zero).

use super::chemistry::unconverted_carbon_warnings;
use super::common::{
    build_stage, check_pressure_drop, frozen_warnings, resolve_approaches, run_stage_into,
    stage_approaches, Key,
};
use super::{StreamPhase, UnitResult};
use crate::equilibrium::{
    Direction, EnergyMode, EquilibriumStage, SolverOptions, StageInlet, StageWorkspace,
};
use crate::error::Result;
use crate::thermo::SpeciesDb;

/// Name, key species and stage of an equilibrium reactor.
#[derive(Debug, Clone)]
pub(crate) struct ReactorCore {
    /// The unit's name.
    pub name: String,
    /// Database indices of the species the reactor looks at.
    pub key: Key,
    /// The equilibrium stage of its reactions.
    pub stage: EquilibriumStage,
    /// Its reactions, in stage order.
    reactions: &'static [&'static str],
}

impl ReactorCore {
    /// Check the approaches (by reaction name) and the pressure drop, and build the stage of
    /// `reactions` with their `directions`.
    pub fn new(
        db: &SpeciesDb,
        name: &str,
        reactions: &'static [&'static str],
        approaches: &[(String, f64)],
        directions: &[Direction],
        pressure_drop_pa: f64,
    ) -> Result<ReactorCore> {
        let approaches = resolve_approaches(name, approaches, reactions)?;
        check_pressure_drop(name, pressure_drop_pa)?;
        Ok(ReactorCore {
            name: name.to_string(),
            key: Key::new(db, name)?,
            stage: build_stage(db, name, reactions, &approaches, directions)?,
            reactions,
        })
    }

    /// Check the numbers of a specification this core was built from, changed by a study:
    /// the approaches (by reaction name) and the pressure drop, as [`ReactorCore::new`] checks
    /// them; the approaches in stage order.
    pub fn check(&self, approaches: &[(String, f64)], pressure_drop_pa: f64) -> Result<Vec<f64>> {
        let resolved = resolve_approaches(&self.name, approaches, self.reactions)?;
        check_pressure_drop(&self.name, pressure_drop_pa)?;
        Ok(resolved)
    }

    /// Start `out` (one outlet), solve the stage for `flows` entering at `inlet_temperature_k`
    /// and `pressure_pa` into `out.equilibrium`, and write the outlet from it (vapour at the
    /// stage's outlet temperature and `pressure_pa`). `approaches_k`: the approaches of this
    /// solve in stage order (`None`: those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    pub fn solve_stage(
        &self,
        db: &SpeciesDb,
        flows: &[f64],
        inlet_temperature_k: f64,
        pressure_pa: f64,
        mode: EnergyMode,
        guess: Option<&[f64]>,
        approaches_k: Option<&[f64]>,
        options: &SolverOptions,
        ws: &mut StageWorkspace,
        out: &mut UnitResult,
    ) -> Result<()> {
        out.reset(1, db.len());
        let stage = out.equilibrium.get_or_insert_with(Default::default);
        let inlet = StageInlet {
            flows,
            temperature_k: inlet_temperature_k,
            pressure_pa,
        };
        run_stage_into(
            &self.stage,
            db,
            &self.name,
            inlet,
            mode,
            guess,
            approaches_k,
            options,
            ws,
            stage,
        )?;
        let outlet = &mut out.outlets[0];
        outlet.flows.copy_from_slice(&stage.outlet_flows);
        outlet.temperature_k = stage.outlet_temperature_k;
        outlet.pressure_pa = pressure_pa;
        outlet.phase = StreamPhase::Vapour;
        Ok(())
    }

    /// The warnings and approaches every reactor reports: carbon-bearing species of the inlet
    /// that none of its reactions converts (`converts` says which the unit converts before its
    /// stage), reactions that could not proceed, and the approach of each reaction (those of
    /// `approaches_k` where given, as in [`ReactorCore::solve_stage`]).
    pub fn finish(
        &self,
        db: &SpeciesDb,
        inlet_flows: &[f64],
        converts: impl Fn(usize) -> bool,
        approaches_k: Option<&[f64]>,
        out: &mut UnitResult,
    ) {
        let name = &self.name;
        unconverted_carbon_warnings(
            db,
            name,
            &self.key,
            inlet_flows,
            converts,
            &mut out.warnings,
        );
        if let Some(stage) = &out.equilibrium {
            frozen_warnings(name, &self.stage, stage, &mut out.warnings);
        }
        stage_approaches(
            self.reactions,
            &self.stage,
            approaches_k,
            &mut out.approaches,
        );
        super::limits::negative_approach_warnings(name, &out.approaches, &mut out.warnings);
    }
}

/// The two solve entries of an equilibrium reactor's [`super::unit::UnitKind`] impl: with the
/// numbers it was built with, or with changed ones (checked by the unit's `check_numbers`, if it
/// names one, and by the core, then solved on the stage it built). Both go to the unit's
/// `run(db, spec, approaches_k, inlets, guess, scratch, out)`.
macro_rules! reactor_solve_entries {
    ($spec:ty) => {
        $crate::units::reactor::reactor_solve_entries!($spec, |_: &str, _: &$spec| -> Result<()> {
            Ok(())
        });
    };
    ($spec:ty, $check:expr) => {
        /// Solve into `out` with the work memory of `scratch` (no heap allocation once warm).
        fn solve_into(
            &self,
            db: &SpeciesDb,
            inlets: &[&Stream],
            guess: Option<&[f64]>,
            scratch: &mut UnitScratch,
            out: &mut UnitResult,
        ) -> Result<()> {
            self.run(db, &self.spec, None, inlets, guess, scratch, out)
        }

        /// Solve with changed numbers: checked as a build checks them, solved on the stage
        /// built.
        fn solve_spec_into(
            &self,
            db: &SpeciesDb,
            name: &str,
            spec: &$spec,
            inlets: &[&Stream],
            guess: Option<&[f64]>,
            scratch: &mut UnitScratch,
            out: &mut UnitResult,
        ) -> Result<()> {
            ($check)(name, spec)?;
            let approaches = self.core.check(&spec.approaches, spec.pressure_drop_pa)?;
            self.run(db, spec, Some(&approaches), inlets, guess, scratch, out)
        }
    };
}
pub(crate) use reactor_solve_entries;
