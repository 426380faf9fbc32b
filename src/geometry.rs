//! Small geometric helpers shared by the engine: local shading frames and
//! reflection directions.

use glam::DVec3;

/// An orthonormal frame whose `normal` is the local +Z axis.
///
/// Reflection laws work only in this local frame, with both the arriving
/// direction `wo` (back along the incoming ray) and the outgoing `wi` pointing
/// away from the surface. The world↔local conversion happens here and nowhere else.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Frame {
    /// Local +X.
    pub tangent: DVec3,
    /// Local +Y.
    pub bitangent: DVec3,
    /// Local +Z, the surface normal.
    pub normal: DVec3,
}

impl Frame {
    /// Builds a frame around a unit normal, branch-light and continuous almost
    /// everywhere (Duff et al., "Building an Orthonormal Basis, Revisited",
    /// JCGT 6(1), 2017).
    #[must_use]
    pub fn from_normal(n: DVec3) -> Self {
        debug_assert!(n.is_normalized(), "frame normal must be unit length");
        let sign = 1f64.copysign(n.z);
        let a = -1.0 / (sign + n.z);
        let b = n.x * n.y * a;
        let tangent = DVec3::new(1.0 + sign * n.x * n.x * a, sign * b, -sign * n.x);
        let bitangent = DVec3::new(b, sign + n.y * n.y * a, -n.y);
        Self {
            tangent,
            bitangent,
            normal: n,
        }
    }

    /// Builds a frame with a chosen tangent (projected onto the plane and
    /// normalized); used where a surface has a preferred axis, e.g. the
    /// extrusion axis of a 1D diffuser. Falls back to [`Frame::from_normal`]
    /// when the tangent is parallel to the normal.
    #[must_use]
    pub fn from_normal_and_tangent(n: DVec3, t: DVec3) -> Self {
        let t = t - n * n.dot(t);
        match t.try_normalize() {
            Some(t) => Self {
                tangent: t,
                bitangent: n.cross(t),
                normal: n,
            },
            None => Self::from_normal(n),
        }
    }

    /// World direction → local coordinates.
    #[must_use]
    pub fn to_local(&self, v: DVec3) -> DVec3 {
        DVec3::new(
            v.dot(self.tangent),
            v.dot(self.bitangent),
            v.dot(self.normal),
        )
    }

    /// Local coordinates → world direction.
    #[must_use]
    pub fn to_world(&self, v: DVec3) -> DVec3 {
        self.tangent * v.x + self.bitangent * v.y + self.normal * v.z
    }
}

/// Mirror direction in the local frame (normal +Z) for `wo` pointing away from the surface.
#[must_use]
pub fn mirror_local(wo: DVec3) -> DVec3 {
    DVec3::new(-wo.x, -wo.y, wo.z)
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn frame_is_orthonormal_and_round_trips() {
        // Common practice, no source: an orthonormal basis must preserve dot products.
        for n in [
            DVec3::Z,
            -DVec3::Z,
            DVec3::X,
            DVec3::new(0.3, -0.5, 0.8).normalize(),
            DVec3::new(-1e-9, 0.0, -1.0).normalize(),
        ] {
            let f = Frame::from_normal(n);
            assert_relative_eq!(f.tangent.dot(f.bitangent), 0.0, epsilon = 1e-12);
            assert_relative_eq!(f.tangent.dot(f.normal), 0.0, epsilon = 1e-12);
            assert_relative_eq!(f.tangent.length(), 1.0, epsilon = 1e-12);
            assert_relative_eq!(f.bitangent.length(), 1.0, epsilon = 1e-12);
            let v = DVec3::new(0.2, 0.7, -0.4);
            let back = f.to_world(f.to_local(v));
            assert_relative_eq!((back - v).length(), 0.0, epsilon = 1e-12);
            assert_relative_eq!(f.to_local(n).z, 1.0, epsilon = 1e-12);
        }
    }
}
