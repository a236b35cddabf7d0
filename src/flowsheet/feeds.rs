//! Feed streams: from the file's flows (per species, molar or mass) or total and mole fractions
//! to a vapour [`Stream`] in SI.
//!
//! A mass flow of a species is converted with its molar mass; a total mass flow with mole
//! fractions is converted with the mean molar mass of the mixture, M = sum x_i M_i. Mole
//! fractions must sum to 1 within 1e-6 (checked while parsing) and are then normalised. Normal cubic metres are converted by the quantity
//! parser at 22.414 m3/kmol (DIN 1343).

use super::values::{FlowRate, OrderedMap};
use super::yaml::FeedModel;
use crate::error::{Error, Result};
use crate::quantity::Flow;
use crate::thermo::{Phase, SpeciesDb};
use crate::units::Stream;

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
    Ok(Feed {
        name: name.to_string(),
        stream: Stream::vapour(flows, model.temperature.0, model.pressure.0),
    })
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
}
