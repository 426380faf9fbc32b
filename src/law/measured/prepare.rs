//! From a polar file to per-band direction tables: band mapping, checks,
//! specular-zone removal and table building.

use std::f64::consts::PI;
use std::path::{Path, PathBuf};

use glam::DVec3;

use super::table::{ArcTable, SphereTable};
use super::{MeasuredLawError, MeasuredLawWarning, PolarUse};
use crate::bands::exact_octave_centre_hz;
use crate::polar::{Arrangement, GoniometerGeometry, PolarFile, PolarResponse};

/// File bands within this many octaves of a wanted centre match it (half the
/// spacing of third-octave bands would be 1/6; 1/12 leaves room for rounding).
const BAND_TOLERANCE_OCT: f64 = 1.0 / 12.0;

/// Incidence or receiver angles closer than this (degrees) are the same.
const SAME_DEG: f64 = 1e-6;

/// A direction table of one band and incidence.
#[derive(Clone, Debug)]
pub(super) enum Table {
    /// Density per steradian over the hemisphere.
    Sphere(SphereTable),
    /// Density per radian of the in-plane angle (extruded profile).
    Arc(ArcTable),
}

/// One measured source azimuth at an incidence angle.
#[derive(Clone, Debug)]
pub(super) struct Variant {
    /// Source azimuth, radians.
    pub azimuth_rad: f64,
    /// Whether the pattern turns with the arrival azimuth (hemisphere data, oblique incidence).
    pub rotate: bool,
    /// The scattered pattern.
    pub table: Table,
}

/// All data of one band at one incidence angle.
#[derive(Clone, Debug)]
pub(super) struct Entry {
    /// Incidence: polar angle (sphere) or signed in-plane angle (arc), radians.
    pub incidence_rad: f64,
    /// Measured source azimuths (one for plane data).
    pub variants: Vec<Variant>,
}

/// The scattered pattern of one band: entries sorted by incidence.
#[derive(Clone, Debug)]
pub(super) struct BandPattern {
    /// Entries, increasing incidence.
    pub entries: Vec<Entry>,
}

/// A checked response of one room band (third-octaves already combined).
struct Prepared {
    band_hz: f64,
    incidence_deg: f64,
    azimuth_deg: f64,
    /// Receiver (θ, φ) in degrees; φ = 0 for plane data.
    receivers_deg: Vec<[f64; 2]>,
    /// Linear energy per receiver (10^(L/10)).
    energy: Vec<f64>,
}

/// Reads a polar file (TOML) without the full validation of the polar module.
pub fn load_polar_file(path: &Path) -> Result<PolarFile, MeasuredLawError> {
    let text = std::fs::read_to_string(path).map_err(|cause| MeasuredLawError::Read {
        file: path.to_path_buf(),
        cause,
    })?;
    toml::from_str(&text).map_err(|e| MeasuredLawError::Parse {
        file: path.to_path_buf(),
        message: e.to_string(),
    })
}

fn octaves_apart(a: f64, b: f64) -> f64 {
    (a / b).log2().abs()
}

/// Distinct band centres of the file, increasing.
fn file_bands(polar: &PolarFile) -> Vec<f64> {
    let mut bands: Vec<f64> = polar
        .responses
        .iter()
        .map(|r| r.band_hz)
        .filter(|f| f.is_finite() && *f > 0.0)
        .collect();
    bands.sort_by(f64::total_cmp);
    bands.dedup_by(|a, b| octaves_apart(*a, *b) < BAND_TOLERANCE_OCT);
    bands
}

/// True when two of the file's bands lie closer than half an octave: third-octave data.
fn is_third_octave(bands: &[f64]) -> bool {
    bands.windows(2).any(|p| octaves_apart(p[0], p[1]) < 0.5)
}

fn bad(file: &Path, r: &PolarResponse, problem: impl Into<String>) -> MeasuredLawError {
    MeasuredLawError::BadResponse {
        file: file.to_path_buf(),
        band_hz: r.band_hz,
        incidence_deg: r.incidence_deg,
        problem: problem.into(),
    }
}

/// Checks one response and converts its levels to energies.
fn check_response(
    file: &Path,
    arrangement: Arrangement,
    r: &PolarResponse,
) -> Result<Prepared, MeasuredLawError> {
    if r.receiver_deg.is_empty() || r.level_db.is_empty() {
        return Err(bad(
            file,
            r,
            "empty response: give receiver_deg and level_db",
        ));
    }
    if r.receiver_deg.len() != r.level_db.len() {
        return Err(bad(
            file,
            r,
            format!(
                "{} receivers but {} levels; give one level per receiver",
                r.receiver_deg.len(),
                r.level_db.len()
            ),
        ));
    }
    if !(r.incidence_deg.is_finite() && r.incidence_deg.abs() < 90.0) {
        return Err(bad(
            file,
            r,
            "incidence must lie strictly between −90° and 90°",
        ));
    }
    let azimuths: Vec<f64> = match (arrangement, &r.receiver_azimuth_deg) {
        (Arrangement::Plane, None) => vec![0.0; r.receiver_deg.len()],
        (Arrangement::Plane, Some(_)) => return Err(bad(
            file,
            r,
            "plane data carry receiver_azimuth_deg; remove it or set arrangement = \"hemisphere\"",
        )),
        (Arrangement::Hemisphere, None) => {
            return Err(bad(file, r, "hemispherical data need receiver_azimuth_deg"))
        }
        (Arrangement::Hemisphere, Some(a)) if a.len() != r.receiver_deg.len() => {
            return Err(bad(
                file,
                r,
                format!(
                    "{} receivers but {} azimuths; give one azimuth per receiver",
                    r.receiver_deg.len(),
                    a.len()
                ),
            ))
        }
        (Arrangement::Hemisphere, Some(a)) => a.clone(),
    };
    let mut receivers_deg = Vec::with_capacity(r.receiver_deg.len());
    let mut energy = Vec::with_capacity(r.level_db.len());
    for (i, ((&theta, &phi), &level)) in r
        .receiver_deg
        .iter()
        .zip(&azimuths)
        .zip(&r.level_db)
        .enumerate()
    {
        if !(theta.is_finite() && theta.abs() <= 90.0 + SAME_DEG && phi.is_finite()) {
            return Err(bad(
                file,
                r,
                format!("receiver {i} at {theta}° (azimuth {phi}°) lies outside −90°..90°"),
            ));
        }
        let e = 10f64.powf(level / 10.0);
        if level.is_nan() || !e.is_finite() {
            return Err(bad(
                file,
                r,
                format!("level {level} dB at receiver {i} is not a usable number"),
            ));
        }
        receivers_deg.push([theta.clamp(-90.0, 90.0), phi]);
        energy.push(e);
    }
    if energy.iter().all(|&e| e == 0.0) {
        return Err(bad(
            file,
            r,
            "all levels are zero energy (−inf dB); the response has no pattern to sample",
        ));
    }
    Ok(Prepared {
        band_hz: r.band_hz,
        incidence_deg: r.incidence_deg,
        azimuth_deg: r.incidence_azimuth_deg.unwrap_or(0.0),
        receivers_deg,
        energy,
    })
}

/// Responses of the file band nearest `centre_hz`, checked; `None` if absent.
fn responses_at(
    file: &Path,
    polar: &PolarFile,
    centre_hz: f64,
) -> Result<Option<Vec<Prepared>>, MeasuredLawError> {
    let picked: Vec<&PolarResponse> = polar
        .responses
        .iter()
        .filter(|r| octaves_apart(r.band_hz, centre_hz) < BAND_TOLERANCE_OCT)
        .collect();
    if picked.is_empty() {
        return Ok(None);
    }
    picked
        .into_iter()
        .map(|r| check_response(file, polar.geometry.arrangement, r))
        .collect::<Result<Vec<_>, _>>()
        .map(Some)
}

/// The responses for room band `band_hz` (nominal octave centre): the octave
/// band itself, or the mean energy of the three third-octave bands in it.
fn responses_for_band(
    file: &Path,
    polar: &PolarFile,
    band_hz: u32,
) -> Result<Vec<Prepared>, MeasuredLawError> {
    let bands = file_bands(polar);
    let centre = exact_octave_centre_hz(band_hz);
    let missing = |detail: String| MeasuredLawError::MissingBand {
        file: file.to_path_buf(),
        band_hz,
        detail,
        available: bands
            .iter()
            .map(|f| format!("{f}"))
            .collect::<Vec<_>>()
            .join(", "),
    };
    if !is_third_octave(&bands) {
        return responses_at(file, polar, centre)?.ok_or_else(|| missing(String::new()));
    }
    let mut thirds = Vec::with_capacity(3);
    for k in [-1.0, 0.0, 1.0] {
        let f = centre * 10f64.powf(k / 10.0);
        let got = responses_at(file, polar, f)?
            .ok_or_else(|| missing(format!(" (third-octave band {f:.0} Hz is missing)")))?;
        thirds.push(got);
    }
    let mut combined = thirds.remove(1);
    for resp in &mut combined {
        for other in &thirds {
            let twin = other
                .iter()
                .find(|o| {
                    (o.incidence_deg - resp.incidence_deg).abs() < SAME_DEG
                        && (o.azimuth_deg - resp.azimuth_deg).abs() < SAME_DEG
                })
                .filter(|o| {
                    o.receivers_deg.len() == resp.receivers_deg.len()
                        && o.receivers_deg
                            .iter()
                            .zip(&resp.receivers_deg)
                            .all(|(a, b)| {
                                (a[0] - b[0]).abs() < SAME_DEG && (a[1] - b[1]).abs() < SAME_DEG
                            })
                });
            let Some(twin) = twin else {
                return Err(MeasuredLawError::BadResponse {
                    file: file.to_path_buf(),
                    band_hz: resp.band_hz,
                    incidence_deg: resp.incidence_deg,
                    problem: format!(
                        "band {:.0} Hz has no response with the same incidence and receivers; \
                         the third-octave bands of an octave are averaged receiver by receiver",
                        other.first().map_or(0.0, |o| o.band_hz)
                    ),
                });
            };
            for (e, o) in resp.energy.iter_mut().zip(&twin.energy) {
                *e += o;
            }
        }
        for e in &mut resp.energy {
            *e /= 3.0;
        }
    }
    Ok(combined)
}

fn plane_direction(theta_deg: f64) -> DVec3 {
    let t = theta_deg.to_radians();
    DVec3::new(t.sin(), 0.0, t.cos())
}

fn sphere_direction(theta_deg: f64, phi_deg: f64) -> DVec3 {
    let (t, p) = (theta_deg.to_radians(), phi_deg.to_radians());
    DVec3::new(t.sin() * p.cos(), t.sin() * p.sin(), t.cos())
}

/// Receivers in the specular zone: those the image source reaches through the
/// sample (reference.md §2), or those within `zone_half_width_deg` of the
/// mirror direction when the file gives it; the receiver nearest the mirror
/// direction always belongs (it records the specular peak even when the
/// geometric zone falls between receivers).
fn specular_zone(geometry: &GoniometerGeometry, p: &Prepared, hemisphere: bool) -> Vec<bool> {
    let dir = |r: &[f64; 2]| {
        if hemisphere {
            sphere_direction(r[0], r[1])
        } else {
            plane_direction(r[0])
        }
    };
    let source = if hemisphere {
        sphere_direction(p.incidence_deg, p.azimuth_deg)
    } else {
        plane_direction(p.incidence_deg)
    };
    let mirror = DVec3::new(-source.x, -source.y, source.z);
    let mut zone: Vec<bool> = p
        .receivers_deg
        .iter()
        .map(|r| {
            let d = dir(r);
            if let Some(half) = geometry.zone_half_width_deg {
                return d.dot(mirror).clamp(-1.0, 1.0).acos().to_degrees() <= half + SAME_DEG;
            }
            // Image source S' and receiver R; where the line S'R crosses z = 0.
            let s = source * geometry.source_distance_m;
            let image = DVec3::new(s.x, s.y, -s.z);
            let rx = d * geometry.receiver_distance_m;
            let t = s.z / (rx.z + s.z);
            let hit = image + (rx - image) * t;
            let half_w = 0.5 * geometry.sample_width_m;
            let half_d = 0.5 * geometry.sample_depth_m.unwrap_or(geometry.sample_width_m);
            hit.x.abs() <= half_w && (!hemisphere || hit.y.abs() <= half_d)
        })
        .collect();
    let nearest = p
        .receivers_deg
        .iter()
        .map(|r| dir(r).dot(mirror))
        .enumerate()
        .max_by(|a, b| a.1.total_cmp(&b.1))
        .map(|(i, _)| i);
    if let Some(i) = nearest {
        zone[i] = true;
    }
    zone
}

/// Replaces the energies of zone receivers by the level their outside
/// neighbours give: linear in angle between the nearest outside receivers on
/// each side (plane), or inverse-angle weighting of the four nearest outside
/// receivers (hemisphere); a zone receiver measured below that level keeps
/// its own (a dip at the mirror direction is scattered energy missing, not
/// specular energy). `None` when no receiver lies outside the zone.
fn without_zone(p: &Prepared, zone: &[bool], hemisphere: bool) -> Option<Vec<f64>> {
    let outside: Vec<usize> = (0..zone.len()).filter(|&i| !zone[i]).collect();
    if outside.is_empty() {
        return None;
    }
    let mut energy = p.energy.clone();
    for i in (0..zone.len()).filter(|&i| zone[i]) {
        if hemisphere {
            let d = sphere_direction(p.receivers_deg[i][0], p.receivers_deg[i][1]);
            let mut near: Vec<(f64, f64)> = outside
                .iter()
                .map(|&j| {
                    let dj = sphere_direction(p.receivers_deg[j][0], p.receivers_deg[j][1]);
                    (d.dot(dj).clamp(-1.0, 1.0).acos(), p.energy[j])
                })
                .collect();
            near.sort_by(|a, b| a.0.total_cmp(&b.0));
            near.truncate(4);
            let w: f64 = near.iter().map(|n| 1.0 / n.0.max(1e-9)).sum();
            let neighbours = near.iter().map(|n| n.1 / n.0.max(1e-9)).sum::<f64>() / w;
            energy[i] = neighbours.min(p.energy[i]);
        } else {
            let theta = p.receivers_deg[i][0];
            let left = outside
                .iter()
                .filter(|&&j| p.receivers_deg[j][0] < theta)
                .max_by(|&&a, &&b| p.receivers_deg[a][0].total_cmp(&p.receivers_deg[b][0]));
            let right = outside
                .iter()
                .filter(|&&j| p.receivers_deg[j][0] > theta)
                .min_by(|&&a, &&b| p.receivers_deg[a][0].total_cmp(&p.receivers_deg[b][0]));
            let neighbours = match (left, right) {
                (Some(&l), Some(&r)) => {
                    let (tl, tr) = (p.receivers_deg[l][0], p.receivers_deg[r][0]);
                    let f = (theta - tl) / (tr - tl);
                    p.energy[l] + f * (p.energy[r] - p.energy[l])
                }
                (Some(&j), None) | (None, Some(&j)) => p.energy[j],
                (None, None) => p.energy[outside[0]],
            };
            energy[i] = neighbours.min(p.energy[i]);
        }
    }
    Some(energy)
}

/// The scattered pattern of one response (specular zone removed), or an error
/// naming the response when nothing is left to sample.
fn scattered_energy(
    file: &Path,
    geometry: &GoniometerGeometry,
    p: &Prepared,
    hemisphere: bool,
) -> Result<Vec<f64>, MeasuredLawError> {
    let err = |problem: &str| MeasuredLawError::BadResponse {
        file: file.to_path_buf(),
        band_hz: p.band_hz,
        incidence_deg: p.incidence_deg,
        problem: problem.into(),
    };
    let zone = specular_zone(geometry, p, hemisphere);
    let energy = without_zone(p, &zone, hemisphere).ok_or_else(|| {
        err(
            "the specular zone covers every receiver, so no scattered pattern can be told apart \
             from the mirror reflection; add receivers outside it or set the material's \
             scattering coefficient to 0 in this band",
        )
    })?;
    if energy.iter().all(|&e| e == 0.0) {
        return Err(err(
            "no energy outside the specular zone (a flat reflector?) while the material's \
             scattering coefficient is above 0; set it to 0 in this band or use data with a \
             scattered part",
        ));
    }
    Ok(energy)
}

/// Responses pooled at one |ψ|: key (degrees), folded receivers, first signed incidence.
type Pooled = (f64, Vec<(f64, f64, f64)>, f64);

/// Everything the law keeps of one room band.
pub(super) struct PreparedBand {
    /// The scattered pattern; `None` when the band's scattering coefficient is 0.
    pub pattern: Option<BandPattern>,
    /// Lowest and highest incidence covered, radians.
    pub range_rad: (f64, f64),
}

/// Builds the pattern of one room band.
pub(super) fn prepare_band(
    file: &Path,
    polar: &PolarFile,
    band_hz: u32,
    scattering: f64,
    usage: PolarUse,
    warnings: &mut Vec<MeasuredLawWarning>,
) -> Result<PreparedBand, MeasuredLawError> {
    let responses = responses_for_band(file, polar, band_hz)?;
    let mirror_negative =
        usage == PolarUse::Extruded && polar.responses.iter().all(|r| r.incidence_deg >= 0.0);
    if mirror_negative
        && !warnings
            .iter()
            .any(|w| matches!(w, MeasuredLawWarning::MirroredIncidences { .. }))
    {
        warnings.push(MeasuredLawWarning::MirroredIncidences {
            file: file.to_path_buf(),
        });
    }

    // Incidence keys as the law looks them up.
    let key_deg = |p: &Prepared| match usage {
        PolarUse::Extruded => p.incidence_deg,
        PolarUse::Rotational | PolarUse::Hemisphere => p.incidence_deg.abs(),
    };
    let mut keys: Vec<f64> = responses.iter().map(key_deg).collect();
    if mirror_negative {
        keys.extend(responses.iter().map(|p| -p.incidence_deg));
    }
    keys.sort_by(f64::total_cmp);
    keys.dedup_by(|a, b| (*a - *b).abs() < SAME_DEG);
    let range_rad = (keys[0].to_radians(), keys[keys.len() - 1].to_radians());
    let clamped = match usage {
        PolarUse::Extruded => keys[0] > -90.0 + SAME_DEG || keys[keys.len() - 1] < 90.0 - SAME_DEG,
        _ => keys[0] > SAME_DEG || keys[keys.len() - 1] < 90.0 - SAME_DEG,
    };
    if clamped {
        warnings.push(MeasuredLawWarning::IncidenceClamped {
            file: file.to_path_buf(),
            band_hz,
            lowest_deg: keys[0],
            highest_deg: keys[keys.len() - 1],
        });
    }
    if scattering <= 0.0 {
        return Ok(PreparedBand {
            pattern: None,
            range_rad,
        });
    }

    let duplicate = |p: &Prepared| MeasuredLawError::BadResponse {
        file: file.to_path_buf(),
        band_hz: p.band_hz,
        incidence_deg: p.incidence_deg,
        problem: "two responses share this band, incidence and azimuth; keep one".into(),
    };
    let mut entries: Vec<Entry> = Vec::new();
    let mut push = |incidence_deg: f64, variant: Variant| -> bool {
        let incidence_rad = incidence_deg.to_radians();
        match entries
            .iter_mut()
            .find(|e| (e.incidence_rad - incidence_rad).abs() < SAME_DEG.to_radians())
        {
            Some(e) => {
                if e.variants
                    .iter()
                    .any(|v| (v.azimuth_rad - variant.azimuth_rad).abs() < 1e-9)
                {
                    return false;
                }
                e.variants.push(variant);
            }
            None => entries.push(Entry {
                incidence_rad,
                variants: vec![variant],
            }),
        }
        true
    };

    match usage {
        PolarUse::Rotational => {
            // Fold each response about the normal; responses at ±ψ pool their
            // normalized receivers (same |θ| averaged by the table).
            let mut pooled: Vec<Pooled> = Vec::new();
            for p in &responses {
                let e = scattered_energy(file, &polar.geometry, p, false)?;
                let total: f64 = e.iter().sum();
                let folded: Vec<(f64, f64, f64)> = p
                    .receivers_deg
                    .iter()
                    .zip(&e)
                    .map(|(r, e)| (r[0].abs().to_radians(), 0.0, e / total))
                    .collect();
                let key = p.incidence_deg.abs();
                match pooled.iter_mut().find(|g| (g.0 - key).abs() < SAME_DEG) {
                    Some(g) if g.2.signum() == p.incidence_deg.signum() || key < SAME_DEG => {
                        return Err(duplicate(p))
                    }
                    Some(g) => g.1.extend(folded),
                    None => pooled.push((key, folded, p.incidence_deg)),
                }
            }
            for (key, rx, _) in pooled {
                let table =
                    SphereTable::new(&rx, true).ok_or_else(|| zero_after(file, band_hz, key))?;
                push(
                    key,
                    Variant {
                        azimuth_rad: 0.0,
                        rotate: false,
                        table: Table::Sphere(table),
                    },
                );
            }
        }
        PolarUse::Extruded => {
            for p in &responses {
                let e = scattered_energy(file, &polar.geometry, p, false)?;
                let rx: Vec<(f64, f64)> = p
                    .receivers_deg
                    .iter()
                    .zip(&e)
                    .map(|(r, e)| (r[0].to_radians(), *e))
                    .collect();
                let table =
                    ArcTable::new(&rx).ok_or_else(|| zero_after(file, band_hz, p.incidence_deg))?;
                let variant = |t: ArcTable| Variant {
                    azimuth_rad: 0.0,
                    rotate: false,
                    table: Table::Arc(t),
                };
                if !push(p.incidence_deg, variant(table)) {
                    return Err(duplicate(p));
                }
                if mirror_negative && p.incidence_deg > SAME_DEG {
                    let mirrored: Vec<(f64, f64)> = rx.iter().map(|&(t, e)| (-t, e)).collect();
                    let table = ArcTable::new(&mirrored)
                        .ok_or_else(|| zero_after(file, band_hz, p.incidence_deg))?;
                    push(-p.incidence_deg, variant(table));
                }
            }
        }
        PolarUse::Hemisphere => {
            for p in &responses {
                let e = scattered_energy(file, &polar.geometry, p, true)?;
                let rx: Vec<(f64, f64, f64)> = p
                    .receivers_deg
                    .iter()
                    .zip(&e)
                    .map(|(r, e)| {
                        let (t, ph) = if r[0] < 0.0 {
                            (-r[0], r[1] + 180.0)
                        } else {
                            (r[0], r[1])
                        };
                        (t.to_radians(), ph.to_radians(), *e)
                    })
                    .collect();
                let table = SphereTable::new(&rx, false)
                    .ok_or_else(|| zero_after(file, band_hz, p.incidence_deg))?;
                let (psi, az) = if p.incidence_deg < 0.0 {
                    (-p.incidence_deg, p.azimuth_deg + 180.0)
                } else {
                    (p.incidence_deg, p.azimuth_deg)
                };
                let variant = Variant {
                    azimuth_rad: az.to_radians().rem_euclid(2.0 * PI),
                    rotate: psi > SAME_DEG,
                    table: Table::Sphere(table),
                };
                if !push(psi, variant) {
                    return Err(duplicate(p));
                }
            }
        }
    }
    entries.sort_by(|a, b| a.incidence_rad.total_cmp(&b.incidence_rad));
    Ok(PreparedBand {
        pattern: Some(BandPattern { entries }),
        range_rad,
    })
}

fn zero_after(file: &Path, band_hz: u32, incidence_deg: f64) -> MeasuredLawError {
    MeasuredLawError::BadResponse {
        file: PathBuf::from(file),
        band_hz: f64::from(band_hz),
        incidence_deg,
        problem: "the scattered pattern has zero total energy after the specular zone is removed"
            .into(),
    }
}
