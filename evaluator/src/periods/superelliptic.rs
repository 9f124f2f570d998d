//! Periods and a Riemann matrix of y^m = f(x), f square-free of degree n.
//!
//! The method of Molin and Neurohr (*Computing period matrices and the Abel–Jacobi map of
//! superelliptic curves*, Math. Comp. 2019), rebuilt here:
//! - branch points: the roots of f, with a-posteriori inclusion radii;
//! - cycles: for each edge [a, b] of a spanning tree of the branch points and each sheet
//!   s = 0..m-2, go from a to b on the branch zeta^s y_e and come back on zeta^(s+1) y_e,
//!   where y_e is one continuous branch of y on the open segment; (n-1)(m-1) cycles that
//!   generate homology;
//! - intersections: near a finite branch point y is a local coordinate, and each lift of an
//!   edge leaves it along a ray of angle arg(zeta^s L) in the y-plane (L the leading
//!   coefficient of y_e there). Pushing one cycle off to its left and counting signed
//!   crossings with the other at the shared branch points gives the intersection number;
//! - periods: integral of x^i dx / y^j along each edge by a Gauss–Jacobi rule for the weight
//!   (1 - t^2)^(-j/m), sized by its Bernstein-ellipse error bound;
//! - a symplectic basis by integer symplectic reduction, then tau = A^-1 B.

use super::quad;
use super::symplectic::symplectic_basis;
use super::tree::{spanning_tree, Offset};
use crate::algebra::roots::refined_roots;
use crate::algebra::upoly::UPoly;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

/// A holomorphic differential x^power dx / y^j.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Differential {
    pub power: u32,
    pub j: u32,
}

impl Differential {
    pub fn show(&self) -> String {
        let x = match self.power {
            0 => String::new(),
            1 => "x ".into(),
            p => format!("x^{p} "),
        };
        let y = if self.j == 1 { "y".to_string() } else { format!("y^{}", self.j) };
        format!("{x}dx/{y}")
    }
}

/// Periods of the curve in a symplectic basis, with what went into them.
#[derive(Clone, Debug)]
pub struct Periods {
    pub genus: usize,
    /// The differentials y^m = f(x) uses (empty for general plane curves, see `forms`).
    pub differentials: Vec<Differential>,
    /// How each differential is written, for messages.
    pub forms: Vec<String>,
    /// For a general plane curve: the chart and the differentials as polynomials, so they
    /// can be expanded at a point (Krichever's construction).
    pub plane: Option<std::sync::Arc<super::general::PlaneForms>>,
    /// A[l][k] = integral of differential l over a_k; B likewise over b_k.
    pub a: DMatrix<C64>,
    pub b: DMatrix<C64>,
    /// Bounds on the entries' errors.
    pub a_error: f64,
    pub b_error: f64,
    /// A posteriori: the largest entry of the difference between A^-1 B and the same from an
    /// independent computation of the differentials (0 when there is none); the stated
    /// error of tau is at least this.
    pub validation: f64,
    pub branch_points: Vec<C64>,
    pub edges: usize,
    /// Quadrature nodes used, summed over edges and exponents j.
    pub nodes: usize,
    pub largest_rule: usize,
    /// y^m = f(x) only: the spanning tree's edges with their integrals, from which the
    /// Abel–Jacobi map reaches every branch point (`periods::abel`).
    pub tree: Vec<EdgeData>,
    /// y^m = f(x) only: the roots' inclusion radii, beside `branch_points`.
    pub root_radii: Vec<f64>,
    /// Intersection numbers of a_1..a_g, b_1..b_g, computed from the lifted cycles'.
    pub intersection: Vec<Vec<i64>>,
}

#[derive(Clone, Debug, PartialEq)]
pub enum PeriodError {
    /// The mathematics is outside what is built (said plainly to the user).
    Unsupported(String),
    /// No Riemann matrix exists (genus 0).
    NoMatrix(String),
    /// The computation could not reach the accuracy asked for.
    Accuracy(String),
}

/// The genus (n - 1)(m - 1) - gcd(m, n) + 1 all over 2 (Riemann–Hurwitz, f square-free).
pub fn superelliptic_genus(m: u32, n: u32) -> u32 {
    ((m - 1) * (n - 1) + 1 - num_integer::gcd(m, n)) / 2
}

/// x^(i-1) dx / y^j with 1 <= j <= m-1, i >= 1, j n - m i - gcd(m, n) >= 0.
pub fn holomorphic_basis(m: u32, n: u32) -> Vec<Differential> {
    let d = num_integer::gcd(m, n) as i64;
    let mut out = vec![];
    for j in 1..m {
        let mut i = 1i64;
        while j as i64 * n as i64 - m as i64 * i - d >= 0 {
            out.push(Differential { power: (i - 1) as u32, j });
            i += 1;
        }
    }
    out
}

/// Continuous logarithm of (t - u) for t on [-1, 1] and u off it: log(-u) + log(1 - t/u),
/// whose cut (t on the ray from u away from 0) misses every Bernstein ellipse that
/// excludes u.
fn log_branch(u_minus_t: C64, u: C64) -> C64 {
    // 1 - t/u = (u - t)/u, from an accurately computed u - t.
    (-u).ln() + (u_minus_t / u).ln()
}

/// One straight edge from branch point a: to branch point b, or (for the Abel–Jacobi map)
/// to a regular point.
#[derive(Clone, Debug)]
pub struct EdgeData {
    pub a: usize,
    pub b: usize,
    /// Arguments of y_e's leading coefficient at a and at b.
    arg_a: f64,
    arg_b: f64,
    /// integral over [a, b] of each differential against y_e, and its error bound.
    pub integrals: Vec<C64>,
    pub errors: Vec<f64>,
    /// log y_e at the far end when it is a regular point (its branch, to match a given y).
    pub log_y_end: C64,
}

/// Where an edge ends.
#[derive(Clone, Copy, Debug)]
pub enum End {
    /// At the branch point with this index.
    Branch(usize),
    /// At a regular point x (f(x) != 0).
    Regular(C64),
}

/// f has no repeated root: certified mod 2^61 - 1 when possible (an exact gcd over Q of
/// degree-40 polynomials costs tens of milliseconds of coefficient growth).
pub fn square_free(f: &UPoly) -> bool {
    let fd = f.derivative();
    f.coprime_mod_p(&fd) == Some(true) || f.gcd(&fd).degree() == Some(0)
}

pub fn periods(m: u32, f: &UPoly, tol: f64) -> Result<Periods, PeriodError> {
    let n = f.degree().unwrap_or(0) as u32;
    if m < 2 || n < 1 {
        return Err(PeriodError::NoMatrix("y^m = f(x) needs m >= 2 and f of degree at least 1".into()));
    }
    if !square_free(f) {
        return Err(PeriodError::Unsupported(format!(
            "f = {} has a repeated root, so the curve is singular there; this route needs f square-free (`superelliptic_route` sends such models to the covering route)",
            f.show("x")
        )));
    }
    let g = superelliptic_genus(m, n) as usize;
    if g == 0 {
        return Err(PeriodError::NoMatrix("it has genus 0".into()));
    }
    let diffs = holomorphic_basis(m, n);
    if diffs.len() != g {
        return Err(PeriodError::Accuracy(format!(
            "internal: {} holomorphic differentials for genus {g}",
            diffs.len()
        )));
    }
    let refined = refined_roots(f);
    let roots: Vec<C64> = refined.iter().map(|r| r.0).collect();
    let scale = roots.iter().map(|r| r.norm()).fold(1.0, f64::max);
    let radii: Vec<f64> = refined.iter().map(|r| r.1).collect();
    let radius = radii.iter().copied().fold(0.0, f64::max);
    let min_gap = (0..roots.len())
        .flat_map(|i| (i + 1..roots.len()).map(move |j| (i, j)))
        .map(|(i, j)| (roots[i] - roots[j]).norm())
        .fold(f64::INFINITY, f64::min);
    if !(radius <= 1e-11 * scale) || min_gap < 1e4 * radius.max(1e-300) {
        return Err(PeriodError::Accuracy(format!(
            "the branch points are known only to {radius:.1e} in double precision while the closest two are {min_gap:.1e} apart; higher precision is not supported yet"
        )));
    }
    let tree = spanning_tree(&roots)
        .ok_or_else(|| PeriodError::Accuracy("no spanning tree of the branch points was found".into()))?;
    let lead = kelp_lang::number::to_f64(&f.lead());
    let mut nodes = 0;
    let mut largest_rule = 0;
    let mut edges = vec![];
    for e in &tree {
        let (d, used, big) = edge_integrals(m, lead, &roots, &radii, e.a, End::Branch(e.b), &diffs, tol)?;
        nodes += used;
        largest_rule = largest_rule.max(big);
        edges.push(d);
    }

    // Cycles (edge, sheet) and their passes through branch points: (vertex, ray in, ray out),
    // a ray being (edge, end, sheet) with its angle.
    let mm = m as usize;
    let ray_angle = |e: &EdgeData, end: usize, s: usize| -> f64 {
        let base = if end == 0 { e.arg_a } else { e.arg_b };
        (base + 2.0 * PI * s as f64 / m as f64).rem_euclid(2.0 * PI)
    };
    type Ray = ((usize, usize, usize), f64);
    let mut passes: Vec<Vec<(usize, Ray, Ray)>> = vec![];
    for (ei, e) in edges.iter().enumerate() {
        for s in 0..mm - 1 {
            let ray = |end: usize, sh: usize| ((ei, end, sh % mm), ray_angle(e, end, sh % mm));
            passes.push(vec![(e.b, ray(1, s), ray(1, s + 1)), (e.a, ray(0, s + 1), ray(0, s))]);
        }
    }
    let nc = passes.len();
    let in_sector = |p_in: &Ray, p_out: &Ray, r: &Ray| -> bool {
        if r.0 == p_in.0 || r.0 == p_out.0 {
            return false;
        }
        let width = (p_in.1 - p_out.1).rem_euclid(2.0 * PI);
        let at = (p_in.1 - r.1).rem_euclid(2.0 * PI);
        at > 0.0 && at < width
    };
    let mut k = vec![vec![0i64; nc]; nc];
    for c1 in 0..nc {
        crate::limits::checkpoint();
        for c2 in 0..nc {
            if c1 == c2 {
                continue;
            }
            let mut s = 0;
            for (v1, i1, o1) in &passes[c1] {
                for (v2, i2, o2) in &passes[c2] {
                    if v1 == v2 {
                        s += i64::from(in_sector(i1, o1, o2)) - i64::from(in_sector(i1, o1, i2));
                    }
                }
            }
            k[c1][c2] = s;
        }
    }
    let basis = symplectic_basis(&k).map_err(|e| PeriodError::Accuracy(format!("homology: {e}")))?;
    if basis.a.len() != g {
        return Err(PeriodError::Accuracy(format!("homology: found {} symplectic pairs for genus {g}", basis.a.len())));
    }

    // Period of differential l over cycle (e, s): zeta^(-s j) (1 - zeta^(-j)) I_e,l.
    let zeta = |p: i64| C64::from_polar(1.0, 2.0 * PI * p as f64 / m as f64);
    let mut pm = DMatrix::<C64>::zeros(g, nc);
    let mut pe = DMatrix::<f64>::zeros(g, nc);
    for (ei, e) in edges.iter().enumerate() {
        for s in 0..mm - 1 {
            let c = ei * (mm - 1) + s;
            for (l, d) in diffs.iter().enumerate() {
                let j = d.j as i64;
                let factor = zeta(-(s as i64) * j) * (C64::new(1.0, 0.0) - zeta(-j));
                pm[(l, c)] = factor * e.integrals[l];
                pe[(l, c)] = factor.norm() * e.errors[l];
            }
        }
    }
    let combine = |vs: &[Vec<i64>]| -> (DMatrix<C64>, f64) {
        let mut out = DMatrix::<C64>::zeros(g, g);
        let mut err: f64 = 0.0;
        for (kk, v) in vs.iter().enumerate() {
            for l in 0..g {
                let mut s = C64::new(0.0, 0.0);
                let mut e = 0.0;
                for (c, &coef) in v.iter().enumerate() {
                    if coef != 0 {
                        s += pm[(l, c)] * coef as f64;
                        e += pe[(l, c)] * coef.abs() as f64 + f64::EPSILON * (pm[(l, c)] * coef as f64).norm();
                    }
                }
                out[(l, kk)] = s;
                err = err.max(e);
            }
        }
        (out, err)
    };
    let (a, a_error) = combine(&basis.a);
    let (b, b_error) = combine(&basis.b);
    Ok(Periods {
        genus: g,
        forms: diffs.iter().map(Differential::show).collect(),
        plane: None,
        differentials: diffs,
        a,
        b,
        a_error,
        b_error,
        validation: 0.0,
        branch_points: roots,
        edges: edges.len(),
        nodes,
        largest_rule,
        tree: edges,
        root_radii: radii,
        intersection: basis.intersections(&k),
    })
}

/// A piece [lo, hi] of an edge's coordinate, and the smallest ellipse parameter (in the
/// piece's own coordinate) of the singular points outside it: the other branch points and
/// the edge's ends that the piece does not contain.
struct Piece {
    lo: f64,
    hi: f64,
    rho: f64,
}

/// Pieces below this ellipse parameter are halved: a branch point near an edge (a cluster
/// of close roots) gets pieces graded down to its distance, each converging fast.
const SPLIT_RHO: f64 = 1.8;

fn pieces(us: &[Offset]) -> Vec<Piece> {
    fn rho(us: &[Offset], lo: f64, hi: f64) -> f64 {
        let local = |z: C64| (2.0 * z - lo - hi) / (hi - lo);
        // (u - c) / h from the offsets, so a branch point ulps from the edge's end is placed right.
        let mut r =
            us.iter().map(|o| quad::rho_of(-2.0 * o.from_centre(lo, hi) / (hi - lo))).fold(f64::INFINITY, f64::min);
        if lo > -1.0 {
            r = r.min(quad::rho_of(local(C64::new(-1.0, 0.0))));
        }
        if hi < 1.0 {
            r = r.min(quad::rho_of(local(C64::new(1.0, 0.0))));
        }
        r
    }
    let mut out = vec![];
    let mut stack = vec![(-1.0, 1.0, 0)];
    while let Some((lo, hi, depth)) = stack.pop() {
        crate::limits::checkpoint();
        let r = rho(us, lo, hi);
        // Pieces stay dyadic and at least a few ulps wide, so lo + 1 and hi - 1 stay exact.
        if r >= SPLIT_RHO || depth >= 60 || hi - lo < 8.0 * f64::EPSILON {
            out.push(Piece { lo, hi, rho: r });
        } else {
            let mid = 0.5 * (lo + hi);
            stack.push((mid, hi, depth + 1));
            stack.push((lo, mid, depth + 1));
        }
    }
    out
}

/// Integrals of every differential along one edge against the edge's branch y_e, with the
/// leading-coefficient arguments of y_e at both ends. Returns (data, nodes used, largest rule).
#[allow(clippy::too_many_arguments)]
pub fn edge_integrals(
    m: u32,
    lead: f64,
    roots: &[C64],
    radii: &[f64],
    ea: usize,
    end: End,
    diffs: &[Differential],
    tol: f64,
) -> Result<(EdgeData, usize, usize), PeriodError> {
    // A regular end takes no weight: y^m = lead half^n (1 + t) prod (t - u_k) there.
    let (eb, pb, b_branch) = match end {
        End::Branch(b) => (b, roots[b], true),
        End::Regular(x) => (usize::MAX, x, false),
    };
    let pa = roots[ea];
    let half = (pb - pa) / 2.0;
    let mid = (pa + pb) / 2.0;
    let n = roots.len();
    let others: Vec<usize> = (0..n).filter(|&k| k != ea && k != eb).collect();
    let us: Vec<Offset> = others.iter().map(|&k| Offset::new(pa, pb, roots[k])).collect();
    // How far each u - t may be off, absolutely: rounding in the offsets (a few ulps of 2 + |d|)
    // and the roots' inclusion radii (moving u by 2 delta / |b - a|).
    let u_err: Vec<f64> = others
        .iter()
        .zip(&us)
        .map(|(&k, o)| {
            let d = o.d_lo.norm().min(o.d_hi.norm());
            let rb = if b_branch { radii[eb] } else { 0.0 };
            4.0 * f64::EPSILON * (2.0 + d) + 2.0 * (radii[k] + radii[ea] + rb) * (1.0 + d) / (pb - pa).norm()
        })
        .collect();
    let mf = m as f64;
    // y_e = Ce (1 - t^2)^(1/m) prod (t - u_k)^(1/m), Ce^m = -lead half^n; to a regular end
    // y_e = Ce (1 + t)^(1/m) prod (t - u_k)^(1/m), Ce^m = lead half^n.
    let sign = if b_branch { -lead } else { lead };
    let log_ce = (C64::new(sign, 0.0).ln() + n as f64 * half.ln()) / mf;
    let arg_a = log_ce.im + us.iter().map(|o| log_branch(o.d_lo, o.u)).sum::<C64>().im / mf;
    let arg_b = log_ce.im + us.iter().map(|o| log_branch(o.d_hi, o.u)).sum::<C64>().im / mf;

    let mut integrals = vec![C64::new(0.0, 0.0); diffs.len()];
    let mut errors = vec![0.0; diffs.len()];
    let mut used = 0;
    let mut largest = 0;
    let max_j = diffs.iter().map(|d| d.j).max().unwrap_or(0);
    for piece in pieces(&us) {
        crate::limits::checkpoint();
        let (lo, hi) = (piece.lo, piece.hi);
        let (cp, hp) = ((lo + hi) / 2.0, (hi - lo) / 2.0);
        let (left, right) = (lo == -1.0, hi == 1.0);
        // log(t - u) continuous on the piece with its cut outside the piece's ellipses, shifted
        // by 2 pi i k to equal the edge-wide branch (so y_e stays one branch along the edge).
        // Everything below is written in the piece's coordinate s (t = c + hp s), with
        // c - u from the offsets and 1 -+ t from the exact dyadic ends: near a cluster of
        // branch points t - u is tiny and t and u themselves carry no accurate difference.
        let c_u: Vec<C64> = us.iter().map(|o| o.from_centre(lo, hi)).collect();
        let shifts: Vec<(C64, C64)> = us
            .iter()
            .zip(&c_u)
            .map(|(o, &cu)| {
                let local = cu.ln();
                let k = ((log_branch(-cu, o.u) - local).im / (2.0 * PI)).round();
                (cu, local + C64::new(0.0, 2.0 * PI * k))
            })
            .collect();
        let piece_log =
            |s: f64| -> C64 { shifts.iter().map(|&(cu, base)| base + (C64::new(1.0, 0.0) + hp * s / cu).ln()).sum() };
        // Relative error of y_e^-j / j at s: sum over the other branch points of |d(u - t)| / |u - t|.
        let amp = |s: f64| -> f64 { c_u.iter().zip(&u_err).map(|(&cu, &e)| e / (cu + hp * s).norm()).sum() };
        let (one_minus_c, one_plus_c) = (0.5 * ((1.0 - lo) + (1.0 - hi)), 0.5 * ((lo + 1.0) + (hi + 1.0)));
        let rho_max = piece.rho.min(40.0);
        for j in 1..=max_j {
            let which: Vec<usize> = (0..diffs.len()).filter(|&l| diffs[l].j == j).collect();
            let Some(max_pow) = which.iter().map(|&l| diffs[l].power).max() else { continue };
            let jf = j as f64;
            let ex = jf / mf;
            // The endpoint factors a piece does not take into its weight, and the constant
            // hp^(-j/m) of those it does: (1 -+ t) = hp (1 -+ s) at a touched end.
            let ends = |s: C64| -> C64 {
                let mut f = C64::new(1.0, 0.0);
                if b_branch {
                    f *= if right { C64::new(hp.powf(-ex), 0.0) } else { (one_minus_c - hp * s).powf(-ex) };
                }
                f *= if left { C64::new(hp.powf(-ex), 0.0) } else { (one_plus_c + hp * s).powf(-ex) };
                f
            };
            // |integrand / weight| at local s, largest over the powers i.
            let abs_g = |s: C64| -> f64 {
                let x = (mid + half * (cp + hp * s)).norm();
                // One logarithm of the product of squared distances (no overflow for the
                // degrees accepted: each factor is far from 0 and from 1e150).
                let prod: f64 = c_u.iter().map(|&cu| (cu + hp * s).norm_sqr()).product();
                half.norm()
                    * hp
                    * ends(s).norm()
                    * x.max(1.0).powi(max_pow as i32)
                    * (-jf * (log_ce.re + 0.5 * prod.ln() / mf)).exp()
            };
            let weight = quad::Weight { a: if right && b_branch { j } else { 0 }, b: if left { j } else { 0 }, q: m };
            let mu0 = weight.mu0();
            let m0 = (0..=32).map(|k| abs_g(C64::new(-1.0 + k as f64 / 16.0, 0.0))).fold(0.0, f64::max);
            let target = (1e-3 * tol).max(1e-16) * mu0 * m0;
            let mut best: Option<(usize, f64)> = None;
            for frac in [0.3, 0.5, 0.7, 0.85, 0.95] {
                let rho = 1.0 + (rho_max - 1.0) * frac;
                let mm = 1.2
                    * (0..96).map(|k| abs_g(quad::ellipse_point(rho, 2.0 * PI * k as f64 / 96.0))).fold(0.0, f64::max);
                if let Some(size) = quad::size_for(mu0, mm, rho, target) {
                    let bound = quad::error_bound(mu0, mm, rho, size);
                    if best.is_none_or(|(s, _)| size < s) {
                        best = Some((size, bound));
                    }
                }
            }
            let Some((size, bound)) = best else {
                return Err(PeriodError::Accuracy(format!(
                    "branch points {pa:.4} and {pb:.4}: a piece of the edge passes too close to another branch point for {} quadrature nodes at {tol:.0e}",
                    quad::SIZES[quad::SIZES.len() - 1]
                )));
            };
            used += size;
            largest = largest.max(size);
            let rule = quad::rule(weight, size);
            let mut magnitude = vec![0.0; which.len()];
            let mut amplified = vec![0.0; which.len()];
            for (sn, w) in rule.nodes.iter().zip(&rule.weights) {
                crate::limits::checkpoint();
                let x = mid + half * (cp + hp * sn);
                let base = half * hp * *w * ends(C64::new(*sn, 0.0)) * (-jf * (log_ce + piece_log(*sn) / mf)).exp();
                let rel = ex * amp(*sn);
                let mut xp = C64::new(1.0, 0.0);
                let mut pow = 0;
                for (slot, &l) in which.iter().enumerate() {
                    while pow < diffs[l].power {
                        xp *= x;
                        pow += 1;
                    }
                    let term = base * xp;
                    integrals[l] += term;
                    magnitude[slot] += term.norm();
                    amplified[slot] += term.norm() * rel;
                }
            }
            for (slot, &l) in which.iter().enumerate() {
                // Rounding: each term carries about n + a few ulps (the log sum), the sum N more;
                // plus the offsets' and roots' errors, amplified by 1 / |u - t|.
                errors[l] += bound + 2.0 * (size + n) as f64 * f64::EPSILON * magnitude[slot] + amplified[slot];
            }
        }
    }
    let log_y_end = log_ce + (2f64.ln() + us.iter().map(|o| log_branch(o.d_hi, o.u)).sum::<C64>()) / mf;
    Ok((EdgeData { a: ea, b: eb, arg_a, arg_b, integrals, errors, log_y_end }, used, largest))
}
