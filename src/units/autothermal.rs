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
use super::reactor::ReactorCore;
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, UnitResult, Warning};
use crate::equilibrium::{Direction, EnergyMode};
use crate::error::{Error, Result, ResultExt};
use crate::quantity::CELSIUS_OFFSET_K;
use crate::thermo::{mixture, Phase, SpeciesDb};

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
    ],
    example: "- name: atr\n  type: autothermal-reformer\n  from: [atr-feed, oxygen]\n  to: \
              atr-exit\n  pressure-drop: 0.5 bar\n  approach: {reforming: 10 K, shift: 0 K}",
    build: build::<Autothermal>,
};

impl UnitKind for Autothermal {
    type Spec = AutothermalSpec;

    fn read(b: &mut UnitBuilder<'_, '_, AutothermalSpec>) -> Result<AutothermalSpec> {
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        let approaches = b.approaches(&AUTOTHERMAL_REACTIONS, |s, j, v| s.approaches[j].1 = v)?;
        let limits = limits::read(b, &LIMIT_KEYS, |s: &mut AutothermalSpec| &mut s.limits)?;
        Ok(AutothermalSpec {
            pressure_drop_pa: drop,
            approaches,
            limits,
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
            )?,
            spec: spec.clone(),
            higher: HigherHydrocarbons::new(db)?,
            carbon: CarbonCheck::new(db)?,
            burning: Burning::new(db, name)?,
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
                let cho = s.elements.iter().all(|(e, _)| matches!(e.as_str(), "C" | "H" | "O"));
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
        let [combined, combusted, _] = flows;
        combined.clear();
        combined.extend(process.flows.iter().zip(&oxidant.flows).map(|(a, b)| a + b));
        combusted.clear();
        combusted.extend_from_slice(combined);
        self.burning.burn(name, key, combusted)?;
        self.higher.reform(name, key, combusted)?;
        check_temperature(db, name, "inlet 1", combusted, t_ref)?;
        let context = || format!("unit '{name}', inlet enthalpy");
        let h_in = process.enthalpy_w(db).context(context)? + oxidant.enthalpy_w(db).context(context)?;
        let h_combusted = mixture::enthalpy(db, combusted, t_ref).context(context)?;
        let mode = EnergyMode::FixedDuty {
            duty_w: h_in - h_combusted,
        };
        self.core.solve_stage(
            db,
            combusted,
            t_ref,
            p,
            mode,
            guess,
            approaches_k,
            options,
            stage_ws,
            out,
        )?;
        out.duty_w = 0.0;
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
            figures.push(figure("h2-to-co", "H2/CO, outlet", h2 / co, FigureKind::Number));
        }
        // Air-blown units only (nitrogen in the oxidant): the ammonia syngas figures.
        let air_n2 = db
            .index_of("N2")
            .filter(|i| oxidant.flows[*i] > 0.0)
            .map(|i| out_flows[i]);
        if let Some(n2) = air_n2 {
            figures.push(figure("h2-to-n2", "H2/N2, outlet", h2 / n2, FigureKind::Number));
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
        self.carbon
            .report(db, &self.core, process, combusted, points, options, carbon, out)?;
        let burns = |i: usize| {
            self.higher.converts(i) || self.burning.fuels.iter().any(|f| f.0 == i)
        };
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

