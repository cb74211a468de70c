//! Errors of the event stage. Every message names the file and, where the
//! reader knows them, the event number (1-based, within the file) and the
//! line number (1-based, within the decompressed text), then the rule broken.

use std::path::PathBuf;

/// Errors of the event stage. Messages name the file, the event number and,
/// where possible, the line number, and the rule broken.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum EventError {
    /// Reading the file failed.
    #[error("{path}: {source}")]
    Io {
        /// File.
        path: PathBuf,
        /// Underlying error.
        source: std::io::Error,
    },
    /// The file breaks the LHEF format or a rule of the reader.
    #[error("{0}")]
    Format(String),
    /// The header or `<init>` block breaks a rule.
    #[error("{}: line {line}: {rule}", path.display())]
    Header {
        /// File.
        path: PathBuf,
        /// Line number (1-based).
        line: u64,
        /// The rule broken, with the offending value.
        rule: String,
    },
    /// An event breaks a rule.
    #[error("{}: event {event}: line {line}: {rule}", path.display())]
    Event {
        /// File.
        path: PathBuf,
        /// Event number within the file (1-based).
        event: u64,
        /// Line number (1-based).
        line: u64,
        /// The rule broken, with the offending value.
        rule: String,
    },
    /// Text between events, or the end of the file, breaks a rule.
    #[error("{}: line {line}: {rule}", path.display())]
    Body {
        /// File.
        path: PathBuf,
        /// Line number (1-based).
        line: u64,
        /// The rule broken.
        rule: String,
    },
    /// The gzip stream is corrupt or truncated.
    #[error("{}: corrupt gzip stream after {offset} decompressed bytes: {source}", path.display())]
    Gzip {
        /// File.
        path: PathBuf,
        /// Decompressed bytes delivered before the failure.
        offset: u64,
        /// Underlying error.
        source: std::io::Error,
    },
    /// Files of one sample disagree, or the sample cannot be normalised.
    #[error("{}: {rule}", path.display())]
    Sample {
        /// File.
        path: PathBuf,
        /// The rule broken.
        rule: String,
    },
    /// A caller-supplied option is invalid.
    #[error("invalid reader option: {0}")]
    Option(String),
}
