//! All coefficients of a set of polar responses: per band and incidence, and
//! random-incidence averages per band.

use super::bound::ZoneSize;
use super::data::{Arrangement, PolarResponse};
use super::diffusion::{diffusion_coefficient, energies_from_levels_db, normalized_diffusion};
use super::scattering::{correlation_scattering, zone_scattering_ratio, Complex};
use super::weights::{hemisphere_area_weights, IncidenceWeighting};
use super::zone::{Direction, ZoneRule};

/// Coefficients of one polar response (one band, one angle of incidence).
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct ResponseCoefficients {
    /// Band centre, Hz.
    pub band_hz: f64,
    /// Angle of incidence from the normal, degrees: every coefficient here is for it.
    pub incidence_deg: f64,
    /// Source azimuth, degrees (hemispherical data).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub incidence_azimuth_deg: Option<f64>,
    /// Receivers, M.
    pub receivers: usize,
    /// Receivers in the specular zone, M_s.
    pub zone_receivers: usize,
    /// Specular-zone scattering ratio s_z (fraction of energy outside the zone).
    pub s_zone: f64,
    /// Correlation scattering coefficient s_c (needs complex pressures of sample and reference).
    pub s_corr: Option<f64>,
    /// Diffusion coefficient d.
    pub d: f64,
    /// Diffusion coefficient of the flat reference.
    pub d_ref: Option<f64>,
    /// Normalized diffusion coefficient d_n.
    pub d_n: Option<f64>,
    /// Bound d_max(s_z) for this zone (undefined when the zone is empty or holds every receiver).
    pub d_max: Option<f64>,
    /// d / d_max.
    pub d_ratio: Option<f64>,
    /// Zone membership per receiver (in file order), for plots.
    #[serde(skip)]
    pub in_zone: Vec<bool>,
    /// Receiver and zone weights.
    #[serde(skip)]
    pub zone_size: ZoneSize,
}

/// Weight of one angle of incidence in a random-incidence average.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct IncidenceWeight {
    /// Angle of incidence, degrees.
    pub incidence_deg: f64,
    /// Source azimuth, degrees (hemispherical data).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub incidence_azimuth_deg: Option<f64>,
    /// Weight (the weights of a band sum to 1).
    pub weight: f64,
}

/// Random-incidence averages of one band.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct RandomIncidence {
    /// Band centre, Hz.
    pub band_hz: f64,
    /// Weights of the angles of incidence averaged.
    pub incidence_weights: Vec<IncidenceWeight>,
    /// Weighted mean of s_z.
    pub s_zone: f64,
    /// Weighted mean of s_c (only when every incidence has one).
    pub s_corr: Option<f64>,
    /// Weighted mean of d.
    pub d: f64,
    /// Weighted mean of d_n (only when every incidence has one).
    pub d_n: Option<f64>,
}

/// Everything computed from a set of responses.
#[derive(Clone, Debug, PartialEq, serde::Serialize)]
pub struct Analysis {
    /// How incidences are weighted in the averages.
    pub weighting: IncidenceWeighting,
    /// Per band and incidence, sorted by band then incidence.
    pub bands: Vec<ResponseCoefficients>,
    /// Per band, averaged over the incidences supplied.
    pub random_incidence: Vec<RandomIncidence>,
    /// Things worth knowing that do not stop the computation.
    pub warnings: Vec<String>,
}

/// A response whose coefficients are undefined.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("band {band_hz} Hz, incidence {incidence_deg}°: {message}")]
pub struct AnalysisError {
    /// Band centre, Hz.
    pub band_hz: f64,
    /// Angle of incidence, degrees.
    pub incidence_deg: f64,
    /// What is wrong.
    pub message: String,
}

/// Receiver area weights N_i: all 1 in a plane (ISO 17497-2 single-plane
/// formula, which assumes evenly spaced receivers); solid-angle weights on a
/// hemisphere (see [`super::weights`]).
#[must_use]
pub fn receiver_weights(arrangement: Arrangement, response: &PolarResponse) -> Vec<f64> {
    match arrangement {
        Arrangement::Plane => vec![1.0; response.receiver_deg.len()],
        Arrangement::Hemisphere => hemisphere_area_weights(&response.receiver_deg),
    }
}

/// Receiver directions of a response.
#[must_use]
pub fn receiver_directions(response: &PolarResponse) -> Vec<Direction> {
    response
        .receiver_deg
        .iter()
        .enumerate()
        .map(|(i, &t)| Direction {
            polar_deg: t,
            azimuth_deg: response
                .receiver_azimuth_deg
                .as_ref()
                .and_then(|a| a.get(i).copied())
                .unwrap_or(0.0),
        })
        .collect()
}

fn complex_pair(re: &Option<Vec<f64>>, im: &Option<Vec<f64>>) -> Option<Vec<Complex>> {
    match (re, im) {
        (Some(re), Some(im)) => Some(re.iter().copied().zip(im.iter().copied()).collect()),
        _ => None,
    }
}

/// Coefficients of one response (already checked by the loader).
pub fn analyze_response(
    arrangement: Arrangement,
    zone: &ZoneRule,
    r: &PolarResponse,
) -> Result<ResponseCoefficients, AnalysisError> {
    let err = |message: &str| AnalysisError {
        band_hz: r.band_hz,
        incidence_deg: r.incidence_deg,
        message: message.into(),
    };
    let weight = receiver_weights(arrangement, r);
    let incidence = Direction {
        polar_deg: r.incidence_deg,
        azimuth_deg: r.incidence_azimuth_deg.unwrap_or(0.0),
    };
    let in_zone = zone.membership(incidence, &receiver_directions(r));
    let zone_size = ZoneSize::from_membership(&in_zone, &weight);
    let energy = energies_from_levels_db(&r.level_db);
    let d = diffusion_coefficient(&energy, &weight).ok_or_else(|| {
        err("the diffusion coefficient is undefined (no energy, or fewer than 2 receivers)")
    })?;
    let s_zone = zone_scattering_ratio(&energy, &weight, &in_zone)
        .ok_or_else(|| err("the response carries no energy"))?;
    let d_ref = r
        .reference_level_db
        .as_ref()
        .and_then(|l| diffusion_coefficient(&energies_from_levels_db(l), &weight));
    let d_n = d_ref.and_then(|dr| normalized_diffusion(d, dr));
    let s_corr = match (
        complex_pair(&r.pressure_re, &r.pressure_im),
        complex_pair(&r.reference_re, &r.reference_im),
    ) {
        (Some(p1), Some(p0)) => correlation_scattering(&p1, &p0, &weight),
        _ => None,
    };
    let d_max = zone_size.d_max(s_zone).ok();
    let d_ratio = d_max.filter(|&m| m > 0.0).map(|m| d / m);
    Ok(ResponseCoefficients {
        band_hz: r.band_hz,
        incidence_deg: r.incidence_deg,
        incidence_azimuth_deg: r.incidence_azimuth_deg,
        receivers: in_zone.len(),
        zone_receivers: zone_size.zone_receivers,
        s_zone,
        s_corr,
        d,
        d_ref,
        d_n,
        d_max,
        d_ratio,
        in_zone,
        zone_size,
    })
}

/// Coefficients of every response and the random-incidence averages per band.
pub fn analyze(
    arrangement: Arrangement,
    zone: &ZoneRule,
    responses: &[PolarResponse],
    weighting: IncidenceWeighting,
) -> Result<Analysis, AnalysisError> {
    let mut bands = responses
        .iter()
        .map(|r| analyze_response(arrangement, zone, r))
        .collect::<Result<Vec<_>, _>>()?;
    bands.sort_by(|a, b| {
        a.band_hz
            .total_cmp(&b.band_hz)
            .then(a.incidence_deg.total_cmp(&b.incidence_deg))
            .then(
                a.incidence_azimuth_deg
                    .unwrap_or(0.0)
                    .total_cmp(&b.incidence_azimuth_deg.unwrap_or(0.0)),
            )
    });
    let mut warnings = Vec::new();
    for c in &bands {
        if c.d_max.is_none() {
            let why = zone_why(&c.zone_size);
            warnings.push(format!(
                "band {} Hz, incidence {}°: no bound ({why})",
                c.band_hz, c.incidence_deg
            ));
        }
    }
    if arrangement == Arrangement::Plane {
        for r in responses {
            if unevenly_spaced(&r.receiver_deg) {
                warnings.push(format!(
                    "band {} Hz, incidence {}°: receivers are unevenly spaced, but single-plane d counts every receiver equally (ISO 17497-2); d is biased towards densely sampled directions",
                    r.band_hz, r.incidence_deg
                ));
            }
        }
    }
    let mut band_list: Vec<f64> = bands.iter().map(|c| c.band_hz).collect();
    band_list.dedup();
    let incidence_set = |band: f64| -> Vec<(f64, Option<f64>)> {
        bands
            .iter()
            .filter(|c| c.band_hz == band)
            .map(|c| (c.incidence_deg, c.incidence_azimuth_deg))
            .collect()
    };
    if let Some(&first) = band_list.first() {
        let reference = incidence_set(first);
        for &b in &band_list[1..] {
            if incidence_set(b) != reference {
                warnings.push(format!(
                    "band {b} Hz has other angles of incidence than band {first} Hz; their random-incidence averages cover different angles"
                ));
            }
        }
    }
    // A random-incidence average needs responses at more than one incidence:
    // with one, the "average" would be that one response renamed.
    let single_incidence = band_list.iter().all(|&band| {
        let mut angles: Vec<(f64, Option<f64>)> = bands
            .iter()
            .filter(|c| c.band_hz == band)
            .map(|c| (c.incidence_deg, c.incidence_azimuth_deg))
            .collect();
        angles.dedup();
        angles.len() <= 1
    });
    if single_incidence {
        if let Some(c) = bands.first() {
            warnings.push(format!(
                "the data hold one angle of incidence only ({}°), so no random-incidence value can be formed; give responses at several incidences (e.g. 0°, 30°, 60°) for one",
                c.incidence_deg
            ));
        }
    }
    let random_incidence = band_list
        .iter()
        .filter(|_| !single_incidence)
        .map(|&band| {
            let items: Vec<&ResponseCoefficients> =
                bands.iter().filter(|c| c.band_hz == band).collect();
            let polar: Vec<f64> = items.iter().map(|c| c.incidence_deg).collect();
            let w = weighting.weights(&polar);
            let mean = |f: &dyn Fn(&ResponseCoefficients) -> Option<f64>| -> Option<f64> {
                items
                    .iter()
                    .zip(&w)
                    .map(|(c, wi)| f(c).map(|v| v * wi))
                    .sum::<Option<f64>>()
            };
            RandomIncidence {
                band_hz: band,
                incidence_weights: items
                    .iter()
                    .zip(&w)
                    .map(|(c, &weight)| IncidenceWeight {
                        incidence_deg: c.incidence_deg,
                        incidence_azimuth_deg: c.incidence_azimuth_deg,
                        weight,
                    })
                    .collect(),
                s_zone: mean(&|c| Some(c.s_zone)).unwrap_or(f64::NAN),
                s_corr: mean(&|c| c.s_corr),
                d: mean(&|c| Some(c.d)).unwrap_or(f64::NAN),
                d_n: mean(&|c| c.d_n),
            }
        })
        .collect();
    Ok(Analysis {
        weighting,
        bands,
        random_incidence,
        warnings,
    })
}

/// Whether sorted receiver angles have steps differing by more than 1 %.
fn unevenly_spaced(angle_deg: &[f64]) -> bool {
    let mut a = angle_deg.to_vec();
    a.sort_by(f64::total_cmp);
    let steps: Vec<f64> = a.windows(2).map(|w| w[1] - w[0]).collect();
    let (lo, hi) = steps.iter().fold((f64::INFINITY, 0.0f64), |(lo, hi), &s| {
        (lo.min(s), hi.max(s))
    });
    steps.len() > 1 && hi - lo > 0.01 * hi
}

fn zone_why(size: &ZoneSize) -> String {
    match size.check() {
        Err(e) => e.to_string(),
        Ok(()) => "the bound is zero here, so d/d_max is undefined".into(),
    }
}
