//! Polynomials in y over R = Q[x]/(h), h square-free but not necessarily irreducible,
//! with the gcd computed by splitting h whenever a leading coefficient turns out to be a
//! zero divisor (dynamic evaluation, "D5"). This gives exact facts about the points
//! above all roots of h at once without factoring h.

use super::upoly::UPoly;
use num_rational::BigRational;
use num_traits::One;

/// Coefficients in y, lowest first, each reduced mod h.
pub type RPoly = Vec<UPoly>;

/// Extended Euclid: (g, s) with s a = g mod h, g = gcd(a, h) monic.
pub fn xgcd_mod(a: &UPoly, h: &UPoly) -> (UPoly, UPoly) {
    let (mut r0, mut r1) = (h.clone(), a.rem(h));
    let (mut s0, mut s1) = (UPoly::zero(), UPoly::one());
    while !r1.is_zero() {
        crate::limits::checkpoint();
        let (qt, r) = r0.divrem(&r1);
        let s = s0.sub(&qt.mul(&s1));
        r0 = r1;
        r1 = r;
        s0 = s1;
        s1 = s;
    }
    let lc = r0.lead();
    let inv = BigRational::one() / lc;
    (r0.scale(&inv), s0.scale(&inv).rem(h))
}

fn reduce(p: &RPoly, h: &UPoly) -> RPoly {
    let mut out: RPoly = p.iter().map(|c| c.rem(h)).collect();
    while out.last().is_some_and(UPoly::is_zero) {
        out.pop();
    }
    out
}

/// Either the leading coefficient is invertible on all of h, or h splits.
enum Lead {
    Unit(UPoly),
    Split(UPoly, UPoly),
}

fn lead_inverse(p: &RPoly, h: &UPoly) -> Lead {
    let (g, s) = xgcd_mod(p.last().unwrap(), h);
    if g.degree() == Some(0) {
        Lead::Unit(s)
    } else {
        let other = h.divrem(&g).0.monic();
        Lead::Split(g, other)
    }
}

/// gcd(a, b) in R[y], as monic gcds over the pieces of a splitting of h. Each piece is
/// (h_i, g_i) with prod h_i = h (up to constants).
pub fn gcd(h: &UPoly, a: &RPoly, b: &RPoly) -> Vec<(UPoly, RPoly)> {
    let mut out = Vec::new();
    let mut work = vec![(h.clone(), a.clone(), b.clone())];
    while let Some((h, a, b)) = work.pop() {
        crate::limits::checkpoint();
        if h.degree().unwrap_or(0) == 0 {
            continue;
        }
        let (a, b) = (reduce(&a, &h), reduce(&b, &h));
        if b.is_empty() {
            if a.is_empty() {
                out.push((h, vec![]));
                continue;
            }
            match lead_inverse(&a, &h) {
                Lead::Unit(inv) => out.push((h.clone(), a.iter().map(|c| c.mul(&inv).rem(&h)).collect())),
                Lead::Split(g1, g2) => {
                    work.push((g1, a.clone(), b.clone()));
                    work.push((g2, a, b));
                }
            }
            continue;
        }
        match lead_inverse(&b, &h) {
            Lead::Split(g1, g2) => {
                work.push((g1, a.clone(), b.clone()));
                work.push((g2, a, b));
            }
            Lead::Unit(inv) => {
                // a mod b with b's leading coefficient inverted.
                let mut r = a.clone();
                let db = b.len() - 1;
                while r.len() > db {
                    crate::limits::checkpoint();
                    let c = r.last().unwrap().mul(&inv).rem(&h);
                    let shift = r.len() - 1 - db;
                    for (i, bc) in b.iter().enumerate() {
                        r[shift + i] = r[shift + i].sub(&c.mul(bc)).rem(&h);
                    }
                    r.pop();
                }
                let r = reduce(&r, &h);
                work.push((h, b, r));
            }
        }
    }
    out
}

pub fn derivative(p: &RPoly) -> RPoly {
    p.iter().enumerate().skip(1).map(|(i, c)| c.scale(&BigRational::from_integer((i as i64).into()))).collect()
}

/// The square-free part of `g` over each piece of a further splitting of h.
pub fn squarefree(h: &UPoly, g: &RPoly) -> Vec<(UPoly, RPoly)> {
    if g.len() <= 1 {
        return vec![(h.clone(), g.clone())];
    }
    gcd(h, g, &derivative(g))
        .into_iter()
        .map(|(hi, d)| {
            let gi = reduce(g, &hi);
            let q = divide(&hi, &gi, &d);
            (hi, q)
        })
        .collect()
}

/// p / d in R[y] for d with an invertible leading coefficient that divides p.
pub fn divide(h: &UPoly, p: &RPoly, d: &RPoly) -> RPoly {
    if d.len() <= 1 {
        if let Some(c) = d.first() {
            let inv = xgcd_mod(c, h).1;
            return p.iter().map(|v| v.mul(&inv).rem(h)).collect();
        }
        return p.clone();
    }
    let mut rem = p.clone();
    let dd = d.len() - 1;
    let lead_inv = xgcd_mod(d.last().unwrap(), h).1;
    let mut q = vec![UPoly::zero(); rem.len().saturating_sub(dd)];
    while rem.len() > dd {
        crate::limits::checkpoint();
        let c = rem.last().unwrap().mul(&lead_inv).rem(h);
        let shift = rem.len() - 1 - dd;
        for (i, dc) in d.iter().enumerate() {
            rem[shift + i] = rem[shift + i].sub(&c.mul(dc)).rem(h);
        }
        q[shift] = c;
        rem.pop();
    }
    q
}

pub fn is_zero(p: &RPoly) -> bool {
    p.iter().all(UPoly::is_zero)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(v: &[i64]) -> UPoly {
        UPoly::from_ints(v)
    }

    #[test]
    fn gcd_splits_where_the_points_differ() {
        // h = (x^2 + 1)(x^2 - 2); a = y^2 - 2 (constant in x), b = y - x: over x = +-sqrt(2)
        // b divides a (gcd degree 1); over x = +-i it does not (gcd 1).
        let h = c(&[1, 0, 1]).mul(&c(&[-2, 0, 1]));
        let a: RPoly = vec![c(&[-2]), c(&[0]), c(&[1])];
        let b: RPoly = vec![c(&[0, -1]), c(&[1])];
        let pieces = gcd(&h, &a, &b);
        let mut degs: Vec<(usize, usize)> =
            pieces.iter().map(|(hi, g)| (hi.degree().unwrap(), g.len().saturating_sub(1))).collect();
        degs.sort();
        assert_eq!(degs, vec![(2, 0), (2, 1)]);
    }
}
