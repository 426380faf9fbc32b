//! Decay-curve chart: one panel per band with the Schroeder curve, the EDT, T20
//! and T30 regression lines over their fitted spans, the T30 span shaded and the
//! noise/truncation floor. Used by `polaray analyze` and for simulated echograms.

use std::path::{Path, PathBuf};

use plotters::prelude::*;

use super::parameters::BandParameters;
use super::schroeder::DecayCurve;
use super::DecayFits;
use crate::output::{finish_atomic, temp_sibling};
use crate::plot;

/// Lowest level shown (dB).
pub const LEVEL_MIN_DB: f64 = -70.0;

/// A chart that could not be written.
#[derive(Debug, thiserror::Error)]
#[error(
    "{path}: cannot write the decay-curve chart ({message}); check that the folder is writable"
)]
pub struct PlotError {
    /// Target file.
    pub path: PathBuf,
    /// What went wrong.
    pub message: String,
}

/// One panel of the chart.
#[derive(Clone, Copy, Debug)]
pub struct DecayPanel<'a> {
    /// Nominal band centre (Hz), the panel title.
    pub band_hz: u32,
    /// Schroeder curve (t = 0 at the direct sound).
    pub curve: &'a DecayCurve,
    /// Fits to draw.
    pub fits: &'a DecayFits,
    /// Floor level (dB re total), drawn as a line.
    pub floor_db: Option<f64>,
}

impl<'a> DecayPanel<'a> {
    /// The panel of a computed band.
    #[must_use]
    pub fn from_band(b: &'a BandParameters) -> Self {
        Self {
            band_hz: b.band_hz,
            curve: &b.decay,
            fits: &b.fits,
            floor_db: b.floor_db,
        }
    }
}

/// Writes the chart as PNG to `path` (atomically: temporary sibling, then rename).
pub fn write_decay_chart(
    path: &Path,
    title: &str,
    panels: &[DecayPanel<'_>],
) -> Result<(), PlotError> {
    plot::ensure_fonts();
    let err = |m: String| PlotError {
        path: path.to_path_buf(),
        message: m,
    };
    if panels.is_empty() {
        return Err(err("no bands to draw".into()));
    }
    if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
        std::fs::create_dir_all(dir).map_err(|e| err(e.to_string()))?;
    }
    let tmp = temp_sibling(path);
    let cols = panels.len().min(3);
    let rows = panels.len().div_ceil(cols);
    let size = (420 * cols as u32, 320 * rows as u32 + 50);
    {
        let root = BitMapBackend::new(&tmp, size).into_drawing_area();
        root.fill(&plot::PAPER).map_err(|e| err(e.to_string()))?;
        let root = root
            .titled(title, (plot::FONT, 22).into_font().color(&plot::INK))
            .map_err(|e| err(e.to_string()))?;
        let areas = root.split_evenly((rows, cols));
        for (panel, area) in panels.iter().zip(areas) {
            draw_panel(&area, panel).map_err(|e| err(e.to_string()))?;
        }
        root.present().map_err(|e| err(e.to_string()))?;
    }
    finish_atomic(&tmp, path).map_err(|e| err(e.to_string()))
}

/// Keeps at most about 1500 points of a curve (every n-th), finite and above the
/// chart's bottom edge.
fn thin(curve: &DecayCurve) -> Vec<(f64, f64)> {
    let step = (curve.times_s.len() / 1500).max(1);
    curve
        .times_s
        .iter()
        .zip(&curve.level_db)
        .step_by(step)
        .filter(|(_, l)| l.is_finite() && **l >= LEVEL_MIN_DB)
        .map(|(t, l)| (*t, *l))
        .collect()
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    panel: &DecayPanel<'_>,
) -> Result<(), DrawingAreaErrorKind<DB::ErrorType>> {
    let points = thin(panel.curve);
    let t_max = points.last().map_or(1.0, |p| p.0).max(0.05) * 1.05;
    let mut chart = ChartBuilder::on(area)
        .margin(10)
        .caption(
            format!("{} Hz", panel.band_hz),
            (plot::FONT, 16).into_font().color(&plot::INK),
        )
        .x_label_area_size(36)
        .y_label_area_size(46)
        .build_cartesian_2d(0.0..t_max, LEVEL_MIN_DB..5.0)?;
    chart
        .configure_mesh()
        .light_line_style(plot::PAPER)
        .bold_line_style(plot::GRID)
        .axis_style(plot::INK)
        .label_style((plot::FONT, 12).into_font().color(&plot::INK))
        .x_desc("time after direct sound (s)")
        .y_desc("level (dB)")
        .draw()?;
    if let Some((a, b)) = panel.fits.t30.span_s {
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(a, LEVEL_MIN_DB), (b, 5.0)],
                plot::SHADE.filled(),
            )))?
            .label("T30 fit range (−5 to −35 dB)")
            .legend(|(x, y)| Rectangle::new([(x, y - 5), (x + 16, y + 5)], plot::SHADE.filled()));
    }
    // The floor line only where it is on the chart (a little above its foot).
    if let Some(f) = panel.floor_db.filter(|f| *f > LEVEL_MIN_DB + 1.0) {
        chart
            .draw_series(LineSeries::new(
                [(0.0, f), (t_max, f)],
                ShapeStyle::from(&plot::series_colour(4)).stroke_width(1),
            ))?
            .label("floor")
            .legend(|(x, y)| PathElement::new([(x, y), (x + 16, y)], plot::series_colour(4)));
    }
    chart
        .draw_series(LineSeries::new(
            points,
            ShapeStyle::from(&plot::series_colour(0)).stroke_width(2),
        ))?
        .label("decay curve")
        .legend(|(x, y)| PathElement::new([(x, y), (x + 16, y)], plot::series_colour(0)));
    for (i, fit) in [&panel.fits.edt, &panel.fits.t20, &panel.fits.t30]
        .into_iter()
        .enumerate()
    {
        if let (Some((a, b)), Some(c), Some(s)) = (fit.span_s, fit.intercept_db, fit.slope_db_per_s)
        {
            let colour = plot::series_colour(i + 1);
            chart
                .draw_series(LineSeries::new(
                    [(a, c + s * a), (b, c + s * b)],
                    ShapeStyle::from(&colour).stroke_width(2),
                ))?
                .label(format!("{} fit", fit.range.name))
                .legend(move |(x, y)| PathElement::new([(x, y), (x + 16, y)], colour));
        }
    }
    chart
        .configure_series_labels()
        .background_style(plot::PAPER)
        .border_style(plot::GRID)
        .label_font((plot::FONT, 11).into_font().color(&plot::INK))
        .position(SeriesLabelPosition::UpperRight)
        .draw()?;
    Ok(())
}
