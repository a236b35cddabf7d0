//! Knockout drum: cools the gas to the drum temperature (or keeps the inlet's) and condenses
//! water at that temperature and pressure.
//!
//! Raoult's law for water over pure liquid water, the rest insoluble: when the gas would be
//! supersaturated, y_H2O = p_sat(T) / P with p_sat from IAPWS-IF97 eq. (30)
//! ([`crate::thermo::water::saturation_pressure_pa`]), i.e. the gas keeps
//! n_H2O = y_sat n_dry / (1 - y_sat) and the rest leaves as condensate. The condensate's
//! enthalpy is that of pure liquid water, IAPWS-IF97 Region 1 on the NASA ideal-gas basis
//! ([`super::stream::pure_water_enthalpy_w`]). Duty = H(gas) + H(condensate) - H(inlet).

use super::common::{
    check_inlets, check_pressure_drop, check_temperature, degc, dew_point_k, figure,
    outlet_pressure, require_vapour, spec_error, Key,
};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, StreamPhase, UnitResult, Warning};
use crate::error::{Result, ResultExt};
use crate::thermo::{water, SpeciesDb};

/// Lowest drum temperature, K: the triple point of water (IAPWS), where the latent-heat
/// correlation starts.
const TRIPLE_POINT_K: f64 = 273.16;

/// Water condensing from a gas at `t_k` and `p_pa` (below the critical temperature of water):
/// `water_in` mol/s of water with `dry` mol/s of other (insoluble) species. Returns (water left
/// in the gas, condensate), mol/s: when the gas would be supersaturated it keeps
/// n_H2O = y_sat n_dry / (1 - y_sat) with y_sat = p_sat(T) / P (IAPWS-IF97 eq. 30); otherwise all
/// the water stays in the gas. Shared by the knockout and the exchanger's hot side.
pub(crate) fn flash_water(water_in: f64, dry: f64, t_k: f64, p_pa: f64) -> Result<(f64, f64)> {
    let y_sat = water::saturation_pressure_pa(t_k)? / p_pa;
    if y_sat < 1.0 {
        let held = y_sat * dry / (1.0 - y_sat);
        if water_in > held {
            return Ok((held, water_in - held));
        }
    }
    Ok((water_in, 0.0))
}

/// Specification of a knockout drum.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct KnockoutSpec {
    /// Drum temperature, K; `None` keeps the inlet temperature.
    pub temperature_k: Option<f64>,
    /// Pressure drop, Pa.
    pub pressure_drop_pa: f64,
}

/// A knockout drum ready to solve.
#[derive(Debug, Clone)]
pub struct Knockout {
    name: String,
    spec: KnockoutSpec,
    key: Key,
}

/// The `knockout` unit type.
pub static TYPE: UnitType = UnitType {
    name: "knockout",
    summary: "Knockout drum: the gas cooled to the drum temperature and the water that condenses \
              there separated (Raoult's law on the IAPWS-IF97 saturation line).",
    inlets: Ports::exactly(1, "wet gas"),
    outlets: Ports::exactly(2, "gas, condensate"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "temperature",
            value: ValueKind::Temperature,
            default: Some("the inlet temperature"),
            meaning: "drum temperature",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost across the unit",
        },
    ],
    example: "- name: knockout\n  type: knockout\n  from: cooled-gas\n  to: [raw-hydrogen, \
              process-condensate]\n  temperature: 40 degC",
    build: build::<Knockout>,
};

impl UnitKind for Knockout {
    type Spec = KnockoutSpec;

    fn read(b: &mut UnitBuilder<'_, '_, KnockoutSpec>) -> Result<KnockoutSpec> {
        Ok(KnockoutSpec {
            temperature_k: b.number("temperature", ValueKind::Temperature, None, |s, v| {
                s.temperature_k = Some(v)
            })?,
            pressure_drop_pa: b.pressure_drop(|s, v| s.pressure_drop_pa = v)?,
        })
    }

    /// Check the spec and prepare.
    fn new(db: &SpeciesDb, name: &str, spec: &KnockoutSpec) -> Result<Knockout> {
        if let Some(t) = spec.temperature_k {
            if !(t.is_finite() && t >= TRIPLE_POINT_K) {
                return Err(spec_error(
                    name,
                    "temperature",
                    format!(
                        "{t} K: a knockout drum works above the triple point of water \
                         (273.16 K, 0.01 degC)"
                    ),
                ));
            }
        }
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Knockout {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
        })
    }

    fn spec(&self) -> &KnockoutSpec {
        &self.spec
    }

    /// Cool and separate into `out` (its buffers reused: no heap allocation once they have
    /// their size, but for the warning above the critical temperature).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        _: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let name = &self.name;
        let w = self.key.h2o;
        check_inlets(db, name, "knockout", inlets, 1, Some(1))?;
        require_vapour(db, name, inlets)?;
        let inlet = inlets[0];
        let t = self.spec.temperature_k.unwrap_or(inlet.temperature_k);
        if t > inlet.temperature_k {
            return Err(spec_error(
                name,
                "temperature",
                format!(
                    "a knockout cools: inlet {}, drum {}; heat the gas in a heater instead",
                    degc(inlet.temperature_k),
                    degc(t)
                ),
            ));
        }
        check_temperature(db, name, "temperature", &inlet.flows, t)?;
        let p = outlet_pressure(name, inlet.pressure_pa, self.spec.pressure_drop_pa)?;
        out.reset(2, db.len());
        out.equilibrium = None;
        // Gas: the inlet with the water it can hold; condensate: the rest of the water.
        out.set_outlet(0, &inlet.flows, t, p, StreamPhase::Vapour);
        let condensate = &mut out.outlets[1];
        condensate.temperature_k = t;
        condensate.pressure_pa = p;
        condensate.phase = StreamPhase::Liquid;
        let water_in = inlet.flows[w];
        let dry: f64 = inlet.flows.iter().sum::<f64>() - water_in;
        if t < TRIPLE_POINT_K {
            return Err(spec_error(
                name,
                "temperature",
                format!("{t} K is below the triple point of water (273.16 K): it would freeze"),
            ));
        }
        if t < water::CRITICAL_TEMPERATURE_K {
            let (held, condensed) =
                flash_water(water_in, dry, t, p).context(|| format!("unit '{name}'"))?;
            out.outlets[0].flows[w] = held;
            out.outlets[1].flows[w] = condensed;
        } else if water_in > 0.0 {
            out.warnings.push(
                Warning::new(
                    "no-condensation",
                    "at {value}, above the critical temperature of water ({limit}), nothing \
                     condenses",
                )
                .value(t, FigureKind::Temperature)
                .limit(water::CRITICAL_TEMPERATURE_K)
                .for_unit(name.as_str()),
            );
        }
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let (gas, condensate) = (&out.outlets[0], &out.outlets[1]);
        let h_out = gas.enthalpy_w(db)? + condensate.enthalpy_w(db)?;
        out.duty_w = h_out - h_in;
        out.figures.push(figure(
            "condensate-flow",
            "condensate",
            condensate.flows[w],
            FigureKind::MolarFlow,
        ));
        out.figures.push(figure(
            "gas-water",
            "water in the gas outlet",
            gas.mole_fraction(w),
            FigureKind::Fraction,
        ));
        if let Some(dew) = dew_point_k(&self.key, &inlet.flows, inlet.pressure_pa) {
            out.figures.push(figure(
                "inlet-dew-point",
                "water dew point of the inlet",
                dew,
                FigureKind::Temperature,
            ));
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, fig, gas};

    #[test]
    fn condensate_leaves_the_gas_saturated_per_iapws_if97() {
        // IAPWS-IF97 eq. (30): the gas leaves with y_H2O P = p_sat(T); Table 35 gives
        // p_sat(300 K) = 0.353658941e-2 MPa.
        let db = db();
        let inlet = gas(
            &db,
            &[("H2", 0.75), ("CO2", 0.18), ("CH4", 0.04), ("H2O", 0.35)],
            450.0,
            25e5,
        );
        let ko = Knockout::new(
            &db,
            "ko",
            &KnockoutSpec {
                temperature_k: Some(300.0),
                pressure_drop_pa: 0.5e5,
            },
        )
        .unwrap();
        let r = ko.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        let w = db.index_of("H2O").unwrap();
        let g = &r.outlets[0];
        let y_p = g.mole_fraction(w) * g.pressure_pa;
        assert!((y_p / 0.353_658_941e4 - 1.0).abs() < 1e-9, "y P = {y_p}");
        let c = &r.outlets[1];
        assert_eq!(c.phase, StreamPhase::Liquid);
        assert!((c.flows[w] + g.flows[w] - 0.35).abs() < 1e-15);
        assert_eq!(c.total(), c.flows[w]);
        assert!(r.duty_w < 0.0);
        assert!((fig(&r, "condensate-flow") - c.flows[w]).abs() < 1e-15);
        let dew = fig(&r, "inlet-dew-point");
        assert!(dew > 400.0 && dew < 450.0, "{dew}");
    }

    #[test]
    fn condensing_duty_includes_the_latent_heat() {
        // Pure steam at 1 bar condensed at 372 K (below T_s(0.1 MPa) = 372.756 K, IAPWS-IF97
        // Table 36): almost all of it condenses, and the heat removed is the ideal-gas cooling
        // plus the latent heat at 372 K (IAPWS SR1-86; about 40.7 kJ/mol near 100 degC).
        let db = db();
        let inlet = gas(&db, &[("H2O", 1.0), ("N2", 0.001)], 400.0, 1.0e5);
        let ko = Knockout::new(
            &db,
            "ko",
            &KnockoutSpec {
                temperature_k: Some(372.0),
                pressure_drop_pa: 0.0,
            },
        )
        .unwrap();
        let r = ko.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        let w = db.index_of("H2O").unwrap();
        let cond = r.outlets[1].flows[w];
        assert!(cond > 0.9, "{cond}");
        let sp = db.by_index(w);
        // Condensate: IAPWS-IF97 Region 1 at 372 K, 1 bar on the NASA ideal-gas basis,
        // h_NASA + M_w (h - h°); PyPI iapws 1.5.5: h(372 K, 0.1 MPa) = 414.249778930154 kJ/kg.
        let (h0, _) = crate::thermo::if97::ideal_gas_enthalpy_and_cp(372.0).unwrap();
        let departure = (414.249_778_930_154e3 - h0) * 0.018_015_268;
        let expected = sp.enthalpy(372.0).unwrap() - sp.enthalpy(400.0).unwrap()
            + cond * departure
            + db.get("N2").unwrap().enthalpy(372.0).unwrap() * 0.001
            - db.get("N2").unwrap().enthalpy(400.0).unwrap() * 0.001;
        assert!((r.duty_w - expected).abs() < 1e-9 * expected.abs());
        assert!(r.duty_w < -36_000.0);
    }

    #[test]
    fn dry_gas_keeps_its_water_and_bad_specs_are_refused() {
        let db = db();
        let inlet = gas(&db, &[("H2", 1.0), ("H2O", 0.001)], 320.0, 20e5);
        let ko = Knockout::new(&db, "ko", &KnockoutSpec::default()).unwrap();
        let r = ko.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        assert_eq!(r.outlets[1].total(), 0.0);
        assert_eq!(r.outlets[0].flows, inlet.flows);
        let hot = Knockout::new(
            &db,
            "ko",
            &KnockoutSpec {
                temperature_k: Some(400.0),
                pressure_drop_pa: 0.0,
            },
        )
        .unwrap();
        let e = hot.solve(&db, &[&inlet], None).unwrap_err().to_string();
        assert!(e.contains("unit 'ko'") && e.contains("cools"), "{e}");
        let frozen = KnockoutSpec {
            temperature_k: Some(260.0),
            pressure_drop_pa: 0.0,
        };
        assert!(Knockout::new(&db, "ko", &frozen).is_err());
    }
}
