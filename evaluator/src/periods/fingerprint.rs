//! An Sp(2g, Z)-invariant of a Riemann matrix: the multiset of theta[m](0 | tau)^8 over
//! even characteristics m, up to one common factor. Under Sp(2g, Z) the even theta constants
//! are permuted and multiplied by one common modular factor (up to eighth roots of unity,
//! which the eighth power removes; common practice, e.g. Igusa, *Theta Functions*, 1972, V.1).
//! The values are divided by the one of largest modulus: dividing by their sum, the other
//! natural choice, fails where that sum (a weight-4 modular form) vanishes, as it does for
//! y^2 = x^5 - 1. Used to compare matrices from different homology bases.

use crate::theta::{Characteristic, ThetaContext, ThetaError};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

/// All even half-integer characteristics of genus g.
pub fn even_characteristics(g: usize) -> Vec<Characteristic> {
    let mut out = vec![];
    for bits in 0..(1u32 << (2 * g)) {
        let a: Vec<f64> = (0..g).map(|k| 0.5 * ((bits >> k) & 1) as f64).collect();
        let b: Vec<f64> = (0..g).map(|k| 0.5 * ((bits >> (g + k)) & 1) as f64).collect();
        let ch = Characteristic { a, b };
        if ch.is_even() == Some(true) {
            out.push(ch);
        }
    }
    out
}

/// The fingerprint values and a bound on their errors (from the theta truncation only).
pub fn theta_fingerprint(tau: &DMatrix<C64>) -> Result<(Vec<C64>, f64), ThetaError> {
    let g = tau.nrows();
    let ctx = ThetaContext::new(tau, 1e-8)?;
    let z = vec![C64::new(0.0, 0.0); g];
    let mut eighth = vec![];
    let mut rel: f64 = 0.0;
    for ch in even_characteristics(g) {
        let v = ctx.eval(&z, Some(&ch), &[], 1e-15)?;
        let t = v.full();
        eighth.push(t.powi(8));
        rel = rel.max(8.0 * v.full_error() / t.norm().max(1e-300));
    }
    let top = *eighth.iter().max_by(|a, b| a.norm().total_cmp(&b.norm())).expect("genus >= 1");
    Ok((eighth.iter().map(|v| v / top).collect(), 2.0 * rel))
}

/// Distance between two fingerprints as multisets up to the choice of the largest value:
/// when several values tie for the largest modulus, each is tried as the normaliser.
pub fn fingerprint_distance(xs: &[C64], ys: &[C64]) -> f64 {
    let top = ys.iter().map(|y| y.norm()).fold(0.0, f64::max);
    ys.iter()
        .filter(|y| y.norm() >= top * (1.0 - 1e-6))
        .map(|&y0| multiset_distance(xs, &ys.iter().map(|y| y / y0).collect::<Vec<_>>()))
        .fold(f64::INFINITY, f64::min)
}

/// Largest distance between two multisets of equal size under a greedy nearest matching.
pub fn multiset_distance(xs: &[C64], ys: &[C64]) -> f64 {
    if xs.len() != ys.len() {
        return f64::INFINITY;
    }
    let mut free: Vec<C64> = ys.to_vec();
    let mut worst: f64 = 0.0;
    for x in xs {
        let (k, d) = free
            .iter()
            .enumerate()
            .map(|(k, y)| (k, (y - x).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .expect("same length");
        worst = worst.max(d);
        free.swap_remove(k);
    }
    worst
}
