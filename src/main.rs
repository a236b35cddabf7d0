//! The `syntrain` command line: parse, call the library, print. Exit code 0 on success, 1 on
//! any error (the whole error chain is printed once to stderr), 2 for a usage error (clap).

use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand, ValueEnum};

use syntrain::flowsheet::Flowsheet;
use syntrain::report;
use syntrain::report::species as species_report;
use syntrain::thermo::SpeciesDb;

/// Shown under every help page.
const CAUTION: &str = "Screening results only: hot hydrogen and carbon monoxide at pressure are \
flammable and toxic. Follow local codes and licensed engineering practice.";

/// Equilibrium and energy balances of steam-reforming hydrogen and syngas trains.
#[derive(Parser)]
#[command(name = "syntrain", version, about, long_about = None, after_help = CAUTION)]
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
    Solve {
        /// The flowsheet file (YAML), e.g. flowsheets/demo-train.yaml.
        file: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: SolveFormat,
        /// Write the report to this file instead of standard output (nothing is written on an
        /// error).
        #[arg(long, short = 'o', value_name = "PATH")]
        output: Option<PathBuf>,
    },
    /// List the species database, or show one record with its properties.
    Species {
        /// A species name (e.g. CH4, n-C4H10, "C(gr)"); omit to list all.
        name: Option<String>,
        /// Temperatures at which to show Cp, H, S, G (e.g. "850 degC", "1100 K"); repeatable.
        #[arg(long = "temperature", short = 't', value_name = "T")]
        temperatures: Vec<String>,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: SpeciesFormat,
    },
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(text) => {
            print!("{text}");
            ExitCode::SUCCESS
        }
        Err(err) => {
            eprintln!("{}", syntrain::report::error_chain(&err));
            ExitCode::FAILURE
        }
    }
}

fn database(file: Option<&PathBuf>) -> syntrain::Result<SpeciesDb> {
    match file {
        Some(path) => SpeciesDb::embedded_with_file(path),
        None => SpeciesDb::embedded(),
    }
}

fn run(cli: Cli) -> syntrain::Result<String> {
    let db = database(cli.species_file.as_ref())?;
    match cli.command {
        Command::Solve {
            file,
            format,
            output,
        } => {
            let flowsheet = Flowsheet::from_file(&file, &db)?;
            let result = flowsheet.solve(&db)?;
            // Render completely before writing, so an error leaves no partial file.
            let text = report::render_solution(&db, &result, format.into())?;
            match output {
                Some(path) => {
                    report::write_atomically(&path, &text)?;
                    eprintln!("wrote {}", path.display());
                    Ok(String::new())
                }
                None => Ok(text),
            }
        }
        Command::Species {
            name,
            temperatures,
            format,
        } => {
            let temperatures_k = temperatures
                .iter()
                .map(|t| syntrain::quantity::parse_temperature("--temperature", t))
                .collect::<syntrain::Result<Vec<f64>>>()?;
            match format {
                SpeciesFormat::Table => {
                    species_report::table(&db, name.as_deref(), &temperatures_k)
                }
                SpeciesFormat::Json => species_report::json(&db, name.as_deref(), &temperatures_k),
            }
        }
    }
}
