//! Steam reformer (primary reformer): the higher hydrocarbons are reformed completely, then
//! `reforming` (CH4 + H2O = CO + 3 H2, approach in its forward direction) and `shift`
//! (CO + H2O = CO2 + H2, direction decided by the solve) come to equilibrium, each at its
//! approach temperature, at the given outlet temperature and the outlet pressure. The duty is
//! H_out - H_in of the original inlet (formation enthalpies included), so it holds the heat of
//! the higher-hydrocarbon reforming as well (the stage's own result, [`UnitResult::equilibrium`],
//! has its duty on the converted inlet).
//!
//! Carbon formation potential, by the principle of equilibrated gas: the carbon activity by
//! methane cracking and by Boudouard ([`crate::reaction::carbon_activity`]) of the gas brought
//! to reforming and shift equilibrium (the unit's own stage at zero approach) at 21 temperatures
//! from the inlet's to the outlet's, and of the actual outlet gas; a value above one anywhere
//! warns that carbon formation is thermodynamically possible there (a screening check: carbon
//! risk is usually highest part-way down the tubes, where the path check looks). The figure
//! `carbon-margin` is the smallest 1 - a found, `carbon-margin-temperature` where. The activity
//! of the actual inlet gas is a figure as well (absent when the inlet holds no hydrogen, where
//! it is unbounded, or no methane); it raises no warning by itself.
//!
//! Operating limits ([`super::limits`], common practice, settable per unit): outlet within
//! 700-950 degC and not below the inlet (`reformer-temperature`), inlet steam-to-carbon ratio
//! at least 2.5 (`steam-to-carbon`).

use super::chemistry::{CarbonCheck, HigherHydrocarbons};
use super::common::{check_temperature, dry_fraction, figure, reactor_inlet, spec_error};
use super::limits::{self, key_doc, LimitKey, OperatingLimits, Place, Window, WindowCode};
use super::reactor::{read_gas_model, ReactorCore, GAS_MODEL_KEY};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult, Warning};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::{Result, ResultExt};
use crate::thermo::{mixture, GasModel, SpeciesDb};

/// The reactions of a reformer's equilibrium stage, in stage order.
pub const REFORMER_REACTIONS: [&str; 2] = ["reforming", "shift"];

/// Specification of a steam reformer.
#[derive(Debug, Clone, PartialEq)]
pub struct ReformerSpec {
    /// Outlet temperature, K.
    pub outlet_temperature_k: f64,
    /// Pressure drop across the tubes, Pa.
    pub pressure_drop_pa: f64,
    /// Approach temperature by reaction name (`reforming`, `shift`), K; unlisted ones are zero.
    pub approaches: Vec<(String, f64)>,
    /// Operating limits set in the file (`None`: the defaults of [`super::limits`]).
    pub limits: OperatingLimits,
    /// Gas model of the equilibrium (`None`: the flowsheet's).
    pub gas_model: Option<GasModel>,
}

/// The limit keys of a reformer.
const LIMIT_KEYS: [LimitKey; 4] = [
    LimitKey::OutletMin,
    LimitKey::OutletMax,
    LimitKey::MinSteamToCarbon,
    LimitKey::CarbonPathPoints,
];

/// A reformer ready to solve (its equilibrium stage built once).
#[derive(Debug, Clone)]
pub struct Reformer {
    core: ReactorCore,
    spec: ReformerSpec,
    higher: HigherHydrocarbons,
    carbon: CarbonCheck,
}

/// The `reformer` unit type.
pub static TYPE: UnitType = UnitType {
    name: "reformer",
    summary: "Steam reformer at a given outlet temperature: the higher hydrocarbons and \
              oxygenates reformed completely, then reforming and shift at equilibrium with their \
              approach temperatures; the duty follows.",
    inlets: Ports::exactly(1, "process gas with steam"),
    outlets: Ports::exactly(1, "reformed gas"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "outlet-temperature",
            value: ValueKind::Temperature,
            default: None,
            meaning: "outlet (catalyst exit) temperature",
        },
    KeyDoc {
        key: "pressure-drop",
        value: ValueKind::PressureDifference,
        default: Some("0 bar"),
        meaning: "pressure lost across the unit",
    },
        KeyDoc {
            key: "approach",
            value: ValueKind::PerReaction(&REFORMER_REACTIONS),
            default: Some("0 K for each reaction"),
            meaning: "approach temperature per reaction; a positive one leaves the outlet short of equilibrium",
        },
        key_doc(LimitKey::OutletMin, "700 degC"),
        key_doc(LimitKey::OutletMax, "950 degC"),
        key_doc(LimitKey::MinSteamToCarbon, "2.5"),
        key_doc(LimitKey::CarbonPathPoints, "21"),
        GAS_MODEL_KEY,
    ],
    example: "- name: reformer\n  type: reformer\n  from: reformer-feed\n  to: reformed-gas\n  \
              outlet-temperature: 865 degC\n  pressure-drop: 3 bar\n  approach: {reforming: \
              10 K, shift: 0 K}",
    build: build::<Reformer>,
};

impl UnitKind for Reformer {
    type Spec = ReformerSpec;

    fn read(b: &mut UnitBuilder<'_, '_, ReformerSpec>) -> Result<ReformerSpec> {
        let t = b.required(
            "outlet-temperature",
            ValueKind::Temperature,
            "865 degC",
            |s, v| s.outlet_temperature_k = v,
        )?;
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&REFORMER_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let limits = limits::read(b, &LIMIT_KEYS, |s: &mut ReformerSpec| &mut s.limits)?;
        let gas_model = read_gas_model(b)?;
        Ok(ReformerSpec {
            outlet_temperature_k: t,
            pressure_drop_pa: drop,
            approaches,
            limits,
            gas_model,
        })
    }

    /// Check the spec and build the equilibrium stage.
    fn new(db: &SpeciesDb, name: &str, spec: &ReformerSpec) -> Result<Reformer> {
        check_numbers(name, spec)?;
        Ok(Reformer {
            core: ReactorCore::new(
                db,
                name,
                &REFORMER_REACTIONS,
                &spec.approaches,
                &[Direction::Forward, Direction::Auto],
                spec.pressure_drop_pa,
            )?
            .with_gas_model(spec.gas_model),
            spec: spec.clone(),
            higher: HigherHydrocarbons::new(db)?,
            carbon: CarbonCheck::new(db)?,
        })
    }

    fn spec(&self) -> &ReformerSpec {
        &self.spec
    }

    super::reactor::reactor_solve_entries!(ReformerSpec, check_numbers);
}

impl Reformer {
    /// Solve with the numbers of `spec` and the approaches `approaches_k` (stage order; `None`:
    /// those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    fn run(
        &self,
        db: &SpeciesDb,
        spec: &ReformerSpec,
        approaches_k: Option<&[f64]>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let (name, key) = (&self.core.name, &self.core.key);
        let (inlet, p) = reactor_inlet(db, name, "reformer", inlets, spec.pressure_drop_pa)?;
        let t_out = spec.outlet_temperature_k;
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
        check_temperature(db, name, "outlet-temperature", converted, t_out)?;
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let mode = EnergyMode::FixedTemperature {
            temperature_k: t_out,
        };
        let t_in = inlet.temperature_k;
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
        let out_flows = &outlet.flows;
        out.duty_w = match ReactorCore::residual_enthalpy_change(out) {
            // As a real gas: the residual enthalpies of the outlet and of the stage's inlet.
            Some(r) => mixture::enthalpy(db, out_flows, t_out)? - h_in + r,
            None => mixture::enthalpy(db, out_flows, t_out)? - h_in,
        };
        let figures = &mut out.figures;
        let ch4_in = inlet.flows[key.ch4];
        if ch4_in > 0.0 {
            figures.push(figure(
                "methane-conversion",
                "methane conversion",
                1.0 - out_flows[key.ch4] / ch4_in,
                FigureKind::Fraction,
            ));
        }
        for (k, label, i) in [
            ("methane-slip-dry", "methane slip, dry", key.ch4),
            ("co-dry", "CO, dry", key.co),
            ("co2-dry", "CO2, dry", key.co2),
            ("h2-dry", "H2, dry", key.h2),
        ] {
            figures.push(figure(
                k,
                label,
                dry_fraction(key, out_flows, i),
                FigureKind::Fraction,
            ));
        }
        let warnings = &mut out.warnings;
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
            limits::steam_to_carbon_warning(name, sc, min, warnings);
        }
        let window = Window {
            min_k: Some(
                spec.limits
                    .outlet_min_k
                    .unwrap_or(limits::REFORMER_OUTLET_MIN_K),
            ),
            max_k: Some(
                spec.limits
                    .outlet_max_k
                    .unwrap_or(limits::REFORMER_OUTLET_MAX_K),
            ),
        };
        let code = WindowCode::Reformer;
        limits::window_warnings(
            name,
            code,
            Place::Outlet,
            t_out,
            window,
            "a reformer",
            warnings,
        );
        if t_out < t_in {
            warnings.push(
                Warning::new(
                    "reformer-temperature",
                    "outlet {value} is below the inlet {limit}: a fired reformer heats its gas; \
                     check the outlet temperature and the feed preheat",
                )
                .value(t_out, FigureKind::Temperature)
                .limit(t_in)
                .for_unit(name.as_str()),
            );
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

/// The checks of a reformer's numbers besides the approaches and pressure drop.
fn check_numbers(name: &str, spec: &ReformerSpec) -> Result<()> {
    spec.limits.check(name)?;
    let t = spec.outlet_temperature_k;
    if !(t.is_finite() && t > 0.0) {
        return Err(spec_error(
            name,
            "outlet-temperature",
            format!("{t} K must be a positive absolute temperature"),
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{
        assert_balances, db, equilibrium_gap, fig, gas, reformer_feed,
    };

    fn spec(t_out: f64, approaches: &[(&str, f64)]) -> ReformerSpec {
        ReformerSpec {
            outlet_temperature_k: t_out,
            pressure_drop_pa: 2.0e5,
            approaches: approaches
                .iter()
                .map(|(n, a)| (n.to_string(), *a))
                .collect(),
            limits: OperatingLimits::default(),
            gas_model: None,
        }
    }

    #[test]
    fn natural_gas_reformer_at_865_degc_leaves_3_to_7_percent_methane_dry() {
        // Common practice: 850-900 degC exit, 20-30 bar, S/C 2.5-3.5 gives roughly 3-7 %
        // methane on a dry basis; the reformer is strongly endothermic.
        let db = db();
        let feed = reformer_feed(&db, 893.15, 28e5);
        let r = Reformer::new(&db, "primary", &spec(1138.15, &[]))
            .unwrap()
            .solve(&db, &[&feed], None)
            .unwrap();
        assert_balances(&db, &[&feed], &r);
        let slip = fig(&r, "methane-slip-dry");
        assert!((0.03..0.07).contains(&slip), "methane slip {slip}");
        assert!((fig(&r, "steam-to-carbon") - 3.0).abs() < 1e-12);
        assert!(r.duty_w > 0.0);
        // Recomputed from the outlet: reforming at 865 - 0 K and shift at 865 degC (no approach).
        for reaction in ["reforming", "shift"] {
            let gap = equilibrium_gap(&db, reaction, &r.outlets[0], 1138.15);
            assert!(gap.abs() < 1e-9, "{reaction}: {gap:e}");
        }
        // Higher hydrocarbons are gone.
        assert_eq!(r.outlets[0].flows[db.index_of("C2H6").unwrap()], 0.0);
        // In a gas at reforming and shift equilibrium both carbon routes agree (design notes),
        // and at S/C 3 and 865 degC both are below one.
        let a1 = fig(&r, "carbon-activity-methane-cracking");
        let a2 = fig(&r, "carbon-activity-boudouard");
        assert!((a1 / a2 - 1.0).abs() < 1e-6 && a1 < 1.0, "{a1} {a2}");
        assert!(r.warnings.is_empty(), "{:?}", r.warnings);
    }

    #[test]
    fn a_methane_approach_leaves_more_methane_and_warm_start_agrees() {
        let db = db();
        let feed = reformer_feed(&db, 893.15, 28e5);
        let close = Reformer::new(&db, "r", &spec(1138.15, &[])).unwrap();
        let r0 = close.solve(&db, &[&feed], None).unwrap();
        let apart = Reformer::new(&db, "r", &spec(1138.15, &[("reforming", 10.0)])).unwrap();
        let r1 = apart.solve(&db, &[&feed], None).unwrap();
        assert_balances(&db, &[&feed], &r1);
        assert!(fig(&r1, "methane-slip-dry") > fig(&r0, "methane-slip-dry"));
        let eq = r1.equilibrium.as_ref().unwrap();
        assert!((eq.equilibrium_temperatures_k[0] - 1128.15).abs() < 1e-9);
        let guess = eq.extents.clone();
        let r2 = apart.solve(&db, &[&feed], Some(&guess)).unwrap();
        for (a, b) in r2.outlets[0].flows.iter().zip(&r1.outlets[0].flows) {
            assert!((a - b).abs() <= 1e-10 * b.abs().max(1e-12));
        }
    }

    #[test]
    fn low_steam_warns_of_carbon_and_bad_specs_are_refused() {
        let db = db();
        let feed = gas(&db, &[("CH4", 1.0), ("H2O", 0.6)], 873.15, 25e5);
        let r = Reformer::new(&db, "r", &spec(1000.0, &[]))
            .unwrap()
            .solve(&db, &[&feed], None)
            .unwrap();
        assert_balances(&db, &[&feed], &r);
        let carbon = r.warnings.iter().find(|w| w.code == "carbon-formation");
        assert!(
            carbon.is_some_and(|w| w.value.unwrap() > 1.0 && w.limit == Some(1.0)),
            "{:?}",
            r.warnings
        );
        assert!(Reformer::new(&db, "r", &spec(1100.0, &[("methanation", 5.0)])).is_err());
        let hot = Reformer::new(&db, "r", &spec(3500.0, &[])).unwrap();
        let e = hot.solve(&db, &[&feed], None).unwrap_err().to_string();
        assert!(e.contains("unit 'r'") && e.contains("data range"), "{e}");
        let two = Reformer::new(&db, "r", &spec(1100.0, &[])).unwrap();
        assert!(two.solve(&db, &[&feed, &feed], None).is_err());
    }

    #[test]
    fn a_reformer_without_steam_says_nothing_reacted_and_carbon_is_possible() {
        // Common practice: methane with no steam cannot be reformed, and methane cracking can
        // deposit carbon; both must be said, not hidden behind a converged result.
        let db = db();
        let feed = gas(&db, &[("CH4", 1.0)], 773.15, 20e5);
        let r = Reformer::new(&db, "dry", &spec(1123.15, &[]))
            .unwrap()
            .solve(&db, &[&feed], None)
            .unwrap();
        assert_balances(&db, &[&feed], &r);
        let text: Vec<String> = r.warnings.iter().map(|w| w.to_string()).collect();
        let text = text.join("\n");
        assert!(text.contains("reaction reforming cannot proceed"), "{text}");
        assert!(text.contains("carbon activity is unbounded"), "{text}");
        assert_eq!(r.equilibrium.as_ref().unwrap().frozen, vec![true, true]);
    }
}
