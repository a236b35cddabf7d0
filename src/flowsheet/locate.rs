//! Finding the line and column of a value in the flowsheet text after it has been parsed, for
//! errors found later (graph checks, species names, unit checks), so that they too point into the
//! file.
//!
//! The YAML parser gives positions only with its errors, so the text is read once more with a
//! reader that walks down the given path and fails on purpose at the value it reaches; the
//! position of that error is the position of the value. This runs only on the error path.

use std::fmt;

use serde::de::{self, DeserializeSeed, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};
use serde_norway::Value;

use crate::error::{Error, Position};

/// One step of a path into the YAML document.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Step<'a> {
    /// The value of a mapping key.
    Key(&'a str),
    /// An element of a sequence (a scalar in its place counts as element 0 and the target).
    Index(usize),
}

const MARKER: &str = "syntrain: located";

/// An error found after parsing as an [`Error::Input`]: the file, the position of the value
/// (where found) and the input path as fields, the message from the error.
pub fn annotate(err: Error, origin: &str, position: Option<Position>, path_text: &str) -> Error {
    let (input, message) = match err {
        Error::UnitSpec {
            unit,
            field,
            reason,
        } => {
            if field.contains(", ") || field.contains(' ') {
                (format!("units.{unit}"), format!("{field}: {reason}"))
            } else {
                (format!("units.{unit}.{field}"), reason)
            }
        }
        Error::InvalidValue {
            field,
            value,
            reason,
        } if field.starts_with("feeds.") || field.starts_with("units.") => {
            (field, format!("value {value} is not allowed: {reason}"))
        }
        Error::Flowsheet { reason } => (path_text.to_string(), reason),
        other => (path_text.to_string(), other.to_string()),
    };
    Error::Input {
        file: origin.to_string(),
        position,
        input,
        message,
    }
}

/// The path of a dotted field name ("feeds.gas.flows.CH4"), for [`locate`].
pub fn field_path(field: &str) -> Vec<Step<'_>> {
    field.split('.').map(Step::Key).collect()
}

/// Line and column of the value at `path` in `text`, or `None` when it is not there.
pub fn locate(text: &str, path: &[Step<'_>]) -> Option<Position> {
    let deserializer = serde_norway::Deserializer::from_str(text);
    match (Walk { path }).deserialize(deserializer) {
        Err(e) if e.to_string().contains(MARKER) => e.location().map(|l| Position {
            line: l.line(),
            column: l.column(),
        }),
        _ => None,
    }
}

/// Where a key of the mapping at `entry` (a path to a mapping) is written: the first line at or
/// after the mapping's own position that starts with `key:` (block style) or holds `key:` after
/// `{` or `, ` (flow style), with its column; `None` when it is not found.
pub fn locate_key(text: &str, entry: &[Step], key: &str) -> Option<Position> {
    let line = locate(text, entry)?.line;
    let block = format!("{key}:");
    let flow = [
        format!("{{{key}:"),
        format!(", {key}:"),
        format!("{{ {key}:"),
    ];
    for (i, l) in text.lines().enumerate().skip(line.saturating_sub(1)) {
        let trimmed = l.trim_start().trim_start_matches("- ");
        if trimmed.starts_with(&block) {
            return Some(Position {
                line: i + 1,
                column: l.len() - trimmed.len() + 1,
            });
        }
        let flow_at = flow
            .iter()
            .find_map(|f| l.find(f.as_str()).map(|c| c + f.len() - block.len()));
        if let Some(c) = flow_at {
            return Some(Position {
                line: i + 1,
                column: c + 1,
            });
        }
    }
    None
}

/// Walk down `path`; fail at its end.
struct Walk<'p, 'a> {
    path: &'p [Step<'a>],
}

impl<'de> DeserializeSeed<'de> for Walk<'_, '_> {
    type Value = ();

    fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<(), D::Error> {
        d.deserialize_any(self)
    }
}

impl<'de> Visitor<'de> for Walk<'_, '_> {
    type Value = ();

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any value")
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<(), A::Error> {
        let (key, rest) = match self.path.split_first() {
            Some((Step::Key(key), rest)) => (*key, rest),
            _ => return Err(de::Error::custom(MARKER)),
        };
        while let Some(k) = map.next_key::<Value>()? {
            if k.as_str() == Some(key) {
                return map.next_value_seed(Walk { path: rest });
            }
            map.next_value::<IgnoredAny>()?;
        }
        Ok(())
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<(), A::Error> {
        let (index, rest) = match self.path.split_first() {
            Some((Step::Index(index), rest)) => (*index, rest),
            _ => return Err(de::Error::custom(MARKER)),
        };
        for _ in 0..index {
            if seq.next_element::<IgnoredAny>()?.is_none() {
                return Ok(());
            }
        }
        seq.next_element_seed(Walk { path: rest }).map(|_| ())
    }

    fn visit_str<E: de::Error>(self, _: &str) -> Result<(), E> {
        self.scalar()
    }

    fn visit_bool<E: de::Error>(self, _: bool) -> Result<(), E> {
        self.scalar()
    }

    fn visit_i64<E: de::Error>(self, _: i64) -> Result<(), E> {
        self.scalar()
    }

    fn visit_u64<E: de::Error>(self, _: u64) -> Result<(), E> {
        self.scalar()
    }

    fn visit_f64<E: de::Error>(self, _: f64) -> Result<(), E> {
        self.scalar()
    }

    fn visit_unit<E: de::Error>(self) -> Result<(), E> {
        self.scalar()
    }
}

impl Walk<'_, '_> {
    /// A scalar is the target when the path ends here or only an index is left (a single name
    /// written in place of a list).
    fn scalar<E: de::Error>(&self) -> Result<(), E> {
        match self.path {
            [] | [Step::Index(_)] => Err(E::custom(MARKER)),
            _ => Ok(()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const TEXT: &str = "\
feeds:
  gas: {temperature: 300 K}
units:
  - name: a
    from: [x, y]
    to: z
";

    #[test]
    fn finds_keys_and_elements() {
        let at = |path: &[Step]| locate(TEXT, path).map(|p| (p.line, p.column));
        assert_eq!(at(&[Step::Key("feeds"), Step::Key("gas")]), Some((2, 8)));
        let from = [Step::Key("units"), Step::Index(0), Step::Key("from")];
        assert_eq!(
            at(&[from[0], from[1], from[2], Step::Index(1)]),
            Some((5, 15))
        );
        let to = [
            Step::Key("units"),
            Step::Index(0),
            Step::Key("to"),
            Step::Index(0),
        ];
        assert_eq!(at(&to), Some((6, 9)));
        let entry = [Step::Key("units"), Step::Index(0)];
        let key = locate_key(TEXT, &entry, "to").map(|p| (p.line, p.column));
        assert_eq!(key, Some((6, 5)));
        assert_eq!(at(&[Step::Key("units"), Step::Index(3)]), None);
        assert_eq!(at(&[Step::Key("nothing")]), None);
    }
}
