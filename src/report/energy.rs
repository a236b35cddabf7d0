//! The plant's energy figures and its heat balance in reports (text, Markdown, JSON); the
//! figures and the balance themselves are defined in [`crate::flowsheet::energy`].
//!
//! Units: heating values in MW, steam in t/h, the steam credit in GJ/t, specific energies in GJ
//! per 1000 Nm3 of hydrogen made, heat balance lines in kW.

use serde_json::{json, Value};

use super::json::number;
use super::tables::{fixed, Align, Row, Table};
use crate::flowsheet::energy::{HeatBalance, HeatLine};
use crate::flowsheet::result::Summary;
use crate::quantity::{w_to_kw, w_to_mw};

/// kg/s to t/h.
pub fn kg_s_to_t_h(m: f64) -> f64 {
    m * 3.6
}

/// J/kg to GJ/t (the same number as MJ/kg).
pub fn j_per_kg_to_gj_per_t(x: f64) -> f64 {
    x / 1e6
}

/// J/Nm3 to GJ per 1000 Nm3.
pub fn j_per_nm3_to_gj_per_1000nm3(x: f64) -> f64 {
    x * 1e3 / 1e9
}

/// The energy figures of the summary as (label, value, unit) rows.
pub fn summary_rows(s: &Summary) -> Vec<(String, String, &'static str)> {
    let specific = |x: Option<f64>| {
        x.map_or("-".to_string(), |v| {
            fixed(j_per_nm3_to_gj_per_1000nm3(v), 3)
        })
    };
    let credit = fixed(j_per_kg_to_gj_per_t(s.steam_credit_j_per_kg), 2);
    vec![
        (
            "feed LHV (process feeds)".into(),
            fixed(w_to_mw(s.feed_lhv_w), 3),
            "MW",
        ),
        (
            "fuel LHV (make-up fuel)".into(),
            fixed(w_to_mw(s.fuel_lhv_w), 3),
            "MW",
        ),
        (
            "steam export".into(),
            fixed(kg_s_to_t_h(s.steam_export_kg_s), 2),
            "t/h",
        ),
        (
            format!("net specific energy (credit {credit} GJ/t)"),
            specific(s.net_specific_energy_j_per_nm3),
            "GJ/1000 Nm3 H2",
        ),
        (
            "  of which feed".into(),
            specific(s.feed_specific_energy_j_per_nm3),
            "GJ/1000 Nm3 H2",
        ),
        (
            "  of which fuel".into(),
            specific(s.fuel_specific_energy_j_per_nm3),
            "GJ/1000 Nm3 H2",
        ),
    ]
}

/// The energy figures as keys of the JSON `summary`.
pub fn summary_keys(s: &Summary) -> [(&'static str, Value); 7] {
    let specific = |x: Option<f64>| x.map(|v| number(j_per_nm3_to_gj_per_1000nm3(v)));
    [
        ("feed_LHV_MW", number(w_to_mw(s.feed_lhv_w))),
        ("fuel_LHV_MW", number(w_to_mw(s.fuel_lhv_w))),
        ("steam_export_t_h", number(kg_s_to_t_h(s.steam_export_kg_s))),
        (
            "steam_credit_GJ_per_t",
            number(j_per_kg_to_gj_per_t(s.steam_credit_j_per_kg)),
        ),
        (
            "net_specific_energy_GJ_per_1000Nm3",
            json!(specific(s.net_specific_energy_j_per_nm3)),
        ),
        (
            "feed_specific_energy_GJ_per_1000Nm3",
            json!(specific(s.feed_specific_energy_j_per_nm3)),
        ),
        (
            "fuel_specific_energy_GJ_per_1000Nm3",
            json!(specific(s.fuel_specific_energy_j_per_nm3)),
        ),
    ]
}

fn line_cells(l: &HeatLine) -> Vec<String> {
    vec![
        l.label.to_string(),
        l.name.clone(),
        fixed(w_to_kw(l.heat_w), 1),
    ]
}

/// The heat balance as a table: heats in, heats out, the closing line, then the transfers
/// inside the plant (not part of the sums).
pub fn heat_balance_table(b: &HeatBalance) -> Table {
    use Align::{Left, Right};
    let mut t = Table {
        title: "Heat balance (LHV basis, 25 degC, water as vapour)".into(),
        headers: vec!["heat".into(), "stream or unit".into(), "kW".into()],
        align: vec![Left, Left, Right],
        rows: Vec::new(),
    };
    t.rows.push(Row::Group("heats in".into()));
    t.rows
        .extend(b.heats_in.iter().map(|l| Row::Cells(line_cells(l))));
    t.rows.push(Row::Group("heats out".into()));
    t.rows
        .extend(b.heats_out.iter().map(|l| Row::Cells(line_cells(l))));
    t.rows.push(Row::Group("closing".into()));
    let cells = |label: &str, w: f64| {
        Row::Cells(vec![label.to_string(), String::new(), fixed(w_to_kw(w), 1)])
    };
    t.rows.push(cells("sum of heats in", b.total_in_w));
    t.rows.push(cells("sum of heats out", b.total_out_w));
    t.rows.push(Row::Cells(vec![
        "in - out (residual)".into(),
        String::new(),
        format!("{:.3e}", w_to_kw(b.residual_w())),
    ]));
    if !b.transfers.is_empty() {
        t.rows
            .push(Row::Group("inside the plant (not in the sums)".into()));
        t.rows
            .extend(b.transfers.iter().map(|l| Row::Cells(line_cells(l))));
    }
    t
}

/// The heat balance as the JSON object `heat_balance`: `heats_in`, `heats_out`, `transfers`
/// (lists of {`label`, `name`, `kW`}), `total_in_kW`, `total_out_kW`, `residual_kW`.
pub fn heat_balance_value(b: &HeatBalance) -> Value {
    let list = |lines: &[HeatLine]| -> Value {
        Value::Array(
            lines
                .iter()
                .map(|l| json!({"label": l.label, "name": l.name, "kW": number(w_to_kw(l.heat_w))}))
                .collect(),
        )
    };
    json!({
        "heats_in": list(&b.heats_in),
        "heats_out": list(&b.heats_out),
        "transfers": list(&b.transfers),
        "total_in_kW": number(w_to_kw(b.total_in_w)),
        "total_out_kW": number(w_to_kw(b.total_out_w)),
        "residual_kW": number(w_to_kw(b.residual_w())),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn report_units() {
        // 1 kg/s = 3600 kg/h = 3.6 t/h; 1 J/Nm3 = 1e-6 GJ per 1000 Nm3 (definitions).
        assert_eq!(kg_s_to_t_h(1.0), 3.6);
        assert_eq!(j_per_nm3_to_gj_per_1000nm3(1e7), 10.0);
        assert_eq!(j_per_kg_to_gj_per_t(2.9e6), 2.9);
        let b = HeatBalance {
            heats_in: vec![HeatLine {
                label: "feed LHV",
                name: "ng".into(),
                heat_w: 2e6,
            }],
            heats_out: vec![],
            transfers: vec![],
            total_in_w: 2e6,
            total_out_w: 1e6,
        };
        let v = heat_balance_value(&b);
        assert_eq!(v["residual_kW"].as_f64(), Some(1000.0));
        assert_eq!(v["heats_in"][0]["kW"].as_f64(), Some(2000.0));
        let t = heat_balance_table(&b);
        assert!(t.rows.contains(&Row::Group("closing".into())));
    }
}
