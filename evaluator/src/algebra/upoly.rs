//! Univariate polynomials over Q: the exact layer under singular points (resultants,
//! gcds, square-free parts, rational roots).

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

/// Coefficients, lowest degree first, no trailing zeros (the zero polynomial is empty).
#[derive(Clone, Debug, PartialEq, Eq, Default)]
pub struct UPoly(pub Vec<BigRational>);

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

impl UPoly {
    pub fn new(mut c: Vec<BigRational>) -> Self {
        while c.last().is_some_and(Zero::is_zero) {
            c.pop();
        }
        UPoly(c)
    }
    pub fn from_ints(c: &[i64]) -> Self {
        UPoly::new(c.iter().map(|&v| q(v)).collect())
    }
    pub fn zero() -> Self {
        UPoly(vec![])
    }
    pub fn one() -> Self {
        UPoly(vec![BigRational::one()])
    }
    pub fn is_zero(&self) -> bool {
        self.0.is_empty()
    }
    /// Degree; `None` for zero.
    pub fn degree(&self) -> Option<usize> {
        self.0.len().checked_sub(1)
    }
    pub fn lead(&self) -> BigRational {
        self.0.last().cloned().unwrap_or_else(BigRational::zero)
    }
    pub fn eval(&self, x: &BigRational) -> BigRational {
        self.0.iter().rev().fold(BigRational::zero(), |acc, c| acc * x + c)
    }
    pub fn eval_f64(&self, x: num_complex::Complex64) -> num_complex::Complex64 {
        self.0.iter().rev().fold(num_complex::Complex64::new(0.0, 0.0), |acc, c| acc * x + kelp_lang::number::to_f64(c))
    }
    pub fn add(&self, o: &UPoly) -> UPoly {
        let n = self.0.len().max(o.0.len());
        UPoly::new(
            (0..n)
                .map(|i| {
                    self.0.get(i).cloned().unwrap_or_else(BigRational::zero)
                        + o.0.get(i).cloned().unwrap_or_else(BigRational::zero)
                })
                .collect(),
        )
    }
    pub fn neg(&self) -> UPoly {
        UPoly(self.0.iter().map(|c| -c).collect())
    }
    pub fn sub(&self, o: &UPoly) -> UPoly {
        self.add(&o.neg())
    }
    pub fn scale(&self, c: &BigRational) -> UPoly {
        UPoly::new(self.0.iter().map(|v| v * c).collect())
    }
    pub fn mul(&self, o: &UPoly) -> UPoly {
        if self.is_zero() || o.is_zero() {
            return UPoly::zero();
        }
        let mut r = vec![BigRational::zero(); self.0.len() + o.0.len() - 1];
        for (i, a) in self.0.iter().enumerate() {
            if a.is_zero() {
                continue;
            }
            crate::limits::checkpoint();
            for (j, b) in o.0.iter().enumerate() {
                r[i + j] += a * b;
            }
        }
        UPoly::new(r)
    }
    /// Quotient and remainder; `o` must be non-zero.
    pub fn divrem(&self, o: &UPoly) -> (UPoly, UPoly) {
        let d = o.degree().expect("division by the zero polynomial");
        let mut r = self.0.clone();
        if r.len() <= d {
            return (UPoly::zero(), self.clone());
        }
        let mut quo = vec![BigRational::zero(); r.len() - d];
        let inv = BigRational::one() / o.lead();
        for k in (0..quo.len()).rev() {
            crate::limits::checkpoint();
            let c = &r[k + d] * &inv;
            if !c.is_zero() {
                for (j, b) in o.0.iter().enumerate() {
                    r[k + j] -= &c * b;
                }
            }
            quo[k] = c;
        }
        r.truncate(d);
        (UPoly::new(quo), UPoly::new(r))
    }
    pub fn rem(&self, o: &UPoly) -> UPoly {
        self.divrem(o).1
    }
    /// Monic (or zero).
    pub fn monic(&self) -> UPoly {
        if self.is_zero() {
            return self.clone();
        }
        self.scale(&(BigRational::one() / self.lead()))
    }
    /// Monic gcd (zero only when both are zero).
    pub fn gcd(&self, o: &UPoly) -> UPoly {
        let (mut a, mut b) = (self.clone(), o.clone());
        while !b.is_zero() {
            let r = a.rem(&b);
            a = b;
            // Keep coefficients small: the remainder's scale does not matter.
            b = r.primitive();
        }
        a.monic()
    }
    pub fn derivative(&self) -> UPoly {
        UPoly::new(self.0.iter().enumerate().skip(1).map(|(i, c)| c * q(i as i64)).collect())
    }
    /// The square-free part (monic), with the same roots.
    pub fn squarefree(&self) -> UPoly {
        if self.degree().unwrap_or(0) == 0 {
            return self.monic();
        }
        self.divrem(&self.gcd(&self.derivative())).0.monic()
    }
    /// Scaled to integer coefficients with content 1 and positive leading coefficient.
    pub fn primitive(&self) -> UPoly {
        if self.is_zero() {
            return self.clone();
        }
        let lcm = self.0.iter().fold(BigInt::one(), |l, c| num_integer::Integer::lcm(&l, c.denom()));
        let ints: Vec<BigInt> =
            self.0.iter().map(|c| (c * BigRational::from_integer(lcm.clone())).to_integer()).collect();
        let g = ints.iter().fold(BigInt::zero(), |g, c| num_integer::Integer::gcd(&g, c));
        let sign = if ints.last().unwrap().is_negative() { -BigInt::one() } else { BigInt::one() };
        UPoly::new(ints.into_iter().map(|c| BigRational::from_integer(c * &sign / &g)).collect())
    }
    /// Resultant of two polynomials (by the Euclidean algorithm).
    pub fn resultant(&self, o: &UPoly) -> BigRational {
        let (mut a, mut b) = (self.clone(), o.clone());
        if a.is_zero() || b.is_zero() {
            return BigRational::zero();
        }
        let mut res = BigRational::one();
        loop {
            let (da, db) = (a.degree().unwrap(), b.degree().unwrap());
            if db == 0 {
                return res * num_traits::pow(b.lead(), da);
            }
            let r = a.rem(&b);
            if r.is_zero() {
                return BigRational::zero();
            }
            let dr = r.degree().unwrap();
            // res(a, b) = (-1)^(da db) lc(b)^(da - dr) res(b, r)
            if (da * db) % 2 == 1 {
                res = -res;
            }
            res *= num_traits::pow(b.lead(), da - dr);
            a = b;
            b = r;
        }
    }
    /// Exact rendering in the variable `var`, highest degree first (`x^2 - 3/7*x + 1`).
    /// Values print as they are; call on `primitive()` to show a defining polynomial.
    pub fn show(&self, var: &str) -> String {
        if self.is_zero() {
            return "0".into();
        }
        let mut out = String::new();
        for (i, c) in self.0.iter().enumerate().rev() {
            if c.is_zero() {
                continue;
            }
            let mag = c.abs();
            let sign = if c.is_negative() { "-" } else { "+" };
            if out.is_empty() {
                if c.is_negative() {
                    out.push('-');
                }
            } else {
                out.push_str(&format!(" {sign} "));
            }
            let power = match i {
                0 => String::new(),
                1 => var.to_string(),
                _ => format!("{var}^{i}"),
            };
            out.push_str(&match (i, mag.is_one()) {
                (0, _) => format!("{mag}"),
                (_, true) => power,
                _ => format!("{mag}*{power}"),
            });
        }
        out
    }
    /// Rational roots, each once, found from numerical roots and checked exactly (a
    /// rational root p/q of the primitive polynomial has q | lead, so lead * root is an
    /// integer).
    pub fn rational_roots(&self) -> Vec<BigRational> {
        let p = self.squarefree().primitive();
        let Some(d) = p.degree() else { return vec![] };
        if d == 0 {
            return vec![];
        }
        let lead = p.lead();
        let mut out: Vec<BigRational> = Vec::new();
        if p.0[0].is_zero() {
            out.push(BigRational::zero());
        }
        for z in super::roots::complex_roots(&p) {
            if z.im.abs() > 1e-6 * (1.0 + z.re.abs()) {
                continue;
            }
            let lf = kelp_lang::number::to_f64(&lead);
            let guess = (z.re * lf).round();
            if !guess.is_finite() {
                continue;
            }
            for delta in [-1.0, 0.0, 1.0] {
                let Some(n) = num_bigint::BigInt::parse_bytes(format!("{:.0}", guess + delta).as_bytes(), 10) else {
                    continue;
                };
                let cand = BigRational::new(n, lead.to_integer());
                if !out.contains(&cand) && p.eval(&cand).is_zero() {
                    out.push(cand);
                }
            }
        }
        out.sort();
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gcd_resultant_and_squarefree() {
        // (x - 1)^2 (x + 2) and (x - 1)(x - 3): gcd x - 1 (common practice, no source).
        let a = UPoly::from_ints(&[-1, 1]).mul(&UPoly::from_ints(&[-1, 1])).mul(&UPoly::from_ints(&[2, 1]));
        let b = UPoly::from_ints(&[-1, 1]).mul(&UPoly::from_ints(&[-3, 1]));
        assert_eq!(a.gcd(&b), UPoly::from_ints(&[-1, 1]));
        assert_eq!(a.squarefree(), UPoly::from_ints(&[-1, 1]).mul(&UPoly::from_ints(&[2, 1])));
        assert!(a.resultant(&b).is_zero());
        // res(x^2 + 1, x - 2) = 5; res(x^2 - 2, x^2 - 3) = 1 (products over roots).
        assert_eq!(UPoly::from_ints(&[1, 0, 1]).resultant(&UPoly::from_ints(&[-2, 1])), q(5));
        assert_eq!(UPoly::from_ints(&[-2, 0, 1]).resultant(&UPoly::from_ints(&[-3, 0, 1])), q(1));
        // disc-style: res(f, f') for f = x^3 - x = -(-4)... res(x^3 - x, 3x^2 - 1) = -4
        // (product formula: lc^2 * prod f'(roots) = (-1)(2)(2) = -4).
        let f = UPoly::from_ints(&[0, -1, 0, 1]);
        assert_eq!(f.resultant(&f.derivative()), q(-4));
    }

    #[test]
    fn exact_rendering() {
        let p = UPoly::new(vec![q(1), BigRational::new((-3).into(), 7.into()), q(0), q(-1)]);
        assert_eq!(p.show("x"), "-x^3 - 3/7*x + 1");
        assert_eq!(UPoly::zero().show("y"), "0");
    }

    #[test]
    fn rational_roots_are_exact() {
        // 6x^3 - 5x^2 - 2x + 1 = (x - 1)(2x + 1)(3x - 1) (common practice, no source).
        let p = UPoly::from_ints(&[1, -2, -5, 6]);
        let r = p.rational_roots();
        assert_eq!(r, vec![BigRational::new((-1).into(), 2.into()), BigRational::new(1.into(), 3.into()), q(1)]);
        assert!(UPoly::from_ints(&[-2, 0, 1]).rational_roots().is_empty());
    }
}

/// Arithmetic modulo the prime 2^61 - 1, for gcd certificates.
pub mod modp {
    pub const P: u64 = (1 << 61) - 1;

    pub fn mul(a: u64, b: u64) -> u64 {
        let r = (a as u128) * (b as u128);
        let lo = (r as u64) & P;
        let hi = (r >> 61) as u64;
        let s = lo + hi;
        if s >= P {
            s - P
        } else {
            s
        }
    }
    pub fn add(a: u64, b: u64) -> u64 {
        let s = a + b;
        if s >= P {
            s - P
        } else {
            s
        }
    }
    pub fn sub(a: u64, b: u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a + P - b
        }
    }
    pub fn pow(mut a: u64, mut e: u64) -> u64 {
        let mut r = 1;
        while e > 0 {
            if e & 1 == 1 {
                r = mul(r, a);
            }
            a = mul(a, a);
            e >>= 1;
        }
        r
    }
    pub fn inv(a: u64) -> u64 {
        pow(a, P - 2)
    }
    /// The residue of a rational whose denominator is prime to P (`None` otherwise).
    pub fn of(q: &num_rational::BigRational) -> Option<u64> {
        use num_traits::ToPrimitive;
        let p = num_bigint::BigInt::from(P);
        let n = ((q.numer() % &p) + &p) % &p;
        let d = ((q.denom() % &p) + &p) % &p;
        let d = d.to_u64()?;
        if d == 0 {
            return None;
        }
        Some(mul(n.to_u64()?, inv(d)))
    }
    /// Degree of gcd(a, b) over Z/P (coefficients lowest first, trailing zeros allowed).
    pub fn gcd_degree(a: &[u64], b: &[u64]) -> Option<usize> {
        let trim = |v: &mut Vec<u64>| {
            while v.last() == Some(&0) {
                v.pop();
            }
        };
        let (mut a, mut b) = (a.to_vec(), b.to_vec());
        trim(&mut a);
        trim(&mut b);
        while !b.is_empty() {
            // a mod b
            let lb = inv(*b.last().unwrap());
            while a.len() >= b.len() {
                let c = mul(*a.last().unwrap(), lb);
                let shift = a.len() - b.len();
                for (i, &bv) in b.iter().enumerate() {
                    a[shift + i] = sub(a[shift + i], mul(c, bv));
                }
                a.pop();
                trim(&mut a);
            }
            std::mem::swap(&mut a, &mut b);
        }
        a.len().checked_sub(1)
    }
}

impl UPoly {
    /// `Some(true)` when gcd(self, o) = 1 is certified modulo 2^61 - 1: a common factor
    /// over Q, made primitive over Z, has a leading coefficient dividing both leading
    /// coefficients, so when P divides neither it survives reduction mod P. `None` when
    /// the certificate does not apply (then compute the gcd exactly).
    pub fn coprime_mod_p(&self, o: &UPoly) -> Option<bool> {
        let (a, b) = (self.primitive(), o.primitive());
        let am: Vec<u64> = a.0.iter().map(modp::of).collect::<Option<_>>()?;
        let bm: Vec<u64> = b.0.iter().map(modp::of).collect::<Option<_>>()?;
        if am.last() == Some(&0) || bm.last() == Some(&0) {
            return None;
        }
        match modp::gcd_degree(&am, &bm)? {
            0 => Some(true),
            _ => None,
        }
    }
}
