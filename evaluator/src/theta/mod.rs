//! Riemann theta functions with characteristics and directional derivatives, with a
//! truncation bound chosen for the requested accuracy.
//!
//! Convention (the project's, see `lang/LANGUAGE.md`):
//! theta[a; b](z | tau) = sum over n in Z^g of exp(pi i (n+a)^T tau (n+a) + 2 pi i (n+a)^T (z+b)).
//!
//! A value is returned as exp(`log_factor`) * `value`, with `log_factor` = pi y^T Y^-1 y
//! (y = Im z, Y = Im tau) real, so that `value` stays bounded however large Im z is;
//! `error` bounds |value - exact bounded part| (truncation bound plus a rounding
//! estimate). Log-derivatives only need the bounded parts.
//!
//! Work that depends only on tau (Cholesky factor, LLL reduction of the summation
//! lattice, inverses) is done once in [`ThetaContext::new`] and reused for every z.

pub mod bound;
pub mod lattice;
pub mod siegel;

use bound::TailInput;
use nalgebra::{DMatrix, DVector, SymmetricEigen};
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

/// Lattice points one evaluation may visit before it is refused.
pub const MAX_POINTS: f64 = 4.0e6;

#[derive(Clone, Debug, PartialEq)]
pub enum ThetaError {
    NotSquare {
        rows: usize,
        cols: usize,
    },
    Empty,
    NotFinite,
    NotSymmetric {
        defect: f64,
    },
    /// Im tau is not positive definite; its smallest eigenvalue.
    NotPositiveDefinite {
        smallest: f64,
    },
    WrongLength {
        what: &'static str,
        expected: usize,
        found: usize,
    },
    TooManyPoints {
        estimate: f64,
    },
}

impl std::fmt::Display for ThetaError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ThetaError::NotSquare { rows, cols } => write!(f, "the Riemann matrix must be square; this is {rows} x {cols}"),
            ThetaError::Empty => write!(f, "the Riemann matrix is empty"),
            ThetaError::NotFinite => write!(f, "an entry is not a finite number"),
            ThetaError::NotSymmetric { defect } => {
                write!(f, "the matrix is not symmetric (largest |T_jk - T_kj| is {defect:.3e})")
            }
            ThetaError::NotPositiveDefinite { smallest } => write!(
                f,
                "the imaginary part is not positive definite (smallest eigenvalue {smallest:.6e}); the theta series diverges"
            ),
            ThetaError::WrongLength { what, expected, found } => {
                write!(f, "{what} has {found} entries; the genus is {expected}")
            }
            ThetaError::TooManyPoints { estimate } => write!(
                f,
                "the requested accuracy needs about {estimate:.2e} lattice points (limit {MAX_POINTS:.0e}); \
                 the imaginary part of the matrix is too small or the accuracy too fine"
            ),
        }
    }
}

/// Characteristics [a; b]; half-integer vectors are the usual case, any real ones work.
#[derive(Clone, Debug, PartialEq)]
pub struct Characteristic {
    pub a: Vec<f64>,
    pub b: Vec<f64>,
}

impl Characteristic {
    pub fn zero(g: usize) -> Self {
        Characteristic { a: vec![0.0; g], b: vec![0.0; g] }
    }
    /// For half-integer characteristics: `Some(true)` when even (4 a.b even).
    pub fn is_even(&self) -> Option<bool> {
        let half = |v: f64| (2.0 * v - (2.0 * v).round()).abs() < 1e-12;
        if !self.a.iter().chain(&self.b).all(|&v| half(v)) {
            return None;
        }
        let s: f64 = self.a.iter().zip(&self.b).map(|(a, b)| 4.0 * a * b).sum();
        Some((s.round() as i64).rem_euclid(2) == 0)
    }
}

/// exp(`log_factor`) * `value`, with |value - exact| <= `error`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ThetaValue {
    pub log_factor: f64,
    pub value: C64,
    pub error: f64,
}

impl ThetaValue {
    /// The full value (may overflow to infinity for huge Im z).
    pub fn full(&self) -> C64 {
        self.value * self.log_factor.exp()
    }
    /// Error bound of [`ThetaValue::full`], including the rounding of the factor.
    pub fn full_error(&self) -> f64 {
        let f = self.log_factor.exp();
        f * (self.error + self.value.norm() * 4.0 * f64::EPSILON * self.log_factor.abs())
    }
}

/// Statistics of the last evaluation, for benchmarks and hover.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct SumStats {
    /// Lattice points summed.
    pub points: usize,
    /// Innermost lines summed: each costs two complex exponentials, every point after
    /// the first of its line two complex multiplications.
    pub lines: usize,
    pub radius: f64,
}

/// Everything about tau that every evaluation reuses.
#[derive(Clone, Debug)]
pub struct ThetaContext {
    g: usize,
    tau: DMatrix<C64>,
    re: DMatrix<f64>,
    yinv: DMatrix<f64>,
    /// LLL transform of the summation lattice (columns: reduced basis) and its inverse.
    u: DMatrix<i64>,
    uinv: DMatrix<i64>,
    /// Upper-triangular factor of pi U^T Y U.
    c: DMatrix<f64>,
    gammas: Vec<f64>,
    kappa: f64,
    /// ||Y||_2 * ||Y^-1||_2 and ||Y||_2, for the rounding estimate.
    cond: f64,
    ynorm: f64,
    /// First reduced basis vector (the direction of the innermost lines) and tau times it.
    u1: Vec<f64>,
    tau_u1: Vec<C64>,
    /// exp(2 pi i u1^T tau u1): the second-order ratio along a line.
    q: C64,
    quad_u1: C64,
}

impl ThetaContext {
    /// Checks tau (square, finite, symmetric within `sym_tol`, Im positive definite) and
    /// prepares the reduced lattice.
    pub fn new(tau: &DMatrix<C64>, sym_tol: f64) -> Result<Self, ThetaError> {
        Self::with_reduction(tau, sym_tol, true)
    }

    /// As [`ThetaContext::new`]; `reduce = false` sums over the lattice as given (for
    /// benchmarks and for tests that reduction changes the work, never the value).
    pub fn with_reduction(tau: &DMatrix<C64>, sym_tol: f64, reduce: bool) -> Result<Self, ThetaError> {
        let (r, k) = tau.shape();
        if r != k {
            return Err(ThetaError::NotSquare { rows: r, cols: k });
        }
        if r == 0 {
            return Err(ThetaError::Empty);
        }
        if tau.iter().any(|v| !v.re.is_finite() || !v.im.is_finite()) {
            return Err(ThetaError::NotFinite);
        }
        let g = r;
        let mut defect: f64 = 0.0;
        for i in 0..g {
            for j in 0..g {
                defect = defect.max((tau[(i, j)] - tau[(j, i)]).norm());
            }
        }
        if defect > sym_tol {
            return Err(ThetaError::NotSymmetric { defect });
        }
        // Symmetrise so that the sum is exactly the theta of a symmetric matrix.
        let tau = (tau + tau.transpose()).map(|v| v * 0.5);
        let re = tau.map(|v| v.re);
        let y = tau.map(|v| v.im);
        let eig = SymmetricEigen::new(y.clone()).eigenvalues;
        let (lo, hi) = eig.iter().fold((f64::INFINITY, 0.0f64), |(a, b), &e| (a.min(e), b.max(e)));
        if lo <= 0.0 || y.clone().cholesky().is_none() {
            return Err(ThetaError::NotPositiveDefinite { smallest: lo });
        }
        let yinv = y.clone().try_inverse().ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let u = if reduce { lattice::lll(&y) } else { DMatrix::identity(g, g) };
        let uinv = lattice::unimodular_inverse(&u);
        let uf = u.map(|v| v as f64);
        let yred = uf.transpose() * &y * &uf;
        let c = lattice::upper_cholesky(&yred, PI).ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let gammas = (0..g).map(|j| c[(j, j)]).collect();
        let u1: Vec<f64> = (0..g).map(|i| uf[(i, 0)]).collect();
        let tau_u1: Vec<C64> = (0..g).map(|i| (0..g).map(|j| tau[(i, j)] * u1[j]).sum()).collect();
        let quad_u1: C64 = (0..g).map(|i| tau_u1[i] * u1[i]).sum();
        let q = (C64::new(0.0, 2.0 * PI) * quad_u1).exp();
        Ok(ThetaContext {
            g,
            tau,
            re,
            yinv,
            u,
            uinv,
            c,
            gammas,
            kappa: 1.0 / (PI * lo).sqrt(),
            cond: hi / lo,
            ynorm: hi,
            u1,
            tau_u1,
            q,
            quad_u1,
        })
    }

    pub fn genus(&self) -> usize {
        self.g
    }

    pub fn tau(&self) -> &DMatrix<C64> {
        &self.tau
    }

    /// The LLL transform used for the summation lattice (columns are the reduced basis).
    pub fn reduction(&self) -> &DMatrix<i64> {
        &self.u
    }

    /// theta[ch](z) differentiated once along each of `along` (repeats allowed).
    pub fn eval(
        &self,
        z: &[C64],
        ch: Option<&Characteristic>,
        along: &[Vec<C64>],
        accuracy: f64,
    ) -> Result<ThetaValue, ThetaError> {
        let mono = vec![1u32; along.len()];
        Ok(self.sums(z, ch, along, &[mono], accuracy)?.0[0])
    }

    /// Derivatives of orders 0..=max_order along one direction, in one pass.
    pub fn jet(
        &self,
        z: &[C64],
        ch: Option<&Characteristic>,
        dir: &[C64],
        max_order: u32,
        accuracy: f64,
    ) -> Result<Vec<ThetaValue>, ThetaError> {
        let monos: Vec<Vec<u32>> = (0..=max_order).map(|k| vec![k]).collect();
        Ok(self.sums(z, ch, &[dir.to_vec()], &monos, accuracy)?.0)
    }

    /// One pass over the lattice for several derivatives: monomial `monos[i]` gives the
    /// order along each of `dirs`. Each result has absolute error at most `accuracy`
    /// (truncation) plus its rounding estimate, on the bounded part.
    pub fn sums(
        &self,
        z: &[C64],
        ch: Option<&Characteristic>,
        dirs: &[Vec<C64>],
        monos: &[Vec<u32>],
        accuracy: f64,
    ) -> Result<(Vec<ThetaValue>, SumStats), ThetaError> {
        let g = self.g;
        if z.len() != g {
            return Err(ThetaError::WrongLength { what: "z", expected: g, found: z.len() });
        }
        for d in dirs {
            if d.len() != g {
                return Err(ThetaError::WrongLength { what: "a direction", expected: g, found: d.len() });
            }
        }
        let zero = Characteristic::zero(g);
        let ch = ch.unwrap_or(&zero);
        if ch.a.len() != g || ch.b.len() != g {
            return Err(ThetaError::WrongLength { what: "the characteristic", expected: g, found: ch.a.len() });
        }
        let finite = |v: &C64| v.re.is_finite() && v.im.is_finite();
        if !z.iter().all(finite)
            || !dirs.iter().flatten().all(finite)
            || !ch.a.iter().chain(&ch.b).all(|v| v.is_finite())
        {
            return Err(ThetaError::NotFinite);
        }
        let yv = DVector::from_iterator(g, z.iter().map(|v| v.im));
        let cvec = &self.yinv * &yv;
        let log_factor = PI * yv.dot(&cvec);
        // Centre in reduced coordinates: s = U^-1 (a + c).
        let ac: Vec<f64> = (0..g).map(|i| ch.a[i] + cvec[i]).collect();
        let s: Vec<f64> = (0..g).map(|i| (0..g).map(|j| self.uinv[(i, j)] as f64 * ac[j]).sum()).collect();
        let cnorm = cvec.norm();

        let max_order = monos.iter().map(|m| m.iter().sum::<u32>()).max().unwrap_or(0);
        let weight = monos
            .iter()
            .map(|m| m.iter().zip(dirs).map(|(&e, d)| (2.0 * PI * norm(d)).powi(e as i32)).product::<f64>())
            .fold(0.0f64, f64::max);
        let tail_in = TailInput {
            gammas: &self.gammas,
            kappa: self.kappa,
            centre: cnorm,
            order: max_order,
            weight: weight.max(f64::MIN_POSITIVE),
        };
        let radius = bound::radius(&tail_in, accuracy);
        let truncation = bound::tail(&tail_in, radius);
        let estimate = ellipsoid_points(radius, &self.gammas);
        if estimate > MAX_POINTS {
            return Err(ThetaError::TooManyPoints { estimate });
        }

        let zb: Vec<C64> = (0..g).map(|i| z[i] + ch.b[i]).collect();
        let xb: Vec<f64> = zb.iter().map(|v| v.re).collect();
        let u1_zb: C64 = (0..g).map(|i| zb[i] * self.u1[i]).sum();
        let beta: Vec<C64> =
            dirs.iter().map(|d| C64::new(0.0, 2.0 * PI) * (0..g).map(|i| d[i] * self.u1[i]).sum::<C64>()).collect();
        let mut walk = Walk {
            ctx: self,
            a: &ch.a,
            s: &s,
            xb: &xb,
            u1_zb,
            dirs,
            beta: &beta,
            monos,
            acc: vec![C64::new(0.0, 0.0); monos.len()],
            abs: vec![0.0; monos.len()],
            n: vec![0i64; g],
            points: 0,
            lines: 0,
            max_growth: 0.0,
            alpha: vec![C64::new(0.0, 0.0); dirs.len()],
            powers: vec![Vec::new(); dirs.len()],
        };
        walk.level(g - 1, radius * radius, 0.0);

        // Rounding: each term carries a relative error of a few ulps per operation, grown by
        // the recurrence along a line, the size of its phase, and the centre's own error.
        // The centre c = Y^-1 Im z carries an error of about eps cond(Y) |c|, which moves
        // the modulus of a term by at most 2 sqrt(pi) R |error| ||Y||^(1/2).
        let centre_err = 2.0 * PI.sqrt() * radius * self.cond * cnorm * self.ynorm.sqrt();
        let rel = f64::EPSILON * (16.0 + walk.max_growth + centre_err);
        let values = walk
            .acc
            .iter()
            .zip(&walk.abs)
            .map(|(v, a)| ThetaValue { log_factor, value: *v, error: truncation + a * rel })
            .collect();
        Ok((values, SumStats { points: walk.points, lines: walk.lines, radius }))
    }
}

fn norm(d: &[C64]) -> f64 {
    d.iter().map(|v| v.norm_sqr()).sum::<f64>().sqrt()
}

/// Volume estimate of the number of lattice points in the ellipsoid (plus its boundary
/// layer), used to refuse hopeless requests before enumerating.
fn ellipsoid_points(r: f64, gammas: &[f64]) -> f64 {
    gammas.iter().map(|g| 2.0 * r / g + 1.0).product()
}

/// The enumeration state of one sum.
struct Walk<'a> {
    ctx: &'a ThetaContext,
    a: &'a [f64],
    s: &'a [f64],
    xb: &'a [f64],
    u1_zb: C64,
    dirs: &'a [Vec<C64>],
    beta: &'a [C64],
    monos: &'a [Vec<u32>],
    acc: Vec<C64>,
    abs: Vec<f64>,
    n: Vec<i64>,
    points: usize,
    lines: usize,
    /// Largest relative rounding growth (in ulps) of a term on any line.
    max_growth: f64,
    alpha: Vec<C64>,
    powers: Vec<Vec<C64>>,
}

impl Walk<'_> {
    /// Enumerates coordinate `j` of the reduced lattice point given the later ones;
    /// `r2` is the remaining squared radius and `used` the squared norm so far.
    fn level(&mut self, j: usize, r2: f64, used: f64) {
        let c = &self.ctx.c;
        let g = self.ctx.g;
        let gj = c[(j, j)];
        let mut partial = 0.0;
        for k in j + 1..g {
            partial += c[(j, k)] * (self.n[k] as f64 + self.s[k]);
        }
        let centre = self.s[j] + partial / gj;
        let half = r2.max(0.0).sqrt() / gj;
        let lo = (-centre - half).ceil() as i64;
        let hi = (-centre + half).floor() as i64;
        if lo > hi {
            return;
        }
        if j == 0 {
            self.line(lo, hi, centre, used);
            return;
        }
        for v in lo..=hi {
            self.n[j] = v;
            let w = gj * (v as f64 + centre);
            self.level(j - 1, r2 - w * w, used + w * w);
        }
    }

    /// The innermost line n_0 = lo..=hi: one exponential at its start, then the
    /// recurrence t(k+1) = t(k) rho(k), rho(k+1) = rho(k) q.
    fn line(&mut self, lo: i64, hi: i64, centre: f64, used: f64) {
        let ctx = self.ctx;
        let g = ctx.g;
        self.n[0] = lo;
        // m = U n + a at the start of the line.
        let m: Vec<f64> =
            (0..g).map(|i| (0..g).map(|k| ctx.u[(i, k)] as f64 * self.n[k] as f64).sum::<f64>() + self.a[i]).collect();
        let w0 = ctx.c[(0, 0)] * (lo as f64 + centre);
        let mut phase = 0.0;
        for i in 0..g {
            let mut row = 0.0;
            for k in 0..g {
                row += ctx.re[(i, k)] * m[k];
            }
            phase += m[i] * (PI * row + 2.0 * PI * self.xb[i]);
        }
        let e0 = C64::new(-(used + w0 * w0), phase);
        let mut t = e0.exp();
        let tau_m: C64 = (0..g).map(|i| ctx.tau_u1[i] * m[i]).sum();
        let rho_arg = C64::new(0.0, PI) * (ctx.quad_u1 + 2.0 * tau_m + 2.0 * self.u1_zb);
        let mut rho = rho_arg.exp();
        let len = (hi - lo + 1) as usize;
        // exp(v) carries a relative error of about eps |v| from the rounding of v; along the
        // line the errors of rho and q accumulate linearly and quadratically.
        let l = len as f64;
        let growth = e0.norm() + l * rho_arg.norm() + 0.5 * l * l * 2.0 * PI * ctx.quad_u1.norm() + 4.0 * l;
        self.max_growth = self.max_growth.max(growth);
        self.points += len;
        self.lines += 1;
        let plain = self.dirs.is_empty();
        if plain {
            let mut sum = C64::new(0.0, 0.0);
            let mut abs = 0.0;
            for _ in 0..len {
                sum += t;
                abs += t.re.abs() + t.im.abs();
                t *= rho;
                rho *= ctx.q;
            }
            for (acc, a) in self.acc.iter_mut().zip(self.abs.iter_mut()) {
                *acc += sum;
                *a += abs;
            }
            return;
        }
        // Derivative weights 2 pi i m(k).d = alpha + k' beta along the line.
        for (i, d) in self.dirs.iter().enumerate() {
            self.alpha[i] = C64::new(0.0, 2.0 * PI) * (0..g).map(|k| d[k] * m[k]).sum::<C64>();
        }
        let maxe: Vec<u32> =
            (0..self.dirs.len()).map(|i| self.monos.iter().map(|mo| mo[i]).max().unwrap_or(0)).collect();
        for step in 0..len {
            for i in 0..self.dirs.len() {
                let s = self.alpha[i] + self.beta[i] * step as f64;
                let p = &mut self.powers[i];
                p.clear();
                let mut cur = C64::new(1.0, 0.0);
                p.push(cur);
                for _ in 0..maxe[i] {
                    cur *= s;
                    p.push(cur);
                }
            }
            let tabs = t.re.abs() + t.im.abs();
            for (mi, mo) in self.monos.iter().enumerate() {
                let mut w = C64::new(1.0, 0.0);
                for (i, &e) in mo.iter().enumerate() {
                    if e > 0 {
                        w *= self.powers[i][e as usize];
                    }
                }
                self.acc[mi] += t * w;
                self.abs[mi] += tabs * w.norm();
            }
            t *= rho;
            rho *= ctx.q;
        }
    }
}

#[cfg(test)]
mod tests;
