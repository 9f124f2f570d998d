//! Genus-1 theta values for small Im tau by the modular transformation: tau is moved to
//! the fundamental domain (|Re tau| <= 1/2, |tau| >= 1) by translations and inversions,
//! the series is summed there (a handful of terms), and the value is mapped back exactly.
//!
//! The two steps, derived from the defining series (checked numerically against the
//! direct series in tests/fixtures/gen/theta_hostile.py's references):
//! * translation by an integer k (n^2 = n mod 2):
//!   theta[a; b](z | tau + k) = exp(-pi i k (a^2 + a)) theta[a; b + k a + k/2](z | tau);
//! * inversion (Poisson summation over n, w = z + b, principal square root since
//!   Re(-i tau) > 0):
//!   theta[a; b](z | tau) = (-i tau)^(-1/2) exp(-pi i w^2 / tau) theta[0; a](w / tau | -1/tau).
//!
//! Error bounds follow each step to first order in the input errors and the roundings
//! (each derivative written out below), carried as absolute bounds on tau, z + b and the
//! accumulated logarithm L of the factors; the reduced sum adds its own bound and the
//! effect of its inputs' errors, summed term by term.

use super::{Characteristic, ThetaContext, ThetaError, ThetaValue};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

const U: f64 = f64::EPSILON / 2.0;

/// Whether the transformation pays: below this Im tau the direct series is long and its
/// recurrences lose digits.
pub const USE_BELOW_IM_TAU: f64 = 0.5;

/// theta[ch](z | tau) for a 1 x 1 tau, with `tau_err` and `z_err` bounds on the inputs
/// themselves; the returned error covers them.
pub fn eval(
    tau: C64,
    z: C64,
    ch: &Characteristic,
    tau_err: f64,
    z_err: f64,
    accuracy: f64,
) -> Result<ThetaValue, ThetaError> {
    if !(tau.im > 0.0) {
        return Err(ThetaError::NotPositiveDefinite { smallest: tau.im });
    }
    let (mut t, mut z, mut a, mut b) = (tau, z, ch.a[0], ch.b[0]);
    let (mut et, mut ez, mut log, mut el) = (tau_err, z_err, C64::new(0.0, 0.0), 0.0f64);
    for _ in 0..200 {
        let k = t.re.round();
        if k != 0.0 {
            t.re -= k;
            et += U * t.re.abs();
            log += C64::new(0.0, -PI * k * (a * a + a));
            el += 4.0 * U * PI * k.abs() * (a * a + a.abs());
            b += k * a + k / 2.0;
            ez += 3.0 * U * (b.abs() + (k * a).abs() + k.abs() / 2.0);
        }
        if t.norm() >= 1.0 - 1e-12 {
            break;
        }
        // Inversion. Exact-input derivatives: d/dtau of -log(-i tau)/2 - pi i w^2/tau is
        // -1/(2 tau) + pi i w^2/tau^2, d/dw is -2 pi i w/tau; of w/tau: -w/tau^2 and 1/tau;
        // of -1/tau: 1/tau^2.
        let w = z + b;
        ez += U * w.norm();
        let (tn, wn) = (t.norm(), w.norm());
        let factor = -0.5 * (C64::new(0.0, -1.0) * t).ln() - C64::new(0.0, PI) * w * w / t;
        log += factor;
        el += et * (0.5 / tn + PI * wn * wn / (tn * tn))
            + ez * 2.0 * PI * wn / tn
            + U * (8.0 * factor.norm() + 16.0 * PI * wn * wn / tn + 8.0);
        let z_new = w / t;
        ez = ez / tn + wn * et / (tn * tn) + 4.0 * U * z_new.norm();
        let t_new = -1.0 / t;
        et = et / (tn * tn) + 4.0 * U * t_new.norm();
        (t, z, b, a) = (t_new, z_new, a, 0.0);
    }
    let ctx = ThetaContext::new(&DMatrix::from_element(1, 1, t), 0.0)?;
    let red = Characteristic { a: vec![a], b: vec![b] };
    // The factor exp(L) scales the reduced series' truncation: aim below accuracy / |exp(L)|.
    let reduced_accuracy = (accuracy * (-log.re).exp().min(1.0)).max(1e-300);
    let v = ctx.eval(&[z], Some(&red), &[], reduced_accuracy)?;
    // The reduced series' inputs are off by et and ez: each term exp(pi i m^2 t + 2 pi i m
    // (z + b)) moves by at most its modulus times expm1(pi m^2 et + 2 pi |m| ez); summed
    // over all terms (in the bounded part, whose moduli are exp(-pi y (m + c)^2)).
    let y = t.im;
    let c = z.im / y;
    let mut moved = 0.0;
    let centre = -(a + c);
    let span = (60.0 / (PI * y)).sqrt() + 2.0;
    for n in (centre - span).floor() as i64..=(centre + span).ceil() as i64 {
        let m = n as f64 + a;
        let modulus = (-PI * y * (m + c) * (m + c)).exp();
        moved += modulus * (PI * m * m * et + 2.0 * PI * m.abs() * ez).exp_m1();
    }
    // Terms beyond the span are below e^-60 of the largest and move by less than they weigh.
    moved = moved * (1.0 + 1e-10) + 2.0 * (-60.0f64).exp() * (1.0 + 1.0 / y.sqrt());
    // exp(L) with |dL| <= el + the rounding of L's imaginary part as a phase.
    el += 2.0 * U * log.norm();
    let phase = C64::new(0.0, log.im).exp();
    let value = v.value * phase;
    let error = (v.error + moved) * (1.0 + el.exp_m1()) + v.value.norm() * el.exp_m1() + 3.0 * U * value.norm();
    Ok(ThetaValue { log_factor: v.log_factor + log.re, value, error: error * (1.0 + 8.0 * U) })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn poisson_summation_gives_t_to_the_minus_half() {
        // theta(0 | i t) = t^(-1/2) theta(0 | i / t) (common practice, no source); for t =
        // 1e-6 the second factor is 1 + 2 e^(-pi 10^6) = 1 in double precision.
        for t in [1e-2, 1e-4, 1e-6] {
            let v = eval(C64::new(0.0, t), C64::new(0.0, 0.0), &Characteristic::zero(1), 0.0, 0.0, 1e-15).unwrap();
            let want = 1.0 / t.sqrt() * if t == 1e-2 { 1.0 + 2.0 * (-PI * 100.0f64).exp() } else { 1.0 };
            let diff = (v.full() - want).norm();
            assert!(diff <= v.full_error(), "t = {t}: {} ± {:.2e}", v.full(), v.full_error());
            assert!(v.full_error() < 1e-13 * want, "t = {t}: bound {:.2e} not tight", v.full_error());
        }
    }
}
