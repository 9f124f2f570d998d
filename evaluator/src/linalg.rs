//! Small dense linear algebra on complex matrices (nalgebra underneath).

use crate::num::Num;
use nalgebra::{DMatrix, SymmetricEigen};
use num_complex::Complex64;

pub fn to_complex_matrix(m: &[Vec<Num>]) -> DMatrix<Complex64> {
    let (r, c) = (m.len(), m.first().map_or(0, Vec::len));
    DMatrix::from_fn(r, c, |i, j| m[i][j].to_complex())
}

/// Why a square matrix is or is not a Riemann matrix.
#[derive(Clone, Debug, PartialEq)]
pub struct RiemannCheck {
    /// max |M_ij - M_ji|
    pub symmetry_defect: f64,
    /// Eigenvalues of Im(M + M^T)/2, ascending.
    pub imag_eigenvalues: Vec<f64>,
    pub symmetric: bool,
    pub positive_definite: bool,
}

impl RiemannCheck {
    pub fn holds(&self) -> bool {
        self.symmetric && self.positive_definite
    }
    pub fn reason(&self) -> String {
        let smallest = self.imag_eigenvalues.first().copied().unwrap_or(f64::NAN);
        match (self.symmetric, self.positive_definite) {
            (true, true) => format!(
                "symmetric (defect {:.1e}), imaginary part positive definite (smallest eigenvalue {smallest:.6})",
                self.symmetry_defect
            ),
            (false, _) => format!("not symmetric: largest |M_jk - M_kj| is {:.3e}", self.symmetry_defect),
            (true, false) => {
                let k = self.imag_eigenvalues.iter().filter(|&&e| e <= 0.0).count();
                format!("imaginary part not positive definite: {k} eigenvalue(s) <= 0, smallest {smallest:.6}")
            }
        }
    }
}

/// Symmetric within `tol` and Im part positive definite (Cholesky succeeds and every
/// eigenvalue is positive).
pub fn riemann_check(m: &DMatrix<Complex64>, tol: f64) -> RiemannCheck {
    let n = m.nrows();
    let mut defect: f64 = 0.0;
    for i in 0..n {
        for j in 0..n {
            defect = defect.max((m[(i, j)] - m[(j, i)]).norm());
        }
    }
    let y = DMatrix::from_fn(n, n, |i, j| 0.5 * (m[(i, j)].im + m[(j, i)].im));
    let mut eig: Vec<f64> = SymmetricEigen::new(y.clone()).eigenvalues.iter().copied().collect();
    eig.sort_by(f64::total_cmp);
    let pd = n > 0 && y.cholesky().is_some() && eig.first().is_some_and(|&e| e > 0.0);
    RiemannCheck { symmetry_defect: defect, imag_eigenvalues: eig, symmetric: defect <= tol, positive_definite: pd }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn eigenvalues_of_a_known_imaginary_part() {
        // Im = [[2, 1], [1, 2]] has eigenvalues 1 and 3 (common practice, no source).
        let m = DMatrix::from_row_slice(2, 2, &[c(0.5, 2.0), c(0.0, 1.0), c(0.0, 1.0), c(0.1, 2.0)]);
        let r = riemann_check(&m, 1e-12);
        assert!(r.holds());
        assert!((r.imag_eigenvalues[0] - 1.0).abs() < 1e-12);
        assert!((r.imag_eigenvalues[1] - 3.0).abs() < 1e-12);
        // Im = [[1, 2], [2, 1]] has eigenvalues -1 and 3.
        let bad = DMatrix::from_row_slice(2, 2, &[c(0.0, 1.0), c(0.0, 2.0), c(0.0, 2.0), c(0.0, 1.0)]);
        let r = riemann_check(&bad, 1e-12);
        assert!(!r.holds());
        assert!((r.imag_eigenvalues[0] + 1.0).abs() < 1e-12);
        assert!(r.reason().contains("-1.000000"));
    }
}
