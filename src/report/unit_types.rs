//! `syntrain unit-types [TYPE]`: every unit type the registry has, with its inlets and outlets,
//! each key with what it takes, its default and its meaning, and a short example; made from the
//! registry ([`crate::units::registry`]) and never written by hand.

use serde_json::{json, Value};

use crate::error::{Error, Result};
use crate::units::registry::{self, UNIT_TYPES};
use crate::units::unit::UnitType;

/// The types to show: all, or the one named (an unknown name is an error listing the types).
fn selected(name: Option<&str>) -> Result<Vec<&'static UnitType>> {
    match name {
        None => Ok(UNIT_TYPES.to_vec()),
        Some(n) => registry::unit_type(n)
            .map(|t| vec![t])
            .ok_or_else(|| Error::InvalidValue {
                field: "unit type".into(),
                value: n.to_string(),
                reason: format!(
                    "no such type; the types are: {}",
                    registry::names().join(", ")
                ),
            }),
    }
}

/// Plain text: one block per type.
pub fn table(name: Option<&str>) -> Result<String> {
    let types = selected(name)?;
    let mut out = String::new();
    if name.is_none() {
        out.push_str("Unit types (syntrain unit-types TYPE shows one)\n\n");
    }
    for t in types {
        out.push_str(&format!("{}\n{}\n", t.name, "=".repeat(t.name.len())));
        out.push_str(&wrap(t.summary, 96, ""));
        match t.named_ports {
            Some(named) => out.push_str(&format!(
                "\n  ports (one stream name each, in place of from and to):\n    {}\n  inlets: \
                 {}\n  outlets: {}\n  keys (besides name, type and the ports):\n",
                named.describe(),
                t.inlets.meaning,
                t.outlets.meaning
            )),
            None => out.push_str(&format!(
                "\n  from: {} inlet(s): {}\n  to:   {} outlet(s): {}\n  keys (besides name, \
                 type, from, to):\n",
                t.inlets.count_text(),
                t.inlets.meaning,
                t.outlets.count_text(),
                t.outlets.meaning
            )),
        }
        for k in t.keys {
            let default = k
                .default
                .unwrap_or("none (required, or one of a choice of keys)");
            out.push_str(&format!("    {}\n", k.key));
            out.push_str(&wrap(
                &format!("value: {}", k.value.describe()),
                96,
                "        ",
            ));
            out.push_str(&wrap(&format!("default: {default}"), 96, "        "));
            out.push_str(&wrap(k.meaning, 96, "        "));
        }
        out.push_str("  example:\n");
        for line in t.example.lines() {
            out.push_str(&format!("    {line}\n"));
        }
        out.push('\n');
    }
    Ok(out)
}

/// JSON: a list of types, each with `name`, `summary`, `inlets` and `outlets` {`min`, `max`,
/// `meaning`}, `named_ports` ({`inlets`, `outlets`, `optional_outlets`} keys, or null for types
/// that take `from` and `to`), `keys` [{`key`, `value`, `default`, `meaning`}] and `example`.
pub fn json(name: Option<&str>) -> Result<String> {
    let list: Vec<Value> = selected(name)?
        .iter()
        .map(|t| {
            let ports = |p: &crate::units::unit::Ports| {
                json!({"min": p.min, "max": p.max, "meaning": p.meaning})
            };
            json!({
                "name": t.name,
                "summary": t.summary,
                "inlets": ports(&t.inlets),
                "outlets": ports(&t.outlets),
                "named_ports": t.named_ports.map(|n| json!({
                    "inlets": n.inlets,
                    "outlets": n.outlets,
                    "optional_outlets": n.optional_outlets,
                })),
                "keys": t.keys.iter().map(|k| json!({
                    "key": k.key,
                    "value": k.value.describe(),
                    "default": k.default,
                    "meaning": k.meaning,
                })).collect::<Vec<_>>(),
                "example": t.example,
            })
        })
        .collect();
    let mut text = serde_json::to_string_pretty(&list).map_err(|e| Error::InvalidValue {
        field: "unit-types".into(),
        value: String::new(),
        reason: e.to_string(),
    })?;
    text.push('\n');
    Ok(text)
}

/// Words wrapped at `width` columns, each line indented by `indent`.
fn wrap(text: &str, width: usize, indent: &str) -> String {
    let mut out = String::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        if !line.is_empty() && indent.len() + line.len() + 1 + word.len() > width {
            out.push_str(&format!("{indent}{line}\n"));
            line.clear();
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        out.push_str(&format!("{indent}{line}\n"));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_type_and_key_is_listed() {
        let text = table(None).unwrap();
        for t in UNIT_TYPES {
            assert!(
                text.contains(&format!("\n{}\n", t.name))
                    || text.contains(&format!("{}\n=", t.name))
            );
            for k in t.keys {
                assert!(
                    text.contains(&format!("    {}\n", k.key)),
                    "{}: {}",
                    t.name,
                    k.key
                );
            }
        }
        let v: Value = serde_json::from_str(&json(None).unwrap()).unwrap();
        assert_eq!(v.as_array().unwrap().len(), UNIT_TYPES.len());
        let one: Value = serde_json::from_str(&json(Some("purifier")).unwrap()).unwrap();
        assert_eq!(one[0]["outlets"]["min"], 2);
        assert!(one[0]["named_ports"].is_null());
        let x: Value = serde_json::from_str(&json(Some("exchanger")).unwrap()).unwrap();
        assert_eq!(x[0]["named_ports"]["inlets"][1], "cold-from");
        assert_eq!(x[0]["named_ports"]["optional_outlets"][0], "condensate-to");
        assert!(table(Some("exchanger"))
            .unwrap()
            .contains("hot-from, cold-from, hot-to, cold-to, condensate-to (optional)"));
        assert!(table(Some("shfit"))
            .unwrap_err()
            .to_string()
            .contains("shift"));
        for line in text.lines() {
            assert!(line.chars().count() <= 100, "too wide: {line}");
        }
    }
}
