//! `syntrain compare` end to end: the real binary on the demo train and its revamp overlays, on
//! temporary copies and hand-edited files; the new summary figures against a hand calculation;
//! overlay errors with their file, line and column; and the direction of each revamp option's
//! effect (common practice).

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

use serde_json::Value;
use syntrain::study::overlay;
use syntrain::thermo::SpeciesDb;

/// DIN 1343: molar volume of an ideal gas at 273.15 K and 101 325 Pa, m3/kmol.
const NORMAL_MOLAR_VOLUME_M3_PER_KMOL: f64 = 22.414;

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

fn demo_path(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
}

fn demo_text() -> String {
    std::fs::read_to_string(demo_path("demo-train.yaml")).unwrap()
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.display().to_string()
}

fn ok_stdout(args: &[&str]) -> String {
    let out = syntrain(args);
    assert!(
        out.status.success(),
        "{args:?} failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

fn json(args: &[&str]) -> Value {
    serde_json::from_str(&ok_stdout(args)).expect("JSON output")
}

fn solve_json(file: &str) -> Value {
    json(&["solve", file, "--format", "json"])
}

/// The error text of a run that must fail with exit code 1.
fn failure(args: &[&str]) -> String {
    let out = syntrain(args);
    assert_eq!(out.status.code(), Some(1), "{args:?} should fail");
    String::from_utf8(out.stderr).unwrap()
}

/// Equal to 1e-9 relative (of the larger magnitude; 1e-12 absolute floor for zeros).
fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-9 * a.abs().max(b.abs()) + 1e-12
}

/// Every number of `expected` (walked as a tree) equals the number at the same place in `got`;
/// nulls match nulls. Returns how many numbers were compared.
fn same_tree(got: &Value, expected: &Value, at: &str) -> usize {
    match expected {
        Value::Object(m) => m
            .iter()
            .map(|(k, v)| same_tree(&got[k], v, &format!("{at}.{k}")))
            .sum(),
        Value::Number(n) => {
            let (e, g) = (n.as_f64().unwrap(), got.as_f64());
            let g = g.unwrap_or_else(|| panic!("{at}: expected {e}, got {got}"));
            assert!(close(g, e), "{at}: got {g}, expected {e}");
            1
        }
        Value::Null => {
            assert!(got.is_null(), "{at}: expected null, got {got}");
            0
        }
        other => panic!("{at}: unexpected {other}"),
    }
}

/// Option minus base of two `solve --format json` runs, for the summary (nested the same way)
/// and each unit's outlet temperature (degC) and duty.
fn difference(base: &Value, option: &Value) -> Value {
    fn diff(b: &Value, o: &Value) -> Value {
        match (b, o) {
            (Value::Object(bm), Value::Object(om)) => Value::Object(
                bm.iter()
                    .map(|(k, bv)| (k.clone(), diff(bv, &om[k])))
                    .collect(),
            ),
            (Value::Number(b), Value::Number(o)) => {
                serde_json::json!(o.as_f64().unwrap() - b.as_f64().unwrap())
            }
            _ => Value::Null,
        }
    }
    let units = |v: &Value| -> Value {
        Value::Object(
            v["units"]
                .as_object()
                .unwrap()
                .iter()
                .map(|(name, u)| {
                    let t = u["outlet_temperature_K"].as_f64().unwrap() - 273.15;
                    (
                        name.clone(),
                        serde_json::json!({"outlet_temperature_degC": t, "duty_kW": u["duty_kW"]}),
                    )
                })
                .collect(),
        )
    };
    serde_json::json!({
        "summary": diff(&base["summary"], &option["summary"]),
        "units": diff(&units(base), &units(option)),
    })
}

/// A full copy of the demo train with the MTS stage written in by hand (as the overlay
/// flowsheets/revamp-mts.yaml describes it).
fn hand_written_mts() -> String {
    let text = demo_text();
    let old = "    outlet-temperature: 200 degC\n    pressure-drop: 0.2 bar\n  - name: lts\n    \
               type: shift\n    from: lts-feed\n";
    assert!(
        text.contains(old),
        "the demo train changed; update this test"
    );
    text.replace(
        old,
        "    outlet-temperature: 225 degC\n    pressure-drop: 0.2 bar\n  - name: mts\n    \
         type: shift\n    from: lts-feed\n    to: mts-exit\n    catalyst: \
         medium-temperature-copper\n    pressure-drop: 0.3 bar\n    approach: {shift: 10 K}\n  \
         - name: mts-exit-cooler\n    type: cooler\n    from: mts-exit\n    to: mts-cooled\n    \
         outlet-temperature: 200 degC\n    pressure-drop: 0.2 bar\n  - name: lts\n    type: \
         shift\n    from: mts-cooled\n",
    )
}

#[test]
fn changes_of_a_full_flowsheet_option_are_the_difference_of_two_solves() {
    let dir = tempfile::tempdir().unwrap();
    let base = write(dir.path(), "base.yaml", &demo_text());
    let hotter = demo_text().replace(
        "outlet-temperature: 865 degC",
        "outlet-temperature: 880 degC",
    );
    let option = write(dir.path(), "hotter.yaml", &hotter);
    let v = json(&["compare", &base, &option, "--format", "json"]);
    let (b, o) = (solve_json(&base), solve_json(&option));
    let expected = difference(&b, &o);
    let opt = &v["options"][0];
    let keys = |x: &Value| x.as_object().unwrap().keys().cloned().collect::<Vec<_>>();
    assert_eq!(keys(&v), ["base", "options", "cautions"]);
    assert_eq!(
        keys(&v["base"]),
        ["name", "file", "summary", "units", "warnings"]
    );
    assert_eq!(
        keys(opt),
        [
            "name",
            "file",
            "summary",
            "units",
            "warnings",
            "change",
            "change_pct"
        ]
    );
    assert_eq!(keys(&opt["change"]), ["summary", "units"]);
    // The summary has the keys of solve's summary, in the same order.
    assert_eq!(
        keys(&v["base"]["summary"]),
        keys(&solve_json(&base)["summary"])
    );
    let n = same_tree(&opt["change"], &expected, "change");
    // 10 summary numbers + 2 per unit of the 12.
    assert!(n >= 30, "only {n} numbers compared");
    // The option's own figures are those of its own solve.
    same_tree(&opt["summary"], &o["summary"], "summary");
    same_tree(&v["base"]["summary"], &b["summary"], "base summary");
    // name = the file's title; file = as given.
    assert_eq!(
        v["base"]["name"],
        "Quillmarsh H2 unit (invented demo plant), reactor train"
    );
    assert_eq!(opt["file"], option.as_str());
    // change_pct = change / base in %.
    let c = f(&opt["change"]["summary"]["hydrogen_made_kmol_h"]);
    let base_h2 = f(&b["summary"]["hydrogen_made_kmol_h"]);
    assert!(close(
        f(&opt["change_pct"]["summary"]["hydrogen_made_kmol_h"]),
        100.0 * c / base_h2
    ));
    // A hotter reformer makes more hydrogen (less methane slip): common practice.
    assert!(c > 0.0, "{c}");
    // No change in % where the base is 0 (an adiabatic unit's duty).
    assert!(opt["change_pct"]["units"]["hts"]["duty_kW"].is_null());
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

#[test]
fn an_overlay_with_changes_equals_a_hand_edited_copy() {
    let dir = tempfile::tempdir().unwrap();
    let base = write(dir.path(), "demo-train.yaml", &demo_text());
    let overlay = write(
        dir.path(),
        "lower-steam.yaml",
        "title: Lower steam\nbase: demo-train.yaml\nchanges:\n  feeds.process-steam.total: \
         2794.5 kmol/h\n  units.lts.approach.shift: 6 K\n",
    );
    let edited = demo_text()
        .replace("total: 3105 kmol/h", "total: 2794.5 kmol/h")
        .replace(
            "catalyst: low-temperature-copper\n    pressure-drop: 0.3 bar\n    approach: {shift: 10 K}",
            "catalyst: low-temperature-copper\n    pressure-drop: 0.3 bar\n    approach: {shift: 6 K}",
        );
    assert!(edited.contains("{shift: 6 K}") && edited.contains("2794.5"));
    let edited = write(dir.path(), "edited.yaml", &edited);
    let v = json(&["compare", &base, &overlay, &edited, "--format", "json"]);
    let (over, hand) = (&v["options"][0], &v["options"][1]);
    assert_eq!(over["name"], "Lower steam");
    let n = same_tree(&over["summary"], &hand["summary"], "summary");
    assert!(n >= 10, "{n}");
    same_tree(&over["units"], &hand["units"], "units");
    // And the overlay's change is the difference of two separate solves (base, edited copy).
    let expected = difference(&solve_json(&base), &solve_json(&edited));
    assert!(same_tree(&over["change"], &expected, "change") >= 30);
    // `solve` takes the overlay itself and gives what the hand-edited copy gives.
    let solved_overlay = solve_json(&overlay);
    let solved_edited = solve_json(&edited);
    assert!(
        same_tree(
            &solved_overlay["summary"],
            &solved_edited["summary"],
            "summary"
        ) >= 10
    );
    for (name, stream) in solved_edited["streams"].as_object().unwrap() {
        let got = &solved_overlay["streams"][name];
        assert!(same_tree(&got["flow_kmol_h"], &stream["flow_kmol_h"], name) >= 5);
        assert!(
            close(f(&got["temperature_K"]), f(&stream["temperature_K"])),
            "{name}"
        );
    }
    // S/C 2794.5 / 1035 = 2.7 at the pre-reformer inlet (1035 kmol/h of hydrocarbon carbon).
    assert!(close(
        f(&over["summary"]["steam_to_carbon"]["prereformer"]),
        2.7
    ));
}

#[test]
fn an_added_mts_overlay_equals_the_hand_written_flowsheet() {
    let dir = tempfile::tempdir().unwrap();
    let base = write(dir.path(), "demo-train.yaml", &demo_text());
    let overlay_text = std::fs::read_to_string(demo_path("revamp-mts.yaml")).unwrap();
    let overlay = write(dir.path(), "revamp-mts.yaml", &overlay_text);
    let hand = write(dir.path(), "mts-by-hand.yaml", &hand_written_mts());
    let v = json(&["compare", &base, &overlay, &hand, "--format", "json"]);
    let (over, by_hand) = (&v["options"][0], &v["options"][1]);
    assert!(same_tree(&over["summary"], &by_hand["summary"], "summary") >= 10);
    assert!(same_tree(&over["units"], &by_hand["units"], "units") >= 28);
    // The units only the option has are blank against the base, not a made-up change.
    assert!(v["base"]["units"].get("mts").is_none());
    assert!(f(&over["units"]["mts"]["duty_kW"]).abs() < 1e-9);
    assert!(over["change"]["units"]["mts"]["outlet_temperature_degC"].is_null());
    assert!(over["change"]["summary"]["co_slip_percent_dry"]["mts"].is_null());
    // The hand-written copy against two separate solves.
    let expected = difference(&solve_json(&base), &solve_json(&hand));
    same_tree(&by_hand["change"], &expected, "change");
}

#[test]
fn the_new_summary_figures_match_a_hand_calculation() {
    // Demo train: hydrogen made is the purifier product's hydrogen; the organic carbon fed is
    // 935 + 2 x 35 + 3 x 10 = 1035 kmol/h (CH4, C2H6, C3H8; the CO2 of the gas is not counted,
    // as in the steam-to-carbon ratio).
    let demo = demo_path("demo-train.yaml").display().to_string();
    let v = solve_json(&demo);
    let made = f(&v["summary"]["hydrogen_made_kmol_h"]);
    let product_h2 = f(&v["streams"]["hydrogen-product"]["flow_kmol_h"]["H2"]);
    assert!(close(made, product_h2), "{made} vs {product_h2}");
    assert!(close(
        f(&v["summary"]["hydrogen_per_carbon_fed"]),
        product_h2 / 1035.0
    ));
    // DIN 1343: 22.414 m3/kmol.
    let nm3 = f(&v["summary"]["hydrogen_made_Nm3_h"]);
    assert!((nm3 / made / NORMAL_MOLAR_VOLUME_M3_PER_KMOL - 1.0).abs() < 1e-4);
    // Common practice: a steam reformer with shift and PSA makes about 2.5-3 mol H2 per mol of
    // natural-gas carbon fed as feed (fuel not counted).
    assert!((2.5..3.0).contains(&(made / 1035.0)), "{}", made / 1035.0);

    // Without a purifier: the hydrogen leaving less the hydrogen fed. The shift section alone
    // runs only CO + H2O = CO2 + H2 (one H2 per CO converted), so by hand: H2 made = CO fed -
    // CO leaving. Feed: 1000 kmol/h with 9.06 % CO, 47.9 % H2, 3.43 % CH4 (the only organic
    // carbon).
    let shift = demo_path("shift-only.yaml").display().to_string();
    let v = solve_json(&shift);
    let feed = &v["streams"]["reformed-gas"]["flow_kmol_h"];
    let out = &v["streams"]["shifted-gas"]["flow_kmol_h"];
    assert!((f(&feed["CO"]) - 90.6).abs() < 0.05, "{}", feed["CO"]);
    let by_hand = f(&feed["CO"]) - f(&out["CO"]);
    let made = f(&v["summary"]["hydrogen_made_kmol_h"]);
    assert!(
        (made - by_hand).abs() < 1e-9 * by_hand,
        "{made} vs {by_hand}"
    );
    assert!((made - (f(&out["H2"]) - f(&feed["H2"]))).abs() < 1e-9 * made);
    let carbon = f(&feed["CH4"]);
    assert!(close(
        f(&v["summary"]["hydrogen_per_carbon_fed"]),
        made / carbon
    ));
    assert!(v["summary"]["hydrogen_product_kmol_h"].is_null());
    // The plain report shows them too.
    let table = ok_stdout(&["solve", &shift]);
    assert!(table.contains("hydrogen made") && table.contains("hydrogen made per carbon fed"));
}

#[test]
fn overlay_errors_name_the_overlay_file_line_and_column() {
    let dir = tempfile::tempdir().unwrap();
    let base = write(dir.path(), "demo-train.yaml", &demo_text());
    let unknown_path = write(
        dir.path(),
        "unknown-path.yaml",
        "title: Broken option\nbase: demo-train.yaml\nchanges:\n  units.lts.aproach.shift: 6 K\n",
    );
    let e = failure(&["compare", &base, &unknown_path]);
    assert!(e.contains("unknown-path.yaml:4:"), "{e}");
    assert!(e.contains("nearest are: units.lts.approach.shift"), "{e}");

    let bad_value = write(
        dir.path(),
        "bad-value.yaml",
        "base: demo-train.yaml\nchanges:\n  units.reformer.pressure-drop: 3 bar\n  \
         units.lts.approach.shift: 6 kg\n",
    );
    let e = failure(&["compare", &base, &bad_value]);
    assert!(
        e.contains("bad-value.yaml:4:") && e.contains("units.lts.approach.shift"),
        "{e}"
    );

    let unknown_unit = write(
        dir.path(),
        "unknown-unit.yaml",
        "base: demo-train.yaml\nremove-units:\n  - lts-exit-coler\n",
    );
    let e = failure(&["compare", &base, &unknown_unit]);
    assert!(e.contains("unknown-unit.yaml:3:5"), "{e}");
    assert!(e.contains("lts-exit-cooler"), "{e}");

    let two_outlets = write(
        dir.path(),
        "two-outlets.yaml",
        "base: demo-train.yaml\nremove-units: [psa, knockout]\n",
    );
    let e = failure(&["compare", &base, &two_outlets]);
    assert!(
        e.contains("two-outlets.yaml:2:") && e.contains("'psa' has 1 inlet(s) and 2 outlet(s)"),
        "{e}"
    );

    let bad_key = write(
        dir.path(),
        "bad-key.yaml",
        "base: demo-train.yaml\nadd-units:\n  - name: mts\n    type: shift\n    from: lts-feed\n    \
         to: mts-exit\n    catalyst: medium-temperature-copper\n    aproach: {shift: 10 K}\n",
    );
    let e = failure(&["compare", &base, &bad_key]);
    assert!(e.contains("bad-key.yaml:8:5"), "{e}");
    assert!(
        e.contains("units.mts.aproach") && e.contains("unknown key"),
        "{e}"
    );

    let a = write(dir.path(), "a.yaml", "base: b.yaml\n");
    write(dir.path(), "b.yaml", "base: a.yaml\n");
    let e = failure(&["compare", &base, &a]);
    assert!(e.contains("chain of bases comes back"), "{e}");
}

/// A figure of an overlay's solution by result path (through the library).
fn figure(db: &SpeciesDb, file: &Path, path: &str) -> f64 {
    let case = overlay::load(db, file).unwrap();
    let result = case
        .flowsheet
        .solve_with(db, &case.parameters, None)
        .unwrap();
    result.value(db, path).unwrap()
}

#[test]
fn the_revamp_options_move_the_figures_the_right_way() {
    let db = SpeciesDb::embedded().unwrap();
    let base = demo_path("demo-train.yaml");
    let slip = "summary.methane_slip_percent_dry.reformer";
    let lts_slip = "summary.co_slip_percent_dry.lts";
    // Common practice: a lower steam-to-carbon ratio raises the reformer's methane slip.
    let (b, o) = (
        figure(&db, &base, slip),
        figure(&db, &demo_path("revamp-lower-steam.yaml"), slip),
    );
    assert!(o > b + 0.5, "methane slip {b} -> {o} mol % dry");
    // Common practice: a fresh LTS charge (smaller approach) leaves less CO.
    let (b, o) = (
        figure(&db, &base, lts_slip),
        figure(&db, &demo_path("revamp-fresh-lts.yaml"), lts_slip),
    );
    assert!(o < b - 0.02, "LTS CO slip {b} -> {o} mol % dry");
    // Common practice: a medium-temperature stage before the LTS lowers the CO the LTS gets.
    let b = figure(&db, &base, "streams.lts-feed.dry_mol_pct.CO");
    let mts = demo_path("revamp-mts.yaml");
    let o = figure(&db, &mts, "streams.mts-cooled.dry_mol_pct.CO");
    assert!(o < 0.25 * b, "CO at the LTS inlet {b} -> {o} mol % dry");
    // The LTS inlet is back at 200 degC and the MTS outlet within its catalyst's usual range
    // (common practice: medium-temperature copper below about 350 degC).
    let t = figure(&db, &mts, "streams.mts-cooled.temperature_K") - 273.15;
    assert!((t - 200.0).abs() < 1e-9, "{t}");
    let t = figure(&db, &mts, "units.mts.outlet_temperature_K") - 273.15;
    assert!((225.0..350.0).contains(&t), "{t}");
}

#[test]
fn every_format_shows_the_options_and_output_refuses_the_inputs() {
    let base = demo_path("demo-train.yaml").display().to_string();
    let option = demo_path("revamp-fresh-lts.yaml").display().to_string();
    let table = ok_stdout(&["compare", &base, &option]);
    assert!(table.contains("option 1: Fresh low-temperature shift charge"));
    assert!(table.contains("CO slip, lts") && table.contains("Cautions"));
    // Fits a terminal of 100 columns (file paths aside).
    assert!(
        table
            .lines()
            .filter(|l| !l.starts_with("    file: "))
            .all(|l| l.chars().count() <= 100),
        "{table}"
    );
    let md = ok_stdout(&["compare", &base, &option, "--format", "markdown"]);
    assert!(md.contains("| hydrogen made | kmol/h |"), "{md}");
    let csv = ok_stdout(&["compare", &base, &option, "--format", "csv"]);
    let mut reader = csv::Reader::from_reader(csv.as_bytes());
    let header: Vec<String> = reader.headers().unwrap().iter().map(String::from).collect();
    assert_eq!(
        header,
        [
            "figure",
            "unit",
            "Quillmarsh H2 unit (invented demo plant), reactor train",
            "Fresh low-temperature shift charge",
            "change: Fresh low-temperature shift charge",
            "change %: Fresh low-temperature shift charge",
        ]
    );
    let row = reader
        .records()
        .map(Result::unwrap)
        .find(|r| &r[0] == "summary.co_slip_percent_dry.lts")
        .expect("a row of the LTS CO slip");
    let (b, o, c): (f64, f64, f64) = (
        row[2].parse().unwrap(),
        row[3].parse().unwrap(),
        row[4].parse().unwrap(),
    );
    assert!(close(c, o - b) && c < 0.0, "{row:?}");

    // --output: never over an input, also not a base an overlay pulls in.
    let dir = tempfile::tempdir().unwrap();
    let base_copy = write(dir.path(), "demo-train.yaml", &demo_text());
    let overlay = write(
        dir.path(),
        "o.yaml",
        "base: demo-train.yaml\nchanges: {units.lts.approach.shift: 4 K}\n",
    );
    let other = write(dir.path(), "other.yaml", &demo_text());
    let e = failure(&["compare", &other, &overlay, "--output", &base_copy]);
    assert!(e.contains("demo-train.yaml"), "{e}");
    assert_eq!(std::fs::read_to_string(&base_copy).unwrap(), demo_text());
    let report = dir.path().join("report.json").display().to_string();
    let out = syntrain(&[
        "compare", &other, &overlay, "--format", "json", "--output", &report,
    ]);
    assert!(out.status.success() && out.stdout.is_empty());
    let v: Value = serde_json::from_str(&std::fs::read_to_string(&report).unwrap()).unwrap();
    assert_eq!(v["options"][0]["name"], "o");
}
