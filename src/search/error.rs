//! Errors of the search stage and the translation of byte offsets in a
//! definition file into line and column numbers.

use std::path::PathBuf;

/// Errors of the search stage. Every message names the file (or the event
/// file index), the place and the rule that was broken.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum SearchError {
    /// Reading a definition file failed.
    #[error("{}: {source}", path.display())]
    Io {
        /// File.
        path: PathBuf,
        /// Underlying error.
        source: std::io::Error,
    },
    /// The definition breaks a rule of the schema, at a known place.
    #[error("{origin}:{line}:{column}: {message}")]
    Definition {
        /// File name (or a label for definitions built from text).
        origin: String,
        /// Line, 1-based.
        line: usize,
        /// Column (in characters), 1-based.
        column: usize,
        /// The rule broken, with the value.
        message: String,
    },
    /// The definition breaks a rule that has no single place in the file.
    #[error("{origin}: {message}")]
    DefinitionGlobal {
        /// File name.
        origin: String,
        /// The rule broken, with the value.
        message: String,
    },
    /// An event cannot be counted (weight not finite, wrong number of
    /// weight variations).
    #[error(
        "event file #{file_index} (0-based, in the order given), event {event_index} (0-based): {message}"
    )]
    Event {
        /// Index of the file in the sample.
        file_index: usize,
        /// Index of the event within its file.
        event_index: u64,
        /// The rule broken.
        message: String,
    },
    /// Turning weights into expected events failed.
    #[error("normalisation: {0}")]
    Normalisation(String),
    /// Yields do not belong to this search (for example a stale cache).
    #[error("yields do not match search \"{search}\": {message}")]
    Mismatch {
        /// Title of the search.
        search: String,
        /// What differs.
        message: String,
    },
    /// A projection or option is invalid.
    #[error("{0}")]
    InvalidOption(String),
    /// The event stage failed.
    #[error(transparent)]
    Events(#[from] crate::events::EventError),
    /// The statistics stage failed for a region.
    #[error("region \"{region}\": {source}")]
    Stats {
        /// Region name (or `combined`).
        region: String,
        /// Underlying error.
        source: crate::stats::StatsError,
    },
}

/// Line and column (both 1-based, column in characters) of byte offset
/// `offset` in `text`. Offsets past the end map to the end.
pub(crate) fn line_column(text: &str, offset: usize) -> (usize, usize) {
    let offset = offset.min(text.len());
    let mut line = 1;
    let mut line_start = 0;
    for (i, b) in text.bytes().enumerate().take(offset) {
        if b == b'\n' {
            line += 1;
            line_start = i + 1;
        }
    }
    // A byte offset inside a multi-byte character is rounded down.
    let mut end = offset;
    while !text.is_char_boundary(end) {
        end -= 1;
    }
    let column = text[line_start..end].chars().count() + 1;
    (line, column)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_column_counts_lines_and_characters() {
        // Hand-counted positions.
        let text = "a = 1\nbé = \"x\"\n";
        assert_eq!(line_column(text, 0), (1, 1));
        assert_eq!(line_column(text, 4), (1, 5));
        assert_eq!(line_column(text, 6), (2, 1));
        // 'é' is two bytes: the quote after "bé = " is the 6th character.
        assert_eq!(line_column(text, 12), (2, 6));
        assert_eq!(line_column(text, 1000).0, 3);
    }
}
