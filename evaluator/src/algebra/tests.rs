//! Curve-level checks against classical facts (Fulton, *Algebraic Curves*; Greuel,
//! Lossen, Shustin; values of the examples worked by hand, or common practice).

use super::curve::{analyse, CurveFacts};

fn facts(eq: &str) -> CurveFacts {
    let src = format!("curve c: {eq}\n");
    let checked = kelp_lang::check(&src);
    assert!(!checked.has_errors(), "{:?}", checked.diagnostics);
    let e = checked.curves.values().next().unwrap();
    analyse(&e.poly, e.projective)
}

fn kinds(f: &CurveFacts) -> Vec<String> {
    f.rational.iter().map(|p| p.local.as_ref().map(|l| l.kind.clone()).unwrap_or_else(|e| e.clone())).collect()
}

/// Every singular point's type, irrational ones repeated by their number of conjugates.
fn all_kinds(f: &CurveFacts) -> Vec<String> {
    let mut out = kinds(f);
    for i in &f.irrational {
        let k = match &i.local {
            Some(Ok(l)) => l.kind.clone(),
            other => format!("{other:?}"),
        };
        out.extend(std::iter::repeat_n(k, i.count));
    }
    out.sort();
    out
}

#[test]
fn smooth_curves_have_the_plane_genus() {
    // Fermat curves x^d + y^d + z^d are smooth of genus (d-1)(d-2)/2; the Klein quartic
    // is smooth of genus 3 (common practice, no source).
    for d in 2..=8 {
        let f = facts(&format!("x^{d} + y^{d} + z^{d}"));
        assert!(f.smooth(), "Fermat {d}: {:?}", f.summary());
        assert_eq!(f.genus(), Ok(((d - 1) * (d - 2) / 2) as i64));
    }
    let klein = facts("x^3*y + y^3*z + z^3*x");
    assert!(klein.smooth());
    assert_eq!(klein.genus(), Ok(3));
    let elliptic = facts("y^2 = x^3 - x + 1");
    assert!(elliptic.smooth());
    assert_eq!(elliptic.genus(), Ok(1));
}

#[test]
fn classical_singular_curves() {
    // Nodal and cuspidal cubics: one singular point, genus 0 (Fulton, ch. 3 and 8).
    let node = facts("y^2 = x^3 + x^2");
    assert_eq!(kinds(&node), vec!["A1 (node)"]);
    assert_eq!(node.genus(), Ok(0));
    let cusp = facts("y^2 = x^3");
    assert_eq!(kinds(&cusp), vec!["A2 (cusp)"]);
    assert_eq!(cusp.genus(), Ok(0));
    // y^2 = x^5 - 5x^3 + 4x: smooth in the affine plane, an E8 point (delta 4) at
    // (0 : 1 : 0); genus 6 - 4 = 2 (the hyperelliptic genus floor((5-1)/2)).
    let reef = facts("y^2 = x^5 - 5*x^3 + 4*x");
    assert_eq!(reef.rational.len(), 1);
    assert_eq!(reef.rational[0].coords.iter().map(|c| c.to_string()).collect::<Vec<_>>(), ["0", "1", "0"]);
    assert_eq!(kinds(&reef), vec!["E8"]);
    assert_eq!(reef.genus(), Ok(2));
    // y^2 = x^5: an A4 at the origin (delta 2) and an E8 at (0 : 1 : 0) (delta 4):
    // genus 6 - 6 = 0 (the curve is t -> (t^2, t^5)).
    let a4 = facts("y^2 = x^5");
    let mut k = kinds(&a4);
    k.sort();
    assert_eq!(k, vec!["A4", "E8"]);
    assert_eq!(a4.genus(), Ok(0));
    // y^2 = f(x) with deg f = 6: a tacnode-like A5 at infinity (delta 3), genus 2.
    let sextic = facts("y^2 = x^6 + 3*x + 1");
    assert_eq!(sextic.genus(), Ok(2));
    // The ordinary triple point (x^2 + y^2)^2 + 3x^2 y - y^3: D4, delta 3, genus 0.
    let trip = facts("(x^2 + y^2)^2 + 3*x^2*y - y^3");
    assert_eq!(kinds(&trip), vec!["D4 (ordinary triple point)"]);
    assert_eq!(trip.genus(), Ok(0));
    // A quartic with three nodes (x^2 y^2 + y^2 z^2 + z^2 x^2, the "standard quadratic
    // transform" of a conic): genus 0.
    let three = facts("x^2*y^2 + y^2*z^2 + z^2*x^2");
    assert_eq!(kinds(&three), vec!["A1 (node)"; 3]);
    assert_eq!(three.genus(), Ok(0));
}

#[test]
fn reducible_and_non_reduced_curves_have_no_genus() {
    // y^2 = x^4 is (y - x^2)(y + x^2): a tacnode at the origin and another at infinity.
    let tac = facts("y^2 = x^4");
    assert!(kinds(&tac).contains(&"A3 (tacnode)".to_string()));
    assert!(tac.genus().unwrap_err().message().contains("reducible"));
    // Three lines, and a line times a cubic with three nodes on the line.
    assert!(facts("x*y*(x + y - 1)").genus().unwrap_err().message().contains("reducible"));
    // y (y^2 z - x^3 + x z^2): three nodes on the line y = 0, and (d-1)(d-2)/2 - 3 = 0,
    // so only the line test can tell.
    let line_cubic = facts("y*(y^2*z - x^3 + x*z^2)");
    assert!(line_cubic.genus().unwrap_err().message().contains("the curve is reducible"), "{:?}", line_cubic.genus());
    // x^2 + y^2: two conjugate lines over C.
    assert!(facts("x^2 + y^2").genus().unwrap_err().message().contains("reducible"));
    // A repeated factor.
    let double = facts("(x^2 + y^2 - 1)^2");
    assert!(double.non_reduced);
    assert!(double.genus().unwrap_err().message().contains("repeated factor"));
}

#[test]
fn irrational_singular_points_are_analysed_over_their_field() {
    // y^2 = (x^2 - 2)^2 (x + 3): nodes at the conjugate points (+-sqrt(2), 0), analysed
    // once over Q(sqrt 2), plus the E8 point at infinity of every y^2 = f(x) with
    // deg f = 5: delta 1 + 1 + 4 = 6 = (5-1)(5-2)/2, so genus 0 (indeed t^2 = x + 3
    // parametrises it; common practice, no source).
    let f = facts("y^2 = (x^2 - 2)^2*(x + 3)");
    assert!(!f.smooth());
    assert_eq!(f.singular_count(), 3);
    assert_eq!(f.genus(), Ok(0));
    let irr = &f.irrational[0];
    assert_eq!(irr.count, 2);
    assert_eq!(irr.local.as_ref().unwrap().as_ref().unwrap().kind, "A1 (node)");
    let approx = &f.irrational[0].approx;
    assert!(approx.iter().all(|(z, r)| ((z.re.abs() - 2f64.sqrt()).abs() < 1e-10) && *r < 1e-10));
}

mod invariance {
    use super::*;
    use kelp_lang::poly::Poly;
    use num_bigint::BigInt;
    use num_rational::BigRational;
    use proptest::prelude::*;

    /// F(M (x, y, z)^T) for an integer matrix M.
    fn transform(f: &Poly, m: &[i64; 9]) -> Poly {
        let lin = |r: usize| {
            (0..3).fold(Poly::zero(), |acc, k| {
                acc.add(&Poly::var(k).scale(&BigRational::from_integer(BigInt::from(m[3 * r + k]))))
            })
        };
        let (lx, ly, lz) = (lin(0), lin(1), lin(2));
        let mut out = Poly::zero();
        for (e, c) in &f.terms {
            out = out.add(&lx.pow(e[0]).mul(&ly.pow(e[1])).mul(&lz.pow(e[2])).scale(c));
        }
        out
    }

    fn det(m: &[i64; 9]) -> i64 {
        m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6])
    }

    const CURVES: [&str; 8] = [
        "y^2*z^3 - (x^2 - 2*z^2)^2*(x + 3*z)",
        "(x^2 - 3*z^2)^2 + y^4 - y^2*z^2 + y^3*z",
        "y^2*z - x^3 - x^2*z",
        "y^2*z - x^3",
        "y^2*z^3 - x^5 + 5*x^3*z^2 - 4*x*z^4",
        "(x^2 + y^2)^2 + 3*x^2*y*z - y^3*z",
        "x^2*y^2 + y^2*z^2 + z^2*x^2",
        "x^3*y + y^3*z + z^3*x",
    ];

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(24))]

        /// Genus, smoothness and the singularity types are projective invariants
        /// (common practice, no source): a random invertible change of coordinates over Q
        /// must not change them.
        #[test]
        fn genus_and_types_survive_projective_changes(which in 0usize..8, m in prop::array::uniform9(-3i64..=3)) {
            prop_assume!(det(&m) != 0);
            let src = format!("curve c: {}\n", CURVES[which]);
            let checked = kelp_lang::check(&src);
            let e = checked.curves.values().next().unwrap();
            let before = analyse(&e.poly, true);
            let after = analyse(&transform(&e.poly, &m), true);
            prop_assert_eq!(before.genus(), after.genus());
            prop_assert_eq!(before.smooth(), after.smooth());
            prop_assert_eq!(before.singular_count(), after.singular_count());
            prop_assert_eq!(all_kinds(&before), all_kinds(&after));
        }
    }
}

#[test]
fn irrational_points_are_described_by_their_exact_coordinates() {
    // (y - x/2)^2 = (x^2 - 2)^2 (x + 3): nodes at (+-sqrt(2), +-sqrt(2)/2). The analysis
    // shears to x - y (the y^2 term alone does not reach degree 5), where the nodes are
    // (t, t) with 2t^2 = 1: x = 2t = +-sqrt(2), y = t (worked by hand). The value of y
    // must be printed as it is, not rescaled like a defining polynomial.
    let f = facts("(y - x/2)^2 = (x^2 - 2)^2*(x + 3)");
    let irr = f.irrational.iter().find(|i| i.count == 2).unwrap();
    assert_eq!(irr.description, "(x - y, y) = (t, t) with t a root of 2*t^2 - 1");
    let f2 = facts("(y - 3*x/2)^2 = (x^2 - 2)^2*(x + 3)");
    let irr2 = f2.irrational.iter().find(|i| i.count == 2).unwrap();
    // Nodes at (+-sqrt(2), +-3 sqrt(2)/2): x - y = -x/2 = t, so y = -3t, 8 t^2 = 4.
    assert_eq!(irr2.description, "(x - y, y) = (t, -3*t) with t a root of 2*t^2 - 1");
    assert_eq!(irr.local.as_ref().unwrap().as_ref().unwrap().kind, "A1 (node)");
}

// y^3 = x^12 + x^5 - 7: the singular point at infinity leaves room for a factor of degree 2
// by the Bezout count alone; Capelli's theorem (Lang, Algebra, VI 9.1) settles
// irreducibility, and the genus is Riemann–Hurwitz's ((m-1)(n-1) + 1 - gcd(m, n)) / 2 = 10,
// the same count the period code's differentials give.
#[test]
fn superelliptic_curves_are_irreducible_by_capelli() {
    let f = facts("y^3 = x^12 + x^5 - 7");
    assert!(f.capelli_irreducible);
    assert_eq!(f.genus(), Ok(10));
    // y^2 = (x^2 - 1)^2 is not square-free: no certificate, and it is reducible.
    assert!(!facts("y^2 = (x^2 - 1)^2").capelli_irreducible);
}
