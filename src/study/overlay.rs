//! Overlays: a short file that names a base flowsheet and what differs from it, so that a
//! revamp option is written as its differences and follows its base when the base changes.
//!
//! ```yaml
//! title: Lower steam-to-carbon ratio        # optional; else the file stem names the option
//! base: demo-train.yaml                      # relative to the overlay's own folder
//! changes:                                   # input path: value with its unit
//!   feeds.process-steam.total: 2795 kmol/h
//!   units.lts.approach.shift: 6 K
//! remove-units: [some-unit]
//! add-units:
//!   - {name: mts, type: shift, from: lts-feed, to: mts-exit, approach: {shift: 10 K}}
//! ```
//!
//! How an overlay is applied, in this order:
//!
//! 1. The base is loaded: a full flowsheet (compiled on its own first, so that its errors point
//!    into its own text) or another overlay (applied the same way; a chain of bases that comes
//!    back to a file already in it is refused).
//! 2. `remove-units`, in list order, edit the base's YAML document: a unit with exactly one inlet
//!    and one outlet is taken out and the unit that used its outlet is given its inlet instead;
//!    any other unit is refused, with the reason.
//! 3. `add-units`, in list order: each entry is a unit as in a flowsheet. Each inlet of the added
//!    unit that another unit already takes is *put into* that stream: the unit that took it is
//!    reconnected to the added unit's **first** outlet (for a unit with more than one outlet,
//!    the process outlet: a knockout's gas, a purifier's product, a splitter's first branch);
//!    its other outlets leave the train as products unless a later added unit takes them. The
//!    added entry is written just before the first unit it was put in front of (at the end when
//!    there is none); the solve order comes from the graph either way.
//! 4. The merged document is compiled as a flowsheet (its title: the overlay's title, else the
//!    overlay's file stem).
//! 5. `changes` (the base's first, then the overlay's, so the overlay wins) set input paths
//!    ([`Flowsheet::input`]) in the compiled flowsheet's parameter vector, each value read by the
//!    input's own [`crate::units::unit::ValueKind::parse`], with its unit.
//!
//! Errors name the file where the offending material was written, with line and column: an
//! unknown input path (with the nearest valid ones), a bad value, an unknown unit to remove, a
//! bad key in an added unit (the merged flowsheet's error is found again in the overlay's text).

use std::path::{Path, PathBuf};

use serde_norway::Value;

use crate::error::{Error, Position, Result};
use crate::flowsheet::locate::{locate, locate_key, Step};
use crate::flowsheet::paths::nearest;
use crate::flowsheet::Flowsheet;
use crate::thermo::SpeciesDb;

/// The keys an overlay may have.
pub const OVERLAY_KEYS: &[&str] = &["title", "base", "changes", "add-units", "remove-units"];

/// A flowsheet file or an overlay, loaded and compiled, with the parameter vector its changes
/// make.
#[derive(Debug, Clone)]
pub struct Case {
    /// The file's `title`, else its file stem.
    pub name: String,
    /// The file as given.
    pub file: PathBuf,
    /// The compiled flowsheet (for an overlay: the base with units removed and added).
    pub flowsheet: Flowsheet,
    /// Its parameter vector: the values of the files with the `changes` applied.
    pub parameters: Vec<f64>,
    /// Every file read: the file and every base it pulls in.
    pub files: Vec<PathBuf>,
}

/// True when the YAML text is an overlay (a mapping with a `base` key).
pub fn is_overlay(text: &str) -> bool {
    serde_norway::from_str::<Value>(text)
        .ok()
        .is_some_and(|v| v.get("base").is_some())
}

/// Load a flowsheet file or an overlay (see the module documentation).
pub fn load(db: &SpeciesDb, path: &Path) -> Result<Case> {
    let text = read(path)?;
    let stem = path
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string());
    if !is_overlay(&text) {
        let flowsheet = Flowsheet::from_yaml_str(&path.display().to_string(), &text, db)?;
        let title = serde_norway::from_str::<Value>(&text)
            .ok()
            .and_then(|v| v.get("title").and_then(Value::as_str).map(str::to_string));
        return Ok(Case {
            name: title.unwrap_or(stem),
            file: path.to_path_buf(),
            parameters: flowsheet.parameters(),
            flowsheet,
            files: vec![path.to_path_buf()],
        });
    }
    let mut stack = Vec::new();
    let mut merged = resolve(db, path, text, &mut stack)?;
    let name = merged.title.clone().unwrap_or(stem);
    if let Value::Mapping(m) = &mut merged.doc {
        m.insert("title".into(), Value::String(name.clone()));
    }
    let origin = path.display().to_string();
    let text = serde_norway::to_string(&merged.doc).map_err(|e| Error::yaml(&origin, &e))?;
    let flowsheet =
        Flowsheet::from_yaml_str(&origin, &text, db).map_err(|e| merged.relocate(e, &origin))?;
    let mut parameters = flowsheet.parameters();
    for change in &merged.changes {
        let at = |e: Error, position: Option<Position>| Error::Input {
            file: change.file.clone(),
            position,
            input: change.path.clone(),
            message: match e {
                Error::InvalidValue { reason, .. } => reason,
                Error::Quantity { value, reason, .. } => format!("cannot read '{value}': {reason}"),
                other => other.to_string(),
            },
        };
        let slot = flowsheet
            .input(&change.path)
            .map_err(|e| at(e, change.key_position))?;
        let info = &flowsheet.inputs()[slot.0];
        parameters[slot.0] = info
            .value
            .parse(&change.path, &change.value)
            .map_err(|e| at(e, change.value_position))?;
    }
    Ok(Case {
        name,
        file: path.to_path_buf(),
        flowsheet,
        parameters,
        files: merged.files,
    })
}

fn read(path: &Path) -> Result<String> {
    std::fs::read_to_string(path).map_err(|source| Error::Io {
        action: "reading",
        path: path.to_path_buf(),
        source,
    })
}

/// One value of `changes`, with where it was written.
#[derive(Debug, Clone)]
struct Change {
    path: String,
    value: String,
    file: String,
    key_position: Option<Position>,
    value_position: Option<Position>,
}

/// A file read, with its text (to find positions in).
#[derive(Debug, Clone)]
struct Source {
    file: String,
    text: String,
}

/// Where a unit entry of the merged document was written: the source, the list (`units` or
/// `add-units`) and the index in it.
#[derive(Debug, Clone)]
struct Origin {
    unit: String,
    source: usize,
    list: &'static str,
    index: usize,
}

/// A base chain applied down to one full flowsheet document.
#[derive(Debug, Clone)]
struct Merged {
    doc: Value,
    changes: Vec<Change>,
    sources: Vec<Source>,
    origins: Vec<Origin>,
    files: Vec<PathBuf>,
    title: Option<String>,
}

/// An error of an overlay at a position of its text.
fn error_at(file: &str, position: Option<Position>, input: &str, message: String) -> Error {
    Error::Input {
        file: file.to_string(),
        position,
        input: input.to_string(),
        message,
    }
}

/// Line and column of a top-level key written in block style (`key:` at the start of a line).
fn top_key(text: &str, key: &str) -> Option<Position> {
    let block = format!("{key}:");
    text.lines()
        .position(|l| l.starts_with(&block) || l.starts_with(&format!("\"{key}\":")))
        .map(|i| Position {
            line: i + 1,
            column: 1,
        })
}

/// The stream names of a `from` or `to` value (one name or a list of names).
fn names(v: Option<&Value>) -> Vec<String> {
    match v {
        Some(Value::String(s)) => vec![s.clone()],
        Some(Value::Sequence(items)) => items
            .iter()
            .filter_map(|i| i.as_str().map(str::to_string))
            .collect(),
        _ => Vec::new(),
    }
}

fn unit_name(u: &Value) -> Option<&str> {
    u.get("name").and_then(Value::as_str)
}

/// Replace the stream `old` by `new` in a unit's `from` (kept as one name or a list as written).
fn reconnect(unit: &mut Value, old: &str, new: &str) {
    if let Some(from) = unit.get_mut("from") {
        match from {
            Value::String(s) if s == old => *s = new.to_string(),
            Value::Sequence(items) => {
                for i in items.iter_mut() {
                    if i.as_str() == Some(old) {
                        *i = Value::String(new.to_string());
                    }
                }
            }
            _ => {}
        }
    }
}

/// Apply the overlay at `path` (text already read) down its chain of bases.
fn resolve(db: &SpeciesDb, path: &Path, text: String, stack: &mut Vec<PathBuf>) -> Result<Merged> {
    let file = path.display().to_string();
    let canonical = std::fs::canonicalize(path).unwrap_or_else(|_| path.to_path_buf());
    if stack.contains(&canonical) {
        let chain: Vec<String> = stack.iter().map(|p| p.display().to_string()).collect();
        return Err(error_at(
            &file,
            top_key(&text, "base"),
            "base",
            format!(
                "the chain of bases comes back to this file ({} -> {file}); a base cannot be \
                 the overlay itself or one of the overlays built on it",
                chain.join(" -> ")
            ),
        ));
    }
    stack.push(canonical);
    let value: Value = serde_norway::from_str(&text).map_err(|e| Error::yaml(&file, &e))?;
    let Some(top) = value.as_mapping() else {
        return Err(Error::Yaml {
            path: file,
            position: None,
            message: "an overlay is a mapping with the keys title, base, changes, add-units, \
                      remove-units"
                .into(),
        });
    };
    for key in top.keys() {
        let k = key.as_str().unwrap_or_default();
        if !OVERLAY_KEYS.contains(&k) {
            return Err(Error::Yaml {
                path: file.clone(),
                position: top_key(&text, k),
                message: format!(
                    "unknown key `{k}` in an overlay; its keys are: {}",
                    OVERLAY_KEYS.join(", ")
                ),
            });
        }
    }
    let Some(base) = top.get("base").and_then(Value::as_str) else {
        return Err(error_at(
            &file,
            locate(&text, &[Step::Key("base")]),
            "base",
            "give the base flowsheet as a file name (relative to this file's folder)".into(),
        ));
    };
    let base_path = path.parent().unwrap_or(Path::new("")).join(base);
    let base_text = read(&base_path).map_err(|e| {
        e.context(format!(
            "{file}{}: reading the base of this overlay",
            Position::suffix(&locate(&text, &[Step::Key("base")]))
        ))
    })?;
    let mut merged = if is_overlay(&base_text) {
        resolve(db, &base_path, base_text, stack)?
    } else {
        let base_file = base_path.display().to_string();
        // Compiled on its own first: its errors point into its own text.
        Flowsheet::from_yaml_str(&base_file, &base_text, db)?;
        let doc: Value =
            serde_norway::from_str(&base_text).map_err(|e| Error::yaml(&base_file, &e))?;
        let origins = doc
            .get("units")
            .and_then(Value::as_sequence)
            .map(|units| {
                units
                    .iter()
                    .enumerate()
                    .map(|(index, u)| Origin {
                        unit: unit_name(u).unwrap_or_default().to_string(),
                        source: 0,
                        list: "units",
                        index,
                    })
                    .collect()
            })
            .unwrap_or_default();
        Merged {
            doc,
            changes: Vec::new(),
            sources: vec![Source {
                file: base_file,
                text: base_text,
            }],
            origins,
            files: vec![base_path.clone()],
            title: None,
        }
    };
    let source = merged.sources.len();
    merged.sources.push(Source {
        file: file.clone(),
        text: text.clone(),
    });
    merged.files.insert(0, path.to_path_buf());
    merged.title = top.get("title").and_then(Value::as_str).map(str::to_string);
    if let Some(list) = top.get("remove-units") {
        remove_units(&mut merged, list, &file, &text)?;
    }
    if let Some(list) = top.get("add-units") {
        add_units(&mut merged, list, source, &file, &text)?;
    }
    if let Some(changes) = top.get("changes") {
        let Some(map) = changes.as_mapping() else {
            return Err(error_at(
                &file,
                top_key(&text, "changes"),
                "changes",
                "give a mapping of input paths to values with their units".into(),
            ));
        };
        for (k, v) in map {
            let path_text = k.as_str().unwrap_or_default().to_string();
            let value = match v {
                Value::String(s) => s.clone(),
                Value::Number(n) => n.to_string(),
                _ => String::new(),
            };
            let at = [Step::Key("changes"), Step::Key(&path_text)];
            merged.changes.push(Change {
                key_position: locate_key(&text, &at[..1], &path_text)
                    .or_else(|| locate(&text, &at)),
                value_position: locate(&text, &at),
                path: path_text,
                value,
                file: file.clone(),
            });
        }
    }
    stack.pop();
    Ok(merged)
}

fn units_mut(doc: &mut Value) -> Option<&mut Vec<Value>> {
    doc.get_mut("units").and_then(Value::as_sequence_mut)
}

fn remove_units(merged: &mut Merged, list: &Value, file: &str, text: &str) -> Result<()> {
    let items: Vec<Value> = match list {
        Value::Sequence(items) => items.clone(),
        Value::String(_) => vec![list.clone()],
        _ => Vec::new(),
    };
    for (i, item) in items.iter().enumerate() {
        let position = locate(text, &[Step::Key("remove-units"), Step::Index(i)]);
        let name = item.as_str().unwrap_or_default();
        let units = units_mut(&mut merged.doc)
            .map(std::mem::take)
            .unwrap_or_default();
        let Some(at) = units.iter().position(|u| unit_name(u) == Some(name)) else {
            let known: Vec<&str> = units.iter().filter_map(unit_name).collect();
            let message = format!(
                "no unit named '{name}' in the base; the nearest are: {}",
                nearest(name, &known, 5).join(", ")
            );
            return Err(error_at(file, position, "remove-units", message));
        };
        let (from, to) = (names(units[at].get("from")), names(units[at].get("to")));
        if from.len() != 1 || to.len() != 1 {
            return Err(error_at(
                file,
                position,
                "remove-units",
                format!(
                    "unit '{name}' has {} inlet(s) and {} outlet(s); only a unit with one inlet \
                     and one outlet can be taken out (the unit after it is given its inlet)",
                    from.len(),
                    to.len()
                ),
            ));
        }
        let mut units = units;
        units.remove(at);
        for u in units.iter_mut() {
            reconnect(u, &to[0], &from[0]);
        }
        if let Some(slot) = units_mut(&mut merged.doc) {
            *slot = units;
        }
        merged.origins.retain(|o| o.unit != name);
    }
    Ok(())
}

fn add_units(
    merged: &mut Merged,
    list: &Value,
    source: usize,
    file: &str,
    text: &str,
) -> Result<()> {
    let Some(items) = list.as_sequence() else {
        return Err(error_at(
            file,
            top_key(text, "add-units"),
            "add-units",
            "give a list of units, each as in a flowsheet".into(),
        ));
    };
    for (i, item) in items.iter().enumerate() {
        let entry = [Step::Key("add-units"), Step::Index(i)];
        let at = |key: &str| {
            locate_key(text, &entry, key)
                .or_else(|| locate(text, &entry))
                .or_else(|| top_key(text, "add-units"))
        };
        let Some(name) = unit_name(item).map(str::to_string) else {
            return Err(error_at(
                file,
                at("name"),
                "add-units",
                "an added unit needs a `name`".into(),
            ));
        };
        let (from, to) = (names(item.get("from")), names(item.get("to")));
        if from.is_empty() || to.is_empty() {
            return Err(error_at(
                file,
                at(if from.is_empty() { "from" } else { "to" }),
                &format!("units.{name}"),
                "an added unit needs `from` and `to` stream names".into(),
            ));
        }
        let mut units = units_mut(&mut merged.doc)
            .map(std::mem::take)
            .unwrap_or_default();
        if units.iter().any(|u| unit_name(u) == Some(name.as_str())) {
            return Err(error_at(
                file,
                at("name"),
                &format!("units.{name}"),
                format!(
                    "the base already has a unit named '{name}'; give the added unit another name"
                ),
            ));
        }
        let mut first_consumer: Option<usize> = None;
        for inlet in &from {
            let consumers: Vec<usize> = (0..units.len())
                .filter(|&k| names(units[k].get("from")).contains(inlet))
                .collect();
            for &k in &consumers {
                reconnect(&mut units[k], inlet, &to[0]);
                first_consumer = Some(first_consumer.map_or(k, |f| f.min(k)));
            }
        }
        let position = first_consumer.unwrap_or(units.len());
        units.insert(position, item.clone());
        if let Some(slot) = units_mut(&mut merged.doc) {
            *slot = units;
        } else if let Value::Mapping(m) = &mut merged.doc {
            m.insert("units".into(), Value::Sequence(units));
        }
        merged.origins.push(Origin {
            unit: name,
            source,
            list: "add-units",
            index: i,
        });
    }
    Ok(())
}

impl Merged {
    /// Find an error of the merged flowsheet again in the file where its material was written:
    /// a unit entry in the base or overlay that holds it, the key within it where found. An
    /// error that cannot be traced names the overlay without a position.
    fn relocate(&self, err: Error, overlay: &str) -> Error {
        let (input, message) = match &err {
            Error::Input { input, message, .. } => (input.clone(), message.clone()),
            Error::Yaml { message, .. } => match message.split_once(": ") {
                Some((path, rest)) if path.starts_with("units.") => {
                    (path.to_string(), rest.to_string())
                }
                _ => (String::new(), message.clone()),
            },
            _ => (String::new(), String::new()),
        };
        let origin = self.origins.iter().find(|o| {
            let head = format!("units.{}", o.unit);
            input == head || input.starts_with(&format!("{head}."))
        });
        let Some(o) = origin else {
            return match err {
                Error::Input { input, message, .. } => error_at(overlay, None, &input, message),
                Error::Yaml { message, .. } => Error::Yaml {
                    path: overlay.to_string(),
                    position: None,
                    message: format!("in the flowsheet this overlay makes: {message}"),
                },
                other => other.context(format!("in the flowsheet the overlay {overlay} makes")),
            };
        };
        let source = &self.sources[o.source];
        let rest = input
            .strip_prefix(&format!("units.{}", o.unit))
            .unwrap_or_default()
            .trim_start_matches('.');
        let entry = [Step::Key(o.list), Step::Index(o.index)];
        let mut path = entry.to_vec();
        path.extend(rest.split('.').filter(|s| !s.is_empty()).map(Step::Key));
        let first = rest.split('.').next().unwrap_or_default();
        let position = if message.starts_with("unknown key") && !first.is_empty() {
            locate_key(&source.text, &entry, first)
        } else {
            locate(&source.text, &path).or_else(|| {
                (!first.is_empty())
                    .then(|| locate_key(&source.text, &entry, first))
                    .flatten()
            })
        }
        .or_else(|| locate(&source.text, &entry));
        let located = error_at(&source.file, position, &input, message);
        if source.file == overlay {
            located
        } else {
            // In a base's text, but caused by what the overlay did to it.
            located.context(format!("in the flowsheet the overlay {overlay} makes"))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const BASE: &str = "\
title: Small train, invented
feeds:
  gas:
    temperature: 350 degC
    pressure: 25 bar
    total: 1000 kmol/h
    mole-fractions: {H2: 0.48, CO: 0.09, CO2: 0.06, CH4: 0.03, H2O: 0.34}
units:
  - name: hts
    type: shift
    from: gas
    to: hts-exit
    catalyst: iron-chromium
    approach: {shift: 8 K}
  - name: cooler
    type: cooler
    from: hts-exit
    to: cooled
    outlet-temperature: 200 degC
  - name: knockout
    type: knockout
    from: cooled
    to: [dry-gas, condensate]
    temperature: 40 degC
";

    fn files(pairs: &[(&str, &str)]) -> tempfile::TempDir {
        let dir = tempfile::tempdir().unwrap();
        for (name, text) in pairs {
            std::fs::write(dir.path().join(name), text).unwrap();
        }
        dir
    }

    fn unit_io(case: &Case) -> Vec<(String, Vec<String>, Vec<String>)> {
        case.flowsheet
            .units()
            .iter()
            .map(|u| (u.name.clone(), u.inlets.clone(), u.outlets.clone()))
            .collect()
    }

    fn io(name: &str, from: &[&str], to: &[&str]) -> (String, Vec<String>, Vec<String>) {
        let v = |l: &[&str]| l.iter().map(|s| s.to_string()).collect();
        (name.to_string(), v(from), v(to))
    }

    #[test]
    fn an_added_unit_is_put_into_the_stream_and_its_first_outlet_carries_on() {
        let db = SpeciesDb::embedded().unwrap();
        // A knockout (two outlets) put into hts-exit: the cooler takes its first outlet (the
        // gas); its second (condensate) leaves as a product.
        let dir = files(&[
            ("base.yaml", BASE),
            (
                "o.yaml",
                "base: base.yaml\nadd-units:\n  - {name: early-knockout, type: knockout, from: \
                 hts-exit, to: [wet-gas, early-condensate], temperature: 200 degC}\n",
            ),
        ]);
        let case = load(&db, &dir.path().join("o.yaml")).unwrap();
        assert_eq!(
            unit_io(&case),
            [
                io("hts", &["gas"], &["hts-exit"]),
                io(
                    "early-knockout",
                    &["hts-exit"],
                    &["wet-gas", "early-condensate"]
                ),
                io("cooler", &["wet-gas"], &["cooled"]),
                io("knockout", &["cooled"], &["dry-gas", "condensate"]),
            ]
        );
        assert_eq!(case.name, "o");
        assert_eq!(case.files.len(), 2);
    }

    #[test]
    fn a_removed_unit_hands_its_inlet_on_and_chained_overlays_apply_in_order() {
        let db = SpeciesDb::embedded().unwrap();
        let dir = files(&[
            ("base.yaml", BASE),
            (
                "first.yaml",
                "base: base.yaml\nchanges: {units.hts.approach.shift: 20 K, \
                 feeds.gas.temperature: 360 degC}\n",
            ),
            (
                "second.yaml",
                "title: Second\nbase: first.yaml\nremove-units: [cooler]\nchanges:\n  \
                 units.hts.approach.shift: 5 K\n",
            ),
        ]);
        let case = load(&db, &dir.path().join("second.yaml")).unwrap();
        assert!(case
            .flowsheet
            .solve_with(&db, &case.parameters, None)
            .is_ok());
        assert_eq!(case.name, "Second");
        assert_eq!(case.files.len(), 3);
        assert_eq!(
            unit_io(&case),
            [
                io("hts", &["gas"], &["hts-exit"]),
                io("knockout", &["hts-exit"], &["dry-gas", "condensate"]),
            ]
        );
        let fs = &case.flowsheet;
        let at = |path: &str| case.parameters[fs.input(path).unwrap().0];
        // The overlay's change wins over its base's; the base's other change stays.
        assert_eq!(at("units.hts.approach.shift"), 5.0);
        assert!((at("feeds.gas.temperature") - 633.15).abs() < 1e-9);
        // A unit with two outlets cannot be taken out.
        let dir = files(&[
            ("base.yaml", BASE),
            ("o.yaml", "base: base.yaml\nremove-units: [knockout]\n"),
        ]);
        let e = load(&db, &dir.path().join("o.yaml"))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("o.yaml:2:16") && e.contains("2 outlet(s)"),
            "{e}"
        );
    }

    #[test]
    fn a_base_chain_that_comes_back_is_refused() {
        let db = SpeciesDb::embedded().unwrap();
        let dir = files(&[("a.yaml", "base: a.yaml\n")]);
        let e = load(&db, &dir.path().join("a.yaml"))
            .unwrap_err()
            .to_string();
        assert!(e.contains("a.yaml:1:1") && e.contains("comes back"), "{e}");
    }
}
