//! Riemann matrices of y^2 = f(x) against tests/fixtures/period_refs.json, written by
//! tests/fixtures/gen/period_refs.py (mpmath 1.4.1, python-flint 0.9.0; versions in the
//! fixture): genus 1 against tau = i K(1-l)/K(l) from mpmath's ellipk; genus 2 and 3 through
//! the theta-constant fingerprint, whose reference comes from Thomae's formula and, for real
//! branch points, also from an mpmath-quadrature tau run through FLINT's theta.

use kelp_evaluator::periods::fingerprint::{fingerprint_distance, theta_fingerprint};
use kelp_evaluator::periods::modular::j_of_tau;
use kelp_evaluator::periods::shape::recognise;
use kelp_evaluator::periods::superelliptic::periods;
use kelp_evaluator::periods::{riemann_matrix, RiemannMatrix};
use num_complex::Complex64 as C64;
use serde_json::Value;

fn doc() -> Value {
    serde_json::from_str(include_str!("../fixtures/period_refs.json")).unwrap()
}

/// y^2 = sum c_k x^k, through the language (so recognition is exercised too).
fn tau_of_equation(eq: &str) -> RiemannMatrix {
    let src = format!("curve c: {eq}\n");
    let checked = kelp_lang::check(&src);
    assert!(!checked.has_errors(), "{eq}: {:?}", checked.diagnostics);
    let e = checked.curves.values().next().unwrap();
    let s = recognise(&e.poly, e.projective).unwrap_or_else(|| panic!("{eq}: not recognised"));
    riemann_matrix(periods(s.m, &s.f, 1e-12).unwrap_or_else(|e| panic!("{eq}: {e:?}")), true).unwrap()
}

fn equation(coeffs: &[Value]) -> String {
    let terms: Vec<String> = coeffs
        .iter()
        .enumerate()
        .filter(|(_, c)| c.as_str() != Some("0"))
        .map(|(k, c)| format!("({})*x^{k}", c.as_str().unwrap()))
        .collect();
    format!("y^2 = {}", terms.join(" + "))
}

fn reduce1(mut t: C64) -> C64 {
    for _ in 0..100 {
        t.re -= t.re.round();
        if t.norm_sqr() < 1.0 {
            t = -1.0 / t;
        } else {
            break;
        }
    }
    t
}

#[test]
fn legendre_tau_matches_elliptic_integrals() {
    let d = doc();
    let cases = d["legendre"].as_array().unwrap();
    assert_eq!(cases.len(), 10);
    for c in cases {
        let l = c["l"].as_str().unwrap();
        let r = tau_of_equation(&format!("y^2 = x*(x - 1)*(x - {l})"));
        let want = C64::new(c["tau"][0].as_f64().unwrap(), c["tau"][1].as_f64().unwrap());
        let (ours, theirs) = (reduce1(r.tau[(0, 0)]), reduce1(want));
        // On the boundary of the fundamental domain two reduced points can be equivalent.
        let same = (ours - theirs).norm() < 1e-10
            || ((ours.re.abs() - 0.5).abs() < 1e-9 && (ours + theirs.conj()).norm() < 1e-10)
            || ((ours.norm() - 1.0).abs() < 1e-9 && (ours + theirs.conj()).norm() < 1e-10);
        assert!(same, "l = {l}: ours {ours}, mpmath {theirs}");
        assert!(r.error < 1e-11, "l = {l}: error estimate {:.1e}", r.error);
        let (j, e) = j_of_tau(r.tau[(0, 0)], r.error).unwrap();
        let exact = c["j"].as_f64().unwrap();
        assert!((j - exact).norm() <= e + 1e-9 * exact, "l = {l}: {j} vs {exact}");
    }
}

#[test]
fn hyperelliptic_fingerprints_match_thomae_and_quadrature() {
    let d = doc();
    let cases = d["hyperelliptic"].as_array().unwrap();
    assert!(cases.len() >= 12);
    for c in cases {
        let eq = equation(c["f"].as_array().unwrap());
        let g = c["genus"].as_u64().unwrap() as usize;
        let r = tau_of_equation(&eq);
        assert_eq!(r.tau.nrows(), g, "{eq}");
        assert!(r.error < 1e-10, "{eq}: error estimate {:.1e}", r.error);
        assert!(r.min_eig_im > 0.0 && r.symmetry_defect < 1e-10, "{eq}");
        let (fp, fp_err) = theta_fingerprint(&r.tau).unwrap();
        let want: Vec<C64> = c["fingerprint"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| C64::new(v[0].as_f64().unwrap(), v[1].as_f64().unwrap()))
            .collect();
        let dist = fingerprint_distance(&want, &fp);
        assert!(dist < 1e-9 + fp_err, "{eq}: fingerprint distance {dist:.2e}");
        if let Some(t) = c.get("tau") {
            // The quadrature tau itself, through our own theta: same invariant.
            let m = nalgebra::DMatrix::from_fn(g, g, |i, j| {
                C64::new(t[i][j][0].as_f64().unwrap(), t[i][j][1].as_f64().unwrap())
            });
            let (fq, _) = theta_fingerprint(&m).unwrap();
            assert!(fingerprint_distance(&fq, &fp) < 1e-9 + fp_err, "{eq}");
        }
    }
}
