//! Adiabatic pre-reformer: the higher hydrocarbons are reformed completely, then `reforming`
//! (which may run backward, toward methane; direction decided by the solve) and `shift` come to
//! equilibrium at their approach temperatures in one adiabatic stage.
//!
//! The energy balance is exact over the whole unit: the complete conversion of the higher
//! hydrocarbons is passed to the equilibrium stage as its inlet at the inlet temperature, with a
//! fixed duty equal to H(original inlet) - H(converted inlet), both at the inlet temperature, so
//! that H_out = H_in overall and the unit's duty is zero. The stage's own result
//! ([`UnitResult::equilibrium`]) therefore shows that internal duty, on the converted basis.
//!
//! Carbon formation potential is checked as in the reformer (see [`super::reformer`]): the gas
//! equilibrated by the unit's own stage at 21 temperatures from the inlet's to the outlet's,
//! the actual outlet gas, and the actual inlet gas as a figure. The inlet steam-to-carbon ratio
//! is held against its limit ([`super::limits`], 2.5 by default, `min-steam-to-carbon`).

use super::chemistry::{CarbonCheck, HigherHydrocarbons};
use super::common::{dry_fraction, figure, reactor_inlet};
use super::limits::{self, key_doc, LimitKey, OperatingLimits};
use super::reactor::{read_gas_model, ReactorCore, GAS_MODEL_KEY};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::{Result, ResultExt};
use crate::thermo::{mixture, GasModel, SpeciesDb};

/// The reactions of a pre-reformer's equilibrium stage, in stage order.
pub const PREREFORMER_REACTIONS: [&str; 2] = ["reforming", "shift"];

/// Specification of an adiabatic pre-reformer.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct PrereformerSpec {
    /// Pressure drop across the bed, Pa.
    pub pressure_drop_pa: f64,
    /// Approach temperature by reaction name (`reforming`, `shift`), K; unlisted ones are zero.
    pub approaches: Vec<(String, f64)>,
    /// Operating limits set in the file (`None`: the defaults of [`super::limits`]).
    pub limits: OperatingLimits,
    /// Gas model of the equilibrium (`None`: the flowsheet's).
    pub gas_model: Option<GasModel>,
}

/// A pre-reformer ready to solve.
#[derive(Debug, Clone)]
pub struct Prereformer {
    core: ReactorCore,
    spec: PrereformerSpec,
    higher: HigherHydrocarbons,
    carbon: CarbonCheck,
}

/// The `prereformer` unit type.
pub static TYPE: UnitType = UnitType {
    name: "prereformer",
    summary: "Adiabatic pre-reformer: the higher hydrocarbons and oxygenates reformed \
              completely, then reforming (either way) and shift at equilibrium with their \
              approach temperatures; the outlet temperature follows from the energy balance.",
    inlets: Ports::exactly(1, "process gas with steam"),
    outlets: Ports::exactly(1, "pre-reformed gas"),
    named_ports: None,
    keys: &[
    KeyDoc {
        key: "pressure-drop",
        value: ValueKind::PressureDifference,
        default: Some("0 bar"),
        meaning: "pressure lost across the unit",
    },
        KeyDoc {
            key: "approach",
            value: ValueKind::PerReaction(&PREREFORMER_REACTIONS),
            default: Some("0 K for each reaction"),
            meaning: "approach temperature per reaction; a positive one leaves the outlet short of equilibrium",
        },
        key_doc(LimitKey::MinSteamToCarbon, "2.5"),
        key_doc(LimitKey::CarbonPathPoints, "21"),
        GAS_MODEL_KEY,
    ],
    example: "- name: prereformer\n  type: prereformer\n  from: prereformer-feed\n  to: \
              prereformed-gas\n  approach: {reforming: 0 K, shift: 0 K}",
    build: build::<Prereformer>,
};

impl UnitKind for Prereformer {
    type Spec = PrereformerSpec;

    fn read(b: &mut UnitBuilder<'_, '_, PrereformerSpec>) -> Result<PrereformerSpec> {
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&PREREFORMER_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let limits = limits::read(
            b,
            &[LimitKey::MinSteamToCarbon, LimitKey::CarbonPathPoints],
            |s: &mut PrereformerSpec| &mut s.limits,
        )?;
        let gas_model = read_gas_model(b)?;
        Ok(PrereformerSpec {
            pressure_drop_pa: drop,
            approaches,
            limits,
            gas_model,
        })
    }

    /// Check the spec and build the equilibrium stage.
    fn new(db: &SpeciesDb, name: &str, spec: &PrereformerSpec) -> Result<Prereformer> {
        spec.limits.check(name)?;
        Ok(Prereformer {
            core: ReactorCore::new(
                db,
                name,
                &PREREFORMER_REACTIONS,
                &spec.approaches,
                &[Direction::Auto, Direction::Auto],
                spec.pressure_drop_pa,
            )?
            .with_gas_model(spec.gas_model),
            spec: spec.clone(),
            higher: HigherHydrocarbons::new(db)?,
            carbon: CarbonCheck::new(db)?,
        })
    }

    fn spec(&self) -> &PrereformerSpec {
        &self.spec
    }

    super::reactor::reactor_solve_entries!(
        PrereformerSpec,
        |name: &str, spec: &PrereformerSpec| { spec.limits.check(name) }
    );
}

impl Prereformer {
    /// Solve with the numbers of `spec` and the approaches `approaches_k` (stage order; `None`:
    /// those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    fn run(
        &self,
        db: &SpeciesDb,
        spec: &PrereformerSpec,
        approaches_k: Option<&[f64]>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let (name, key) = (&self.core.name, &self.core.key);
        let (inlet, p) = reactor_inlet(db, name, "prereformer", inlets, spec.pressure_drop_pa)?;
        let t_in = inlet.temperature_k;
        let higher_in = self.higher.amount(&inlet.flows);
        let UnitScratch {
            flows,
            stage: stage_ws,
            options,
            carbon,
            ..
        } = scratch;
        let converted = &mut flows[0];
        converted.clear();
        converted.extend_from_slice(&inlet.flows);
        self.higher.reform(name, key, converted)?;
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let h_converted = mixture::enthalpy(db, converted, t_in)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        // The complete reforming of the C2+ at the inlet temperature is paid for by the duty
        // handed to the stage, so that the whole unit stays adiabatic.
        let mode = EnergyMode::FixedDuty {
            duty_w: h_in - h_converted,
        };
        self.core.solve_stage(
            db,
            converted,
            t_in,
            p,
            mode,
            guess,
            approaches_k,
            options,
            stage_ws,
            out,
        )?;
        let outlet = &out.outlets[0];
        let figures = &mut out.figures;
        figures.push(figure(
            "temperature-change",
            "temperature change",
            outlet.temperature_k - t_in,
            FigureKind::TemperatureDifference,
        ));
        if higher_in > 0.0 {
            figures.push(figure(
                "higher-hydrocarbon-conversion",
                "higher-hydrocarbon conversion",
                1.0 - self.higher.amount(&outlet.flows) / higher_in,
                FigureKind::Fraction,
            ));
        }
        figures.push(figure(
            "methane-dry",
            "methane, dry",
            dry_fraction(key, &outlet.flows, key.ch4),
            FigureKind::Fraction,
        ));
        if let Some(sc) = key.steam_to_carbon(&inlet.flows) {
            figures.push(figure(
                "steam-to-carbon",
                "steam-to-carbon ratio, inlet",
                sc,
                FigureKind::Number,
            ));
            let min = spec
                .limits
                .min_steam_to_carbon
                .unwrap_or(limits::MIN_STEAM_TO_CARBON);
            limits::steam_to_carbon_warning(name, sc, min, &mut out.warnings);
        }
        self.carbon.report(
            db,
            &self.core,
            inlet,
            converted,
            spec.limits.carbon_path_points,
            options,
            carbon,
            out,
        )?;
        self.core.finish(
            db,
            &inlet.flows,
            |i| self.higher.converts(i),
            approaches_k,
            out,
        );
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, equilibrium_gap, fig, reformer_feed};

    #[test]
    fn prereformer_is_adiabatic_and_converts_the_higher_hydrocarbons() {
        // Common practice: a natural-gas pre-reformer fed at 450-500 degC cools by some tens of
        // kelvin (the endothermic reforming of C2+ and some methane outweighs methanation),
        // while a heavy feed (naphtha, butane) heats up (methanation outweighs reforming).
        let db = db();
        let feed = reformer_feed(&db, 763.15, 30e5);
        let pr = Prereformer::new(&db, "pre", &PrereformerSpec::default()).unwrap();
        let r = pr.solve(&db, &[&feed], None).unwrap();
        assert_balances(&db, &[&feed], &r);
        assert!((fig(&r, "higher-hydrocarbon-conversion") - 1.0).abs() < 1e-15);
        let dt = fig(&r, "temperature-change");
        assert!((-80.0..-10.0).contains(&dt), "temperature change {dt}");
        // Recomputed from the outlet: both reactions at equilibrium at the outlet temperature.
        for reaction in ["reforming", "shift"] {
            let out = &r.outlets[0];
            let gap = equilibrium_gap(&db, reaction, out, out.temperature_k);
            assert!(gap.abs() < 1e-9, "{reaction}: {gap:e}");
        }
        // A butane feed at S/C 2 runs reforming backward: methane forms and the bed heats up.
        let rich = crate::units::test_support::gas(
            &db,
            &[("n-C4H10", 1.0), ("H2O", 8.0), ("H2", 0.05)],
            723.15,
            30e5,
        );
        let r = pr.solve(&db, &[&rich], None).unwrap();
        assert_balances(&db, &[&rich], &r);
        assert!(r.outlets[0].flows[db.index_of("CH4").unwrap()] > 1.0);
        assert!(r.equilibrium.as_ref().unwrap().extents[0] < 0.0);
        assert!(fig(&r, "temperature-change") > 0.0);
    }

    #[test]
    fn approaches_and_warm_start() {
        let db = db();
        let feed = reformer_feed(&db, 763.15, 30e5);
        let spec = PrereformerSpec {
            pressure_drop_pa: 0.3e5,
            approaches: vec![("reforming".into(), 10.0), ("shift".into(), 5.0)],
            limits: OperatingLimits::default(),
            gas_model: None,
        };
        let pr = Prereformer::new(&db, "pre", &spec).unwrap();
        let r = pr.solve(&db, &[&feed], None).unwrap();
        assert_balances(&db, &[&feed], &r);
        let g = r.equilibrium.as_ref().unwrap().extents.clone();
        let r2 = pr.solve(&db, &[&feed], Some(&g)).unwrap();
        assert!((r2.outlets[0].temperature_k - r.outlets[0].temperature_k).abs() < 1e-8);
        assert_eq!(r.approaches[0], ("reforming", 10.0));
    }
}
