//! ISO 3382-1 parameters of every source–receiver pair and band of a trace run,
//! and the files derived from them: `parameters.csv` and one decay-curve chart
//! per pair.
//!
//! Time zero is the arrival of the direct sound, t = d / c (ISO 3382-1:2009,
//! Annex A measures every parameter from it). Where a wall blocks the straight
//! path the echogram holds no direct sound; t = 0 is then still the geometric
//! d / c, so that early and late energy are split at the same instants as in
//! an unobstructed room, and the pair carries a note saying so.

use std::fmt::Write as _;
use std::path::Path;

use super::batches::ValueTable;
use crate::metrics::{self, Averages, BandParameters, DecayPanel, EchogramBand, Parameter};
use crate::receiver::Echogram;
use crate::trace::{PairEchogram, TraceResult};

use super::{file_safe, ReportError};

/// Header of `parameters.csv`: the values, then their standard errors.
pub const PARAMETERS_CSV_HEADER: &str = "source,receiver,band_hz,EDT_s,T20_s,T30_s,C50_db,C80_db,D50,Ts_s,G_db,JLF,EDT_s_se,T20_s_se,T30_s_se,C50_db_se,C80_db_se,D50_se,Ts_s_se,G_db_se,JLF_se";

/// The file name of the parameter table.
pub const PARAMETERS_CSV_FILE: &str = "parameters.csv";

/// Parameters of one source–receiver pair.
#[derive(Clone, Debug)]
pub struct PairParameters {
    /// Index into [`TraceResult::sources`].
    pub source: usize,
    /// Index into [`TraceResult::receivers`].
    pub receiver: usize,
    /// One entry per traced band, in band order.
    pub bands: Vec<BandParameters>,
    /// Single-number means over bands ([`metrics::averages`]).
    pub averages: Averages,
    /// Things to know about this pair, e.g. that the direct sound is blocked.
    pub notes: Vec<String>,
    /// Jackknife standard error of every value over the batches
    /// ([`super::batches`]), in the values' units; `None` for one batch.
    pub standard_errors: Option<ValueTable>,
}

impl PairParameters {
    /// Standard error of `parameter` in `slot` (a band index, or the band
    /// count for the single-number value), same unit as the value.
    #[must_use]
    pub fn standard_error(&self, parameter: Parameter, slot: usize) -> Option<f64> {
        self.standard_errors.as_ref()?.get(parameter, slot)
    }
}

/// Computes the parameters of one pair from its energy and lateral echograms,
/// with t = 0 at its direct-sound time d / c.
#[must_use]
pub fn pair_parameters(result: &TraceResult, pair: &PairEchogram) -> PairParameters {
    pair_parameters_with(result, pair, &pair.echogram)
}

/// As [`pair_parameters`], from `echogram` in place of the pair's own (a
/// pooled or delete-one echogram of a batched run), without copying either.
#[must_use]
pub fn pair_parameters_with(
    result: &TraceResult,
    pair: &PairEchogram,
    echogram: &Echogram,
) -> PairParameters {
    let centres = result.bands.centres_hz();
    let e = echogram;
    let mut notes = Vec::new();
    if !pair.direct_visible {
        notes.push(format!(
            "the direct sound is blocked by a wall; t = 0 is its geometric arrival d / c = {:.2} ms (ISO 3382-1 measures from the direct sound)",
            pair.direct_time_s * 1e3
        ));
    }
    let bands: Vec<BandParameters> = centres
        .iter()
        .enumerate()
        .map(|(b, &band_hz)| {
            let energy: Vec<f64> = e.energy.iter().map(|v| v[b]).collect();
            let lateral: Vec<f64> = e.lateral.iter().map(|v| v[b]).collect();
            metrics::histogram_parameters(&EchogramBand {
                band_hz,
                energy: &energy,
                lateral: Some(&lateral),
                bin_s: e.bin_s,
                onset_s: pair.direct_time_s,
            })
        })
        .collect();
    let averages = metrics::averages(&bands);
    PairParameters {
        source: pair.source,
        receiver: pair.receiver,
        bands,
        averages,
        notes,
        standard_errors: None,
    }
}

/// Parameters of every pair, in the order of [`TraceResult::echograms`]
/// (source-major). Pure and deterministic: the same echograms give the same
/// bits.
#[must_use]
pub fn run_parameters(result: &TraceResult) -> Vec<PairParameters> {
    result
        .echograms
        .iter()
        .map(|p| pair_parameters(result, p))
        .collect()
}

/// Quotes a CSV field when it holds a comma, quote or line break (RFC 4180).
fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// A value in shortest round-trip form, empty when undefined.
fn csv_value(v: Option<f64>) -> String {
    v.map_or_else(String::new, |x| format!("{x}"))
}

/// The text of `parameters.csv`: [`PARAMETERS_CSV_HEADER`], then one row per
/// pair and band (pairs source-major, bands ascending); times in s, levels in
/// dB, D50 and JLF as ratios; an empty cell where a value is undefined (the
/// reason is in `result.json`). The `_se` columns hold each value's standard
/// error over the batches, empty for a run traced in one batch.
#[must_use]
pub fn parameters_csv(result: &TraceResult, parameters: &[PairParameters]) -> String {
    let mut out = String::from(PARAMETERS_CSV_HEADER);
    out.push('\n');
    for p in parameters {
        let source = csv_field(&result.sources[p.source].name);
        let receiver = csv_field(&result.receivers[p.receiver].name);
        for (slot, b) in p.bands.iter().enumerate() {
            let _ = write!(out, "{source},{receiver},{}", b.band_hz);
            for parameter in Parameter::ALL {
                out.push(',');
                out.push_str(&csv_value(parameter.of_band(b)));
            }
            for parameter in Parameter::ALL {
                out.push(',');
                out.push_str(&csv_value(p.standard_error(parameter, slot)));
            }
            out.push('\n');
        }
    }
    out
}

/// `decay-<receiver>.png`, or `decay-<source>-<receiver>.png` with several
/// sources (the naming rule of the echogram charts).
#[must_use]
pub fn decay_plot_file_name(result: &TraceResult, source: usize, receiver: usize) -> String {
    let r = file_safe(&result.receivers[receiver].name);
    if result.sources.len() == 1 {
        format!("decay-{r}.png")
    } else {
        format!("decay-{}-{r}.png", file_safe(&result.sources[source].name))
    }
}

/// Draws the Schroeder curves of one pair, one panel per band with the EDT,
/// T20 and T30 fits over their spans, to `path` (PNG, written atomically).
pub fn write_decay_plot(
    result: &TraceResult,
    parameters: &PairParameters,
    path: &Path,
) -> Result<(), ReportError> {
    let title = format!(
        "{} at {}: decay curves (t = 0 at the direct sound)",
        result.sources[parameters.source].name, result.receivers[parameters.receiver].name
    );
    let panels: Vec<DecayPanel<'_>> = parameters.bands.iter().map(DecayPanel::from_band).collect();
    metrics::write_decay_chart(path, &title, &panels).map_err(|e| ReportError::Plot {
        path: path.to_path_buf(),
        message: e.message,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn csv_values_are_round_trip_or_empty() {
        assert_eq!(csv_value(None), "");
        assert_eq!(csv_value(Some(0.1)), "0.1");
        assert_eq!(csv_value(Some(-3.25)), "-3.25");
        assert_eq!(csv_field("a,b"), "\"a,b\"");
    }
}
