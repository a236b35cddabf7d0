//! Flowsheets: a train of units read from a YAML file, checked, connected into a graph and solved
//! in order, with every stream, every duty, a plant summary and the balance checks.
//!
//! Reading goes file -> [`yaml`] (serde model, errors with file, line and column; the checks
//! across the keys of one entry run while parsing, so they too have a position) -> [`feeds`]
//! and [`spec`] (SI streams and unit specifications) -> [`graph`] (petgraph, solve order).
//! [`Flowsheet::solve`] runs the units in that order and checks that the element balance closes
//! within 1e-9 and the energy balance within 1e-6 (relative); a flowsheet that does not close
//! is an error, never a result.
//!
//! Results are screening-level engineering estimates. Hot hydrogen and carbon monoxide at
//! pressure are flammable and toxic: follow local codes and licensed engineering practice.

mod checks;
pub mod feeds;
pub mod graph;
mod locate;
pub mod result;
mod solve;
pub mod spec;
pub mod values;
pub mod yaml;

use std::path::Path;

pub use feeds::Feed;
pub use graph::FlowGraph;
pub use result::{FlowsheetResult, SolvedStream, SolvedUnit, StreamSource, Summary};
pub use solve::{ELEMENT_BALANCE_TOLERANCE, ENERGY_BALANCE_TOLERANCE};
pub use spec::FlowsheetUnit;
pub use yaml::UnitType;

use crate::error::{Error, Result};
use crate::thermo::SpeciesDb;
use locate::Step::{Index, Key};

/// A checked flowsheet: feeds and unit specifications in SI, the graph and the solve order.
#[derive(Debug, Clone)]
pub struct Flowsheet {
    /// Title (the file's `title`, else its name).
    pub title: String,
    /// Where the flowsheet was read from (file path or the origin given).
    pub origin: String,
    /// Feeds, in file order.
    pub feeds: Vec<Feed>,
    /// Units, in file order.
    pub units: Vec<FlowsheetUnit>,
    /// Graph of feeds, units and streams, with the solve order.
    pub graph: FlowGraph,
}

impl Flowsheet {
    /// Read and check a flowsheet file. YAML errors carry the file, line and column.
    pub fn from_file(path: &Path, db: &SpeciesDb) -> Result<Flowsheet> {
        let text = std::fs::read_to_string(path).map_err(|source| Error::Io {
            action: "reading",
            path: path.to_path_buf(),
            source,
        })?;
        Flowsheet::from_yaml_str(&path.display().to_string(), &text, db)
    }

    /// Read and check a flowsheet from YAML text; `origin` names it in messages.
    pub fn from_yaml_str(origin: &str, text: &str, db: &SpeciesDb) -> Result<Flowsheet> {
        let model = yaml::parse(origin, text)?;
        let feeds = model
            .feeds
            .iter()
            .map(|(name, feed)| {
                feeds::convert(db, name, feed).map_err(|e| {
                    let location = match &e {
                        Error::UnknownSpecies { name: species, .. } => {
                            ["flows", "mole-fractions"].iter().find_map(|key| {
                                locate::locate(
                                    text,
                                    &[Key("feeds"), Key(name), Key(key), Key(species)],
                                )
                            })
                        }
                        Error::InvalidValue { field, .. } => {
                            locate::locate(text, &locate::field_path(field))
                        }
                        _ => None,
                    }
                    .or_else(|| locate::locate(text, &[Key("feeds"), Key(name)]));
                    locate::annotate(e, origin, location, &format!("feeds.{name}"))
                })
            })
            .collect::<Result<Vec<Feed>>>()?;
        let units = model
            .units
            .iter()
            .enumerate()
            .map(|(i, unit)| {
                spec::convert(db, unit).map_err(|e| {
                    let entry = [Key("units"), Index(i)];
                    let location = match &e {
                        Error::UnitSpec { field, .. } => {
                            let key = field.split(", ").next().unwrap_or_default();
                            locate::locate(text, &[entry[0], entry[1], Key(key)])
                        }
                        Error::UnknownSpecies { name, .. } => locate::locate(
                            text,
                            &[entry[0], entry[1], Key("impurity-split"), Key(name)],
                        )
                        .or_else(|| {
                            locate::locate(
                                text,
                                &[entry[0], entry[1], Key("impurity-weights"), Key(name)],
                            )
                        }),
                        _ => None,
                    }
                    .or_else(|| locate::locate(text, &entry));
                    let path = format!("units.{}", unit.common().name);
                    locate::annotate(e, origin, location, &path)
                })
            })
            .collect::<Result<Vec<FlowsheetUnit>>>()?;
        let feed_names: Vec<&str> = feeds.iter().map(|f| f.name.as_str()).collect();
        let ports: Vec<graph::UnitPorts<'_>> = units
            .iter()
            .map(|u| graph::UnitPorts {
                name: &u.name,
                inlets: &u.inlets,
                outlets: &u.outlets,
            })
            .collect();
        let graph = graph::build(&feed_names, &ports).map_err(|e| match e.at {
            Some(at) => {
                let path = [Key("units"), Index(at.unit), Key(at.key), Index(at.index)];
                let location = locate::locate(text, &path);
                let name = &units[at.unit].name;
                locate::annotate(
                    e.error,
                    origin,
                    location,
                    &format!("units.{name}.{}", at.key),
                )
            }
            None => e.error,
        })?;
        let title = model.title.unwrap_or_else(|| origin.to_string());
        Ok(Flowsheet {
            title,
            origin: origin.to_string(),
            feeds,
            units,
            graph,
        })
    }

    /// Solve every unit in order, check the balances and collect the result.
    pub fn solve(&self, db: &SpeciesDb) -> Result<FlowsheetResult> {
        solve::solve(self, db)
    }

    /// The units in solve order.
    pub fn units_in_order(&self) -> impl Iterator<Item = &FlowsheetUnit> {
        self.graph.order.iter().map(|&i| &self.units[i])
    }
}
