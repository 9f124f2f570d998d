//! `siegel_transform`, `siegel_reduced` and `symplectic_act` against outside facts: the
//! modular invariance of j in genus 1 (Serre, *A Course in Arithmetic*, VII.3); the group
//! action (G2 G1).T = G2.(G1.T) and the inverse G^-1 = -J G^T J of a symplectic matrix
//! (common practice, no source); Siegel's reduced domain, |Re T_ij| <= 1/2 and |T_11| >= 1
//! (Deconinck, Heil, Bobenko, van Hoeij, Schmies, Math. Comp. 73 (2004), section 6).

mod fixture;

use kelp_evaluator::num::Num;
use kelp_evaluator::theta::siegel::j_form;
use kelp_evaluator::Value;
use kelp_lang::Code;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

fn matrix(e: &kelp_evaluator::Evaluation, name: &str) -> (DMatrix<C64>, f64) {
    let v = e.values.iter().find(|v| v.name == name).unwrap_or_else(|| panic!("{name}: {:?}", e.diagnostics));
    let Value::Matrix(rows) = &v.value.value else { panic!("{name} is {}", v.value.value) };
    (DMatrix::from_fn(rows.len(), rows[0].len(), |i, j| Num::to_complex(&rows[i][j])), v.value.error_bound)
}

fn int_text(m: &DMatrix<i64>) -> String {
    let rows: Vec<String> =
        m.row_iter().map(|r| format!("[{}]", r.iter().map(|v| v.to_string()).collect::<Vec<_>>().join(", "))).collect();
    format!("[{}]", rows.join(", "))
}

/// A random word in the generators of Sp(2g, Z): J, translations [[I, S], [0, I]] with S
/// symmetric, and [[U, 0], [0, U^-T]] with U elementary (common practice, no source).
fn random_symplectic(g: usize, seed: &mut u64, len: usize) -> DMatrix<i64> {
    let mut next = |n: u64| {
        *seed ^= *seed << 13;
        *seed ^= *seed >> 7;
        *seed ^= *seed << 17;
        (*seed % n) as i64
    };
    let mut m = DMatrix::<i64>::identity(2 * g, 2 * g);
    for _ in 0..len {
        let step = match next(3) {
            0 => j_form(g),
            1 => {
                let mut t = DMatrix::<i64>::identity(2 * g, 2 * g);
                let (i, k) = (next(g as u64) as usize, next(g as u64) as usize);
                let s = next(5) - 2;
                t[(i, g + k)] += s;
                if i != k {
                    t[(k, g + i)] += s;
                }
                t
            }
            _ => {
                // U = I + s E_ik (i != k), U^-T = I - s E_ki.
                let mut t = DMatrix::<i64>::identity(2 * g, 2 * g);
                if g > 1 {
                    let i = next(g as u64) as usize;
                    let k = (i + 1 + next(g as u64 - 1) as usize) % g;
                    let s = next(3) - 1;
                    t[(i, k)] = s;
                    t[(g + k, g + i)] = -s;
                }
                t
            }
        };
        m = step * m;
    }
    m
}

#[test]
fn j_is_invariant_under_random_modular_transformations() {
    let mut seed = 0x9e37_79b9_7f4a_7c15u64;
    // Hostile among them: Im tau down to 0.01 near the boundary Re = 1/2, and long words
    // (entries in the hundreds or more).
    for tau in ["0.3 + 0.05i", "0.1 + 1.2i", "-0.45 + 0.9i", "0.5 + 0.02i", "0.499 + 0.01i"] {
        for len in [3, 6, 12, 20, 30, 40] {
            let g = random_symplectic(1, &mut seed, len);
            let src = format!(
                "let T = [[{tau}]]\nlet S = symplectic_act({}, T)\nlet a = j_invariant(T)\nlet b = j_invariant(S)\nlet R = siegel_reduced(T)\nlet c = j_invariant(R)\n",
                int_text(&g)
            );
            let e = fixture::eval(&src);
            let val = |n: &str| {
                let v = e.values.iter().find(|v| v.name == n).unwrap_or_else(|| panic!("{n}: {:?}", e.diagnostics));
                let Value::Num(x) = &v.value.value else { panic!() };
                (x.to_complex(), v.value.error_bound)
            };
            let (a, ea) = val("a");
            for n in ["b", "c"] {
                let (b, eb) = val(n);
                assert!((a - b).norm() <= ea + eb, "{src}: j {a} vs {b} ({:e} > {:e})", (a - b).norm(), ea + eb);
            }
        }
    }
}

#[test]
fn the_action_composes_and_inverts_within_the_bounds() {
    let mut seed = 0x2545_f491_4f6c_dd1du64;
    let taus = [
        "[[0.2 + 1.1i, 0.3 + 0.2i], [0.3 + 0.2i, -0.1 + 0.9i]]",
        "[[1.3i, 0.1, 0.2i], [0.1, 1.1i, -0.3], [0.2i, -0.3, 0.9i + 0.4]]",
    ];
    for tau in taus {
        let g = tau.matches("],").count() + 1;
        for _ in 0..4 {
            let g1 = random_symplectic(g, &mut seed, 5);
            let g2 = random_symplectic(g, &mut seed, 5);
            let inv = -(j_form(g) * g1.transpose() * j_form(g));
            assert_eq!(&inv * &g1, DMatrix::identity(2 * g, 2 * g));
            let src = format!(
                "let T = {tau}\nlet A = symplectic_act({}, symplectic_act({}, T))\nlet B = symplectic_act({}, T)\nlet C = symplectic_act({}, symplectic_act({}, T))\n",
                int_text(&g2),
                int_text(&g1),
                int_text(&(&g2 * &g1)),
                int_text(&inv),
                int_text(&g1)
            );
            let e = fixture::eval(&src);
            let (a, ea) = matrix(&e, "A");
            let (b, eb) = matrix(&e, "B");
            let (c, ec) = matrix(&e, "C");
            let (t, _) = matrix(&e, "T");
            let d1 = (&a - &b).iter().map(|v| v.norm()).fold(0.0, f64::max);
            assert!(d1 <= ea + eb, "{src}: (G2 G1).T differs by {d1:e}, bounds {ea:e} + {eb:e}");
            let d2 = (&c - &t).iter().map(|v| v.norm()).fold(0.0, f64::max);
            assert!(d2 <= ec + 1e-16, "{src}: G^-1.(G.T) differs by {d2:e}, bound {ec:e}");
        }
    }
}

#[test]
fn siegel_reduced_matrices_lie_in_the_reduced_domain() {
    for tau in [
        "[[0.3 + 0.05i]]",
        "[[0.2 + 0.1i, 0.3 + 0.02i], [0.3 + 0.02i, -0.1 + 0.15i]]",
        "[[2.7 + 0.4i, 1.1 + 0.1i], [1.1 + 0.1i, -3.3 + 0.2i]]",
    ] {
        let src = format!(
            "let T = {tau}\nlet R = siegel_reduced(T)\nlet G = siegel_transform(T)\nlet S = symplectic_act(G, T)\n"
        );
        let e = fixture::eval(&src);
        let (r, er) = matrix(&e, "R");
        let (s, es) = matrix(&e, "S");
        assert!(r.iter().all(|v| v.re.abs() <= 0.5 + er + 1e-12), "{src}: {r}");
        assert!(r[(0, 0)].norm() >= 1.0 - er - 1e-12, "{src}: {r}");
        let d = (&r - &s).iter().map(|v| v.norm()).fold(0.0, f64::max);
        assert!(d <= er + es, "{src}");
    }
}

#[test]
fn non_symplectic_matrices_are_refused_naming_the_relation() {
    for (g, why) in [
        ("[[1, 1], [0, 2]]", "A^T D - C^T B is not the identity"),
        ("[[1, 0.5], [0, 1]]", "not a whole number"),
        ("[[1, 0, 0, 0], [0, 1, 0, 0], [1, 0, 1, 0], [0, 0, 0, 1]]", "for a 1 x 1 Riemann matrix is 2 x 2"),
    ] {
        let src = format!("let S = symplectic_act({g}, [[1.5i]])\n");
        let e = fixture::eval(&src);
        let d = e.diagnostics.iter().find(|d| d.is_error()).unwrap_or_else(|| panic!("{src}: accepted"));
        assert!(d.message.contains(why), "{src}: {}", d.message);
        assert_eq!(d.code, Code::WrongKind);
    }
    // In genus 2: [[A, 0], [C, I]] with A = I and C not symmetric breaks A^T C = C^T A.
    let e = fixture::eval(
        "let S = symplectic_act([[1, 0, 0, 0], [0, 1, 0, 0], [0, 1, 1, 0], [0, 0, 0, 1]], [[1i, 0], [0, 1i]])\n",
    );
    let d = e.diagnostics.iter().find(|d| d.is_error()).unwrap();
    assert!(d.message.contains("A^T C is not symmetric"), "{}", d.message);
}
