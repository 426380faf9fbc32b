//! Piecewise-constant direction tables with precomputed CDFs.
//!
//! [`SphereTable`]: cells of a (θ, φ) grid over the hemisphere, density
//! constant per steradian inside each cell. [`ArcTable`]: cells of the signed
//! in-plane angle on [−90°, 90°], density constant per radian inside each cell.
//! Sampling is a binary search in the CDF, then a uniform position inside the
//! cell (uniform in cos θ and φ for the sphere, i.e. uniform in solid angle).

use std::f64::consts::{FRAC_PI_2, TAU};

/// Picks the cell holding `u` in a CDF whose last entry is 1; returns the cell
/// and `u` remapped to [0, 1) within it. Never returns a zero-probability cell.
fn pick(cdf: &[f64], u: f64) -> (usize, f64) {
    let i = cdf.partition_point(|&c| c <= u).min(cdf.len() - 1);
    let lo = if i == 0 { 0.0 } else { cdf[i - 1] };
    let width = cdf[i] - lo;
    let v = if width > 0.0 { (u - lo) / width } else { 0.5 };
    (i, v.clamp(0.0, 1.0 - f64::EPSILON / 2.0))
}

/// Running sum of `prob`, normalized so the last entry is exactly 1.
fn cumulative(prob: &[f64]) -> Vec<f64> {
    let mut acc = 0.0;
    let mut cdf: Vec<f64> = prob
        .iter()
        .map(|p| {
            acc += p;
            acc
        })
        .collect();
    let total = acc;
    for c in &mut cdf {
        *c /= total;
    }
    if let Some(last) = cdf.last_mut() {
        *last = 1.0;
    }
    cdf
}

/// Cell edges from sorted centres: midpoints inside, `lo` and `hi` at the ends.
fn edges_from_centres(centres: &[f64], lo: f64, hi: f64) -> Vec<f64> {
    let mut edges = Vec::with_capacity(centres.len() + 1);
    edges.push(lo);
    for pair in centres.windows(2) {
        edges.push(0.5 * (pair[0] + pair[1]));
    }
    edges.push(hi);
    edges
}

/// Groups sorted `(key, value)` pairs whose keys lie within `tol`, averaging values.
fn cluster_mean(sorted: &[(f64, f64)], tol: f64) -> Vec<(f64, f64)> {
    let mut out: Vec<(f64, f64, usize)> = Vec::new();
    for &(k, v) in sorted {
        match out.last_mut() {
            Some(last) if (k - last.0 / last.2 as f64).abs() <= tol => {
                last.0 += k;
                last.1 += v;
                last.2 += 1;
            }
            _ => out.push((k, v, 1)),
        }
    }
    out.into_iter()
        .map(|(k, v, n)| (k / n as f64, v / n as f64))
        .collect()
}

/// Angles closer than this (radians) are the same receiver position.
const SAME_ANGLE_RAD: f64 = 1e-6;

/// A density over the signed in-plane angle ∈ [−π/2, π/2], constant per radian in each cell.
#[derive(Clone, Debug)]
pub struct ArcTable {
    edges_rad: Vec<f64>,
    cdf: Vec<f64>,
    density_per_rad: Vec<f64>,
}

impl ArcTable {
    /// Builds the table from receivers `(angle_rad, energy per radian)`; the
    /// cells reach halfway to the neighbours and out to ±π/2. `None` when the
    /// total energy is zero.
    #[must_use]
    pub fn new(receivers: &[(f64, f64)]) -> Option<Self> {
        let mut sorted = receivers.to_vec();
        sorted.sort_by(|a, b| a.0.total_cmp(&b.0));
        let merged = cluster_mean(&sorted, SAME_ANGLE_RAD);
        let centres: Vec<f64> = merged.iter().map(|r| r.0).collect();
        let edges_rad = edges_from_centres(&centres, -FRAC_PI_2, FRAC_PI_2);
        let prob: Vec<f64> = merged
            .iter()
            .enumerate()
            .map(|(i, r)| r.1 * (edges_rad[i + 1] - edges_rad[i]))
            .collect();
        let total: f64 = prob.iter().sum();
        if !(total > 0.0 && total.is_finite()) {
            return None;
        }
        let density_per_rad = prob
            .iter()
            .enumerate()
            .map(|(i, p)| {
                let w = edges_rad[i + 1] - edges_rad[i];
                if w > 0.0 {
                    p / total / w
                } else {
                    0.0
                }
            })
            .collect();
        Some(Self {
            cdf: cumulative(&prob),
            edges_rad,
            density_per_rad,
        })
    }

    /// Draws an angle (radians) from one uniform number.
    #[must_use]
    pub fn sample(&self, u: f64) -> f64 {
        let (i, v) = pick(&self.cdf, u);
        self.edges_rad[i] + v * (self.edges_rad[i + 1] - self.edges_rad[i])
    }

    /// Probability density per radian at `angle_rad` (zero outside ±π/2).
    #[must_use]
    pub fn density(&self, angle_rad: f64) -> f64 {
        if !(-FRAC_PI_2..=FRAC_PI_2).contains(&angle_rad) {
            return 0.0;
        }
        let i = self.edges_rad[1..]
            .partition_point(|&e| e <= angle_rad)
            .min(self.density_per_rad.len() - 1);
        self.density_per_rad[i]
    }
}

/// One ring of a [`SphereTable`]: a band of polar angle split into azimuth cells.
#[derive(Clone, Debug)]
struct Ring {
    theta_hi_rad: f64,
    cos_lo: f64,
    cos_hi: f64,
    /// Start of the first cell's azimuth range, radians; cells cover one turn from here.
    phi_start_rad: f64,
    first_cell: usize,
    cells: usize,
}

/// A density over the hemisphere, constant per steradian in each (θ, φ) cell.
#[derive(Clone, Debug)]
pub struct SphereTable {
    rings: Vec<Ring>,
    /// Per cell: azimuth range end, radians, measured from the ring's `phi_start_rad`.
    phi_hi_offset_rad: Vec<f64>,
    cell_ring: Vec<u32>,
    cdf: Vec<f64>,
    density_sr: Vec<f64>,
}

impl SphereTable {
    /// Builds the table from receivers `(θ_rad ∈ [0, π/2], φ_rad, energy per sr)`.
    /// Receivers with the same θ form a ring (edges halfway to the next rings,
    /// the first from 0 and the last to π/2); on a ring, cells reach halfway to
    /// the azimuth neighbours (around the circle). A receiver at θ = 0 forms a
    /// polar cap. With `ignore_azimuth` every ring is one cell (a rotationally
    /// symmetric pattern). `None` when the total energy is zero.
    #[must_use]
    pub fn new(receivers: &[(f64, f64, f64)], ignore_azimuth: bool) -> Option<Self> {
        let mut sorted = receivers.to_vec();
        sorted.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
        // Group receivers into rings of equal θ.
        let mut groups: Vec<Vec<(f64, f64, f64)>> = Vec::new();
        for r in sorted {
            match groups.last_mut() {
                Some(g) if (r.0 - g[0].0).abs() <= SAME_ANGLE_RAD => g.push(r),
                _ => groups.push(vec![r]),
            }
        }
        let ring_theta: Vec<f64> = groups
            .iter()
            .map(|g| g.iter().map(|r| r.0).sum::<f64>() / g.len() as f64)
            .collect();
        let theta_edges = edges_from_centres(&ring_theta, 0.0, FRAC_PI_2);

        let mut rings = Vec::with_capacity(groups.len());
        let mut phi_hi_offset_rad = Vec::new();
        let mut cell_ring = Vec::new();
        let mut prob = Vec::new();
        let mut solid_angle = Vec::new();
        for (k, g) in groups.iter().enumerate() {
            let (cos_lo, cos_hi) = (theta_edges[k].cos(), theta_edges[k + 1].cos());
            let ring_sr_per_rad = cos_lo - cos_hi;
            let is_pole = ring_theta[k] <= SAME_ANGLE_RAD;
            let first_cell = prob.len();
            let mut phi_start_rad = 0.0;
            if ignore_azimuth || is_pole {
                let mean = g.iter().map(|r| r.2).sum::<f64>() / g.len() as f64;
                phi_hi_offset_rad.push(TAU);
                prob.push(mean * ring_sr_per_rad * TAU);
                solid_angle.push(ring_sr_per_rad * TAU);
                cell_ring.push(k as u32);
            } else {
                let mut by_phi: Vec<(f64, f64)> =
                    g.iter().map(|r| (r.1.rem_euclid(TAU), r.2)).collect();
                by_phi.sort_by(|a, b| a.0.total_cmp(&b.0));
                let mut cells = cluster_mean(&by_phi, SAME_ANGLE_RAD);
                // The last and first receivers may coincide across 0 = 2π.
                if cells.len() > 1 && cells[0].0 + TAU - cells[cells.len() - 1].0 <= SAME_ANGLE_RAD
                {
                    let last = cells.pop().unwrap_or_default();
                    cells[0].1 = 0.5 * (cells[0].1 + last.1);
                }
                let m = cells.len();
                phi_start_rad = if m == 1 {
                    cells[0].0 - TAU / 2.0
                } else {
                    0.5 * (cells[m - 1].0 - TAU + cells[0].0)
                };
                for j in 0..m {
                    let hi = if j + 1 < m {
                        0.5 * (cells[j].0 + cells[j + 1].0)
                    } else {
                        phi_start_rad + TAU
                    };
                    let lo = if j == 0 {
                        phi_start_rad
                    } else {
                        0.5 * (cells[j - 1].0 + cells[j].0)
                    };
                    let sr = ring_sr_per_rad * (hi - lo);
                    phi_hi_offset_rad.push(hi - phi_start_rad);
                    prob.push(cells[j].1 * sr);
                    solid_angle.push(sr);
                    cell_ring.push(k as u32);
                }
            }
            rings.push(Ring {
                theta_hi_rad: theta_edges[k + 1],
                cos_lo,
                cos_hi,
                phi_start_rad,
                first_cell,
                cells: prob.len() - first_cell,
            });
        }
        let total: f64 = prob.iter().sum();
        if !(total > 0.0 && total.is_finite()) {
            return None;
        }
        let density_sr = prob
            .iter()
            .zip(&solid_angle)
            .map(|(p, sr)| if *sr > 0.0 { p / total / sr } else { 0.0 })
            .collect();
        Some(Self {
            rings,
            phi_hi_offset_rad,
            cell_ring,
            cdf: cumulative(&prob),
            density_sr,
        })
    }

    /// Draws `(cos θ, φ_rad)` from two uniform numbers (the first picks the
    /// cell and, remapped, gives cos θ; the second gives φ):
    /// the cell by its probability, then uniformly in solid angle within it.
    #[must_use]
    pub fn sample(&self, u_cell: f64, u_phi: f64) -> (f64, f64) {
        let (i, v) = pick(&self.cdf, u_cell);
        let ring = &self.rings[self.cell_ring[i] as usize];
        let cos_theta = ring.cos_lo + v * (ring.cos_hi - ring.cos_lo);
        let phi_lo = if i == ring.first_cell {
            0.0
        } else {
            self.phi_hi_offset_rad[i - 1]
        };
        let phi_hi = self.phi_hi_offset_rad[i];
        let phi = ring.phi_start_rad + phi_lo + u_phi * (phi_hi - phi_lo);
        (cos_theta, phi)
    }

    /// Probability density per steradian at polar angle `theta_rad` ∈ [0, π/2]
    /// and azimuth `phi_rad` (any turn).
    #[must_use]
    pub fn density(&self, theta_rad: f64, phi_rad: f64) -> f64 {
        if !(0.0..=FRAC_PI_2).contains(&theta_rad) {
            return 0.0;
        }
        let k = self
            .rings
            .partition_point(|r| r.theta_hi_rad <= theta_rad)
            .min(self.rings.len() - 1);
        let ring = &self.rings[k];
        let offset = (phi_rad - ring.phi_start_rad).rem_euclid(TAU);
        let cells = &self.phi_hi_offset_rad[ring.first_cell..ring.first_cell + ring.cells];
        let j = cells.partition_point(|&e| e <= offset).min(ring.cells - 1);
        self.density_sr[ring.first_cell + j]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sphere_table_density_integrates_to_one() {
        // Common practice, no source: a normalized density integrates to 1.
        let mut rx = Vec::new();
        for t in 0..=9 {
            for p in 0..12 {
                let theta = f64::from(t) * 10f64.to_radians();
                let phi = f64::from(p) * 30f64.to_radians();
                rx.push((theta, phi, 1.0 + f64::from(t * p % 5)));
            }
        }
        let table = SphereTable::new(&rx, false).unwrap();
        let n = 400;
        let mut sum = 0.0;
        for i in 0..n {
            let cos_t = (i as f64 + 0.5) / n as f64;
            for j in 0..n {
                let phi = (j as f64 + 0.5) / n as f64 * TAU;
                sum += table.density(cos_t.acos(), phi) * (1.0 / n as f64) * (TAU / n as f64);
            }
        }
        assert!((sum - 1.0).abs() < 2e-3, "integral {sum}");
    }

    #[test]
    fn arc_table_density_integrates_to_one() {
        let rx: Vec<(f64, f64)> = (-18..=18)
            .map(|i| (f64::from(i * 5).to_radians(), 1.0 + f64::from(i).abs()))
            .collect();
        let table = ArcTable::new(&rx).unwrap();
        let n = 100_000;
        let h = std::f64::consts::PI / n as f64;
        let sum: f64 = (0..n)
            .map(|i| table.density(-FRAC_PI_2 + (i as f64 + 0.5) * h) * h)
            .sum();
        assert!((sum - 1.0).abs() < 1e-6, "integral {sum}");
    }
}
