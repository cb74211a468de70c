//! Figures from results: the exclusion plane (M, m_χ), the DM–nucleon plane,
//! kinematic distributions and cut-flows, as SVG with the figure's data
//! written as CSV beside it so users can restyle.
//!
//! Fed by the search stage (yields, cut-flows, distributions), the scan stage
//! (grid results, contours, DM–nucleon curves) and the direct-detection
//! stage (reach curves). The figure functions take plain data structs; the
//! [`data`] module reads the CSV files the other commands write into those
//! structs.
//!
//! SVG only: text is written as SVG `<text>` elements in a generic
//! `sans-serif` family, so no system font is needed to make a figure. PNG is
//! not offered: rasterising text needs a font file and a font rasteriser,
//! which a fresh machine does not have without system packages.

mod canvas;
pub mod cutflow;
pub mod data;
pub mod distributions;
pub mod dm_nucleon;
pub mod exclusion;
pub mod folders;
mod output;
pub mod style;

use std::path::PathBuf;

pub use cutflow::{CutflowData, CutflowRow, cutflow_figure, render_cutflow};
pub use distributions::{
    Bin, DistributionsData, Histogram, Level, Observable, RegionYield, distributions_figure,
    render_distributions,
};
pub use dm_nucleon::{Curve, CurveSource, Interaction, dm_nucleon_figure, render_dm_nucleon};
pub use exclusion::{
    ContourLevel, ContourLine, ExclusionData, ScanPoint, exclusion_figure, render_exclusion,
};
pub use folders::{FIGURES_DIR, recast_figures, scan_figures};
pub use output::FigureFiles;

/// Errors from reading figure data or drawing a figure.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum PlotError {
    /// A data file could not be opened or read.
    #[error("{path}: cannot read: {cause}")]
    Read {
        /// The file.
        path: PathBuf,
        /// The underlying error (kept out of the error chain: the message
        /// already states it).
        cause: std::io::Error,
    },
    /// A CSV file is malformed (unbalanced quotes, ragged rows, bad UTF-8).
    #[error("{path}: line {line}: malformed CSV: {message}")]
    Csv {
        /// The file.
        path: PathBuf,
        /// 1-based line number (0 when unknown).
        line: u64,
        /// What the CSV reader reported.
        message: String,
    },
    /// A required column is missing from a CSV header.
    #[error("{path}: header lacks the column `{column}` (header: {header})")]
    MissingColumn {
        /// The file.
        path: PathBuf,
        /// The missing column.
        column: String,
        /// The header as read.
        header: String,
    },
    /// A cell holds a value that breaks a rule.
    #[error("{path}: line {line}: column `{column}`: {rule}, got `{value}`")]
    BadValue {
        /// The file.
        path: PathBuf,
        /// 1-based line number.
        line: u64,
        /// The column.
        column: String,
        /// The rule that was broken.
        rule: String,
        /// The offending cell text.
        value: String,
    },
    /// A data file holds a header but no data rows.
    #[error("{path}: no data rows{detail}")]
    Empty {
        /// The file.
        path: PathBuf,
        /// Extra detail, starting with "; " when present.
        detail: String,
    },
    /// Figure data given to a figure function breaks a rule.
    #[error("{figure} figure: {what}: {rule}")]
    InvalidData {
        /// Which figure.
        figure: &'static str,
        /// Which item (series, point, row).
        what: String,
        /// The rule that was broken, with the value and unit.
        rule: String,
    },
    /// A label the figure must state is missing.
    #[error("{figure} figure: the label `{label}` must be given ({why})")]
    MissingLabel {
        /// Which figure.
        figure: &'static str,
        /// Which label.
        label: &'static str,
        /// Why the figure needs it.
        why: &'static str,
    },
    /// The drawing backend failed.
    #[error("{figure} figure: drawing failed: {message}")]
    Draw {
        /// Which figure.
        figure: &'static str,
        /// What the backend reported.
        message: String,
    },
    /// An output file could not be written.
    #[error("{path}: cannot write: {cause}")]
    Write {
        /// The file.
        path: PathBuf,
        /// The underlying error (kept out of the error chain: the message
        /// already states it).
        cause: std::io::Error,
    },
    /// The output path does not end in `.svg`.
    #[error("{path}: figure files must end in `.svg` (PNG is not offered: it needs system fonts)")]
    NotSvg {
        /// The path given.
        path: PathBuf,
    },
}

/// The text a figure states about where its numbers come from.
///
/// Every field is optional at construction; each figure checks what it needs
/// (the exclusion figure needs the mediator, the couplings, √s and the
/// luminosity; the DM–nucleon figure needs the mediator and the couplings
/// when it shows a collider curve).
#[derive(Debug, Clone, PartialEq)]
pub struct Labels {
    /// Figure title, e.g. the search's name.
    pub title: Option<String>,
    /// Mediator type, e.g. `vector`, `axial-vector`.
    pub mediator: Option<String>,
    /// Couplings as text, e.g. `g_q = 0.25, g_χ = 1`.
    pub couplings: Option<String>,
    /// Centre-of-mass energy √s in TeV.
    pub sqrt_s_tev: Option<f64>,
    /// Integrated luminosity in fb⁻¹.
    pub lumi_ifb: Option<f64>,
    /// Confidence level of the collider limits, a fraction in (0, 1), shown as
    /// "95 % CL (CLs)".
    pub collider_cl: f64,
    /// Further lines printed in the side panel.
    pub notes: Vec<String>,
}

impl Default for Labels {
    fn default() -> Self {
        Labels {
            title: None,
            mediator: None,
            couplings: None,
            sqrt_s_tev: None,
            lumi_ifb: None,
            collider_cl: 0.95,
            notes: Vec::new(),
        }
    }
}

impl Labels {
    /// Checks the numbers before any data is read: √s and luminosity
    /// positive and finite, the collider CL in (0, 1).
    pub fn check(&self) -> Result<(), PlotError> {
        self.validate("this")
    }

    /// Checks the numbers: √s and luminosity positive and finite, the CL in (0, 1).
    fn validate(&self, figure: &'static str) -> Result<(), PlotError> {
        let bad = |what: &str, rule: String| PlotError::InvalidData {
            figure,
            what: what.to_string(),
            rule,
        };
        if let Some(s) = self.sqrt_s_tev
            && !(s.is_finite() && s > 0.0)
        {
            return Err(bad("label √s", format!("must be > 0 TeV, got {s} TeV")));
        }
        if let Some(l) = self.lumi_ifb
            && !(l.is_finite() && l > 0.0)
        {
            return Err(bad(
                "label luminosity",
                format!("must be > 0 fb⁻¹, got {l} fb⁻¹"),
            ));
        }
        if !(self.collider_cl > 0.0 && self.collider_cl < 1.0) {
            return Err(bad(
                "label collider CL",
                format!("must lie in (0, 1), got {}", self.collider_cl),
            ));
        }
        Ok(())
    }

    /// "√s = 13 TeV, 139 fb⁻¹" from whichever of the two is given.
    fn energy_lumi_text(&self) -> Option<String> {
        match (self.sqrt_s_tev, self.lumi_ifb) {
            (Some(s), Some(l)) => Some(format!("√s = {s} TeV, {l} fb⁻¹")),
            (Some(s), None) => Some(format!("√s = {s} TeV")),
            (None, Some(l)) => Some(format!("{l} fb⁻¹")),
            (None, None) => None,
        }
    }
}

/// "95 % CL" for a fraction 0.95.
pub fn cl_text(cl: f64) -> String {
    let pct = (cl * 1000.0).round() / 10.0;
    format!("{pct} % CL")
}

/// The statement every collider figure carries.
pub const ESTIMATE_NOTE: &str =
    "Estimate from parton-level events and a parametrised detector; not an official result.";
