//! The look shared by every figure: one palette of our own, line dashes,
//! markers, font sizes and the canvas layout.
//!
//! The palette was chosen so that its six colours stay apart for readers with
//! normal vision and for simulated protanopia, deuteranopia and tritanopia,
//! and so that their CIELAB lightness climbs in steps of about 10 from 22 to
//! 80 (they stay apart in greyscale). On top of that every series also
//! differs in its dash pattern or marker, so no figure relies on colour alone.

/// An sRGB colour, 8 bits per channel.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Rgb(pub u8, pub u8, pub u8);

impl Rgb {
    /// `#RRGGBB`, upper-case hex, as the SVG backend writes it.
    pub fn hex(self) -> String {
        format!("#{:02X}{:02X}{:02X}", self.0, self.1, self.2)
    }

    pub(crate) fn to_plotters(self) -> plotters::style::RGBColor {
        plotters::style::RGBColor(self.0, self.1, self.2)
    }
}

/// The palette, darkest first: navy, crimson, blue-violet, ochre, sage, aqua.
pub const PALETTE: [Rgb; 6] = [
    Rgb(0x27, 0x32, 0x5F),
    Rgb(0xA3, 0x21, 0x28),
    Rgb(0x61, 0x62, 0xFE),
    Rgb(0xBD, 0x8A, 0x21),
    Rgb(0x9A, 0xB7, 0x83),
    Rgb(0x73, 0xD6, 0xD8),
];

/// Neutral grey for guide lines (region edges, the on-shell line).
pub const GUIDE: Rgb = Rgb(0x6E, 0x6E, 0x6E);
/// Text and axes.
pub const INK: Rgb = Rgb(0x1A, 0x1A, 0x1A);
/// Grid lines.
pub const GRID: Rgb = Rgb(0xE2, 0xE2, 0xE2);

/// How a line is stroked.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LineDash {
    /// Continuous.
    Solid,
    /// Long dashes.
    Dashed,
    /// Dots.
    Dotted,
    /// Dash, dot.
    DashDot,
}

impl LineDash {
    /// On/off lengths in pixels, starting with "on"; empty for solid.
    pub fn pattern(self) -> &'static [f64] {
        match self {
            LineDash::Solid => &[],
            LineDash::Dashed => &[10.0, 6.0],
            LineDash::Dotted => &[2.0, 4.0],
            LineDash::DashDot => &[10.0, 4.0, 2.0, 4.0],
        }
    }

    const CYCLE: [LineDash; 4] = [
        LineDash::Solid,
        LineDash::Dashed,
        LineDash::DashDot,
        LineDash::Dotted,
    ];
}

/// A point marker.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Marker {
    /// Filled disc.
    Disc,
    /// Open circle.
    Ring,
    /// Filled square.
    Square,
    /// Filled triangle pointing up.
    Triangle,
    /// Diagonal cross.
    Cross,
}

impl Marker {
    const CYCLE: [Marker; 4] = [
        Marker::Disc,
        Marker::Square,
        Marker::Triangle,
        Marker::Cross,
    ];
}

/// Colour, dash and marker of one series.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SeriesStyle {
    /// Stroke and fill colour.
    pub colour: Rgb,
    /// Dash pattern of the line.
    pub dash: LineDash,
    /// Marker drawn at points, where the figure draws markers.
    pub marker: Marker,
    /// Stroke width in pixels.
    pub width: u32,
}

/// The style of the `i`-th series of a figure: every pair among the first 24
/// differs in colour, dash or both, and consecutive series differ in both.
pub fn series_style(i: usize) -> SeriesStyle {
    let colour = PALETTE[i % PALETTE.len()];
    let dash = LineDash::CYCLE[(i + i / PALETTE.len()) % LineDash::CYCLE.len()];
    let marker = Marker::CYCLE[(i + i / PALETTE.len()) % Marker::CYCLE.len()];
    SeriesStyle {
        colour,
        dash,
        marker,
        width: 2,
    }
}

/// Font family written into the SVG: generic, so every viewer has one.
pub const FONT: &str = "sans-serif";
/// Axis-title font size in pixels (before the backend's 1/1.24 scaling).
pub const AXIS_TITLE_PX: f64 = 20.0;
/// Tick-label font size in pixels.
pub const TICK_PX: f64 = 16.0;
/// Side-panel text size in pixels.
pub const PANEL_PX: f64 = 16.0;
/// Title font size in pixels.
pub const TITLE_PX: f64 = 22.0;
/// Width of the side panel that holds the legend and the labels, in pixels;
/// the legend lives there so it never hides data.
pub const PANEL_WIDTH: u32 = 320;
/// Height of every figure in pixels.
pub const HEIGHT: u32 = 600;
/// Width of one chart in pixels.
pub const CHART_WIDTH: u32 = 640;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn first_24_styles_are_pairwise_distinct() {
        // common practice, no source: a series must be told apart without colour.
        let styles: Vec<_> = (0..24).map(series_style).collect();
        for (i, a) in styles.iter().enumerate() {
            for b in &styles[i + 1..] {
                assert!(a.colour != b.colour || a.dash != b.dash, "{a:?} vs {b:?}");
            }
        }
        for i in 0..23 {
            assert_ne!(styles[i].dash, styles[i + 1].dash);
            assert_ne!(styles[i].colour, styles[i + 1].colour);
        }
    }

    #[test]
    fn hex_is_upper_case_six_digits() {
        // The SVG backend writes `#RRGGBB` upper case (plotters-svg 0.3.7 source).
        assert_eq!(Rgb(0x0a, 0xbc, 0xff).hex(), "#0ABCFF");
    }
}
