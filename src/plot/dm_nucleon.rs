//! The DM–nucleon plane (log–log): m_χ in GeV against σ_SI or σ_SD in cm²,
//! with collider curves translated from the scan, direct-detection reach
//! curves and imported curves, each labelled with its confidence level, and
//! the note that a collider curve holds only for the stated model and
//! couplings.
//!
//! Fed by the scan stage (`dm_nucleon.csv`) and the direct-detection stage
//! (curve CSVs).

use std::path::Path;

use super::canvas::{
    Axis, LegendEntry, Sample, draw_axes, draw_line, draw_panel, figure_height, render_svg,
    split_charts,
};
use super::output::{Table, num, sci, write_figure};
use super::style::{CHART_WIDTH, PANEL_WIDTH, series_style};
use super::{FigureFiles, Labels, PlotError, cl_text};

const FIGURE: &str = "DM–nucleon";

/// Where a curve comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CurveSource {
    /// Translated from the collider scan.
    Collider,
    /// Computed by the direct-detection stage.
    Direct,
    /// Read from an external CSV.
    Imported,
}

impl CurveSource {
    /// The name used in `dm_nucleon.csv`.
    pub fn as_str(self) -> &'static str {
        match self {
            CurveSource::Collider => "collider",
            CurveSource::Direct => "direct",
            CurveSource::Imported => "imported",
        }
    }

    /// Parses the `dm_nucleon.csv` name.
    pub fn parse(s: &str) -> Option<Self> {
        [
            CurveSource::Collider,
            CurveSource::Direct,
            CurveSource::Imported,
        ]
        .into_iter()
        .find(|c| c.as_str() == s)
    }
}

/// Which DM–nucleon cross-section a curve bounds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Interaction {
    /// Spin-independent, per nucleon.
    SpinIndependent,
    /// Spin-dependent, on the proton.
    SpinDependentProton,
    /// Spin-dependent, on the neutron.
    SpinDependentNeutron,
}

impl Interaction {
    /// The name used in `dm_nucleon.csv`: `SI`, `SD-p`, `SD-n`.
    pub fn as_str(self) -> &'static str {
        match self {
            Interaction::SpinIndependent => "SI",
            Interaction::SpinDependentProton => "SD-p",
            Interaction::SpinDependentNeutron => "SD-n",
        }
    }

    /// Parses the `dm_nucleon.csv` name.
    pub fn parse(s: &str) -> Option<Self> {
        [
            Interaction::SpinIndependent,
            Interaction::SpinDependentProton,
            Interaction::SpinDependentNeutron,
        ]
        .into_iter()
        .find(|c| c.as_str() == s)
    }

    fn axis_title(self) -> &'static str {
        match self {
            Interaction::SpinIndependent => "σ_SI (DM–nucleon) [cm²]",
            Interaction::SpinDependentProton => "σ_SD (DM–proton) [cm²]",
            Interaction::SpinDependentNeutron => "σ_SD (DM–neutron) [cm²]",
        }
    }
}

/// One curve in the DM–nucleon plane: upper limits (or a reach) on σ as a
/// function of m_χ. σ = +∞ marks masses without a limit and breaks the line.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// Legend text, e.g. `observed`, `expected`, a detector's name.
    pub label: String,
    /// Where the curve comes from.
    pub source: CurveSource,
    /// Confidence level, a fraction in (0, 1).
    pub cl: f64,
    /// Which cross-section it bounds.
    pub interaction: Interaction,
    /// (m_χ in GeV, σ in cm²) along the curve.
    pub points: Vec<(f64, f64)>,
}

fn validate(curves: &[Curve]) -> Result<Interaction, PlotError> {
    let bad = |what: String, rule: String| PlotError::InvalidData {
        figure: FIGURE,
        what,
        rule,
    };
    let first = curves.first().ok_or_else(|| {
        bad(
            "curves".into(),
            "at least one curve is needed to draw the plane".into(),
        )
    })?;
    for c in curves {
        if c.interaction != first.interaction {
            return Err(bad(
                format!("curve `{}`", c.label),
                format!(
                    "one figure shows one cross-section; this curve bounds {} but `{}` bounds {}",
                    c.interaction.as_str(),
                    first.label,
                    first.interaction.as_str()
                ),
            ));
        }
        if !(c.cl > 0.0 && c.cl < 1.0) {
            return Err(bad(
                format!("curve `{}`", c.label),
                format!("confidence level must lie in (0, 1), got {}", c.cl),
            ));
        }
        for (i, &(m, s)) in c.points.iter().enumerate() {
            if !(m.is_finite() && m > 0.0) {
                return Err(bad(
                    format!("curve `{}` point {}", c.label, i + 1),
                    format!("m_χ must be finite and > 0 GeV on a log axis, got {m} GeV"),
                ));
            }
            if s.is_nan() || s <= 0.0 {
                return Err(bad(
                    format!("curve `{}` point {}", c.label, i + 1),
                    format!("σ must be > 0 cm² (or inf for no limit) on a log axis, got {s} cm²"),
                ));
            }
        }
    }
    Ok(first.interaction)
}

/// The DM–nucleon figure as an SVG string.
///
/// All curves must bound the same cross-section. When a collider curve is
/// present, `labels.mediator` and `labels.couplings` must be given: the
/// figure states that the collider curve holds only for them.
pub fn render_dm_nucleon(curves: &[Curve], labels: &Labels) -> Result<String, PlotError> {
    build(curves, labels)
}

/// Writes the DM–nucleon figure to `path` (`.svg`) and its data beside it
/// (`.csv`, the long format of `dm_nucleon.csv`).
pub fn dm_nucleon_figure(
    curves: &[Curve],
    labels: &Labels,
    path: &Path,
) -> Result<FigureFiles, PlotError> {
    let svg = build(curves, labels)?;
    write_figure(FIGURE, path, &svg, &dm_nucleon_table(curves))
}

/// The curves as the long-format table of `dm_nucleon.csv`.
pub(crate) fn dm_nucleon_table(curves: &[Curve]) -> Table {
    let mut t = Table::new(vec![
        "curve",
        "source",
        "cl",
        "interaction",
        "m_dm_gev",
        "sigma_cm2",
    ]);
    for c in curves {
        for &(m, s) in &c.points {
            t.push(vec![
                c.label.clone(),
                c.source.as_str().into(),
                num(c.cl),
                c.interaction.as_str().into(),
                num(m),
                sci(s),
            ]);
        }
    }
    t
}

fn build(curves: &[Curve], labels: &Labels) -> Result<String, PlotError> {
    let interaction = validate(curves)?;
    labels.validate(FIGURE)?;
    let has_collider = curves.iter().any(|c| c.source == CurveSource::Collider);
    if has_collider {
        for (v, label) in [
            (&labels.mediator, "mediator"),
            (&labels.couplings, "couplings"),
        ] {
            if v.as_deref().is_none_or(|s| s.trim().is_empty()) {
                return Err(PlotError::MissingLabel {
                    figure: FIGURE,
                    label,
                    why: "a collider curve holds only for the stated model and couplings",
                });
            }
        }
    }
    let ms = curves.iter().flat_map(|c| c.points.iter().map(|p| p.0));
    let ss = curves.iter().flat_map(|c| c.points.iter().map(|p| p.1));
    let x_axis = Axis::log(ms, "Dark-matter mass m_χ [GeV]")
        .unwrap_or_else(|| Axis::log_decades(0, 3, "Dark-matter mass m_χ [GeV]"));
    let y_axis = Axis::log_padded(ss, interaction.axis_title())
        .unwrap_or_else(|| Axis::log_decades(-46, -36, interaction.axis_title()));

    let legend: Vec<LegendEntry> = curves
        .iter()
        .enumerate()
        .map(|(i, c)| LegendEntry {
            sample: Sample::Line(series_style(i)),
            label: format!("{} ({}, {})", c.label, cl_text(c.cl), c.source.as_str()),
        })
        .collect();
    let mut lines = Vec::new();
    if has_collider {
        lines.push(format!(
            "Collider curves ({}, CLs) hold only for the stated model and couplings: {} mediator, {}.",
            cl_text(labels.collider_cl),
            labels.mediator.as_deref().unwrap_or_default(),
            labels.couplings.as_deref().unwrap_or_default()
        ));
        lines.extend(labels.energy_lumi_text());
    }
    let empty: Vec<&str> = curves
        .iter()
        .filter(|c| !c.points.iter().any(|p| p.1.is_finite()))
        .map(|c| c.label.as_str())
        .collect();
    if !empty.is_empty() {
        lines.push(format!(
            "No finite limit in range for: {}.",
            empty.join(", ")
        ));
    }
    lines.extend(labels.notes.iter().cloned());

    let height = figure_height(labels.title.as_deref(), &legend, &lines);
    render_svg((CHART_WIDTH + PANEL_WIDTH, height), |root| {
        let (charts, panel) = split_charts(root, 1, PANEL_WIDTH);
        let frame = draw_axes(&charts[0], None, x_axis.clone(), y_axis.clone())?;
        for (i, c) in curves.iter().enumerate() {
            draw_line(root, &frame, &c.points, &series_style(i))?;
        }
        draw_panel(&panel, labels.title.as_deref(), &legend, &lines)
    })
    .map_err(|message| PlotError::Draw {
        figure: FIGURE,
        message,
    })
}
