//! Splitter: divides one stream into several of the same temperature, pressure (less an optional
//! pressure drop), phase and composition, by fraction or by total molar flow per outlet.

use super::common::{check_inlets, check_pressure_drop, outlet_pressure, spec_error};
use super::unit::{build, KeyDoc, Ports, UnitBuilder, UnitKind, UnitScratch, UnitType, ValueKind};
use super::{Stream, UnitResult};
use crate::error::Result;
use crate::thermo::SpeciesDb;

/// Tolerance on fractions summing to one, and on flows summing to the inlet flow (relative).
pub const SPLIT_SUM_TOLERANCE: f64 = 1e-9;

/// How a splitter divides its inlet: one entry per outlet, in outlet order; `None` marks the one
/// outlet (at most one) that takes the rest.
#[derive(Debug, Clone, PartialEq)]
pub enum Split {
    /// Fraction of the inlet to each outlet (0..1); with no `None` they must sum to one.
    Fractions(Vec<Option<f64>>),
    /// Total molar flow to each outlet, mol/s; with no `None` they must sum to the inlet flow.
    Flows(Vec<Option<f64>>),
}

/// Specification of a splitter.
#[derive(Debug, Clone, PartialEq)]
pub struct SplitterSpec {
    /// The division, one entry per outlet.
    pub split: Split,
    /// Pressure drop, Pa (usually zero).
    pub pressure_drop_pa: f64,
}

/// A splitter ready to solve.
#[derive(Debug, Clone)]
pub struct Splitter {
    name: String,
    spec: SplitterSpec,
}

impl Splitter {
    /// Number of outlets.
    pub fn outlet_count(&self) -> usize {
        match &self.spec.split {
            Split::Fractions(v) | Split::Flows(v) => v.len(),
        }
    }

    /// Fractions to each outlet for an inlet of `total` mol/s (they sum to one to rounding),
    /// written into `f` (its buffer reused).
    fn fractions_into(&self, total: f64, f: &mut Vec<f64>) -> Result<()> {
        let name = &self.name;
        // Each entry's given fraction (`None`: the one outlet that takes the rest), and their sum.
        let (given, scale, given_sum) = match &self.spec.split {
            Split::Fractions(v) => {
                let sum: f64 = v.iter().flatten().sum();
                (v, None, sum)
            }
            Split::Flows(v) => {
                let sum: f64 = v.iter().flatten().sum();
                let rest = v.iter().any(|e| e.is_none());
                let mismatch = (sum - total).abs() > SPLIT_SUM_TOLERANCE * total.max(1e-300);
                if (!rest && mismatch) || (rest && sum > total * (1.0 + SPLIT_SUM_TOLERANCE)) {
                    return Err(spec_error(
                        name,
                        "split",
                        format!(
                            "outlet flows sum to {sum} mol/s but the inlet carries {total} \
                             mol/s; make them match or leave one outlet to take the rest"
                        ),
                    ));
                }
                if total <= 0.0 {
                    let n = v.len() as f64;
                    f.clear();
                    f.resize(v.len(), 1.0 / n);
                    return Ok(());
                }
                (v, Some(total), sum / total)
            }
        };
        let rest = (1.0 - given_sum).max(0.0);
        f.clear();
        f.extend(given.iter().map(|e| match (e, scale) {
            (Some(x), Some(total)) => x / total,
            (Some(x), None) => *x,
            (None, _) => rest,
        }));
        let sum: f64 = f.iter().sum();
        if sum > 0.0 {
            for x in f.iter_mut() {
                *x /= sum;
            }
        }
        Ok(())
    }
}

/// The `splitter` unit type.
pub static TYPE: UnitType = UnitType {
    name: "splitter",
    summary: "One stream divided into two or more of the same composition, temperature and \
              phase, by fraction or by molar flow per outlet; one outlet may be left out and \
              takes the rest.",
    inlets: Ports::exactly(1, "stream to divide"),
    outlets: Ports::at_least(2, "the parts, named in `fractions` or `flows`"),
    named_ports: None,
    keys: &[
        KeyDoc {
            key: "fractions",
            value: ValueKind::PerOutlet,
            default: None,
            meaning: "fraction (0..1) of the inlet to each outlet, by outlet name; or `flows`",
        },
        KeyDoc {
            key: "flows",
            value: ValueKind::PerOutlet,
            default: None,
            meaning: "molar flow to each outlet, by outlet name; or `fractions`",
        },
        KeyDoc {
            key: "pressure-drop",
            value: ValueKind::PressureDifference,
            default: Some("0 bar"),
            meaning: "pressure lost across the unit",
        },
    ],
    example: "- name: tee\n  type: splitter\n  from: raw-gas\n  to: [to-fuel, to-psa]\n  \
              fractions: {to-fuel: 0.1}",
    build: build::<Splitter>,
};

impl UnitKind for Splitter {
    type Spec = SplitterSpec;

    fn read(b: &mut UnitBuilder<'_, '_, SplitterSpec>) -> Result<SplitterSpec> {
        let (key, kind) = match (b.has("fractions"), b.has("flows")) {
            (true, false) => ("fractions", ValueKind::Fraction),
            (false, true) => ("flows", ValueKind::MolarFlow),
            _ => {
                return Err(b.error(
                    "fractions, flows",
                    "give either `fractions` or `flows` per outlet",
                ))
            }
        };
        let given = b.map(key, kind)?.unwrap_or_default();
        let outlets = b.outlets();
        if let Some((name, _)) = given.iter().find(|(n, _)| !outlets.contains(n)) {
            return Err(b.error(
                &format!("{key}.{name}"),
                format!(
                    "'{name}' is not an outlet of this splitter (its `to`: {})",
                    outlets.join(", ")
                ),
            ));
        }
        let mut values = Vec::with_capacity(outlets.len());
        for (k, outlet) in outlets.iter().enumerate() {
            let v = given.iter().find(|(n, _)| n == outlet).map(|(_, v)| *v);
            if let Some(x) = v {
                b.register(
                    &format!("{key}.{outlet}"),
                    x,
                    kind,
                    move |s: &mut SplitterSpec, v| match &mut s.split {
                        Split::Fractions(f) | Split::Flows(f) => f[k] = Some(v),
                    },
                );
            }
            values.push(v);
        }
        let split = if key == "fractions" {
            Split::Fractions(values)
        } else {
            Split::Flows(values)
        };
        Ok(SplitterSpec {
            split,
            pressure_drop_pa: b.pressure_drop(|s, v| s.pressure_drop_pa = v)?,
        })
    }

    /// Check the spec and prepare.
    fn new(_: &SpeciesDb, name: &str, spec: &SplitterSpec) -> Result<Splitter> {
        let (entries, what) = match &spec.split {
            Split::Fractions(v) => (v, "fraction"),
            Split::Flows(v) => (v, "flow"),
        };
        if entries.len() < 2 {
            return Err(spec_error(
                name,
                "split",
                format!(
                    "a splitter needs at least 2 outlets, {} given",
                    entries.len()
                ),
            ));
        }
        if entries.iter().filter(|e| e.is_none()).count() > 1 {
            return Err(spec_error(
                name,
                "split",
                "only one outlet may take the rest",
            ));
        }
        for (k, e) in entries.iter().enumerate() {
            if let Some(v) = e {
                let ok = v.is_finite() && *v >= 0.0 && (what == "flow" || *v <= 1.0);
                if !ok {
                    return Err(spec_error(
                        name,
                        "split",
                        format!(
                            "outlet {}: {what} {v} must be {}",
                            k + 1,
                            if what == "flow" {
                                "finite and not negative (mol/s)"
                            } else {
                                "between 0 and 1"
                            }
                        ),
                    ));
                }
            }
        }
        if let Split::Fractions(v) = &spec.split {
            let sum: f64 = v.iter().flatten().sum();
            let rest = v.iter().any(|e| e.is_none());
            if (!rest && (sum - 1.0).abs() > SPLIT_SUM_TOLERANCE)
                || (rest && sum > 1.0 + SPLIT_SUM_TOLERANCE)
            {
                return Err(spec_error(
                    name,
                    "split",
                    format!(
                        "fractions sum to {sum}; they must sum to 1 (or leave one outlet to take \
                         the rest)"
                    ),
                ));
            }
        }
        check_pressure_drop(name, spec.pressure_drop_pa)?;
        Ok(Splitter {
            name: name.to_string(),
            spec: spec.clone(),
        })
    }

    fn spec(&self) -> &SplitterSpec {
        &self.spec
    }

    /// Split the inlet into `out` (its buffers and `scratch` reused: no heap allocation once
    /// they have their size).
    fn solve_into(
        &self,
        db: &SpeciesDb,
        inlets: &[&Stream],
        _: Option<&[f64]>,
        scratch: &mut UnitScratch,
        out: &mut UnitResult,
    ) -> Result<()> {
        check_inlets(db, &self.name, "splitter", inlets, 1, Some(1))?;
        let inlet = inlets[0];
        let p = outlet_pressure(&self.name, inlet.pressure_pa, self.spec.pressure_drop_pa)?;
        let f = &mut scratch.flows[0];
        self.fractions_into(inlet.total(), f)?;
        let last = f.len() - 1;
        out.reset(f.len(), db.len());
        out.equilibrium = None;
        // The last outlet starts as the whole inlet and gives up each part in turn, so that it
        // takes what is left and the balance closes to rounding.
        let (parts, rest) = out.outlets.split_at_mut(last);
        let remaining = &mut rest[0].flows;
        remaining.copy_from_slice(&inlet.flows);
        for (outlet, x) in parts.iter_mut().zip(f.iter()) {
            for ((o, n), r) in outlet
                .flows
                .iter_mut()
                .zip(&inlet.flows)
                .zip(remaining.iter_mut())
            {
                *o = n * x;
                *r -= *o;
            }
        }
        for r in remaining.iter_mut() {
            *r = r.max(0.0);
        }
        for outlet in &mut out.outlets {
            outlet.temperature_k = inlet.temperature_k;
            outlet.pressure_pa = p;
            outlet.phase = inlet.phase;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::test_support::{assert_balances, db, gas};

    #[test]
    fn fractions_and_flows_split_the_stream() {
        let db = db();
        let s = gas(&db, &[("H2", 3.0), ("CO", 1.0)], 600.0, 20e5);
        let spec = SplitterSpec {
            split: Split::Fractions(vec![Some(0.25), None]),
            pressure_drop_pa: 0.0,
        };
        let r = Splitter::new(&db, "tee", &spec)
            .unwrap()
            .solve(&db, &[&s], None)
            .unwrap();
        assert_balances(&db, &[&s], &r);
        assert!((r.outlets[0].total() - 1.0).abs() < 1e-15);
        assert!((r.outlets[1].total() - 3.0).abs() < 1e-15);
        assert_eq!(r.outlets[1].temperature_k, 600.0);
        let spec = SplitterSpec {
            split: Split::Flows(vec![Some(1.0), Some(2.0), Some(1.0)]),
            pressure_drop_pa: 0.1e5,
        };
        let r = Splitter::new(&db, "tee", &spec)
            .unwrap()
            .solve(&db, &[&s], None)
            .unwrap();
        assert_balances(&db, &[&s], &r);
        assert!((r.outlets[1].total() - 2.0).abs() < 1e-15);
        assert_eq!(r.outlets[2].pressure_pa, 19.9e5);
    }

    #[test]
    fn bad_splits_are_refused() {
        let db = db();
        let s = gas(&db, &[("H2", 3.0)], 600.0, 20e5);
        let bad = |split| SplitterSpec {
            split,
            pressure_drop_pa: 0.0,
        };
        for split in [
            Split::Fractions(vec![Some(0.5), Some(0.6)]),
            Split::Fractions(vec![None, None]),
            Split::Fractions(vec![Some(1.0)]),
            Split::Fractions(vec![Some(-0.1), None]),
            Split::Flows(vec![Some(f64::NAN), None]),
        ] {
            let e = Splitter::new(&db, "tee", &bad(split))
                .unwrap_err()
                .to_string();
            assert!(e.contains("unit 'tee'"), "{e}");
        }
        let sp = Splitter::new(&db, "tee", &bad(Split::Flows(vec![Some(1.0), Some(1.0)]))).unwrap();
        assert!(sp.solve(&db, &[&s], None).is_err());
        let sp = Splitter::new(&db, "tee", &bad(Split::Flows(vec![Some(4.0), None]))).unwrap();
        assert!(sp.solve(&db, &[&s], None).is_err());
    }
}
