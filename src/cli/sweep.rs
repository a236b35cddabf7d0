//! `syntrain sweep`: read the study from the command line, run it through the library's sweep
//! runner, and show progress (a bar on a terminal's stderr, nothing otherwise), the spread of
//! the results and a chart.

use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

use indicatif::{ProgressBar, ProgressDrawTarget, ProgressStyle};

use syntrain::flowsheet::{Flowsheet, ResultPath};
use syntrain::report;
use syntrain::study::cases::CaseList;
use syntrain::study::columns;
use syntrain::study::overlay;
use syntrain::study::percentiles::spread;
use syntrain::study::plot::{self, Chart, Panel};
use syntrain::study::sweep::{Observer, Shard, Sweep};
use syntrain::study::vary::parse_vary;
use syntrain::thermo::SpeciesDb;
use syntrain::{Error, Result};

/// What `sweep` was asked.
#[derive(clap::Args)]
pub struct SweepArgs {
    /// The flowsheet file (YAML).
    pub file: PathBuf,
    /// An input to vary: PATH=FROM..TO:COUNT (e.g. 'units.hts.approach.shift=0 K..40 K:9'),
    /// PATH=V1,V2,..., or with --draws PATH~normal(MEAN,SD), PATH~uniform(A,B),
    /// PATH~triangular(A,MODE,B). Repeat for a full grid (the last varies fastest).
    /// PATH may be units.NAME.steam-to-carbon (met by scaling the steam feed).
    #[arg(long, value_name = "SETTING")]
    pub vary: Vec<String>,
    /// Cases from a CSV file: a header of input paths, one row per case, values with units.
    #[arg(long, value_name = "FILE.csv")]
    pub cases: Option<PathBuf>,
    /// Monte Carlo: this many random draws of the --vary distributions.
    #[arg(long, value_name = "N")]
    pub draws: Option<u64>,
    /// Seed of the random draws (the same seed gives the same draws on any thread count).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Only these result columns: paths or patterns with * (comma-separated).
    #[arg(long, value_name = "PATH,...")]
    pub columns: Option<String>,
    /// Write the CSV here (row by row) instead of standard output.
    #[arg(long, short = 'o', value_name = "FILE.csv")]
    pub output: Option<PathBuf>,
    /// Draw the --y results against the first varied input into this SVG file.
    #[arg(long, value_name = "FILE.svg")]
    pub plot: Option<PathBuf>,
    /// A result to chart or summarise (repeatable); default: the CO slip at the last shift
    /// outlet.
    #[arg(long, value_name = "RESULT-PATH")]
    pub y: Vec<String>,
    /// Run only slice K of N equal slices of the case list (for a batch scheduler).
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// The feed scaled to set a steam-to-carbon ratio.
    #[arg(long, value_name = "NAME")]
    pub steam_feed: Option<String>,
    /// Exit with status 3 when a case failed or gave a warning.
    #[arg(long)]
    pub strict: bool,
    /// Print P10, P50 and P90 (with mean, min, max) of the --y results.
    #[arg(long)]
    pub summary: bool,
    /// Threads to use (default: all cores).
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,
}

/// How a sweep ended, for the exit code.
pub enum Ending {
    /// Every case ran (and, with --strict, none failed or warned).
    Done,
    /// Interrupted: the message says so.
    Incomplete(String),
    /// --strict found failed cases or warnings (exit status 3, as `solve --strict`).
    Strict(String),
}

/// Progress bar and Ctrl-C flag.
struct Watch {
    bar: Option<ProgressBar>,
    stop: Arc<AtomicBool>,
}

impl Observer for Watch {
    fn advanced(&self, done: u64) {
        if let Some(bar) = &self.bar {
            bar.set_position(done);
        }
    }
    fn stop_requested(&self) -> bool {
        self.stop.load(Ordering::Relaxed)
    }
}

/// Run `sweep`. Messages for the user go to stderr; the CSV to the output or stdout.
pub fn run(args: SweepArgs, db: &SpeciesDb, species_file: Option<&Path>) -> Result<Ending> {
    let text = std::fs::read_to_string(&args.file).map_err(|source| Error::Io {
        action: "reading",
        path: args.file.clone(),
        source,
    })?;
    // A flowsheet, or an overlay of one (its changes are where every case starts).
    let (flowsheet, base, files) = if overlay::is_overlay(&text) {
        let case = overlay::load(db, &args.file)?;
        (case.flowsheet, case.parameters, case.files)
    } else {
        let flowsheet = Flowsheet::from_yaml_str(&args.file.display().to_string(), &text, db)?;
        let base = flowsheet.parameters();
        (flowsheet, base, vec![args.file.clone()])
    };
    let cases = case_list(&args, &flowsheet)?;
    let shard = args.shard.as_deref().map(Shard::parse).transpose()?;
    let sweep = Sweep::new(&flowsheet, db, &cases)
        .shard(shard)
        .base(base)
        .steam_feed(args.steam_feed.as_deref())?;
    let reference = sweep.reference()?;
    let columns = match &args.columns {
        Some(list) => {
            let items: Vec<String> = list.split(',').map(str::to_string).collect();
            columns::select(db, &reference, &items)?
        }
        None => columns::default_columns(db, &reference),
    };
    let kept: Vec<ResultPath> = if args.plot.is_some() || args.summary {
        if args.y.is_empty() {
            vec![columns::last_co_slip(db, &reference)?]
        } else {
            args.y
                .iter()
                .map(|p| reference.resolve(db, p.trim()))
                .collect::<Result<_>>()?
        }
    } else {
        Vec::new()
    };
    if args.plot.is_some() && cases.is_draws() && cases.inputs.is_empty() {
        return Err(invalid(
            "--plot",
            "",
            "there is no varied input to draw against",
        ));
    }
    let sweep = sweep.columns(columns).keep(kept.clone());

    let mut inputs: Vec<&Path> = files.iter().map(PathBuf::as_path).collect();
    inputs.extend(species_file);
    inputs.extend(args.cases.as_deref());
    let total = shard.map_or(cases.len(), |s| {
        let (a, b) = s.range(cases.len());
        b - a
    });
    let stop = Arc::new(AtomicBool::new(false));
    let flag = stop.clone();
    // Without a handler (one was set already) Ctrl-C ends the process as usual.
    let _ = ctrlc::set_handler(move || flag.store(true, Ordering::Relaxed));
    let bar = std::io::stderr().is_terminal().then(|| {
        let bar = ProgressBar::with_draw_target(Some(total), ProgressDrawTarget::stderr());
        if let Ok(style) = ProgressStyle::with_template(
            "{elapsed_precise} [{wide_bar}] {pos}/{len} cases, {per_sec}, {eta} left",
        ) {
            bar.set_style(style);
        }
        bar
    });
    let watch = Watch { bar, stop };

    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(args.threads.unwrap_or(0))
        .build()
        .map_err(|e| invalid("--threads", "", &e.to_string()))?;
    let outcome = match &args.output {
        Some(path) => {
            let file = report::create_streaming(path, &inputs)?;
            let out = std::io::BufWriter::with_capacity(1 << 20, file);
            pool.install(|| sweep.run(out, &watch))
                .map_err(|e| e.context(format!("writing '{}'", path.display())))?
        }
        None => {
            let out = std::io::BufWriter::with_capacity(1 << 20, std::io::stdout());
            match pool.install(|| sweep.run(out, &watch)) {
                Err(Error::Io { source, .. })
                    if source.kind() == std::io::ErrorKind::BrokenPipe =>
                {
                    return Ok(Ending::Done);
                }
                other => other?,
            }
        }
    };
    if let Some(bar) = &watch.bar {
        bar.finish_and_clear();
    }

    let mut notes = Vec::new();
    if args.summary {
        let n = kept.len();
        let rows: Vec<_> = kept
            .iter()
            .enumerate()
            .map(|(k, p)| {
                let values: Vec<f64> = outcome
                    .kept
                    .results
                    .iter()
                    .skip(k)
                    .step_by(n)
                    .copied()
                    .collect();
                (
                    p.path.clone(),
                    columns::unit_of(&reference, p),
                    spread(&values),
                )
            })
            .collect();
        let text = report::spread::table(&rows, outcome.written, outcome.failed);
        if args.output.is_some() {
            print(&text)?;
        } else {
            let _ = write!(std::io::stderr(), "{text}");
        }
    }
    if let Some(path) = &args.plot {
        let chart = Chart {
            title: flowsheet.title().to_string(),
            inputs: cases
                .inputs
                .iter()
                .map(|i| (i.path.clone(), i.unit.name.clone()))
                .collect(),
            panels: kept
                .iter()
                .map(|p| Panel {
                    path: p.path.clone(),
                    unit: columns::unit_of(&reference, p),
                })
                .collect(),
            points: cases.is_draws(),
        };
        let svg = plot::svg(&chart, &outcome.kept.inputs, &outcome.kept.results)?;
        report::write_output(path, &svg, &inputs)?;
        notes.push(format!("chart in {}", path.display()));
    }
    let target = args
        .output
        .as_ref()
        .map_or("standard output".to_string(), |p| p.display().to_string());
    let counts = format!(
        "{} of {} cases written to {target} ({} failed, {} with warnings)",
        outcome.written, outcome.cases, outcome.failed, outcome.with_warnings
    );
    notes.insert(0, counts.clone());
    let _ = writeln!(std::io::stderr(), "{}", notes.join("; "));
    if outcome.interrupted {
        return Ok(Ending::Incomplete(format!(
            "interrupted: {counts}; the CSV holds the rows finished"
        )));
    }
    if args.strict && (outcome.failed > 0 || outcome.with_warnings > 0) {
        return Ok(Ending::Strict(format!(
            "--strict: {} failed cases and {} cases with warnings",
            outcome.failed, outcome.with_warnings
        )));
    }
    Ok(Ending::Done)
}

/// The case list the arguments describe.
fn case_list(args: &SweepArgs, flowsheet: &Flowsheet) -> Result<CaseList> {
    if let Some(path) = &args.cases {
        if !args.vary.is_empty() || args.draws.is_some() {
            return Err(invalid(
                "--cases",
                &path.display().to_string(),
                "give the cases in a file or with --vary/--draws, not both",
            ));
        }
        let text = std::fs::read_to_string(path).map_err(|source| Error::Io {
            action: "reading",
            path: path.clone(),
            source,
        })?;
        return CaseList::from_table(flowsheet, &path.display().to_string(), &text);
    }
    if args.vary.is_empty() {
        return Err(invalid(
            "--vary",
            "",
            "give at least one --vary (e.g. --vary 'units.hts.approach.shift=0 K..40 K:9') or \
             --cases FILE.csv",
        ));
    }
    let varies = args
        .vary
        .iter()
        .map(|v| parse_vary(flowsheet, v))
        .collect::<Result<Vec<_>>>()?;
    match args.draws {
        Some(n) => CaseList::draws(varies, n, args.seed),
        None => CaseList::grid(varies),
    }
}

fn print(text: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(Error::Io {
            action: "writing",
            path: "standard output".into(),
            source: e,
        }),
        _ => Ok(()),
    }
}

fn invalid(field: &str, value: &str, reason: &str) -> Error {
    Error::InvalidValue {
        field: field.to_string(),
        value: value.to_string(),
        reason: reason.to_string(),
    }
}
