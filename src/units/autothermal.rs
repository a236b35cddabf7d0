//! Autothermal reformer (also a secondary reformer): process gas with steam and an oxidant
//! (oxygen, enriched air or air) enter together, the oxygen is consumed completely, and the gas
//! leaves at `reforming` (CH4 + H2O = CO + 3 H2, approach in its forward direction) and `shift`
//! (CO + H2O = CO2 + H2, direction decided by the solve) equilibrium, each at its approach
//! temperature. No heat is exchanged: the outlet temperature follows from
//! H_out = H_process_in + H_oxidant_in (formation enthalpies included), and the duty is zero.
//!
//! Method. The inlets are combined, and the oxygen is burnt formally by an element-conserving
//! step: with H2 first (H2 + 1/2 O2 = H2O), then CO (CO + 1/2 O2 = CO2), then CH4
//! (CH4 + 2 O2 = CO2 + 2 H2O), then every other gas of carbon, hydrogen and oxygen in database
//! order (CxHyOz + (x + y/4 - z/2) O2 = x CO2 + y/2 H2O); the higher hydrocarbons left are then
//! reformed completely with steam, as in the other reforming units. Not enough combustibles for
//! the oxygen is an error. The combusted gas holds the inlet's elements without O2, and every
//! composition of CH4, H2O, CO, CO2 and H2 with the same elements differs from it only by
//! extents of reforming and shift (five species, three elements: two independent reactions).
//! The equilibrium stage of those two reactions is then solved with the energy target set to
//! the total inlet enthalpy: the combusted gas enters the stage at the process-gas inlet
//! temperature with a fixed duty H_inlets - H_combusted(T_process) (the stage's own result,
//! [`UnitResult::equilibrium`], shows that internal duty). At zero approach the outlet is the
//! one state of the ideal gas at the inlet's elements, enthalpy and pressure where both
//! reactions are at equilibrium (the stage's convex problem has one root), so the order of the
//! formal burning cannot change it: any order gives the same final equilibrium. With approaches,
//! each reaction takes its constant at T - s dT as in every reactor, the extents being measured
//! from the combusted composition (the direction of `shift` is decided from there). Oxygen
//! never reaches the outlet (it is not a member of the stage, and its inlet flow is zero after
//! the burning step; the solve checks it). The thermodynamic answer is that of a gas which has
//! reached equilibrium; the flame, soot in the burner and the catalyst bed's own path are not
//! modelled.
//!
//! Pressure: the lowest inlet pressure less `pressure-drop`.
//!
//! Gas model: the flowsheet's `gas-model:` unless the unit's own `gas-model` key says otherwise
//! ([`super::reactor`]). As a Peng-Robinson gas (Peng & Robinson 1976,
//! [`crate::thermo::peng_robinson`]) reforming and shift take fugacities, and the energy balance
//! holds on real-gas enthalpies: the outlet's (ideal-gas enthalpy plus residual enthalpy at its
//! composition, temperature and pressure) equals the sum of the two inlets', each taken alone at
//! its own composition and temperature and at the outlet pressure (the pressure drop taken as an
//! ideal gas, as in every reactor, [`ReactorCore::residual_enthalpy_change`]). The stage is
//! given the fixed duty H_inlets - H_combusted(T_process) + H_res,inlets - H_res,combusted
//! (the stage adds the combusted gas's residual at its inlet itself), and the unit's
//! `residual_enthalpy_change_w` is the outlet's residual less the inlets', which the
//! flowsheet's energy balance adds to the ideal-gas stream enthalpies. Streams between units
//! carry ideal-gas enthalpies, as everywhere. The unit is then solved once more as an ideal gas
//! (duty H_inlets - H_combusted) for the figures `ideal-gas-outlet-temperature-change`,
//! `ideal-gas-methane-slip-change` and `ideal-gas-co-slip-change` (Peng-Robinson less ideal; the
//! two slips relative, on a dry basis). The residual enthalpies are evaluated on the
//! Peng-Robinson constants prepared when the unit is built, with no heap allocation once warm;
//! `heat-released` stays an ideal-gas figure.
//!
//! Figures: outlet temperature; heat released (H of the combined inlet composition at the
//! outlet temperature less H_out: the net heat of oxidation and reforming that brings both
//! inlets to the outlet temperature, independent of the burning order); methane slip and CO,
//! CO2 and H2 on a dry basis; oxygen per carbon (mol O2 in the inlets per mol organic carbon,
//! [`crate::reaction::organic_carbon_atoms`]); steam-to-carbon at the inlet (steam of both
//! inlets over organic carbon); H2/CO at the outlet; and where there is nitrogen in the oxidant
//! (an air-blown secondary reformer) H2/N2 and (H2 + CO)/N2 at the outlet, the second being the
//! H2/N2 the gas would have after complete shift (each CO gives one H2), the figure an ammonia
//! plant holds near 3 (common practice). Carbon activity by methane cracking and Boudouard of
//! the outlet gas, with `carbon-margin`, as in the reformer ([`super::reformer`]); by default
//! the outlet gas only (`carbon-path-points: 0`), since the bed of an autothermal reformer runs
//! from the hot combustion zone down to the outlet, a path the equilibrium model does not know;
//! with `carbon-path-points: N` the gas of the outlet's elements is also equilibrated at N
//! temperatures from the process-gas inlet's to the outlet's (a screening that includes
//! temperatures the gas never meets in the bed, so it errs on the side of caution).
//!
//! Operating limits ([`super::limits`], common practice, settable per unit; code
//! `reformer-temperature`): outlet at most 1100 degC (`outlet-max-temperature`: the refractory
//! lining, burner and outlet collector of an autothermal or secondary reformer are usually
//! designed for an exit of about 950-1100 degC), and at least 850 degC
//! (`outlet-min-temperature`: an exit below about 850 degC means too little oxidant for a
//! sensible methane slip at the pressures of hydrogen and syngas plants).

use super::chemistry::{CarbonCheck, HigherHydrocarbons};
use super::common::{
    check_inlets, check_temperature, dry_fraction, figure, outlet_pressure, require_vapour,
    spec_error, Key,
};
use super::limits::{self, key_doc, LimitKey, OperatingLimits};
use super::reactor::{read_gas_model, ReactorCore, GAS_MODEL_KEY};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult, Warning};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::{Error, Result, ResultExt};
use crate::quantity::CELSIUS_OFFSET_K;
use crate::thermo::peng_robinson::{evaluate, PrComponent};
use crate::thermo::{mixture, GasModel, Phase, SpeciesDb};

/// The reactions of an autothermal reformer's equilibrium stage, in stage order.
pub const AUTOTHERMAL_REACTIONS: [&str; 2] = ["reforming", "shift"];

/// Default highest outlet temperature, K (common practice: the refractory lining, burner and
/// outlet of an autothermal or secondary reformer are usually designed for an exit of about
/// 950-1100 degC).
pub const AUTOTHERMAL_OUTLET_MAX_K: f64 = 1100.0 + CELSIUS_OFFSET_K;
/// Default lowest outlet temperature, K (common practice: an exit below about 850 degC means
/// too little oxidant for a sensible methane slip).
pub const AUTOTHERMAL_OUTLET_MIN_K: f64 = 850.0 + CELSIUS_OFFSET_K;

/// Specification of an autothermal (or secondary) reformer.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct AutothermalSpec {
    /// Pressure drop from the lowest inlet pressure to the outlet, Pa.
    pub pressure_drop_pa: f64,
    /// Approach temperature by reaction name (`reforming`, `shift`), K; unlisted ones are zero.
    pub approaches: Vec<(String, f64)>,
    /// Operating limits set in the file (`None`: the defaults above).
    pub limits: OperatingLimits,
    /// Gas model of the equilibrium (`None`: the flowsheet's).
    pub gas_model: Option<GasModel>,
}

/// The limit keys of an autothermal reformer.
const LIMIT_KEYS: [LimitKey; 3] = [
    LimitKey::OutletMin,
    LimitKey::OutletMax,
    LimitKey::CarbonPathPoints,
];

/// An autothermal reformer ready to solve (its equilibrium stage built once).
#[derive(Debug, Clone)]
pub struct Autothermal {
    core: ReactorCore,
    spec: AutothermalSpec,
    higher: HigherHydrocarbons,
    carbon: CarbonCheck,
    burning: Burning,
    residual: ResidualEnthalpy,
}

/// The `autothermal-reformer` unit type.
pub static TYPE: UnitType = UnitType {
    name: "autothermal-reformer",
    summary: "Adiabatic autothermal or secondary reformer: the oxidant's oxygen consumed \
              completely, then reforming and shift at equilibrium with their approach \
              temperatures; the outlet temperature follows from the energy balance.",
    inlets: Ports::exactly(2, "process gas with steam, oxidant (oxygen, enriched air or air)"),
    outlets: Ports::exactly(1, "reformed gas"),
    keys: &[
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost from the lowest inlet pressure to the outlet",
        },
        KeyDoc {
            key: "approach",
            value: ValueKind::PerReaction(&AUTOTHERMAL_REACTIONS),
            default: Some("0 K for each reaction"),
            meaning: "approach temperature per reaction; a positive one leaves the outlet short of equilibrium",
        },
        key_doc(LimitKey::OutletMin, "850 degC (too little oxidant below)"),
        key_doc(LimitKey::OutletMax, "1100 degC (refractory and burner)"),
        key_doc(LimitKey::CarbonPathPoints, "0 (the outlet gas only)"),
        GAS_MODEL_KEY,
    ],
    example: "- name: atr\n  type: autothermal-reformer\n  from: [atr-feed, oxygen]\n  to: \
              atr-exit\n  pressure-drop: 0.5 bar\n  approach: {reforming: 10 K, shift: 0 K}",
    named_ports: None,
    build: build::<Autothermal>,
};

impl UnitKind for Autothermal {
    type Spec = AutothermalSpec;

    fn read(b: &mut UnitBuilder<'_, '_, AutothermalSpec>) -> Result<AutothermalSpec> {
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&AUTOTHERMAL_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let limits = limits::read(b, &LIMIT_KEYS, |s: &mut AutothermalSpec| &mut s.limits)?;
        let gas_model = read_gas_model(b)?;
        Ok(AutothermalSpec {
            pressure_drop_pa: drop,
            approaches,
            limits,
            gas_model,
        })
    }

    /// Check the spec and build the equilibrium stage.
    fn new(db: &SpeciesDb, name: &str, spec: &AutothermalSpec) -> Result<Autothermal> {
        spec.limits.check(name)?;
        Ok(Autothermal {
            core: ReactorCore::new(
                db,
                name,
                &AUTOTHERMAL_REACTIONS,
                &spec.approaches,
                &[Direction::Forward, Direction::Auto],
                spec.pressure_drop_pa,
            )?
            .with_gas_model(spec.gas_model),
            spec: spec.clone(),
            higher: HigherHydrocarbons::new(db)?,
            carbon: CarbonCheck::new(db)?,
            burning: Burning::new(db, name)?,
            residual: ResidualEnthalpy::new(db),
        })
    }

    fn spec(&self) -> &AutothermalSpec {
        &self.spec
    }

    super::reactor::reactor_solve_entries!(
        AutothermalSpec,
        |name: &str, spec: &AutothermalSpec| { spec.limits.check(name) }
    );
}

/// The formal burning of the oxidant's oxygen, prepared once: the O2 index and the gases that
/// burn, in order (H2, CO, CH4, then every other gas of C, H and O with an oxygen demand).
#[derive(Debug, Clone)]
struct Burning {
    o2: usize,
    /// (species, O2 per mol, CO2 per mol, H2O per mol).
    fuels: Vec<(usize, f64, f64, f64)>,
}

impl Burning {
    fn new(db: &SpeciesDb, unit: &str) -> Result<Burning> {
        let ctx = format!(" (needed by unit '{unit}')");
        let o2 = db.require("O2", &ctx)?;
        let first: Vec<usize> = ["H2", "CO", "CH4"]
            .iter()
            .map(|s| db.require(s, &ctx))
            .collect::<Result<_>>()?;
        let mut order = first.clone();
        order.extend((0..db.len()).filter(|i| !first.contains(i)));
        let fuels = order
            .into_iter()
            .filter_map(|i| {
                let s = db.by_index(i);
                let cho = s
                    .elements
                    .iter()
                    .all(|(e, _)| matches!(e.as_str(), "C" | "H" | "O"));
                let (c, h, o) = (s.atoms("C"), s.atoms("H"), s.atoms("O"));
                let demand = c + h / 4.0 - o / 2.0;
                (s.phase == Phase::Gas && cho && demand > 0.0).then_some((i, demand, c, h / 2.0))
            })
            .collect();
        Ok(Burning { o2, fuels })
    }

    /// Burn every mol of O2 in `flows` (in place), fuels in order; error when they cannot take
    /// it all.
    fn burn(&self, unit: &str, key: &Key, flows: &mut [f64]) -> Result<()> {
        let o2_in = flows[self.o2];
        let mut left = o2_in;
        for &(i, demand, co2, h2o) in &self.fuels {
            if left <= 0.0 {
                break;
            }
            let n = flows[i];
            if n <= 0.0 {
                continue;
            }
            let burnt = n.min(left / demand);
            if burnt == n {
                flows[i] = 0.0;
                left -= demand * n;
            } else {
                flows[i] = n - burnt;
                left = 0.0;
            }
            flows[key.co2] += co2 * burnt;
            flows[key.h2o] += h2o * burnt;
        }
        if left > 1e-12 * o2_in {
            return Err(spec_error(
                unit,
                "inlets",
                format!(
                    "not enough combustibles for the oxidant: {o2_in:.6} mol/s of O2 enter, the \
                     combustibles can take {:.6} mol/s; reduce the oxidant flow",
                    o2_in - left
                ),
            ));
        }
        flows[self.o2] = 0.0;
        Ok(())
    }
}

/// The Peng-Robinson constants of every species of the database, prepared once (a species
/// without critical constants holds a stand-in that is never used with a flow).
#[derive(Debug, Clone)]
struct ResidualEnthalpy {
    components: Vec<PrComponent>,
    known: Vec<bool>,
}

impl ResidualEnthalpy {
    fn new(db: &SpeciesDb) -> ResidualEnthalpy {
        let stand_in = PrComponent::from_constants(1.0, 1.0, 0.0);
        let (components, known) = (0..db.len())
            .map(|i| match &db.by_index(i).critical {
                Some(c) => (PrComponent::new(c), true),
                None => (stand_in, false),
            })
            .unzip();
        ResidualEnthalpy { components, known }
    }

    /// n (H - H_ig) of the gas of `flows` at `temperature_k` and `pressure_pa`, W (the value of
    /// [`crate::thermo::peng_robinson::stream_residual_enthalpy_w`]: species without flow add
    /// nothing); `ln_phi` is work memory. An error names a species present without critical
    /// constants.
    fn of(
        &self,
        db: &SpeciesDb,
        flows: &[f64],
        temperature_k: f64,
        pressure_pa: f64,
        ln_phi: &mut Vec<f64>,
    ) -> Result<f64> {
        let mut total = 0.0;
        for (i, &n) in flows.iter().enumerate() {
            if n > 0.0 {
                if !self.known[i] {
                    return Err(Error::InvalidValue {
                        field: format!("critical constants of {}", db.by_index(i).name),
                        value: "none".into(),
                        reason: "the gas model peng-robinson needs them for every species present"
                            .into(),
                    });
                }
                total += n;
            }
        }
        if !(total > 0.0) {
            return Ok(0.0);
        }
        ln_phi.clear();
        ln_phi.resize(flows.len(), 0.0);
        let state = evaluate(&self.components, flows, temperature_k, pressure_pa, ln_phi)?;
        Ok(total * state.residual_enthalpy_j_per_mol)
    }
}

impl Autothermal {
    /// Solve with the numbers of `spec` and the approaches `approaches_k` (stage order; `None`:
    /// those the stage was built with).
    #[allow(clippy::too_many_arguments)]
    fn run(
        &self,
        db: &SpeciesDb,
        spec: &AutothermalSpec,
        approaches_k: Option<&[f64]>,
        inlets: &[&Stream],
        guess: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let (name, key) = (&self.core.name, &self.core.key);
        check_inlets(db, name, "autothermal-reformer", inlets, 2, Some(2))?;
        require_vapour(db, name, inlets)?;
        let (process, oxidant) = (inlets[0], inlets[1]);
        let o2 = self.burning.o2;
        if oxidant.flows[o2] <= 0.0 {
            return Err(spec_error(
                name,
                "inlet 2",
                "the oxidant carries no O2; an autothermal reformer needs oxygen, enriched air \
                 or air as its second inlet",
            ));
        }
        let p = outlet_pressure(
            name,
            process.pressure_pa.min(oxidant.pressure_pa),
            spec.pressure_drop_pa,
        )?;
        let t_ref = process.temperature_k;
        let UnitScratch {
            flows,
            stage: stage_ws,
            options,
            carbon,
            ..
        } = scratch;
        let [combined, combusted, ln_phi] = flows;
        combined.clear();
        combined.extend(process.flows.iter().zip(&oxidant.flows).map(|(a, b)| a + b));
        combusted.clear();
        combusted.extend_from_slice(combined);
        self.burning.burn(name, key, combusted)?;
        self.higher.reform(name, key, combusted)?;
        check_temperature(db, name, "inlet 1", combusted, t_ref)?;
        let context = || format!("unit '{name}', inlet enthalpy");
        let h_in =
            process.enthalpy_w(db).context(context)? + oxidant.enthalpy_w(db).context(context)?;
        let h_combusted = mixture::enthalpy(db, combusted, t_ref).context(context)?;
        let ideal_mode = EnergyMode::FixedDuty {
            duty_w: h_in - h_combusted,
        };
        // As a real gas: the inlets' residual enthalpies at the outlet pressure (target) and
        // the combusted gas's at the process-gas temperature (the stage adds it to its inlet).
        let residuals = if self.core.gas_model(options).is_ideal() {
            None
        } else {
            let mut residual = |flows: &[f64], t: f64| {
                self.residual
                    .of(db, flows, t, p, ln_phi)
                    .context(|| format!("unit '{name}', residual enthalpy"))
            };
            let inlets_w = residual(&process.flows, process.temperature_k)?
                + residual(&oxidant.flows, oxidant.temperature_k)?;
            Some((inlets_w, residual(combusted, t_ref)?))
        };
        let real_mode = match residuals {
            Some((inlets_w, combusted_w)) => EnergyMode::FixedDuty {
                duty_w: h_in - h_combusted + inlets_w - combusted_w,
            },
            None => ideal_mode,
        };
        self.core.solve_stage_modes(
            db,
            combusted,
            t_ref,
            p,
            [real_mode, ideal_mode],
            guess,
            approaches_k,
            options,
            stage_ws,
            out,
        )?;
        out.duty_w = 0.0;
        if let (Some((inlets_w, combusted_w)), Some(stage)) = (residuals, out.equilibrium.as_mut())
        {
            // The flowsheet adds this to the ideal-gas stream enthalpies: the outlet's residual
            // enthalpy less the inlets' (not less the combusted gas's, the stage's own inlet).
            stage.residual_enthalpy_change_w += combusted_w - inlets_w;
        }
        let outlet = &out.outlets[0];
        if outlet.flows[o2] != 0.0 {
            return Err(Error::NotConverged {
                what: format!("oxygen balance of unit '{name}'"),
                iterations: 0,
                residual: outlet.flows[o2],
                hint: " (oxygen left in the outlet)".into(),
            });
        }
        let (t_out, out_flows) = (outlet.temperature_k, &outlet.flows);
        let h_combined_hot = mixture::enthalpy(db, combined, t_out)
            .context(|| format!("unit '{name}', heat released"))?;
        let h_out = mixture::enthalpy(db, out_flows, t_out)?;
        let figures = &mut out.figures;
        figures.push(figure(
            "outlet-temperature",
            "outlet temperature",
            t_out,
            FigureKind::Temperature,
        ));
        figures.push(figure(
            "heat-released",
            "heat released, net of reforming",
            h_combined_hot - h_out,
            FigureKind::Power,
        ));
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
        let carbon_in = key.organic_carbon(combined);
        if carbon_in > 0.0 {
            figures.push(figure(
                "oxygen-to-carbon",
                "O2 per organic carbon, inlet",
                combined[o2] / carbon_in,
                FigureKind::Number,
            ));
        }
        if let Some(sc) = key.steam_to_carbon(combined) {
            figures.push(figure(
                "steam-to-carbon",
                "steam-to-carbon ratio, inlet",
                sc,
                FigureKind::Number,
            ));
        }
        let (h2, co) = (out_flows[key.h2], out_flows[key.co]);
        if co > 0.0 {
            figures.push(figure(
                "h2-to-co",
                "H2/CO, outlet",
                h2 / co,
                FigureKind::Number,
            ));
        }
        // Air-blown units only (nitrogen in the oxidant): the ammonia syngas figures.
        let air_n2 = db
            .index_of("N2")
            .filter(|i| oxidant.flows[*i] > 0.0)
            .map(|i| out_flows[i]);
        if let Some(n2) = air_n2 {
            figures.push(figure(
                "h2-to-n2",
                "H2/N2, outlet",
                h2 / n2,
                FigureKind::Number,
            ));
            figures.push(figure(
                "h2-co-to-n2",
                "(H2 + CO)/N2, outlet",
                (h2 + co) / n2,
                FigureKind::Number,
            ));
        }
        let max_k = spec.limits.outlet_max_k.unwrap_or(AUTOTHERMAL_OUTLET_MAX_K);
        let min_k = spec.limits.outlet_min_k.unwrap_or(AUTOTHERMAL_OUTLET_MIN_K);
        outlet_warnings(name, t_out, min_k, max_k, &mut out.warnings);
        let points = Some(spec.limits.carbon_path_points.unwrap_or(0.0));
        self.carbon.report(
            db, &self.core, process, combusted, points, options, carbon, out,
        )?;
        let burns =
            |i: usize| self.higher.converts(i) || self.burning.fuels.iter().any(|f| f.0 == i);
        self.core.finish(db, combined, burns, approaches_k, out);
        Ok(())
    }
}

/// Warn (`reformer-temperature`) when the outlet `t_out` is above `max_k` (refractory and
/// burner) or below `min_k` (too little oxidant).
fn outlet_warnings(unit: &str, t_out: f64, min_k: f64, max_k: f64, warnings: &mut Vec<Warning>) {
    if t_out > max_k {
        warnings.push(
            Warning::new(
                "reformer-temperature",
                "outlet {value} is above {limit}, the usual design limit of an autothermal \
                 reformer's refractory, burner and outlet (common practice or set in the \
                 file): reduce the oxidant or raise the steam",
            )
            .value(t_out, FigureKind::Temperature)
            .limit(max_k)
            .for_unit(unit),
        );
    }
    if t_out < min_k {
        warnings.push(
            Warning::new(
                "reformer-temperature",
                "outlet {value} is below {limit} (common practice or set in the file): too \
                 little oxidant for a sensible methane slip; raise the oxidant or the preheat",
            )
            .value(t_out, FigureKind::Temperature)
            .limit(min_k)
            .for_unit(unit),
        );
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::common::temperature_at_enthalpy;
    use crate::units::test_support::{assert_balances, db, equilibrium_gap, fig, gas};

    fn spec(approaches: &[(&str, f64)], limits: OperatingLimits) -> AutothermalSpec {
        AutothermalSpec {
            pressure_drop_pa: 0.5e5,
            approaches: approaches
                .iter()
                .map(|(n, a)| (n.to_string(), *a))
                .collect(),
            limits,
            gas_model: None,
        }
    }

    /// Pre-reformed natural gas at S/C 1.5 and 650 degC, 30 bar (an invented demo feed).
    fn process(db: &SpeciesDb) -> Stream {
        let pairs = [
            ("CH4", 0.9),
            ("H2O", 1.35),
            ("H2", 0.12),
            ("CO2", 0.08),
            ("N2", 0.01),
        ];
        gas(db, &pairs, 923.15, 30e5)
    }

    fn oxygen(db: &SpeciesDb, o2: f64) -> Stream {
        gas(db, &[("O2", o2)], 513.15, 31e5)
    }

    fn solve(db: &SpeciesDb, s: &AutothermalSpec, inlets: &[&Stream]) -> Result<UnitResult> {
        Autothermal::new(db, "atr", s)?.solve(db, inlets, None)
    }

    #[test]
    fn oxygen_is_consumed_and_the_outlet_is_at_equilibrium_adiabatically() {
        let db = db();
        let (p, o) = (process(&db), oxygen(&db, 0.5));
        let r = solve(&db, &spec(&[], OperatingLimits::default()), &[&p, &o]).unwrap();
        assert_balances(&db, &[&p, &o], &r);
        let out = &r.outlets[0];
        assert_eq!(out.flows[db.index_of("O2").unwrap()], 0.0);
        assert_eq!(r.duty_w, 0.0);
        // Lowest inlet pressure (30 bar) less 0.5 bar.
        assert_eq!(out.pressure_pa, 29.5e5);
        // Recomputed from the outlet alone: both reactions at equilibrium at its temperature.
        for reaction in ["reforming", "shift"] {
            let gap = equilibrium_gap(&db, reaction, out, out.temperature_k);
            assert!(gap.abs() < 1e-9, "{reaction}: {gap:e}");
        }
        // Common practice: an oxygen-blown autothermal reformer at O2/C about 0.55 leaves at
        // about 950-1100 degC with well under 1 % methane (dry).
        let t = fig(&r, "outlet-temperature");
        assert_eq!(t, out.temperature_k);
        assert!((1223.15..1373.15).contains(&t), "{t}");
        assert!(fig(&r, "methane-slip-dry") < 0.01);
        assert!((fig(&r, "oxygen-to-carbon") - 0.5 / 0.9).abs() < 1e-15);
        assert!((fig(&r, "steam-to-carbon") - 1.5).abs() < 1e-15);
        assert!(fig(&r, "heat-released") > 0.0);
        // Nitrogen from the process gas only: no ammonia syngas figures.
        assert!(r.figures.iter().all(|f| f.key != "h2-to-n2"));
        assert!(r.warnings.is_empty(), "{:?}", r.warnings);
    }

    #[test]
    fn as_a_peng_robinson_gas_the_outlet_keeps_the_inlets_real_gas_enthalpy() {
        use crate::thermo::peng_robinson::stream_residual_enthalpy_w;
        let db = db();
        let (p, o) = (process(&db), oxygen(&db, 0.5));
        let real_spec = AutothermalSpec {
            gas_model: Some(GasModel::PengRobinson),
            ..spec(&[("reforming", 10.0)], OperatingLimits::default())
        };
        let r = solve(&db, &real_spec, &[&p, &o]).unwrap();
        let ideal = solve(
            &db,
            &spec(&[("reforming", 10.0)], OperatingLimits::default()),
            &[&p, &o],
        )
        .unwrap();
        // Elements 1e-12 and, as the flowsheet counts it (ideal-gas streams), energy 1e-9.
        let stage = r.equilibrium.as_ref().unwrap();
        assert_eq!(stage.gas_model, GasModel::PengRobinson);
        assert_eq!(r.duty_w, 0.0);
        let out = &r.outlets[0];
        let h = |s: &Stream| s.enthalpy_w(&db).unwrap();
        let (h_in, h_out) = (h(&p) + h(&o), h(out));
        let flowsheet = (h_out + stage.residual_enthalpy_change_w - h_in).abs() / h_in.abs();
        assert!(flowsheet < 1e-9, "{flowsheet:e}");
        let e =
            crate::units::test_support::element_error(&db, &[&p.flows, &o.flows], &[&out.flows]);
        assert!(e <= 1e-12, "{e:e}");
        // As real gases (Peng & Robinson 1976, the residuals of the thermo module): the
        // outlet's enthalpy is the two inlets', each at its temperature and the outlet
        // pressure, and the change the flowsheet adds is the outlet's residual less theirs.
        let p_out = out.pressure_pa;
        let res =
            |s: &Stream| stream_residual_enthalpy_w(&db, &s.flows, s.temperature_k, p_out).unwrap();
        let real = (h_out + res(out) - h_in - res(&p) - res(&o)).abs() / h_in.abs();
        assert!(real < 1e-9, "{real:e}");
        let change = res(out) - res(&p) - res(&o);
        assert!((stage.residual_enthalpy_change_w - change).abs() < 1e-9 * h_in.abs());
        // The gas is at equilibrium as a real gas, not as an ideal one: reforming takes its
        // constant 10 K below the outlet with fugacities (the ideal-gas gap is what ln phi
        // moves, about 1e-2 at 30 bar, Poling, Prausnitz & O'Connell ch. 6 order).
        let gap = equilibrium_gap(&db, "reforming", out, out.temperature_k - 10.0);
        assert!(gap.abs() > 1e-3 && gap.abs() < 0.1, "{gap:e}");
        // The ideal-gas figures are the differences to the unit solved as an ideal gas.
        let dt = fig(&r, "ideal-gas-outlet-temperature-change");
        let t_ideal = ideal.outlets[0].temperature_k;
        assert!((dt - (out.temperature_k - t_ideal)).abs() < 1e-9, "{dt}");
        let slip = fig(&r, "ideal-gas-methane-slip-change");
        let ratio = fig(&r, "methane-slip-dry") / fig(&ideal, "methane-slip-dry") - 1.0;
        assert!((slip - ratio).abs() < 1e-12, "{slip} {ratio}");
        // Cantera Peng-Robinson (tests/data/cantera_autothermal_peng_robinson.csv, oxygen-blown
        // cases at 30 bar): the real gas leaves 1.5-3.1 K cooler with 3.7-5.6 % more methane (dry).
        assert!((-4.0..-1.0).contains(&dt), "{dt}");
        assert!((0.02..0.07).contains(&slip), "{slip}");
        assert!(ideal
            .figures
            .iter()
            .all(|f| !f.key.starts_with("ideal-gas-")));
    }

    #[test]
    fn the_order_of_the_formal_burning_does_not_move_the_equilibrium() {
        // The same elements and enthalpy reached with part of the methane burnt already
        // (CH4 + 2 O2 = CO2 + 2 H2O) and the process gas at the temperature that keeps the
        // total enthalpy: the unit then burns hydrogen with the oxygen left, a different
        // combusted gas, and must land on the same outlet (one equilibrium per elements,
        // enthalpy and pressure).
        let db = db();
        let (p, o) = (process(&db), oxygen(&db, 0.5));
        let s = spec(&[], OperatingLimits::default());
        let a = solve(&db, &s, &[&p, &o]).unwrap();
        let h_total = p.enthalpy_w(&db).unwrap() + o.enthalpy_w(&db).unwrap();
        let d = 0.1;
        let mut burnt = p.clone();
        burnt.flows[db.index_of("CH4").unwrap()] -= d;
        burnt.flows[db.index_of("CO2").unwrap()] += d;
        burnt.flows[db.index_of("H2O").unwrap()] += 2.0 * d;
        let o2 = oxygen(&db, 0.5 - 2.0 * d);
        let target = h_total - o2.enthalpy_w(&db).unwrap();
        burnt.temperature_k =
            temperature_at_enthalpy(&db, "t", &burnt.flows, target, 1000.0).unwrap();
        assert!(burnt.temperature_k > p.temperature_k + 100.0);
        let b = solve(&db, &s, &[&burnt, &o2]).unwrap();
        let (x, y) = (&a.outlets[0], &b.outlets[0]);
        assert!((x.temperature_k - y.temperature_k).abs() < 1e-7);
        for (f, g) in x.flows.iter().zip(&y.flows) {
            assert!((f - g).abs() < 1e-10, "{f} {g}");
        }
    }

    #[test]
    fn approaches_leave_more_methane_and_a_warm_start_agrees() {
        let db = db();
        let (p, o) = (process(&db), oxygen(&db, 0.5));
        let unit = Autothermal::new(
            &db,
            "atr",
            &spec(&[("reforming", 10.0)], OperatingLimits::default()),
        )
        .unwrap();
        let r = unit.solve(&db, &[&p, &o], None).unwrap();
        assert_balances(&db, &[&p, &o], &r);
        let out = &r.outlets[0];
        // Reforming takes its constant 10 K below the outlet (forward, endothermic).
        let gap = equilibrium_gap(&db, "reforming", out, out.temperature_k - 10.0);
        assert!(gap.abs() < 1e-9, "{gap:e}");
        let close = solve(&db, &spec(&[], OperatingLimits::default()), &[&p, &o]).unwrap();
        assert!(fig(&r, "methane-slip-dry") > fig(&close, "methane-slip-dry"));
        // Less methane reformed: less heat taken, a hotter outlet.
        assert!(out.temperature_k > close.outlets[0].temperature_k);
        let guess = r.equilibrium.as_ref().unwrap().extents.clone();
        let again = unit.solve(&db, &[&p, &o], Some(&guess)).unwrap();
        assert!((again.outlets[0].temperature_k - out.temperature_k).abs() < 1e-8);
    }

    #[test]
    fn outlet_limits_warn_beyond_and_not_at_their_defaults_or_set_values() {
        // Common practice: about 850-1100 degC at the exit (module docs).
        let db = db();
        let p = process(&db);
        let codes = |r: &UnitResult| -> Vec<f64> {
            r.warnings
                .iter()
                .filter(|w| w.code == "reformer-temperature")
                .map(|w| w.limit.unwrap())
                .collect()
        };
        let default = spec(&[], OperatingLimits::default());
        let lean = solve(&db, &default, &[&p, &oxygen(&db, 0.35)]).unwrap();
        assert!(lean.outlets[0].temperature_k < AUTOTHERMAL_OUTLET_MIN_K);
        assert_eq!(codes(&lean), vec![AUTOTHERMAL_OUTLET_MIN_K]);
        let hot = solve(&db, &default, &[&p, &oxygen(&db, 0.6)]).unwrap();
        assert!(hot.outlets[0].temperature_k > AUTOTHERMAL_OUTLET_MAX_K);
        assert_eq!(codes(&hot), vec![AUTOTHERMAL_OUTLET_MAX_K]);
        // At the limit set to the outlet itself: inside; 0.01 K tighter: a warning.
        let o = oxygen(&db, 0.5);
        let t = solve(&db, &default, &[&p, &o]).unwrap().outlets[0].temperature_k;
        let at = |min: Option<f64>, max: Option<f64>| {
            let limits = OperatingLimits {
                outlet_min_k: min,
                outlet_max_k: max,
                ..Default::default()
            };
            codes(&solve(&db, &spec(&[], limits), &[&p, &o]).unwrap())
        };
        assert!(at(Some(t), Some(t)).is_empty());
        assert_eq!(at(None, Some(t - 0.01)), vec![t - 0.01]);
        assert_eq!(at(Some(t + 0.01), None), vec![t + 0.01]);
    }

    #[test]
    fn carbon_is_checked_on_the_outlet_and_on_request_along_the_path() {
        let db = db();
        let (p, o) = (process(&db), oxygen(&db, 0.5));
        let r = solve(&db, &spec(&[], OperatingLimits::default()), &[&p, &o]).unwrap();
        // Outlet gas at reforming and shift equilibrium: both routes agree (design notes).
        let a1 = fig(&r, "carbon-activity-methane-cracking");
        let a2 = fig(&r, "carbon-activity-boudouard");
        assert!((a1 / a2 - 1.0).abs() < 1e-6 && a1 < 1.0, "{a1} {a2}");
        assert!((fig(&r, "carbon-margin") - (1.0 - a1.max(a2))).abs() < 1e-12);
        // A lean-steam feed (S/C 0.4, O2/C 0.45, 600 degC): its outlet gas has no carbon
        // potential, but the equilibrated gas of its elements can deposit carbon at the cool
        // end of the path (Boudouard), which only the path check asked for sees.
        let lean = gas(
            &db,
            &[("CH4", 1.0), ("H2O", 0.4), ("H2", 0.02)],
            873.15,
            30e5,
        );
        let carbon = |feed: &Stream, o2: f64, points: Option<f64>| {
            let limits = OperatingLimits {
                carbon_path_points: points,
                ..Default::default()
            };
            let r = solve(&db, &spec(&[], limits), &[feed, &oxygen(&db, o2)]).unwrap();
            let w = r.warnings.iter().find(|w| w.code == "carbon-formation");
            (w.and_then(|w| w.value), fig(&r, "carbon-margin"))
        };
        let (w, margin) = carbon(&lean, 0.45, None);
        assert!(w.is_none() && margin > 0.0, "{w:?} {margin}");
        let (w, margin) = carbon(&lean, 0.45, Some(21.0));
        assert!(w.is_some_and(|a| a > 1.0) && margin < 0.0, "{w:?} {margin}");
        // Leaner still (S/C 0.2, O2/C 0.35, outlet about 920 degC): the outlet gas itself.
        let leaner = gas(
            &db,
            &[("CH4", 1.0), ("H2O", 0.2), ("H2", 0.02)],
            873.15,
            30e5,
        );
        let (w, margin) = carbon(&leaner, 0.35, None);
        assert!(w.is_some_and(|a| a > 1.0) && margin < 0.0, "{w:?} {margin}");
    }

    #[test]
    fn air_gives_the_ammonia_syngas_figures() {
        let db = db();
        let primary = gas(
            &db,
            &[
                ("CH4", 0.118),
                ("H2O", 0.99),
                ("H2", 0.62),
                ("CO", 0.092),
                ("CO2", 0.1),
            ],
            1063.15,
            30e5,
        );
        let air = gas(
            &db,
            &[("N2", 0.3124), ("O2", 0.0838), ("Ar", 0.0038)],
            853.15,
            31e5,
        );
        let r = solve(
            &db,
            &spec(&[], OperatingLimits::default()),
            &[&primary, &air],
        )
        .unwrap();
        assert_balances(&db, &[&primary, &air], &r);
        let out = &r.outlets[0];
        let n = |s: &str| out.flows[db.index_of(s).unwrap()];
        assert!((fig(&r, "h2-to-n2") - n("H2") / n("N2")).abs() < 1e-12);
        assert!((fig(&r, "h2-co-to-n2") - (n("H2") + n("CO")) / n("N2")).abs() < 1e-12);
        assert!((n("N2") - 0.3124).abs() < 1e-15 && (n("Ar") - 0.0038).abs() < 1e-15);
    }

    #[test]
    fn impossible_inlets_are_refused() {
        let db = db();
        let s = spec(&[], OperatingLimits::default());
        let p = process(&db);
        // CH4 0.9 needs 1.8, H2 0.12 needs 0.06: 1.86 mol/s of O2 at most.
        let e = solve(&db, &s, &[&p, &oxygen(&db, 1.9)])
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("not enough combustibles") && e.contains("1.860000"),
            "{e}"
        );
        let e = solve(&db, &s, &[&p, &gas(&db, &[("N2", 1.0)], 500.0, 30e5)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("carries no O2"), "{e}");
        assert!(solve(&db, &s, &[&p]).is_err());
        let too_much_drop = AutothermalSpec {
            pressure_drop_pa: 40e5,
            ..s.clone()
        };
        assert!(solve(&db, &too_much_drop, &[&p, &oxygen(&db, 0.5)]).is_err());
    }
}
