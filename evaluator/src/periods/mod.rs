//! Riemann matrices of curves: periods of holomorphic differentials over a symplectic
//! homology basis, tau = A^-1 B, with an error estimate and the free self-checks
//! (symmetry defect, smallest eigenvalue of Im tau).

pub mod fingerprint;
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

#[derive(Clone, Debug)]
pub struct RiemannMatrix {
    pub tau: DMatrix<C64>,
    /// Bound on the error of every entry (quadrature and rounding, propagated through A^-1 B).
    pub error: f64,
    pub symmetry_defect: f64,
    pub min_eig_im: f64,
    /// Whether tau was Siegel-reduced (and by which element of Sp(2g, Z)).
    pub reduced: Option<DMatrix<i64>>,
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

/// tau = A^-1 B from periods, symmetrised, checked, and Siegel-reduced when asked.
pub fn riemann_matrix(p: Periods, reduce: bool) -> Result<RiemannMatrix, PeriodError> {
    let g = p.genus;
    let ainv =
        p.a.clone().try_inverse().ok_or_else(|| PeriodError::Accuracy("the a-period matrix is singular".into()))?;
    let raw = &ainv * &p.b;
    // d(A^-1 B) = A^-1 (dB - dA tau): an entry of dB - dA tau is at most
    // b_error + a_error ||tau||_1, and a row of A^-1 sums to at most ||A^-1||_inf.
    let gf = g as f64;
    let ni = norm_inf(&ainv);
    let mut error = ni * (p.b_error + p.a_error * norm_1(&raw)) + 4.0 * gf * f64::EPSILON * ni * norm_inf(&p.b);
    let symmetry_defect = (0..g)
        .flat_map(|i| (0..g).map(move |j| (i, j)))
        .map(|(i, j)| (raw[(i, j)] - raw[(j, i)]).norm())
        .fold(0.0, f64::max);
    let mut tau = (&raw + raw.transpose()) * C64::new(0.5, 0.0);
    error = error.max(symmetry_defect);
    let min_eig = |t: &DMatrix<C64>| t.map(|v| v.im).symmetric_eigenvalues().min();
    let mut min_eig_im = min_eig(&tau);
    if !(min_eig_im > error) {
        return Err(PeriodError::Accuracy(format!(
            "the computed matrix fails the Riemann check: smallest eigenvalue of Im tau {min_eig_im:.3e} with error {error:.1e}"
        )));
    }
    let mut reduced = None;
    if reduce {
        if let Ok(s) = crate::theta::siegel::siegel_reduce(&tau) {
            // tau' = (A tau + B)(C tau + D)^-1 moves errors by X^T . X with X = (C tau + D)^-1,
            // and |(X^T E X)_ij| <= max|E| ||X||_1^2.
            let blk = |r: usize, c: usize| s.gamma.view((r * g, c * g), (g, g)).map(|v| C64::new(v as f64, 0.0));
            if let Some(minv) = (blk(1, 0) * &tau + blk(1, 1)).try_inverse() {
                let k = norm_1(&minv);
                error *= k * k;
                tau = (&s.tau + s.tau.transpose()) * C64::new(0.5, 0.0);
                min_eig_im = min_eig(&tau);
                reduced = Some(s.gamma);
            }
        }
    }
    Ok(RiemannMatrix { tau, error, symmetry_defect, min_eig_im, reduced, periods: p })
}
