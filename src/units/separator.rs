//! Separator: takes named species out of a stream by fraction (CO2 removal by a solvent wash, a
//! dryer), as a component split with no model of how.
//!
//! `removal: {CO2: 0.99, H2O: 1.0}` sends that fraction of each named species to the second
//! outlet (the removed stream); every other species stays in the product. Per species the
//! removed flow is f n and the product n - f n. Both outlets leave at the inlet temperature; the
//! product at the inlet pressure less `pressure-drop`, the removed stream at the inlet pressure.
//!
//! Phase of the removed stream (kept simple on purpose): pure water below its saturation
//! temperature at that pressure (IAPWS-IF97 eq. 31) is liquid, anything else vapour. A vapour
//! outlet below its water dew point would be two phases, which a stream does not carry: an
//! error naming the outlet (take the water out first in a knockout, or remove less of it).
//!
//! Energy: the unit's duty is H_out - H_in, which is zero but for removed water that leaves as
//! liquid (its heat of condensation, negative, IAPWS SR1-86(1992), through the stream module).
//! The heat a real removal unit needs (the regeneration of its solvent) is not added to the
//! process stream: with `duty-per-tonne-co2` it is reported as the figure `removal-heat`
//! (W) = duty-per-tonne x `co2-removed` (kg/s), for the plant's energy figures.

use super::common::{
    check_inlets, check_pressure_drop, dew_point_k, figure, outlet_pressure, require_vapour,
    spec_error, Key,
};
use super::stream::water_phase;
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{FigureKind, Stream, StreamPhase, UnitResult};
use crate::error::{Result, ResultExt};
use crate::thermo::SpeciesDb;

/// Specification of a separator.
#[derive(Debug, Clone, PartialEq)]
pub struct SeparatorSpec {
    /// Fraction (0..1) of each named species sent to the removed stream, in file order.
    pub removal: Vec<(String, f64)>,
    /// Pressure drop of the product, Pa.
    pub pressure_drop_pa: f64,
    /// Heat needed per mass of CO2 removed, J/kg (for the figure `removal-heat`).
    pub duty_per_tonne_co2_j_per_kg: Option<f64>,
}

/// A separator ready to solve.
#[derive(Debug, Clone)]
pub struct Separator {
    name: String,
    spec: SeparatorSpec,
    key: Key,
    /// (database index, fraction removed) per named species.
    removal: Vec<(usize, f64)>,
}

/// The `separator` unit type.
pub static TYPE: UnitType = UnitType {
    name: "separator",
    summary: "Named species taken out of a stream by fraction (CO2 removal, drying) to a second \
              outlet at the inlet temperature; the removal heat per tonne of CO2 is reported as \
              a figure, not added to the stream.",
    inlets: Ports::exactly(1, "stream to treat"),
    outlets: Ports::exactly(2, "product, removed species"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "removal",
            value: ValueKind::PerSpecies,
            default: None,
            meaning: "fraction (0..1) of each named species sent to the second outlet; the \
                      others stay in the product",
        },
        KeyDoc {
            key: "duty-per-tonne-co2",
            value: ValueKind::SpecificEnergy,
            default: Some("none (no removal-heat figure)"),
            meaning: "heat the removal needs per mass of CO2 removed (e.g. 2.5 GJ/t), reported \
                      as the figure removal-heat",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost by the product",
        },
    ],
    example: "- name: co2-removal\n  type: separator\n  from: cooled-gas\n  to: [co2-lean-gas, \
              removed-co2]\n  removal: {CO2: 0.99}\n  duty-per-tonne-co2: 2.5 GJ/t",
    build: build::<Separator>,
};

impl UnitKind for Separator {
    type Spec = SeparatorSpec;

    fn read(b: &mut UnitBuilder<'_, '_, SeparatorSpec>) -> Result<SeparatorSpec> {
        let removal = b
            .map("removal", ValueKind::PerSpecies)?
            .filter(|m| !m.is_empty())
            .ok_or_else(|| {
                b.error(
                    "removal",
                    "a separator needs `removal` with at least one species (e.g. removal: \
                     {CO2: 0.99})",
                )
            })?;
        for (k, (species, value)) in removal.iter().enumerate() {
            b.register(
                &format!("removal.{species}"),
                *value,
                ValueKind::PerSpecies,
                move |s: &mut SeparatorSpec, v| s.removal[k].1 = v,
            );
        }
        let duty_per_tonne_co2_j_per_kg = b.number(
            "duty-per-tonne-co2",
            ValueKind::SpecificEnergy,
            None,
            |s: &mut SeparatorSpec, v| s.duty_per_tonne_co2_j_per_kg = Some(v),
        )?;
        Ok(SeparatorSpec {
            removal,
            pressure_drop_pa: b.pressure_drop(|s, v| s.pressure_drop_pa = v)?,
            duty_per_tonne_co2_j_per_kg,
        })
    }

    /// Check the spec and prepare.
    fn new(db: &SpeciesDb, name: &str, spec: &SeparatorSpec) -> Result<Separator> {
        let mut removal = Vec::with_capacity(spec.removal.len());
        for (species, f) in &spec.removal {
            let field = format!("removal.{species}");
            let Some(i) = db.index_of(species) else {
                return Err(spec_error(
                    name,
                    &field,
                    format!(
                        "'{species}' is not a species of the database (see `syntrain species`)"
                    ),
                ));
            };
            if !(f.is_finite() && (0.0..=1.0).contains(f)) {
                return Err(spec_error(
                    name,
                    &field,
                    format!("{f}: a fraction removed must be within 0 and 1"),
                ));
            }
            if removal.iter().any(|(j, _)| *j == i) {
                return Err(spec_error(name, &field, "is given twice"));
            }
            removal.push((i, *f));
        }
        if let Some(e) = spec.duty_per_tonne_co2_j_per_kg {
            if !(e.is_finite() && e >= 0.0) {
                return Err(spec_error(
                    name,
                    "duty-per-tonne-co2",
                    format!("{e} J/kg must be zero or positive"),
                ));
            }
        }
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Separator {
            name: name.to_string(),
            spec: spec.clone(),
            key: Key::new(db, name)?,
            removal,
        })
    }

    fn spec(&self) -> &SeparatorSpec {
        &self.spec
    }

    /// Split the inlet into `out` (its buffers reused: no heap allocation once they have their
    /// size, errors aside).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        _: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        let name = &self.name;
        check_inlets(db, name, "separator", inlets, 1, Some(1))?;
        require_vapour(db, name, inlets)?;
        let inlet = inlets[0];
        let t = inlet.temperature_k;
        let p = outlet_pressure(name, inlet.pressure_pa, self.spec.pressure_drop_pa)?;
        out.reset(2, db.len());
        out.equilibrium = None;
        out.set_outlet(0, &inlet.flows, t, p, StreamPhase::Vapour);
        let removed = &mut out.outlets[1];
        removed.temperature_k = t;
        removed.pressure_pa = inlet.pressure_pa;
        removed.phase = StreamPhase::Vapour;
        for &(i, f) in &self.removal {
            let r = f * inlet.flows[i];
            out.outlets[1].flows[i] = r;
            out.outlets[0].flows[i] = inlet.flows[i] - r;
        }
        let w = self.key.h2o;
        if out.outlets[1].is_pure_water(w) {
            out.outlets[1].phase = water_phase(t, inlet.pressure_pa)
                .map_err(|e| spec_error(name, "removal", format!("removed water: {e}")))?;
        }
        for (k, what) in [(0, "product"), (1, "removed stream")] {
            let s = &out.outlets[k];
            if s.phase == StreamPhase::Liquid {
                continue;
            }
            if let Some(dew) = dew_point_k(&self.key, &s.flows, s.pressure_pa) {
                if t < dew {
                    return Err(spec_error(
                        name,
                        "removal",
                        format!(
                            "the {what} would be below its water dew point {} at {:.4} bar: \
                             part of its water would condense, and a stream is either liquid or \
                             vapour; take the water out first in a knockout, or change the \
                             fraction of H2O removed",
                            super::common::degc(dew),
                            s.pressure_pa / 1e5
                        ),
                    ));
                }
            }
        }
        let h_in = inlet
            .enthalpy_w(db)
            .context(|| format!("unit '{name}', inlet enthalpy"))?;
        let h_out = out.outlets[0].enthalpy_w(db)? + out.outlets[1].enthalpy_w(db)?;
        out.duty_w = h_out - h_in;
        let co2 = self.key.co2;
        let co2_removed = out.outlets[1].flows[co2] * db.by_index(co2).molar_mass_kg_per_mol;
        out.figures.push(figure(
            "co2-removed",
            "CO2 removed",
            co2_removed,
            FigureKind::MassFlow,
        ));
        if let Some(e) = self.spec.duty_per_tonne_co2_j_per_kg {
            out.figures.push(figure(
                "removal-heat",
                "heat of the CO2 removal",
                e * co2_removed,
                FigureKind::Power,
            ));
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, fig, gas};

    fn spec(removal: &[(&str, f64)]) -> SeparatorSpec {
        SeparatorSpec {
            removal: removal.iter().map(|(s, f)| (s.to_string(), *f)).collect(),
            pressure_drop_pa: 0.3e5,
            duty_per_tonne_co2_j_per_kg: Some(2.5e6),
        }
    }

    #[test]
    fn named_species_leave_by_fraction_and_the_rest_stays() {
        let db = db();
        // Dried shifted gas (invented demo composition, mol/s), 40 degC, 22 bar; the removed
        // CO2 and water stay above their dew point: y_H2O P = 0.004 / 1.786 x 22 bar = 4.9 kPa,
        // below p_sat(313.15 K) = 7.38 kPa (IAPWS-IF97 eq. 30).
        let inlet = gas(
            &db,
            &[
                ("H2", 7.0),
                ("CO2", 1.8),
                ("CH4", 0.3),
                ("CO", 0.05),
                ("H2O", 0.004),
            ],
            313.15,
            22e5,
        );
        let sep = Separator::new(&db, "ccr", &spec(&[("CO2", 0.99), ("H2O", 1.0)])).unwrap();
        let r = sep.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        for (i, n) in inlet.flows.iter().enumerate() {
            let sum = r.outlets[0].flows[i] + r.outlets[1].flows[i];
            assert!((sum - n).abs() <= 1e-15 * n, "{}", db.by_index(i).name);
        }
        let (co2, h2o, h2) = (
            db.index_of("CO2").unwrap(),
            db.index_of("H2O").unwrap(),
            db.index_of("H2").unwrap(),
        );
        assert_eq!(r.outlets[1].flows[co2], 0.99 * 1.8);
        assert_eq!(r.outlets[1].flows[h2o], 0.004);
        assert_eq!(r.outlets[0].flows[h2o], 0.0);
        assert_eq!(r.outlets[0].flows[h2], 7.0);
        assert_eq!(r.outlets[1].flows[h2], 0.0);
        assert_eq!(r.outlets[0].pressure_pa, 21.7e5);
        assert_eq!(r.outlets[1].pressure_pa, 22e5);
        assert_eq!(r.outlets[1].temperature_k, 313.15);
        // By hand: 1.782 mol/s x 44.0095 g/mol (CO2, IUPAC atomic weights) = 0.078425 kg/s;
        // x 2.5 GJ/t = 2.5e6 J/kg -> 196.06 kW.
        let m = 1.782 * 0.044_009_5;
        assert!((fig(&r, "co2-removed") / m - 1.0).abs() < 1e-4);
        assert!((fig(&r, "removal-heat") - 2.5e6 * fig(&r, "co2-removed")).abs() < 1e-9);
        assert!((fig(&r, "removal-heat") / 196_063.0 - 1.0).abs() < 1e-4);
        // Vapour water and ideal gases at the same temperature: no heat enters.
        assert!(r.duty_w.abs() < 1e-6);
    }

    #[test]
    fn removed_liquid_water_carries_its_latent_heat_as_duty() {
        let db = db();
        let inlet = gas(&db, &[("N2", 10.0), ("H2O", 0.1)], 353.15, 2e5);
        let sep = Separator::new(&db, "dryer", &spec(&[("H2O", 1.0)])).unwrap();
        let r = sep.solve(&db, &[&inlet], None).unwrap();
        assert_balances(&db, &[&inlet], &r);
        // Pure water at 80 degC and 2 bar is below T_s(0.2 MPa) = 393.36 K (IAPWS-IF97 eq. 31).
        assert_eq!(r.outlets[1].phase, StreamPhase::Liquid);
        // The duty is the liquid's enthalpy less the ideal-gas steam's at 80 degC: PyPI `iapws`
        // 1.5.5 (IAPWS-IF97) h(80 degC, 0.2 MPa) = 335.070 kJ/kg and h(80 degC, 1 kPa) =
        // 2650.786 kJ/kg (steam at 1 kPa is ideal to 0.01 %): 2315.715 kJ/kg x 18.015268 g/mol
        // = 41.718 kJ/mol, for 0.1 mol/s.
        assert!((r.duty_w / -4171.8 - 1.0).abs() < 2e-4, "{}", r.duty_w);
        assert_eq!(fig(&r, "co2-removed"), 0.0);
    }

    #[test]
    fn unknown_species_and_bad_fractions_are_refused() {
        let db = db();
        let e = Separator::new(&db, "ccr", &spec(&[("CO3", 0.5)]))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("removal.CO3") && e.contains("not a species"),
            "{e}"
        );
        for f in [1.2, -0.1, f64::NAN] {
            let e = Separator::new(&db, "ccr", &spec(&[("CO2", f)]))
                .unwrap_err()
                .to_string();
            assert!(e.contains("within 0 and 1"), "{e}");
        }
        // A removed CO2 + water mix below its dew point is refused.
        let wet = gas(
            &db,
            &[("H2", 7.0), ("CO2", 1.8), ("H2O", 0.05)],
            340.0,
            22e5,
        );
        let sep = Separator::new(&db, "ccr", &spec(&[("CO2", 0.9), ("H2O", 1.0)])).unwrap();
        let e = sep.solve(&db, &[&wet], None).unwrap_err().to_string();
        assert!(
            e.contains("dew point") && e.contains("removed stream"),
            "{e}"
        );
    }
}
