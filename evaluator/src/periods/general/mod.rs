//! Riemann matrices of general plane curves from the x-projection as a covering
//! (conventions file; the method follows Deconinck & van Hoeij, Physica D 152–153 (2001),
//! with keyhole loops about a base point instead of their path graph):
//!
//! 1. a projective change of coordinates with small integers puts the curve in general
//!    position (y^d has a constant coefficient, the line at infinity meets the curve in d
//!    distinct points), so x has degree d and is unramified over infinity;
//! 2. the critical values are the roots of the exact discriminant Res_y(G, G_y);
//! 3. the fibre over a base point is continued along one keyhole loop per critical value
//!    (`track`), giving the monodromy (transitive = irreducible; Riemann–Hurwitz genus)
//!    and the integrals of x^a y^b dx / G_y over every lifted loop (Gauss–Legendre on
//!    pieces graded toward the critical values; error estimated by a second rule);
//! 4. `homology` turns the lifted loops into cycles with intersection numbers, and the
//!    symplectic reduction of `symplectic` into a canonical basis;
//! 5. `adjoint` gives the holomorphic differentials; tau = A^-1 B as for y^m = f(x).

pub mod adjoint;
pub mod homology;
pub mod near;
pub mod plane;
pub mod track;

#[cfg(test)]
mod tests;

use super::superelliptic::{PeriodError, Periods};
use crate::algebra::bivar::{resultant_v, P2};
use crate::algebra::curve::CurveFacts;
use crate::algebra::roots::refined_roots;
use kelp_lang::number::to_f64;
use kelp_lang::poly::Poly;
use nalgebra::DMatrix;
use num_bigint::BigInt;
use num_complex::Complex64 as C64;
use num_rational::BigRational;
use num_traits::Zero;
use plane::Plane;

/// What the covering gave, besides the periods (for messages and tests).
#[derive(Clone, Debug)]
pub struct Covering {
    /// Old coordinates = M (new coordinates).
    pub change: [[i64; 3]; 3],
    pub sheets: usize,
    pub critical: Vec<C64>,
    pub monodromy: Vec<Vec<usize>>,
    pub riemann_hurwitz_genus: i64,
    pub steps: usize,
}

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// F(M (X, Y, Z)) for a homogeneous F.
fn substitute(f: &Poly, m: &[[i64; 3]; 3]) -> Poly {
    let row = |r: usize| {
        (0..3).fold(Poly::zero(), |acc, c| if m[r][c] == 0 { acc } else { acc.add(&Poly::var(c).scale(&q(m[r][c]))) })
    };
    let (x, y, z) = (row(0), row(1), row(2));
    let mut out = Poly::zero();
    for (e, c) in &f.terms {
        out = out.add(&x.pow(e[0]).mul(&y.pow(e[1])).mul(&z.pow(e[2])).scale(c));
    }
    out
}

/// G(1, y, 0) square-free of degree d: x is unramified over infinity and has degree d.
fn in_general_position(g: &Poly, d: u32) -> bool {
    let mut c = vec![BigRational::zero(); d as usize + 1];
    for (e, v) in &g.terms {
        if e[2] == 0 {
            c[e[1] as usize] += v;
        }
    }
    let p = crate::algebra::upoly::UPoly::new(c);
    p.degree() == Some(d as usize) && p.gcd(&p.derivative()).degree() == Some(0)
}

fn general_position(f: &Poly, d: u32) -> Option<([[i64; 3]; 3], Poly)> {
    let mut candidates = vec![[[1, 0, 0], [0, 1, 0], [0, 0, 1]]];
    for (a, b, c) in
        [(1, 0, 0), (0, 0, 1), (1, 0, 1), (0, 1, 1), (2, 0, 1), (1, 1, 2), (3, 1, 1), (-1, 2, 3), (2, -3, 5)]
    {
        candidates.push([[1, a, 0], [0, 1, 0], [b, c, 1]]);
        candidates.push([[1, 0, 0], [a, 1, 0], [b, c, 1]]);
    }
    candidates.into_iter().find_map(|m| {
        let g = substitute(f, &m);
        in_general_position(&g, d).then_some((m, g))
    })
}

/// Singular points of the affine chart, found numerically over the critical values. In
/// general position the vertical line through a point of multiplicity m meets the curve
/// there m times (or a few more where it is tangent to a branch), so y0 is a cluster of
/// fibre roots over a critical value x0 (itself a simple root of the square-free
/// discriminant, refined in double-double arithmetic): its centroid, refined as the simple
/// root of a y-derivative of G of the cluster's order, or by Newton's method in both
/// variables. Near a highly tangent singular point other points make G and its derivatives
/// small too, so the candidates are ranked by how well they vanish and, for each
/// multiplicity, as many are taken as the exact algebra reports (`wanted[m]`).
fn singular_points(
    g: &Plane,
    critical: &[C64],
    wanted: &std::collections::BTreeMap<u32, usize>,
    known: &[(C64, C64, u32)],
) -> Vec<(C64, C64, u32)> {
    let residual = |x: C64, y: C64, m: usize| -> f64 {
        (0..m)
            .flat_map(|o| (0..=o).map(move |b| (o - b, b)))
            .map(|(a, b)| {
                let (v, size) = g.partial_with_size(a, b, x, y);
                v.norm() / size.max(1e-300)
            })
            .fold(0.0, f64::max)
    };
    let mut found: Vec<(C64, C64, u32)> = vec![];
    for (&m, &count) in wanted.iter().rev() {
        let m_us = m as usize;
        let mut candidates: Vec<(f64, C64, C64)> = vec![];
        for &x0 in critical {
            crate::limits::checkpoint();
            let roots = plane::roots(&g.fibre(x0));
            for (k, &y) in roots.iter().enumerate() {
                let mut near: Vec<(f64, usize)> =
                    roots.iter().enumerate().filter(|&(j, _)| j != k).map(|(j, z)| ((z - y).norm(), j)).collect();
                near.sort_by(|a, b| a.0.total_cmp(&b.0));
                let mut points = vec![newton2(g, x0, y, m_us - 1)];
                for size in m_us..=(m_us + 2).min(g.d) {
                    if near.len() < size - 1 || near[size - 2].0 > 1e-2 * (1.0 + y.norm()) {
                        break;
                    }
                    let mut y0 = (y + near[..size - 1].iter().map(|&(_, j)| roots[j]).sum::<C64>()) / size as f64;
                    for _ in 0..20 {
                        let (f, fd) = (g.partial(0, size - 1, x0, y0), g.partial(0, size, x0, y0));
                        if fd.norm() == 0.0 {
                            break;
                        }
                        let step = f / fd;
                        y0 -= step;
                        if step.norm() < 1e-16 * (1.0 + y0.norm()) {
                            break;
                        }
                    }
                    points.push((x0, y0));
                }
                for (x1, y1) in points {
                    if (x1 - x0).norm() + (y1 - y).norm() < 1e-2 * (1.0 + x0.norm() + y.norm()) {
                        let r = residual(x1, y1, m_us);
                        if r.is_finite() {
                            candidates.push((r, x1, y1));
                        }
                    }
                }
            }
        }
        candidates.sort_by(|a, b| a.0.total_cmp(&b.0));
        let mut taken = 0;
        for (r, x, y) in candidates {
            if taken == count || r > 1e-9 {
                break;
            }
            let close = |a: C64, b: C64| (a - x).norm() + (b - y).norm() < 1e-5 * (1.0 + x.norm() + y.norm());
            if found.iter().chain(known).any(|&(a, b, _)| close(a, b)) {
                continue;
            }
            found.push((x, y, m));
            taken += 1;
        }
    }
    found
}

/// The point with projective coordinates `p` (old coordinates) in the chart Z = 1 of the
/// new ones, where (old) = change (new): Cramer's rule, exact until the final rounding.
fn in_chart(change: &[[i64; 3]; 3], p: &[BigRational; 3]) -> Option<(BigRational, BigRational)> {
    let m = |r: usize, c: usize| q(change[r][c]);
    let det3 = |col: usize, with: Option<&[BigRational; 3]>| -> BigRational {
        let e = |r: usize, c: usize| match with {
            Some(v) if c == col => v[r].clone(),
            _ => m(r, c),
        };
        e(0, 0) * (e(1, 1) * e(2, 2) - e(1, 2) * e(2, 1)) - e(0, 1) * (e(1, 0) * e(2, 2) - e(1, 2) * e(2, 0))
            + e(0, 2) * (e(1, 0) * e(2, 1) - e(1, 1) * e(2, 0))
    };
    let det = det3(0, None);
    if det.is_zero() {
        return None;
    }
    let n: Vec<BigRational> = (0..3).map(|c| det3(c, Some(p)) / &det).collect();
    if n[2].is_zero() {
        return None;
    }
    Some((&n[0] / &n[2], &n[1] / &n[2]))
}

/// Newton's method in (x, y) on d^o G / dx^o and d^o G / dy^o.
fn newton2(g: &Plane, x0: C64, y0: C64, o: usize) -> (C64, C64) {
    let (mut x, mut y) = (x0, y0);
    for _ in 0..40 {
        let (f1, f2) = (g.partial(o, 0, x, y), g.partial(0, o, x, y));
        let (f1x, f1y) = (g.partial(o + 1, 0, x, y), g.partial(o, 1, x, y));
        let (f2x, f2y) = (g.partial(1, o, x, y), g.partial(0, o + 1, x, y));
        let det = f1x * f2y - f1y * f2x;
        if det.norm() == 0.0 {
            break;
        }
        let dx = (f1 * f2y - f1y * f2) / det;
        let dy = (f1x * f2 - f1 * f2x) / det;
        x -= dx;
        y -= dy;
        if dx.norm() + dy.norm() < 1e-15 * (1.0 + x.norm() + y.norm()) {
            break;
        }
    }
    (x, y)
}

fn dist_to_segment(p: C64, a: C64, b: C64) -> f64 {
    let ab = b - a;
    let t = (((p - a) * ab.conj()).re / ab.norm_sqr()).clamp(0.0, 1.0);
    (p - (a + ab * t)).norm()
}

/// A base point whose rays to the critical values stay clear of the other critical values.
fn base_point(b: &[C64]) -> Result<C64, PeriodError> {
    let centre = b.iter().sum::<C64>() / b.len() as f64;
    let r = 1.0 + b.iter().map(|z| (z - centre).norm()).fold(0.0, f64::max);
    let score = |b0: C64| -> f64 {
        let mut s = b.iter().map(|z| (z - b0).norm()).fold(f64::INFINITY, f64::min);
        for (i, bi) in b.iter().enumerate() {
            for (j, bj) in b.iter().enumerate() {
                if i != j {
                    s = s.min(dist_to_segment(*bj, b0, *bi));
                }
            }
        }
        s
    };
    let best = (0..96)
        .map(|k| {
            let k = k as f64;
            centre + C64::from_polar(r * (0.11 + 0.9 * ((k * 0.618_034) % 1.0)), k * 2.399_963 + 0.3)
        })
        .map(|z| (score(z), z))
        .max_by(|a, c| a.0.total_cmp(&c.0))
        .expect("candidates");
    if !(best.0 > 1e-9 * r) {
        return Err(PeriodError::Accuracy("no base point keeps its paths clear of the critical values".into()));
    }
    Ok(best.1)
}

/// A piece of path: x(t) for t in [-1, 1], and dx/dt.
#[derive(Clone, Copy)]
enum Piece {
    Segment(C64, C64),
    /// Centre, radius, start and end angle.
    Arc(C64, f64, f64, f64),
}

impl Piece {
    fn at(&self, t: f64) -> (C64, C64) {
        match *self {
            Piece::Segment(a, b) => ((a + b) * 0.5 + (b - a) * 0.5 * t, (b - a) * 0.5),
            Piece::Arc(c, r, p0, p1) => {
                let phi = p0 + (p1 - p0) * (t + 1.0) / 2.0;
                let e = C64::from_polar(r, phi);
                (c + e, C64::new(0.0, 1.0) * e * ((p1 - p0) / 2.0))
            }
        }
    }
}

/// Rules compared on every piece: the larger gives the value, the difference the estimate.
const RULES: (usize, usize) = (16, 24);

struct Walk<'a> {
    g: &'a Plane,
    monomials: &'a [(u32, u32)],
    /// Column l: the holomorphic differential P_l in the monomials. The integrand is
    /// P_l / G_y itself, not each monomial apart: near a singular point the monomials'
    /// integrals are large and only their adjoint combination is not.
    basis: &'a DMatrix<C64>,
    /// Both rules' nodes in order along [-1, 1], with their weights and whether they belong
    /// to the larger rule (merged once, used on every piece).
    rule_nodes: &'a [(f64, f64, bool)],
    steps: usize,
    nodes: usize,
}

/// The nodes of the two rules of `RULES`, merged in order.
fn merged_rules() -> Vec<(f64, f64, bool)> {
    let weight = super::quad::Weight::symmetric(0, 1);
    let (lo, hi) = (super::quad::rule(weight, RULES.0), super::quad::rule(weight, RULES.1));
    let mut nodes: Vec<(f64, f64, bool)> = lo.nodes.iter().zip(&lo.weights).map(|(&t, &w)| (t, w, false)).collect();
    nodes.extend(hi.nodes.iter().zip(&hi.weights).map(|(&t, &w)| (t, w, true)));
    nodes.sort_by(|a, b| a.0.total_cmp(&b.0));
    nodes
}

impl Piece {
    fn halves(&self) -> (Piece, Piece) {
        match *self {
            Piece::Segment(a, b) => {
                let m = (a + b) * 0.5;
                (Piece::Segment(a, m), Piece::Segment(m, b))
            }
            Piece::Arc(c, r, p0, p1) => {
                let pm = 0.5 * (p0 + p1);
                (Piece::Arc(c, r, p0, pm), Piece::Arc(c, r, pm, p1))
            }
        }
    }
}

/// Pieces are halved until the two rules agree to this (relative to the piece's integral),
/// at most `MAX_HALVINGS` times, and only while halving still helps (near a singular point
/// rounding in the adjoint combination sets a floor no rule gets below).
const PIECE_TOL: f64 = 1e-13;
const MAX_HALVINGS: usize = 6;

impl Walk<'_> {
    /// Integrals over `pieces` of every differential for every sheet, continuing `ys`;
    /// returns the integrals [sheet][differential], the error estimate and the end roots.
    fn integrate(&mut self, pieces: &[Piece], ys: &[C64]) -> Result<(Vec<Vec<C64>>, f64, Vec<C64>), PeriodError> {
        let (d, g) = (ys.len(), self.basis.ncols());
        let mut total = vec![vec![C64::new(0.0, 0.0); g]; d];
        let mut err = 0.0f64;
        let mut cur = ys.to_vec();
        for piece in pieces {
            let (sums, e, end) = self.piece(piece, &cur, 0, f64::INFINITY)?;
            for s in 0..d {
                for l in 0..g {
                    total[s][l] += sums[s][l];
                }
            }
            err += e;
            cur = end;
        }
        Ok((total, err, cur))
    }

    /// One piece by both rules, halved while they disagree.
    fn piece(
        &mut self,
        piece: &Piece,
        ys: &[C64],
        depth: usize,
        parent: f64,
    ) -> Result<(Vec<Vec<C64>>, f64, Vec<C64>), PeriodError> {
        crate::limits::checkpoint();
        crate::limits::check().map_err(|m| PeriodError::Accuracy(m.into()))?;
        let (d, g) = (ys.len(), self.basis.ncols());
        let (mut x, _) = piece.at(-1.0);
        let mut cur = ys.to_vec();
        // The certified radii of `cur`, passed from one node's continuation to the next.
        let mut betas: Option<Vec<f64>> = None;
        let mut sums = [vec![vec![C64::new(0.0, 0.0); g]; d], vec![vec![C64::new(0.0, 0.0); g]; d]];
        let mut mono = vec![C64::new(0.0, 0.0); self.monomials.len()];
        for &(t, w, big) in self.rule_nodes {
            crate::limits::checkpoint();
            let (xn, dxdt) = piece.at(t);
            let (c, k) = track::continue_to(self.g, x, &cur, betas.take(), xn, &mut self.steps)
                .map_err(PeriodError::Accuracy)?;
            (cur, betas) = (c, Some(k));
            x = xn;
            self.nodes += 1;
            for (s, &y) in cur.iter().enumerate() {
                let (_, _, gy) = self.g.eval(x, y);
                let base = dxdt * w / gy;
                for (m, &(a, b)) in self.monomials.iter().enumerate() {
                    mono[m] = x.powi(a as i32) * y.powi(b as i32);
                }
                for l in 0..g {
                    let p: C64 = (0..mono.len()).map(|m| self.basis[(m, l)] * mono[m]).sum();
                    sums[big as usize][s][l] += base * p;
                }
            }
        }
        let (xe, _) = piece.at(1.0);
        cur = track::continue_to(self.g, x, &cur, betas, xe, &mut self.steps).map_err(PeriodError::Accuracy)?.0;
        let mut diff = 0.0f64;
        let mut size = 0.0f64;
        for s in 0..d {
            for l in 0..g {
                diff = diff.max((sums[1][s][l] - sums[0][s][l]).norm());
                size = size.max(sums[1][s][l].norm());
            }
        }
        // Halving a piece divides the rules' error by about 2^32 while it is quadrature
        // error; when the two halves together did not improve on a quarter of the parent's
        // difference, this is the rounding floor.
        let helps = diff < 0.25 * parent;
        if diff > PIECE_TOL * (1.0 + size) && depth < MAX_HALVINGS && helps {
            let (a, b) = piece.halves();
            let (s1, e1, mid) = self.piece(&a, ys, depth + 1, diff)?;
            let (s2, e2, end) = self.piece(&b, &mid, depth + 1, diff)?;
            let sum = (0..d).map(|s| (0..g).map(|l| s1[s][l] + s2[s][l]).collect()).collect();
            return Ok((sum, e1 + e2, end));
        }
        let [_, big] = sums;
        Ok((big, diff, cur))
    }
}

/// The sheets' order after one counterclockwise turn: sigma[s] = the sheet where the root
/// that started as sheet s ends.
fn permutation(start: &[C64], end: &[C64]) -> Result<Vec<usize>, PeriodError> {
    let sep = track::separations(start);
    let mut p = vec![usize::MAX; start.len()];
    for (s, e) in end.iter().enumerate() {
        let (k, dist) = start
            .iter()
            .enumerate()
            .map(|(k, z)| (k, (z - e).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .expect("a fibre");
        if dist > sep[k] / 4.0 || p.contains(&k) {
            return Err(PeriodError::Accuracy("a loop did not close up on the fibre it started from".into()));
        }
        p[s] = k;
    }
    Ok(p)
}

/// The differentials of the covering route: omega_l = sum over monomials of
/// basis[(m, l)] X^a Y^b dX / G_Y in the chart Z = 1 of the coordinates (X : Y : Z) with
/// (x : y : z) = change (X, Y, Z).
#[derive(Clone, Debug)]
pub struct PlaneForms {
    pub change: [[i64; 3]; 3],
    pub plane: Plane,
    pub monomials: Vec<(u32, u32)>,
    pub basis: DMatrix<C64>,
}

pub struct General {
    pub periods: Periods,
    pub covering: Covering,
}

/// Periods of an irreducible plane curve (affine or projective equation) with the exact
/// facts of the curve algebra.
pub fn periods(poly: &Poly, projective: bool, facts: &CurveFacts, genus: i64) -> Result<General, PeriodError> {
    let f = crate::algebra::curve::homogeneous(poly, projective);
    let d = f.degree().unwrap_or(0);
    if genus < 1 {
        return Err(PeriodError::NoMatrix(format!("the curve has genus {genus}")));
    }
    let (change, g) = general_position(&f, d).ok_or_else(|| {
        PeriodError::Unsupported("no small change of coordinates puts the curve in general position".into())
    })?;
    let chart = P2::chart(&g, 2);
    let plane = Plane::from_terms(chart.terms.iter().map(|(&m, c)| (m, to_f64(c))), d as usize);
    let disc = resultant_v(&chart, &chart.deriv(1));
    if disc.is_zero() {
        return Err(PeriodError::NoMatrix("the equation has a repeated factor".into()));
    }
    let critical: Vec<C64> = refined_roots(&disc.squarefree()).into_iter().map(|(z, _)| z).collect();
    // How many singular points of each multiplicity the exact algebra reports.
    let mut wanted = std::collections::BTreeMap::new();
    for p in &facts.rational {
        if let Ok(l) = &p.local {
            *wanted.entry(l.multiplicity).or_insert(0) += 1;
        }
    }
    for p in &facts.irrational {
        if let Some(Ok(l)) = &p.local {
            *wanted.entry(l.multiplicity).or_insert(0) += p.count;
        }
    }
    // Rational singular points are known exactly: their coordinates in the chart are
    // exact, and only the irrational ones are located numerically (a point of high
    // multiplicity found from a cluster of fibre roots is off by about eps^(1/m)).
    let mut singular: Vec<(C64, C64, u32)> = vec![];
    let mut exact = vec![];
    for p in &facts.rational {
        if let (Ok(l), Some((x, y))) = (&p.local, in_chart(&change, &p.coords)) {
            singular.push((C64::new(to_f64(&x), 0.0), C64::new(to_f64(&y), 0.0), l.multiplicity));
            exact.push(Some(adjoint::ExactPoint::new(&chart, &x, &y)));
            if let Some(k) = wanted.get_mut(&l.multiplicity) {
                *k -= 1;
            }
        }
    }
    wanted.retain(|_, k| *k > 0);
    let known = singular.clone();
    singular.extend(singular_points(&plane, &critical, &wanted, &known));
    exact.resize(singular.len(), None);
    if singular.len() != facts.singular_count() {
        return Err(PeriodError::Accuracy(format!(
            "{} singular points found numerically, the exact algebra has {}",
            singular.len(),
            facts.singular_count()
        )));
    }
    let mut numeric_delta = 0u64;
    let diffs = adjoint::holomorphic(&plane, &singular, &exact, None, genus as usize, &mut numeric_delta);
    let arithmetic = ((d - 1) * (d - 2) / 2) as i64;
    if arithmetic - numeric_delta as i64 != genus {
        return Err(PeriodError::Accuracy(format!(
            "the singular points resolved numerically ({}) give genus {}, the exact algebra {genus}",
            singular.len(),
            arithmetic - numeric_delta as i64
        )));
    }
    let diffs = diffs.map_err(PeriodError::Accuracy)?;
    // A posteriori check of the differentials: the same adjoint conditions again with every
    // blow-up in sheared coordinates (other tangent polynomials, other roots, other
    // rounding), integrated along the same loops. The two Riemann matrices must agree; twice
    // their difference bounds the stated error from below. A smooth curve's differentials
    // are exact.
    let second = if singular.is_empty() {
        None
    } else {
        adjoint::holomorphic(&plane, &singular, &exact, Some(C64::new(-0.377, 0.529)), genus as usize, &mut 0)
            .ok()
            .filter(|d| d.basis.ncols() == genus as usize)
    };
    let both = match &second {
        Some(s) => {
            let mut m = DMatrix::<C64>::zeros(diffs.basis.nrows(), 2 * genus as usize);
            m.columns_mut(0, genus as usize).copy_from(&diffs.basis);
            m.columns_mut(genus as usize, genus as usize).copy_from(&s.basis);
            m
        }
        None => diffs.basis.clone(),
    };

    let b0 = base_point(&critical)?;
    let fibre0 = plane::roots(&plane.fibre(b0));
    let n = critical.len();
    let rule_nodes = merged_rules();
    let mut walk =
        Walk { g: &plane, monomials: &diffs.monomials, basis: &both, rule_nodes: &rule_nodes, steps: 0, nodes: 0 };
    let mut sigma = vec![];
    // loop_periods[i][s][monomial], and each loop's error estimate.
    let mut loop_periods = vec![];
    let mut loop_errors = vec![];
    for (i, &bi) in critical.iter().enumerate() {
        let mut r = (bi - b0).norm() / 2.0;
        for (j, &bj) in critical.iter().enumerate() {
            if j != i {
                r = r.min((bi - bj).norm() / 2.0).min(dist_to_segment(bi, b0, bj));
            }
        }
        // The widest keyhole that still keeps the loops apart: near a singular point the
        // adjoint differential's rounding is amplified about like r^-(2 delta / m).
        let r = 0.8 * r;
        let u = (bi - b0) / (bi - b0).norm();
        let p = bi - u * r;
        // The segment in pieces no longer than half their distance to the critical values.
        let mut pieces = vec![];
        let mut a = b0;
        while (p - a).norm() > 1e-15 * (1.0 + p.norm()) {
            let near = critical.iter().map(|z| (z - a).norm()).fold(f64::INFINITY, f64::min);
            let len = (0.5 * near).min((p - a).norm());
            let next = if len >= (p - a).norm() { p } else { a + u * len };
            pieces.push(Piece::Segment(a, next));
            a = next;
        }
        let (seg, seg_err, at_p) = walk.integrate(&pieces, &fibre0)?;
        let phi0 = (p - bi).arg();
        let arcs: Vec<Piece> = (0..16)
            .map(|k| {
                let s = std::f64::consts::TAU / 16.0;
                Piece::Arc(bi, r, phi0 + s * k as f64, phi0 + s * (k + 1) as f64)
            })
            .collect();
        let (circ, circ_err, back) = walk.integrate(&arcs, &at_p)?;
        let perm = permutation(&at_p, &back)?;
        let per: Vec<Vec<C64>> = (0..plane.d)
            .map(|s| (0..both.ncols()).map(|l| seg[s][l] + circ[s][l] - seg[perm[s]][l]).collect())
            .collect();
        loop_periods.push(per);
        loop_errors.push(2.0 * seg_err + circ_err);
        sigma.push(perm);
    }
    let dd = plane.d as i64;
    let rh = 1 - dd + sigma.iter().map(|p| dd - homology::cycle_count(p) as i64).sum::<i64>() / 2;
    // Infinity is unramified, so the loops in counterclockwise order of their rays compose
    // to the identity: a check of the whole continuation.
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| (critical[a] - b0).arg().total_cmp(&(critical[b] - b0).arg()));
    let mut rank = vec![0; n];
    for (k, &i) in order.iter().enumerate() {
        rank[i] = k;
    }
    let composed =
        order.iter().fold((0..plane.d).collect::<Vec<_>>(), |acc, &i| acc.iter().map(|&s| sigma[i][s]).collect());
    if composed.iter().enumerate().any(|(s, &t)| s != t) {
        return Err(PeriodError::Accuracy("the loops do not compose to the identity around infinity".into()));
    }
    let cycles = homology::fundamental_cycles(plane.d, &sigma)
        .ok_or_else(|| PeriodError::NoMatrix("the curve is reducible: its monodromy group is not transitive".into()))?;
    if rh != genus {
        return Err(PeriodError::Accuracy(format!(
            "Riemann–Hurwitz from the monodromy gives genus {rh}, the exact algebra {genus}"
        )));
    }
    let k: Vec<Vec<i64>> =
        cycles.iter().map(|a| cycles.iter().map(|b| homology::intersection(a, b, &sigma, &rank)).collect()).collect();
    for i in 0..k.len() {
        for j in 0..i {
            if k[i][j] != -homology::intersection(&cycles[j], &cycles[i], &sigma, &rank) {
                return Err(PeriodError::Accuracy("the intersection numbers are not skew-symmetric".into()));
            }
        }
    }
    let basis = super::symplectic::symplectic_basis(&k).map_err(PeriodError::Accuracy)?;
    if basis.a.len() as i64 != genus {
        return Err(PeriodError::Accuracy(format!(
            "the cycles give {} symplectic pairs for genus {genus}",
            basis.a.len()
        )));
    }
    // Periods of the differentials over each fundamental cycle.
    let gg = genus as usize;
    let cycle_periods: Vec<(Vec<C64>, f64)> = cycles
        .iter()
        .map(|c| {
            let mut v = vec![C64::new(0.0, 0.0); both.ncols()];
            let mut e = 0.0;
            for st in c {
                let sign = if st.forward { 1.0 } else { -1.0 };
                for l in 0..both.ncols() {
                    v[l] += loop_periods[st.lp][st.sheet][l] * sign;
                }
                e += loop_errors[st.lp];
            }
            (v, e)
        })
        .collect();
    // Rows `from..from + g` of the cycle periods: the first basis, or the second.
    let assemble = |vecs: &[Vec<i64>], from: usize| -> (DMatrix<C64>, f64) {
        let mut out = DMatrix::<C64>::zeros(gg, gg);
        let mut err = 0.0f64;
        for (j, coeffs) in vecs.iter().enumerate() {
            let mut e = 0.0;
            for (c, &w) in coeffs.iter().enumerate() {
                if w == 0 {
                    continue;
                }
                e += (w as f64).abs() * cycle_periods[c].1;
                for l in 0..gg {
                    out[(l, j)] += cycle_periods[c].0[from + l] * w as f64;
                }
            }
            err = err.max(e);
        }
        (out, err)
    };
    let (a, a_error) = assemble(&basis.a, 0);
    let (b, b_error) = assemble(&basis.b, 0);
    let validation = match second {
        None => 0.0,
        Some(_) => {
            let (a2, b2) = (assemble(&basis.a, gg).0, assemble(&basis.b, gg).0);
            match (a.clone().try_inverse(), a2.try_inverse()) {
                // Twice the difference: the two errors are of one size and need not point apart
                // (with the tacnode tangents unrefined, the difference alone fell 3% short).
                (Some(ai), Some(a2i)) => 2.0 * (ai * &b - a2i * b2).iter().map(|v| v.norm()).fold(0.0, f64::max),
                _ => f64::INFINITY,
            }
        }
    };
    let covering = Covering {
        change,
        sheets: plane.d,
        critical: critical.clone(),
        monodromy: sigma,
        riemann_hurwitz_genus: rh,
        steps: walk.steps,
    };
    let periods = Periods {
        genus: genus as usize,
        differentials: vec![],
        forms: diffs.names.clone(),
        plane: Some(std::sync::Arc::new(PlaneForms {
            change,
            plane: plane.clone(),
            monomials: diffs.monomials.clone(),
            basis: diffs.basis.clone(),
        })),
        a,
        b,
        a_error,
        b_error,
        validation,
        branch_points: critical,
        edges: n,
        nodes: walk.nodes,
        largest_rule: RULES.1,
        tree: vec![],
        root_radii: vec![],
        intersection: basis.intersections(&k),
    };
    Ok(General { periods, covering })
}
