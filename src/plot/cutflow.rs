//! The cut-flow figure: for each signal region, the cumulative efficiency
//! after each cut (log scale), the common preselection first and each
//! region's own cuts after it; the cuts are listed by step in the side panel.
//!
//! Fed by the search stage (`cutflow.csv`).

use std::collections::BTreeMap;
use std::path::Path;

use super::canvas::{
    Axis, LegendEntry, Sample, draw_axes, draw_line, draw_panel, draw_point, figure_height,
    render_svg, split_charts,
};
use super::output::{Table, num, write_figure};
use super::style::{CHART_WIDTH, PANEL_WIDTH, series_style};
use super::{ESTIMATE_NOTE, FigureFiles, Labels, PlotError};

const FIGURE: &str = "cut-flow";

/// The region name of the common part of a cut-flow.
pub const PRESELECTION: &str = "preselection";

/// One row of a cut-flow.
#[derive(Debug, Clone, PartialEq)]
pub struct CutflowRow {
    /// Region name, [`PRESELECTION`] for the common part.
    pub region: String,
    /// Step number (0 = all events).
    pub step: u32,
    /// The cut text.
    pub cut: String,
    /// Unweighted events passing.
    pub raw_events: u64,
    /// Expected events passing at the search luminosity.
    pub weighted_events: f64,
    /// Fraction of all events passing this and every earlier cut, in [0, 1].
    pub efficiency_cumulative: f64,
    /// Fraction of the previous step's events passing this cut, in [0, 1].
    pub efficiency_step: f64,
}

/// A whole cut-flow.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct CutflowData {
    /// Rows in any order.
    pub rows: Vec<CutflowRow>,
}

/// One line of the figure: a region's rows sorted by step, with positions.
struct Track<'a> {
    region: &'a str,
    rows: Vec<(usize, &'a CutflowRow)>,
}

impl CutflowData {
    fn validate(&self) -> Result<(), PlotError> {
        let bad = |what: String, rule: String| PlotError::InvalidData {
            figure: FIGURE,
            what,
            rule,
        };
        if self.rows.is_empty() {
            return Err(bad(
                "rows".into(),
                "a cut-flow needs at least one row".into(),
            ));
        }
        let mut seen = std::collections::BTreeSet::new();
        for r in &self.rows {
            let what = || format!("region `{}` step {}", r.region, r.step);
            if !seen.insert((r.region.as_str(), r.step)) {
                return Err(bad(what(), "appears twice".into()));
            }
            for (col, v) in [
                ("efficiency_cumulative", r.efficiency_cumulative),
                ("efficiency_step", r.efficiency_step),
            ] {
                if !(0.0..=1.0 + 1e-9).contains(&v) {
                    return Err(bad(what(), format!("{col} must lie in [0, 1], got {v}")));
                }
            }
            if !(r.weighted_events.is_finite() && r.weighted_events >= 0.0) {
                return Err(bad(
                    what(),
                    format!(
                        "weighted_events must be finite and ≥ 0, got {}",
                        r.weighted_events
                    ),
                ));
            }
        }
        Ok(())
    }

    /// The preselection track first, then each region in name order; region
    /// steps are placed after the last preselection step whatever their
    /// numbering.
    fn tracks(&self) -> Vec<Track<'_>> {
        let mut by_region: BTreeMap<&str, Vec<&CutflowRow>> = BTreeMap::new();
        for r in &self.rows {
            by_region.entry(r.region.as_str()).or_default().push(r);
        }
        for v in by_region.values_mut() {
            v.sort_by_key(|r| r.step);
        }
        let pre = by_region.remove(PRESELECTION).unwrap_or_default();
        let mut out = Vec::new();
        let offset = pre.len();
        if !pre.is_empty() {
            out.push(Track {
                region: PRESELECTION,
                rows: pre.into_iter().enumerate().collect(),
            });
        }
        for (region, rows) in by_region {
            out.push(Track {
                region,
                rows: rows
                    .into_iter()
                    .enumerate()
                    .map(|(i, r)| (offset + i, r))
                    .collect(),
            });
        }
        out
    }
}

/// The cut-flow figure as an SVG string.
pub fn render_cutflow(data: &CutflowData, labels: &Labels) -> Result<String, PlotError> {
    Ok(build(data, labels)?.0)
}

/// Writes the cut-flow figure to `path` (`.svg`) and its data beside it
/// (`.csv`: region, position, step, cut, efficiency_cumulative,
/// efficiency_step, weighted_events).
pub fn cutflow_figure(
    data: &CutflowData,
    labels: &Labels,
    path: &Path,
) -> Result<FigureFiles, PlotError> {
    let (svg, table) = build(data, labels)?;
    write_figure(FIGURE, path, &svg, &table)
}

fn build(data: &CutflowData, labels: &Labels) -> Result<(String, Table), PlotError> {
    data.validate()?;
    labels.validate(FIGURE)?;
    let tracks = data.tracks();
    let n_pos = tracks
        .iter()
        .flat_map(|t| t.rows.iter().map(|(p, _)| p + 1))
        .max()
        .unwrap_or(1);
    let effs = data.rows.iter().map(|r| r.efficiency_cumulative);
    let y_title = "Cumulative efficiency";
    // Efficiencies end at 1: the axis stops there.
    let lowest = effs.filter(|e| *e > 0.0).fold(1.0, f64::min);
    let y_axis = Axis::log_decades((lowest.log10() - 0.02).floor() as i32, 0, y_title);
    let x_axis = Axis::categories(n_pos, "Cut-flow step");
    let has_zero = data.rows.iter().any(|r| r.efficiency_cumulative == 0.0);

    let legend: Vec<LegendEntry> = tracks
        .iter()
        .enumerate()
        .map(|(i, t)| LegendEntry {
            sample: Sample::Line(series_style(i)),
            label: t.region.to_string(),
        })
        .collect();
    let mut lines = Vec::new();
    lines.extend(labels.energy_lumi_text());
    for t in &tracks {
        lines.push(format!("{}:", t.region));
        for (p, r) in &t.rows {
            lines.push(format!("  {p}: {}", r.cut));
        }
    }
    if has_zero {
        lines.push("Zero efficiencies are not drawn on the log axis.".into());
    }
    lines.extend(labels.notes.iter().cloned());
    lines.push(ESTIMATE_NOTE.into());

    let pre_last = tracks
        .first()
        .filter(|t| t.region == PRESELECTION)
        .and_then(|t| {
            t.rows
                .last()
                .map(|(p, r)| (*p as f64, r.efficiency_cumulative))
        });
    let height = figure_height(labels.title.as_deref(), &legend, &lines);
    let svg = render_svg((CHART_WIDTH + PANEL_WIDTH, height), |root| {
        let (charts, panel) = split_charts(root, 1, PANEL_WIDTH);
        let frame = draw_axes(&charts[0], None, x_axis.clone(), y_axis.clone())?;
        for (i, t) in tracks.iter().enumerate() {
            let st = series_style(i);
            let mut pts: Vec<(f64, f64)> = Vec::new();
            if t.region != PRESELECTION
                && let Some(p) = pre_last
            {
                pts.push(p);
            }
            pts.extend(
                t.rows
                    .iter()
                    .map(|(p, r)| (*p as f64, r.efficiency_cumulative)),
            );
            draw_line(root, &frame, &pts, &st)?;
            for (p, r) in &t.rows {
                draw_point(
                    root,
                    &frame,
                    *p as f64,
                    r.efficiency_cumulative,
                    st.marker,
                    st.colour,
                )?;
            }
        }
        draw_panel(&panel, labels.title.as_deref(), &legend, &lines)
    })
    .map_err(|message| PlotError::Draw {
        figure: FIGURE,
        message,
    })?;

    let mut table = Table::new(vec![
        "region",
        "position",
        "step",
        "cut",
        "efficiency_cumulative",
        "efficiency_step",
        "weighted_events",
    ]);
    for t in &tracks {
        for (p, r) in &t.rows {
            table.push(vec![
                t.region.to_string(),
                p.to_string(),
                r.step.to_string(),
                r.cut.clone(),
                num(r.efficiency_cumulative),
                num(r.efficiency_step),
                num(r.weighted_events),
            ]);
        }
    }
    Ok((svg, table))
}
