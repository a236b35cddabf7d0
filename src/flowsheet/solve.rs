//! Solving a checked flowsheet: each unit in the graph's order, then the plant summary and the
//! two balance checks over the whole flowsheet (products against feeds):
//!
//! - elements: for each element e, |sum products - sum feeds| / (sum feeds) <= 1e-9, the
//!   denominator being the feed amount of that element (or, for an element present only in
//!   traces, 1e-12 of all atoms fed, so that an absent element compares 0 with 0);
//! - energy: |H_products - H_feeds - sum of duties| <= 1e-6 of the larger of the feed enthalpy
//!   magnitude (sum over feeds of |H|, formation enthalpies included) and the sum of |duty|.
//!
//! A flowsheet that fails either check is an error, never a result. The plant summary reads the
//! figures the units publish.

use super::recycle::{self, RecyclePlan, RecycleState};
use super::result::{
    FlowsheetResult, RecycleRecord, RecycleTermination, SolvedStream, SolvedUnit, StreamSource,
    Summary,
};
use super::targets::TargetOutcome;
use super::{Flowsheet, Inlet};
use crate::error::{Error, Result};
use crate::reaction::organic_carbon_atoms;
use crate::thermo::{mixture, water, SpeciesDb};
use crate::units::unit::{UnitContext, UnitScratch};
use crate::units::{Stream, StreamPhase, UnitResult, Warning};

/// Largest relative element-balance error a solved flowsheet may have.
pub const ELEMENT_BALANCE_TOLERANCE: f64 = 1e-9;
/// Largest relative energy-balance error a solved flowsheet may have.
pub const ENERGY_BALANCE_TOLERANCE: f64 = 1e-6;

/// The atoms of each database species by element index, built once per flowsheet so that the
/// element balance of a solve reads numbers by index.
#[derive(Debug, Clone)]
pub(crate) struct ElementTable {
    /// Element symbols, sorted.
    names: Vec<String>,
    /// For each database species: (element index, atoms per molecule).
    atoms: Vec<Vec<(usize, f64)>>,
    /// Species holding organic carbon, with their organic carbon atoms
    /// ([`crate::reaction::organic_carbon_atoms`], the count of the steam-to-carbon ratio).
    organic: Vec<(usize, f64)>,
    /// Database index of H2, where the data hold it.
    hydrogen: Option<usize>,
}

/// Most elements the balance check keeps on the stack.
const MAX_ELEMENTS: usize = 32;

impl ElementTable {
    pub(crate) fn new(db: &SpeciesDb) -> ElementTable {
        let names = mixture::elements(db);
        let atoms = db
            .all()
            .iter()
            .map(|s| {
                names
                    .iter()
                    .enumerate()
                    .map(|(e, name)| (e, s.atoms(name)))
                    .filter(|(_, a)| *a != 0.0)
                    .collect()
            })
            .collect();
        let organic = db
            .all()
            .iter()
            .enumerate()
            .map(|(i, s)| (i, organic_carbon_atoms(s)))
            .filter(|(_, c)| *c > 0.0)
            .collect();
        ElementTable {
            names,
            atoms,
            organic,
            hydrogen: db.index_of("H2"),
        }
    }
}

/// Per-thread work memory of a flowsheet solve: the result it writes into (stream and unit names
/// laid out once), each unit's scratch, and the warm-start extents. Make one per thread with
/// [`Flowsheet::workspace`] and reuse it: a solve then starts every equilibrium stage from the
/// previous solution of this workspace.
#[derive(Debug)]
pub struct Workspace {
    result: FlowsheetResult,
    scratch: Vec<UnitScratch>,
    guess: Vec<f64>,
    /// Whether each unit (solve order) holds a converged solution to start from.
    warm: Vec<bool>,
    /// The tear slots and Wegstein memory of a flowsheet with cycles (empty without).
    recycle: RecycleState,
}

impl Workspace {
    /// The last result written (valid after a successful solve).
    pub fn result(&self) -> &FlowsheetResult {
        &self.result
    }

    /// Forget the previous solution (the next solve starts cold, and works out every check
    /// afresh rather than reusing one asked the same).
    pub fn forget(&mut self) {
        self.warm.iter_mut().for_each(|w| *w = false);
        self.scratch.iter_mut().for_each(|s| s.carbon.forget());
        self.recycle.warm = false;
    }

    /// The last result written, owned.
    pub fn into_result(self) -> FlowsheetResult {
        self.result
    }

    /// Record the outcomes of the targets met by the last solve (their entries reused).
    pub(crate) fn set_targets(&mut self, outcomes: &[TargetOutcome]) {
        super::targets::copy_outcomes(&mut self.result.targets, outcomes);
    }
}

/// A workspace laid out for `fs`: one stream per feed and unit outlet (solve order), one unit
/// entry per unit (solve order), with their names.
pub(crate) fn workspace(fs: &Flowsheet, db: &SpeciesDb) -> Workspace {
    let destination = |name: &str| {
        fs.units
            .iter()
            .find(|u| u.inlets.iter().any(|i| i == name))
            .map(|u| u.name.clone())
    };
    let empty = |n: usize| Stream::vapour(vec![0.0; n], 0.0, 0.0);
    let mut streams = Vec::new();
    for feed in &fs.feeds {
        streams.push(SolvedStream {
            name: feed.name.clone(),
            stream: feed.stream.clone(),
            source: StreamSource::Feed,
            destination: destination(&feed.name),
        });
    }
    let mut units = Vec::with_capacity(fs.units.len());
    for unit in fs.units_in_order() {
        for name in &unit.outlets {
            streams.push(SolvedStream {
                name: name.clone(),
                stream: empty(db.len()),
                source: StreamSource::Unit(unit.name.clone()),
                destination: destination(name),
            });
        }
        units.push(SolvedUnit {
            name: unit.name.clone(),
            type_name: unit.unit_type.name.to_string(),
            inlets: unit.inlets.clone(),
            outlets: unit.outlets.clone(),
            result: UnitResult::default(),
        });
    }
    Workspace {
        result: FlowsheetResult {
            title: fs.title.clone(),
            streams,
            units,
            summary: Summary::default(),
            warnings: Vec::new(),
            element_balance_residual: 0.0,
            energy_balance_residual: 0.0,
            targets: Vec::new(),
            recycle: fs.recycle.as_ref().map(|plan| RecycleRecord {
                tear_streams: plan.tears.clone(),
                iterations: 0,
                residual: 0.0,
                termination: RecycleTermination::NotSolved,
            }),
        },
        scratch: (0..fs.units.len())
            .map(|_| UnitScratch::default())
            .collect(),
        guess: Vec::new(),
        warm: vec![false; fs.units.len()],
        recycle: fs
            .recycle
            .as_ref()
            .map_or_else(RecycleState::default, |plan| {
                RecycleState::new(plan.tears.len(), db.len())
            }),
    }
}

/// Solve every unit in order with the parameter vector `params` (by slot) into the workspace,
/// check the balances, and return the result it holds. Warm-started from the workspace's
/// previous solution where it has one.
pub(crate) fn solve_in<'w>(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &[f64],
    ws: &'w mut Workspace,
) -> Result<&'w FlowsheetResult> {
    let defaults = &fs.defaults;
    if params.len() != defaults.len() {
        return Err(Error::InvalidValue {
            field: "parameter vector".into(),
            value: format!("{} values", params.len()),
            reason: format!(
                "the flowsheet has {} inputs; start from Flowsheet::parameters()",
                defaults.len()
            ),
        });
    }
    let Workspace {
        result,
        scratch,
        guess,
        warm,
        recycle,
    } = ws;
    result.warnings.clear();
    result.targets.clear();
    load_feeds(fs, db, params, &mut result.streams)?;
    for (k, feed) in fs.feeds.iter().enumerate() {
        if result.streams[k].destination.is_none() {
            result.warnings.push(
                Warning::new(
                    "feed-unused",
                    "feed {subject} goes to no unit; it is listed as a product as it is",
                )
                .subject(feed.name.as_str()),
            );
        }
        if let Some(w) =
            super::feeds::near_saturation_warning(db, &feed.name, &result.streams[k].stream)
        {
            result.warnings.push(w);
        }
    }
    let mut parts = Parts {
        result,
        scratch,
        guess,
        warm,
    };
    match &fs.recycle {
        None => {
            for k in 0..fs.graph.order.len() {
                solve_unit(fs, db, params, k, &mut parts, &[])?;
            }
        }
        Some(plan) => {
            let outcome = solve_loops(fs, db, params, plan, &mut parts, recycle);
            if let Err(e) = outcome {
                recycle.warm = false;
                return Err(match recycle.pressure_note(&plan.tears) {
                    Some(note) => e.context(note),
                    None => e,
                });
            }
        }
    }
    let result = parts.result;
    summary(&mut result.summary, &result.units);
    hydrogen_made(&mut result.summary, &fs.elements, &result.streams);
    super::energy::summary(&fs.energy, db, params, result);
    result.element_balance_residual = element_balance(&fs.elements, &result.streams)?;
    result.energy_balance_residual = energy_balance(db, &result.streams, &result.units)?;
    Ok(result)
}

/// The parts of a workspace a unit solve writes.
struct Parts<'w> {
    result: &'w mut FlowsheetResult,
    scratch: &'w mut [UnitScratch],
    guess: &'w mut Vec<f64>,
    warm: &'w mut [bool],
}

/// Write every feed stream from the parameter vector.
fn load_feeds(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &[f64],
    streams: &mut [SolvedStream],
) -> Result<()> {
    for (k, (feed, inputs)) in fs.feeds.iter().zip(&fs.feed_inputs).enumerate() {
        feed.stream_into(db, inputs, params, &fs.defaults, &mut streams[k].stream)?;
    }
    Ok(())
}

/// Solve the unit at solve-order position `k` from its inlets (tear inlets from `tears`) and
/// write its outlets, warnings and the flows it sets.
fn solve_unit(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &[f64],
    k: usize,
    parts: &mut Parts<'_>,
    tears: &[Stream],
) -> Result<()> {
    let defaults = &fs.defaults;
    let unit = &fs.units[fs.graph.order[k]];
    let io = &fs.layout[k];
    let result = &mut *parts.result;
    // Heat the unit delivers to the units it heats (solved before it, in this pass).
    let heat_demand_w: f64 = io
        .heated
        .iter()
        .map(|&j| result.units[j].result.duty_w)
        .sum();
    let solved = &mut result.units[k];
    let guess = &mut *parts.guess;
    // Warm start: the extents of this workspace's previous solution of the unit.
    guess.clear();
    if parts.warm[k] {
        if let Some(e) = &solved.result.equilibrium {
            guess.extend_from_slice(&e.extents);
        }
    }
    parts.warm[k] = false;
    let (before, after) = result.streams.split_at_mut(io.first_outlet);
    let cx = UnitContext {
        db,
        name: &unit.name,
        params,
        defaults,
    };
    let g = (!guess.is_empty()).then_some(guess.as_slice());
    let scratch = &mut parts.scratch[k];
    scratch.options = fs.options;
    scratch.heat_demand_w = heat_demand_w;
    let outcome = with_inlets(before, tears, &io.inlets, |inlets| {
        unit.unit
            .solve_into(&cx, inlets, g, scratch, &mut solved.result)
    });
    outcome.map_err(|e| {
        e.context(format!(
            "solving unit '{}' ({})",
            unit.name, unit.unit_type.name
        ))
    })?;
    let r = &solved.result;
    set_inlet_flows(fs, &unit.name, &io.inlets, &r.inlet_flows, before)?;
    if r.outlets.len() != unit.outlets.len() {
        return Err(Error::Flowsheet {
            reason: format!(
                "unit '{}' made {} outlet streams but lists {} in `to` (internal error)",
                unit.name,
                r.outlets.len(),
                unit.outlets.len()
            ),
        });
    }
    for (j, outlet) in r.outlets.iter().enumerate() {
        let target = &mut after[j].stream;
        target.flows.clear();
        target.flows.extend_from_slice(&outlet.flows);
        target.temperature_k = outlet.temperature_k;
        target.pressure_pa = outlet.pressure_pa;
        target.phase = outlet.phase;
        check_phase(db, &unit.name, &after[j].name, target)?;
    }
    result.warnings.extend(r.warnings.iter().cloned());
    parts.warm[k] = true;
    Ok(())
}

/// Solve a flowsheet with cycles ([`recycle`]): the units before the first unit on a cycle
/// once, the range of units on cycles until the tears converge, the units after it once.
fn solve_loops(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &[f64],
    plan: &RecyclePlan,
    parts: &mut Parts<'_>,
    state: &mut RecycleState,
) -> Result<()> {
    for k in 0..plan.first {
        solve_unit(fs, db, params, k, parts, &state.slots)?;
    }
    let feeds = fs.feeds.len();
    let feed_total: f64 = parts.result.streams[..feeds]
        .iter()
        .map(|s| s.stream.total())
        .sum();
    state.start(&parts.result.streams[0].stream, &plan.guesses);
    let mark = parts.result.warnings.len();
    let tolerance = plan.options.tolerance;
    let limit = plan.options.iteration_limit;
    let (mut iterations, mut residual, mut converged) = (0, f64::INFINITY, false);
    while iterations < limit {
        iterations += 1;
        parts.result.warnings.truncate(mark);
        if iterations > 1 {
            // Feeds a unit rescaled start each pass from the file's values again.
            load_feeds(fs, db, params, &mut parts.result.streams)?;
        }
        for k in plan.first..=plan.last {
            solve_unit(fs, db, params, k, parts, &state.slots).map_err(|e| {
                // On the first pass a tear without a guess holds no flow, which a reactor or
                // an exchanger may not take: say how to give one.
                let hint = if iterations == 1 && plan.guesses.iter().any(Option::is_none) {
                    "; the tears started from no flow: give a first guess of them under \
                     `solver: tear-guess` (written as a feed)"
                } else {
                    ""
                };
                e.context(format!(
                    "recycle iteration {iterations} of at most {limit} (tear streams {}){hint}",
                    quoted(&plan.tears)
                ))
            })?;
        }
        let streams = &parts.result.streams;
        let computed = |t: usize| &streams[plan.stream_index[t]].stream;
        residual = state.residual(computed, feed_total);
        if residual <= tolerance {
            converged = true;
            break;
        }
        state.update(computed, iterations == 1, plan.options.wegstein_bounds);
    }
    if let Some(record) = parts.result.recycle.as_mut() {
        recycle::finish(record, iterations, residual, converged);
        if !converged {
            let worst = state.describe_worst(&plan.tears, |i| {
                db.all()
                    .get(i)
                    .map_or_else(|| format!("species {i}"), |s| s.name.clone())
            });
            return Err(recycle::not_converged(record, tolerance, worst));
        }
    }
    state.warm = true;
    for k in plan.last + 1..fs.graph.order.len() {
        solve_unit(fs, db, params, k, parts, &state.slots)?;
    }
    Ok(())
}

/// Names quoted and comma separated.
fn quoted(names: &[String]) -> String {
    names
        .iter()
        .map(|n| format!("'{n}'"))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Rescale the feeds whose flow a unit set ([`UnitResult::inlet_flows`]) to that flow, keeping
/// their composition; an inlet that is not a feed is an error naming it.
fn set_inlet_flows(
    fs: &Flowsheet,
    unit: &str,
    inlets: &[Inlet],
    flows: &[(usize, f64)],
    streams: &mut [SolvedStream],
) -> Result<()> {
    for &(k, flow_mol_s) in flows {
        let Some(&inlet) = inlets.get(k) else {
            continue;
        };
        let made = |name: &str| Error::Flowsheet {
            reason: format!(
                "unit '{unit}' sets the flow of its inlet '{name}', which is made by another \
                 unit; give that inlet as a feed (its composition, temperature and pressure; \
                 the unit sets its flow)"
            ),
        };
        let index = match inlet {
            Inlet::Stream(index) => index,
            Inlet::Tear(t) => {
                let plan = fs.recycle.as_ref();
                let name = plan
                    .and_then(|p| p.tears.get(t))
                    .map_or("?", String::as_str);
                return Err(made(name));
            }
        };
        let stream = &mut streams[index];
        if index >= fs.feeds.len() {
            return Err(made(&stream.name));
        }
        let total = stream.stream.total();
        if !(total > 0.0) || !flow_mol_s.is_finite() || flow_mol_s < 0.0 {
            return Err(Error::Flowsheet {
                reason: format!(
                    "unit '{unit}' cannot set the flow of feed '{}' to {flow_mol_s} mol/s \
                     (the feed must have a composition with a positive flow, and the flow \
                     set must be finite and not negative)",
                    stream.name
                ),
            });
        }
        let scale = flow_mol_s / total;
        stream.stream.flows.iter_mut().for_each(|n| *n *= scale);
    }
    Ok(())
}

/// Call `f` with the inlet streams `inlets` (from `streams` or the tear slots `tears`), without
/// a heap allocation for up to eight inlets.
fn with_inlets<T>(
    streams: &[SolvedStream],
    tears: &[Stream],
    inlets: &[Inlet],
    f: impl FnOnce(&[&Stream]) -> T,
) -> T {
    const STACK: usize = 8;
    let at = |inlet: &Inlet| match *inlet {
        Inlet::Stream(i) => &streams[i].stream,
        Inlet::Tear(t) => &tears[t],
    };
    if inlets.len() <= STACK {
        let first = at(&inlets[0]);
        let mut refs: [&Stream; STACK] = [first; STACK];
        for (slot, inlet) in refs.iter_mut().zip(inlets) {
            *slot = at(inlet);
        }
        f(&refs[..inlets.len()])
    } else {
        let refs: Vec<&Stream> = inlets.iter().map(at).collect();
        f(&refs)
    }
}

/// Solve into a fresh workspace (warm-started from `previous` where given) and return an owned
/// result.
pub(crate) fn solve(
    fs: &Flowsheet,
    db: &SpeciesDb,
    params: &[f64],
    previous: Option<&FlowsheetResult>,
) -> Result<FlowsheetResult> {
    let mut ws = warm_workspace(fs, db, previous);
    solve_in(fs, db, params, &mut ws)?;
    Ok(ws.result)
}

/// A fresh workspace of `fs` whose equilibrium units start from `previous` where it has them.
pub(crate) fn warm_workspace(
    fs: &Flowsheet,
    db: &SpeciesDb,
    previous: Option<&FlowsheetResult>,
) -> Workspace {
    let mut ws = workspace(fs, db);
    if let Some(p) = previous {
        // Tears start from the previous result's streams where it has them all.
        if let Some(plan) = &fs.recycle {
            let found: Option<Vec<&Stream>> = plan
                .tears
                .iter()
                .map(|t| p.streams.iter().find(|s| &s.name == t).map(|s| &s.stream))
                .collect();
            if let Some(found) = found {
                for (slot, s) in ws.recycle.slots.iter_mut().zip(found) {
                    if s.flows.len() == slot.flows.len() {
                        slot.clone_from(s);
                    }
                }
                ws.recycle.warm = true;
            }
        }
        for (k, solved) in ws.result.units.iter_mut().enumerate() {
            if let Some(old) = p.units.iter().find(|u| u.name == solved.name) {
                if old.result.equilibrium.is_some() {
                    solved.result.equilibrium = old.result.equilibrium.clone();
                    ws.warm[k] = true;
                }
            }
        }
    }
    ws
}

/// A unit outlet must be what its phase says: vapour at or above its water dew point, liquid
/// water at or below its saturation temperature (IAPWS-IF97 eqs. 30 and 31; 1e-9 relative on
/// the pressures for rounding). Otherwise it would be two phases, which a stream does not carry:
/// an error naming the stream and the unit, never a quiet label.
fn check_phase(db: &SpeciesDb, unit: &str, name: &str, s: &Stream) -> Result<()> {
    let Some(w) = db.water() else {
        return Ok(());
    };
    let (t, p, total) = (s.temperature_k, s.pressure_pa, s.total());
    if s.flows[w] <= 0.0 || total <= 0.0 || t >= water::CRITICAL_TEMPERATURE_K {
        return Ok(());
    }
    let p_sat = water::saturation_pressure_pa(t.max(water::SATURATION_MIN_TEMPERATURE_K))?;
    let wrong = match s.phase {
        StreamPhase::Vapour => s.flows[w] / total * p > p_sat * (1.0 + 1e-9),
        StreamPhase::Liquid => p < p_sat * (1.0 - 1e-9),
    };
    if !wrong {
        return Ok(());
    }
    let what = match s.phase {
        StreamPhase::Vapour => format!(
            "is gas below its water dew point (water partial pressure {:.4} bar above the \
             saturation pressure {:.4} bar): part of its water would condense; keep it above \
             its dew point, or cool it in a knockout, which condenses and separates the water",
            s.flows[w] / total * p / 1e5,
            p_sat / 1e5
        ),
        StreamPhase::Liquid => format!(
            "is liquid water above its saturation temperature at {:.4} bar: part of it would \
             flash to steam; raise its pressure or heat it to steam in a heater",
            p / 1e5
        ),
    };
    Err(Error::Flowsheet {
        reason: format!(
            "stream '{name}' from unit '{unit}' at {:.2} degC and {:.4} bar {what}",
            t - 273.15,
            p / 1e5
        ),
    })
}

/// The plant summary, read from the figures the units publish: hydrogen in each purifier
/// product (`hydrogen-product`), methane slip at each reformer outlet (`methane-slip-dry`), CO
/// slip at each shift outlet (`co-slip-dry`), the steam-to-carbon ratio at each reformer and
/// pre-reformer inlet (`steam-to-carbon`), the carbon margin of each (`carbon-margin`), and the
/// sums of the duties. Written in place: a
/// solve of the same flowsheet finds the same entries and only sets their values.
fn summary(s: &mut Summary, units: &[SolvedUnit]) {
    let mut counts = [0usize; 4];
    s.hydrogen_product_mol_s = None;
    s.heating_duty_w = 0.0;
    s.cooling_duty_w = 0.0;
    for solved in units {
        for f in &solved.result.figures {
            let (list, n) = match f.key {
                "hydrogen-product" => {
                    *s.hydrogen_product_mol_s.get_or_insert(0.0) += f.value;
                    continue;
                }
                "methane-slip-dry" => (&mut s.methane_slip_dry, &mut counts[0]),
                "co-slip-dry" => (&mut s.co_slip_dry, &mut counts[1]),
                "steam-to-carbon" => (&mut s.steam_to_carbon, &mut counts[2]),
                "carbon-margin" => (&mut s.carbon_margin, &mut counts[3]),
                _ => continue,
            };
            set_entry(list, *n, &solved.name, f.value);
            *n += 1;
        }
        let q = solved.result.duty_w;
        if q > 0.0 {
            s.heating_duty_w += q;
        } else {
            s.cooling_duty_w += q;
        }
    }
    s.methane_slip_dry.truncate(counts[0]);
    s.co_slip_dry.truncate(counts[1]);
    s.steam_to_carbon.truncate(counts[2]);
    s.carbon_margin.truncate(counts[3]);
}

/// Hydrogen made and hydrogen made per organic carbon fed (see [`Summary`]): the purifier
/// product where there is one (already summed by [`summary`]), else the hydrogen of the
/// products (streams no unit uses) less that of the feeds; the carbon fed is the organic carbon
/// of every feed stream. Reads by index; no allocation.
fn hydrogen_made(s: &mut Summary, table: &ElementTable, streams: &[SolvedStream]) {
    let mut net = 0.0;
    let mut carbon = 0.0;
    for st in streams {
        let flows = &st.stream.flows;
        let h2 = table.hydrogen.and_then(|h| flows.get(h)).copied();
        if st.source == StreamSource::Feed {
            net -= h2.unwrap_or(0.0);
            carbon += table
                .organic
                .iter()
                .map(|(i, c)| flows.get(*i).copied().unwrap_or(0.0) * c)
                .sum::<f64>();
        }
        if st.destination.is_none() {
            net += h2.unwrap_or(0.0);
        }
    }
    s.hydrogen_made_mol_s = match s.hydrogen_product_mol_s {
        Some(n) => Some(n),
        None => table.hydrogen.map(|_| net),
    };
    s.hydrogen_per_carbon_fed = s
        .hydrogen_made_mol_s
        .filter(|_| carbon > 0.0)
        .map(|n| n / carbon);
}

/// Set entry `i` of a (unit, value) list, reusing it when it names the same unit.
fn set_entry(list: &mut Vec<(String, f64)>, i: usize, unit: &str, value: f64) {
    match list.get_mut(i) {
        Some(entry) if entry.0 == unit => entry.1 = value,
        _ => {
            list.truncate(i);
            list.push((unit.to_string(), value));
        }
    }
}

/// Largest relative element-balance error, products against feeds; an error above tolerance.
/// Feeds are the streams a feed makes; products those no unit uses (a feed may be both).
fn element_balance(table: &ElementTable, streams: &[SolvedStream]) -> Result<f64> {
    let n_elements = table.names.len();
    if n_elements > MAX_ELEMENTS {
        return Err(Error::Flowsheet {
            reason: format!(
                "the species data hold {n_elements} elements; the balance check takes at most \
                 {MAX_ELEMENTS}"
            ),
        });
    }
    let mut fed = [0.0f64; MAX_ELEMENTS];
    let mut made = [0.0f64; MAX_ELEMENTS];
    for s in streams {
        let is_feed = s.source == StreamSource::Feed;
        let is_product = s.destination.is_none();
        if !is_feed && !is_product {
            continue;
        }
        for (n, atoms) in s.stream.flows.iter().zip(&table.atoms) {
            if *n == 0.0 {
                continue;
            }
            for &(e, a) in atoms {
                if is_feed {
                    fed[e] += n * a;
                }
                if is_product {
                    made[e] += n * a;
                }
            }
        }
    }
    let all_atoms: f64 = fed[..n_elements].iter().sum();
    let mut worst = 0.0f64;
    let mut worst_element = 0;
    for e in 0..n_elements {
        let (fed, made) = (fed[e], made[e]);
        let scale = fed.max(1e-12 * all_atoms).max(f64::MIN_POSITIVE);
        let r = (made - fed).abs() / scale;
        if !(r <= worst) {
            worst = r;
            worst_element = e;
        }
    }
    if !(worst <= ELEMENT_BALANCE_TOLERANCE) {
        return Err(Error::Flowsheet {
            reason: format!(
                "element balance does not close: element {} is off by {worst:.3e} (relative, \
                 products against feeds; at most {ELEMENT_BALANCE_TOLERANCE:e} is allowed); the \
                 result is not reported",
                table.names[worst_element]
            ),
        });
    }
    Ok(worst)
}

/// Relative energy-balance error; an error above tolerance.
fn energy_balance(db: &SpeciesDb, streams: &[SolvedStream], units: &[SolvedUnit]) -> Result<f64> {
    let mut h_feeds = 0.0;
    let mut h_feeds_abs = 0.0;
    let mut h_products = 0.0;
    for s in streams {
        if s.source == StreamSource::Feed {
            let h = s.stream.enthalpy_w(db)?;
            h_feeds += h;
            h_feeds_abs += h.abs();
        }
        if s.destination.is_none() {
            h_products += s.stream.enthalpy_w(db)?;
        }
    }
    let duties: f64 = units.iter().map(|u| u.result.duty_w).sum();
    // Units solved as a real gas: the residual enthalpy their outlets gained (zero for ideal).
    let residual: f64 = units
        .iter()
        .filter_map(|u| u.result.equilibrium.as_ref())
        .map(|e| e.residual_enthalpy_change_w)
        .sum();
    if residual != 0.0 {
        h_products += residual;
    }
    let duties_abs: f64 = units.iter().map(|u| u.result.duty_w.abs()).sum();
    let scale = h_feeds_abs.max(duties_abs).max(1.0);
    let r = (h_products - h_feeds - duties).abs() / scale;
    if !(r <= ENERGY_BALANCE_TOLERANCE) {
        return Err(Error::Flowsheet {
            reason: format!(
                "energy balance does not close: products {h_products:.6e} W - feeds \
                 {h_feeds:.6e} W differs from the sum of duties {duties:.6e} W by {r:.3e} \
                 (relative; at most {ENERGY_BALANCE_TOLERANCE:e} is allowed); the result is \
                 not reported"
            ),
        });
    }
    Ok(r)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::units::UnitResult;

    fn stream(
        db: &SpeciesDb,
        name: &str,
        source: StreamSource,
        dest: Option<&str>,
        pairs: &[(&str, f64)],
    ) -> SolvedStream {
        let mut flows = vec![0.0; db.len()];
        for (n, x) in pairs {
            flows[db.index_of(n).unwrap()] = *x;
        }
        SolvedStream {
            name: name.into(),
            stream: Stream::vapour(flows, 600.0, 2.0e6),
            source,
            destination: dest.map(str::to_string),
        }
    }

    fn unit(duty_w: f64) -> SolvedUnit {
        SolvedUnit {
            name: "u".into(),
            type_name: "heater".into(),
            inlets: vec!["a".into()],
            outlets: vec!["b".into()],
            result: UnitResult {
                outlets: Vec::new(),
                duty_w,
                approaches: Vec::new(),
                figures: Vec::new(),
                equilibrium: None,
                warnings: Vec::new(),
                inlet_flows: Vec::new(),
            },
        }
    }

    #[test]
    fn an_element_balance_that_does_not_close_is_an_error() {
        let db = SpeciesDb::embedded().unwrap();
        let feed = stream(&db, "a", StreamSource::Feed, Some("u"), &[("CH4", 1.0)]);
        let same = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0)],
        );
        let table = ElementTable::new(&db);
        assert!(element_balance(&table, &[feed.clone(), same]).unwrap() == 0.0);
        // Below the tolerance the residual is reported as it is: 1e-10 more CH4 is 1e-10 more
        // carbon relative to the carbon fed (and the same for hydrogen).
        let little = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0 + 1e-10)],
        );
        let r = element_balance(&table, &[feed.clone(), little]).unwrap();
        assert!((r - 1e-10).abs() < 1e-15, "{r:e}");
        // An element present only in the product (argon, none fed) is measured against
        // 1e-12 of all the atoms fed (5 per CH4): 1e-13 mol of Ar is 0.02 relative.
        let trace = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0), ("Ar", 1e-13)],
        );
        let e = element_balance(&table, &[feed.clone(), trace])
            .unwrap_err()
            .to_string();
        assert!(e.contains("element Ar is off by 2.000e-2"), "{e}");
        // 1e-8 relative too much carbon and hydrogen in the product.
        let more = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("CH4", 1.0 + 1e-8)],
        );
        let e = element_balance(&table, &[feed, more])
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("element balance does not close") && e.contains("not reported"),
            "{e}"
        );
    }

    #[test]
    fn an_energy_balance_that_does_not_close_is_an_error() {
        let db = SpeciesDb::embedded().unwrap();
        let feed = stream(&db, "a", StreamSource::Feed, Some("u"), &[("N2", 1.0)]);
        let mut hot = stream(
            &db,
            "b",
            StreamSource::Unit("u".into()),
            None,
            &[("N2", 1.0)],
        );
        hot.stream.temperature_k = 700.0;
        let dh = hot.stream.enthalpy_w(&db).unwrap() - feed.stream.enthalpy_w(&db).unwrap();
        let h_feed = feed.stream.enthalpy_w(&db).unwrap();
        let streams = [feed, hot];
        assert!(energy_balance(&db, &streams, &[unit(dh)]).unwrap() < 1e-12);
        // Below the tolerance the residual is reported: |dH - duty| over the larger of the feed
        // enthalpy magnitude and the duties.
        let r = energy_balance(&db, &streams, &[unit(dh * (1.0 + 1e-9))]).unwrap();
        let expected = (dh * 1e-9).abs() / h_feed.abs().max(dh.abs());
        assert!((r / expected - 1.0).abs() < 1e-3, "{r:e} vs {expected:e}");
        let e = energy_balance(&db, &streams, &[unit(dh * 0.99)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("energy balance does not close"), "{e}");
    }

    #[test]
    fn a_unit_outlet_in_two_phases_is_refused() {
        let db = SpeciesDb::embedded().unwrap();
        let f = |pairs: &[(&str, f64)]| {
            let mut v = vec![0.0; db.len()];
            for (n, x) in pairs {
                v[db.index_of(n).unwrap()] = *x;
            }
            v
        };
        // Gas with 30 % water at 25 bar: dew point 440.9 K (IAPWS-IF97 eq. 31).
        let wet = f(&[("H2", 0.7), ("H2O", 0.3)]);
        assert!(check_phase(&db, "u", "s", &Stream::vapour(wet.clone(), 445.0, 25e5)).is_ok());
        let e = check_phase(&db, "u", "s", &Stream::vapour(wet, 430.0, 25e5))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("stream 's' from unit 'u'") && e.contains("dew point"),
            "{e}"
        );
        // Liquid water above its saturation temperature (T_s(1 bar) = 372.76 K) would flash.
        let water = f(&[("H2O", 1.0)]);
        let liquid = |t: f64| Stream::liquid(water.clone(), t, 1e5);
        assert!(check_phase(&db, "u", "s", &liquid(360.0)).is_ok());
        assert!(check_phase(&db, "u", "s", &liquid(380.0)).is_err());
    }
}
