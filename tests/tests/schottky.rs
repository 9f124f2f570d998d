//! `schottky_value` against what is known of Igusa's form J = 2^g sum theta_m^16 -
//! (sum theta_m^8)^2 (Igusa, Amer. J. Math. 103 (1981), from memory): it vanishes
//! identically in genus 1, 2 and 3 (the theta series of the lattices E8 + E8 and D16+
//! agree there), and in genus 4 exactly on the closure of the Jacobian locus, so Riemann
//! matrices of genus-4 curves give 0 and a generic symmetric matrix with positive definite
//! imaginary part does not.

mod fixture;

use kelp_evaluator::Value;

fn value_of(src: &str) -> (f64, f64) {
    let e = fixture::eval(src);
    let v = e.values.iter().find(|v| v.name == "s").unwrap_or_else(|| panic!("{src}: {:?}", e.diagnostics));
    let Value::Num(n) = &v.value.value else { panic!() };
    (n.to_complex().re, v.value.error_bound)
}

#[test]
fn vanishes_identically_below_genus_four() {
    for t in [
        "[[0.3 + 1.1i]]",
        "[[0.1 + 0.9i, 0.2 + 0.3i], [0.2 + 0.3i, -0.4 + 1.2i]]",
        "[[0.45 + 1.3i, 0.1 - 0.2i, -0.3 + 0.1i], [0.1 - 0.2i, 0.2 + 0.8i, 0.25 + 0.2i], [-0.3 + 0.1i, 0.25 + 0.2i, -0.1 + 1.1i]]",
    ] {
        let (v, e) = value_of(&format!("let s = schottky_value({t})\n"));
        assert!(v <= e, "{t}: {v:e} > {e:e}");
        assert!(e < 1e-9, "{t}: bound {e:e}");
    }
}

#[test]
fn vanishes_on_genus_four_jacobians() {
    // Genus 4: y^2 = f of degree 9 (hyperelliptic) and y^3 = f of degree 5 (trigonal).
    for c in ["y^2 = x^9 - 2*x^5 + x^2 - 3*x + 1", "y^3 = x^5 - 2*x^2 + x + 3", "y^2 = x^10 - x^3 + 2"] {
        let (v, e) = value_of(&format!("curve C: {c}\nlet s = schottky_value(tau(C))\n"));
        assert!(v <= e, "{c}: {v:e} > {e:e}");
        assert!(e < 1e-7, "{c}: bound {e:e}");
    }
}

#[test]
fn does_not_vanish_off_the_locus() {
    // A generic indecomposable 4 x 4 Riemann matrix (invented entries; the Jacobian locus
    // has codimension 1 in genus 4, so a generic matrix is off it).
    let t = "[[0.1 + 1.2i, 0.3 + 0.2i, -0.2 + 0.1i, 0.15 - 0.25i], [0.3 + 0.2i, -0.35 + 1.1i, 0.05 + 0.3i, 0.2 + 0.1i], [-0.2 + 0.1i, 0.05 + 0.3i, 0.4 + 1.3i, -0.1 + 0.2i], [0.15 - 0.25i, 0.2 + 0.1i, -0.1 + 0.2i, 0.25 + 0.95i]]";
    let (v, e) = value_of(&format!("let s = schottky_value({t})\n"));
    assert!(v > 1e3 * e && v > 1e-4, "{v:e} (bound {e:e})");
    // The same value for an Sp(8, Z) image (scale-free invariant): the inversion J.
    let j = "[[0,0,0,0,-1,0,0,0],[0,0,0,0,0,-1,0,0],[0,0,0,0,0,0,-1,0],[0,0,0,0,0,0,0,-1],[1,0,0,0,0,0,0,0],[0,1,0,0,0,0,0,0],[0,0,1,0,0,0,0,0],[0,0,0,1,0,0,0,0]]";
    let (w, f) = value_of(&format!("let s = schottky_value(symplectic_act({j}, {t}))\n"));
    assert!((v - w).abs() <= e + f, "{v} vs {w}");
}
