//! The common case of a curve equation expanded with 128-bit rational coefficients.
//!
//! Arithmetic is checked: the moment a coefficient does not fit, a degree passes the
//! limit, or the expression is not a plain polynomial, the answer is `None` and the
//! caller takes the exact big-number route (which also words any diagnostic). Most
//! equations never leave this path, which allocates no big integers.

use crate::ast::{BinOp, Expr, ExprKind, UnOp};
use crate::check::MAX_CURVE_DEGREE;
use crate::poly::{Monomial, Poly};
use num_bigint::BigInt;
use num_rational::{BigRational, Ratio};
use num_traits::{CheckedAdd, CheckedMul, One, Zero};

type Q = Ratio<i128>;

/// Terms with non-zero coefficients, each monomial once (unsorted: curve equations have
/// few terms, so a linear search beats a map).
#[derive(Clone)]
struct Terms(Vec<(Monomial, Q)>);

impl Terms {
    fn constant(c: Q) -> Terms {
        Terms(if c.is_zero() { vec![] } else { vec![([0; 3], c)] })
    }
    fn degree(&self) -> u32 {
        self.0.iter().map(|(m, _)| m.iter().sum::<u32>()).max().unwrap_or(0)
    }
    fn as_constant(&self) -> Option<Q> {
        match self.0.as_slice() {
            [] => Some(Q::zero()),
            [(m, c)] if *m == [0; 3] => Some(*c),
            _ => None,
        }
    }
    fn add_term(&mut self, m: Monomial, c: Q) -> Option<()> {
        if let Some(i) = self.0.iter().position(|(n, _)| *n == m) {
            let s = self.0[i].1.checked_add(&c)?;
            if s.is_zero() {
                self.0.swap_remove(i);
            } else {
                self.0[i].1 = s;
            }
        } else if !c.is_zero() {
            self.0.push((m, c));
        }
        Some(())
    }
    fn add(mut self, o: &Terms) -> Option<Terms> {
        for &(m, c) in &o.0 {
            self.add_term(m, c)?;
        }
        Some(self)
    }
    fn neg(mut self) -> Option<Terms> {
        for t in &mut self.0 {
            t.1 = Q::new_raw(t.1.numer().checked_neg()?, *t.1.denom());
        }
        Some(self)
    }
    fn mul(&self, o: &Terms) -> Option<Terms> {
        if self.degree() + o.degree() > MAX_CURVE_DEGREE {
            return None;
        }
        let mut r = Terms(Vec::with_capacity(self.0.len() * o.0.len()));
        for &(m1, c1) in &self.0 {
            for &(m2, c2) in &o.0 {
                r.add_term([m1[0] + m2[0], m1[1] + m2[1], m1[2] + m2[2]], c1.checked_mul(&c2)?)?;
            }
        }
        Some(r)
    }
    fn pow(&self, mut e: u32) -> Option<Terms> {
        if self.degree() as u64 * e as u64 > MAX_CURVE_DEGREE as u64 {
            return None;
        }
        let mut base = self.clone();
        let mut acc = Terms::constant(Q::one());
        while e > 0 {
            if e & 1 == 1 {
                acc = acc.mul(&base)?;
            }
            e >>= 1;
            if e > 0 {
                base = base.mul(&base)?;
            }
        }
        Some(acc)
    }
}

/// A decimal literal as a 128-bit rational, if it fits.
fn literal(text: &str) -> Option<Q> {
    let (mantissa, exp) = match text.find(['e', 'E']) {
        Some(i) => (&text[..i], text[i + 1..].parse::<i32>().ok()?),
        None => (text, 0),
    };
    let (int_part, frac_part) = mantissa.split_once('.').unwrap_or((mantissa, ""));
    if int_part.len() + frac_part.len() > 36 || !(int_part.bytes().chain(frac_part.bytes())).all(|b| b.is_ascii_digit())
    {
        return None;
    }
    let mut n: i128 = 0;
    for b in int_part.bytes().chain(frac_part.bytes()) {
        n = n * 10 + (b - b'0') as i128;
    }
    let shift = exp.checked_sub(frac_part.len() as i32)?;
    let p = 10i128.checked_pow(shift.unsigned_abs())?;
    Some(if shift >= 0 { Q::from_integer(n.checked_mul(p)?) } else { Q::new(n, p) })
}

fn expand(e: &Expr) -> Option<Terms> {
    match &e.kind {
        ExprKind::Number(t) => literal(t).map(Terms::constant),
        ExprKind::Name(n) => {
            let i = ["x", "y", "z"].iter().position(|v| v == n)?;
            let mut m = [0; 3];
            m[i] = 1;
            Some(Terms(vec![(m, Q::one())]))
        }
        ExprKind::Paren(inner) => expand(inner),
        ExprKind::Unary { op: UnOp::Neg, operand } => expand(operand)?.neg(),
        ExprKind::Binary { op, lhs, rhs } => {
            let (l, r) = (expand(lhs)?, expand(rhs)?);
            match op {
                BinOp::Add => l.add(&r),
                BinOp::Sub => l.add(&r.neg()?),
                BinOp::Mul => l.mul(&r),
                BinOp::Div => {
                    let c = r.as_constant().filter(|c| !c.is_zero())?;
                    let inv = c.recip();
                    Terms(l.0.into_iter().map(|(m, v)| Some((m, v.checked_mul(&inv)?))).collect::<Option<_>>()?).into()
                }
                BinOp::Pow => {
                    let k = r.as_constant().filter(|q| q.is_integer() && *q.numer() >= 0)?;
                    l.pow(u32::try_from(*k.numer()).ok()?)
                }
                _ => None,
            }
        }
        _ => None,
    }
}

/// `lhs - rhs` expanded, when every step fits in 128-bit rationals.
pub fn curve_poly(lhs: &Expr, rhs: Option<&Expr>) -> Option<Poly> {
    let mut t = expand(lhs)?;
    if let Some(r) = rhs {
        t = t.add(&expand(r)?.neg()?)?;
    }
    let terms =
        t.0.into_iter()
            .map(|(m, c)| (m, BigRational::new_raw(BigInt::from(*c.numer()), BigInt::from(*c.denom()))))
            .collect();
    Some(Poly { terms })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ast::StmtKind;

    fn both(src: &str) -> (Option<Poly>, Poly) {
        let p = crate::parse(src);
        let StmtKind::Curve { lhs, rhs, .. } = &p.program.stmts[0].kind else { panic!("{src}") };
        let exact = crate::check(src).curves.values().next().expect("a clean curve").poly.clone();
        (curve_poly(lhs, rhs.as_ref()), exact)
    }

    /// The fast path agrees with the big-number expansion (which it replaces) on
    /// equations that fit, and declines those that do not.
    #[test]
    fn agrees_with_the_exact_route() {
        for src in [
            "curve c: y^2 = x^5 - 3*x^3 + 4*x - 11/7",
            "curve c: (x + 2*y - 1/3)^7 = 0.25e-3*x*y",
            "curve c: x^3*y + y^3*z + z^3*x",
            "curve c: y^3 = (x - 1)*(x + 1)*(x^2 + 1.5)/4",
            "curve c: x^2 - x^2 + y",
        ] {
            let (fast, exact) = both(src);
            assert_eq!(fast.expect(src), exact, "{src}");
        }
        // 10^40 does not fit in 128 bits: the exact route takes over.
        let (fast, exact) = both("curve c: y = 10000000000000000000000000000000000000000*x^2");
        assert!(fast.is_none());
        assert_eq!(exact.degree(), Some(2));
        // (x + 7)^45 has the coefficient 45 * 7^44 ~ 6.6e38, past i128 (~1.7e38).
        assert!(both("curve c: y = (x + 7)^45").0.is_none());
    }
}
