//! Adjoint conditions at a singular point and its infinitely near points, numerically.
//!
//! P dx / G_y is holomorphic exactly when P passes through every point q infinitely near
//! to (or equal to) a singular point with multiplicity at least m_q - 1, m_q the
//! multiplicity of the curve's strict transform at q (classical; e.g. Brieskorn & Knörrer,
//! *Plane Algebraic Curves*, on adjoint curves). Conditions are imposed on the virtual
//! transform: at p, P's terms of order < m_p - 1 vanish; then P(u, u (t + w)) / u^(m_p - 1)
//! must meet the same condition at the point w = 0 above each tangent direction t, with the
//! curve's strict transform G(u, u (t + w)) / u^(m_p) there, and so on until the strict
//! transform is smooth. Each step is a linear condition on P's coefficients, so they are
//! collected as rows of one matrix. The sum of m_q (m_q - 1) / 2 is the point's delta
//! invariant, which must match the exact algebra's.

use num_complex::Complex64 as C64;

const ZERO: C64 = C64 { re: 0.0, im: 0.0 };

/// A polynomial in (u, v) whose coefficients are vectors of length `l` (l = 1 for the
/// curve; for P, the coefficient of each monomial of P in that term).
#[derive(Clone, Debug)]
pub struct LocalPoly {
    pub l: usize,
    /// c[i][j]: coefficient of u^i v^j.
    pub c: Vec<Vec<Vec<C64>>>,
}

fn binomial(n: usize, k: usize) -> f64 {
    (0..k).map(|i| (n - i) as f64 / (i + 1) as f64).product()
}

impl LocalPoly {
    pub fn zero(l: usize, n: usize) -> LocalPoly {
        LocalPoly { l, c: vec![vec![vec![ZERO; l]; n + 1]; n + 1] }
    }
    fn n(&self) -> usize {
        self.c.len() - 1
    }
    fn size(&self) -> f64 {
        self.c.iter().flatten().flatten().map(|v| v.norm()).fold(0.0, f64::max)
    }
    /// Lowest total degree with a coefficient above `tol` times the largest one.
    fn order(&self, tol: f64) -> usize {
        let top = self.size();
        (0..=2 * self.n())
            .find(|&s| (0..=s).any(|i| self.get(i, s - i).iter().any(|v| v.norm() > tol * top)))
            .unwrap_or(usize::MAX)
    }
    fn get(&self, i: usize, j: usize) -> Vec<C64> {
        self.c.get(i).and_then(|r| r.get(j)).cloned().unwrap_or_else(|| vec![ZERO; self.l])
    }
    /// (u, v) -> (u + s v, v): a shear that makes v = 0 ... a non-tangent direction.
    fn shear(&self, s: C64) -> LocalPoly {
        let n = self.n();
        let mut out = LocalPoly::zero(self.l, n);
        for i in 0..=n {
            for j in 0..=n - i.min(n) {
                if j >= self.c[i].len() {
                    continue;
                }
                let v = &self.c[i][j];
                if v.iter().all(|x| *x == ZERO) {
                    continue;
                }
                // (u + s v)^i v^j = sum_k C(i, k) u^(i-k) s^k v^(k+j)
                for k in 0..=i {
                    let f = s.powi(k as i32) * binomial(i, k);
                    let (a, b) = (i - k, k + j);
                    if b > n {
                        continue;
                    }
                    for e in 0..self.l {
                        out.c[a][b][e] += v[e] * f;
                    }
                }
            }
        }
        out
    }
    /// P(u, u (t + w)) / u^e, terms of lower order in u dropped (for the curve they are
    /// zero; for P they are the ones the conditions set to zero).
    fn blow_up(&self, t: C64, e: usize) -> LocalPoly {
        let n = self.n();
        let mut out = LocalPoly::zero(self.l, 2 * n);
        for i in 0..=n {
            for j in 0..=n {
                let v = &self.c[i][j];
                if v.iter().all(|x| *x == ZERO) || i + j < e {
                    continue;
                }
                // u^(i+j) (t + w)^j
                for l in 0..=j {
                    let f = t.powi((j - l) as i32) * binomial(j, l);
                    let a = i + j - e;
                    for k in 0..self.l {
                        out.c[a][l][k] += v[k] * f;
                    }
                }
            }
        }
        // Trim to the degree actually used.
        let used = (0..out.c.len())
            .flat_map(|i| (0..out.c.len()).map(move |j| (i, j)))
            .filter(|&(i, j)| out.c[i][j].iter().any(|x| *x != ZERO))
            .map(|(i, j)| i + j)
            .max()
            .unwrap_or(0);
        let mut t = LocalPoly::zero(self.l, used);
        for i in 0..=used {
            for j in 0..=used - i {
                t.c[i][j] = out.c[i][j].clone();
            }
        }
        t
    }
}

/// Rows of conditions (each a vector over P's monomials) and the delta invariant found.
/// `shear`: blow up in coordinates sheared by (u, v) -> (u + s v, v) at every level, for a
/// second, independent computation of the same conditions.
pub fn conditions(
    curve: &LocalPoly,
    p: &LocalPoly,
    rows: &mut Vec<Vec<C64>>,
    depth: usize,
    shear: Option<C64>,
) -> Result<u64, String> {
    const TOL: f64 = 1e-8;
    let m = curve.order(TOL);
    if m <= 1 || m == usize::MAX {
        return Ok(0);
    }
    if depth > 12 {
        return Err("more than 12 blow-ups at one point".into());
    }
    for s in 0..m - 1 {
        for i in 0..=s {
            let row = p.get(i, s - i);
            if row.iter().any(|x| *x != ZERO) {
                rows.push(row);
            }
        }
    }
    let mut delta = (m * (m - 1) / 2) as u64;
    // Make v^m appear in the lowest form, so every tangent is v = t u.
    let lead = |c: &LocalPoly| c.get(0, m)[0].norm();
    let (curve, p) = match shear {
        Some(s) => (curve.shear(s), p.shear(s)),
        None => (curve.clone(), p.clone()),
    };
    let (curve, p) = if lead(&curve) > 1e-6 * curve.size() {
        (curve, p)
    } else {
        let s = C64::new(0.618, 0.211);
        (curve.shear(s), p.shear(s))
    };
    let h: Vec<C64> = (0..=m).map(|j| curve.get(m - j, j)[0]).collect();
    let roots = super::plane::roots(&h);
    // Clusters of equal tangents, represented by their centroid (well conditioned). A
    // k-fold root comes out of double arithmetic spread over about eps^(1/k), so the
    // radius that joins a cluster grows with the multiplicity m (a wrong join shows up as
    // a delta invariant that disagrees with the exact algebra: an error, not a wrong tau).
    let radius = 1e-10f64.powf(1.0 / m as f64).max(1e-4);
    let mut clusters: Vec<(C64, usize)> = vec![];
    for r in roots {
        match clusters.iter_mut().find(|(c, k)| (*c / *k as f64 - r).norm() < radius * (1.0 + r.norm())) {
            Some((c, k)) => {
                *c += r;
                *k += 1;
            }
            None => clusters.push((r, 1)),
        }
    }
    for (sum, k) in clusters {
        if k < 2 {
            continue; // a simple tangent: the strict transform is smooth there
        }
        let t = refine_multiple(&h, sum / k as f64, k);
        let c2 = curve.blow_up(t, m);
        let p2 = p.blow_up(t, m - 1);
        delta += conditions(&c2, &p2, rows, depth + 1, shear)?;
    }
    Ok(delta)
}

/// A k-fold root of h near t: the simple root of h^(k-1) by Newton's method. The roots of a
/// k-fold cluster converge only linearly and stop about eps^(1/k) off, not symmetrically,
/// so their centroid can be off by far more than eps (observed: 1e-10 at a tacnode, which
/// moved the adjoint conditions and tau by as much).
fn refine_multiple(h: &[C64], t0: C64, k: usize) -> C64 {
    let mut c = h.to_vec();
    for _ in 0..k - 1 {
        c = (1..c.len()).map(|j| c[j] * j as f64).collect();
    }
    let eval = |c: &[C64], t: C64| c.iter().rev().fold(ZERO, |acc, v| acc * t + v);
    let dc: Vec<C64> = (1..c.len()).map(|j| c[j] * j as f64).collect();
    let mut t = t0;
    for _ in 0..30 {
        let d = eval(&dc, t);
        if d.norm() == 0.0 {
            break;
        }
        let step = eval(&c, t) / d;
        t -= step;
        if step.norm() <= 1e-16 * (1.0 + t.norm()) {
            break;
        }
    }
    // A step that left the cluster (a wrong join) keeps the centroid.
    if (t - t0).norm() < 1e-3 * (1.0 + t0.norm()) {
        t
    } else {
        t0
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn local(terms: &[((usize, usize), f64)], n: usize) -> LocalPoly {
        let mut c = LocalPoly::zero(1, n);
        for &((i, j), v) in terms {
            c.c[i][j][0] = C64::new(v, 0.0);
        }
        c
    }

    /// Delta invariants of classical germs (common practice, no source: delta = sum of
    /// m (m - 1) / 2 over the infinitely near points): node 1, cusp 1, tacnode y^2 = x^4
    /// 2, A5 y^2 = x^6 3, ordinary triple point 3, E8 y^3 = x^5 4, (y - x^2)^2 = x^5 2.
    #[test]
    fn delta_of_classical_germs() {
        let p = LocalPoly::zero(1, 6);
        let cases: Vec<(LocalPoly, u64, &str)> = vec![
            (local(&[((0, 2), 1.0), ((2, 0), -1.0)], 6), 1, "node"),
            (local(&[((0, 2), 1.0), ((3, 0), -1.0)], 6), 1, "cusp"),
            (local(&[((0, 2), 1.0), ((4, 0), -1.0)], 6), 2, "tacnode"),
            (local(&[((0, 2), 1.0), ((6, 0), -1.0)], 6), 3, "A5"),
            (local(&[((0, 3), 1.0), ((3, 0), -1.0)], 6), 3, "D4"),
            (local(&[((0, 3), 1.0), ((5, 0), -1.0)], 6), 4, "E8"),
            (local(&[((0, 2), 1.0), ((2, 1), -2.0), ((4, 0), 1.0), ((5, 0), -1.0)], 6), 2, "(y - x^2)^2 = x^5"),
            // The tacnode turned: (x + 2y)^2 = y^4 has its double tangent off the axes.
            (local(&[((2, 0), 1.0), ((1, 1), 4.0), ((0, 2), 4.0), ((0, 4), -1.0)], 6), 2, "turned tacnode"),
            (local(&[((0, 7), 1.0), ((2, 0), -1.0)], 7), 3, "A6 y^7 = x^2"),
            (local(&[((0, 7), 1.0), ((4, 0), -1.0)], 7), 9, "y^7 = x^4"),
            (local(&[((7, 0), 1.0), ((0, 4), -1.0)], 7), 9, "x^7 = y^4"),
            (local(&[((7, 0), 1.0), ((0, 2), -1.0)], 7), 3, "x^7 = y^2"),
        ];
        for (curve, want, name) in cases {
            let mut rows = vec![];
            assert_eq!(conditions(&curve, &p, &mut rows, 0, None).unwrap(), want, "{name}");
            let mut rows = vec![];
            assert_eq!(conditions(&curve, &p, &mut rows, 0, Some(C64::new(-0.377, 0.529))).unwrap(), want, "{name}");
        }
    }
}
