//! `syntrain evaluate`: laboratory samples of reactor outlets held against equilibrium.

use std::path::{Path, PathBuf};

use syntrain::evaluate::{self, Limit, Options};
use syntrain::flowsheet::Flowsheet;
use syntrain::report::evaluate::{render, EvaluateFormat};
use syntrain::thermo::SpeciesDb;

/// Output form of `evaluate`.
#[derive(Clone, Copy, clap::ValueEnum)]
pub enum Format {
    Table,
    Json,
    Csv,
}

/// Hold laboratory samples of reactor outlets against equilibrium: the approach temperature of
/// each reaction, the fit of each analysis, and with dated samples the trend of each approach
/// and when a limit is crossed if it goes on (an extrapolation).
#[derive(clap::Args)]
pub struct EvaluateArgs {
    /// The flowsheet the samples were taken from.
    pub file: PathBuf,
    /// The samples (CSV; see flowsheets/samples-template.csv).
    #[arg(long, value_name = "SAMPLES.csv")]
    pub samples: PathBuf,
    /// Report form: text for a terminal, one JSON object, or one CSV row per sample.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
    /// Draw approach against sample date with each trend and its band (SVG).
    #[arg(long, value_name = "SVG")]
    pub plot: Option<PathBuf>,
    /// Write the report to a file (atomically; never over the flowsheet or the samples).
    #[arg(long, short = 'o', value_name = "PATH")]
    pub output: Option<PathBuf>,
    /// Analyser accuracy of a species, absolute mol % dry (repeatable): CO=0.01.
    #[arg(long, value_name = "SPECIES=ABS_MOL_PCT")]
    pub accuracy: Vec<String>,
    /// Forecast when a result crosses a limit along the trends: 'streams.lts-exit.dry_mol_pct.CO>0.40'.
    #[arg(long, value_name = "RESULT-PATH>VALUE")]
    pub limit: Option<String>,
    /// How far past the last sample the forecast looks, days.
    #[arg(long, default_value_t = 3650.0, value_name = "DAYS")]
    pub horizon_days: f64,
    /// Exit with status 3 when any sample gives a warning (the report is still written).
    #[arg(long)]
    pub strict: bool,
}

/// Run the command; the report text for standard output (empty when written to a file).
pub fn run(
    args: EvaluateArgs,
    db: &SpeciesDb,
    species_file: Option<&Path>,
) -> syntrain::Result<(String, Vec<String>, usize)> {
    let flowsheet = Flowsheet::from_file(&args.file, db)?;
    let text = std::fs::read_to_string(&args.samples).map_err(|source| syntrain::Error::Io {
        action: "reading",
        path: args.samples.clone(),
        source,
    })?;
    let samples =
        evaluate::samples::read(db, &flowsheet, &args.samples.display().to_string(), &text)?;
    let mut options = Options {
        horizon_days: args.horizon_days,
        ..Options::default()
    };
    if !(args.horizon_days > 0.0 && args.horizon_days <= 36_525.0) {
        return Err(syntrain::Error::InvalidValue {
            field: "--horizon-days".into(),
            value: args.horizon_days.to_string(),
            reason: "must be between 0 and 36525 days".into(),
        });
    }
    for a in &args.accuracy {
        options.add_accuracy(db, a)?;
    }
    options.limit = args.limit.as_deref().map(Limit::parse).transpose()?;
    let evaluation = evaluate::evaluate(db, &flowsheet, &samples, &options)?;
    let format = match args.format {
        Format::Table => EvaluateFormat::Table,
        Format::Json => EvaluateFormat::Json,
        Format::Csv => EvaluateFormat::Csv,
    };
    let report = render(db, &evaluation, format)?;
    let warned: usize = evaluation.samples.iter().map(|s| s.warnings.len()).sum();
    let plot = args
        .plot
        .as_ref()
        .map(|_| evaluate::plot::svg(&evaluation))
        .transpose()?;
    let mut inputs: Vec<&Path> = vec![&args.file, &args.samples];
    inputs.extend(species_file);
    let mut notes = Vec::new();
    if let (Some(path), Some(svg)) = (&args.plot, &plot) {
        syntrain::report::write_output(path, svg, &inputs)?;
        notes.push(format!("wrote {}", path.display()));
    }
    match &args.output {
        Some(path) => {
            syntrain::report::write_output(path, &report, &inputs)?;
            notes.push(format!("wrote {}", path.display()));
            Ok((String::new(), notes, warned))
        }
        None => Ok((report, notes, warned)),
    }
}
