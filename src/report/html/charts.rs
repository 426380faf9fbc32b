//! The comparison report's charts, each described by plain data
//! ([`ChartSpec`]) and drawn by one function for any plotters backend, so the
//! same chart becomes inline SVG for the page and a PNG file beside it.

use std::path::Path;

use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use crate::output::{finish_atomic, temp_sibling};
use crate::plot::{ensure_fonts, series_colour, FONT, GRID, INK, PAPER, SHADE};
use crate::polar::plot::{render_polar_chart, PolarChart};
use crate::polar::ZoneSize;

/// One line of a line chart.
#[derive(Clone, Debug)]
pub struct Line {
    /// Legend text.
    pub label: String,
    /// Colour.
    pub colour: RGBColor,
    /// Dashed (envelope runs).
    pub dashed: bool,
    /// Points (x, y), x ascending; a non-finite y breaks the line there.
    pub points: Vec<(f64, f64)>,
}

/// One panel of a line chart.
#[derive(Clone, Debug)]
pub struct Panel {
    /// Panel heading.
    pub title: String,
    /// Lines.
    pub lines: Vec<Line>,
}

/// Line charts: echograms (one panel per variant) and decay curves.
#[derive(Clone, Debug)]
pub struct LineChart {
    /// Title.
    pub title: String,
    /// x axis text.
    pub x_desc: String,
    /// y axis text.
    pub y_desc: String,
    /// x range.
    pub x_range: (f64, f64),
    /// y range.
    pub y_range: (f64, f64),
    /// Decimals of the x and y tick labels.
    pub decimals: (usize, usize),
    /// Panels, stacked.
    pub panels: Vec<Panel>,
}

/// One bar: a run's value in one group.
#[derive(Clone, Copy, Debug)]
pub struct Bar {
    /// Value, display unit.
    pub value: f64,
    /// k standard errors, display unit.
    pub noise: Option<f64>,
    /// Half a JND, display unit.
    pub half_jnd: Option<f64>,
}

/// Grouped bars: one group per band (and the single number), one bar per run.
#[derive(Clone, Debug)]
pub struct BarChart {
    /// Title.
    pub title: String,
    /// y axis text.
    pub y_desc: String,
    /// Group labels.
    pub groups: Vec<String>,
    /// Series (runs): label and colour.
    pub series: Vec<(String, RGBColor)>,
    /// `bars[group][series]`, `None` where undefined.
    pub bars: Vec<Vec<Option<Bar>>>,
}

/// Materials on the scattering–diffusion plane.
#[derive(Clone, Debug)]
pub struct PlaneMaterial {
    /// Legend text.
    pub label: String,
    /// Colour.
    pub colour: RGBColor,
    /// (s, d, band label) per band with a diffusion coefficient.
    pub points: Vec<(f64, f64, String)>,
    /// Whether to write band labels beside the points.
    pub labelled: bool,
    /// Envelope ranges (s, least even d, most even d), for s-only materials.
    pub envelope: Vec<(f64, f64, f64)>,
}

/// d against s: the bound, the bounded law's reachable region, every material.
#[derive(Clone, Debug)]
pub struct PlaneChart {
    /// Title.
    pub title: String,
    /// Arc the bound is taken on.
    pub zone: ZoneSize,
    /// (s, least even d, most even d) on a grid of s, for the reachable region.
    pub reachable: Vec<(f64, f64, f64)>,
    /// Materials.
    pub materials: Vec<PlaneMaterial>,
}

/// Any chart of the report.
#[derive(Clone, Debug)]
pub enum ChartSpec {
    /// Lines.
    Lines(LineChart),
    /// Bars.
    Bars(BarChart),
    /// The scattering–diffusion plane.
    Plane(PlaneChart),
    /// A polar response chart ([`crate::polar::plot`]).
    Polar(PolarChart),
}

/// A chart with its file stem and size.
#[derive(Clone, Debug)]
pub struct Chart {
    /// File stem of the PNG, also the figure's id.
    pub name: String,
    /// Size, px.
    pub size: (u32, u32),
    /// What to draw.
    pub spec: ChartSpec,
}

impl Chart {
    /// The chart as an SVG document (text).
    pub fn to_svg(&self) -> Result<String, String> {
        ensure_fonts();
        let mut text = String::new();
        {
            let root = SVGBackend::with_string(&mut text, self.size).into_drawing_area();
            render(&root, &self.spec)?;
            root.present().map_err(|e| e.to_string())?;
        }
        Ok(text)
    }

    /// Writes the chart as PNG to `path`, atomically.
    pub fn write_png(&self, path: &Path) -> Result<(), String> {
        ensure_fonts();
        let tmp = temp_sibling(path);
        let drawn = (|| {
            let root = BitMapBackend::new(&tmp, self.size).into_drawing_area();
            render(&root, &self.spec)?;
            root.present().map_err(|e| e.to_string())
        })();
        match drawn {
            Ok(()) => finish_atomic(&tmp, path).map_err(|e| e.to_string()),
            Err(e) => {
                let _ = std::fs::remove_file(&tmp);
                Err(e)
            }
        }
    }
}

/// Colour of the ±½ JND brackets and of the least-even curve.
const BRACKET: RGBColor = RGBColor(150, 146, 138);

fn render<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    spec: &ChartSpec,
) -> Result<(), String> {
    match spec {
        ChartSpec::Lines(c) => render_lines(root, c),
        ChartSpec::Bars(c) => render_bars(root, c),
        ChartSpec::Plane(c) => render_plane(root, c),
        ChartSpec::Polar(c) => render_polar_chart(root, c),
    }
}

fn font(size: u32) -> TextStyle<'static> {
    (FONT, size).into_font().color(&INK)
}

fn anchored(size: u32, h: HPos, v: VPos) -> TextStyle<'static> {
    font(size).pos(Pos::new(h, v))
}

fn title<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, text: &str) -> Result<(), String> {
    let (w, _) = root.dim_in_pixel();
    root.draw(&Text::new(
        text.to_string(),
        (i32::try_from(w / 2).unwrap_or(0), 10),
        (FONT, 20)
            .into_font()
            .style(FontStyle::Bold)
            .color(&INK)
            .pos(Pos::new(HPos::Center, VPos::Top)),
    ))
    .map_err(|e| e.to_string())
}

/// A legend in rows along the top of `area`, `entries` (label, colour, dashed).
fn legend<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    top: i32,
    entries: &[(String, RGBColor, bool)],
) -> Result<i32, String> {
    let (w, _) = area.dim_in_pixel();
    let w = i32::try_from(w).unwrap_or(1000);
    let (mut x, mut y) = (70, top);
    for (label, colour, dashed) in entries {
        let width = 44 + 7 * label.chars().count() as i32;
        if x + width > w - 20 {
            x = 70;
            y += 20;
        }
        let style = colour.stroke_width(3);
        if *dashed {
            area.draw(&DashedPathElement::new(
                vec![(x, y), (x + 28, y)],
                6,
                4,
                style,
            ))
            .map_err(|e| e.to_string())?;
        } else {
            area.draw(&PathElement::new(vec![(x, y), (x + 28, y)], style))
                .map_err(|e| e.to_string())?;
        }
        area.draw(&Text::new(
            label.clone(),
            (x + 34, y),
            anchored(13, HPos::Left, VPos::Center),
        ))
        .map_err(|e| e.to_string())?;
        x += width;
    }
    Ok(y + 14)
}

fn render_lines<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &LineChart,
) -> Result<(), String> {
    root.fill(&PAPER).map_err(|e| e.to_string())?;
    title(root, &c.title)?;
    // One legend for all panels: the union of line labels, first seen first.
    let mut entries: Vec<(String, RGBColor, bool)> = Vec::new();
    for p in &c.panels {
        for l in &p.lines {
            if !entries.iter().any(|e| e.0 == l.label) {
                entries.push((l.label.clone(), l.colour, l.dashed));
            }
        }
    }
    let below = legend(root, 44, &entries)?;
    let body = root.margin(u32::try_from(below).unwrap_or(60), 0, 0, 0);
    let (xd, yd) = c.decimals;
    let panels = body.split_evenly((c.panels.len().max(1), 1));
    for (area, panel) in panels.iter().zip(&c.panels) {
        let mut chart = ChartBuilder::on(area)
            .caption(panel.title.clone(), font(15))
            .margin(8)
            .margin_right(24)
            .x_label_area_size(40)
            .y_label_area_size(64)
            .build_cartesian_2d(c.x_range.0..c.x_range.1, c.y_range.0..c.y_range.1)
            .map_err(|e| e.to_string())?;
        chart
            .configure_mesh()
            .x_label_formatter(&|v| format!("{v:.xd$}"))
            .y_label_formatter(&|v| format!("{v:.yd$}"))
            .x_desc(c.x_desc.clone())
            .y_desc(c.y_desc.clone())
            .axis_style(INK)
            .bold_line_style(GRID)
            .light_line_style(PAPER)
            .label_style(font(13))
            .axis_desc_style(font(14))
            .draw()
            .map_err(|e| e.to_string())?;
        for l in &panel.lines {
            // Runs of finite points, each drawn as one path.
            let mut runs: Vec<Vec<(f64, f64)>> = vec![Vec::new()];
            for &(x, y) in l
                .points
                .iter()
                .filter(|p| p.0 >= c.x_range.0 && p.0 <= c.x_range.1)
            {
                if y.is_finite() {
                    if let Some(r) = runs.last_mut() {
                        r.push((x, y.clamp(c.y_range.0, c.y_range.1)));
                    }
                } else if runs.last().is_some_and(|r| !r.is_empty()) {
                    runs.push(Vec::new());
                }
            }
            for pts in runs.into_iter().filter(|r| r.len() > 1) {
                if l.dashed {
                    chart
                        .draw_series(std::iter::once(DashedPathElement::new(
                            pts,
                            7,
                            5,
                            l.colour.stroke_width(2),
                        )))
                        .map_err(|e| e.to_string())?;
                } else {
                    chart
                        .draw_series(std::iter::once(PathElement::new(
                            pts,
                            l.colour.stroke_width(2),
                        )))
                        .map_err(|e| e.to_string())?;
                }
            }
        }
    }
    Ok(())
}

fn render_bars<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &BarChart,
) -> Result<(), String> {
    root.fill(&PAPER).map_err(|e| e.to_string())?;
    title(root, &c.title)?;
    let entries: Vec<(String, RGBColor, bool)> = c
        .series
        .iter()
        .map(|(l, col)| (l.clone(), *col, false))
        .collect();
    let below = legend(root, 44, &entries)?;
    let body = root.margin(u32::try_from(below).unwrap_or(60), 0, 0, 0);

    // y range over bars, whiskers and zero.
    let (mut lo, mut hi) = (0.0_f64, 0.0_f64);
    for g in &c.bars {
        for b in g.iter().flatten() {
            let reach = b.half_jnd.unwrap_or(0.0).max(b.noise.unwrap_or(0.0));
            lo = lo.min(b.value - reach);
            hi = hi.max(b.value + reach);
        }
    }
    if hi - lo <= 0.0 {
        hi = lo + 1.0;
    }
    let pad = 0.06 * (hi - lo);
    let (lo, hi) = (if lo < 0.0 { lo - pad } else { 0.0 }, hi + pad);
    let groups = c.groups.len().max(1);
    let mut chart = ChartBuilder::on(&body)
        .margin(8)
        .margin_right(24)
        .x_label_area_size(34)
        .y_label_area_size(70)
        .build_cartesian_2d(0.0..groups as f64, lo..hi)
        .map_err(|e| e.to_string())?;
    let yd = if hi - lo >= 20.0 {
        0
    } else if hi - lo >= 2.0 {
        1
    } else {
        2
    };
    chart
        .configure_mesh()
        .y_label_formatter(&|v| format!("{v:.yd$}"))
        .disable_x_mesh()
        .x_labels(0)
        .y_desc(c.y_desc.clone())
        .axis_style(INK)
        .bold_line_style(GRID)
        .light_line_style(PAPER)
        .label_style(font(13))
        .axis_desc_style(font(14))
        .draw()
        .map_err(|e| e.to_string())?;
    let series = c.series.len().max(1);
    let width = 0.8 / series as f64;
    for (g, bars) in c.bars.iter().enumerate() {
        // Group label under the axis, in backend pixels.
        let (px, py) = chart.backend_coord(&(g as f64 + 0.5, lo));
        root.draw(&Text::new(
            c.groups.get(g).cloned().unwrap_or_default(),
            (px, py + 8),
            anchored(13, HPos::Center, VPos::Top),
        ))
        .map_err(|e| e.to_string())?;
        for (k, bar) in bars.iter().enumerate() {
            let Some(b) = bar else { continue };
            let colour = c.series.get(k).map_or(INK, |s| s.1);
            let x0 = g as f64 + 0.1 + k as f64 * width;
            let x1 = x0 + width * 0.86;
            let xm = 0.5 * (x0 + x1);
            chart
                .draw_series(std::iter::once(Rectangle::new(
                    [(x0, 0.0_f64.max(lo)), (x1, b.value)],
                    colour.filled(),
                )))
                .map_err(|e| e.to_string())?;
            // ±½ JND as a bracket: bars whose brackets overlap differ by less than one JND.
            if let Some(j) = b.half_jnd {
                let xa = x0 + 0.1 * (x1 - x0);
                let xb = x1 - 0.1 * (x1 - x0);
                let (lo_j, hi_j) = (b.value - j, b.value + j);
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        vec![(xb, lo_j), (xa, lo_j), (xa, hi_j), (xb, hi_j)],
                        BRACKET.stroke_width(2),
                    )))
                    .map_err(|e| e.to_string())?;
            }
            // ±k standard errors.
            if let Some(n) = b.noise {
                chart
                    .draw_series(std::iter::once(PathElement::new(
                        vec![(xm, b.value - n), (xm, b.value + n)],
                        INK.stroke_width(2),
                    )))
                    .map_err(|e| e.to_string())?;
            }
        }
    }
    Ok(())
}

fn render_plane<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &PlaneChart,
) -> Result<(), String> {
    root.fill(&PAPER).map_err(|e| e.to_string())?;
    title(root, &c.title)?;
    let mut entries: Vec<(String, RGBColor, bool)> = vec![
        ("bound d_max(min(s, s*))".into(), series_colour(4), false),
        ("least even the bounded law reaches".into(), BRACKET, true),
    ];
    entries.extend(
        c.materials
            .iter()
            .map(|m| (m.label.clone(), m.colour, false)),
    );
    let below = legend(root, 44, &entries)?;
    let body = root.margin(u32::try_from(below).unwrap_or(60), 0, 0, 0);
    let mut chart = ChartBuilder::on(&body)
        .margin(8)
        .margin_right(24)
        .x_label_area_size(48)
        .y_label_area_size(64)
        .build_cartesian_2d(0.0..1.0, 0.0..1.05)
        .map_err(|e| e.to_string())?;
    chart
        .configure_mesh()
        .x_desc("scattering coefficient s")
        .y_desc("diffusion coefficient d")
        .axis_style(INK)
        .bold_line_style(GRID)
        .light_line_style(PAPER)
        .label_style(font(13))
        .axis_desc_style(font(14))
        .draw()
        .map_err(|e| e.to_string())?;
    let s_star = c.zone.s_star();
    let bound = |s: f64| c.zone.d_max(s.min(s_star)).unwrap_or(1.0).clamp(0.0, 1.0);
    let curve: Vec<(f64, f64)> = (0..=200)
        .map(|k| f64::from(k) / 200.0)
        .map(|s| (s, bound(s)))
        .collect();
    // Above the bound: no surface can lie there.
    let mut above = curve.clone();
    above.push((1.0, 1.05));
    above.push((0.0, 1.05));
    chart
        .draw_series(std::iter::once(Polygon::new(
            above,
            RGBColor(233, 225, 214).filled(),
        )))
        .map_err(|e| e.to_string())?;
    // Between least even and most even: what the bounded law reproduces.
    if !c.reachable.is_empty() {
        let mut region: Vec<(f64, f64)> = c.reachable.iter().map(|&(s, _, hi)| (s, hi)).collect();
        region.extend(c.reachable.iter().rev().map(|&(s, lo, _)| (s, lo)));
        chart
            .draw_series(std::iter::once(Polygon::new(
                region,
                SHADE.mix(0.6).filled(),
            )))
            .map_err(|e| e.to_string())?;
        chart
            .draw_series(std::iter::once(DashedPathElement::new(
                c.reachable
                    .iter()
                    .map(|&(s, lo, _)| (s, lo))
                    .collect::<Vec<_>>(),
                6,
                4,
                BRACKET.stroke_width(2),
            )))
            .map_err(|e| e.to_string())?;
    }
    chart
        .draw_series(LineSeries::new(curve, series_colour(4).stroke_width(3)))
        .map_err(|e| e.to_string())?;
    for (text, at) in [
        ("above the bound: no surface can lie here", (0.03, 0.97)),
        ("shaded: what the bounded law reproduces", (0.55, 0.12)),
    ] {
        chart
            .draw_series(std::iter::once(Text::new(
                text,
                at,
                anchored(13, HPos::Left, VPos::Top),
            )))
            .map_err(|e| e.to_string())?;
    }
    chart
        .draw_series(std::iter::once(Text::new(
            format!("s* = {s_star:.3}"),
            (s_star, 1.01),
            anchored(12, HPos::Center, VPos::Bottom),
        )))
        .map_err(|e| e.to_string())?;
    // Band labels never overlap: a label whose box would cover one already
    // written is left out (its point stays), and the chart says how many.
    let (w_px, h_px) = chart.plotting_area().dim_in_pixel();
    let char_w = 6.5 / f64::from(w_px.max(1));
    let line_h = 13.0 * 1.05 / f64::from(h_px.max(1));
    let mut placed: Vec<[f64; 4]> = Vec::new();
    let mut pending: Vec<(f64, f64, String)> = Vec::new();
    let mut left_out = 0usize;
    for m in &c.materials {
        for &(s, lo, hi) in &m.envelope {
            chart
                .draw_series(std::iter::once(PathElement::new(
                    vec![(s, lo), (s, hi)],
                    m.colour.stroke_width(3),
                )))
                .map_err(|e| e.to_string())?;
            for d in [lo, hi] {
                chart
                    .draw_series(std::iter::once(Circle::new(
                        (s, d),
                        4,
                        m.colour.stroke_width(2),
                    )))
                    .map_err(|e| e.to_string())?;
            }
        }
        // Coinciding points of one material share one label ("125/250").
        let mut labels: Vec<(f64, f64, String)> = Vec::new();
        for (s, d, label) in &m.points {
            chart
                .draw_series(std::iter::once(Circle::new((*s, *d), 5, m.colour.filled())))
                .map_err(|e| e.to_string())?;
            match labels
                .iter_mut()
                .find(|(x, y, _)| (x - s).abs() < 0.01 && (y - d).abs() < 0.01)
            {
                Some(l) => {
                    l.2.push('/');
                    l.2.push_str(label);
                }
                None => labels.push((*s, *d, label.clone())),
            }
        }
        if m.labelled {
            pending.extend(labels);
        }
    }
    // Labels last, on a paper-coloured backing so later points do not hide them.
    for (s, d, label) in pending {
        let text = format!(" {label}");
        let b = [s, s + char_w * text.chars().count() as f64, d, d + line_h];
        let overlaps = placed
            .iter()
            .any(|p| b[0] < p[1] && p[0] < b[1] && b[2] < p[3] && p[2] < b[3]);
        if overlaps {
            left_out += 1;
            continue;
        }
        placed.push(b);
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(b[0] + 0.3 * char_w, b[2]), (b[1], b[3])],
                PAPER.mix(0.85).filled(),
            )))
            .map_err(|e| e.to_string())?;
        chart
            .draw_series(std::iter::once(Text::new(
                text,
                (s, d),
                anchored(11, HPos::Left, VPos::Bottom),
            )))
            .map_err(|e| e.to_string())?;
    }
    if left_out > 0 {
        chart
            .draw_series(std::iter::once(Text::new(
                format!("{left_out} band labels left out where they would overlap; the surface table lists every band"),
                (0.03, 0.91),
                anchored(11, HPos::Left, VPos::Top),
            )))
            .map_err(|e| e.to_string())?;
    }
    Ok(())
}
