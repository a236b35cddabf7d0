//! The exchanger and the separator in a flowsheet, through the real binary: a reformed-gas feed
//! cooled against boiler-feed water, its CO2 then removed; the JSON outputs, the closing of the
//! balances, and the named ports of the exchanger in the file (their errors at the right line).
//! Feeds are invented demo values.

use std::process::{Command, Output, Stdio};

use serde_json::Value;

fn syntrain(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    out
}

const FEEDS: &str = "\
title: exchanger demo (invented values)
feeds:
  reformed-gas:
    temperature: 350 degC
    pressure: 24 bar
    flows: {H2: 1800 kmol/h, CO: 180 kmol/h, CO2: 288 kmol/h, CH4: 72 kmol/h, H2O: 1260 kmol/h}
  boiler-feed-water:
    temperature: 105 degC
    pressure: 40 bar
    flows: {H2O: 3000 kmol/h}
";

const UNITS: &str = "\
units:
  - name: gas-water-exchanger
    type: exchanger
    hot-from: reformed-gas
    hot-to: cooled-gas
    cold-from: boiler-feed-water
    cold-to: hot-water
    hot-outlet-temperature: 250 degC
    hot-pressure-drop: 0.2 bar
  - name: co2-removal
    type: separator
    from: cooled-gas
    to: [co2-lean-gas, removed-co2]
    removal: {CO2: 0.99}
    duty-per-tonne-co2: 2.5 GJ/t
";

/// Write `text` to a temporary flowsheet and run `solve --format json` on it.
fn solve(text: &str) -> Output {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("flowsheet.yaml");
    std::fs::write(&path, text).unwrap();
    syntrain(&["solve", path.to_str().unwrap(), "--format", "json"])
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn exchanger_and_separator_solve_and_balance() {
    let out = solve(&format!("{FEEDS}{UNITS}"));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{err}");
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let s = &v["streams"];
    let h = |name: &str| f(&s[name]["enthalpy_kW"]);
    // Heat given by the hot side = heat taken by the cold side (duty closure, 1e-9 relative).
    let given = h("reformed-gas") - h("cooled-gas");
    let taken = h("hot-water") - h("boiler-feed-water");
    let x = &v["units"]["gas-water-exchanger"];
    let q = f(&x["figures"]["heat-transferred"]["value"]);
    assert!((given - taken).abs() <= 1e-9 * q, "{given} vs {taken}");
    assert!((given - q).abs() <= 1e-9 * q, "{given} vs {q}");
    assert_eq!(f(&x["duty_kW"]), 0.0);
    assert_eq!(
        x["inlets"],
        serde_json::json!(["reformed-gas", "boiler-feed-water"])
    );
    assert_eq!(x["outlets"], serde_json::json!(["cooled-gas", "hot-water"]));
    // 250 degC = 523.15 K (ISO 80000-5); 24 bar less 0.2 bar.
    assert!((f(&s["cooled-gas"]["temperature_K"]) - 523.15).abs() < 1e-9);
    assert!((f(&s["cooled-gas"]["pressure_bar"]) - 23.8).abs() < 1e-12);
    // Rough size, ideal gas: about 3600 kmol/h x 31 J/(mol K) x 100 K = 3.1 MW; the water rises
    // by Q / (n cp), cp of liquid water about 75.5 J/(mol K) at 105-150 degC (from memory).
    // The liquid enthalpy of the stream module (ideal-gas steam less the latent heat) gives
    // about 86 J/(mol K) there, so the rise is checked within 20 %.
    assert!(q > 2800.0 && q < 3500.0, "{q}");
    let rise = f(&s["hot-water"]["temperature_K"]) - 378.15;
    let expected = q * 1e3 / (3000.0 / 3.6 * 75.5);
    assert!((rise / expected - 1.0).abs() < 0.2, "{rise} vs {expected}");
    // The separator: CO2 by fraction, the rest in the product; removal heat by hand.
    let flow = |name: &str, sp: &str| f(&s[name]["flow_kmol_h"][sp]);
    assert!((flow("removed-co2", "CO2") - 0.99 * 288.0).abs() < 1e-9);
    assert!((flow("co2-lean-gas", "CO2") - 0.01 * 288.0).abs() < 1e-9);
    assert!((flow("co2-lean-gas", "H2") - 1800.0).abs() < 1e-9);
    let sep = &v["units"]["co2-removal"]["figures"];
    // 285.12 kmol/h x 44.0095 kg/kmol = 12 547.99 kg/h; x 2.5 GJ/t = 3.4856 MW.
    let kg_h = f(&sep["co2-removed"]["value"]);
    assert!((kg_h / 12_548.0 - 1.0).abs() < 1e-4, "{kg_h}");
    let kw = f(&sep["removal-heat"]["value"]);
    assert!((kw - kg_h / 3600.0 * 2.5e6 / 1e3).abs() < 1e-6 * kw, "{kw}");
    // Whole flowsheet balances.
    assert!(f(&v["balances"]["energy_residual"]) < 1e-9);
    assert!(f(&v["balances"]["element_residual"]) < 1e-12);
}

#[test]
fn a_condensing_exchanger_needs_and_fills_its_condensate_outlet() {
    let feeds = FEEDS.replace("{H2O: 3000 kmol/h}", "{H2O: 12000 kmol/h}");
    let units = UNITS.replace(
        "hot-outlet-temperature: 250 degC",
        "hot-outlet-temperature: 120 degC",
    );
    let out = solve(&format!("{feeds}{units}"));
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("condensate-to") && err.contains("dew point"),
        "{err}"
    );
    let units = units.replace(
        "    cold-to: hot-water\n",
        "    cold-to: hot-water\n    condensate-to: process-condensate\n",
    );
    // The separator is left out here: its product would carry the gas saturated at 120 degC.
    let units = &units[..units.find("  - name: co2-removal").unwrap()];
    let out = solve(&format!("{feeds}{units}"));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(out.status.success(), "{err}");
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let s = &v["streams"];
    let water_in = f(&s["reformed-gas"]["flow_kmol_h"]["H2O"]);
    let gas = f(&s["cooled-gas"]["flow_kmol_h"]["H2O"]);
    let cond = f(&s["process-condensate"]["flow_kmol_h"]["H2O"]);
    assert!(cond > 0.0 && (gas + cond - water_in).abs() < 1e-9 * water_in);
    let x = &v["units"]["gas-water-exchanger"]["figures"];
    // kg/h of condensate: kmol/h x 18.015 kg/kmol (the molar mass of the species data).
    let kg_h = f(&x["condensed-water"]["value"]);
    assert!(
        (kg_h / (cond * 18.015) - 1.0).abs() < 1e-12,
        "{kg_h} {cond}"
    );
    let h = |name: &str| f(&s[name]["enthalpy_kW"]);
    let given = h("reformed-gas") - h("cooled-gas") - h("process-condensate");
    let taken = h("hot-water") - h("boiler-feed-water");
    assert!((given - taken).abs() <= 1e-9 * given, "{given} vs {taken}");
    assert!(f(&v["balances"]["energy_residual"]) < 1e-9);
}

#[test]
fn ports_are_named_for_an_exchanger_only() {
    // `from` on an exchanger: refused at its own line.
    let units = UNITS.replace("    hot-from: reformed-gas\n", "    from: reformed-gas\n");
    let out = solve(&format!("{FEEDS}{units}"));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!out.status.success());
    assert!(err.contains("hot-from") && err.contains("by port"), "{err}");
    assert!(err.contains(".yaml:14:5:"), "{err}");
    // `hot-from` on a cooler: refused, naming the exchanger.
    let text = format!(
        "{FEEDS}units:\n  - name: c\n    type: cooler\n    hot-from: reformed-gas\n    to: x\n    \
         outlet-temperature: 300 degC\n"
    );
    let out = solve(&text);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("port of an exchanger") && err.contains(".yaml:14:"),
        "{err}"
    );
    // A stream made nowhere, named in a port: the error points at that port's line.
    let units = UNITS.replace("cold-from: boiler-feed-water", "cold-from: no-such-water");
    let out = solve(&format!("{FEEDS}{units}"));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("no-such-water") && err.contains(".yaml:16:"),
        "{err}"
    );
    // Two ways of fixing the heat: refused naming the keys.
    let units = UNITS.replace(
        "    hot-pressure-drop: 0.2 bar\n",
        "    hot-pressure-drop: 0.2 bar\n    duty: 2 MW\n",
    );
    let out = solve(&format!("{FEEDS}{units}"));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("exactly one of") && err.contains("2 given"),
        "{err}"
    );
}

#[test]
fn numeric_keys_are_inputs_a_study_can_vary() {
    use syntrain::flowsheet::Flowsheet;
    use syntrain::thermo::SpeciesDb;
    let db = SpeciesDb::embedded().unwrap();
    let units = UNITS.replace(
        "hot-outlet-temperature: 250 degC",
        "minimum-approach: 100 K",
    );
    let sheet = Flowsheet::from_yaml_str("demo", &format!("{FEEDS}{units}"), &db).unwrap();
    let figure = |r: &syntrain::flowsheet::FlowsheetResult, unit: &str, key: &str| {
        let u = r.units.iter().find(|u| u.name == unit).unwrap();
        u.result
            .figures
            .iter()
            .find(|f| f.key == key)
            .unwrap()
            .value
    };
    let smaller = |r: &syntrain::flowsheet::FlowsheetResult| {
        let a = figure(r, "gas-water-exchanger", "hot-end-difference");
        let b = figure(r, "gas-water-exchanger", "cold-end-difference");
        a.min(b)
    };
    let base = sheet.solve(&db).unwrap();
    assert!((smaller(&base) - 100.0).abs() < 1e-6);
    let mut params = sheet.parameters();
    let approach = sheet
        .input("units.gas-water-exchanger.minimum-approach")
        .unwrap();
    let removal = sheet.input("units.co2-removal.removal.CO2").unwrap();
    params[approach.0] = 120.0;
    params[removal.0] = 0.5;
    let r = sheet.solve_with(&db, &params, None).unwrap();
    assert!((smaller(&r) - 120.0).abs() < 1e-6);
    // Less heat at the larger approach; half the CO2 removed: 144 kmol/h x 44.0095 kg/kmol.
    let q = |r| figure(r, "gas-water-exchanger", "heat-transferred");
    assert!(q(&r) < q(&base));
    let kg_s = figure(&r, "co2-removal", "co2-removed");
    assert!(
        (kg_s * 3600.0 / (144.0 * 44.0095) - 1.0).abs() < 1e-4,
        "{kg_s}"
    );
    assert!(sheet.input("units.co2-removal.duty-per-tonne-co2").is_ok());
}
