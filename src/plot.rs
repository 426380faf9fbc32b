//! The polaray visual style for every chart: embedded fonts (no system fonts,
//! so images are the same on every machine), one palette, one set of sizes.

use std::sync::Once;

use plotters::style::{register_font, FontStyle, RGBColor};

/// Registers the embedded DejaVu fonts as `sans-serif`. Call before drawing any
/// text; cheap after the first call.
pub fn ensure_fonts() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        // InvalidFont implements neither Debug nor Display; the embedded fonts are valid.
        let _ = register_font("sans-serif", FontStyle::Normal, dejavu::sans::regular());
        let _ = register_font("sans-serif", FontStyle::Bold, dejavu::sans::bold());
    });
}

/// Font family used in all charts.
pub const FONT: &str = "sans-serif";

/// Background of every chart: a warm off-white.
pub const PAPER: RGBColor = RGBColor(250, 248, 243);
/// Axis lines and text.
pub const INK: RGBColor = RGBColor(40, 44, 52);
/// Light grid lines.
pub const GRID: RGBColor = RGBColor(222, 218, 208);
/// Shading of highlighted regions (specular zone, fit ranges).
pub const SHADE: RGBColor = RGBColor(236, 226, 200);

/// Series colours, in order of use: one per band or per treatment.
pub const SERIES: [RGBColor; 8] = [
    RGBColor(27, 111, 122), // deep teal
    RGBColor(208, 140, 43), // amber
    RGBColor(125, 78, 140), // plum
    RGBColor(200, 85, 61),  // brick
    RGBColor(74, 90, 106),  // slate
    RGBColor(122, 139, 58), // olive
    RGBColor(60, 130, 200), // cornflower
    RGBColor(150, 110, 80), // walnut
];

/// Colour of series `i` (wraps around).
#[must_use]
pub fn series_colour(i: usize) -> RGBColor {
    SERIES[i % SERIES.len()]
}

/// Default chart size in pixels for PNG and SVG output.
pub const CHART_SIZE: (u32, u32) = (1000, 640);
