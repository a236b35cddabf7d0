//! Helpers of the integration tests that run syngas flowsheets through the real binary: the
//! binary itself, `solve --format json`, and flows and element totals over the eight gases of
//! reforming with air or oxygen.

use std::path::Path;
use std::process::{Command, Output, Stdio};

use serde_json::Value;

/// The gases, in the order of the flow vectors below.
pub const SPECIES: [&str; 8] = ["CH4", "H2O", "CO", "CO2", "H2", "O2", "N2", "Ar"];
/// Atoms of C, H, O, N, Ar in each of `SPECIES` (from their formulas).
pub const ATOMS: [[f64; 5]; 8] = [
    [1.0, 4.0, 0.0, 0.0, 0.0],
    [0.0, 2.0, 1.0, 0.0, 0.0],
    [1.0, 0.0, 1.0, 0.0, 0.0],
    [1.0, 0.0, 2.0, 0.0, 0.0],
    [0.0, 2.0, 0.0, 0.0, 0.0],
    [0.0, 0.0, 2.0, 0.0, 0.0],
    [0.0, 0.0, 0.0, 2.0, 0.0],
    [0.0, 0.0, 0.0, 0.0, 1.0],
];

/// Run the binary with `args` (no standard input); it must not panic.
pub fn syntrain(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("running the syntrain binary");
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    out
}

/// `solve FILE --format json` with `extra` options; it must succeed.
pub fn solve_json(file: &Path, extra: &[&str]) -> Value {
    let file = file.display().to_string();
    let mut args = vec!["solve", file.as_str(), "--format", "json"];
    args.extend_from_slice(extra);
    let out = syntrain(&args);
    assert!(
        out.status.success(),
        "solve {file} failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("solve --format json prints JSON")
}

/// A JSON number.
pub fn f(v: &Value) -> f64 {
    v.as_f64().unwrap_or_else(|| panic!("not a number: {v}"))
}

/// A flow map in mol/s for YAML from flows by `SPECIES`, zero flows left out.
pub fn flow_map(flows: &[f64]) -> String {
    let parts: Vec<String> = SPECIES
        .iter()
        .zip(flows)
        .filter(|(_, n)| **n > 0.0)
        .map(|(s, n)| format!("{s}: {n:e} mol/s"))
        .collect();
    format!("{{{}}}", parts.join(", "))
}

/// Flows of a stream of the JSON result, mol/s by `SPECIES`.
pub fn stream_flows(v: &Value, stream: &str) -> Vec<f64> {
    let m = &v["streams"][stream]["flow_kmol_h"];
    SPECIES
        .iter()
        .map(|s| m.get(*s).map_or(0.0, f) / 3.6)
        .collect()
}

/// Atoms of C, H, O, N, Ar in flows by `SPECIES`.
pub fn elements(flows: &[f64]) -> [f64; 5] {
    let mut e = [0.0; 5];
    for (n, atoms) in flows.iter().zip(&ATOMS) {
        for (k, a) in atoms.iter().enumerate() {
            e[k] += n * a;
        }
    }
    e
}

/// Solve `unit` warm (after `other`, then `process`, each with `oxidant`), count the heap
/// allocations of one more solve of `process` (the counting allocator of [`super::alloc`] must
/// be the binary's), assert there are none and that the warm answer equals a fresh solve; the
/// warm result is returned for further checks.
pub fn assert_warm_solve_allocates_nothing(
    db: &syntrain::thermo::SpeciesDb,
    unit: &syntrain::units::autothermal::Autothermal,
    other: &syntrain::units::Stream,
    process: &syntrain::units::Stream,
    oxidant: &syntrain::units::Stream,
) -> syntrain::units::UnitResult {
    use syntrain::units::unit::UnitScratch;
    use syntrain::units::{UnitKind, UnitResult};
    let (mut scratch, mut out) = (UnitScratch::default(), UnitResult::default());
    for inlet in [other, process] {
        unit.solve_into(db, &[inlet, oxidant], None, &mut scratch, &mut out)
            .unwrap();
    }
    let before = super::alloc::allocations();
    unit.solve_into(db, &[process, oxidant], None, &mut scratch, &mut out)
        .unwrap();
    let counted = super::alloc::allocations() - before;
    assert_eq!(counted, 0, "a warm solve allocated {counted} times");
    let fresh = unit.solve(db, &[process, oxidant], None).unwrap();
    assert_eq!(out.outlets[0].flows, fresh.outlets[0].flows);
    assert_eq!(out.outlets[0].temperature_k, fresh.outlets[0].temperature_k);
    assert_eq!(out.figures, fresh.figures);
    out
}
