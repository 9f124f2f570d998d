//! Bivariate polynomials over Q in local variables (u, v): charts of a projective curve,
//! translations, lowest forms, blow-ups, and resultants by evaluation and interpolation.

use super::upoly::UPoly;
use kelp_lang::poly::Poly;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};
use std::collections::BTreeMap;

#[derive(Clone, Debug, PartialEq, Eq, Default)]
pub struct P2 {
    /// (i, j) -> coefficient of u^i v^j; non-zero coefficients only.
    pub terms: BTreeMap<(u32, u32), BigRational>,
}

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

fn binomial(n: u32, k: u32) -> BigInt {
    let mut r = BigInt::one();
    for i in 0..k {
        r = r * BigInt::from(n - i) / BigInt::from(i + 1);
    }
    r
}

impl P2 {
    pub fn add_term(&mut self, m: (u32, u32), c: BigRational) {
        if c.is_zero() {
            return;
        }
        let e = self.terms.entry(m).or_insert_with(BigRational::zero);
        *e += c;
        if e.is_zero() {
            self.terms.remove(&m);
        }
    }
    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }
    /// The chart of a homogeneous F(x, y, z) where variable `one` is set to 1; the other
    /// two, in order, become (u, v).
    pub fn chart(f: &Poly, one: usize) -> P2 {
        let rest: Vec<usize> = (0..3).filter(|&i| i != one).collect();
        let mut p = P2::default();
        for (m, c) in &f.terms {
            p.add_term((m[rest[0]], m[rest[1]]), c.clone());
        }
        p
    }
    pub fn total_degree(&self) -> Option<u32> {
        self.terms.keys().map(|(i, j)| i + j).max()
    }
    /// Lowest total degree of a term: the multiplicity at the origin.
    pub fn order(&self) -> Option<u32> {
        self.terms.keys().map(|(i, j)| i + j).min()
    }
    pub fn deg_v(&self) -> Option<u32> {
        self.terms.keys().map(|&(_, j)| j).max()
    }
    pub fn deriv(&self, var: usize) -> P2 {
        let mut p = P2::default();
        for (&(i, j), c) in &self.terms {
            let (e, m) = if var == 0 { (i, (i.wrapping_sub(1), j)) } else { (j, (i, j.wrapping_sub(1))) };
            if e > 0 {
                p.add_term(m, c * q(e as i64));
            }
        }
        p
    }
    /// p(u + a, v + b).
    pub fn shift(&self, a: &BigRational, b: &BigRational) -> P2 {
        let mut p = P2::default();
        for (&(i, j), c) in &self.terms {
            for k in 0..=i {
                let ck = BigRational::from_integer(binomial(i, k)) * num_traits::pow(a.clone(), (i - k) as usize);
                if ck.is_zero() {
                    continue;
                }
                for l in 0..=j {
                    let cl = BigRational::from_integer(binomial(j, l)) * num_traits::pow(b.clone(), (j - l) as usize);
                    p.add_term((k, l), c * &ck * cl);
                }
            }
        }
        p
    }
    /// The lowest form as the polynomial T(1, t) (t = v/u) and the multiplicity of the
    /// direction u = 0 (the degree drop).
    pub fn tangent_cone(&self) -> (UPoly, u32) {
        let m = self.order().unwrap_or(0);
        let mut c = vec![BigRational::zero(); m as usize + 1];
        for (&(i, j), v) in &self.terms {
            if i + j == m {
                c[j as usize] = v.clone();
            }
        }
        let t = UPoly::new(c);
        let drop = m - t.degree().map_or(0, |d| d as u32);
        (t, drop)
    }
    /// Blow-up in the chart v = u (w + t0): p(u, u (w + t0)) / u^m, in variables (u, w).
    pub fn blow_up(&self, m: u32, t0: &BigRational) -> P2 {
        let mut p = P2::default();
        for (&(i, j), c) in &self.terms {
            // u^i (u (w + t0))^j = u^(i + j) (w + t0)^j
            for l in 0..=j {
                let cl = BigRational::from_integer(binomial(j, l)) * num_traits::pow(t0.clone(), (j - l) as usize);
                p.add_term((i + j - m, l), c * cl);
            }
        }
        p
    }
    /// Blow-up in the other chart u = s v: p(s v, v) / v^m, in variables (s, v).
    pub fn blow_up_other(&self, m: u32) -> P2 {
        let mut p = P2::default();
        for (&(i, j), c) in &self.terms {
            p.add_term((i, i + j - m), c.clone());
        }
        p
    }
    /// p(u0, v) as a polynomial in v.
    pub fn at_u(&self, u0: &BigRational) -> UPoly {
        let d = self.deg_v().unwrap_or(0) as usize;
        let mut c = vec![BigRational::zero(); d + 1];
        for (&(i, j), v) in &self.terms {
            c[j as usize] += v * num_traits::pow(u0.clone(), i as usize);
        }
        UPoly::new(c)
    }
    pub fn scale_add(&self, o: &P2, t: &BigRational) -> P2 {
        let mut p = self.clone();
        for (m, c) in &o.terms {
            p.add_term(*m, c * t);
        }
        p
    }
}

/// Res_v(f, g) as a polynomial in u, for f whose coefficient of its top power of v is a
/// non-zero constant (so the formal resultant is lc(f)^k * Res(f(u0), g(u0)) where g
/// drops k degrees at u0), by evaluation at 0, 1, ... and Newton interpolation.
pub fn resultant_v(f: &P2, g: &P2) -> UPoly {
    let n = g.deg_v().unwrap_or(0);
    let m = f.deg_v().unwrap_or(0);
    let lc = f.terms.iter().find(|(&(_, j), _)| j == m).map(|(_, c)| c.clone()).unwrap_or_else(BigRational::one);
    let bound = f.total_degree().unwrap_or(0) * g.total_degree().unwrap_or(0);
    let xs: Vec<BigRational> = (0..=bound as i64).map(q).collect();
    let ys: Vec<BigRational> = xs
        .iter()
        .map(|x| {
            let (fu, gu) = (f.at_u(x), g.at_u(x));
            if gu.is_zero() {
                return BigRational::zero();
            }
            let k = n - gu.degree().unwrap() as u32;
            fu.resultant(&gu) * num_traits::pow(lc.clone(), k as usize)
        })
        .collect();
    interpolate(&xs, &ys)
}

/// The polynomial of least degree through the points (Newton's divided differences).
pub fn interpolate(xs: &[BigRational], ys: &[BigRational]) -> UPoly {
    let n = xs.len();
    let mut dd = ys.to_vec();
    for k in 1..n {
        for i in (k..n).rev() {
            dd[i] = (&dd[i] - &dd[i - 1]) / (&xs[i] - &xs[i - k]);
        }
    }
    let mut p = UPoly::zero();
    for k in (0..n).rev() {
        p = p.mul(&UPoly::new(vec![-xs[k].clone(), BigRational::one()])).add(&UPoly::new(vec![dd[k].clone()]));
    }
    p
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resultant_eliminates_y() {
        // Res_y(y^2 - x, y - x) = x^2 - x (y = x on the parabola: x = 0 or 1; common
        // practice, no source).
        let mut f = P2::default();
        f.add_term((0, 2), q(1));
        f.add_term((1, 0), q(-1));
        let mut g = P2::default();
        g.add_term((0, 1), q(1));
        g.add_term((1, 0), q(-1));
        assert_eq!(resultant_v(&f, &g), UPoly::from_ints(&[0, -1, 1]));
    }

    #[test]
    fn blow_up_of_the_cusp_is_smooth() {
        // y^2 - x^3 at the origin: multiplicity 2, tangent cone y^2 (t^2), and the blow-up
        // w^2 - u is smooth (common practice, no source).
        let mut f = P2::default();
        f.add_term((0, 2), q(1));
        f.add_term((3, 0), q(-1));
        assert_eq!(f.order(), Some(2));
        let (t, drop) = f.tangent_cone();
        assert_eq!((t, drop), (UPoly::from_ints(&[0, 0, 1]), 0));
        assert_eq!(f.blow_up(2, &q(0)).order(), Some(1));
    }
}
