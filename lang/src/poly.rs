//! Sparse polynomials in x, y, z with exact rational coefficients: the form in which a
//! curve equation leaves the checker. The evaluator's exact algebra builds on it.

use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use std::collections::BTreeMap;
use std::fmt;

/// Exponents of (x, y, z).
pub type Monomial = [u32; 3];

#[derive(Clone, Debug, PartialEq, Eq, Default)]
pub struct Poly {
    /// Non-zero coefficients only.
    pub terms: BTreeMap<Monomial, BigRational>,
}

pub const VARS: [&str; 3] = ["x", "y", "z"];

impl Poly {
    pub fn zero() -> Self {
        Poly::default()
    }
    pub fn constant(c: BigRational) -> Self {
        let mut p = Poly::zero();
        p.add_term([0, 0, 0], c);
        p
    }
    pub fn var(i: usize) -> Self {
        let mut m = [0; 3];
        m[i] = 1;
        let mut p = Poly::zero();
        p.add_term(m, BigRational::one());
        p
    }
    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }
    fn add_term(&mut self, m: Monomial, c: BigRational) {
        if c.is_zero() {
            return;
        }
        let e = self.terms.entry(m).or_insert_with(BigRational::zero);
        *e += c;
        if e.is_zero() {
            self.terms.remove(&m);
        }
    }
    /// Total degree; `None` for the zero polynomial.
    pub fn degree(&self) -> Option<u32> {
        self.terms.keys().map(|m| m.iter().sum()).max()
    }
    /// The constant value if the polynomial has no variables.
    pub fn as_constant(&self) -> Option<BigRational> {
        match self.degree() {
            None => Some(BigRational::zero()),
            Some(0) => self.terms.get(&[0, 0, 0]).cloned(),
            _ => None,
        }
    }
    pub fn uses_var(&self, i: usize) -> bool {
        self.terms.keys().any(|m| m[i] > 0)
    }
    /// Distinct total degrees of the terms, ascending.
    pub fn term_degrees(&self) -> Vec<u32> {
        let mut d: Vec<u32> = self.terms.keys().map(|m| m.iter().sum()).collect();
        d.sort_unstable();
        d.dedup();
        d
    }
    pub fn is_homogeneous(&self) -> bool {
        self.term_degrees().len() <= 1
    }
    pub fn neg(&self) -> Poly {
        Poly { terms: self.terms.iter().map(|(m, c)| (*m, -c.clone())).collect() }
    }
    pub fn add(&self, o: &Poly) -> Poly {
        let mut r = self.clone();
        for (m, c) in &o.terms {
            r.add_term(*m, c.clone());
        }
        r
    }
    pub fn sub(&self, o: &Poly) -> Poly {
        self.add(&o.neg())
    }
    pub fn mul(&self, o: &Poly) -> Poly {
        let mut r = Poly::zero();
        for (m1, c1) in &self.terms {
            for (m2, c2) in &o.terms {
                r.add_term([m1[0] + m2[0], m1[1] + m2[1], m1[2] + m2[2]], c1 * c2);
            }
        }
        r
    }
    pub fn scale(&self, c: &BigRational) -> Poly {
        let mut r = Poly::zero();
        for (m, v) in &self.terms {
            r.add_term(*m, v * c);
        }
        r
    }
    /// The partial derivative with respect to variable `var` (0 = x, 1 = y, 2 = z).
    pub fn derivative(&self, var: usize) -> Poly {
        let mut r = Poly::zero();
        for (m, v) in &self.terms {
            if m[var] > 0 {
                let mut m2 = *m;
                m2[var] -= 1;
                r.add_term(m2, v * BigRational::from_integer(m[var].into()));
            }
        }
        r
    }
    /// Power by repeated squaring. Callers bound `e * degree` first.
    pub fn pow(&self, mut e: u32) -> Poly {
        let mut base = self.clone();
        let mut acc = Poly::constant(BigRational::one());
        while e > 0 {
            if e & 1 == 1 {
                acc = acc.mul(&base);
            }
            e >>= 1;
            if e > 0 {
                base = base.mul(&base);
            }
        }
        acc
    }
    /// Homogenises to degree `d` with z (for an affine equation in x, y).
    pub fn homogenize(&self) -> Poly {
        let d = self.degree().unwrap_or(0);
        Poly {
            terms: self.terms.iter().map(|(m, c)| ([m[0], m[1], m[2] + d - (m[0] + m[1] + m[2])], c.clone())).collect(),
        }
    }
}

impl fmt::Display for Poly {
    /// Highest degree first, e.g. `y^2 - x^3 - x^2`; the zero polynomial is `0`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.is_zero() {
            return f.write_str("0");
        }
        let mut terms: Vec<(&Monomial, &BigRational)> = self.terms.iter().collect();
        terms.sort_by(|a, b| {
            let da: u32 = a.0.iter().sum();
            let db: u32 = b.0.iter().sum();
            db.cmp(&da).then(b.0.cmp(a.0))
        });
        for (i, (m, c)) in terms.iter().enumerate() {
            let neg = c.is_negative();
            let a = c.abs();
            if i == 0 {
                if neg {
                    f.write_str("-")?;
                }
            } else {
                f.write_str(if neg { " - " } else { " + " })?;
            }
            let mono: Vec<String> = (0..3)
                .filter(|&k| m[k] > 0)
                .map(|k| if m[k] == 1 { VARS[k].to_string() } else { format!("{}^{}", VARS[k], m[k]) })
                .collect();
            let coeff_one = a.is_one();
            if mono.is_empty() {
                write!(f, "{a}")?;
            } else if coeff_one {
                f.write_str(&mono.join("*"))?;
            } else {
                write!(f, "{a}*{}", mono.join("*"))?;
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64) -> BigRational {
        BigRational::from_integer(n.into())
    }

    #[test]
    fn binomial_expansion() {
        // (x + y)^3 = x^3 + 3x^2y + 3xy^2 + y^3 (common practice, no source).
        let p = Poly::var(0).add(&Poly::var(1)).pow(3);
        assert_eq!(p.terms.len(), 4);
        assert_eq!(p.terms[&[2, 1, 0]], q(3));
        assert!(p.is_homogeneous());
        assert_eq!(p.to_string(), "x^3 + 3*x^2*y + 3*x*y^2 + y^3");
    }

    #[test]
    fn homogenisation_of_the_nodal_cubic() {
        let x = Poly::var(0);
        let y = Poly::var(1);
        let f = y.pow(2).sub(&x.pow(3)).sub(&x.pow(2));
        let h = f.homogenize();
        assert!(h.is_homogeneous());
        assert_eq!(h.degree(), Some(3));
        assert_eq!(h.terms[&[0, 2, 1]], q(1));
        assert_eq!(h.terms[&[2, 0, 1]], q(-1));
    }
}
