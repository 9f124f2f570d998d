//! Sums of the moduli of theta's terms weighted by powers of |n|:
//! P_k = sum_n (2 pi |n|)^k |exp(pi i n.tau n + 2 pi i n.z)|, divided by exp(log_factor) like
//! the engine's values. They bound how far theta and its Taylor coefficients can move when z
//! moves: |d/ds coeff(z + s dz)| <= |dz| P_(order + 1) |U|^a |V|^b |W|^c / (a! b! c!).
//!
//! The moduli are the terms of theta(i Im z | i Y) (all positive), and
//! (-Laplacian)^m theta(i Im z | i Y) = sum (4 pi^2 |n|^2)^m (terms): so P_(2m) is one engine
//! pass over the lattice of i Y with upper bounds (value + error); odd k by Cauchy–Schwarz,
//! P_(2m+1) <= sqrt(P_(2m) P_(2m+2)).

use crate::theta::{ThetaContext, ThetaError};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
use std::sync::{Mutex, OnceLock};

/// P_0 ..= P_8.
pub type Moments = [f64; 9];

/// The context of i Y and the last Im z's moments (along a real wave Im z is constant).
#[derive(Default)]
pub struct MomentCache {
    ctx: OnceLock<Result<ThetaContext, ThetaError>>,
    last: Mutex<Option<(Vec<f64>, f64, Moments)>>,
}

impl Clone for MomentCache {
    fn clone(&self) -> Self {
        MomentCache::default()
    }
}

/// Multi-indices alpha of total m in g variables.
fn compositions(g: usize, m: u32) -> Vec<Vec<u32>> {
    if g == 1 {
        return vec![vec![m]];
    }
    (0..=m)
        .flat_map(|k| {
            compositions(g - 1, m - k).into_iter().map(move |mut rest| {
                rest.insert(0, k);
                rest
            })
        })
        .collect()
}

fn fact(n: u32) -> f64 {
    (1..=n).map(|k| k as f64).product()
}

impl MomentCache {
    /// The moments at Im z, relative to exp(`log_factor`) (the main pass's factor).
    pub fn at(&self, tau: &DMatrix<C64>, imz: &[f64], log_factor: f64) -> Result<Moments, ThetaError> {
        if let Some((y, lf, m)) = self.last.lock().unwrap().as_ref() {
            if y.as_slice() == imz {
                return Ok(scaled(*m, *lf, log_factor));
            }
        }
        let ctx = self
            .ctx
            .get_or_init(|| ThetaContext::new(&tau.map(|v| C64::new(0.0, v.im)), 1e-8))
            .as_ref()
            .map_err(Clone::clone)?;
        let g = imz.len();
        let z: Vec<C64> = imz.iter().map(|&v| C64::new(0.0, v)).collect();
        let dirs: Vec<Vec<C64>> =
            (0..g).map(|j| (0..g).map(|i| C64::new(if i == j { 1.0 } else { 0.0 }, 0.0)).collect()).collect();
        let mut monos = vec![];
        let mut weights = vec![];
        for m in 0..=4u32 {
            for a in compositions(g, m) {
                weights.push((m, fact(m) / a.iter().map(|&k| fact(k)).product::<f64>()));
                monos.push(a.iter().map(|k| 2 * k).collect::<Vec<u32>>());
            }
        }
        let (vals, _) = ctx.sums(&z, None, &dirs, &monos, 1e-15)?;
        let lf = vals[0].log_factor;
        let mut even = [0.0f64; 5];
        let mut errs = [0.0f64; 5];
        for ((m, w), v) in weights.iter().zip(&vals) {
            // Each value is relative to its own factor; all share lf here (one pass).
            let sign = if m % 2 == 0 { 1.0 } else { -1.0 };
            even[*m as usize] += sign * w * v.value.re;
            errs[*m as usize] += w * (v.error + v.value.im.abs());
        }
        let mut p = [0.0f64; 9];
        for m in 0..5 {
            // Summation rounding: at most 40 terms of size <= the bound itself.
            p[2 * m] = (even[m].abs() + errs[m]) * (1.0 + 64.0 * f64::EPSILON);
        }
        for k in (1..9).step_by(2) {
            p[k] = (p[k - 1] * p[k + 1]).sqrt() * (1.0 + 2.0 * f64::EPSILON);
        }
        if p.iter().any(|v| !v.is_finite()) {
            return Err(ThetaError::NotFinite);
        }
        *self.last.lock().unwrap() = Some((imz.to_vec(), lf, p));
        Ok(scaled(p, lf, log_factor))
    }
}

fn scaled(p: Moments, lf: f64, log_factor: f64) -> Moments {
    let f = (lf - log_factor).exp() * (1.0 + 4.0 * f64::EPSILON * (1.0 + (lf - log_factor).abs()));
    p.map(|v| v * f)
}

#[cfg(test)]
mod tests {
    use super::*;

    // Genus 1, tau = i, z = 0: P_0 = sum exp(-pi n^2) = 1.0864348112133080 and
    // P_2 = 4 pi^2 sum n^2 exp(-pi n^2), sum n^2 exp(-pi n^2) = 0.08645573527585404 (both by
    // mpmath.nsum at 30 digits).
    #[test]
    fn genus_one_moments_bound_the_sums() {
        let tau = DMatrix::from_element(1, 1, C64::new(0.0, 1.0));
        let p = MomentCache::default().at(&tau, &[0.0], 0.0).unwrap();
        assert!(p[0] >= 1.0864348112133080 && p[0] < 1.0864348112133080 * (1.0 + 1e-13), "{p:?}");
        let want2 = 4.0 * std::f64::consts::PI.powi(2) * 0.08645573527585404;
        assert!(p[2] >= want2 * (1.0 - 1e-11) && p[2] < want2 * (1.0 + 1e-10), "{p:?} vs {want2}");
        assert!(p[1] <= (p[0] * p[2]).sqrt() * 1.0001 && p[1] > 0.0);
    }
}
