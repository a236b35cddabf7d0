//! Reports: what the command line prints. Text tables, JSON, CSV and Markdown of a solved
//! flowsheet, the species listing, and the error chain. Values leave in the units a plant
//! engineer reads (degC, bar abs, kmol/h, Nm3/h per DIN 1343, kW, mol %).

pub mod csv;
pub mod json;
pub mod markdown;
pub mod solve_table;
pub mod species;
pub mod tables;
#[cfg(test)]
mod test_fixture;

use std::io::Write;
use std::path::Path;

use crate::error::{Error, Result};
use crate::flowsheet::result::FlowsheetResult;
use crate::thermo::SpeciesDb;

/// Output format of `solve`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Format {
    /// Plain-text tables for a terminal ([`solve_table`]).
    Table,
    /// One JSON object with stable keys ([`json`]).
    Json,
    /// The stream table as CSV, wide form ([`csv`]).
    Csv,
    /// The tables of `Table` in GitHub-flavoured Markdown ([`markdown`]).
    Markdown,
}

/// Render a solved flowsheet in `format`. Rendering is complete before anything is written, so
/// an error leaves no partial output behind.
pub fn render_solution(db: &SpeciesDb, result: &FlowsheetResult, format: Format) -> Result<String> {
    match format {
        Format::Table => solve_table::render(db, result),
        Format::Json => json::render(db, result),
        Format::Csv => csv::render(db, result),
        Format::Markdown => markdown::render(db, result),
    }
}

/// Write `text` to `path` atomically: into a new temporary file in the same folder, flushed to
/// disk, then renamed over `path`. On any error the temporary file is removed and `path` is left
/// as it was (absent or with its old content).
pub fn write_atomically(path: &Path, text: &str) -> Result<()> {
    let io_error = |source: std::io::Error| Error::Io {
        action: "writing",
        path: path.to_path_buf(),
        source,
    };
    let file_name = path.file_name().ok_or_else(|| {
        io_error(std::io::Error::new(
            std::io::ErrorKind::InvalidInput,
            "the output path names no file; give a file name such as 'report.json'",
        ))
    })?;
    let folder = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    // A name of our own in the same folder, so the rename stays on one file system.
    let mut attempt = 0u32;
    let (temp_path, mut file) = loop {
        let mut name = std::ffi::OsString::from(".");
        name.push(file_name);
        name.push(format!(".{}-{attempt}.tmp", std::process::id()));
        let candidate = folder.join(name);
        match std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&candidate)
        {
            Ok(file) => break (candidate, file),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists && attempt < 100 => {
                attempt += 1;
            }
            Err(e) => return Err(io_error(e)),
        }
    };
    let written = file
        .write_all(text.as_bytes())
        .and_then(|()| file.sync_all())
        .and_then(|()| {
            drop(file);
            std::fs::rename(&temp_path, path)
        });
    if let Err(e) = written {
        // Best effort: the temporary file must not be left behind.
        let _ = std::fs::remove_file(&temp_path);
        return Err(io_error(e));
    }
    Ok(())
}

/// The cautions printed with every result.
pub const CAUTIONS: &str = "Screening results only. Hot hydrogen and carbon monoxide at pressure \
are flammable, toxic and can embrittle or attack steel; check every figure against vendor data and \
follow local codes and licensed engineering practice before acting on it.";

/// The error and each of its causes, one per line ("error: ...", "  caused by: ...").
pub fn error_chain(err: &Error) -> String {
    let mut out = format!("error: {err}");
    let mut source = std::error::Error::source(err);
    while let Some(s) = source {
        out.push_str(&format!("\n  caused by: {s}"));
        source = s.source();
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_and_leaves_no_temporary() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.json");
        write_atomically(&path, "first").unwrap();
        write_atomically(&path, "second").unwrap();
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "second");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1);
    }

    #[test]
    fn atomic_write_failure_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        // The target is a folder: the rename fails and the temporary file is removed.
        let target = dir.path().join("taken");
        std::fs::create_dir(&target).unwrap();
        std::fs::write(target.join("x"), "keep").unwrap();
        let err = write_atomically(&target, "text").unwrap_err();
        assert!(
            matches!(
                err,
                Error::Io {
                    action: "writing",
                    ..
                }
            ),
            "{err}"
        );
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1);
        // A folder that does not exist.
        let missing = dir.path().join("no-such-folder").join("out.csv");
        assert!(write_atomically(&missing, "text").is_err());
        assert!(!missing.exists());
    }

    #[test]
    fn error_chain_lists_causes() {
        let err = Error::Flowsheet {
            reason: "stream 'x' has two producers".into(),
        }
        .context("reading 'plant.yaml'");
        assert_eq!(
            error_chain(&err),
            "error: reading 'plant.yaml'\n  caused by: flowsheet: stream 'x' has two producers"
        );
    }
}
