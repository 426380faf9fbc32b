//! The CSV tables derived from `comparison.json`: `comparison.csv` (every
//! run's values with standard errors) and `verdicts.csv` (every judged entry
//! with the numbers of its deciding pair).

use std::fmt::Write as _;

use super::document::ComparisonDocument;

/// Header of `comparison.csv`.
pub const VALUES_HEADER: &str = "run,variant,law,role,source,receiver,parameter,band,value,se";

/// Header of `verdicts.csv`.
pub const VERDICTS_HEADER: &str = "spread,kind,source,receiver,parameter,band,verdict,from,to,difference,se,jnd,spread_jnd,noise_jnd";

/// Quotes a field when it holds a comma, quote or line break (RFC 4180).
fn field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Shortest round-trip form, empty when undefined.
fn number(v: Option<f64>) -> String {
    v.map_or_else(String::new, |x| format!("{x}"))
}

/// `band` column: the band centre in Hz, or `single` for the single-number value.
fn band(b: Option<u32>) -> String {
    b.map_or_else(|| "single".to_string(), |hz| hz.to_string())
}

fn json_key<T: serde::Serialize>(v: &T) -> String {
    match serde_json::to_value(v) {
        Ok(serde_json::Value::String(s)) => s,
        _ => String::new(),
    }
}

/// The text of `comparison.csv`: one row per run, pair, parameter and band
/// (`single` for the single-number value); values in the units of
/// `result.json` (s, dB, ratios), empty where undefined.
#[must_use]
pub fn values_csv(doc: &ComparisonDocument) -> String {
    let mut out = String::from(VALUES_HEADER);
    out.push('\n');
    for r in &doc.runs {
        let role = json_key(&r.role);
        for p in &r.pairs {
            for q in &p.parameters {
                for e in q.per_band.iter().chain(std::iter::once(&q.single_number)) {
                    let _ = writeln!(
                        out,
                        "{},{},{},{role},{},{},{},{},{},{}",
                        field(&r.id),
                        field(&r.variant),
                        r.law,
                        field(&p.source),
                        field(&p.receiver),
                        q.parameter.key(),
                        band(e.band_hz),
                        number(e.value),
                        number(e.se)
                    );
                }
            }
        }
    }
    out
}

/// The text of `verdicts.csv`: one row per spread group, pair, parameter and
/// band, with the verdict and the numbers of the deciding pair of runs.
#[must_use]
pub fn verdicts_csv(doc: &ComparisonDocument) -> String {
    let mut out = String::from(VERDICTS_HEADER);
    out.push('\n');
    for s in &doc.spreads {
        let kind = json_key(&s.kind);
        for row in &s.rows {
            let d = row.differences.get(row.deciding);
            let _ = writeln!(
                out,
                "{},{kind},{},{},{},{},{},{},{},{},{},{},{},{}",
                field(&s.id),
                field(&row.source),
                field(&row.receiver),
                row.parameter.key(),
                band(row.band_hz),
                row.verdict.key(),
                field(d.map_or("", |d| d.from.as_str())),
                field(d.map_or("", |d| d.to.as_str())),
                number(d.and_then(|d| d.difference)),
                number(d.and_then(|d| d.se)),
                number(d.and_then(|d| d.jnd)),
                number(d.and_then(|d| d.spread_jnd)),
                number(d.and_then(|d| d.noise_jnd)),
            );
        }
    }
    out
}
