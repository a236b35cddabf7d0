//! Species files use syntrain's own keys (`atoms`, `nasa7: {from-k, break-k, to-k, below-break,
//! above-break}`); a file with an earlier key is refused with a message naming the key to write,
//! and a bad record stops the run with its name.

use crate::support::{arg, stderr, stdout, syntrain, write};

/// One record in the current keys: a constant-Cp monatomic test gas (Cp = 5/2 R, ideal
/// monatomic gas, common practice); a demo record, not real data.
fn record(name: &str, molar_mass: &str) -> String {
    format!(
        "  - name: {name}
    description: test gas
    formula: He
    atoms: {{He: 1}}
    phase: gas
    molar-mass: {molar_mass}
    source: demo record
    standard-pressure: 1 bar
    nasa7:
      from-k: 200.0
      break-k: 1000.0
      to-k: 3000.0
      below-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]
      above-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]
"
    )
}

#[test]
fn the_new_keys_are_read() {
    let dir = tempfile::tempdir().unwrap();
    let file = write(
        dir.path(),
        "x.yaml",
        &format!("species:\n{}", record("Xk", "4.002602")),
    );
    let out = syntrain(&[
        "--species-file",
        &arg(&file),
        "species",
        "Xk",
        "-t",
        "500 K",
    ]);
    assert!(out.status.success(), "{}", stderr(&out));
    // Cp = 2.5 R = 20.786 J/(mol K).
    assert!(stdout(&out).contains("20.7862"), "{}", stdout(&out));
}

#[test]
fn an_earlier_key_is_refused_naming_the_new_one() {
    let dir = tempfile::tempdir().unwrap();
    let old = format!("species:\n{}", record("Xo", "4.002602"))
        .replace(
            "      from-k: 200.0\n      break-k: 1000.0\n      to-k: 3000.0\n",
            "      temperature-ranges: [200.0, 1000.0, 3000.0]\n",
        )
        .replace("below-break", "low")
        .replace("above-break", "high");
    let file = write(dir.path(), "old.yaml", &old);
    let out = syntrain(&["--species-file", &arg(&file), "species"]);
    assert_eq!(out.status.code(), Some(1));
    let err = stderr(&out);
    assert!(
        err.contains("'Xo'") && err.contains("'temperature-ranges'"),
        "{err}"
    );
    assert!(err.contains("from-k, break-k and to-k"), "{err}");
}

#[test]
fn the_shipped_file_speaks_only_the_new_keys() {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("data/species.yaml"),
    )
    .unwrap();
    for old in [
        "temperature-ranges:",
        "elements:",
        "      low:",
        "      high:",
    ] {
        assert!(!text.contains(old), "data/species.yaml still has '{old}'");
    }
    assert_eq!(text.matches("    atoms: {").count(), 16);
    assert_eq!(text.matches("      break-k: ").count(), 16);
}

#[test]
fn a_bad_record_is_named_and_the_run_stops() {
    // The second record's molar mass does not match helium (4.002602 g/mol, IUPAC 2013). That
    // nothing of such a file reaches the database is checked beside the reader
    // (`a_bad_record_leaves_the_database_unchanged` in src/thermo/database.rs).
    let dir = tempfile::tempdir().unwrap();
    let file = write(
        dir.path(),
        "two.yaml",
        &format!(
            "species:\n{}{}",
            record("Xgood", "4.002602"),
            record("Xbad", "7.0")
        ),
    );
    let out = syntrain(&["--species-file", &arg(&file), "species", "Xgood"]);
    assert_eq!(out.status.code(), Some(1), "{}", stdout(&out));
    assert!(stderr(&out).contains("'Xbad'"), "{}", stderr(&out));
}
