//! Is a run precise enough to read? A parameter whose standard error over the
//! batches exceeds half a JND cannot tell two treatments one JND apart, so
//! the run says so and how many rays would bring it below.
//!
//! Monte Carlo standard errors fall as 1/√N with N rays at a fixed detection
//! radius (independent batches; common practice, no source), so the rays
//! needed are N · (se / target)².

use super::parameters::PairParameters;
use crate::metrics::jnd::JndKind;
use crate::metrics::Parameter;
use crate::trace::TraceResult;

/// The standard error above which a value is flagged: this many JNDs.
pub const SE_LIMIT_JND: f64 = 0.5;

/// One value whose standard error is too large.
#[derive(Clone, Debug, PartialEq)]
pub struct ImpreciseValue {
    /// The parameter.
    pub parameter: Parameter,
    /// Band centre in Hz, `None` for the single-number value.
    pub band_hz: Option<u32>,
    /// The value, its unit.
    pub value: f64,
    /// Its standard error, same unit; `None` when the value is defined on
    /// the pooled echogram but not without some batch, which is noise too.
    pub standard_error: Option<f64>,
    /// Half a JND at this value, same unit.
    pub limit: f64,
}

/// Half a JND of `parameter` at `value`, in its unit (relative JNDs of EDT,
/// T20, T30 taken at the value itself); `None` without a usable JND.
#[must_use]
pub fn se_limit(parameter: Parameter, value: f64) -> Option<f64> {
    let jnd = parameter.jnd()?;
    let one = match jnd.kind {
        JndKind::Relative => jnd.value * value.abs(),
        JndKind::Absolute => jnd.value,
    };
    (one.is_finite() && one > 0.0).then_some(SE_LIMIT_JND * one)
}

/// The values of one pair whose standard error exceeds half a JND: the
/// single-number values when `single_numbers`, else every band.
#[must_use]
pub fn imprecise_values(
    result: &TraceResult,
    pair: &PairParameters,
    single_numbers: bool,
) -> Vec<ImpreciseValue> {
    let centres = result.bands.centres_hz();
    let slots: Vec<(usize, Option<u32>)> = if single_numbers {
        vec![(pair.bands.len(), None)]
    } else {
        (0..pair.bands.len())
            .map(|b| (b, centres.get(b).copied()))
            .collect()
    };
    let mut out = Vec::new();
    for parameter in Parameter::ALL {
        for &(slot, band_hz) in &slots {
            let value = match band_hz {
                Some(_) => pair.bands.get(slot).and_then(|b| parameter.of_band(b)),
                None => parameter.of_averages(&pair.averages),
            };
            let Some(value) = value else {
                continue;
            };
            if pair.standard_errors.is_none() {
                continue;
            }
            let se = pair.standard_error(parameter, slot);
            if let Some(limit) = se_limit(parameter, value) {
                if se.is_none_or(|se| se > limit) {
                    out.push(ImpreciseValue {
                        parameter,
                        band_hz,
                        value,
                        standard_error: se,
                        limit,
                    });
                }
            }
        }
    }
    out
}

/// Rays per source that would bring every standard error in `values` to its
/// limit, from `rays` now: N · max (se / limit)², rounded up to two
/// significant figures and to a multiple of `batches`; `None` when no value
/// has a standard error to scale from.
#[must_use]
pub fn rays_needed(values: &[ImpreciseValue], rays: usize, batches: usize) -> Option<usize> {
    let worst = values
        .iter()
        .filter_map(|v| Some((v.standard_error? / v.limit).powi(2)))
        .reduce(f64::max)?
        .max(1.0);
    let wanted = (rays as f64 * worst).ceil();
    let magnitude = 10f64.powf((wanted.log10().floor() - 1.0).max(0.0));
    let rounded = ((wanted / magnitude).ceil() * magnitude) as usize;
    let batches = batches.max(1);
    Some(rounded.div_ceil(batches) * batches)
}

/// The run's warning for one pair, if any of its values is imprecise.
/// `radius_is_default`: the estimate of rays assumes a fixed radius, which
/// the default rule does not keep, so the warning says so.
#[must_use]
pub fn precision_warning(
    pair_name: &str,
    values: &[ImpreciseValue],
    rays: usize,
    batches: usize,
    radius_is_default: bool,
) -> Option<String> {
    if values.is_empty() {
        return None;
    }
    let listed: Vec<String> = values
        .iter()
        .map(|v| {
            let (scale, unit) = v.parameter.display_unit();
            let decimals = v.parameter.display_decimals() + 1;
            let at = v
                .band_hz
                .map(|hz| format!(" at {hz} Hz"))
                .unwrap_or_default();
            let unit = if unit.is_empty() {
                String::new()
            } else {
                format!(" {unit}")
            };
            match v.standard_error {
                Some(se) => format!(
                    "{}{at} (±{:.decimals$}{unit}, half a JND {:.decimals$}{unit})",
                    v.parameter.short(),
                    se * scale,
                    v.limit * scale
                ),
                None => format!(
                    "{}{at} (undefined without some batch, so no standard error)",
                    v.parameter.short()
                ),
            }
        })
        .collect();
    let them = if values.len() == 1 { "it" } else { "them" };
    let advice = match rays_needed(values, rays, batches) {
        Some(needed) => {
            format!("about {needed} rays per source (now {rays}) would bring {them} below")
        }
        None => format!("trace more rays per source than {rays} to bring {them} below"),
    };
    let radius = if radius_is_default {
        " at a fixed detection radius: the default radius shrinks as rays grow, so give `radius_m` in the room file first"
    } else {
        ""
    };
    Some(format!(
        "{pair_name}: standard error above half a JND for {}; {advice}{radius}",
        listed.join(", ")
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn value(se: f64, limit: f64) -> ImpreciseValue {
        ImpreciseValue {
            parameter: Parameter::C80,
            band_hz: None,
            value: 0.0,
            standard_error: Some(se),
            limit,
        }
    }

    #[test]
    fn rays_needed_scales_with_the_square_of_the_excess() {
        // se ∝ 1/√N (common practice, no source): twice the limit needs 4× the rays.
        assert_eq!(rays_needed(&[value(1.0, 0.5)], 10_000, 20), Some(40_000));
        // The worst value decides; rounded up to two figures and to the batches.
        assert_eq!(
            rays_needed(&[value(0.6, 0.5), value(0.55, 0.5)], 1000, 20),
            Some(1500)
        );
        assert_eq!(rays_needed(&[value(0.51, 0.5)], 333, 7), Some(350));
        let mut unknown = value(0.0, 0.5);
        unknown.standard_error = None;
        assert_eq!(rays_needed(&[unknown.clone()], 333, 7), None);
        let text = precision_warning("R1", &[unknown], 333, 7, false).unwrap();
        assert!(
            text.contains("no standard error") && text.contains("more rays"),
            "{text}"
        );
    }

    #[test]
    fn the_limit_is_half_a_jnd_relative_or_absolute() {
        // ISO 3382-1:2009 Table A.1: EDT 5 % (relative), C80 1 dB (absolute).
        assert!((se_limit(Parameter::Edt, 2.0).unwrap() - 0.05).abs() < 1e-12);
        assert!((se_limit(Parameter::C80, -3.0).unwrap() - 0.5).abs() < 1e-12);
        assert_eq!(se_limit(Parameter::T30, 0.0), None);
    }
}
