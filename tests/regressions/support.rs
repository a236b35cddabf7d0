//! Shared helpers: run the real binary, write temporary input files, insist that nothing panics.

#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

/// Run the syntrain binary with `args`; no standard input.
pub fn syntrain(args: &[&str]) -> Output {
    let out = Command::new(env!("CARGO_BIN_EXE_syntrain"))
        .args(args)
        .stdin(Stdio::null())
        .output()
        .expect("running the syntrain binary");
    assert_no_panic(&out);
    out
}

/// Fail when a run printed a Rust panic message or exited with the panic code 101.
pub fn assert_no_panic(out: &Output) {
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(!err.contains("panicked"), "the binary panicked: {err}");
    assert_ne!(out.status.code(), Some(101), "exit code 101 (panic): {err}");
}

/// Standard output as text.
pub fn stdout(out: &Output) -> String {
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// Standard error as text.
pub fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

/// Write `text` to `name` inside `dir` and return the path.
pub fn write(dir: &Path, name: &str, text: &str) -> PathBuf {
    let path = dir.join(name);
    std::fs::write(&path, text).expect("writing a temporary input file");
    path
}

/// A shipped demo flowsheet by file name.
pub fn demo(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("flowsheets")
        .join(name)
}

/// A path as an argument.
pub fn arg(path: &Path) -> String {
    path.display().to_string()
}
