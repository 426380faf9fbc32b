//! Measuring an extruded (1D) profile's law in the plane across its extrusion
//! axis. The tracer gives such a surface a local frame whose +X runs along the
//! axis (see `crate::law::measured`), so the plane across it is local Y–Z,
//! receiver angles positive toward +Y. The goniometer's arc lies in its own
//! x–z plane; this view turns the law by 90° about the normal so the two meet.

use glam::DVec3;

use crate::bands::Bands;
use crate::law::{LawSample, ReflectionLaw};

/// A law seen with the goniometer's x–z plane laid across the extrusion axis:
/// goniometer (x, y, z) is law (−y, x, z).
pub struct CrossAxisView<'a> {
    law: &'a dyn ReflectionLaw,
}

impl<'a> CrossAxisView<'a> {
    /// Wraps `law`, whose local +X is the extrusion axis.
    #[must_use]
    pub fn new(law: &'a dyn ReflectionLaw) -> Self {
        Self { law }
    }
}

/// Goniometer frame → law frame.
fn to_law(v: DVec3) -> DVec3 {
    DVec3::new(-v.y, v.x, v.z)
}

/// Law frame → goniometer frame.
fn to_gonio(v: DVec3) -> DVec3 {
    DVec3::new(v.y, -v.x, v.z)
}

impl ReflectionLaw for CrossAxisView<'_> {
    fn name(&self) -> &'static str {
        self.law.name()
    }

    fn sample(&self, wo: DVec3, u_lobe: f64, u_dir: [f64; 2]) -> Option<LawSample> {
        self.law
            .sample(to_law(wo), u_lobe, u_dir)
            .map(|s| LawSample {
                wi: to_gonio(s.wi),
                ..s
            })
    }

    fn mirror_fraction(&self, wo: DVec3) -> Bands {
        self.law.mirror_fraction(to_law(wo))
    }

    fn eval(&self, wo: DVec3, wi: DVec3) -> Bands {
        self.law.eval(to_law(wo), to_law(wi))
    }

    fn pdf(&self, wo: DVec3, wi: DVec3) -> f64 {
        self.law.pdf(to_law(wo), to_law(wi))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_turn_is_a_rotation_and_its_own_inverse_pair() {
        let v = DVec3::new(0.3, -0.4, 0.866);
        assert_eq!(to_gonio(to_law(v)), v);
        // Goniometer +x (positive arc angles) is the law's +Y (positive
        // receiver angles of the extruded data).
        assert_eq!(to_law(DVec3::X), DVec3::Y);
        assert!((to_law(v).length() - v.length()).abs() < 1e-15);
    }
}
