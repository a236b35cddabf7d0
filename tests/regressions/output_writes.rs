//! `--output` writes into what the path names instead of replacing it: a symbolic link stays a
//! link, a device stays a device, a FIFO receives the report, a file keeps its permission bits,
//! and an input file of the same run is never overwritten.

use crate::support::{arg, demo, stderr, syntrain, write};

/// The shift-only demo as JSON: a report that is quick to make.
fn solve_to(output: &std::path::Path) -> std::process::Output {
    let file = demo("shift-only.yaml");
    syntrain(&[
        "solve",
        &arg(&file),
        "--format",
        "json",
        "--output",
        &arg(output),
    ])
}

#[cfg(unix)]
#[test]
fn a_symbolic_link_stays_a_link_and_its_target_gets_the_report() {
    let dir = tempfile::tempdir().unwrap();
    let target = write(dir.path(), "report-v1.json", "old");
    let link = dir.path().join("latest.json");
    std::os::unix::fs::symlink("report-v1.json", &link).unwrap();
    let out = solve_to(&link);
    assert!(out.status.success(), "{}", stderr(&out));
    let meta = std::fs::symlink_metadata(&link).unwrap();
    assert!(meta.file_type().is_symlink(), "the link was replaced");
    let text = std::fs::read_to_string(&target).unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    assert!(v["streams"]["shifted-gas"].is_object(), "{text}");
    // Nothing else left in the folder (no temporary file).
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 2);
}

#[cfg(unix)]
#[test]
fn dev_null_stays_a_character_device() {
    use std::os::unix::fs::FileTypeExt;
    let out = solve_to(std::path::Path::new("/dev/null"));
    assert!(out.status.success(), "{}", stderr(&out));
    let meta = std::fs::metadata("/dev/null").unwrap();
    assert!(meta.file_type().is_char_device(), "/dev/null was replaced");
}

#[cfg(unix)]
#[test]
fn a_fifo_receives_the_report() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("report.pipe");
    let made = std::process::Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .expect("mkfifo");
    assert!(made.success());
    let reader_path = fifo.clone();
    // Opening a FIFO for reading blocks until a writer opens it: read in a thread.
    let reader = std::thread::spawn(move || std::fs::read_to_string(reader_path).unwrap());
    let out = solve_to(&fifo);
    assert!(out.status.success(), "{}", stderr(&out));
    // Checked before joining: a FIFO replaced by a file would leave the reader waiting forever.
    use std::os::unix::fs::FileTypeExt;
    assert!(
        std::fs::symlink_metadata(&fifo)
            .unwrap()
            .file_type()
            .is_fifo(),
        "the FIFO was replaced"
    );
    let text = reader.join().unwrap();
    let v: serde_json::Value = serde_json::from_str(&text).expect("the FIFO got the JSON report");
    assert!(v["units"]["lts"].is_object());
}

#[cfg(unix)]
#[test]
fn permission_bits_are_kept() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    let path = write(dir.path(), "report.json", "old");
    std::fs::set_permissions(&path, std::fs::Permissions::from_mode(0o640)).unwrap();
    let out = solve_to(&path);
    assert!(out.status.success(), "{}", stderr(&out));
    let mode = std::fs::metadata(&path).unwrap().permissions().mode() & 0o777;
    assert_eq!(mode, 0o640, "mode {mode:o}");
    assert!(std::fs::read_to_string(&path).unwrap().starts_with('{'));
}

#[test]
fn the_flowsheet_itself_is_refused_and_left_unchanged() {
    let dir = tempfile::tempdir().unwrap();
    let original = std::fs::read_to_string(demo("shift-only.yaml")).unwrap();
    let case = write(dir.path(), "case.yaml", &original);
    let out = syntrain(&["solve", &arg(&case), "--output", &arg(&case)]);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("input of this run"),
        "{}",
        stderr(&out)
    );
    assert_eq!(std::fs::read_to_string(&case).unwrap(), original);
    // The same through a symbolic link.
    #[cfg(unix)]
    {
        let link = dir.path().join("alias.yaml");
        std::os::unix::fs::symlink(&case, &link).unwrap();
        let out = syntrain(&["solve", &arg(&case), "--output", &arg(&link)]);
        assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
        assert_eq!(std::fs::read_to_string(&case).unwrap(), original);
    }
}

#[test]
fn the_species_file_is_refused_too() {
    let dir = tempfile::tempdir().unwrap();
    let species = write(dir.path(), "extra.yaml", "species: []\n");
    let file = demo("shift-only.yaml");
    let out = syntrain(&[
        "--species-file",
        &arg(&species),
        "solve",
        &arg(&file),
        "-o",
        &arg(&species),
    ]);
    assert_eq!(out.status.code(), Some(1), "{}", stderr(&out));
    assert_eq!(std::fs::read_to_string(&species).unwrap(), "species: []\n");
}
