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
    use super::matches;

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
        // The first and last parts may not overlap.
        assert!(!matches("ab*ba", "aba"));
    }
}
