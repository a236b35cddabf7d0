//! Things a pipe, a disk or a user file can do that once ended in a panic (exit code 101): a
//! reader that closes the pipe early, a full device, and a species record whose temperature range
//! leaves no room for an equilibrium search.

use std::io::Read;
use std::process::{Command, Stdio};

use crate::support::{arg, assert_no_panic, stderr, syntrain, write};

/// Forty temperatures: the JSON listing of every species at all of them is far larger than a
/// pipe's buffer (64 KiB on Linux), so the writer must meet the closed pipe.
fn many_temperatures() -> Vec<String> {
    (0..40)
        .flat_map(|k| ["-t".to_string(), format!("{} K", 300 + 25 * k)])
        .collect()
}

#[test]
fn a_reader_that_closes_the_pipe_ends_the_run_quietly() {
    let mut args = vec!["species".to_string(), "--format".into(), "json".into()];
    args.extend(many_temperatures());
    let mut child = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(&args)
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Like `| head -c 100`: read a little, then close the pipe.
    let mut first = [0u8; 100];
    child.stdout.take().unwrap().read_exact(&mut first).unwrap();
    let out = child.wait_with_output().unwrap();
    assert_no_panic(&out);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(out.stderr.is_empty(), "{}", stderr(&out));
    assert!(first.starts_with(b"{"));
}

#[cfg(target_os = "linux")]
#[test]
fn a_full_device_is_an_error_not_a_panic() {
    let full = std::fs::OpenOptions::new()
        .write(true)
        .open("/dev/full")
        .unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(["species", "--format", "json"])
        .stdin(Stdio::null())
        .stdout(full)
        .output()
        .unwrap();
    assert_no_panic(&out);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("error: writing standard output"),
        "{}",
        stderr(&out)
    );
}

#[test]
fn a_species_record_with_a_narrow_range_gives_an_error_not_a_panic() {
    // A test gas (demo record, not real data) valid only at 760-780 K, fed to a pre-reformer with
    // a 20 K approach: the temperature search of the stage once got crossed bounds and panicked.
    let dir = tempfile::tempdir().unwrap();
    let species = write(
        dir.path(),
        "narrow.yaml",
        "species:
  - name: Xn
    description: narrow test gas
    formula: He
    atoms: {He: 1}
    phase: gas
    molar-mass: 4.002602
    source: demo record
    standard-pressure: 1 bar
    nasa7:
      from-k: 760.0
      break-k: 770.0
      to-k: 780.0
      below-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]
      above-break: [2.5, 0, 0, 0, 0, -745.375, 0.9]
",
    );
    let flowsheet = write(
        dir.path(),
        "case.yaml",
        "title: narrow range
feeds:
  gas:
    temperature: 500 degC
    pressure: 25 bar
    flows: {CH4: 100 kmol/h, H2O: 300 kmol/h, Xn: 1 kmol/h}
units:
  - name: pre
    type: prereformer
    from: gas
    to: out
    approach: {reforming: 20 K}
",
    );
    let out = syntrain(&["--species-file", &arg(&species), "solve", &arg(&flowsheet)]);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    // The error names the narrow range that no temperature of the train can meet.
    let err = stderr(&out);
    assert!(err.contains("780.00"), "{err}");
}
