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
//! Recycles: a flowsheet whose units form cycles is torn ([`tears`]: the fewest tear streams,
//! or those named under `solver: tear-streams`), solved in the order of the graph without its
//! tears, and the tears converged by bounded Wegstein iteration ([`recycle`]); the result holds
//! a [`RecycleRecord`]. A flowsheet without cycles is solved in one pass, as before.
//!
//! Design targets ([`targets`]): the file's `targets:` (and any built in code) adjust one input
//! each so that one result meets a value, by Brent's method around the whole solve; several are
//! met in file order, each with the others held, in rounds until all hold at once (at most
//! [`targets::ROUND_LIMIT`]). [`Flowsheet::solve`] and [`Flowsheet::solve_with`] meet the
//! file's targets; [`Flowsheet::solve_targets_in`] is the path for many cases.
//!
//! Results are screening-level engineering estimates. Hot hydrogen and carbon monoxide at
//! pressure are flammable and toxic: follow local codes and licensed engineering practice.

mod checks;
pub mod energy;
pub mod feeds;
pub mod graph;
pub mod locate;
pub mod paths;
pub mod recycle;
pub mod result;
mod solve;
pub mod spec;
pub mod targets;
pub mod tears;
pub mod values;
pub mod yaml;

use std::path::Path;

pub use feeds::Feed;
pub use feeds::FeedInputs;
pub use graph::FlowGraph;
pub use paths::{ResultPath, ResultSlot};
pub use recycle::RecycleOptions;
pub use result::{
    FlowsheetResult, RecycleRecord, RecycleTermination, SolvedStream, SolvedUnit, StreamSource,
    Summary,
};
pub use solve::{Workspace, ELEMENT_BALANCE_TOLERANCE, ENERGY_BALANCE_TOLERANCE};
pub use spec::FlowsheetUnit;
pub use targets::{Target, TargetOutcome};

use crate::equilibrium::SolverOptions;
use crate::error::{Error, Result};
use crate::thermo::SpeciesDb;
use crate::units::unit::{Param, ParamInfo, ParamTable};
use locate::Step::{Index, Key};

/// A compiled flowsheet: read and checked once, its units built (equilibrium stages prepared),
/// every numeric input given a slot in a parameter vector under its input path. Immutable and
/// `Send + Sync`: solve it as often as needed, from many threads, with the parameter vector of
/// the file ([`Flowsheet::solve`]) or one a study changed ([`Flowsheet::solve_with`]).
#[derive(Debug, Clone)]
pub struct Flowsheet {
    title: String,
    origin: String,
    feeds: Vec<Feed>,
    feed_inputs: Vec<FeedInputs>,
    units: Vec<FlowsheetUnit>,
    graph: FlowGraph,
    params: ParamTable,
    /// The parameter vector of the file.
    defaults: Vec<f64>,
    /// For each unit in solve order: its inlet streams and first outlet, as indices into the
    /// streams of a result (feeds first, then unit outlets in solve order).
    layout: Vec<UnitIo>,
    elements: solve::ElementTable,
    /// Tolerances and iteration limits of the equilibrium stages (`solver:`).
    options: SolverOptions,
    /// The file's design targets, in file order.
    targets: Vec<Target>,
    /// The file's `steam-feed`.
    steam_feed: Option<String>,
    /// What the plant's energy figures need (`energy:`, heating values, which feeds are fuel).
    energy: energy::EnergyTable,
    /// The tears and the iterated range of a flowsheet with cycles; `None` without.
    recycle: Option<recycle::RecyclePlan>,
}

/// Where a unit's inlets and outlets sit among the streams of a result.
#[derive(Debug, Clone)]
struct UnitIo {
    inlets: Vec<Inlet>,
    first_outlet: usize,
    /// The units it heats, as positions in the solve order (solved before it).
    heated: Vec<usize>,
}

/// Where a unit reads an inlet: a stream of the result made before it, or a tear slot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Inlet {
    /// Index among the streams of a result.
    Stream(usize),
    /// Index among the tear streams.
    Tear(usize),
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
        let mut params = ParamTable::default();
        let feed_inputs = feeds.iter().map(|f| f.register(db, &mut params)).collect();
        let units = model
            .units
            .iter()
            .enumerate()
            .map(|(i, unit)| {
                spec::build(db, unit, &mut params).map_err(|e| {
                    let entry = [Key("units"), Index(i)];
                    let location = match &e {
                        Error::UnitSpec { field, reason, .. } => {
                            let key = field.split(", ").next().unwrap_or_default();
                            let mut path = entry.to_vec();
                            path.extend(key.split('.').map(Key));
                            if reason.starts_with("unknown key") {
                                // The key itself, not its value.
                                locate::locate_key(text, &entry, key)
                            } else {
                                locate::locate(text, &path)
                                    .or_else(|| locate::locate(text, &path[..3.min(path.len())]))
                            }
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
                    let path = format!("units.{}", unit.name);
                    locate::annotate(e, origin, location, &path)
                })
            })
            .collect::<Result<Vec<FlowsheetUnit>>>()?;
        let feed_names: Vec<&str> = feeds.iter().map(|f| f.name.as_str()).collect();
        let ports: Vec<graph::UnitPorts<'_>> = units
            .iter()
            .zip(&model.units)
            .map(|(u, m)| graph::UnitPorts {
                name: &u.name,
                inlets: &u.inlets,
                outlets: &u.outlets,
                heats: &m.heats,
            })
            .collect();
        let graph = graph::build_with(&feed_names, &ports, &model.recycle.tear_streams).map_err(
            |e| match e.at {
                Some(at) => {
                    // A unit with named ports: the key of that port, holding one name.
                    let named = units
                        .get(at.unit)
                        .and_then(|u| u.unit_type.named_ports)
                        .and_then(|n| n.key_of(at.key, at.index));
                    let path = match named {
                        Some(key) => vec![Key("units"), Index(at.unit), Key(key)],
                        None => vec![Key("units"), Index(at.unit), Key(at.key), Index(at.index)],
                    };
                    let location =
                        locate::locate(text, &path).or_else(|| locate::locate(text, &path[..3]));
                    let name = &units[at.unit].name;
                    locate::annotate(
                        *e.error,
                        origin,
                        location,
                        &format!("units.{name}.{}", named.unwrap_or(at.key)),
                    )
                }
                None => *e.error,
            },
        )?;
        let title = model.title.unwrap_or_else(|| origin.to_string());
        let energy =
            energy::EnergyTable::new(db, &feeds, &units, &graph, &model.energy, &mut params);
        let defaults = params.defaults();
        let (layout, mut recycle) = layout(&feeds, &units, &graph, &model.recycle);
        tear_guesses(db, origin, text, &model.tear_guess, recycle.as_mut())?;
        let mut flowsheet = Flowsheet {
            title,
            origin: origin.to_string(),
            feeds,
            feed_inputs,
            units,
            graph,
            params,
            defaults,
            layout,
            elements: solve::ElementTable::new(db),
            options: model.solver,
            targets: Vec::new(),
            steam_feed: model.steam_feed.clone(),
            energy,
            recycle,
        };
        targets::check_steam_feed(&flowsheet, origin, text, model.steam_feed.as_deref())?;
        flowsheet.targets = targets::from_file(&flowsheet, origin, text, &model.targets)?;
        Ok(flowsheet)
    }

    /// Solve every unit in order with the values of the file, meeting the file's targets
    /// ([`targets`]), check the balances and collect the result.
    pub fn solve(&self, db: &SpeciesDb) -> Result<FlowsheetResult> {
        self.solve_with(db, &self.defaults, None)
    }

    /// Per-thread work memory for [`Flowsheet::solve_in`].
    pub fn workspace(&self, db: &SpeciesDb) -> Workspace {
        solve::workspace(self, db)
    }

    /// Solve with the parameter vector `params` into a workspace of this flowsheet, warm-started
    /// from that workspace's previous solution; the result lives in the workspace. The path for
    /// many cases: once warm, it makes no heap allocation on its own.
    pub fn solve_in<'w>(
        &self,
        db: &SpeciesDb,
        params: &[f64],
        ws: &'w mut Workspace,
    ) -> Result<&'w FlowsheetResult> {
        solve::solve_in(self, db, params, ws)
    }

    /// Solve with the parameter vector `params` (one value per input, by slot: start from
    /// [`Flowsheet::parameters`] and set the slots [`Flowsheet::input`] gives). `previous`: a
    /// result of this flowsheet to warm-start the equilibrium stages from (a neighbouring case).
    /// The file's targets are met starting from `params` ([`Flowsheet::solve_targets_in`]).
    pub fn solve_with(
        &self,
        db: &SpeciesDb,
        params: &[f64],
        previous: Option<&FlowsheetResult>,
    ) -> Result<FlowsheetResult> {
        if self.targets.is_empty() {
            return solve::solve(self, db, params, previous);
        }
        let mut ws = solve::warm_workspace(self, db, previous);
        let mut params = params.to_vec();
        let mut outcomes = Vec::with_capacity(self.targets.len());
        self.solve_targets_in(db, &mut params, &[], &mut ws, &mut outcomes)?;
        Ok(ws.into_result())
    }

    /// The parameter vector of the file: every numeric input by slot, SI.
    pub fn parameters(&self) -> Vec<f64> {
        self.params.defaults()
    }

    /// Every numeric input: its path, its value in the file and how it reads, by slot.
    pub fn inputs(&self) -> &[ParamInfo] {
        self.params.all()
    }

    /// The slot of an input path (`units.hts.approach.shift`, `feeds.natural-gas.flows.CH4`);
    /// an unknown path is an error listing the nearest valid ones.
    pub fn input(&self, path: &str) -> Result<Param> {
        self.params.find(path).ok_or_else(|| {
            let known: Vec<&str> = self.params.all().iter().map(|p| p.path.as_str()).collect();
            Error::InvalidValue {
                field: "input path".into(),
                value: path.to_string(),
                reason: format!(
                    "no such input; the nearest are: {}",
                    paths::nearest(path, &known, 5).join(", ")
                ),
            }
        })
    }

    /// The solver options of the file (`solver:`; defaults where it gives none).
    pub fn solver_options(&self) -> &SolverOptions {
        &self.options
    }

    /// The tear streams of the flowsheet's cycles (named under `solver: tear-streams` or
    /// chosen, [`tears`]); empty without cycles.
    pub fn tear_streams(&self) -> &[String] {
        &self.graph.tearing.tears
    }

    /// The title (the file's `title`, else its name).
    pub fn title(&self) -> &str {
        &self.title
    }

    /// Where the flowsheet was read from.
    pub fn origin(&self) -> &str {
        &self.origin
    }

    /// The feeds as written, in file order.
    pub fn feeds(&self) -> &[Feed] {
        &self.feeds
    }

    /// The units, in file order.
    pub fn units(&self) -> &[FlowsheetUnit] {
        &self.units
    }

    /// The graph of feeds, units and streams, with the solve order.
    pub fn graph(&self) -> &FlowGraph {
        &self.graph
    }

    /// The units in solve order.
    pub fn units_in_order(&self) -> impl Iterator<Item = &FlowsheetUnit> {
        self.graph.order.iter().map(|&i| &self.units[i])
    }
}

/// Stream indices of each unit's inlets and first outlet, in solve order (the streams of a
/// result are the feeds in file order, then each unit's outlets in solve order; a tear stream
/// is read from its slot), and the recycle plan where the graph has tears.
fn layout(
    feeds: &[Feed],
    units: &[FlowsheetUnit],
    graph: &FlowGraph,
    options: &RecycleOptions,
) -> (Vec<UnitIo>, Option<recycle::RecyclePlan>) {
    let tears = &graph.tearing.tears;
    let mut names: Vec<&str> = feeds.iter().map(|f| f.name.as_str()).collect();
    let mut out = Vec::with_capacity(units.len());
    for &u in &graph.order {
        let unit = &units[u];
        let inlets = unit
            .inlets
            .iter()
            .map(|i| match tears.iter().position(|t| t == i) {
                Some(t) => Inlet::Tear(t),
                None => Inlet::Stream(names.iter().position(|n| n == i).unwrap_or(usize::MAX)),
            })
            .collect();
        let heated = graph.heats[u]
            .iter()
            .filter_map(|h| graph.order.iter().position(|o| o == h))
            .collect();
        out.push(UnitIo {
            inlets,
            first_outlet: names.len(),
            heated,
        });
        names.extend(unit.outlets.iter().map(String::as_str));
    }
    if tears.is_empty() {
        return (out, None);
    }
    let looped = &graph.tearing.looped_units;
    let positions = || {
        graph
            .order
            .iter()
            .enumerate()
            .filter(|(_, u)| looped.contains(u))
            .map(|(k, _)| k)
    };
    let plan = recycle::RecyclePlan {
        options: options.clone(),
        tears: tears.clone(),
        stream_index: tears
            .iter()
            .map(|t| names.iter().position(|n| n == t).unwrap_or(usize::MAX))
            .collect(),
        first: positions().min().unwrap_or(0),
        last: positions().max().unwrap_or(0),
        guesses: vec![None; tears.len()],
    };
    (out, Some(plan))
}

/// Read the first guesses of tear streams (`solver: tear-guess`, written as feeds) into the
/// recycle plan; a guess for a stream that is not a tear is an error naming the tears.
fn tear_guesses(
    db: &SpeciesDb,
    origin: &str,
    text: &str,
    guesses: &[(String, yaml::FeedModel)],
    plan: Option<&mut recycle::RecyclePlan>,
) -> Result<()> {
    let tears: &[String] = plan.as_ref().map_or(&[], |p| &p.tears);
    let mut found = Vec::with_capacity(guesses.len());
    for (name, model) in guesses {
        let at = || locate::locate(text, &[Key("solver"), Key("tear-guess"), Key(name)]);
        let Some(t) = tears.iter().position(|t| t == name) else {
            let reason = if tears.is_empty() {
                format!(
                    "`solver: tear-guess` gives a first guess for '{name}', but the flowsheet \
                     has no cycle and so no tear streams; leave `tear-guess` out"
                )
            } else {
                format!(
                    "`solver: tear-guess` gives a first guess for '{name}', which is not a tear \
                     stream; the tear streams are {} (name them under `solver: tear-streams` to \
                     choose others)",
                    tears
                        .iter()
                        .map(|t| format!("'{t}'"))
                        .collect::<Vec<_>>()
                        .join(", ")
                )
            };
            return Err(locate::annotate(
                Error::Flowsheet { reason },
                origin,
                at(),
                &format!("solver.tear-guess.{name}"),
            ));
        };
        let feed = feeds::convert(db, name, model)
            .map_err(|e| locate::annotate(e, origin, at(), &format!("solver.tear-guess.{name}")))?;
        found.push((t, feed.stream));
    }
    if let Some(plan) = plan {
        for (t, stream) in found {
            plan.guesses[t] = Some(stream);
        }
    }
    Ok(())
}
