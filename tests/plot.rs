//! Figures: each type renders from the fixtures under tests/fixtures/plot/,
//! the SVG parses as XML and holds the expected series, labels and units;
//! degenerate inputs give a clear error or a sensible figure.
//!
//! The fixture numbers are inputs only; the checks compare the drawing with
//! the input by independent arithmetic (pixel ratios of a linear or
//! logarithmic mapping), never with values copied from the code.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::process::Command;

use recoil::plot::{
    self, ContourLevel, ContourLine, Curve, CurveSource, DistributionsData, ExclusionData,
    Interaction, Labels, PlotError, ScanPoint, data, style,
};

fn fixture(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fixtures/plot")
        .join(name)
}

fn recoil() -> Command {
    Command::new(env!("CARGO_BIN_EXE_recoil"))
}

/// Width of the chart part of a one-chart figure (style::CHART_WIDTH); the
/// side panel with the legend lies to its right.
const CHART_PX: f64 = style::CHART_WIDTH as f64;

/// One parsed SVG, reduced to what the tests look at.
struct Svg {
    texts: Vec<String>,
    /// (stroke colour, points) of every polyline.
    polylines: Vec<(String, Vec<(f64, f64)>)>,
    /// (fill colour, points) of every polygon.
    polygons: Vec<(String, Vec<(f64, f64)>)>,
    /// (fill, stroke, cx, cy) of every circle.
    circles: Vec<(String, String, f64, f64)>,
    font_families: BTreeSet<String>,
}

fn points(s: &str) -> Vec<(f64, f64)> {
    s.split_whitespace()
        .filter_map(|p| {
            let (x, y) = p.split_once(',')?;
            Some((x.parse().ok()?, y.parse().ok()?))
        })
        .collect()
}

fn parse(svg: &str) -> Svg {
    let doc = roxmltree::Document::parse(svg).expect("the SVG parses as XML");
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");
    let mut out = Svg {
        texts: Vec::new(),
        polylines: Vec::new(),
        polygons: Vec::new(),
        circles: Vec::new(),
        font_families: BTreeSet::new(),
    };
    for n in root.descendants().filter(|n| n.is_element()) {
        let a = |k: &str| n.attribute(k).unwrap_or("").to_string();
        match n.tag_name().name() {
            "text" => {
                out.texts.push(n.text().unwrap_or("").trim().to_string());
                out.font_families.insert(a("font-family"));
            }
            "polyline" => out.polylines.push((a("stroke"), points(&a("points")))),
            "polygon" => out.polygons.push((a("fill"), points(&a("points")))),
            "circle" => out.circles.push((
                a("fill"),
                a("stroke"),
                a("cx").parse().unwrap_or(f64::NAN),
                a("cy").parse().unwrap_or(f64::NAN),
            )),
            _ => {}
        }
    }
    out
}

impl Svg {
    /// Whether the figure's text holds `needle`; the side panel wraps long
    /// lines, so the text elements are joined with spaces first.
    fn has_text(&self, needle: &str) -> bool {
        self.texts.join(" ").contains(needle)
    }

    /// Polylines of one colour inside the chart area (left of the panel).
    fn lines_of(&self, colour: &str) -> Vec<&Vec<(f64, f64)>> {
        self.polylines
            .iter()
            .filter(|(c, p)| c == colour && p.iter().all(|q| q.0 < CHART_PX))
            .map(|(_, p)| p)
            .collect()
    }

    fn chart_circles(&self) -> Vec<&(String, String, f64, f64)> {
        self.circles.iter().filter(|c| c.2 < CHART_PX).collect()
    }
}

fn assert_ok(out: &std::process::Output) {
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

fn assert_texts(svg: &Svg, texts: &[&str]) {
    for t in texts {
        assert!(svg.has_text(t), "missing text `{t}` in {:?}", svg.texts);
    }
}

fn hex(c: style::Rgb) -> String {
    c.hex()
}

fn full_labels() -> Labels {
    Labels {
        title: Some("Jet + p_T^miss search".into()),
        mediator: Some("vector".into()),
        couplings: Some("g_q = 0.25, g_χ = 1".into()),
        sqrt_s_tev: Some(13.0),
        lumi_ifb: Some(139.0),
        ..Labels::default()
    }
}

fn exclusion_fixture() -> ExclusionData {
    let rows = data::read_scan_results(&fixture("results.csv")).unwrap();
    ExclusionData {
        points: rows.iter().map(|r| r.point_masses).collect(),
        contours: data::read_contours(&fixture("contours.csv")).unwrap(),
    }
}

fn approx(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

// ---------------------------------------------------------------- exclusion

#[test]
fn exclusion_cli_renders_series_labels_and_units() {
    let dir = tempfile::tempdir().unwrap();
    for f in ["results.csv", "contours.csv"] {
        std::fs::copy(fixture(f), dir.path().join(f)).unwrap();
    }
    let out = dir.path().join("exclusion.svg");
    let st = recoil()
        .args(["plot", "exclusion"])
        .arg(dir.path())
        .args([
            "--mediator",
            "vector",
            "--sqrt-s-tev",
            "13",
            "--lumi-ifb",
            "139",
        ])
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert_ok(&st);
    let svg = parse(&std::fs::read_to_string(&out).unwrap());
    // The labels the issue asks for.
    assert_texts(
        &svg,
        &[
            "95 % CL (CLs)",
            "Mediator: vector",
            // Couplings read from results.csv (all points share g_q = 0.25, g_dm = 1).
            "Couplings: g_q = 0.25, g_χ = 1",
            "√s = 13 TeV, 139 fb⁻¹",
            "Mediator mass M [GeV]",
            "Dark-matter mass m_χ [GeV]",
            "M = 2 m_χ",
            "Observed limit",
            "Expected limit",
            "Expected ± 1σ",
        ],
    );
    // Text is SVG text in a generic family: no font file is involved.
    assert_eq!(
        svg.font_families,
        BTreeSet::from(["sans-serif".to_string()])
    );
    // Series: observed (one solid polyline) and expected (dashed: many
    // short pieces), so they differ without colour; the band as one polygon.
    assert_eq!(svg.lines_of(&hex(style::PALETTE[0])).len(), 1);
    assert!(svg.lines_of(&hex(style::PALETTE[1])).len() >= 10);
    let band: Vec<_> = svg
        .polygons
        .iter()
        .filter(|(c, p)| *c == hex(style::PALETTE[3]) && p.iter().all(|q| q.0 < CHART_PX))
        .collect();
    assert_eq!(band.len(), 1);
    // Nine scanned points: p1, p2, p4 excluded (filled), six allowed (open);
    // counted from the fixture by hand.
    let circles = svg.chart_circles();
    assert_eq!(circles.len(), 9);
    assert_eq!(circles.iter().filter(|c| c.0 != "none").count(), 3);
    assert_eq!(circles.iter().filter(|c| c.0 == "none").count(), 6);

    // The data beside the figure.
    let csv = std::fs::read_to_string(dir.path().join("exclusion.csv")).unwrap();
    let mut lines = csv.lines();
    assert_eq!(
        lines.next(),
        Some("series,segment,m_med_gev,m_dm_gev,excluded")
    );
    let series: BTreeSet<&str> = lines.filter_map(|l| l.split(',').next()).collect();
    for s in [
        "observed",
        "expected",
        "expected_m1",
        "expected_p1",
        "on_shell_line",
        "scanned_point",
    ] {
        assert!(series.contains(s), "{s} not in {series:?}");
    }
    // Nothing but the two outputs and the inputs is left in the folder.
    let names: BTreeSet<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        BTreeSet::from(
            [
                "contours.csv",
                "exclusion.csv",
                "exclusion.svg",
                "results.csv"
            ]
            .map(String::from)
        )
    );
}

#[test]
fn exclusion_points_land_where_a_linear_map_puts_them() {
    // The observed contour of the fixture runs through (500, 300),
    // (750, 200), (1100, 1) GeV. On linear axes the pixel differences keep
    // the data ratios: Δx ratio (750−500)/(1100−500) = 0.41667 and Δy ratio
    // (300−200)/(300−1) = 0.33445 (arithmetic). Tolerance: 1 px rounding.
    let svg = parse(&plot::render_exclusion(&exclusion_fixture(), &full_labels()).unwrap());
    let obs = svg.lines_of(&hex(style::PALETTE[0]));
    let line = obs
        .iter()
        .find(|p| p.len() == 3)
        .expect("observed polyline");
    let (a, b, c) = (line[0], line[1], line[2]);
    let rx = (b.0 - a.0) / (c.0 - a.0);
    let ry = (b.1 - a.1) / (c.1 - a.1);
    assert!(approx(rx, 250.0 / 600.0, 1.5 / (c.0 - a.0).abs()), "{rx}");
    assert!(approx(ry, 100.0 / 299.0, 1.5 / (c.1 - a.1).abs()), "{ry}");
    // Larger m_χ is higher on the page (smaller SVG y).
    assert!(a.1 < c.1);
}

#[test]
fn exclusion_on_shell_line_has_slope_one_half() {
    // M = 2 m_χ: on linear axes the guide's pixel slope equals
    // (1/2)·(px per GeV in y)/(px per GeV in x). The scanned grid corners
    // (500, 1) and (1500, 400) give the px-per-GeV scales (arithmetic).
    let d = ExclusionData {
        points: vec![
            ScanPoint {
                m_med_gev: 500.0,
                m_dm_gev: 1.0,
                excluded: true,
            },
            ScanPoint {
                m_med_gev: 1500.0,
                m_dm_gev: 400.0,
                excluded: false,
            },
        ],
        contours: vec![],
    };
    let svg = parse(&plot::render_exclusion(&d, &full_labels()).unwrap());
    let c = svg.chart_circles();
    let (p, q) = (c[0], c[1]);
    let sx = (q.2 - p.2) / 1000.0;
    let sy = (q.3 - p.3) / 399.0;
    let guide: Vec<(f64, f64)> = svg
        .lines_of(&hex(style::GUIDE))
        .into_iter()
        .flatten()
        .copied()
        .collect();
    let (first, last) = (guide[0], guide[guide.len() - 1]);
    let slope = (last.1 - first.1) / (last.0 - first.0);
    assert!(
        approx(slope, 0.5 * sy / sx, 0.02 * (0.5 * sy / sx).abs()),
        "{slope}"
    );
}

#[test]
fn exclusion_without_excluded_points_is_a_sensible_figure() {
    let rows = data::read_scan_results(&fixture("results_none_excluded.csv")).unwrap();
    let contours = data::read_contours(&fixture("contours_empty.csv")).unwrap();
    assert!(contours.is_empty());
    let d = ExclusionData {
        points: rows.iter().map(|r| r.point_masses).collect(),
        contours,
    };
    let svg = parse(&plot::render_exclusion(&d, &full_labels()).unwrap());
    assert!(svg.has_text("No observed contour"));
    assert!(!svg.has_text("Observed limit"));
    assert_eq!(svg.chart_circles().len(), 2);
    assert!(svg.chart_circles().iter().all(|c| c.0 == "none"));
}

#[test]
fn exclusion_with_one_point_renders() {
    let rows = data::read_scan_results(&fixture("results_one_point.csv")).unwrap();
    let d = ExclusionData {
        points: rows.iter().map(|r| r.point_masses).collect(),
        contours: vec![],
    };
    let mut labels = full_labels();
    labels.couplings = data::uniform_couplings(&rows);
    assert_eq!(labels.couplings.as_deref(), Some("g_q = 0.1, g_χ = 1"));
    let svg = parse(&plot::render_exclusion(&d, &labels).unwrap());
    let c = svg.chart_circles();
    assert_eq!(c.len(), 1);
    assert_ne!(c[0].0, "none");
}

#[test]
fn contour_along_the_grid_edge_stays_inside_the_frame() {
    // A contour lying on the grid's edges (M = 500 and m_χ = 400 are the
    // grid's bounds) must be drawn, clipped to the frame, not dropped.
    let mut d = exclusion_fixture();
    d.contours = vec![ContourLine {
        level: ContourLevel::Observed,
        points: vec![(500.0, 1.0), (500.0, 400.0), (1500.0, 400.0)],
    }];
    let svg = parse(&plot::render_exclusion(&d, &full_labels()).unwrap());
    let lines = svg.lines_of(&hex(style::PALETTE[0]));
    assert_eq!(lines.len(), 1);
    assert_eq!(lines[0].len(), 3);
}

#[test]
fn two_segment_band_falls_back_to_edges() {
    let mut d = exclusion_fixture();
    d.contours = data::read_contours(&fixture("contours_two_segments.csv")).unwrap();
    assert_eq!(
        d.contours
            .iter()
            .filter(|c| c.level == ContourLevel::Observed)
            .count(),
        2
    );
    let svg = parse(&plot::render_exclusion(&d, &full_labels()).unwrap());
    assert!(svg.has_text("Expected ± 1σ (edges)"));
    assert!(
        svg.polygons
            .iter()
            .all(|(c, p)| *c != hex(style::PALETTE[3]) || p.iter().any(|q| q.0 >= CHART_PX)),
        "no band polygon when a side has two segments"
    );
}

#[test]
fn exclusion_refuses_missing_labels_and_points() {
    let mut labels = full_labels();
    labels.lumi_ifb = None;
    match plot::render_exclusion(&exclusion_fixture(), &labels) {
        Err(PlotError::MissingLabel { label, .. }) => assert_eq!(label, "lumi_ifb"),
        other => panic!("expected MissingLabel, got {other:?}"),
    }
    let err = plot::render_exclusion(&ExclusionData::default(), &full_labels()).unwrap_err();
    assert!(err.to_string().contains("at least one point"), "{err}");
    let mut bad = exclusion_fixture();
    bad.points[0].m_med_gev = f64::NAN;
    let err = plot::render_exclusion(&bad, &full_labels()).unwrap_err();
    assert!(err.to_string().contains("point 1"), "{err}");
}

#[test]
fn cli_exclusion_without_luminosity_fails_with_one_message() {
    let dir = tempfile::tempdir().unwrap();
    for f in ["results.csv", "contours.csv"] {
        std::fs::copy(fixture(f), dir.path().join(f)).unwrap();
    }
    let out = dir.path().join("x.svg");
    let st = recoil()
        .args(["plot", "exclusion"])
        .arg(dir.path())
        .args(["--mediator", "vector", "--sqrt-s-tev", "13", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    assert_eq!(st.status.code(), Some(1));
    let err = String::from_utf8_lossy(&st.stderr);
    assert!(err.contains("lumi_ifb"), "{err}");
    assert!(!out.exists());
}

#[test]
fn cli_rejects_non_svg_output_before_reading() {
    let st = recoil()
        .args(["plot", "cutflow", "/nonexistent-folder", "--out", "fig.png"])
        .output()
        .unwrap();
    assert_eq!(st.status.code(), Some(1));
    let err = String::from_utf8_lossy(&st.stderr);
    assert!(err.contains(".svg"), "{err}");
    assert!(!err.contains("nonexistent-folder/cutflow.csv"), "{err}");
}

// ---------------------------------------------------------------- DM–nucleon

fn dm_curves() -> Vec<Curve> {
    let mut c = data::read_dm_nucleon(&fixture("dm_nucleon.csv")).unwrap();
    c.push(
        data::read_curve_csv(
            &fixture("direct_curve.csv"),
            "external",
            CurveSource::Imported,
            0.9,
            Interaction::SpinIndependent,
        )
        .unwrap(),
    );
    c
}

#[test]
fn dm_nucleon_renders_curves_with_cl_and_model_note() {
    let curves = dm_curves();
    assert_eq!(curves.len(), 4);
    let svg = parse(&plot::render_dm_nucleon(&curves, &full_labels()).unwrap());
    assert_texts(
        &svg,
        &[
            "observed (95 % CL, collider)",
            "expected (95 % CL, collider)",
            "xenon-1t-year (90 % CL, direct)",
            "external (90 % CL, imported)",
            "σ_SI (DM–nucleon) [cm²]",
            "Dark-matter mass m_χ [GeV]",
            "hold only for the stated model and couplings",
            "10⁻⁴⁰",
        ],
    );
    // One colour per curve, in order.
    for i in 0..4 {
        assert!(
            !svg.lines_of(&hex(style::series_style(i).colour)).is_empty(),
            "curve {i}"
        );
    }
}

#[test]
fn dm_nucleon_axes_are_logarithmic_and_inf_breaks_the_line() {
    // The observed curve of the fixture: (1, 2.1e-41), (10, 3.0e-41),
    // (100, 3.5e-41), (300, 8.0e-41). On log axes x(10) − x(1) = x(100) −
    // x(10) (one decade each); in y the ratio of pixel differences equals
    // log(3.0/2.1) / log(3.5/2.1) = 0.69823 (arithmetic). Tolerance: 1 px.
    let curves = dm_curves();
    let svg = parse(&plot::render_dm_nucleon(&curves, &full_labels()).unwrap());
    let obs: Vec<(f64, f64)> = svg.lines_of(&hex(style::series_style(0).colour))[0].clone();
    assert_eq!(obs.len(), 4);
    let decade = obs[1].0 - obs[0].0;
    assert!(approx(obs[2].0 - obs[1].0, decade, 1.0));
    let ry = (obs[1].1 - obs[0].1) / (obs[2].1 - obs[0].1);
    let expect = (3.0f64 / 2.1).ln() / (3.5f64 / 2.1).ln();
    assert!(
        approx(ry, expect, 1.5 / (obs[2].1 - obs[0].1).abs()),
        "{ry}"
    );
    // The direct curve has σ = inf at 3 GeV: its drawing starts at 6 GeV,
    // log10(6) = 0.77815 decades right of 1 GeV (arithmetic).
    let direct = svg.lines_of(&hex(style::series_style(2).colour));
    let leftmost = direct
        .iter()
        .flat_map(|p| p.iter())
        .map(|p| p.0)
        .fold(f64::INFINITY, f64::min);
    assert!(
        approx(leftmost, obs[0].0 + 6f64.log10() * decade, 1.5),
        "{leftmost}"
    );
}

#[test]
fn dm_nucleon_cli_picks_interaction_and_imports() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy(
        fixture("dm_nucleon_mixed.csv"),
        dir.path().join("dm_nucleon.csv"),
    )
    .unwrap();
    let out = dir.path().join("dmn.svg");
    let base = |cmd: &mut Command| {
        cmd.args(["plot", "dm-nucleon", "--scan"])
            .arg(dir.path())
            .args([
                "--mediator",
                "axial-vector",
                "--couplings",
                "g_q = 0.25, g_χ = 1",
            ])
            .arg("--out")
            .arg(&out);
    };
    let mut c = recoil();
    base(&mut c);
    let st = c.output().unwrap();
    assert_eq!(st.status.code(), Some(1));
    let err = String::from_utf8_lossy(&st.stderr);
    assert!(
        err.contains("SI, SD-p") && err.contains("--interaction"),
        "{err}"
    );

    let mut c = recoil();
    base(&mut c);
    let st = c
        .args(["--interaction", "SD-p", "--import"])
        .arg(format!("ext={}", fixture("direct_curve.csv").display()))
        .output()
        .unwrap();
    assert_ok(&st);
    let svg = parse(&std::fs::read_to_string(&out).unwrap());
    assert!(svg.has_text("σ_SD (DM–proton) [cm²]"));
    assert!(svg.has_text("observed-sd (95 % CL, collider)"));
    assert!(svg.has_text("ext (90 % CL, imported)"));
    assert!(!svg.has_text("observed (95 % CL"));
    let csv = std::fs::read_to_string(dir.path().join("dmn.csv")).unwrap();
    assert!(csv.starts_with("curve,source,cl,interaction,m_dm_gev,sigma_cm2\n"));
    assert_eq!(csv.lines().count(), 1 + 1 + 4);
    // Cross-sections in scientific notation, shortest digits: the input
    // files' own values (dm_nucleon_mixed.csv, direct_curve.csv) come back
    // as written there.
    let sigmas: Vec<&str> = csv
        .lines()
        .skip(1)
        .map(|l| l.rsplit(',').next().unwrap())
        .collect();
    assert_eq!(sigmas, ["2.1e-42", "3e-41", "1e-44", "1e-46", "3e-46"]);
    // The figure's table reads back with the plot reader.
    let back = data::read_dm_nucleon(&dir.path().join("dmn.csv")).unwrap();
    assert_eq!(back.iter().map(|c| c.points.len()).sum::<usize>(), 5);
}

#[test]
fn dm_nucleon_refuses_bad_curves() {
    let labels = full_labels();
    assert!(plot::render_dm_nucleon(&[], &labels).is_err());
    let mut c = dm_curves();
    c[0].points[1].1 = -1e-40;
    let err = plot::render_dm_nucleon(&c, &labels).unwrap_err();
    assert!(
        err.to_string().contains("observed") && err.to_string().contains("cm²"),
        "{err}"
    );
    let mut c = dm_curves();
    c[3].interaction = Interaction::SpinDependentNeutron;
    assert!(plot::render_dm_nucleon(&c, &labels).is_err());
    // A collider curve needs the model it holds for.
    let mut no_model = labels.clone();
    no_model.couplings = None;
    assert!(matches!(
        plot::render_dm_nucleon(&dm_curves(), &no_model),
        Err(PlotError::MissingLabel { .. })
    ));
    // Direct-detection curves alone need no model.
    let direct: Vec<Curve> = dm_curves()
        .into_iter()
        .filter(|c| c.source != CurveSource::Collider)
        .collect();
    assert!(plot::render_dm_nucleon(&direct, &Labels::default()).is_ok());
}

#[test]
fn dm_nucleon_single_point_curve_is_a_marker() {
    let c = vec![Curve {
        label: "one".into(),
        source: CurveSource::Imported,
        cl: 0.9,
        interaction: Interaction::SpinIndependent,
        points: vec![(50.0, 1e-46)],
    }];
    let svg = parse(&plot::render_dm_nucleon(&c, &Labels::default()).unwrap());
    assert_eq!(svg.chart_circles().len(), 1);
}

// ---------------------------------------------------------------- distributions

#[test]
fn distributions_cli_draws_truth_reco_and_region_edges() {
    let dir = tempfile::tempdir().unwrap();
    for f in ["distributions.csv", "yields.csv"] {
        std::fs::copy(fixture(f), dir.path().join(f)).unwrap();
    }
    let out = dir.path().join("dist.svg");
    let st = recoil()
        .args(["plot", "distributions"])
        .arg(dir.path())
        .args(["--sqrt-s-tev", "13", "--lumi-ifb", "139", "--out"])
        .arg(&out)
        .output()
        .unwrap();
    assert_ok(&st);
    let svg = parse(&std::fs::read_to_string(&out).unwrap());
    assert_texts(
        &svg,
        &[
            "Missing transverse momentum p_T^miss [GeV]",
            "Leading-jet p_T [GeV]",
            "Expected signal events per bin",
            "Signal, reconstructed level (± MC stat.)",
            "Signal, truth level (± MC stat.)",
            "Signal-region p_T^miss edges",
            "Background estimate per region (± unc.)",
            "Region 0: SR1 [250, 300) GeV",
        ],
    );
    // Region edges 250, 300, 500 GeV (the fixture's distinct met bounds):
    // vertical guide lines whose x positions keep the ratio
    // (300 − 250)/(500 − 250) = 0.2 on the linear p_T^miss axis.
    let mut xs: Vec<f64> = svg
        .polylines
        .iter()
        .filter(|(c, p)| *c == hex(style::GUIDE) && p.iter().all(|q| q.0 < CHART_PX))
        .flat_map(|(_, p)| p.iter().map(|q| q.0))
        .collect();
    xs.sort_by(f64::total_cmp);
    xs.dedup_by(|a, b| (*a - *b).abs() < 0.5);
    assert_eq!(xs.len(), 3, "{xs:?}");
    let r = (xs[1] - xs[0]) / (xs[2] - xs[0]);
    assert!(approx(r, 0.2, 1.5 / (xs[2] - xs[0])), "{r}");
    // The per-region panel: four regions, signal as discs.
    let discs = svg
        .circles
        .iter()
        .filter(|c| c.0 == hex(style::PALETTE[1]))
        .count();
    assert_eq!(discs, 4 + 1, "four regions and one legend sample");
    let csv = std::fs::read_to_string(dir.path().join("dist.csv")).unwrap();
    assert!(
        csv.starts_with("series,observable,bin_low_gev,bin_high_gev,events,uncertainty,region\n")
    );
    assert_eq!(
        csv.lines()
            .filter(|l| l.starts_with("region_edge,"))
            .count(),
        3
    );
}

#[test]
fn distributions_with_all_empty_bins_still_render() {
    let hist = data::read_distributions(&fixture("distributions.csv")).unwrap();
    let zeroed: Vec<_> = hist
        .into_iter()
        .map(|mut h| {
            for b in &mut h.bins {
                b.events = 0.0;
                b.mc_stat = 0.0;
            }
            h
        })
        .collect();
    let d = DistributionsData {
        histograms: zeroed,
        region_edges_gev: vec![250.0],
        regions: vec![],
    };
    let svg = parse(&plot::render_distributions(&d, &Labels::default()).unwrap());
    assert!(svg.has_text("Expected signal events per bin"));
    let nothing = DistributionsData::default();
    assert!(plot::render_distributions(&nothing, &Labels::default()).is_err());
}

#[test]
fn overlapping_bins_are_an_error_naming_the_line() {
    let err = data::read_distributions(&fixture("distributions_overlap.csv")).unwrap_err();
    let msg = err.to_string();
    assert!(
        msg.contains("distributions_overlap.csv") && msg.contains("line 3"),
        "{msg}"
    );
    assert!(msg.contains("overlap"), "{msg}");
}

// ---------------------------------------------------------------- cut-flow

#[test]
fn cutflow_cli_draws_regions_after_preselection() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy(fixture("cutflow.csv"), dir.path().join("cutflow.csv")).unwrap();
    let out = dir.path().join("cf.svg");
    let st = recoil()
        .args(["plot", "cutflow"])
        .arg(dir.path())
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert_ok(&st);
    let svg = parse(&std::fs::read_to_string(&out).unwrap());
    assert_texts(
        &svg,
        &[
            "Cumulative efficiency",
            "Cut-flow step",
            "preselection",
            "SR1",
            "SR3",
            "met > 250",
            "Zero efficiencies are not drawn",
            "0.1",
            "0.01",
        ],
    );
    // Each region's line starts at the last preselection point: the
    // preselection's step 3 (efficiency 0.2) — the SR1 line's first point
    // equals the preselection line's last point.
    let pre = svg.lines_of(&hex(style::series_style(0).colour));
    let sr1 = svg.lines_of(&hex(style::series_style(1).colour));
    let pre_last = *pre.iter().flat_map(|p| p.iter()).last().unwrap();
    let sr1_first = sr1[0][0];
    assert!(approx(pre_last.0, sr1_first.0, 1.0) && approx(pre_last.1, sr1_first.1, 1.0));
    // Log y: efficiencies 1, 0.3 and 0.2 (fixture) give pixel ratio
    // log(0.3)/log(0.2) = 0.74807 measured from the efficiency-1 point
    // (arithmetic).
    let pts: Vec<(f64, f64)> = pre.iter().flat_map(|p| p.iter()).copied().collect();
    let (y1, y03, y02) = (pts[0].1, pts[2].1, pts[3].1);
    let r = (y03 - y1) / (y02 - y1);
    assert!(
        approx(r, 0.3f64.ln() / 0.2f64.ln(), 1.5 / (y02 - y1)),
        "{r}"
    );
    let csv = std::fs::read_to_string(dir.path().join("cf.csv")).unwrap();
    assert!(
        csv.contains("SR1,4,1,250 <= met < 300,0.09,0.45,72"),
        "{csv}"
    );
}

#[test]
fn cutflow_refuses_out_of_range_efficiencies_and_duplicates() {
    let mut d = data::read_cutflow(&fixture("cutflow.csv")).unwrap();
    d.rows[1].efficiency_cumulative = 1.5;
    let err = plot::render_cutflow(&d, &Labels::default()).unwrap_err();
    assert!(
        err.to_string().contains("[0, 1]") && err.to_string().contains("1.5"),
        "{err}"
    );
    let mut d = data::read_cutflow(&fixture("cutflow.csv")).unwrap();
    let dup = d.rows[0].clone();
    d.rows.push(dup);
    assert!(
        plot::render_cutflow(&d, &Labels::default())
            .unwrap_err()
            .to_string()
            .contains("twice")
    );
    assert!(plot::render_cutflow(&Default::default(), &Labels::default()).is_err());
}

// ---------------------------------------------------------------- files

#[test]
fn empty_and_malformed_files_give_one_clear_error() {
    let e = data::read_scan_results(&fixture("empty.csv")).unwrap_err();
    assert!(matches!(e, PlotError::Empty { .. }), "{e}");
    assert!(e.to_string().contains("empty.csv"));
    let e = data::read_scan_results(&fixture("results_header_only.csv")).unwrap_err();
    assert!(e.to_string().contains("no data rows"), "{e}");
    let e = data::read_scan_results(&fixture("results_bad_bool.csv")).unwrap_err();
    let m = e.to_string();
    assert!(
        m.contains("line 2") && m.contains("excluded") && m.contains("`yes`"),
        "{m}"
    );
    let e = data::read_contours(&fixture("results.csv")).unwrap_err();
    assert!(e.to_string().contains("`level`"), "{e}");
    let e = data::read_cutflow(&fixture("does-not-exist.csv")).unwrap_err();
    assert!(matches!(e, PlotError::Read { .. }), "{e}");

    let dir = tempfile::tempdir().unwrap();
    let ragged = dir.path().join("ragged.csv");
    std::fs::write(&ragged, "m_dm_gev,sigma_cm2\n10,1e-45\n20\n").unwrap();
    let e = data::read_curve_csv(
        &ragged,
        "x",
        CurveSource::Imported,
        0.9,
        Interaction::SpinIndependent,
    )
    .unwrap_err();
    assert!(e.to_string().contains("line 3"), "{e}");
    let nan = dir.path().join("nan.csv");
    std::fs::write(&nan, "m_dm_gev,sigma_cm2\n10,NaN\n").unwrap();
    let e = data::read_curve_csv(
        &nan,
        "x",
        CurveSource::Imported,
        0.9,
        Interaction::SpinIndependent,
    )
    .unwrap_err();
    assert!(e.to_string().contains("sigma_cm2"), "{e}");
}

#[test]
fn writing_into_a_missing_folder_fails_cleanly() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("no-such-folder/fig.svg");
    let e = plot::cutflow_figure(
        &data::read_cutflow(&fixture("cutflow.csv")).unwrap(),
        &Labels::default(),
        &out,
    )
    .unwrap_err();
    assert!(matches!(e, PlotError::Write { .. }), "{e}");
    assert!(e.to_string().contains("no-such-folder"));
    // Nothing was created, not even a temporary file.
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}

// ---------------------------------------------------------------- palette

/// sRGB (8 bit) to CIELAB (D65), by IEC 61966-2-1 (sRGB transfer curve and
/// primaries) and CIE 15 (L*a*b*); common practice.
fn lab_of_linear(rl: [f64; 3]) -> [f64; 3] {
    let m = [
        [0.4124, 0.3576, 0.1805],
        [0.2126, 0.7152, 0.0722],
        [0.0193, 0.1192, 0.9505],
    ];
    let white = [0.95047, 1.0, 1.08883];
    let mut f = [0.0; 3];
    for i in 0..3 {
        let t = (m[i][0] * rl[0].clamp(0.0, 1.0)
            + m[i][1] * rl[1].clamp(0.0, 1.0)
            + m[i][2] * rl[2].clamp(0.0, 1.0))
            / white[i];
        let d: f64 = 6.0 / 29.0;
        f[i] = if t > d.powi(3) {
            t.cbrt()
        } else {
            t / (3.0 * d * d) + 4.0 / 29.0
        };
    }
    [
        116.0 * f[1] - 16.0,
        500.0 * (f[0] - f[1]),
        200.0 * (f[1] - f[2]),
    ]
}

fn linear(c: style::Rgb) -> [f64; 3] {
    [c.0, c.1, c.2].map(|v| {
        let v = f64::from(v) / 255.0;
        if v <= 0.04045 {
            v / 12.92
        } else {
            ((v + 0.055) / 1.055).powf(2.4)
        }
    })
}

#[test]
fn palette_stays_apart_for_colour_blind_readers_and_in_greyscale() {
    // Dichromat simulation matrices for linear RGB, severity 1.0: G. M.
    // Machado, M. M. Oliveira, L. A. F. Fernandes, IEEE TVCG 15 (2009) 1291,
    // Table 1 (from memory; each row sums to 1, checked below).
    let sims: [(&str, [[f64; 3]; 3]); 4] = [
        (
            "normal",
            [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]],
        ),
        (
            "protanopia",
            [
                [0.152286, 1.052583, -0.204868],
                [0.114503, 0.786281, 0.099216],
                [-0.003882, -0.048116, 1.051998],
            ],
        ),
        (
            "deuteranopia",
            [
                [0.367322, 0.860646, -0.227968],
                [0.280085, 0.672501, 0.047413],
                [-0.011820, 0.042940, 0.968881],
            ],
        ),
        (
            "tritanopia",
            [
                [1.255528, -0.076749, -0.178779],
                [-0.078411, 0.930809, 0.147602],
                [0.004733, 0.691367, 0.303900],
            ],
        ),
    ];
    for (name, m) in &sims {
        for row in m {
            assert!(approx(row.iter().sum::<f64>(), 1.0, 1e-5), "{name}");
        }
        let labs: Vec<[f64; 3]> = style::PALETTE
            .iter()
            .map(|&c| {
                let l = linear(c);
                let s = [0, 1, 2].map(|i| m[i][0] * l[0] + m[i][1] * l[1] + m[i][2] * l[2]);
                lab_of_linear(s)
            })
            .collect();
        for i in 0..labs.len() {
            for j in i + 1..labs.len() {
                let de = ((labs[i][0] - labs[j][0]).powi(2)
                    + (labs[i][1] - labs[j][1]).powi(2)
                    + (labs[i][2] - labs[j][2]).powi(2))
                .sqrt();
                // ΔE*ab ≥ 20 is far above the ~2.3 just-noticeable
                // difference (common practice); numpy 2.4 gives a minimum
                // of 32.4 (deuteranopia) for this palette.
                assert!(de >= 20.0, "{name}: colours {i} and {j}: ΔE = {de:.1}");
            }
        }
    }
    // Greyscale: CIE L* of each colour (its luminance) at least 8 apart.
    let mut ls: Vec<f64> = style::PALETTE
        .iter()
        .map(|&c| lab_of_linear(linear(c))[0])
        .collect();
    ls.sort_by(f64::total_cmp);
    for w in ls.windows(2) {
        assert!(w[1] - w[0] >= 8.0, "L* {ls:?}");
    }
}

#[test]
fn extreme_magnitudes_do_not_hang_or_panic() {
    // Values at the ends of f64's range must give a figure or an error.
    for (a, b) in [(0.0, 1e308), (1e-300, 2e-300), (5.0, 5.0)] {
        let d = ExclusionData {
            points: vec![
                ScanPoint {
                    m_med_gev: a,
                    m_dm_gev: a,
                    excluded: true,
                },
                ScanPoint {
                    m_med_gev: b,
                    m_dm_gev: b,
                    excluded: false,
                },
            ],
            contours: vec![],
        };
        let _ = plot::render_exclusion(&d, &full_labels());
    }
    let c = vec![Curve {
        label: "wide".into(),
        source: CurveSource::Imported,
        cl: 0.9,
        interaction: Interaction::SpinIndependent,
        points: vec![(1e-300, 1e-300), (1e300, 1e300)],
    }];
    let _ = plot::render_dm_nucleon(&c, &Labels::default());
}

// ---------------------------------------------------------------- folders

#[test]
fn scan_and_recast_folders_get_all_their_figures() {
    let dir = tempfile::tempdir().unwrap();
    for (from, to) in [
        ("results.csv", "results.csv"),
        ("contours.csv", "contours.csv"),
        ("dm_nucleon.csv", "dm_nucleon.csv"),
        ("yields.csv", "yields.csv"),
        ("cutflow.csv", "cutflow.csv"),
        ("distributions.csv", "distributions.csv"),
    ] {
        std::fs::copy(fixture(from), dir.path().join(to)).unwrap();
    }
    let mut labels = full_labels();
    labels.couplings = None; // taken from results.csv
    let scan = plot::scan_figures(dir.path(), &labels).unwrap();
    let recast = plot::recast_figures(dir.path(), &labels).unwrap();
    let names: Vec<String> = scan
        .iter()
        .chain(recast.iter())
        .map(|f| f.svg.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        [
            "exclusion.svg",
            "dm_nucleon.svg",
            "distributions.svg",
            "cutflow.svg"
        ]
    );
    for f in scan.iter().chain(recast.iter()) {
        assert_eq!(f.svg.parent().unwrap(), dir.path().join(plot::FIGURES_DIR));
        parse(&std::fs::read_to_string(&f.svg).unwrap());
        assert!(f.csv.exists());
    }
    // The scan's own dm_nucleon.csv is left as it was.
    assert_eq!(
        std::fs::read(dir.path().join("dm_nucleon.csv")).unwrap(),
        std::fs::read(fixture("dm_nucleon.csv")).unwrap()
    );
    let ex = parse(&std::fs::read_to_string(&scan[0].svg).unwrap());
    assert!(ex.has_text("Couplings: g_q = 0.25, g_χ = 1"));

    // Several cross-sections: one DM–nucleon figure each.
    std::fs::copy(
        fixture("dm_nucleon_mixed.csv"),
        dir.path().join("dm_nucleon.csv"),
    )
    .unwrap();
    let scan = plot::scan_figures(dir.path(), &full_labels()).unwrap();
    let names: Vec<String> = scan
        .iter()
        .map(|f| f.svg.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        ["exclusion.svg", "dm_nucleon_SI.svg", "dm_nucleon_SD-p.svg"]
    );
}

#[test]
fn markup_and_control_characters_in_labels_keep_the_svg_well_formed() {
    let mut d = data::read_cutflow(&fixture("cutflow.csv")).unwrap();
    d.rows[1].cut = "met < 300 & \"n_jets\" <= 4 \u{1}".into();
    let labels = Labels {
        title: Some("S & B <test>".into()),
        notes: vec!["it's \u{7} fine".into()],
        ..Labels::default()
    };
    let svg = parse(&plot::render_cutflow(&d, &labels).unwrap());
    assert!(svg.has_text("S & B <test>"));
    assert!(svg.has_text("met < 300 & \"n_jets\" <= 4"));
}
