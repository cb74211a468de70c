//! Kinematic distributions of one sample: p_T^miss and the leading-jet p_T,
//! at truth and reconstructed level, with the search's region edges drawn
//! on the p_T^miss axis; optionally a panel with each region's expected
//! signal beside its background estimate.
//!
//! Fed by the search stage (`distributions.csv`, `yields.csv`).

use std::path::Path;

use super::canvas::{
    Axis, DResult, Frame, LegendEntry, Root, Sample, draw_axes, draw_line, draw_panel, draw_point,
    draw_vline, figure_height, render_svg, split_charts,
};
use super::output::{Table, num, write_figure};
use super::style::{CHART_WIDTH, GUIDE, LineDash, Marker, PALETTE, PANEL_WIDTH, SeriesStyle};
use super::{ESTIMATE_NOTE, FigureFiles, Labels, PlotError};

const FIGURE: &str = "distributions";

/// A kinematic observable with a histogram.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Observable {
    /// Missing transverse momentum p_T^miss.
    Met,
    /// Transverse momentum of the leading jet.
    Jet1Pt,
}

impl Observable {
    /// The name used in `distributions.csv`.
    pub fn as_str(self) -> &'static str {
        match self {
            Observable::Met => "met",
            Observable::Jet1Pt => "jet1_pt",
        }
    }

    /// Parses the `distributions.csv` name.
    pub fn parse(s: &str) -> Option<Self> {
        [Observable::Met, Observable::Jet1Pt]
            .into_iter()
            .find(|o| o.as_str() == s)
    }

    fn axis_title(self) -> &'static str {
        match self {
            Observable::Met => "Missing transverse momentum p_T^miss [GeV]",
            Observable::Jet1Pt => "Leading-jet p_T [GeV]",
        }
    }
}

/// Truth (generator) or reconstructed (detector) level.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Level {
    /// From the generator record.
    Truth,
    /// After the detector response.
    Reco,
}

impl Level {
    /// The name used in `distributions.csv`.
    pub fn as_str(self) -> &'static str {
        match self {
            Level::Truth => "truth",
            Level::Reco => "reco",
        }
    }

    /// Parses the `distributions.csv` name.
    pub fn parse(s: &str) -> Option<Self> {
        [Level::Truth, Level::Reco]
            .into_iter()
            .find(|o| o.as_str() == s)
    }

    fn style(self) -> SeriesStyle {
        match self {
            Level::Truth => SeriesStyle {
                colour: PALETTE[2],
                dash: LineDash::Dashed,
                marker: Marker::Square,
                width: 2,
            },
            Level::Reco => SeriesStyle {
                colour: PALETTE[0],
                dash: LineDash::Solid,
                marker: Marker::Disc,
                width: 2,
            },
        }
    }
}

/// One histogram bin.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bin {
    /// Lower edge in GeV.
    pub low_gev: f64,
    /// Upper edge in GeV.
    pub high_gev: f64,
    /// Expected signal events in the bin at the search luminosity.
    pub events: f64,
    /// Monte-Carlo statistical uncertainty on `events`.
    pub mc_stat: f64,
}

/// A histogram of one observable at one level.
#[derive(Debug, Clone, PartialEq)]
pub struct Histogram {
    /// The observable.
    pub observable: Observable,
    /// Truth or reco.
    pub level: Level,
    /// Bins in increasing order.
    pub bins: Vec<Bin>,
}

/// One signal region's yield and background estimate.
#[derive(Debug, Clone, PartialEq)]
pub struct RegionYield {
    /// Region name.
    pub name: String,
    /// Lower p_T^miss edge in GeV, if the region has one.
    pub met_low_gev: Option<f64>,
    /// Upper p_T^miss edge in GeV, if the region has one.
    pub met_high_gev: Option<f64>,
    /// Expected signal events after all cuts.
    pub signal_events: f64,
    /// Background estimate in events.
    pub background: f64,
    /// Uncertainty on the background estimate in events.
    pub background_unc: f64,
}

/// Everything the distributions figure shows.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct DistributionsData {
    /// Histograms (any of met/jet1_pt × truth/reco).
    pub histograms: Vec<Histogram>,
    /// p_T^miss region edges in GeV, drawn on the p_T^miss panel.
    pub region_edges_gev: Vec<f64>,
    /// Per-region signal and background; an extra panel when not empty.
    pub regions: Vec<RegionYield>,
}

impl DistributionsData {
    /// The region edges implied by the regions' p_T^miss bounds, sorted and
    /// without repeats.
    pub fn edges_from_regions(regions: &[RegionYield]) -> Vec<f64> {
        let mut e: Vec<f64> = regions
            .iter()
            .flat_map(|r| [r.met_low_gev, r.met_high_gev])
            .flatten()
            .filter(|v| v.is_finite())
            .collect();
        e.sort_by(f64::total_cmp);
        e.dedup();
        e
    }

    fn validate(&self) -> Result<(), PlotError> {
        let bad = |what: String, rule: String| PlotError::InvalidData {
            figure: FIGURE,
            what,
            rule,
        };
        if self.histograms.iter().all(|h| h.bins.is_empty()) && self.regions.is_empty() {
            return Err(bad(
                "data".into(),
                "no histogram bin and no region: nothing to draw".into(),
            ));
        }
        for h in &self.histograms {
            let name = format!("{} {} histogram", h.observable.as_str(), h.level.as_str());
            for (i, b) in h.bins.iter().enumerate() {
                let what = || format!("{name} bin {}", i + 1);
                if !(b.low_gev.is_finite() && b.high_gev.is_finite() && b.low_gev < b.high_gev) {
                    return Err(bad(
                        what(),
                        format!(
                            "edges must be finite with low < high, got [{}, {}) GeV",
                            b.low_gev, b.high_gev
                        ),
                    ));
                }
                if !(b.events.is_finite() && b.events >= 0.0) {
                    return Err(bad(
                        what(),
                        format!("events must be finite and ≥ 0, got {}", b.events),
                    ));
                }
                if !(b.mc_stat.is_finite() && b.mc_stat >= 0.0) {
                    return Err(bad(
                        what(),
                        format!("mc_stat must be finite and ≥ 0, got {}", b.mc_stat),
                    ));
                }
            }
        }
        for r in &self.regions {
            for (col, v) in [
                ("signal_events", r.signal_events),
                ("background", r.background),
                ("background_unc", r.background_unc),
            ] {
                if !(v.is_finite() && v >= 0.0) {
                    return Err(bad(
                        format!("region `{}`", r.name),
                        format!("{col} must be finite and ≥ 0 events, got {v}"),
                    ));
                }
            }
        }
        if let Some(e) = self.region_edges_gev.iter().find(|e| !e.is_finite()) {
            return Err(bad(
                "region edges".into(),
                format!("must be finite, got {e} GeV"),
            ));
        }
        Ok(())
    }
}

/// The distributions figure as an SVG string.
pub fn render_distributions(
    data: &DistributionsData,
    labels: &Labels,
) -> Result<String, PlotError> {
    Ok(build(data, labels)?.0)
}

/// Writes the distributions figure to `path` (`.svg`) and its data beside it
/// (`.csv`: series, observable, bin_low_gev, bin_high_gev, events,
/// uncertainty, region).
pub fn distributions_figure(
    data: &DistributionsData,
    labels: &Labels,
    path: &Path,
) -> Result<FigureFiles, PlotError> {
    let (svg, table) = build(data, labels)?;
    write_figure(FIGURE, path, &svg, &table)
}

/// A y axis for event counts: log over the positive values, or linear 0..1
/// when every value is zero.
fn events_axis(values: impl IntoIterator<Item = f64>, title: &str) -> Axis {
    let v: Vec<f64> = values.into_iter().collect();
    Axis::log_padded(v.iter().copied(), title)
        .unwrap_or_else(|| Axis::linear([0.0, 1.0], title, true))
}

fn draw_histogram(root: &Root, frame: &Frame, h: &Histogram) -> DResult<()> {
    let style = h.level.style();
    // One step line; a gap wherever bins are not contiguous.
    let mut pts: Vec<(f64, f64)> = Vec::new();
    for (i, b) in h.bins.iter().enumerate() {
        if i > 0 && h.bins[i - 1].high_gev != b.low_gev {
            pts.push((f64::NAN, f64::NAN));
        }
        pts.push((b.low_gev, b.events));
        pts.push((b.high_gev, b.events));
    }
    draw_line(root, frame, &pts, &style)?;
    let floor = frame.y_axis().min;
    let bar = SeriesStyle {
        dash: LineDash::Solid,
        width: 1,
        ..style
    };
    for b in &h.bins {
        if b.mc_stat > 0.0 && b.events > 0.0 {
            let c = 0.5 * (b.low_gev + b.high_gev);
            let lo = (b.events - b.mc_stat).max(floor);
            draw_line(root, frame, &[(c, lo), (c, b.events + b.mc_stat)], &bar)?;
        }
    }
    Ok(())
}

fn build(data: &DistributionsData, labels: &Labels) -> Result<(String, Table), PlotError> {
    data.validate()?;
    labels.validate(FIGURE)?;
    let mut observables: Vec<Observable> = data
        .histograms
        .iter()
        .filter(|h| !h.bins.is_empty())
        .map(|h| h.observable)
        .collect();
    observables.sort();
    observables.dedup();
    let n_panels = observables.len() + usize::from(!data.regions.is_empty());

    let mut axes = Vec::new();
    for &o in &observables {
        let hs: Vec<&Histogram> = data
            .histograms
            .iter()
            .filter(|h| h.observable == o)
            .collect();
        let xs = hs
            .iter()
            .flat_map(|h| h.bins.iter().flat_map(|b| [b.low_gev, b.high_gev]));
        let ys = hs
            .iter()
            .flat_map(|h| h.bins.iter().flat_map(|b| [b.events, b.events + b.mc_stat]));
        let mut x = Axis::linear(xs, o.axis_title(), true);
        // Histograms fill their range exactly.
        let (lo, hi) = hs
            .iter()
            .flat_map(|h| h.bins.iter())
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), b| {
                (l.min(b.low_gev), h.max(b.high_gev))
            });
        x.min = lo;
        x.max = hi;
        axes.push((o, x, events_axis(ys, "Expected signal events per bin")));
    }
    let region_axes = (!data.regions.is_empty()).then(|| {
        let ys = data.regions.iter().flat_map(|r| {
            [
                r.signal_events,
                r.background + r.background_unc,
                r.background,
            ]
        });
        (
            Axis::categories(data.regions.len(), "Signal region (see list)"),
            events_axis(ys, "Events per region"),
        )
    });

    let guide = SeriesStyle {
        colour: GUIDE,
        dash: LineDash::DashDot,
        marker: Marker::Cross,
        width: 1,
    };
    let mut legend = Vec::new();
    for level in [Level::Reco, Level::Truth] {
        if data
            .histograms
            .iter()
            .any(|h| h.level == level && !h.bins.is_empty())
        {
            legend.push(LegendEntry {
                sample: Sample::Line(level.style()),
                label: format!(
                    "Signal, {} level (± MC stat.)",
                    if level == Level::Reco {
                        "reconstructed"
                    } else {
                        "truth"
                    }
                ),
            });
        }
    }
    if !data.region_edges_gev.is_empty() && observables.contains(&Observable::Met) {
        legend.push(LegendEntry {
            sample: Sample::Line(guide),
            label: "Signal-region p_T^miss edges".into(),
        });
    }
    if region_axes.is_some() {
        legend.push(LegendEntry {
            sample: Sample::Marker(Marker::Disc, PALETTE[1]),
            label: "Expected signal per region".into(),
        });
        legend.push(LegendEntry {
            sample: Sample::Marker(Marker::Square, PALETTE[3]),
            label: "Background estimate per region (± unc.)".into(),
        });
    }
    let mut lines = Vec::new();
    lines.extend(labels.energy_lumi_text());
    lines.push("Events expected at the search luminosity, before any cut.".into());
    for (i, r) in data.regions.iter().enumerate() {
        let range = match (r.met_low_gev, r.met_high_gev) {
            (Some(a), Some(b)) => format!(" [{a}, {b}) GeV"),
            (Some(a), None) => format!(" ≥ {a} GeV"),
            (None, Some(b)) => format!(" < {b} GeV"),
            (None, None) => String::new(),
        };
        lines.push(format!("Region {i}: {}{range}", r.name));
    }
    lines.extend(labels.notes.iter().cloned());
    lines.push(ESTIMATE_NOTE.into());

    let width = CHART_WIDTH * n_panels.max(1) as u32 * 3 / 4 + PANEL_WIDTH;
    let height = figure_height(labels.title.as_deref(), &legend, &lines);
    let svg = render_svg((width.max(CHART_WIDTH + PANEL_WIDTH), height), |root| {
        let (charts, panel) = split_charts(root, n_panels, PANEL_WIDTH);
        for ((o, x, y), area) in axes.iter().zip(charts.iter()) {
            let frame = draw_axes(area, None, x.clone(), y.clone())?;
            if *o == Observable::Met {
                for &e in &data.region_edges_gev {
                    if e > x.min && e < x.max {
                        draw_vline(root, &frame, e, GUIDE, LineDash::DashDot)?;
                    }
                }
            }
            for h in data.histograms.iter().filter(|h| h.observable == *o) {
                draw_histogram(root, &frame, h)?;
            }
        }
        if let (Some((x, y)), Some(area)) = (&region_axes, charts.get(axes.len())) {
            let frame = draw_axes(area, None, x.clone(), y.clone())?;
            let floor = frame.y_axis().min;
            for (i, r) in data.regions.iter().enumerate() {
                let xi = i as f64;
                let bar = SeriesStyle {
                    colour: PALETTE[3],
                    dash: LineDash::Solid,
                    marker: Marker::Square,
                    width: 1,
                };
                if r.background_unc > 0.0 {
                    let lo = (r.background - r.background_unc).max(floor);
                    draw_line(
                        root,
                        &frame,
                        &[
                            (xi + 0.12, lo),
                            (xi + 0.12, r.background + r.background_unc),
                        ],
                        &bar,
                    )?;
                }
                draw_point(
                    root,
                    &frame,
                    xi + 0.12,
                    r.background,
                    Marker::Square,
                    PALETTE[3],
                )?;
                draw_point(
                    root,
                    &frame,
                    xi - 0.12,
                    r.signal_events,
                    Marker::Disc,
                    PALETTE[1],
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
        "series",
        "observable",
        "bin_low_gev",
        "bin_high_gev",
        "events",
        "uncertainty",
        "region",
    ]);
    for h in &data.histograms {
        for b in &h.bins {
            table.push(vec![
                h.level.as_str().into(),
                h.observable.as_str().into(),
                num(b.low_gev),
                num(b.high_gev),
                num(b.events),
                num(b.mc_stat),
                String::new(),
            ]);
        }
    }
    for &e in &data.region_edges_gev {
        table.push(vec![
            "region_edge".into(),
            Observable::Met.as_str().into(),
            num(e),
            num(e),
            String::new(),
            String::new(),
            String::new(),
        ]);
    }
    let opt = |v: Option<f64>| v.map(num).unwrap_or_default();
    for r in &data.regions {
        for (series, ev, unc) in [
            ("region_signal", r.signal_events, String::new()),
            ("region_background", r.background, num(r.background_unc)),
        ] {
            table.push(vec![
                series.into(),
                Observable::Met.as_str().into(),
                opt(r.met_low_gev),
                opt(r.met_high_gev),
                num(ev),
                unc,
                r.name.clone(),
            ]);
        }
    }
    Ok((svg, table))
}
