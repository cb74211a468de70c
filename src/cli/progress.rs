//! Progress bars on stderr, shown only when stderr is a terminal (so logs
//! and pipes stay clean).

use std::io::IsTerminal;
use std::path::PathBuf;

/// A bar over the bytes of `files` on disk (compressed bytes for gzip
/// files, as the event reader reports them), labelled `what`.
pub fn bytes_bar(files: &[PathBuf], what: &str) -> Option<indicatif::ProgressBar> {
    if !std::io::stderr().is_terminal() {
        return None;
    }
    let total: u64 = files
        .iter()
        .filter_map(|f| std::fs::metadata(f).ok())
        .map(|m| m.len())
        .sum();
    let bar = indicatif::ProgressBar::new(total);
    let template =
        format!("{what} {{bar:40}} {{bytes}}/{{total_bytes}} {{bytes_per_sec}} eta {{eta}}");
    if let Ok(style) = indicatif::ProgressStyle::with_template(&template) {
        bar.set_style(style);
    }
    Some(bar)
}

/// A bar counting `len` items of `unit`.
pub fn count_bar(len: u64, unit: &str) -> Option<indicatif::ProgressBar> {
    if !std::io::stderr().is_terminal() {
        return None;
    }
    let bar = indicatif::ProgressBar::new(len);
    let template = format!("{{bar:40}} {{pos}}/{{len}} {unit}, ETA {{eta}} ({{msg}})");
    if let Ok(style) = indicatif::ProgressStyle::with_template(&template) {
        bar.set_style(style);
    }
    Some(bar)
}
