//! Reports of `syntrain evaluate`: laboratory samples held against equilibrium, the trend of
//! each approach and the forecast of a limit.
//!
//! JSON: `{"samples": [{sample, unit, inlet, temperature_degC, pressure_bar, approach_K:
//! {REACTION}, extents_kmol_h: {REACTION}, measured_dry_pct, fitted_dry_pct, residuals_pct,
//! accuracy_pct, analysis_total_pct, outlet_kmol_h: {SPECIES}, warnings: [{unit, code, message,
//! value, limit}]}], "trends": [...], "forecast": {...} or null, "cautions"}`. Residuals are
//! measured minus fitted. CSV: one row per sample.

use serde_json::{json, Map, Value};

use super::json::number;
use crate::diagnostics::Warning;
use crate::error::{Error, Result};
use crate::evaluate::samples::date_text;
use crate::evaluate::{Evaluation, SampleResult, Trend};
use crate::quantity::{kelvin_to_degc, mol_s_to_kmol_h, pa_to_bar};
use crate::thermo::SpeciesDb;

/// The caution under every evaluation report.
pub const EXTRAPOLATION: &str = "The forecast is an extrapolation: it assumes the catalyst \
keeps ageing as it did while sampled, at the flowsheet's design rate. Screening results only: \
hot hydrogen and carbon monoxide at pressure are flammable and toxic; follow local codes and \
licensed engineering practice.";

/// Output form.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EvaluateFormat {
    /// Plain text for a terminal.
    Table,
    /// One JSON object.
    Json,
    /// One CSV row per sample.
    Csv,
}

/// Render the evaluation.
pub fn render(db: &SpeciesDb, e: &Evaluation, format: EvaluateFormat) -> Result<String> {
    match format {
        EvaluateFormat::Table => Ok(table(e)),
        EvaluateFormat::Json => serde_json::to_string_pretty(&to_value(db, e))
            .map(|s| s + "\n")
            .map_err(|err| Error::InvalidValue {
                field: "json".into(),
                value: String::new(),
                reason: err.to_string(),
            }),
        EvaluateFormat::Csv => csv(e),
    }
}

fn warnings(list: &[Warning]) -> Value {
    Value::Array(
        list.iter()
            .map(|w| {
                json!({
                    "unit": (!w.unit.is_empty()).then_some(w.unit.as_str()),
                    "code": w.code,
                    "message": w.message(),
                    "value": w.report_value().map(number),
                    "limit": w.report_limit().map(number),
                })
            })
            .collect(),
    )
}

fn sample_value(db: &SpeciesDb, r: &SampleResult) -> Value {
    let map = |pairs: &mut dyn Iterator<Item = (String, Value)>| Value::Object(pairs.collect());
    let outlet: Map<String, Value> = r
        .outlet_flows
        .iter()
        .enumerate()
        .filter(|(_, v)| **v > 0.0)
        .map(|(i, v)| (db.by_index(i).name.clone(), number(mol_s_to_kmol_h(*v))))
        .collect();
    json!({
        "sample": r.sample.id,
        "unit": r.sample.unit,
        "inlet": r.inlet_source,
        "gas_model": r.gas_model.label(),
        "temperature_degC": number(kelvin_to_degc(r.sample.temperature_k)),
        "pressure_bar": number(pa_to_bar(r.pressure_pa)),
        "approach_K": map(&mut r.approaches_k.iter().map(|(n, a)| (n.clone(), a.map_or(Value::Null, number)))),
        "extents_kmol_h": map(&mut r.extents_mol_s.iter().map(|(n, x)| (n.clone(), number(mol_s_to_kmol_h(*x))))),
        "measured_dry_pct": map(&mut r.analysis.iter().map(|a| (a.0.clone(), number(a.1)))),
        "fitted_dry_pct": map(&mut r.analysis.iter().map(|a| (a.0.clone(), number(a.2)))),
        "residuals_pct": map(&mut r.analysis.iter().map(|a| (a.0.clone(), number(a.1 - a.2)))),
        "accuracy_pct": map(&mut r.analysis.iter().map(|a| (a.0.clone(), number(a.3)))),
        "analysis_total_pct": number(r.analysis_total_pct),
        "outlet_kmol_h": Value::Object(outlet),
        "warnings": warnings(&r.warnings),
    })
}

fn trend_value(t: &Trend) -> Value {
    json!({
        "unit": t.unit,
        "reaction": t.reaction,
        "first_sample": date_text(t.origin_days.floor() as i64),
        "last_sample": date_text(t.last_days.floor() as i64),
        "samples": t.linear.count,
        "linear": {
            "approach_at_first_K": number(t.linear.intercept_k),
            "slope_K_per_year": number(365.25 * t.linear.slope_k_per_day),
            "slope_standard_error_K_per_year": number(365.25 * t.linear.slope_se_k_per_day),
            "residual_sd_K": number(t.linear.residual_sd_k),
        },
        "exponential": t.exponential.map(|x| json!({
            "approach_at_first_K": number(x.initial_k),
            "rate_per_year": number(365.25 * x.rate_per_day),
            "residual_sd_K": number(x.residual_sd_k),
        })),
        "better_fit": t.better(),
    })
}

fn date_or_null(d: Option<f64>) -> Value {
    d.map_or(Value::Null, |d| Value::String(date_text(d.floor() as i64)))
}

/// The JSON value of an evaluation (module docs).
pub fn to_value(db: &SpeciesDb, e: &Evaluation) -> Value {
    json!({
        "title": e.title,
        "samples": e.samples.iter().map(|r| sample_value(db, r)).collect::<Vec<_>>(),
        "trends": e.trends.iter().map(trend_value).collect::<Vec<_>>(),
        "forecast": e.crossing.as_ref().map(|c| json!({
            "limit": format!("{}{}{}", c.limit.path, if c.limit.above { ">" } else { "<" }, c.limit.value),
            "along": "linear trend, 95 % confidence band",
            "value_at_last_sample": number(c.value_at_last),
            "crossing": date_or_null(c.central_days),
            "band_earliest": date_or_null(c.early_days),
            "band_latest": date_or_null(c.late_days),
            "horizon": date_text(c.horizon_days.floor() as i64),
            "extrapolation": true,
        })),
        "cautions": EXTRAPOLATION,
    })
}

/// The gas model of the approaches: one line, naming the units when they differ.
fn gas_model_line(e: &Evaluation) -> String {
    let mut seen: Vec<(&str, &str)> = Vec::new();
    for r in &e.samples {
        let pair = (r.sample.unit.as_str(), r.gas_model.label());
        if !seen.contains(&pair) {
            seen.push(pair);
        }
    }
    let first = seen.first().map(|p| p.1);
    if seen.iter().all(|p| Some(p.1) == first) {
        format!(
            "Gas model of the approaches: {}\n",
            first.unwrap_or(crate::thermo::GasModel::Ideal.label())
        )
    } else {
        let each: Vec<String> = seen.iter().map(|(u, m)| format!("{u} {m}")).collect();
        format!("Gas model of the approaches: {}\n", each.join(", "))
    }
}

fn approach_text(a: Option<f64>) -> String {
    a.map_or("-".into(), |a| format!("{a:.1}"))
}

/// Plain text: one block per sample, then the trends and the forecast.
pub fn table(e: &Evaluation) -> String {
    let mut out = format!("Samples held against equilibrium: {}\n", e.title);
    out += &gas_model_line(e);
    out += "\n";
    for r in &e.samples {
        let approaches: Vec<String> = r
            .approaches_k
            .iter()
            .map(|(n, a)| format!("{n} {} K", approach_text(*a)))
            .collect();
        out += &format!(
            "{}  {}  {:.1} degC, {:.2} bar abs, inlet: {}; approach {}\n",
            r.sample.id,
            r.sample.unit,
            kelvin_to_degc(r.sample.temperature_k),
            pa_to_bar(r.pressure_pa),
            r.inlet_source,
            approaches.join(", ")
        );
        out += "  species   measured   fitted  residual  accuracy (mol % dry)\n";
        for (name, m, f, a) in &r.analysis {
            out += &format!("  {name:<7} {m:>10.3} {f:>8.3} {:>+9.3} {a:>9.3}\n", m - f);
        }
        let extents: Vec<String> = r
            .extents_mol_s
            .iter()
            .map(|(n, x)| format!("{n} {:.2} kmol/h", mol_s_to_kmol_h(*x)))
            .collect();
        out += &format!(
            "  analysis total {:.2} %; extents: {}\n",
            r.analysis_total_pct,
            extents.join(", ")
        );
        for w in &r.warnings {
            out += &format!("  warning [{}]: {}\n", w.code, w.message());
        }
    }
    if !e.trends.is_empty() {
        out += "\nTrends of the approach (dated samples)\n";
        out += "  unit, reaction        samples  linear K/year (+- se)   sd K  exp. 1/year   sd K  better\n";
        for t in &e.trends {
            let (rate, sd) = t.exponential.map_or(("-".into(), "-".into()), |x| {
                (
                    format!("{:.3}", 365.25 * x.rate_per_day),
                    format!("{:.2}", x.residual_sd_k),
                )
            });
            out += &format!(
                "  {:<20} {:>8}  {:>+8.2} (+- {:>5.2})  {:>6.2}  {:>11}  {:>5}  {}\n",
                format!("{}, {}", t.unit, t.reaction),
                t.linear.count,
                365.25 * t.linear.slope_k_per_day,
                365.25 * t.linear.slope_se_k_per_day,
                t.linear.residual_sd_k,
                rate,
                sd,
                t.better()
            );
        }
    }
    if let Some(c) = &e.crossing {
        let op = if c.limit.above { ">" } else { "<" };
        out += &format!(
            "\nForecast (an extrapolation along the linear trends, design rate)\n  limit {}{op}{}: \
             {:.4} at the last sample\n",
            c.limit.path, c.limit.value, c.value_at_last
        );
        let d = |x: Option<f64>| {
            x.map_or("not before the horizon".into(), |d| {
                date_text(d.floor() as i64)
            })
        };
        out += &format!(
            "  crossed on {} (95 % band of the trend: {} to {}; horizon {})\n",
            d(c.central_days),
            d(c.early_days),
            d(c.late_days),
            date_text(c.horizon_days.floor() as i64)
        );
    }
    out += &format!("\n{EXTRAPOLATION}\n");
    out
}

/// One CSV row per sample: sample, unit, temperature, pressure, each reaction's approach and
/// extent, each species measured / fitted / residual, the analysis total and the warning codes.
pub fn csv(e: &Evaluation) -> Result<String> {
    let mut reactions: Vec<String> = Vec::new();
    let mut species: Vec<String> = Vec::new();
    for r in &e.samples {
        for (n, _) in &r.approaches_k {
            if !reactions.contains(n) {
                reactions.push(n.clone());
            }
        }
        for a in &r.analysis {
            if !species.contains(&a.0) {
                species.push(a.0.clone());
            }
        }
    }
    let mut w = ::csv::Writer::from_writer(Vec::new());
    let mut header: Vec<String> = vec![
        "sample".into(),
        "unit".into(),
        "temperature_C".into(),
        "pressure_bar".into(),
    ];
    header.extend(reactions.iter().map(|n| format!("approach_K.{n}")));
    header.extend(reactions.iter().map(|n| format!("extent_kmol_h.{n}")));
    for s in &species {
        header.push(format!("measured_dry_pct.{s}"));
        header.push(format!("fitted_dry_pct.{s}"));
        header.push(format!("residual_pct.{s}"));
    }
    header.push("analysis_total_pct".into());
    header.push("warnings".into());
    let io = |err: ::csv::Error| Error::InvalidValue {
        field: "csv".into(),
        value: String::new(),
        reason: err.to_string(),
    };
    w.write_record(&header).map_err(io)?;
    let num = |x: f64| format!("{x:.6}");
    for r in &e.samples {
        let mut row = vec![
            r.sample.id.clone(),
            r.sample.unit.clone(),
            num(kelvin_to_degc(r.sample.temperature_k)),
            num(pa_to_bar(r.pressure_pa)),
        ];
        for n in &reactions {
            let a = r
                .approaches_k
                .iter()
                .find(|(m, _)| m == n)
                .and_then(|x| x.1);
            row.push(a.map_or(String::new(), num));
        }
        for n in &reactions {
            let x = r.extents_mol_s.iter().find(|(m, _)| m == n);
            row.push(x.map_or(String::new(), |x| num(mol_s_to_kmol_h(x.1))));
        }
        for s in &species {
            match r.analysis.iter().find(|a| &a.0 == s) {
                Some(a) => row.extend([num(a.1), num(a.2), num(a.1 - a.2)]),
                None => row.extend([String::new(), String::new(), String::new()]),
            }
        }
        row.push(num(r.analysis_total_pct));
        row.push(
            r.warnings
                .iter()
                .map(|w| w.code)
                .collect::<Vec<_>>()
                .join(";"),
        );
        w.write_record(&row).map_err(io)?;
    }
    let bytes = w.into_inner().map_err(|err| Error::InvalidValue {
        field: "csv".into(),
        value: String::new(),
        reason: err.to_string(),
    })?;
    String::from_utf8(bytes).map_err(|err| Error::InvalidValue {
        field: "csv".into(),
        value: String::new(),
        reason: err.to_string(),
    })
}
