//! Riemann matrices of curves: periods of holomorphic differentials over a symplectic
//! homology basis, tau = A^-1 B, with an error estimate and the free self-checks
//! (symmetry defect, smallest eigenvalue of Im tau).

pub mod abel;
pub mod fingerprint;
pub mod general;
pub mod igusa;
pub mod modular;
pub mod quad;
pub mod shape;
pub mod superelliptic;
pub mod symplectic;
pub mod tree;

#[cfg(test)]
mod tests;

use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
pub use superelliptic::{PeriodError, Periods};

use crate::memo::Memo;
use std::sync::{Arc, OnceLock};

/// Periods of y^m = f(x) at an accuracy, computed once per process and shared: editing a
/// claim or a comment must not recompute every Riemann matrix in the file.
pub fn periods_memo(m: u32, f: &crate::algebra::upoly::UPoly, accuracy: f64) -> Result<Arc<Periods>, PeriodError> {
    type Key = (u32, String, u64);
    static MEMO: OnceLock<Memo<Key, Result<Arc<Periods>, PeriodError>>> = OnceLock::new();
    MEMO.get_or_init(Memo::new)
        .get_or((m, f.show("x"), accuracy.to_bits()), || superelliptic::periods(m, f, accuracy).map(Arc::new))
}

/// Periods of a general plane curve (the covering route), once per equation per process.
pub fn general_memo(
    poly: &kelp_lang::poly::Poly,
    projective: bool,
    facts: &crate::algebra::curve::CurveFacts,
    genus: i64,
) -> Result<Arc<Periods>, PeriodError> {
    type Key = (String, bool);
    static MEMO: OnceLock<Memo<Key, Result<Arc<Periods>, PeriodError>>> = OnceLock::new();
    MEMO.get_or_init(Memo::new).get_or_keep(
        (poly.to_string(), projective),
        || general::periods(poly, projective, facts, genus).map(|g| Arc::new(g.periods)),
        |_| !crate::limits::expired(),
    )
}

/// Period matrices over one homology basis, with entrywise bounds.
#[derive(Clone, Debug)]
pub struct Basis {
    pub a: DMatrix<C64>,
    pub b: DMatrix<C64>,
    pub a_error: f64,
    pub b_error: f64,
}

/// The periods over the cycles changed by Gamma = [[a, b], [c, d]] in Sp(2g, Z):
/// A' = A d^T + B c^T and B' = A b^T + B a^T (from tau' = (c tau + d)^-T (a tau + b)^T and
/// A tau = B). Each entry's bound: the entries' bounds through the integer blocks' row
/// sums, plus the products' rounding (2g terms of at most max|A|, max|B| times an integer;
/// Higham, *Accuracy and Stability of Numerical Algorithms*, ch. 3).
pub fn change_cycles(p: &Periods, gamma: &DMatrix<i64>) -> Basis {
    let g = p.genus;
    let blk = |r: usize, c: usize| gamma.view((r * g, c * g), (g, g)).map(|v| C64::new(v as f64, 0.0));
    let (ga, gb, gc, gd) = (blk(0, 0), blk(0, 1), blk(1, 0), blk(1, 1));
    let max = |m: &DMatrix<C64>| m.iter().map(|v| v.norm()).fold(0.0, f64::max);
    let round = 4.0 * (2 * g + 1) as f64 * f64::EPSILON * max(&p.a).max(max(&p.b));
    let error = |x: &DMatrix<C64>, y: &DMatrix<C64>| {
        p.a_error * norm_inf(x) + p.b_error * norm_inf(y) + round * (norm_inf(x) + norm_inf(y))
    };
    Basis {
        a: &p.a * gd.transpose() + &p.b * gc.transpose(),
        b: &p.a * gb.transpose() + &p.b * ga.transpose(),
        a_error: error(&gd, &gc),
        b_error: error(&gb, &ga),
    }
}

#[derive(Clone, Debug)]
pub struct RiemannMatrix {
    pub tau: DMatrix<C64>,
    /// Bound on the error of every entry (quadrature and rounding, propagated through A^-1 B).
    pub error: f64,
    pub symmetry_defect: f64,
    pub min_eig_im: f64,
    /// Whether tau was Siegel-reduced (and by which element of Sp(2g, Z)).
    pub reduced: Option<DMatrix<i64>>,
    /// The periods in the basis tau refers to (reduced or not): tau = A^-1 B, and the
    /// normalized differentials are A^-1 omega with this A.
    pub basis: Basis,
    pub periods: Periods,
}

/// Largest row sum of absolute values.
fn norm_inf(m: &DMatrix<C64>) -> f64 {
    m.row_iter().map(|r| r.iter().map(|v| v.norm()).sum::<f64>()).fold(0.0, f64::max)
}

/// Largest column sum of absolute values.
fn norm_1(m: &DMatrix<C64>) -> f64 {
    norm_inf(&m.transpose())
}

/// A^-1 B and a bound on its entries' errors: d(A^-1 B) = A^-1 (dB - dA tau), an entry of
/// dB - dA tau is at most b_error + a_error ||tau||_1, and a row of A^-1 sums to at most
/// ||A^-1||_inf; plus rounding in the solve.
fn quotient(a: &DMatrix<C64>, b: &DMatrix<C64>, a_error: f64, b_error: f64) -> Option<(DMatrix<C64>, f64)> {
    let ainv = a.clone().try_inverse()?;
    let raw = &ainv * b;
    let ni = norm_inf(&ainv);
    let g = a.nrows() as f64;
    Some((raw.clone(), ni * (b_error + a_error * norm_1(&raw)) + 4.0 * g * f64::EPSILON * ni * norm_inf(b)))
}

/// Largest |m_ij - m_ji|.
fn asymmetry(m: &DMatrix<C64>) -> f64 {
    let g = m.nrows();
    (0..g).flat_map(|i| (0..g).map(move |j| (i, j))).map(|(i, j)| (m[(i, j)] - m[(j, i)]).norm()).fold(0.0, f64::max)
}

/// tau = A^-1 B from periods, symmetrised, checked, and Siegel-reduced when asked.
pub fn riemann_matrix(p: Periods, reduce: bool) -> Result<RiemannMatrix, PeriodError> {
    let g = p.genus;
    let (raw, error) = quotient(&p.a, &p.b, p.a_error, p.b_error)
        .ok_or_else(|| PeriodError::Accuracy("the a-period matrix is singular".into()))?;
    if !(p.validation < f64::INFINITY) {
        return Err(PeriodError::Accuracy(
            "two independent computations of the holomorphic differentials do not give a Riemann matrix".into(),
        ));
    }
    let symmetry_defect = asymmetry(&raw);
    let mut tau = (&raw + raw.transpose()) * C64::new(0.5, 0.0);
    let mut error = error.max(symmetry_defect).max(p.validation);
    let min_eig = |t: &DMatrix<C64>| t.map(|v| v.im).symmetric_eigenvalues().min();
    let mut min_eig_im = min_eig(&tau);
    if !(min_eig_im > error) {
        return Err(PeriodError::Accuracy(format!(
            "the computed matrix fails the Riemann check: smallest eigenvalue of Im tau {min_eig_im:.3e} with error {error:.1e}"
        )));
    }
    let mut reduced = None;
    let mut basis = Basis { a: p.a.clone(), b: p.b.clone(), a_error: p.a_error, b_error: p.b_error };
    if reduce {
        if let Ok(s) = crate::theta::siegel::siegel_reduce(&tau) {
            // Gamma = [[a, b], [c, d]] changes the cycles: the new periods are
            // A' = A d^T + B c^T and B' = A b^T + B a^T (from tau' = (c tau + d)^-T (a tau + b)^T
            // and A tau = B), so the
            // reduced matrix is A'^-1 B' with errors propagated through the new, usually
            // better conditioned, A'.
            let changed = change_cycles(&p, &s.gamma);
            let (gc, gd) = (
                s.gamma.view((g, 0), (g, g)).map(|v| C64::new(v as f64, 0.0)),
                s.gamma.view((g, g), (g, g)).map(|v| C64::new(v as f64, 0.0)),
            );
            // A second valid bound: tau' - tau_exact' = X^T (tau - tau_exact) X with
            // X = (c tau + d)^-1, and |(X^T E X)_ij| <= max|E| ||X||_1^2. The smaller wins.
            let x_norm = (&gc * &tau + &gd).try_inverse().map_or(f64::INFINITY, |x| norm_1(&x).powi(2));
            let through_x = error * x_norm;
            if let Some((raw2, err2)) = quotient(&changed.a, &changed.b, changed.a_error, changed.b_error) {
                tau = (&raw2 + raw2.transpose()) * C64::new(0.5, 0.0);
                // The validation difference is not in a_error, b_error: it maps like any error of tau.
                error = err2.min(through_x).max(asymmetry(&raw2)).max(symmetry_defect).max(p.validation * x_norm);
                min_eig_im = min_eig(&tau);
                reduced = Some(s.gamma);
                basis = changed;
            }
        }
    }
    Ok(RiemannMatrix { tau, error, symmetry_defect, min_eig_im, reduced, basis, periods: p })
}
