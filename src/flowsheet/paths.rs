//! Input and result paths: the names every numeric input and output of a flowsheet goes by.
//!
//! Input paths (values in SI when set through the library): `feeds.NAME.temperature`,
//! `feeds.NAME.pressure`, `feeds.NAME.total`, `feeds.NAME.flows.SPECIES`, `units.NAME.KEY` and
//! `units.NAME.KEY.SUBKEY` (`units.hts.approach.shift`, `units.reformer.outlet-temperature`).
//!
//! Result paths: `streams.NAME.temperature_K`, `streams.NAME.pressure_bar`,
//! `streams.NAME.flow_kmol_h.SPECIES`, `streams.NAME.dry_mol_pct.SPECIES`, `units.NAME.duty_kW`,
//! `units.NAME.outlet_temperature_K`, `units.NAME.figures.KEY` (in report units),
//! `summary.KEY`.
//!
//! A path that does not exist is an error listing the nearest valid ones, nearest by the
//! Levenshtein edit distance (Levenshtein 1966) on the whole path.

use super::result::FlowsheetResult;
use crate::error::{Error, Result};
use crate::quantity::{mol_s_to_kmol_h, mol_s_to_nm3_h, pa_to_bar, w_to_kw};
use crate::thermo::SpeciesDb;

impl FlowsheetResult {
    /// Every result path of this solution with its value (in the unit its name says; figures in
    /// report units), in report order: streams, units, summary.
    pub fn result_values(&self, db: &SpeciesDb) -> Vec<(String, f64)> {
        let mut out = Vec::new();
        let water = db.index_of("H2O");
        for s in &self.streams {
            let (n, st) = (&s.name, &s.stream);
            out.push((format!("streams.{n}.temperature_K"), st.temperature_k));
            out.push((
                format!("streams.{n}.pressure_bar"),
                pa_to_bar(st.pressure_pa),
            ));
            for (i, f) in st.flows.iter().enumerate() {
                let species = &db.by_index(i).name;
                out.push((
                    format!("streams.{n}.flow_kmol_h.{species}"),
                    mol_s_to_kmol_h(*f),
                ));
            }
            for i in 0..st.flows.len() {
                if Some(i) != water {
                    let species = &db.by_index(i).name;
                    let x = 100.0 * st.dry_mole_fraction(db, i);
                    out.push((format!("streams.{n}.dry_mol_pct.{species}"), x));
                }
            }
        }
        for u in &self.units {
            let (n, r) = (&u.name, &u.result);
            out.push((format!("units.{n}.duty_kW"), w_to_kw(r.duty_w)));
            if let Some(first) = r.outlets.first() {
                out.push((
                    format!("units.{n}.outlet_temperature_K"),
                    first.temperature_k,
                ));
            }
            for (reaction, a) in &r.approaches {
                out.push((format!("units.{n}.approach_K.{reaction}"), *a));
            }
            for f in &r.figures {
                out.push((
                    format!("units.{n}.figures.{}", f.key),
                    f.kind.to_report(f.value),
                ));
            }
        }
        let s = &self.summary;
        if let Some(h2) = s.hydrogen_product_mol_s {
            out.push((
                "summary.hydrogen_product_kmol_h".into(),
                mol_s_to_kmol_h(h2),
            ));
            out.push(("summary.hydrogen_product_Nm3_h".into(), mol_s_to_nm3_h(h2)));
        }
        for (list, key, scale) in [
            (&s.methane_slip_dry, "methane_slip_percent_dry", 100.0),
            (&s.co_slip_dry, "co_slip_percent_dry", 100.0),
            (&s.steam_to_carbon, "steam_to_carbon", 1.0),
        ] {
            for (unit, v) in list {
                out.push((format!("summary.{key}.{unit}"), v * scale));
            }
        }
        out.push(("summary.heating_duty_kW".into(), w_to_kw(s.heating_duty_w)));
        out.push(("summary.cooling_duty_kW".into(), w_to_kw(s.cooling_duty_w)));
        out
    }

    /// The value of one result path; an unknown path is an error listing the nearest valid ones.
    pub fn value(&self, db: &SpeciesDb, path: &str) -> Result<f64> {
        let all = self.result_values(db);
        if let Some((_, v)) = all.iter().find(|(p, _)| p == path) {
            return Ok(*v);
        }
        let known: Vec<&str> = all.iter().map(|(p, _)| p.as_str()).collect();
        Err(Error::InvalidValue {
            field: "result path".into(),
            value: path.to_string(),
            reason: format!(
                "no such result; the nearest are: {}",
                nearest(path, &known, 5).join(", ")
            ),
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
