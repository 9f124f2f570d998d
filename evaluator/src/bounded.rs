//! `exp`, `log` and `sqrt` with error bounds that hold.
//!
//! An input z~ (a float, or an exact rational converted to one) stands for an exact z with
//! |z - z~| <= d, where d is the value's bound plus the conversion error. The result's bound
//! is the change of the function over that disc plus the library's own error:
//!
//! * exp: |exp(z) - exp(z~)| = |exp(z~)| |exp(z - z~) - 1| <= |exp(z~)| (e^d - 1).
//! * log (principal branch, Im in (-pi, pi]): analytic off the cut (-inf, 0]; when the disc
//!   misses the cut and 0, the segment from z~ to z stays in it and |log'| = 1/|w| <=
//!   1/(|z~| - d), so the change is at most d / (|z~| - d). A disc that meets the cut makes
//!   the principal value jump by 2 pi i inside it: refused, never guessed. Exact negative
//!   rationals are real, so their disc is the real segment, along which log is continuous.
//! * sqrt (principal branch, Re >= 0): off the cut, |sqrt'| = 1/(2 sqrt|w|) gives
//!   d / (2 sqrt(|z~| - d)); on a real segment |sqrt a - sqrt b| <= sqrt|a - b| also holds.
//!   A disc that meets the cut is widened honestly: every principal root of a point of the
//!   disc has modulus <= sqrt(|z~| + d), so the bound is |r~| + sqrt(|z~| + d).
//!
//! Own errors (allowances, tested against mpmath at 50 digits in tests/basics_audit.rs):
//! glibc's exp, log and sqrt of doubles are within 1 ulp (sqrt is correctly rounded); the
//! allowance is 2 ulps = 4u |r| for exp and log, u |r| for sqrt. num-complex evaluates
//! exp(a + bi) as e^a (cos b, sin b), log z as (ln hypot, atan2) and sqrt by polar form:
//! a handful of 1-ulp steps per component; the allowance is 16u |r| for exp and sqrt, and
//! u (16 + 4 |r|) for log (its real part can be tiny while atan2 and hypot err absolutely).
//! Results in the subnormal range also carry 4 times the smallest subnormal.

use crate::num::{Num, UNIT_ROUNDOFF as U};
use num_bigint::BigInt;
use num_complex::Complex64;
use num_rational::BigRational;
use num_traits::{One, Signed};

/// A value with its bound, or why there is none.
pub type Out = Result<(Num, f64), String>;

const TINY: f64 = 4.0 * 4.9406564584124654e-324;

/// The radius of the disc an input stands for: its bound and its conversion to a float.
fn radius(z: &Num, bound: f64) -> f64 {
    bound + conversion(z)
}

/// The conversion error of an exact number, never rounded to 0 when the conversion is
/// inexact (an error below the smallest subnormal would otherwise vanish).
pub(crate) fn conversion(z: &Num) -> f64 {
    let Num::Exact(q) = z else { return 0.0 };
    match BigRational::from_float(kelp_lang::number::to_f64(q)) {
        Some(f) if f == *q => 0.0,
        _ => z.conversion_error().max(TINY),
    }
}

/// The float an input becomes, with the sign of a zero imaginary part made positive (the
/// principal branch puts the negative real axis on the upper side).
fn point(z: &Num) -> Complex64 {
    let c = z.to_complex();
    Complex64::new(c.re, if c.im == 0.0 { 0.0 } else { c.im })
}

fn finish(value: Num, prop: f64, own: f64, what: &str) -> Out {
    if !value.is_finite() {
        return Err(format!("{what} is beyond the range of double precision"));
    }
    let bound = (prop + own + TINY) * (1.0 + 4.0 * U);
    if !bound.is_finite() {
        return Err(format!("{what} has no finite error bound: the input's error bound is too large"));
    }
    Ok((value, bound))
}

fn tidy(c: Complex64, real: bool) -> Num {
    if real {
        Num::Real(c.re)
    } else {
        Num::Complex(c)
    }
}

pub fn exp(z: &Num, bound: f64) -> Out {
    if z.is_zero() && z.is_exact() && bound == 0.0 {
        return Ok((Num::int(1), 0.0));
    }
    let d = radius(z, bound);
    let real = z.to_real().is_some();
    let c = point(z);
    let (r, own_rel) = if real { (Complex64::new(c.re.exp(), 0.0), 4.0 * U) } else { (c.exp(), 16.0 * U) };
    let m = r.norm() * (1.0 + U);
    let own = own_rel * m;
    // |exp(z~)| <= |r~| + own.
    let prop = if d == 0.0 { 0.0 } else { (m + own) * d.exp_m1() * (1.0 + 2.0 * U) };
    finish(tidy(r, real), prop, own, "exp of this number")
}

pub fn log(z: &Num, bound: f64) -> Out {
    if z.is_zero() {
        return Err("log(0) is undefined (the logarithm has a singularity at 0)".into());
    }
    if let Num::Exact(q) = z {
        if q.is_one() && bound == 0.0 {
            return Ok((Num::int(0), 0.0));
        }
    }
    let d = radius(z, bound);
    let c = point(z);
    let m = c.norm();
    // Exact rationals are real: their disc is a segment of the real axis, on one side of 0.
    let exact_real = z.is_exact() && bound == 0.0;
    let cut_distance = if exact_real || c.re >= 0.0 { m } else { c.im.abs() };
    if d > 0.0 && (cut_distance <= d || m <= d) {
        let why = if m <= d { "0" } else { "the negative real axis, where the principal logarithm jumps by 2 pi i" };
        return Err(format!(
            "log cannot be bounded here: the input {c} ± {d:.1e} may lie on {why}; kelp cannot tell which side it is on"
        ));
    }
    let real = z.to_real().is_some_and(|x| x > 0.0);
    let r = if real { Complex64::new(c.re.ln(), 0.0) } else { c.ln() };
    let own = if real { 4.0 * U * r.re.abs() } else { U * (16.0 + 4.0 * r.norm()) };
    let prop = if d == 0.0 { 0.0 } else { d / ((m * (1.0 - 2.0 * U)) - d) * (1.0 + 4.0 * U) };
    finish(tidy(r, real), prop, own, "log of this number")
}

/// The exact square root of a rational square, if it is one.
fn exact_root(q: &BigRational) -> Option<BigRational> {
    let root = |n: &BigInt| -> Option<BigInt> {
        let r = n.sqrt();
        (&r * &r == *n).then_some(r)
    };
    if q.is_negative() {
        return None;
    }
    Some(BigRational::new(root(q.numer())?, root(q.denom())?))
}

pub fn sqrt(z: &Num, bound: f64) -> Out {
    if let (Num::Exact(q), true) = (z, bound == 0.0) {
        if let Some(r) = exact_root(q) {
            return Ok((Num::Exact(r), 0.0));
        }
    }
    let d = radius(z, bound);
    let c = point(z);
    let m = c.norm();
    let real = z.to_real().is_some_and(|x| x >= 0.0);
    let r = if real { Complex64::new(c.re.sqrt(), 0.0) } else { c.sqrt() };
    let rm = r.norm() * (1.0 + U);
    let own = if real { U * rm } else { 16.0 * U * rm };
    let exact_real = z.is_exact() && bound == 0.0;
    let cut_distance = if c.re >= 0.0 { m } else { c.im.abs() };
    let prop = if d == 0.0 {
        0.0
    } else if exact_real {
        // A real segment on one side of 0 (of its own side's sign).
        let lip = if m > d { d / (2.0 * ((m - d) * (1.0 - 2.0 * U)).sqrt()) } else { f64::INFINITY };
        lip.min(d.sqrt() * (1.0 + 2.0 * U)) * (1.0 + 4.0 * U)
    } else if cut_distance > d {
        d / (2.0 * ((m * (1.0 - 2.0 * U) - d).sqrt())) * (1.0 + 4.0 * U)
    } else {
        // The disc meets the cut: only the size of the roots is known.
        (rm + ((m + d) * (1.0 + 2.0 * U)).sqrt()) * (1.0 + 4.0 * U)
    };
    finish(tidy(r, real), prop, own, "sqrt of this number")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64, d: i64) -> Num {
        Num::Exact(BigRational::new(n.into(), d.into()))
    }

    #[test]
    fn exact_values_stay_exact() {
        // sqrt(9/4) = 3/2, exp(0) = 1, log(1) = 0 (common practice, no source).
        assert_eq!(sqrt(&q(9, 4), 0.0).unwrap(), (q(3, 2), 0.0));
        assert_eq!(exp(&q(0, 1), 0.0).unwrap(), (q(1, 1), 0.0));
        assert_eq!(log(&q(1, 1), 0.0).unwrap(), (q(0, 1), 0.0));
    }

    #[test]
    fn the_cut_is_refused_or_widened() {
        // -1 ± 1e-12 may be above or below the cut: log jumps by 2 pi i there (common
        // practice, no source).
        assert!(log(&Num::Real(-1.0), 1e-12).is_err());
        assert!(log(&Num::Real(0.0), 0.0).is_err());
        // An exact -1 is real: log(-1) = pi i.
        let (v, b) = log(&q(-1, 1), 0.0).unwrap();
        assert!((v.to_complex() - Complex64::new(0.0, std::f64::consts::PI)).norm() <= b);
        // sqrt near the cut: the values i and -i are both possible, the bound covers both.
        let (v, b) = sqrt(&Num::Real(-1.0), 1e-12).unwrap();
        assert!((v.to_complex() - Complex64::new(0.0, -1.0)).norm() <= b);
    }
}
