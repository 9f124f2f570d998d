//! Bound audit of the expression basics (exp, log, sqrt, det, inverse, trace, pi, entrywise
//! abs/re/im/conj) on random and hostile inputs against mpmath at 50 digits and sympy's
//! exact values (tests/fixtures/gen/basics_refs.py, mpmath 1.3.0, sympy 1.14.0). Every
//! stated bound must hold; exact inputs must give sympy's exact result; inputs within
//! rounding of a branch cut may be refused, never answered wrongly.

use kelp_evaluator::num::Num;
use kelp_evaluator::value::Value;
use kelp_evaluator::{evaluate, Mode};
use kelp_lang::check;
use num_complex::Complex64 as C64;
use serde_json::Value as J;

/// The entries of `let v = EXPR` and its bound, or the message when kelp refused it.
fn value_of(expr: &str) -> Result<(Vec<Num>, f64), String> {
    let src = format!("let v = {expr}\n");
    let c = check(&src);
    assert!(!c.has_errors(), "{expr}: {:?}", c.diagnostics);
    let e = evaluate(&c, &src, &Mode::Check);
    let Some(v) = e.values.iter().find(|v| v.name == "v") else {
        let d = e.diagnostics.iter().find(|d| d.code.as_str() == "K601");
        return Err(d.unwrap_or_else(|| panic!("{expr}: {:?}", e.diagnostics)).message.clone());
    };
    let entries = match &v.value.value {
        Value::Num(n) => vec![n.clone()],
        Value::Vector(x) => x.clone(),
        Value::Matrix(m) => m.iter().flatten().cloned().collect(),
        other => panic!("{expr}: {other}"),
    };
    Ok((entries, v.value.error_bound))
}

#[test]
fn every_basic_bound_holds_against_mpmath_and_exact_results_match_sympy() {
    let doc: J = serde_json::from_str(include_str!("../fixtures/basics_refs.json")).unwrap();
    let cases = doc["cases"].as_array().unwrap();
    assert!(cases.len() >= 300);
    let (mut worst, mut worst_at, mut refused, mut exact) = (0.0f64, String::new(), 0, 0);
    for case in cases {
        let expr = case["expr"].as_str().unwrap();
        let (got, bound) = match value_of(expr) {
            Ok(v) => v,
            Err(why) => {
                assert!(case["may_refuse"].as_bool().unwrap(), "{expr}: refused ({why}), but it is far from any cut");
                refused += 1;
                continue;
            }
        };
        let want: Vec<C64> = case["value"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| C64::new(p[0].as_str().unwrap().parse().unwrap(), p[1].as_str().unwrap().parse().unwrap()))
            .collect();
        assert_eq!(got.len(), want.len(), "{expr}");
        for (g, w) in got.iter().zip(&want) {
            let diff = (g.to_complex() - w).norm();
            // The reference is a double rounded from 30 digits.
            let allowed = bound + 2.0 * f64::EPSILON * w.norm();
            assert!(diff <= allowed, "{expr}: kelp {g} ± {bound:.2e}, mpmath {w}, difference {diff:.2e}");
            if bound > 0.0 && diff / allowed > worst {
                (worst, worst_at) = (diff / allowed, format!("{expr}: {diff:.2e} of {allowed:.2e}"));
            }
        }
        if let Some(ex) = case["exact"].as_array() {
            exact += 1;
            assert_eq!(bound, 0.0, "{expr}: an exact result has bound 0");
            for (g, s) in got.iter().zip(ex) {
                assert!(g.is_exact(), "{expr}: {g} should be exact");
                assert_eq!(g.to_string(), s.as_str().unwrap(), "{expr}: sympy's exact value");
            }
        }
    }
    assert!(refused <= 4, "{refused} refused");
    assert!(exact >= 20, "only {exact} exact cases");
    println!(
        "basics audit: worst observed/stated {worst:.3} ({worst_at}); {refused} refused (cases marked may_refuse); {exact} exact"
    );
}

fn verdicts(src: &str) -> Vec<Option<bool>> {
    let c = check(src);
    assert!(!c.has_errors(), "{:?}", c.diagnostics);
    evaluate(&c, src, &Mode::Check).expectations.iter().map(|x| x.passed).collect()
}

#[test]
fn determinant_claims_at_the_rounding_level() {
    // det [[1, 2], [2, 4]] = 0 and det [[1, 1], [1, 1 + 1e-12]] = 1e-12 exactly (common
    // practice, no source): exact inputs decide exactly, however small the gap.
    let v = verdicts("expect det([[1, 2], [2, 4]]) == 0\nexpect det([[1, 1], [1, 1.000000000001]]) == 0\n");
    assert_eq!(v, vec![Some(true), Some(false)]);
    // pi [[1, 1], [1, 1]] is singular, pi [[1, 1], [1, 1 + 1e-12]] has det pi^2 1e-12
    // (common practice, no source): as floats, true or undecided for the first, false or
    // undecided for the second, never the other way.
    let v = verdicts(
        "expect det(pi * [[1, 1], [1, 1]]) == 0\n\
         expect det(pi * [[1, 1], [1, 1.000000000001]]) == 0 within 1e-20\n\
         expect det(pi * [[1, 1], [1, 1.000000000000001]]) == 0 within 1e-16\n",
    );
    assert_ne!(v[0], Some(false), "{v:?}");
    assert_eq!(v[0], Some(true), "the bound of pi's rounding is far below the default tolerance");
    assert_ne!(v[1], Some(true), "{v:?}");
    assert_ne!(v[2], Some(true), "{v:?}");
}

#[test]
fn matrices_that_cannot_be_shown_invertible_are_refused() {
    // Exactly singular, and singular within the entries' error bound: no inverse.
    for expr in ["inverse([[1, 2], [2, 4]])", "inverse(pi * [[1, 1], [1, 1]])", "log(0)", "log(-(2^(1/2)))"] {
        assert!(value_of(expr).is_err(), "{expr} gave a value");
    }
    // The 2 x 2 Hilbert-like [[1, 1], [1, 1 + 1e-14]] times pi: invertible, with a bound.
    let (x, b) = value_of("inverse(pi * [[1, 1], [1, 1.00000000000001]])").unwrap();
    // inverse = [[1 + 1e14, -1e14], [-1e14, 1e14]] / pi (common practice, no source).
    let want = (1e14 + 1.0) / std::f64::consts::PI;
    assert!((x[0].to_complex().re - want).abs() <= b + 1e-2, "{} ± {b}", x[0]);
}

#[test]
fn indexing_reads_entries_rows_and_keeps_bounds() {
    let src = "let T = [[1 + 2i, 3], [4, 5]]\nlet a = T[1, 1]\nlet r = T[2]\nlet b = r[1]\nlet s = [7, 8, 9][3]\n";
    let c = check(src);
    assert!(!c.has_errors(), "{:?}", c.diagnostics);
    let e = evaluate(&c, src, &Mode::Check);
    let get = |n: &str| e.values.iter().find(|v| v.name == n).unwrap().value.clone();
    assert_eq!(get("a").value.to_string(), "1.0 + 2.0i");
    assert_eq!(get("a").error_bound, get("T").error_bound);
    assert_eq!(get("r").value.to_string(), "[4, 5]");
    assert_eq!(get("b").value.to_string(), "4");
    assert_eq!(get("s").value.to_string(), "9");
}
