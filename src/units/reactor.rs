//! The core the four equilibrium reactors (reformer, pre-reformer, shift converter, methanator)
//! share: their name, the key species, the equilibrium stage of their reactions with its
//! approach temperatures, and the solve steps around it (the stage solved into the unit's result
//! with no heap allocation once warm, the outlet written from it, the warnings every reactor
//! gives: carbon-bearing species it cannot convert, reactions that cannot proceed, approach
//! temperatures below zero).
//!
//! The gas model: each reactor takes the flowsheet's (`gas-model:` at the top of the file, kept
//! in the solver options) unless its own `gas-model` key says otherwise ([`GAS_MODEL_KEY`],
//! [`read_gas_model`], [`ReactorCore::with_gas_model`]). A reactor solved as a Peng-Robinson
//! gas is solved once more as an ideal gas, from the same inlet and with the same approaches,
//! and reports the difference as figures (Peng-Robinson less ideal):
//! `ideal-gas-co-slip-change` and `ideal-gas-methane-slip-change`, relative changes of the dry
//! CO and methane mole fractions at the outlet (+0.055 = 5.5 % more than the ideal gas gives;
//! methane only when the stage converts it); `ideal-gas-outlet-temperature-change` (K) for an
//! adiabatic or fixed-duty stage and `ideal-gas-duty-change` (W) for a fixed outlet
//! temperature. With Peng-Robinson the duty includes the residual enthalpies of inlet and
//! outlet ([`ReactorCore::residual_enthalpy_change`]). A unit whose fixed duty holds residual
//! enthalpies of its own (the autothermal reformer, [`super::autothermal`]) gives the real-gas
//! and the ideal-gas energy modes apart ([`ReactorCore::solve_stage_modes`]).
use super::chemistry::unconverted_carbon_warnings;
use super::common::{
    build_stage, check_pressure_drop, frozen_warnings, resolve_approaches, run_stage_into,
    stage_approaches, Key,
};
use super::common::{dry_fraction, figure};
use super::unit::{KeyDoc, UnitBuilder, ValueKind};
use super::{FigureKind, StreamPhase, UnitResult};
use crate::equilibrium::{
    Direction, EnergyMode, EquilibriumStage, SolveSettings, SolverOptions, StageInlet, StageResult,
    StageWorkspace,
};
use crate::error::Result;
use crate::thermo::{GasModel, SpeciesDb};

/// The `gas-model` key of the equilibrium reactors.
pub(crate) const GAS_MODEL_KEY: KeyDoc = KeyDoc {
    key: "gas-model",
    value: ValueKind::Choice(&GasModel::NAMES),
    default: Some("the flowsheet's gas-model (ideal unless set)"),
    meaning: "gas model of the equilibrium: ideal, or peng-robinson (fugacity coefficients and \
              residual enthalpies; figures then give the change against the ideal gas)",
};

/// Read a reactor's `gas-model` key (`None` when left out: the flowsheet's model).
pub(crate) fn read_gas_model<S: 'static>(
    b: &mut UnitBuilder<'_, '_, S>,
) -> Result<Option<GasModel>> {
    Ok(b.choice("gas-model", &GasModel::NAMES)?.map(|i| match i {
        0 => GasModel::Ideal,
        _ => GasModel::PengRobinson,
    }))
}

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
    /// Its own gas model (`None`: the flowsheet's, from the solver options).
    gas_model: Option<GasModel>,
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
            gas_model: None,
        })
    }

    /// The same core with its own gas model (`None`: the flowsheet's).
    pub fn with_gas_model(mut self, gas_model: Option<GasModel>) -> ReactorCore {
        self.gas_model = gas_model;
        self
    }

    /// The gas model this core solves with under `options`: its own, else the flowsheet's.
    pub fn gas_model(&self, options: &SolverOptions) -> GasModel {
        self.gas_model.unwrap_or(options.gas_model)
    }

    /// The residual enthalpy of the outlet less that of the stage's inlet (W) when the stage
    /// was solved as a Peng-Robinson gas, `None` for an ideal gas: a unit adds it to its
    /// ideal-gas enthalpy difference to get its duty, and the flowsheet's energy balance adds it
    /// to the ideal-gas stream enthalpies. The stage's inlet is the unit's own at the outlet
    /// pressure (and, in a reformer or pre-reformer, with its higher hydrocarbons converted):
    /// the pressure drop and that conversion are taken as an ideal gas.
    pub fn residual_enthalpy_change(out: &UnitResult) -> Option<f64> {
        out.equilibrium
            .as_ref()
            .filter(|e| !e.gas_model.is_ideal())
            .map(|e| e.residual_enthalpy_change_w)
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
        let modes = [mode, mode];
        self.solve_stage_modes(
            db,
            flows,
            inlet_temperature_k,
            pressure_pa,
            modes,
            guess,
            approaches_k,
            options,
            ws,
            out,
        )
    }

    /// [`ReactorCore::solve_stage`] with the energy mode of a real-gas solve and that of the
    /// ideal-gas solve of the `ideal-gas-*` figures given apart (`[real, ideal]`; for a unit
    /// whose fixed duty holds residual enthalpies of its own, which the ideal gas has not). For
    /// an ideal-gas solve only the second is used.
    #[allow(clippy::too_many_arguments)]
    pub fn solve_stage_modes(
        &self,
        db: &SpeciesDb,
        flows: &[f64],
        inlet_temperature_k: f64,
        pressure_pa: f64,
        [real_mode, ideal_mode]: [EnergyMode; 2],
        guess: Option<&[f64]>,
        approaches_k: Option<&[f64]>,
        options: &SolverOptions,
        ws: &mut StageWorkspace,
        out: &mut UnitResult,
    ) -> Result<()> {
        out.reset(1, db.len());
        let mut own = *options;
        if let Some(model) = self.gas_model {
            own.gas_model = model;
        }
        let options = &own;
        let mode = if options.gas_model.is_ideal() {
            ideal_mode
        } else {
            real_mode
        };
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
        if options.gas_model != GasModel::Ideal {
            self.ideal_gas_figures(db, inlet, ideal_mode, approaches_k, options, out)?;
        }
        Ok(())
    }

    /// Solve the stage once more as an ideal gas and push the changes of the real-gas answer
    /// against it as figures (see the module docs).
    fn ideal_gas_figures(
        &self,
        db: &SpeciesDb,
        inlet: StageInlet<'_>,
        mode: EnergyMode,
        approaches_k: Option<&[f64]>,
        options: &SolverOptions,
        out: &mut UnitResult,
    ) -> Result<()> {
        thread_local! {
            static IDEAL: std::cell::RefCell<(StageWorkspace, StageResult)> =
                std::cell::RefCell::new(Default::default());
        }
        let Some(real) = &out.equilibrium else {
            return Ok(());
        };
        let settings = SolveSettings {
            guess: Some(&real.extents),
            approaches_k,
            options: SolverOptions {
                gas_model: GasModel::Ideal,
                ..*options
            },
        };
        let compute = |ws: &mut StageWorkspace, ideal: &mut StageResult| -> Result<[f64; 4]> {
            run_stage_into(
                &self.stage,
                db,
                &self.name,
                inlet,
                mode,
                settings.guess,
                settings.approaches_k,
                &settings.options,
                ws,
                ideal,
            )?;
            let key = &self.key;
            let relative = |i: usize| {
                let base = dry_fraction(key, &ideal.outlet_flows, i);
                if base > 0.0 {
                    dry_fraction(key, &real.outlet_flows, i) / base - 1.0
                } else {
                    f64::NAN
                }
            };
            Ok([
                relative(key.co),
                relative(key.ch4),
                real.outlet_temperature_k - ideal.outlet_temperature_k,
                real.duty_w - ideal.duty_w,
            ])
        };
        let [co, ch4, dt, duty] = IDEAL.with(|cell| match cell.try_borrow_mut() {
            Ok(mut pair) => {
                let (ws, ideal) = &mut *pair;
                compute(ws, ideal)
            }
            Err(_) => compute(&mut StageWorkspace::new(), &mut StageResult::default()),
        })?;
        let converts_methane = self
            .stage
            .reactions()
            .iter()
            .any(|r| r.reaction.coefficient(self.key.ch4) != 0.0);
        let figures = &mut out.figures;
        if co.is_finite() {
            figures.push(figure(
                "ideal-gas-co-slip-change",
                "CO slip vs ideal gas",
                co,
                FigureKind::Fraction,
            ));
        }
        if converts_methane && ch4.is_finite() {
            figures.push(figure(
                "ideal-gas-methane-slip-change",
                "methane slip vs ideal gas",
                ch4,
                FigureKind::Fraction,
            ));
        }
        match mode {
            EnergyMode::FixedTemperature { .. } => figures.push(figure(
                "ideal-gas-duty-change",
                "duty vs ideal gas",
                duty,
                FigureKind::Power,
            )),
            _ => figures.push(figure(
                "ideal-gas-outlet-temperature-change",
                "outlet temperature vs ideal gas",
                dt,
                FigureKind::TemperatureDifference,
            )),
        }
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
