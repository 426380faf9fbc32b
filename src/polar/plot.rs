//! Charts of polar data: a polar response on a semicircle (levels in dB, the
//! flat reference overlaid, the specular zone shaded) and the scattering–
//! diffusion plane with the bound curve. Both write PNG or SVG by the file's
//! extension, atomically, in the polaray style of [`crate::plot`].

use std::path::{Path, PathBuf};

use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::bound::{ZoneSize, ZoneSizeError};
use super::zone::ZoneGeometry;
use crate::output::{finish_atomic, temp_sibling};
use crate::plot::{ensure_fonts, series_colour, CHART_SIZE, FONT, GRID, INK, PAPER, SHADE};

/// A chart could not be written.
#[derive(Debug, thiserror::Error)]
pub enum PlotError {
    /// The file name does not say PNG or SVG.
    #[error("{}: unknown chart format; name the file *.png or *.svg", .0.display())]
    Format(PathBuf),
    /// Drawing or writing failed.
    #[error("{}: could not draw the chart: {message}", .path.display())]
    Draw {
        /// The chart file.
        path: PathBuf,
        /// What the backend reported.
        message: String,
    },
    /// The bound is undefined for the zone given.
    #[error("no bound curve to draw: {0}")]
    NoBound(#[from] ZoneSizeError),
}

/// One curve of a polar chart.
#[derive(Clone, Debug, PartialEq)]
pub struct PolarCurve {
    /// Legend text.
    pub label: String,
    /// Receiver angles from the normal, degrees (any order).
    pub angle_deg: Vec<f64>,
    /// Levels, dB, one per angle.
    pub level_db: Vec<f64>,
    /// Draw dashed (for a reference).
    pub dashed: bool,
}

/// A polar response chart.
#[derive(Clone, Debug, PartialEq)]
pub struct PolarChart {
    /// Title line.
    pub title: String,
    /// Curves, drawn in series colours in order.
    pub curves: Vec<PolarCurve>,
    /// Specular zone to shade, as an angular interval (degrees, low to high).
    pub zone_deg: Option<(f64, f64)>,
    /// Source angle to mark, degrees.
    pub incidence_deg: Option<f64>,
    /// Level range shown from the rim to the centre, dB (e.g. 40).
    pub range_db: f64,
}

/// Angular interval covered by the zone receivers: from halfway to the next
/// receiver outside the zone on each side (or the last receiver), for shading.
/// `None` when no receiver is in the zone.
#[must_use]
pub fn zone_interval_deg(angle_deg: &[f64], in_zone: &[bool]) -> Option<(f64, f64)> {
    let mut pairs: Vec<(f64, bool)> = angle_deg
        .iter()
        .copied()
        .zip(in_zone.iter().copied())
        .collect();
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    let first = pairs.iter().position(|p| p.1)?;
    let last = pairs.iter().rposition(|p| p.1)?;
    let lo = if first > 0 {
        0.5 * (pairs[first - 1].0 + pairs[first].0)
    } else {
        pairs[first].0
    };
    let hi = if last + 1 < pairs.len() {
        0.5 * (pairs[last].0 + pairs[last + 1].0)
    } else {
        pairs[last].0
    };
    Some((lo, hi))
}

/// Draws with `$render(&root)` on a PNG or SVG backend chosen by the extension
/// of `$path`, through a temporary sibling renamed into place.
macro_rules! write_chart {
    ($path:expr, $render:expr) => {{
        let path: &Path = $path;
        let draw_err = |message: String| PlotError::Draw {
            path: path.to_path_buf(),
            message,
        };
        ensure_fonts();
        if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
            std::fs::create_dir_all(dir).map_err(|e| draw_err(e.to_string()))?;
        }
        let tmp = temp_sibling(path);
        let ext = path
            .extension()
            .map(|e| e.to_string_lossy().to_ascii_lowercase())
            .unwrap_or_default();
        let drawn: Result<(), String> = match ext.as_str() {
            "png" => {
                let root = BitMapBackend::new(&tmp, CHART_SIZE).into_drawing_area();
                $render(&root).and_then(|()| root.present().map_err(|e| e.to_string()))
            }
            "svg" => {
                let root = SVGBackend::new(&tmp, CHART_SIZE).into_drawing_area();
                $render(&root).and_then(|()| root.present().map_err(|e| e.to_string()))
            }
            _ => return Err(PlotError::Format(path.to_path_buf())),
        };
        match drawn {
            Ok(()) => finish_atomic(&tmp, path).map_err(|e| draw_err(e.to_string())),
            Err(message) => {
                let _ = std::fs::remove_file(&tmp);
                Err(draw_err(message))
            }
        }
    }};
}

fn text_style(size: u32, h: HPos, v: VPos) -> TextStyle<'static> {
    (FONT, size).into_font().color(&INK).pos(Pos::new(h, v))
}

/// Draws a polar response chart to `path` (`*.png` or `*.svg`): the sample
/// normal points up, positive angles to the right, levels in dB from the rim
/// (highest level, rounded up to 5 dB) to the centre (`range_db` below it).
pub fn draw_polar_chart(path: &Path, chart: &PolarChart) -> Result<(), PlotError> {
    write_chart!(path, |root| render_polar(root, chart))
}

/// Draws a polar response chart on any plotters drawing area (for charts
/// embedded elsewhere, e.g. inline SVG in the comparison report); errors as text.
pub fn render_polar_chart<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &PolarChart,
) -> Result<(), String> {
    render_polar(root, chart)
}

fn render_polar<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    chart: &PolarChart,
) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    root.fill(&PAPER).map_err(e)?;
    let (w, h) = root.dim_in_pixel();
    let (w, h) = (f64::from(w), f64::from(h));
    let radius = (0.44 * w).min(h - 205.0);
    let (cx, cy) = (0.5 * w, h - 65.0);
    let at = |angle_deg: f64, r: f64| -> (i32, i32) {
        let (s, c) = angle_deg.to_radians().sin_cos();
        ((cx + r * s).round() as i32, (cy - r * c).round() as i32)
    };
    let range_db = if chart.range_db > 0.0 {
        chart.range_db
    } else {
        40.0
    };
    let max_db = chart
        .curves
        .iter()
        .flat_map(|c| c.level_db.iter().copied())
        .fold(f64::NEG_INFINITY, f64::max);
    let top_db = if max_db.is_finite() {
        (max_db / 5.0).ceil() * 5.0
    } else {
        0.0
    };
    let radius_of = |l: f64| ((l - (top_db - range_db)) / range_db).clamp(0.0, 1.0) * radius;

    // Title.
    root.draw(&Text::new(
        chart.title.clone(),
        ((0.5 * w) as i32, 14),
        (FONT, 22)
            .into_font()
            .style(FontStyle::Bold)
            .color(&INK)
            .pos(Pos::new(HPos::Center, VPos::Top)),
    ))
    .map_err(e)?;

    // Specular zone sector.
    if let Some((lo, hi)) = chart.zone_deg {
        let mut pts = vec![at(0.0, 0.0)];
        let steps = ((hi - lo).abs().ceil() as usize).max(2);
        for k in 0..=steps {
            pts.push(at(lo + (hi - lo) * k as f64 / steps as f64, radius));
        }
        root.draw(&Polygon::new(pts, SHADE.filled())).map_err(e)?;
    }

    // Level rings every 10 dB and angle spokes every 30°.
    let mut ring_db = top_db;
    while ring_db > top_db - range_db + 1e-9 {
        let r = radius_of(ring_db);
        let pts: Vec<(i32, i32)> = (0..=180).map(|k| at(-90.0 + f64::from(k), r)).collect();
        root.draw(&PathElement::new(pts, GRID.stroke_width(1)))
            .map_err(e)?;
        root.draw(&Text::new(
            // `+ 0.0` turns a rounded −0 into 0, so no ring reads "-0 dB".
            format!("{:.0} dB", ring_db.round() + 0.0),
            (at(90.0, r).0, (cy + 8.0) as i32),
            text_style(13, HPos::Center, VPos::Top),
        ))
        .map_err(e)?;
        ring_db -= 10.0;
    }
    for k in -3..=3 {
        let a = f64::from(k) * 30.0;
        root.draw(&PathElement::new(
            vec![at(a, 0.0), at(a, radius)],
            GRID.stroke_width(1),
        ))
        .map_err(e)?;
        let (x, y) = at(a, radius + 16.0);
        root.draw(&Text::new(
            format!("{a:.0}°"),
            (x, y),
            text_style(14, HPos::Center, VPos::Center),
        ))
        .map_err(e)?;
    }
    // The sample along the baseline.
    root.draw(&PathElement::new(
        vec![at(-90.0, 0.12 * radius), at(90.0, 0.12 * radius)],
        INK.stroke_width(4),
    ))
    .map_err(e)?;

    // Source direction.
    if let Some(psi) = chart.incidence_deg {
        root.draw(&PathElement::new(
            vec![at(psi, 0.82 * radius), at(psi, radius)],
            INK.stroke_width(3),
        ))
        .map_err(e)?;
        root.draw(&Circle::new(at(psi, radius), 6, INK.filled()))
            .map_err(e)?;
        let (x, y) = at(psi, 0.78 * radius);
        let h = if psi >= 0.0 { HPos::Left } else { HPos::Right };
        root.draw(&Text::new(
            "source".to_string(),
            (x, y),
            text_style(13, h, VPos::Center),
        ))
        .map_err(e)?;
    }

    // Curves.
    for (i, curve) in chart.curves.iter().enumerate() {
        let colour = series_colour(i);
        let mut pairs: Vec<(f64, f64)> = curve
            .angle_deg
            .iter()
            .copied()
            .zip(curve.level_db.iter().copied())
            .collect();
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
        let mut pts: Vec<(i32, i32)> = pairs.iter().map(|&(a, l)| at(a, radius_of(l))).collect();
        // Near-repeated pixels (levels clamped to the centre) give zero-length
        // segments, which the bitmap backend's wide lines draw as stray spikes.
        pts.dedup_by(|b, a| (b.0 - a.0).abs() <= 2 && (b.1 - a.1).abs() <= 2);
        if curve.dashed {
            root.draw(&DashedPathElement::new(
                pts.clone(),
                8,
                6,
                colour.stroke_width(2),
            ))
            .map_err(e)?;
        } else {
            // Segment by segment: the bitmap backend's mitred joins spike at sharp turns.
            for seg in pts.windows(2) {
                root.draw(&PathElement::new(seg.to_vec(), colour.stroke_width(2)))
                    .map_err(e)?;
            }
            for p in &pts {
                root.draw(&Circle::new(*p, 3, colour.filled())).map_err(e)?;
            }
        }
        // Legend entry.
        let y = 62 + 22 * i as i32;
        root.draw(&PathElement::new(
            vec![(24, y), (54, y)],
            colour.stroke_width(3),
        ))
        .map_err(e)?;
        root.draw(&Text::new(
            curve.label.clone(),
            (62, y),
            text_style(15, HPos::Left, VPos::Center),
        ))
        .map_err(e)?;
    }
    if chart.zone_deg.is_some() {
        let y = 62 + 22 * chart.curves.len() as i32;
        root.draw(&Rectangle::new([(24, y - 7), (54, y + 7)], SHADE.filled()))
            .map_err(e)?;
        root.draw(&Text::new(
            "specular zone".to_string(),
            (62, y),
            text_style(15, HPos::Left, VPos::Center),
        ))
        .map_err(e)?;
    }
    Ok(())
}

/// One labelled point on the scattering–diffusion chart.
#[derive(Clone, Debug, PartialEq)]
pub struct BoundPoint {
    /// Label drawn beside the point (e.g. "500 Hz").
    pub label: String,
    /// Scattering (zone ratio s_z, or a material's s), 0–1.
    pub s: f64,
    /// Diffusion coefficient, 0–1.
    pub d: f64,
}

/// Draws d against s with the bound d_max(s) for `zone` (M receivers, M_s in the
/// zone; the region above it shaded as impossible) and each point marked, to
/// `path` (`*.png` or `*.svg`).
pub fn draw_bound_chart(
    path: &Path,
    title: &str,
    zone: &ZoneSize,
    points: &[BoundPoint],
) -> Result<(), PlotError> {
    zone.check()?;
    write_chart!(path, |root| render_bound(root, title, zone, points))
}

/// [`draw_bound_chart`] for a goniometer arrangement (e.g. the default check
/// geometry of [`ZoneGeometry::default`]), for material (s, d) pairs.
pub fn draw_bound_chart_for_geometry(
    path: &Path,
    title: &str,
    geometry: &ZoneGeometry,
    points: &[BoundPoint],
) -> Result<(), PlotError> {
    draw_bound_chart(path, title, &geometry.size(), points)
}

fn render_bound<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    title: &str,
    zone: &ZoneSize,
    points: &[BoundPoint],
) -> Result<(), String> {
    let e = |e: DrawingAreaErrorKind<DB::ErrorType>| e.to_string();
    root.fill(&PAPER).map_err(e)?;
    let mut chart = ChartBuilder::on(root)
        .caption(
            title,
            (FONT, 22).into_font().style(FontStyle::Bold).color(&INK),
        )
        .margin(20)
        .x_label_area_size(55)
        .y_label_area_size(65)
        .build_cartesian_2d(0.0..1.0, 0.0..1.05)
        .map_err(e)?;
    chart
        .configure_mesh()
        .light_line_style(PAPER)
        .bold_line_style(GRID)
        .axis_style(INK)
        .label_style((FONT, 14).into_font().color(&INK))
        .axis_desc_style((FONT, 16).into_font().color(&INK))
        .x_desc("scattering: fraction of energy outside the specular zone, s")
        .y_desc("diffusion coefficient, d")
        .draw()
        .map_err(e)?;
    let curve: Vec<(f64, f64)> = (0..=400)
        .map(|k| {
            let s = f64::from(k) / 400.0;
            (s, zone.d_max(s).unwrap_or(f64::NAN).clamp(0.0, 1.0))
        })
        .collect();
    // Region above the bound: no response can lie there.
    let mut above = curve.clone();
    above.push((1.0, 1.05));
    above.push((0.0, 1.05));
    chart
        .draw_series(std::iter::once(Polygon::new(above, SHADE.filled())))
        .map_err(e)?
        .label("above the bound: inconsistent")
        .legend(|(x, y)| Rectangle::new([(x, y - 6), (x + 24, y + 6)], SHADE.filled()));
    chart
        .draw_series(LineSeries::new(curve, series_colour(0).stroke_width(3)))
        .map_err(e)?
        .label(format!(
            "bound d_max(s), {} receivers, {} in the zone",
            zone.receivers, zone.zone_receivers
        ))
        .legend(|(x, y)| {
            PathElement::new(vec![(x, y), (x + 24, y)], series_colour(0).stroke_width(3))
        });
    let s_star = zone.s_star();
    chart
        .draw_series(std::iter::once(DashedPathElement::new(
            vec![(s_star, 0.0), (s_star, 1.0)],
            6,
            5,
            INK.stroke_width(1),
        )))
        .map_err(e)?;
    chart
        .draw_series(std::iter::once(Text::new(
            format!("s* = {s_star:.3}"),
            (s_star, 0.03),
            text_style(14, HPos::Right, VPos::Bottom),
        )))
        .map_err(e)?;
    for (i, p) in points.iter().enumerate() {
        let colour = series_colour(i + 1);
        chart
            .draw_series(std::iter::once(Circle::new((p.s, p.d), 6, colour.filled())))
            .map_err(e)?;
        chart
            .draw_series(std::iter::once(Text::new(
                format!("  {}", p.label),
                (p.s, p.d),
                text_style(14, HPos::Left, VPos::Center),
            )))
            .map_err(e)?;
    }
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::UpperLeft)
        .background_style(PAPER)
        .border_style(GRID)
        .label_font((FONT, 14).into_font().color(&INK))
        .draw()
        .map_err(e)?;
    Ok(())
}
