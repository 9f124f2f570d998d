//! Bound audit of the language's own arithmetic: random and hostile expressions mixing
//! exact rationals with floats (irrational powers, imaginary literals), against mpmath at
//! 60 digits (tests/fixtures/gen/float_refs.py reads every decimal literal exactly, as kelp
//! does). Every stated bound must hold; claims at the rounding level must be decided
//! right or left undecided (K702), never decided wrong.

use kelp_evaluator::value::Value;
use kelp_evaluator::{evaluate, Mode};
use kelp_lang::check;
use num_complex::Complex64 as C64;
use serde_json::Value as J;

fn value_of(expr: &str) -> Option<(C64, f64)> {
    let src = format!("let v = {expr}\n");
    let c = check(&src);
    assert!(!c.has_errors(), "{expr}: {:?}", c.diagnostics);
    let e = evaluate(&c, &src, &Mode::Check);
    let v = e.values.iter().find(|v| v.name == "v")?;
    match &v.value.value {
        Value::Num(n) => Some((n.to_complex(), v.value.error_bound)),
        other => panic!("{expr}: {other}"),
    }
}

#[test]
fn every_arithmetic_bound_holds_against_mpmath() {
    let doc: J = serde_json::from_str(include_str!("../fixtures/float_refs.json")).unwrap();
    let cases = doc["cases"].as_array().unwrap();
    assert!(cases.len() >= 300);
    let (mut worst, mut evaluated) = (0.0f64, 0);
    for case in cases {
        let expr = case["expr"].as_str().unwrap();
        let p = |k: usize| case["value"][k].as_str().unwrap().parse::<f64>().unwrap();
        let want = C64::new(p(0), p(1));
        // A division by a value whose bound holds 0 has no value (an honest refusal).
        let Some((got, bound)) = value_of(expr) else { continue };
        evaluated += 1;
        let diff = (got - want).norm();
        // The reference is a double rounded from 40 digits.
        let allowed = bound + 2.0 * f64::EPSILON * want.norm();
        assert!(diff <= allowed, "{expr}: kelp {got} ± {bound:.2e}, mpmath {want}, difference {diff:.2e}");
        if bound > 0.0 {
            worst = worst.max(diff / allowed);
        }
    }
    assert!(evaluated >= 290, "only {evaluated} evaluated");
    println!("float audit: worst observed/stated {worst:.3} over {evaluated} expressions");
}

#[test]
fn rounding_level_claims_are_decided_right_or_left_open() {
    // sqrt 2 = 1.41421356237309504880... (common practice, no source), so each of these is
    // true; kelp may leave one undecided but must never call it false.
    let src = "let s = 2^(1/2)\n\
               expect 2^(1/2) < 1.4142135623730951\n\
               expect 2^(1/2) > 1.4142135623730950\n\
               expect s * s == 2 within 1e-20\n\
               expect s * s == 2 within 1e-12\n\
               expect (1 + 1e-17i) * (1 - 1e-17i) == 1 within 1e-30\n\
               expect abs(3 + 4i) == 5 within 1e-30\n";
    let c = check(src);
    let e = evaluate(&c, src, &Mode::Check);
    let passed: Vec<Option<bool>> = e.expectations.iter().map(|x| x.passed).collect();
    assert!(passed.iter().all(|p| *p != Some(false)), "{passed:?}");
    // The wide ones and the exact ones are decided.
    assert_eq!(passed[3], Some(true));
    assert_eq!(passed[4], Some(true), "(1 + 1e-17 i)(1 - 1e-17 i) = 1 + 1e-34 exactly");
    assert_eq!(passed[5], Some(true), "|3 + 4i| = 5 exactly");
    // And false ones at the rounding level are false or open, never true.
    let src = "let s = 2^(1/2)\n\
               expect s < 1.41421356237309\n\
               expect s * s == 2.000000000000001 within 1e-20\n";
    let c = check(src);
    let e = evaluate(&c, src, &Mode::Check);
    assert!(e.expectations.iter().all(|x| x.passed != Some(true)));
}
