//! Truncated Taylor series in (x, y, t) of weighted degree a + 2b + 3c <= 6.
//!
//! KP is weighted-homogeneous with x, y, t of weights 1, 2, 3: every term of
//! 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x has weight 6 once u = 2 F_xx (F = log tau). So the
//! series of F to weighted degree 6 at a point gives u and every derivative the residual
//! needs, analytically: no finite differences anywhere.

use num_complex::Complex64 as C64;
use std::sync::OnceLock;

/// The exponents (a, b, c) kept, in a fixed order.
pub fn monomials() -> &'static [(u32, u32, u32)] {
    static M: OnceLock<Vec<(u32, u32, u32)>> = OnceLock::new();
    M.get_or_init(|| {
        let mut out = vec![];
        for c in 0..=2u32 {
            for b in 0..=3u32 {
                for a in 0..=6u32 {
                    if a + 2 * b + 3 * c <= 6 {
                        out.push((a, b, c));
                    }
                }
            }
        }
        out.sort_by_key(|&(a, b, c)| (a + 2 * b + 3 * c, c, b, a));
        out
    })
}

/// Index of the product monomial, or None when it is truncated away.
pub(crate) fn product_table() -> &'static Vec<Vec<Option<usize>>> {
    static T: OnceLock<Vec<Vec<Option<usize>>>> = OnceLock::new();
    T.get_or_init(|| {
        let m = monomials();
        m.iter()
            .map(|&(a, b, c)| m.iter().map(|&(d, e, f)| m.iter().position(|&x| x == (a + d, b + e, c + f))).collect())
            .collect()
    })
}

pub fn index(a: u32, b: u32, c: u32) -> usize {
    monomials().iter().position(|&m| m == (a, b, c)).expect("a kept monomial")
}

/// Coefficients f_(a,b,c) of sum f x^a y^b t^c (Taylor coefficients, not derivatives).
#[derive(Clone, Debug, PartialEq)]
pub struct Series(pub Vec<C64>);

impl Series {
    pub fn zero() -> Series {
        Series(vec![C64::new(0.0, 0.0); monomials().len()])
    }

    /// exp(p x + q y + r t), truncated.
    pub fn exponential(p: C64, q: C64, r: C64) -> Series {
        let mut s = Series::zero();
        for (k, &(a, b, c)) in monomials().iter().enumerate() {
            s.0[k] = p.powu(a) * q.powu(b) * r.powu(c) / (fact(a) * fact(b) * fact(c));
        }
        s
    }

    pub fn add_scaled(&mut self, w: C64, o: &Series) {
        for (x, y) in self.0.iter_mut().zip(&o.0) {
            *x += w * y;
        }
    }

    pub fn mul(&self, o: &Series) -> Series {
        let t = product_table();
        let mut out = Series::zero();
        for (i, x) in self.0.iter().enumerate() {
            if *x == C64::new(0.0, 0.0) {
                continue;
            }
            for (j, y) in o.0.iter().enumerate() {
                if let Some(k) = t[i][j] {
                    out.0[k] += x * y;
                }
            }
        }
        out
    }

    /// log of the series without its constant term's logarithm: log(S / s0), which has the
    /// same derivatives as log S. None when s0 is zero (tau vanishes at the point).
    pub fn log_normalised(&self) -> Option<Series> {
        let s0 = self.0[0];
        if s0.norm() == 0.0 || !s0.re.is_finite() || !s0.im.is_finite() {
            return None;
        }
        let mut e = Series(self.0.iter().map(|v| v / s0).collect());
        e.0[0] = C64::new(0.0, 0.0);
        // log(1 + e) = e - e^2/2 + ... ; e^7 has weighted degree >= 7.
        let mut out = Series::zero();
        let mut power = e.clone();
        for k in 1..=6 {
            let sign = if k % 2 == 1 { 1.0 } else { -1.0 };
            out.add_scaled(C64::new(sign / k as f64, 0.0), &power);
            power = power.mul(&e);
        }
        Some(out)
    }

    /// A coefficientwise majorant of [`Series::log_normalised`]: -log(1 - |e|) = sum |e|^k / k
    /// with |e| the moduli of S / s0 - 1. Rounding in log S is relative to these sizes (the
    /// terms of its coefficients before they cancel), so they are what a residual computed
    /// from log S can be compared with. None when s0 is zero.
    pub fn log_majorant(&self) -> Option<Series> {
        let s0 = self.0[0];
        if s0.norm() == 0.0 || !s0.re.is_finite() || !s0.im.is_finite() {
            return None;
        }
        let mut e = Series(self.0.iter().map(|v| C64::new((v / s0).norm(), 0.0)).collect());
        e.0[0] = C64::new(0.0, 0.0);
        let mut out = Series::zero();
        let mut power = e.clone();
        for k in 1..=6 {
            out.add_scaled(C64::new(1.0 / k as f64, 0.0), &power);
            power = power.mul(&e);
        }
        Some(out)
    }

    pub fn get(&self, a: u32, b: u32, c: u32) -> C64 {
        self.0[index(a, b, c)]
    }
}

pub fn fact(n: u32) -> f64 {
    (1..=n).map(|k| k as f64).product()
}

/// u and the KP residual at a point from the series of F = log tau: u = 2 F_xx + c.
#[derive(Clone, Copy, Debug)]
pub struct KpPoint {
    pub u: C64,
    pub residual: C64,
    /// The largest of |3 u_yy|, |u_xxxx|, |6 u_x^2|, |6 u u_xx|, |4 u_xt|.
    pub scale: f64,
    /// The largest of the same five terms computed from [`Series::log_majorant`] (and |c|):
    /// the sizes the computation of the residual works at, so its rounding is relative to
    /// this, and it stays away from 0 where the wave is flat (there `scale` is itself at
    /// rounding level). At least `scale`.
    pub size: f64,
}

/// The five terms of the residual from the Taylor coefficients of F = log tau.
fn kp_terms(f: &Series, c: C64) -> (C64, [C64; 5]) {
    let d = |a: u32, b: u32, cc: u32| f.get(a, b, cc) * fact(a) * fact(b) * fact(cc);
    let u = 2.0 * d(2, 0, 0) + c;
    let ux = 2.0 * d(3, 0, 0);
    let uxx = 2.0 * d(4, 0, 0);
    let uxxxx = 2.0 * d(6, 0, 0);
    let uyy = 2.0 * d(2, 2, 0);
    let uxt = 2.0 * d(3, 0, 1);
    (u, [3.0 * uyy, uxxxx, 6.0 * ux * ux, 6.0 * u * uxx, -4.0 * uxt])
}

fn largest(terms: &[C64]) -> f64 {
    terms.iter().map(|v| v.norm()).fold(0.0, f64::max)
}

/// `majorant` is [`Series::log_majorant`] of the same tau series as `f`.
pub fn kp_point(f: &Series, majorant: &Series, c: C64) -> KpPoint {
    let (u, terms) = kp_terms(f, c);
    let (_, sizes) = kp_terms(majorant, C64::new(c.norm(), 0.0));
    let scale = largest(&terms);
    KpPoint { u, residual: terms.iter().sum(), scale, size: largest(&sizes).max(scale) }
}

#[cfg(test)]
mod tests {
    use super::*;

    // 23 monomials of weighted degree <= 6 (count by hand: 16 with c = 0, 6 with c = 1, 1 with c = 2).
    #[test]
    fn monomial_count() {
        assert_eq!(monomials().len(), 23);
    }

    // log(exp(p x + q y + r t)) = p x + q y + r t, exactly (common practice).
    #[test]
    fn log_of_exponential_is_linear() {
        let (p, q, r) = (C64::new(0.3, 0.1), C64::new(-1.2, 0.0), C64::new(0.5, -0.7));
        let mut e = Series::exponential(p, q, r);
        for v in e.0.iter_mut() {
            *v *= 2.5;
        }
        let l = e.log_normalised().unwrap();
        for (k, &(a, b, c)) in monomials().iter().enumerate() {
            let want = match (a, b, c) {
                (1, 0, 0) => p,
                (0, 1, 0) => q,
                (0, 0, 1) => r,
                _ => C64::new(0.0, 0.0),
            };
            assert!((l.0[k] - want).norm() < 1e-14, "{a} {b} {c}");
        }
    }
}
