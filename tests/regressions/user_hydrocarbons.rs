//! User-added hydrocarbons were inert: a higher hydrocarbon added with `--species-file`
//! (n-heptane) passed the pre-reformer and reformer unreacted while the report claimed 100 %
//! higher-hydrocarbon conversion. Which species are reformed now follows from the species data;
//! a carbon-bearing species that no reaction converts is a warning naming it.

use serde_json::Value;

use super::support::{arg, stderr, stdout, syntrain, write};

fn species_file(name: &str) -> String {
    format!("{}/tests/data/species/{name}", env!("CARGO_MANIFEST_DIR"))
}

/// Cantera's reference for the heptane pre-reformer (tools/cantera_user_hydrocarbon.py).
fn reference() -> Vec<(String, f64)> {
    let path = format!(
        "{}/tests/data/cantera_heptane_prereformer.csv",
        env!("CARGO_MANIFEST_DIR")
    );
    std::fs::read_to_string(path)
        .expect("reading the cantera reference")
        .lines()
        .skip(1)
        .map(|l| {
            let (k, v) = l.split_once(',').expect("key,value");
            (k.to_string(), v.parse().expect("a number"))
        })
        .collect()
}

const HEPTANE_PREREFORMER: &str = "\
title: heptane pre-reformer (invented check case)
feeds:
  feed:
    temperature: 490 degC
    pressure: 30 bar
    flows: {CH4: 90 kmol/h, n-C7H16: 10 kmol/h, H2: 2 kmol/h, H2O: 480 kmol/h}
units:
  - name: pre
    type: prereformer
    from: feed
    to: out
";

fn solve_json(dir: &std::path::Path, species: &str, flowsheet: &str) -> Value {
    let file = write(dir, "case.yaml", flowsheet);
    let out = syntrain(&[
        "--species-file",
        &species_file(species),
        "solve",
        &arg(&file),
        "--format",
        "json",
    ]);
    assert!(out.status.success(), "solve failed: {}", stderr(&out));
    serde_json::from_str(&stdout(&out)).expect("JSON")
}

#[test]
fn user_added_heptane_is_reformed_in_a_prereformer_as_a_gibbs_minimiser_finds() {
    let dir = tempfile::tempdir().unwrap();
    let v = solve_json(dir.path(), "n-heptane.yaml", HEPTANE_PREREFORMER);
    let out = &v["streams"]["out"];
    let reference = reference();
    for (key, expected) in reference {
        let got = if key == "outlet_temperature_K" {
            out["temperature_K"].as_f64().unwrap()
        } else {
            let species = key.trim_start_matches("flow_kmol_h.");
            out["flow_kmol_h"][species].as_f64().unwrap_or(0.0)
        };
        // Cantera 3 HP equilibrium on the same species data, n-heptane a member of the phase
        // (tools/cantera_user_hydrocarbon.py): 1e-6 K and 1e-6 kmol/h (n-heptane there 5e-23).
        assert!(
            (got - expected).abs() <= 1e-6,
            "{key}: syntrain {got}, cantera {expected}"
        );
    }
    // The report's conversion figure is true: every mole of n-heptane reformed (in %).
    let figures = &v["units"]["pre"]["figures"];
    let conversion = figures["higher-hydrocarbon-conversion"]["value"].as_f64();
    assert_eq!(conversion, Some(100.0), "figures: {figures}");
}

#[test]
fn user_added_heptane_is_reformed_in_a_reformer() {
    let dir = tempfile::tempdir().unwrap();
    let sheet = HEPTANE_PREREFORMER.replace(
        "type: prereformer",
        "type: reformer\n    outlet-temperature: 850 degC",
    );
    let v = solve_json(dir.path(), "n-heptane.yaml", &sheet);
    let out = &v["streams"]["out"]["flow_kmol_h"];
    assert!(
        out["n-C7H16"].as_f64().unwrap_or(0.0) == 0.0,
        "n-heptane left: {out}"
    );
    // Carbon kept: 90 + 7 * 10 = 160 kmol/h of carbon in CH4 + CO + CO2.
    let carbon: f64 = ["CH4", "CO", "CO2"]
        .iter()
        .map(|s| out[*s].as_f64().unwrap())
        .sum();
    assert!((carbon - 160.0).abs() < 1e-9, "carbon out {carbon}");
    // Steam-to-carbon counts the heptane's seven carbon atoms: 480 / 160 = 3.
    let sc = v["units"]["pre"]["figures"]["steam-to-carbon"]["value"].as_f64();
    assert!(sc.is_some_and(|x| (x - 3.0).abs() < 1e-12), "{sc:?}");
}

#[test]
fn a_carbon_species_no_reaction_converts_is_named_in_a_warning() {
    let dir = tempfile::tempdir().unwrap();
    let sheet = HEPTANE_PREREFORMER.replace("n-C7H16: 10 kmol/h", "HCN: 0.5 kmol/h");
    let v = solve_json(dir.path(), "hydrogen-cyanide.yaml", &sheet);
    let warnings = v["warnings"].to_string();
    assert!(
        warnings.contains("HCN") && warnings.contains("unconverted"),
        "warnings: {warnings}"
    );
    // The warning's value is the species' share of the inlet in %: 0.5 of 572.5 kmol/h.
    let w = v["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .find(|w| w["code"] == "unconverted-carbon")
        .expect("an unconverted-carbon warning");
    let share = w["value"].as_f64().unwrap();
    assert!((share - 100.0 * 0.5 / 572.5).abs() < 1e-9, "{share}");
    assert_eq!(w["unit"], "pre");
    // It passes through unchanged.
    let hcn = v["streams"]["out"]["flow_kmol_h"]["HCN"].as_f64().unwrap();
    assert!((hcn - 0.5).abs() < 1e-12, "HCN out {hcn}");
}
