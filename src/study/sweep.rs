//! The sweep runner: every case of a [`CaseList`] solved on a compiled flowsheet, one CSV row
//! per case in case order (RFC 4180, written with the `csv` crate).
//!
//! Row: the inputs as shown (in the unit each was written in), `status` (`ok`, or why the case
//! failed: a failed case is written, never dropped), `warnings` (the distinct warning codes of
//! the case in order of appearance, `;`-separated), then one column per result path, headed by
//! the path. Numbers carry 12 significant digits (see [`super::row`]); a value a case does not
//! have is an empty cell. Lines end in a line feed.
//!
//! Parallel and repeatable: the case list is cut into fixed blocks of [`BLOCK`] cases, counted
//! from case 0 of the whole list. Blocks run in parallel on all cores (rayon); within a block
//! each case is warm-started from the previous one, and the first case of a block starts
//! cold. A slice of the list (a shard) that begins inside a block first solves the cases of
//! that block before it (without writing them), so every case starts from the same state
//! whatever the thread count or the slicing: the rows of the slices, concatenated, equal the
//! rows of the whole byte for byte. Rows go to the writer a chunk of blocks at a time, so
//! memory stays flat however many cases there are.
//!
//! The runner never prints: it reports progress and asks whether to stop through an
//! [`Observer`] (the command line shows a progress bar and catches Ctrl-C there); on a stop it
//! finishes the rows already made, so the output holds whole rows only.

use std::io::{IoSlice, Write};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::sync_channel;
use std::sync::Mutex;

use rayon::prelude::*;

use super::cases::CaseList;
use super::row::{CachedNumber, RowWriter};
use super::vary::InputTarget;
use crate::error::{Error, Result};
use crate::flowsheet::paths::Reader;
use crate::flowsheet::{Flowsheet, FlowsheetResult, ResultPath, Target, TargetOutcome, Workspace};
use crate::thermo::SpeciesDb;

/// Cases per block: the unit of parallel work and of warm starts.
pub const BLOCK: u64 = 32;

/// Blocks handed to the threads at a time (and written together).
const CHUNK_BLOCKS: u64 = 32;

/// Row buffers kept for reuse at most (a chunk's worth and one more).
const SPARE_ROOMS: usize = 2 * CHUNK_BLOCKS as usize;

/// The K-th of N equal slices of a case list (K from 1).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// Which slice, 1..=count.
    pub index: u64,
    /// How many slices.
    pub count: u64,
}

impl Shard {
    /// Read `K/N`.
    pub fn parse(text: &str) -> Result<Shard> {
        let bad = |reason: &str| Error::InvalidValue {
            field: "--shard".into(),
            value: text.to_string(),
            reason: reason.to_string(),
        };
        let (k, n) = text
            .split_once('/')
            .ok_or_else(|| bad("write K/N, e.g. 3/10 for the third of ten slices"))?;
        let (k, n): (u64, u64) = match (k.trim().parse(), n.trim().parse()) {
            (Ok(k), Ok(n)) => (k, n),
            _ => return Err(bad("K and N must be whole numbers, e.g. 3/10")),
        };
        if n == 0 || k == 0 || k > n {
            return Err(bad("K must be 1 to N and N 1 or more, e.g. 3/10"));
        }
        Ok(Shard { index: k, count: n })
    }

    /// The cases `[start, end)` of this slice of `len` cases: slice K of N holds cases
    /// floor((K-1) len / N) up to floor(K len / N), so the slices cover the list once, in order.
    pub fn range(&self, len: u64) -> (u64, u64) {
        let at = |k: u64| ((k as u128 * len as u128) / self.count as u128) as u64;
        (at(self.index - 1), at(self.index))
    }
}

/// What a sweep tells its caller while it runs.
pub trait Observer: Sync {
    /// `done` rows of this run have been written.
    fn advanced(&self, _done: u64) {}
    /// True when the run should stop (Ctrl-C); the rows already made are still written.
    fn stop_requested(&self) -> bool {
        false
    }
}

/// An observer that neither shows nor stops anything.
pub struct Quiet;
impl Observer for Quiet {}

/// Values kept in memory for a chart or percentiles, case-major.
#[derive(Debug, Clone, Default)]
pub struct Kept {
    /// The inputs of each case written, as shown (`inputs.len()` per case).
    pub inputs: Vec<f64>,
    /// The kept results of each case written (NaN where a case failed or lacks the value).
    pub results: Vec<f64>,
}

/// How a sweep ended.
#[derive(Debug, Clone, Default)]
pub struct SweepOutcome {
    /// Cases in this run (the whole list, or the shard's slice).
    pub cases: u64,
    /// Rows written.
    pub written: u64,
    /// Rows of failed cases.
    pub failed: u64,
    /// Rows of cases with at least one warning.
    pub with_warnings: u64,
    /// True when the run stopped before every case was written.
    pub interrupted: bool,
    /// The kept values.
    pub kept: Kept,
}

/// A sweep of a flowsheet over a case list.
pub struct Sweep<'a> {
    flowsheet: &'a Flowsheet,
    db: &'a SpeciesDb,
    cases: &'a CaseList,
    columns: Vec<ResultPath>,
    shard: Option<Shard>,
    keep: Vec<ResultPath>,
    /// The parameter vector each case starts from (the file's, or an overlay's).
    base: Vec<f64>,
    /// For each steam-to-carbon input (by input index), the target that sets it.
    ratio_targets: Vec<(usize, Target)>,
}

/// One block's rows and counts.
struct BlockOut {
    /// The rows; the buffer goes back to the threads for reuse.
    bytes: Vec<u8>,
    rows: u64,
    failed: u64,
    warned: u64,
    kept: Kept,
}

/// A thread's memory, reused from block to block.
struct ThreadState {
    ws: Workspace,
    params: Vec<f64>,
    shown: Vec<f64>,
    si: Vec<f64>,
    codes: Vec<&'static str>,
    joined: String,
    /// The steam-to-carbon targets of this thread, set case by case.
    extra: Vec<Target>,
    outcomes: Vec<TargetOutcome>,
    /// The text of each result column's last value.
    cache: Vec<CachedNumber>,
    reader: Reader,
    /// The rows of the block being solved.
    row: RowWriter,
}

impl<'a> Sweep<'a> {
    /// A sweep of `flowsheet` over `cases`, writing no result column until
    /// [`Sweep::columns`] names some.
    pub fn new(flowsheet: &'a Flowsheet, db: &'a SpeciesDb, cases: &'a CaseList) -> Sweep<'a> {
        Sweep {
            flowsheet,
            db,
            cases,
            columns: Vec::new(),
            shard: None,
            keep: Vec::new(),
            base: flowsheet.parameters(),
            ratio_targets: Vec::new(),
        }
    }

    /// Start every case from this parameter vector (an overlay's) instead of the file's.
    pub fn base(mut self, parameters: Vec<f64>) -> Sweep<'a> {
        self.base = parameters;
        self
    }

    /// Prepare the steam-to-carbon inputs: each is met by scaling `steam_feed` (else the
    /// file's `steam-feed`, else the only all-water feed), a design target set case by case.
    pub fn steam_feed(mut self, steam_feed: Option<&str>) -> Result<Sweep<'a>> {
        self.ratio_targets.clear();
        if self.cases.is_empty() {
            return Ok(self);
        }
        let n = self.cases.inputs.len();
        let (mut shown, mut si) = (vec![0.0; n], vec![0.0; n]);
        self.cases.case(0, &mut shown, &mut si);
        for (k, input) in self.cases.inputs.iter().enumerate() {
            if let InputTarget::SteamToCarbon { unit } = &input.target {
                let target = self
                    .flowsheet
                    .steam_to_carbon_target(self.db, unit, si[k], steam_feed)
                    .map_err(|e| e.context(format!("setting {}", input.path)))?;
                self.ratio_targets.push((k, target));
            }
        }
        Ok(self)
    }

    /// Write these result paths (of `flowsheet`'s results) for every case.
    pub fn columns(mut self, columns: Vec<ResultPath>) -> Sweep<'a> {
        self.columns = columns;
        self
    }

    /// A solution to lay the result columns out from: the flowsheet as written, or where that
    /// fails, the first of the first 64 cases of the whole list that solves (the same for every
    /// slice of the list); the error of the flowsheet as written when none does.
    pub fn reference(&self) -> Result<FlowsheetResult> {
        let defaults = self.base.clone();
        let mut st = self.thread_state(&defaults);
        st.params.copy_from_slice(&defaults);
        let first_error = match self.flowsheet.solve_targets_in(
            self.db,
            &mut st.params,
            &[],
            &mut st.ws,
            &mut st.outcomes,
        ) {
            Ok(result) => return Ok(result.clone()),
            Err(e) => e,
        };
        for i in 0..self.cases.len().min(64) {
            self.cases.case(i, &mut st.shown, &mut st.si);
            st.ws.forget();
            if let Ok(result) = self.solve_case(&mut st, &defaults) {
                return Ok(result.clone());
            }
        }
        Err(first_error)
    }

    /// Run only this slice of the case list.
    pub fn shard(mut self, shard: Option<Shard>) -> Sweep<'a> {
        self.shard = shard;
        self
    }

    /// Keep these results of every case in memory (for a chart or percentiles).
    pub fn keep(mut self, keep: Vec<ResultPath>) -> Sweep<'a> {
        self.keep = keep;
        self
    }

    /// The CSV header: input paths, `status`, `warnings`, result paths.
    pub fn header(&self) -> Vec<String> {
        let mut h: Vec<String> = self.cases.inputs.iter().map(|i| i.path.clone()).collect();
        h.push("status".into());
        h.push("warnings".into());
        h.extend(self.columns.iter().map(|c| c.path.clone()));
        h
    }

    /// Solve every case (of the shard) and write the header and one row per case to `out`.
    /// An error writing ends the run with that error; a stop asked by the observer ends it with
    /// `interrupted` set, after the rows already made are written.
    pub fn run<W: Write + Send>(&self, out: W, observer: &dyn Observer) -> Result<SweepOutcome> {
        let len = self.cases.len();
        let (start, end) = self.shard.map_or((0, len), |s| s.range(len));
        let mut outcome = SweepOutcome {
            cases: end - start,
            ..SweepOutcome::default()
        };
        let mut writer = csv::WriterBuilder::new()
            .terminator(csv::Terminator::Any(b'\n'))
            .from_writer(out);
        writer.write_record(self.header()).map_err(csv_error)?;
        writer.flush().map_err(io_error)?;
        let (first_block, end_block) = (start / BLOCK, end.div_ceil(BLOCK));
        let stop_writing = AtomicBool::new(false);
        let defaults = self.base.clone();
        // One state per worker thread for the whole run (its workspace, caches and row room
        // made once), rather than one per piece of work the thread pool splits off.
        let states: Vec<Mutex<Option<ThreadState>>> = (0..rayon::current_num_threads().max(1))
            .map(|_| Mutex::new(None))
            .collect();
        // Row buffers written out, handed back to the threads (no new room to zero).
        let spare_rooms: Mutex<Vec<Vec<u8>>> = Mutex::new(Vec::new());
        let spare_rooms = &spare_rooms;
        std::thread::scope(|scope| -> Result<()> {
            let (tx, rx) = sync_channel::<Vec<BlockOut>>(1);
            let stop = &stop_writing;
            let writing = scope.spawn(move || -> Result<(u64, u64, u64, Kept, W)> {
                let mut inner = writer.into_inner().map_err(|e| io_error(e.into_error()))?;
                let (mut rows, mut failed, mut warned) = (0u64, 0u64, 0u64);
                let mut kept = Kept::default();
                for chunk in rx {
                    // One vectored write for the chunk: a buffered writer hands a chunk larger
                    // than its buffer straight to the file instead of copying it in.
                    let mut slices: Vec<IoSlice<'_>> =
                        chunk.iter().map(|b| IoSlice::new(&b.bytes)).collect();
                    if let Err(e) = write_all_vectored(&mut inner, &mut slices) {
                        stop.store(true, Ordering::Relaxed);
                        return Err(io_error(e));
                    }
                    drop(slices);
                    let mut spare = spare_rooms.lock().unwrap_or_else(|e| e.into_inner());
                    for block in chunk {
                        if spare.len() < SPARE_ROOMS {
                            spare.push(block.bytes);
                        }
                        rows += block.rows;
                        failed += block.failed;
                        warned += block.warned;
                        kept.inputs.extend(block.kept.inputs);
                        kept.results.extend(block.kept.results);
                    }
                    if let Err(e) = inner.flush() {
                        stop.store(true, Ordering::Relaxed);
                        return Err(io_error(e));
                    }
                    observer.advanced(rows);
                }
                Ok((rows, failed, warned, kept, inner))
            });
            let mut block = first_block;
            while block < end_block {
                if observer.stop_requested() || stop_writing.load(Ordering::Relaxed) {
                    break;
                }
                let upto = (block + CHUNK_BLOCKS).min(end_block);
                let chunk: Vec<BlockOut> = (block..upto)
                    .into_par_iter()
                    .map(|b| {
                        let slot = rayon::current_thread_index().unwrap_or(0) % states.len();
                        let mut state = states[slot].lock().unwrap_or_else(|e| e.into_inner());
                        let state = state.get_or_insert_with(|| self.thread_state(&defaults));
                        let room = spare_rooms
                            .lock()
                            .unwrap_or_else(|e| e.into_inner())
                            .pop()
                            .unwrap_or_default();
                        self.run_block(state, &defaults, b, start, end, room)
                    })
                    .collect();
                if tx.send(chunk).is_err() {
                    break;
                }
                block = upto;
            }
            drop(tx);
            let (rows, failed, warned, kept, _) =
                writing.join().map_err(|_| Error::Flowsheet {
                    reason: "the thread writing the sweep's rows stopped unexpectedly".into(),
                })??;
            outcome.written = rows;
            outcome.failed = failed;
            outcome.with_warnings = warned;
            outcome.kept = kept;
            Ok(())
        })?;
        outcome.interrupted = outcome.written < outcome.cases;
        Ok(outcome)
    }

    fn thread_state(&self, defaults: &[f64]) -> ThreadState {
        let n = self.cases.inputs.len();
        ThreadState {
            ws: self.flowsheet.workspace(self.db),
            params: defaults.to_vec(),
            shown: vec![0.0; n],
            si: vec![0.0; n],
            codes: Vec::new(),
            joined: String::new(),
            extra: self.ratio_targets.iter().map(|(_, t)| t.clone()).collect(),
            outcomes: Vec::new(),
            cache: vec![CachedNumber::default(); self.columns.len()],
            reader: Reader::default(),
            row: RowWriter::new(),
        }
    }

    /// Solve block `b` (cases from its start, so warm starts are those of the whole list) and
    /// write the rows of the cases within `[start, end)`.
    fn run_block(
        &self,
        st: &mut ThreadState,
        defaults: &[f64],
        b: u64,
        start: u64,
        end: u64,
        room: Vec<u8>,
    ) -> BlockOut {
        let first = b * BLOCK;
        let (lo, hi) = (first.max(start), ((b + 1) * BLOCK).min(end));
        let mut out = BlockOut {
            bytes: Vec::new(),
            rows: 0,
            failed: 0,
            warned: 0,
            kept: Kept::default(),
        };
        st.row
            .begin(room, (hi - lo) as usize * (self.columns.len() + 8) * 14);
        st.ws.forget();
        for i in first..hi {
            self.cases.case(i, &mut st.shown, &mut st.si);
            let solved = self.solve_case(st, defaults).map(|_| ());
            if solved.is_err() {
                st.ws.forget();
            }
            if i < lo {
                continue;
            }
            let ThreadState {
                ws,
                shown,
                codes,
                joined,
                cache,
                reader,
                row,
                ..
            } = st;
            let solved = solved.as_ref().map(|()| ws.result());
            self.write_row(row, shown, solved, codes, joined, cache, reader, &mut out);
            out.rows += 1;
        }
        out.bytes = st.row.finish();
        out
    }

    fn solve_case<'w>(
        &self,
        st: &'w mut ThreadState,
        defaults: &[f64],
    ) -> Result<&'w FlowsheetResult> {
        st.params.copy_from_slice(defaults);
        for (input, si) in self.cases.inputs.iter().zip(&st.si) {
            if let InputTarget::Slot(p, _) = &input.target {
                st.params[p.0] = *si;
            }
        }
        for ((k, _), target) in self.ratio_targets.iter().zip(&mut st.extra) {
            target.set_equals(st.si[*k]);
        }
        self.flowsheet.solve_targets_in(
            self.db,
            &mut st.params,
            &st.extra,
            &mut st.ws,
            &mut st.outcomes,
        )
    }

    #[allow(clippy::too_many_arguments)]
    fn write_row(
        &self,
        row: &mut RowWriter,
        shown: &[f64],
        solved: std::result::Result<&FlowsheetResult, &Error>,
        codes: &mut Vec<&'static str>,
        joined: &mut String,
        cache: &mut [CachedNumber],
        reader: &mut Reader,
        out: &mut BlockOut,
    ) {
        for v in shown {
            row.number(*v);
        }
        out.kept.inputs.extend_from_slice(shown);
        match solved {
            Ok(result) => {
                row.text("ok");
                codes.clear();
                for w in &result.warnings {
                    if !codes.contains(&w.code) {
                        codes.push(w.code);
                    }
                }
                if !codes.is_empty() {
                    out.warned += 1;
                }
                joined.clear();
                for (i, code) in codes.iter().enumerate() {
                    if i > 0 {
                        joined.push(';');
                    }
                    joined.push_str(code);
                }
                row.text(joined);
                reader.start(result);
                let values = self
                    .columns
                    .iter()
                    .map(|c| reader.get(self.db, result, c).unwrap_or(f64::NAN));
                row.cached_numbers(values, cache);
                for k in &self.keep {
                    out.kept
                        .results
                        .push(k.get(self.db, result).unwrap_or(f64::NAN));
                }
            }
            Err(e) => {
                out.failed += 1;
                row.text(&one_line(e));
                row.text("");
                for _ in &self.columns {
                    row.number(f64::NAN);
                }
                out.kept
                    .results
                    .extend(std::iter::repeat_n(f64::NAN, self.keep.len()));
            }
        }
        row.end();
    }
}

/// An error and its causes on one line.
pub fn one_line(e: &Error) -> String {
    let mut text = e.to_string();
    let mut source = std::error::Error::source(e);
    while let Some(s) = source {
        text.push_str(": ");
        text.push_str(&s.to_string());
        source = s.source();
    }
    text.replace(['\n', '\r'], " ")
}

/// Write every byte of `slices` (`Write::write_all` for vectored writes).
fn write_all_vectored<W: Write>(
    out: &mut W,
    mut slices: &mut [IoSlice<'_>],
) -> std::io::Result<()> {
    IoSlice::advance_slices(&mut slices, 0);
    while !slices.is_empty() {
        match out.write_vectored(slices) {
            Ok(0) => return Err(std::io::ErrorKind::WriteZero.into()),
            Ok(n) => IoSlice::advance_slices(&mut slices, n),
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
            Err(e) => return Err(e),
        }
    }
    Ok(())
}

fn io_error(e: std::io::Error) -> Error {
    Error::Io {
        action: "writing",
        path: "the sweep's rows".into(),
        source: e,
    }
}

fn csv_error(e: csv::Error) -> Error {
    match e.into_kind() {
        csv::ErrorKind::Io(e) => io_error(e),
        other => io_error(std::io::Error::other(format!("{other:?}"))),
    }
}
