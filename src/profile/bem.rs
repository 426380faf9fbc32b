//! A 2D boundary element check for rigid extruded profiles, where the
//! Kirchhoff prediction is doubtful (low frequency, grazing, deep relief).
//!
//! The profile becomes the top of a closed rigid body of a given thickness
//! (sides and a flat back added). Boundary integral equation for the total
//! pressure on a rigid boundary, n out of the body into the air:
//! ½ p(x) − ∫ p(y) ∂G(x, y)/∂n_y dS_y = p_i(x), G = (−j/4) H0^(2)(k|x − y|),
//! solved by collocation at the midpoints of constant elements (the self term
//! of a straight element vanishes). The scattered field is then
//! p_s(X) = ∫ p(y) ∂G(X, y)/∂n_y dS_y. Limits: the closed-body equation fails
//! near the interior Dirichlet eigenfrequencies of the body (the first at about
//! c / (2 · thickness) for a thin slab), so keep the thickness small; element
//! integrals use 4-point Gauss–Legendre; elements ≤ λ/10 are advised.

use num_complex::Complex64;

use super::green::green_2d;
use super::surface::{Panel, Reflection, Surface1d};

/// Gauss–Legendre nodes and weights on [−1, 1], 4 points (Abramowitz & Stegun 25.4.30).
const GAUSS: [(f64, f64); 4] = [
    (-0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
    (-0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
    (0.339_981_043_584_856_3, 0.652_145_154_862_546_1),
    (0.861_136_311_594_052_6, 0.347_854_845_137_453_9),
];

/// The BEM system could not be solved.
#[derive(Debug, thiserror::Error, PartialEq)]
pub enum BemError {
    /// The matrix is singular to working precision (an interior resonance of
    /// the closed body, or a degenerate mesh).
    #[error("the boundary element system is singular; change the body thickness or the frequency slightly")]
    Singular,
    /// The top surface holds wells, which this check does not model.
    #[error(
        "the boundary element check models rigid profiles only (flat, sinusoid, points), not wells"
    )]
    NotRigid,
}

fn straight(a: [f64; 2], b: [f64; 2], n: usize) -> Vec<Panel> {
    (0..n)
        .map(|i| {
            let t0 = i as f64 / n as f64;
            let t1 = (i + 1) as f64 / n as f64;
            let p = |t: f64| [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t];
            let (p0, p1) = (p(t0), p(t1));
            let (dx, dz) = (p1[0] - p0[0], p1[1] - p0[1]);
            let len = dx.hypot(dz);
            let t = [dx / len, dz / len];
            Panel {
                mid_m: [0.5 * (p0[0] + p1[0]), 0.5 * (p0[1] + p1[1])],
                tangent: t,
                normal: [-t[1], t[0]],
                length_m: len,
                reflection: Reflection::Rigid,
            }
        })
        .collect()
}

/// Closes a rigid top surface into a body: right side down to
/// `thickness_m` below the lowest point of the top, a flat back, left side up;
/// elements ≤ `step_m`.
/// Normals point out of the body.
pub fn closed_body(top: &Surface1d, thickness_m: f64, step_m: f64) -> Result<Vec<Panel>, BemError> {
    if top.panels.iter().any(|p| p.reflection != Reflection::Rigid) {
        return Err(BemError::NotRigid);
    }
    let end = |p: &Panel, s: f64| {
        [
            p.mid_m[0] + s * 0.5 * p.length_m * p.tangent[0],
            p.mid_m[1] + s * 0.5 * p.length_m * p.tangent[1],
        ]
    };
    let (first, last) = (&top.panels[0], &top.panels[top.panels.len() - 1]);
    let (a, b) = (end(first, -1.0), end(last, 1.0));
    let lowest = top
        .panels
        .iter()
        .flat_map(|p| [end(p, -1.0)[1], end(p, 1.0)[1]])
        .fold(f64::INFINITY, f64::min);
    let bottom = lowest - thickness_m;
    let count = |len: f64| ((len / step_m - 1e-9).ceil() as usize).max(1);
    let mut out = top.panels.clone();
    let (rb, lb) = ([b[0], bottom], [a[0], bottom]);
    out.extend(straight(b, rb, count(b[1] - bottom)));
    out.extend(straight(rb, lb, count(b[0] - a[0])));
    out.extend(straight(lb, a, count(a[1] - bottom)));
    Ok(out)
}

/// ∫ over element `p` of ∂G(x, y)/∂n_y dS_y.
fn dgdn_integral(p: &Panel, x: [f64; 2], k: f64) -> Complex64 {
    let mut sum = Complex64::new(0.0, 0.0);
    for (s, w) in GAUSS {
        let y = [
            p.mid_m[0] + s * 0.5 * p.length_m * p.tangent[0],
            p.mid_m[1] + s * 0.5 * p.length_m * p.tangent[1],
        ];
        let r = [y[0] - x[0], y[1] - x[1]];
        let d = r[0].hypot(r[1]);
        let (_, dg) = green_2d(k, d);
        sum += dg * ((r[0] * p.normal[0] + r[1] * p.normal[1]) / d) * (w * 0.5 * p.length_m);
    }
    sum
}

/// Solves A x = b in place by Gaussian elimination with partial pivoting.
fn solve(mut a: Vec<Vec<Complex64>>, mut b: Vec<Complex64>) -> Result<Vec<Complex64>, BemError> {
    let n = b.len();
    for col in 0..n {
        let piv = (col..n)
            .max_by(|&i, &j| a[i][col].norm().total_cmp(&a[j][col].norm()))
            .unwrap_or(col);
        if a[piv][col].norm() < 1e-14 {
            return Err(BemError::Singular);
        }
        a.swap(col, piv);
        b.swap(col, piv);
        for row in col + 1..n {
            let f = a[row][col] / a[col][col];
            if f == Complex64::new(0.0, 0.0) {
                continue;
            }
            let (upper, lower) = a.split_at_mut(row);
            for (dst, src) in lower[0][col..].iter_mut().zip(&upper[col][col..]) {
                *dst -= f * src;
            }
            let v = b[col];
            b[row] -= f * v;
        }
    }
    let mut x = vec![Complex64::new(0.0, 0.0); n];
    for row in (0..n).rev() {
        let mut s = b[row];
        for c in row + 1..n {
            s -= a[row][c] * x[c];
        }
        x[row] = s / a[row][row];
    }
    Ok(x)
}

/// Scattered pressure of a closed rigid body (from [`closed_body`]) at each
/// receiver, for a unit line source at `source_m`, wavenumber `k_per_m`;
/// same normalization as [`super::kirchhoff::scattered_2d`].
pub fn scattered_bem_2d(
    body: &[Panel],
    source_m: [f64; 2],
    receivers_m: &[[f64; 2]],
    k_per_m: f64,
) -> Result<Vec<Complex64>, BemError> {
    let n = body.len();
    let mut a = vec![vec![Complex64::new(0.0, 0.0); n]; n];
    let mut b = Vec::with_capacity(n);
    for (i, pi) in body.iter().enumerate() {
        for (j, pj) in body.iter().enumerate() {
            a[i][j] = if i == j {
                Complex64::new(0.5, 0.0)
            } else {
                -dgdn_integral(pj, pi.mid_m, k_per_m)
            };
        }
        let d = (pi.mid_m[0] - source_m[0]).hypot(pi.mid_m[1] - source_m[1]);
        b.push(green_2d(k_per_m, d).0);
    }
    let p = solve(a, b)?;
    Ok(receivers_m
        .iter()
        .map(|&x| {
            body.iter()
                .zip(&p)
                .map(|(panel, &pj)| pj * dgdn_integral(panel, x, k_per_m))
                .sum()
        })
        .collect())
}
