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
    let k = inp.order as f64;
    if r * r < k / 2.0 + 2.0 {
        return f64::INFINITY;
    }
    // ln(e) = 1
    let log = 1.0 + inp.weight.ln() + k * (inp.kappa * r + inp.centre).ln() - r * r
        + inp.gammas.iter().map(|g| (1.0 + PI.sqrt() * r / g).ln()).sum::<f64>();
    log.exp()
}

/// The smallest radius (to a few percent) whose tail bound is at most `eps`.
pub fn radius(inp: &TailInput, eps: f64) -> f64 {
    let k = inp.order as f64;
    let mut lo = (k / 2.0 + 2.0).sqrt();
    if tail(inp, lo) <= eps {
        return lo;
    }
    let mut hi = lo * 2.0;
    while tail(inp, hi) > eps {
        hi *= 2.0;
        if hi > 1e6 {
            return hi;
        }
    }
    for _ in 0..40 {
        let mid = 0.5 * (lo + hi);
        if tail(inp, mid) > eps {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-3 * hi {
            break;
        }
    }
    hi
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
        let r = radius(&inp, 1e-12);
        assert!(tail(&inp, r) <= 1e-12);
    }
}
