//! The exclusion figure in the (M, m_χ) plane: observed contour, expected
//! contour with its ±1σ band, the on-shell line M = 2m_χ, the scanned points
//! (filled when excluded, open when allowed) and the labels that say which
//! model, couplings, √s, luminosity and confidence level the limit is for.
//!
//! Fed by the scan stage (`results.csv`, `contours.csv`).

use std::path::Path;

use super::canvas::{
    Axis, LegendEntry, Sample, draw_axes, draw_line, draw_panel, draw_point, figure_height,
    fill_polygon, render_svg, split_charts,
};
use super::output::{Table, num, write_figure};
use super::style::{CHART_WIDTH, GUIDE, LineDash, Marker, PALETTE, PANEL_WIDTH, SeriesStyle};
use super::{ESTIMATE_NOTE, FigureFiles, Labels, PlotError, cl_text};

const FIGURE: &str = "exclusion";

/// One scanned model point.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ScanPoint {
    /// Mediator mass M in GeV.
    pub m_med_gev: f64,
    /// Dark-matter mass m_χ in GeV.
    pub m_dm_gev: f64,
    /// Whether the observed limit excludes the point (μ_up,obs < 1).
    pub excluded: bool,
}

/// Which limit a contour traces (μ_up = 1 of that limit).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum ContourLevel {
    /// Observed limit.
    Observed,
    /// Median expected limit.
    Expected,
    /// Expected limit at −1σ (`expected_m1`).
    ExpectedMinus1,
    /// Expected limit at +1σ (`expected_p1`).
    ExpectedPlus1,
}

impl ContourLevel {
    /// The name used in `contours.csv`.
    pub fn as_str(self) -> &'static str {
        match self {
            ContourLevel::Observed => "observed",
            ContourLevel::Expected => "expected",
            ContourLevel::ExpectedMinus1 => "expected_m1",
            ContourLevel::ExpectedPlus1 => "expected_p1",
        }
    }

    /// Parses the `contours.csv` name.
    pub fn parse(s: &str) -> Option<Self> {
        [
            ContourLevel::Observed,
            ContourLevel::Expected,
            ContourLevel::ExpectedMinus1,
            ContourLevel::ExpectedPlus1,
        ]
        .into_iter()
        .find(|l| l.as_str() == s)
    }
}

/// One polyline of a contour, points in order, (M, m_χ) in GeV.
#[derive(Debug, Clone, PartialEq)]
pub struct ContourLine {
    /// Which limit.
    pub level: ContourLevel,
    /// (M in GeV, m_χ in GeV) along the line.
    pub points: Vec<(f64, f64)>,
}

/// Everything the exclusion figure shows.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct ExclusionData {
    /// The scanned points.
    pub points: Vec<ScanPoint>,
    /// Contour polylines (any number per level, including none).
    pub contours: Vec<ContourLine>,
}

impl ExclusionData {
    fn validate(&self) -> Result<(), PlotError> {
        let bad = |what: String, rule: String| PlotError::InvalidData {
            figure: FIGURE,
            what,
            rule,
        };
        if self.points.is_empty() {
            return Err(bad(
                "scanned points".into(),
                "at least one point is needed to draw the plane".into(),
            ));
        }
        for (i, p) in self.points.iter().enumerate() {
            for (name, v) in [("M", p.m_med_gev), ("m_χ", p.m_dm_gev)] {
                if !(v.is_finite() && v >= 0.0) {
                    return Err(bad(
                        format!("point {}", i + 1),
                        format!("{name} must be finite and ≥ 0 GeV, got {v} GeV"),
                    ));
                }
            }
        }
        for (i, c) in self.contours.iter().enumerate() {
            if let Some(&(x, y)) = c
                .points
                .iter()
                .find(|(x, y)| !(x.is_finite() && y.is_finite()))
            {
                return Err(bad(
                    format!("{} contour segment {}", c.level.as_str(), i + 1),
                    format!("points must be finite, got ({x} GeV, {y} GeV)"),
                ));
            }
        }
        Ok(())
    }

    fn lines(&self, level: ContourLevel) -> Vec<&ContourLine> {
        self.contours
            .iter()
            .filter(|c| c.level == level && !c.points.is_empty())
            .collect()
    }
}

fn style_of(level: ContourLevel) -> SeriesStyle {
    match level {
        ContourLevel::Observed => SeriesStyle {
            colour: PALETTE[0],
            dash: LineDash::Solid,
            marker: Marker::Disc,
            width: 3,
        },
        ContourLevel::Expected => SeriesStyle {
            colour: PALETTE[1],
            dash: LineDash::Dashed,
            marker: Marker::Square,
            width: 2,
        },
        ContourLevel::ExpectedMinus1 | ContourLevel::ExpectedPlus1 => SeriesStyle {
            colour: PALETTE[3],
            dash: LineDash::Dotted,
            marker: Marker::Triangle,
            width: 1,
        },
    }
}

/// The ±1σ band as one polygon: the −1σ line, then the +1σ line joined at
/// its nearer end. Only when each side is one polyline; otherwise `None` and
/// the figure draws the two edges alone.
fn band_polygon(m1: &[&ContourLine], p1: &[&ContourLine]) -> Option<Vec<(f64, f64)>> {
    let ([a], [b]) = (m1, p1) else {
        return None;
    };
    if a.points.len() < 2 || b.points.len() < 2 {
        return None;
    }
    let end = a.points[a.points.len() - 1];
    let d2 = |p: (f64, f64)| {
        let (dx, dy) = (p.0 - end.0, p.1 - end.1);
        dx * dx + dy * dy
    };
    let mut poly = a.points.clone();
    let b_first = b.points[0];
    let b_last = b.points[b.points.len() - 1];
    if d2(b_first) <= d2(b_last) {
        poly.extend(b.points.iter().copied());
    } else {
        poly.extend(b.points.iter().rev().copied());
    }
    Some(poly)
}

/// The exclusion figure as an SVG string.
///
/// Needs `labels.mediator`, `labels.couplings`, `labels.sqrt_s_tev` and
/// `labels.lumi_ifb`: an exclusion means nothing without them.
pub fn render_exclusion(data: &ExclusionData, labels: &Labels) -> Result<String, PlotError> {
    Ok(build(data, labels)?.0)
}

/// Writes the exclusion figure to `path` (`.svg`) and its data beside it
/// (`.csv`: series, segment, m_med_gev, m_dm_gev, excluded).
pub fn exclusion_figure(
    data: &ExclusionData,
    labels: &Labels,
    path: &Path,
) -> Result<FigureFiles, PlotError> {
    let (svg, table) = build(data, labels)?;
    write_figure(FIGURE, path, &svg, &table)
}

fn need(v: &Option<String>, label: &'static str) -> Result<(), PlotError> {
    match v {
        Some(s) if !s.trim().is_empty() => Ok(()),
        _ => Err(PlotError::MissingLabel {
            figure: FIGURE,
            label,
            why: "an exclusion holds only for a stated model, couplings, energy and luminosity",
        }),
    }
}

fn build(data: &ExclusionData, labels: &Labels) -> Result<(String, Table), PlotError> {
    data.validate()?;
    labels.validate(FIGURE)?;
    need(&labels.mediator, "mediator")?;
    need(&labels.couplings, "couplings")?;
    for (v, label) in [
        (labels.sqrt_s_tev, "sqrt_s_tev"),
        (labels.lumi_ifb, "lumi_ifb"),
    ] {
        if v.is_none() {
            return Err(PlotError::MissingLabel {
                figure: FIGURE,
                label,
                why: "an exclusion holds only for a stated model, couplings, energy and luminosity",
            });
        }
    }

    let xs = data.points.iter().map(|p| p.m_med_gev).chain(
        data.contours
            .iter()
            .flat_map(|c| c.points.iter().map(|p| p.0)),
    );
    let ys = data.points.iter().map(|p| p.m_dm_gev).chain(
        data.contours
            .iter()
            .flat_map(|c| c.points.iter().map(|p| p.1)),
    );
    let x_axis = Axis::linear(xs, "Mediator mass M [GeV]", true);
    let y_axis = Axis::linear(ys, "Dark-matter mass m_χ [GeV]", true);

    let observed = data.lines(ContourLevel::Observed);
    let expected = data.lines(ContourLevel::Expected);
    let m1 = data.lines(ContourLevel::ExpectedMinus1);
    let p1 = data.lines(ContourLevel::ExpectedPlus1);
    let band = band_polygon(&m1, &p1);
    let on_shell: Vec<(f64, f64)> = {
        let (a, b) = (x_axis.min.max(0.0), x_axis.max);
        (0..=64)
            .map(|i| {
                let m = a + (b - a) * f64::from(i) / 64.0;
                (m, m / 2.0)
            })
            .collect()
    };
    let guide = SeriesStyle {
        colour: GUIDE,
        dash: LineDash::DashDot,
        marker: Marker::Cross,
        width: 1,
    };
    let band_colour = style_of(ContourLevel::ExpectedPlus1).colour;
    // Without a fill the band's edges carry it alone: draw them heavier.
    let edge_style = SeriesStyle {
        width: if band.is_some() { 1 } else { 2 },
        ..style_of(ContourLevel::ExpectedPlus1)
    };

    let mut legend = Vec::new();
    if !observed.is_empty() {
        legend.push(LegendEntry {
            sample: Sample::Line(style_of(ContourLevel::Observed)),
            label: "Observed limit".into(),
        });
    }
    if !expected.is_empty() {
        legend.push(LegendEntry {
            sample: Sample::Line(style_of(ContourLevel::Expected)),
            label: "Expected limit".into(),
        });
    }
    if band.is_some() {
        legend.push(LegendEntry {
            sample: Sample::Band(band_colour, 0.35),
            label: "Expected ± 1σ".into(),
        });
    } else if !m1.is_empty() || !p1.is_empty() {
        legend.push(LegendEntry {
            sample: Sample::Line(edge_style),
            label: "Expected ± 1σ (edges)".into(),
        });
    }
    legend.push(LegendEntry {
        sample: Sample::Line(guide),
        label: "M = 2 m_χ".into(),
    });
    legend.push(LegendEntry {
        sample: Sample::Marker(Marker::Disc, PALETTE[0]),
        label: "Scanned point, excluded".into(),
    });
    legend.push(LegendEntry {
        sample: Sample::Marker(Marker::Ring, PALETTE[0]),
        label: "Scanned point, allowed".into(),
    });

    let mut lines = vec![
        format!("{} ({})", cl_text(labels.collider_cl), "CLs"),
        format!(
            "Mediator: {}",
            labels.mediator.as_deref().unwrap_or_default()
        ),
        format!(
            "Couplings: {}",
            labels.couplings.as_deref().unwrap_or_default()
        ),
    ];
    lines.extend(labels.energy_lumi_text());
    if observed.is_empty() {
        lines.push("No observed contour: the observed limit excludes no connected region of the scanned grid.".into());
    }
    if expected.is_empty() {
        lines.push("No expected contour in the scanned grid.".into());
    }
    lines.extend(labels.notes.iter().cloned());
    lines.push(ESTIMATE_NOTE.into());

    let height = figure_height(labels.title.as_deref(), &legend, &lines);
    let svg = render_svg((CHART_WIDTH + PANEL_WIDTH, height), |root| {
        let (charts, panel) = split_charts(root, 1, PANEL_WIDTH);
        let frame = draw_axes(&charts[0], None, x_axis.clone(), y_axis.clone())?;
        if let Some(poly) = &band {
            fill_polygon(root, &frame, poly, band_colour, 0.35)?;
        }
        for c in m1.iter().chain(p1.iter()) {
            draw_line(root, &frame, &c.points, &edge_style)?;
        }
        draw_line(root, &frame, &on_shell, &guide)?;
        for c in &expected {
            draw_line(root, &frame, &c.points, &style_of(ContourLevel::Expected))?;
        }
        for c in &observed {
            draw_line(root, &frame, &c.points, &style_of(ContourLevel::Observed))?;
        }
        for p in &data.points {
            let marker = if p.excluded {
                Marker::Disc
            } else {
                Marker::Ring
            };
            draw_point(root, &frame, p.m_med_gev, p.m_dm_gev, marker, PALETTE[0])?;
        }
        draw_panel(&panel, labels.title.as_deref(), &legend, &lines)
    })
    .map_err(|message| PlotError::Draw {
        figure: FIGURE,
        message,
    })?;

    let mut table = Table::new(vec![
        "series",
        "segment",
        "m_med_gev",
        "m_dm_gev",
        "excluded",
    ]);
    let mut segment_of = std::collections::BTreeMap::<ContourLevel, usize>::new();
    for c in &data.contours {
        let seg = segment_of.entry(c.level).or_insert(0);
        for &(x, y) in &c.points {
            table.push(vec![
                c.level.as_str().into(),
                seg.to_string(),
                num(x),
                num(y),
                String::new(),
            ]);
        }
        *seg += 1;
    }
    for &(x, y) in &on_shell {
        table.push(vec![
            "on_shell_line".into(),
            "0".into(),
            num(x),
            num(y),
            String::new(),
        ]);
    }
    for p in &data.points {
        table.push(vec![
            "scanned_point".into(),
            String::new(),
            num(p.m_med_gev),
            num(p.m_dm_gev),
            p.excluded.to_string(),
        ]);
    }
    Ok((svg, table))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn band_joins_nearer_end() {
        let a = ContourLine {
            level: ContourLevel::ExpectedMinus1,
            points: vec![(0.0, 0.0), (10.0, 0.0)],
        };
        let b = ContourLine {
            level: ContourLevel::ExpectedPlus1,
            points: vec![(0.0, 1.0), (10.0, 1.0)],
        };
        let poly = band_polygon(&[&a], &[&b]).unwrap();
        // The +1σ line is reversed so the outline does not cross itself.
        assert_eq!(poly, vec![(0.0, 0.0), (10.0, 0.0), (10.0, 1.0), (0.0, 1.0)]);
        assert!(band_polygon(&[&a, &a], &[&b]).is_none());
    }
}
