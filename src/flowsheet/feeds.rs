//! Feed streams: from the file's flows (per species, molar or mass) or total and mole fractions
//! to a [`Stream`] in SI.
//!
//! Phase: a feed of pure water is liquid (boiler-feed water) strictly below its saturation
//! temperature at the feed pressure on the IAPWS-IF97 saturation line, eq. (31), and steam at
//! or above it (at exactly T_s(P), saturated steam). A gas mixture is vapour, and one whose
//! water partial pressure lies above the saturation pressure of water at the feed temperature
//! (IAPWS-IF97 eq. 30), i.e. below its dew point, would be partly condensed and is refused with
//! what to do instead.
//!
//! A mass flow of a species is converted with its molar mass; a total mass flow with mole
//! fractions is converted with the mean molar mass of the mixture, M = sum x_i M_i. Mole
//! fractions must sum to 1 within 1e-6 (checked while parsing) and are then normalised. Normal cubic metres are converted by the quantity
//! parser at 22.414 m3/kmol (DIN 1343).

use super::values::{FlowRate, OrderedMap};
use super::yaml::FeedModel;
use crate::error::{Error, Result};
use crate::quantity::{kelvin_to_degc, Flow};
use crate::thermo::{water, Phase, SpeciesDb};
use crate::units::stream::water_phase;
use crate::units::unit::{Param, ParamTable, ValueKind};
use crate::units::{FigureKind, Stream, Warning};

/// Tolerance on the sum of mole fractions.
pub const MOLE_FRACTION_SUM_TOLERANCE: f64 = 1e-6;

/// A checked feed.
#[derive(Debug, Clone)]
pub struct Feed {
    /// Feed (stream) name.
    pub name: String,
    /// The stream, SI.
    pub stream: Stream,
}

/// Convert a feed as written into a stream.
pub fn convert(db: &SpeciesDb, name: &str, model: &FeedModel) -> Result<Feed> {
    let field = format!("feeds.{name}");
    // Which keys go together was checked while parsing (see `checks`).
    let flows = match (&model.flows, &model.total, &model.mole_fractions) {
        (Some(flows), None, None) => species_flows(db, &field, flows)?,
        (None, Some(total), Some(fractions)) => from_fractions(db, &field, *total, fractions)?,
        _ => {
            return invalid(
                &field,
                "flows/total",
                "give either `flows` (per species) or `total` with `mole-fractions`",
            )
        }
    };
    if flows.iter().sum::<f64>() <= 0.0 {
        return invalid(
            &field,
            "zero flow",
            "the feed has no flow at all; give at least one species a flow above zero",
        );
    }
    let stream = Stream::vapour(flows, model.temperature.0, model.pressure.0);
    Ok(Feed {
        name: name.to_string(),
        stream: with_phase(db, &field, stream)?,
    })
}

/// The input slots of a feed: `feeds.NAME.temperature`, `.pressure`, `.total` and
/// `.flows.SPECIES` for each species the file gives it.
#[derive(Debug, Clone, PartialEq)]
pub struct FeedInputs {
    /// Temperature, K.
    pub temperature: Param,
    /// Pressure, Pa.
    pub pressure: Param,
    /// Total molar flow, mol/s.
    pub total: Param,
    /// Molar flow of each species, mol/s: (database index, slot).
    pub flows: Vec<(usize, Param)>,
}

impl Feed {
    /// Register the feed's inputs.
    pub fn register(&self, db: &SpeciesDb, params: &mut ParamTable) -> FeedInputs {
        let n = &self.name;
        let s = &self.stream;
        FeedInputs {
            temperature: params.add(
                format!("feeds.{n}.temperature"),
                s.temperature_k,
                ValueKind::Temperature,
            ),
            pressure: params.add(
                format!("feeds.{n}.pressure"),
                s.pressure_pa,
                ValueKind::Pressure,
            ),
            total: params.add(format!("feeds.{n}.total"), s.total(), ValueKind::MolarFlow),
            flows: s
                .flows
                .iter()
                .enumerate()
                .filter(|(_, f)| **f > 0.0)
                .map(|(i, f)| {
                    let path = format!("feeds.{n}.flows.{}", db.by_index(i).name);
                    (i, params.add(path, *f, ValueKind::MolarFlow))
                })
                .collect(),
        }
    }

    /// Write the feed's stream for a parameter vector into `out` (its flow vector reused). The
    /// flows are those of `flows.SPECIES`; when `total` differs from the file's, they are scaled
    /// to it (so a total and a composition may be set together). The phase follows as for the
    /// file's feed.
    pub fn stream_into(
        &self,
        db: &SpeciesDb,
        inputs: &FeedInputs,
        params: &[f64],
        defaults: &[f64],
        out: &mut Stream,
    ) -> Result<()> {
        let same = |p: Param| params[p.0].to_bits() == defaults[p.0].to_bits();
        let unchanged = same(inputs.temperature)
            && same(inputs.pressure)
            && same(inputs.total)
            && inputs.flows.iter().all(|(_, p)| same(*p));
        if unchanged {
            out.flows.clear();
            out.flows.extend_from_slice(&self.stream.flows);
            out.temperature_k = self.stream.temperature_k;
            out.pressure_pa = self.stream.pressure_pa;
            out.phase = self.stream.phase;
            return Ok(());
        }
        let field = format!("feeds.{}", self.name);
        let value = |p: Param, key: &str, positive: bool| -> Result<f64> {
            let v = params[p.0];
            if v.is_finite() && (v > 0.0 || (!positive && v >= 0.0)) {
                Ok(v)
            } else {
                invalid(
                    &format!("{field}.{key}"),
                    &v.to_string(),
                    if positive {
                        "must be a positive, finite number (SI)"
                    } else {
                        "must be finite and not negative (SI)"
                    },
                )
            }
        };
        let t = value(inputs.temperature, "temperature", true)?;
        let p = value(inputs.pressure, "pressure", true)?;
        let mut flows = vec![0.0; db.len()];
        for (i, slot) in &inputs.flows {
            flows[*i] = value(*slot, &format!("flows.{}", db.by_index(*i).name), false)?;
        }
        let sum: f64 = flows.iter().sum();
        if !same(inputs.total) {
            let total = value(inputs.total, "total", true)?;
            if sum <= 0.0 {
                return invalid(
                    &field,
                    "zero flow",
                    "the feed has no flow to scale to `total`",
                );
            }
            flows.iter_mut().for_each(|f| *f *= total / sum);
        } else if sum <= 0.0 {
            return invalid(&field, "zero flow", "the feed has no flow at all");
        }
        *out = with_phase(db, &field, Stream::vapour(flows, t, p))?;
        Ok(())
    }
}

/// How close below its saturation temperature a pure-water feed is taken as liquid with a
/// warning, K: a temperature rounded down from T_s(P) meant as saturated steam would otherwise
/// turn into boiler water without a word.
pub const NEAR_SATURATION_K: f64 = 1.0;

/// A warning for a liquid-water feed within [`NEAR_SATURATION_K`] below its saturation
/// temperature (taken as liquid; saturated steam needs T >= T_s(P)).
pub fn near_saturation_warning(db: &SpeciesDb, feed: &str, s: &Stream) -> Option<Warning> {
    let w = db.water()?;
    if s.phase != crate::units::StreamPhase::Liquid || !s.is_pure_water(w) {
        return None;
    }
    let t_s = water::saturation_temperature_k(s.pressure_pa).ok()?;
    (t_s - s.temperature_k < NEAR_SATURATION_K).then(|| {
        Warning::new(
            "feed-near-saturation",
            "feed {subject}: water at {value} is just below its saturation temperature {limit} \
             and is taken as liquid; for saturated steam give a temperature at or above the \
             saturation temperature",
        )
        .value(s.temperature_k, FigureKind::Temperature)
        .limit(t_s)
        .subject(feed)
    })
}

/// A pure-water feed takes its phase from the saturation line; a gas mixture below its water
/// dew point is refused.
fn with_phase(db: &SpeciesDb, field: &str, mut stream: Stream) -> Result<Stream> {
    let Some(w) = db.water() else {
        return Ok(stream);
    };
    let (t, p) = (stream.temperature_k, stream.pressure_pa);
    if stream.is_pure_water(w) {
        stream.phase = water_phase(t, p).map_err(|e| match e {
            Error::InvalidValue { reason, .. } => Error::InvalidValue {
                field: format!("{field}.temperature"),
                value: format!("{:.2} degC at {:.4} bar", kelvin_to_degc(t), p / 1e5),
                reason: format!("a feed of pure water: {reason}"),
            },
            other => other,
        })?;
        return Ok(stream);
    }
    let total = stream.total();
    let p_water = stream.flows[w] / total * p;
    if p_water <= 0.0 || t >= water::CRITICAL_TEMPERATURE_K {
        return Ok(stream);
    }
    // Below 0 degC the bound is the saturation pressure at 273.15 K (over ice it is lower still,
    // so the check is lenient there).
    let p_sat = water::saturation_pressure_pa(t.max(water::SATURATION_MIN_TEMPERATURE_K))?;
    if p_water > p_sat {
        let dew = water::saturation_temperature_k(p_water.min(water::CRITICAL_PRESSURE_PA))
            .map(|d| format!("{:.1} degC", kelvin_to_degc(d)))
            .unwrap_or_else(|_| "above the critical temperature".to_string());
        return invalid(
            &format!("{field}.temperature"),
            &format!("{:.2} degC", kelvin_to_degc(t)),
            &format!(
                "the feed is a gas mixture partly condensed at its own temperature and pressure \
                 ({:.4} bar): its water partial pressure {:.4} bar is above the saturation \
                 pressure of water {:.4} bar at {:.2} degC (its dew point is {dew}), so part of \
                 its water would be liquid; give it at a temperature above its dew point, or, \
                 to model the wet gas with its condensate, give it hotter and pass it through \
                 a knockout at this temperature (the knockout condenses and separates the water)",
                p / 1e5,
                p_water / 1e5,
                p_sat / 1e5,
                kelvin_to_degc(t)
            ),
        );
    }
    Ok(stream)
}

/// Index of a gas species, or an error naming the field.
fn gas_species(db: &SpeciesDb, field: &str, name: &str) -> Result<usize> {
    let index = db.require(name, &format!(" in {field}"))?;
    if db.by_index(index).phase != Phase::Gas {
        return invalid(
            &format!("{field}.{name}"),
            name,
            "is not a gas; a feed holds gas species only",
        );
    }
    Ok(index)
}

/// Flows given per species.
fn species_flows(db: &SpeciesDb, field: &str, flows: &OrderedMap<FlowRate>) -> Result<Vec<f64>> {
    let field = format!("{field}.flows");
    if flows.is_empty() {
        return invalid(
            &field,
            "{}",
            "the list of flows is empty; give at least one species",
        );
    }
    let mut out = vec![0.0; db.len()];
    for (name, flow) in flows.iter() {
        let i = gas_species(db, &field, name)?;
        out[i] = match flow.0 {
            Flow::Molar(n) => n,
            Flow::Mass(m) => m / db.by_index(i).molar_mass_kg_per_mol,
        };
    }
    Ok(out)
}

/// Total flow with mole fractions.
fn from_fractions(
    db: &SpeciesDb,
    field: &str,
    total: FlowRate,
    fractions: &OrderedMap<crate::flowsheet::values::Fraction>,
) -> Result<Vec<f64>> {
    let fraction_field = format!("{field}.mole-fractions");
    let mut x = vec![0.0; db.len()];
    for (name, fraction) in fractions.iter() {
        let i = gas_species(db, &fraction_field, name)?;
        x[i] = fraction.0;
    }
    // The sum was checked to be 1 within the tolerance while parsing; normalise exactly.
    let sum: f64 = x.iter().sum();
    if !(sum > 0.0) {
        return invalid(&fraction_field, "0", "the mole fractions sum to zero");
    }
    let n_total = match total.0 {
        Flow::Molar(n) => n,
        Flow::Mass(m) => {
            let mean: f64 = x
                .iter()
                .enumerate()
                .map(|(i, xi)| xi * db.by_index(i).molar_mass_kg_per_mol)
                .sum::<f64>()
                / sum;
            m / mean
        }
    };
    Ok(x.iter().map(|xi| xi / sum * n_total).collect())
}

fn invalid<T>(field: &str, value: &str, reason: &str) -> Result<T> {
    Err(Error::InvalidValue {
        field: field.to_string(),
        value: value.to_string(),
        reason: reason.to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flowsheet::values::{Fraction, Pressure, Temperature};

    fn model(flows: Option<Vec<(&str, Flow)>>, total: Option<Flow>) -> FeedModel {
        FeedModel {
            temperature: Temperature(600.0),
            pressure: Pressure(3.0e6),
            flows: flows.map(|f| {
                OrderedMap(
                    f.into_iter()
                        .map(|(k, v)| (k.to_string(), FlowRate(v)))
                        .collect(),
                )
            }),
            total: total.map(FlowRate),
            mole_fractions: None,
        }
    }

    #[test]
    fn mass_flow_uses_the_species_molar_mass() {
        let db = SpeciesDb::embedded().unwrap();
        // IUPAC 2013 conventional atomic weights: M(CH4) = 12.011 + 4 * 1.008 = 16.043 g/mol.
        let m = model(Some(vec![("CH4", Flow::Mass(16.043e-3))]), None);
        let feed = convert(&db, "gas", &m).unwrap();
        let ch4 = db.index_of("CH4").unwrap();
        assert!((feed.stream.flows[ch4] - 1.0).abs() < 1e-4);
    }

    #[test]
    fn total_mass_flow_uses_the_mean_molar_mass() {
        let db = SpeciesDb::embedded().unwrap();
        let mut m = model(None, Some(Flow::Mass(0.5 * 16.043e-3 + 0.5 * 18.015e-3)));
        m.mole_fractions = Some(OrderedMap(vec![
            ("CH4".into(), Fraction(0.5)),
            ("H2O".into(), Fraction(0.5)),
        ]));
        let feed = convert(&db, "gas", &m).unwrap();
        assert!(
            (feed.stream.total() - 1.0).abs() < 1e-4,
            "{}",
            feed.stream.total()
        );
    }

    #[test]
    fn a_solid_is_not_a_feed_species() {
        let db = SpeciesDb::embedded().unwrap();
        let m = model(Some(vec![("C(gr)", Flow::Molar(1.0))]), None);
        let e = convert(&db, "coke", &m).unwrap_err().to_string();
        assert!(
            e.contains("feeds.coke.flows.C(gr)") && e.contains("not a gas"),
            "{e}"
        );
    }

    fn water_feed(t: f64, p: f64, pairs: Vec<(&str, Flow)>) -> FeedModel {
        let mut m = model(Some(pairs), None);
        m.temperature = Temperature(t);
        m.pressure = Pressure(p);
        m
    }

    #[test]
    fn pure_water_below_saturation_is_a_liquid_feed() {
        use crate::units::StreamPhase;
        let db = SpeciesDb::embedded().unwrap();
        // IAPWS-IF97 eq. (31): T_s(3 MPa) = 507.008 K (PyPI iapws 1.5.5, IAPWS97(P=3, x=0).T).
        let bfw = water_feed(423.15, 3.0e6, vec![("H2O", Flow::Molar(1.0))]);
        let feed = convert(&db, "bfw", &bfw).unwrap();
        assert_eq!(feed.stream.phase, StreamPhase::Liquid);
        assert!(near_saturation_warning(&db, &feed.name, &feed.stream).is_none());
        let steam = water_feed(507.01, 3.0e6, vec![("H2O", Flow::Molar(1.0))]);
        assert_eq!(
            convert(&db, "s", &steam).unwrap().stream.phase,
            StreamPhase::Vapour
        );
        let near = water_feed(506.5, 3.0e6, vec![("H2O", Flow::Molar(1.0))]);
        let feed = convert(&db, "near", &near).unwrap();
        assert_eq!(feed.stream.phase, StreamPhase::Liquid);
        let w = near_saturation_warning(&db, &feed.name, &feed.stream).unwrap();
        assert_eq!(w.code, "feed-near-saturation");
        assert!((w.limit.unwrap() - 507.008).abs() < 1e-3, "{w:?}");
        let text = w.to_string();
        assert!(
            text.contains("feed near") && text.contains("233.9 degC"),
            "{text}"
        );
        // Water at 0 degC would freeze; compressed water above the critical pressure is not
        // modelled: both refused, naming the feed's temperature.
        let ice = water_feed(273.15, 3.0e6, vec![("H2O", Flow::Molar(1.0))]);
        let e = convert(&db, "ice", &ice).unwrap_err().to_string();
        assert!(
            e.contains("feeds.ice.temperature") && e.contains("freeze"),
            "{e}"
        );
        let deep = water_feed(500.0, 25.0e6, vec![("H2O", Flow::Molar(1.0))]);
        assert!(convert(&db, "deep", &deep).is_err());
    }

    #[test]
    fn a_gas_mixture_below_its_dew_point_is_refused() {
        let db = SpeciesDb::embedded().unwrap();
        let pairs = || vec![("H2", Flow::Molar(0.7)), ("H2O", Flow::Molar(0.3))];
        // y_H2O P = 7.5 bar: dew point 440.9 K (IAPWS-IF97 eq. 31); p_s(393.15 K) = 1.99 bar
        // (eq. 30), so at 120 degC part of the water is liquid.
        let e = convert(&db, "wet", &water_feed(393.15, 25e5, pairs()))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("feeds.wet.temperature")
                && e.contains("partly condensed")
                && e.contains("knockout"),
            "{e}"
        );
        // Above the dew point it is a vapour feed.
        let ok = convert(&db, "wet", &water_feed(445.0, 25e5, pairs())).unwrap();
        assert_eq!(ok.stream.phase, crate::units::StreamPhase::Vapour);
    }
}
