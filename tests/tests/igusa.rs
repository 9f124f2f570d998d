//! `igusa_invariants` two ways that must agree: from the curve's equation (roots of f) and
//! from its Riemann matrix (Rosenhain's form from theta constants, through Thomae's
//! formula; Mumford, *Tata Lectures on Theta II*, IIIa), in the reduced and the unreduced
//! basis and after random changes of basis by Sp(4, Z) generators; the same from an
//! isomorphic model (x -> 1/x reverses f: y^2 = x^6 f(1/x); common practice, no source);
//! different curves give different invariants (a control that can fail).

mod fixture;

use kelp_evaluator::Value;
use num_complex::Complex64 as C64;

fn triple(e: &kelp_evaluator::Evaluation, name: &str) -> (Vec<C64>, f64) {
    let v = &e.values.iter().find(|v| v.name == name).unwrap_or_else(|| panic!("{name}: {:?}", e.diagnostics)).value;
    let Value::Vector(xs) = &v.value else { panic!() };
    (xs.iter().map(|x| x.to_complex()).collect(), v.error_bound)
}

fn agree(a: &(Vec<C64>, f64), b: &(Vec<C64>, f64)) -> bool {
    a.0.iter().zip(&b.0).all(|(x, y)| (x - y).norm() <= a.1 + b.1)
}

const CURVES: [&str; 5] = [
    "y^2 = x^5 - 3*x^3 + x + 0.5",
    "y^2 = 2*x^6 - x^5 + 3*x^3 - 0.5*x + 1.25",
    "y^2 = x^5 - x + 1",
    "y^2 = x^6 + 7*x^4 - 2*x + 11",
    "y^2 = 3*x^5 + 20*x^2 - 1",
];

#[test]
fn theta_route_meets_the_curve_route() {
    let word = "[[0, 0, -1, 0], [0, 1, 0, 1], [1, 0, 1, 0], [0, 0, 0, 1]]";
    for c in CURVES {
        let src = format!(
            "curve C: {c}\nlet a = igusa_invariants(C)\nlet b = igusa_invariants(tau(C))\nlet u = igusa_invariants(tau(C, reduce = false))\nlet w = igusa_invariants(symplectic_act({word}, tau(C)))\n"
        );
        let e = fixture::eval(&src);
        let a = triple(&e, "a");
        for other in ["b", "u", "w"] {
            let b = triple(&e, other);
            assert!(agree(&a, &b), "{c} {other}: {:?} vs {:?}", a, b);
            // Bounds that say something: relative 1e-6 at most.
            let size = b.0.iter().map(|v| v.norm()).fold(1.0, f64::max);
            assert!(b.1 <= 1e-6 * size, "{c} {other}: bound {:e}", b.1);
        }
    }
}

#[test]
fn isomorphic_models_agree_and_different_curves_differ() {
    // y^2 = x^5 - x + 1 and its reversal y^2 = x^6 (x^-5 - x^-1 + 1) = x + ... : x^6 - x^5 + x.
    let e = fixture::eval("curve A: y^2 = x^5 - x + 1\ncurve B: y^2 = x^6 - x^5 + x\nlet a = igusa_invariants(A)\nlet b = igusa_invariants(B)\n");
    assert!(agree(&triple(&e, "a"), &triple(&e, "b")));
    let e = fixture::eval(&format!(
        "curve A: {}\ncurve B: {}\nlet a = igusa_invariants(A)\nlet b = igusa_invariants(tau(B))\n",
        CURVES[0], CURVES[2]
    ));
    assert!(!agree(&triple(&e, "a"), &triple(&e, "b")));
}

// Hostile models: clustered roots (near-singular), coefficients near 1e6, and a curve moved
// by x -> x + 50 (the invariants do not change under translation; common practice, no
// source): both routes must still agree within their bounds, and the moved model must
// agree with the original.
#[test]
fn hostile_models() {
    for hostile in ["y^2 = x*(x - 0.001)*(x - 1)*(x + 2)*(x - 3)", "y^2 = x^5 - 1000000*x^2 + 3*x + 7"] {
        let e = fixture::eval(&format!(
            "curve C: {hostile}\nlet a = igusa_invariants(C)\nlet b = igusa_invariants(tau(C))\n"
        ));
        let (a, b) = (triple(&e, "a"), triple(&e, "b"));
        assert!(agree(&a, &b), "{hostile}: {a:?} vs {b:?}");
    }
    // (x + 50)^5 - (x + 50) + 1, expanded exactly (sympy 1.14 expand).
    let moved = "y^2 = x^5 + 250*x^4 + 25000*x^3 + 1250000*x^2 + 31249999*x + 312499951";
    let e = fixture::eval(&format!(
        "curve A: y^2 = x^5 - x + 1\ncurve B: {moved}\nlet a = igusa_invariants(A)\nlet b = igusa_invariants(B)\nlet c = igusa_invariants(tau(B))\n"
    ));
    let (a, b, c) = (triple(&e, "a"), triple(&e, "b"), triple(&e, "c"));
    assert!(agree(&a, &b), "moved roots: {a:?} vs {b:?}");
    assert!(agree(&a, &c), "moved matrix: {a:?} vs {c:?}");
}
