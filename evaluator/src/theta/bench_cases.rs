//! Deterministic benchmark matrices (invented): genus 1..8, well- and ill-conditioned,
//! shared by `cargo bench`, the timing example and the python-flint comparison script
//! (which reads them from the example's output of `--print-cases`).

use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Conditioning {
    /// Im tau = I + small off-diagonal part.
    Well,
    /// Im tau with smallest eigenvalue about 0.05.
    Ill,
}

pub struct BenchCase {
    pub conditioning: Conditioning,
    pub tau: DMatrix<C64>,
    /// A few z with moderate imaginary parts.
    pub zs: Vec<Vec<C64>>,
}

/// A small deterministic generator (no dependency, reproducible everywhere).
struct Lcg(u64);
impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        ((self.0 >> 11) as f64) / ((1u64 << 53) as f64) - 0.5
    }
}

pub fn cases() -> Vec<BenchCase> {
    let mut out = Vec::new();
    let mut r = Lcg(2026);
    for g in 1..=8 {
        for cond in [Conditioning::Well, Conditioning::Ill] {
            let mut y = DMatrix::<f64>::identity(g, g);
            for i in 0..g {
                for j in 0..i {
                    let v = 0.2 * r.next();
                    y[(i, j)] = v;
                    y[(j, i)] = v;
                }
            }
            if cond == Conditioning::Ill {
                // Shrink one direction: Y -> Y - (1 - 0.05) v v^T / |v|^2 along v = (1, 1, ..).
                let v = DMatrix::<f64>::from_element(g, 1, 1.0 / (g as f64).sqrt());
                let eig = nalgebra::SymmetricEigen::new(y.clone());
                let lo = eig.eigenvalues.min();
                y -= (&v * v.transpose()) * (lo - 0.05).max(0.0);
            }
            let tau = DMatrix::from_fn(g, g, |i, j| C64::new(0.0, y[(i, j)]));
            let mut tau = tau.clone();
            for i in 0..g {
                for j in 0..=i {
                    let x = r.next();
                    tau[(i, j)].re = x;
                    tau[(j, i)].re = x;
                }
            }
            let zs = (0..8).map(|_| (0..g).map(|_| C64::new(r.next(), 0.5 * r.next())).collect()).collect();
            out.push(BenchCase { conditioning: cond, tau, zs });
        }
    }
    out
}
