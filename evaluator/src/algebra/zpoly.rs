//! Univariate polynomials over Z as plain coefficient vectors (lowest first): the
//! fraction-free inner loops of resultants, where BigRational normalisation would cost
//! a gcd per operation.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Zero};

pub type Z = Vec<BigInt>;

pub fn trim(a: &mut Z) {
    while a.last().is_some_and(Zero::is_zero) {
        a.pop();
    }
}

fn deg(a: &Z) -> usize {
    a.len() - 1
}

fn content(a: &Z) -> BigInt {
    a.iter().fold(BigInt::zero(), |g, c| g.gcd(c))
}

/// lc(b)^(deg a - deg b + 1) a mod b.
fn prem(a: &Z, b: &Z) -> Z {
    let mut r = a.clone();
    let db = deg(b);
    let lb = b[db].clone();
    let mut e = deg(a) + 1 - db;
    while r.len() > db && !r.is_empty() {
        let dr = deg(&r);
        let c = r[dr].clone();
        for v in r.iter_mut() {
            *v *= &lb;
        }
        for (i, bv) in b.iter().enumerate() {
            r[dr - db + i] -= &c * bv;
        }
        r.pop();
        trim(&mut r);
        e -= 1;
    }
    let f = num_traits::pow(lb, e);
    if !f.is_one() {
        for v in r.iter_mut() {
            *v *= &f;
        }
    }
    r
}

/// Res(a, b) = lc(a)^deg b * prod b(roots of a), by the sub-resultant algorithm
/// (Cohen, *A Course in Computational Algebraic Number Theory*, Algorithm 3.3.7).
pub fn resultant(a: &Z, b: &Z) -> BigInt {
    let (mut a, mut b) = (a.clone(), b.clone());
    trim(&mut a);
    trim(&mut b);
    if a.is_empty() || b.is_empty() {
        return BigInt::zero();
    }
    let (ca, cb) = (content(&a), content(&b));
    let t = num_traits::pow(ca.clone(), deg(&b)) * num_traits::pow(cb.clone(), deg(&a));
    for v in a.iter_mut() {
        *v /= &ca;
    }
    for v in b.iter_mut() {
        *v /= &cb;
    }
    let mut s = BigInt::one();
    if deg(&a) < deg(&b) {
        std::mem::swap(&mut a, &mut b);
        if deg(&a) % 2 == 1 && deg(&b) % 2 == 1 {
            s = -s;
        }
    }
    let (mut g, mut h) = (BigInt::one(), BigInt::one());
    while deg(&b) > 0 {
        // Coefficients grow with every step: a step of a big-coefficient curve can take long.
        crate::limits::checkpoint();
        let delta = deg(&a) - deg(&b);
        if deg(&a) % 2 == 1 && deg(&b) % 2 == 1 {
            s = -s;
        }
        let r = prem(&a, &b);
        if r.is_empty() {
            return BigInt::zero();
        }
        a = b;
        let div = &g * num_traits::pow(h.clone(), delta);
        b = r.into_iter().map(|v| v / &div).collect();
        g = a[deg(&a)].clone();
        h = if delta == 0 { h } else { num_traits::pow(g.clone(), delta) / num_traits::pow(h.clone(), delta - 1) };
    }
    // b is a non-zero constant now: h <- lc(b)^deg a / h^(deg a - 1) (1 when deg a = 0).
    let da = deg(&a);
    let last = if da == 0 { BigInt::one() } else { num_traits::pow(b[0].clone(), da) / num_traits::pow(h, da - 1) };
    s * t * last
}

/// The integer polynomial through (k, y_k), k = 0..n, from forward differences:
/// R(u) = sum_k (Delta^k y_0) binom(u, k). Coefficients come out as exact rationals.
pub fn interpolate_integers(ys: &[BigInt]) -> Vec<num_rational::BigRational> {
    use num_rational::BigRational;
    let n = ys.len();
    let mut diffs = Vec::with_capacity(n);
    let mut cur = ys.to_vec();
    for _ in 0..n {
        crate::limits::checkpoint();
        diffs.push(cur[0].clone());
        cur = cur.windows(2).map(|w| &w[1] - &w[0]).collect();
    }
    // Accumulate sum_k diffs[k] * (n-1)!/k! * falling(u, k), then divide by (n-1)!.
    let top = n.saturating_sub(1);
    let fact = |k: usize| (1..=k).fold(BigInt::one(), |a, i| a * BigInt::from(i));
    let big = fact(top);
    let mut acc = vec![BigInt::zero(); n.max(1)];
    let mut falling = vec![BigInt::one()]; // falling(u, 0) = 1
    for (k, d) in diffs.iter().enumerate() {
        crate::limits::checkpoint();
        if !d.is_zero() {
            let w = d * (&big / fact(k));
            for (i, c) in falling.iter().enumerate() {
                acc[i] += &w * c;
            }
        }
        // falling(u, k + 1) = falling(u, k) (u - k)
        let mut next = vec![BigInt::zero(); falling.len() + 1];
        for (i, c) in falling.iter().enumerate() {
            next[i + 1] += c;
            next[i] -= c * BigInt::from(k);
        }
        falling = next;
    }
    acc.into_iter().map(|c| BigRational::new(c, big.clone())).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn z(v: &[i64]) -> Z {
        v.iter().map(|&c| BigInt::from(c)).collect()
    }

    #[test]
    fn subresultant_agrees_with_the_product_formula() {
        // res(x^2 + 1, x - 2) = 5; res(x^2 - 2, x^2 - 3) = 1; res(x^3 - x, 3x^2 - 1) = -4;
        // res(2x^2 + 3x + 1, x^2 - 1) = 0 (common root -1) (common practice, no source).
        assert_eq!(resultant(&z(&[1, 0, 1]), &z(&[-2, 1])), BigInt::from(5));
        assert_eq!(resultant(&z(&[-2, 0, 1]), &z(&[-3, 0, 1])), BigInt::from(1));
        assert_eq!(resultant(&z(&[0, -1, 0, 1]), &z(&[-1, 0, 3])), BigInt::from(-4));
        assert_eq!(resultant(&z(&[1, 3, 2]), &z(&[-1, 0, 1])), BigInt::from(0));
        // Against the rational Euclidean resultant on a less tidy pair.
        let (a, b) = (z(&[7, -3, 0, 5, 2]), z(&[-4, 1, 9]));
        let ua = super::super::upoly::UPoly::from_ints(&[7, -3, 0, 5, 2]);
        let ub = super::super::upoly::UPoly::from_ints(&[-4, 1, 9]);
        assert_eq!(num_rational::BigRational::from_integer(resultant(&a, &b)), ua.resultant(&ub));
        assert_eq!(num_rational::BigRational::from_integer(resultant(&b, &a)), ub.resultant(&ua));
    }

    #[test]
    fn interpolation_recovers_a_cubic() {
        // 2u^3 - u + 5 at u = 0..=3.
        let ys: Vec<BigInt> = (0..4i64).map(|u| BigInt::from(2 * u * u * u - u + 5)).collect();
        let c = interpolate_integers(&ys);
        let want: Vec<num_rational::BigRational> =
            [5, -1, 0, 2].iter().map(|&v| num_rational::BigRational::from_integer(BigInt::from(v))).collect();
        assert_eq!(c, want);
    }
}
