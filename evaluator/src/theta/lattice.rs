//! Lattice tools for theta sums: the upper-triangular Cholesky factor of pi*Y and LLL
//! reduction of a positive-definite Gram matrix.

use nalgebra::DMatrix;

/// Upper-triangular C with C^T C = s * Y, or `None` when Y is not positive definite.
pub fn upper_cholesky(y: &DMatrix<f64>, s: f64) -> Option<DMatrix<f64>> {
    let l = (y * s).cholesky()?.l();
    Some(l.transpose())
}

/// LLL reduction (delta = 0.99) of the lattice with Gram matrix `gram` (positive
/// definite). Returns a unimodular integer matrix U whose columns form the reduced basis:
/// the reduced Gram matrix is U^T gram U. Floating point Gram–Schmidt, recomputed from the
/// Gram matrix at every swap: the dimensions here are small (genus <= ~20).
pub fn lll(gram: &DMatrix<f64>) -> DMatrix<i64> {
    let n = gram.nrows();
    let mut u = DMatrix::<i64>::identity(n, n);
    if n <= 1 {
        return u;
    }
    let delta = 0.99;
    let g_of = |u: &DMatrix<i64>| -> DMatrix<f64> {
        let uf = u.map(|v| v as f64);
        uf.transpose() * gram * uf
    };
    let mut g = g_of(&u);
    let (mut mu, mut b) = gram_schmidt(&g);
    let mut k = 1;
    let mut guard = 0usize;
    while k < n {
        guard += 1;
        if guard > 100_000 {
            break; // cannot happen for sane input; the basis is still unimodular
        }
        for j in (0..k).rev() {
            let q = mu[(k, j)].round();
            if q.abs() > 1e12 {
                return u; // numerically meaningless reduction; U so far is still unimodular
            }
            if q != 0.0 {
                let qi = q as i64;
                for r in 0..n {
                    u[(r, k)] -= qi * u[(r, j)];
                }
                g = g_of(&u);
                let gs = gram_schmidt(&g);
                mu = gs.0;
                b = gs.1;
            }
        }
        if b[k] >= (delta - mu[(k, k - 1)].powi(2)) * b[k - 1] {
            k += 1;
        } else {
            u.swap_columns(k, k - 1);
            g = g_of(&u);
            let gs = gram_schmidt(&g);
            mu = gs.0;
            b = gs.1;
            k = (k - 1).max(1);
        }
    }
    u
}

/// Gram–Schmidt coefficients mu (lower triangular) and squared lengths b from a Gram matrix.
fn gram_schmidt(g: &DMatrix<f64>) -> (DMatrix<f64>, Vec<f64>) {
    let n = g.nrows();
    let mut mu = DMatrix::<f64>::zeros(n, n);
    let mut b = vec![0.0; n];
    for i in 0..n {
        for j in 0..i {
            let mut s = g[(i, j)];
            for k in 0..j {
                s -= mu[(j, k)] * mu[(i, k)] * b[k];
            }
            mu[(i, j)] = s / b[j];
        }
        let mut s = g[(i, i)];
        for k in 0..i {
            s -= mu[(i, k)].powi(2) * b[k];
        }
        b[i] = s;
        mu[(i, i)] = 1.0;
    }
    (mu, b)
}

/// Inverse of a unimodular integer matrix (exact: Gauss–Jordan over the rationals is not
/// needed because the inverse is integral; floating inversion is rounded and verified).
pub fn unimodular_inverse(u: &DMatrix<i64>) -> DMatrix<i64> {
    let f = u.map(|v| v as f64);
    let inv = f.try_inverse().expect("a unimodular matrix is invertible").map(|v| v.round() as i64);
    debug_assert_eq!(u * &inv, DMatrix::<i64>::identity(u.nrows(), u.nrows()));
    inv
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lll_finds_the_short_basis_of_a_skewed_lattice() {
        // The lattice Z^2 in the skewed basis (1, 0), (100, 1): LLL must recover vectors of
        // length 1 (common practice, no source).
        let b = DMatrix::from_row_slice(2, 2, &[1.0, 100.0, 0.0, 1.0]);
        let gram = b.transpose() * &b;
        let u = lll(&gram);
        let red = u.map(|v| v as f64).transpose() * &gram * u.map(|v| v as f64);
        assert!((red[(0, 0)] - 1.0).abs() < 1e-9 && (red[(1, 1)] - 1.0).abs() < 1e-9, "{red}");
        let det = u[(0, 0)] * u[(1, 1)] - u[(0, 1)] * u[(1, 0)];
        assert_eq!(det.abs(), 1);
    }
}
