use super::*;
use crate::periods::fingerprint::{fingerprint_distance, theta_fingerprint};
use crate::periods::riemann_matrix;

fn curve(src: &str) -> (Poly, bool) {
    let c = kelp_lang::check(&format!("curve c: {src}\n"));
    assert!(!c.has_errors(), "{src}: {:?}", c.diagnostics);
    let e = c.curves.values().next().unwrap();
    (e.poly.clone(), e.projective)
}

fn general(src: &str) -> (General, crate::periods::RiemannMatrix) {
    let (p, proj) = curve(src);
    let facts = crate::algebra::curve::analyse(&p, proj);
    let g = facts.genus().unwrap_or_else(|e| panic!("{src}: {}", e.message()));
    let out = periods(&p, proj, &facts, g).unwrap_or_else(|e| panic!("{src}: {e:?}"));
    let r = riemann_matrix(out.periods.clone(), true).unwrap_or_else(|e| panic!("{src}: {e:?}"));
    (out, r)
}

fn superelliptic(src: &str) -> crate::periods::RiemannMatrix {
    let (p, proj) = curve(src);
    let s = crate::periods::shape::recognise(&p, proj).unwrap();
    riemann_matrix(crate::periods::superelliptic::periods(s.m, &s.f, 1e-12).unwrap(), true).unwrap()
}

#[test]
fn explore() {
    for src in ["y^2 = x^3 - 2*x + 5", "x^4 + y^4 = 1", "y^3 = x^4 - 2*x + 3"] {
        let (g, r) = general(src);
        let s = superelliptic(src);
        let (f1, _) = theta_fingerprint(&r.tau).unwrap();
        let (f2, _) = theta_fingerprint(&s.tau).unwrap();
        eprintln!(
            "{src}: change {:?} sheets {} critical {} steps {} nodes {} err {:.1e} defect {:.1e} mineig {:.3}\n  tau {}\n  super {}\n  fingerprint distance {:.2e}",
            g.covering.change, g.covering.sheets, g.covering.critical.len(), g.covering.steps, g.periods.nodes,
            r.error, r.symmetry_defect, r.min_eig_im, r.tau, s.tau, fingerprint_distance(&f1, &f2)
        );
    }
}
