//! The covering route against independent values: the superelliptic route (itself checked
//! against mpmath elliptic integrals and Thomae's formula in tests/period_refs.rs), the
//! exact j-invariant of the curve algebra, and facts about special curves.

use super::*;
use crate::periods::fingerprint::{fingerprint_distance, theta_fingerprint};
use crate::periods::{riemann_matrix, RiemannMatrix};

fn curve(src: &str) -> (Poly, bool) {
    let c = kelp_lang::check(&format!("curve c: {src}\n"));
    assert!(!c.has_errors(), "{src}: {:?}", c.diagnostics);
    let e = c.curves.values().next().unwrap();
    (e.poly.clone(), e.projective)
}

fn general(src: &str) -> (General, RiemannMatrix) {
    let (p, proj) = curve(src);
    let facts = crate::algebra::curve::analyse(&p, proj);
    let g = facts.genus().unwrap_or_else(|e| panic!("{src}: {}", e.message()));
    let out = periods(&p, proj, &facts, g).unwrap_or_else(|e| panic!("{src}: {e:?}"));
    let r = riemann_matrix(out.periods.clone(), true).unwrap_or_else(|e| panic!("{src}: {e:?}"));
    (out, r)
}

fn superelliptic(src: &str) -> RiemannMatrix {
    let (p, proj) = curve(src);
    let s = crate::periods::shape::recognise(&p, proj).unwrap();
    riemann_matrix(crate::periods::superelliptic::periods(s.m, &s.f, 1e-12).unwrap(), true).unwrap()
}

fn same_curve(a: &RiemannMatrix, b: &RiemannMatrix) -> f64 {
    let (fa, _) = theta_fingerprint(&a.tau).unwrap();
    let (fb, _) = theta_fingerprint(&b.tau).unwrap();
    fingerprint_distance(&fa, &fb)
}

/// Two independent routes inside the project: the same Sp(2g, Z)-invariant fingerprint.
/// The cubic needs a change of coordinates (no y^3 term); the Fermat quartic is already in
/// general position; the trigonal quartic has 12 critical values.
#[test]
fn covering_route_agrees_with_the_superelliptic_route() {
    for src in
        ["y^2 = x^3 - 2*x + 5", "x^4 + y^4 = 1", "y^3 = x^4 - 2*x + 3", "y^2 = x^3 + x^2 - 7/3", "x^4 = y^4 - 3*y + 1"]
    {
        let (g, r) = general(src);
        let s = superelliptic(src);
        let d = same_curve(&r, &s);
        assert!(d < 1e-10, "{src}: fingerprints differ by {d:.2e}");
        assert!(r.error < 1e-9 && r.symmetry_defect < 1e-10, "{src}: error {:.1e}", r.error);
        assert_eq!(g.covering.riemann_hurwitz_genus as usize, r.periods.genus, "{src}");
    }
}

/// A smooth cubic's images under the standard quadratic transformation
/// (x : y : z) -> (yz : xz : xy) after linear changes that put 2 or 0 of its points on the
/// base points: a quartic with two nodes and a sextic with three ordinary triple points,
/// both of genus 1 and birational to the cubic (classical; the equations were expanded
/// with sympy 1.14.0). Their j(tau) must be the cubic's exact j = 1728 4a^3 / (4a^3 + 27b^2)
/// for y^2 = x^3 + a x + b (classical), here -55296/643.
#[test]
fn nodes_and_ordinary_triple_points_keep_the_j_invariant() {
    let j_exact = -55296.0 / 643.0;
    for src in [
        "5*x^2*y^2 - x^2*z^2 + 13*x*y^2*z - 4*x*y*z^2 - x*z^3 + 7*y^2*z^2 - 4*y*z^3",
        "-5*x^3*y^3 - 15*x^3*y^2*z - 14*x^3*y*z^2 - 4*x^3*z^3 + 2*x^2*y^3*z + 4*x^2*y^2*z^2 + 2*x^2*y*z^3 - y^3*z^3",
    ] {
        let (_, r) = general(src);
        let (j, e) = crate::periods::modular::j_of_tau(r.tau[(0, 0)], r.error).unwrap();
        assert!((j.re - j_exact).abs() < 1e-6 * j_exact.abs() && j.im.abs() < 1e-6, "{src}: j = {j} (± {e:.1e})");
    }
}

/// Klein's quartic x^3 y + y^3 z + z^3 x: its Jacobian is isogenous to E^3 with E having
/// complex multiplication by Q(sqrt(-7)) (classical; cited from memory), so every entry
/// of any Riemann matrix of it lies in Q(sqrt(-7)): a + b sqrt(-7) with a, b rational.
/// The same curve after a projective change gives the same fingerprint.
#[test]
fn klein_quartic_has_entries_in_q_sqrt_minus_7() {
    let (g, r) = general("x^3*y + y^3*z + z^3*x");
    assert_eq!(g.covering.riemann_hurwitz_genus, 3);
    let s7 = 7f64.sqrt();
    let rational = |v: f64| (1..=64).any(|q| ((v * q as f64).round() - v * q as f64).abs() < 1e-9 * q as f64);
    for v in r.tau.iter() {
        assert!(rational(v.re) && rational(v.im / s7), "{v} is not in Q(sqrt(-7))");
    }
    let (_, moved) = general("(x + 2*y)^3*(y - z) + (y - z)^3*(3*z + x) + (3*z + x)^3*(x + 2*y)");
    let d = same_curve(&r, &moved);
    assert!(d < 1e-10, "fingerprints differ by {d:.2e}");
}

/// Random smooth quartics and quintics (fixed seed): the Riemann–Hurwitz genus of the
/// monodromy equals (d-1)(d-2)/2, tau is symmetric and Im tau positive definite within
/// the estimate (the Riemann bilinear relations; classical).
#[test]
fn random_smooth_quartics_and_quintics() {
    let mut state = 0x9e37_79b9_7f4a_7c15u64;
    let mut next = || {
        state ^= state << 13;
        state ^= state >> 7;
        state ^= state << 17;
        (state % 11) as i64 - 5
    };
    let mut tried = 0;
    for d in [4u32, 4, 5] {
        let mut terms = vec![];
        for a in 0..=d {
            for b in 0..=d - a {
                let c = next();
                if c != 0 {
                    terms.push(format!("{c}*x^{a}*y^{b}*z^{}", d - a - b));
                }
            }
        }
        terms.push(format!("x^{d} + y^{d} + z^{d}"));
        let src = terms.join(" + ");
        let (p, proj) = curve(&src);
        let facts = crate::algebra::curve::analyse(&p, proj);
        if !facts.smooth() {
            continue;
        }
        let (g, r) = general(&src);
        let genus = ((d - 1) * (d - 2) / 2) as i64;
        assert_eq!(g.covering.riemann_hurwitz_genus, genus, "{src}");
        assert!(r.symmetry_defect < 1e-9 && r.min_eig_im > 1e-3, "{src}: {r:?}");
        tried += 1;
    }
    assert!(tried >= 2, "the random curves were not smooth");
}
