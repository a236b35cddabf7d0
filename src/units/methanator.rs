//! Methanator: the last CO and CO2 turned back to methane over nickel. `reforming` runs backward
//! (CO + 3 H2 = CH4 + H2O; approach taken in that, its exothermic, direction) and `shift` in the
//! direction the solve finds, in one adiabatic equilibrium stage.
//!
//! Beside the computed temperature rise the rule of thumb is reported (common practice: about
//! 74 K per 1 % CO and 60 K per 1 % CO2 converted, mole % of the inlet).
//!
//! At zero approach the outlet is at equilibrium, which at 300-350 degC leaves far below 1 ppm
//! of CO + CO2; a real bed, limited by its kinetics, leaves a few ppm. Use the approach
//! temperatures to represent a bed short of equilibrium.
//!
//! Operating limits ([`super::limits`], common practice, each settable per unit): inlet
//! 260-330 degC, outlet at most 450 degC (`catalyst-temperature`), inlet at least 15 K above
//! its water dew point (`dew-point`).

use super::common::{dew_point_k, dry_fraction, figure, reactor_inlet};
use super::limits::{self, key_doc, LimitKey, OperatingLimits};
use super::reactor::{read_gas_model, ReactorCore, GAS_MODEL_KEY};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult, Warning};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::Result;
use crate::thermo::{GasModel, SpeciesDb};

/// The reactions of a methanator's equilibrium stage, in stage order.
pub const METHANATOR_REACTIONS: [&str; 2] = ["reforming", "shift"];

/// Rule-of-thumb rise per 1 mol % CO converted, K (common practice).
pub const RISE_PER_PERCENT_CO_K: f64 = 74.0;
/// Rule-of-thumb rise per 1 mol % CO2 converted, K (common practice).
pub const RISE_PER_PERCENT_CO2_K: f64 = 60.0;
/// Temperature rise above which the methanator warns, K (common practice: a normal rise is
/// 20-30 K; a large one points to CO or CO2 slipping from upstream).
pub const LARGE_RISE_K: f64 = 50.0;

/// Specification of an adiabatic methanator.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct MethanatorSpec {
    /// Pressure drop across the bed, Pa.
    pub pressure_drop_pa: f64,
    /// Approach temperature by reaction name (`reforming`, `shift`), K; unlisted ones are zero.
    pub approaches: Vec<(String, f64)>,
    /// Operating limits set in the file (`None`: the defaults of [`super::limits`]).
    pub limits: OperatingLimits,
    /// Gas model of the equilibrium (`None`: the flowsheet's).
    pub gas_model: Option<GasModel>,
}

/// A methanator ready to solve.
#[derive(Debug, Clone)]
pub struct Methanator {
    core: ReactorCore,
    spec: MethanatorSpec,
}

/// The `methanator` unit type.
pub static TYPE: UnitType = UnitType {
    name: "methanator",
    summary: "Adiabatic methanator: the last CO and CO2 turned back to methane (reforming \
              backward, shift either way) at equilibrium with their approach temperatures; the \
              temperature rise is set beside the rule of thumb.",
    inlets: Ports::exactly(1, "purified gas"),
    outlets: Ports::exactly(1, "methanated gas"),
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
            value: ValueKind::PerReaction(&METHANATOR_REACTIONS),
            default: Some("0 K for each reaction"),
            meaning: "approach temperature per reaction; a positive one leaves the outlet short of equilibrium (more CO and CO2)",
        },
        key_doc(LimitKey::InletMin, "260 degC"),
        key_doc(LimitKey::InletMax, "330 degC"),
        key_doc(LimitKey::OutletMax, "450 degC"),
        key_doc(LimitKey::DewPointMargin, "15 K"),
        GAS_MODEL_KEY,
    ],
    example: "- name: methanator\n  type: methanator\n  from: methanator-feed\n  to: \
              methanated-gas\n  approach: {reforming: 20 K}",
    build: build::<Methanator>,
};

impl UnitKind for Methanator {
    type Spec = MethanatorSpec;

    fn read(b: &mut UnitBuilder<'_, '_, MethanatorSpec>) -> Result<MethanatorSpec> {
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&METHANATOR_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let keys = super::shift::LIMIT_KEYS;
        let limits = limits::read(b, &keys, |s: &mut MethanatorSpec| &mut s.limits)?;
        let gas_model = read_gas_model(b)?;
        Ok(MethanatorSpec {
            pressure_drop_pa: drop,
            approaches,
            limits,
            gas_model,
        })
    }

    /// Check the spec and build the equilibrium stage.
    fn new(db: &SpeciesDb, name: &str, spec: &MethanatorSpec) -> Result<Methanator> {
        spec.limits.check(name)?;
        Ok(Methanator {
            core: ReactorCore::new(
                db,
                name,
                &METHANATOR_REACTIONS,
                &spec.approaches,
                &[Direction::Backward, Direction::Auto],
                spec.pressure_drop_pa,
            )?
            .with_gas_model(spec.gas_model),
            spec: spec.clone(),
        })
    }

    fn spec(&self) -> &MethanatorSpec {
        &self.spec
    }

    super::reactor::reactor_solve_entries!(MethanatorSpec, |name: &str, spec: &MethanatorSpec| {
        spec.limits.check(name)
    });
}

impl Methanator {
    /// Solve with the numbers of `spec` and the approaches `approaches_k` (stage order; `None`:
    /// those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    fn run(
        &self,
        db: &SpeciesDb,
        spec: &MethanatorSpec,
        approaches_k: Option<&[f64]>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let (name, key) = (&self.core.name, &self.core.key);
        let (inlet, p) = reactor_inlet(db, name, "methanator", inlets, spec.pressure_drop_pa)?;
        let t_in = inlet.temperature_k;
        self.core.solve_stage(
            db,
            &inlet.flows,
            t_in,
            p,
            EnergyMode::Adiabatic,
            guess,
            approaches_k,
            &scratch.options,
            &mut scratch.stage,
            out,
        )?;
        let outlet = &out.outlets[0];
        let out_flows = &outlet.flows;
        let total_out: f64 = out_flows.iter().sum();
        let oxides = out_flows[key.co] + out_flows[key.co2];
        let rise = outlet.temperature_k - t_in;
        let n_in = inlet.total();
        let (d_co, d_co2) = if n_in > 0.0 {
            (
                100.0 * (inlet.flows[key.co] - out_flows[key.co]) / n_in,
                100.0 * (inlet.flows[key.co2] - out_flows[key.co2]) / n_in,
            )
        } else {
            (0.0, 0.0)
        };
        let rule = RISE_PER_PERCENT_CO_K * d_co + RISE_PER_PERCENT_CO2_K * d_co2;
        let figures = &mut out.figures;
        figures.push(figure(
            "co-co2-wet",
            "CO + CO2 at the outlet, wet",
            if total_out > 0.0 {
                oxides / total_out
            } else {
                0.0
            },
            FigureKind::Ppm,
        ));
        figures.push(figure(
            "co-co2-dry",
            "CO + CO2 at the outlet, dry",
            dry_fraction(key, out_flows, key.co) + dry_fraction(key, out_flows, key.co2),
            FigureKind::Ppm,
        ));
        figures.push(figure(
            "temperature-rise",
            "temperature rise",
            rise,
            FigureKind::TemperatureDifference,
        ));
        figures.push(figure(
            "temperature-rise-rule-of-thumb",
            "temperature rise by rule of thumb (74 K per % CO, 60 K per % CO2 converted; \
             common practice)",
            rule,
            FigureKind::TemperatureDifference,
        ));
        if rise > LARGE_RISE_K {
            out.warnings.push(
                Warning::new(
                    "methanator-temperature-rise",
                    "temperature rise {value} is above {limit} (common practice: 20-30 K is \
                     normal; check for CO or CO2 slipping from upstream, and the bed's design \
                     temperature)",
                )
                .value(rise, FigureKind::TemperatureDifference)
                .limit(LARGE_RISE_K)
                .for_unit(name.as_str()),
            );
        }
        let dew = dew_point_k(key, &inlet.flows, inlet.pressure_pa);
        limits::catalyst_warnings(
            name,
            &spec.limits,
            (
                limits::METHANATOR_INLET_MIN_K,
                limits::METHANATOR_INLET_MAX_K,
                limits::METHANATOR_OUTLET_MAX_K,
            ),
            "a methanator",
            t_in,
            t_in + rise,
            dew,
            &mut out.warnings,
        );
        self.core
            .finish(db, &inlet.flows, |_| false, approaches_k, out);
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, equilibrium_gap, fig, gas};

    /// A gas after CO2 removal (invented demo composition): 0.3 % CO, 0.1 % CO2, mol/s.
    fn feed(db: &SpeciesDb, co: f64, co2: f64) -> Stream {
        let pairs = [
            ("H2", 0.975 - co - co2),
            ("CH4", 0.012),
            ("N2", 0.003),
            ("H2O", 0.01),
            ("CO", co),
            ("CO2", co2),
        ];
        gas(db, &pairs, 573.15, 25e5)
    }

    #[test]
    fn methanator_leaves_under_10_ppm_with_the_rule_of_thumb_rise() {
        // Common practice: methanator at about 280-320 degC leaves CO + CO2 below 10 ppm, with a
        // rise of about 74 K per % CO and 60 K per % CO2 converted.
        let db = db();
        let inlet = feed(&db, 0.003, 0.001);
        let m = Methanator::new(&db, "meth", &MethanatorSpec::default()).unwrap();
        let r = m.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        let ppm = fig(&r, "co-co2-dry") * 1e6;
        assert!(ppm < 10.0, "{ppm} ppm");
        let rise = fig(&r, "temperature-rise");
        let rule = fig(&r, "temperature-rise-rule-of-thumb");
        assert!((rule - 28.2).abs() < 0.1, "rule {rule}");
        assert!(
            (rise - rule).abs() < 0.1 * rule,
            "rise {rise} vs rule {rule}"
        );
        assert!(r.warnings.is_empty());
        let eq = r.equilibrium.as_ref().unwrap();
        assert!(eq.extents[0] < 0.0);
        let out = &r.outlets[0];
        for reaction in ["reforming", "shift"] {
            let gap = equilibrium_gap(&db, reaction, out, out.temperature_k);
            assert!(gap.abs() < 1e-8, "{reaction}: {gap:e}");
        }
        // With an approach in the exothermic direction the equilibrium is taken hotter.
        let spec = MethanatorSpec {
            pressure_drop_pa: 0.2e5,
            approaches: vec![("reforming".into(), 20.0)],
            limits: OperatingLimits::default(),
            gas_model: None,
        };
        let m20 = Methanator::new(&db, "meth", &spec).unwrap();
        let r20 = m20.solve(&db, &[&inlet], Some(&eq.extents)).unwrap();
        assert_balances(&db, &[&inlet], &r20);
        let e20 = r20.equilibrium.as_ref().unwrap();
        assert!(
            (e20.equilibrium_temperatures_k[0] - r20.outlets[0].temperature_k - 20.0).abs() < 1e-9
        );
        assert!(fig(&r20, "co-co2-dry") > fig(&r, "co-co2-dry"));
    }

    #[test]
    fn co2_breakthrough_gives_a_large_rise_warning() {
        let db = db();
        let inlet = feed(&db, 0.004, 0.01);
        let r = Methanator::new(&db, "meth", &MethanatorSpec::default())
            .unwrap()
            .solve(&db, &[&inlet], None)
            .unwrap();
        assert_balances(&db, &[&inlet], &r);
        assert!(fig(&r, "temperature-rise") > LARGE_RISE_K);
        let w = &r.warnings[0];
        assert_eq!(w.code, "methanator-temperature-rise", "{:?}", r.warnings);
        assert_eq!(w.limit, Some(LARGE_RISE_K));
        assert_eq!(w.value, Some(fig(&r, "temperature-rise")));
    }
}
