//! Analytic continuation of the fibre roots of G(x, y) = 0 along a path in the x-plane.
//!
//! Each step predicts the roots at the new x with the tangent dy/dx = -G_x / G_y,
//! corrects them with Newton's method, and accepts the step only if (1) every corrected
//! root passes Smale's alpha test (alpha = beta gamma < 0.03: Newton converges
//! quadratically to a root within 2 beta; Blum, Cucker, Shub & Smale, *Complexity and
//! Real Computation* (1998), ch. 8), (2) the discs of radius 2 beta about the roots are
//! pairwise disjoint, so they are d distinct roots, and (3) each root moved less than a
//! third of its distance to the others at the old x, so none can have swapped places
//! with another. A failing step is halved. This certifies the fibre at every accepted
//! point; between points the path is covered by the step control (3), not by an
//! interval bound.

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

/// One attempted step from (x0, ys) to x1; `None` when it is not certified.
fn attempt(g: &Plane, x0: C64, ys: &[C64], x1: C64) -> Option<Vec<C64>> {
    let (p0, p0x) = (g.fibre(x0), g.fibre_dx(x0));
    let p1 = g.fibre(x1);
    let sep = separations(ys);
    let h = x1 - x0;
    let mut out = Vec::with_capacity(ys.len());
    for (j, &y) in ys.iter().enumerate() {
        let (_, gy) = horner(&p0, y);
        let (gx, _) = horner(&p0x, y);
        let pred = y - h * gx / gy;
        let mut z = pred;
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
        if !z.re.is_finite() || !z.im.is_finite() || (z - y).norm() >= sep[j] / 3.0 || (z - pred).norm() >= sep[j] / 8.0
        {
            return None;
        }
        out.push(z);
    }
    let ab: Vec<(f64, f64)> = out.iter().map(|&z| alpha_beta(&p1, z)).collect();
    if ab.iter().any(|&(a, _)| !(a < ALPHA_MAX)) {
        return None;
    }
    for j in 0..out.len() {
        for k in j + 1..out.len() {
            if (out[j] - out[k]).norm() <= 2.0 * (ab[j].1 + ab[k].1) {
                return None;
            }
        }
    }
    Some(out)
}

/// Continues `ys` (the fibre over x0, in sheet order) to x1, keeping the order.
pub fn continue_to(g: &Plane, x0: C64, ys: &[C64], x1: C64, steps: &mut usize) -> Result<Vec<C64>, String> {
    let mut x = x0;
    let mut cur = ys.to_vec();
    let mut frac = 1.0f64;
    let total = x1 - x0;
    let mut done = 0.0f64;
    while done < 1.0 {
        let take = frac.min(1.0 - done);
        let next = if done + take >= 1.0 { x1 } else { x0 + total * (done + take) };
        match attempt(g, x, &cur, next) {
            Some(v) => {
                cur = v;
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
    Ok(cur)
}
