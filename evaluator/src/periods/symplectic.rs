//! A symplectic basis from an integer skew-symmetric intersection matrix.
//!
//! Symplectic Gram–Schmidt over Z: take a pair x, y with the smallest nonzero pairing,
//! reduce every other vector's pairings with x and y modulo it (Euclid), repeat until the
//! pair pairs to +-1 and is orthogonal to the rest, split it off. The cycles generate
//! homology exactly when every pair reaches +-1 (a sublattice of index k would have
//! determinant k^2), so anything else is reported, never papered over.

/// a_i . b_j = delta_ij, a.a = b.b = 0, each vector written in the input basis.
#[derive(Clone, Debug)]
pub struct SymplecticBasis {
    pub a: Vec<Vec<i64>>,
    pub b: Vec<Vec<i64>>,
}

impl SymplecticBasis {
    /// The intersection numbers of a_1..a_g, b_1..b_g computed from the cycles' own
    /// intersection matrix k (the standard symplectic form when the reduction is right).
    pub fn intersections(&self, k: &[Vec<i64>]) -> Vec<Vec<i64>> {
        let vs: Vec<&Vec<i64>> = self.a.iter().chain(&self.b).collect();
        let pair = |x: &[i64], y: &[i64]| -> i64 {
            let mut s = 0i128;
            for (i, &xi) in x.iter().enumerate() {
                if xi != 0 {
                    for (j, &yj) in y.iter().enumerate() {
                        s += xi as i128 * k[i][j] as i128 * yj as i128;
                    }
                }
            }
            s as i64
        };
        vs.iter().map(|x| vs.iter().map(|y| pair(x, y)).collect()).collect()
    }
}

fn round_div(a: i128, d: i128) -> i128 {
    let q = a.div_euclid(d);
    let r = a.rem_euclid(d);
    if 2 * r > d.abs() {
        q + d.signum()
    } else {
        q
    }
}

fn axpy(z: &mut [i128], q: i128, x: &[i128]) {
    for (zi, xi) in z.iter_mut().zip(x) {
        *zi -= q * xi;
    }
}

pub fn symplectic_basis(k: &[Vec<i64>]) -> Result<SymplecticBasis, String> {
    let n = k.len();
    for i in 0..n {
        for j in 0..n {
            if k[i][j] != -k[j][i] {
                return Err(format!("intersection matrix is not skew-symmetric at ({i}, {j})"));
            }
        }
    }
    // The remaining vectors (rows of `rem`, in the input basis) and their Gram matrix
    // `gram[i][j] = <rem_i, rem_j>`, kept up to date by the same row operations.
    let mut rem: Vec<Vec<i128>> = (0..n).map(|i| (0..n).map(|j| i128::from(i == j)).collect()).collect();
    let mut gram: Vec<Vec<i128>> = k.iter().map(|r| r.iter().map(|&v| v as i128).collect()).collect();
    let (mut a, mut b) = (vec![], vec![]);
    // z -= q * y, in the vectors and in the Gram matrix.
    let sub = |rem: &mut Vec<Vec<i128>>, gram: &mut Vec<Vec<i128>>, z: usize, q: i128, y: usize| {
        if q == 0 {
            return;
        }
        let yv = rem[y].clone();
        axpy(&mut rem[z], q, &yv);
        let gy = gram[y].clone();
        axpy(&mut gram[z], q, &gy);
        for row in gram.iter_mut() {
            row[z] -= q * row[y];
        }
    };
    loop {
        crate::limits::checkpoint();
        // The pair with the smallest nonzero pairing.
        let mut best: Option<(usize, usize, i128)> = None;
        for i in 0..rem.len() {
            for j in i + 1..rem.len() {
                let d = gram[i][j];
                if d != 0 && best.is_none_or(|(_, _, e)| d.abs() < e.abs()) {
                    best = Some((i, j, d));
                }
            }
        }
        let Some((mut ix, mut iy, _)) = best else { break };
        loop {
            crate::limits::checkpoint();
            let d = gram[ix][iy];
            let mut next: Option<(usize, usize, i128)> = None;
            for z in 0..rem.len() {
                if z == ix || z == iy {
                    continue;
                }
                // <x, z - q y> = <x, z> - q d and <y, z + p x> = <y, z> - p d.
                let q = round_div(gram[ix][z], d);
                sub(&mut rem, &mut gram, z, q, iy);
                let p = round_div(gram[iy][z], d);
                sub(&mut rem, &mut gram, z, -p, ix);
                for (e, pr) in [(gram[ix][z], (ix, z)), (gram[iy][z], (iy, z))] {
                    if e != 0 && next.is_none_or(|(_, _, f)| e.abs() < f.abs()) {
                        next = Some((pr.0, pr.1, e));
                    }
                }
            }
            match next {
                Some((i, j, _)) => {
                    ix = i;
                    iy = j;
                }
                None => {
                    if d.abs() != 1 {
                        return Err(format!(
                            "the cycles do not generate homology (a pairing of {d} cannot be reduced to 1)"
                        ));
                    }
                    let (p, q) = if d == 1 { (ix, iy) } else { (iy, ix) };
                    let conv = |v: &[i128]| -> Result<Vec<i64>, String> {
                        v.iter().map(|&c| i64::try_from(c).map_err(|_| "coefficient overflow".to_string())).collect()
                    };
                    a.push(conv(&rem[p])?);
                    b.push(conv(&rem[q])?);
                    let (hi, lo) = (ix.max(iy), ix.min(iy));
                    for idx in [hi, lo] {
                        rem.remove(idx);
                        gram.remove(idx);
                        for row in gram.iter_mut() {
                            row.remove(idx);
                        }
                    }
                    break;
                }
            }
        }
    }
    Ok(SymplecticBasis { a, b })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pair(k: &[Vec<i64>], u: &[i128], v: &[i128]) -> i128 {
        let mut s = 0i128;
        for (i, ui) in u.iter().enumerate() {
            if *ui == 0 {
                continue;
            }
            for (j, vj) in v.iter().enumerate() {
                s += ui * k[i][j] as i128 * vj;
            }
        }
        s
    }

    fn form(k: &[Vec<i64>], u: &[i64], v: &[i64]) -> i64 {
        let u: Vec<i128> = u.iter().map(|&x| x as i128).collect();
        let v: Vec<i128> = v.iter().map(|&x| x as i128).collect();
        pair(k, &u, &v) as i64
    }

    // A skew matrix built as P^T J P with a unimodular P (plus a kernel direction) must give
    // back a symplectic basis of rank 2g (definition of a symplectic basis, common practice).
    #[test]
    fn recovers_a_symplectic_basis() {
        // J of genus 2 in the basis e1..e4, plus a null vector e5, then mixed by P.
        let j = |i: usize, k: usize| -> i64 {
            match (i, k) {
                (0, 2) | (1, 3) => 1,
                (2, 0) | (3, 1) => -1,
                _ => 0,
            }
        };
        let p = [[1, 2, 0, 0, 1], [0, 1, 3, 0, 0], [0, 0, 1, -2, 0], [0, 0, 0, 1, 4], [0, 0, 0, 0, 1]];
        // P is unit upper triangular, so unimodular.
        let n = 5;
        let mut k = vec![vec![0i64; n]; n];
        for r in 0..n {
            for c in 0..n {
                let mut s = 0;
                for i in 0..n {
                    for l in 0..n {
                        s += p[i][r] * j(i, l) * p[l][c];
                    }
                }
                k[r][c] = s;
            }
        }
        let basis = symplectic_basis(&k).expect("reduces");
        assert_eq!(basis.a.len(), 2);
        for x in 0..2 {
            for y in 0..2 {
                assert_eq!(form(&k, &basis.a[x], &basis.b[y]), i64::from(x == y));
                assert_eq!(form(&k, &basis.a[x], &basis.a[y]), 0);
                assert_eq!(form(&k, &basis.b[x], &basis.b[y]), 0);
            }
        }
    }

    // The form 2 (e1 ^ e2) comes from a sublattice of index 2: reported, not reduced.
    #[test]
    fn index_two_is_refused() {
        let k = vec![vec![0, 2], vec![-2, 0]];
        assert!(symplectic_basis(&k).is_err());
    }
}
