//! Solving a checked flowsheet: each unit in the graph's order, then the plant summary and the
//! two balance checks over the whole flowsheet (products against feeds):
//!
//! - elements: for each element e, |sum products - sum feeds| / (sum feeds) <= 1e-9, the
//!   denominator being the feed amount of that element (or, for an element present only in
//!   traces, 1e-12 of all atoms fed, so that an absent element compares 0 with 0);
//! - energy: |H_products - H_feeds - sum of duties| <= 1e-6 of the larger of the feed enthalpy
//!   magnitude (sum over feeds of |H|, formation enthalpies included) and the sum of |duty|.
//!
//! A flowsheet that fails either check is an error, never a result. The steam-to-carbon ratio
//! is H2O over organic carbon (carbon in every gas species but CO and CO2), common practice.

use std::collections::HashMap;

use super::result::{FlowsheetResult, SolvedStream, SolvedUnit, StreamSource, Summary};
use super::yaml::UnitType;
use super::Flowsheet;
use crate::error::{Error, Result};
use crate::thermo::{mixture, water, SpeciesDb};
use crate::units::{Stream, StreamPhase, Warning};

/// Largest relative element-balance error a solved flowsheet may have.
pub const ELEMENT_BALANCE_TOLERANCE: f64 = 1e-9;
/// Largest relative energy-balance error a solved flowsheet may have.
pub const ENERGY_BALANCE_TOLERANCE: f64 = 1e-6;

/// Solve every unit in order and collect the result.
pub fn solve(fs: &Flowsheet, db: &SpeciesDb) -> Result<FlowsheetResult> {
    let n_streams = fs.feeds.len() + fs.units.iter().map(|u| u.outlets.len()).sum::<usize>();
    let mut streams: Vec<SolvedStream> = Vec::with_capacity(n_streams);
    let mut slot: HashMap<&str, usize> = HashMap::with_capacity(n_streams);
    let mut destination: HashMap<&str, &str> = HashMap::with_capacity(n_streams);
    for unit in &fs.units {
        for inlet in &unit.inlets {
            destination.insert(inlet, &unit.name);
        }
    }
    let dest = |name: &str| destination.get(name).map(|d| d.to_string());
    for feed in &fs.feeds {
        slot.insert(&feed.name, streams.len());
        streams.push(SolvedStream {
            name: feed.name.clone(),
            stream: feed.stream.clone(),
            source: StreamSource::Feed,
            destination: dest(&feed.name),
        });
    }

    let mut units: Vec<SolvedUnit> = Vec::with_capacity(fs.units.len());
    let mut warnings: Vec<Warning> = streams
        .iter()
        .filter(|s| s.destination.is_none())
        .map(|s| {
            Warning::new(
                "feed-unused",
                "feed {subject} goes to no unit; it is listed as a product as it is",
            )
            .subject(s.name.as_str())
        })
        .collect();
    warnings.extend(
        fs.feeds
            .iter()
            .filter_map(|f| super::feeds::near_saturation_warning(db, f)),
    );
    for unit in fs.units_in_order() {
        let result = {
            let mut inlets: Vec<&Stream> = Vec::with_capacity(unit.inlets.len());
            for name in &unit.inlets {
                let i = *slot.get(name.as_str()).ok_or_else(|| Error::Flowsheet {
                    reason: format!(
                        "stream '{name}' is needed by unit '{}' before it is made (internal \
                         error in the solve order)",
                        unit.name
                    ),
                })?;
                inlets.push(&streams[i].stream);
            }
            unit.prepared.solve(db, &inlets, None).map_err(|e| {
                e.context(format!("solving unit '{}' ({})", unit.name, unit.unit_type))
            })?
        };
        if result.outlets.len() != unit.outlets.len() {
            return Err(Error::Flowsheet {
                reason: format!(
                    "unit '{}' made {} outlet streams but lists {} in `to` (internal error)",
                    unit.name,
                    result.outlets.len(),
                    unit.outlets.len()
                ),
            });
        }
        for (name, stream) in unit.outlets.iter().zip(&result.outlets) {
            check_phase(db, &unit.name, name, stream)?;
            slot.insert(name, streams.len());
            streams.push(SolvedStream {
                name: name.clone(),
                stream: stream.clone(),
                source: StreamSource::Unit(unit.name.clone()),
                destination: dest(name),
            });
        }
        // Unit warnings already name their unit.
        warnings.extend(result.warnings.iter().cloned());
        units.push(SolvedUnit {
            name: unit.name.clone(),
            type_name: unit.unit_type.name().to_string(),
            inlets: unit.inlets.clone(),
            outlets: unit.outlets.clone(),
            result,
        });
    }

    let converged = units
        .iter()
        .all(|u| u.result.equilibrium.as_ref().is_none_or(|e| e.converged()));
    let summary = summary(db, fs, &streams, &slot, &units);
    let element_balance_residual = element_balance(db, &streams)?;
    let energy_balance_residual = energy_balance(db, &streams, &units)?;
    Ok(FlowsheetResult {
        title: fs.title.clone(),
        streams,
        units,
        summary,
        warnings,
        converged,
        element_balance_residual,
        energy_balance_residual,
    })
}

/// A unit outlet must be what its phase says: vapour at or above its water dew point, liquid
/// water at or below its saturation temperature (IAPWS-IF97 eqs. 30 and 31; 1e-9 relative on
/// the pressures for rounding). Otherwise it would be two phases, which a stream does not carry:
/// an error naming the stream and the unit, never a quiet label.
fn check_phase(db: &SpeciesDb, unit: &str, name: &str, s: &Stream) -> Result<()> {
    let Some(w) = db.index_of("H2O") else {
        return Ok(());
    };
    let (t, p, total) = (s.temperature_k, s.pressure_pa, s.total());
    if s.flows[w] <= 0.0 || total <= 0.0 || t >= water::CRITICAL_TEMPERATURE_K {
        return Ok(());
    }
    let p_sat = water::saturation_pressure_pa(t.max(water::SATURATION_MIN_TEMPERATURE_K))?;
    let wrong = match s.phase {
        StreamPhase::Vapour => s.flows[w] / total * p > p_sat * (1.0 + 1e-9),
        StreamPhase::Liquid => p < p_sat * (1.0 - 1e-9),
    };
    if !wrong {
        return Ok(());
    }
    let what = match s.phase {
        StreamPhase::Vapour => format!(
            "is gas below its water dew point (water partial pressure {:.4} bar above the \
             saturation pressure {:.4} bar): part of its water would condense; keep it above \
             its dew point, or cool it in a knockout, which condenses and separates the water",
            s.flows[w] / total * p / 1e5,
            p_sat / 1e5
        ),
        StreamPhase::Liquid => format!(
            "is liquid water above its saturation temperature at {:.4} bar: part of it would \
             flash to steam; raise its pressure or heat it to steam in a heater",
            p / 1e5
        ),
    };
    Err(Error::Flowsheet {
        reason: format!(
            "stream '{name}' from unit '{unit}' at {:.2} degC and {:.4} bar {what}",
            t - 273.15,
            p / 1e5
        ),
    })
}

/// Organic carbon (carbon in every gas species but CO and CO2), mol/s.
fn organic_carbon(db: &SpeciesDb, flows: &[f64]) -> f64 {
    flows
        .iter()
        .enumerate()
        .filter(|(_, n)| **n != 0.0)
        .map(|(i, n)| n * crate::reaction::organic_carbon_atoms(db.by_index(i)))
        .sum()
}

fn dry_fraction(db: &SpeciesDb, stream: &Stream, species: &str) -> Option<f64> {
    db.index_of(species)
        .map(|i| stream.dry_mole_fraction(db, i))
}

fn summary(
    db: &SpeciesDb,
    fs: &Flowsheet,
    streams: &[SolvedStream],
    slot: &HashMap<&str, usize>,
    units: &[SolvedUnit],
) -> Summary {
    let stream = |name: &str| slot.get(name).map(|&i| &streams[i].stream);
    let h2 = db.index_of("H2");
    let h2o = db.index_of("H2O");
    let mut s = Summary::default();
    for (unit, solved) in fs.units_in_order().zip(units) {
        let outlet = solved.result.outlets.first();
        match unit.unit_type {
            UnitType::Purifier => {
                if let (Some(product), Some(h2)) = (outlet, h2) {
                    *s.hydrogen_product_mol_s.get_or_insert(0.0) += product.flows[h2];
                }
            }
            UnitType::Reformer => {
                if let Some(x) = outlet.and_then(|o| dry_fraction(db, o, "CH4")) {
                    s.methane_slip_dry.push((unit.name.clone(), x));
                }
            }
            UnitType::Shift => {
                if let Some(x) = outlet.and_then(|o| dry_fraction(db, o, "CO")) {
                    s.co_slip_dry.push((unit.name.clone(), x));
                }
            }
            _ => {}
        }
        if matches!(unit.unit_type, UnitType::Reformer | UnitType::Prereformer) {
            let inlet = unit.inlets.first().and_then(|n| stream(n));
            if let (Some(inlet), Some(h2o)) = (inlet, h2o) {
                let carbon = organic_carbon(db, &inlet.flows);
                if carbon > 0.0 {
                    s.steam_to_carbon
                        .push((unit.name.clone(), inlet.flows[h2o] / carbon));
                }
            }
        }
        let q = solved.result.duty_w;
        if q > 0.0 {
            s.heating_duty_w += q;
        } else {
            s.cooling_duty_w += q;
        }
    }
    s
}

/// Largest relative element-balance error, products against feeds; an error above tolerance.
fn element_balance(db: &SpeciesDb, streams: &[SolvedStream]) -> Result<f64> {
    let elements = mixture::elements(db);
    // Feeds: streams made by a feed; products: streams no unit uses (a feed may be both).
    let sum = |feed: bool, element: &str| -> f64 {
        streams
            .iter()
            .filter(|s| match feed {
                true => s.source == StreamSource::Feed,
                false => s.destination.is_none(),
            })
            .map(|s| mixture::element_amount(db, &s.stream.flows, element))
            .sum()
    };
    let fed: Vec<f64> = elements.iter().map(|e| sum(true, e)).collect();
    let made: Vec<f64> = elements.iter().map(|e| sum(false, e)).collect();
    let all_atoms: f64 = fed.iter().sum();
    let mut worst = 0.0f64;
    let mut worst_element = String::new();
    for ((e, f), p) in elements.iter().zip(&fed).zip(&made) {
        let scale = f.max(1e-12 * all_atoms).max(f64::MIN_POSITIVE);
        let r = (p - f).abs() / scale;
        if !(r <= worst) {
            worst = r;
            worst_element = e.clone();
        }
    }
    if !(worst <= ELEMENT_BALANCE_TOLERANCE) {
        return Err(Error::Flowsheet {
            reason: format!(
                "element balance does not close: element {worst_element} is off by {worst:.3e} \
                 (relative, products against feeds; at most {ELEMENT_BALANCE_TOLERANCE:e} is \
                 allowed); the result is not reported"
            ),
        });
    }
    Ok(worst)
}

/// Relative energy-balance error; an error above tolerance.
fn energy_balance(db: &SpeciesDb, streams: &[SolvedStream], units: &[SolvedUnit]) -> Result<f64> {
    let mut h_feeds = 0.0;
    let mut h_feeds_abs = 0.0;
    let mut h_products = 0.0;
    for s in streams {
        if s.source == StreamSource::Feed {
            let h = s.stream.enthalpy_w(db)?;
            h_feeds += h;
            h_feeds_abs += h.abs();
        }
        if s.destination.is_none() {
            h_products += s.stream.enthalpy_w(db)?;
        }
    }
    let duties: f64 = units.iter().map(|u| u.result.duty_w).sum();
    let duties_abs: f64 = units.iter().map(|u| u.result.duty_w.abs()).sum();
    let scale = h_feeds_abs.max(duties_abs).max(1.0);
    let r = (h_products - h_feeds - duties).abs() / scale;
    if !(r <= ENERGY_BALANCE_TOLERANCE) {
        return Err(Error::Flowsheet {
            reason: format!(
                "energy balance does not close: products {h_products:.6e} W - feeds \
                 {h_feeds:.6e} W differs from the sum of duties {duties:.6e} W by {r:.3e} \
                 (relative; at most {ENERGY_BALANCE_TOLERANCE:e} is allowed); the result is \
                 not reported"
            ),
        });
    }
    Ok(r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::UnitResult;

    fn stream(
        db: &SpeciesDb,
        name: &str,
        source: StreamSource,
        dest: Option<&str>,
        pairs: &[(&str, f64)],
    ) -> SolvedStream {
        let mut flows = vec![0.0; db.len()];
        for (n, x) in pairs {
            flows[db.index_of(n).unwrap()] = *x;
        }
        SolvedStream {
            name: name.into(),
            stream: Stream::vapour(flows, 600.0, 2.0e6),
            source,
            destination: dest.map(str::to_string),
        }
    }

    fn unit(duty_w: f64) -> SolvedUnit {
        SolvedUnit {
            name: "u".into(),
            type_name: "heater".into(),
            inlets: vec!["a".into()],
            outlets: vec!["b".into()],
            result: UnitResult {
                outlets: Vec::new(),
                duty_w,
                approaches: Vec::new(),
                figures: Vec::new(),
                equilibrium: None,
                warnings: Vec::new(),
            },
        }
    }

    #[test]
    fn an_element_balance_that_does_not_close_is_an_error() {
        let db = SpeciesDb::embedded().unwrap();
        let feed = stream(&db, "a", StreamSource::Feed, Some("u"), &[("CH4", 1.0)]);
        let same = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0)],
        );
        assert!(element_balance(&db, &[feed.clone(), same]).unwrap() == 0.0);
        // 1e-8 relative too much carbon and hydrogen in the product.
        let more = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0 + 1e-8)],
        );
        let e = element_balance(&db, &[feed, more]).unwrap_err().to_string();
        assert!(
            e.contains("element balance does not close") && e.contains("not reported"),
            "{e}"
        );
    }

    #[test]
    fn an_energy_balance_that_does_not_close_is_an_error() {
        let db = SpeciesDb::embedded().unwrap();
        let feed = stream(&db, "a", StreamSource::Feed, Some("u"), &[("N2", 1.0)]);
        let mut hot = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("N2", 1.0)],
        );
        hot.stream.temperature_k = 700.0;
        let dh = hot.stream.enthalpy_w(&db).unwrap() - feed.stream.enthalpy_w(&db).unwrap();
        let streams = [feed, hot];
        assert!(energy_balance(&db, &streams, &[unit(dh)]).unwrap() < 1e-12);
        let e = energy_balance(&db, &streams, &[unit(dh * 0.99)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("energy balance does not close"), "{e}");
    }

    #[test]
    fn a_unit_outlet_in_two_phases_is_refused() {
        let db = SpeciesDb::embedded().unwrap();
        let f = |pairs: &[(&str, f64)]| {
            let mut v = vec![0.0; db.len()];
            for (n, x) in pairs {
                v[db.index_of(n).unwrap()] = *x;
            }
            v
        };
        // Gas with 30 % water at 25 bar: dew point 440.9 K (IAPWS-IF97 eq. 31).
        let wet = f(&[("H2", 0.7), ("H2O", 0.3)]);
        assert!(check_phase(&db, "u", "s", &Stream::vapour(wet.clone(), 445.0, 25e5)).is_ok());
        let e = check_phase(&db, "u", "s", &Stream::vapour(wet, 430.0, 25e5))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("stream 's' from unit 'u'") && e.contains("dew point"),
            "{e}"
        );
        // Liquid water above its saturation temperature (T_s(1 bar) = 372.76 K) would flash.
        let water = f(&[("H2O", 1.0)]);
        let liquid = |t: f64| Stream::liquid(water.clone(), t, 1e5);
        assert!(check_phase(&db, "u", "s", &liquid(360.0)).is_ok());
        assert!(check_phase(&db, "u", "s", &liquid(380.0)).is_err());
    }
}
