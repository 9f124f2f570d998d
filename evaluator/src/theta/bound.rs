//! The truncation bound of theta sums, and the ellipsoid radius chosen from it.
//!
//! Let C be upper triangular with C^T C = pi Y and diagonal gamma_j, w = C (m + c) the
//! image of a summation point m (n + a) around the centre -c = -Y^-1 Im z. After the
//! exponential factor exp(pi Im z^T Y^-1 Im z) is taken out, the term of m has modulus
//! exp(-|w|^2). Derived here (the method of the published bounds: Deconinck, Heil, Bobenko,
//! van Hoeij, Schmies, Math. Comp. 73 (2004), and FLINT's acb_theta documentation):
//!
//! * summing over integers a unimodal function f gives at most max f + integral of f, so
//!   level by level along the triangular structure of C,
//!   sum over all m of exp(-s |w|^2) <= prod_j (1 + sqrt(pi / s) / gamma_j);
//! * outside the ball |w| > R, exp(-|w|^2) <= exp(-t R^2) exp(-(1 - t)|w|^2);
//! * a derivative of total order k along directions d_i multiplies a term by
//!   prod |2 pi m.d_i| <= W (kappa |w| + |c|)^k with W = prod 2 pi |d_i|,
//!   kappa = ||C^-1||_2 = 1 / sqrt(pi lambda_min(Y)), and for |w| >= R,
//!   (kappa |w| + |c|)^k <= (kappa R + |c|)^k exp(k (|w|^2 / R^2 - 1) / 2).
//!
//! With t chosen as 1 - 1 / (R^2 - k/2) these combine into
//!   tail(R) <= e W (kappa R + |c|)^k exp(-R^2) prod_j (1 + sqrt(pi) R / gamma_j),
//! valid for R^2 >= k/2 + 2.

use std::f64::consts::PI;

/// What the bound needs to know about one sum.
#[derive(Clone, Debug)]
pub struct TailInput<'a> {
    /// Diagonal of the (reduced) upper-triangular factor of pi Y.
    pub gammas: &'a [f64],
    /// ||C^-1||_2.
    pub kappa: f64,
    /// |c + a|, the distance of the centre from the origin (Euclidean).
    pub centre: f64,
    /// Total derivative order.
    pub order: u32,
    /// prod over directions of 2 pi |d_i|.
    pub weight: f64,
}

/// Upper bound of the sum of |term| over all points outside |w| <= R.
pub fn tail(inp: &TailInput, r: f64) -> f64 {
    log_tail(inp, r).exp()
}

fn log_tail(inp: &TailInput, r: f64) -> f64 {
    let k = inp.order as f64;
    if r * r < k / 2.0 + 2.0 {
        return f64::INFINITY;
    }
    // ln(e) = 1
    1.0 + inp.weight.ln() + k * (inp.kappa * r + inp.centre).ln() - r * r
        + inp.gammas.iter().map(|g| (1.0 + PI.sqrt() * r / g).ln()).sum::<f64>()
}

/// A radius (within 0.1% of the smallest) whose tail bound is at most `eps`: Newton's
/// method on log tail(R) - log eps, which is concave and decreasing past its
/// maximum, then a check.
pub fn radius(inp: &TailInput, eps: f64) -> f64 {
    let k = inp.order as f64;
    let r_min = (k / 2.0 + 2.0).sqrt();
    let target = eps.ln();
    let phi = |r: f64| log_tail(inp, r) - target;
    let dphi = |r: f64| {
        k * inp.kappa / (inp.kappa * r + inp.centre) - 2.0 * r
            + inp.gammas.iter().map(|g| PI.sqrt() / (g + PI.sqrt() * r)).sum::<f64>()
    };
    let mut r = r_min.max((-target).max(0.0).sqrt());
    for _ in 0..50 {
        let (f, d) = (phi(r), dphi(r));
        if f <= 0.0 && f > -1e-3 {
            break;
        }
        if d >= 0.0 {
            r *= 1.5; // still left of the maximum: step out
            continue;
        }
        r = (r - f / d).max(r_min);
    }
    while phi(r) > 0.0 && r < 1e6 {
        r *= 1.001;
    }
    r
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_genus_one_tail_bounds_the_true_tail() {
        // Y = 1: terms exp(-pi n^2); the true tail outside |w| = sqrt(pi)|n| <= R is a
        // direct sum (common practice, no source: it is the definition).
        let gammas = [PI.sqrt()];
        let inp = TailInput { gammas: &gammas, kappa: 1.0 / PI.sqrt(), centre: 0.0, order: 0, weight: 1.0 };
        for r in [2.0, 3.0, 4.0, 5.0] {
            let true_tail: f64 =
                (-50i32..=50).filter(|&n| PI.sqrt() * (n as f64).abs() > r).map(|n| (-PI * (n * n) as f64).exp()).sum();
            assert!(true_tail <= tail(&inp, r), "R = {r}: {true_tail} > {}", tail(&inp, r));
        }
        for eps in [1e-3, 1e-12, 1e-30] {
            let r = radius(&inp, eps);
            assert!(tail(&inp, r) <= eps && tail(&inp, r * 0.998) > eps, "eps {eps}: R = {r}");
        }
        let derivs = TailInput { order: 4, weight: 1e3, centre: 30.0, ..inp };
        let r = radius(&derivs, 1e-12);
        assert!(tail(&derivs, r) <= 1e-12 && tail(&derivs, r * 0.998) > 1e-12);
    }
}
