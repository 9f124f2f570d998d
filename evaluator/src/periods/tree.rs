//! A spanning tree of the branch points made of straight segments that stay far from the
//! other branch points and never cross each other.
//!
//! Each candidate edge [a, b] is weighted by the smallest Bernstein-ellipse parameter of the
//! other branch points in the edge's own coordinate t (x = (a + b)/2 + (b - a)/2 t): the
//! larger it is, the faster quadrature along the edge converges (the choice of Molin and
//! Neurohr, Math. Comp. 2019). Kruskal's algorithm on descending weights, skipping edges
//! that cross a chosen one, keeps the lifts of different edges apart except at shared ends,
//! which is what the intersection count assumes. An edge through another branch point
//! (weight 1) is never used.

use super::quad::rho_of;
use num_complex::Complex64 as C64;

#[derive(Clone, Copy, Debug)]
pub struct Edge {
    pub a: usize,
    pub b: usize,
    /// Smallest ellipse parameter of the other branch points (infinite when there are none).
    pub rho: f64,
}

/// The coordinate of z on the edge's segment: -1 at a, 1 at b.
pub fn edge_coordinate(a: C64, b: C64, z: C64) -> C64 {
    (2.0 * z - a - b) / (b - a)
}

/// Another branch point in an edge's coordinate, with its offsets from both ends computed
/// from root differences: when it lies within a few ulps of the edge's length from an end,
/// u itself has lost all relative accuracy in u + 1 or u - 1, which the integrand needs.
#[derive(Clone, Copy, Debug)]
pub struct Offset {
    pub u: C64,
    /// u + 1 = 2 (z - a) / (b - a) and u - 1 = 2 (z - b) / (b - a).
    pub d_lo: C64,
    pub d_hi: C64,
}

impl Offset {
    pub fn new(a: C64, b: C64, z: C64) -> Offset {
        Offset { u: edge_coordinate(a, b, z), d_lo: 2.0 * (z - a) / (b - a), d_hi: 2.0 * (z - b) / (b - a) }
    }
    /// c - u for c = (lo + hi) / 2 with lo, hi dyadic in [-1, 1] (so lo + 1 and hi - 1
    /// are exact), taken from the nearer end.
    pub fn from_centre(&self, lo: f64, hi: f64) -> C64 {
        if self.d_lo.norm() <= self.d_hi.norm() {
            0.5 * ((lo + 1.0) + (hi + 1.0)) - self.d_lo
        } else {
            0.5 * ((lo - 1.0) + (hi - 1.0)) - self.d_hi
        }
    }
}

fn orient(p: C64, q: C64, r: C64) -> f64 {
    (q - p).re * (r - p).im - (q - p).im * (r - p).re
}

/// Whether the open segments pq and rs cross (shared endpoints do not count).
fn crosses(p: C64, q: C64, r: C64, s: C64) -> bool {
    let (d1, d2) = (orient(p, q, r), orient(p, q, s));
    let (d3, d4) = (orient(r, s, p), orient(r, s, q));
    d1 * d2 < 0.0 && d3 * d4 < 0.0
}

pub fn spanning_tree(points: &[C64]) -> Option<Vec<Edge>> {
    let n = points.len();
    let mut cands = vec![];
    for a in 0..n {
        for b in a + 1..n {
            let rho = (0..n)
                .filter(|&k| k != a && k != b)
                .map(|k| rho_of(edge_coordinate(points[a], points[b], points[k])))
                .fold(f64::INFINITY, f64::min);
            if rho > 1.0 + 1e-9 {
                cands.push(Edge { a, b, rho });
            }
        }
    }
    cands.sort_by(|x, y| y.rho.total_cmp(&x.rho));
    let mut comp: Vec<usize> = (0..n).collect();
    fn root(c: &mut [usize], mut i: usize) -> usize {
        while c[i] != i {
            c[i] = c[c[i]];
            i = c[i];
        }
        i
    }
    let mut tree: Vec<Edge> = vec![];
    for e in cands {
        if tree.len() + 1 == n {
            break;
        }
        let (ra, rb) = (root(&mut comp, e.a), root(&mut comp, e.b));
        if ra == rb {
            continue;
        }
        let shares = |f: &Edge| f.a == e.a || f.a == e.b || f.b == e.a || f.b == e.b;
        if tree.iter().any(|f| !shares(f) && crosses(points[e.a], points[e.b], points[f.a], points[f.b])) {
            continue;
        }
        comp[ra] = rb;
        tree.push(e);
    }
    (tree.len() + 1 == n || n == 0).then_some(tree)
}

#[cfg(test)]
mod tests {
    use super::*;

    // The corners of a square: the tree uses sides, never both diagonals, and never an
    // edge through the centre point (common practice, no source).
    #[test]
    fn square_with_centre() {
        let pts = [C64::new(0.0, 0.0), C64::new(1.0, 0.0), C64::new(1.0, 1.0), C64::new(0.0, 1.0), C64::new(0.5, 0.5)];
        let t = spanning_tree(&pts).expect("tree");
        assert_eq!(t.len(), 4);
        for (i, e) in t.iter().enumerate() {
            assert!(e.rho > 1.0);
            for f in &t[i + 1..] {
                let shares = f.a == e.a || f.a == e.b || f.b == e.a || f.b == e.b;
                assert!(shares || !crosses(pts[e.a], pts[e.b], pts[f.a], pts[f.b]));
            }
        }
    }

    // Collinear points: only neighbours can be joined.
    #[test]
    fn collinear_points_join_neighbours() {
        let pts: Vec<C64> = (0..5).map(|k| C64::new(k as f64, 0.0)).collect();
        let t = spanning_tree(&pts).expect("tree");
        assert!(t.iter().all(|e| e.a.abs_diff(e.b) == 1));
    }
}
