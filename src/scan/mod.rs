//! Scans over simplified-model points: a plan (TOML) with a table of points
//! (CSV), a parallel driver that evaluates every point, a content-addressed
//! cache of per-point yields, resume after an interruption, deterministic
//! shards for batch systems and their merge, and exclusion contours traced on
//! the (M, m_χ) grid.
//!
//! Fed by [`crate::search`] (yields), [`crate::stats`] (limits) and
//! [`crate::model`] (widths, coupling rescaling, DM–nucleon cross-sections);
//! feeds the figures of [`crate::plot`] through the files it writes.
//!
//! The driver ([`run::run_scan`]) is independent of the physics: it calls a
//! [`run::PointEvaluator`] once per point, so resume, sharding, merging and
//! caching are tested with a stand-in evaluator.

pub mod atomic;
pub mod cache;
pub mod contour;
pub mod evaluate;
pub mod exclusion;
pub mod output;
pub mod plan;
pub mod products;
pub mod run;
pub mod shard;

pub use cache::{CacheKey, CacheKeyBuilder, YieldCache};
pub use contour::{Contour, ContourLevel, Grid, exclusion_contours, trace_level};
pub use exclusion::{ContourCurve, ScanExclusion, translate_contours};
pub use output::{PointResult, ScanManifest};
pub use plan::{MediatorKind, ScanPlan, ScanPoint};
pub use run::{
    NoProducts, PointContext, PointEvaluator, PointOutcome, Progress, RunOptions, ScanProducts,
    ScanSummary, run_scan,
};
pub use shard::{MergeSummary, Shard, merge_shards};

use std::path::PathBuf;

/// Errors of the scan stage. Every message names the file, the place (row,
/// key or point) and the rule that was broken.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ScanError {
    /// Reading or writing a file failed.
    #[error("{path}: {cause}")]
    Io {
        /// File or folder.
        path: PathBuf,
        /// Underlying error (part of the message, so not repeated as a
        /// source).
        cause: std::io::Error,
    },
    /// The plan or its table of points breaks a rule.
    #[error("{0}")]
    Plan(String),
    /// A `--shard` specification breaks a rule.
    #[error("{0}")]
    Shard(String),
    /// Shard outputs cannot be merged (mixed plans or versions, missing or
    /// repeated points).
    #[error("{0}")]
    Merge(String),
    /// Evaluating one point failed.
    #[error("point {index} ({label}): {message}")]
    Point {
        /// Index of the point in the table (0-based, data rows in order).
        index: usize,
        /// The point's label.
        label: String,
        /// What went wrong.
        message: String,
    },
    /// A file written by an earlier run cannot be read back.
    #[error("{path}: {message}")]
    Output {
        /// File.
        path: PathBuf,
        /// What is wrong with it.
        message: String,
    },
    /// The contour tracer was given an unusable grid.
    #[error("{0}")]
    Contour(String),
    /// A table of a finished scan folder, read back with the figure stage's
    /// readers, breaks a rule (the message names file, line and column).
    #[error(transparent)]
    Table(#[from] crate::plot::PlotError),
}

impl ScanError {
    /// An I/O error on `path`.
    pub(crate) fn io(path: impl Into<PathBuf>, cause: std::io::Error) -> Self {
        Self::Io {
            path: path.into(),
            cause,
        }
    }
}

/// Version of the code that produced a scan, recorded in every output and
/// in every cache key: the crate version plus the version of the scan's own
/// file layout. Bump [`SCAN_FORMAT_VERSION`] whenever yields or per-point
/// results are computed differently, so that old caches are not reused.
pub fn code_version() -> String {
    format!(
        "recoil {} (scan format {})",
        env!("CARGO_PKG_VERSION"),
        SCAN_FORMAT_VERSION
    )
}

/// Version of the scan's cache entries and per-point result files.
pub const SCAN_FORMAT_VERSION: u32 = 1;
