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
            crate::limits::checkpoint();
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

/// Res_v(f, g) as a polynomial in u, up to a non-zero constant factor, for f whose
/// coefficient of its top power of v is a non-zero constant (so the formal resultant is
/// lc(f)^k Res(f(u0), g(u0)) where g drops k degrees at u0). Both are scaled to integer
/// coefficients, evaluated at u = 0, 1, ..., and the values interpolated: all in
/// integers, with the sub-resultant algorithm at each point.
pub fn resultant_v(f: &P2, g: &P2) -> UPoly {
    let (f, g) = (f.integral(), g.integral());
    let n = g.deg_v().unwrap_or(0) as usize;
    let m = f.deg_v().unwrap_or(0) as usize;
    let lc =
        f.terms.iter().find(|(&(_, j), _)| j as usize == m).map(|(_, c)| c.to_integer()).unwrap_or_else(BigInt::one);
    let bound = f.total_degree().unwrap_or(0) * g.total_degree().unwrap_or(0);
    let ys: Vec<BigInt> = (0..=bound as i64)
        .map(|x| {
            crate::limits::checkpoint();
            let (fu, mut gu) = (f.at_u_int(x), g.at_u_int(x));
            super::zpoly::trim(&mut gu);
            if gu.is_empty() {
                return BigInt::zero();
            }
            let k = n - (gu.len() - 1);
            super::zpoly::resultant(&fu, &gu) * num_traits::pow(lc.clone(), k)
        })
        .collect();
    UPoly::new(super::zpoly::interpolate_integers(&ys))
}

impl P2 {
    /// Scaled by a positive rational to integer coefficients with content 1.
    pub fn integral(&self) -> P2 {
        let lcm = self.terms.values().fold(BigInt::one(), |l, c| num_integer::Integer::lcm(&l, c.denom()));
        let ints: Vec<BigInt> =
            self.terms.values().map(|c| (c * BigRational::from_integer(lcm.clone())).to_integer()).collect();
        let g = ints.iter().fold(BigInt::zero(), |g, c| num_integer::Integer::gcd(&g, c));
        let mut p = P2::default();
        for ((m, _), c) in self.terms.iter().zip(ints) {
            p.add_term(*m, BigRational::from_integer(c / &g));
        }
        p
    }
    /// p(u0, v) for integer u0 and integer coefficients, as integers (lowest first).
    fn at_u_int(&self, u0: i64) -> Vec<BigInt> {
        let d = self.deg_v().unwrap_or(0) as usize;
        let mut c = vec![BigInt::zero(); d + 1];
        let u = BigInt::from(u0);
        for (&(i, j), v) in &self.terms {
            c[j as usize] += v.to_integer() * num_traits::pow(u.clone(), i as usize);
        }
        c
    }
}

/// The local intersection multiplicity at the origin of two curves p = 0 and q = 0
/// (`None` when they share a component through it), by Fulton's algorithm (*Algebraic
/// Curves*, section 3.3): I(P, yH) = I(P, y) + I(P, H), and replacing q by a
/// combination with p that lowers deg q(x, 0) keeps I.
pub fn intersection_at_origin(p: &P2, q: &P2) -> Option<u64> {
    let (mut f, mut g) = (p.clone(), q.clone());
    let mut total = 0u64;
    for _ in 0..10_000 {
        crate::limits::checkpoint();
        let at0 = |h: &P2| h.terms.get(&(0, 0)).is_some_and(|c| !c.is_zero());
        if at0(&f) || at0(&g) {
            return Some(total);
        }
        let (fx, gx) = (on_x_axis(&f), on_x_axis(&g));
        match (fx.degree(), gx.degree()) {
            (None, None) => return None,
            (None, Some(_)) | (Some(_), None) => {
                // The one vanishing on y = 0 is y H: I(y, other) + I(H, other).
                let (yh, other, ox) = if fx.is_zero() { (&f, &g, &gx) } else { (&g, &f, &fx) };
                total += ox.0.iter().position(|c| !c.is_zero()).unwrap_or(0) as u64;
                let mut h = P2::default();
                for (&(i, j), c) in &yh.terms {
                    h.add_term((i, j - 1), c.clone());
                }
                let other = other.clone();
                f = h.integral();
                g = other;
            }
            (Some(r), Some(s)) => {
                let (lo, hi, r, s) = if r <= s { (f.clone(), g.clone(), r, s) } else { (g.clone(), f.clone(), s, r) };
                let (lx, hx) = (on_x_axis(&lo), on_x_axis(&hi));
                // hi' = lc(lo) hi - lc(hi) x^(s - r) lo has a lower degree on y = 0.
                let mut shifted = P2::default();
                for (&(i, j), c) in &lo.terms {
                    shifted.add_term((i + (s - r) as u32, j), c * hx.lead());
                }
                let mut next = P2::default();
                for (&m, c) in &hi.terms {
                    next.add_term(m, c * lx.lead());
                }
                // Scaling by a non-zero constant keeps I; it keeps the coefficients small.
                let next = next.scale_add(&shifted, &-num_rational::BigRational::one());
                f = lo;
                g = if next.is_zero() { next } else { next.integral() };
            }
        }
    }
    None
}

fn on_x_axis(p: &P2) -> UPoly {
    let d = p.terms.keys().filter(|&&(_, j)| j == 0).map(|&(i, _)| i).max().unwrap_or(0) as usize;
    let mut c = vec![BigRational::zero(); d + 1];
    for (&(i, j), v) in &p.terms {
        if j == 0 {
            c[i as usize] = v.clone();
        }
    }
    UPoly::new(c)
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
