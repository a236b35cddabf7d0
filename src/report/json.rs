//! The solve result as one JSON object (RFC 8259), for scripts and spreadsheets.
//!
//! Stable keys (listed in DEVELOPERS.md; scripts may rely on them):
//! - `streams.<name>`: `temperature_K`, `pressure_bar` (absolute), `flow_kmol_h` {species: value},
//!   `enthalpy_kW` (total, formation enthalpies included)
//! - `units.<name>`: `type`, `inlets` [stream names], `outlets` [stream names], `duty_kW`
//! - `warnings`: [{`unit`, `code`, `message`, `value`, `limit`}]: value and limit in report units
//!   (degC for temperatures, K for differences, % for fractions), null where not applicable;
//!   `unit` is null for a warning about the flowsheet as a whole
//! - `targets`: [{`input`, `result`, `value`, `met`, `input_value`, `iterations`}], one per
//!   design target in the order they were met (file order), empty without targets: `input` the
//!   input path varied, `result` the result path met, `value` the value reached in the result
//!   path's own unit, `met` a boolean, `input_value` the input found in the report unit of its
//!   kind (degC, K, bar abs, kmol/h, %), `iterations` the flowsheet solves it took; beside them
//!   `input_unit` (the name of that report unit), `equals` and `tolerance` (result's unit)
//! - `recycles` (only for a flowsheet with cycles): {`tear_streams` [stream names],
//!   `iterations`, `residual` (largest scaled change of the tears in the last iteration),
//!   `converged` (a boolean; always true in a result, a recycle that does not converge is an
//!   error), `termination` (in words)}
//!
//! Beside them:
//! - top level: `title`, `summary`, `balances`, `cautions` (a result exists only when every unit
//!   converged and the balances closed; anything else is an error)
//! - `streams.<name>`: `source` ("feed" or the unit name), `destination` (unit name or null for a
//!   product), `phase` ("vapour" or "liquid"), `temperature_degC`, `total_kmol_h`,
//!   `total_Nm3_h` (ideal gas at 273.15 K and 101 325 Pa, DIN 1343), `mass_kg_h`, `mole_percent_wet`,
//!   `dew_point_degC` (water dew point at the stream's pressure, IAPWS-IF97 saturation line with
//!   Raoult's law; null for a stream without water),
//!   `mole_percent_dry` {species: value}
//! - `units.<name>`: `outlet_temperature_K`, `approach_K` {reaction: K},
//!   `figures` {key: {label, value, unit}} in report units (% for fractions, ppm, degC, K,
//!   kmol/h, bar abs), `warnings`, and for equilibrium units `converged`, `iterations`,
//!   `residuals` [one per reaction], `max_residual`, `energy_residual`, `gas_model` (`ideal` or
//!   `peng-robinson`)
//! - `summary`: `hydrogen_product_kmol_h` and `hydrogen_product_Nm3_h` (null without a purifier),
//!   `hydrogen_made_kmol_h` and `hydrogen_made_Nm3_h` (the purifier product's hydrogen where
//!   there is a purifier, else the hydrogen of the products less the hydrogen fed),
//!   `hydrogen_per_carbon_fed` (hydrogen made per mole of organic carbon fed, mol/mol; null
//!   without organic carbon fed),
//!   `methane_slip_percent_dry` {unit: %}, `co_slip_percent_dry` {unit: %},
//!   `steam_to_carbon` {unit: ratio}, `carbon_margin` {unit: smallest 1 - a of the carbon
//!   activities checked at each reformer and pre-reformer}, `heating_duty_kW`, `cooling_duty_kW`,
//!   and the energy figures ([`crate::flowsheet::energy`]): `feed_LHV_MW`, `fuel_LHV_MW`,
//!   `steam_export_t_h`, `steam_credit_GJ_per_t`, `net_specific_energy_GJ_per_1000Nm3`,
//!   `feed_specific_energy_GJ_per_1000Nm3`, `fuel_specific_energy_GJ_per_1000Nm3` (the last
//!   three null without hydrogen made)
//! - `heat_balance`: `heats_in`, `heats_out`, `transfers` [{`label`, `name`, `kW`}],
//!   `total_in_kW`, `total_out_kW`, `residual_kW` ([`super::energy`])
//! - `balances`: `element_residual`, `energy_residual` (relative)
//!
//! Species maps list every species that flows in some stream, the same keys in every stream,
//! in database order. Streams and units keep the order of the result (feeds first, then solve
//! order). Numbers are full precision; a value that is not finite is written as null.

use serde_json::{json, Map, Value};

use super::tables::{figure_value, phase_name, present_species, source_name};
use crate::error::{Result, ResultExt};
use crate::flowsheet::result::{FlowsheetResult, RecycleRecord, SolvedStream, Summary};
use crate::flowsheet::TargetOutcome;
use crate::quantity::{
    kelvin_to_degc, kg_s_to_kg_h, mol_s_to_kmol_h, mol_s_to_nm3_h, pa_to_bar, w_to_kw,
};
use crate::thermo::SpeciesDb;
use crate::units::Warning;

/// Render the solve result as pretty-printed JSON, ending in a newline.
pub fn render(db: &SpeciesDb, result: &FlowsheetResult) -> Result<String> {
    Ok(format!("{:#}\n", to_value(db, result)?))
}

/// The solve result as a JSON value.
pub fn to_value(db: &SpeciesDb, result: &FlowsheetResult) -> Result<Value> {
    let species = present_species(result);
    let mut streams = Map::new();
    for s in &result.streams {
        streams.insert(s.name.clone(), stream_value(db, s, &species)?);
    }
    let mut units = Map::new();
    for u in &result.units {
        let r = &u.result;
        let mut unit = Map::new();
        unit.insert("type".into(), json!(u.type_name));
        unit.insert("inlets".into(), json!(u.inlets));
        unit.insert("outlets".into(), json!(u.outlets));
        unit.insert("duty_kW".into(), number(w_to_kw(r.duty_w)));
        if let Some(first) = r.outlets.first() {
            unit.insert("outlet_temperature_K".into(), number(first.temperature_k));
        }
        let approaches: Map<String, Value> = r
            .approaches
            .iter()
            .map(|(reaction, dt)| (reaction.to_string(), number(*dt)))
            .collect();
        unit.insert("approach_K".into(), Value::Object(approaches));
        let figures: Map<String, Value> = r
            .figures
            .iter()
            .map(|f| {
                let (value, unit) = figure_value(f);
                (
                    f.key.to_string(),
                    json!({"label": f.label, "value": number(value), "unit": unit}),
                )
            })
            .collect();
        unit.insert("figures".into(), Value::Object(figures));
        if let Some(eq) = &r.equilibrium {
            unit.insert("converged".into(), json!(eq.converged()));
            unit.insert("gas_model".into(), json!(eq.gas_model.label()));
            unit.insert(
                "iterations".into(),
                json!(eq.iterations + eq.temperature_iterations),
            );
            let residuals: Vec<Value> = eq.residuals.iter().map(|x| number(*x)).collect();
            unit.insert("residuals".into(), Value::Array(residuals));
            unit.insert("max_residual".into(), number(eq.max_residual()));
            unit.insert("energy_residual".into(), number(eq.energy_residual));
        }
        unit.insert("warnings".into(), warnings(&r.warnings));
        units.insert(u.name.clone(), Value::Object(unit));
    }

    let summary = summary_value(&result.summary);
    let heat_balance =
        super::energy::heat_balance_value(&crate::flowsheet::energy::heat_balance(db, result)?);

    let mut top = Map::new();
    top.insert("title".into(), json!(result.title));
    top.insert("streams".into(), Value::Object(streams));
    top.insert("units".into(), Value::Object(units));
    top.insert("summary".into(), summary);
    top.insert("heat_balance".into(), heat_balance);
    top.insert("targets".into(), targets(&result.targets));
    if let Some(r) = &result.recycle {
        top.insert("recycles".into(), recycles(r));
    }
    top.insert(
        "balances".into(),
        json!({
            "element_residual": number(result.element_balance_residual),
            "energy_residual": number(result.energy_balance_residual),
        }),
    );
    top.insert("warnings".into(), warnings(&result.warnings));
    top.insert("cautions".into(), json!(super::CAUTIONS));
    Ok(Value::Object(top))
}

/// The recycle record (see the module docs).
fn recycles(r: &RecycleRecord) -> Value {
    json!({
        "tear_streams": r.tear_streams,
        "iterations": r.iterations,
        "residual": number(r.residual),
        "converged": r.termination.is_converged(),
        "termination": r.termination.to_string(),
    })
}

/// Design targets as objects (see the module docs).
fn targets(list: &[TargetOutcome]) -> Value {
    Value::Array(
        list.iter()
            .map(|t| {
                json!({
                    "input": t.input,
                    "input_value": number(t.input_kind.to_report(t.input_value)),
                    "input_unit": t.input_kind.report_unit(),
                    "result": t.result,
                    "value": number(t.value),
                    "equals": number(t.equals),
                    "tolerance": number(t.tolerance),
                    "met": t.met,
                    "iterations": t.iterations,
                })
            })
            .collect(),
    )
}

/// The plant summary as the JSON object of `solve --format json` (`summary`): see the module
/// documentation for its keys.
pub fn summary_value(s: &Summary) -> Value {
    let pairs = |list: &[(String, f64)], scale: f64| -> Value {
        Value::Object(
            list.iter()
                .map(|(unit, v)| (unit.clone(), number(v * scale)))
                .collect(),
        )
    };
    let mut v = json!({
        "hydrogen_product_kmol_h": s.hydrogen_product_mol_s.map(mol_s_to_kmol_h).map(number),
        "hydrogen_product_Nm3_h": s.hydrogen_product_mol_s.map(mol_s_to_nm3_h).map(number),
        "hydrogen_made_kmol_h": s.hydrogen_made_mol_s.map(mol_s_to_kmol_h).map(number),
        "hydrogen_made_Nm3_h": s.hydrogen_made_mol_s.map(mol_s_to_nm3_h).map(number),
        "hydrogen_per_carbon_fed": s.hydrogen_per_carbon_fed.map(number),
        "methane_slip_percent_dry": pairs(&s.methane_slip_dry, 100.0),
        "co_slip_percent_dry": pairs(&s.co_slip_dry, 100.0),
        "steam_to_carbon": pairs(&s.steam_to_carbon, 1.0),
        "carbon_margin": pairs(&s.carbon_margin, 1.0),
        "heating_duty_kW": number(w_to_kw(s.heating_duty_w)),
        "cooling_duty_kW": number(w_to_kw(s.cooling_duty_w)),
    });
    if let Value::Object(m) = &mut v {
        for (key, value) in super::energy::summary_keys(s) {
            m.insert(key.into(), value);
        }
    }
    v
}

/// Warnings as objects `{unit, code, message, value, limit}`; value and limit in report units
/// (degC, K, %, ...), null where a warning has none, `unit` null for the flowsheet as a whole.
pub(crate) fn warnings(list: &[Warning]) -> Value {
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

fn stream_value(db: &SpeciesDb, s: &SolvedStream, species: &[usize]) -> Result<Value> {
    let st = &s.stream;
    let enthalpy_w = st
        .enthalpy_w(db)
        .context(|| format!("enthalpy of stream '{}' for the report", s.name))?;
    let map = |value: &dyn Fn(usize) -> f64, skip_water: bool| -> Value {
        Value::Object(
            species
                .iter()
                .filter(|&&i| !(skip_water && db.by_index(i).name == "H2O"))
                .map(|&i| (db.by_index(i).name.clone(), number(value(i))))
                .collect(),
        )
    };
    let flow = |i: usize| mol_s_to_kmol_h(st.flows.get(i).copied().unwrap_or(0.0));
    let wet = |i: usize| 100.0 * st.mole_fraction(i);
    let dry = |i: usize| 100.0 * st.dry_mole_fraction(db, i);
    let destination = match &s.destination {
        Some(unit) => json!(unit),
        None => Value::Null,
    };
    let mut m = Map::new();
    m.insert("source".into(), json!(source_name(s)));
    m.insert("destination".into(), destination);
    m.insert("phase".into(), json!(phase_name(st.phase)));
    m.insert("temperature_K".into(), number(st.temperature_k));
    m.insert(
        "temperature_degC".into(),
        number(kelvin_to_degc(st.temperature_k)),
    );
    m.insert("pressure_bar".into(), number(pa_to_bar(st.pressure_pa)));
    m.insert(
        "dew_point_degC".into(),
        st.water_dew_point_k(db)
            .map_or(Value::Null, |t| number(kelvin_to_degc(t))),
    );
    m.insert("total_kmol_h".into(), number(mol_s_to_kmol_h(st.total())));
    m.insert("total_Nm3_h".into(), number(mol_s_to_nm3_h(st.total())));
    m.insert(
        "mass_kg_h".into(),
        number(kg_s_to_kg_h(crate::thermo::mixture::mass(db, &st.flows))),
    );
    m.insert("flow_kmol_h".into(), map(&flow, false));
    m.insert("mole_percent_wet".into(), map(&wet, false));
    m.insert("mole_percent_dry".into(), map(&dry, true));
    m.insert("enthalpy_kW".into(), number(w_to_kw(enthalpy_w)));
    Ok(Value::Object(m))
}

/// A finite number, or null.
pub fn number(x: f64) -> Value {
    serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::test_fixture::{fixture, with_db};

    #[test]
    fn stable_keys_and_values() {
        with_db(|db| {
            let result = fixture(db);
            let text = render(db, &result).unwrap();
            let v: Value = serde_json::from_str(&text).unwrap();
            let reformed = &v["streams"]["reformed"];
            // ISO 80000-5 and 80000-4.
            assert!((reformed["temperature_K"].as_f64().unwrap() - 1143.15).abs() < 1e-9);
            assert!((reformed["pressure_bar"].as_f64().unwrap() - 28.0).abs() < 1e-12);
            // 45 mol/s = 162 kmol/h.
            assert!((reformed["flow_kmol_h"]["CO"].as_f64().unwrap() - 162.0).abs() < 1e-9);
            // DIN 1343: 22.414 m3/kmol.
            let kmol = reformed["total_kmol_h"].as_f64().unwrap();
            let nm3 = reformed["total_Nm3_h"].as_f64().unwrap();
            assert!((nm3 / kmol / 22.414 - 1.0).abs() < 1e-4);
            let h = result.streams[3].stream.enthalpy_w(db).unwrap() / 1e3;
            assert!((reformed["enthalpy_kW"].as_f64().unwrap() - h).abs() <= 1e-9 * h.abs());
            // Same species keys in every stream; no species that flows nowhere.
            let keys = |s: &Value| -> Vec<String> {
                s["flow_kmol_h"]
                    .as_object()
                    .unwrap()
                    .keys()
                    .cloned()
                    .collect()
            };
            assert_eq!(keys(reformed), ["CH4", "H2O", "H2", "CO", "CO2", "N2"]);
            assert_eq!(keys(&v["streams"]["steam"]), keys(reformed));
            assert!(reformed["mole_percent_dry"].get("H2O").is_none());
            assert!(v["streams"]["hydrogen"]["destination"].is_null());

            let reformer = &v["units"]["reformer"];
            assert_eq!(reformer["type"], "reformer");
            assert_eq!(reformer["inlets"], json!(["mixed-feed"]));
            assert_eq!(reformer["outlets"], json!(["reformed"]));
            assert_eq!(reformer["approach_K"]["reforming"], 10.0);
            assert_eq!(reformer["converged"], true);
            assert_eq!(reformer["figures"]["methane-slip-dry"]["unit"], "%");
            let duty = reformer["duty_kW"].as_f64().unwrap();
            assert!((duty - result.units[1].result.duty_w / 1e3).abs() < 1e-9 * duty.abs());
            assert_eq!(v["warnings"].as_array().unwrap().len(), 1);
            assert!(v["cautions"].as_str().unwrap().contains("local codes"));
            assert!(v["summary"]["hydrogen_product_kmol_h"].as_f64().unwrap() > 1000.0);
            // The fixture's target: 1143.15 K is 870 degC (ISO 80000-5).
            let t = &v["targets"][0];
            assert_eq!(t["input"], "units.reformer.outlet-temperature");
            assert_eq!(t["result"], "streams.reformed.dry_mol_pct.CH4");
            assert!((t["input_value"].as_f64().unwrap() - 870.0).abs() < 1e-9);
            assert_eq!(t["input_unit"], "degC");
            assert_eq!(t["value"], 4.50003);
            assert_eq!(t["equals"], 4.5);
            assert_eq!(t["tolerance"], 1e-4);
            assert_eq!(t["met"], true);
            assert_eq!(t["iterations"], 7);
        });
    }

    #[test]
    fn order_of_the_result_is_kept() {
        with_db(|db| {
            let result = fixture(db);
            let v = to_value(db, &result).unwrap();
            let streams: Vec<&String> = v["streams"].as_object().unwrap().keys().collect();
            let expected: Vec<&String> = result.streams.iter().map(|s| &s.name).collect();
            assert_eq!(streams, expected);
            let units: Vec<&String> = v["units"].as_object().unwrap().keys().collect();
            assert_eq!(
                units,
                ["mixer", "reformer", "hts", "cooler", "knockout", "purifier"]
            );
        });
    }

    #[test]
    fn non_finite_numbers_become_null() {
        assert!(number(f64::NAN).is_null());
        assert_eq!(number(1.5), json!(1.5));
    }
}
