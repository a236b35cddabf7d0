//! Reformer furnace (the radiant box): its fuels burnt completely with air at a given excess,
//! the flue gas leaving at the bridgewall temperature, and exactly the heat the reformer(s) it
//! fires take delivered to them. It meets that by setting the flow of its make-up fuel (the air
//! follows it).
//!
//! Combustion is complete, by atoms ([`super::combustion`]): every fuel species to CO2, H2O and
//! N2, noble gases unchanged. Excess air is defined on oxygen:
//!
//! ```text
//! excess = O2 supplied in the air / O2 stoichiometric - 1
//! ```
//!
//! where the stoichiometric oxygen is that of complete combustion of all fuels, less any oxygen
//! the fuels bring. The flue gas therefore holds excess x O2 stoichiometric of oxygen, and every
//! other species of the air (N2, Ar, CO2, H2O) as it came.
//!
//! Energy balance of the radiant box (enthalpies with formation enthalpies, NASA-7 data):
//!
//! ```text
//! sum H(fuels, at their temperatures) + H(air) - H(flue gas at the bridgewall) = Q + L
//! L = f x fired duty,  fired duty = LHV of all fuels and air at 298.15 K
//! ```
//!
//! Q is the heat demand the flowsheet hands the furnace: the sum of the duties of the units it
//! `heats` (solved before it). The make-up flow x and the air flow y = y0 + x y1 enter the
//! balance linearly, so x is found directly, without iteration. The casing loss fraction f
//! (`heat-loss`) defaults to 1.5 % of the fired duty (common practice: radiant-box casing
//! losses are about 1-2 % of the fired duty). The furnace's own duty is H_flue - H_in, i.e.
//! -(Q + L), so that the flowsheet's energy balance closes with the reformer's +Q.
//!
//! A demand the other fuels (tail gas) already exceed would need a negative make-up: that is an
//! error saying by how many kW they exceed it; a make-up fuel that brings no net heat at the
//! bridgewall temperature is an error saying by how many kW the demand cannot be met.
//!
//! Figures: `make-up-fuel-flow`, `other-fuel-flow` (the fuels other than the make-up), `air-flow`,
//! `excess-air`, flue gas `flue-o2-wet`, `flue-o2-dry`, `flue-co2-wet`, `flue-h2o-wet`,
//! `flue-n2-wet`, `fired-duty` (LHV), `heat-to-reformer` (Q), `radiant-efficiency` (Q / fired
//! duty) and `heat-loss` (L).

use super::combustion::Combustion;
use super::common::{check_inlets, degc, figure, outlet_pressure, require_vapour, spec_error};
use super::unit::{
    build, EntryValue, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind,
};
use super::{FigureKind, Stream, StreamPhase, UnitResult};
use crate::error::{Result, ResultExt};
use crate::thermo::{mixture, SpeciesDb};

/// Default casing loss, fraction of the fired duty (common practice).
pub const DEFAULT_HEAT_LOSS: f64 = 0.015;

/// Specification of a furnace.
#[derive(Debug, Clone, PartialEq)]
pub struct FurnaceSpec {
    /// Flue gas temperature leaving the radiant box, K.
    pub bridgewall_temperature_k: f64,
    /// Excess air: O2 supplied / O2 stoichiometric - 1.
    pub excess_air: f64,
    /// Casing loss, fraction of the fired duty (LHV).
    pub heat_loss_fraction: f64,
    /// Pressure drop from the lowest inlet pressure to the flue gas, Pa.
    pub pressure_drop_pa: f64,
    /// Position of the combustion air among the inlets, and its stream name.
    pub air_inlet: (usize, String),
    /// Position of the make-up fuel among the inlets, and its stream name.
    pub make_up_inlet: (usize, String),
}

/// A furnace ready to solve.
#[derive(Debug, Clone)]
pub struct Furnace {
    name: String,
    spec: FurnaceSpec,
    combustion: Combustion,
}

/// The `furnace` unit type.
pub static TYPE: UnitType = UnitType {
    name: "furnace",
    summary: "Reformer furnace: its fuels burnt completely with air at a given excess, the flue \
              gas at the bridgewall temperature; sets the make-up fuel (and the air) so that the \
              reformer(s) it heats get exactly their duty.",
    inlets: Ports::at_least(2, "fuels (tail gas, make-up fuel), combustion air"),
    outlets: Ports::exactly(1, "flue gas"),
    keys: &[
        KeyDoc {
            key: "heats",
            value: ValueKind::Names,
            default: None,
            meaning: "the unit(s) it fires (reformers); their duties are the heat it delivers",
        },
        KeyDoc {
            key: "air",
            value: ValueKind::Names,
            default: None,
            meaning: "the inlet that is the combustion air (a feed; its flow is set)",
        },
        KeyDoc {
            key: "make-up-fuel",
            value: ValueKind::Names,
            default: None,
            meaning: "the fuel inlet whose flow is set to meet the duty (a feed)",
        },
        KeyDoc {
            key: "bridgewall-temperature",
            value: ValueKind::Temperature,
            default: None,
            meaning: "flue gas temperature leaving the radiant box",
        },
        KeyDoc {
            key: "excess-oxygen",
            value: ValueKind::Fraction,
            default: Some("10 %"),
            meaning: "excess air: O2 supplied / O2 stoichiometric - 1",
        },
        KeyDoc {
            key: "heat-loss",
            value: ValueKind::Fraction,
            default: Some("1.5 %"),
            meaning: "casing loss, fraction of the fired duty (LHV)",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost from the lowest inlet pressure to the flue gas",
        },
    ],
    example: "- name: reformer-furnace\n  type: furnace\n  from: [tail-gas, fuel-gas, \
              combustion-air]\n  to: flue-gas\n  heats: reformer\n  air: combustion-air\n  \
              make-up-fuel: fuel-gas\n  bridgewall-temperature: 1010 degC\n  excess-oxygen: 10 %",
    named_ports: None,
    build: build::<Furnace>,
};

/// The inlet position of the stream a name key gives.
fn inlet_named(b: &mut UnitBuilder<'_, '_, FurnaceSpec>, key: &str) -> Result<(usize, String)> {
    let inlets = b.inlets();
    let name = match b.value(key) {
        Some(EntryValue::Scalar(s)) => s.trim().to_string(),
        Some(_) => return Err(b.error(key, "give one inlet stream name")),
        None => {
            return Err(b.error(
                key,
                format!(
                    "a furnace needs `{key}`: the name of one of its inlets ({})",
                    inlets.join(", ")
                ),
            ))
        }
    };
    match inlets.iter().position(|i| *i == name) {
        Some(k) => Ok((k, name)),
        None => Err(b.error(
            key,
            format!(
                "'{name}' is not an inlet of this furnace; its inlets are: {}",
                inlets.join(", ")
            ),
        )),
    }
}

impl UnitKind for Furnace {
    type Spec = FurnaceSpec;

    fn read(b: &mut UnitBuilder<'_, '_, FurnaceSpec>) -> Result<FurnaceSpec> {
        let air = inlet_named(b, "air")?;
        let make_up = inlet_named(b, "make-up-fuel")?;
        if air.0 == make_up.0 {
            return Err(b.error(
                "make-up-fuel",
                "the make-up fuel and the air must be two different inlets",
            ));
        }
        let t = b.required(
            "bridgewall-temperature",
            ValueKind::Temperature,
            "1010 degC",
            |s, v| s.bridgewall_temperature_k = v,
        )?;
        let excess = b
            .number("excess-oxygen", ValueKind::Fraction, Some(0.10), |s, v| {
                s.excess_air = v
            })?
            .unwrap_or(0.10);
        let loss = b
            .number(
                "heat-loss",
                ValueKind::Fraction,
                Some(DEFAULT_HEAT_LOSS),
                |s, v| s.heat_loss_fraction = v,
            )?
            .unwrap_or(DEFAULT_HEAT_LOSS);
        let drop = b.pressure_drop(|s, v| s.pressure_drop_pa = v)?;
        Ok(FurnaceSpec {
            bridgewall_temperature_k: t,
            excess_air: excess,
            heat_loss_fraction: loss,
            pressure_drop_pa: drop,
            air_inlet: air,
            make_up_inlet: make_up,
        })
    }

    fn new(db: &SpeciesDb, name: &str, spec: &FurnaceSpec) -> Result<Furnace> {
        check_numbers(name, spec)?;
        Ok(Furnace {
            name: name.to_string(),
            spec: spec.clone(),
            combustion: Combustion::new(db).context(|| format!("furnace {name}"))?,
        })
    }

    fn spec(&self) -> &FurnaceSpec {
        &self.spec
    }

    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        self.solve_spec(db, &self.spec, inlets, scratch, out)
    }

    fn solve_spec_into(
        &self,
        db: &SpeciesDb,
        name: &str,
        spec: &FurnaceSpec,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        check_numbers(name, spec)?;
        self.solve_spec(db, spec, inlets, scratch, out)
    }
}

/// The numbers of a spec must make sense.
fn check_numbers(name: &str, spec: &FurnaceSpec) -> Result<()> {
    let t = spec.bridgewall_temperature_k;
    if !(t.is_finite() && t > 0.0) {
        return Err(spec_error(
            name,
            "bridgewall-temperature",
            format!("{t} K must be a positive absolute temperature"),
        ));
    }
    if !(spec.excess_air.is_finite() && spec.excess_air >= 0.0) {
        return Err(spec_error(
            name,
            "excess-oxygen",
            format!(
                "{} must be finite and not negative (substoichiometric firing leaves fuel \
                 unburnt, which this model does not follow)",
                spec.excess_air
            ),
        ));
    }
    let f = spec.heat_loss_fraction;
    if !(f.is_finite() && (0.0..1.0).contains(&f)) {
        return Err(spec_error(
            name,
            "heat-loss",
            format!("{f} must be at least 0 and below 1 (a fraction of the fired duty)"),
        ));
    }
    super::common::check_pressure_drop(name, spec.pressure_drop_pa)
}

impl Furnace {
    /// Solve for these inlets delivering `heat_demand_w` (the duty of the units it fires), W.
    pub fn solve_for(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        heat_demand_w: f64,
    ) -> Result<UnitResult> {
        let mut scratch = UnitScratch {
            heat_demand_w,
            ..UnitScratch::default()
        };
        let mut out = UnitResult::default();
        self.solve_spec(db, &self.spec, inlets, &mut scratch, &mut out)?;
        Ok(out)
    }

    fn solve_spec(
        &self,
        db: &SpeciesDb,
        spec: &FurnaceSpec,
        inlets: &[&Stream],
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let name = self.name.as_str();
        check_inlets(db, name, "furnace", inlets, 2, None)?;
        require_vapour(db, name, inlets)?;
        let (a, m) = (spec.air_inlet.0, spec.make_up_inlet.0);
        let (Some(air), Some(make_up)) = (inlets.get(a), inlets.get(m)) else {
            return Err(spec_error(
                name,
                "air",
                "the air or the make-up fuel is not among the inlets given",
            ));
        };
        let c = &self.combustion;
        let t_bw = spec.bridgewall_temperature_k;
        let q = scratch.heat_demand_w;
        let n = db.len();
        let [p0, pm, pa] = &mut scratch.flows;
        for v in [&mut *p0, &mut *pm, &mut *pa] {
            v.clear();
            v.resize(n, 0.0);
        }
        // The fuels the furnace does not set (tail gas): products, oxygen, enthalpy, LHV.
        let (mut d0, mut h0, mut l0, mut other_flow) = (0.0, 0.0, 0.0, 0.0);
        for (k, s) in inlets.iter().enumerate() {
            if k == a || k == m {
                continue;
            }
            d0 += c
                .burn_into(db, &s.flows, 1.0, p0)
                .context(|| format!("furnace {name}"))?;
            h0 += s.enthalpy_w(db)?;
            l0 += c.lhv_w(&s.flows);
            other_flow += s.total();
        }
        // Per mole of make-up fuel and of air (their compositions, temperatures as given).
        let (n_m, n_a) = (make_up.total(), air.total());
        if !(n_m > 0.0 && n_a > 0.0) {
            return Err(spec_error(
                name,
                "inlets",
                "the make-up fuel and the air need a composition with a positive flow",
            ));
        }
        let dm = c
            .burn_into(db, &make_up.flows, 1.0 / n_m, pm)
            .context(|| format!("furnace {name}"))?;
        let hm = make_up.enthalpy_w(db)? / n_m;
        let lm = c.lhv_w(&make_up.flows) / n_m;
        let o2_per_air = -c
            .burn_into(db, &air.flows, 1.0 / n_a, pa)
            .context(|| format!("furnace {name}"))?;
        let ha = air.enthalpy_w(db)? / n_a;
        let la = c.lhv_w(&air.flows) / n_a;
        if !(o2_per_air > 0.0) {
            return Err(spec_error(
                name,
                "air",
                format!(
                    "'{}' brings no oxygen; the combustion air must hold O2",
                    spec.air_inlet.1
                ),
            ));
        }
        // Air y = y0 + x y1 for O2 supplied = (1 + excess) x O2 stoichiometric.
        let e = spec.excess_air;
        let (y0, y1) = ((1.0 + e) * d0 / o2_per_air, (1.0 + e) * dm / o2_per_air);
        // Flue gas enthalpies at the bridgewall, per part.
        let hp0 = mixture::enthalpy(db, p0, t_bw).context(|| format!("furnace {name}"))?;
        let hpm = mixture::enthalpy(db, pm, t_bw).context(|| format!("furnace {name}"))?;
        let hpa = mixture::enthalpy(db, pa, t_bw).context(|| format!("furnace {name}"))?;
        // Heat to the reformer at make-up x: g0 + x g1 (after the casing loss).
        let f = spec.heat_loss_fraction;
        let g0 = h0 + y0 * ha - hp0 - y0 * hpa - f * (l0 + y0 * la);
        let g1 = hm + y1 * ha - hpm - y1 * hpa - f * (lm + y1 * la);
        if !(g1 > 0.0) {
            return Err(spec_error(
                name,
                "make-up-fuel",
                format!(
                    "the make-up fuel '{}' brings no net heat at a bridgewall temperature of {} \
                     ({:.3} kJ per mol burnt); the {:.1} kW the heated units take cannot be met \
                     (short by {:.1} kW after the other fuels); use a fuel with a heating value \
                     or lower the bridgewall temperature",
                    spec.make_up_inlet.1,
                    degc(t_bw),
                    g1 / 1e3,
                    q / 1e3,
                    (q - g0) / 1e3
                ),
            ));
        }
        let x = (q - g0) / g1;
        if !(x >= 0.0) {
            return Err(spec_error(
                name,
                "make-up-fuel",
                format!(
                    "the fuels other than the make-up already give {:.1} kW more than the \
                     {:.1} kW the heated units take (at a bridgewall temperature of {}, \
                     {:.1} % excess air): the make-up fuel would be negative; send less of \
                     that fuel to the furnace, or raise the duty or the bridgewall temperature",
                    (g0 - q) / 1e3,
                    q / 1e3,
                    degc(t_bw),
                    100.0 * e
                ),
            ));
        }
        let y = y0 + x * y1;
        let stoich = d0 + x * dm;
        if !(stoich > 0.0) {
            return Err(spec_error(
                name,
                "inlets",
                "the fuels need no oxygen: there is nothing to burn",
            ));
        }
        // The flue gas: p0 + x pm + y pa, written into p0.
        for ((t, u), v) in p0.iter_mut().zip(pm.iter()).zip(pa.iter()) {
            *t += x * u + y * v;
        }
        // Rounding can leave -0.0-ish O2 at zero excess; keep flows non-negative.
        if p0[c.o2] < 0.0 && p0[c.o2] > -1e-12 * stoich {
            p0[c.o2] = 0.0;
        }
        let p_in = inlets
            .iter()
            .map(|s| s.pressure_pa)
            .fold(f64::INFINITY, f64::min);
        let p_out = outlet_pressure(name, p_in, spec.pressure_drop_pa)?;
        let h_in = h0 + x * hm + y * ha;
        let h_flue = mixture::enthalpy(db, p0, t_bw).context(|| format!("furnace {name}"))?;
        let fired = l0 + x * lm + y * la;
        out.reset(1, n);
        out.set_outlet(0, p0, t_bw, p_out, StreamPhase::Vapour);
        out.duty_w = h_flue - h_in;
        out.inlet_flows.push((m, x));
        out.inlet_flows.push((a, y));
        let flue = &out.outlets[0].flows;
        let total = mixture::total(flue);
        let wet = |i: usize| flue[i] / total;
        let dry = flue[c.o2] / (total - flue[c.h2o]);
        let figures = [
            figure(
                "make-up-fuel-flow",
                "make-up fuel",
                x,
                FigureKind::MolarFlow,
            ),
            figure(
                "other-fuel-flow",
                "other fuels (tail gas)",
                other_flow,
                FigureKind::MolarFlow,
            ),
            figure("air-flow", "combustion air", y, FigureKind::MolarFlow),
            figure("excess-air", "excess air (on O2)", e, FigureKind::Fraction),
            figure(
                "flue-o2-wet",
                "flue gas O2, wet",
                wet(c.o2),
                FigureKind::Fraction,
            ),
            figure("flue-o2-dry", "flue gas O2, dry", dry, FigureKind::Fraction),
            figure(
                "flue-co2-wet",
                "flue gas CO2, wet",
                wet(c.co2),
                FigureKind::Fraction,
            ),
            figure(
                "flue-h2o-wet",
                "flue gas H2O, wet",
                wet(c.h2o),
                FigureKind::Fraction,
            ),
            figure(
                "flue-n2-wet",
                "flue gas N2, wet",
                wet(c.n2),
                FigureKind::Fraction,
            ),
            figure("fired-duty", "fired duty (LHV)", fired, FigureKind::Power),
            figure(
                "heat-to-reformer",
                "heat to the reformer",
                q,
                FigureKind::Power,
            ),
            figure(
                "radiant-efficiency",
                "radiant efficiency (on LHV)",
                q / fired,
                FigureKind::Fraction,
            ),
            figure("heat-loss", "casing loss", f * fired, FigureKind::Power),
        ];
        out.figures.extend(figures);
        Ok(())
    }
}

#[cfg(test)]
#[path = "furnace_tests.rs"]
mod tests;
