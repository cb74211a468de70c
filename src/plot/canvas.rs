//! Drawing primitives shared by the figures: axes (linear or logarithmic,
//! drawn by plotters), and everything inside them drawn here in pixel space
//! (dashed lines clipped to the plotting area, markers, filled bands, error
//! bars), plus the side panel with the legend and the labels.

use std::fmt::Display;

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::style::{
    AXIS_TITLE_PX, FONT, GRID, INK, LineDash, Marker, PANEL_PX, Rgb, SeriesStyle, TICK_PX, TITLE_PX,
};

/// The drawing area of a whole figure, in pixels.
pub(crate) type Root<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// Internal drawing result; figures map the message to [`super::PlotError::Draw`].
pub(crate) type DResult<T> = Result<T, String>;

fn de<E: Display>(e: E) -> String {
    e.to_string()
}

/// A point in pixels (float, before rounding).
type Px = (f64, f64);

/// Axis scale.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Scale {
    Linear,
    Log,
}

/// One axis: its scale, range (data units) and title (with the unit).
#[derive(Debug, Clone)]
pub(crate) struct Axis {
    pub scale: Scale,
    pub min: f64,
    pub max: f64,
    pub title: String,
    /// For log axes: print 1, 10, 100 rather than 10⁰, 10¹, 10².
    plain_log: bool,
    /// For linear axes: label only integer ticks (a categorical axis).
    integer_ticks: bool,
}

impl Axis {
    /// A linear axis covering `values` with 5 % padding; `nonneg` keeps the
    /// lower end at 0 or above when all values are non-negative.
    pub fn linear(values: impl IntoIterator<Item = f64>, title: &str, nonneg: bool) -> Axis {
        let (lo, hi) = finite_range(values.into_iter());
        let (mut min, max) = match (lo, hi) {
            (Some(lo), Some(hi)) if hi > lo => {
                let pad = 0.05 * (hi - lo);
                (lo - pad, hi + pad)
            }
            (Some(0.0), Some(_)) => (-1.0, 1.0),
            (Some(v), Some(_)) => (v - 0.5 * v.abs(), v + 0.5 * v.abs()),
            _ => (0.0, 1.0),
        };
        if nonneg && lo.is_some_and(|l| l >= 0.0) && min < 0.0 {
            min = 0.0;
        }
        Axis {
            scale: Scale::Linear,
            min,
            max,
            title: title.to_string(),
            plain_log: false,
            integer_ticks: false,
        }
    }

    /// A categorical axis for positions 0..n-1, labelled by integers.
    pub fn categories(n: usize, title: &str) -> Axis {
        Axis {
            scale: Scale::Linear,
            min: -0.5,
            max: n.max(1) as f64 - 0.5,
            title: title.to_string(),
            plain_log: false,
            integer_ticks: true,
        }
    }

    /// A log axis covering the positive finite `values`, widened to whole
    /// decades; `None` when there is no positive finite value.
    pub fn log(values: impl IntoIterator<Item = f64>, title: &str) -> Option<Axis> {
        Axis::log_with_room(values, title, 0.0)
    }

    /// As [`Axis::log`], but a value on a decade gets a decade of room so it
    /// is not drawn on the frame (for counts and cross-sections).
    pub fn log_padded(values: impl IntoIterator<Item = f64>, title: &str) -> Option<Axis> {
        Axis::log_with_room(values, title, 0.02)
    }

    fn log_with_room(
        values: impl IntoIterator<Item = f64>,
        title: &str,
        room: f64,
    ) -> Option<Axis> {
        let (lo, hi) = finite_range(values.into_iter().filter(|v| *v > 0.0));
        let (lo, hi) = (lo?, hi?);
        let a = (lo.log10() - room).floor();
        let mut b = (hi.log10() + room).ceil();
        if b <= a {
            b = a + 1.0;
        }
        Some(Axis::log_decades(a as i32, b as i32, title))
    }

    /// A log axis from 10^a to 10^b.
    pub fn log_decades(a: i32, b: i32, title: &str) -> Axis {
        let b = b.max(a + 1);
        Axis {
            scale: Scale::Log,
            min: decade(a),
            max: decade(b),
            title: title.to_string(),
            plain_log: a >= -3 && b <= 4,
            integer_ticks: false,
        }
    }

    /// The range handed to plotters: the values, or log₁₀ of them.
    fn plotters_range(&self) -> (f64, f64) {
        match self.scale {
            Scale::Linear => (self.min, self.max),
            Scale::Log => (self.min.log10(), self.max.log10()),
        }
    }

    /// How many labels to ask plotters for.
    fn label_hint(&self) -> usize {
        match (self.scale, self.integer_ticks) {
            (Scale::Linear, true) => ((self.max - self.min).round() as usize + 1).min(40),
            (Scale::Linear, false) => 8,
            (Scale::Log, _) => {
                let (a, b) = self.plotters_range();
                ((b - a).round() as usize + 1).clamp(2, 12)
            }
        }
    }

    /// The tick label at plotters position `t` (the value, or its log₁₀);
    /// empty where no label belongs.
    pub fn tick_label(&self, t: f64) -> String {
        match self.scale {
            Scale::Linear => {
                if self.integer_ticks {
                    if (t - t.round()).abs() < 1e-9 && t.round() >= 0.0 {
                        format!("{}", t.round() as i64)
                    } else {
                        String::new()
                    }
                } else {
                    linear_label(t, self.max - self.min)
                }
            }
            Scale::Log => {
                let k = t.round();
                if (t - k).abs() > 1e-6 {
                    return String::new();
                }
                let k = k as i32;
                if self.plain_log {
                    linear_label(decade(k), decade(k))
                } else {
                    format!("10{}", superscript(k))
                }
            }
        }
    }

    fn frac(&self, v: f64) -> Option<f64> {
        if !v.is_finite() {
            return None;
        }
        match self.scale {
            Scale::Linear => Some((v - self.min) / (self.max - self.min)),
            Scale::Log => {
                if v <= 0.0 {
                    None
                } else {
                    Some((v / self.min).log10() / (self.max / self.min).log10())
                }
            }
        }
    }
}

/// 10ᵏ correctly rounded (`powi` is not for negative k).
pub(crate) fn decade(k: i32) -> f64 {
    format!("1e{k}").parse().unwrap_or(f64::NAN)
}

fn finite_range(values: impl Iterator<Item = f64>) -> (Option<f64>, Option<f64>) {
    values
        .filter(|v| v.is_finite())
        .fold((None, None), |(lo, hi), v| {
            (
                Some(lo.map_or(v, |l: f64| l.min(v))),
                Some(hi.map_or(v, |h: f64| h.max(v))),
            )
        })
}

/// A tick label with as many decimals as the axis span needs.
fn linear_label(v: f64, span: f64) -> String {
    if v.abs() < 1e-9 * span.abs().max(f64::MIN_POSITIVE) {
        return "0".to_string();
    }
    let decimals = if span >= 10.0 {
        0
    } else {
        (2.0 - span.log10().floor()).clamp(0.0, 8.0) as usize
    };
    let s = format!("{v:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

/// An integer as Unicode superscript digits, e.g. −40 → "⁻⁴⁰".
pub(crate) fn superscript(k: i32) -> String {
    const DIGITS: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let mut s = String::new();
    if k < 0 {
        s.push('⁻');
    }
    for c in k.unsigned_abs().to_string().chars() {
        let d = c.to_digit(10).unwrap_or(0) as usize;
        s.push(DIGITS[d]);
    }
    s
}

/// Renders a figure of `size` pixels into an SVG string.
pub(crate) fn render_svg(
    size: (u32, u32),
    draw: impl FnOnce(&Root) -> DResult<()>,
) -> DResult<String> {
    let mut buf = String::new();
    {
        let root = SVGBackend::with_string(&mut buf, size).into_drawing_area();
        root.fill(&WHITE).map_err(de)?;
        draw(&root)?;
        root.present().map_err(de)?;
    }
    Ok(buf)
}

/// The plotting area of a chart and the mapping from data to pixels.
pub(crate) struct Frame {
    x: Axis,
    y: Axis,
    left: f64,
    right: f64,
    top: f64,
    bottom: f64,
}

impl Frame {
    /// Pixel position of a data point; `None` when it cannot be placed
    /// (not finite, or ≤ 0 on a log axis).
    pub fn px(&self, x: f64, y: f64) -> Option<Px> {
        let fx = self.x.frac(x)?;
        let fy = self.y.frac(y)?;
        Some((
            self.left + fx * (self.right - self.left),
            self.bottom + fy * (self.top - self.bottom),
        ))
    }

    /// The pixel rectangle (x0, y0, x1, y1) with x0 < x1, y0 < y1.
    fn rect(&self) -> (f64, f64, f64, f64) {
        (
            self.left.min(self.right),
            self.top.min(self.bottom),
            self.left.max(self.right),
            self.top.max(self.bottom),
        )
    }

    pub fn y_axis(&self) -> &Axis {
        &self.y
    }
}

/// Draws the axes, ticks, grid and axis titles of one chart on `area`, with
/// an optional caption above, and returns the data-to-pixel mapping.
///
/// A log axis is handed to plotters as a linear axis over log₁₀ of the
/// values (plotters 0.3.7 drops log ticks below 2.2×10⁻¹⁶, which rules out
/// cross-sections in cm²); its labels read 10ᵏ and the minor ticks at
/// 2…9×10ᵏ are drawn here.
pub(crate) fn draw_axes(area: &Root, caption: Option<&str>, x: Axis, y: Axis) -> DResult<Frame> {
    let mut builder = ChartBuilder::on(area);
    builder
        .margin(14)
        .x_label_area_size(58)
        .y_label_area_size(92);
    if let Some(c) = caption {
        builder.caption(c, (FONT, TITLE_PX).into_font().color(&INK.to_plotters()));
    }
    let (x0, x1) = x.plotters_range();
    let (y0, y1) = y.plotters_range();
    let mut ch = builder.build_cartesian_2d(x0..x1, y0..y1).map_err(de)?;
    let xf = |v: &f64| x.tick_label(*v);
    let yf = |v: &f64| y.tick_label(*v);
    ch.configure_mesh()
        .x_desc(x.title.as_str())
        .y_desc(y.title.as_str())
        .x_label_formatter(&xf)
        .y_label_formatter(&yf)
        .x_labels(x.label_hint())
        .y_labels(y.label_hint())
        .bold_line_style(GRID.to_plotters())
        .light_line_style(WHITE.mix(0.0))
        .axis_style(INK.to_plotters())
        .label_style((FONT, TICK_PX).into_font().color(&INK.to_plotters()))
        .axis_desc_style((FONT, AXIS_TITLE_PX).into_font().color(&INK.to_plotters()))
        .draw()
        .map_err(de)?;
    let (l, b) = ch.backend_coord(&(x0, y0));
    let (r, t) = ch.backend_coord(&(x1, y1));
    let frame = Frame {
        x,
        y,
        left: f64::from(l),
        right: f64::from(r),
        top: f64::from(t),
        bottom: f64::from(b),
    };
    draw_minor_ticks(area, &frame)?;
    Ok(frame)
}

/// Minor ticks at 2…9×10ᵏ on log axes, pointing into the plotting area.
fn draw_minor_ticks(root: &Root, frame: &Frame) -> DResult<()> {
    let style = stroke(INK, 1);
    for (axis, horizontal) in [(&frame.x, true), (&frame.y, false)] {
        if axis.scale != Scale::Log {
            continue;
        }
        let (a, b) = (
            axis.min.log10().round() as i32,
            axis.max.log10().round() as i32,
        );
        if b - a > 12 {
            continue;
        }
        for k in a..b {
            for m in 2..=9 {
                let v = f64::from(m) * decade(k);
                let Some(f) = axis.frac(v) else { continue };
                let seg = if horizontal {
                    let px = frame.left + f * (frame.right - frame.left);
                    [(px, frame.bottom), (px, frame.bottom - 5.0)]
                } else {
                    let py = frame.bottom + f * (frame.top - frame.bottom);
                    [(frame.left, py), (frame.left + 5.0, py)]
                };
                root.draw(&PathElement::new(seg.map(ipt).to_vec(), style))
                    .map_err(de)?;
            }
        }
    }
    Ok(())
}

fn ipt(p: Px) -> (i32, i32) {
    (p.0.round() as i32, p.1.round() as i32)
}

fn stroke(colour: Rgb, width: u32) -> ShapeStyle {
    ShapeStyle {
        color: colour.to_plotters().to_rgba(),
        filled: false,
        stroke_width: width,
    }
}

fn fill(colour: Rgb, opacity: f64) -> ShapeStyle {
    ShapeStyle {
        color: colour.to_plotters().mix(opacity),
        filled: true,
        stroke_width: 0,
    }
}

/// Liang–Barsky clipping of the segment a→b to the rectangle.
fn clip_segment(a: Px, b: Px, r: (f64, f64, f64, f64)) -> Option<(Px, Px)> {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let mut t0: f64 = 0.0;
    let mut t1: f64 = 1.0;
    for (p, q) in [
        (-dx, a.0 - r.0),
        (dx, r.2 - a.0),
        (-dy, a.1 - r.1),
        (dy, r.3 - a.1),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return None;
            }
        } else {
            let t = q / p;
            if p < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
        }
    }
    if t0 > t1 {
        return None;
    }
    Some((
        (a.0 + t0 * dx, a.1 + t0 * dy),
        (a.0 + t1 * dx, a.1 + t1 * dy),
    ))
}

/// Splits a pixel polyline into the runs that lie inside the rectangle.
fn clip_polyline(pts: &[Px], r: (f64, f64, f64, f64)) -> Vec<Vec<Px>> {
    let mut runs: Vec<Vec<Px>> = Vec::new();
    let mut current: Vec<Px> = Vec::new();
    for w in pts.windows(2) {
        match clip_segment(w[0], w[1], r) {
            Some((a, b)) => {
                let continues = current.last().is_some_and(|l| *l == a) && a == w[0];
                if !continues && !current.is_empty() {
                    runs.push(std::mem::take(&mut current));
                }
                if current.is_empty() {
                    current.push(a);
                }
                current.push(b);
                if b != w[1] {
                    runs.push(std::mem::take(&mut current));
                }
            }
            None => {
                if !current.is_empty() {
                    runs.push(std::mem::take(&mut current));
                }
            }
        }
    }
    if !current.is_empty() {
        runs.push(current);
    }
    runs
}

/// Cuts a pixel polyline into the "on" pieces of a dash pattern.
fn dash_polyline(pts: &[Px], pattern: &[f64]) -> Vec<Vec<Px>> {
    if pattern.is_empty() || pattern.iter().any(|l| *l <= 0.0) {
        return vec![pts.to_vec()];
    }
    let mut out = Vec::new();
    let mut idx = 0usize;
    let mut left = pattern[0];
    let mut on = true;
    let mut current: Vec<Px> = pts.first().map(|p| vec![*p]).unwrap_or_default();
    for w in pts.windows(2) {
        let (mut a, b) = (w[0], w[1]);
        let mut seg = ((b.0 - a.0).powi(2) + (b.1 - a.1).powi(2)).sqrt();
        while seg > left {
            let t = left / seg;
            let m = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
            if on {
                current.push(m);
                out.push(std::mem::take(&mut current));
            } else {
                current = vec![m];
            }
            seg -= left;
            a = m;
            on = !on;
            idx = (idx + 1) % pattern.len();
            left = pattern[idx];
        }
        left -= seg;
        if on {
            current.push(b);
        }
    }
    if on && current.len() > 1 {
        out.push(current);
    }
    out
}

/// Draws a polyline given in data coordinates: the points that cannot be
/// placed (not finite, ≤ 0 on a log axis) break the line; the line is clipped
/// to the plotting area; a lone point becomes a marker.
pub(crate) fn draw_line(
    root: &Root,
    frame: &Frame,
    pts: &[(f64, f64)],
    style: &SeriesStyle,
) -> DResult<()> {
    let mut pieces: Vec<Vec<Px>> = vec![Vec::new()];
    for &(x, y) in pts {
        match frame.px(x, y) {
            Some(p) => pieces.last_mut().map_or((), |v| v.push(p)),
            None => pieces.push(Vec::new()),
        }
    }
    let rect = frame.rect();
    for piece in pieces.iter().filter(|p| !p.is_empty()) {
        if piece.len() == 1 {
            draw_marker(root, frame, piece[0], style.marker, style.colour)?;
            continue;
        }
        for dash in dash_polyline(piece, style.dash.pattern()) {
            for run in clip_polyline(&dash, rect) {
                let v: Vec<_> = run.into_iter().map(ipt).collect();
                root.draw(&PathElement::new(v, stroke(style.colour, style.width)))
                    .map_err(de)?;
            }
        }
    }
    Ok(())
}

/// Draws a marker at pixel position `p` (skipped when outside the plotting
/// area of `frame`).
pub(crate) fn draw_marker(
    root: &Root,
    frame: &Frame,
    p: Px,
    marker: Marker,
    colour: Rgb,
) -> DResult<()> {
    let r = frame.rect();
    if p.0 < r.0 - 0.5 || p.0 > r.2 + 0.5 || p.1 < r.1 - 0.5 || p.1 > r.3 + 0.5 {
        return Ok(());
    }
    marker_at(root, ipt(p), marker, colour, 4)
}

fn marker_at(root: &Root, c: (i32, i32), marker: Marker, colour: Rgb, s: i32) -> DResult<()> {
    let col = colour.to_plotters();
    match marker {
        Marker::Disc => root.draw(&Circle::new(c, s, col.filled())),
        Marker::Ring => root.draw(&Circle::new(c, s, stroke(colour, 2))),
        Marker::Square => root.draw(&Rectangle::new(
            [(c.0 - s, c.1 - s), (c.0 + s, c.1 + s)],
            col.filled(),
        )),
        Marker::Triangle => root.draw(&Polygon::new(
            vec![
                (c.0, c.1 - s - 1),
                (c.0 - s - 1, c.1 + s),
                (c.0 + s + 1, c.1 + s),
            ],
            col.filled(),
        )),
        Marker::Cross => {
            root.draw(&PathElement::new(
                vec![(c.0 - s, c.1 - s), (c.0 + s, c.1 + s)],
                stroke(colour, 2),
            ))
            .map_err(de)?;
            root.draw(&PathElement::new(
                vec![(c.0 - s, c.1 + s), (c.0 + s, c.1 - s)],
                stroke(colour, 2),
            ))
        }
    }
    .map_err(de)
}

/// Draws a marker at a data point, if it can be placed inside the area.
pub(crate) fn draw_point(
    root: &Root,
    frame: &Frame,
    x: f64,
    y: f64,
    marker: Marker,
    colour: Rgb,
) -> DResult<()> {
    match frame.px(x, y) {
        Some(p) => draw_marker(root, frame, p, marker, colour),
        None => Ok(()),
    }
}

/// Sutherland–Hodgman clipping of a polygon to the rectangle.
fn clip_polygon(pts: &[Px], r: (f64, f64, f64, f64)) -> Vec<Px> {
    let inside = |p: Px, edge: usize| match edge {
        0 => p.0 >= r.0,
        1 => p.0 <= r.2,
        2 => p.1 >= r.1,
        _ => p.1 <= r.3,
    };
    let cross = |a: Px, b: Px, edge: usize| {
        let t = match edge {
            0 => (r.0 - a.0) / (b.0 - a.0),
            1 => (r.2 - a.0) / (b.0 - a.0),
            2 => (r.1 - a.1) / (b.1 - a.1),
            _ => (r.3 - a.1) / (b.1 - a.1),
        };
        (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1))
    };
    let mut poly = pts.to_vec();
    for edge in 0..4 {
        if poly.is_empty() {
            break;
        }
        let input = std::mem::take(&mut poly);
        for (i, &cur) in input.iter().enumerate() {
            let prev = input[(i + input.len() - 1) % input.len()];
            match (inside(prev, edge), inside(cur, edge)) {
                (true, true) => poly.push(cur),
                (true, false) => poly.push(cross(prev, cur, edge)),
                (false, true) => {
                    poly.push(cross(prev, cur, edge));
                    poly.push(cur);
                }
                (false, false) => {}
            }
        }
    }
    poly
}

/// Fills a polygon given in data coordinates, clipped to the plotting area.
/// Points that cannot be placed are dropped from the outline.
pub(crate) fn fill_polygon(
    root: &Root,
    frame: &Frame,
    pts: &[(f64, f64)],
    colour: Rgb,
    opacity: f64,
) -> DResult<()> {
    let px: Vec<Px> = pts.iter().filter_map(|&(x, y)| frame.px(x, y)).collect();
    let clipped = clip_polygon(&px, frame.rect());
    if clipped.len() < 3 {
        return Ok(());
    }
    let v: Vec<_> = clipped.into_iter().map(ipt).collect();
    root.draw(&Polygon::new(v, fill(colour, opacity)))
        .map_err(de)
}

/// A vertical line across the whole plotting area at data x.
pub(crate) fn draw_vline(
    root: &Root,
    frame: &Frame,
    x: f64,
    colour: Rgb,
    dash: LineDash,
) -> DResult<()> {
    let (y0, y1) = (frame.y.min, frame.y.max);
    let style = SeriesStyle {
        colour,
        dash,
        marker: Marker::Cross,
        width: 1,
    };
    draw_line(root, frame, &[(x, y0), (x, y1)], &style)
}

/// Text at a pixel position, anchored at its top-left corner.
pub(crate) fn text(root: &Root, s: &str, at: (i32, i32), size: f64, colour: Rgb) -> DResult<()> {
    let c = colour.to_plotters();
    let style = TextStyle::from((FONT, size).into_font())
        .color(&c)
        .pos(Pos::new(HPos::Left, VPos::Top));
    root.draw(&Text::new(xml_safe(s), at, style)).map_err(de)
}

/// The text with characters XML 1.0 forbids (control characters other than
/// tab, newline and carriage return) replaced by U+FFFD, so any label from a
/// data file still gives a well-formed SVG. The backend escapes `<`, `&` and
/// quotes itself.
fn xml_safe(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_control() && !matches!(c, '\t' | '\n' | '\r') {
                '\u{FFFD}'
            } else {
                c
            }
        })
        .collect()
}

/// What a legend entry shows left of its text.
#[derive(Debug, Clone)]
pub(crate) enum Sample {
    /// A line sample in this style.
    Line(SeriesStyle),
    /// A marker alone.
    Marker(Marker, Rgb),
    /// A filled box (a band).
    Band(Rgb, f64),
}

/// One legend entry.
#[derive(Debug, Clone)]
pub(crate) struct LegendEntry {
    pub sample: Sample,
    pub label: String,
}

/// Greedy word wrap to `width` characters.
fn wrap(s: &str, width: usize) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in s.split_whitespace() {
        if !line.is_empty() && line.chars().count() + 1 + word.chars().count() > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

const WRAP_CHARS: usize = 38;
const LINE_PX: i32 = 19;

/// Draws the side panel: a title, the legend, then the text lines (wrapped).
pub(crate) fn draw_panel(
    area: &Root,
    title: Option<&str>,
    legend: &[LegendEntry],
    lines: &[String],
) -> DResult<()> {
    // The panel's own coordinates start at its top-left corner.
    let x0 = 8;
    let mut y = 24;
    if let Some(t) = title {
        for l in wrap(t, WRAP_CHARS - 6) {
            text(area, &l, (x0, y), TITLE_PX, INK)?;
            y += LINE_PX + 4;
        }
        y += 8;
    }
    for e in legend {
        let label_lines = wrap(&e.label, WRAP_CHARS - 6);
        let mid = y + LINE_PX / 2 - 2;
        match &e.sample {
            Sample::Line(st) => {
                let pts = [
                    (f64::from(x0), f64::from(mid)),
                    (f64::from(x0 + 40), f64::from(mid)),
                ];
                for d in dash_polyline(&pts, st.dash.pattern()) {
                    let v: Vec<_> = d.into_iter().map(ipt).collect();
                    area.draw(&PathElement::new(v, stroke(st.colour, st.width)))
                        .map_err(de)?;
                }
            }
            Sample::Marker(m, c) => marker_at(area, (x0 + 20, mid), *m, *c, 4)?,
            Sample::Band(c, o) => {
                area.draw(&Rectangle::new(
                    [(x0, mid - 7), (x0 + 40, mid + 7)],
                    fill(*c, *o),
                ))
                .map_err(de)?;
            }
        }
        for l in label_lines {
            text(area, &l, (x0 + 50, y), PANEL_PX, INK)?;
            y += LINE_PX;
        }
        y += 6;
    }
    y += 10;
    for para in lines {
        for l in wrap(para, WRAP_CHARS) {
            text(area, &l, (x0, y), PANEL_PX, INK)?;
            y += LINE_PX;
        }
        y += 4;
    }
    Ok(())
}

/// The figure height that fits the side panel's text: at least
/// [`HEIGHT`](super::style::HEIGHT).
pub(crate) fn figure_height(title: Option<&str>, legend: &[LegendEntry], lines: &[String]) -> u32 {
    let mut y = 24;
    if let Some(t) = title {
        y += wrap(t, WRAP_CHARS - 6).len() as i32 * (LINE_PX + 4) + 8;
    }
    for e in legend {
        y += wrap(&e.label, WRAP_CHARS - 6).len() as i32 * LINE_PX + 6;
    }
    y += 10;
    for para in lines {
        y += wrap(para, WRAP_CHARS).len() as i32 * LINE_PX + 4;
    }
    (y + 16).max(super::style::HEIGHT as i32) as u32
}

/// Splits a figure into `n` equal charts and the side panel on the right.
pub(crate) fn split_charts<'a>(
    root: &Root<'a>,
    n: usize,
    panel_width: u32,
) -> (Vec<Root<'a>>, Root<'a>) {
    let (w, _) = root.dim_in_pixel();
    let (charts, panel) = root.split_horizontally(w.saturating_sub(panel_width));
    let n = n.max(1);
    let cw = charts.dim_in_pixel().0 / n as u32;
    let mut out = Vec::with_capacity(n);
    let mut rest = charts;
    for _ in 1..n {
        let (a, b) = rest.split_horizontally(cw);
        out.push(a);
        rest = b;
    }
    out.push(rest);
    (out, panel)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn superscripts() {
        assert_eq!(superscript(-40), "⁻⁴⁰");
        assert_eq!(superscript(3), "³");
    }

    #[test]
    fn log_axis_whole_decades() {
        let a = Axis::log([3e-45, 2e-38], "σ").unwrap();
        assert_eq!((a.min, a.max), (1e-45, 1e-37));
        assert_eq!(a.tick_label(-40.0), "10⁻⁴⁰");
        assert_eq!(a.tick_label(-40.5), "");
        let m = Axis::log([5.0, 800.0], "m").unwrap();
        assert_eq!(m.tick_label(2.0), "100");
        // A value on a decade is not put on the frame.
        let e = Axis::log_padded([0.01, 1.0], "ε").unwrap();
        assert_eq!((e.min, e.max), (1e-3, 10.0));
        assert!(Axis::log([0.0, -1.0], "x").is_none());
    }

    #[test]
    fn clipping_keeps_inside_part() {
        let r = (0.0, 0.0, 10.0, 10.0);
        let (a, b) = clip_segment((-5.0, 5.0), (5.0, 5.0), r).unwrap();
        assert_eq!((a, b), ((0.0, 5.0), (5.0, 5.0)));
        assert!(clip_segment((-5.0, -5.0), (-1.0, 20.0), r).is_none());
        let runs = clip_polyline(&[(1.0, 1.0), (20.0, 1.0), (20.0, 5.0), (1.0, 5.0)], r);
        assert_eq!(runs.len(), 2);
    }

    #[test]
    fn dashes_cover_pattern_fraction() {
        // A 100 px line with a 10 on / 6 off pattern is "on" for 6 full
        // periods (60 px) plus the first 4 px of the 7th period: 64 px
        // (arithmetic).
        let d = dash_polyline(&[(0.0, 0.0), (100.0, 0.0)], &[10.0, 6.0]);
        let on: f64 = d.iter().map(|p| p.last().unwrap().0 - p[0].0).sum();
        assert!((on - 64.0).abs() < 1e-9, "{on}");
    }

    #[test]
    fn polygon_clip_square() {
        let p = clip_polygon(
            &[(-5.0, -5.0), (5.0, -5.0), (5.0, 5.0), (-5.0, 5.0)],
            (0.0, 0.0, 10.0, 10.0),
        );
        assert_eq!(p.len(), 4);
        assert!(p.iter().all(|q| q.0 >= 0.0 && q.1 >= 0.0));
    }

    #[test]
    fn wraps_words() {
        assert_eq!(wrap("aa bb cc", 5), vec!["aa bb", "cc"]);
    }
}
