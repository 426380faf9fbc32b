//! Diffuse-field estimates of a room: volume, areas, mean free path and the
//! Sabine and Eyring reverberation times (Kuttruff, Room Acoustics, 6th ed., §5.1–5.3).

use crate::bands::Bands;

use super::Room;

/// Room volume in m³ by the divergence theorem over the triangles:
/// V = (1/3) ∮ x · n_out dA = −Σ v0 · (v1 × v2) / 6 for triangles whose
/// normals point into the room (polaray's convention). Meaningful only for a
/// closed, consistently oriented mesh.
#[must_use]
pub fn volume_m3(room: &Room) -> f64 {
    -room
        .triangles
        .iter()
        .map(|t| t.vertices[0].dot(t.vertices[1].cross(t.vertices[2])))
        .sum::<f64>()
        / 6.0
}

/// Total surface area in m².
#[must_use]
pub fn area_m2(room: &Room) -> f64 {
    room.surfaces.iter().map(|s| s.area_m2).sum()
}

/// Surface area per material in m², in the order of [`Room::materials`].
#[must_use]
pub fn area_by_material_m2(room: &Room) -> Vec<f64> {
    let mut areas = vec![0.0; room.materials.len()];
    for s in &room.surfaces {
        areas[s.material] += s.area_m2;
    }
    areas
}

/// Mean free path for diffuse reflection, 4V/S in m (Kuttruff, §5.2; valid for
/// any room shape).
#[must_use]
pub fn mean_free_path_m(room: &Room) -> f64 {
    4.0 * volume_m3(room) / area_m2(room)
}

/// Energy attenuation of the air per band in 1/m (zero when the room disables
/// air absorption).
#[must_use]
pub fn air_attenuation_per_m(room: &Room) -> Bands {
    let set = &room.settings.bands;
    let mut m = Bands::ZERO;
    if room.settings.air_absorption {
        for b in 0..set.len() {
            m[b] = room
                .settings
                .air
                .energy_attenuation_per_m(set.exact_centre_hz(b));
        }
    }
    m
}

/// Σ S_i α_i per band, m² (equivalent absorption area of the surfaces).
#[must_use]
pub fn absorption_area_m2(room: &Room) -> Bands {
    let mut a = Bands::ZERO;
    for s in &room.surfaces {
        a += room.materials[s.material].absorption * s.area_m2;
    }
    a
}

/// Sabine reverberation time per band, s: T = K V / (A + 4 m V), K = 24 ln 10 / c.
#[must_use]
pub fn sabine_s(room: &Room) -> Bands {
    let n = room.settings.bands.len();
    let v = volume_m3(room);
    let k = reverberation_constant_s_per_m(room);
    let a = absorption_area_m2(room);
    let m = air_attenuation_per_m(room);
    let mut t = Bands::ZERO;
    for b in 0..n {
        t[b] = k * v / (a[b] + 4.0 * m[b] * v);
    }
    t
}

/// Eyring reverberation time per band, s: T = K V / (−S ln(1 − ᾱ) + 4 m V),
/// ᾱ the area-weighted mean absorption coefficient.
#[must_use]
pub fn eyring_s(room: &Room) -> Bands {
    let n = room.settings.bands.len();
    let v = volume_m3(room);
    let s = area_m2(room);
    let k = reverberation_constant_s_per_m(room);
    let a = absorption_area_m2(room);
    let m = air_attenuation_per_m(room);
    let mut t = Bands::ZERO;
    for b in 0..n {
        let mean_alpha = (a[b] / s).min(1.0);
        let surface_term = if mean_alpha >= 1.0 {
            f64::INFINITY
        } else {
            -s * (1.0 - mean_alpha).ln()
        };
        t[b] = k * v / (surface_term + 4.0 * m[b] * v);
    }
    t
}

/// K = 24 ln 10 / c in s/m (0.161 s/m at 343 m/s; Kuttruff, eq. 5.10).
#[must_use]
pub fn reverberation_constant_s_per_m(room: &Room) -> f64 {
    24.0 * std::f64::consts::LN_10 / room.settings.air.speed_of_sound_m_s()
}

/// Longest echogram polaray computes by default, s.
pub const MAX_DEFAULT_DURATION_S: f64 = 10.0;
/// Shortest echogram polaray computes by default, s.
pub const MIN_DEFAULT_DURATION_S: f64 = 0.3;

/// Default echogram length: 1.5 × the longest Eyring estimate, clamped to
/// [`MIN_DEFAULT_DURATION_S`, `MAX_DEFAULT_DURATION_S`] (common practice, no
/// source: a T30 fit needs the decay followed to about −35 dB, i.e. 0.6 T, and
/// the margin keeps the Schroeder integral's truncation away from it).
#[must_use]
pub fn default_duration_s(room: &Room) -> f64 {
    let n = room.settings.bands.len();
    let longest = eyring_s(room).max_of(n);
    if longest.is_finite() {
        (1.5 * longest).clamp(MIN_DEFAULT_DURATION_S, MAX_DEFAULT_DURATION_S)
    } else {
        MAX_DEFAULT_DURATION_S
    }
}
