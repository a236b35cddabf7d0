//! Mixer: adiabatic mixing of any number of inlets, gas or liquid water.
//!
//! Energy balance H_out = sum H_in. Pure-water inlets, liquid or steam, carry their IAPWS-IF97
//! departure from the ideal gas (see [`super::stream`]): liquid water mixed into hot gas takes
//! its heat of vaporisation from the gas, and steam at pressure gives up its residual enthalpy
//! (a mix of steam at 30 bar into process gas ends some kelvin below the ideal-gas mix, since
//! the mixture itself is an ideal gas). The outlet leaves at the lowest inlet pressure less an
//! optional pressure drop.
//!
//! - A gas outlet (any species besides water): all vapour, its temperature from H(T) = sum H_in
//!   by Newton's method with dH/dT = sum n_i Cp_i (ideal-gas mixture, NASA polynomials). If that
//!   temperature lies below the water dew point of the outlet (IAPWS-IF97 saturation line), part
//!   of the water would stay liquid: an error saying so (two phases are not carried in one
//!   stream; send more or hotter gas, or less or hotter water).
//! - A pure-water outlet: liquid, wet steam or steam by its enthalpy against saturated liquid
//!   and saturated steam at the outlet pressure (see [`super::stream::water_at_enthalpy`]); wet
//!   steam is an error naming its vapour fraction.

use super::common::{
    check_inlets, check_pressure_drop, degc, dew_point_k, enthalpy_sum, figure, outlet_pressure,
    spec_error, temperature_at_enthalpy, Key,
};
use super::stream::{check_phases, water_at_enthalpy, WaterState};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, StreamPhase, UnitResult};
use crate::error::{Result, ResultExt};
use crate::thermo::{mixture, SpeciesDb};

/// Specification of a mixer.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct MixerSpec {
    /// Pressure drop below the lowest inlet pressure, Pa (usually zero).
    pub pressure_drop_pa: f64,
}

/// A mixer ready to solve.
#[derive(Debug, Clone)]
pub struct Mixer {
    name: String,
    spec: MixerSpec,
    key: Key,
}

/// The `mixer` unit type.
pub static TYPE: UnitType = UnitType {
    name: "mixer",
    summary: "Adiabatic mixing of one or more streams (liquid water included); the outlet leaves \
              at the lowest inlet pressure less the pressure drop, its temperature from the \
              energy balance.",
    inlets: Ports::at_least(1, "streams to mix"),
    outlets: Ports::exactly(1, "mixed stream"),
    named_ports: None,
    keys: &[KeyDoc {
        key: "pressure-drop",
        value: ValueKind::PressureDifference,
        default: Some("0 bar"),
        meaning: "pressure lost across the unit",
    }],
    example: "- name: feed-mixer\n  type: mixer\n  from: [natural-gas, process-steam]\n  to: \
              mixed-feed",
    build: build::<Mixer>,
};

impl UnitKind for Mixer {
    type Spec = MixerSpec;

    fn read(b: &mut UnitBuilder<'_, '_, MixerSpec>) -> Result<MixerSpec> {
        Ok(MixerSpec {
            pressure_drop_pa: b.pressure_drop(|s, v| s.pressure_drop_pa = v)?,
        })
    }

    /// Check the spec and prepare.
    fn new(db: &SpeciesDb, name: &str, spec: &MixerSpec) -> Result<Mixer> {
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Mixer {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
        })
    }

    fn spec(&self) -> &MixerSpec {
        &self.spec
    }

    /// Mix the inlets into `out` (its buffers reused).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        _: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let name = &self.name;
        check_inlets(db, name, "mixer", inlets, 1, None)?;
        let w = self.key.h2o;
        check_phases(db, name, w, inlets)?;
        out.reset(1, db.len());
        let mut p_min = f64::INFINITY;
        let (mut nt, mut n_total) = (0.0, 0.0);
        for s in inlets {
            for (o, n) in out.outlets[0].flows.iter_mut().zip(&s.flows) {
                *o += n;
            }
            p_min = p_min.min(s.pressure_pa);
            let n = s.total();
            nt += n * s.temperature_k;
            n_total += n;
        }
        let pressure = outlet_pressure(name, p_min, self.spec.pressure_drop_pa)?;
        let h_in = enthalpy_sum(db, inlets).context(|| format!("unit '{name}', inlet enthalpy"))?;
        let start = if n_total > 0.0 {
            nt / n_total
        } else {
            inlets[0].temperature_k
        };
        let liquid_in: f64 = inlets
            .iter()
            .filter(|s| s.phase == StreamPhase::Liquid)
            .map(|s| s.flows[w])
            .sum();
        let outlet = &mut out.outlets[0];
        outlet.pressure_pa = pressure;
        outlet.temperature_k = start;
        outlet.phase = StreamPhase::Vapour;
        if outlet.is_pure_water(w) {
            match water_at_enthalpy(db, name, w, &outlet.flows, h_in, pressure, start)? {
                WaterState::Liquid(t) => {
                    outlet.temperature_k = t;
                    outlet.phase = StreamPhase::Liquid;
                }
                WaterState::Vapour(t) => outlet.temperature_k = t,
                WaterState::Wet {
                    temperature_k,
                    vapour_fraction,
                    ..
                } => {
                    return Err(spec_error(
                        name,
                        "energy balance",
                        format!(
                            "the mixed water would be wet steam at its saturation temperature \
                             {} and {:.4} bar, {:.1} % vapour by mole; a stream here is either \
                             liquid or vapour: change the inlet temperatures so that the mix is \
                             all liquid or all steam",
                            degc(temperature_k),
                            pressure / 1e5,
                            100.0 * vapour_fraction
                        ),
                    ));
                }
            }
        } else {
            // Below the dew point the all-vapour enthalpy is above what the inlets bring.
            if let Some(dew) = dew_point_k(&self.key, &outlet.flows, pressure) {
                let h_dew = mixture::enthalpy(db, &outlet.flows, dew)?;
                if h_in < h_dew {
                    let what = if liquid_in > 0.0 {
                        "the gas cannot vaporise all the liquid water fed to it"
                    } else {
                        "part of its water would condense"
                    };
                    return Err(spec_error(
                        name,
                        "energy balance",
                        format!(
                            "the mix would end below its water dew point {} at {:.4} bar \
                             ({:.3} kW short of an all-vapour mix at the dew point): {what}, \
                             and a stream here is either liquid or vapour; send more or hotter \
                             gas, or less or hotter water (steam), so that the mix stays above \
                             its dew point",
                            degc(dew),
                            pressure / 1e5,
                            (h_dew - h_in) / 1e3
                        ),
                    ));
                }
            }
            outlet.temperature_k = temperature_at_enthalpy(db, name, &outlet.flows, h_in, start)?;
        }
        let outlet = &out.outlets[0];
        if let Some(sc) = self.key.steam_to_carbon(&outlet.flows) {
            if outlet.flows[self.key.h2o] > 0.0 {
                out.figures.push(figure(
                    "outlet-steam-to-carbon",
                    "steam-to-carbon ratio",
                    sc,
                    FigureKind::Number,
                ));
            }
        }
        if let Some(dew) = dew_point_k(&self.key, &outlet.flows, pressure) {
            out.figures.push(figure(
                "dew-point",
                "water dew point of the outlet",
                dew,
                FigureKind::Temperature,
            ));
        }
        if liquid_in > 0.0 && outlet.phase == StreamPhase::Vapour {
            out.figures.push(figure(
                "vaporised-water",
                "liquid water vaporised",
                liquid_in,
                FigureKind::MolarFlow,
            ));
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, fig, gas};
    use crate::units::StreamPhase;

    #[test]
    fn steam_and_gas_mix_adiabatically() {
        let db = db();
        let ng = gas(&db, &[("CH4", 1.0), ("C2H6", 0.05)], 650.0, 30e5);
        let steam = gas(&db, &[("H2O", 3.3)], 660.0, 31e5);
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let r = m.solve(&db, &[&ng, &steam], None).unwrap();
        assert_balances(&db, &[&ng, &steam], &r);
        let out = &r.outlets[0];
        // The steam's residual enthalpy at 31 bar (IAPWS-IF97, PyPI iapws 1.5.5: h - h° =
        // -53.29 kJ/kg at 660 K) is released into the ideal-gas mix, which therefore ends
        // below the ideal-gas mix temperature (which lies between the two inlets): 3.3 mol/s x
        // 0.96 kJ/mol over about 185 W/K of heat capacity is about 17 K (measured 639.24 K; the
        // model mixes real steam into an ideal-gas mixture, see the module docs).
        assert!(
            out.temperature_k > 636.0 && out.temperature_k < 642.0,
            "{}",
            out.temperature_k
        );
        assert_eq!(out.pressure_pa, 30e5);
        assert!((fig(&r, "outlet-steam-to-carbon") - 3.0).abs() < 1e-12);
        // Equal temperatures mix to that temperature exactly (ideal gas: no heat of mixing).
        let a = gas(&db, &[("H2", 1.0)], 500.0, 2e5);
        let b = gas(&db, &[("N2", 2.0)], 500.0, 3e5);
        let r = m.solve(&db, &[&a, &b], None).unwrap();
        assert!((r.outlets[0].temperature_k - 500.0).abs() < 1e-9);
        assert_balances(&db, &[&a, &b], &r);
    }

    #[test]
    fn liquid_water_takes_its_latent_heat_from_the_gas() {
        let db = db();
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let w = db.index_of("H2O").unwrap();
        let hot = gas(&db, &[("N2", 10.0)], 1073.15, 30e5);
        let mut water = gas(&db, &[("H2O", 1.0)], 423.15, 30e5);
        water.phase = StreamPhase::Liquid;
        let r = m.solve(&db, &[&hot, &water], None).unwrap();
        assert_balances(&db, &[&hot, &water], &r);
        let out = &r.outlets[0];
        assert_eq!(out.phase, StreamPhase::Vapour);
        assert!((fig(&r, "vaporised-water") - 1.0).abs() < 1e-15);
        // The same water as steam at 4 bar (T_s 143.6 degC) leaves the mix hotter by
        // IAPWS-IF97 h(423.15 K, 0.4 MPa) - h(423.15 K, 3 MPa) = 2118.9675720989526 kJ/kg
        // (PyPI iapws 1.5.5), x 18.015268 g/mol; the mix itself is an ideal gas.
        let steam = gas(&db, &[("H2O", 1.0)], 423.15, 4e5);
        let r2 = m.solve(&db, &[&hot, &steam], None).unwrap();
        let h = |s: &Stream| s.enthalpy_w(&db).unwrap();
        let latent = h(&r2.outlets[0]) - h(out);
        let want = 2_118.967_572_098_952_6 * 18.015_268;
        assert!(((latent - want) / want).abs() < 1e-9, "{latent} vs {want}");
        assert!(r2.outlets[0].temperature_k > out.temperature_k + 50.0);
        assert!(out.flows[w] == 1.0);
    }

    #[test]
    fn pure_water_mixes_to_liquid_steam_or_an_error() {
        let db = db();
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let liquid = |n: f64, t: f64| {
            let mut s = gas(&db, &[("H2O", n)], t, 30e5);
            s.phase = StreamPhase::Liquid;
            s
        };
        // Two liquids: liquid at an enthalpy-weighted temperature (near the mean).
        let (a, b) = (liquid(1.0, 303.15), liquid(1.0, 423.15));
        let r = m.solve(&db, &[&a, &b], None).unwrap();
        assert_balances(&db, &[&a, &b], &r);
        assert_eq!(r.outlets[0].phase, StreamPhase::Liquid);
        let t = r.outlets[0].temperature_k;
        assert!((t - 363.15).abs() < 5.0, "{t}");
        // Superheated steam with a little spray water: steam (a desuperheater).
        let steam = gas(&db, &[("H2O", 10.0)], 723.15, 30e5);
        let spray = liquid(1.0, 423.15);
        let r = m.solve(&db, &[&steam, &spray], None).unwrap();
        assert_balances(&db, &[&steam, &spray], &r);
        assert_eq!(r.outlets[0].phase, StreamPhase::Vapour);
        // T_s(3 MPa) = 507.008 K (IAPWS-IF97 eq. 31, PyPI iapws 1.5.5).
        assert!(r.outlets[0].temperature_k > 507.0);
        // Equal amounts of steam at 240 degC and water at 150 degC: wet steam, an error.
        let steam = gas(&db, &[("H2O", 1.0)], 513.15, 30e5);
        let e = m
            .solve(&db, &[&steam, &spray], None)
            .unwrap_err()
            .to_string();
        assert!(e.contains("unit 'mix'") && e.contains("wet steam"), "{e}");
    }

    #[test]
    fn a_mix_below_its_dew_point_is_an_error() {
        let db = db();
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        // Gas at 60 degC with steam that saturates it: all vapour, below the dew point.
        let cold = gas(&db, &[("H2", 1.0)], 333.15, 20e5);
        let steam = gas(&db, &[("H2O", 1.0)], 500.0, 20e5);
        let e = m
            .solve(&db, &[&cold, &steam], None)
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("unit 'mix'") && e.contains("below its water dew point"),
            "{e}"
        );
    }

    #[test]
    fn odd_inlets_and_no_inlets_are_refused() {
        let db = db();
        let m = Mixer::new(&db, "mix", &MixerSpec::default()).unwrap();
        let mut wet = gas(&db, &[("H2O", 1.0), ("H2", 0.1)], 300.0, 2e5);
        wet.phase = StreamPhase::Liquid;
        let gas = gas(&db, &[("H2", 1.0)], 500.0, 2e5);
        let e = m.solve(&db, &[&gas, &wet], None).unwrap_err().to_string();
        assert!(e.contains("inlet 2") && e.contains("water only"), "{e}");
        let e = m.solve(&db, &[], None).unwrap_err().to_string();
        assert!(e.contains("unit 'mix'") && e.contains("at least 1"), "{e}");
        let bad = MixerSpec {
            pressure_drop_pa: -1.0,
        };
        assert!(Mixer::new(&db, "mix", &bad).is_err());
    }
}
