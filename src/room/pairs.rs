//! Consistency of each material's (scattering, diffusion) pairs.
//!
//! A diffusion coefficient cannot exceed what the scattering coefficient
//! allows (reference sheet §3: d ≤ d_max(min(s, s*))). The bound itself is
//! computed elsewhere (the polar-data work); this module is the one place the
//! loader asks it, so wiring it in is a change to [`material_pair_bound`] only.

use crate::bands::BandSet;

use super::Material;

/// Slack allowed above the bound before a pair counts as impossible (data are
/// given to two decimals; common practice, no source).
pub const PAIR_TOLERANCE: f64 = 0.005;

/// The largest diffusion coefficient consistent with scattering coefficient
/// `s`, or `None` where no bound is known.
///
/// Not wired yet: returns `None` for every `s`, so no pair is rejected until the
/// bound function of the polar-data work is connected here.
#[must_use]
pub fn material_pair_bound(_s: f64) -> Option<f64> {
    None
}

/// Problems for every band of every material whose diffusion coefficient lies
/// above `max_diffusion(scattering)` by more than [`PAIR_TOLERANCE`]. Materials
/// without diffusion data are skipped.
pub fn check_material_pairs(
    materials: &[Material],
    bands: &BandSet,
    max_diffusion: impl Fn(f64) -> Option<f64>,
) -> Vec<String> {
    let mut problems = Vec::new();
    for m in materials {
        let Some(d) = m.diffusion else { continue };
        for (b, hz) in bands.centres_hz().iter().enumerate() {
            let s = m.scattering[b];
            if let Some(limit) = max_diffusion(s) {
                if d[b] > limit + PAIR_TOLERANCE {
                    problems.push(format!(
                        "materials.{}: at {hz} Hz diffusion {:.3} is impossible with scattering {:.3} (at most {:.3}); lower the diffusion or raise the scattering coefficient",
                        m.name, d[b], s, limit
                    ));
                }
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
    fn pairs_above_a_bound_are_reported_per_band() {
        let bands = BandSet::new(&[500, 1000]).unwrap();
        let m = Material {
            name: "panel".into(),
            absorption: Bands::from_slice(&[0.1, 0.1]),
            scattering: Bands::from_slice(&[0.1, 0.5]),
            diffusion: Some(Bands::from_slice(&[0.6, 0.6])),
            polar_file: None,
        };
        // An invented bound d_max(s) = s + 0.2, only to exercise the check.
        let p = check_material_pairs(&[m], &bands, |s| Some(s + 0.2));
        assert_eq!(p.len(), 1);
        assert!(
            p[0].contains("materials.panel") && p[0].contains("500 Hz"),
            "{}",
            p[0]
        );
        assert!(material_pair_bound(0.3).is_none());
    }
}
