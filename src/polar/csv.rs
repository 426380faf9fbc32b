//! The plain CSV form of a polar response, for quick use: first column
//! `angle_deg`, then one column per band (header = band centre in Hz) holding
//! levels in dB, one row per receiver, for one angle of incidence given
//! separately. Blank lines and lines starting with `#` are skipped.

use std::path::Path;

use super::data::PolarResponse;
use super::load::{PolarFileError, Problem};

/// A flat reference that does not match the sample's CSV table.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CsvReferenceError {
    /// Other receiver angles.
    #[error("the reference has other receiver angles than the sample; measure both on the same receivers")]
    Angles,
    /// A band missing from the reference.
    #[error("the reference has no {0} Hz column; give the reference in every band of the sample")]
    MissingBand(f64),
}

/// A polar response table read from CSV.
#[derive(Clone, Debug, PartialEq)]
pub struct PolarCsv {
    /// Band centres from the header, Hz.
    pub bands_hz: Vec<f64>,
    /// Receiver angles, degrees from the normal.
    pub angle_deg: Vec<f64>,
    /// Levels, dB: `level_db[band][receiver]`.
    pub level_db: Vec<Vec<f64>>,
}

fn problem(line: usize, item: String, message: String) -> Problem {
    Problem {
        line: Some(line),
        item,
        message,
    }
}

/// Reads a polar CSV file.
pub fn load_polar_csv(path: &Path) -> Result<PolarCsv, PolarFileError> {
    let text = std::fs::read_to_string(path).map_err(|e| PolarFileError {
        file: path.to_path_buf(),
        problems: vec![Problem {
            line: None,
            item: String::new(),
            message: format!("cannot read the file: {}", crate::messages::io_problem(&e)),
        }],
    })?;
    parse_polar_csv(&text, path)
}

/// Parses the text of a polar CSV file; `file` names it in errors.
pub fn parse_polar_csv(text: &str, file: &Path) -> Result<PolarCsv, PolarFileError> {
    let mut problems = Vec::new();
    let mut rows = text
        .lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'));
    let fail = |problems| PolarFileError {
        file: file.to_path_buf(),
        problems,
    };
    let Some((header_line, header)) = rows.next() else {
        return Err(fail(vec![Problem {
            line: None,
            item: String::new(),
            message: "the file is empty; the first line must be `angle_deg,<band Hz>,...`".into(),
        }]));
    };
    let cells: Vec<&str> = header.split(',').map(str::trim).collect();
    if cells[0] != "angle_deg" {
        problems.push(problem(
            header_line,
            "column 1".into(),
            format!(
                "header is `{}`; the first column must be `angle_deg`",
                cells[0]
            ),
        ));
    }
    if cells.len() < 2 {
        problems.push(problem(
            header_line,
            "header".into(),
            "no band column; add one column per band, headed by its centre frequency in Hz".into(),
        ));
    }
    let mut bands_hz = Vec::new();
    for (c, cell) in cells.iter().enumerate().skip(1) {
        match cell.parse::<f64>() {
            Ok(f) if f.is_finite() && f > 0.0 => {
                if bands_hz.contains(&f) {
                    problems.push(problem(
                        header_line,
                        format!("column {}", c + 1),
                        format!("band {f} Hz appears twice; give each band one column"),
                    ));
                }
                bands_hz.push(f);
            }
            _ => problems.push(problem(
                header_line,
                format!("column {}", c + 1),
                format!("header `{cell}` is not a band centre frequency in Hz"),
            )),
        }
    }
    let columns = cells.len();
    let mut angle_deg = Vec::new();
    let mut level_db = vec![Vec::new(); bands_hz.len()];
    for (line, row) in rows {
        let cells: Vec<&str> = row.split(',').map(str::trim).collect();
        if cells.len() != columns {
            problems.push(problem(
                line,
                "row".into(),
                format!(
                    "has {} columns but the header has {columns}; give an angle and one level per band",
                    cells.len()
                ),
            ));
            continue;
        }
        for (c, cell) in cells.iter().enumerate() {
            let name = if c == 0 {
                "column 1 (angle_deg)".to_string()
            } else {
                format!("column {} ({} Hz)", c + 1, cells_header(header, c))
            };
            let value = match cell.parse::<f64>() {
                Ok(v) if v.is_finite() => v,
                Ok(v) => {
                    problems.push(problem(line, name, format!("{v} is not a finite number")));
                    continue;
                }
                Err(_) => {
                    let what = if c == 0 {
                        "an angle in degrees"
                    } else {
                        "a level in dB"
                    };
                    problems.push(problem(line, name, format!("`{cell}` is not {what}")));
                    continue;
                }
            };
            if c == 0 {
                if value.abs() > 90.0 {
                    problems.push(problem(line, name, format!("{value}° is outside ±90°")));
                } else if angle_deg.contains(&value) {
                    problems.push(problem(line, name, format!("angle {value}° appears twice")));
                }
                angle_deg.push(value);
            } else if let Some(col) = level_db.get_mut(c - 1) {
                col.push(value);
            }
        }
    }
    if angle_deg.len() < 2 && problems.is_empty() {
        problems.push(Problem {
            line: None,
            item: String::new(),
            message: format!(
                "has {} receiver rows; a polar response needs at least 2",
                angle_deg.len()
            ),
        });
    }
    if !problems.is_empty() {
        return Err(fail(problems));
    }
    Ok(PolarCsv {
        bands_hz,
        angle_deg,
        level_db,
    })
}

fn cells_header(header: &str, c: usize) -> String {
    header
        .split(',')
        .nth(c)
        .map(|s| s.trim().to_string())
        .unwrap_or_default()
}

impl PolarCsv {
    /// One [`PolarResponse`] per band at angle of incidence `incidence_deg`, with
    /// `reference` (same angles and bands) as the flat reference when given.
    pub fn to_responses(
        &self,
        incidence_deg: f64,
        reference: Option<&PolarCsv>,
    ) -> Result<Vec<PolarResponse>, CsvReferenceError> {
        if let Some(r) = reference {
            if r.angle_deg != self.angle_deg {
                return Err(CsvReferenceError::Angles);
            }
        }
        self.bands_hz
            .iter()
            .enumerate()
            .map(|(b, &band_hz)| {
                let reference_level_db = match reference {
                    None => None,
                    Some(r) => {
                        let i = r
                            .bands_hz
                            .iter()
                            .position(|&f| f == band_hz)
                            .ok_or(CsvReferenceError::MissingBand(band_hz))?;
                        Some(r.level_db[i].clone())
                    }
                };
                Ok(PolarResponse {
                    band_hz,
                    incidence_deg,
                    incidence_azimuth_deg: None,
                    receiver_deg: self.angle_deg.clone(),
                    receiver_azimuth_deg: None,
                    level_db: self.level_db[b].clone(),
                    pressure_re: None,
                    pressure_im: None,
                    reference_level_db,
                    reference_re: None,
                    reference_im: None,
                })
            })
            .collect()
    }
}
