//! The `syntrain species` command, run as the real binary.

use std::process::{Command, Stdio};

/// Run the binary; (exit code, stdout, stderr). Fails the test on any panic.
fn syntrain(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("run syntrain");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    assert_ne!(out.status.code(), Some(101), "exit code 101 (panic): {err}");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn lists_the_database_with_sources() {
    let (code, out, _) = syntrain(&["species"]);
    assert_eq!(code, 0);
    for name in ["CH4", "C2H6", "n-C4H10", "i-C4H10", "NH3", "C(gr)"] {
        assert!(out.contains(name), "{name} missing");
    }
    assert!(out.contains("NIST-JANAF"));
}

#[test]
fn one_species_in_json_matches_janaf_at_1000_k() {
    let (code, out, err) = syntrain(&["species", "CO2", "-t", "1000 K", "--format", "json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let p = &v["properties"][0];
    // NIST-JANAF (Chase 1998), CO2 table, 1000 K: Cp 54.308 J/(mol K), H-H298 33.397 kJ/mol,
    // S 269.299 J/(mol K).
    assert!((p["cp_J_mol_K"].as_f64().unwrap() - 54.308).abs() < 0.005 * 54.308);
    assert!((p["enthalpy_above_298_kJ_mol"].as_f64().unwrap() - 33.397).abs() < 0.2);
    assert!((p["entropy_J_mol_K"].as_f64().unwrap() - 269.299).abs() < 0.3);
    assert_eq!(v["standard_pressure_bar"].as_f64(), Some(1.0));
}

#[test]
fn temperatures_take_units_and_bad_input_fails_cleanly() {
    let (code, out, _) = syntrain(&["species", "H2O", "-t", "850 degC"]);
    assert_eq!(code, 0);
    assert!(out.contains("1123.15"));
    let (code, _, err) = syntrain(&["species", "H2O", "-t", "850"]);
    assert_ne!(code, 0);
    assert!(err.contains("--temperature"), "{err}");
    let (code, _, err) = syntrain(&["species", "CH5"]);
    assert_ne!(code, 0);
    assert!(err.contains("unknown species 'CH5'"), "{err}");
    let (code, _, err) = syntrain(&["species", "CH4", "-t", "4000 K"]);
    assert_ne!(code, 0);
    assert!(err.contains("outside its data range"), "{err}");
}

#[test]
fn user_species_file_adds_records_and_reports_yaml_positions() {
    let dir = tempfile::tempdir().unwrap();
    let good = dir.path().join("extra.yaml");
    // A constant-Cp monatomic test gas (Cp = 5/2 R); demo record, not real data.
    std::fs::write(
        &good,
        "species:\n  - name: Xx\n    description: test gas\n    formula: He\n    atoms: {He: 1}\n    \
         phase: gas\n    molar-mass: 4.002602\n    source: demo record\n    standard-pressure: 1 bar\n    nasa7:\n      \
         from-k: 200.0\n      break-k: 1000.0\n      to-k: 3000.0\n      \
         below-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]\n      \
         above-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]\n",
    )
    .unwrap();
    let path = good.to_str().unwrap();
    let (code, out, err) = syntrain(&["--species-file", path, "species", "Xx", "-t", "500 K"]);
    assert_eq!(code, 0, "{err}");
    // Cp = 2.5 R = 20.786 J/(mol K) (ideal monatomic gas, common practice).
    assert!(out.contains("20.7862"), "{out}");
    let bad = dir.path().join("bad.yaml");
    std::fs::write(&bad, "species:\n  - name: Yy\n    formulae: He\n").unwrap();
    let (code, _, err) = syntrain(&["--species-file", bad.to_str().unwrap(), "species"]);
    assert_ne!(code, 0);
    assert!(err.contains("bad.yaml:3:"), "{err}");
}
