//! Operating limits as warnings, through the library and the real binary: carbon formation by
//! the principle of equilibrated gas, steam-to-carbon ratio, catalyst and reformer windows, dew
//! point, negative approaches, `--strict`, and each threshold just inside and just outside.
//!
//! Limits are common practice (no single source; see `src/units/limits.rs`); the carbon
//! activity is checked against NIST-JANAF and the dew point against IAPWS-IF97.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use syntrain::reaction::{carbon_activity, Reaction};
use syntrain::thermo::SpeciesDb;
use syntrain::units::{Reformer, ReformerSpec, Stream, UnitKind};

fn syntrain(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .output()
        .expect("run syntrain")
}

fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path
}

/// Solve `text` as JSON (with `extra` arguments) and return the exit code and the JSON.
fn solve(text: &str, extra: &[&str]) -> (Option<i32>, serde_json::Value) {
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "plant.yaml", text);
    let mut args = vec!["solve", file.to_str().unwrap(), "--format", "json"];
    args.extend_from_slice(extra);
    let out = syntrain(&args);
    let stdout = String::from_utf8_lossy(&out.stdout);
    let v = serde_json::from_str(&stdout)
        .unwrap_or_else(|e| panic!("{e}: {stdout}\n{}", String::from_utf8_lossy(&out.stderr)));
    (out.status.code(), v)
}

/// The codes of the warnings of a solve, in order.
fn codes(v: &serde_json::Value) -> Vec<String> {
    v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["code"].as_str().unwrap().to_string())
        .collect()
}

/// One reformer fed methane and steam (`water` kmol/h per 100 kmol/h of CH4) at 620 degC and
/// 30 bar, with `extra` lines under the unit.
fn reformer(water: &str, extra: &str) -> String {
    format!(
        "title: reformer (invented)
feeds:
  feed:
    temperature: 620 degC
    pressure: 30 bar
    flows: {{CH4: 100 kmol/h, H2O: {water} kmol/h, H2: 3 kmol/h, CO2: 1 kmol/h}}
units:
  - name: reformer
    type: reformer
    from: feed
    to: out
{extra}"
    )
}

/// A shift converter fed a reformed gas at `t_in` and 25 bar, `water` kmol/h of steam.
fn shift(t_in: &str, water: &str, extra: &str) -> String {
    format!(
        "title: shift (invented)
feeds:
  gas:
    temperature: {t_in}
    pressure: 25 bar
    flows: {{H2: 470 kmol/h, H2O: {water} kmol/h, CO: 95 kmol/h, CO2: 55 kmol/h, CH4: 35 kmol/h, N2: 5 kmol/h}}
units:
  - name: conv
    type: shift
    from: gas
    to: out
{extra}"
    )
}

/// A methanator fed a purified gas at `t_in` and 25 bar.
fn methanator(t_in: &str) -> String {
    format!(
        "title: methanator (invented)
feeds:
  gas:
    temperature: {t_in}
    pressure: 25 bar
    flows: {{H2: 96.5 kmol/h, CH4: 1.2 kmol/h, N2: 0.3 kmol/h, H2O: 1 kmol/h, CO: 0.3 kmol/h, CO2: 0.1 kmol/h}}
units:
  - name: meth
    type: methanator
    from: gas
    to: out
"
    )
}

#[test]
fn carbon_routes_agree_in_an_equilibrated_gas() {
    // Consistency: cracking (CH4 = C + 2 H2) minus Boudouard (2 CO = C + CO2) is
    // CH4 + CO2 = 2 CO + 2 H2, which is reforming minus shift; in a gas at reforming and shift
    // equilibrium it is at equilibrium too, so both routes give the same carbon activity.
    // A check of the data and the stage together: 1e-9 relative.
    let db = SpeciesDb::embedded().unwrap();
    let mut flows = vec![0.0; db.len()];
    for (name, n) in [("CH4", 1.0), ("H2O", 3.0), ("H2", 0.03), ("CO2", 0.01)] {
        flows[db.index_of(name).unwrap()] = n;
    }
    let feed = Stream::vapour(flows, 893.15, 30e5);
    for t_out in [973.15, 1073.15, 1138.15, 1223.15] {
        let spec = ReformerSpec {
            outlet_temperature_k: t_out,
            pressure_drop_pa: 0.0,
            approaches: vec![],
            limits: Default::default(),
            gas_model: None,
        };
        let r = Reformer::new(&db, "r", &spec)
            .unwrap()
            .solve(&db, &[&feed], None)
            .unwrap();
        let fig = |k: &str| r.figures.iter().find(|f| f.key == k).unwrap().value;
        let (a1, a2) = (
            fig("carbon-activity-methane-cracking"),
            fig("carbon-activity-boudouard"),
        );
        assert!((a1 / a2 - 1.0).abs() < 1e-9, "{t_out} K: {a1} vs {a2}");
        // The margin is the smallest 1 - a over the path and the outlet, so at most 1 - a_out.
        assert!(fig("carbon-margin") <= 1.0 - a1 + 1e-12);
    }
}

#[test]
fn methane_cracking_activity_matches_janaf_at_1000_k() {
    // NIST-JANAF (Chase 1998), tests/data/janaf/CH4.csv at 1000 K: log10 Kf(CH4) = -1.018; C(gr)
    // and H2 are reference states (log10 Kf = 0). For CH4 = C(gr) + 2 H2, log10 K = +1.018,
    // K = 10^1.018 = 10.423. An equimolar CH4/H2 gas at 1 bar: p_CH4 = p_H2 = 0.5 bar, so
    // a_C = K p_CH4 / p_H2^2 = 10.423 * 0.5 / 0.25 = 20.85. The table's 3 decimals of log10 K
    // are worth 0.12 % in K, the species fits a few J/mol in G: 0.5 % is asked.
    let db = SpeciesDb::embedded().unwrap();
    let cracking = Reaction::named(&db, "methane-cracking").unwrap();
    let (ch4, h2) = (db.index_of("CH4").unwrap(), db.index_of("H2").unwrap());
    let a = carbon_activity(&db, &cracking, 1000.0, |i| {
        if i == ch4 || i == h2 {
            0.5
        } else {
            1.0
        }
    })
    .unwrap();
    let hand = 10f64.powf(1.018) * 0.5 / 0.25;
    assert!((hand - 20.85).abs() < 0.01, "{hand}");
    assert!((a / hand - 1.0).abs() < 5e-3, "{a} vs {hand}");
}

#[test]
fn low_steam_to_carbon_is_flagged_for_carbon_and_for_the_ratio() {
    // S/C 0.96 at 30 bar, 620 -> 865 degC, as a new user tried: below 2.5 (common practice).
    // By the principle of equilibrated gas alone it is carbon-free (smallest margin about
    // 0.12), while the actual inlet gas, not yet reformed, has a cracking activity far above 1.
    let (_, v) = solve(&reformer("96", "    outlet-temperature: 865 degC\n"), &[]);
    assert_eq!(codes(&v), vec!["steam-to-carbon"]);
    let m = v["summary"]["carbon_margin"]["reformer"].as_f64().unwrap();
    assert!((0.0..0.3).contains(&m), "{m}");
    let inlet = &v["units"]["reformer"]["figures"]["carbon-activity-inlet-cracking"]["value"];
    assert!(inlet.as_f64().unwrap() > 10.0, "{inlet}");
    // S/C 0.8: carbon possible part-way along the path, once, with where and how much.
    let text = reformer("80", "    outlet-temperature: 865 degC\n");
    let (code, v) = solve(&text, &[]);
    assert_eq!(code, Some(0));
    let c = codes(&v);
    assert_eq!(c, vec!["steam-to-carbon", "carbon-formation"], "{c:?}");
    let carbon = v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|w| w["code"] == "carbon-formation")
        .unwrap();
    assert!(carbon["value"].as_f64().unwrap() > 1.0 && carbon["limit"] == 1.0);
    assert!(
        carbon["message"].as_str().unwrap().contains("degC"),
        "{carbon}"
    );
    let margin = v["summary"]["carbon_margin"]["reformer"].as_f64().unwrap();
    assert!(margin < 0.0, "{margin}");
    assert_eq!(
        v["units"]["reformer"]["figures"]["carbon-margin"]["value"]
            .as_f64()
            .unwrap(),
        margin
    );
    // --strict: the same solve, exit status 3 (solved, with warnings).
    let (code, _) = solve(&text, &["--strict"]);
    assert_eq!(code, Some(3));
}

#[test]
fn carbon_threshold_bites_at_a_margin_of_zero() {
    // Find by bisection the steam flow at which the smallest margin 1 - a crosses zero, then
    // check 0.5 % of steam either side: a warning below, none above.
    let margin = |water: f64| {
        let (_, v) = solve(
            &reformer(&format!("{water}"), "    outlet-temperature: 865 degC\n"),
            &[],
        );
        let m = v["summary"]["carbon_margin"]["reformer"].as_f64().unwrap();
        (m, codes(&v).contains(&"carbon-formation".to_string()))
    };
    let (mut lo, mut hi) = (50.0, 300.0);
    assert!(margin(lo).0 < 0.0 && margin(hi).0 > 0.0);
    for _ in 0..12 {
        let mid = 0.5 * (lo + hi);
        if margin(mid).0 < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let (m_below, warned_below) = margin(lo * 0.995);
    let (m_above, warned_above) = margin(hi * 1.005);
    assert!(m_below < 0.0 && warned_below, "{lo}: {m_below}");
    assert!(m_above > 0.0 && !warned_above, "{hi}: {m_above}");
}

#[test]
fn steam_to_carbon_threshold_bites() {
    // 250 kmol/h of steam on 100 kmol/h of CH4 is 2.5 exactly: inside; 249 is outside.
    let at = |water: &str| {
        let (_, v) = solve(&reformer(water, "    outlet-temperature: 865 degC\n"), &[]);
        codes(&v).contains(&"steam-to-carbon".to_string())
    };
    assert!(!at("250"));
    assert!(at("249"));
    // Set in the file: 3.0 flags a ratio of 2.9.
    let (_, v) = solve(
        &reformer(
            "290",
            "    outlet-temperature: 865 degC\n    min-steam-to-carbon: 3.0\n",
        ),
        &[],
    );
    let w = &v["warnings"][0];
    assert_eq!(w["code"], "steam-to-carbon", "{v}");
    assert_eq!(w["limit"], 3.0);
}

#[test]
fn reformer_windows_bite_and_a_cold_outlet_is_flagged() {
    let at = |outlet: &str| {
        let (code, v) = solve(
            &reformer("300", &format!("    outlet-temperature: {outlet}\n")),
            &[],
        );
        assert_eq!(code, Some(0));
        codes(&v)
    };
    let rt = "reformer-temperature".to_string();
    // Common practice: outlet 700-950 degC.
    assert!(!at("950 degC").contains(&rt));
    assert!(at("950.5 degC").contains(&rt));
    assert!(at("1050 degC").contains(&rt));
    assert!(!at("700 degC").contains(&rt));
    assert!(at("699.5 degC").contains(&rt));
    // Outlet colder than the inlet (620 degC): below the window and below the inlet.
    let cold = at("600 degC");
    assert_eq!(cold.iter().filter(|c| **c == rt).count(), 2, "{cold:?}");
    // --strict on a reformer at 1050 degC.
    let (code, _) = solve(
        &reformer("300", "    outlet-temperature: 1050 degC\n"),
        &["--strict"],
    );
    assert_eq!(code, Some(3));
    // A window set in the file.
    let (_, v) = solve(
        &reformer(
            "300",
            "    outlet-temperature: 865 degC\n    outlet-max-temperature: 860 degC\n",
        ),
        &[],
    );
    assert_eq!(codes(&v), vec![rt]);
}

#[test]
fn a_negative_approach_is_flagged() {
    let (code, v) = solve(
        &reformer(
            "300",
            "    outlet-temperature: 865 degC\n    approach: {reforming: -5 K}\n",
        ),
        &["--strict"],
    );
    assert_eq!(code, Some(3));
    let w = &v["warnings"][0];
    assert_eq!(w["code"], "negative-approach", "{v}");
    assert_eq!(w["value"], -5.0);
    assert_eq!(w["limit"], 0.0);
    // Zero is inside.
    let (code, v) = solve(
        &reformer(
            "300",
            "    outlet-temperature: 865 degC\n    approach: {reforming: 0 K}\n",
        ),
        &["--strict"],
    );
    assert_eq!(code, Some(0), "{v}");
}

#[test]
fn shift_windows_bite() {
    let cat = |c: &str| format!("    catalyst: {c}\n");
    let warned = |text: String| {
        let (_, v) = solve(&text, &[]);
        codes(&v).contains(&"catalyst-temperature".to_string())
    };
    // Iron-chromium, fed 320-380 degC (common practice); isothermal outlets to test 480 degC.
    let hts = cat("iron-chromium");
    let iso = |t: &str| format!("{hts}    outlet-temperature: {t}\n");
    assert!(!warned(shift("380 degC", "340", &iso("400 degC"))));
    assert!(warned(shift("380.5 degC", "340", &iso("400 degC"))));
    assert!(!warned(shift("320 degC", "340", &iso("400 degC"))));
    assert!(warned(shift("319.5 degC", "340", &iso("400 degC"))));
    assert!(!warned(shift("350 degC", "340", &iso("480 degC"))));
    assert!(warned(shift("350 degC", "340", &iso("480.5 degC"))));
    // A hot HTS outlet under --strict.
    let (code, v) = solve(&shift("350 degC", "340", &iso("500 degC")), &["--strict"]);
    assert_eq!(code, Some(3));
    assert_eq!(v["warnings"][0]["limit"], 480.0);
    // Low-temperature copper, fed 190-230 degC.
    let lts = cat("low-temperature-copper");
    let lts_iso = format!("{lts}    outlet-temperature: 220 degC\n");
    assert!(!warned(shift("190 degC", "340", &lts_iso)));
    assert!(warned(shift("189.5 degC", "340", &lts_iso)));
    assert!(!warned(shift(
        "230 degC",
        "340",
        &format!("{lts}    outlet-temperature: 250 degC\n")
    )));
    assert!(warned(shift(
        "230.5 degC",
        "340",
        &format!("{lts}    outlet-temperature: 250 degC\n")
    )));
    // An iron-chromium charge at 300 degC, as a new user tried: below its window.
    assert!(warned(shift("300 degC", "340", &hts)));
    // Windows set in the file.
    let wide = format!("{hts}    inlet-min-temperature: 290 degC\n");
    assert!(!warned(shift(
        "300 degC",
        "340",
        &format!("{wide}    outlet-temperature: 400 degC\n")
    )));
}

#[test]
fn a_wet_inlet_is_flagged_and_the_dew_point_margin_bites() {
    // The feed's dew point from the JSON stream table (IAPWS-IF97 saturation line at the water
    // partial pressure); the margin, 15 K by default, set either side of the inlet.
    let lts = "    catalyst: low-temperature-copper\n";
    let (_, v) = solve(&shift("200 degC", "900", lts), &[]);
    let dew = v["streams"]["gas"]["dew_point_degC"].as_f64().unwrap();
    assert!((185.0..200.0).contains(&dew), "{dew}");
    assert!(codes(&v).contains(&"dew-point".to_string()), "{v}");
    let (code, _) = solve(&shift("200 degC", "900", lts), &["--strict"]);
    assert_eq!(code, Some(3));
    let margin = 200.0 - dew;
    let with = |m: f64| {
        let (_, v) = solve(
            &shift(
                "200 degC",
                "900",
                &format!("{lts}    dew-point-margin: {m} K\n"),
            ),
            &[],
        );
        codes(&v).contains(&"dew-point".to_string())
    };
    assert!(!with(margin - 0.01));
    assert!(with(margin + 0.01));
}

#[test]
fn methanator_window_bites() {
    // Common practice: methanator fed at 260-330 degC.
    let warned = |t: &str| {
        let (_, v) = solve(&methanator(t), &[]);
        codes(&v).contains(&"catalyst-temperature".to_string())
    };
    assert!(!warned("300 degC"));
    assert!(!warned("330 degC"));
    assert!(warned("330.5 degC"));
    assert!(!warned("260 degC"));
    assert!(warned("259.5 degC"));
}

#[test]
fn stream_dew_points_follow_iapws_if97() {
    // IAPWS-IF97 Table 35: T_s(1 MPa) = 453.035632 K, 179.885632 degC. Pure steam at 10 bar abs
    // has that dew point; half steam at 20 bar abs has the same water partial pressure.
    let text = "title: dew points (invented)
feeds:
  steam:
    temperature: 250 degC
    pressure: 10 bar
    flows: {H2O: 10 kmol/h}
  wet:
    temperature: 250 degC
    pressure: 20 bar
    flows: {H2O: 10 kmol/h, N2: 10 kmol/h}
  dry:
    temperature: 250 degC
    pressure: 20 bar
    flows: {N2: 10 kmol/h}
units:
  - name: mix
    type: mixer
    from: [steam, wet, dry]
    to: mixed
";
    let (code, v) = solve(text, &[]);
    assert_eq!(code, Some(0));
    for s in ["steam", "wet"] {
        let d = v["streams"][s]["dew_point_degC"].as_f64().unwrap();
        assert!((d - 179.885_632).abs() < 1e-5, "{s}: {d}");
    }
    assert!(v["streams"]["dry"]["dew_point_degC"].is_null());
    // The table and Markdown show the row.
    let dir = tempfile::tempdir().unwrap();
    let file = write(dir.path(), "dew.yaml", text);
    for format in ["table", "markdown"] {
        let out = syntrain(&["solve", file.to_str().unwrap(), "--format", format]);
        let t = String::from_utf8_lossy(&out.stdout);
        assert!(
            t.contains("water dew point, degC") && t.contains("179.9"),
            "{t}"
        );
    }
}

#[test]
fn the_demo_train_raises_no_warning_and_shows_its_margins() {
    let demo = concat!(env!("CARGO_MANIFEST_DIR"), "/flowsheets/demo-train.yaml");
    let out = syntrain(&["solve", demo, "--format", "json", "--strict"]);
    assert_eq!(out.status.code(), Some(0));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(
        v["warnings"].as_array().unwrap().is_empty(),
        "{}",
        v["warnings"]
    );
    // Margins of the demo (S/C 3.0): well inside.
    for unit in ["prereformer", "reformer"] {
        let m = v["summary"]["carbon_margin"][unit].as_f64().unwrap();
        assert!((0.5..1.0).contains(&m), "{unit}: {m}");
    }
    // The table lists the margin and says there are no warnings.
    let out = syntrain(&["solve", demo]);
    let t = String::from_utf8_lossy(&out.stdout);
    assert!(
        t.contains("carbon margin, reformer") && t.contains("Warnings\n  none"),
        "{t}"
    );
    // compare --strict: the demo against its revamp options, none warned.
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/flowsheets/");
    let option = format!("{dir}revamp-lower-steam.yaml");
    let out = syntrain(&["compare", demo, &option, "--strict", "--format", "json"]);
    assert_eq!(out.status.code(), Some(0));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert!(v["base"]["warnings"].as_array().unwrap().is_empty());
    assert!(v["options"][0]["warnings"].as_array().unwrap().is_empty());
}

#[test]
fn compare_and_sweep_under_strict_exit_3_on_warnings() {
    let dir = tempfile::tempdir().unwrap();
    let base = write(
        dir.path(),
        "base.yaml",
        &reformer("300", "    outlet-temperature: 865 degC\n"),
    );
    let hot = write(
        dir.path(),
        "hot.yaml",
        &reformer("300", "    outlet-temperature: 1000 degC\n"),
    );
    let (b, h) = (base.to_str().unwrap(), hot.to_str().unwrap());
    let out = syntrain(&["compare", b, h]);
    assert_eq!(out.status.code(), Some(0));
    let t = String::from_utf8_lossy(&out.stdout);
    assert!(
        t.contains("option 1: unit 'reformer': outlet 1000.0 degC"),
        "{t}"
    );
    let out = syntrain(&["compare", b, h, "--strict"]);
    assert_eq!(out.status.code(), Some(3));
    let out = syntrain(&["compare", b, b, "--strict"]);
    assert_eq!(out.status.code(), Some(0));
    // A sweep whose second case breaks the reformer window; its row names the code.
    let vary = "units.reformer.outlet-temperature=865 degC,1000 degC";
    let out = syntrain(&["sweep", b, "--vary", vary]);
    assert_eq!(out.status.code(), Some(0));
    let csv = String::from_utf8_lossy(&out.stdout);
    let rows: Vec<&str> = csv.lines().collect();
    assert_eq!(rows.len(), 3, "{csv}");
    assert!(!rows[1].contains("reformer-temperature") && rows[2].contains("reformer-temperature"));
    let out = syntrain(&["sweep", b, "--vary", vary, "--strict"]);
    assert_eq!(out.status.code(), Some(3));
}

#[test]
fn unit_types_list_the_limit_keys() {
    for (unit, keys) in [
        (
            "reformer",
            &[
                "outlet-min-temperature",
                "outlet-max-temperature",
                "min-steam-to-carbon",
            ][..],
        ),
        ("prereformer", &["min-steam-to-carbon"][..]),
        (
            "shift",
            &[
                "inlet-min-temperature",
                "inlet-max-temperature",
                "outlet-max-temperature",
                "dew-point-margin",
            ][..],
        ),
        (
            "methanator",
            &[
                "inlet-min-temperature",
                "inlet-max-temperature",
                "outlet-max-temperature",
                "dew-point-margin",
            ][..],
        ),
    ] {
        let out = syntrain(&["unit-types", unit]);
        let t = String::from_utf8_lossy(&out.stdout);
        for k in keys {
            assert!(t.contains(k), "{unit} lacks {k}:\n{t}");
        }
    }
}
