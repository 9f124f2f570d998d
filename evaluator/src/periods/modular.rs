//! The j-invariant of a genus-1 Riemann matrix, from Eisenstein series.
//!
//! j = E4^3 / Delta with E4 = 1 + 240 sum sigma_3(n) q^n, Delta = q prod (1 - q^n)^24 and
//! q = exp(2 pi i tau) (Serre, *A Course in Arithmetic*, VII 4.4 and 4.5). The textbook
//! 1728 E4^3 / (E4^3 - E6^2) loses everything to cancellation high in the upper half plane
//! (E4^3 - E6^2 = 1728 q + ...), so Delta comes from Jacobi's product instead. tau is first moved into the standard fundamental domain, where
//! |q| <= exp(-pi sqrt 3) < 0.0044, so a few dozen terms reach double precision. Errors
//! propagate through j'(tau) = -2 pi i (E6 / E4) j(tau).

use num_complex::Complex64 as C64;
use std::f64::consts::PI;

/// j(tau) and a bound on its error given a bound on tau's error.
pub fn j_of_tau(tau: C64, tau_error: f64) -> Option<(C64, f64)> {
    if !(tau.im > 0.0) || !tau.re.is_finite() || !(tau_error >= 0.0) {
        return None;
    }
    let (mut t, mut err) = (tau, tau_error);
    for _ in 0..1000 {
        t.re -= t.re.round();
        if t.norm_sqr() < 1.0 - 1e-15 {
            // |-1/(t + d) + 1/t| = |d| / (|t| |t + d|) <= err / (|t| (|t| - err)).
            let r = t.norm();
            if !(err < 0.5 * r) {
                return None;
            }
            err /= r * (r - err);
            t = -1.0 / t;
        } else {
            break;
        }
    }
    // |j'| can grow fast across the disc |d| <= err (like e^(2 pi err) high up, and near
    // the zeros of E4 and E6 from nearly nothing): refuse discs wider than a small fraction
    // of Im t, and take the largest |j'| on the disc's centre and rim with that growth.
    if !(err <= 0.05 * t.im) {
        return None;
    }
    let (j, dj0) = j_and_slope(t)?;
    let mut slope = dj0;
    for k in 0..8 {
        let p = t + C64::from_polar(err, std::f64::consts::TAU * k as f64 / 8.0);
        slope = slope.max(j_and_slope(p)?.1);
    }
    let slope = slope * (2.0 * PI * err).exp() * 1.25;
    // Rounding: q = exp(2 pi i t) carries about |2 pi t| ulps, the series a few more.
    let rounding = 1e-14 * (1.0 + t.norm()) * j.norm().max(1.0);
    Some((j, slope * err + rounding))
}

/// j(t) and |j'(t)| = 2 pi |E6 / E4 j| for t in (or near) the fundamental domain.
fn j_and_slope(t: C64) -> Option<(C64, f64)> {
    let q = (C64::new(0.0, 2.0 * PI) * t).exp();
    let (mut e4, mut e6) = (C64::new(0.0, 0.0), C64::new(0.0, 0.0));
    let mut qn = C64::new(1.0, 0.0);
    let mut tail_ok = false;
    for n in 1..200u64 {
        qn *= q;
        let (mut s3, mut s5) = (0.0, 0.0);
        for d in 1..=n {
            if n % d == 0 {
                s3 += (d as f64).powi(3);
                s5 += (d as f64).powi(5);
            }
        }
        e4 += qn * s3;
        e6 += qn * s5;
        // sigma_5(n) <= 2 n^5 bounds the rest by a geometric series once terms are tiny.
        if qn.norm() * 2.0 * (n as f64).powi(5) < 1e-19 {
            tail_ok = true;
            break;
        }
    }
    if !tail_ok {
        return None;
    }
    let e4 = 1.0 + 240.0 * e4;
    let e6 = 1.0 - 504.0 * e6;
    let mut delta = q;
    let mut qn = C64::new(1.0, 0.0);
    for _ in 0..200 {
        qn *= q;
        if qn.norm() < 1e-19 {
            break;
        }
        delta *= (1.0 - qn).powi(24);
    }
    let j = e4 * e4 * e4 / delta;
    // j' = -2 pi i (E6 / E4) j = -2 pi i E6 E4^2 / Delta (no division by E4 near rho).
    Some((j, 2.0 * PI * (e6 * e4 * e4 / delta).norm()))
}

#[cfg(test)]
mod tests {
    use super::*;

    // j(i) = 1728 and j(e^{2 pi i / 3}) = 0 (classical special values, DLMF 23.15.9 area;
    // common practice), j(tau + 1) = j(tau) = j(-1/tau).
    #[test]
    fn special_values_and_invariance() {
        let (j, e) = j_of_tau(C64::new(0.0, 1.0), 0.0).unwrap();
        assert!((j - 1728.0).norm() < 1e-9 + e);
        let rho = C64::from_polar(1.0, 2.0 * PI / 3.0);
        let (j, _) = j_of_tau(rho, 0.0).unwrap();
        assert!(j.norm() < 1e-8);
        let t = C64::new(0.31, 0.8);
        let (j1, _) = j_of_tau(t, 0.0).unwrap();
        let (j2, _) = j_of_tau(-1.0 / (t + 3.0), 0.0).unwrap();
        assert!((j1 - j2).norm() < 1e-10 * j1.norm());
    }

    // High in the upper half plane j = 1/q + 744 + 196884 q + ... (the classical
    // q-expansion; Serre VII.4), which the cancellation-prone formula missed by 1e-5.
    #[test]
    fn high_in_the_upper_half_plane() {
        for y in [3.0, 5.28, 6.0] {
            let q = (-2.0 * PI * y).exp();
            let want = 1.0 / q + 744.0 + 196_884.0 * q + 21_493_760.0 * q * q;
            let (j, e) = j_of_tau(C64::new(0.0, y), 0.0).unwrap();
            assert!((j.re - want).abs() < 1e-13 * want && j.im.abs() < 1e-13 * want, "{y}: {j} vs {want}");
            assert!(e < 1e-13 * want);
        }
    }

    // j(i sqrt 2) = 8000 (the CM value for discriminant -8; classical, from memory, and
    // re-derived by the Legendre-curve check in the periods tests).
    #[test]
    fn cm_value_at_i_sqrt2() {
        let (j, _) = j_of_tau(C64::new(0.0, 2f64.sqrt()), 0.0).unwrap();
        assert!((j - 8000.0).norm() < 1e-8);
    }
}
