//! Curve facts against sympy 1.14.0 (tests/fixtures/gen/curve_refs.py; versions in the
//! fixture): singular points of the projective closure found by sympy.solve on the
//! partial derivatives in each chart, and factorisations by sympy.factor_list. kelp must
//! find the same number of singular points, the same rational ones exactly, and give
//! no genus for a curve that factors.

use kelp_evaluator::algebra::curve::analyse;
use serde_json::Value;

#[test]
fn singular_points_and_factorisations_match_sympy() {
    let doc: Value = serde_json::from_str(include_str!("../fixtures/curve_refs.json")).unwrap();
    let curves = doc["curves"].as_array().unwrap();
    assert!(curves.len() >= 30);
    for c in curves {
        let eq = c["equation"].as_str().unwrap();
        let src = format!("curve c: {eq}\n");
        let checked = kelp_lang::check(&src);
        assert!(!checked.has_errors(), "{eq}: {:?}", checked.diagnostics);
        let e = checked.curves.values().next().unwrap();
        assert_eq!(e.degree as u64, c["degree"].as_u64().unwrap(), "{eq}");
        let f = analyse(&e.poly, e.projective);
        let factors = c["factors"].as_array().unwrap();
        let reducible = factors.len() > 1 || factors.iter().any(|f| f[1].as_u64() != Some(1));
        if c.get("non_reduced").is_some() {
            assert!(f.non_reduced, "{eq}: a repeated factor must be seen");
            assert!(f.genus().is_err());
            continue;
        }
        assert!(!f.non_reduced, "{eq}");
        let count = c["singular_count"].as_u64().unwrap() as usize;
        assert_eq!(f.singular_count(), count, "{eq}: {:?}", f.summary());
        assert_eq!(f.smooth(), count == 0, "{eq}");
        let mut ours: Vec<Vec<String>> =
            f.rational.iter().map(|p| p.coords.iter().map(|q| q.to_string()).collect()).collect();
        ours.sort();
        let theirs: Vec<Vec<String>> = c["rational_points"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| p.as_array().unwrap().iter().map(|s| s.as_str().unwrap().to_string()).collect())
            .collect();
        assert_eq!(ours, theirs, "{eq}");
        if reducible {
            assert!(f.genus().is_err(), "{eq} factors over Q ({factors:?}) but got genus {:?}", f.genus());
        }
    }
}
