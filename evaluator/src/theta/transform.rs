//! Theta values for small Im tau by Siegel's reduction applied to the value itself: tau is
//! moved towards the Siegel fundamental domain by unimodular changes (LLL on Im tau),
//! integer translations of Re tau and inversions in the first coordinate, the series is
//! summed there (few terms, all of moderate size), and the value is mapped back exactly.
//!
//! The three steps, derived from the defining series (each checked numerically against
//! the direct series: tests/fixtures/gen/theta_hostile.py's references):
//! * unimodular U (m = U n is a bijection of Z^g):
//!   theta[a; b](z | tau) = theta[U^-1 a; U^T b](U^T z | U^T tau U);
//! * translation by an integer symmetric S with diagonal d (n^T S n = n.d mod 2):
//!   theta[a; b](z | tau' + S) = exp(-pi i (a^T S a + a.d)) theta[a; b + S a + d/2](z | tau');
//! * inversion in the first coordinate (Poisson summation over n_1; t = tau_11, r the
//!   rest of the first row, T the rest of tau, w = z + b, principal square root since
//!   Re(-i t) > 0):
//!   theta[a; b](z | tau) = (-i t)^(-1/2) exp(-pi i w_1^2 / t)
//!     theta[(0, a'); (a_1, b')](w_1 / t, z' - r^T w_1 / t | [[-1/t, r/t], [r^T/t, T - r^T r / t]]).
//!
//! Errors follow each step to first order (checked to stay small, else no value), as
//! entrywise absolute bounds on tau and on z + b, and an absolute bound on the logarithm L
//! of the accumulated factor; characteristics are dyadic and stay exact (else the
//! transformation is not used). The reduced sum adds its own bound and the effect of its
//! inputs' errors on every term.

use super::{lattice, Characteristic, InputErrors, ThetaContext, ThetaError, ThetaValue};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

const U: f64 = f64::EPSILON / 2.0;

/// The transformation is used when Siegel's reduction would invert (the first diagonal
/// entry of the LLL-reduced tau, its real part reduced mod 1, is inside the unit disc) and
/// either by a margin (modulus below this) or when the direct series is large: just inside
/// the unit disc a small direct series is as cheap and its bound tighter.
pub const USE_BELOW: f64 = 0.5;

/// Direct series with more terms than this (a rough count at radius 6) are transformed
/// whenever the reduction would invert.
const LARGE_SERIES: f64 = 1e5;

/// Whether a real number is a dyadic rational small enough that sums of integer multiples
/// of it stay exact in binary64.
fn dyadic(v: f64) -> bool {
    v.abs() < 1e6 && (v * 1_073_741_824.0).fract() == 0.0
}

/// Whether the value of theta at tau is better computed through the transformation.
pub fn worthwhile(tau: &DMatrix<C64>) -> bool {
    let y = tau.map(|v| v.im);
    let u = lattice::lll(&y).map(|v| v as f64);
    let yr = u.transpose() * &y * &u;
    let t11 = (u.column(0).transpose() * tau.map(|v| v.re) * u.column(0))[(0, 0)];
    let x11 = t11 - t11.round();
    let m2 = x11 * x11 + yr[(0, 0)] * yr[(0, 0)];
    if m2 >= 1.0 {
        return false;
    }
    let terms: f64 = (0..yr.nrows()).map(|j| 12.0 / (PI * yr[(j, j)]).sqrt() + 1.0).product();
    m2 < USE_BELOW * USE_BELOW || terms > LARGE_SERIES
}

/// theta[ch](z | tau) with `tau_err` (entrywise) and `z_err` bounds on the inputs
/// themselves; the returned error covers them. `None` when the transformation does not
/// apply (characteristics that are not small dyadic numbers, or errors too large for
/// first-order tracking); the caller then sums directly.
pub fn eval(
    tau: &DMatrix<C64>,
    z: &[C64],
    ch: &Characteristic,
    tau_err: f64,
    z_err: f64,
    accuracy: f64,
) -> Option<Result<ThetaValue, ThetaError>> {
    let g = tau.nrows();
    if !ch.a.iter().chain(&ch.b).all(|&v| dyadic(v)) {
        return None;
    }
    let mut t = (tau + tau.transpose()).map(|v| v * 0.5);
    let mut z: Vec<C64> = z.to_vec();
    let (mut a, mut b) = (ch.a.clone(), ch.b.clone());
    // Entrywise error bounds: entries of very different sizes must not share one bound,
    // or an inversion would amplify the large entries' error into the small ones.
    let mut et = t.map(|v| tau_err + U * v.norm());
    let mut ez = vec![z_err; g];
    let (mut log, mut el) = (C64::new(0.0, 0.0), 0.0f64);
    for _ in 0..200 {
        crate::limits::checkpoint();
        // (1) LLL on Im tau.
        let y = t.map(|v| v.im);
        let u = lattice::lll(&y);
        if u != DMatrix::identity(g, g) {
            let uinv = lattice::unimodular_inverse(&u);
            let uf = u.map(|v| v as f64);
            let ua = uf.map(f64::abs);
            let uc = uf.map(|v| C64::new(v, 0.0));
            let tn = uc.transpose() * &t * &uc;
            let round = (ua.transpose() * t.map(|v| v.norm()) * &ua) * ((2.0 * g as f64 + 1.0) * U);
            et = ua.transpose() * &et * &ua + round;
            let zn: Vec<C64> = (0..g).map(|j| (0..g).map(|i| uc[(i, j)] * z[i]).sum()).collect();
            ez = (0..g).map(|j| (0..g).map(|i| ua[(i, j)] * (ez[i] + g as f64 * U * z[i].norm())).sum()).collect();
            let an: Vec<f64> = (0..g).map(|i| (0..g).map(|j| uinv[(i, j)] as f64 * a[j]).sum()).collect();
            let bn: Vec<f64> = (0..g).map(|j| (0..g).map(|i| uf[(i, j)] * b[i]).sum()).collect();
            if !an.iter().chain(&bn).all(|&v| dyadic(v)) {
                return None;
            }
            (t, z, a, b) = (tn, zn, an, bn);
        }
        // (2) Re tau into [-1/2, 1/2].
        let s = t.map(|v| v.re.round());
        if s.iter().any(|&v| v != 0.0) {
            let d: Vec<f64> = (0..g).map(|j| s[(j, j)]).collect();
            let sa: Vec<f64> = (0..g).map(|i| (0..g).map(|j| s[(i, j)] * a[j]).sum()).collect();
            let asa: f64 = (0..g).map(|i| a[i] * sa[i]).sum();
            let ad: f64 = (0..g).map(|i| a[i] * d[i]).sum();
            log += C64::new(0.0, -PI * (asa + ad));
            el += 4.0 * g as f64 * U * PI * (asa.abs() + ad.abs() + 1.0);
            t -= s.map(|v| C64::new(v, 0.0));
            et += t.map(|v| U * v.re.abs());
            b = (0..g).map(|i| b[i] + sa[i] + d[i] / 2.0).collect();
            if !b.iter().all(|&v| dyadic(v)) {
                return None;
            }
        }
        let t11 = t[(0, 0)];
        if t11.norm() >= 1.0 - 1e-12 {
            break;
        }
        // (3) Inversion in the first coordinate. Exact-input derivatives: of -1/t: 1/t^2;
        // of r/t: 1/t and r/t^2; of r_j r_k / t: r_k/t, r_j/t and r_j r_k/t^2; of w_1/t:
        // 1/t and w_1/t^2; of -log(-i t)/2 - pi i w_1^2/t: 1/(2t) + pi w_1^2/t^2 and 2 pi w_1/t.
        let tn = t11.norm();
        let e11 = et[(0, 0)];
        if e11 > 1e-3 * tn {
            return None;
        }
        let w: Vec<C64> = (0..g).map(|i| z[i] + b[i]).collect();
        let ew1 = ez[0] + U * w[0].norm();
        let (w1, w1n) = (w[0], w[0].norm());
        let r: Vec<C64> = (0..g).map(|j| t[(0, j)]).collect();
        let rn: Vec<f64> = r.iter().map(|v| v.norm()).collect();
        let factor = -0.5 * (C64::new(0.0, -1.0) * t11).ln() - C64::new(0.0, PI) * w1 * w1 / t11;
        log += factor;
        el += e11 * (0.5 / tn + PI * w1n * w1n / (tn * tn))
            + ew1 * 2.0 * PI * w1n / tn
            + U * (8.0 * factor.norm() + 16.0 * PI * w1n * w1n / tn + 8.0);
        let mut t_new = t.clone();
        let mut e_new = et.clone();
        t_new[(0, 0)] = -1.0 / t11;
        e_new[(0, 0)] = e11 / (tn * tn) + 4.0 * U * t_new[(0, 0)].norm();
        for j in 1..g {
            let v = r[j] / t11;
            t_new[(0, j)] = v;
            t_new[(j, 0)] = v;
            let e = et[(0, j)] / tn + rn[j] * e11 / (tn * tn) + 4.0 * U * v.norm();
            e_new[(0, j)] = e;
            e_new[(j, 0)] = e;
            for k in 1..g {
                t_new[(j, k)] = t[(j, k)] - r[j] * r[k] / t11;
                e_new[(j, k)] = et[(j, k)]
                    + (rn[j] * et[(0, k)] + rn[k] * et[(0, j)]) / tn
                    + rn[j] * rn[k] * e11 / (tn * tn)
                    + 4.0 * U * (t_new[(j, k)].norm() + rn[j] * rn[k] / tn);
            }
        }
        let q = w1 / t11;
        let eq = ew1 / tn + w1n * e11 / (tn * tn);
        let mut z_new = vec![q];
        let mut ez_new = vec![eq + 4.0 * U * q.norm()];
        for j in 1..g {
            let v = z[j] - r[j] * q;
            z_new.push(v);
            ez_new.push(ez[j] + rn[j] * eq + q.norm() * et[(0, j)] + 4.0 * U * (v.norm() + rn[j] * q.norm()));
        }
        b[0] = a[0];
        a[0] = 0.0;
        (t, z, et, ez) = (t_new, z_new, e_new, ez_new);
    }
    Some(finish(&t, &z, &a, &b, &et, &ez, log, el, accuracy))
}

/// The reduced series and the map back.
#[allow(clippy::too_many_arguments)]
fn finish(
    t: &DMatrix<C64>,
    z: &[C64],
    a: &[f64],
    b: &[f64],
    et: &DMatrix<f64>,
    ez: &[f64],
    log: C64,
    el: f64,
    accuracy: f64,
) -> Result<ThetaValue, ThetaError> {
    let ctx = ThetaContext::new(t, 1e-12).map_err(|e| match e {
        ThetaError::NotSymmetric { defect } => ThetaError::ReducedNotSymmetric { defect },
        other => other,
    })?;
    let red = Characteristic { a: a.to_vec(), b: b.to_vec() };
    // exp(L) scales the reduced series' truncation: aim below accuracy / |exp(L)|.
    let reduced_accuracy = (accuracy * (-log.re).exp().min(1.0)).max(1e-300);
    // The reduced inputs are off by et (entrywise; its Frobenius norm bounds the spectral
    // norm) and ez: the sum's bound covers every term's change.
    let errors = InputErrors { tau: et.norm(), z: ez.iter().map(|v| v * v).sum::<f64>().sqrt() };
    let (vals, _) = ctx.sums_with_input_errors(z, Some(&red), &[vec![]], reduced_accuracy, errors)?;
    let v = vals[0];
    let el = el + 2.0 * U * log.norm();
    let value = v.value * C64::new(0.0, log.im).exp();
    let error = v.error * (1.0 + el.exp_m1()) + v.value.norm() * el.exp_m1() + 3.0 * U * value.norm();
    Ok(ThetaValue { log_factor: v.log_factor + log.re, value, error: error * (1.0 + 8.0 * U) })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn one(t: f64) -> ThetaValue {
        let tau = DMatrix::from_element(1, 1, C64::new(0.0, t));
        eval(&tau, &[C64::new(0.0, 0.0)], &Characteristic::zero(1), 0.0, 0.0, 1e-15).unwrap().unwrap()
    }

    #[test]
    fn poisson_summation_gives_t_to_the_minus_half() {
        // theta(0 | i t) = t^(-1/2) theta(0 | i / t) (common practice, no source); for t <=
        // 1e-4 the second factor is 1 + 2 e^(-pi 10^4) = 1 in double precision.
        for t in [1e-2, 1e-4, 1e-6] {
            let v = one(t);
            let want = 1.0 / t.sqrt() * if t == 1e-2 { 1.0 + 2.0 * (-PI * 100.0f64).exp() } else { 1.0 };
            let diff = (v.full() - want).norm();
            assert!(diff <= v.full_error(), "t = {t}: {} ± {:.2e}", v.full(), v.full_error());
            assert!(v.full_error() < 1e-13 * want, "t = {t}: bound {:.2e} not tight", v.full_error());
        }
    }

    #[test]
    fn scaled_identities_factorise() {
        // theta(0 | i s I_g) = theta(0 | i s)^g (the series factorises; common practice, no
        // source), with the genus-1 value from the same transformation checked above.
        for (g, s) in [(3, 0.05), (8, 0.2), (12, 0.3)] {
            let tau = DMatrix::from_fn(g, g, |i, j| C64::new(0.0, if i == j { s } else { 0.0 }));
            let zero = vec![C64::new(0.0, 0.0); g];
            let v = eval(&tau, &zero, &Characteristic::zero(g), 0.0, 0.0, 1e-15).unwrap().unwrap();
            let base = one(s);
            let want = base.full().powi(g as i32);
            let want_err = g as f64 * base.full_error() / base.full().norm() * want.norm() * 1.01;
            let diff = (v.full() - want).norm();
            assert!(diff <= v.full_error() + want_err, "g = {g}, s = {s}: {} vs {want}", v.full());
            assert!(v.full_error() < 1e-12 * want.norm(), "g = {g}: bound {:.2e}", v.full_error());
        }
    }
}
