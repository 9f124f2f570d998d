//! Rational KP solutions: tau = the Schur polynomial s_lambda in t1 = x, t2 = y, t3 = t (and
//! optional constant higher times), from the Jacobi–Trudi determinant det(h_{lambda_i - i + j})
//! with sum h_n z^n = exp(sum t_k z^k) (Macdonald, *Symmetric Functions and Hall
//! Polynomials*, I.3). Exact polynomial arithmetic over Q; the KP equation is checked
//! exactly in Hirota's form (D_x^4 + 3 D_y^2 - 4 D_x D_t) tau . tau = 0, which for
//! u = 2 (log tau)_xx is kelp's 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x = 0.

use super::ball::{up, Ball, BallSeries, U};
use super::series::{monomials, Series};

/// Binomial coefficients, exact in binary64 for the degrees kept (every partial product is
/// an integer below 2^53).
fn binom(n: u32, k: u32) -> f64 {
    (0..k).fold(1.0, |acc, i| acc * (n - i) as f64 / (i + 1) as f64)
}
use kelp_lang::poly::Poly;
use num_complex::Complex64 as C64;
use num_rational::BigRational;
use num_traits::One;

#[derive(Clone, Debug)]
pub struct RationalWave {
    pub partition: Vec<u32>,
    /// tau in x, y and t (stored as the third variable).
    pub tau: Poly,
    /// The Hirota form vanishes identically (checked exactly).
    pub exact_solution: bool,
    terms: Vec<([u32; 3], f64)>,
}

fn q(n: i64) -> BigRational {
    BigRational::from_integer(n.into())
}

fn d(p: &Poly, vars: &[usize]) -> Poly {
    vars.iter().fold(p.clone(), |acc, &v| acc.derivative(v))
}

/// Largest |lambda| accepted (the determinant's size grows quickly beyond).
pub const MAX_WEIGHT: u32 = 24;

impl RationalWave {
    pub fn new(partition: &[u32], higher: &[BigRational]) -> Result<RationalWave, String> {
        let mut lambda: Vec<u32> = partition.iter().copied().filter(|&v| v > 0).collect();
        if lambda.is_empty() {
            return Err("the partition must have a positive part".into());
        }
        if lambda.windows(2).any(|w| w[0] < w[1]) {
            return Err("a partition lists its parts in non-increasing order".into());
        }
        let weight: u32 = lambda.iter().sum();
        if weight > MAX_WEIGHT {
            return Err(format!("|lambda| = {weight} exceeds the limit of {MAX_WEIGHT}"));
        }
        lambda.shrink_to_fit();
        // h_0..h_N with n h_n = sum_k k t_k h_{n-k}.
        let nmax = (lambda[0] as usize) + lambda.len();
        let time = |k: usize| -> Poly {
            match k {
                1 => Poly::var(0),
                2 => Poly::var(1),
                3 => Poly::var(2),
                _ => higher.get(k - 4).map_or_else(Poly::zero, |c| Poly::constant(c.clone())),
            }
        };
        let mut h = vec![Poly::constant(BigRational::one())];
        for n in 1..=nmax {
            let mut s = Poly::zero();
            for k in 1..=n {
                s = s.add(&time(k).mul(&h[n - k]).scale(&q(k as i64)));
            }
            h.push(s.scale(&(BigRational::one() / q(n as i64))));
        }
        let l = lambda.len();
        let entry = |i: usize, j: usize| -> Poly {
            let idx = lambda[i] as i64 - i as i64 + j as i64;
            if idx < 0 {
                Poly::zero()
            } else {
                h[idx as usize].clone()
            }
        };
        let m: Vec<Vec<Poly>> = (0..l).map(|i| (0..l).map(|j| entry(i, j)).collect()).collect();
        let tau = det(&m);
        // Hirota: D_x^4 tau.tau = 2 (tau tau_xxxx - 4 tau_x tau_xxx + 3 tau_xx^2),
        // D_y^2 tau.tau = 2 (tau tau_yy - tau_y^2), D_x D_t tau.tau = 2 (tau tau_xt - tau_x tau_t).
        let (x, y, t) = (0, 1, 2);
        let dx4 = tau
            .mul(&d(&tau, &[x, x, x, x]))
            .sub(&d(&tau, &[x]).mul(&d(&tau, &[x, x, x])).scale(&q(4)))
            .add(&d(&tau, &[x, x]).mul(&d(&tau, &[x, x])).scale(&q(3)));
        let dy2 = tau.mul(&d(&tau, &[y, y])).sub(&d(&tau, &[y]).mul(&d(&tau, &[y])));
        let dxt = tau.mul(&d(&tau, &[x, t])).sub(&d(&tau, &[x]).mul(&d(&tau, &[t])));
        let hirota = dx4.add(&dy2.scale(&q(3))).sub(&dxt.scale(&q(4)));
        let terms = tau.terms.iter().map(|(m, c)| (*m, kelp_lang::number::to_f64(c))).collect();
        Ok(RationalWave { partition: lambda, tau, exact_solution: hirota.is_zero(), terms })
    }

    /// tau's Taylor series at (x, y, t).
    /// The series as balls: every term of a coefficient is a product of a rounded rational,
    /// exact binomials and powers (degree roundings), summed over the polynomial's terms.
    pub fn series_ball(&self, x: f64, y: f64, t: f64) -> BallSeries {
        let s = self.series(x, y, t);
        let mut out = BallSeries::zero();
        let n = self.terms.len() as f64;
        for (k, &(a, b, c)) in monomials().iter().enumerate() {
            let mut size = 0.0;
            let mut deg = 0u32;
            for (m, coef) in &self.terms {
                if m[0] < a || m[1] < b || m[2] < c {
                    continue;
                }
                deg = deg.max(m[0] + m[1] + m[2]);
                size += coef.abs()
                    * binom(m[0], a)
                    * binom(m[1], b)
                    * binom(m[2], c)
                    * x.abs().powi((m[0] - a) as i32)
                    * y.abs().powi((m[1] - b) as i32)
                    * t.abs().powi((m[2] - c) as i32);
            }
            let r = (deg as f64 + 8.0 + n) * U * size * 1.01;
            out.0[k] = Ball::new(s.0[k], up(r));
        }
        out
    }

    pub fn series(&self, x: f64, y: f64, t: f64) -> Series {
        let mut s = Series::zero();
        for (k, &(a, b, c)) in monomials().iter().enumerate() {
            let mut v = 0.0;
            for (m, coef) in &self.terms {
                if m[0] < a || m[1] < b || m[2] < c {
                    continue;
                }
                v += coef
                    * binom(m[0], a)
                    * binom(m[1], b)
                    * binom(m[2], c)
                    * x.powi((m[0] - a) as i32)
                    * y.powi((m[1] - b) as i32)
                    * t.powi((m[2] - c) as i32);
            }
            s.0[k] = C64::new(v, 0.0);
        }
        s
    }
}

/// Determinant by expansion along the first row (partitions are short).
fn det(m: &[Vec<Poly>]) -> Poly {
    let n = m.len();
    if n == 1 {
        return m[0][0].clone();
    }
    let mut out = Poly::zero();
    for c in 0..n {
        if m[0][c].is_zero() {
            continue;
        }
        let minor: Vec<Vec<Poly>> = m[1..]
            .iter()
            .map(|r| r.iter().enumerate().filter(|(j, _)| *j != c).map(|(_, v)| v.clone()).collect())
            .collect();
        let term = m[0][c].mul(&det(&minor));
        out = if c % 2 == 0 { out.add(&term) } else { out.sub(&term) };
    }
    out
}
