//! Invariants of genus-2 curves, from a binary sextic's roots or from a Riemann matrix.
//!
//! The invariants of y^2 = a0 prod (x - alpha_i) in Igusa's root form (Igusa, Ann. of
//! Math. 72 (1960), section 2; cited from memory), with (ij) = alpha_i - alpha_j:
//!   I2  = a0^2  sum over the 15 pairings          (12)^2 (34)^2 (56)^2,
//!   I4  = a0^4  sum over the 10 splits into triples (12)^2 (23)^2 (31)^2 (45)^2 (56)^2 (64)^2,
//!   I6  = a0^6  sum over the 60 splits with a matching
//!                 (12)^2 (23)^2 (31)^2 (45)^2 (56)^2 (64)^2 (14)^2 (25)^2 (36)^2,
//!   I10 = a0^10 prod over i < j (ij)^2.
//! Each root occurs in every term to the power 2, 4, 6 and 10, so a root at infinity (a
//! quintic) drops out with its factors, a0 becoming the quintic's leading coefficient. A
//! change of coordinates by GL(2) multiplies I_k by det^k times a common power of the
//! scaling, so the absolute invariants I2^5 / I10, I2^3 I4 / I10, I2^2 I6 / I10 depend on
//! the curve alone.
//!
//! From a Riemann matrix: Rosenhain's form y^2 = x (x - 1)(x - l1)(x - l2)(x - l3) with
//! l1 = t0^2 t2^2 / (t1^2 t3^2), l2 = t2^2 t12^2 / (t1^2 t15^2), l3 = t0^2 t12^2 / (t3^2 t15^2),
//! t_i the even theta constants theta[a/2, b/2](0) of `theta`'s convention with
//! i = a_1 + 2 a_2 + 4 b_1 + 8 b_2 (a, b in {0, 1}^2). The shape of these quotients is
//! Rosenhain's, as given by Gaudry (J. Math. Cryptology 1 (2007), section 3; it rests on
//! Thomae's formula, Mumford, *Tata Lectures on Theta II*, IIIa, section 8). Recalled from
//! memory, the index convention and the denominators were fixed against one curve's own
//! invariants (y^2 = x^5 - 3x^3 + x + 1/2, its roots in mpmath); the tests check the result
//! on other curves and bases.
//!
//! All arithmetic is in complex balls (`waves::ball`), so the results carry bounds.

use crate::waves::ball::Ball;

/// The root invariants (I2, I4, I6, I10); `None` is the root at infinity.
pub fn root_invariants(lead: Ball, roots: &[Option<Ball>; 6]) -> [Ball; 4] {
    let d = |i: usize, j: usize| -> Ball {
        match (roots[i], roots[j]) {
            (Some(a), Some(b)) => {
                let x = a.add(b.scale(-1.0));
                x.mul(x)
            }
            _ => Ball::real(1.0),
        }
    };
    let prod = |pairs: &[(usize, usize)]| pairs.iter().fold(Ball::real(1.0), |acc, &(i, j)| acc.mul(d(i, j)));
    let mut i2 = Ball::real(0.0);
    for p in pairings(&[0, 1, 2, 3, 4, 5]) {
        i2 = i2.add(prod(&p));
    }
    let mut i4 = Ball::real(0.0);
    let mut i6 = Ball::real(0.0);
    for (s, t) in splits() {
        let tri = prod(&[(s[0], s[1]), (s[1], s[2]), (s[2], s[0]), (t[0], t[1]), (t[1], t[2]), (t[2], t[0])]);
        i4 = i4.add(tri);
        for perm in PERMS {
            let m = prod(&[(s[0], t[perm[0]]), (s[1], t[perm[1]]), (s[2], t[perm[2]])]);
            i6 = i6.add(tri.mul(m));
        }
    }
    let mut i10 = Ball::real(1.0);
    for i in 0..6 {
        for j in i + 1..6 {
            i10 = i10.mul(d(i, j));
        }
    }
    let a2 = lead.mul(lead);
    let a4 = a2.mul(a2);
    let a6 = a4.mul(a2);
    let a10 = a6.mul(a4);
    [i2.mul(a2), i4.mul(a4), i6.mul(a6), i10.mul(a10)]
}

const PERMS: [[usize; 3]; 6] = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];

/// The 15 ways to split the six indices into three pairs.
fn pairings(idx: &[usize]) -> Vec<Vec<(usize, usize)>> {
    if idx.is_empty() {
        return vec![vec![]];
    }
    let first = idx[0];
    let mut out = vec![];
    for k in 1..idx.len() {
        let rest: Vec<usize> = idx.iter().enumerate().filter(|&(j, _)| j != 0 && j != k).map(|(_, &v)| v).collect();
        for mut p in pairings(&rest) {
            p.push((first, idx[k]));
            out.push(p);
        }
    }
    out
}

/// The 10 splits of {0..5} into two triples (the one holding 0 first).
fn splits() -> Vec<([usize; 3], [usize; 3])> {
    let mut out = vec![];
    for a in 1..6 {
        for b in a + 1..6 {
            let s = [0, a, b];
            let t: Vec<usize> = (1..6).filter(|&k| k != a && k != b).collect();
            out.push((s, [t[0], t[1], t[2]]));
        }
    }
    out
}

/// I2^5 / I10, I2^3 I4 / I10, I2^2 I6 / I10; None when I10's ball holds 0 (a singular sextic
/// or bounds too wide).
pub fn absolute(i: &[Ball; 4]) -> Option<[Ball; 3]> {
    let [i2, i4, i6, i10] = *i;
    let p2 = i2.mul(i2);
    let p3 = p2.mul(i2);
    let p5 = p3.mul(p2);
    Some([p5.div(i10)?, p3.mul(i4).div(i10)?, p2.mul(i6).div(i10)?])
}

/// Rosenhain's l1, l2, l3 from the theta constants indexed by i = a1 + 2 a2 + 4 b1 + 8 b2.
pub fn rosenhain(t: &dyn Fn(usize) -> Ball) -> Option<[Ball; 3]> {
    let sq = |i: usize| t(i).mul(t(i));
    let q = |a: usize, b: usize, c: usize, d: usize| sq(a).mul(sq(b)).div(sq(c).mul(sq(d)));
    Some([q(0, 2, 1, 3)?, q(2, 12, 1, 15)?, q(0, 12, 3, 15)?])
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_complex::Complex64 as C64;

    #[test]
    fn counts_of_terms() {
        assert_eq!(pairings(&[0, 1, 2, 3, 4, 5]).len(), 15);
        assert_eq!(splits().len(), 10);
    }

    // A Moebius change x -> 1/x maps the roots to their inverses and a0 to a0 prod(-alpha_i)
    // (the reversed polynomial's leading coefficient): the absolute invariants stay
    // (common practice, no source).
    #[test]
    fn absolute_invariants_survive_inversion() {
        let roots = [0.5, -1.25, 2.0, 3.5, -0.75, 1.5].map(|v| C64::new(v, 0.3 * v));
        let ball = |z: C64| Some(Ball::exact(z));
        let a = absolute(&root_invariants(Ball::real(2.0), &roots.map(ball))).unwrap();
        let lead = roots.iter().fold(C64::new(2.0, 0.0), |acc, r| acc * (-r));
        let inv = roots.map(|r| C64::new(1.0, 0.0) / r);
        let b = absolute(&root_invariants(Ball::exact(lead), &inv.map(ball))).unwrap();
        for k in 0..3 {
            assert!((a[k].c - b[k].c).norm() <= 1e-9 * a[k].c.norm(), "{k}: {:?} {:?}", a[k], b[k]);
        }
    }
}
