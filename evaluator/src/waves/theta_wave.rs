//! Theta-function waves u = 2 d^2/dx^2 log theta(U x + V y + W t + D | tau) + c, and the
//! constant c from Dubrovin's conditions.
//!
//! Dubrovin (*Theta functions and non-linear equations*, Russian Math. Surveys 36:2 (1981)):
//! with T_nu(w) = theta[nu; 0](2w | 2 tau), the wave solves kelp's KP form when for every
//! nu in {0, 1/2}^g, (D_U^4 - 4 D_U D_W + 3 D_V^2 + 6 c D_U^2 - d) T_nu(0) = 0 (conventions
//! file, derived there). Given U, V, W this is an overdetermined linear system in (c, d):
//! solved by least squares, its relative residual reported as a self-check.

use super::ball::{up, Ball, BallSeries, U};
use super::moments::{MomentCache, Moments};
use super::series::{fact, monomials, Series};
use crate::theta::{Characteristic, ThetaContext, ThetaError};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

pub struct ThetaWave {
    pub ctx: ThetaContext,
    pub u: Vec<C64>,
    pub v: Vec<C64>,
    pub w: Vec<C64>,
    pub shift: Vec<C64>,
    pub c: C64,
    pub accuracy: f64,
    /// Moduli moments for the bounds (see `moments.rs`); `Default::default()`.
    pub moments: MomentCache,
}

impl std::fmt::Debug for ThetaWave {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "ThetaWave {{ genus {}, u {:?}, v {:?}, w {:?}, c {} }}",
            self.u.len(),
            self.u,
            self.v,
            self.w,
            self.c
        )
    }
}

impl ThetaWave {
    /// The argument of theta at (x, y, t): U x + V y + W t + D.
    fn phase(&self, x: f64, y: f64, t: f64) -> Vec<C64> {
        (0..self.u.len()).map(|k| self.shift[k] + self.u[k] * x + self.v[k] * y + self.w[k] * t).collect()
    }

    /// theta's Taylor series at (x, y, t) (its exponential factor divided out) and a bound
    /// on the relative error of its constant term.
    pub fn series(&self, x: f64, y: f64, t: f64) -> Result<(Series, f64), ThetaError> {
        let z = self.phase(x, y, t);
        let monos: Vec<Vec<u32>> = monomials().iter().map(|&(a, b, c)| vec![a, b, c]).collect();
        let dirs = [self.u.clone(), self.v.clone(), self.w.clone()];
        let (vals, _) = self.ctx.sums(&z, None, &dirs, &monos, self.accuracy)?;
        let f0 = vals[0].log_factor;
        let mut s = Series::zero();
        let mut err: f64 = 0.0;
        for (k, (&(a, b, c), v)) in monomials().iter().zip(&vals).enumerate() {
            let scale = (v.log_factor - f0).exp() / (fact(a) * fact(b) * fact(c));
            s.0[k] = v.value * scale;
            err = err.max(v.error * scale);
        }
        let rel = err / s.0[0].norm().max(1e-300);
        Ok((s, rel))
    }

    /// A bound on |z - z exact| (Euclidean) for the phase as computed: each coordinate is
    /// three products by reals and three sums.
    fn phase_error(&self, x: f64, y: f64, t: f64) -> f64 {
        let e2: f64 = (0..self.u.len())
            .map(|k| {
                let s = self.shift[k].norm()
                    + self.u[k].norm() * x.abs()
                    + self.v[k].norm() * y.abs()
                    + self.w[k].norm() * t.abs();
                (4.0 * U * s).powi(2)
            })
            .sum();
        up(e2.sqrt())
    }

    fn moments_at(&self, z: &[C64], log_factor: f64) -> Result<Moments, ThetaError> {
        let imz: Vec<f64> = z.iter().map(|v| v.im).collect();
        self.moments.at(self.ctx.tau(), &imz, log_factor)
    }

    /// theta's Taylor series at (x, y, t) as balls that hold the exact coefficients of the
    /// wave at the exact point: the engine's bound (truncation and rounding) per monomial,
    /// the rounding of the scale, and the rounding of the phase through the moments.
    pub fn series_ball(&self, x: f64, y: f64, t: f64) -> Result<BallSeries, ThetaError> {
        let z = self.phase(x, y, t);
        let monos: Vec<Vec<u32>> = monomials().iter().map(|&(a, b, c)| vec![a, b, c]).collect();
        let dirs = [self.u.clone(), self.v.clone(), self.w.clone()];
        let (vals, _) = self.ctx.sums(&z, None, &dirs, &monos, self.accuracy)?;
        let f0 = vals[0].log_factor;
        let p = self.moments_at(&z, f0)?;
        let dz = self.phase_error(x, y, t);
        let norm = |d: &[C64]| d.iter().map(|v| v.norm_sqr()).sum::<f64>().sqrt();
        let (nu, nv, nw) = (norm(&self.u), norm(&self.v), norm(&self.w));
        let mut s = BallSeries::zero();
        for (k, (&(a, b, c), v)) in monomials().iter().zip(&vals).enumerate() {
            let diff = v.log_factor - f0;
            let scale = diff.exp() / (fact(a) * fact(b) * fact(c));
            let value = v.value * scale;
            let moved = dz * p[(a + b + c + 1) as usize] * nu.powi(a as i32) * nv.powi(b as i32) * nw.powi(c as i32)
                / (fact(a) * fact(b) * fact(c));
            let r = v.error * scale * (1.0 + 8.0 * U) + value.norm() * (8.0 + 2.0 * diff.abs()) * U + moved * 1.01;
            s.0[k] = Ball::new(value, up(r));
        }
        Ok(s)
    }

    /// theta at (x, y, t) (its factor divided out) as a ball, and P_1 (the gradient bound:
    /// |d theta / ds| <= |dz/ds| P_1 on the bounded part while Im z is that of the point).
    pub fn tau_ball(&self, x: f64, y: f64, t: f64) -> Result<(Ball, f64), ThetaError> {
        let z = self.phase(x, y, t);
        let (vals, _) = self.ctx.sums(&z, None, &[], &[vec![]], self.accuracy)?;
        let p = self.moments_at(&z, vals[0].log_factor)?;
        let r = vals[0].error * (1.0 + 8.0 * U) + self.phase_error(x, y, t) * p[1] * 1.01;
        Ok((Ball::new(vals[0].value, up(r)), p[1]))
    }

    /// Whether Im z is the same at every (x, y, t) (real U, V, W) and theta real there
    /// (tau purely imaginary, U, V, W, D real).
    pub fn real_directions(&self) -> bool {
        self.u.iter().chain(&self.v).chain(&self.w).all(|v| v.im == 0.0)
    }
    pub fn real_theta(&self) -> bool {
        self.real_directions() && self.shift.iter().all(|v| v.im == 0.0) && self.ctx.tau().iter().all(|v| v.re == 0.0)
    }

    /// theta, its first and second derivatives along U at (x, y, t) (exponential factor
    /// divided out alike), for u alone.
    pub fn x_jet(&self, x: f64, y: f64, t: f64) -> Result<[C64; 3], ThetaError> {
        let z = self.phase(x, y, t);
        let monos = [vec![0], vec![1], vec![2]];
        let (vals, _) = self.ctx.sums(&z, None, &[self.u.clone()], &monos, self.accuracy)?;
        let f0 = vals[0].log_factor;
        let s = |k: usize| vals[k].value * (vals[k].log_factor - f0).exp();
        Ok([s(0), s(1), s(2)])
    }
}

/// Least-squares (c, d) of Dubrovin's conditions and the relative residual.
pub fn dubrovin_constants(tau: &DMatrix<C64>, u: &[C64], v: &[C64], w: &[C64]) -> Result<(C64, C64, f64), ThetaError> {
    let g = tau.nrows();
    let ctx = ThetaContext::new(&(tau * C64::new(2.0, 0.0)), 1e-8)?;
    let zero = vec![C64::new(0.0, 0.0); g];
    let dirs = [u.to_vec(), v.to_vec(), w.to_vec()];
    // D^k of T(w) = theta(2w) brings 2^k.
    let monos = [vec![4, 0, 0], vec![1, 0, 1], vec![0, 2, 0], vec![2, 0, 0], vec![0, 0, 0]];
    let pow2 = [16.0, 4.0, 4.0, 4.0, 1.0];
    let mut rows: Vec<([C64; 2], C64)> = vec![];
    for bits in 0..(1u32 << g) {
        let a: Vec<f64> = (0..g).map(|k| 0.5 * ((bits >> k) & 1) as f64).collect();
        let ch = Characteristic { a, b: vec![0.0; g] };
        let (vals, _) = ctx.sums(&zero, Some(&ch), &dirs, &monos, 1e-15)?;
        let t: Vec<C64> = vals.iter().zip(pow2).map(|(x, p)| x.full() * p).collect();
        // 6 c D_U^2 T - d T = -(D_U^4 T - 4 D_U D_W T + 3 D_V^2 T).
        rows.push(([6.0 * t[3], -t[4]], -(t[0] - 4.0 * t[1] + 3.0 * t[2])));
    }
    // Normal equations of the 2-unknown complex least-squares problem.
    let mut n = [[C64::new(0.0, 0.0); 2]; 2];
    let mut r = [C64::new(0.0, 0.0); 2];
    for (a, b) in &rows {
        for i in 0..2 {
            for j in 0..2 {
                n[i][j] += a[i].conj() * a[j];
            }
            r[i] += a[i].conj() * b;
        }
    }
    let det = n[0][0] * n[1][1] - n[0][1] * n[1][0];
    if det.norm() == 0.0 {
        return Err(ThetaError::NotFinite);
    }
    let c = (r[0] * n[1][1] - n[0][1] * r[1]) / det;
    let d = (n[0][0] * r[1] - n[1][0] * r[0]) / det;
    let res: f64 = rows.iter().map(|(a, b)| (a[0] * c + a[1] * d - b).norm_sqr()).sum::<f64>().sqrt();
    let size: f64 = rows.iter().map(|(_, b)| b.norm_sqr()).sum::<f64>().sqrt();
    Ok((c, d, res / size.max(1e-300)))
}
