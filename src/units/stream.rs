//! Process streams: flows per database species at a temperature and pressure, as vapour (an
//! ideal-gas mixture) or as liquid water (condensate, boiler-feed water).
//!
//! Phase rule for pure water (water the only species flowing): liquid strictly below its
//! saturation temperature T_s(P) on the IAPWS-IF97 saturation line, eq. (31)
//! ([`crate::thermo::water::is_liquid`]); at exactly T_s(P) it is saturated steam. A liquid
//! stream holds water only; its enthalpy is the ideal-gas value less the latent heat of
//! vaporisation at its temperature (IAPWS SR1-86(1992),
//! [`crate::thermo::water::latent_heat_j_per_mol`]); the pressure effect on the liquid is
//! neglected. A gas mixture is vapour only above its water dew point: the units and the feeds
//! refuse a mixture that would be partly condensed (a knockout condenses it).
//!
//! When the state of pure water follows from its enthalpy (an adiabatic mixer, a heater or
//! cooler given its duty), [`water_at_enthalpy`] decides between subcooled or saturated liquid,
//! wet steam and saturated or superheated steam at the pressure.

use super::common::temperature_at_enthalpy;
use crate::error::{Error, Result};
use crate::thermo::{mixture, water, Phase, SpeciesDb};

/// Phase of a whole stream.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StreamPhase {
    /// Ideal-gas mixture.
    Vapour,
    /// Liquid water (condensate, boiler-feed water): water only; its enthalpy is the ideal-gas
    /// value less the latent heat at its temperature.
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

    /// Enthalpy flow, W, formation enthalpies included.
    pub fn enthalpy_w(&self, db: &SpeciesDb) -> Result<f64> {
        let ideal = mixture::enthalpy(db, &self.flows, self.temperature_k)?;
        match self.phase {
            StreamPhase::Vapour => Ok(ideal),
            StreamPhase::Liquid => {
                let water = match db.water() {
                    Some(w) => w,
                    None => db.require("H2O", " (condensate)")?,
                };
                let n = self.flows[water];
                if n == 0.0 {
                    // No condensate: no latent heat (and no range check on the temperature).
                    return Ok(ideal);
                }
                Ok(ideal - n * crate::thermo::water::latent_heat_j_per_mol(self.temperature_k)?)
            }
        }
    }
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
/// when at least that of saturated steam, wet steam in between. Saturated steam is the
/// ideal-gas water enthalpy at T_s(P) and saturated liquid that less the latent heat there
/// (IAPWS-IF97 eq. 31 and IAPWS SR1-86(1992)). The liquid temperature is found by the Illinois
/// variant of the false-position method on [0.01 degC, T_s(P)]; the steam temperature by
/// Newton's method on the ideal-gas enthalpy. Outside the saturation line (below 611.213 Pa or
/// above the critical pressure) the water is treated as steam, as [`water_phase`] does.
pub(crate) fn water_at_enthalpy(
    db: &SpeciesDb,
    unit: &str,
    water: usize,
    flows: &[f64],
    target_w: f64,
    pressure_pa: f64,
    start_k: f64,
) -> Result<WaterState> {
    let n = flows[water];
    let on_the_line =
        (water::SATURATION_MIN_PRESSURE_PA..=water::CRITICAL_PRESSURE_PA).contains(&pressure_pa);
    if !on_the_line || n <= 0.0 {
        let t = temperature_at_enthalpy(db, unit, flows, target_w, start_k)?;
        water_phase(t, pressure_pa)?;
        return Ok(WaterState::Vapour(t));
    }
    let species = db.by_index(water);
    let t_s = water::saturation_temperature_k(pressure_pa)?;
    let h_vapour = n * species.enthalpy(t_s)?;
    let h_liquid = h_vapour - n * water::latent_heat_j_per_mol(t_s)?;
    if target_w >= h_vapour {
        let t = temperature_at_enthalpy(db, unit, flows, target_w, start_k.max(t_s))?;
        // Rounding can leave Newton's root a hair below T_s: it is saturated steam.
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
    let liquid_h = |t: f64| -> Result<f64> {
        Ok(n * (species.enthalpy(t)? - water::latent_heat_j_per_mol(t)?))
    };
    let mut lo = water::TRIPLE_POINT_TEMPERATURE_K;
    let mut hi = t_s;
    let mut f_lo = liquid_h(lo)? - target_w;
    let mut f_hi = h_liquid - target_w;
    if f_lo > 0.0 {
        return Err(Error::UnitSpec {
            unit: unit.to_string(),
            field: "energy balance".to_string(),
            reason: "the water would be cooled below its triple point (0.01 degC) and freeze; \
                     check the duty and the inlet temperatures"
                .to_string(),
        });
    }
    if f_hi == 0.0 {
        return Ok(WaterState::Liquid(t_s));
    }
    // Illinois false position: the bracket keeps a sign change, and the retained end's value
    // is halved when the same end is kept twice (superlinear, never leaves the bracket).
    let scale = target_w.abs().max(n * 1.0e3);
    let mut side = 0;
    for _ in 0..200 {
        let t = (lo * f_hi - hi * f_lo) / (f_hi - f_lo);
        let t = if t > lo && t < hi { t } else { 0.5 * (lo + hi) };
        let f = liquid_h(t)? - target_w;
        if f.abs() <= 1e-14 * scale || hi - lo <= 1e-12 * t {
            return Ok(WaterState::Liquid(t));
        }
        if f < 0.0 {
            lo = t;
            f_lo = f;
            if side == -1 {
                f_hi *= 0.5;
            }
            side = -1;
        } else {
            hi = t;
            f_hi = f;
            if side == 1 {
                f_lo *= 0.5;
            }
            side = 1;
        }
    }
    Err(Error::NotConverged {
        what: format!("liquid-water energy balance of unit '{unit}'"),
        iterations: 200,
        residual: f64::NAN,
        hint: String::new(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{db, flows};

    #[test]
    fn liquid_enthalpy_is_the_gas_less_the_latent_heat() {
        // IAPWS SR1-86(1992) via PyPI iapws 1.5.5: h''(423.15 K) - h'(423.15 K)
        // = 2746.047455 - 632.147355 kJ/kg = 2113.900 kJ/kg = 38.0826 kJ/mol (18.015268 g/mol).
        let db = db();
        let n = flows(&db, &[("H2O", 2.0)]);
        let gas = Stream::vapour(n.clone(), 423.15, 30e5);
        let liquid = Stream::liquid(n, 423.15, 30e5);
        let dh = gas.enthalpy_w(&db).unwrap() - liquid.enthalpy_w(&db).unwrap();
        assert!((dh / 2.0 - 38_082.6).abs() < 1.0, "{dh}");
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
