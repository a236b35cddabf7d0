//! The result columns of a sweep: every result path of the flowsheet (for every stream its
//! temperature, pressure, flows and dry mol %, for every unit its duty, outlet temperature,
//! approaches and figures, and every summary figure), the per-species columns limited to the
//! species that flow somewhere in the reference solution; or those a `--columns` list names.
//!
//! A `--columns` item is a result path, or a pattern in which `*` stands for any run of
//! characters (`streams.lts-exit.dry_mol_pct.*`, `summary.*`); a pattern that matches nothing
//! is an error listing the nearest valid paths.

use crate::error::{Error, Result};
use crate::flowsheet::paths::nearest;
use crate::flowsheet::{FlowsheetResult, ResultPath, ResultSlot};
use crate::thermo::SpeciesDb;

/// Every result path of `reference` a sweep writes by default.
pub fn default_columns(db: &SpeciesDb, reference: &FlowsheetResult) -> Vec<ResultPath> {
    let present: Vec<bool> = (0..db.len())
        .map(|k| {
            reference
                .streams
                .iter()
                .any(|s| s.stream.flows.get(k).is_some_and(|n| *n > 0.0))
        })
        .collect();
    reference
        .result_paths(db)
        .into_iter()
        .filter(|p| match p.slot {
            ResultSlot::Flow { species, .. } | ResultSlot::DryPercent { species, .. } => {
                present.get(species).copied().unwrap_or(false)
            }
            _ => true,
        })
        .collect()
}

/// The result paths `items` name (paths or `*` patterns), in the order given, each once.
pub fn select(
    db: &SpeciesDb,
    reference: &FlowsheetResult,
    items: &[String],
) -> Result<Vec<ResultPath>> {
    let all = reference.result_paths(db);
    let mut out: Vec<ResultPath> = Vec::new();
    for item in items.iter().map(|i| i.trim()).filter(|i| !i.is_empty()) {
        let matched: Vec<&ResultPath> = all.iter().filter(|p| matches(item, &p.path)).collect();
        if matched.is_empty() {
            let known: Vec<&str> = all.iter().map(|p| p.path.as_str()).collect();
            return Err(Error::InvalidValue {
                field: "--columns".into(),
                value: item.to_string(),
                reason: format!(
                    "no result path matches; the nearest are: {}",
                    nearest(item, &known, 5).join(", ")
                ),
            });
        }
        for p in matched {
            if !out.iter().any(|o| o.path == p.path) {
                out.push(p.clone());
            }
        }
    }
    Ok(out)
}

/// The unit a result path's values are in, for axis labels and tables.
pub fn unit_of(reference: &FlowsheetResult, path: &ResultPath) -> String {
    match path.slot {
        ResultSlot::Temperature { .. } | ResultSlot::OutletTemperature { .. } => "K".into(),
        ResultSlot::Approach { .. } => "K".into(),
        ResultSlot::Pressure { .. } => "bar abs".into(),
        ResultSlot::Flow { .. } => "kmol/h".into(),
        ResultSlot::DryPercent { .. } => "mol % dry".into(),
        ResultSlot::Duty { .. } | ResultSlot::HeatingDuty | ResultSlot::CoolingDuty => "kW".into(),
        ResultSlot::Figure { unit, key, .. } => reference
            .units
            .get(unit)
            .and_then(|u| u.result.figures.iter().find(|f| f.key == key))
            .map(|f| f.kind.report_unit().to_string())
            .unwrap_or_default(),
        ResultSlot::HydrogenKmolH | ResultSlot::HydrogenMadeKmolH => "kmol/h".into(),
        ResultSlot::HydrogenNm3H | ResultSlot::HydrogenMadeNm3H => "Nm3/h".into(),
        ResultSlot::HydrogenPerCarbonFed => "mol/mol".into(),
        ResultSlot::MethaneSlip { .. } | ResultSlot::CoSlip { .. } => "mol % dry".into(),
        ResultSlot::SteamToCarbon { .. } => "mol/mol".into(),
        ResultSlot::CarbonMargin { .. } => String::new(),
        ResultSlot::FeedLhv | ResultSlot::FuelLhv => "MW".into(),
        ResultSlot::SteamExport => "t/h".into(),
        ResultSlot::SteamCredit => "GJ/t".into(),
        ResultSlot::NetSpecificEnergy
        | ResultSlot::FeedSpecificEnergy
        | ResultSlot::FuelSpecificEnergy => "GJ/1000 Nm3".into(),
    }
}

/// The CO slip at the last shift outlet: the result a chart shows when none is named.
pub fn last_co_slip(db: &SpeciesDb, reference: &FlowsheetResult) -> Result<ResultPath> {
    match reference.summary.co_slip_dry.last() {
        Some((unit, _)) => reference.resolve(db, &format!("summary.co_slip_percent_dry.{unit}")),
        None => Err(Error::InvalidValue {
            field: "--y".into(),
            value: String::new(),
            reason: "this flowsheet has no shift converter; name the result to show with --y"
                .into(),
        }),
    }
}

/// True when `text` matches `pattern`, where `*` stands for any run of characters.
pub fn matches(pattern: &str, text: &str) -> bool {
    let parts: Vec<&str> = pattern.split('*').collect();
    if parts.len() == 1 {
        return pattern == text;
    }
    let (first, last) = (parts[0], parts[parts.len() - 1]);
    if !text.starts_with(first) || text.len() < first.len() + last.len() {
        return false;
    }
    let mut rest = &text[first.len()..text.len() - last.len()];
    if !text.ends_with(last) {
        return false;
    }
    for middle in &parts[1..parts.len() - 1] {
        match rest.find(middle) {
            Some(at) => rest = &rest[at + middle.len()..],
            None => return false,
        }
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::flowsheet::Flowsheet;

    fn demo(db: &SpeciesDb) -> FlowsheetResult {
        let path =
            std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml");
        Flowsheet::from_file(&path, db).unwrap().solve(db).unwrap()
    }

    #[test]
    fn default_columns_leave_out_species_that_flow_nowhere() {
        let db = SpeciesDb::embedded().unwrap();
        let r = demo(&db);
        let all = r.result_paths(&db);
        let cols = default_columns(&db, &r);
        let has = |p: &str| cols.iter().any(|c| c.path == p);
        assert!(has("streams.lts-exit.flow_kmol_h.CO"));
        assert!(has("streams.natural-gas.flow_kmol_h.C2H6"));
        assert!(has("units.hts.duty_kW") && has("summary.heating_duty_kW"));
        // Argon is in the database and flows nowhere in the demo train.
        assert!(db.index_of("Ar").is_some());
        assert!(!has("streams.lts-exit.flow_kmol_h.Ar"));
        assert!(!has("streams.lts-exit.dry_mol_pct.Ar"));
        assert!(all
            .iter()
            .any(|p| p.path == "streams.lts-exit.flow_kmol_h.Ar"));
        // Every other path is kept, in the same order.
        let kept: Vec<&str> = all
            .iter()
            .filter(|p| !p.path.ends_with(".Ar") && !p.path.ends_with(".O2"))
            .map(|p| p.path.as_str())
            .collect();
        let got: Vec<&str> = cols.iter().map(|c| c.path.as_str()).collect();
        assert!(got.len() < all.len());
        assert!(got.iter().all(|g| kept.contains(g)));
    }

    #[test]
    fn selections_keep_the_order_given_and_refuse_what_matches_nothing() {
        let db = SpeciesDb::embedded().unwrap();
        let r = demo(&db);
        let items = [
            "units.hts.duty_kW".to_string(),
            "summary.co_slip_percent_dry.*".to_string(),
            "units.hts.duty_kW".to_string(),
        ];
        let got: Vec<String> = select(&db, &r, &items)
            .unwrap()
            .into_iter()
            .map(|c| c.path)
            .collect();
        assert_eq!(
            got,
            [
                "units.hts.duty_kW",
                "summary.co_slip_percent_dry.hts",
                "summary.co_slip_percent_dry.lts"
            ]
        );
        let e = select(&db, &r, &["units.hts.duty_MW".to_string()]).unwrap_err();
        assert!(e.to_string().contains("units.hts.duty_kW"), "{e}");
    }

    #[test]
    fn units_of_result_paths_and_the_default_chart_result() {
        let db = SpeciesDb::embedded().unwrap();
        let r = demo(&db);
        let unit = |p: &str| unit_of(&r, &r.resolve(&db, p).unwrap());
        assert_eq!(unit("streams.lts-exit.temperature_K"), "K");
        assert_eq!(unit("streams.lts-exit.pressure_bar"), "bar abs");
        assert_eq!(unit("streams.lts-exit.flow_kmol_h.CO"), "kmol/h");
        assert_eq!(unit("streams.lts-exit.dry_mol_pct.CO"), "mol % dry");
        assert_eq!(unit("units.hts.duty_kW"), "kW");
        assert_eq!(unit("units.hts.approach_K.shift"), "K");
        assert_eq!(unit("units.reformer.figures.methane-slip-dry"), "%");
        // Each figure by its own key: a temperature and a pure number among fractions.
        assert_eq!(
            unit("units.reformer.figures.carbon-margin-temperature"),
            "degC"
        );
        assert_eq!(unit("units.reformer.figures.steam-to-carbon"), "");
        assert_eq!(unit("summary.hydrogen_product_Nm3_h"), "Nm3/h");
        assert_eq!(unit("summary.steam_to_carbon.reformer"), "mol/mol");
        assert_eq!(unit("summary.co_slip_percent_dry.lts"), "mol % dry");
        assert_eq!(
            unit("summary.methane_slip_percent_dry.reformer"),
            "mol % dry"
        );
        assert_eq!(unit("units.hts.outlet_temperature_K"), "K");
        assert_eq!(unit("summary.hydrogen_product_kmol_h"), "kmol/h");
        assert_eq!(unit("summary.hydrogen_made_kmol_h"), "kmol/h");
        assert_eq!(unit("summary.hydrogen_made_Nm3_h"), "Nm3/h");
        assert_eq!(unit("summary.hydrogen_per_carbon_fed"), "mol/mol");
        assert_eq!(unit("summary.cooling_duty_kW"), "kW");
        assert_eq!(unit("summary.heating_duty_kW"), "kW");
        assert_eq!(unit("summary.feed_LHV_MW"), "MW");
        assert_eq!(unit("summary.steam_export_t_h"), "t/h");
        assert_eq!(
            unit("summary.net_specific_energy_GJ_per_1000Nm3"),
            "GJ/1000 Nm3"
        );
        assert_eq!(
            last_co_slip(&db, &r).unwrap().path,
            "summary.co_slip_percent_dry.lts"
        );
    }

    #[test]
    fn patterns_match_runs_of_characters() {
        assert!(matches("summary.*", "summary.heating_duty_kW"));
        assert!(!matches("summary.*", "units.hts.duty_kW"));
        assert!(matches(
            "streams.*.dry_mol_pct.CO",
            "streams.lts-exit.dry_mol_pct.CO"
        ));
        assert!(!matches(
            "streams.*.dry_mol_pct.CO",
            "streams.lts-exit.dry_mol_pct.CO2"
        ));
        assert!(matches("units.hts.duty_kW", "units.hts.duty_kW"));
        assert!(!matches("units.hts.duty_kW", "units.hts.duty_kW2"));
        assert!(matches("*", "anything"));
        // The first and last parts may not overlap, but may meet.
        assert!(!matches("ab*ba", "aba"));
        assert!(matches("ab*ba", "abba"));
        assert!(matches("a*b", "ab"));
        assert!(matches("a*b*c", "aXbYc") && !matches("a*b*c", "aXcYb"));
        // A middle part used up is not found again; the ends keep their own characters.
        assert!(matches("a*b*b*c", "abbc") && !matches("a*b*b*c", "abc"));
        assert!(!matches("abc*c", "abc") && matches("abc*c", "abcc"));
    }
}
