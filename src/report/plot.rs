//! Echogram charts: level per bin in dB against time in ms, one line per band.

use std::path::Path;

use plotters::prelude::*;

use super::{file_safe, ReportError};
use crate::output;
use crate::plot::{ensure_fonts, series_colour, CHART_SIZE, FONT, GRID, INK, PAPER};
use crate::trace::TraceResult;

/// Dynamic range shown below the highest bin, dB.
const RANGE_DB: f64 = 80.0;

/// `echogram-<receiver>.png`, or `echogram-<source>-<receiver>.png` with several sources.
#[must_use]
pub fn plot_file_name(result: &TraceResult, source: usize, receiver: usize) -> String {
    let r = file_safe(&result.receivers[receiver].name);
    if result.sources.len() == 1 {
        format!("echogram-{r}.png")
    } else {
        format!(
            "echogram-{}-{r}.png",
            file_safe(&result.sources[source].name)
        )
    }
}

/// Draws the echogram of pair (`source`, `receiver`) to `path` (PNG), through
/// a temporary sibling and a rename.
pub fn write_echogram_plot(
    result: &TraceResult,
    source: usize,
    receiver: usize,
    path: &Path,
) -> Result<(), ReportError> {
    let tmp = output::temp_sibling(path);
    let drawn = draw(result, source, receiver, &tmp).map_err(|message| ReportError::Plot {
        path: path.to_path_buf(),
        message,
    });
    if let Err(e) = drawn {
        let _ = std::fs::remove_file(&tmp);
        return Err(e);
    }
    output::finish_atomic(&tmp, path).map_err(|source| ReportError::Io {
        path: path.to_path_buf(),
        source,
    })
}

/// Level re the free-field direct sound at 10 m, dB: 10 lg(4π · 100 · fluence).
fn level_db(fluence: f64) -> f64 {
    10.0 * (4.0 * std::f64::consts::PI * 100.0 * fluence).log10()
}

fn draw(result: &TraceResult, source: usize, receiver: usize, tmp: &Path) -> Result<(), String> {
    ensure_fonts();
    let pair = result.pair(source, receiver);
    let e = &pair.echogram;
    let bands = result.bands.len();
    let top = e.energy.iter().map(|b| b.max_of(bands)).fold(0.0, f64::max);
    let top_db = if top > 0.0 {
        (level_db(top) / 10.0).ceil() * 10.0
    } else {
        0.0
    };
    let floor_db = top_db - RANGE_DB;
    let t_max_ms = e.bins() as f64 * result.bin_s * 1e3;

    let root = BitMapBackend::new(tmp, CHART_SIZE).into_drawing_area();
    root.fill(&PAPER).map_err(|x| x.to_string())?;
    let title = format!(
        "{} at {}: energy per {:.1} ms bin",
        result.sources[source].name,
        result.receivers[receiver].name,
        result.bin_s * 1e3
    );
    let mut chart = ChartBuilder::on(&root)
        .caption(title, (FONT, 24).into_font().color(&INK))
        .margin(20)
        .x_label_area_size(50)
        .y_label_area_size(70)
        .build_cartesian_2d(0.0..t_max_ms, floor_db..top_db)
        .map_err(|x| x.to_string())?;
    chart
        .configure_mesh()
        .x_desc("Time after emission (ms)")
        .y_desc("Level re free field at 10 m (dB)")
        .axis_style(INK)
        .bold_line_style(GRID)
        .light_line_style(GRID.mix(0.4))
        .label_style((FONT, 16).into_font().color(&INK))
        .axis_desc_style((FONT, 18).into_font().color(&INK))
        .draw()
        .map_err(|x| x.to_string())?;
    for b in 0..bands {
        let colour = series_colour(b);
        // From the first arrival on; empty bins later on sit at the floor.
        let first = e.first_nonzero_bin().unwrap_or(0);
        let points = e.energy.iter().enumerate().skip(first).map(|(k, v)| {
            let db = if v[b] > 0.0 {
                level_db(v[b]).max(floor_db)
            } else {
                floor_db
            };
            ((k as f64 + 0.5) * result.bin_s * 1e3, db)
        });
        chart
            .draw_series(LineSeries::new(points, colour.stroke_width(1)))
            .map_err(|x| x.to_string())?
            .label(format!("{} Hz", result.bands.centres_hz()[b]))
            .legend(move |(x, y)| {
                PathElement::new(vec![(x, y), (x + 24, y)], colour.stroke_width(3))
            });
    }
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::UpperRight)
        .background_style(PAPER.mix(0.9))
        .border_style(INK)
        .label_font((FONT, 16).into_font().color(&INK))
        .draw()
        .map_err(|x| x.to_string())?;
    root.present().map_err(|x| x.to_string())?;
    Ok(())
}
