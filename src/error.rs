//! The library's one error type.
//!
//! Every variant carries the context an engineer needs to fix the input: which unit, stream,
//! species or field, the value that was given, and a hint. The binary prints the whole chain once
//! and exits non-zero; the library never prints and never exits.

use std::path::PathBuf;

/// Result alias used throughout the library.
pub type Result<T, E = Error> = std::result::Result<T, E>;

/// Everything that can go wrong in syntrain, with context.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// A quantity string could not be read ("850 degC", "25 barg", ...).
    #[error("{field}: cannot read '{value}': {reason}")]
    Quantity {
        /// The field (YAML key or option) that held the quantity.
        field: String,
        /// The text as given.
        value: String,
        /// Why it failed and how to fix it.
        reason: String,
    },

    /// A value is outside what is physically possible or allowed.
    #[error("{field}: value {value} is not allowed: {reason}")]
    InvalidValue {
        /// The field (YAML key, option or argument).
        field: String,
        /// The value as given, formatted.
        value: String,
        /// Why it is not allowed and how to fix it.
        reason: String,
    },

    /// A species name is not in the database.
    #[error("unknown species '{name}'{context}; known species: {known}")]
    UnknownSpecies {
        /// The name as given.
        name: String,
        /// Where it was met (e.g. " in feed 'natural-gas'"), possibly empty.
        context: String,
        /// The names the database knows, comma separated.
        known: String,
    },

    /// A reaction name is not known.
    #[error("unknown reaction '{name}'{context}; known reactions: {known}")]
    UnknownReaction {
        /// The name as given.
        name: String,
        /// Where it was met, possibly empty.
        context: String,
        /// The names that are known, comma separated.
        known: String,
    },

    /// A species property was asked for outside the temperature range of its data.
    #[error(
        "species {species}: temperature {temperature_k:.2} K is outside its data range \
         {min_k:.2}-{max_k:.2} K (no extrapolation is done)"
    )]
    OutOfRange {
        /// Species name.
        species: String,
        /// The temperature asked for, K.
        temperature_k: f64,
        /// Lowest temperature of the record, K.
        min_k: f64,
        /// Highest temperature of the record, K.
        max_k: f64,
    },

    /// A species record is inconsistent or incomplete.
    #[error("species record '{species}': {reason}")]
    SpeciesRecord {
        /// Species name.
        species: String,
        /// What is wrong with it.
        reason: String,
    },

    /// A reaction does not balance its elements.
    #[error("reaction '{reaction}' does not balance element {element}: net {imbalance} atoms")]
    ElementBalance {
        /// Reaction name or equation.
        reaction: String,
        /// Element symbol.
        element: String,
        /// Net atoms (products minus reactants).
        imbalance: f64,
    },

    /// A reaction is defined in a way that cannot be used.
    #[error("reaction '{reaction}': {reason}")]
    Reaction {
        /// Reaction name or equation.
        reaction: String,
        /// What is wrong and how to fix it.
        reason: String,
    },

    /// A numerical solve did not converge; never silently returned as an answer.
    #[error(
        "{what} did not converge after {iterations} iterations (largest residual {residual:.3e}){hint}"
    )]
    NotConverged {
        /// What failed (e.g. "equilibrium stage of unit 'reformer'").
        what: String,
        /// Iterations spent.
        iterations: usize,
        /// The largest residual left.
        residual: f64,
        /// A hint for the user, starting with "; " or empty.
        hint: String,
    },

    /// A unit specification is missing, contradictory or impossible.
    #[error("unit '{unit}', {field}: {reason}")]
    UnitSpec {
        /// Unit name.
        unit: String,
        /// The spec key.
        field: String,
        /// What is wrong and how to fix it.
        reason: String,
    },

    /// The flowsheet graph is not valid (missing stream, double producer, cycle, ...).
    #[error("flowsheet: {reason}")]
    Flowsheet {
        /// What is wrong and how to fix it.
        reason: String,
    },

    /// The recycle iteration of a flowsheet with cycles did not converge within its limit.
    #[error(
        "the recycle did not converge: after {iterations} iterations the tear streams \
         {tear_streams} still change by {residual:.3e} (scaled; at most {tolerance:e} allowed), \
         most in {worst}; allow more iterations (`solver: recycle-iterations`), tear the loop \
         at another stream (`solver: tear-streams`), or check the loop (a recycle that grows \
         without bound, a pressure that falls on every pass)"
    )]
    RecycleNotConverged {
        /// The tear streams, quoted and comma separated.
        tear_streams: String,
        /// Iterations taken.
        iterations: usize,
        /// Largest scaled change in the last iteration.
        residual: f64,
        /// The tolerance it had to meet.
        tolerance: f64,
        /// The variable that changed most, in words.
        worst: String,
    },

    /// A YAML file could not be read into the model.
    #[error("{path}{}: {message}", Position::suffix(position))]
    Yaml {
        /// File path (or `<embedded data/species.yaml>`).
        path: String,
        /// Line and column where known.
        position: Option<Position>,
        /// The parser's message.
        message: String,
    },

    /// A value of an input file that cannot be used, found after the file was read: with the
    /// file, the position of the value and its input path (`units.hts.approach.shift`).
    #[error("{file}{}: {input}: {message}", Position::suffix(position))]
    Input {
        /// The file (or the origin given for a text).
        file: String,
        /// Line and column where known.
        position: Option<Position>,
        /// The input path of the value (or of the entry it belongs to).
        input: String,
        /// What is wrong and how to fix it.
        message: String,
    },

    /// A file could not be read or written.
    #[error("{action} '{path}'")]
    Io {
        /// "reading" or "writing".
        action: &'static str,
        /// The file.
        path: PathBuf,
        /// The operating-system error.
        #[source]
        source: std::io::Error,
    },

    /// An error with added context (the unit or study it happened in).
    #[error("{context}")]
    Context {
        /// What was being done.
        context: String,
        /// The underlying error.
        #[source]
        source: Box<Error>,
    },
}

/// A line and column in an input file (1-based, as editors count).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Position {
    /// Line, from 1.
    pub line: usize,
    /// Column, from 1.
    pub column: usize,
}

impl Position {
    /// ":line:column", or empty without a position.
    pub fn suffix(position: &Option<Position>) -> String {
        position
            .map(|p| format!(":{}:{}", p.line, p.column))
            .unwrap_or_default()
    }
}

impl Error {
    /// Wrap this error with a line of context ("solving unit 'reformer'").
    pub fn context(self, context: impl Into<String>) -> Error {
        Error::Context {
            context: context.into(),
            source: Box::new(self),
        }
    }

    /// Build a YAML error from a serde_norway error, with file, line and column.
    pub fn yaml(path: impl Into<String>, err: &serde_norway::Error) -> Error {
        Error::Yaml {
            path: path.into(),
            position: err.location().map(|l| Position {
                line: l.line(),
                column: l.column(),
            }),
            message: err.to_string(),
        }
    }
}

/// Extension to add context to any library result.
pub trait ResultExt<T> {
    /// Wrap the error, if any, with a line of context.
    fn context(self, context: impl FnOnce() -> String) -> Result<T>;
}

impl<T> ResultExt<T> for Result<T> {
    fn context(self, context: impl FnOnce() -> String) -> Result<T> {
        self.map_err(|e| e.context(context()))
    }
}
