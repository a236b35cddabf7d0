//! `syntrain solve` end to end: the real binary on the shipped demo flowsheets and on small
//! temporary files, in every output format, with `--output`, and on every error path the command
//! line can meet (missing file, unknown key, bad unit, cycle, unknown species, failed solve).

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

use serde_json::Value;

/// DIN 1343: molar volume of an ideal gas at 273.15 K and 101 325 Pa, m3/kmol.
const NORMAL_MOLAR_VOLUME_M3_PER_KMOL: f64 = 22.414;

/// Run the binary with no standard input; fails the test on any panic.
fn syntrain(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    assert_ne!(out.status.code(), Some(101), "exit code 101 (panic): {err}");
    out
}

fn demo(name: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
        .display()
        .to_string()
}

fn stdout(out: &Output) -> String {
    String::from_utf8(out.stdout.clone()).expect("stdout is UTF-8")
}

fn stderr(out: &Output) -> String {
    String::from_utf8(out.stderr.clone()).expect("stderr is UTF-8")
}

/// Run `solve` and insist on success with nothing on stderr.
fn solve_ok(file: &str, format: &str) -> String {
    let out = syntrain(&["solve", file, "--format", format]);
    assert!(
        out.status.success(),
        "solve {file} --format {format} failed: {}",
        stderr(&out)
    );
    assert!(out.stderr.is_empty(), "stderr: {}", stderr(&out));
    stdout(&out)
}

fn solve_json(file: &str) -> Value {
    serde_json::from_str(&solve_ok(file, "json")).expect("solve --format json prints JSON")
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

fn assert_rel(got: f64, expected: f64, rel: f64, what: &str) {
    let scale = expected.abs().max(1e-300);
    assert!(
        (got - expected).abs() <= rel * scale,
        "{what}: got {got}, expected {expected} (relative tolerance {rel})"
    );
}

/// Atoms per molecule of the species a hydrogen train carries (from the formulas).
fn atoms(species: &str) -> &'static [(&'static str, f64)] {
    match species {
        "CH4" => &[("C", 1.0), ("H", 4.0)],
        "C2H6" => &[("C", 2.0), ("H", 6.0)],
        "C3H8" => &[("C", 3.0), ("H", 8.0)],
        "n-C4H10" | "i-C4H10" => &[("C", 4.0), ("H", 10.0)],
        "C2H4" => &[("C", 2.0), ("H", 4.0)],
        "H2O" => &[("H", 2.0), ("O", 1.0)],
        "H2" => &[("H", 2.0)],
        "CO" => &[("C", 1.0), ("O", 1.0)],
        "CO2" => &[("C", 1.0), ("O", 2.0)],
        "N2" => &[("N", 2.0)],
        "O2" => &[("O", 2.0)],
        "Ar" => &[("Ar", 1.0)],
        "He" => &[("He", 1.0)],
        "NH3" => &[("N", 1.0), ("H", 3.0)],
        "C(gr)" => &[("C", 1.0)],
        other => panic!("no formula in the test for {other}"),
    }
}

fn element_flow(stream: &Value, element: &str) -> f64 {
    stream["flow_kmol_h"]
        .as_object()
        .expect("flow_kmol_h is an object")
        .iter()
        .map(|(species, n)| {
            let a = atoms(species)
                .iter()
                .find(|(e, _)| *e == element)
                .map_or(0.0, |(_, a)| *a);
            a * f(n)
        })
        .sum()
}

fn is_feed(stream: &Value) -> bool {
    stream["source"] == "feed"
}

fn is_product(stream: &Value) -> bool {
    stream["destination"].is_null()
}

/// Checks every JSON report must pass: stable keys, the energy balance of the reported duties
/// and enthalpies, the element balance of the reported flows, and the DIN 1343 normal volumes.
fn check_json_report(v: &Value) {
    let streams = v["streams"].as_object().expect("streams object");
    let units = v["units"].as_object().expect("units object");
    assert!(!streams.is_empty() && !units.is_empty());
    assert!(v["warnings"].is_array(), "warnings array");
    for (name, s) in streams {
        for key in ["temperature_K", "pressure_bar", "enthalpy_kW"] {
            assert!(s[key].is_number(), "streams.{name}.{key}");
        }
        let flows = s["flow_kmol_h"].as_object().expect("flow_kmol_h");
        let total: f64 = flows.values().map(f).sum();
        assert_rel(f(&s["total_kmol_h"]), total, 1e-12, name);
        if total > 0.0 {
            // DIN 1343: 1 kmol of ideal gas is 22.414 m3 at 0 degC and 101.325 kPa.
            assert_rel(
                f(&s["total_Nm3_h"]),
                total * NORMAL_MOLAR_VOLUME_M3_PER_KMOL,
                1e-4,
                &format!("streams.{name}.total_Nm3_h"),
            );
        }
    }
    for (name, u) in units {
        assert!(u["type"].is_string(), "units.{name}.type");
        assert!(u["duty_kW"].is_number(), "units.{name}.duty_kW");
        for key in ["inlets", "outlets"] {
            for stream in u[key].as_array().expect("stream list") {
                let stream = stream.as_str().expect("stream name");
                assert!(streams.contains_key(stream), "units.{name}.{key}: {stream}");
            }
        }
        for outlet in u["outlets"].as_array().unwrap() {
            let s = &streams[outlet.as_str().unwrap()];
            assert_eq!(s["source"], name.as_str(), "{outlet} comes from {name}");
        }
    }

    // First law over the whole train: sum of duties = products - feeds (enthalpies with
    // formation enthalpies included).
    let feeds: f64 = streams
        .values()
        .filter(|s| is_feed(s))
        .map(|s| f(&s["enthalpy_kW"]))
        .sum();
    let products: f64 = streams
        .values()
        .filter(|s| is_product(s))
        .map(|s| f(&s["enthalpy_kW"]))
        .sum();
    let duties: f64 = units.values().map(|u| f(&u["duty_kW"])).sum();
    let scale = feeds.abs().max(products.abs());
    assert!(
        (duties - (products - feeds)).abs() <= 1e-6 * scale,
        "sum of duties {duties} kW vs products - feeds {} kW",
        products - feeds
    );
    let heating: f64 = units
        .values()
        .map(|u| f(&u["duty_kW"]))
        .filter(|d| *d > 0.0)
        .sum();
    let summary = &v["summary"];
    assert_rel(
        f(&summary["heating_duty_kW"]),
        heating,
        1e-9,
        "heating duty",
    );

    // Conservation of atoms: every element in the feeds leaves in the products.
    for element in ["C", "H", "O", "N"] {
        let fed: f64 = streams
            .values()
            .filter(|s| is_feed(s))
            .map(|s| element_flow(s, element))
            .sum();
        let left: f64 = streams
            .values()
            .filter(|s| is_product(s))
            .map(|s| element_flow(s, element))
            .sum();
        assert!(
            (fed - left).abs() <= 1e-9 * fed.abs().max(1.0),
            "element {element}: fed {fed} kmol/h, left {left} kmol/h"
        );
    }
    assert!(f(&v["balances"]["element_residual"]) < 1e-9);
    assert!(f(&v["balances"]["energy_residual"]) < 1e-6);
    // A result exists only when every unit converged: no top-level flag to check.
    assert!(v.get("converged").is_none());
}

#[test]
fn demo_train_json_keeps_the_stable_keys_and_closes_the_balances() {
    let v = solve_json(&demo("demo-train.yaml"));
    check_json_report(&v);
    let streams = v["streams"].as_object().unwrap();
    let units = v["units"].as_object().unwrap();

    // The summary agrees with the streams it is taken from.
    let summary = &v["summary"];
    for (unit, slip) in summary["methane_slip_percent_dry"].as_object().unwrap() {
        let outlet = units[unit]["outlets"][0].as_str().unwrap();
        let dry = f(&streams[outlet]["mole_percent_dry"]["CH4"]);
        assert_rel(f(slip), dry, 1e-9, "methane slip");
    }
    for (unit, slip) in summary["co_slip_percent_dry"].as_object().unwrap() {
        let outlet = units[unit]["outlets"][0].as_str().unwrap();
        let dry = f(&streams[outlet]["mole_percent_dry"]["CO"]);
        assert_rel(f(slip), dry, 1e-9, "CO slip");
    }
    if let Some(h2) = summary["hydrogen_product_kmol_h"].as_f64() {
        // DIN 1343 again for the product.
        assert_rel(
            f(&summary["hydrogen_product_Nm3_h"]),
            h2 * NORMAL_MOLAR_VOLUME_M3_PER_KMOL,
            1e-4,
            "hydrogen product Nm3/h",
        );
        let purifier_h2: f64 = units
            .values()
            .filter(|u| u["type"] == "purifier")
            .map(|u| f(&streams[u["outlets"][0].as_str().unwrap()]["flow_kmol_h"]["H2"]))
            .sum();
        assert_rel(h2, purifier_h2, 1e-9, "hydrogen product");
    }
    // Common practice: a reformer runs endothermic, a cooler removes heat.
    for u in units.values() {
        if u["type"] == "reformer" {
            assert!(f(&u["duty_kW"]) > 0.0);
            assert_eq!(u["converged"], true);
        }
        if u["type"] == "cooler" {
            assert!(f(&u["duty_kW"]) < 0.0);
        }
    }
    assert!(v["cautions"].as_str().unwrap().contains("local codes"));

    // Conservation of mass (common practice): products carry the mass of the feeds, within
    // 1e-9 relative.
    let mass = |pick: fn(&Value) -> bool| -> f64 {
        streams
            .values()
            .filter(|s| pick(s))
            .map(|s| f(&s["mass_kg_h"]))
            .sum()
    };
    assert_rel(mass(is_product), mass(is_feed), 1e-9, "mass balance");
}

/// log10 K of CO + H2O = CO2 + H2 from the NIST-JANAF log Kf columns, linear in 1/T between
/// the tabulated temperatures.
fn janaf_log10_k_shift(t_k: f64) -> f64 {
    let table = |name: &str| -> Vec<(f64, f64)> {
        let path = PathBuf::from(env!("CARGO_MANIFEST_DIR"))
            .join("tests/data/janaf")
            .join(name);
        let text = std::fs::read_to_string(path).unwrap();
        let mut lines = text.lines();
        let header: Vec<&str> = lines.next().unwrap().split(',').collect();
        let col = header.iter().position(|h| *h == "log10_Kf").unwrap();
        lines
            .filter(|l| !l.trim().is_empty())
            .map(|l| {
                let cells: Vec<&str> = l.split(',').collect();
                (cells[0].parse().unwrap(), cells[col].parse().unwrap())
            })
            .collect()
    };
    let at = |rows: &[(f64, f64)]| -> f64 {
        let k = rows
            .windows(2)
            .position(|w| w[0].0 <= t_k && t_k <= w[1].0)
            .unwrap_or_else(|| panic!("{t_k} K outside the table"));
        let ((t0, y0), (t1, y1)) = (rows[k], rows[k + 1]);
        let x = (1.0 / t_k - 1.0 / t0) / (1.0 / t1 - 1.0 / t0);
        y0 + x * (y1 - y0)
    };
    // H2 is an element in its reference state: log Kf = 0.
    at(&table("CO2.csv")) - at(&table("CO.csv")) - at(&table("H2O.csv"))
}

#[test]
fn shift_only_outlets_are_at_equilibrium_at_their_approach() {
    let v = solve_json(&demo("shift-only.yaml"));
    check_json_report(&v);
    let streams = v["streams"].as_object().unwrap();
    let mut checked = 0;
    for (name, u) in v["units"].as_object().unwrap() {
        if u["type"] != "shift" {
            continue;
        }
        let inlet = &streams[u["inlets"][0].as_str().unwrap()]["flow_kmol_h"];
        let outlet_name = u["outlets"][0].as_str().unwrap();
        let outlet = &streams[outlet_name];
        let n = |s: &str| f(&outlet["flow_kmol_h"][s]);
        // The design-notes convention: run exothermic (CO consumed) -> T_eq = T + approach.
        let forward = n("CO") < f(&inlet["CO"]);
        let approach = u["approach_K"]["shift"].as_f64().unwrap_or(0.0);
        let t = f(&outlet["temperature_K"]);
        let t_eq = if forward { t + approach } else { t - approach };
        let k = (n("CO2") * n("H2")) / (n("CO") * n("H2O"));
        // NIST-JANAF (Chase 1998), log Kf of CO, CO2, H2O. The NASA polynomials and the
        // interpolation between 100 K table steps agree with it within about 0.3 % here.
        let k_janaf = 10f64.powf(janaf_log10_k_shift(t_eq));
        assert_rel(k, k_janaf, 0.01, &format!("shift K at {name} outlet"));
        assert_eq!(u["converged"], true);
        let co_dry = f(&v["summary"]["co_slip_percent_dry"][name]);
        assert_rel(
            co_dry,
            f(&outlet["mole_percent_dry"]["CO"]),
            1e-9,
            "CO slip",
        );
        checked += 1;
    }
    assert!(checked > 0, "shift-only.yaml has a shift unit");
}

#[test]
fn table_shows_streams_units_summary_warnings_and_cautions() {
    let text = solve_ok(&demo("demo-train.yaml"), "table");
    for needle in [
        "Streams",
        "temperature, degC",
        "pressure, bar abs",
        "total, kmol/h",
        "total, Nm3/h",
        "mol % wet",
        "mol % dry",
        "Units",
        "duty, kW",
        "approach",
        "Key figures",
        "Equilibrium convergence",
        "largest residual",
        "Summary",
        "methane slip, dry",
        "CO slip, dry",
        "steam-to-carbon ratio",
        "heating duties, sum",
        "cooling duties, sum",
        "Warnings",
        "Cautions",
        "Screening results",
        "licensed engineering practice",
    ] {
        assert!(text.contains(needle), "table lacks '{needle}':\n{text}");
    }
    // Stream blocks fit a terminal.
    let streams = &text[..text.find("\nUnits\n").expect("unit table")];
    for line in streams.lines() {
        assert!(line.chars().count() <= 102, "too wide: {line}");
    }
    // Every stream of the JSON is a column of the table.
    let v = solve_json(&demo("demo-train.yaml"));
    for name in v["streams"].as_object().unwrap().keys() {
        assert!(text.contains(name.as_str()), "table lacks stream {name}");
    }
}

#[test]
fn shift_only_table_and_markdown() {
    let text = solve_ok(&demo("shift-only.yaml"), "table");
    assert!(text.contains("CO slip, dry"));
    let md = solve_ok(&demo("shift-only.yaml"), "markdown");
    assert!(md.starts_with("# "));
    assert!(md.contains("## Units\n"));
    assert!(md.contains("| :--- |"));
    assert!(md.contains("## Cautions"));
}

#[test]
fn csv_has_one_line_per_stream_matching_the_json() {
    let file = demo("demo-train.yaml");
    let text = solve_ok(&file, "csv");
    let v = solve_json(&file);
    assert!(text.ends_with("\r\n"), "RFC 4180 line ends");
    let lines: Vec<&str> = text.split("\r\n").filter(|l| !l.is_empty()).collect();
    let streams = v["streams"].as_object().unwrap();
    assert_eq!(lines.len(), 1 + streams.len());
    let header: Vec<&str> = lines[0].split(',').collect();
    assert_eq!(&header[..4], ["stream", "source", "destination", "phase"]);
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    for (line, (name, s)) in lines[1..].iter().zip(streams) {
        let cells: Vec<&str> = line.split(',').collect();
        assert_eq!(cells.len(), header.len(), "{line}");
        assert_eq!(cells[0], name, "same order as the JSON");
        let num = |c: &str| cells[col(c)].parse::<f64>().unwrap();
        assert_rel(num("temperature_K"), f(&s["temperature_K"]), 1e-15, name);
        assert_rel(num("pressure_bar_abs"), f(&s["pressure_bar"]), 1e-15, name);
        assert_rel(num("enthalpy_kW"), f(&s["enthalpy_kW"]), 1e-15, name);
        for (species, n) in s["flow_kmol_h"].as_object().unwrap() {
            let got = num(&format!("{species}_kmol_h"));
            assert!((got - f(n)).abs() <= 1e-12 * f(n).abs(), "{name} {species}");
        }
    }
}

#[test]
fn output_writes_the_file_and_prints_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let file = demo("demo-train.yaml");
    for format in ["table", "json", "csv", "markdown"] {
        let path = dir.path().join(format!("report.{format}"));
        let path_text = path.display().to_string();
        let out = syntrain(&["solve", &file, "--format", format, "--output", &path_text]);
        assert!(out.status.success(), "{}", stderr(&out));
        assert!(out.stdout.is_empty(), "stdout: {}", stdout(&out));
        assert!(stderr(&out).lines().count() <= 1, "one note at most");
        let written = std::fs::read_to_string(&path).unwrap();
        assert_eq!(written, solve_ok(&file, format), "{format}");
    }
    // Only the reports, no temporary files.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 4);
}

/// A small valid flowsheet (an invented shift case); the error cases below each break one thing.
const SMALL: &str = "\
title: Small shift case, invented
feeds:
  syngas:
    temperature: 350 degC
    pressure: 25 bar
    flows:
      CO: 100 kmol/h
      H2O: 300 kmol/h
      H2: 300 kmol/h
      CO2: 50 kmol/h
units:
  - name: hts
    type: shift
    from: syngas
    to: shifted
    approach:
      shift: 10 K
";

fn write(dir: &Path, name: &str, text: &str) -> String {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.display().to_string()
}

/// 1-based line of the first line containing `needle`.
fn line_of(text: &str, needle: &str) -> usize {
    text.lines().position(|l| l.contains(needle)).unwrap() + 1
}

#[test]
fn the_small_case_solves() {
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "small.yaml", SMALL);
    let v = solve_json(&file);
    check_json_report(&v);
    assert_eq!(v["title"], "Small shift case, invented");
    assert_eq!(v["units"]["hts"]["inlets"], serde_json::json!(["syngas"]));
    assert_eq!(v["units"]["hts"]["outlets"], serde_json::json!(["shifted"]));
    assert!(v["streams"]["shifted"]["destination"].is_null());
}

/// Run a case that must fail: exit code 1, the message on stderr, nothing on stdout, and
/// `--output` left uncreated (no temporary file either).
fn assert_fails(file: &str, needles: &[&str]) {
    let dir = tempfile::tempdir().unwrap();
    let output = dir.path().join("report.json");
    let output_text = output.display().to_string();
    for format in ["table", "json"] {
        let out = syntrain(&["solve", file, "--format", format, "--output", &output_text]);
        assert_eq!(out.status.code(), Some(1), "exit code for {file}");
        assert!(out.stdout.is_empty(), "stdout: {}", stdout(&out));
        let message = stderr(&out);
        assert!(message.starts_with("error: "), "{message}");
        for needle in needles {
            assert!(message.contains(needle), "'{needle}' not in: {message}");
        }
        assert!(!output.exists(), "--output must not be created on error");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
    }
}

#[test]
fn missing_file() {
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("no-such-plant.yaml").display().to_string();
    assert_fails(&file, &["reading", "no-such-plant.yaml"]);
}

#[test]
fn unknown_key_has_file_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let text = SMALL.replace("    approach:", "    aproach:");
    let file = write(dir.path(), "typo.yaml", &text);
    let line = line_of(&text, "aproach");
    let location = format!("{file}:{line}:");
    assert_fails(&file, &[&location, "aproach"]);
}

#[test]
fn bad_unit_names_the_field_and_place() {
    let dir = tempfile::tempdir().unwrap();
    let text = SMALL.replace("temperature: 350 degC", "temperature: 350 degK");
    let file = write(dir.path(), "unit.yaml", &text);
    let location = format!("{file}:{}:", line_of(&text, "degK"));
    assert_fails(&file, &[&location, "degK", "temperature"]);
}

#[test]
fn unknown_species() {
    let dir = tempfile::tempdir().unwrap();
    let text = SMALL.replace("CO2: 50 kmol/h", "CO3: 50 kmol/h");
    let file = write(dir.path(), "species.yaml", &text);
    assert_fails(&file, &["unknown species 'CO3'", "CO2"]);
}

#[test]
fn cycle() {
    let dir = tempfile::tempdir().unwrap();
    let text = "\
title: A loop, invented
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    flows:
      H2: 100 kmol/h
units:
  - name: mix
    type: mixer
    from: [gas, back]
    to: mid
  - name: split
    type: splitter
    from: mid
    to: [out, back]
    fractions:
      out: 0.5
";
    let file = write(dir.path(), "cycle.yaml", text);
    // The loop is torn at the stream back into the mixer and converged (tests/recycles.rs
    // checks the values); a loop nothing flows into is still refused.
    let text_out = solve_ok(&file, "table");
    assert!(
        text_out.contains("Recycle converged") && text_out.contains("'back'"),
        "{text_out}"
    );
    let closed = text.replace("from: [gas, back]", "from: [out, back]");
    let file = write(dir.path(), "closed.yaml", &closed);
    assert_fails(&file, &["cycle", "'mid'", "'back'", "nothing flows into"]);
}

#[test]
fn failed_solve() {
    // A heater asked to add far more heat than any temperature in the species data can hold.
    let dir = tempfile::tempdir().unwrap();
    let text = "\
title: Impossible heater, invented
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    flows:
      H2: 100 kmol/h
units:
  - name: burner
    type: heater
    from: gas
    to: hot
    duty: 1000000 MW
";
    let file = write(dir.path(), "heater.yaml", text);
    assert_fails(&file, &["burner", "caused by"]);
}

#[test]
fn output_into_a_missing_folder_fails_cleanly() {
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "small.yaml", SMALL);
    let output = dir.path().join("no-such-folder").join("out.json");
    let out = syntrain(&["solve", &file, "--output", &output.display().to_string()]);
    assert_eq!(out.status.code(), Some(1));
    assert!(stderr(&out).contains("writing"), "{}", stderr(&out));
    assert!(!output.exists());
}

#[test]
fn unknown_format_is_a_usage_error() {
    let out = syntrain(&["solve", &demo("shift-only.yaml"), "--format", "xml"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("xml"));
}
