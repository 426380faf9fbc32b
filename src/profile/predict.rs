//! From a checked [`ProfileSpec`] to a [`PolarFile`]: receivers, bands,
//! frequencies, the Kirchhoff sums for the profile and its flat reference,
//! levels, and the warnings that apply.

use glam::DVec3;
use num_complex::Complex64;
use rayon::prelude::*;

use super::green::green_2d;
use super::kirchhoff::{scattered_2d, scattered_3d};
use super::spec::{ArrangementSpec, BandFraction, Evaluation, ProfileShape, ProfileSpec};
use super::surface::{footprint_m, grid_depths_m, well_depths_m, Surface1d, Surface2d};
use super::warnings::{
    ProfileWarning, CLOSE_WAVELENGTHS, DEEP_WELL_RATIO, GRAZING_INCIDENCE_DEG,
    GRAZING_RECEIVER_DEG, MIN_WAVELENGTHS, NARROW_WELL_M,
};
use crate::polar::{Arrangement, GoniometerGeometry, PolarFile, PolarResponse};

/// Energy floor for levels, so an exact null gives −200 dB rather than −∞.
const ENERGY_FLOOR: f64 = 1e-20;

/// A prediction: the polar data and every warning that applies.
#[derive(Clone, Debug)]
pub struct Prediction {
    /// The polar data file (plane or hemisphere).
    pub polar: PolarFile,
    /// Conditions under which the result is doubtful.
    pub warnings: Vec<ProfileWarning>,
    /// Surface elements used in each band (profile), for the summary.
    pub elements_per_band: Vec<usize>,
}

/// Exact mid-band frequency of a nominal octave or third-octave centre, Hz:
/// 1000 · 10^(k/10), k = 10 lg(f/1000) rounded (IEC 61260-1 base-ten series).
#[must_use]
pub fn exact_centre_hz(nominal_hz: f64) -> f64 {
    let k = (10.0 * (nominal_hz / 1000.0).log10()).round();
    1000.0 * 10f64.powf(k / 10.0)
}

/// The frequencies a band is evaluated at, Hz. Centre mode: the exact centre.
/// Average mode: the midpoints of `n` equal sub-bands between the band edges
/// f_c 2^{∓b/2} (b = 1 or 1/3 octave). Equal linear sub-bands make the energy
/// mean a midpoint rule for the band integral of |p(f)|² df, which is what a
/// band-filtered measured impulse response (flat excitation spectrum) gives.
#[must_use]
pub fn band_frequencies_hz(
    nominal_hz: f64,
    fraction: BandFraction,
    evaluation: Evaluation,
    n: u32,
) -> Vec<f64> {
    let fc = exact_centre_hz(nominal_hz);
    match evaluation {
        Evaluation::Centre => vec![fc],
        Evaluation::Average => {
            let half = 2f64.powf(0.5 * fraction.octaves());
            let (lo, hi) = (fc / half, fc * half);
            (0..n)
                .map(|i| lo + (hi - lo) * (f64::from(i) + 0.5) / f64::from(n))
                .collect()
        }
    }
}

/// Receiver angles of the plane arc, degrees: start, start + step, ... ≤ end.
#[must_use]
pub fn arc_deg(start_deg: f64, end_deg: f64, step_deg: f64) -> Vec<f64> {
    let n = ((end_deg - start_deg) / step_deg + 1e-9).floor() as usize + 1;
    (0..n).map(|i| start_deg + step_deg * i as f64).collect()
}

/// Hemisphere grid (θ, φ), degrees: the pole once, then rings θ = step..=90
/// with φ = 0, Δφ, ... < 360.
#[must_use]
pub fn hemisphere_deg(polar_step_deg: f64, azimuth_step_deg: f64) -> Vec<(f64, f64)> {
    let rings = (90.0 / polar_step_deg).round() as usize;
    let per_ring = (360.0 / azimuth_step_deg).round() as usize;
    let mut out = vec![(0.0, 0.0)];
    for r in 1..=rings {
        for a in 0..per_ring {
            out.push((polar_step_deg * r as f64, azimuth_step_deg * a as f64));
        }
    }
    out
}

/// Position in the x–z plane of a point at `angle_deg` from the normal
/// (signed, positive towards +x) and `distance_m` from the sample centre.
#[must_use]
pub fn plane_position_m(angle_deg: f64, distance_m: f64) -> [f64; 2] {
    let a = angle_deg.to_radians();
    [distance_m * a.sin(), distance_m * a.cos()]
}

/// Position of a point at polar angle θ, azimuth φ (degrees), distance r.
#[must_use]
pub fn sphere_position_m(theta_deg: f64, phi_deg: f64, distance_m: f64) -> DVec3 {
    let (t, p) = (theta_deg.to_radians(), phi_deg.to_radians());
    distance_m * DVec3::new(t.sin() * p.cos(), t.sin() * p.sin(), t.cos())
}

/// The two surfaces of one band: the profile and its flat reference.
enum Surfaces {
    Line(Surface1d, Surface1d),
    Area(Surface2d, Surface2d),
}

impl Surfaces {
    fn elements(&self) -> usize {
        match self {
            Self::Line(s, _) => s.panels.len(),
            Self::Area(s, _) => s.patches.len(),
        }
    }
}

/// Rounds every value of a polar file to `significant` significant digits
/// (levels to 0.001 dB), to keep written files moderate in size.
#[must_use]
pub fn rounded(polar: &PolarFile, significant: i32) -> PolarFile {
    let sig = |v: f64| {
        if v == 0.0 || !v.is_finite() {
            return v;
        }
        let scale = 10f64.powi(significant - 1 - v.abs().log10().floor() as i32);
        (v * scale).round() / scale
    };
    let db = |v: &Vec<f64>| {
        v.iter()
            .map(|x| (x * 1000.0).round() / 1000.0)
            .collect::<Vec<_>>()
    };
    let all = |v: &Option<Vec<f64>>| v.as_ref().map(|v| v.iter().map(|&x| sig(x)).collect());
    let mut out = polar.clone();
    out.geometry.sample_width_m = (out.geometry.sample_width_m * 1e9).round() / 1e9;
    out.geometry.sample_depth_m = out.geometry.sample_depth_m.map(|d| (d * 1e9).round() / 1e9);
    for r in &mut out.responses {
        r.level_db = db(&r.level_db);
        r.reference_level_db = r.reference_level_db.as_ref().map(db);
        r.pressure_re = all(&r.pressure_re);
        r.pressure_im = all(&r.pressure_im);
        r.reference_re = all(&r.reference_re);
        r.reference_im = all(&r.reference_im);
    }
    out
}

/// A specification given to [`predict`] that fails its own checks (specs
/// from [`super::load_spec`] never do).
#[derive(Debug, thiserror::Error, PartialEq)]
#[error("the profile specification is invalid: {}", .problems.join("; "))]
pub struct PredictError {
    /// Every problem, each naming its field.
    pub problems: Vec<String>,
}

/// Predicts the polar responses a specification asks for, after checking it
/// with [`ProfileSpec::problems`].
pub fn predict(spec: &ProfileSpec) -> Result<Prediction, PredictError> {
    let problems = spec.problems();
    if !problems.is_empty() {
        return Err(PredictError { problems });
    }
    let gon = &spec.goniometer;
    let c = gon.sound_speed_m_s;
    let grid = spec.profile.is_grid();
    let arrangement = gon.arrangement_for(grid);
    let (width_m, depth_m) = footprint_m(&spec.profile);

    // Receivers (angles) of the arrangement.
    let (receiver_deg, receiver_az): (Vec<f64>, Option<Vec<f64>>) = match arrangement {
        ArrangementSpec::Plane => (
            arc_deg(
                gon.receiver_start_deg,
                gon.receiver_end_deg,
                gon.receiver_step_deg,
            ),
            None,
        ),
        ArrangementSpec::Hemisphere => {
            let g = hemisphere_deg(gon.receiver_step_deg, gon.azimuth_step_deg);
            (
                g.iter().map(|p| p.0).collect(),
                Some(g.iter().map(|p| p.1).collect()),
            )
        }
    };

    // One job per band: discretize for its highest frequency, then every incidence.
    let bands: Vec<(usize, f64)> = spec.bands.centres_hz.iter().copied().enumerate().collect();
    let per_band: Vec<(Vec<PolarResponse>, usize)> = bands
        .par_iter()
        .map(|&(bi, band_hz)| {
            let evaluation = spec.bands.evaluation_of(bi);
            let freqs = band_frequencies_hz(
                band_hz,
                spec.bands.fraction,
                evaluation,
                spec.bands.frequencies_per_band,
            );
            let fc = exact_centre_hz(band_hz);
            let f_max = freqs.iter().copied().fold(fc, f64::max);
            let step_m = c / f_max / spec.integration.points_per_wavelength;
            let min_per_well = spec.integration.min_points_per_well;
            let surfaces = if grid {
                Surfaces::Area(
                    Surface2d::from_shape(&spec.profile, c, step_m, min_per_well)
                        .expect("grid shape"),
                    Surface2d::flat(width_m, depth_m.unwrap_or(width_m), step_m),
                )
            } else {
                Surfaces::Line(
                    Surface1d::from_shape(&spec.profile, c, step_m, min_per_well)
                        .expect("extruded shape"),
                    Surface1d::flat(width_m, step_m),
                )
            };
            let responses = gon
                .incidence_deg
                .iter()
                .map(|&inc| {
                    let eval = |f_hz: f64| {
                        evaluate(
                            &surfaces,
                            spec,
                            arrangement,
                            inc,
                            &receiver_deg,
                            receiver_az.as_deref(),
                            f_hz,
                        )
                    };
                    // Energy means over the band's frequencies, normalized per frequency.
                    let n = receiver_deg.len();
                    let (mut e1, mut e0) = (vec![0.0; n], vec![0.0; n]);
                    for &f in &freqs {
                        let (p1, p0) = eval(f);
                        for i in 0..n {
                            e1[i] += p1[i].norm_sqr() / freqs.len() as f64;
                            e0[i] += p0[i].norm_sqr() / freqs.len() as f64;
                        }
                    }
                    let (p1, p0) = eval(fc);
                    let db = |e: &[f64]| {
                        e.iter()
                            .map(|&v| 10.0 * v.max(ENERGY_FLOOR).log10())
                            .collect()
                    };
                    PolarResponse {
                        band_hz,
                        incidence_deg: inc,
                        incidence_azimuth_deg: receiver_az
                            .as_ref()
                            .map(|_| gon.incidence_azimuth_deg),
                        receiver_deg: receiver_deg.clone(),
                        receiver_azimuth_deg: receiver_az.clone(),
                        level_db: db(&e1),
                        pressure_re: Some(p1.iter().map(|p| p.re).collect()),
                        pressure_im: Some(p1.iter().map(|p| p.im).collect()),
                        reference_level_db: Some(db(&e0)),
                        reference_re: Some(p0.iter().map(|p| p.re).collect()),
                        reference_im: Some(p0.iter().map(|p| p.im).collect()),
                    }
                })
                .collect();
            (responses, surfaces.elements())
        })
        .collect();

    let mut responses = Vec::new();
    let mut elements_per_band = Vec::new();
    for (r, e) in per_band {
        responses.extend(r);
        elements_per_band.push(e);
    }
    let method = if grid {
        "3D Kirchhoff over the aperture plane, point source"
    } else {
        "2D Kirchhoff, line source"
    };
    let polar = PolarFile {
        name: spec.name.clone(),
        origin: format!(
            "predicted by polaray profile: {method}, near field kept; levels re the image source of an infinite rigid plane, energy-averaged over each band's frequencies (\"average\" bands) or at the band centre; pressure_re/im and reference_re/im at the exact band centre; reference = flat rigid sample of the same footprint"
        ),
        geometry: GoniometerGeometry {
            arrangement: match arrangement {
                ArrangementSpec::Plane => Arrangement::Plane,
                ArrangementSpec::Hemisphere => Arrangement::Hemisphere,
            },
            sample_width_m: width_m,
            sample_depth_m: depth_m,
            source_distance_m: gon.source_distance_m,
            receiver_distance_m: gon.receiver_distance_m,
            zone_half_width_deg: None,
        },
        responses,
    };
    Ok(Prediction {
        warnings: find_warnings(spec, &receiver_deg),
        polar,
        elements_per_band,
    })
}

/// Complex pressures (profile, reference) at every receiver for one
/// frequency, normalized by |G| of the image source of an infinite rigid
/// plane (path r_s + r_r), so a large flat sample reads about 0 dB in the
/// mirror direction.
fn evaluate(
    surfaces: &Surfaces,
    spec: &ProfileSpec,
    arrangement: ArrangementSpec,
    incidence_deg: f64,
    receiver_deg: &[f64],
    receiver_az: Option<&[f64]>,
    f_hz: f64,
) -> (Vec<Complex64>, Vec<Complex64>) {
    let gon = &spec.goniometer;
    let k = 2.0 * std::f64::consts::PI * f_hz / gon.sound_speed_m_s;
    let path = gon.source_distance_m + gon.receiver_distance_m;
    let (p1, p0, norm) = match surfaces {
        Surfaces::Line(s, flat) => {
            let src = plane_position_m(incidence_deg, gon.source_distance_m);
            let rec: Vec<[f64; 2]> = receiver_deg
                .iter()
                .map(|&a| plane_position_m(a, gon.receiver_distance_m))
                .collect();
            (
                scattered_2d(s, src, &rec, k),
                scattered_2d(flat, src, &rec, k),
                green_2d(k, path).0.norm(),
            )
        }
        Surfaces::Area(s, flat) => {
            let (src, rec): (DVec3, Vec<DVec3>) = match arrangement {
                ArrangementSpec::Plane => (
                    sphere_position_m(incidence_deg, 0.0, gon.source_distance_m),
                    receiver_deg
                        .iter()
                        .map(|&a| sphere_position_m(a, 0.0, gon.receiver_distance_m))
                        .collect(),
                ),
                ArrangementSpec::Hemisphere => (
                    sphere_position_m(
                        incidence_deg,
                        gon.incidence_azimuth_deg,
                        gon.source_distance_m,
                    ),
                    receiver_deg
                        .iter()
                        .zip(receiver_az.unwrap_or(&[]))
                        .map(|(&t, &p)| sphere_position_m(t, p, gon.receiver_distance_m))
                        .collect(),
                ),
            };
            (
                scattered_3d(s, src, &rec, k),
                scattered_3d(flat, src, &rec, k),
                1.0 / (4.0 * std::f64::consts::PI * path),
            )
        }
    };
    let scale = |v: Vec<Complex64>| v.into_iter().map(|p| p / norm).collect();
    (scale(p1), scale(p0))
}

/// Every warning that applies to the request.
fn find_warnings(spec: &ProfileSpec, receiver_deg: &[f64]) -> Vec<ProfileWarning> {
    let gon = &spec.goniometer;
    let c = gon.sound_speed_m_s;
    let (w, d) = footprint_m(&spec.profile);
    let smallest = d.map_or(w, |d| d.min(w));
    let largest = d.map_or(w, |d| d.max(w));
    let mut out = Vec::new();

    // Distances against sample size and wavelength at the lowest band.
    let lowest_hz = spec
        .bands
        .centres_hz
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    let r_min = gon.source_distance_m.min(gon.receiver_distance_m);
    if r_min < largest || r_min < CLOSE_WAVELENGTHS * c / exact_centre_hz(lowest_hz) {
        out.push(ProfileWarning::CloseGoniometer {
            distance_m: r_min,
            sample_size_m: largest,
        });
    }
    for &band_hz in &spec.bands.centres_hz {
        let wavelengths = smallest * exact_centre_hz(band_hz) / c;
        if wavelengths < MIN_WAVELENGTHS {
            out.push(ProfileWarning::SmallSample {
                band_hz,
                wavelengths,
            });
        }
    }
    for &inc in &gon.incidence_deg {
        if inc.abs() > GRAZING_INCIDENCE_DEG {
            out.push(ProfileWarning::GrazingIncidence { incidence_deg: inc });
        }
    }
    let grazing = receiver_deg
        .iter()
        .filter(|a| a.abs() > GRAZING_RECEIVER_DEG)
        .count();
    if grazing > 0 {
        out.push(ProfileWarning::GrazingReceivers { count: grazing });
    }

    // Shadowing: surface elements whose normal faces away from the source.
    if !spec.profile.is_grid() {
        let step = c / exact_centre_hz(lowest_hz) / spec.integration.points_per_wavelength;
        if let Some(s) = Surface1d::from_shape(&spec.profile, c, step, 1) {
            let total: f64 = s.panels.iter().map(|p| p.length_m).sum();
            for &inc in &gon.incidence_deg {
                let src = plane_position_m(inc, gon.source_distance_m);
                let away: f64 = s
                    .panels
                    .iter()
                    .filter(|p| {
                        (src[0] - p.mid_m[0]) * p.normal[0] + (src[1] - p.mid_m[1]) * p.normal[1]
                            <= 0.0
                    })
                    .map(|p| p.length_m)
                    .sum();
                if away > 0.0 {
                    out.push(ProfileWarning::SelfShadowing {
                        incidence_deg: inc,
                        fraction: away / total,
                    });
                }
            }
        }
    }

    // Wells: cross modes, depth and width.
    let well = match &spec.profile {
        ProfileShape::QuadraticResidue { well_width_m, .. }
        | ProfileShape::PrimitiveRoot { well_width_m, .. }
        | ProfileShape::WellDepths { well_width_m, .. }
        | ProfileShape::WellGrid { well_width_m, .. }
        | ProfileShape::QuadraticResidueGrid { well_width_m, .. } => Some(*well_width_m),
        _ => None,
    };
    if let Some(ww) = well {
        let max_depth = well_depths_m(&spec.profile, c)
            .or_else(|| grid_depths_m(&spec.profile, c).map(|g| g.concat()))
            .unwrap_or_default()
            .into_iter()
            .fold(0.0, f64::max);
        let limit_hz = c / (2.0 * ww);
        for (bi, &band_hz) in spec.bands.centres_hz.iter().enumerate() {
            let freqs = band_frequencies_hz(
                band_hz,
                spec.bands.fraction,
                spec.bands.evaluation_of(bi),
                spec.bands.frequencies_per_band,
            );
            if freqs.iter().any(|&f| f > limit_hz) {
                out.push(ProfileWarning::WellCrossModes { band_hz, limit_hz });
            }
        }
        if max_depth / ww > DEEP_WELL_RATIO || ww < NARROW_WELL_M {
            out.push(ProfileWarning::DeepNarrowWells {
                depth_to_width: max_depth / ww,
                well_width_m: ww,
            });
        }
    }
    out
}
