//! The `syntrain` command line: parse, call the library, print. Exit code 0 on success (also
//! when the reader of standard output closes the pipe early, as in `syntrain species | head`:
//! the run ends quietly, like other Unix tools), 1 on any error (the whole error chain is printed
//! once to stderr; a failed write to standard output is such an error), 2 for a usage error
//! (clap), 3 for a run that solved but gave warnings under `--strict` (solve, compare, sweep:
//! the report is written in full, and a line on standard error counts the warnings).

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

mod cli;

use syntrain::report;
use syntrain::report::species as species_report;
use syntrain::thermo::SpeciesDb;

/// Shown under every help page.
/// Exit status of a run that solved but gave warnings under `--strict`.
const STRICT_EXIT: u8 = 3;

const CAUTION: &str = "Screening results only: hot hydrogen and carbon monoxide at pressure are \
flammable and toxic. Follow local codes and licensed engineering practice.";

/// Equilibrium and energy balances of steam-reforming hydrogen and syngas trains.
#[derive(Parser)]
#[command(
    name = "syntrain",
    version,
    about,
    long_about = None,
    after_help = CAUTION,
    after_long_help = CAUTION
)]
struct Cli {
    /// Extra species records to add to the shipped database (same format as data/species.yaml).
    #[arg(long, global = true, value_name = "FILE")]
    species_file: Option<PathBuf>,
    #[command(subcommand)]
    command: Command,
}

#[derive(Clone, Copy, ValueEnum)]
enum SpeciesFormat {
    Table,
    Json,
}

/// Output formats of `solve`.
#[derive(Clone, Copy, ValueEnum)]
enum SolveFormat {
    /// Plain-text tables for a terminal.
    Table,
    /// One JSON object with stable keys.
    Json,
    /// The stream table as CSV (one line per stream).
    Csv,
    /// The tables in GitHub-flavoured Markdown.
    Markdown,
}

impl From<SolveFormat> for report::Format {
    fn from(format: SolveFormat) -> report::Format {
        match format {
            SolveFormat::Table => report::Format::Table,
            SolveFormat::Json => report::Format::Json,
            SolveFormat::Csv => report::Format::Csv,
            SolveFormat::Markdown => report::Format::Markdown,
        }
    }
}

#[derive(Subcommand)]
enum Command {
    /// Solve a flowsheet file: stream table, units, summary, warnings and cautions.
    #[command(after_help = CAUTION, after_long_help = CAUTION)]
    Solve {
        /// The flowsheet file (YAML), e.g. flowsheets/demo-train.yaml.
        file: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: SolveFormat,
        /// Write the report to this file instead of standard output. Nothing is written on an
        /// error; a regular file is replaced atomically (keeping its permissions), a symbolic
        /// link is followed, a FIFO or device is written into, an input file is refused.
        #[arg(long, short = 'o', value_name = "PATH")]
        output: Option<PathBuf>,
        /// Exit with status 3 when the solve gives any warning (the report is still written).
        #[arg(long)]
        strict: bool,
    },
    /// Solve a flowsheet for many cases (a grid of --vary values, a cases file, or random
    /// draws) and write one CSV row per case, in case order.
    #[command(after_help = CAUTION, after_long_help = CAUTION)]
    Sweep(Box<cli::sweep::SweepArgs>),
    /// Compare revamp options with a base side by side: hydrogen made, slips, temperatures,
    /// duties, and each option's change. An option is a flowsheet or an overlay of one.
    #[command(after_help = CAUTION, after_long_help = CAUTION)]
    Compare(CompareArgs),
    #[command(after_help = CAUTION, after_long_help = CAUTION)]
    Evaluate(Box<cli::evaluate::EvaluateArgs>),
    /// List the unit types a flowsheet can use, with their inlets, outlets and keys, or show one.
    #[command(name = "unit-types", after_help = CAUTION, after_long_help = CAUTION)]
    UnitTypes {
        /// A unit type (e.g. shift); omit to list all.
        name: Option<String>,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: SpeciesFormat,
    },
    /// List the species database, or show one record with its properties.
    #[command(after_help = CAUTION, after_long_help = CAUTION)]
    Species {
        /// A species name (e.g. CH4, n-C4H10, "C(gr)"); omit to list all.
        name: Option<String>,
        /// Temperatures at which to show Cp, H, S, G (e.g. "850 degC", "1100 K"); repeatable.
        /// Without a species name, one table of every species at these temperatures.
        #[arg(long = "temperature", short = 't', value_name = "T")]
        temperatures: Vec<String>,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: SpeciesFormat,
    },
}

/// Output formats of `compare`.
#[derive(Clone, Copy, ValueEnum)]
enum CompareFormat {
    /// One column per flowsheet, change rows under each figure, for a terminal.
    Table,
    /// One object: base and options with their summary, units, change and change_pct.
    Json,
    /// One row per figure: base, options, each option's change and % change.
    Csv,
    /// The table in GitHub-flavoured Markdown.
    Markdown,
}

/// Arguments of `compare`.
#[derive(clap::Args)]
struct CompareArgs {
    /// The base flowsheet, then one or more options (flowsheets or overlays with `base:`).
    #[arg(required = true, num_args = 2.., value_name = "FILE")]
    files: Vec<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value = "table")]
    format: CompareFormat,
    /// Write the report to this file instead of standard output (as `solve --output`); no
    /// input of the run (base, options and the bases they pull in) is overwritten.
    #[arg(long, short = 'o', value_name = "PATH")]
    output: Option<PathBuf>,
    /// Uncertainty: solve base and options for this many random draws of the --vary
    /// distributions (the same draws for all) and report P10/P50/P90 of each change.
    #[arg(long, value_name = "N")]
    draws: Option<u64>,
    /// An uncertain input: PATH~normal(MEAN,SD), PATH~uniform(A,B) or
    /// PATH~triangular(A,MODE,B), each number with its unit; repeatable (with --draws).
    #[arg(long, value_name = "PATH~DIST")]
    vary: Vec<String>,
    /// Seed of the random draws.
    #[arg(long, default_value_t = 1)]
    seed: u64,
    /// Exit with status 3 when the base or an option gives any warning (the report is still
    /// written).
    #[arg(long)]
    strict: bool,
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    if let Command::Sweep(args) = cli.command {
        return sweep(cli.species_file, *args);
    }
    match run(cli) {
        Ok((text, None)) => print_stdout(&text),
        Ok((text, Some(strict))) => {
            let printed = print_stdout(&text);
            if printed != ExitCode::SUCCESS {
                return printed;
            }
            report_error(&format!("error: --strict: {strict}"));
            ExitCode::from(STRICT_EXIT)
        }
        Err(err) => {
            report_error(&syntrain::report::error_chain(&err));
            ExitCode::FAILURE
        }
    }
}

/// Write the report to standard output through a buffer. A reader that went away (closed pipe)
/// ends the run quietly with success; any other failure (a full disk, say) is an error.
fn print_stdout(text: &str) -> ExitCode {
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    match out.write_all(text.as_bytes()).and_then(|()| out.flush()) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            // The buffer still holds what could not be written; drop it without a second try.
            let (_, _) = out.into_parts();
            report_error(&format!("error: writing standard output\n  caused by: {e}"));
            ExitCode::FAILURE
        }
    }
}

/// A line on standard error; if even that fails there is no one left to tell.
fn report_error(text: &str) {
    let _ = writeln!(std::io::stderr(), "{text}");
}

fn database(file: Option<&PathBuf>) -> syntrain::Result<SpeciesDb> {
    match file {
        Some(path) => SpeciesDb::embedded_with_file(path),
        None => SpeciesDb::embedded(),
    }
}

/// `sweep` streams its rows itself and ends with its own exit code.
fn sweep(species_file: Option<PathBuf>, args: cli::sweep::SweepArgs) -> ExitCode {
    let ran = database(species_file.as_ref())
        .and_then(|db| cli::sweep::run(args, &db, species_file.as_deref()));
    match ran {
        Ok(cli::sweep::Ending::Done) => ExitCode::SUCCESS,
        Ok(cli::sweep::Ending::Incomplete(message)) => {
            report_error(&format!("error: {message}"));
            ExitCode::FAILURE
        }
        Ok(cli::sweep::Ending::Strict(message)) => {
            report_error(&format!("error: {message}"));
            ExitCode::from(STRICT_EXIT)
        }
        Err(err) => {
            report_error(&syntrain::report::error_chain(&err));
            ExitCode::FAILURE
        }
    }
}

/// The warnings that `--strict` turns into exit status 3, counted in one line; `None` when
/// there are none.
fn strict_note(count: usize) -> Option<String> {
    (count > 0).then(|| format!("{count} warning(s); see the Warnings of the report"))
}

/// The report text, and with `--strict` the note of the warnings found.
fn run(cli: Cli) -> syntrain::Result<(String, Option<String>)> {
    let db = database(cli.species_file.as_ref())?;
    match cli.command {
        Command::Solve {
            file,
            format,
            output,
            strict,
        } => {
            // A flowsheet, or an overlay of one (solved with its changes).
            let case = syntrain::study::overlay::load(&db, &file)?;
            let result = case.flowsheet.solve_with(&db, &case.parameters, None)?;
            let note = strict.then(|| strict_note(result.warnings.len())).flatten();
            // Render completely before writing, so an error leaves no partial file.
            let text = report::render_solution(&db, &result, format.into())?;
            match output {
                Some(path) => {
                    let mut inputs: Vec<&Path> = case.files.iter().map(PathBuf::as_path).collect();
                    inputs.extend(cli.species_file.as_deref());
                    report::write_output(&path, &text, &inputs)?;
                    report_error(&format!("wrote {}", path.display()));
                    Ok((String::new(), note))
                }
                None => Ok((text, note)),
            }
        }
        Command::Sweep(_) => Ok((String::new(), None)),
        Command::Evaluate(args) => {
            let strict = args.strict;
            let (text, notes, warned) =
                cli::evaluate::run(*args, &db, cli.species_file.as_deref())?;
            for note in notes {
                report_error(&note);
            }
            Ok((text, strict.then(|| strict_note(warned)).flatten()))
        }
        Command::Compare(args) => {
            let solved = syntrain::study::compare::solve_all(&db, &args.files)?;
            let warned: usize = solved.iter().map(|s| s.result.warnings.len()).sum();
            let note = args.strict.then(|| strict_note(warned)).flatten();
            let format = match args.format {
                CompareFormat::Table => report::Format::Table,
                CompareFormat::Json => report::Format::Json,
                CompareFormat::Csv => report::Format::Csv,
                CompareFormat::Markdown => report::Format::Markdown,
            };
            let text = match args.draws {
                Some(n) => {
                    let outcome = syntrain::study::uncertainty::compare_draws(
                        &db, &solved, &args.vary, n, args.seed,
                    )?;
                    report::spread::changes(&outcome, args.seed, format)?
                }
                None if !args.vary.is_empty() => {
                    return Err(syntrain::Error::InvalidValue {
                        field: "--vary".into(),
                        value: args.vary.join(" "),
                        reason: "uncertain inputs need --draws N".into(),
                    })
                }
                None => report::compare::render(&solved, format)?,
            };
            match args.output {
                Some(path) => {
                    let mut inputs: Vec<&Path> = solved
                        .iter()
                        .flat_map(|s| s.case.files.iter().map(PathBuf::as_path))
                        .collect();
                    inputs.extend(cli.species_file.as_deref());
                    report::write_output(&path, &text, &inputs)?;
                    report_error(&format!("wrote {}", path.display()));
                    Ok((String::new(), note))
                }
                None => Ok((text, note)),
            }
        }
        Command::UnitTypes { name, format } => Ok((
            match format {
                SpeciesFormat::Table => syntrain::report::unit_types::table(name.as_deref())?,
                SpeciesFormat::Json => syntrain::report::unit_types::json(name.as_deref())?,
            },
            None,
        )),
        Command::Species {
            name,
            temperatures,
            format,
        } => {
            let temperatures_k = temperatures
                .iter()
                .map(|t| syntrain::quantity::parse_temperature("--temperature", t))
                .collect::<syntrain::Result<Vec<f64>>>()?;
            let text = match format {
                SpeciesFormat::Table => {
                    species_report::table(&db, name.as_deref(), &temperatures_k)?
                }
                SpeciesFormat::Json => species_report::json(&db, name.as_deref(), &temperatures_k)?,
            };
            Ok((text, None))
        }
    }
}
