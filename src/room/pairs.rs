//! Consistency of each material's (scattering, diffusion) pairs.
//!
//! A diffusion coefficient cannot exceed what the scattering coefficient
//! allows (reference sheet §3: d ≤ d_max(min(s, s*))). The bound and its error
//! text live in [`crate::polar::bound`]; the loader asks it here, with the
//! default goniometer geometry, so `polaray check`, `polaray run` and the
//! `bounded` law refuse the same pairs with the same words.

use crate::bands::BandSet;
use crate::polar::bound::{check_material_pair, BoundViolation};
use crate::polar::zone::ZoneGeometry;

use super::Material;

/// Slack allowed above the bound before a pair counts as impossible (data are
/// given to two decimals; common practice, no source).
pub const PAIR_TOLERANCE: f64 = 0.005;

/// Problems for every band of every material whose diffusion coefficient lies
/// above the bound for its scattering coefficient by more than
/// [`PAIR_TOLERANCE`], checked with the material's own goniometer (or the
/// default one). Materials without diffusion data are skipped.
pub fn check_material_pairs(materials: &[Material], bands: &BandSet) -> Vec<String> {
    let mut problems = Vec::new();
    for m in materials {
        let Some(d) = m.diffusion else { continue };
        let geometry: &ZoneGeometry = &m.goniometer.clone().unwrap_or_default().zone_geometry();
        for (b, hz) in bands.centres_hz().iter().enumerate() {
            let s = m.scattering[b];
            // The tolerance forgives rounding of d, never a value out of range.
            let d_checked = if (0.0..=1.0).contains(&d[b]) {
                (d[b] - PAIR_TOLERANCE).max(0.0)
            } else {
                d[b]
            };
            match check_material_pair(s, d_checked, geometry) {
                Ok(()) => {}
                Err(BoundViolation::Exceeds { d_max, .. }) => problems.push(format!(
                    "materials.{}: at {hz} Hz {}",
                    m.name,
                    BoundViolation::Exceeds {
                        s,
                        d: d[b],
                        s_used: s.min(geometry.size().s_star()),
                        s_star: geometry.size().s_star(),
                        d_max,
                        excess: d[b] - d_max,
                        receivers: geometry.size().receivers,
                        zone_receivers: geometry.size().zone_receivers,
                    }
                )),
                Err(e) => problems.push(format!("materials.{}: at {hz} Hz {e}", m.name)),
            }
        }
    }
    problems
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::bands::Bands;

    #[test]
    fn pairs_above_the_bound_are_reported_per_band() {
        // reference.md §3 with the default geometry (37 receivers, 5 in the zone):
        // d_max(0.1) = 0.143 (computed from w(s) = 1/M + M/(M_s(M−M_s))(s−s*)²),
        // so d = 0.6 at s = 0.1 is impossible; at s = 0.5, d_max = 67/148 = 0.453,
        // so d = 0.4 passes.
        let bands = BandSet::new(&[500, 1000]).unwrap();
        let m = Material {
            name: "panel".into(),
            absorption: Bands::from_slice(&[0.1, 0.1]),
            scattering: Bands::from_slice(&[0.1, 0.5]),
            diffusion: Some(Bands::from_slice(&[0.6, 0.4])),
            polar_file: None,
            goniometer: None,
        };
        let p = check_material_pairs(std::slice::from_ref(&m), &bands);
        assert_eq!(p.len(), 1, "{p:?}");
        assert!(
            p[0].contains("materials.panel") && p[0].contains("500 Hz") && p[0].contains("exceeds"),
            "{}",
            p[0]
        );
    }

    #[test]
    fn the_materials_own_goniometer_sets_the_bound() {
        // A 2.4 m sample (source 10 m, receivers 5 m) puts 9 of 37 receivers in
        // the zone (the line to 20° meets the sample at 1.16 m, to 25° at
        // 1.45 m, half-width 1.2 m). reference.md §3 with M = 37, M_s = 9:
        // w(0.5) = 0.25/9 + 0.25/28, d_max = (1 − w)/(36 w) = 0.729; with the
        // default zone (M_s = 5) d_max(0.5) = 67/148 = 0.453.
        let bands = BandSet::new(&[1000]).unwrap();
        let mut m = Material {
            name: "panel".into(),
            absorption: Bands::from_slice(&[0.1]),
            scattering: Bands::from_slice(&[0.5]),
            diffusion: Some(Bands::from_slice(&[0.6])),
            polar_file: None,
            goniometer: None,
        };
        assert_eq!(
            check_material_pairs(std::slice::from_ref(&m), &bands).len(),
            1
        );
        let wide = crate::room::DiffusionGoniometer {
            sample_width_m: 2.4,
            ..Default::default()
        };
        assert_eq!(wide.zone_geometry().size().zone_receivers, 9);
        assert!(wide.problem().is_none());
        m.goniometer = Some(wide);
        assert!(check_material_pairs(&[m.clone()], &bands).is_empty());
        m.diffusion = Some(Bands::from_slice(&[0.74]));
        assert_eq!(check_material_pairs(&[m], &bands).len(), 1);
    }
}
