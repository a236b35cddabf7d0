//! Exchanger: counter-current heat exchange between a hot side and a cold side, either of them
//! process gas or pure water (liquid or steam).
//!
//! Ports are named: `hot-from`, `hot-to`, `cold-from`, `cold-to`, and `condensate-to` for the
//! water that condenses out of a gas on the hot side. Exactly one of `hot-outlet-temperature`,
//! `cold-outlet-temperature`, `duty` (the heat transferred, positive) or `minimum-approach` (the
//! smaller of the two terminal temperature differences) fixes the heat transferred Q; the other
//! side follows from its energy balance, so that H_hot,in - H_hot,out = H_cold,out - H_cold,in = Q
//! (to the round-off of the temperature search). No heat enters from outside: the unit's duty is
//! zero and Q is the figure `heat-transferred`.
//!
//! - A gas side is an ideal-gas mixture (NASA polynomials); its outlet temperature at an enthalpy
//!   is found by the safeguarded Newton search of the other units. When the hot outlet lies below
//!   the water dew point of the hot gas at its outlet pressure, water condenses: the gas keeps
//!   y_H2O = p_sat(T) / P (Raoult's law on the IAPWS-IF97 saturation line, eq. 30; the flash of
//!   the knockout, [`super::knockout::flash_water`]) and the rest leaves as liquid through
//!   `condensate-to`, its enthalpy that of liquid water of the stream module (the latent heat of
//!   IAPWS SR1-86(1992) taken off), so that Q includes the latent heat. The outlet temperature
//!   is then found by bisection-safeguarded search on temperature
//!   ([`crate::equilibrium::root::solve_increasing`]) between the triple point and the dew
//!   point. Without `condensate-to` condensation is an error.
//! - A pure-water side changes phase on the saturation line at its outlet pressure as a heater
//!   or cooler does ([`super::stream::water_at_enthalpy`]); an outlet that would be wet steam is
//!   an error naming the duties of saturated liquid and saturated steam.
//! - `minimum-approach`: Q is found by the same safeguarded search on Q between zero and the
//!   largest heat either side could take (hot side cooled to the cold inlet, cold side heated to
//!   the hot inlet), on the smaller terminal difference. Only the terminal differences are set;
//!   with condensation or boiling the pinch can lie inside. When a side changes phase the
//!   exchanger therefore also looks inside (the hot side having given q, the cold side at the
//!   same section having taken Q - q): at 10 %, 20 %, ... 90 % of Q and at the kinks of the
//!   curves (the hot gas at its dew point, pure water at saturated steam or saturated liquid),
//!   reports the smallest difference found, ends and inside, as `minimum-difference`, and
//!   refuses a temperature cross inside. Between these points a pinch can still hide on a
//!   strongly curved condensing-gas curve; the search for `minimum-approach` itself sets the
//!   ends only.
//!
//! Terminal differences: hot end = T_hot,in - T_cold,out, cold end = T_hot,out - T_cold,in; both
//! must be positive (a temperature cross is an error naming the two temperatures). The
//! log-mean temperature difference is (dT1 - dT2) / ln(dT1 / dT2), and its limit
//! dT2 (1 + x/2 + x^2/6 + x^3/24), x = ln(dT1 / dT2), for |x| < 1e-3 (equal differences).

use super::common::{
    check_inlets, check_pressure_drop, data_range, degc, dew_point_k, figure, outlet_pressure,
    spec_error, temperature_at_enthalpy, Key,
};
use super::knockout::flash_water;
use super::stream::{check_phases, water_at_enthalpy, water_phase, WaterState};
use super::unit::{
    build, KeyDoc, NamedPorts, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind,
};
use super::{FigureKind, Stream, StreamPhase, UnitResult};
use crate::equilibrium::root::{self, Evaluation, RootOptions, Termination};
use crate::error::{Error, Result, ResultExt};
use crate::thermo::{water, SpeciesDb};

/// Points inside the exchanger where the temperature difference is checked (at k/N of Q).
const INTERNAL_SECTIONS: usize = 10;

/// The keys that fix the heat transferred (exactly one is given).
const TARGET_KEYS: &str = "hot-outlet-temperature, cold-outlet-temperature, duty, minimum-approach";

/// What fixes the heat transferred.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ExchangerTarget {
    /// Hot side outlet temperature, K.
    HotOutletTemperature(f64),
    /// Cold side outlet temperature, K.
    ColdOutletTemperature(f64),
    /// Heat transferred from the hot side to the cold side, W (positive).
    Duty(f64),
    /// The smaller terminal temperature difference, K (positive).
    MinimumApproach(f64),
}

impl ExchangerTarget {
    fn key(&self) -> &'static str {
        match self {
            ExchangerTarget::HotOutletTemperature(_) => "hot-outlet-temperature",
            ExchangerTarget::ColdOutletTemperature(_) => "cold-outlet-temperature",
            ExchangerTarget::Duty(_) => "duty",
            ExchangerTarget::MinimumApproach(_) => "minimum-approach",
        }
    }
}

/// Specification of an exchanger.
#[derive(Debug, Clone, PartialEq)]
pub struct ExchangerSpec {
    /// What fixes the heat transferred.
    pub target: ExchangerTarget,
    /// Pressure drop of the hot side, Pa.
    pub hot_pressure_drop_pa: f64,
    /// Pressure drop of the cold side, Pa.
    pub cold_pressure_drop_pa: f64,
    /// True when the unit has a condensate outlet (`condensate-to`), its third outlet.
    pub condensate_outlet: bool,
}

/// An exchanger ready to solve.
#[derive(Debug, Clone)]
pub struct Exchanger {
    name: String,
    spec: ExchangerSpec,
    key: Key,
}

static PORTS: NamedPorts = NamedPorts {
    inlets: &["hot-from", "cold-from"],
    outlets: &["hot-to", "cold-to"],
    optional_outlets: &["condensate-to"],
};

/// The `exchanger` unit type.
pub static TYPE: UnitType = UnitType {
    name: "exchanger",
    summary: "Counter-current heat exchange between a hot and a cold stream (gas or water) at a \
              hot or cold outlet temperature, a duty or a minimum approach; water condensing \
              from the hot gas leaves through `condensate-to`.",
    inlets: Ports::exactly(2, "hot side, cold side"),
    outlets: Ports {
        min: 2,
        max: Some(3),
        meaning: "hot side, cold side, condensate of the hot side (optional)",
    },
    named_ports: Some(&PORTS),
    keys: &[
        KeyDoc {
            key: "hot-outlet-temperature",
            value: ValueKind::Temperature,
            default: None,
            meaning: "hot side outlet temperature; or one of cold-outlet-temperature, duty, \
                      minimum-approach",
        },
        KeyDoc {
            key: "cold-outlet-temperature",
            value: ValueKind::Temperature,
            default: None,
            meaning: "cold side outlet temperature; or one of the other three",
        },
        KeyDoc {
            key: "duty",
            value: ValueKind::Duty,
            default: None,
            meaning: "heat transferred from the hot to the cold side (positive); or one of the \
                      other three",
        },
        KeyDoc {
            key: "minimum-approach",
            value: ValueKind::TemperatureDifference,
            default: None,
            meaning: "the smaller terminal temperature difference (only the ends are set; the \
                      figure minimum-difference also looks inside); or one of the other three",
        },
        KeyDoc {
            key: "hot-pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost on the hot side",
        },
        KeyDoc {
            key: "cold-pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost on the cold side",
        },
    ],
    example: "- name: gas-water-exchanger\n  type: exchanger\n  hot-from: reformed-gas\n  \
              hot-to: cooled-gas\n  cold-from: boiler-feed-water\n  cold-to: hot-water\n  \
              hot-outlet-temperature: 350 degC",
    build: build::<Exchanger>,
};

impl UnitKind for Exchanger {
    type Spec = ExchangerSpec;

    fn read(b: &mut UnitBuilder<'_, '_, ExchangerSpec>) -> Result<ExchangerSpec> {
        let given = [
            "hot-outlet-temperature",
            "cold-outlet-temperature",
            "duty",
            "minimum-approach",
        ]
        .iter()
        .filter(|k| b.has(k))
        .count();
        if given != 1 {
            return Err(b.error(
                TARGET_KEYS,
                format!("give exactly one of {TARGET_KEYS}; {given} given"),
            ));
        }
        use ExchangerTarget as T;
        let target = if let Some(t) = b.number(
            "hot-outlet-temperature",
            ValueKind::Temperature,
            None,
            |s: &mut ExchangerSpec, v| s.target = T::HotOutletTemperature(v),
        )? {
            T::HotOutletTemperature(t)
        } else if let Some(t) = b.number(
            "cold-outlet-temperature",
            ValueKind::Temperature,
            None,
            |s: &mut ExchangerSpec, v| s.target = T::ColdOutletTemperature(v),
        )? {
            T::ColdOutletTemperature(t)
        } else if let Some(q) =
            b.number("duty", ValueKind::Duty, None, |s: &mut ExchangerSpec, v| {
                s.target = T::Duty(v)
            })?
        {
            T::Duty(q)
        } else {
            T::MinimumApproach(b.required(
                "minimum-approach",
                ValueKind::TemperatureDifference,
                "10 K",
                |s: &mut ExchangerSpec, v| s.target = T::MinimumApproach(v),
            )?)
        };
        let hot_pressure_drop_pa = b
            .number(
                "hot-pressure-drop",
                ValueKind::PressureDifference,
                Some(0.0),
                |s: &mut ExchangerSpec, v| s.hot_pressure_drop_pa = v,
            )?
            .unwrap_or(0.0);
        let cold_pressure_drop_pa = b
            .number(
                "cold-pressure-drop",
                ValueKind::PressureDifference,
                Some(0.0),
                |s: &mut ExchangerSpec, v| s.cold_pressure_drop_pa = v,
            )?
            .unwrap_or(0.0);
        Ok(ExchangerSpec {
            target,
            hot_pressure_drop_pa,
            cold_pressure_drop_pa,
            condensate_outlet: b.outlets().len() == 3,
        })
    }

    /// Check the spec and prepare.
    fn new(db: &SpeciesDb, name: &str, spec: &ExchangerSpec) -> Result<Exchanger> {
        let key = spec.target.key();
        match spec.target {
            ExchangerTarget::HotOutletTemperature(t)
            | ExchangerTarget::ColdOutletTemperature(t)
                if !(t.is_finite() && t > 0.0) =>
            {
                return Err(spec_error(
                    name,
                    key,
                    format!("{t} K must be a positive absolute temperature"),
                ));
            }
            ExchangerTarget::Duty(q) if !(q.is_finite() && q > 0.0) => {
                return Err(spec_error(
                    name,
                    key,
                    format!(
                        "{:.3} kW: the heat transferred from the hot to the cold side must be \
                         positive (swap the hot and cold sides to send heat the other way)",
                        q / 1e3
                    ),
                ));
            }
            ExchangerTarget::MinimumApproach(d) if !(d.is_finite() && d > 0.0) => {
                return Err(spec_error(
                    name,
                    key,
                    format!("{d} K: a minimum approach must be positive"),
                ));
            }
            _ => {}
        }
        check_pressure_drop(name, spec.hot_pressure_drop_pa)?;
        check_pressure_drop(name, spec.cold_pressure_drop_pa)?;
        Ok(Exchanger {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
        })
    }

    fn spec(&self) -> &ExchangerSpec {
        &self.spec
    }

    /// Exchange heat into `out` (its buffers and `scratch` reused).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let name = &self.name;
        let w = self.key.h2o;
        check_inlets(db, name, "exchanger", inlets, 2, Some(2))?;
        check_phases(db, name, w, inlets)?;
        let (hot, cold) = (inlets[0], inlets[1]);
        if hot.temperature_k <= cold.temperature_k {
            return Err(spec_error(
                name,
                "hot-from",
                format!(
                    "the hot side enters at {}, not above the cold side's {}: no heat can pass \
                     from hot to cold; swap hot-from and cold-from (and hot-to and cold-to)",
                    degc(hot.temperature_k),
                    degc(cold.temperature_k)
                ),
            ));
        }
        let sides = Sides {
            db,
            name,
            w,
            key: &self.key,
            hot,
            cold,
            p_hot: outlet_pressure(name, hot.pressure_pa, self.spec.hot_pressure_drop_pa)?,
            p_cold: outlet_pressure(name, cold.pressure_pa, self.spec.cold_pressure_drop_pa)?,
            h_hot_in: hot
                .enthalpy_w(db)
                .context(|| format!("unit '{name}', hot inlet enthalpy"))?,
            h_cold_in: cold
                .enthalpy_w(db)
                .context(|| format!("unit '{name}', cold inlet enthalpy"))?,
            hot_water: hot.is_pure_water(w),
            cold_water: cold.is_pure_water(w),
        };
        let n_out = if self.spec.condensate_outlet { 3 } else { 2 };
        out.reset(n_out, db.len());
        out.equilibrium = None;
        // The condensate is worked out in a scratch buffer and copied to its outlet if the unit
        // has one (no heap allocation once the buffer has its size).
        let mut cond = Stream::liquid(std::mem::take(&mut scratch.flows[0]), 0.0, 0.0);
        cond.flows.clear();
        cond.flows.resize(db.len(), 0.0);
        let result = self.solve_sides(&sides, out, &mut cond);
        if result.is_ok() && self.spec.condensate_outlet {
            let c = &cond;
            out.set_outlet(
                2,
                &c.flows,
                c.temperature_k,
                c.pressure_pa,
                StreamPhase::Liquid,
            );
        }
        scratch.flows[0] = cond.flows;
        result
    }
}

impl Exchanger {
    /// The solve proper: the hot and cold outlets into `out`, the condensate into `cond`.
    fn solve_sides(&self, s: &Sides<'_>, out: &mut UnitResult, cond: &mut Stream) -> Result<()> {
        let name = &self.name;
        let (hot, cold) = (s.hot, s.cold);
        let target_key = self.spec.target.key();
        let (hot_part, cold_part) = out.outlets.split_at_mut(1);
        let (hot_out, cold_out) = (&mut hot_part[0], &mut cold_part[0]);
        let q = match self.spec.target {
            ExchangerTarget::HotOutletTemperature(t) => {
                if t >= hot.temperature_k {
                    return Err(spec_error(
                        name,
                        target_key,
                        format!(
                            "the hot side must be cooled: inlet {}, outlet {}",
                            degc(hot.temperature_k),
                            degc(t)
                        ),
                    ));
                }
                if t <= cold.temperature_k {
                    return Err(cold_end_cross(name, target_key, t, cold.temperature_k));
                }
                s.h_hot_in - s.hot_at_temperature(target_key, t, hot_out, cond)?
            }
            ExchangerTarget::ColdOutletTemperature(t) => {
                if t <= cold.temperature_k {
                    return Err(spec_error(
                        name,
                        target_key,
                        format!(
                            "the cold side must be heated: inlet {}, outlet {}",
                            degc(cold.temperature_k),
                            degc(t)
                        ),
                    ));
                }
                if t >= hot.temperature_k {
                    return Err(hot_end_cross(name, target_key, t, hot.temperature_k));
                }
                s.cold_at_temperature(target_key, t, cold_out)? - s.h_cold_in
            }
            ExchangerTarget::Duty(q) => q,
            ExchangerTarget::MinimumApproach(d) => {
                self.duty_at_approach(s, d, hot_out, cold_out, cond)?
            }
        };
        // Both sides at the heat transferred, each from its own energy balance.
        let (hot_wet, cold_wet) = self.states(s, q, hot_out, cold_out, cond)?;
        for (wet, side, stream, h_in, sign) in [
            (hot_wet, "hot", &*hot_out, s.h_hot_in, -1.0),
            (cold_wet, "cold", &*cold_out, s.h_cold_in, 1.0),
        ] {
            if let Some(w) = wet {
                return Err(spec_error(
                    name,
                    target_key,
                    format!(
                        "the {side} side's water would leave as wet steam at its saturation \
                         temperature {} and {:.4} bar, {:.1} % vapour by mole; a stream here is \
                         either liquid or vapour: give a duty of at most {:.3} kW or at least \
                         {:.3} kW, or an outlet temperature",
                        degc(stream.temperature_k),
                        stream.pressure_pa / 1e5,
                        100.0 * w.vapour_fraction,
                        sign * (w.first_w - h_in) / 1e3,
                        sign * (w.second_w - h_in) / 1e3
                    ),
                ));
            }
        }
        let (th_in, tc_in) = (hot.temperature_k, cold.temperature_k);
        let (th_out, tc_out) = (hot_out.temperature_k, cold_out.temperature_k);
        if tc_out >= th_in {
            return Err(hot_end_cross(name, target_key, tc_out, th_in));
        }
        if th_out <= tc_in {
            return Err(cold_end_cross(name, target_key, th_out, tc_in));
        }
        let condensed = cond.flows[s.w];
        let dew = if s.hot_water {
            None
        } else {
            dew_point_k(s.key, &hot.flows, s.p_hot)
        };
        if condensed > 0.0 && !self.spec.condensate_outlet {
            let m = condensed * s.db.by_index(s.w).molar_mass_kg_per_mol * 3600.0;
            return Err(spec_error(
                name,
                target_key,
                format!(
                    "the hot outlet {} is below the water dew point of the hot gas {} at {:.4} \
                     bar: {m:.1} kg/h of water would condense; add `condensate-to: NAME` for \
                     the condensate, or keep the hot outlet above the dew point",
                    degc(th_out),
                    dew.map_or_else(|| "-".to_string(), degc),
                    s.p_hot / 1e5
                ),
            ));
        }
        // Points inside: the hot side having given q_k, the cold side there having taken
        // Q - q_k (the outlet buffers serve as probes, then the outlets are set again).
        let (hot_end, cold_end) = (th_in - tc_out, th_out - tc_in);
        let mut smallest = hot_end.min(cold_end);
        let mut inside: Option<(f64, f64, f64)> = None;
        if s.hot_water || s.cold_water || condensed > 0.0 {
            let kinks = s.kinks(q, hot_out, cold_out)?;
            let sections = (1..INTERNAL_SECTIONS).map(|k| q * k as f64 / INTERNAL_SECTIONS as f64);
            for qk in sections.chain(kinks.into_iter().flatten()) {
                s.hot_at_duty(qk, hot_out, cond)?;
                s.cold_at_duty(q - qk, cold_out)?;
                let d = hot_out.temperature_k - cold_out.temperature_k;
                if d < smallest {
                    smallest = d;
                    inside = Some((hot_out.temperature_k, cold_out.temperature_k, qk / q));
                }
            }
            self.states(s, q, hot_out, cold_out, cond)?;
        }
        if let Some((th, tc, f)) = inside.filter(|_| smallest <= 0.0) {
            return Err(spec_error(
                name,
                target_key,
                format!(
                    "the temperatures cross inside the exchanger: at {:.0} % of the heat \
                     transferred the hot side is at {} and the cold side at {} (phase change \
                     makes a pinch inside); transfer less heat",
                    100.0 * f,
                    degc(th),
                    degc(tc)
                ),
            ));
        }
        out.duty_w = 0.0;
        let figures = [
            ("heat-transferred", "heat transferred", q, FigureKind::Power),
            (
                "hot-end-difference",
                "hot end: hot in - cold out",
                hot_end,
                FigureKind::TemperatureDifference,
            ),
            (
                "cold-end-difference",
                "cold end: hot out - cold in",
                cold_end,
                FigureKind::TemperatureDifference,
            ),
            (
                "lmtd",
                "log-mean temperature difference",
                lmtd(hot_end, cold_end),
                FigureKind::TemperatureDifference,
            ),
            (
                "minimum-difference",
                "smallest difference, ends and inside",
                smallest,
                FigureKind::TemperatureDifference,
            ),
            (
                "hot-outlet-temperature",
                "hot outlet temperature",
                th_out,
                FigureKind::Temperature,
            ),
            (
                "cold-outlet-temperature",
                "cold outlet temperature",
                tc_out,
                FigureKind::Temperature,
            ),
        ];
        for (key, label, value, kind) in figures {
            out.figures.push(figure(key, label, value, kind));
        }
        if let Some(dew) = dew {
            out.figures.push(figure(
                "hot-dew-point",
                "water dew point of the hot gas",
                dew,
                FigureKind::Temperature,
            ));
            out.figures.push(figure(
                "condensed-water",
                "water condensed on the hot side",
                condensed * s.db.by_index(s.w).molar_mass_kg_per_mol,
                FigureKind::MassFlow,
            ));
        }
        Ok(())
    }

    /// Both outlets (and the condensate) at the heat transferred `q`: the side whose outlet
    /// temperature is given at that temperature, the other from its energy balance; wet steam
    /// on either side as `Some`.
    fn states(
        &self,
        s: &Sides<'_>,
        q: f64,
        hot_out: &mut Stream,
        cold_out: &mut Stream,
        cond: &mut Stream,
    ) -> Result<(Option<Wet>, Option<Wet>)> {
        let key = self.spec.target.key();
        let hot = match self.spec.target {
            ExchangerTarget::HotOutletTemperature(t) => {
                s.hot_at_temperature(key, t, hot_out, cond)?;
                None
            }
            _ => s.hot_at_duty(q, hot_out, cond)?,
        };
        let cold = match self.spec.target {
            ExchangerTarget::ColdOutletTemperature(t) => {
                s.cold_at_temperature(key, t, cold_out)?;
                None
            }
            _ => s.cold_at_duty(q, cold_out)?,
        };
        Ok((hot, cold))
    }

    /// The heat transferred at which the smaller terminal difference equals `approach`: the
    /// safeguarded search of [`root::solve_increasing`] (bisection, no slope) on
    /// approach - min(hot end, cold end), which grows with Q.
    fn duty_at_approach(
        &self,
        s: &Sides<'_>,
        approach: f64,
        hot_out: &mut Stream,
        cold_out: &mut Stream,
        cond: &mut Stream,
    ) -> Result<f64> {
        let name = &self.name;
        let (th_in, tc_in) = (s.hot.temperature_k, s.cold.temperature_k);
        if approach >= th_in - tc_in {
            return Err(spec_error(
                name,
                "minimum-approach",
                format!(
                    "{approach} K is not below the difference of the inlets, {} - {} = \
                     {:.3} K: no heat can pass; give a smaller minimum approach",
                    degc(th_in),
                    degc(tc_in),
                    th_in - tc_in
                ),
            ));
        }
        // The most either side could take: the hot side cooled to the cold inlet, the cold
        // side heated to the hot inlet.
        let hot_most =
            s.h_hot_in - s.hot_at_temperature("minimum-approach", tc_in, hot_out, cond)?;
        let cold_most = s.cold_at_temperature("minimum-approach", th_in, cold_out)? - s.h_cold_in;
        let q_max = hot_most.min(cold_most);
        let options = RootOptions {
            residual_tolerance: 1e-9,
            step_tolerance: 1e-13 * q_max,
            max_iterations: 200,
        };
        let root = root::solve_increasing(0.0, q_max, 0.5 * q_max, options, |q| {
            s.hot_at_duty(q, hot_out, cond)?;
            s.cold_at_duty(q, cold_out)?;
            let hot_end = th_in - cold_out.temperature_k;
            let cold_end = hot_out.temperature_k - tc_in;
            Ok::<_, Error>(Evaluation {
                value: approach - hot_end.min(cold_end),
                slope: None,
            })
        })?;
        match root.termination {
            Termination::Converged | Termination::BracketNarrowed if root.residual <= 1e-6 => {
                Ok(root.x)
            }
            termination => Err(Error::NotConverged {
                what: format!("minimum approach of exchanger '{name}'"),
                iterations: root.iterations,
                residual: root.residual,
                hint: format!("; the search on the heat transferred stopped: {termination}"),
            }),
        }
    }
}

/// Wet steam on a water side: its vapour fraction and the enthalpy flows (W) of the side at the
/// two ends of the wet region, in the order the side passes them.
#[derive(Debug, Clone, Copy)]
struct Wet {
    vapour_fraction: f64,
    first_w: f64,
    second_w: f64,
}

/// The two sides of one solve.
struct Sides<'a> {
    db: &'a SpeciesDb,
    name: &'a str,
    w: usize,
    key: &'a Key,
    hot: &'a Stream,
    cold: &'a Stream,
    p_hot: f64,
    p_cold: f64,
    h_hot_in: f64,
    h_cold_in: f64,
    hot_water: bool,
    cold_water: bool,
}

impl Sides<'_> {
    /// Heat given by the hot side (0 < q < `q_total`) at the kinks of the two curves, where
    /// the pinch of a phase change sits: the hot gas reaching its dew point, pure water on
    /// either side reaching saturated steam or saturated liquid. `a` and `b` are work buffers.
    fn kinks(&self, q_total: f64, a: &mut Stream, b: &mut Stream) -> Result<[Option<f64>; 4]> {
        let mut out = [None; 4];
        let inside = |q: f64| (q > 0.0 && q < q_total).then_some(q);
        let saturated = |inlet: &Stream, p: f64, s: &mut Stream| -> Result<Option<(f64, f64)>> {
            if !(water::SATURATION_MIN_PRESSURE_PA..=water::CRITICAL_PRESSURE_PA).contains(&p) {
                return Ok(None);
            }
            let t_s = water::saturation_temperature_k(p)?;
            s.flows.copy_from_slice(&inlet.flows);
            s.temperature_k = t_s;
            s.pressure_pa = p;
            s.phase = StreamPhase::Vapour;
            let vapour = s.enthalpy_w(self.db)?;
            s.phase = StreamPhase::Liquid;
            Ok(Some((vapour, s.enthalpy_w(self.db)?)))
        };
        if self.hot_water {
            if let Some((hv, hl)) = saturated(self.hot, self.p_hot, a)? {
                out[0] = inside(self.h_hot_in - hv);
                out[1] = inside(self.h_hot_in - hl);
            }
        } else if let Some(dew) = dew_point_k(self.key, &self.hot.flows, self.p_hot) {
            if dew < self.hot.temperature_k {
                a.flows.copy_from_slice(&self.hot.flows);
                a.temperature_k = dew;
                a.pressure_pa = self.p_hot;
                a.phase = StreamPhase::Vapour;
                out[0] = inside(self.h_hot_in - a.enthalpy_w(self.db)?);
            }
        }
        if self.cold_water {
            if let Some((hv, hl)) = saturated(self.cold, self.p_cold, b)? {
                out[2] = inside(q_total - (hl - self.h_cold_in));
                out[3] = inside(q_total - (hv - self.h_cold_in));
            }
        }
        Ok(out)
    }

    /// The hot side's outlet at temperature `t` into `gas` and `cond` (the condensate, empty
    /// unless water condenses from a gas); returns their enthalpy, W.
    fn hot_at_temperature(
        &self,
        field: &str,
        t: f64,
        gas: &mut Stream,
        cond: &mut Stream,
    ) -> Result<f64> {
        let (db, w, inlet) = (self.db, self.w, self.hot);
        gas.flows.copy_from_slice(&inlet.flows);
        gas.temperature_k = t;
        gas.pressure_pa = self.p_hot;
        cond.flows.iter_mut().for_each(|n| *n = 0.0);
        cond.temperature_k = t;
        cond.pressure_pa = self.p_hot;
        cond.phase = StreamPhase::Liquid;
        if self.hot_water {
            gas.phase = water_phase(t, self.p_hot)
                .map_err(|e| spec_error(self.name, field, format!("hot side water: {e}")))?;
        } else {
            gas.phase = StreamPhase::Vapour;
            let water_in = inlet.flows[w];
            if water_in > 0.0 && t < water::CRITICAL_TEMPERATURE_K {
                if t < water::TRIPLE_POINT_TEMPERATURE_K {
                    return Err(spec_error(
                        self.name,
                        field,
                        format!(
                            "the hot gas would be cooled to {}, below the triple point of \
                             water (0.01 degC): its water would freeze",
                            degc(t)
                        ),
                    ));
                }
                let dry = inlet.total() - water_in;
                let (held, condensed) = flash_water(water_in, dry, t, self.p_hot)?;
                gas.flows[w] = held;
                cond.flows[w] = condensed;
            }
        }
        Ok(gas.enthalpy_w(db)? + cond.enthalpy_w(db)?)
    }

    /// The hot side's outlet after giving up `q` W, into `gas` and `cond`; `Some` when pure
    /// water would be wet steam (the streams then hold saturated steam).
    fn hot_at_duty(&self, q: f64, gas: &mut Stream, cond: &mut Stream) -> Result<Option<Wet>> {
        let (db, name, w, inlet) = (self.db, self.name, self.w, self.hot);
        let target = self.h_hot_in - q;
        if self.hot_water {
            cond.flows.iter_mut().for_each(|n| *n = 0.0);
            let state = water_at_enthalpy(
                db,
                name,
                w,
                &inlet.flows,
                target,
                self.p_hot,
                inlet.temperature_k,
            )?;
            return Ok(set_water(state, inlet, self.p_hot, gas, true));
        }
        // Above the dew point (or without water): all vapour, Newton on temperature.
        let dew = dew_point_k(self.key, &inlet.flows, self.p_hot);
        // A saturated inlet (after a knockout) condenses from the start: its own temperature.
        let h_dew = match dew {
            Some(d) => {
                let d = d.min(inlet.temperature_k);
                Some((d, self.hot_at_temperature("duty", d, gas, cond)?))
            }
            None => None,
        };
        if h_dew.is_none_or(|(_, h)| target >= h) {
            let t = temperature_at_enthalpy(db, name, &inlet.flows, target, inlet.temperature_k)?;
            self.hot_at_temperature("duty", t, gas, cond)?;
            // Rounding can leave the root a hair below the dew point: no water condenses there.
            if let Some(c) = cond.flows.get_mut(w) {
                if *c > 0.0 {
                    gas.flows[w] += *c;
                    *c = 0.0;
                }
            }
            return Ok(None);
        }
        let Some((dew, _)) = h_dew else {
            return Ok(None);
        };
        // Below the dew point: the temperature at which gas and condensate hold the target.
        let lo = data_range(db, &inlet.flows)
            .0
            .max(water::TRIPLE_POINT_TEMPERATURE_K);
        let scale = inlet.total() * crate::quantity::R_GAS * inlet.temperature_k;
        let options = RootOptions {
            residual_tolerance: 1e-13,
            step_tolerance: 1e-11,
            max_iterations: 200,
        };
        let root = root::solve_increasing(lo, dew, dew, options, |t| {
            let h = self.hot_at_temperature("duty", t, gas, cond)?;
            Ok::<_, Error>(Evaluation {
                value: (h - target) / scale,
                slope: None,
            })
        })?;
        match root.termination {
            Termination::Converged | Termination::BracketNarrowed if root.residual <= 1e-9 => {
                self.hot_at_temperature("duty", root.x, gas, cond)?;
                Ok(None)
            }
            // Without a slope the search only bisects and never evaluates the lower end, so a
            // root below it shows as a bracket narrowed onto that end with a large residual.
            Termination::RootBelowBracket | Termination::BracketNarrowed
                if root.termination == Termination::RootBelowBracket
                    || root.x <= lo + options.step_tolerance =>
            {
                Err(spec_error(
                    name,
                    "duty",
                    format!(
                        "the hot gas would be cooled below {} (the triple point of water or the \
                         species data range); transfer less heat",
                        degc(lo)
                    ),
                ))
            }
            termination => Err(Error::NotConverged {
                what: format!("hot side energy balance of exchanger '{name}'"),
                iterations: root.iterations,
                residual: root.residual,
                hint: format!("; the temperature search stopped: {termination}"),
            }),
        }
    }

    /// The cold side's outlet at temperature `t` into `s`; returns its enthalpy, W.
    fn cold_at_temperature(&self, field: &str, t: f64, s: &mut Stream) -> Result<f64> {
        let inlet = self.cold;
        s.flows.copy_from_slice(&inlet.flows);
        s.temperature_k = t;
        s.pressure_pa = self.p_cold;
        s.phase = if self.cold_water {
            water_phase(t, self.p_cold)
                .map_err(|e| spec_error(self.name, field, format!("cold side water: {e}")))?
        } else {
            StreamPhase::Vapour
        };
        s.enthalpy_w(self.db)
    }

    /// The cold side's outlet after taking `q` W, into `s`; `Some` when pure water would be wet
    /// steam (the stream then holds saturated steam).
    fn cold_at_duty(&self, q: f64, s: &mut Stream) -> Result<Option<Wet>> {
        let (db, name, inlet) = (self.db, self.name, self.cold);
        let target = self.h_cold_in + q;
        if self.cold_water {
            let state = water_at_enthalpy(
                db,
                name,
                self.w,
                &inlet.flows,
                target,
                self.p_cold,
                inlet.temperature_k,
            )?;
            return Ok(set_water(state, inlet, self.p_cold, s, false));
        }
        let t = temperature_at_enthalpy(db, name, &inlet.flows, target, inlet.temperature_k)?;
        self.cold_at_temperature("duty", t, s)?;
        Ok(None)
    }
}

/// Pure water in the state found from its enthalpy, into `s`; `Some` for wet steam (`s` then
/// holds saturated steam). `cooling`: the side gives heat (saturated steam is met first).
fn set_water(
    state: WaterState,
    inlet: &Stream,
    p: f64,
    s: &mut Stream,
    cooling: bool,
) -> Option<Wet> {
    s.flows.copy_from_slice(&inlet.flows);
    s.pressure_pa = p;
    let (t, phase, wet) = match state {
        WaterState::Liquid(t) => (t, StreamPhase::Liquid, None),
        WaterState::Vapour(t) => (t, StreamPhase::Vapour, None),
        WaterState::Wet {
            temperature_k,
            vapour_fraction,
            saturated_liquid_w,
            saturated_vapour_w,
        } => {
            let (first_w, second_w) = if cooling {
                (saturated_vapour_w, saturated_liquid_w)
            } else {
                (saturated_liquid_w, saturated_vapour_w)
            };
            (
                temperature_k,
                StreamPhase::Vapour,
                Some(Wet {
                    vapour_fraction,
                    first_w,
                    second_w,
                }),
            )
        }
    };
    s.temperature_k = t;
    s.phase = phase;
    wet
}

/// The error of a cold outlet at or above the hot inlet.
fn hot_end_cross(name: &str, field: &str, tc_out: f64, th_in: f64) -> Error {
    spec_error(
        name,
        field,
        format!(
            "temperature cross at the hot end: the cold outlet {} would be at or above the hot \
             inlet {}; transfer less heat (a lower duty or cold outlet temperature, a higher hot \
             outlet temperature) or give a minimum-approach",
            degc(tc_out),
            degc(th_in)
        ),
    )
}

/// The error of a hot outlet at or below the cold inlet.
fn cold_end_cross(name: &str, field: &str, th_out: f64, tc_in: f64) -> Error {
    spec_error(
        name,
        field,
        format!(
            "temperature cross at the cold end: the hot outlet {} would be at or below the cold \
             inlet {}; transfer less heat (a higher hot outlet temperature, a lower duty or cold \
             outlet temperature) or give a minimum-approach",
            degc(th_out),
            degc(tc_in)
        ),
    )
}

/// Log-mean temperature difference of two terminal differences (both positive), K; the series
/// dT2 (1 + x/2 + x^2/6 + x^3/24), x = ln(dT1/dT2), where they are nearly equal (|x| < 1e-3,
/// truncation below 1e-13 relative).
pub fn lmtd(dt1: f64, dt2: f64) -> f64 {
    let x = (dt1 / dt2).ln();
    if x.abs() < 1e-3 {
        dt2 * (1.0 + x / 2.0 + x * x / 6.0 + x * x * x / 24.0)
    } else {
        (dt1 - dt2) / x
    }
}

#[cfg(test)]
#[path = "exchanger_tests.rs"]
mod tests;
