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

pub mod bench_cases;
pub mod bound;
pub mod isometry;
pub mod lattice;
mod rounding;
pub mod siegel;
mod sum;
pub mod transform;

use bound::TailInput;
use nalgebra::{DMatrix, DVector, SymmetricEigen};
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

const U: f64 = f64::EPSILON / 2.0;

/// Radius of the exponential tables built with a context (see `sum`).
const TABLE_RADIUS: f64 = 9.0;

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
        limit: f64,
    },
    /// Siegel's reduction of an ill-conditioned (symmetric) input left a rounding asymmetry
    /// beyond what the reduced series accepts.
    ReducedNotSymmetric {
        defect: f64,
    },
}

impl std::fmt::Display for ThetaError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ThetaError::NotSquare { rows, cols } => write!(f, "the Riemann matrix must be square; this is {rows} x {cols}"),
            ThetaError::Empty => write!(f, "the Riemann matrix is empty"),
            ThetaError::NotFinite => write!(f, "an entry is not a finite number"),
            ThetaError::ReducedNotSymmetric { defect } => write!(
                f,
                "Siegel's reduction of this ill-conditioned matrix leaves a rounding asymmetry of {defect:.3e} in double precision, too much for a bounded value; the input itself is accepted as symmetric"
            ),
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
            ThetaError::TooManyPoints { estimate, limit } => write!(
                f,
                "the requested accuracy needs about {estimate:.2e} lattice points (limit {limit:.0e}, the `max_lattice_points` setting); \
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

/// Bounds on how far the tau (spectral norm of the difference) and the z (Euclidean
/// norm) given to a sum are from the ones meant, when they come out of a computation.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct InputErrors {
    pub tau: f64,
    pub z: f64,
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
    /// |Y^-1 Im z|, the distance of the ellipsoid's centre from the origin.
    pub centre: f64,
    /// Sum of the summed terms' moduli (bounded parts; an upper bound, |re| + |im| each).
    pub moduli: f64,
}

/// Everything about tau that every evaluation reuses.
#[derive(Clone, Debug)]
pub struct ThetaContext {
    g: usize,
    tau: DMatrix<C64>,
    re: DMatrix<f64>,
    ychol: nalgebra::Cholesky<f64, nalgebra::Dyn>,
    /// LLL transform of the summation lattice (columns: reduced basis) and its inverse.
    u: DMatrix<i64>,
    uinv: DMatrix<i64>,
    /// Upper-triangular factor of pi U^T Y U.
    c: DMatrix<f64>,
    gammas: Vec<f64>,
    kappa: f64,
    /// Sizes for the rounding bound (see `rounding.rs`): ||C||_F ||C^-1||_2, the
    /// Cholesky backward error in units of u, ||C^-1||_2 (bounded by the Frobenius norm),
    /// ||Y||_F, ||C||_F and ||U^-1||_F.
    kappa_c: f64,
    /// The tau-only part of the rounding growth (see `rounding.rs`) and alpha_j.
    growth_shared: f64,
    growth_w2: f64,
    alpha: Vec<f64>,
    chol_err: f64,
    cinv_norm: f64,
    y_frob: f64,
    c_frob: f64,
    uinv_frob: f64,
    /// tau' = U^T tau U, the diagonal of (Y')^-1, and the exponential tables of tau'.
    taur: DMatrix<C64>,
    yred_inv_diag: Vec<f64>,
    tables: sum::Tables,
    /// The lattice-point limit in force when the context was made (the `max_lattice_points`
    /// setting; kept here because grid points are summed on worker threads).
    max_points: f64,
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
        let lo = eig.iter().fold(f64::INFINITY, |a, &e| a.min(e));
        if lo <= 0.0 || y.clone().cholesky().is_none() {
            return Err(ThetaError::NotPositiveDefinite { smallest: lo });
        }
        let ychol = y.clone().cholesky().ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let u = if reduce { lattice::lll(&y) } else { DMatrix::identity(g, g) };
        let uinv = lattice::unimodular_inverse(&u);
        let uf = u.map(|v| v as f64);
        let yred = uf.transpose() * &y * &uf;
        let c = lattice::upper_cholesky(&yred, PI).ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let cinv = c.clone().try_inverse().ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let (c_frob, cinv_norm) = (c.norm(), cinv.norm());
        let cabs = c.map(f64::abs);
        let ubs = uf.map(f64::abs);
        let chol_err = (g as f64 + 2.0) * (cabs.transpose() * &cabs).norm()
            + 2.0 * PI * g as f64 * (ubs.transpose() * y.map(f64::abs) * &ubs).norm();
        // The tail bound needs the exact lattice's Cholesky diagonal and smallest
        // eigenvalue; the computed ones are within a relative u chol_err ||C^-1||^2 (and
        // the eigenvalue solver's g u ||Y||_F) of them: shrink both by that much.
        let shrink = 1.0 - 4.0 * f64::EPSILON * chol_err * cinv_norm * cinv_norm;
        let lo_safe = lo - 4.0 * f64::EPSILON * g as f64 * y.norm();
        if shrink <= 0.5 || lo_safe <= 0.0 {
            return Err(ThetaError::NotPositiveDefinite { smallest: lo });
        }
        let gammas = (0..g).map(|j| c[(j, j)] * shrink).collect();
        let ucx = uf.map(|v| C64::new(v, 0.0));
        let taur = ucx.transpose() * &tau * &ucx;
        let yred_inv = yred.clone().try_inverse().ok_or(ThetaError::NotPositiveDefinite { smallest: lo })?;
        let yred_inv_diag: Vec<f64> = (0..g).map(|j| yred_inv[(j, j)]).collect();
        // Tables wide enough for truncation far below double precision (R = 9: a tail of
        // about e^-81) unless that would be large; wider requests build their own.
        let mut half = sum::half_widths(&yred_inv_diag, TABLE_RADIUS);
        let cells = |h: &[i64]| -> f64 {
            let w: Vec<f64> = h.iter().map(|&v| (2 * v + 1) as f64).collect();
            (0..g).map(|j| w[j] * (1.0 + w[j + 1..].iter().sum::<f64>())).sum()
        };
        while cells(&half) > 4.0e6 && half.iter().any(|&v| v > 1) {
            half.iter_mut().for_each(|v| *v = (*v / 2).max(1));
        }
        let tables = sum::Tables::new(&taur, half);
        let uinv_frob = uinv.map(|v| v as f64).norm();
        let (growth_shared, growth_w2, alpha) = Self::tau_growth(g, &taur, &re, &u, &yred_inv_diag);
        Ok(ThetaContext {
            growth_shared,
            growth_w2,
            alpha,
            max_points: crate::limits::current().max_lattice_points,
            g,
            tau,
            re,
            ychol,
            u,
            uinv,
            c,
            gammas,
            kappa: 1.0 / (PI * lo_safe).sqrt(),
            kappa_c: c_frob * cinv_norm,
            chol_err,
            cinv_norm,
            y_frob: y.norm(),
            c_frob,
            uinv_frob,
            taur,
            yred_inv_diag,
            tables,
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
        let (mut v, stats) = self.pass(&[z], ch, dirs, monos, accuracy, InputErrors::default())?;
        Ok((v.swap_remove(0), stats))
    }

    /// [`ThetaContext::sums`] for a tau and z that are themselves off by at most
    /// `errors` (norms): the bound covers the change of every term.
    pub fn sums_with_input_errors(
        &self,
        z: &[C64],
        ch: Option<&Characteristic>,
        monos: &[Vec<u32>],
        accuracy: f64,
        errors: InputErrors,
    ) -> Result<(Vec<ThetaValue>, SumStats), ThetaError> {
        let (mut v, stats) = self.pass(&[z], ch, &[], monos, accuracy, errors)?;
        Ok((v.swap_remove(0), stats))
    }

    /// [`ThetaContext::sums`] for many z at once. Runs of z that share Im z (as along a
    /// KP wave with real U, V, W, D) share one pass over the lattice, so only the phases
    /// are computed per z.
    pub fn batch(
        &self,
        zs: &[Vec<C64>],
        ch: Option<&Characteristic>,
        dirs: &[Vec<C64>],
        monos: &[Vec<u32>],
        accuracy: f64,
    ) -> Result<Vec<Vec<ThetaValue>>, ThetaError> {
        let mut out = Vec::with_capacity(zs.len());
        let mut i = 0;
        while i < zs.len() {
            let same_im = |z: &Vec<C64>| z.len() == zs[i].len() && z.iter().zip(&zs[i]).all(|(a, b)| a.im == b.im);
            let mut j = i + 1;
            while j < zs.len() && j - i < 256 && same_im(&zs[j]) {
                j += 1;
            }
            let group: Vec<&[C64]> = zs[i..j].iter().map(Vec::as_slice).collect();
            out.extend(self.pass(&group, ch, dirs, monos, accuracy, InputErrors::default())?.0);
            i = j;
        }
        Ok(out)
    }

    /// One pass over the lattice for z's sharing Im z.
    fn pass(
        &self,
        zs: &[&[C64]],
        ch: Option<&Characteristic>,
        dirs: &[Vec<C64>],
        monos: &[Vec<u32>],
        accuracy: f64,
        errors: InputErrors,
    ) -> Result<(Vec<Vec<ThetaValue>>, SumStats), ThetaError> {
        let z = zs[0];
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
        if zs.iter().any(|z| z.len() != g || z.iter().zip(zs[0]).any(|(a, b)| a.im != b.im)) {
            return Err(ThetaError::WrongLength { what: "z", expected: g, found: 0 });
        }
        if !zs.iter().all(|z| z.iter().all(finite))
            || !dirs.iter().flatten().all(finite)
            || !ch.a.iter().chain(&ch.b).all(|v| v.is_finite())
        {
            return Err(ThetaError::NotFinite);
        }
        let yv = DVector::from_iterator(g, z.iter().map(|v| v.im));
        // A Cholesky solve, not the explicit inverse: for ill-conditioned Y the inverse
        // loses digits that exp(pi y^T Y^-1 y) would amplify.
        let cvec = self.ychol.solve(&yv);
        let log_factor = PI * yv.dot(&cvec);
        let cnorm = cvec.norm();
        let uf = |i: usize, j: usize| self.u[(i, j)] as f64;
        // Centre in reduced coordinates s = U^-1 (a + c); re-index the series by the
        // nearest lattice point so that the centre lies within 1/2 of the origin.
        let s0: Vec<f64> =
            (0..g).map(|i| (0..g).map(|j| self.uinv[(i, j)] as f64 * (ch.a[j] + cvec[j])).sum()).collect();
        let n0: Vec<f64> = s0.iter().map(|v| -v.round()).collect();
        let s: Vec<f64> = (0..g).map(|i| s0[i] + n0[i]).collect();
        let a2: Vec<f64> = (0..g).map(|i| ch.a[i] + (0..g).map(|j| uf(i, j) * n0[j]).sum::<f64>()).collect();

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
        // With input errors the exact lattice's moduli differ by a factor exp(pi m^T E m); the
        // tail then grows by at most that factor at the radius, kept below 2 (else no bound).
        let input_tail = 2.0 * errors.tau * radius * radius * self.kappa * self.kappa * PI;
        if input_tail > std::f64::consts::LN_2 {
            return Err(ThetaError::NotFinite);
        }
        let truncation = bound::tail(&tail_in, radius) * input_tail.exp();
        let estimate = ellipsoid_points(radius, &self.gammas);
        if estimate > self.max_points {
            return Err(ThetaError::TooManyPoints { estimate, limit: self.max_points });
        }
        // Enumerate a hair wider than the bound's radius: the centre carries rounding.
        let r_enum = radius * (1.0 + 1e-9) + 1e-12;
        let need = sum::half_widths(&self.yred_inv_diag, r_enum);
        let local;
        let tables = if need.iter().zip(&self.tables.half).all(|(n, h)| n <= h) {
            &self.tables
        } else {
            local = sum::Tables::new(&self.taur, need.clone());
            &local
        };

        let i2pi = C64::new(0.0, 2.0 * PI);
        // Per z: L = 2 pi i U^T (tau a' + z + b), of which only the phase is used (the
        // moduli come from the enumeration), and the phase of
        // pi i a'^T tau a' + 2 pi i a'^T (z + b).
        let phase = |v: C64| C64::new(0.0, v.im).exp();
        let (pow_off, pow_len) = sum::pow_offsets(&tables.half);
        let mut pows = vec![C64::new(0.0, 0.0); pow_len * zs.len()];
        let mut kfacs = Vec::with_capacity(zs.len());
        // Absolute rounding (units of u) of the reduced phases and of the common phase.
        let mut phase_err = vec![0.0f64; g];
        let mut common_err = 0.0f64;
        let gf = g as f64;
        // Per-z scratch (|v_i|, z + b, v and L), reused across the batch.
        let mut v_abs = vec![0.0f64; g];
        let mut zb = vec![C64::new(0.0, 0.0); g];
        let mut vv = vec![C64::new(0.0, 0.0); g];
        for (zi, z) in zs.iter().enumerate() {
            for i in 0..g {
                v_abs[i] =
                    (0..g).map(|j| self.tau[(i, j)].norm() * a2[j].abs()).sum::<f64>() + z[i].norm() + ch.b[i].abs();
            }
            for j in 0..g {
                let e = (gf + 4.0) * 2.0 * PI * (0..g).map(|i| v_abs[i] * uf(i, j).abs()).sum::<f64>();
                phase_err[j] = phase_err[j].max(e);
            }
            let k_abs: f64 = (0..g)
                .map(|i| {
                    a2[i].abs()
                        * (PI * (0..g).map(|j| self.re[(i, j)].abs() * a2[j].abs()).sum::<f64>()
                            + 2.0 * PI * (z[i].re.abs() + ch.b[i].abs()))
                })
                .sum();
            common_err = common_err.max((2.0 * gf + 4.0) * k_abs);
            for i in 0..g {
                zb[i] = z[i] + ch.b[i];
            }
            for i in 0..g {
                vv[i] = (0..g).map(|j| self.tau[(i, j)] * a2[j]).sum::<C64>() + zb[i];
            }
            let block = &mut pows[zi * pow_len..(zi + 1) * pow_len];
            for j in 0..g {
                let l = i2pi * (0..g).map(|i| vv[i] * uf(i, j)).sum::<C64>();
                let h = tables.half[j] as usize;
                // Powers only as far as the enumeration can reach (|n_j| <= need_j), by
                // repeated products from 1 outwards as before.
                let reach = (need[j] as usize + 1).min(h);
                // exp(-i phi) is the conjugate (exact), with the same error as exp(i phi).
                let e = phase(l);
                let einv = e.conj();
                let p = &mut block[pow_off[j]..pow_off[j] + 2 * h + 1];
                p[h] = C64::new(1.0, 0.0);
                for k in 1..=reach {
                    p[h + k] = p[h + k - 1] * e;
                    p[h - k] = p[h - k + 1] * einv;
                }
            }
            let mut k_arg = 0.0;
            for i in 0..g {
                let row: f64 = (0..g).map(|j| self.re[(i, j)] * a2[j]).sum();
                k_arg += a2[i] * (PI * row + 2.0 * PI * zb[i].re);
            }
            kfacs.push(C64::new(0.0, k_arg).exp());
        }
        let rdirs: Vec<Vec<C64>> = dirs
            .iter()
            .map(|d| (0..g).map(|j| i2pi * (0..g).map(|i| d[i] * uf(i, j)).sum::<C64>()).collect())
            .collect();
        let dir_const: Vec<C64> = dirs.iter().map(|d| i2pi * (0..g).map(|i| d[i] * a2[i]).sum::<C64>()).collect();
        // Rounding: a bound derived in `rounding.rs`.
        let h: Vec<f64> = need.iter().map(|&v| v as f64).collect();
        let ynorm = yv.norm();
        let log_factor_err =
            PI * 4.0 * gf * self.y_frob * cnorm * cnorm + (gf + 2.0) * PI * ynorm * cnorm + 4.0 * log_factor.abs();
        let char_a = a2.iter().map(|v| v * v).sum::<f64>().sqrt();
        // Input errors, in units of u, as a per-term constant and a part growing with |w|^2:
        // pi |m^T E m| + 2 pi |m.e_z| with |m| <= |m + c| + |c| and |m + c|^2 <= |w|^2 / (pi lambda):
        // at most 2 pi |E| |c|^2 + 2 pi e_z (|c| + 1 / (2 sqrt(pi lambda))) + (2 |E| / lambda +
        // pi e_z / sqrt(pi lambda)) |w|^2.
        let lambda = 1.0 / (PI * self.kappa * self.kappa);
        let sl = (PI * lambda).sqrt();
        let input_shared = (2.0 * PI * errors.tau * cnorm * cnorm + 2.0 * PI * errors.z * (cnorm + 0.5 / sl)) / U;
        let input_w2 = (2.0 * errors.tau / lambda + PI * errors.z / sl) / U;
        let mut growth = self.term_growth(&rounding::PassSizes {
            half: &h,
            radius,
            phase_err: &phase_err,
            common_err,
            centre: cnorm,
            char_a,
            log_factor_err: log_factor_err + input_shared,
        });
        growth.per_w2 += input_w2;
        // lin = dir_const + sum_j rdirs_j v_j with |v_j| <= h_j, each part itself rounded.
        let dir_err = rdirs
            .iter()
            .zip(&dir_const)
            .map(|(d, c)| {
                2.0 * (gf + 2.0)
                    * U
                    * (c.norm() + (0..g).map(|j| (d[j].re.abs() + d[j].im.abs()) * need[j] as f64).sum::<f64>())
            })
            .fold(0.0, f64::max);
        let orders: Vec<u32> = monos.iter().map(|m| m.iter().sum()).collect();
        let out = sum::run(&sum::SumInput {
            tables,
            c: &self.c,
            s: &s,
            r2: r_enum * r_enum,
            pow: &pows,
            pow_off: &pow_off,
            pow_len,
            k: &kfacs,
            q: (i2pi * self.taur[(0, 0)]).exp(),
            dirs: &rdirs,
            dir_const: &dir_const,
            monos,
            growth: [growth.per_step, growth.per_step2, growth.per_w2],
            dir_err,
            orders: &orders,
        });
        growth.max_line = out.max_line as f64;

        let bounds: Vec<f64> = monos
            .iter()
            .zip(&out.abs)
            .enumerate()
            .map(|(mi, (mono, &abs))| {
                let sums = rounding::TermSums { abs, grow: out.grow[mi], weight_err: out.weight_err[mi] };
                truncation + self.rounding_bound(&sums, &growth, mono)
            })
            .collect();
        let nm = monos.len();
        let values = (0..zs.len())
            .map(|b| {
                let acc = &out.acc[b * nm..(b + 1) * nm];
                acc.iter().zip(&bounds).map(|(v, &error)| ThetaValue { log_factor, value: *v, error }).collect()
            })
            .collect();
        Ok((values, SumStats { points: out.points, lines: out.lines, radius, centre: cnorm, moduli: out.abs0 }))
    }
}

/// One theta value theta[ch](z | tau) with inputs off by at most `tau_err` (entrywise)
/// and `z_err`, through Siegel's reduction (`transform.rs`) when Im tau has a short
/// lattice vector; `None` otherwise: the caller then sums directly (and propagates
/// `tau_err`, `z_err` by derivatives, see `theta_fn.rs`).
pub fn value_with_inputs(
    tau: &DMatrix<C64>,
    z: &[C64],
    ch: Option<&Characteristic>,
    tau_err: f64,
    z_err: f64,
    accuracy: f64,
) -> Option<Result<ThetaValue, ThetaError>> {
    let g = tau.nrows();
    if tau.ncols() != g || z.len() != g || g == 0 || !tau.iter().all(|v| v.re.is_finite() && v.im.is_finite()) {
        return None;
    }
    if tau.map(|v| v.im).cholesky().is_none() || !transform::worthwhile(tau) {
        return None;
    }
    let zero = Characteristic::zero(g);
    transform::eval(tau, z, ch.unwrap_or(&zero), tau_err, z_err, accuracy)
}

fn norm(d: &[C64]) -> f64 {
    d.iter().map(|v| v.norm_sqr()).sum::<f64>().sqrt()
}

/// Volume estimate of the number of lattice points in the ellipsoid, each semi-axis
/// widened by one lattice step, used to refuse hopeless requests before enumerating.
fn ellipsoid_points(r: f64, gammas: &[f64]) -> f64 {
    // Volume of the unit ball: V_0 = 1, V_1 = 2, V_n = 2 pi V_(n-2) / n.
    let n = gammas.len();
    let mut v = [1.0, 2.0];
    for k in 2..=n {
        v[k % 2] *= 2.0 * PI / k as f64;
    }
    v[n % 2] * gammas.iter().map(|g| r / g + 1.0).product::<f64>()
}

#[cfg(test)]
mod tests;

/// Derivatives of log theta of orders 1..=4 along one direction, from the jet
/// [theta, D theta, ..., D^4 theta] of one pass (the exponential factors cancel), each
/// with a first-order error estimate. Fewer jet entries give fewer orders.
pub fn log_jet(jet: &[ThetaValue]) -> Vec<(C64, f64)> {
    let Some(d0) = jet.first() else { return vec![] };
    let den = d0.value.norm() - d0.error;
    if den <= 0.0 {
        // theta may vanish here: its logarithm has no derivatives to report.
        return vec![(C64::new(f64::NAN, f64::NAN), f64::INFINITY); jet.len().saturating_sub(1)];
    }
    // Ratios r_k = D^k theta / theta and their error bounds.
    let r: Vec<C64> = jet.iter().map(|v| v.value / d0.value).collect();
    let dr: Vec<f64> = jet.iter().map(|v| (v.error + (v.value / d0.value).norm() * d0.error) / den).collect();
    let z = C64::new(0.0, 0.0);
    let g = |k: usize| if k < r.len() { r[k] } else { z };
    let (r1, r2, r3, r4) = (g(1), g(2), g(3), g(4));
    // Faa di Bruno for log: l1 = r1, l2 = r2 - r1^2, l3 = r3 - 3 r1 r2 + 2 r1^3,
    // l4 = r4 - 4 r1 r3 - 3 r2^2 + 12 r1^2 r2 - 6 r1^4; errors by the partial derivatives.
    let e = |k: usize| if k < dr.len() { dr[k] } else { 0.0 };
    let n = |c: C64| c.norm();
    let out = [
        (r1, e(1)),
        (r2 - r1 * r1, e(2) + 2.0 * n(r1) * e(1)),
        (r3 - 3.0 * r1 * r2 + 2.0 * r1 * r1 * r1, e(3) + 3.0 * n(r1) * e(2) + (3.0 * n(r2) + 6.0 * n(r1 * r1)) * e(1)),
        (
            r4 - 4.0 * r1 * r3 - 3.0 * r2 * r2 + 12.0 * r1 * r1 * r2 - 6.0 * r1 * r1 * r1 * r1,
            e(4) + 4.0 * n(r1) * e(3)
                + (6.0 * n(r2) + 12.0 * n(r1 * r1)) * e(2)
                + (4.0 * n(r3) + 24.0 * n(r1 * r2) + 24.0 * n(r1 * r1 * r1)) * e(1),
        ),
    ];
    out[..jet.len().saturating_sub(1).min(4)].to_vec()
}
