//! Error bounds of the language's own floating-point arithmetic.
//!
//! A value carries one absolute bound (the largest over its entries) on the distance
//! between the float it holds and the exact value it stands for. Every operation adds
//! three things: the operands' own bounds pushed through the operation (first order is not
//! enough: the bounds below hold for any perturbation within the bounds), the error of
//! converting an exact operand to floating point when the result is a float, and the
//! rounding of the operation itself. Unit roundoff u = 2^-53 (rounding to nearest).
//!
//! Rounding constants (common practice, from the standard error model
//! fl(a op b) = (a op b)(1 + d), |d| <= u, applied componentwise):
//! * real + - * /: u |r|; complex + -: u |r| (each component rounds by u of itself);
//! * complex *: sqrt(5) u |a||b| (Brent, Percival & Zimmermann, Math. Comp. 76 (2007)),
//!   taken as 3u |r|; complex /: at most about 5u |a|/|b| for the textbook formula num-complex
//!   uses, taken as 8u;
//! * a dot product of length n: gamma_n sum |a_k||b_k| (Higham, *Accuracy and Stability of
//!   Numerical Algorithms*, 2nd ed., sec. 3.1), taken as 4 (n + 2) u n max|a| max|b| for
//!   complex entries;
//! * real powers by the C library's pow: within 1 ulp, taken as 2u |r|; complex powers by
//!   exp(e log b): 6u + 2u |e| (|log |b|| + pi), relative.

use crate::num::{Num, UNIT_ROUNDOFF as U};
use crate::value::{Value, Valued};
use kelp_lang::ast::BinOp;
use kelp_lang::number::to_f64;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};

/// A complex number with exact rational parts: the value a float stands for exactly.
#[derive(Clone)]
struct Cq {
    re: BigRational,
    im: BigRational,
}

impl Cq {
    /// The exact value of the float that `n` is (or becomes when converted).
    fn of_float(n: &Num) -> Option<Cq> {
        let c = n.to_complex();
        Some(Cq { re: BigRational::from_float(c.re)?, im: BigRational::from_float(c.im)? })
    }
    fn add(&self, o: &Cq) -> Cq {
        Cq { re: &self.re + &o.re, im: &self.im + &o.im }
    }
    fn sub(&self, o: &Cq) -> Cq {
        Cq { re: &self.re - &o.re, im: &self.im - &o.im }
    }
    fn mul(&self, o: &Cq) -> Cq {
        Cq { re: &self.re * &o.re - &self.im * &o.im, im: &self.re * &o.im + &self.im * &o.re }
    }
    fn div(&self, o: &Cq) -> Option<Cq> {
        let d = &o.re * &o.re + &o.im * &o.im;
        if d.is_zero() {
            return None;
        }
        let n = self.mul(&Cq { re: o.re.clone(), im: -o.im.clone() });
        Some(Cq { re: n.re / &d, im: n.im / d })
    }
    /// |self - o| as a float rounded up.
    fn distance(&self, o: &Cq) -> f64 {
        let (a, b) = (to_f64(&(&self.re - &o.re).abs()), to_f64(&(&self.im - &o.im).abs()));
        a.hypot(b) * (1.0 + 8.0 * U) + f64::MIN_POSITIVE
    }
}

/// Largest exact rounding error of an entrywise or matrix operation, or `None` when the
/// operation has no rational exact result (or its operands are not all finite). Exact
/// operands enter as the floats they are converted to: the conversion is an input error.
fn exact_rounding(op: BinOp, l: &Value, r: &Value, result: &Value) -> Option<f64> {
    let q = |v: &Value| -> Option<Vec<Cq>> { nums(v).iter().map(|n| Cq::of_float(n)).collect() };
    let (a, b, res) = (q(l)?, q(r)?, q(result)?);
    let exact: Vec<Cq> = match (op, l, r) {
        (BinOp::Mul, Value::Matrix(m), Value::Matrix(_) | Value::Vector(_)) => {
            let (rows, inner) = (m.len(), m.first().map_or(0, Vec::len));
            let cols = b.len() / inner.max(1);
            let mut out = Vec::with_capacity(rows * cols);
            for i in 0..rows {
                for j in 0..cols {
                    let mut s = Cq { re: BigRational::zero(), im: BigRational::zero() };
                    for k in 0..inner {
                        s = s.add(&a[i * inner + k].mul(&b[k * cols + j]));
                    }
                    out.push(s);
                }
            }
            out
        }
        (BinOp::Pow, Value::Num(_), Value::Num(e)) => {
            let k = e.to_rational().filter(|k| k.is_integer())?.to_integer().to_i64()?;
            if k.unsigned_abs() > 64 {
                return None;
            }
            let mut p = Cq { re: BigRational::from_integer(1.into()), im: BigRational::zero() };
            for _ in 0..k.unsigned_abs() {
                p = p.mul(&a[0]);
            }
            if k < 0 {
                p = Cq { re: BigRational::from_integer(1.into()), im: BigRational::zero() }.div(&p)?;
            }
            vec![p]
        }
        (BinOp::Add | BinOp::Sub | BinOp::Mul | BinOp::Div, _, _) => {
            // Entrywise, or a scalar against every entry.
            let n = res.len();
            let pick = |v: &Vec<Cq>, i: usize| if v.len() == 1 { v[0].clone() } else { v[i].clone() };
            let mut out = Vec::with_capacity(n);
            for i in 0..n {
                let (x, y) = (pick(&a, i), pick(&b, i));
                out.push(match op {
                    BinOp::Add => x.add(&y),
                    BinOp::Sub => x.sub(&y),
                    BinOp::Mul => x.mul(&y),
                    _ => x.div(&y)?,
                });
            }
            out
        }
        _ => return None,
    };
    if exact.len() != res.len() {
        return None;
    }
    Some(exact.iter().zip(&res).map(|(e, r)| e.distance(r)).fold(0.0, f64::max))
}

/// Every numeric entry of a value.
fn nums(v: &Value) -> Vec<&Num> {
    match v {
        Value::Num(n) => vec![n],
        Value::Vector(x) => x.iter().collect(),
        Value::Matrix(m) => m.iter().flatten().collect(),
        _ => vec![],
    }
}

/// Largest modulus of the entries.
pub fn size(v: &Value) -> f64 {
    nums(v).iter().map(|n| n.magnitude()).fold(0.0, f64::max)
}

fn all_exact(v: &Value) -> bool {
    nums(v).iter().all(|n| n.is_exact())
}

/// The operand's bound, plus its conversion to floating point when it is used in float
/// arithmetic.
fn input_error(v: &Valued, converted: bool) -> f64 {
    let conv = if converted { nums(&v.value).iter().map(|n| n.conversion_error()).fold(0.0, f64::max) } else { 0.0 };
    v.error_bound + conv
}

/// Inner dimension of a matrix product (1 for entrywise and scalar products).
fn inner_dim(op: BinOp, l: &Value, r: &Value) -> f64 {
    match (op, l, r) {
        (BinOp::Mul, Value::Matrix(a), Value::Matrix(_) | Value::Vector(_)) => a.first().map_or(1, Vec::len) as f64,
        _ => 1.0,
    }
}

/// The bound of `l op r`, whose computed value is `result`.
pub fn arith_error(op: BinOp, l: &Valued, r: &Valued, result: &Value) -> f64 {
    if all_exact(result) {
        // Exact arithmetic: the result is as exact as its operands (both exact here).
        return l.error_bound + r.error_bound;
    }
    let (ea, eb) = (input_error(l, true), input_error(r, true));
    let (a, b) = (size(&l.value), size(&r.value));
    let res = size(result);
    let complex = nums(result).iter().any(|n| matches!(n, Num::Complex(_)))
        || nums(&l.value).iter().chain(nums(&r.value).iter()).any(|n| matches!(n, Num::Complex(_)));
    // (the operands' errors pushed through, the operation's own rounding by the model)
    let (pushed, model) = match op {
        BinOp::Add | BinOp::Sub => (ea + eb, U * res),
        BinOp::Mul => {
            let n = inner_dim(op, &l.value, &r.value);
            let own = if n > 1.0 {
                4.0 * (n + 2.0) * U * n * a * b
            } else if complex {
                3.0 * U * res
            } else {
                U * res
            };
            (n * (a * eb + b * ea + ea * eb), own)
        }
        BinOp::Div => {
            if b <= eb {
                return f64::INFINITY;
            }
            let own = if complex { 8.0 * U * a / (b - eb) } else { U * res };
            ((ea + a * eb / b) / (b - eb), own)
        }
        BinOp::Pow => match (&l.value, &r.value) {
            (Value::Num(base), Value::Num(e)) => (pow_pushed(base, ea, e, eb, res), pow_model(base, e, res)),
            _ => return f64::INFINITY,
        },
        _ => (0.0, 0.0),
    };
    // The operation's own rounding exactly, where the exact result is rational.
    let own = exact_rounding(op, &l.value, &r.value, result).unwrap_or(model);
    // The bound itself is computed in floating point: round it up.
    (pushed + own) * (1.0 + 4.0 * U)
}

/// The model's rounding bound of a power.
fn pow_model(base: &Num, e: &Num, res: f64) -> f64 {
    let bm = base.magnitude();
    let complex_route = matches!(base, Num::Complex(_))
        || matches!(e, Num::Complex(_))
        || (base.to_real().is_some_and(|x| x < 0.0) && !is_integer(e));
    if complex_route {
        (6.0 + 2.0 * e.magnitude() * (bm.ln().abs() + std::f64::consts::PI)) * U * res
    } else {
        2.0 * U * res
    }
}

/// |(b + db)^(e + de) - b^e| for |db| <= eb, |de| <= ee.
fn pow_pushed(base: &Num, eb: f64, e: &Num, ee: f64, res: f64) -> f64 {
    if eb == 0.0 && ee == 0.0 {
        return 0.0;
    }
    let bm = base.magnitude();
    // Integer exponents, any base, by the mean value theorem on |x|^m along the segment
    // (|(b + d)^m - b^m| <= m |d| (|b| + |d|)^(m-1); for x^-m, m |d| / (|b| - |d|)^(m+1)).
    // Written as products, not as a difference that would round the small change away.
    if ee == 0.0 && is_integer(e) {
        let k = e.to_real().unwrap_or(f64::NAN);
        let m = k.abs();
        let prop = if k == 0.0 {
            0.0
        } else if k > 0.0 {
            m * eb * (bm + eb).powf(m - 1.0)
        } else if bm > eb {
            m * eb / (bm - eb).powf(m + 1.0)
        } else {
            f64::INFINITY
        };
        return prop * (1.0 + 1e-12);
    }
    // Otherwise b^e = exp(e log b): bound the change of e log b over the discs, which
    // must avoid 0 and the branch cut of log (the distance of b from (-inf, 0] is |b| for
    // Re b >= 0, |Im b| otherwise).
    let c = base.to_complex();
    let cut_distance = if c.re >= 0.0 { bm } else { c.im.abs() };
    if cut_distance <= eb {
        return f64::INFINITY;
    }
    let dlog = eb / (bm - eb);
    let log_max = (bm + eb).ln().abs().max((bm - eb).ln().abs()) + std::f64::consts::PI;
    let d = (e.magnitude() + ee) * dlog + ee * log_max;
    res * d.exp_m1() * (1.0 + 1e-12)
}

fn is_integer(n: &Num) -> bool {
    match n {
        Num::Exact(q) => q.is_integer(),
        Num::Real(r) => r.fract() == 0.0,
        Num::Complex(c) => c.im == 0.0 && c.re.fract() == 0.0,
    }
}

/// The bound of `abs(v)`: the modulus of a complex number is rounded once (hypot).
pub fn abs_error(v: &Valued, result: &Num) -> f64 {
    let own = match &v.value {
        Value::Num(n @ Num::Complex(_)) => {
            // Exact when r^2 = re^2 + im^2 holds exactly (3 + 4i, say).
            let exact = match (Cq::of_float(n), Cq::of_float(result)) {
                (Some(c), Some(r)) => &r.re * &r.re == &c.re * &c.re + &c.im * &c.im,
                _ => false,
            };
            if exact {
                0.0
            } else {
                U * result.magnitude()
            }
        }
        _ => 0.0,
    };
    v.error_bound + own
}

/// Slack to add when deciding |a - b| computed in floating point: conversions of exact
/// entries, the subtraction and the modulus.
pub fn distance_slack(a: &Num, b: &Num, dist: f64) -> f64 {
    if a.is_exact() && b.is_exact() {
        return 0.0;
    }
    (a.conversion_error() + b.conversion_error() + 3.0 * U * dist) * (1.0 + 4.0 * U)
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_rational::BigRational;

    fn real(x: f64, e: f64) -> Valued {
        Valued { value: Value::Num(Num::Real(x)), error_bound: e, reason: None }
    }

    #[test]
    fn a_square_root_carries_its_rounding() {
        // sqrt(2) = 1.41421356237309504880... (common practice, no source); the double
        // nearest is 1.4142135623730951454..., 4.5e-17 away.
        let two = Valued::exact(Value::Num(Num::int(2)));
        let half = Valued::exact(Value::Num(Num::Exact(BigRational::new(1.into(), 2.into()))));
        let r = Num::int(2).pow(&Num::Exact(BigRational::new(1.into(), 2.into()))).unwrap();
        let e = arith_error(BinOp::Pow, &two, &half, &Value::Num(r.clone()));
        let truth = 1.414_213_562_373_095_048_801_688_724_209_7_f64;
        assert!(e >= 4.4e-17 && e < 1e-15, "bound {e}");
        assert!((r.to_real().unwrap() - truth).abs() <= e);
    }

    #[test]
    fn integer_powers_of_uncertain_bases_have_finite_bounds() {
        // (1 + d)^2 - 1 = 2d + d^2 exactly (common practice, no source).
        let b = real(1.0, 1e-10);
        let two = Valued::exact(Value::Num(Num::int(2)));
        let e = arith_error(BinOp::Pow, &b, &two, &Value::Num(Num::Real(1.0)));
        assert!(e >= 2e-10 + 1e-20 && e < 2.1e-10, "{e}");
        let minus = Valued::exact(Value::Num(Num::int(-1)));
        let e = arith_error(BinOp::Pow, &real(1e-12, 1e-11), &minus, &Value::Num(Num::Real(1e12)));
        assert!(e.is_infinite(), "a base whose disc holds 0 has no bounded reciprocal");
    }

    #[test]
    fn matrix_products_count_their_inner_dimension() {
        // An n x n all-ones matrix with entries off by e: each product entry is off by
        // up to n (2e + e^2) (common practice, no source).
        let n = 5;
        let m = Value::Matrix(vec![vec![Num::Real(1.0); n]; n]);
        let v = Valued { value: m.clone(), error_bound: 1e-8, reason: None };
        let prod = Value::Matrix(vec![vec![Num::Real(n as f64); n]; n]);
        let e = arith_error(BinOp::Mul, &v, &v, &prod);
        assert!(e >= n as f64 * (2e-8 + 1e-16), "{e}");
    }
}
