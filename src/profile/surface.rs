//! Discretized surfaces: the profile cut into small straight elements, each
//! with its own reflection factor rule (rigid, or a well of given depth).
//!
//! Element boundaries always fall on well and fin edges and on the vertices of
//! piecewise-linear profiles, so a discontinuity of the reflection factor never
//! lies inside an element.

use super::sequence;
use super::spec::ProfileShape;

/// How an element reflects: rigid (R = 1) or the mouth of a well of depth
/// `d` (R = e^{−2jkd}: plane-wave, lossless, rigid bottom).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Reflection {
    /// Rigid surface, R = 1.
    Rigid,
    /// Well mouth of the given depth, m.
    Well(f64),
}

impl Reflection {
    /// The reflection factor at wavenumber `k_per_m`.
    #[must_use]
    pub fn factor(self, k_per_m: f64) -> num_complex::Complex64 {
        match self {
            Self::Rigid => num_complex::Complex64::new(1.0, 0.0),
            Self::Well(d) => num_complex::Complex64::from_polar(1.0, -2.0 * k_per_m * d),
        }
    }
}

/// One straight element of an extruded profile, in the (x, z) plane; z is the
/// sample normal, the sample centre is at x = 0.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Panel {
    /// Midpoint [x, z], m.
    pub mid_m: [f64; 2],
    /// Unit tangent (along increasing x).
    pub tangent: [f64; 2],
    /// Unit normal pointing into the air.
    pub normal: [f64; 2],
    /// Length, m.
    pub length_m: f64,
    /// Reflection rule.
    pub reflection: Reflection,
}

/// An extruded (1D) profile cut into panels.
#[derive(Clone, Debug, PartialEq)]
pub struct Surface1d {
    /// The panels in order of x.
    pub panels: Vec<Panel>,
    /// Overall width along x, m.
    pub width_m: f64,
}

/// One rectangular patch of a grid profile's aperture plane (z = 0).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Patch {
    /// Centre [x, y], m.
    pub centre_m: [f64; 2],
    /// Size along x, m.
    pub dx_m: f64,
    /// Size along y, m.
    pub dy_m: f64,
    /// Reflection rule.
    pub reflection: Reflection,
}

/// A grid (2D) profile's aperture plane cut into patches.
#[derive(Clone, Debug, PartialEq)]
pub struct Surface2d {
    /// The patches.
    pub patches: Vec<Patch>,
    /// Size along x, m.
    pub width_m: f64,
    /// Size along y, m.
    pub depth_m: f64,
}

/// An interval of the aperture line: [start, end) with either a fin (rigid)
/// or the well of sequence index `Some(n)`.
#[derive(Clone, Copy, Debug)]
struct Interval {
    start_m: f64,
    end_m: f64,
    well: Option<usize>,
}

/// Cells of `well_width + fin_width`, each a half fin, a well, a half fin,
/// `wells × periods` of them, centred on 0; adjacent fins merge.
fn well_intervals(
    wells: usize,
    periods: u32,
    well_width_m: f64,
    fin_width_m: f64,
) -> Vec<Interval> {
    let cell = well_width_m + fin_width_m;
    let total = cell * (wells * periods as usize) as f64;
    let x0 = -0.5 * total;
    let mut out: Vec<Interval> = Vec::new();
    let mut push = |iv: Interval| {
        if iv.end_m - iv.start_m <= 0.0 {
            return;
        }
        if let Some(last) = out.last_mut() {
            if last.well.is_none() && iv.well.is_none() {
                last.end_m = iv.end_m;
                return;
            }
        }
        out.push(iv);
    };
    for c in 0..wells * periods as usize {
        let a = x0 + cell * c as f64;
        let half = 0.5 * fin_width_m;
        push(Interval {
            start_m: a,
            end_m: a + half,
            well: None,
        });
        push(Interval {
            start_m: a + half,
            end_m: a + half + well_width_m,
            well: Some(c % wells),
        });
        push(Interval {
            start_m: a + half + well_width_m,
            end_m: a + cell,
            well: None,
        });
    }
    out
}

/// Number of elements for an interval of `len_m`: no longer than `step_m`,
/// at least `min_count`.
fn element_count(len_m: f64, step_m: f64, min_count: u32) -> usize {
    ((len_m / step_m - 1e-9).ceil() as usize)
        .max(min_count as usize)
        .max(1)
}

/// Splits intervals into 1D sub-intervals (start, length, well index).
fn subdivide(
    intervals: &[Interval],
    step_m: f64,
    min_per_well: u32,
) -> Vec<(f64, f64, Option<usize>)> {
    let mut out = Vec::new();
    for iv in intervals {
        let len = iv.end_m - iv.start_m;
        let min = if iv.well.is_some() { min_per_well } else { 1 };
        let n = element_count(len, step_m, min);
        let h = len / n as f64;
        for i in 0..n {
            out.push((iv.start_m + h * i as f64, h, iv.well));
        }
    }
    out
}

/// Depths of one period of a 1D well profile, m, or `None` for other shapes.
#[must_use]
pub fn well_depths_m(shape: &ProfileShape, sound_speed_m_s: f64) -> Option<Vec<f64>> {
    match shape {
        ProfileShape::QuadraticResidue {
            prime, design_hz, ..
        } => Some(sequence::depths_m(
            &sequence::quadratic_residue(*prime),
            *prime,
            *design_hz,
            sound_speed_m_s,
        )),
        ProfileShape::PrimitiveRoot {
            prime,
            root,
            design_hz,
            ..
        } => {
            let g = root.or_else(|| sequence::smallest_primitive_root(*prime))?;
            Some(sequence::depths_m(
                &sequence::primitive_root(*prime, g),
                *prime,
                *design_hz,
                sound_speed_m_s,
            ))
        }
        ProfileShape::WellDepths { depths_m, .. } => Some(depths_m.clone()),
        _ => None,
    }
}

/// Depths of one period of a grid profile, m: rows along y.
#[must_use]
pub fn grid_depths_m(shape: &ProfileShape, sound_speed_m_s: f64) -> Option<Vec<Vec<f64>>> {
    match shape {
        ProfileShape::WellGrid { depths_m, .. } => Some(depths_m.clone()),
        ProfileShape::QuadraticResidueGrid {
            prime, design_hz, ..
        } => {
            let lambda0 = sound_speed_m_s / design_hz;
            let n = u64::from(*prime);
            Some(
                (0..n)
                    .map(|j| {
                        (0..n)
                            .map(|i| ((i * i + j * j) % n) as f64 * lambda0 / (2.0 * n as f64))
                            .collect()
                    })
                    .collect(),
            )
        }
        _ => None,
    }
}

/// Overall size of a shape, [width along x, depth along y] in m (depth `None`
/// for extruded profiles).
#[must_use]
pub fn footprint_m(shape: &ProfileShape) -> (f64, Option<f64>) {
    match shape {
        ProfileShape::Flat { width_m } | ProfileShape::Sinusoid { width_m, .. } => (*width_m, None),
        ProfileShape::QuadraticResidue {
            prime,
            well_width_m,
            fin_width_m,
            periods,
            ..
        } => (
            (well_width_m + fin_width_m) * f64::from(*prime) * f64::from(*periods),
            None,
        ),
        ProfileShape::PrimitiveRoot {
            prime,
            well_width_m,
            fin_width_m,
            periods,
            ..
        } => (
            (well_width_m + fin_width_m) * f64::from(prime.saturating_sub(1)) * f64::from(*periods),
            None,
        ),
        ProfileShape::WellDepths {
            depths_m,
            well_width_m,
            fin_width_m,
            periods,
        } => (
            (well_width_m + fin_width_m) * depths_m.len() as f64 * f64::from(*periods),
            None,
        ),
        ProfileShape::Points { points_m } => {
            let w = match (points_m.first(), points_m.last()) {
                (Some(a), Some(b)) => b[0] - a[0],
                _ => 0.0,
            };
            (w, None)
        }
        ProfileShape::WellGrid {
            depths_m,
            well_width_m,
            fin_width_m,
            periods_x,
            periods_y,
        } => {
            let cell = well_width_m + fin_width_m;
            let nx = depths_m.first().map_or(0, Vec::len);
            (
                cell * nx as f64 * f64::from(*periods_x),
                Some(cell * depths_m.len() as f64 * f64::from(*periods_y)),
            )
        }
        ProfileShape::QuadraticResidueGrid {
            prime,
            well_width_m,
            fin_width_m,
            periods_x,
            periods_y,
            ..
        } => {
            let cell = (well_width_m + fin_width_m) * f64::from(*prime);
            (
                cell * f64::from(*periods_x),
                Some(cell * f64::from(*periods_y)),
            )
        }
    }
}

/// Largest height of the profile above the reference plane z = 0, m (wells
/// lie below it).
#[must_use]
pub fn max_height_m(shape: &ProfileShape) -> f64 {
    match shape {
        ProfileShape::Sinusoid { amplitude_m, .. } => *amplitude_m,
        ProfileShape::Points { points_m } => {
            points_m.iter().map(|p| p[1].abs()).fold(0.0, f64::max)
        }
        _ => 0.0,
    }
}

fn panel(a: [f64; 2], b: [f64; 2], reflection: Reflection) -> Panel {
    let (dx, dz) = (b[0] - a[0], b[1] - a[1]);
    let len = dx.hypot(dz);
    let t = [dx / len, dz / len];
    Panel {
        mid_m: [0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1])],
        tangent: t,
        normal: [-t[1], t[0]],
        length_m: len,
        reflection,
    }
}

fn polyline(points: &[[f64; 2]], step_m: f64) -> Vec<Panel> {
    let mut out = Vec::new();
    for w in points.windows(2) {
        let (a, b) = (w[0], w[1]);
        let len = (b[0] - a[0]).hypot(b[1] - a[1]);
        let n = element_count(len, step_m, 1);
        for i in 0..n {
            let t0 = i as f64 / n as f64;
            let t1 = (i + 1) as f64 / n as f64;
            let p0 = [a[0] + (b[0] - a[0]) * t0, a[1] + (b[1] - a[1]) * t0];
            let p1 = [a[0] + (b[0] - a[0]) * t1, a[1] + (b[1] - a[1]) * t1];
            out.push(panel(p0, p1, Reflection::Rigid));
        }
    }
    out
}

impl Surface1d {
    /// A flat rigid strip of `width_m` centred on x = 0, elements ≤ `step_m`.
    #[must_use]
    pub fn flat(width_m: f64, step_m: f64) -> Self {
        let h = 0.5 * width_m;
        Self {
            panels: polyline(&[[-h, 0.0], [h, 0.0]], step_m),
            width_m,
        }
    }

    /// Cuts an extruded shape into elements no longer than `step_m`, with at
    /// least `min_per_well` across each well; `None` for grid shapes.
    #[must_use]
    pub fn from_shape(
        shape: &ProfileShape,
        sound_speed_m_s: f64,
        step_m: f64,
        min_per_well: u32,
    ) -> Option<Self> {
        let (width_m, _) = footprint_m(shape);
        let panels = match shape {
            ProfileShape::Flat { width_m } => return Some(Self::flat(*width_m, step_m)),
            ProfileShape::Sinusoid {
                width_m,
                amplitude_m,
                period_m,
                phase_deg,
            } => {
                // Vertices close enough that chords follow the curve (32 per period)
                // and arcs stay within the step.
                let slope = 2.0 * std::f64::consts::PI * amplitude_m / period_m;
                let dx = (step_m / slope.hypot(1.0)).min(period_m / 32.0);
                let n = element_count(*width_m, dx, 1);
                let phase = phase_deg.to_radians();
                let pts: Vec<[f64; 2]> = (0..=n)
                    .map(|i| {
                        let x = -0.5 * width_m + width_m * i as f64 / n as f64;
                        [
                            x,
                            amplitude_m * (2.0 * std::f64::consts::PI * x / period_m + phase).sin(),
                        ]
                    })
                    .collect();
                polyline(&pts, step_m)
            }
            ProfileShape::Points { points_m } => {
                let x_mid = 0.5 * (points_m[0][0] + points_m[points_m.len() - 1][0]);
                let pts: Vec<[f64; 2]> = points_m.iter().map(|p| [p[0] - x_mid, p[1]]).collect();
                polyline(&pts, step_m)
            }
            ProfileShape::QuadraticResidue {
                well_width_m,
                fin_width_m,
                periods,
                ..
            }
            | ProfileShape::PrimitiveRoot {
                well_width_m,
                fin_width_m,
                periods,
                ..
            }
            | ProfileShape::WellDepths {
                well_width_m,
                fin_width_m,
                periods,
                ..
            } => {
                let depths = well_depths_m(shape, sound_speed_m_s)?;
                let ivs = well_intervals(depths.len(), *periods, *well_width_m, *fin_width_m);
                subdivide(&ivs, step_m, min_per_well)
                    .into_iter()
                    .map(|(x0, h, well)| {
                        let r = well.map_or(Reflection::Rigid, |n| Reflection::Well(depths[n]));
                        panel([x0, 0.0], [x0 + h, 0.0], r)
                    })
                    .collect()
            }
            ProfileShape::WellGrid { .. } | ProfileShape::QuadraticResidueGrid { .. } => {
                return None
            }
        };
        Some(Self { panels, width_m })
    }
}

impl Surface2d {
    /// A flat rigid rectangle `width_m` × `depth_m` centred on the origin.
    #[must_use]
    pub fn flat(width_m: f64, depth_m: f64, step_m: f64) -> Self {
        let nx = element_count(width_m, step_m, 1);
        let ny = element_count(depth_m, step_m, 1);
        let (dx, dy) = (width_m / nx as f64, depth_m / ny as f64);
        let mut patches = Vec::with_capacity(nx * ny);
        for j in 0..ny {
            for i in 0..nx {
                patches.push(Patch {
                    centre_m: [
                        -0.5 * width_m + dx * (i as f64 + 0.5),
                        -0.5 * depth_m + dy * (j as f64 + 0.5),
                    ],
                    dx_m: dx,
                    dy_m: dy,
                    reflection: Reflection::Rigid,
                });
            }
        }
        Self {
            patches,
            width_m,
            depth_m,
        }
    }

    /// Cuts a grid shape's aperture plane into patches no larger than
    /// `step_m` a side, at least `min_per_well` a side per well; `None` for
    /// extruded shapes.
    #[must_use]
    pub fn from_shape(
        shape: &ProfileShape,
        sound_speed_m_s: f64,
        step_m: f64,
        min_per_well: u32,
    ) -> Option<Self> {
        let depths = grid_depths_m(shape, sound_speed_m_s)?;
        let (well_width_m, fin_width_m, periods_x, periods_y) = match shape {
            ProfileShape::WellGrid {
                well_width_m,
                fin_width_m,
                periods_x,
                periods_y,
                ..
            }
            | ProfileShape::QuadraticResidueGrid {
                well_width_m,
                fin_width_m,
                periods_x,
                periods_y,
                ..
            } => (*well_width_m, *fin_width_m, *periods_x, *periods_y),
            _ => return None,
        };
        let (nx, ny) = (depths[0].len(), depths.len());
        let xs = subdivide(
            &well_intervals(nx, periods_x, well_width_m, fin_width_m),
            step_m,
            min_per_well,
        );
        let ys = subdivide(
            &well_intervals(ny, periods_y, well_width_m, fin_width_m),
            step_m,
            min_per_well,
        );
        let mut patches = Vec::with_capacity(xs.len() * ys.len());
        for &(y0, hy, wy) in &ys {
            for &(x0, hx, wx) in &xs {
                let reflection = match (wx, wy) {
                    (Some(i), Some(j)) => Reflection::Well(depths[j][i]),
                    _ => Reflection::Rigid,
                };
                patches.push(Patch {
                    centre_m: [x0 + 0.5 * hx, y0 + 0.5 * hy],
                    dx_m: hx,
                    dy_m: hy,
                    reflection,
                });
            }
        }
        let (w, d) = footprint_m(shape);
        Some(Self {
            patches,
            width_m: w,
            depth_m: d.unwrap_or(0.0),
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wells_and_fins_tile_the_width() {
        let shape = ProfileShape::QuadraticResidue {
            prime: 7,
            design_hz: 500.0,
            well_width_m: 0.1,
            fin_width_m: 0.01,
            periods: 2,
        };
        let s = Surface1d::from_shape(&shape, 343.0, 0.02, 4).unwrap();
        let total: f64 = s.panels.iter().map(|p| p.length_m).sum();
        assert!((total - 1.54).abs() < 1e-12 && (s.width_m - 1.54).abs() < 1e-12);
        let wells = s
            .panels
            .iter()
            .filter(|p| matches!(p.reflection, Reflection::Well(_)))
            .count();
        // 14 wells of 0.1 m at ≤ 0.02 m: 5 elements each.
        assert_eq!(wells, 70);
        assert!(
            (s.panels[0].mid_m[0] + 0.77 - 0.0025).abs() < 1e-12,
            "starts with a half fin"
        );
    }
}
