//! A reformer fired by a furnace, end to end through the real binary: the make-up fuel set so the
//! furnace delivers the reformer's duty, the whole flowsheet's element and energy balances, the
//! plant's energy figures worked out by hand from the stream flows and heating values, the heat
//! balance, and the errors of a fuel that cannot meet the duty and of a missing `heats`.

mod common;

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

use serde_json::Value;
use syntrain::flowsheet::Flowsheet;
use syntrain::thermo::SpeciesDb;

#[global_allocator]
static GLOBAL: common::alloc::Counting = common::alloc::Counting;

/// DIN 1343: molar volume of an ideal gas at 273.15 K and 101 325 Pa, m3/kmol.
const NORMAL_MOLAR_VOLUME_M3_PER_KMOL: f64 = 22.414;
/// Molar mass of water, kg/kmol (IUPAC atomic weights; the database's 18.015).
const WATER_KG_PER_KMOL: f64 = 18.015;

/// Lower heating value at 298.15 K, kJ/mol, water as vapour, by species; and its atoms
/// (C, H, O, N, Ar).
/// NIST-JANAF (Chase 1998) formation enthalpies, kJ/mol: CH4 -74.873, CO -110.527,
/// CO2 -393.522, H2O(g) -241.826. LHV(CH4) = -74.873 + 393.522 + 2 x 241.826 = 802.301;
/// LHV(H2) = 241.826; LHV(CO) = 393.522 - 110.527 = 282.995. Ethane -84.0 and propane
/// -104.7 kJ/mol (NIST Chemistry WebBook, from memory): LHV(C2H6) = 2 x 393.522 + 3 x 241.826
/// - 84.0 = 1428.522; LHV(C3H8) = 3 x 393.522 + 4 x 241.826 - 104.7 = 2043.170.
const SPECIES: [(&str, f64, [f64; 5]); 10] = [
    ("CH4", 802.301, [1.0, 4.0, 0.0, 0.0, 0.0]),
    ("C2H6", 1428.522, [2.0, 6.0, 0.0, 0.0, 0.0]),
    ("C3H8", 2043.170, [3.0, 8.0, 0.0, 0.0, 0.0]),
    ("H2", 241.826, [0.0, 2.0, 0.0, 0.0, 0.0]),
    ("CO", 282.995, [1.0, 0.0, 1.0, 0.0, 0.0]),
    ("CO2", 0.0, [1.0, 0.0, 2.0, 0.0, 0.0]),
    ("H2O", 0.0, [0.0, 2.0, 1.0, 0.0, 0.0]),
    ("N2", 0.0, [0.0, 0.0, 0.0, 2.0, 0.0]),
    ("O2", 0.0, [0.0, 0.0, 2.0, 0.0, 0.0]),
    ("Ar", 0.0, [0.0, 0.0, 0.0, 0.0, 1.0]),
];

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

fn temp_dir(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("syntrain-furnace-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn write(dir: &Path, name: &str, text: &str) -> String {
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path.display().to_string()
}

fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// The demo train with its tail gas and a make-up fuel fired in a furnace heating the reformer,
/// and boiler-feed water raised to export steam in a heater (invented demo numbers).
fn fired_train() -> String {
    let demo = std::fs::read_to_string(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("flowsheets/demo-train.yaml"),
    )
    .unwrap();
    let demo = demo.replace(
        "feeds:\n",
        "energy: {steam-credit: 2.9 GJ/t}\n\
         feeds:\n\
         \x20 fuel-gas:\n\
         \x20   temperature: 15 degC\n\
         \x20   pressure: 4 bar\n\
         \x20   flows: {CH4: 93 kmol/h, C2H6: 4 kmol/h, N2: 3 kmol/h}\n\
         \x20 combustion-air:\n\
         \x20   temperature: 250 degC\n\
         \x20   pressure: 1.05 bar\n\
         \x20   total: 1000 kmol/h\n\
         \x20   mole-fractions: {N2: 0.7808, O2: 0.2095, Ar: 0.0097}\n\
         \x20 boiler-feed-water:\n\
         \x20   temperature: 105 degC\n\
         \x20   pressure: 45 bar\n\
         \x20   flows: {H2O: 4000 kmol/h}\n",
    );
    format!(
        "{demo}\n\
         \x20 - name: reformer-furnace\n\
         \x20   type: furnace\n\
         \x20   from: [psa-tail-gas, fuel-gas, combustion-air]\n\
         \x20   to: flue-gas\n\
         \x20   heats: reformer\n\
         \x20   air: combustion-air\n\
         \x20   make-up-fuel: fuel-gas\n\
         \x20   bridgewall-temperature: 1010 degC\n\
         \x20   excess-oxygen: 10 %\n\
         \x20 - name: steam-raising\n\
         \x20   type: heater\n\
         \x20   from: boiler-feed-water\n\
         \x20   to: export-steam\n\
         \x20   outlet-temperature: 400 degC\n"
    )
}

fn solve_json(path: &str) -> Value {
    let out = syntrain(&["solve", path, "--format", "json"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// LHV of a stream, MW, from its flows (kmol/h) and the heating values above.
fn lhv_mw(stream: &Value) -> f64 {
    SPECIES
        .iter()
        .map(|(name, lhv, _)| {
            stream["flow_kmol_h"]
                .get(name)
                .map_or(0.0, |n| f(n) / 3.6 * lhv / 1e3)
        })
        .sum()
}

#[test]
fn a_fired_reformer_closes_its_balances_and_its_energy_figures_follow_by_hand() {
    let dir = temp_dir("fired");
    let path = write(&dir, "fired.yaml", &fired_train());
    let v = solve_json(&path);
    let streams = v["streams"].as_object().unwrap();
    let units = v["units"].as_object().unwrap();

    // The furnace gives the reformer exactly its duty, and its own duty is minus that and the
    // casing loss (1.5 % of the fired duty by default).
    let furnace = &units["reformer-furnace"];
    let q_reformer = f(&units["reformer"]["duty_kW"]);
    let figure = |key: &str| f(&furnace["figures"][key]["value"]);
    assert!((figure("heat-to-reformer") - q_reformer).abs() < 1e-9 * q_reformer);
    let fired = figure("fired-duty");
    let loss = figure("heat-loss");
    assert!((loss - 0.015 * fired).abs() < 1e-9 * fired);
    assert!((f(&furnace["duty_kW"]) + q_reformer + loss).abs() < 1e-9 * q_reformer);
    // Fired duty is the LHV of tail gas and make-up fuel (the air burns nothing).
    let by_hand = lhv_mw(&streams["psa-tail-gas"]) + lhv_mw(&streams["fuel-gas"]);
    assert!(
        (fired / 1e3 - by_hand).abs() < 2e-4 * by_hand,
        "{fired} kW vs {by_hand} MW"
    );
    // The make-up fuel feed carries the flow the furnace set.
    let make_up: f64 = streams["fuel-gas"]["flow_kmol_h"]
        .as_object()
        .unwrap()
        .values()
        .map(f)
        .sum();
    assert!((make_up - figure("make-up-fuel-flow")).abs() < 1e-9 * make_up);

    // Element balance of the whole flowsheet (1e-9) and energy balance (1e-6), recomputed from
    // the JSON: feeds are streams from "feed", products those going to no unit.
    let is_feed = |s: &Value| s["source"] == "feed";
    let is_product = |s: &Value| s["destination"].is_null();
    for e in 0..5 {
        let atoms = |s: &Value| -> f64 {
            SPECIES
                .iter()
                .map(|(name, _, a)| s["flow_kmol_h"].get(name).map_or(0.0, |n| f(n) * a[e]))
                .sum()
        };
        let fed: f64 = streams.values().filter(|s| is_feed(s)).map(atoms).sum();
        let made: f64 = streams.values().filter(|s| is_product(s)).map(atoms).sum();
        assert!(
            (made - fed).abs() <= 1e-9 * fed,
            "element {e}: {fed} vs {made}"
        );
    }
    let h = |s: &Value| f(&s["enthalpy_kW"]);
    let h_feeds: f64 = streams.values().filter(|s| is_feed(s)).map(h).sum();
    let h_feeds_abs: f64 = streams
        .values()
        .filter(|s| is_feed(s))
        .map(|s| h(s).abs())
        .sum();
    let h_products: f64 = streams.values().filter(|s| is_product(s)).map(h).sum();
    let duties: f64 = units.values().map(|u| f(&u["duty_kW"])).sum();
    let r = (h_products - h_feeds - duties).abs() / h_feeds_abs;
    assert!(r < 1e-6, "energy balance off by {r:e}");
    assert!(f(&v["balances"]["energy_residual"]) < 1e-6);
    assert!(f(&v["balances"]["element_residual"]) < 1e-9);

    // Energy figures by hand. Feed LHV: the natural gas (the process steam burns nothing);
    // fuel LHV: the make-up fuel only (the tail gas is made inside the plant).
    let s = &v["summary"];
    let feed = lhv_mw(&streams["natural-gas"]);
    let fuel = lhv_mw(&streams["fuel-gas"]);
    assert!((f(&s["feed_LHV_MW"]) - feed).abs() < 2e-4 * feed, "{feed}");
    assert!((f(&s["fuel_LHV_MW"]) - fuel).abs() < 2e-4 * fuel, "{fuel}");
    // Steam export: 4000 kmol/h raised less 3105 kmol/h of process steam taken in.
    let export = (4000.0 - 3105.0) * WATER_KG_PER_KMOL / 1e3;
    assert!((f(&s["steam_export_t_h"]) - export).abs() < 1e-9 * export);
    assert_eq!(f(&s["steam_credit_GJ_per_t"]), 2.9);
    // Hydrogen made: the purifier product's H2, Nm3/h (DIN 1343).
    let h2 = f(&streams["hydrogen-product"]["flow_kmol_h"]["H2"]) * NORMAL_MOLAR_VOLUME_M3_PER_KMOL;
    assert!((f(&s["hydrogen_made_Nm3_h"]) - h2).abs() < 1e-3 * h2);
    // MW x 3.6 = GJ/h; per 1000 Nm3/h of hydrogen.
    let per = |gj_h: f64| gj_h / (h2 / 1e3);
    let net = per((feed + fuel) * 3.6 - export * 2.9);
    assert!(
        (f(&s["net_specific_energy_GJ_per_1000Nm3"]) - net).abs() < 2e-4 * net,
        "{net}"
    );
    assert!((f(&s["feed_specific_energy_GJ_per_1000Nm3"]) - per(feed * 3.6)).abs() < 2e-4 * net);
    assert!((f(&s["fuel_specific_energy_GJ_per_1000Nm3"]) - per(fuel * 3.6)).abs() < 2e-4 * net);
    // A steam-reforming hydrogen plant needs about 12-16 GJ per 1000 Nm3 of hydrogen net of its
    // steam export (common practice); this invented one, with a large steam import, is in range.
    assert!((10.0..18.0).contains(&net), "{net}");

    // The heat balance closes: heats in = heats out within 1e-6 of the heats in.
    let hb = &v["heat_balance"];
    let total_in = f(&hb["total_in_kW"]);
    assert!(f(&hb["residual_kW"]).abs() < 1e-6 * total_in);
    assert!((total_in - f(&hb["total_out_kW"])).abs() < 1e-6 * total_in);
    let out = hb["heats_out"].as_array().unwrap();
    assert!(out
        .iter()
        .any(|l| l["label"] == "flue gas loss (above 25 degC)" && l["name"] == "flue-gas"));
    let transfers = hb["transfers"].as_array().unwrap();
    assert!(transfers
        .iter()
        .any(|l| l["label"] == "heat to the reformer" && (f(&l["kW"]) - q_reformer).abs() < 1e-6));

    // The text report shows the heat balance and the energy figures.
    let out = syntrain(&["solve", &path]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Heat balance (LHV basis"), "{text}");
    assert!(
        text.contains("net specific energy (credit 2.90 GJ/t)"),
        "{text}"
    );
    std::fs::remove_dir_all(dir).ok();
}

#[test]
fn the_steam_credit_is_an_input_and_the_energy_figures_are_result_paths() {
    let dir = temp_dir("sweep");
    let path = write(&dir, "fired.yaml", &fired_train());
    let out = syntrain(&[
        "sweep",
        &path,
        "--vary",
        "energy.steam-credit=2.0e6,4.0e6",
        "--columns",
        "summary.net_specific_energy_GJ_per_1000Nm3,summary.steam_export_t_h,summary.feed_LHV_MW",
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let rows: Vec<Vec<f64>> = text
        .lines()
        .skip(1)
        .map(|l| l.split(',').filter_map(|c| c.parse().ok()).collect())
        .collect();
    assert_eq!(rows.len(), 2, "{text}");
    let (a, b) = (&rows[0], &rows[1]);
    let n = a.len();
    // The net figure falls by export x 2 GJ/t per 1000 Nm3 of hydrogen; the others stay.
    assert_eq!(a[n - 2], b[n - 2]);
    assert_eq!(a[n - 1], b[n - 1]);
    assert!(a[n - 3] > b[n - 3], "{text}");
    std::fs::remove_dir_all(dir).ok();
}

#[test]
fn a_warm_solve_of_the_fired_train_allocates_nothing() {
    let db = SpeciesDb::embedded().unwrap();
    let fs = Flowsheet::from_yaml_str("fired.yaml", &fired_train(), &db).unwrap();
    let params = fs.parameters();
    let mut ws = fs.workspace(&db);
    // The counter counts: a cold solve sizes its buffers.
    let cold = common::alloc::allocations();
    fs.solve_in(&db, &params, &mut ws).unwrap();
    assert!(common::alloc::allocations() > cold);
    for _ in 0..3 {
        fs.solve_in(&db, &params, &mut ws).unwrap();
    }
    let before = common::alloc::allocations();
    let r = fs.solve_in(&db, &params, &mut ws).unwrap();
    let fuel = r.summary.fuel_lhv_w;
    let after = common::alloc::allocations();
    assert!(fuel > 0.0);
    assert_eq!(
        after - before,
        0,
        "a warm solve made {} allocations",
        after - before
    );
}

/// A reformer with a tail gas fed to its furnace (invented demo numbers).
fn small(tail_h2_kmol_h: f64, heats: &str) -> String {
    format!(
        "title: Invented fired reformer\n\
         feeds:\n\
         \x20 reformer-feed:\n\
         \x20   temperature: 620 degC\n\
         \x20   pressure: 30 bar\n\
         \x20   flows: {{CH4: 1000 kmol/h, H2O: 3000 kmol/h, H2: 30 kmol/h}}\n\
         \x20 tail-gas:\n\
         \x20   temperature: 30 degC\n\
         \x20   pressure: 1.3 bar\n\
         \x20   flows: {{H2: {tail_h2_kmol_h} kmol/h, CO2: 500 kmol/h, CH4: 100 kmol/h}}\n\
         \x20 fuel-gas:\n\
         \x20   temperature: 15 degC\n\
         \x20   pressure: 4 bar\n\
         \x20   flows: {{CH4: 100 kmol/h}}\n\
         \x20 combustion-air:\n\
         \x20   temperature: 25 degC\n\
         \x20   pressure: 1.05 bar\n\
         \x20   mole-fractions: {{N2: 0.79, O2: 0.21}}\n\
         \x20   total: 1000 kmol/h\n\
         units:\n\
         \x20 - name: reformer\n\
         \x20   type: reformer\n\
         \x20   from: reformer-feed\n\
         \x20   to: reformed-gas\n\
         \x20   outlet-temperature: 865 degC\n\
         \x20 - name: reformer-furnace\n\
         \x20   type: furnace\n\
         \x20   from: [tail-gas, fuel-gas, combustion-air]\n\
         \x20   to: flue-gas\n\
         {heats}\
         \x20   air: combustion-air\n\
         \x20   make-up-fuel: fuel-gas\n\
         \x20   bridgewall-temperature: 1010 degC\n"
    )
}

#[test]
fn a_duty_the_fuel_exceeds_and_a_missing_link_are_errors() {
    let dir = temp_dir("errors");
    // 6000 kmol/h of hydrogen in the tail gas alone is far more than the reformer takes.
    let path = write(&dir, "rich.yaml", &small(6000.0, "    heats: reformer\n"));
    let out = syntrain(&["solve", &path]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("reformer-furnace") && err.contains("kW more than the"),
        "{err}"
    );
    // With a lean tail gas it solves.
    let path = write(&dir, "lean.yaml", &small(300.0, "    heats: reformer\n"));
    assert!(syntrain(&["solve", &path]).status.success());
    // A misspelt heated unit: an error at its line and column.
    let path = write(&dir, "typo.yaml", &small(300.0, "    heats: [reformr]\n"));
    let out = syntrain(&["solve", &path]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1));
    assert!(
        err.contains("typo.yaml:30:13") && err.contains("heats 'reformr'"),
        "{err}"
    );
    // No `heats` at all.
    let path = write(&dir, "none.yaml", &small(300.0, ""));
    let out = syntrain(&["solve", &path]);
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("needs `heats`") && err.contains("none.yaml:"),
        "{err}"
    );
    std::fs::remove_dir_all(dir).ok();
}
