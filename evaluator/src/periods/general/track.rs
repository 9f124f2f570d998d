//! Analytic continuation of the fibre roots of G(x, y) = 0 along a path in the x-plane.
//!
//! Each step predicts the roots at the new x with the tangent dy/dx = -G_x / G_y and
//! corrects them with Newton's method. A step from x0 to x1 is accepted only with a
//! certificate that covers the whole disc |x - x0| <= |x1 - x0|, not just its end points:
//!
//! 1. every root y_j at x0 passed Smale's alpha test (alpha = beta gamma < 0.03: an exact
//!    root lies within 2 beta; Blum, Cucker, Shub & Smale, *Complexity and Real
//!    Computation* (1998), ch. 8), and the discs D_j of radius rho_j = sep_j / 3 about
//!    them are pairwise disjoint (sep_j: distance to the nearest other root);
//! 2. Rouché's theorem on a circle of radius rho_j about each root, for every x = x0 + s
//!    with |s| <= h = |x1 - x0|. The reference is G(x0, y) itself (a fixed disc) or,
//!    where that bound is too weak, G(x0, y - s v_j) with v_j = -G_x / G_y, the fibre
//!    shifted along the root's tangent (a disc moving with the root, so the first-order
//!    change cancels; near a singular point this allows steps several times longer).
//!    Either reference is lc prod (y - exact roots) up to that shift, so on the circle
//!    it is at least L_j = |lc| (rho_j - 2 beta_j) prod_k (|y_j - y_k| - rho_j - 2 beta_k);
//!    the difference from G(x0 + s, y) is at most U_j, a sum over Taylor coefficients at
//!    (x0, y_j) times h^i R^k (`Rouche`). U_j < L_j / 2 (half, for rounding), and the
//!    discs staying pairwise disjoint for every s, mean that every x in the disc has
//!    exactly one root in each disc: no root can leave its disc or swap with another
//!    anywhere on the step;
//! 3. each corrected root at x1 passes the alpha test and its exact root (within 2 beta)
//!    lies inside its disc at x1, so it is the continuation of y_j.
//!
//! A failing step is halved. The bounds are evaluated in double arithmetic with that
//! factor of two as margin, not in interval arithmetic.

use super::plane::{horner, taylor, Plane};
use num_complex::Complex64 as C64;

const ALPHA_MAX: f64 = 0.03;

/// Smale's beta and alpha of p at y.
fn alpha_beta(p: &[C64], y: C64) -> (f64, f64) {
    let t = taylor(p, y);
    let d1 = t[1].norm();
    if d1 == 0.0 {
        return (f64::INFINITY, f64::INFINITY);
    }
    let beta = t[0].norm() / d1;
    let gamma = (2..t.len()).map(|k| (t[k].norm() / d1).powf(1.0 / (k as f64 - 1.0))).fold(0.0, f64::max);
    (beta * gamma, beta)
}

/// The nearest other root's distance for each root.
pub fn separations(ys: &[C64]) -> Vec<f64> {
    (0..ys.len())
        .map(|j| (0..ys.len()).filter(|&k| k != j).map(|k| (ys[j] - ys[k]).norm()).fold(f64::INFINITY, f64::min))
        .collect()
}

/// Rouché upper bounds on the change of G over |x - x0| <= h near each root. b_i(y) is
/// the coefficient of (x - x0)^i, a polynomial in y.
struct Rouche {
    /// b_i for i = 0..=d.
    b: Vec<Vec<C64>>,
    h: f64,
}

/// sum over k of |c_k| r^k.
fn modulus_sum(c: &[C64], r: f64) -> f64 {
    c.iter().rev().fold(0.0, |s, a| s * r + a.norm())
}

impl Rouche {
    fn new(g: &Plane, x0: C64, h: f64) -> Rouche {
        let shifted: Vec<Vec<C64>> = g.c.iter().map(|row| taylor(row, x0)).collect();
        let b = (0..=g.d).map(|i| shifted.iter().map(|t| t.get(i).copied().unwrap_or_default()).collect()).collect();
        Rouche { b, h }
    }

    /// Fixed disc, cheap: |G(x, y) - G(x0, y)| for |y - y_j| <= rho, with b_1 = G_x
    /// bounded by its Taylor coefficients at y (so G_x's own size enters, not the sum of
    /// its terms' sizes) and the terms carrying h^2 or less by |coefficients| at |y| + rho.
    fn fixed(&self, y: C64, rho: f64) -> f64 {
        let big = y.norm() + rho;
        let rest = self.b[2..].iter().rev().fold(0.0, |acc, bi| (acc + modulus_sum(bi, big)) * self.h);
        (modulus_sum(&taylor(&self.b[1], y), rho) + rest) * self.h
    }

    /// Moving disc: |G(x0 + s, y) - G(x0, y - s v)| for |s| <= h, |y - y_j| <= rho + h |v|.
    /// With a_ik the Taylor coefficients of G at (x0, y_j), the difference has the
    /// coefficients a_ik - C(i + k, i) (-v)^i a_0,i+k of s^i w^k (none for i = 0).
    fn moving(&self, y: C64, v: C64, rho: f64) -> f64 {
        let a: Vec<Vec<C64>> = self.b.iter().map(|bi| taylor(bi, y)).collect();
        let r = rho + self.h * v.norm();
        let mut total = 0.0;
        let mut hi = 1.0;
        let mut minus_v_i = C64::new(1.0, 0.0);
        for i in 1..a.len() {
            hi *= self.h;
            minus_v_i *= -v;
            let mut binom = 1.0; // C(i + k, i), k = 0
            let mut rk = 1.0;
            for k in 0..a[i].len() {
                let shifted = a[0].get(i + k).map_or(C64::new(0.0, 0.0), |c| c * minus_v_i * binom);
                total += hi * rk * (a[i][k] - shifted).norm();
                rk *= r;
                binom *= (i + k + 1) as f64 / (k + 1) as f64;
            }
        }
        total
    }
}

/// One attempted step from (x0, ys) with alpha-certified radii `betas` to x1; the new
/// roots and their betas, or `None` when the step is not certified.
fn attempt(g: &Plane, x0: C64, ys: &[C64], betas: &[f64], x1: C64) -> Option<(Vec<C64>, Vec<f64>)> {
    let (p0, p0x) = (g.fibre(x0), g.fibre_dx(x0));
    let p1 = g.fibre(x1);
    let sep = separations(ys);
    let rho: Vec<f64> = sep.iter().map(|s| s / 3.0).collect();
    let h = x1 - x0;
    // Each root's tangent, and the velocity of its disc's centre: 0 for a fixed disc.
    let lc = p0.last().map_or(0.0, |c| c.norm());
    let rouche = Rouche::new(g, x0, h.norm());
    let mut tangent = Vec::with_capacity(ys.len());
    let mut centre = Vec::with_capacity(ys.len());
    for (j, &y) in ys.iter().enumerate() {
        let (_, gy) = horner(&p0, y);
        let (gx, _) = horner(&p0x, y);
        let v = -gx / gy;
        tangent.push(v);
        let mut lower = lc * (rho[j] - 2.0 * betas[j]);
        for k in 0..ys.len() {
            if k != j {
                lower *= (ys[j] - ys[k]).norm() - rho[j] - 2.0 * betas[k];
            }
        }
        if !(lower > 0.0 && v.re.is_finite() && v.im.is_finite()) {
            return None;
        }
        if rouche.fixed(y, rho[j]) < 0.5 * lower {
            centre.push(C64::new(0.0, 0.0));
        } else if rouche.moving(y, v, rho[j]) < 0.5 * lower {
            centre.push(v);
        } else {
            return None;
        }
    }
    // The discs stay apart for every x in the step.
    for j in 0..ys.len() {
        for k in j + 1..ys.len() {
            if (ys[j] - ys[k]).norm() - h.norm() * (centre[j] - centre[k]).norm() <= rho[j] + rho[k] {
                return None;
            }
        }
    }
    let mut out = Vec::with_capacity(ys.len());
    for (&y, &v) in ys.iter().zip(&tangent) {
        let mut z = y + h * v;
        for _ in 0..6 {
            let (v, dv) = horner(&p1, z);
            if dv.norm() == 0.0 {
                return None;
            }
            let s = v / dv;
            z -= s;
            if s.norm() <= 1e-16 * (1.0 + z.norm()) {
                break;
            }
        }
        if !z.re.is_finite() || !z.im.is_finite() {
            return None;
        }
        out.push(z);
    }
    let ab: Vec<(f64, f64)> = out.iter().map(|&z| alpha_beta(&p1, z)).collect();
    for j in 0..out.len() {
        // The exact root near out[j] lies in y_j's disc: it is y_j continued.
        if !(ab[j].0 < ALPHA_MAX) || (out[j] - ys[j] - h * centre[j]).norm() + 2.0 * ab[j].1 >= rho[j] {
            return None;
        }
    }
    Some((out, ab.into_iter().map(|(_, b)| b).collect()))
}

/// Certified radii (2 beta) of the roots `ys` of the fibre over x, or an error when the
/// alpha test fails for one of them or two of their discs meet.
fn certify(g: &Plane, x: C64, ys: &[C64]) -> Result<Vec<f64>, String> {
    let p = g.fibre(x);
    let ab: Vec<(f64, f64)> = ys.iter().map(|&y| alpha_beta(&p, y)).collect();
    let bad = || format!("the fibre over x = {:.6} {:+.6}i could not be certified (roots too close)", x.re, x.im);
    if ab.iter().any(|&(a, _)| !(a < ALPHA_MAX)) {
        return Err(bad());
    }
    for j in 0..ys.len() {
        for k in j + 1..ys.len() {
            if (ys[j] - ys[k]).norm() <= 2.0 * (ab[j].1 + ab[k].1) {
                return Err(bad());
            }
        }
    }
    Ok(ab.into_iter().map(|(_, b)| b).collect())
}

/// Continues `ys` (the fibre over x0, in sheet order) to x1, keeping the order; returns the
/// roots with their certified radii. `betas`: those radii when the previous call gave them.
pub fn continue_to(
    g: &Plane,
    x0: C64,
    ys: &[C64],
    betas: Option<Vec<f64>>,
    x1: C64,
    steps: &mut usize,
) -> Result<(Vec<C64>, Vec<f64>), String> {
    let mut x = x0;
    let mut cur = ys.to_vec();
    let mut betas = match betas {
        Some(b) => b,
        None => certify(g, x0, ys)?,
    };
    let mut frac = 1.0f64;
    let total = x1 - x0;
    let mut done = 0.0f64;
    while done < 1.0 {
        crate::limits::checkpoint();
        let take = frac.min(1.0 - done);
        let next = if done + take >= 1.0 { x1 } else { x0 + total * (done + take) };
        match attempt(g, x, &cur, &betas, next) {
            Some((v, b)) => {
                cur = v;
                betas = b;
                x = next;
                done += take;
                *steps += 1;
                frac = (take * 2.0).min(1.0);
            }
            None => {
                frac = take / 2.0;
                if frac * total.norm() < 1e-13 * (1.0 + x.norm()) {
                    return Err(format!(
                        "root continuation stalled near x = {:.6} {:+.6}i (two sheets meet too closely)",
                        x.re, x.im
                    ));
                }
            }
        }
    }
    Ok((cur, betas))
}
