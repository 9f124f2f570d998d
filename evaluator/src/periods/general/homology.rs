//! Homology of the compact curve from the monodromy of its x-projection.
//!
//! The base point b0 and one keyhole loop per critical value b_i (out along a ray on its
//! right side, counterclockwise around b_i, back on its left side) make the punctured
//! x-plane retract onto a bouquet of circles; its d-sheeted cover is the graph G whose
//! vertices are the sheets over b0 and whose edges are the lifted loops (i, s): s ->
//! sigma_i(s). H1 of the curve is the cycle space of G modulo the boundaries of the
//! punctures (the orbit walks of each sigma_i, and the loops around infinity), and those
//! boundaries are exactly the radical of the intersection form: a symplectic reduction of
//! the fundamental cycles of G drops them on its own.
//!
//! Intersection numbers: lifted loops meet only over b0, where a cycle passes a sheet
//! coming in along one half-edge and leaving along another. Pushing the second cycle onto
//! nested, narrower keyholes makes every meeting a crossing of two paths through the
//! point, counted +1 when the second crosses the first from its right to its left
//! (tangents of first and second positively oriented), 0 unless their half-edges
//! interleave around b0.

/// One traversal of the lifted loop (i, s), forwards (s -> sigma_i(s)) or backwards.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Step {
    pub lp: usize,
    pub sheet: usize,
    pub forward: bool,
}

impl Step {
    fn from_sheet(&self, sigma: &[Vec<usize>]) -> usize {
        if self.forward {
            self.sheet
        } else {
            sigma[self.lp][self.sheet]
        }
    }
    fn to_sheet(&self, sigma: &[Vec<usize>]) -> usize {
        if self.forward {
            sigma[self.lp][self.sheet]
        } else {
            self.sheet
        }
    }
    /// (loop, is the `in` half-edge) of the start and of the end.
    fn start_half(&self) -> (usize, bool) {
        (self.lp, !self.forward)
    }
    fn end_half(&self) -> (usize, bool) {
        (self.lp, self.forward)
    }
    fn reversed(&self) -> Step {
        Step { forward: !self.forward, ..*self }
    }
}

/// The fundamental cycles of G for a BFS spanning tree from sheet 0, each a closed walk
/// without backtracking; `None` when G is not connected (the monodromy is not transitive).
pub fn fundamental_cycles(d: usize, sigma: &[Vec<usize>]) -> Option<Vec<Vec<Step>>> {
    // path[s]: the tree steps from sheet 0 to s.
    let mut path: Vec<Option<Vec<Step>>> = vec![None; d];
    path[0] = Some(vec![]);
    let mut tree = std::collections::HashSet::new();
    let mut queue = std::collections::VecDeque::from([0usize]);
    while let Some(u) = queue.pop_front() {
        for (i, sig) in sigma.iter().enumerate() {
            for s in 0..d {
                let (a, b) = (s, sig[s]);
                let (step, other) = if a == u && path[b].is_none() {
                    (Step { lp: i, sheet: s, forward: true }, b)
                } else if b == u && path[a].is_none() {
                    (Step { lp: i, sheet: s, forward: false }, a)
                } else {
                    continue;
                };
                let mut p = path[u].clone().expect("visited");
                p.push(step);
                path[other] = Some(p);
                tree.insert((i, s));
                queue.push_back(other);
            }
        }
    }
    if path.iter().any(Option::is_none) {
        return None;
    }
    let mut cycles = vec![];
    for (i, sig) in sigma.iter().enumerate() {
        for s in 0..d {
            if tree.contains(&(i, s)) {
                continue;
            }
            let (pu, pv) = (path[s].as_ref().unwrap(), path[sig[s]].as_ref().unwrap());
            let common = pu.iter().zip(pv).take_while(|(a, b)| a == b).count();
            let mut c: Vec<Step> = pu[common..].to_vec();
            c.push(Step { lp: i, sheet: s, forward: true });
            c.extend(pv[common..].iter().rev().map(Step::reversed));
            cycles.push(c);
        }
    }
    Some(cycles)
}

/// Passes of a closed walk through the base fibre: (sheet, arriving half-edge, leaving half-edge).
fn passes(c: &[Step], sigma: &[Vec<usize>]) -> Vec<(usize, (usize, bool), (usize, bool))> {
    (0..c.len())
        .map(|k| {
            let (cur, next) = (c[k], c[(k + 1) % c.len()]);
            debug_assert_eq!(cur.to_sheet(sigma), next.from_sheet(sigma));
            (cur.to_sheet(sigma), cur.end_half(), next.start_half())
        })
        .collect()
}

/// Position of a half-edge on a small circle about b0: loops in counterclockwise order of
/// their rays, and within one: wide out, narrow out, narrow in, wide in.
fn position(rank: &[usize], (lp, is_in): (usize, bool), narrow: bool) -> i64 {
    let sub = match (is_in, narrow) {
        (false, false) => 0,
        (false, true) => 1,
        (true, true) => 2,
        (true, false) => 3,
    };
    4 * rank[lp] as i64 + sub
}

/// <c, c'> with c on the wide keyholes and c' on the narrow ones.
pub fn intersection(c: &[Step], c2: &[Step], sigma: &[Vec<usize>], rank: &[usize]) -> i64 {
    let m = 4 * rank.len() as i64;
    let mut total = 0;
    for (s, a_in, a_out) in passes(c, sigma) {
        let (ai, ao) = (position(rank, a_in, false), position(rank, a_out, false));
        let left = |x: i64| (x - ao).rem_euclid(m) < (ai - ao).rem_euclid(m);
        for (s2, b_in, b_out) in passes(c2, sigma) {
            if s2 != s {
                continue;
            }
            let (bi, bo) = (position(rank, b_in, true), position(rank, b_out, true));
            total += match (left(bo), left(bi)) {
                (true, false) => 1,
                (false, true) => -1,
                _ => 0,
            };
        }
    }
    total
}

/// Number of cycles of a permutation.
pub fn cycle_count(p: &[usize]) -> usize {
    let mut seen = vec![false; p.len()];
    let mut n = 0;
    for s in 0..p.len() {
        if !seen[s] {
            n += 1;
            let mut t = s;
            while !seen[t] {
                seen[t] = true;
                t = p[t];
            }
        }
    }
    n
}

#[cfg(test)]
mod tests {
    use super::*;

    /// y^2 = (x - 1)(x - 2)(x - 3)(x - 4) seen as 2 sheets with four simple branch points
    /// (a torus): the intersection form on the cycle space has rank 2 and is unimodular
    /// there (common practice, no source: genus 1 by Riemann–Hurwitz).
    #[test]
    fn four_transpositions_make_a_torus() {
        let sigma = vec![vec![1, 0]; 4];
        let rank = vec![0, 1, 2, 3];
        let cycles = fundamental_cycles(2, &sigma).unwrap();
        assert_eq!(cycles.len(), 4 * 2 - 2 + 1);
        let k: Vec<Vec<i64>> =
            cycles.iter().map(|a| cycles.iter().map(|b| intersection(a, b, &sigma, &rank)).collect()).collect();
        for i in 0..k.len() {
            for j in 0..k.len() {
                assert_eq!(k[i][j], -k[j][i], "skew at {i},{j}: {k:?}");
            }
        }
        let basis = crate::periods::symplectic::symplectic_basis(&k).unwrap();
        assert_eq!(basis.a.len(), 1, "{k:?}");
    }
}
