//! `syntrain unit-types`: the real binary lists every type of the registry and every key that a
//! shipped flowsheet uses, in text and JSON; an unknown type is an error naming the types.

use std::process::Command;

use serde_json::Value;
use syntrain::units::registry::UNIT_TYPES;

fn run(args: &[&str]) -> std::process::Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "{err}");
    out
}

#[test]
fn every_registry_type_and_every_shipped_key_is_listed() {
    let out = run(&["unit-types", "--format", "json"]);
    assert!(out.status.success());
    let listed: Value = serde_json::from_slice(&out.stdout).unwrap();
    let names: Vec<&str> = listed
        .as_array()
        .unwrap()
        .iter()
        .map(|t| t["name"].as_str().unwrap())
        .collect();
    let registry: Vec<&str> = UNIT_TYPES.iter().map(|t| t.name).collect();
    assert_eq!(names, registry);
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("flowsheets");
    for file in std::fs::read_dir(dir).unwrap() {
        let text = std::fs::read_to_string(file.unwrap().path()).unwrap();
        let doc: serde_norway::Value = serde_norway::from_str(&text).unwrap();
        // A flowsheet's units, or the units an overlay adds.
        let units = doc["units"]
            .as_sequence()
            .or(doc["add-units"].as_sequence());
        for unit in units.into_iter().flatten() {
            let t = unit["type"].as_str().unwrap();
            let entry = listed
                .as_array()
                .unwrap()
                .iter()
                .find(|x| x["name"] == t)
                .unwrap_or_else(|| panic!("type {t} not listed"));
            for (key, _) in unit.as_mapping().unwrap() {
                let key = key.as_str().unwrap();
                if ["name", "type", "from", "to"].contains(&key) {
                    continue;
                }
                let keys = entry["keys"].as_array().unwrap();
                // Named ports (an exchanger's hot-from, ...) are listed as ports.
                let ports = &entry["named_ports"];
                let port = ["inlets", "outlets", "optional_outlets"]
                    .iter()
                    .any(|side| {
                        ports[side]
                            .as_array()
                            .is_some_and(|list| list.iter().any(|p| p == key))
                    });
                assert!(
                    port || keys.iter().any(|k| k["key"] == key),
                    "{t}: {key} not listed"
                );
            }
        }
    }
    let text = run(&["unit-types"]);
    let text = String::from_utf8(text.stdout).unwrap();
    for t in &registry {
        assert!(
            text.contains(&format!("{t}\n{}\n", "=".repeat(t.len()))),
            "{t}"
        );
    }
}

#[test]
fn one_type_and_an_unknown_type() {
    let out = run(&["unit-types", "knockout"]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.starts_with("knockout\n"), "{text}");
    assert!(text.contains("gas, condensate") && text.contains("    temperature\n"));
    let out = run(&["unit-types", "knock-out"]);
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("knockout") && err.contains("methanator"),
        "{err}"
    );
}
