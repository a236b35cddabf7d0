//! The whole demo plant (flowsheets/demo-plant.yaml: heat recovery, the reformer's firing,
//! boilers, loops through exchangers and through the reformer's duty), run through the real
//! binary: its element balance closes within 1e-9 and its energy balance within 1e-6, recomputed
//! here from the printed streams and duties; the recycle converged; the furnace delivers the
//! reformer's duty; every exchanger gives what it takes; the boilers' steam agrees with
//! IAPWS-IF97; and the energy figures follow their definitions in the README. The plant
//! overlays compare on the energy figures.

use std::collections::BTreeMap;
use std::path::PathBuf;
use std::process::Command;

use serde_json::Value;

fn flowsheet(name: &str) -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
        .display()
        .to_string()
}

fn solve_json(file: &str) -> Value {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(["solve", file, "--format", "json"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

/// Atoms of the species the demo plant carries, by element (from their formulas).
fn atoms(species: &str) -> &'static [(&'static str, f64)] {
    match species {
        "CH4" => &[("C", 1.0), ("H", 4.0)],
        "C2H6" => &[("C", 2.0), ("H", 6.0)],
        "C3H8" => &[("C", 3.0), ("H", 8.0)],
        "H2O" => &[("H", 2.0), ("O", 1.0)],
        "H2" => &[("H", 2.0)],
        "CO" => &[("C", 1.0), ("O", 1.0)],
        "CO2" => &[("C", 1.0), ("O", 2.0)],
        "N2" => &[("N", 2.0)],
        "O2" => &[("O", 2.0)],
        "Ar" => &[("Ar", 1.0)],
        other => panic!("species {other} not expected in the demo plant"),
    }
}

fn elements(stream: &Value) -> BTreeMap<&'static str, f64> {
    let mut out = BTreeMap::new();
    for (species, flow) in stream["flow_kmol_h"].as_object().unwrap() {
        for (e, n) in atoms(species) {
            *out.entry(*e).or_insert(0.0) += n * flow.as_f64().unwrap();
        }
    }
    out
}

fn figure(d: &Value, unit: &str, key: &str) -> f64 {
    d["units"][unit]["figures"][key]["value"]
        .as_f64()
        .unwrap_or_else(|| panic!("{unit}: no figure {key}"))
}

fn num(v: &Value) -> f64 {
    v.as_f64().unwrap()
}

fn is_feed(s: &Value) -> bool {
    s["source"] == "feed"
}

fn is_product(s: &Value) -> bool {
    s["destination"].is_null()
}

#[test]
fn the_whole_plant_closes_its_element_and_energy_balances() {
    let d = solve_json(&flowsheet("demo-plant.yaml"));
    let streams = d["streams"].as_object().unwrap();
    // Element balance, products against feeds, each element relative to what is fed
    // (conservation of atoms).
    let (mut fed, mut out) = (BTreeMap::new(), BTreeMap::new());
    for s in streams.values() {
        if is_feed(s) {
            for (e, n) in elements(s) {
                *fed.entry(e).or_insert(0.0) += n;
            }
        }
        if is_product(s) {
            for (e, n) in elements(s) {
                *out.entry(e).or_insert(0.0) += n;
            }
        }
    }
    for (e, n_in) in &fed {
        let n_out = out.get(e).copied().unwrap_or(0.0);
        assert!(
            ((n_out - n_in) / n_in).abs() < 1e-9,
            "{e}: {n_in} in, {n_out} out"
        );
    }
    // Energy balance: H(products) - H(feeds) = sum of duties (first law, steady flow), within
    // 1e-6 of the feed enthalpy magnitude.
    let h = |pick: fn(&Value) -> bool| -> f64 {
        streams
            .values()
            .filter(|s| pick(s))
            .map(|s| num(&s["enthalpy_kW"]))
            .sum()
    };
    let scale: f64 = streams
        .values()
        .filter(|s| is_feed(s))
        .map(|s| num(&s["enthalpy_kW"]).abs())
        .sum();
    let duties: f64 = d["units"]
        .as_object()
        .unwrap()
        .values()
        .map(|u| num(&u["duty_kW"]))
        .sum();
    let residual = (h(is_product) - h(is_feed) - duties) / scale;
    assert!(residual.abs() < 1e-6, "energy residual {residual}");
    // The heat balance of the report closes too (its own residual, kW, on ~3e5 kW in).
    assert!(num(&d["heat_balance"]["residual_kW"]).abs() < 1e-6 * scale);
    // The loops converged, with the tears the file names.
    let r = &d["recycles"];
    assert_eq!(r["converged"], true);
    assert_eq!(r["tear_streams"][0], "prereformed-gas");
    assert_eq!(r["tear_streams"][1], "reformer-feed");
    assert!(num(&r["residual"]) <= 1e-10);
    assert!(
        d["warnings"].as_array().unwrap().is_empty(),
        "{}",
        d["warnings"]
    );
}

#[test]
fn the_furnace_exchangers_and_boilers_pass_on_what_they_take() {
    let d = solve_json(&flowsheet("demo-plant.yaml"));
    let s = |name: &str| &d["streams"][name];
    let h = |name: &str| num(&s(name)["enthalpy_kW"]);
    // The furnace gives the reformer exactly its duty, and its own duty is that and the casing
    // loss (1.5 % of the fired duty) taken from its flue gas.
    let reformer = num(&d["units"]["reformer"]["duty_kW"]);
    let to_reformer = figure(&d, "reformer-furnace", "heat-to-reformer");
    let fired = figure(&d, "reformer-furnace", "fired-duty");
    assert!((to_reformer / reformer - 1.0).abs() < 1e-12);
    let furnace = num(&d["units"]["reformer-furnace"]["duty_kW"]);
    assert!((furnace + reformer + 0.015 * fired).abs() < 1e-9 * fired);
    // Radiant efficiency = heat to the reformer / fired duty (LHV), in %.
    let eta = figure(&d, "reformer-furnace", "radiant-efficiency");
    assert!((eta - 100.0 * reformer / fired).abs() < 1e-9);
    // Counter-current exchangers: heat given by the hot side = heat taken by the cold side,
    // from the stream enthalpies, and the unit exchanges nothing with the outside.
    for (unit, hot_in, hot_out, cold_in, cold_out) in [
        (
            "feed-effluent-exchanger",
            "hts-exit",
            "hts-exit-cooled",
            "hydrogenated-feed",
            "desulphurised-feed",
        ),
        (
            "reformer-feed-coil",
            "flue-gas",
            "flue-gas-1",
            "prereformed-gas",
            "reformer-feed",
        ),
        (
            "mixed-feed-coil",
            "flue-gas-1",
            "flue-gas-2",
            "mixed-feed",
            "prereformer-feed",
        ),
        (
            "bfw-preheater",
            "hts-exit-cooled",
            "lts-feed",
            "boiler-feed-water",
            "warm-boiler-feed-water",
        ),
        (
            "economiser",
            "flue-gas-3",
            "stack-gas",
            "warm-boiler-feed-water",
            "preheated-boiler-feed-water",
        ),
    ] {
        let given = h(hot_in) - h(hot_out);
        let taken = h(cold_out) - h(cold_in);
        let q = figure(&d, unit, "heat-transferred");
        assert!(((given - taken) / q).abs() < 1e-9, "{unit}");
        assert!(((q - taken) / q).abs() < 1e-9, "{unit}");
        assert_eq!(num(&d["units"][unit]["duty_kW"]), 0.0, "{unit}");
        // Log-mean temperature difference of the two ends (definition).
        let t = |n: &str| num(&s(n)["temperature_K"]);
        let (a, b) = (t(hot_in) - t(cold_out), t(hot_out) - t(cold_in));
        let lmtd = (a - b) / (a / b).ln();
        assert!(
            (figure(&d, unit, "lmtd") - lmtd).abs() < 1e-6 * lmtd,
            "{unit}"
        );
    }
    // Boilers with their steam side outside the flowsheet: feed water at 230 degC and 42 bar,
    // 2 % blowdown as saturated liquid. IAPWS-IF97 by PyPI `iapws` 1.5.5 at 4.2 MPa:
    // h'' = 2799.8519 kJ/kg (saturated steam), h' = 1101.6284 kJ/kg (saturated liquid),
    // h(230 degC) = 990.4772 kJ/kg, h(400 degC) = 3210.8652 kJ/kg.
    let (h_sat, h_liq, h_fw, h_sup) = (2799.8519, 1101.6284, 990.4772, 3210.8652);
    for (unit, h_steam) in [("process-gas-boiler", h_sat), ("flue-gas-boiler", h_sup)] {
        let q_kw = figure(&d, unit, "heat-to-steam");
        assert!((q_kw + num(&d["units"][unit]["duty_kW"])).abs() < 1e-9 * q_kw);
        let b = 0.02;
        let feed_kg_s = q_kw / ((1.0 - b) * h_steam + b * h_liq - h_fw);
        let steam_kg_h = 3600.0 * (1.0 - b) * feed_kg_s;
        let got = figure(&d, unit, "steam-raised");
        // Within 1e-5: syntrain's water is the NASA ideal gas plus the IF97 departure, whose
        // ideal-gas enthalpy differences differ from IF97's own by a few parts in 1e6.
        assert!(
            (got / steam_kg_h - 1.0).abs() < 1e-5,
            "{unit}: {got} vs {steam_kg_h}"
        );
    }
}

#[test]
fn the_energy_figures_follow_their_definitions() {
    let d = solve_json(&flowsheet("demo-plant.yaml"));
    let sum = &d["summary"];
    // Steam export: steam raised by boilers whose steam side is outside the flowsheet, less the
    // process steam taken in as a feed (README, energy figures), t/h.
    let raised = figure(&d, "process-gas-boiler", "steam-raised")
        + figure(&d, "flue-gas-boiler", "steam-raised");
    let imported = num(&d["streams"]["process-steam"]["mass_kg_h"]);
    let export = num(&sum["steam_export_t_h"]);
    assert!((export - (raised - imported) / 1000.0).abs() < 1e-9 * export);
    // Net specific energy: (feed + fuel LHV - export x credit) per 1000 Nm3 of hydrogen made;
    // MW x 3.6 = GJ/h.
    let credit = num(&sum["steam_credit_GJ_per_t"]);
    assert_eq!(credit, 2.9);
    let (feed, fuel) = (num(&sum["feed_LHV_MW"]), num(&sum["fuel_LHV_MW"]));
    let h2_knm3_h = num(&sum["hydrogen_made_Nm3_h"]) / 1000.0;
    let net = (3.6 * (feed + fuel) - export * credit) / h2_knm3_h;
    let got = num(&sum["net_specific_energy_GJ_per_1000Nm3"]);
    assert!((got - net).abs() < 1e-9 * net, "{got} vs {net}");
    assert!(
        (num(&sum["feed_specific_energy_GJ_per_1000Nm3"]) - 3.6 * feed / h2_knm3_h).abs() < 1e-9
    );
    // The make-up fuel is the natural gas's composition: its LHV per kmol is the same. The
    // process feeds are the natural gas and the hydrogen for desulphurisation; H2 LHV
    // 241.826 kJ/mol (NIST-JANAF, Chase 1998: dfH H2O(g) -241.826 kJ/mol).
    let kmol_h = |n: &str| num(&d["streams"][n]["total_kmol_h"]);
    let h2_mw = kmol_h("recycle-hydrogen") / 3.6 * 241.826 / 1000.0;
    let gas_feed_mw = feed - h2_mw;
    let per_kmol_feed = gas_feed_mw / kmol_h("natural-gas");
    let per_kmol_fuel = fuel / kmol_h("fuel-gas");
    assert!((per_kmol_fuel / per_kmol_feed - 1.0).abs() < 1e-9);
    // Fired duty = the LHV of every fuel burnt: the make-up and the purifier tail gas.
    let fired_mw = figure(&d, "reformer-furnace", "fired-duty") / 1000.0;
    assert!(fired_mw > fuel, "the tail gas adds to the make-up fuel");
}

#[test]
fn revamp_options_of_the_plant_compare_on_specific_energy() {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args([
            "compare",
            &flowsheet("demo-plant.yaml"),
            &flowsheet("plant-revamp-lower-steam.yaml"),
            &flowsheet("plant-revamp-mts.yaml"),
        ])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8_lossy(&out.stdout);
    for label in [
        "net specific energy",
        "steam export",
        "fuel LHV",
        "feed LHV",
    ] {
        assert!(text.contains(label), "{label} missing:\n{text}");
    }
    // Less process steam: the furnace burns less make-up fuel (the reformer's duty falls).
    let base = solve_json(&flowsheet("demo-plant.yaml"));
    let lower = solve_json(&flowsheet("plant-revamp-lower-steam.yaml"));
    let fuel = |d: &Value| num(&d["summary"]["fuel_LHV_MW"]);
    assert!(fuel(&lower) < fuel(&base));
    assert_eq!(lower["recycles"]["converged"], true);
}

#[test]
fn tear_guesses_start_the_loops_and_must_name_a_tear() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(flowsheet("demo-plant.yaml")).unwrap();
    // Without its guesses the reformer would be handed a tear of no flow on the first pass:
    // an error that says how to give one.
    let start = text.find("  tear-guess:\n").unwrap();
    let end = text.find("energy:\n").unwrap();
    let unguessed = format!("{}{}", &text[..start], &text[end..]);
    let path = dir.path().join("unguessed.yaml");
    std::fs::write(&path, unguessed).unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(["solve", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("recycle iteration 1 of at most 100"), "{err}");
    assert!(err.contains("`solver: tear-guess`"), "{err}");
    // A guess for a stream that is not a tear is refused at its line.
    let wrong = text.replace(
        "    reformer-feed:\n      temperature",
        "    mixed-feed:\n      temperature",
    );
    let path = dir.path().join("wrong.yaml");
    std::fs::write(&path, &wrong).unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(["solve", path.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8_lossy(&out.stderr);
    // The position is that of the guess's value: the line after its name.
    let line = 2 + wrong.lines().position(|l| l == "    mixed-feed:").unwrap();
    assert!(err.contains(&format!("wrong.yaml:{line}:7")), "{err}");
    assert!(
        err.contains("'mixed-feed', which is not a tear stream"),
        "{err}"
    );
}
