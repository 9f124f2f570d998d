//! Determinant, inverse and trace with bounds that hold.
//!
//! Every entry is a complex rational: an exact rational as it is, a float as the binary
//! fraction it is. A matrix value with bound e stands for an exact matrix A + E, |E_jk| <= e.
//!
//! **det and trace** are computed exactly from those rationals (fraction-free Bareiss
//! elimination over the Gaussian integers after scaling each row by the lcm of its
//! denominators), so the only rounding is the final conversion to a float, measured
//! exactly. The input term: det is multilinear in the rows, so det(A + E) - det A is the
//! sum over nonempty row sets S of det(rows E_i for i in S, A_i otherwise); by Hadamard's
//! inequality each term is at most prod_{S} |E_i| prod_{not S} |A_i| (Euclidean row norms),
//! and |E_i| <= e sqrt(n). Summed: |det(A + E) - det A| <= prod (a_i + e sqrt n) - prod a_i
//! with a_i = |A_i|, evaluated as a sum of nonnegative terms. For the trace, n e.
//!
//! **inverse** of a rational matrix is exact (Gauss-Jordan over Q). Otherwise X is the
//! computed inverse (LU, nalgebra) and R = I - A X is computed in floating point with its
//! rounding bounded by |fl(A X) - A X| <= gamma |A||X| entrywise (Higham, *Accuracy and
//! Stability of Numerical Algorithms*, 2nd ed., sec. 3.1 and 3.6, complex inner products;
//! gamma taken as 4 (n + 2) u as in `rounding.rs`) plus the subtraction's rounding. With
//! rho >= ||R||_inf < 1, A X = I - R gives A^-1 = X (I - R)^-1 and the Neumann series
//! ||A^-1 - X|| <= ||X|| rho / (1 - rho), ||A^-1|| <= mu = ||X|| / (1 - rho). The input
//! term: with ||E||_inf <= n e and mu n e < 1, (A + E)^-1 - A^-1 = -(A + E)^-1 E A^-1 gives
//! ||(A + E)^-1 - A^-1|| <= mu^2 n e / (1 - mu n e). Entries are bounded by the infinity
//! norm. When rho >= 1 or mu n e >= 1, invertibility is not shown and the call is refused.

use crate::num::{Num, UNIT_ROUNDOFF as U};
use kelp_lang::number::to_f64;
use nalgebra::DMatrix;
use num_bigint::BigInt;
use num_complex::Complex64;
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

/// A complex rational.
#[derive(Clone, Debug, PartialEq)]
struct Qc {
    re: BigRational,
    im: BigRational,
}

impl Qc {
    fn of(n: &Num) -> Option<Qc> {
        Some(match n {
            Num::Exact(q) => Qc { re: q.clone(), im: BigRational::zero() },
            Num::Real(x) => Qc { re: BigRational::from_float(*x)?, im: BigRational::zero() },
            Num::Complex(c) => Qc { re: BigRational::from_float(c.re)?, im: BigRational::from_float(c.im)? },
        })
    }
}

/// The exact value as a `Num`: exact when every input was exact, otherwise the nearest
/// float (real when the imaginary part is 0 and the inputs were real) with the distance
/// to it, rounded up.
fn to_num(q: &Qc, exact: bool, real: bool) -> (Num, f64) {
    if exact {
        return (Num::Exact(q.re.clone()), 0.0);
    }
    let (re, im) = (to_f64(&q.re), to_f64(&q.im));
    let back = |x: f64, exact: &BigRational| to_f64(&(BigRational::from_float(x).unwrap() - exact).abs());
    let dist = back(re, &q.re).hypot(back(im, &q.im)) * (1.0 + 4.0 * U);
    let v = if real && im == 0.0 { Num::Real(re) } else { Num::Complex(Complex64::new(re, im)) };
    (v, dist)
}

/// Gaussian integers as pairs, for Bareiss elimination.
type Zi = (BigInt, BigInt);

fn zmul(a: &Zi, b: &Zi) -> Zi {
    (&a.0 * &b.0 - &a.1 * &b.1, &a.0 * &b.1 + &a.1 * &b.0)
}

/// a / b, known to be exact.
fn zdiv_exact(a: &Zi, b: &Zi) -> Zi {
    let n = zmul(a, &(b.0.clone(), -b.1.clone()));
    let d = &b.0 * &b.0 + &b.1 * &b.1;
    (n.0 / &d, n.1 / d)
}

fn is_zero(a: &Zi) -> bool {
    a.0.is_zero() && a.1.is_zero()
}

/// The exact determinant of a square matrix of complex rationals.
fn det_exact(m: &[Vec<Qc>]) -> Qc {
    let n = m.len();
    let mut scale = BigInt::one();
    // Each row times the lcm of its denominators: Gaussian integers.
    let mut a: Vec<Vec<Zi>> = m
        .iter()
        .map(|row| {
            let l = row.iter().fold(BigInt::one(), |l, q| l.lcm(q.re.denom()).lcm(q.im.denom()));
            scale *= &l;
            row.iter()
                .map(|q| {
                    (
                        (&q.re * BigRational::from_integer(l.clone())).to_integer(),
                        (&q.im * BigRational::from_integer(l.clone())).to_integer(),
                    )
                })
                .collect()
        })
        .collect();
    let mut sign = BigInt::one();
    let mut prev: Zi = (BigInt::one(), BigInt::zero());
    for k in 0..n {
        crate::limits::checkpoint();
        let Some(p) = (k..n).find(|&i| !is_zero(&a[i][k])) else {
            return Qc { re: BigRational::zero(), im: BigRational::zero() };
        };
        if p != k {
            a.swap(p, k);
            sign = -sign;
        }
        for i in k + 1..n {
            for j in k + 1..n {
                let t = zmul(&a[k][k], &a[i][j]);
                let s = zmul(&a[i][k], &a[k][j]);
                a[i][j] = zdiv_exact(&(t.0 - s.0, t.1 - s.1), &prev);
            }
        }
        prev = a[k][k].clone();
    }
    let d = if n == 0 { (BigInt::one(), BigInt::zero()) } else { a[n - 1][n - 1].clone() };
    let s = BigRational::from_integer(scale);
    Qc { re: BigRational::from_integer(&sign * d.0) / &s, im: BigRational::from_integer(sign * d.1) / s }
}

fn qc_matrix(m: &[Vec<Num>]) -> Result<Vec<Vec<Qc>>, String> {
    m.iter()
        .map(|r| r.iter().map(|x| Qc::of(x).ok_or_else(|| "an entry is not a finite number".to_string())).collect())
        .collect()
}

fn all_exact(m: &[Vec<Num>]) -> bool {
    m.iter().flatten().all(Num::is_exact)
}

fn all_real(m: &[Vec<Num>]) -> bool {
    m.iter().flatten().all(|x| x.to_real().is_some())
}

/// Upper bounds of the Euclidean row norms.
fn row_norms(m: &[Vec<Num>]) -> Vec<f64> {
    let n = m.first().map_or(0, Vec::len) as f64;
    m.iter()
        .map(|r| {
            // Scaled by the largest modulus, so squares neither overflow nor underflow.
            let big = r.iter().map(|x| x.magnitude() * (1.0 + 2.0 * U)).fold(0.0, f64::max);
            if big == 0.0 {
                return 0.0;
            }
            let s: f64 = r.iter().map(|x| (x.magnitude() * (1.0 + 2.0 * U) / big).powi(2)).sum();
            big * s.sqrt() * (1.0 + 2.0 * (n + 5.0) * U)
        })
        .collect()
}

/// det with its bound; `e` is the input's entrywise bound.
pub fn det(m: &[Vec<Num>], e: f64) -> Result<(Num, f64), String> {
    let n = m.len();
    let d = det_exact(&qc_matrix(m)?);
    let (v, rounding) = to_num(&d, all_exact(m), all_real(m));
    let input = if e == 0.0 {
        0.0
    } else {
        // prod (a_i + eps) - prod a_i, accumulated without cancellation.
        let eps = e * (n as f64).sqrt() * (1.0 + 2.0 * U);
        let (mut p, mut diff) = (1.0f64, 0.0f64);
        for a in row_norms(m) {
            diff = diff * (a + eps) + p * eps;
            p *= a;
        }
        diff * (1.0 + 4.0 * (n as f64 + 2.0) * U)
    };
    let bound = (input + rounding) * (1.0 + 2.0 * U);
    if !bound.is_finite() || !v.is_finite() {
        return Err("the determinant is beyond the range of double precision".into());
    }
    Ok((v, bound))
}

/// trace with its bound.
pub fn trace(m: &[Vec<Num>], e: f64) -> Result<(Num, f64), String> {
    let q = qc_matrix(m)?;
    let mut s = Qc { re: BigRational::zero(), im: BigRational::zero() };
    for (i, row) in q.iter().enumerate() {
        s = Qc { re: &s.re + &row[i].re, im: &s.im + &row[i].im };
    }
    let (v, rounding) = to_num(&s, all_exact(m), all_real(m));
    Ok((v, (m.len() as f64 * e + rounding) * (1.0 + 2.0 * U)))
}

/// Gauss-Jordan over Q; `None` when the matrix is singular.
fn inverse_exact(m: &[Vec<Num>]) -> Option<Vec<Vec<BigRational>>> {
    let n = m.len();
    let mut a: Vec<Vec<BigRational>> = m
        .iter()
        .enumerate()
        .map(|(i, r)| {
            let mut row: Vec<BigRational> = r.iter().map(|x| x.to_rational().unwrap()).collect();
            row.extend((0..n).map(|j| if i == j { BigRational::one() } else { BigRational::zero() }));
            row
        })
        .collect();
    for k in 0..n {
        crate::limits::checkpoint();
        let p = (k..n).find(|&i| !a[i][k].is_zero())?;
        a.swap(p, k);
        let piv = a[k][k].clone();
        for x in a[k].iter_mut() {
            *x /= &piv;
        }
        for i in 0..n {
            if i != k && !a[i][k].is_zero() {
                let f = a[i][k].clone();
                for j in k..2 * n {
                    let t = &f * &a[k][j];
                    a[i][j] -= t;
                }
            }
        }
    }
    Some(a.into_iter().map(|r| r[n..].to_vec()).collect())
}

/// Upper bound of the infinity norm (largest row sum of moduli).
fn inf_norm(rows: impl Iterator<Item = Vec<f64>>, n: usize) -> f64 {
    rows.map(|r| r.iter().sum::<f64>()).fold(0.0, f64::max) * (1.0 + 2.0 * (n as f64 + 2.0) * U)
}

/// The input term mu^2 n e / (1 - mu n e), or a refusal when invertibility near A is not shown.
fn input_term(mu: f64, n: usize, e: f64) -> Result<f64, String> {
    if e == 0.0 {
        return Ok(0.0);
    }
    let t = mu * n as f64 * e * (1.0 + 4.0 * U);
    if t >= 1.0 {
        return Err(format!(
            "the matrix cannot be shown invertible: its entries' error bound {e:.1e} allows a singular matrix \
             (||A^-1|| ||E|| may be {:.2e} >= 1)",
            t
        ));
    }
    Ok(mu * t / (1.0 - t) * (1.0 + 4.0 * U))
}

/// inverse with its entrywise bound; `e` is the input's entrywise bound.
pub fn inverse(m: &[Vec<Num>], e: f64) -> Result<(Vec<Vec<Num>>, f64), String> {
    let n = m.len();
    let singular = || "the matrix is singular: its determinant is exactly 0".to_string();
    if all_exact(m) {
        let x = inverse_exact(m).ok_or_else(singular)?;
        let mu = inf_norm(x.iter().map(|r| r.iter().map(|q| to_f64(&q.abs()) * (1.0 + 4.0 * U)).collect()), n);
        let bound = input_term(mu, n, e)?;
        return Ok((x.into_iter().map(|r| r.into_iter().map(Num::Exact).collect()).collect(), bound));
    }
    let a = crate::linalg::to_complex_matrix(m);
    let real = all_real(m);
    // B = D_r A D_c with powers of two, so that widely different magnitudes neither
    // overflow nor underflow in elimination; A^-1 = D_c B^-1 D_r, and everything below
    // bounds Y against B^-1 and scales back by the largest factors.
    let (dr, dc) = scales(&a);
    let b = DMatrix::from_fn(n, n, |i, j| a[(i, j)] * dr[i] * dc[j]);
    let mut y = b.clone().try_inverse().ok_or_else(|| {
        "the matrix cannot be shown invertible: elimination in double precision met a zero pivot".to_string()
    })?;
    if real {
        y.iter_mut().for_each(|z| *z = Complex64::new(z.re, 0.0));
    }
    if y.iter().any(|z| !z.re.is_finite() || !z.im.is_finite()) {
        return Err("the matrix cannot be shown invertible: its computed inverse overflows".into());
    }
    let (rho, e) = if n <= EXACT_RESIDUAL_MAX {
        (residual_exact(m, &dr, &dc, &y)?, e)
    } else {
        // Exact entries enter as the floats they become: their conversion is an input error.
        (residual_float(&b, &y), e + m.iter().flatten().map(crate::bounded::conversion).fold(0.0, f64::max))
    };
    if rho >= 1.0 || !rho.is_finite() {
        return Err(format!(
            "the matrix cannot be shown invertible in double precision: for the computed inverse X, \
             ||I - A X|| may be {rho:.2e} >= 1 (the matrix is singular or too close to it)"
        ));
    }
    let mag = |z: Complex64| z.norm() * (1.0 + U);
    let yn = inf_norm((0..n).map(|i| (0..n).map(|j| mag(y[(i, j)])).collect()), n);
    let one_minus = (1.0 - rho) * (1.0 - 2.0 * U);
    let own = yn * rho / one_minus * (1.0 + 4.0 * U);
    let mu = yn / one_minus * (1.0 + 2.0 * U);
    let (rmax, cmax) = (dr.iter().copied().fold(0.0, f64::max), dc.iter().copied().fold(0.0, f64::max));
    // |F| = |D_r E D_c| <= e rmax cmax entrywise; entries of D_c M D_r are <= cmax rmax ||M||.
    let scaled = if e == 0.0 { 0.0 } else { input_term(mu, n, e * rmax * cmax * (1.0 + 2.0 * U))? };
    let tidy = |z: Complex64| if real { Num::Real(z.re) } else { Num::Complex(z) };
    let x: Vec<Vec<Num>> = (0..n).map(|i| (0..n).map(|j| tidy(y[(i, j)] * dc[i] * dr[j])).collect()).collect();
    // Scaling back by powers of two is exact unless it leaves the normal range.
    let bound = (own + scaled) * rmax * cmax * (1.0 + 4.0 * U) + 2.0 * TINY;
    if !bound.is_finite() || x.iter().flatten().any(|z| !z.is_finite()) {
        return Err("the inverse is beyond the range of double precision".into());
    }
    Ok((x, bound))
}

/// The smallest positive subnormal.
const TINY: f64 = 4.9406564584124654e-324;

/// A power of two near 1 / m (1 for 0), clamped so it stays a normal float.
fn pow2_near_inverse(m: f64) -> f64 {
    if m == 0.0 || !m.is_finite() {
        return 1.0;
    }
    2f64.powi((-m.log2().floor() as i32).clamp(-1000, 1000))
}

/// Row scales, then column scales of the row-scaled matrix (powers of two).
fn scales(a: &DMatrix<Complex64>) -> (Vec<f64>, Vec<f64>) {
    let n = a.nrows();
    let big = |it: &mut dyn Iterator<Item = Complex64>| it.map(|z| z.re.abs().max(z.im.abs())).fold(0.0, f64::max);
    let dr: Vec<f64> = (0..n).map(|i| pow2_near_inverse(big(&mut (0..n).map(|j| a[(i, j)])))).collect();
    let dc: Vec<f64> = (0..n).map(|j| pow2_near_inverse(big(&mut (0..n).map(|i| a[(i, j)] * dr[i])))).collect();
    (dr, dc)
}

/// Up to this size R = I - A X is computed exactly (A's exact entries as they are, so
/// their conversion to floats costs nothing); above it in floating point with its rounding.
const EXACT_RESIDUAL_MAX: usize = 16;

/// ||I - B Y||_inf rounded up, from the exact rationals of B = D_r A D_c and Y.
fn residual_exact(m: &[Vec<Num>], dr: &[f64], dc: &[f64], x: &DMatrix<Complex64>) -> Result<f64, String> {
    let n = m.len();
    let q = |f: f64| BigRational::from_float(f).unwrap();
    let a: Vec<Vec<Qc>> = qc_matrix(m)?
        .into_iter()
        .enumerate()
        .map(|(i, r)| {
            r.into_iter()
                .enumerate()
                .map(|(j, z)| {
                    let f = q(dr[i]) * q(dc[j]);
                    Qc { re: z.re * &f, im: z.im * f }
                })
                .collect()
        })
        .collect();
    let xq: Vec<Vec<Qc>> =
        (0..n).map(|i| (0..n).map(|j| Qc::of(&Num::Complex(x[(i, j)])).unwrap()).collect()).collect();
    let mut rho = 0.0f64;
    for i in 0..n {
        crate::limits::checkpoint();
        let mut row = 0.0;
        for j in 0..n {
            let mut s = Qc { re: BigRational::from_integer((i == j).into()), im: BigRational::zero() };
            for k in 0..n {
                let (p, q) = (&a[i][k], &xq[k][j]);
                s.re -= &p.re * &q.re - &p.im * &q.im;
                s.im -= &p.re * &q.im + &p.im * &q.re;
            }
            let up = |v: &BigRational| to_f64(&v.abs()) * (1.0 + 4.0 * U) + f64::from_bits(1);
            row += up(&s.re).hypot(up(&s.im)) * (1.0 + 2.0 * U);
        }
        rho = rho.max(row);
    }
    Ok(rho * (1.0 + 2.0 * (n as f64 + 2.0) * U))
}

/// ||I - B Y||_inf rounded up, from floating point with the rounding of fl(B Y) bounded.
fn residual_float(a: &DMatrix<Complex64>, x: &DMatrix<Complex64>) -> f64 {
    let n = a.nrows();
    let gamma = 4.0 * (n as f64 + 2.0) * U;
    let mag = |z: Complex64| z.norm() * (1.0 + U);
    // |R| entrywise, plus the rounding of fl(A X) and of I - fl(A X).
    let r_rows = (0..n).map(|i| {
        crate::limits::checkpoint();
        (0..n)
            .map(|j| {
                let (mut s, mut abs) = (Complex64::new(0.0, 0.0), 0.0);
                for k in 0..n {
                    s += a[(i, k)] * x[(k, j)];
                    abs += mag(a[(i, k)]) * mag(x[(k, j)]);
                }
                let r = if i == j { Complex64::new(1.0, 0.0) - s } else { -s };
                mag(r) * (1.0 + 2.0 * U) + gamma * abs
            })
            .collect::<Vec<f64>>()
    });
    inf_norm(r_rows, n) * (1.0 + 2.0 * (n as f64 + 2.0) * U)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(v: i64) -> Num {
        Num::int(v)
    }

    #[test]
    fn exact_determinants_and_inverses() {
        // det [[2, 1], [7, 4]] = 1, inverse [[4, -1], [-7, 2]] (common practice, no source).
        let m = vec![vec![q(2), q(1)], vec![q(7), q(4)]];
        assert_eq!(det(&m, 0.0).unwrap(), (q(1), 0.0));
        let (x, b) = inverse(&m, 0.0).unwrap();
        assert_eq!(x, vec![vec![q(4), q(-1)], vec![q(-7), q(2)]]);
        assert_eq!(b, 0.0);
        // A singular one: rows proportional.
        let s = vec![vec![q(1), q(2)], vec![q(2), q(4)]];
        assert_eq!(det(&s, 0.0).unwrap().0, q(0));
        assert!(inverse(&s, 0.0).is_err());
    }

    #[test]
    fn a_float_near_singular_matrix_is_refused() {
        // [[1, 1], [1, 1 + 2^-52]] has determinant 2^-52 exactly (common practice, no
        // source); with an input bound of 1e-10 a singular matrix is within reach.
        let m = vec![vec![Num::Real(1.0), Num::Real(1.0)], vec![Num::Real(1.0), Num::Real(1.0 + f64::EPSILON)]];
        let (d, b) = det(&m, 0.0).unwrap();
        assert_eq!(d.to_real().unwrap(), f64::EPSILON);
        assert_eq!(b, 0.0);
        assert!(inverse(&m, 1e-10).is_err());
    }
}
