//! Echogram charts: level per bin in dB against time in ms, one panel per
//! band with its 10 ms mean drawn over the raw bins.

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

/// Length of the blocks whose mean energy is drawn over the raw bins, s.
const MEAN_BLOCK_S: f64 = 0.010;

/// One panel per band (three to a row, all on the same scales): the level of
/// every bin, light, and of the mean energy per bin over 10 ms blocks, dark,
/// so the decay reads at a glance while single arrivals stay visible.
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
    let first = e.first_nonzero_bin().unwrap_or(0);
    let block = ((MEAN_BLOCK_S / result.bin_s).round() as usize).max(1);
    let db = |v: f64| {
        if v > 0.0 {
            level_db(v).max(floor_db)
        } else {
            floor_db
        }
    };

    let columns = bands.clamp(1, 3);
    let rows = bands.div_ceil(columns).max(1);
    let size = (CHART_SIZE.0, 70 + 290 * rows as u32);
    let root = BitMapBackend::new(tmp, size).into_drawing_area();
    root.fill(&PAPER).map_err(|x| x.to_string())?;
    let title = format!(
        "{} at {}: level per {:.1} ms bin (light) and mean over {:.0} ms (dark), dB re the free-field direct sound at 10 m",
        result.sources[source].name,
        result.receivers[receiver].name,
        result.bin_s * 1e3,
        block as f64 * result.bin_s * 1e3
    );
    let root = root
        .titled(&title, (FONT, 18).into_font().color(&INK))
        .map_err(|x| x.to_string())?;
    let panels = root.split_evenly((rows, columns));
    for (b, panel) in panels.iter().enumerate().take(bands) {
        let colour = series_colour(b);
        let mut chart = ChartBuilder::on(panel)
            .caption(
                format!("{} Hz", result.bands.centres_hz()[b]),
                (FONT, 16).into_font().color(&INK),
            )
            .margin(8)
            .x_label_area_size(36)
            .y_label_area_size(48)
            .build_cartesian_2d(0.0..t_max_ms, floor_db..top_db)
            .map_err(|x| x.to_string())?;
        chart
            .configure_mesh()
            .x_desc("time after emission (ms)")
            .y_desc("level (dB)")
            .x_labels(5)
            .y_labels(5)
            .x_label_formatter(&|v| format!("{v:.0}"))
            .y_label_formatter(&|v| format!("{v:.0}"))
            .axis_style(INK)
            .bold_line_style(GRID)
            .light_line_style(GRID.mix(0.0))
            .label_style((FONT, 13).into_font().color(&INK))
            .axis_desc_style((FONT, 13).into_font().color(&INK))
            .draw()
            .map_err(|x| x.to_string())?;
        // From the first arrival on; empty bins later on sit at the floor.
        let raw = e
            .energy
            .iter()
            .enumerate()
            .skip(first)
            .map(|(k, v)| ((k as f64 + 0.5) * result.bin_s * 1e3, db(v[b])));
        chart
            .draw_series(LineSeries::new(raw, colour.mix(0.35).stroke_width(1)))
            .map_err(|x| x.to_string())?;
        let means = e.energy[first..]
            .chunks(block)
            .enumerate()
            .map(|(j, chunk)| {
                let mean = chunk.iter().map(|v| v[b]).sum::<f64>() / chunk.len() as f64;
                let mid = first as f64 + (j * block) as f64 + 0.5 * chunk.len() as f64;
                (mid * result.bin_s * 1e3, db(mean))
            });
        chart
            .draw_series(LineSeries::new(means, colour.stroke_width(2)))
            .map_err(|x| x.to_string())?;
    }
    root.present().map_err(|x| x.to_string())?;
    Ok(())
}
