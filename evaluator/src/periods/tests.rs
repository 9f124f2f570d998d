//! Riemann matrices against outside values. Cross-crate fixtures live in tests/.

use super::modular::j_of_tau;
use super::superelliptic::periods;
use super::*;
use crate::algebra::upoly::UPoly;
use num_rational::BigRational;

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}

fn tau_of(m: u32, f: &UPoly) -> RiemannMatrix {
    riemann_matrix(periods(m, f, 1e-12).expect("periods"), true).expect("tau")
}

// Legendre form y^2 = x(x-1)(x-l): j = 256 (1 - l + l^2)^3 / (l^2 (1 - l)^2) (classical;
// Silverman, *The Arithmetic of Elliptic Curves*, III.1.7). j(tau) must agree.
#[test]
fn legendre_curves_j_of_tau() {
    for (n, d) in [(2, 1), (-1, 1), (1, 2), (3, 7), (-5, 3), (9, 4), (1, 10), (17, 5), (-2, 9), (7, 8), (40, 3)] {
        let l = q(n, d);
        let f = UPoly::new(vec![q(0, 1), l.clone(), -(&l + q(1, 1)), q(1, 1)]);
        let r = tau_of(2, &f);
        let lf = n as f64 / d as f64;
        let exact = 256.0 * (1.0 - lf + lf * lf).powi(3) / (lf * lf * (1.0 - lf).powi(2));
        let (j, e) = j_of_tau(r.tau[(0, 0)], r.error).unwrap();
        assert!(
            (j - exact).norm() <= e.max(1e-9 * exact.abs()),
            "l = {n}/{d}: j(tau) = {j}, exact {exact}, error {e:.1e}, tau {}",
            r.tau[(0, 0)]
        );
        assert!(r.error < 1e-11, "error estimate {:.1e}", r.error);
    }
}

fn poly(c: &[i64]) -> UPoly {
    UPoly::from_ints(c)
}

// Genus-1 curves with extra automorphisms, through the m = 3 and m = 4 sheet structures:
// y^3 = x^3 - 1 (the Fermat cubic) and y^3 = x^2 + 1 have j = 0; y^4 = x^2 - 1 and
// y^4 = 3x^2 + x - 5 have j = 1728 (an automorphism of order 3, resp. 4, fixing a point;
// classical, Silverman III.10.1).
#[test]
fn superelliptic_genus_one_j_values() {
    for (m, f, want) in [
        (3, poly(&[-1, 0, 0, 1]), 0.0),
        (3, poly(&[1, 0, 1]), 0.0),
        (3, poly(&[2, -3, 0, 5]), 0.0),
        (4, poly(&[-1, 0, 1]), 1728.0),
        (4, poly(&[-5, 1, 3]), 1728.0),
    ] {
        let r = tau_of(m, &f);
        assert_eq!(r.tau.nrows(), 1);
        let (j, e) = j_of_tau(r.tau[(0, 0)], r.error).unwrap();
        assert!((j - want).norm() < e.max(1e-8), "y^{m} = {}: j = {j}", f.show("x"));
    }
}

/// Whether D Pi = Pi M for an integer unimodular M, Pi = [A | B]: the period lattice is
/// invariant under the linear map D of an automorphism acting on the differentials.
fn lattice_invariant(r: &RiemannMatrix, d: &[C64]) -> bool {
    let g = r.periods.genus;
    let pi = DMatrix::from_fn(g, 2 * g, |l, k| if k < g { r.periods.a[(l, k)] } else { r.periods.b[(l, k - g)] });
    let real =
        |m: &DMatrix<C64>| DMatrix::from_fn(2 * g, 2 * g, |i, k| if i < g { m[(i, k)].re } else { m[(i - g, k)].im });
    let dpi = DMatrix::from_fn(g, 2 * g, |l, k| d[l] * pi[(l, k)]);
    let Some(inv) = real(&pi).try_inverse() else { return false };
    let m = inv * real(&dpi);
    let off = m.iter().map(|v| (v - v.round()).abs()).fold(0.0, f64::max);
    let det = m.map(|v| v.round()).determinant();
    off < 1e-8 && (det.abs() - 1.0).abs() < 1e-9
}

use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

// y^3 = x^4 - 1 (genus 3) has the automorphism (x, y) -> (i x, y), which maps the tree of
// branch points to a different set of edges; it multiplies x^p dx / y^j by i^(p+1), and
// its action on homology is an integer unimodular matrix (common practice: an automorphism
// acts on H_1 by an integral symplectic map). Same for y^2 = x^5 - x with (x, y) ->
// (i x, e^{i pi/4} y), y^5 = x^3 - 1 with (x, y) -> (w x, y), w^3 = 1, and y^4 = x^7 + x with
// (x, y) -> (-x, e^{i pi/4} y).
#[test]
fn automorphisms_preserve_the_period_lattice() {
    use std::f64::consts::PI;
    let cases: Vec<(u32, UPoly, Box<dyn Fn(&superelliptic::Differential) -> C64>)> = vec![
        (3, poly(&[-1, 0, 0, 0, 1]), Box::new(|d| C64::new(0.0, 1.0).powu(d.power + 1))),
        (
            2,
            poly(&[0, -1, 0, 0, 0, 1]),
            Box::new(|d| C64::new(0.0, 1.0).powu(d.power + 1) * C64::from_polar(1.0, -PI / 4.0)),
        ),
        (5, poly(&[-1, 0, 0, 1]), Box::new(|d| C64::from_polar(1.0, 2.0 * PI / 3.0).powu(d.power + 1))),
        (
            4,
            poly(&[0, 1, 0, 0, 0, 0, 0, 1]),
            Box::new(|d| {
                // y^4 = x^7 + x: (x, y) -> (-x, e^{i pi/4} y).
                C64::new(-1.0, 0.0).powu(d.power + 1) * C64::from_polar(1.0, -PI / 4.0 * d.j as f64)
            }),
        ),
    ];
    for (m, f, act) in cases {
        let r = tau_of(m, &f);
        let d: Vec<C64> = r.periods.differentials.iter().map(|d| act(d)).collect();
        assert!(lattice_invariant(&r, &d), "y^{m} = {}", f.show("x"));
        // And a map that is not an automorphism must fail the same test.
        let wrong: Vec<C64> =
            d.iter().enumerate().map(|(k, v)| if k == 0 { v * C64::new(0.0, 1.0) } else { *v }).collect();
        assert!(!lattice_invariant(&r, &wrong) || d.len() == 1, "y^{m} = {}: the test cannot fail", f.show("x"));
    }
}

// x -> a x + b, y -> c y changes f to f(a x + b) / c^m: the same curve, so the theta
// fingerprint is unchanged (definition of the invariant).
#[test]
fn affine_changes_keep_the_fingerprint() {
    use super::fingerprint::{fingerprint_distance, theta_fingerprint};
    // y^2 = x^5 + 3x^2 - x + 2 and y^3 = x^4 + x + 1 (invented), then with x -> (2x - 1)/3,
    // y -> (1/2) y, written out exactly.
    for (m, f) in [(2u32, poly(&[2, -1, 3, 0, 0, 1])), (3, poly(&[1, 1, 0, 0, 1]))] {
        let sub = UPoly::new(vec![q(-1, 3), q(2, 3)]);
        let mut g = UPoly::zero();
        for c in f.0.iter().rev() {
            g = g.mul(&sub).add(&UPoly::new(vec![c.clone()]));
        }
        let c = q(1, 2);
        let mut cm = q(1, 1);
        for _ in 0..m {
            cm *= &c;
        }
        let g = g.scale(&(q(1, 1) / cm));
        let (fa, ea) = theta_fingerprint(&tau_of(m, &f).tau).unwrap();
        let (fb, eb) = theta_fingerprint(&tau_of(m, &g).tau).unwrap();
        let d = fingerprint_distance(&fa, &fb);
        assert!(d < 1e-9 + ea + eb, "y^{m} = {}: {d:.2e}", f.show("x"));
        // A different curve does not share it.
        let (fc, _) = theta_fingerprint(&tau_of(m, &f.add(&poly(&[1]))).tau).unwrap();
        assert!(fingerprint_distance(&fa, &fc) > 1e-4);
    }
}

// Many random-looking superelliptic curves: the Riemann bilinear relations (symmetry, Im tau
// positive definite) hold within the estimate; a wrong intersection matrix breaks them.
#[test]
fn bilinear_relations_hold_across_shapes() {
    let fs = [
        (2, poly(&[3, -1, 4, 1, -5, 9, 2])),
        (3, poly(&[6, -5, 3, 5, 8])),
        (3, poly(&[-7, 9, 3, -2, 3, 8, 4])),
        (4, poly(&[2, 7, -1, 8, 2])),
        (5, poly(&[1, -3, 2, 1])),
        (6, poly(&[1, 0, -2, 3])),
        (7, poly(&[-2, 5, 1])),
        (2, poly(&[1, -2, 3, -4, 5, -6, 7, -8, 9, -10, 11, -12, 13])),
    ];
    for (m, f) in fs {
        let p = periods(m, &f, 1e-12).unwrap();
        let n = f.degree().unwrap() as u32;
        assert_eq!(p.genus as u32, superelliptic::superelliptic_genus(m, n));
        let r = riemann_matrix(p, false).unwrap();
        assert!(r.symmetry_defect < 1e-10, "y^{m} = {}: {:.1e}", f.show("x"), r.symmetry_defect);
        assert!(r.min_eig_im > 1e-3, "y^{m} = {}", f.show("x"));
        assert!(r.error < 1e-10, "y^{m} = {}: {:.1e}", f.show("x"), r.error);
    }
}

// The count of the differentials equals the Riemann–Hurwitz genus for every small (m, n)
// (the index set is from memory, so this is its check).
#[test]
fn differential_count_is_the_genus() {
    for m in 2..9 {
        for n in 1..14 {
            let g = superelliptic::superelliptic_genus(m, n) as usize;
            assert_eq!(superelliptic::holomorphic_basis(m, n).len(), g, "m = {m}, n = {n}");
        }
    }
}

/// Thomae's formula (J. Thomae, J. reine angew. Math. 71 (1870); cited from memory): up to one
/// common factor, the even theta constants' eighth powers of y^2 = prod (x - e_k) are the
/// squares of prod_{i<j in S} (e_i - e_j) prod_{i<j in S'} (e_i - e_j) over the splits of the
/// branch points into two sets of g + 1 (infinity, for odd degree, left out of the products).
fn thomae(e: &[f64]) -> Vec<C64> {
    let g = (e.len() - 1) / 2;
    let mut pts: Vec<Option<f64>> = e.iter().map(|&v| Some(v)).collect();
    if e.len() % 2 == 1 {
        pts.push(None);
    }
    let n = pts.len();
    let mut out = vec![];
    for mask in 0u32..(1 << n) {
        if mask.count_ones() as usize != g + 1 || mask & 1 == 0 {
            continue;
        }
        let mut prod = 1.0;
        for i in 0..n {
            for j in i + 1..n {
                let same = ((mask >> i) & 1) == ((mask >> j) & 1);
                if let (true, Some(a), Some(b)) = (same, pts[i], pts[j]) {
                    prod *= a - b;
                }
            }
        }
        out.push(C64::new(prod * prod, 0.0));
    }
    let n_even = (1usize << (g - 1)) * ((1 << g) + 1);
    out.resize(n_even, C64::new(0.0, 0.0));
    let top = out.iter().map(|v| v.norm()).fold(0.0, f64::max);
    out.iter().map(|v| v / top).collect()
}

// Clusters of close branch points (1e-6 and 1e-9 apart): the roots are resolved in
// double-double, edges near a cluster are integrated in pieces graded down to it, and the
// fingerprint still equals Thomae's from the exact roots. In genus 1, j against the exact
// Legendre value (Silverman III.1.7), which is about 2.6e14 here.
#[test]
fn clusters_of_close_branch_points() {
    use super::fingerprint::{fingerprint_distance, theta_fingerprint};
    let from_roots = |roots: &[(i64, i64)]| {
        let mut f = UPoly::one();
        for &(n, d) in roots {
            f = f.mul(&UPoly::new(vec![-q(n, d), q(1, 1)]));
        }
        f
    };
    for roots in [
        vec![(0, 1), (1, 1), (1_000_001, 1_000_000), (-2, 1), (3, 1)],
        vec![(0, 1), (1, 1), (1_000_000_001, 1_000_000_000), (-2, 1), (3, 1), (7, 2)],
        vec![(1, 3), (10_000_001, 30_000_000), (-5, 2), (4, 1), (11, 5), (-1, 1), (2, 1)],
    ] {
        let f = from_roots(&roots);
        let r = tau_of(2, &f);
        let e: Vec<f64> = roots.iter().map(|&(n, d)| n as f64 / d as f64).collect();
        let (fp, err) = theta_fingerprint(&r.tau).unwrap();
        let d = fingerprint_distance(&thomae(&e), &fp);
        assert!(d < 1e-8 + err, "roots {roots:?}: {d:.2e}, error estimate {:.1e}", r.error);
    }
    let l: f64 = 1.0 + 1e-6;
    let f = from_roots(&[(0, 1), (1, 1), (1_000_001, 1_000_000)]);
    let r = tau_of(2, &f);
    let exact = 256.0 * (1.0 - l + l * l).powi(3) / (l * l * (1.0 - l).powi(2));
    let (j, e) = j_of_tau(r.tau[(0, 0)], r.error).unwrap();
    assert!((j - exact).norm() <= e + 1e-6 * exact, "{j} vs {exact}");
}
