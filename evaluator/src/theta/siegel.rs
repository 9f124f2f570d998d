//! Siegel reduction of a Riemann matrix, keeping the Sp(2g, Z) transformation.
//!
//! The practical form of Siegel's algorithm used for theta computations (Deconinck, Heil,
//! Bobenko, van Hoeij, Schmies, Math. Comp. 73 (2004), section 6): repeat
//! (1) LLL-reduce Im tau by a unimodular U: tau -> U^T tau U;
//! (2) translate Re tau to entries in [-1/2, 1/2];
//! (3) stop when |tau_11| >= 1, else apply the quasi-inversion in the first coordinate.
//! Every step is an element of Sp(2g, Z) acting by tau -> (A tau + B)(C tau + D)^-1; their
//! product is returned so that callers can map characteristics and periods.

use super::{lattice, ThetaError};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

#[derive(Clone, Debug)]
pub struct Siegel {
    /// The reduced matrix.
    pub tau: DMatrix<C64>,
    /// Gamma = [[A, B], [C, D]] in Sp(2g, Z) with tau_reduced = (A tau + B)(C tau + D)^-1.
    pub gamma: DMatrix<i64>,
    /// Number of quasi-inversions applied.
    pub inversions: usize,
}

/// The action (A tau + B)(C tau + D)^-1 of an element of Sp(2g, Z).
pub fn act(gamma: &DMatrix<i64>, tau: &DMatrix<C64>) -> Option<DMatrix<C64>> {
    let g = tau.nrows();
    let blk = |r: usize, c: usize| gamma.view((r * g, c * g), (g, g)).map(|v| C64::new(v as f64, 0.0));
    let num = blk(0, 0) * tau + blk(0, 1);
    let den = blk(1, 0) * tau + blk(1, 1);
    Some(num * den.try_inverse()?)
}

/// The symplectic form J = [[0, I], [-I, 0]].
pub fn j_form(g: usize) -> DMatrix<i64> {
    let mut j = DMatrix::<i64>::zeros(2 * g, 2 * g);
    for i in 0..g {
        j[(i, g + i)] = 1;
        j[(g + i, i)] = -1;
    }
    j
}

pub fn siegel_reduce(tau: &DMatrix<C64>) -> Result<Siegel, ThetaError> {
    // Validates tau the same way theta does.
    let ctx = super::ThetaContext::new(tau, 1e-8)?;
    let g = ctx.genus();
    let mut t = ctx.tau().clone();
    let mut gamma = DMatrix::<i64>::identity(2 * g, 2 * g);
    let mut inversions = 0;
    for _ in 0..200 {
        // (1) LLL on Im tau.
        let y = t.map(|v| v.im);
        let u = lattice::lll(&y);
        let uinv = lattice::unimodular_inverse(&u);
        let uc = u.map(|v| C64::new(v as f64, 0.0));
        t = uc.transpose() * &t * &uc;
        let mut step = DMatrix::<i64>::zeros(2 * g, 2 * g);
        step.view_mut((0, 0), (g, g)).copy_from(&u.transpose());
        step.view_mut((g, g), (g, g)).copy_from(&uinv);
        gamma = &step * &gamma;
        // (2) Re tau into [-1/2, 1/2].
        let b = t.map(|v| -v.re.round() as i64);
        t += b.map(|v| C64::new(v as f64, 0.0));
        let mut step = DMatrix::<i64>::identity(2 * g, 2 * g);
        step.view_mut((0, g), (g, g)).copy_from(&b);
        gamma = &step * &gamma;
        // (3) Done when the first diagonal entry is outside the unit disc.
        if t[(0, 0)].norm() >= 1.0 - 1e-12 {
            return Ok(Siegel { tau: symmetrise(&t), gamma, inversions });
        }
        let mut step = DMatrix::<i64>::zeros(2 * g, 2 * g);
        for i in 1..g {
            step[(i, i)] = 1;
            step[(g + i, g + i)] = 1;
        }
        step[(0, g)] = -1;
        step[(g, 0)] = 1;
        t = act(&step, &t).ok_or(ThetaError::NotFinite)?;
        t = symmetrise(&t);
        gamma = &step * &gamma;
        inversions += 1;
    }
    Ok(Siegel { tau: symmetrise(&t), gamma, inversions })
}

fn symmetrise(t: &DMatrix<C64>) -> DMatrix<C64> {
    (t + t.transpose()).map(|v| v * 0.5)
}
