//! Process streams: flows per database species at a temperature and pressure, as vapour (an
//! ideal-gas mixture) or as liquid water (condensate, boiler-feed water).
//!
//! Phase rule for pure water (water the only species flowing): liquid strictly below its
//! saturation temperature T_s(P) on the IAPWS-IF97 saturation line, eq. (31)
//! ([`crate::thermo::water::is_liquid`]); at exactly T_s(P) it is saturated steam. A liquid
//! stream holds water only. A gas mixture is an ideal gas (NASA polynomials) and is vapour only
//! above its water dew point: the units and the feeds refuse a mixture that would be partly
//! condensed (a knockout condenses it).
//!
//! Pure water, liquid or steam, is real water: its enthalpy is the NASA ideal-gas value (the
//! formation-enthalpy basis of every process gas) plus the IAPWS-IF97 departure from the ideal
//! gas at the same temperature, M_w [h(T, p) - h°(T)] with Region 1 for liquid and Region 2 for
//! steam ([`pure_water_enthalpy_w`]). The departure holds the latent heat, the pressure effect
//! on the liquid and the residual enthalpy of steam at pressure; pure water outside IF97
//! Regions 1 and 2 (steam above 800 degC, Region 3 near the critical point) is an error.
//!
//! When the state of pure water follows from its enthalpy (an adiabatic mixer, a heater or
//! cooler given its duty), [`water_at_enthalpy`] decides between subcooled or saturated liquid,
//! wet steam and saturated or superheated steam at the pressure.

use super::common::temperature_at_enthalpy;
use crate::error::{Error, Result, ResultExt};
use crate::thermo::{mixture, water, Phase, SpeciesDb};

/// Phase of a whole stream.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StreamPhase {
    /// Ideal-gas mixture.
    Vapour,
    /// Liquid water (condensate, boiler-feed water): water only, its enthalpy from IAPWS-IF97
    /// Region 1.
    Liquid,
}

/// A process stream.
#[derive(Debug, Clone, PartialEq)]
pub struct Stream {
    /// Flow of every database species, mol/s (indexed like the database).
    pub flows: Vec<f64>,
    /// Temperature, K.
    pub temperature_k: f64,
    /// Pressure, Pa (absolute).
    pub pressure_pa: f64,
    /// Vapour or liquid.
    pub phase: StreamPhase,
}

impl Stream {
    /// A vapour stream.
    pub fn vapour(flows: Vec<f64>, temperature_k: f64, pressure_pa: f64) -> Stream {
        Stream {
            flows,
            temperature_k,
            pressure_pa,
            phase: StreamPhase::Vapour,
        }
    }

    /// A liquid-water stream (the flows must hold water only).
    pub fn liquid(flows: Vec<f64>, temperature_k: f64, pressure_pa: f64) -> Stream {
        Stream {
            flows,
            temperature_k,
            pressure_pa,
            phase: StreamPhase::Liquid,
        }
    }

    /// True when water (database index `water`) flows and nothing else does.
    pub fn is_pure_water(&self, water: usize) -> bool {
        self.flows.get(water).is_some_and(|n| *n > 0.0)
            && self
                .flows
                .iter()
                .enumerate()
                .all(|(i, n)| i == water || *n == 0.0)
    }

    /// Total molar flow, mol/s.
    pub fn total(&self) -> f64 {
        mixture::total(&self.flows)
    }

    /// Mole fraction of a species by database index (zero for an empty stream).
    pub fn mole_fraction(&self, species: usize) -> f64 {
        let t = self.total();
        if t > 0.0 {
            self.flows[species] / t
        } else {
            0.0
        }
    }

    /// Water dew point at the stream's pressure, K: the saturation temperature (IAPWS-IF97
    /// eq. 31) at the partial pressure of water by Raoult's law, y_w P. For liquid water it is
    /// the saturation temperature at its pressure. `None` without water, or with a partial
    /// pressure outside the saturation line (below the triple point, above the critical point).
    pub fn water_dew_point_k(&self, db: &SpeciesDb) -> Option<f64> {
        let w = db.water()?;
        let total = self.total();
        let n = self.flows.get(w).copied().unwrap_or(0.0);
        if !(total > 0.0 && n > 0.0) {
            return None;
        }
        let p_w = n / total * self.pressure_pa;
        if !(water::SATURATION_MIN_PRESSURE_PA..=water::CRITICAL_PRESSURE_PA).contains(&p_w) {
            return None;
        }
        water::saturation_temperature_k(p_w).ok()
    }

    /// Mole fraction on a dry basis (water left out); zero when nothing but water flows.
    pub fn dry_mole_fraction(&self, db: &SpeciesDb, species: usize) -> f64 {
        mixture::dry_mole_fraction(&self.flows, db.water(), species)
    }

    /// Enthalpy flow, W, formation enthalpies included. A gas mixture is an ideal gas (NASA
    /// polynomials); pure water, liquid or steam, takes the IAPWS-IF97 departure from the ideal
    /// gas besides ([`pure_water_enthalpy_w`]).
    pub fn enthalpy_w(&self, db: &SpeciesDb) -> Result<f64> {
        let water = match (db.water(), self.phase) {
            (Some(w), _) => Some(w),
            (None, StreamPhase::Liquid) => Some(db.require("H2O", " (condensate)")?),
            (None, StreamPhase::Vapour) => None,
        };
        if let Some(w) = water {
            if self.is_pure_water(w) {
                return pure_water_enthalpy_w(
                    db,
                    w,
                    self.flows[w],
                    self.temperature_k,
                    self.pressure_pa,
                    self.phase,
                );
            }
        }
        // A gas, or a liquid stream with nothing flowing.
        mixture::enthalpy(db, &self.flows, self.temperature_k)
    }
}

/// Enthalpy flow of `n` mol/s of pure water (database index `water`) at a temperature,
/// pressure and phase, W: n [h_NASA(T) + M_w (h_IF97(T, p) - h°_IF97(T))]
/// ([`water::pure_water_enthalpy_and_cp`]; Region 1 for liquid, Region 2 for steam). The one
/// function for the enthalpy of a pure-water stream.
pub fn pure_water_enthalpy_w(
    db: &SpeciesDb,
    water: usize,
    n: f64,
    temperature_k: f64,
    pressure_pa: f64,
    phase: StreamPhase,
) -> Result<f64> {
    Ok(n * pure_water_molar(db, water, temperature_k, pressure_pa, phase)?.0)
}

/// (h, cp) of pure water per mole, J/mol and J/(mol K).
fn pure_water_molar(
    db: &SpeciesDb,
    water: usize,
    temperature_k: f64,
    pressure_pa: f64,
    phase: StreamPhase,
) -> Result<(f64, f64)> {
    water::pure_water_enthalpy_and_cp(
        db.by_index(water),
        temperature_k,
        pressure_pa,
        phase == StreamPhase::Liquid,
    )
}

/// Temperature of `n` mol/s of pure water in a phase at a pressure whose enthalpy flow is
/// `target_w`, searched on [lo, hi] K by the safeguarded Newton of
/// [`crate::thermo::if97::increasing_root`] with the IF97 heat capacity.
#[allow(clippy::too_many_arguments)]
fn pure_water_temperature_k(
    db: &SpeciesDb,
    unit: &str,
    water: usize,
    n: f64,
    target_w: f64,
    pressure_pa: f64,
    phase: StreamPhase,
    (lo, hi): (f64, f64),
) -> Result<f64> {
    let scale = n * 1.0e3;
    // The unit is named only on an error (no allocation on the normal path).
    crate::thermo::if97::increasing_root("water energy balance", lo, hi, 1e-13, |t| {
        let (h, cp) = pure_water_molar(db, water, t, pressure_pa, phase)?;
        Ok(((n * h - target_w) / scale, n * cp / scale))
    })
    .context(|| format!("unit '{unit}'"))
}

/// Check the phases of a unit's inlets for units that take gas or liquid water (mixer, heater,
/// cooler): a liquid inlet must hold water only; a vapour inlet must carry no solid.
pub(crate) fn check_phases(
    db: &SpeciesDb,
    unit: &str,
    water: usize,
    inlets: &[&Stream],
) -> Result<()> {
    for (k, s) in inlets.iter().enumerate() {
        let odd = s.flows.iter().enumerate().find(|(i, n)| {
            **n > 0.0
                && match s.phase {
                    StreamPhase::Liquid => *i != water,
                    StreamPhase::Vapour => db.by_index(*i).phase != Phase::Gas,
                }
        });
        if let Some((i, _)) = odd {
            let reason = match s.phase {
                StreamPhase::Liquid => format!(
                    "is liquid but carries {}; a liquid stream holds water only",
                    db.by_index(i).name
                ),
                StreamPhase::Vapour => format!(
                    "carries the solid {}; process streams are gas only",
                    db.by_index(i).name
                ),
            };
            return Err(Error::UnitSpec {
                unit: unit.to_string(),
                field: format!("inlet {}", k + 1),
                reason,
            });
        }
    }
    Ok(())
}

/// Phase of pure water at a temperature and pressure: liquid strictly below the IAPWS-IF97
/// saturation temperature T_s(P), vapour (saturated or superheated steam) at or above it. Errors
/// as [`water::is_liquid`] (compressed water above the critical pressure, ice).
pub fn water_phase(temperature_k: f64, pressure_pa: f64) -> Result<StreamPhase> {
    Ok(if water::is_liquid(temperature_k, pressure_pa)? {
        StreamPhase::Liquid
    } else {
        StreamPhase::Vapour
    })
}

/// State of pure water found from its enthalpy at a pressure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum WaterState {
    /// Subcooled or saturated liquid at this temperature, K.
    Liquid(f64),
    /// Saturated or superheated steam at this temperature, K.
    Vapour(f64),
    /// Wet steam: liquid and vapour together at the saturation temperature.
    Wet {
        /// Saturation temperature, K.
        temperature_k: f64,
        /// Vapour fraction (molar), strictly between 0 and 1.
        vapour_fraction: f64,
        /// Enthalpy flow of saturated liquid at this pressure, W.
        saturated_liquid_w: f64,
        /// Enthalpy flow of saturated steam at this pressure, W.
        saturated_vapour_w: f64,
    },
}

/// The state of `flows` of pure water (water index `water`) at `pressure_pa` whose enthalpy is
/// `target_w`: liquid when the enthalpy is at most that of saturated liquid at T_s(P), steam
/// when at least that of saturated steam, wet steam in between. Enthalpies are those of
/// [`pure_water_enthalpy_w`] (IAPWS-IF97 Regions 1 and 2 on the NASA ideal-gas basis), T_s(P)
/// is IAPWS-IF97 eq. (31); the temperature is found by a safeguarded Newton search inside the
/// phase's range. Outside the saturation line (below 611.213 Pa, above the critical pressure)
/// the water is steam, as [`water_phase`] does. Saturation above 16.53 MPa (350 degC), where
/// saturated liquid lies in IF97 Region 3, is not modelled: an error.
pub(crate) fn water_at_enthalpy(
    db: &SpeciesDb,
    unit: &str,
    water: usize,
    flows: &[f64],
    target_w: f64,
    pressure_pa: f64,
    start_k: f64,
) -> Result<WaterState> {
    use crate::thermo::if97::{self, Region};
    let n = flows[water];
    if n <= 0.0 {
        let t = temperature_at_enthalpy(db, unit, flows, target_w, start_k)?;
        return Ok(WaterState::Vapour(t));
    }
    let context = |e: Error| Error::UnitSpec {
        unit: unit.to_string(),
        field: "energy balance".to_string(),
        reason: format!("the water outlet: {e}"),
    };
    let on_the_line =
        (water::SATURATION_MIN_PRESSURE_PA..=water::CRITICAL_PRESSURE_PA).contains(&pressure_pa);
    if !on_the_line {
        let range = if97::temperature_range_k(Region::Steam, pressure_pa).map_err(context)?;
        let t = pure_water_temperature_k(
            db,
            unit,
            water,
            n,
            target_w,
            pressure_pa,
            StreamPhase::Vapour,
            range,
        )
        .map_err(context)?;
        return Ok(WaterState::Vapour(t));
    }
    let t_s = water::saturation_temperature_k(pressure_pa)?;
    if t_s > if97::REGION1_MAX_TEMPERATURE_K {
        return Err(context(Error::InvalidValue {
            field: "pressure".to_string(),
            value: format!("{:.4} bar", pressure_pa / 1e5),
            reason: "saturated water above 165.3 bar (350 degC) lies in IAPWS-IF97 Region 3,                      which is not modelled; give a lower pressure"
                .to_string(),
        }));
    }
    let h_vapour = pure_water_enthalpy_w(db, water, n, t_s, pressure_pa, StreamPhase::Vapour)?;
    let h_liquid = pure_water_enthalpy_w(db, water, n, t_s, pressure_pa, StreamPhase::Liquid)?;
    if target_w >= h_vapour {
        let t = pure_water_temperature_k(
            db,
            unit,
            water,
            n,
            target_w,
            pressure_pa,
            StreamPhase::Vapour,
            (t_s, if97::REGION2_MAX_TEMPERATURE_K),
        )
        .map_err(context)?;
        return Ok(WaterState::Vapour(t.max(t_s)));
    }
    if target_w > h_liquid {
        return Ok(WaterState::Wet {
            temperature_k: t_s,
            vapour_fraction: (target_w - h_liquid) / (h_vapour - h_liquid),
            saturated_liquid_w: h_liquid,
            saturated_vapour_w: h_vapour,
        });
    }
    let lo = water::TRIPLE_POINT_TEMPERATURE_K;
    let h_lo = pure_water_enthalpy_w(db, water, n, lo, pressure_pa, StreamPhase::Liquid)?;
    if target_w < h_lo {
        return Err(Error::UnitSpec {
            unit: unit.to_string(),
            field: "energy balance".to_string(),
            reason: "the water would be cooled below its triple point (0.01 degC) and freeze; \
                     check the duty and the inlet temperatures"
                .to_string(),
        });
    }
    let t = pure_water_temperature_k(
        db,
        unit,
        water,
        n,
        target_w,
        pressure_pa,
        StreamPhase::Liquid,
        (lo, t_s),
    )
    .map_err(context)?;
    Ok(WaterState::Liquid(t))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{db, flows};

    #[test]
    fn liquid_and_steam_enthalpies_follow_if97() {
        // IAPWS-IF97 via PyPI iapws 1.5.5 (tests/data/iapws97_points.csv): h(423.15 K, 0.1 MPa,
        // Region 2) - h(423.15 K, 3 MPa, Region 1) = 2776.591815449922 - 633.8126255186869
        // kJ/kg; at one temperature the NASA ideal-gas part cancels, so the difference is
        // exactly IF97's (x 18.015268 g/mol), checked at 1e-9.
        let db = db();
        let n = flows(&db, &[("H2O", 2.0)]);
        let steam = Stream::vapour(n.clone(), 423.15, 1e5);
        let liquid = Stream::liquid(n.clone(), 423.15, 30e5);
        let dh = steam.enthalpy_w(&db).unwrap() - liquid.enthalpy_w(&db).unwrap();
        let want = 2.0 * (2_776.591_815_449_922 - 633.812_625_518_686_9) * 18.015_268;
        assert!(((dh - want) / want).abs() < 1e-9, "{dh} vs {want}");
        // Steam at pressure lies below the ideal gas by its residual enthalpy: IAPWS-IF97 via
        // PyPI iapws 1.5.5, h(660 K, 3.1 MPa) - h°(660 K) = -53.29452101016386 kJ/kg.
        let sp = db.get("H2O").unwrap();
        let h = Stream::vapour(n.clone(), 660.0, 31e5)
            .enthalpy_w(&db)
            .unwrap();
        let residual = h / 2.0 - sp.enthalpy(660.0).unwrap();
        let want = -53.294_521_010_163_86 * 18.015_268;
        assert!(
            ((residual - want) / want).abs() < 1e-9,
            "{residual} vs {want}"
        );
        // Out of IF97 Regions 1 and 2: an error, not an extrapolation.
        assert!(Stream::vapour(n.clone(), 1200.0, 1e5)
            .enthalpy_w(&db)
            .is_err());
        assert!(Stream::liquid(n, 500.0, 1e5).enthalpy_w(&db).is_err());
        let w = db.index_of("H2O").unwrap();
        assert!(liquid.is_pure_water(w));
        let wet = Stream::vapour(flows(&db, &[("H2O", 1.0), ("H2", 1e-9)]), 400.0, 1e5);
        assert!(!wet.is_pure_water(w));
        assert!(!Stream::vapour(vec![0.0; db.len()], 400.0, 1e5).is_pure_water(w));
    }

    #[test]
    fn phase_of_pure_water_follows_the_saturation_line() {
        // IAPWS-IF97 Table 36: T_s(1 MPa) = 453.035632 K.
        assert_eq!(water_phase(453.0, 1e6).unwrap(), StreamPhase::Liquid);
        assert_eq!(water_phase(453.1, 1e6).unwrap(), StreamPhase::Vapour);
    }

    #[test]
    fn enthalpy_decides_liquid_wet_or_steam() {
        let db = db();
        let w = db.index_of("H2O").unwrap();
        let n = flows(&db, &[("H2O", 1.5)]);
        let p = 30e5;
        // PyPI iapws 1.5.5: IAPWS97(P=3, x=0).T = 507.008445 K.
        let t_s = 507.008_445_006_252_2;
        for t in [300.0, 423.15, 500.0, 507.0] {
            let h = Stream::liquid(n.clone(), t, p).enthalpy_w(&db).unwrap();
            match water_at_enthalpy(&db, "u", w, &n, h, p, 400.0).unwrap() {
                WaterState::Liquid(back) => assert!((back - t).abs() < 1e-9, "{t}: {back}"),
                other => panic!("{t} K: {other:?}"),
            }
        }
        for t in [510.0, 700.0] {
            let h = Stream::vapour(n.clone(), t, p).enthalpy_w(&db).unwrap();
            match water_at_enthalpy(&db, "u", w, &n, h, p, 400.0).unwrap() {
                WaterState::Vapour(back) => assert!((back - t).abs() < 1e-9, "{t}: {back}"),
                other => panic!("{t} K: {other:?}"),
            }
        }
        // Half-way between saturated liquid and steam: wet steam at T_s, vapour fraction 1/2.
        let hv = Stream::vapour(n.clone(), t_s, p).enthalpy_w(&db).unwrap();
        let hl = Stream::liquid(n.clone(), t_s - 1e-9, p)
            .enthalpy_w(&db)
            .unwrap();
        match water_at_enthalpy(&db, "u", w, &n, 0.5 * (hv + hl), p, 400.0).unwrap() {
            WaterState::Wet {
                temperature_k,
                vapour_fraction,
                ..
            } => {
                assert!((temperature_k - t_s).abs() < 1e-9);
                assert!((vapour_fraction - 0.5).abs() < 1e-6);
            }
            other => panic!("{other:?}"),
        }
        // Colder than the triple point: an error, not an extrapolation.
        let cold = Stream::liquid(n.clone(), 274.0, p).enthalpy_w(&db).unwrap() - 1.5 * 2000.0;
        assert!(water_at_enthalpy(&db, "u", w, &n, cold, p, 400.0).is_err());
    }
}
