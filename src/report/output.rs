//! Writing a finished report to the path given with `--output`, without replacing what the path
//! names:
//!
//! - a regular file (or a path that does not exist yet) is written atomically: the text goes into
//!   a new temporary file in the same folder, is flushed to disk and renamed over the target, so a
//!   reader sees the old content or the new, never a half-written file; an existing target keeps
//!   its permission bits;
//! - a symbolic link is followed to its final target, which is then written atomically as above,
//!   so the link stays a link;
//! - anything else that can be opened for writing (a FIFO, a character device such as
//!   `/dev/null` or a terminal) is written directly, never replaced;
//! - a path that is an input of the same run (the flowsheet, a species file) is refused, also
//!   when reached through a symbolic link or another hard link (same device and inode on Unix,
//!   same canonical path elsewhere).

use std::io::Write;
use std::path::{Path, PathBuf};

use crate::error::{Error, Result};

/// Most symbolic links followed before giving up (the usual limit of Unix systems).
const MAX_LINKS: usize = 40;

/// Write `text` to `path` as described in the module documentation. `inputs` are the files the
/// run read; writing over any of them is refused before anything is written.
pub fn write_output(path: &Path, text: &str, inputs: &[&Path]) -> Result<()> {
    refuse_inputs(path, inputs)?;
    let target = resolve_links(path)?;
    match std::fs::metadata(&target) {
        Ok(meta) if meta.is_dir() => Err(io_error(
            path,
            std::io::ErrorKind::InvalidInput,
            "this is a folder; give a file name such as 'report.json'",
        )),
        Ok(meta) if !meta.is_file() => write_in_place(&target, text).map_err(|e| Error::Io {
            action: "writing",
            path: path.to_path_buf(),
            source: e,
        }),
        Ok(meta) => write_atomically_with(&target, text, Some(meta.permissions())),
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            write_atomically_with(&target, text, None)
        }
        Err(e) => Err(Error::Io {
            action: "writing",
            path: path.to_path_buf(),
            source: e,
        }),
    }
}

/// Open `path` to write a long report into as it is made (a sweep's rows), so that what was
/// written survives an interruption: an input of the run is refused, links are followed, a
/// folder is refused, a regular file is created or emptied, a FIFO or device written into.
pub fn create_streaming(path: &Path, inputs: &[&Path]) -> Result<std::fs::File> {
    refuse_inputs(path, inputs)?;
    let target = resolve_links(path)?;
    if std::fs::metadata(&target).is_ok_and(|m| m.is_dir()) {
        return Err(io_error(
            path,
            std::io::ErrorKind::InvalidInput,
            "this is a folder; give a file name such as 'sweep.csv'",
        ));
    }
    let is_regular = std::fs::metadata(&target).map_or(true, |m| m.is_file());
    let mut options = std::fs::OpenOptions::new();
    options.write(true);
    if is_regular {
        options.create(true).truncate(true);
    }
    options.open(&target).map_err(|source| Error::Io {
        action: "writing",
        path: path.to_path_buf(),
        source,
    })
}

fn io_error(path: &Path, kind: std::io::ErrorKind, message: &str) -> Error {
    Error::Io {
        action: "writing",
        path: path.to_path_buf(),
        source: std::io::Error::new(kind, message.to_string()),
    }
}

/// Error when `path` names the same file as one of `inputs`.
fn refuse_inputs(path: &Path, inputs: &[&Path]) -> Result<()> {
    for input in inputs {
        if same_file(path, input) {
            return Err(io_error(
                path,
                std::io::ErrorKind::InvalidInput,
                &format!(
                    "this is '{}', an input of this run; the report would overwrite it, so \
                     nothing was written: choose another output path",
                    input.display()
                ),
            ));
        }
    }
    Ok(())
}

/// True when both paths exist and name the same file (following symbolic links).
#[cfg(unix)]
fn same_file(a: &Path, b: &Path) -> bool {
    use std::os::unix::fs::MetadataExt;
    match (std::fs::metadata(a), std::fs::metadata(b)) {
        (Ok(x), Ok(y)) => x.dev() == y.dev() && x.ino() == y.ino(),
        _ => false,
    }
}

/// True when both paths exist and name the same file (following symbolic links).
#[cfg(not(unix))]
fn same_file(a: &Path, b: &Path) -> bool {
    match (std::fs::canonicalize(a), std::fs::canonicalize(b)) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

/// Follow symbolic links from `path` to the path they finally name (which may not exist yet, for
/// a link that points at a file still to be made).
fn resolve_links(path: &Path) -> Result<PathBuf> {
    let mut current = path.to_path_buf();
    for _ in 0..MAX_LINKS {
        match std::fs::symlink_metadata(&current) {
            Ok(meta) if meta.file_type().is_symlink() => {
                let link = std::fs::read_link(&current).map_err(|source| Error::Io {
                    action: "writing",
                    path: path.to_path_buf(),
                    source,
                })?;
                current = match current.parent() {
                    Some(parent) if link.is_relative() => parent.join(link),
                    _ => link,
                };
            }
            _ => return Ok(current),
        }
    }
    Err(io_error(
        path,
        std::io::ErrorKind::InvalidInput,
        "too many levels of symbolic links",
    ))
}

/// Open an existing FIFO or device for writing (no create, no truncate) and write into it.
fn write_in_place(path: &Path, text: &str) -> std::io::Result<()> {
    let mut file = std::fs::OpenOptions::new().write(true).open(path)?;
    file.write_all(text.as_bytes())?;
    file.flush()
}

fn write_atomically_with(
    path: &Path,
    text: &str,
    permissions: Option<std::fs::Permissions>,
) -> Result<()> {
    let io = |source: std::io::Error| Error::Io {
        action: "writing",
        path: path.to_path_buf(),
        source,
    };
    let file_name = path.file_name().ok_or_else(|| {
        io_error(
            path,
            std::io::ErrorKind::InvalidInput,
            "the output path names no file; give a file name such as 'report.json'",
        )
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
            Err(e) => return Err(io(e)),
        }
    };
    let written = file
        .write_all(text.as_bytes())
        .and_then(|()| match &permissions {
            Some(p) => file.set_permissions(p.clone()),
            None => Ok(()),
        })
        .and_then(|()| file.sync_all())
        .and_then(|()| {
            drop(file);
            std::fs::rename(&temp_path, path)
        });
    if let Err(e) = written {
        // Best effort: the temporary file must not be left behind.
        let _ = std::fs::remove_file(&temp_path);
        return Err(io(e));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn atomic_write_replaces_and_leaves_no_temporary() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.json");
        write_output(&path, "first", &[]).unwrap();
        write_output(&path, "second", &[]).unwrap();
        assert_eq!(std::fs::read_to_string(&path).unwrap(), "second");
        let names: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert_eq!(names.len(), 1);
    }

    #[test]
    fn a_folder_or_a_missing_folder_fails_and_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let target = dir.path().join("taken");
        std::fs::create_dir(&target).unwrap();
        let err = write_output(&target, "text", &[]).unwrap_err();
        assert!(err.to_string().contains("writing"), "{err}");
        assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
        let missing = dir.path().join("no-such-folder").join("out.csv");
        assert!(write_output(&missing, "text", &[]).is_err());
        assert!(!missing.exists());
    }

    #[cfg(unix)]
    #[test]
    fn a_link_to_a_file_still_to_be_made_makes_the_file() {
        let dir = tempfile::tempdir().unwrap();
        let link = dir.path().join("latest.json");
        std::os::unix::fs::symlink("runs/today.json", &link).unwrap();
        std::fs::create_dir(dir.path().join("runs")).unwrap();
        write_output(&link, "new", &[]).unwrap();
        assert!(std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink());
        let made = dir.path().join("runs").join("today.json");
        assert_eq!(std::fs::read_to_string(made).unwrap(), "new");
    }

    #[cfg(unix)]
    #[test]
    fn a_hard_link_to_an_input_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let input = dir.path().join("case.yaml");
        std::fs::write(&input, "title: x\n").unwrap();
        let twin = dir.path().join("twin.yaml");
        std::fs::hard_link(&input, &twin).unwrap();
        let err = write_output(&twin, "report", &[&input]).unwrap_err();
        assert!(err.to_string().contains("writing"), "{err}");
        assert_eq!(std::fs::read_to_string(&input).unwrap(), "title: x\n");
        // Another file in the same folder is fine.
        write_output(&dir.path().join("report.txt"), "r", &[&input]).unwrap();
    }
}
