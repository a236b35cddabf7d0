//! The gas model chosen in a flowsheet, end to end with the real binary: `gas-model:` at the top
//! of the file and per unit, the figures that compare a Peng-Robinson reactor with the ideal
//! gas, and how the reports show the model.
//!
//! The reference of the direction and size: Cantera's Peng-Robinson phase on the same data
//! (tests/data/cantera_peng_robinson.csv, case 2: a shift gas at 200 degC and 25 bar holds
//! 5.8 % more CO at equilibrium than the ideal gas).

use std::path::Path;
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

/// An invented LTS at 25 bar abs: fed at 200 degC, adiabatic, zero approach.
fn lts_file(dir: &Path, name: &str, top: &str, unit: &str) -> String {
    let text = format!(
        "title: LTS at 25 bar (invented demo)\n{top}feeds:\n  lts-feed:\n    temperature: 200 \
         degC\n    pressure: 25 bar\n    total: 1000 kmol/h\n    mole-fractions: {{H2: 0.545, \
         CO: 0.03, CO2: 0.12, CH4: 0.02, H2O: 0.28, N2: 0.005}}\nunits:\n  - name: lts\n    \
         type: shift\n    from: lts-feed\n    to: shifted-gas\n    catalyst: \
         low-temperature-copper\n{unit}"
    );
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.display().to_string()
}

fn solve_json(file: &str) -> Value {
    let out = syntrain(&["solve", file, "--format", "json"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

fn figure(v: &Value, key: &str) -> Option<f64> {
    v["units"]["lts"]["figures"][key]["value"].as_f64()
}

#[test]
fn a_peng_robinson_lts_at_25_bar_slips_more_co_than_the_ideal_gas() {
    let dir = tempfile::tempdir().unwrap();
    let ideal = solve_json(&lts_file(dir.path(), "ideal.yaml", "", ""));
    let real = solve_json(&lts_file(
        dir.path(),
        "real.yaml",
        "gas-model: peng-robinson\n",
        "",
    ));
    assert_eq!(ideal["units"]["lts"]["gas_model"], "ideal");
    assert_eq!(real["units"]["lts"]["gas_model"], "peng-robinson");
    // No comparison figures for an ideal-gas unit.
    assert!(figure(&ideal, "ideal-gas-co-slip-change").is_none());
    let slip_ideal = figure(&ideal, "co-slip-dry").unwrap();
    let slip_real = figure(&real, "co-slip-dry").unwrap();
    // Higher CO slip as a real gas (Cantera Peng-Robinson: +5.8 % at 200 degC, 25 bar, fixed
    // temperature; here the bed is adiabatic and ends about 25 K warmer, where the real gas
    // also converts less and so runs cooler: a smaller change).
    let change = figure(&real, "ideal-gas-co-slip-change").unwrap() / 100.0;
    eprintln!(
        "adiabatic LTS CO slip dry: ideal {slip_ideal:.5} %, Peng-Robinson {slip_real:.5} % \
         ({change:+.4})"
    );
    assert!(slip_real > slip_ideal);
    assert!(change > 0.01 && change < 0.05, "{change}");
    // The figure is the relative change of the two answers (same file otherwise).
    assert!((slip_real / slip_ideal - 1.0 - change).abs() < 1e-6);
    // An adiabatic unit gives the change of its outlet temperature: less shift, less heat.
    let dt = figure(&real, "ideal-gas-outlet-temperature-change").unwrap();
    let t_ideal = ideal["units"]["lts"]["outlet_temperature_K"]
        .as_f64()
        .unwrap();
    let t_real = real["units"]["lts"]["outlet_temperature_K"]
        .as_f64()
        .unwrap();
    assert!(
        (t_real - t_ideal - dt).abs() < 1e-6,
        "{dt} vs {}",
        t_real - t_ideal
    );
    assert!(dt < 0.0, "{dt}");
    // Held at 200 degC (a cooled bed) the change is that of Cantera's case 2 in size: +4 to
    // +8 % (the feed here holds a little methane and less steam).
    let held = "    outlet-temperature: 200 degC\n";
    let ideal = solve_json(&lts_file(dir.path(), "held-ideal.yaml", "", held));
    let real = solve_json(&lts_file(
        dir.path(),
        "held-real.yaml",
        "gas-model: peng-robinson\n",
        held,
    ));
    let change = figure(&real, "ideal-gas-co-slip-change").unwrap() / 100.0;
    eprintln!(
        "LTS at 200 degC CO slip dry: ideal {:.5} %, Peng-Robinson {:.5} % ({change:+.4}); \
         duty change {:.3} kW",
        figure(&ideal, "co-slip-dry").unwrap(),
        figure(&real, "co-slip-dry").unwrap(),
        figure(&real, "ideal-gas-duty-change").unwrap()
    );
    assert!(change > 0.04 && change < 0.08, "{change}");
    assert!(figure(&real, "ideal-gas-outlet-temperature-change").is_none());
}

#[test]
fn a_unit_may_set_its_own_gas_model() {
    let dir = tempfile::tempdir().unwrap();
    let top = solve_json(&lts_file(
        dir.path(),
        "top.yaml",
        "gas-model: peng-robinson\n",
        "",
    ));
    let own = solve_json(&lts_file(
        dir.path(),
        "own.yaml",
        "",
        "    gas-model: peng-robinson\n",
    ));
    assert_eq!(own["units"]["lts"]["gas_model"], "peng-robinson");
    assert_eq!(
        figure(&top, "co-slip-dry").unwrap(),
        figure(&own, "co-slip-dry").unwrap()
    );
    // And back to ideal under a Peng-Robinson flowsheet.
    let back = solve_json(&lts_file(
        dir.path(),
        "back.yaml",
        "gas-model: peng-robinson\n",
        "    gas-model: ideal\n",
    ));
    assert_eq!(back["units"]["lts"]["gas_model"], "ideal");
    let ideal = solve_json(&lts_file(dir.path(), "ideal.yaml", "", ""));
    assert_eq!(
        figure(&back, "co-slip-dry").unwrap(),
        figure(&ideal, "co-slip-dry").unwrap()
    );
}

#[test]
fn the_text_report_names_the_model_and_a_bad_name_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let file = lts_file(dir.path(), "real.yaml", "gas-model: peng-robinson\n", "");
    let out = syntrain(&["solve", &file]);
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("lts (peng-robinson)"), "{text}");
    assert!(text.contains("CO slip vs ideal gas"), "{text}");
    for (top, unit) in [
        ("gas-model: real\n", ""),
        ("", "    gas-model: van-der-waals\n"),
    ] {
        let file = lts_file(dir.path(), "bad.yaml", top, unit);
        let out = syntrain(&["solve", &file]);
        assert_eq!(out.status.code(), Some(1));
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains("peng-robinson"), "{err}");
    }
}

#[test]
fn evaluation_reads_approaches_with_the_flowsheets_gas_model() {
    // An LTS outlet made by the solver as a Peng-Robinson gas 10 K short of equilibrium
    // (definition of the approach, DEVELOPERS.md) reads back as 10 K with the same model; read
    // as an ideal gas the same analysis means a larger approach.
    let dir = tempfile::tempdir().unwrap();
    let unit = "    outlet-temperature: 210 degC\n    approach: {shift: 10 K}\n";
    let real_file = lts_file(dir.path(), "real.yaml", "gas-model: peng-robinson\n", unit);
    let ideal_file = lts_file(dir.path(), "ideal.yaml", "", unit);
    let solved = solve_json(&real_file);
    let gas = &solved["streams"]["shifted-gas"];
    let dry = &gas["mole_percent_dry"];
    let cell = |s: &str| format!("{:.9}", dry[s].as_f64().unwrap_or(0.0));
    let samples = format!(
        "sample,unit,temperature_C,pressure_bar,H2,CO,CO2,CH4,N2\ns1,lts,{:.9},{:.9},{},{},{},{},{}\n",
        gas["temperature_degC"].as_f64().unwrap(),
        gas["pressure_bar"].as_f64().unwrap(),
        cell("H2"),
        cell("CO"),
        cell("CO2"),
        cell("CH4"),
        cell("N2")
    );
    let samples_file = dir.path().join("samples.csv");
    std::fs::write(&samples_file, samples).unwrap();
    let read = |file: &str, format: &str| {
        let out = syntrain(&[
            "evaluate",
            file,
            "--samples",
            samples_file.to_str().unwrap(),
            "--format",
            format,
        ]);
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        String::from_utf8(out.stdout).unwrap()
    };
    let real: Value = serde_json::from_str(&read(&real_file, "json")).unwrap();
    let ideal: Value = serde_json::from_str(&read(&ideal_file, "json")).unwrap();
    let back = real["samples"][0]["approach_K"]["shift"].as_f64().unwrap();
    let as_ideal = ideal["samples"][0]["approach_K"]["shift"].as_f64().unwrap();
    eprintln!("approach read back: Peng-Robinson {back:.4} K, ideal gas {as_ideal:.4} K");
    assert!((back - 10.0).abs() < 0.05, "{back}");
    assert!(as_ideal > back + 1.0, "{as_ideal}");
    assert_eq!(real["samples"][0]["gas_model"], "peng-robinson");
    assert_eq!(ideal["samples"][0]["gas_model"], "ideal");
    let text = read(&real_file, "table");
    assert!(
        text.contains("Gas model of the approaches: peng-robinson"),
        "{text}"
    );
}
