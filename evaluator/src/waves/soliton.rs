//! Line solitons from Grassmannian data (Kodama and Williams, Invent. Math. 198 (2014)):
//! tau = sum over k-subsets I of Delta_I(A) prod_{i<j in I} (kappa_j - kappa_i) exp(sum_{i in I}
//! theta_i), theta_i = kappa_i x + kappa_i^2 y + kappa_i^3 t, for kappa_1 < ... < kappa_n and a
//! full-rank k x n matrix A. The wave is regular for all (x, y, t) exactly when every maximal
//! minor Delta_I(A) >= 0. Evaluated as a log-sum-exp, so far-field values do not overflow.

use super::ball::{up, Ball, BallSeries, U};
use super::series::{fact, monomials, Series};
use crate::num::Num;
use num_complex::Complex64 as C64;
use num_rational::BigRational;
use num_traits::{Signed, Zero};

#[derive(Clone, Debug)]
pub struct Minor {
    /// Column indices (into the sorted kappa), ascending.
    pub columns: Vec<usize>,
    /// Delta_I(A) (exact when A is).
    pub value: Num,
}

#[derive(Clone, Debug)]
pub struct Soliton {
    /// Sorted increasing; `order[i]` is the position the user gave kappa_i.
    pub kappa: Vec<f64>,
    pub order: Vec<usize>,
    pub k: usize,
    pub minors: Vec<Minor>,
    /// (sum of kappa, of kappa^2, of kappa^3, sign, log |coefficient|) of each nonzero term.
    terms: Vec<(f64, f64, f64, f64, f64)>,
    /// A bound on each term's coefficient's relative rounding (minor times Vandermonde).
    coef_rel: Vec<f64>,
    /// Per term, the Taylor coefficients of exp(s1 x + s2 y + s3 t) (point-independent).
    expansions: Vec<Series>,
}

fn det_exact(m: &mut [Vec<BigRational>]) -> BigRational {
    let n = m.len();
    let mut det = BigRational::from_integer(1.into());
    for c in 0..n {
        let Some(p) = (c..n).find(|&r| !m[r][c].is_zero()) else { return BigRational::zero() };
        if p != c {
            m.swap(p, c);
            det = -det;
        }
        det *= &m[c][c];
        for r in c + 1..n {
            let f = &m[r][c] / &m[c][c];
            for cc in c..n {
                let v = &f * &m[c][cc];
                m[r][cc] -= v;
            }
        }
    }
    det
}

fn det_f64(m: &mut [Vec<f64>]) -> f64 {
    let n = m.len();
    let mut det = 1.0;
    for c in 0..n {
        let p = (c..n).max_by(|&a, &b| m[a][c].abs().total_cmp(&m[b][c].abs())).unwrap();
        if m[p][c] == 0.0 {
            return 0.0;
        }
        if p != c {
            m.swap(p, c);
            det = -det;
        }
        det *= m[c][c];
        for r in c + 1..n {
            let f = m[r][c] / m[c][c];
            for cc in c..n {
                m[r][cc] -= f * m[c][cc];
            }
        }
    }
    det
}

fn subsets(n: usize, k: usize) -> Vec<Vec<usize>> {
    let mut out = vec![];
    let mut cur = vec![];
    fn go(start: usize, n: usize, k: usize, cur: &mut Vec<usize>, out: &mut Vec<Vec<usize>>) {
        if cur.len() == k {
            out.push(cur.clone());
            return;
        }
        for i in start..n {
            if n - i < k - cur.len() {
                break;
            }
            cur.push(i);
            go(i + 1, n, k, cur, out);
            cur.pop();
        }
    }
    go(0, n, k, &mut cur, &mut out);
    out
}

/// Largest number of k-subsets accepted (C(20, 10) = 184756).
pub const MAX_TERMS: usize = 200_000;

impl Soliton {
    pub fn new(kappa: &[f64], a: &[Vec<Num>]) -> Result<Soliton, String> {
        let n = kappa.len();
        let k = a.len();
        if k == 0 || k >= n {
            return Err(format!("A must have between 1 and {} rows for {n} values of kappa; it has {k}", n - 1));
        }
        if let Some(r) = a.iter().position(|r| r.len() != n) {
            return Err(format!("row {} of A has {} entries; kappa has {n}", r + 1, a[r].len()));
        }
        if kappa.iter().any(|v| !v.is_finite()) {
            return Err("kappa must be finite real numbers".into());
        }
        let mut order: Vec<usize> = (0..n).collect();
        order.sort_by(|&i, &j| kappa[i].total_cmp(&kappa[j]));
        let sorted: Vec<f64> = order.iter().map(|&i| kappa[i]).collect();
        if sorted.windows(2).any(|w| w[0] == w[1]) {
            return Err("the values of kappa must be distinct".into());
        }
        if a.iter().flatten().any(|v| v.to_real().is_none()) {
            return Err("A must be real".into());
        }
        let count = (0..k).fold(1f64, |acc, i| acc * (n - i) as f64 / (i + 1) as f64);
        if count > MAX_TERMS as f64 {
            return Err(format!("{count:.0} maximal minors exceed the limit of {MAX_TERMS}"));
        }
        let exact = a.iter().flatten().all(Num::is_exact);
        let mut minors = vec![];
        let mut terms = vec![];
        let mut coef_rel = vec![];
        for cols in subsets(n, k) {
            crate::limits::checkpoint();
            // Column cols[j] of the sorted kappa is column order[cols[j]] of A as written.
            let value = if exact {
                let mut m: Vec<Vec<BigRational>> = a
                    .iter()
                    .map(|r| {
                        cols.iter()
                            .map(|&c| match &r[order[c]] {
                                Num::Exact(q) => q.clone(),
                                _ => unreachable!("checked exact"),
                            })
                            .collect()
                    })
                    .collect();
                Num::Exact(det_exact(&mut m))
            } else {
                let mut m: Vec<Vec<f64>> =
                    a.iter().map(|r| cols.iter().map(|&c| r[order[c]].to_real().unwrap()).collect()).collect();
                Num::Real(det_f64(&mut m))
            };
            let d = value.to_real().unwrap();
            if d != 0.0 {
                let mut vander = 1.0;
                for i in 0..cols.len() {
                    for j in i + 1..cols.len() {
                        vander *= sorted[cols[j]] - sorted[cols[i]];
                    }
                }
                let coef = d * vander;
                let s1: f64 = cols.iter().map(|&c| sorted[c]).sum();
                let s2: f64 = cols.iter().map(|&c| sorted[c].powi(2)).sum();
                let s3: f64 = cols.iter().map(|&c| sorted[c].powi(3)).sum();
                terms.push((s1, s2, s3, coef.signum(), coef.abs().ln()));
                // Exact minors are rounded once (charged 2 u); a float minor by elimination carries
                // Wilkinson's bound with growth factor 2^(k-1): 2^k k^2 u prod |rows| (Hadamard).
                let det_rel = if exact {
                    2.0 * U
                } else {
                    let rows: f64 = a
                        .iter()
                        .map(|r| cols.iter().map(|&c| r[order[c]].to_real().unwrap().powi(2)).sum::<f64>().sqrt())
                        .product();
                    2f64.powi(k as i32) * (k * k) as f64 * U * rows / d.abs()
                };
                let pairs = (k * (k - 1) / 2) as f64;
                coef_rel.push(up(det_rel + (2.0 * pairs + 2.0) * U));
            }
            minors.push(Minor { columns: cols, value });
        }
        if terms.is_empty() {
            return Err("A does not have full rank: every maximal minor is zero".into());
        }
        let expansions = terms
            .iter()
            .map(|&(s1, s2, s3, _, _)| Series::exponential(C64::new(s1, 0.0), C64::new(s2, 0.0), C64::new(s3, 0.0)))
            .collect();
        Ok(Soliton { kappa: sorted, order, k, minors, terms, coef_rel, expansions })
    }

    /// The first negative maximal minor, if any (regular exactly when there is none).
    pub fn negative_minor(&self) -> Option<&Minor> {
        self.minors.iter().find(|m| match &m.value {
            Num::Exact(q) => q.is_negative(),
            v => v.to_real().is_some_and(|x| x < 0.0),
        })
    }

    pub fn terms(&self) -> usize {
        self.terms.len()
    }

    /// Each term's weight at (x, y, t), divided by the largest (log-sum-exp).
    fn weights(&self, x: f64, y: f64, t: f64) -> Vec<f64> {
        let logs: Vec<f64> = self.terms.iter().map(|&(s1, s2, s3, _, lc)| lc + s1 * x + s2 * y + s3 * t).collect();
        let top = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        self.terms.iter().zip(&logs).map(|(&(_, _, _, sign, _), l)| sign * (l - top).exp()).collect()
    }

    /// tau's Taylor series at (x, y, t), divided by the largest term's exponential.
    pub fn series(&self, x: f64, y: f64, t: f64) -> Series {
        let mut s = Series::zero();
        for (w, e) in self.weights(x, y, t).into_iter().zip(&self.expansions) {
            if w.abs() >= 1e-300 {
                s.add_scaled(C64::new(w, 0.0), e);
            }
        }
        s
    }

    /// tau's series as balls holding the exact series of tau exp(-top), top the computed
    /// largest exponent (a common factor, invisible to log tau's derivatives): each term's
    /// exponent carries the rounding of its coefficient's logarithm and of the kappa sums,
    /// each expansion the rounding of its powers.
    pub fn series_ball(&self, x: f64, y: f64, t: f64) -> BallSeries {
        let k = self.k as f64;
        let sum_pow = |p: i32| self.kappa.iter().map(|v| v.abs().powi(p)).sum::<f64>();
        let ds = [k * U * sum_pow(1), (k + 1.0) * U * sum_pow(2), (k + 2.0) * U * sum_pow(3)];
        let logs: Vec<f64> = self.terms.iter().map(|&(s1, s2, s3, _, lc)| lc + s1 * x + s2 * y + s3 * t).collect();
        let top = logs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        let mut out = BallSeries::zero();
        for (i, (&(s1, s2, s3, sign, lc), l)) in self.terms.iter().zip(&logs).enumerate() {
            let parts = lc.abs() + (s1 * x).abs() + (s2 * y).abs() + (s3 * t).abs();
            let dl = self.coef_rel[i] * 1.01
                + U * lc.abs()
                + ds[0] * x.abs()
                + ds[1] * y.abs()
                + ds[2] * t.abs()
                + 4.0 * U * parts
                + U * (l - top).abs();
            let w = (l - top).exp();
            if w < 1e-300 {
                // Below the largest term by 690 e-folds: charged as its whole size.
                for (b, e) in out.0.iter_mut().zip(&self.expansions[i].0) {
                    b.r = up(b.r + 2e-300 * (e.norm() + 1.0));
                }
                continue;
            }
            let rho = up((dl + 2.0 * U).exp_m1() * 1.01);
            let wb = Ball::new(C64::new(sign * w, 0.0), w * rho);
            let (dp, dq, dr) = (ds[0], ds[1], ds[2]);
            for (kk, &(a, b, c)) in monomials().iter().enumerate() {
                let e = self.expansions[i].0[kk];
                let f = fact(a) * fact(b) * fact(c);
                let hi =
                    (s1.abs() + dp).powi(a as i32) * (s2.abs() + dq).powi(b as i32) * (s3.abs() + dr).powi(c as i32);
                let lo = s1.abs().powi(a as i32) * s2.abs().powi(b as i32) * s3.abs().powi(c as i32);
                let re = (hi - lo) / f * (1.0 + 4.0 * U) + (a + b + c + 4) as f64 * U * e.norm();
                out.0[kk] = out.0[kk].add(wb.mul(Ball::new(e, up(re))));
            }
        }
        out
    }

    /// tau, tau_x, tau_xx at (x, y, t) (scaled alike), for u alone.
    pub fn x_jet(&self, x: f64, y: f64, t: f64) -> [f64; 3] {
        let mut j = [0.0; 3];
        for (w, &(s1, _, _, _, _)) in self.weights(x, y, t).into_iter().zip(&self.terms) {
            j[0] += w;
            j[1] += w * s1;
            j[2] += w * s1 * s1;
        }
        j
    }
}
