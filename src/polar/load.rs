//! Reading and checking a polar data file (TOML, the types of [`super::data`]).
//! Every problem names the file, the line and what is wrong; all problems are
//! reported at once.

use std::fmt;
use std::path::{Path, PathBuf};

use toml::de::{DeTable, DeValue};

use super::data::{Arrangement, PolarFile, PolarResponse};

/// Problems listed in one error, at most; the rest are counted.
const MAX_LISTED_PROBLEMS: usize = 40;

/// One problem in a polar data file.
#[derive(Clone, Debug, PartialEq)]
pub struct Problem {
    /// Line in the file (1-based), when known.
    pub line: Option<usize>,
    /// The item concerned, e.g. `responses[2].level_db[5]`.
    pub item: String,
    /// What is wrong and how to fix it.
    pub message: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if let Some(line) = self.line {
            write!(f, "line {line}: ")?;
        }
        if self.item.is_empty() {
            write!(f, "{}", self.message)
        } else {
            write!(f, "{}: {}", self.item, self.message)
        }
    }
}

/// A polar data file that cannot be used.
#[derive(Debug, thiserror::Error)]
#[error("{}: {}", .file.display(), list_problems(.problems))]
pub struct PolarFileError {
    /// The file.
    pub file: PathBuf,
    /// Every problem found.
    pub problems: Vec<Problem>,
}

fn list_problems(problems: &[Problem]) -> String {
    let mut lines: Vec<String> = problems
        .iter()
        .take(MAX_LISTED_PROBLEMS)
        .map(ToString::to_string)
        .collect();
    if problems.len() > MAX_LISTED_PROBLEMS {
        lines.push(format!(
            "... and {} more problems",
            problems.len() - MAX_LISTED_PROBLEMS
        ));
    }
    lines.join("\n  ")
}

/// One step of the path to an item in the file.
#[derive(Clone, Copy, Debug, PartialEq)]
pub(super) enum Seg {
    /// A table key.
    Key(&'static str),
    /// An array index.
    Index(usize),
}

pub(super) fn item_name(path: &[Seg]) -> String {
    let mut s = String::new();
    for seg in path {
        match seg {
            Seg::Key(k) => {
                if !s.is_empty() {
                    s.push('.');
                }
                s.push_str(k);
            }
            Seg::Index(i) => s.push_str(&format!("[{i}]")),
        }
    }
    s
}

/// Line (1-based) of a byte offset.
pub(super) fn line_of(text: &str, offset: usize) -> usize {
    text[..offset.min(text.len())]
        .bytes()
        .filter(|&b| b == b'\n')
        .count()
        + 1
}

/// Reads and checks a polar data file.
pub fn load_polar_file(path: &Path) -> Result<PolarFile, PolarFileError> {
    let text = std::fs::read_to_string(path).map_err(|e| PolarFileError {
        file: path.to_path_buf(),
        problems: vec![Problem {
            line: None,
            item: String::new(),
            message: format!("cannot read the file: {}", crate::messages::io_problem(&e)),
        }],
    })?;
    parse_polar_toml(&text, path)
}

/// Parses and checks the text of a polar data file; `file` names it in errors.
pub fn parse_polar_toml(text: &str, file: &Path) -> Result<PolarFile, PolarFileError> {
    let fail = |problems| PolarFileError {
        file: file.to_path_buf(),
        problems,
    };
    let parsed: PolarFile =
        toml::from_str(text).map_err(|e| fail(vec![syntax_problem(text, &e)]))?;
    let found = validate(&parsed);
    if found.is_empty() {
        return Ok(parsed);
    }
    // The text parsed once, so it parses again; spans give the lines.
    let tree = DeTable::parse(text)
        .ok()
        .map(|t| DeValue::Table(t.into_inner()));
    let problems = found
        .into_iter()
        .map(|(path, message)| Problem {
            line: tree
                .as_ref()
                .and_then(|t| span_of(t, &path))
                .map(|start| line_of(text, start)),
            item: item_name(&path),
            message,
        })
        .collect();
    Err(fail(problems))
}

/// A problem from the TOML reader, with the line and the key written on it.
pub(super) fn syntax_problem(text: &str, e: &toml::de::Error) -> Problem {
    let start = e.span().map(|s| s.start);
    let key = start
        .and_then(|s| {
            text[..s.min(text.len())]
                .rsplit('\n')
                .next()
                .map(str::to_string)
        })
        .and_then(|before| before.split_once('=').map(|(k, _)| k.trim().to_string()))
        .filter(|k| !k.is_empty() && !k.starts_with('['))
        .unwrap_or_default();
    Problem {
        line: start.map(|s| line_of(text, s)),
        item: key,
        message: e.message().trim_end().to_string(),
    }
}

/// Byte offset where the item at `path` starts, or its nearest ancestor that exists.
pub(super) fn span_of(root: &DeValue<'_>, path: &[Seg]) -> Option<usize> {
    let mut node = root;
    let mut start = None;
    for seg in path {
        let next = match *seg {
            Seg::Key(k) => node.get(k),
            Seg::Index(i) => node.get(i),
        };
        match next {
            Some(v) => {
                start = Some(v.span().start);
                node = v.get_ref();
            }
            None => break,
        }
    }
    start
}

/// Checks an in-memory polar file (for example before writing one). Returns
/// human-readable problems, each naming the item; empty when the file is usable.
#[must_use]
pub fn check_polar_file(file: &PolarFile) -> Vec<String> {
    validate(file)
        .into_iter()
        .map(|(path, msg)| format!("{}: {msg}", item_name(&path)))
        .collect()
}

type Found = Vec<(Vec<Seg>, String)>;

fn validate(file: &PolarFile) -> Found {
    let mut found = Found::new();
    let g = &file.geometry;
    let geo = |k: &'static str| vec![Seg::Key("geometry"), Seg::Key(k)];
    for (key, v) in [
        ("sample_width_m", Some(g.sample_width_m)),
        ("source_distance_m", Some(g.source_distance_m)),
        ("receiver_distance_m", Some(g.receiver_distance_m)),
        ("sample_depth_m", g.sample_depth_m),
    ] {
        if let Some(v) = v {
            if !(v.is_finite() && v > 0.0) {
                found.push((geo(key), format!("{v} is not a positive length in metres")));
            }
        }
    }
    if let Some(h) = g.zone_half_width_deg {
        if !(h.is_finite() && (0.0..=90.0).contains(&h)) {
            found.push((
                geo("zone_half_width_deg"),
                format!("{h} is not a half-width between 0° and 90°"),
            ));
        }
    }
    if file.responses.is_empty() {
        found.push((
            vec![Seg::Key("responses")],
            "the file holds no response; add at least one [[responses]] table".into(),
        ));
    }
    for (k, r) in file.responses.iter().enumerate() {
        validate_response(k, r, g.arrangement, &mut found);
    }
    // The same band and incidence twice.
    for (k, r) in file.responses.iter().enumerate() {
        if let Some(j) = file.responses[..k].iter().position(|q| {
            q.band_hz == r.band_hz
                && q.incidence_deg == r.incidence_deg
                && q.incidence_azimuth_deg.unwrap_or(0.0) == r.incidence_azimuth_deg.unwrap_or(0.0)
        }) {
            found.push((
                vec![Seg::Key("responses"), Seg::Index(k)],
                format!(
                    "repeats band {} Hz at incidence {}° already given by responses[{j}]; remove one",
                    r.band_hz, r.incidence_deg
                ),
            ));
        }
    }
    found
}

fn validate_response(k: usize, r: &PolarResponse, arrangement: Arrangement, found: &mut Found) {
    let at = |key: &'static str| vec![Seg::Key("responses"), Seg::Index(k), Seg::Key(key)];
    let at_i = |key: &'static str, i: usize| {
        vec![
            Seg::Key("responses"),
            Seg::Index(k),
            Seg::Key(key),
            Seg::Index(i),
        ]
    };
    if !(r.band_hz.is_finite() && r.band_hz > 0.0) {
        found.push((
            at("band_hz"),
            format!("{} is not a frequency in Hz", r.band_hz),
        ));
    }
    if !(r.incidence_deg.is_finite() && r.incidence_deg.abs() < 90.0) {
        found.push((
            at("incidence_deg"),
            format!(
                "{} is not an angle of incidence strictly between −90° and 90°",
                r.incidence_deg
            ),
        ));
    }
    let m = r.receiver_deg.len();
    if m < 2 {
        found.push((
            at("receiver_deg"),
            format!("has {m} receivers; a polar response needs at least 2"),
        ));
    }
    for (i, &t) in r.receiver_deg.iter().enumerate() {
        if !(t.is_finite() && t.abs() <= 90.0) {
            found.push((
                at_i("receiver_deg", i),
                format!("{t} is not a receiver angle within ±90°"),
            ));
        }
    }
    // Azimuths: required for hemispheres, meaningless for a plane.
    match (arrangement, &r.receiver_azimuth_deg) {
        (Arrangement::Hemisphere, None) => found.push((
            at("receiver_deg"),
            "hemispherical data need receiver_azimuth_deg, one azimuth per receiver".into(),
        )),
        (Arrangement::Plane, Some(_)) => found.push((
            at("receiver_azimuth_deg"),
            "azimuths given for single-plane data; remove them or set geometry.arrangement = \"hemisphere\"".into(),
        )),
        _ => {}
    }
    if arrangement == Arrangement::Plane {
        if r.incidence_azimuth_deg.is_some() {
            found.push((
                at("incidence_azimuth_deg"),
                "an incidence azimuth is given for single-plane data; remove it or set geometry.arrangement = \"hemisphere\"".into(),
            ));
        }
        for i in 0..m {
            if let Some(j) = r.receiver_deg[..i]
                .iter()
                .position(|&t| t == r.receiver_deg[i])
            {
                found.push((
                    at_i("receiver_deg", i),
                    format!(
                        "angle {}° repeats receiver_deg[{j}]; each receiver needs its own angle",
                        r.receiver_deg[i]
                    ),
                ));
            }
        }
    }
    if let Some(a) = r.incidence_azimuth_deg {
        if !a.is_finite() {
            found.push((
                at("incidence_azimuth_deg"),
                format!("{a} is not an azimuth in degrees"),
            ));
        }
    }
    let mut per_receiver = |key: &'static str, values: Option<&Vec<f64>>, what: &str| {
        let Some(values) = values else { return };
        if values.len() != m {
            found.push((
                at(key),
                format!(
                    "has {} values but receiver_deg has {m}; give one {what} per receiver",
                    values.len()
                ),
            ));
        }
        for (i, v) in values.iter().enumerate() {
            if !v.is_finite() {
                found.push((at_i(key, i), format!("{v} is not a finite {what}")));
            }
        }
    };
    per_receiver(
        "receiver_azimuth_deg",
        r.receiver_azimuth_deg.as_ref(),
        "azimuth in degrees",
    );
    per_receiver("level_db", Some(&r.level_db), "level in dB");
    per_receiver("pressure_re", r.pressure_re.as_ref(), "pressure");
    per_receiver("pressure_im", r.pressure_im.as_ref(), "pressure");
    per_receiver(
        "reference_level_db",
        r.reference_level_db.as_ref(),
        "level in dB",
    );
    per_receiver("reference_re", r.reference_re.as_ref(), "pressure");
    per_receiver("reference_im", r.reference_im.as_ref(), "pressure");
    for (re, im, re_key, im_key) in [
        (&r.pressure_re, &r.pressure_im, "pressure_re", "pressure_im"),
        (
            &r.reference_re,
            &r.reference_im,
            "reference_re",
            "reference_im",
        ),
    ] {
        match (re.is_some(), im.is_some()) {
            (true, false) => found.push((
                at(re_key),
                format!("{re_key} is given without {im_key}; give both or neither"),
            )),
            (false, true) => found.push((
                at(im_key),
                format!("{im_key} is given without {re_key}; give both or neither"),
            )),
            _ => {}
        }
    }
}
