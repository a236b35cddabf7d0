//! Input and result paths: the names every numeric input and output of a flowsheet goes by.
//!
//! Input paths (values in SI when set through the library): `feeds.NAME.temperature`,
//! `feeds.NAME.pressure`, `feeds.NAME.total`, `feeds.NAME.flows.SPECIES`, `units.NAME.KEY` and
//! `units.NAME.KEY.SUBKEY` (`units.hts.approach.shift`, `units.reformer.outlet-temperature`),
//! and `energy.steam-credit` (J/kg).
//!
//! Result paths: `streams.NAME.temperature_K`, `streams.NAME.pressure_bar`,
//! `streams.NAME.flow_kmol_h.SPECIES`, `streams.NAME.dry_mol_pct.SPECIES`, `units.NAME.duty_kW`,
//! `units.NAME.outlet_temperature_K`, `units.NAME.figures.KEY` (in report units),
//! `summary.KEY` (the energy figures among them: `summary.feed_LHV_MW`, `summary.fuel_LHV_MW`,
//! `summary.steam_export_t_h`, `summary.steam_credit_GJ_per_t`,
//! `summary.net_specific_energy_GJ_per_1000Nm3` and the feed and fuel parts of it).
//!
//! A path that does not exist is an error listing the nearest valid ones, nearest by the
//! Levenshtein edit distance (Levenshtein 1966) on the whole path.

use super::result::FlowsheetResult;
use crate::error::{Error, Result};
use crate::quantity::{mol_s_to_kmol_h, mol_s_to_nm3_h, pa_to_bar, w_to_kw};
use crate::thermo::{mixture, SpeciesDb};

/// Where a result path reads from in a [`FlowsheetResult`] of its flowsheet: indices fixed by
/// the flowsheet's layout, so reading a value is a few array lookups (no text, no allocation).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ResultSlot {
    /// `streams.NAME.temperature_K`
    Temperature { stream: usize },
    /// `streams.NAME.pressure_bar`
    Pressure { stream: usize },
    /// `streams.NAME.flow_kmol_h.SPECIES`
    Flow { stream: usize, species: usize },
    /// `streams.NAME.dry_mol_pct.SPECIES`
    DryPercent { stream: usize, species: usize },
    /// `units.NAME.duty_kW`
    Duty { unit: usize },
    /// `units.NAME.outlet_temperature_K`
    OutletTemperature { unit: usize },
    /// `units.NAME.approach_K.REACTION`
    Approach { unit: usize, index: usize },
    /// `units.NAME.figures.KEY` (report units); the key is checked on every read.
    Figure {
        unit: usize,
        index: usize,
        key: &'static str,
    },
    /// `summary.hydrogen_product_kmol_h`
    HydrogenKmolH,
    /// `summary.hydrogen_product_Nm3_h`
    HydrogenNm3H,
    /// `summary.hydrogen_made_kmol_h`
    HydrogenMadeKmolH,
    /// `summary.hydrogen_made_Nm3_h`
    HydrogenMadeNm3H,
    /// `summary.hydrogen_per_carbon_fed` (mol/mol)
    HydrogenPerCarbonFed,
    /// `summary.methane_slip_percent_dry.UNIT`
    MethaneSlip { index: usize },
    /// `summary.co_slip_percent_dry.UNIT`
    CoSlip { index: usize },
    /// `summary.steam_to_carbon.UNIT`
    SteamToCarbon { index: usize },
    /// `summary.carbon_margin.UNIT`
    CarbonMargin { index: usize },
    /// `summary.heating_duty_kW`
    HeatingDuty,
    /// `summary.cooling_duty_kW`
    CoolingDuty,
    /// `summary.feed_LHV_MW`
    FeedLhv,
    /// `summary.fuel_LHV_MW`
    FuelLhv,
    /// `summary.steam_export_t_h`
    SteamExport,
    /// `summary.steam_credit_GJ_per_t`
    SteamCredit,
    /// `summary.net_specific_energy_GJ_per_1000Nm3`
    NetSpecificEnergy,
    /// `summary.feed_specific_energy_GJ_per_1000Nm3`
    FeedSpecificEnergy,
    /// `summary.fuel_specific_energy_GJ_per_1000Nm3`
    FuelSpecificEnergy,
}

/// The energy summary paths with their slots, in report order.
const ENERGY_PATHS: [(&str, ResultSlot); 7] = [
    ("summary.feed_LHV_MW", ResultSlot::FeedLhv),
    ("summary.fuel_LHV_MW", ResultSlot::FuelLhv),
    ("summary.steam_export_t_h", ResultSlot::SteamExport),
    ("summary.steam_credit_GJ_per_t", ResultSlot::SteamCredit),
    (
        "summary.net_specific_energy_GJ_per_1000Nm3",
        ResultSlot::NetSpecificEnergy,
    ),
    (
        "summary.feed_specific_energy_GJ_per_1000Nm3",
        ResultSlot::FeedSpecificEnergy,
    ),
    (
        "summary.fuel_specific_energy_GJ_per_1000Nm3",
        ResultSlot::FuelSpecificEnergy,
    ),
];

/// A result path resolved once against a result of its flowsheet; [`ResultPath::get`] reads it
/// from any other result of the same flowsheet.
#[derive(Debug, Clone, PartialEq)]
pub struct ResultPath {
    /// The path as written (`streams.lts-exit.dry_mol_pct.CO`).
    pub path: String,
    /// Where it reads from.
    pub slot: ResultSlot,
}

impl ResultPath {
    /// The value in the unit its name says (figures in report units); `None` when the result
    /// does not hold it (a figure a unit did not publish in this solve).
    pub fn get(&self, db: &SpeciesDb, r: &FlowsheetResult) -> Option<f64> {
        let stream = |i: usize| r.streams.get(i).map(|s| &s.stream);
        let unit = |i: usize| r.units.get(i).map(|u| &u.result);
        let s = &r.summary;
        let pct = |list: &[(String, f64)], i: usize, scale: f64| list.get(i).map(|e| e.1 * scale);
        match self.slot {
            ResultSlot::Temperature { stream: i } => stream(i).map(|s| s.temperature_k),
            ResultSlot::Pressure { stream: i } => stream(i).map(|s| pa_to_bar(s.pressure_pa)),
            ResultSlot::Flow { stream: i, species } => stream(i)
                .and_then(|s| s.flows.get(species))
                .map(|n| mol_s_to_kmol_h(*n)),
            ResultSlot::DryPercent { stream: i, species } => {
                stream(i).map(|s| 100.0 * s.dry_mole_fraction(db, species))
            }
            ResultSlot::Duty { unit: u } => unit(u).map(|r| w_to_kw(r.duty_w)),
            ResultSlot::OutletTemperature { unit: u } => unit(u)
                .and_then(|r| r.outlets.first())
                .map(|o| o.temperature_k),
            ResultSlot::Approach { unit: u, index } => {
                unit(u).and_then(|r| r.approaches.get(index)).map(|a| a.1)
            }
            ResultSlot::Figure {
                unit: u,
                index,
                key,
            } => unit(u).and_then(|r| {
                // The key is most often the very same static text: compared by address first.
                let at = |f: &&crate::units::Figure| std::ptr::eq(f.key, key) || f.key == key;
                r.figures
                    .get(index)
                    .filter(at)
                    .or_else(|| r.figures.iter().find(at))
                    .map(|f| f.kind.to_report(f.value))
            }),
            ResultSlot::HydrogenKmolH => s.hydrogen_product_mol_s.map(mol_s_to_kmol_h),
            ResultSlot::HydrogenNm3H => s.hydrogen_product_mol_s.map(mol_s_to_nm3_h),
            ResultSlot::HydrogenMadeKmolH => s.hydrogen_made_mol_s.map(mol_s_to_kmol_h),
            ResultSlot::HydrogenMadeNm3H => s.hydrogen_made_mol_s.map(mol_s_to_nm3_h),
            ResultSlot::HydrogenPerCarbonFed => s.hydrogen_per_carbon_fed,
            ResultSlot::MethaneSlip { index } => pct(&s.methane_slip_dry, index, 100.0),
            ResultSlot::CoSlip { index } => pct(&s.co_slip_dry, index, 100.0),
            ResultSlot::SteamToCarbon { index } => pct(&s.steam_to_carbon, index, 1.0),
            ResultSlot::CarbonMargin { index } => pct(&s.carbon_margin, index, 1.0),
            ResultSlot::HeatingDuty => Some(w_to_kw(s.heating_duty_w)),
            ResultSlot::CoolingDuty => Some(w_to_kw(s.cooling_duty_w)),
            ResultSlot::FeedLhv => Some(s.feed_lhv_w / 1e6),
            ResultSlot::FuelLhv => Some(s.fuel_lhv_w / 1e6),
            // kg/s to t/h: x 3600 / 1000.
            ResultSlot::SteamExport => Some(s.steam_export_kg_s * 3.6),
            ResultSlot::SteamCredit => Some(s.steam_credit_j_per_kg / 1e6),
            // J/Nm3 to GJ per 1000 Nm3: x 1e3 / 1e9.
            ResultSlot::NetSpecificEnergy => s.net_specific_energy_j_per_nm3.map(|x| x * 1e-6),
            ResultSlot::FeedSpecificEnergy => s.feed_specific_energy_j_per_nm3.map(|x| x * 1e-6),
            ResultSlot::FuelSpecificEnergy => s.fuel_specific_energy_j_per_nm3.map(|x| x * 1e-6),
        }
    }
}

/// Reads many result paths of one result, working out each stream's dry total once (a sweep
/// row reads the dry mol % of every species of every stream).
#[derive(Debug, Default)]
pub struct Reader {
    dry_totals: Vec<f64>,
}

impl Reader {
    /// Start reading a new result.
    pub fn start(&mut self, r: &FlowsheetResult) {
        self.dry_totals.clear();
        self.dry_totals.resize(r.streams.len(), f64::NAN);
    }

    /// The value of `path` in `r` (the result given to [`Reader::start`]); the same as
    /// [`ResultPath::get`].
    #[inline(always)]
    pub fn get(&mut self, db: &SpeciesDb, r: &FlowsheetResult, path: &ResultPath) -> Option<f64> {
        let ResultSlot::DryPercent { stream, species } = path.slot else {
            return path.get(db, r);
        };
        let flows = &r.streams.get(stream)?.stream.flows;
        let water = db.water();
        if Some(species) == water {
            return Some(0.0);
        }
        let total = self.dry_totals.get_mut(stream)?;
        if total.is_nan() {
            *total = mixture::total(flows) - water.map_or(0.0, |w| flows[w]);
        }
        let n = *flows.get(species)?;
        Some(if *total > 0.0 {
            100.0 * n / *total
        } else {
            0.0
        })
    }
}

impl FlowsheetResult {
    /// Every result path of this solution, in report order: streams (temperature, pressure,
    /// flow of every species of the database, dry mol % of every species but water), units
    /// (duty, outlet temperature, approaches, figures), summary.
    pub fn result_paths(&self, db: &SpeciesDb) -> Vec<ResultPath> {
        let mut out = Vec::new();
        let mut push = |path: String, slot: ResultSlot| out.push(ResultPath { path, slot });
        let water = db.water();
        for (i, s) in self.streams.iter().enumerate() {
            let n = &s.name;
            push(
                format!("streams.{n}.temperature_K"),
                ResultSlot::Temperature { stream: i },
            );
            push(
                format!("streams.{n}.pressure_bar"),
                ResultSlot::Pressure { stream: i },
            );
            for k in 0..s.stream.flows.len() {
                let species = &db.by_index(k).name;
                push(
                    format!("streams.{n}.flow_kmol_h.{species}"),
                    ResultSlot::Flow {
                        stream: i,
                        species: k,
                    },
                );
            }
            for k in (0..s.stream.flows.len()).filter(|k| Some(*k) != water) {
                let species = &db.by_index(k).name;
                push(
                    format!("streams.{n}.dry_mol_pct.{species}"),
                    ResultSlot::DryPercent {
                        stream: i,
                        species: k,
                    },
                );
            }
        }
        for (u, solved) in self.units.iter().enumerate() {
            let (n, r) = (&solved.name, &solved.result);
            push(format!("units.{n}.duty_kW"), ResultSlot::Duty { unit: u });
            if !r.outlets.is_empty() {
                push(
                    format!("units.{n}.outlet_temperature_K"),
                    ResultSlot::OutletTemperature { unit: u },
                );
            }
            for (index, (reaction, _)) in r.approaches.iter().enumerate() {
                push(
                    format!("units.{n}.approach_K.{reaction}"),
                    ResultSlot::Approach { unit: u, index },
                );
            }
            for (index, f) in r.figures.iter().enumerate() {
                push(
                    format!("units.{n}.figures.{}", f.key),
                    ResultSlot::Figure {
                        unit: u,
                        index,
                        key: f.key,
                    },
                );
            }
        }
        let s = &self.summary;
        if s.hydrogen_product_mol_s.is_some() {
            push(
                "summary.hydrogen_product_kmol_h".into(),
                ResultSlot::HydrogenKmolH,
            );
            push(
                "summary.hydrogen_product_Nm3_h".into(),
                ResultSlot::HydrogenNm3H,
            );
        }
        if s.hydrogen_made_mol_s.is_some() {
            push(
                "summary.hydrogen_made_kmol_h".into(),
                ResultSlot::HydrogenMadeKmolH,
            );
            push(
                "summary.hydrogen_made_Nm3_h".into(),
                ResultSlot::HydrogenMadeNm3H,
            );
        }
        if s.hydrogen_per_carbon_fed.is_some() {
            push(
                "summary.hydrogen_per_carbon_fed".into(),
                ResultSlot::HydrogenPerCarbonFed,
            );
        }
        for (index, (unit, _)) in s.methane_slip_dry.iter().enumerate() {
            push(
                format!("summary.methane_slip_percent_dry.{unit}"),
                ResultSlot::MethaneSlip { index },
            );
        }
        for (index, (unit, _)) in s.co_slip_dry.iter().enumerate() {
            push(
                format!("summary.co_slip_percent_dry.{unit}"),
                ResultSlot::CoSlip { index },
            );
        }
        for (index, (unit, _)) in s.steam_to_carbon.iter().enumerate() {
            push(
                format!("summary.steam_to_carbon.{unit}"),
                ResultSlot::SteamToCarbon { index },
            );
        }
        for (index, (unit, _)) in s.carbon_margin.iter().enumerate() {
            push(
                format!("summary.carbon_margin.{unit}"),
                ResultSlot::CarbonMargin { index },
            );
        }
        push("summary.heating_duty_kW".into(), ResultSlot::HeatingDuty);
        push("summary.cooling_duty_kW".into(), ResultSlot::CoolingDuty);
        for (path, slot) in ENERGY_PATHS {
            push(path.into(), slot);
        }
        out
    }

    /// Every result path of this solution with its value (in the unit its name says; figures in
    /// report units), in report order: streams, units, summary.
    pub fn result_values(&self, db: &SpeciesDb) -> Vec<(String, f64)> {
        self.result_paths(db)
            .into_iter()
            .filter_map(|p| p.get(db, self).map(|v| (p.path, v)))
            .collect()
    }

    /// Resolve a result path against this result (its flowsheet's layout); an unknown path is
    /// an error listing the nearest valid ones.
    pub fn resolve(&self, db: &SpeciesDb, path: &str) -> Result<ResultPath> {
        let all = self.result_paths(db);
        if let Some(p) = all.iter().find(|p| p.path == path) {
            return Ok(p.clone());
        }
        let known: Vec<&str> = all.iter().map(|p| p.path.as_str()).collect();
        Err(Error::InvalidValue {
            field: "result path".into(),
            value: path.to_string(),
            reason: format!(
                "no such result; the nearest are: {}",
                nearest(path, &known, 5).join(", ")
            ),
        })
    }

    /// The value of one result path; an unknown path is an error listing the nearest valid ones.
    pub fn value(&self, db: &SpeciesDb, path: &str) -> Result<f64> {
        let resolved = self.resolve(db, path)?;
        resolved.get(db, self).ok_or_else(|| Error::InvalidValue {
            field: "result path".into(),
            value: path.to_string(),
            reason: "this result holds no value there".into(),
        })
    }
}

/// The `count` paths of `known` nearest to `path` by edit distance, nearest first (ties in the
/// order of `known`).
pub fn nearest<'a>(path: &str, known: &[&'a str], count: usize) -> Vec<&'a str> {
    let mut scored: Vec<(usize, usize, &str)> = known
        .iter()
        .enumerate()
        .map(|(i, k)| (edit_distance(path, k), i, *k))
        .collect();
    scored.sort_unstable();
    scored.into_iter().take(count).map(|(_, _, k)| k).collect()
}

/// Levenshtein distance between two strings, by characters (one row of the table at a time).
pub fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut row: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut diagonal = row[0];
        row[0] = i + 1;
        for (j, cb) in b.iter().enumerate() {
            let above = row[j + 1];
            row[j + 1] = if ca == *cb {
                diagonal
            } else {
                1 + diagonal.min(above).min(row[j])
            };
            diagonal = above;
        }
    }
    row[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn levenshtein_distances() {
        // Levenshtein (1966); the classic worked pair: kitten -> sitting is 3 edits.
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("same", "same"), 0);
        assert_eq!(edit_distance("flaw", "lawn"), 2);
    }

    #[test]
    fn nearest_paths_first() {
        let known = [
            "units.hts.approach.shift",
            "units.lts.approach.shift",
            "units.reformer.outlet-temperature",
        ];
        let n = nearest("units.hts.aproach.shift", &known, 2);
        assert_eq!(
            n,
            vec!["units.hts.approach.shift", "units.lts.approach.shift"]
        );
    }
}
