//! The comparison of revamp options with their base ([`crate::study::compare`]), in four
//! formats:
//!
//! - `table`: for a terminal: a legend naming the base and each option, then one row per figure
//!   with one column per flowsheet, each followed by two rows with each option's change against
//!   the base (absolute, and % of the base); the purifier product's hydrogen is shown once, as
//!   hydrogen made;
//! - `markdown`: the same in GitHub-flavoured Markdown;
//! - `csv`: one row per figure; columns `figure` (its path), `unit`, the base and each option (by
//!   name), then `change: NAME` and `change %: NAME` for each option; written by the `csv` crate
//!   (RFC 4180), numbers in full precision, blank where a flowsheet lacks the figure;
//! - `json`: one object
//!   `{"base": {"name", "file", "summary", "units"}, "options": [{"name", "file", "summary",
//!   "units", "change", "change_pct"}]}`. `summary` is the `summary` object of
//!   `solve --format json`, same keys nested the same way; `units` is
//!   `{NAME: {outlet_temperature_degC, duty_kW}}`; `change` is option minus base key by key
//!   (`{"summary": ..., "units": ...}` nested the same way), null where either side lacks the
//!   value; `change_pct` is the change in % of the base, null also where the base is 0.
//!   Base and options carry `warnings`, the list of `solve --format json` (`{unit, code,
//!   message, value, limit}`).
//!
//! Table and Markdown end with the warnings of every flowsheet, each naming the flowsheet
//! (base, option 1, ...), and the cautions.
//!
//! Figure paths are those of [`crate::study::compare::figures`]: `summary.KEY[.UNIT]` and
//! `units.NAME.outlet_temperature_degC`, `units.NAME.duty_kW`.

use serde_json::{json, Map, Value};

use super::json::{number, summary_value};
use super::markdown::table_markdown;
use super::solve_table::table_text;
use super::tables::{fixed, Align, Row, Table};
use super::Format;
use crate::error::{Error, Result};
use crate::quantity::{kelvin_to_degc, w_to_kw};
use crate::study::compare::Solved;

/// Render a comparison (`solved[0]` the base, the others the options) in `format`.
pub fn render(solved: &[Solved], format: Format) -> Result<String> {
    if solved.is_empty() {
        return Err(Error::InvalidValue {
            field: "compare".into(),
            value: "no flowsheet".into(),
            reason: "give the base flowsheet and at least one option".into(),
        });
    }
    match format {
        Format::Json => Ok(format!("{:#}\n", to_value(solved))),
        Format::Csv => csv(solved),
        Format::Table => Ok(text(solved)),
        Format::Markdown => Ok(markdown(solved)),
    }
}

/// `{NAME: {outlet_temperature_degC, duty_kW}}` of a solution, units in solve order.
fn units_value(s: &Solved) -> Value {
    let units: Map<String, Value> = s
        .result
        .units
        .iter()
        .map(|u| {
            let t = u
                .result
                .outlets
                .first()
                .map_or(Value::Null, |o| number(kelvin_to_degc(o.temperature_k)));
            (
                u.name.clone(),
                json!({"outlet_temperature_degC": t, "duty_kW": number(w_to_kw(u.result.duty_w))}),
            )
        })
        .collect();
    Value::Object(units)
}

/// The figures of one flowsheet as one object `{summary, units}`.
fn figures_value(s: &Solved) -> Value {
    json!({"summary": summary_value(&s.result.summary), "units": units_value(s)})
}

/// Option minus base, key by key (and the change in % of the base): objects by the union of
/// their keys (the base's order first), numbers by difference, null where either side lacks a
/// number (and for % where the base is 0).
fn diff(base: &Value, option: &Value) -> (Value, Value) {
    let empty = Map::new();
    match (base, option) {
        (Value::Number(b), Value::Number(o)) => {
            let (b, o) = (
                b.as_f64().unwrap_or(f64::NAN),
                o.as_f64().unwrap_or(f64::NAN),
            );
            let change = o - b;
            let pct = if b != 0.0 {
                number(100.0 * change / b)
            } else {
                Value::Null
            };
            (number(change), pct)
        }
        (Value::Object(_), _) | (_, Value::Object(_)) => {
            let b = base.as_object().unwrap_or(&empty);
            let o = option.as_object().unwrap_or(&empty);
            let mut keys: Vec<&String> = b.keys().collect();
            keys.extend(o.keys().filter(|k| !b.contains_key(*k)));
            let mut change = Map::new();
            let mut pct = Map::new();
            for k in keys {
                let null = Value::Null;
                let (c, p) = diff(b.get(k).unwrap_or(&null), o.get(k).unwrap_or(&null));
                change.insert(k.clone(), c);
                pct.insert(k.clone(), p);
            }
            (Value::Object(change), Value::Object(pct))
        }
        _ => (Value::Null, Value::Null),
    }
}

/// The comparison as one JSON value (see the module documentation).
pub fn to_value(solved: &[Solved]) -> Value {
    let head = |s: &Solved| -> Map<String, Value> {
        let mut m = Map::new();
        m.insert("name".into(), json!(s.case.name));
        m.insert("file".into(), json!(s.case.file.display().to_string()));
        let f = figures_value(s);
        m.insert("summary".into(), f["summary"].clone());
        m.insert("units".into(), f["units"].clone());
        m.insert("warnings".into(), super::json::warnings(&s.result.warnings));
        m
    };
    let base_figures = figures_value(&solved[0]);
    let options: Vec<Value> = solved[1..]
        .iter()
        .map(|s| {
            let mut m = head(s);
            let (change, pct) = diff(&base_figures, &figures_value(s));
            m.insert("change".into(), change);
            m.insert("change_pct".into(), pct);
            Value::Object(m)
        })
        .collect();
    json!({
        "base": Value::Object(head(&solved[0])),
        "options": options,
        "cautions": super::CAUTIONS,
    })
}

/// Leaves of a JSON object as (dotted path, number or None).
fn flatten(prefix: &str, v: &Value, out: &mut Vec<(String, Option<f64>)>) {
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                flatten(&format!("{prefix}.{k}"), x, out);
            }
        }
        other => out.push((prefix.to_string(), other.as_f64())),
    }
}

/// The rows of the comparison: each figure path with its value in every flowsheet (base
/// first), in the base's order then figures only options have; figures no flowsheet holds are
/// left out.
fn rows(solved: &[Solved]) -> Vec<(String, Vec<Option<f64>>)> {
    let flat: Vec<Vec<(String, Option<f64>)>> = solved
        .iter()
        .map(|s| {
            let f = figures_value(s);
            let mut out = Vec::new();
            flatten("summary", &f["summary"], &mut out);
            flatten("units", &f["units"], &mut out);
            out
        })
        .collect();
    let mut paths: Vec<&str> = Vec::new();
    for list in &flat {
        for (p, _) in list {
            if !paths.contains(&p.as_str()) {
                paths.push(p);
            }
        }
    }
    paths
        .into_iter()
        .map(|p| {
            let values: Vec<Option<f64>> = flat
                .iter()
                .map(|list| list.iter().find(|(q, _)| q == p).and_then(|(_, v)| *v))
                .collect();
            (p.to_string(), values)
        })
        .filter(|(_, values)| values.iter().any(Option::is_some))
        .collect()
}

/// A short label, the unit and the decimals shown of a figure path.
pub(crate) fn label(path: &str) -> (String, &'static str, usize) {
    let tail = |prefix: &str| path.strip_prefix(prefix).map(str::to_string);
    let fixed_labels: [(&str, &str, &'static str, usize); 14] = [
        (
            "summary.hydrogen_product_kmol_h",
            "hydrogen product",
            "kmol/h",
            2,
        ),
        (
            "summary.hydrogen_product_Nm3_h",
            "hydrogen product",
            "Nm3/h",
            0,
        ),
        ("summary.hydrogen_made_kmol_h", "hydrogen made", "kmol/h", 2),
        ("summary.hydrogen_made_Nm3_h", "hydrogen made", "Nm3/h", 0),
        (
            "summary.hydrogen_per_carbon_fed",
            "H2 made per carbon fed",
            "mol/mol",
            4,
        ),
        ("summary.heating_duty_kW", "heating duties, sum", "kW", 1),
        ("summary.cooling_duty_kW", "cooling duties, sum", "kW", 1),
        ("summary.feed_LHV_MW", "feed LHV", "MW", 3),
        ("summary.fuel_LHV_MW", "fuel LHV", "MW", 3),
        ("summary.steam_export_t_h", "steam export", "t/h", 2),
        ("summary.steam_credit_GJ_per_t", "steam credit", "GJ/t", 2),
        (
            "summary.net_specific_energy_GJ_per_1000Nm3",
            "net specific energy",
            "GJ/1000 Nm3",
            3,
        ),
        (
            "summary.feed_specific_energy_GJ_per_1000Nm3",
            "feed specific energy",
            "GJ/1000 Nm3",
            3,
        ),
        (
            "summary.fuel_specific_energy_GJ_per_1000Nm3",
            "fuel specific energy",
            "GJ/1000 Nm3",
            3,
        ),
    ];
    if let Some((_, l, u, d)) = fixed_labels.iter().find(|(p, ..)| *p == path) {
        return (l.to_string(), u, *d);
    }
    if let Some(u) = tail("summary.methane_slip_percent_dry.") {
        return (format!("methane slip, {u}"), "mol % dry", 3);
    }
    if let Some(u) = tail("summary.co_slip_percent_dry.") {
        return (format!("CO slip, {u}"), "mol % dry", 3);
    }
    if let Some(u) = tail("summary.steam_to_carbon.") {
        return (format!("steam-to-carbon, {u}"), "mol/mol", 3);
    }
    if let Some(u) = tail("summary.carbon_margin.") {
        return (format!("carbon margin, {u}"), "1 - a", 3);
    }
    if let Some(u) = path
        .strip_prefix("units.")
        .and_then(|r| r.strip_suffix(".outlet_temperature_degC"))
    {
        return (format!("{u}, outlet"), "degC", 1);
    }
    if let Some(u) = path
        .strip_prefix("units.")
        .and_then(|r| r.strip_suffix(".duty_kW"))
    {
        return (format!("{u}, duty"), "kW", 1);
    }
    (path.to_string(), "", 4)
}

/// A change with its sign.
fn signed(x: f64, decimals: usize) -> String {
    let s = fixed(x, decimals);
    if x > 0.0 && !s.starts_with('+') {
        format!("+{s}")
    } else {
        s
    }
}

/// The side-by-side table (text and Markdown share it).
fn table(solved: &[Solved]) -> Table {
    let mut headers = vec!["figure".to_string(), "unit".to_string(), "base".to_string()];
    headers.extend((1..solved.len()).map(|k| format!("option {k}")));
    let mut align = vec![Align::Left, Align::Left];
    align.resize(headers.len(), Align::Right);
    let mut out = Table {
        title: "Comparison".into(),
        headers,
        align,
        rows: Vec::new(),
    };
    let blank = String::new;
    // The purifier product's hydrogen is the hydrogen made where there is a purifier: shown
    // once, as hydrogen made (JSON and CSV keep both).
    let shown = rows(solved)
        .into_iter()
        .filter(|(path, _)| !path.starts_with("summary.hydrogen_product_"));
    for (path, values) in shown {
        let (l, unit, d) = label(&path);
        let mut cells = vec![l, unit.to_string()];
        cells.extend(values.iter().map(|v| v.map_or_else(blank, |x| fixed(x, d))));
        out.rows.push(Row::Cells(cells));
        if solved.len() > 1 {
            let base = values[0];
            let mut change = vec!["  change".to_string(), unit.to_string(), blank()];
            let mut pct = vec!["  change, %".to_string(), "%".to_string(), blank()];
            for v in &values[1..] {
                let c = base.zip(*v).map(|(b, o)| o - b);
                change.push(c.map_or_else(blank, |c| signed(c, d)));
                let p = c.zip(base).filter(|(_, b)| *b != 0.0);
                pct.push(p.map_or_else(blank, |(c, b)| signed(100.0 * c / b, 2)));
            }
            // Change rows only where some option has a change to show.
            if change[3..].iter().any(|c| !c.is_empty()) {
                out.rows.push(Row::Cells(change));
            }
            if pct[3..].iter().any(|c| !c.is_empty()) {
                out.rows.push(Row::Cells(pct));
            }
        }
    }
    out
}

fn legend(solved: &[Solved]) -> Vec<String> {
    solved
        .iter()
        .enumerate()
        .map(|(k, s)| {
            let which = if k == 0 {
                "base".to_string()
            } else {
                format!("option {k}")
            };
            format!(
                "{which}: {}\n    file: {}",
                s.case.name,
                s.case.file.display()
            )
        })
        .collect()
}

/// Every warning of the base and the options, each line naming its flowsheet
/// ("base: unit 'hts': ...", "option 2: ...").
fn warning_lines(solved: &[Solved]) -> Vec<String> {
    let mut out = Vec::new();
    for (k, s) in solved.iter().enumerate() {
        let which = if k == 0 {
            "base".to_string()
        } else {
            format!("option {k}")
        };
        for w in &s.result.warnings {
            out.push(format!("{which}: {w}"));
        }
    }
    out
}

fn text(solved: &[Solved]) -> String {
    let mut out = String::new();
    for line in legend(solved) {
        out.push_str(&format!("  {line}\n"));
    }
    out.push('\n');
    out.push_str(&table_text(&table(solved)));
    out.push_str("\nWarnings\n");
    let lines = warning_lines(solved);
    if lines.is_empty() {
        out.push_str("  none\n");
    }
    for line in lines {
        out.push_str(&format!("  - {line}\n"));
    }
    out.push_str("\nCautions\n");
    out.push_str(&super::solve_table::wrap(
        super::CAUTIONS,
        2,
        super::tables::REPORT_WIDTH - 4,
    ));
    out
}

fn markdown(solved: &[Solved]) -> String {
    let mut out = String::from("# Comparison of options\n\n");
    for line in legend(solved) {
        let line = line.replace('|', "\\|").replace("\n    file:", ", file:");
        out.push_str(&format!("- {line}\n"));
    }
    out.push('\n');
    out.push_str(&table_markdown(&table(solved)));
    out.push_str("## Warnings\n\n");
    let lines = warning_lines(solved);
    if lines.is_empty() {
        out.push_str("None.\n");
    }
    for line in lines {
        out.push_str(&format!("- {}\n", line.replace('|', "\\|")));
    }
    out.push('\n');
    out.push_str("## Cautions\n\n");
    out.push_str(&format!("> {}\n", super::CAUTIONS));
    out
}

fn csv(solved: &[Solved]) -> Result<String> {
    let io = |e: csv::Error| Error::InvalidValue {
        field: "CSV output".into(),
        value: String::new(),
        reason: e.to_string(),
    };
    let mut w = csv::Writer::from_writer(Vec::new());
    let mut header = vec!["figure".to_string(), "unit".to_string()];
    header.extend(solved.iter().map(|s| s.case.name.clone()));
    for s in &solved[1..] {
        header.push(format!("change: {}", s.case.name));
        header.push(format!("change %: {}", s.case.name));
    }
    w.write_record(&header).map_err(io)?;
    let cell = |v: Option<f64>| {
        v.filter(|x| x.is_finite())
            .map_or(String::new(), |x| x.to_string())
    };
    for (path, values) in rows(solved) {
        let (_, unit, _) = label(&path);
        let mut record = vec![path.clone(), unit.to_string()];
        record.extend(values.iter().map(|v| cell(*v)));
        for v in &values[1..] {
            let c = values[0].zip(*v).map(|(b, o)| o - b);
            let p = c
                .zip(values[0])
                .filter(|(_, b)| *b != 0.0)
                .map(|(c, b)| 100.0 * c / b);
            record.push(cell(c));
            record.push(cell(p));
        }
        w.write_record(&record).map_err(io)?;
    }
    let bytes = w
        .into_inner()
        .map_err(|e| io(csv::Error::from(e.into_error())))?;
    String::from_utf8(bytes).map_err(|e| Error::InvalidValue {
        field: "CSV output".into(),
        value: String::new(),
        reason: e.to_string(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn differences_are_key_by_key_and_null_where_a_side_lacks_a_number() {
        let base = json!({"a": 2.0, "b": {"x": 0.0, "gone": 1.0}, "n": null});
        let option = json!({"a": 2.5, "b": {"x": 4.0, "new": 1.0}, "n": 3.0});
        let (c, p) = diff(&base, &option);
        assert_eq!(
            c,
            json!({"a": 0.5, "b": {"x": 4.0, "gone": null, "new": null}, "n": null})
        );
        assert_eq!(
            p,
            json!({"a": 25.0, "b": {"x": null, "gone": null, "new": null}, "n": null})
        );
        // A unit only the option has: an object of nulls, not a made-up change.
        let (c, _) = diff(&json!({}), &json!({"mts": {"duty_kW": 0.0}}));
        assert_eq!(c, json!({"mts": {"duty_kW": null}}));
    }

    #[test]
    fn labels_and_units_of_figure_paths() {
        assert_eq!(
            label("summary.co_slip_percent_dry.lts"),
            ("CO slip, lts".to_string(), "mol % dry", 3)
        );
        assert_eq!(
            label("units.hts.outlet_temperature_degC"),
            ("hts, outlet".to_string(), "degC", 1)
        );
        assert_eq!(label("summary.hydrogen_made_Nm3_h").1, "Nm3/h");
        assert_eq!(
            label("summary.net_specific_energy_GJ_per_1000Nm3").1,
            "GJ/1000 Nm3"
        );
        assert_eq!(signed(1.25, 1), "+1.2");
        assert_eq!(signed(-1.0, 1), "-1.0");
    }
}
