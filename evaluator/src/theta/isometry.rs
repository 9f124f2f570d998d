//! Searching Sp(2g, Z) for a transformation between two Riemann matrices.
//!
//! Both matrices are first Siegel-reduced. Reduced matrices that are equivalent are mostly
//! related by the parabolic part [[U^T, B U^-1], [0, U^-1]] (tau -> U^T tau U + B, U
//! unimodular, B integer symmetric): U is then an isometry between the lattices of Im tau,
//! found by the Fincke–Pohst enumeration of short vectors (Fincke & Pohst, Math. Comp. 44
//! (1985)) and backtracking over the Gram relations (the usual isometry test; Plesken &
//! Souvignier, J. Symb. Comp. 24 (1997), without their invariants), and B is what is left of
//! the real parts, which must be whole. Near the boundary of the reduced domain two
//! equivalent matrices can also differ by an inversion, so the search is repeated after the
//! full inversion J and each quasi-inversion on either side. This is a search, not a
//! decision procedure: finding nothing proves nothing (the caller then says undecided).

use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

/// Integer vectors v != 0 with v^T y v <= c (Fincke–Pohst; one of v, -v), at most `limit`.
pub fn short_vectors(y: &DMatrix<f64>, c: f64, limit: usize) -> Option<Vec<Vec<i64>>> {
    let g = y.nrows();
    let l = y.clone().cholesky()?.l();
    let r = l.transpose();
    let mut out = vec![];
    let mut v = vec![0i64; g];
    fn walk(r: &DMatrix<f64>, i: usize, left: f64, v: &mut Vec<i64>, out: &mut Vec<Vec<i64>>, limit: usize) -> bool {
        let g = r.nrows();
        let s: f64 = (i + 1..g).map(|j| r[(i, j)] * v[j] as f64).sum();
        let centre = -s / r[(i, i)];
        let radius = left.max(0.0).sqrt() / r[(i, i)];
        let (lo, hi) = ((centre - radius).ceil() as i64, (centre + radius).floor() as i64);
        for x in lo..=hi {
            v[i] = x;
            let t = r[(i, i)] * x as f64 + s;
            let rest = left - t * t;
            if rest < -1e-12 * left.abs().max(1.0) {
                continue;
            }
            if i == 0 {
                // One of each pair +-v: the first nonzero entry from the top is positive.
                if let Some(&first) = v.iter().rev().find(|&&e| e != 0) {
                    if first > 0 {
                        out.push(v.clone());
                        if out.len() > limit {
                            return false;
                        }
                    }
                }
            } else if !walk(r, i - 1, rest, v, out, limit) {
                return false;
            }
        }
        v[i] = 0;
        true
    }
    if !walk(&r, g - 1, c, &mut v, &mut out, limit) {
        return None;
    }
    Some(out)
}

fn quad(y: &DMatrix<f64>, a: &[i64], b: &[i64]) -> f64 {
    let g = a.len();
    (0..g).flat_map(|i| (0..g).map(move |j| (i, j))).map(|(i, j)| a[i] as f64 * y[(i, j)] * b[j] as f64).sum()
}

fn det_i64(m: &DMatrix<i64>) -> i128 {
    let n = m.nrows();
    if n == 1 {
        return m[(0, 0)] as i128;
    }
    (0..n)
        .map(|j| {
            let minor = m.clone().remove_row(0).remove_column(j);
            let sign = if j % 2 == 0 { 1 } else { -1 };
            sign * m[(0, j)] as i128 * det_i64(&minor)
        })
        .sum()
}

/// Unimodular U with U^T y1 U = y2 entrywise within `delta`, each passed to `accept` until
/// it returns true; returns whether one was accepted. Gives up (false) past `budget` nodes.
pub fn isometries(
    y1: &DMatrix<f64>,
    y2: &DMatrix<f64>,
    delta: f64,
    budget: usize,
    accept: &mut dyn FnMut(&DMatrix<i64>) -> bool,
) -> bool {
    let g = y1.nrows();
    let mut cands: Vec<Vec<Vec<i64>>> = vec![];
    for i in 0..g {
        let Some(vs) = short_vectors(y1, y2[(i, i)] + delta, 4096) else { return false };
        let mut both = vec![];
        for v in vs {
            if (quad(y1, &v, &v) - y2[(i, i)]).abs() <= delta {
                both.push(v.iter().map(|x| -x).collect());
                both.push(v);
            }
        }
        cands.push(both);
    }
    let mut cols: Vec<usize> = vec![0; g];
    let mut nodes = 0usize;
    fn go(
        k: usize,
        cands: &[Vec<Vec<i64>>],
        y1: &DMatrix<f64>,
        y2: &DMatrix<f64>,
        delta: f64,
        cols: &mut Vec<usize>,
        nodes: &mut usize,
        budget: usize,
        accept: &mut dyn FnMut(&DMatrix<i64>) -> bool,
    ) -> Option<bool> {
        let g = cands.len();
        if k == g {
            let u = DMatrix::from_fn(g, g, |i, j| cands[j][cols[j]][i]);
            if det_i64(&u).abs() != 1 {
                return Some(false);
            }
            return Some(accept(&u));
        }
        for (ci, v) in cands[k].iter().enumerate() {
            *nodes += 1;
            if *nodes > budget {
                return None;
            }
            if (0..k).all(|j| (quad(y1, &cands[j][cols[j]], v) - y2[(j, k)]).abs() <= delta) {
                cols[k] = ci;
                match go(k + 1, cands, y1, y2, delta, cols, nodes, budget, accept) {
                    Some(true) => return Some(true),
                    None => return None,
                    Some(false) => {}
                }
            }
        }
        Some(false)
    }
    go(0, &cands, y1, y2, delta, &mut cols, &mut nodes, budget, accept).unwrap_or(false)
}

/// The inverse of an element of Sp(2g, Z): [[D^T, -B^T], [-C^T, A^T]].
pub fn symplectic_inverse(gamma: &DMatrix<i64>) -> DMatrix<i64> {
    let g = gamma.nrows() / 2;
    let blk = |r: usize, c: usize| gamma.view((r * g, c * g), (g, g)).into_owned();
    let (a, b, c, d) = (blk(0, 0), blk(0, 1), blk(1, 0), blk(1, 1));
    let mut out = DMatrix::<i64>::zeros(2 * g, 2 * g);
    out.view_mut((0, 0), (g, g)).copy_from(&d.transpose());
    out.view_mut((0, g), (g, g)).copy_from(&(-b.transpose()));
    out.view_mut((g, 0), (g, g)).copy_from(&(-c.transpose()));
    out.view_mut((g, g), (g, g)).copy_from(&a.transpose());
    out
}

/// The quasi-inversion in coordinate k (k = None: the full inversion J).
fn inversion(g: usize, k: Option<usize>) -> DMatrix<i64> {
    let mut m = DMatrix::<i64>::identity(2 * g, 2 * g);
    for i in 0..g {
        if k.is_none_or(|k| k == i) {
            m[(i, i)] = 0;
            m[(g + i, g + i)] = 0;
            m[(i, g + i)] = -1;
            m[(g + i, i)] = 1;
        }
    }
    m
}

/// Gamma in Sp(2g, Z) with Gamma . t1 = t2 entrywise within `delta` (numerically; the caller
/// verifies with bounds), searched as described in the module header, or None.
pub fn find_transform(t1: &DMatrix<C64>, t2: &DMatrix<C64>, delta: f64) -> Option<DMatrix<i64>> {
    use super::siegel::{act, siegel_reduce};
    let g = t1.nrows();
    let s1 = siegel_reduce(t1).ok()?;
    let s2 = siegel_reduce(t2).ok()?;
    let mut pre: Vec<DMatrix<i64>> = vec![DMatrix::identity(2 * g, 2 * g), inversion(g, None)];
    for k in 0..g {
        pre.push(inversion(g, Some(k)));
    }
    for p1 in &pre {
        for p2 in &pre {
            crate::limits::checkpoint();
            let (Some(r1), Some(r2)) = (act(p1, &s1.tau), act(p2, &s2.tau)) else { continue };
            let (y1, y2) = (r1.map(|v| v.im), r2.map(|v| v.im));
            if y1.clone().cholesky().is_none() || y2.clone().cholesky().is_none() {
                continue;
            }
            let mut found = None;
            isometries(&y1, &y2, delta, 200_000, &mut |u| {
                let uc = u.map(|v| C64::new(v as f64, 0.0));
                let moved = uc.transpose() * &r1 * &uc;
                let b = DMatrix::from_fn(g, g, |i, j| r2[(i, j)].re - moved[(i, j)].re);
                if b.iter().any(|v| (v - v.round()).abs() > delta) {
                    return false;
                }
                let bi = b.map(|v| v.round() as i64);
                if bi != bi.transpose() {
                    return false;
                }
                let uinv = super::lattice::unimodular_inverse(u);
                let mut q = DMatrix::<i64>::zeros(2 * g, 2 * g);
                q.view_mut((0, 0), (g, g)).copy_from(&u.transpose());
                q.view_mut((0, g), (g, g)).copy_from(&(&bi * &uinv));
                q.view_mut((g, g), (g, g)).copy_from(&uinv);
                found = Some(q);
                true
            });
            if let Some(q) = found {
                // t2 = G2^-1 P2^-1 Q P1 G1 . t1.
                let gamma = symplectic_inverse(&s2.gamma) * symplectic_inverse(p2) * q * p1 * &s1.gamma;
                return Some(gamma);
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    // A^T x A = x for the hexagonal form's automorphisms: the Gram matrix [[2, 1], [1, 2]]
    // has 6 vectors of norm 2 and 12 automorphisms (common practice, no source).
    #[test]
    fn hexagonal_lattice() {
        let y = DMatrix::from_row_slice(2, 2, &[2.0, 1.0, 1.0, 2.0]);
        let vs = short_vectors(&y, 2.0 + 1e-9, 100).unwrap();
        assert_eq!(vs.len(), 3);
        let mut count = 0;
        isometries(&y, &y, 1e-9, 100_000, &mut |_| {
            count += 1;
            false
        });
        assert_eq!(count, 12);
    }
}
