//! Scalars: exact rationals where the input is exact, f64 or complex f64 otherwise.

use kelp_lang::number::to_f64;
use num_bigint::BigInt;
use num_complex::Complex64;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::fmt;

#[derive(Clone, Debug, PartialEq)]
pub enum Num {
    Exact(BigRational),
    Real(f64),
    Complex(Complex64),
}

/// Exact powers are refused past this many bits of result (they would only be slow).
const MAX_EXACT_POWER_BITS: u64 = 100_000;

impl Num {
    pub fn int(n: i64) -> Num {
        Num::Exact(BigRational::from_integer(BigInt::from(n)))
    }
    pub fn to_complex(&self) -> Complex64 {
        match self {
            Num::Exact(q) => Complex64::new(to_f64(q), 0.0),
            Num::Real(r) => Complex64::new(*r, 0.0),
            Num::Complex(c) => *c,
        }
    }
    /// The real value, if the number is real.
    pub fn to_real(&self) -> Option<f64> {
        match self {
            Num::Exact(q) => Some(to_f64(q)),
            Num::Real(r) => Some(*r),
            Num::Complex(c) if c.im == 0.0 => Some(c.re),
            Num::Complex(_) => None,
        }
    }
    pub fn is_exact(&self) -> bool {
        matches!(self, Num::Exact(_))
    }
    pub fn abs(&self) -> Num {
        match self {
            Num::Exact(q) => Num::Exact(q.abs()),
            Num::Real(r) => Num::Real(r.abs()),
            Num::Complex(c) => Num::Real(c.norm()),
        }
    }
    pub fn re(&self) -> Num {
        match self {
            Num::Complex(c) => Num::Real(c.re),
            other => other.clone(),
        }
    }
    pub fn im(&self) -> Num {
        match self {
            Num::Complex(c) => Num::Real(c.im),
            _ => Num::int(0),
        }
    }
    pub fn neg(&self) -> Num {
        match self {
            Num::Exact(q) => Num::Exact(-q),
            Num::Real(r) => Num::Real(-r),
            Num::Complex(c) => Num::Complex(-c),
        }
    }
    /// Collapses complex numbers with zero imaginary part to reals.
    fn tidy(c: Complex64) -> Num {
        if c.im == 0.0 {
            Num::Real(c.re)
        } else {
            Num::Complex(c)
        }
    }
    fn float_op(a: &Num, b: &Num, f: impl Fn(Complex64, Complex64) -> Complex64, g: impl Fn(f64, f64) -> f64) -> Num {
        match (a.to_real(), b.to_real(), a, b) {
            (Some(x), Some(y), l, r) if !matches!(l, Num::Complex(_)) && !matches!(r, Num::Complex(_)) => {
                Num::Real(g(x, y))
            }
            _ => Num::tidy(f(a.to_complex(), b.to_complex())),
        }
    }
    pub fn add(&self, o: &Num) -> Num {
        match (self, o) {
            (Num::Exact(a), Num::Exact(b)) => Num::Exact(a + b),
            _ => Num::float_op(self, o, |a, b| a + b, |a, b| a + b),
        }
    }
    pub fn sub(&self, o: &Num) -> Num {
        self.add(&o.neg())
    }
    pub fn mul(&self, o: &Num) -> Num {
        match (self, o) {
            (Num::Exact(a), Num::Exact(b)) => Num::Exact(a * b),
            _ => Num::float_op(self, o, |a, b| a * b, |a, b| a * b),
        }
    }
    pub fn div(&self, o: &Num) -> Result<Num, String> {
        if o.is_zero() {
            return Err("division by zero".into());
        }
        Ok(match (self, o) {
            (Num::Exact(a), Num::Exact(b)) => Num::Exact(a / b),
            _ => Num::float_op(self, o, |a, b| a / b, |a, b| a / b),
        })
    }
    pub fn pow(&self, e: &Num) -> Result<Num, String> {
        if let (Num::Exact(b), Num::Exact(q)) = (self, e) {
            if q.is_integer() {
                let k = q.to_integer();
                let bits = (b.numer().bits() + b.denom().bits()).max(1);
                let kabs = k.abs().to_u64().unwrap_or(u64::MAX);
                if bits.saturating_mul(kabs) <= MAX_EXACT_POWER_BITS {
                    if b.is_zero() && k.is_negative() {
                        return Err("zero to a negative power".into());
                    }
                    let mut r = num_traits::pow(b.clone(), kabs as usize);
                    if k.is_negative() {
                        r = BigRational::one() / r;
                    }
                    return Ok(Num::Exact(r));
                }
            }
        }
        if self.is_zero() && e.to_real().is_some_and(|x| x < 0.0) {
            return Err("zero to a negative power".into());
        }
        Ok(match (self.to_real(), e.to_real()) {
            (Some(b), Some(x)) if b >= 0.0 || x.fract() == 0.0 => Num::Real(b.powf(x)),
            _ => Num::tidy(self.to_complex().powc(e.to_complex())),
        })
    }
    pub fn is_zero(&self) -> bool {
        match self {
            Num::Exact(q) => q.is_zero(),
            Num::Real(r) => *r == 0.0,
            Num::Complex(c) => c.norm() == 0.0,
        }
    }
    pub fn is_finite(&self) -> bool {
        match self {
            Num::Exact(_) => true,
            Num::Real(r) => r.is_finite(),
            Num::Complex(c) => c.re.is_finite() && c.im.is_finite(),
        }
    }
    /// The distance |a - b| as a float.
    pub fn distance(&self, o: &Num) -> f64 {
        (self.to_complex() - o.to_complex()).norm()
    }

    /// A bound on |float value - exact value| that converting this number to floating
    /// point introduces: 0 for floats (they are what they are); for rationals the exact
    /// difference, rounded up.
    pub fn conversion_error(&self) -> f64 {
        match self {
            Num::Exact(q) => {
                let f = to_f64(q);
                match BigRational::from_float(f) {
                    Some(back) if back == *q => 0.0,
                    // The exact difference, rounded up; the smallest subnormal on top covers
                    // a difference below the subnormal spacing, which the conversion of the
                    // difference itself would round down, even to 0 (`1e-320`).
                    Some(back) => to_f64(&(back - q).abs()) * (1.0 + 4.0 * UNIT_ROUNDOFF) + f64::from_bits(1),
                    None => f64::INFINITY,
                }
            }
            _ => 0.0,
        }
    }

    /// The exact rational value of a real number (floats are binary fractions).
    pub fn to_rational(&self) -> Option<BigRational> {
        match self {
            Num::Exact(q) => Some(q.clone()),
            Num::Real(r) => BigRational::from_float(*r),
            Num::Complex(c) if c.im == 0.0 => BigRational::from_float(c.re),
            Num::Complex(_) => None,
        }
    }

    /// The modulus as a float (rounded up by one unit for complex numbers).
    pub fn magnitude(&self) -> f64 {
        match self {
            Num::Complex(c) => c.norm() * (1.0 + UNIT_ROUNDOFF),
            other => other.to_complex().re.abs(),
        }
    }
}

/// u = 2^-53, the unit roundoff of binary64 with rounding to nearest.
pub const UNIT_ROUNDOFF: f64 = f64::EPSILON / 2.0;

/// Shortest round-tripping decimal of a float, without a trailing ".0" on integers
/// too large to read.
pub fn fmt_f64(x: f64) -> String {
    if x == x.trunc() && x.abs() < 1e15 {
        format!("{x:.1}")
    } else if x.abs() < 1e-4 || x.abs() >= 1e15 {
        // Shortest round-trip digits in scientific form, not forty zeros.
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

impl fmt::Display for Num {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Num::Exact(q) => write!(f, "{q}"),
            Num::Real(r) => f.write_str(&fmt_f64(*r)),
            Num::Complex(c) => {
                if c.re == 0.0 {
                    write!(f, "{}i", fmt_f64(c.im))
                } else if c.im < 0.0 {
                    write!(f, "{} - {}i", fmt_f64(c.re), fmt_f64(-c.im))
                } else {
                    write!(f, "{} + {}i", fmt_f64(c.re), fmt_f64(c.im))
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn subnormal_literals_carry_their_conversion_error() {
        // 1e-320 and the others are not binary fractions; the reference is the exact
        // difference between the literal and the rational value of its float (common
        // practice, no source). Below the subnormal spacing it used to round to 0.
        for text in ["1e-320", "3e-324", "1e-310", "0.1", "1e-300"] {
            let q = kelp_lang::number::parse_exact(text).unwrap();
            let f = to_f64(&q);
            let exact = (BigRational::from_float(f).unwrap() - &q).abs();
            let stated = Num::Exact(q).conversion_error();
            assert!(stated > 0.0, "{text}");
            let stated_q = BigRational::from_float(stated).unwrap();
            assert!(stated_q >= exact, "{text}: stated {stated:e} below the exact difference");
        }
        assert_eq!(Num::Exact(BigRational::new(1.into(), 4.into())).conversion_error(), 0.0);
    }

    #[test]
    fn exact_arithmetic_stays_exact() {
        let a = Num::Exact(BigRational::new(1.into(), 3.into()));
        let b = Num::Exact(BigRational::new(1.into(), 6.into()));
        assert_eq!(a.add(&b), Num::Exact(BigRational::new(1.into(), 2.into())));
        assert_eq!(Num::int(2).pow(&Num::int(-2)).unwrap(), Num::Exact(BigRational::new(1.into(), 4.into())));
        assert!(Num::int(1).div(&Num::int(0)).is_err());
    }

    #[test]
    fn complex_square_root_of_minus_one() {
        let r = Num::int(-1).pow(&Num::Real(0.5)).unwrap().to_complex();
        assert!((r - Complex64::new(0.0, 1.0)).norm() < 1e-15);
    }
}
