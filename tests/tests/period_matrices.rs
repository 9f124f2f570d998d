//! `a_periods`, `b_periods` and `differentials` against outside references: in genus 1 the
//! period lattice of the Legendre curve y^2 = x (x - 1)(x - l), 0 < l < 1, is spanned by
//! 4 K(l) and 4 i K(1 - l) (K the complete elliptic integral with parameter m; substitute
//! x = l sin^2 t in the integral over [0, l], common practice, no source; values from
//! mpmath 1.3.0 `ellipk` at 30 digits, computed for this test); in every genus Riemann's
//! bilinear relations A^T B = B^T A and i (A^* B - B^* A) positive definite (Griffiths &
//! Harris, *Principles of Algebraic Geometry*, ch. 2.2).

mod fixture;

use kelp_evaluator::num::Num;
use kelp_evaluator::Value;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

/// The matrix bound to `name`, with its bound.
fn matrix(e: &kelp_evaluator::Evaluation, name: &str) -> (DMatrix<C64>, f64) {
    let v = e.values.iter().find(|v| v.name == name).unwrap_or_else(|| panic!("{name}: {:?}", e.diagnostics));
    let Value::Matrix(rows) = &v.value.value else { panic!("{name} is {}", v.value.value) };
    let n = |x: &Num| match x {
        Num::Complex(c) => *c,
        other => C64::new(other.to_real().unwrap(), 0.0),
    };
    let m = DMatrix::from_fn(rows.len(), rows[0].len(), |i, j| n(&rows[i][j]));
    (m, v.value.error_bound)
}

/// (l as text, 4 K(l), 4 K(1 - l)).
const LEGENDRE: &[(&str, f64, f64)] = &[
    ("1/3", 6.9356675410317401003, 8.1158364109952597106),
    ("1/10", 6.4497653948808775929, 10.312368453392692753),
    // Near-degenerate: two branch points 1e-3 apart (hostile for the quadrature).
    ("1/1000", 6.2847569876933776733, 19.364530242201188121),
    ("999/1000", 19.364530242201188121, 6.2847569876933776733),
];

/// Moved and scaled copies: y^2 = (x - c)(x - c - s)(x - c - s l) is the Legendre curve
/// under x = c + s u, y = s^(3/2) v, so dx/y = s^(-1/2) du/v and its lattice is the
/// Legendre lattice times s^(-1/2) (s a square of a rational: the factor is exact).
/// (c, s, s^(-1/2)) as text and number.
const MOVES: &[(&str, &str, f64)] = &[
    ("0", "1", 1.0),
    ("1000", "1", 1.0),
    ("-7/3", "9/100", 10.0 / 3.0),
    ("0", "1/10000", 100.0),
    ("25", "10000", 0.01),
];

#[test]
fn genus_one_periods_span_the_legendre_lattice() {
    for &(l, w1, w2) in LEGENDRE {
        for &(c, sc, factor) in MOVES {
            let (w1, w2) = (w1 * factor, w2 * factor);
            for reduce in ["true", "false"] {
                let src = format!(
                    "curve E: y^2 = (x - {c})*(x - {c} - {sc})*(x - {c} - {sc}*{l})\nlet A = a_periods(E, reduce = {reduce})\nlet B = b_periods(E, reduce = {reduce})\nlet D = differentials(E)\n"
                );
                let e = fixture::eval(&src);
                let (a, ea) = matrix(&e, "A");
                let (b, eb) = matrix(&e, "B");
                let (a, b) = (a[(0, 0)], b[(0, 0)]);
                // Each period is m w1 + n i w2 with integers m, n; within its bound (the
                // reference's own rounding, a few units in the last place, on top).
                for (p, err) in [(a, ea), (b, eb)] {
                    let (m, n) = ((p.re / w1).round(), (p.im / w2).round());
                    let miss = (p - C64::new(m * w1, n * w2)).norm();
                    // (Unmoved cases keep the strict comparison they always had.)
                    let slack = if factor == 1.0 { 0.0 } else { 4.0 * f64::EPSILON * (m.abs() * w1 + n.abs() * w2) };
                    assert!(miss <= err + slack, "{src}: {p} is {miss:e} off the lattice, bound {err:e}");
                    assert!(m != 0.0 || n != 0.0);
                }
                // Together they span it: the parallelogram has the lattice's area w1 w2.
                let area = (a.conj() * b).im.abs();
                let area_err = a.norm() * eb + b.norm() * ea + ea * eb;
                assert!((area - w1 * w2).abs() <= area_err + 1e-15 * w1 * w2, "{src}: area {area} vs {}", w1 * w2);
                let d = e.values.iter().find(|v| v.name == "D").unwrap();
                assert_eq!(d.value.value.to_string(), "[\"dx/y\"]");
            }
        }
    }
}

#[test]
fn periods_satisfy_riemanns_bilinear_relations() {
    for curve in [
        "y^2 = x^5 - x + 1",
        "y^2 = x*(x^2 - 1)*(x^2 - 4)*(x - 1/2)",
        "y^3 = x^4 + 1",
        "y^2 = x^7 + 3*x^2 - 1",
        "x^4 + y^4 - 1",
    ] {
        for reduce in ["true", "false"] {
            let src = format!(
                "curve C: {curve}\nlet A = a_periods(C, reduce = {reduce})\nlet B = b_periods(C, reduce = {reduce})\nlet D = differentials(C)\n"
            );
            let e = fixture::eval(&src);
            let (a, ea) = matrix(&e, "A");
            let (b, eb) = matrix(&e, "B");
            let g = a.nrows();
            let forms = e.values.iter().find(|v| v.name == "D").unwrap();
            let Value::List(forms) = &forms.value.value else { panic!() };
            assert_eq!(forms.len(), g, "{curve}: one differential per row");
            // Rows are differentials, columns cycles: the first relation is A B^T = B A^T.
            let s = &a * b.transpose() - &b * a.transpose();
            let amax = a.iter().map(|v| v.norm()).fold(0.0, f64::max);
            let bmax = b.iter().map(|v| v.norm()).fold(0.0, f64::max);
            let bound =
                2.0 * g as f64 * (amax * eb + bmax * ea + ea * eb) + 8.0 * g as f64 * f64::EPSILON * amax * bmax;
            let worst = s.iter().map(|v| v.norm()).fold(0.0, f64::max);
            assert!(worst <= bound, "{curve}, reduce = {reduce}: A B^T - B A^T = {worst:e}, bound {bound:e}");
            // The second: i (A conj(B)^T - B conj(A)^T) is Hermitian positive definite.
            let h = (&a * b.adjoint() - &b * a.adjoint()) * C64::new(0.0, 1.0);
            let herm = DMatrix::from_fn(g, g, |i, j| (h[(i, j)] + h[(j, i)].conj()) * 0.5);
            // A Hermitian H is positive definite iff its real 2g form [[Re, -Im], [Im, Re]] is.
            let mut real = DMatrix::<f64>::zeros(2 * g, 2 * g);
            for i in 0..g {
                for j in 0..g {
                    let z = herm[(i, j)];
                    real[(i, j)] = z.re;
                    real[(i + g, j + g)] = z.re;
                    real[(i, j + g)] = -z.im;
                    real[(i + g, j)] = z.im;
                }
            }
            let min = nalgebra::linalg::SymmetricEigen::new(real).eigenvalues.min();
            assert!(min > bound, "{curve}, reduce = {reduce}: smallest eigenvalue {min:e} (bound {bound:e})");
        }
    }
}

// The cycles behind tau are a symplectic basis: their intersection numbers, computed from
// the lifted cycles' own, form [[0, I], [-I, 0]] (the definition of a canonical homology
// basis; common practice, e.g. Farkas & Kra, *Riemann Surfaces*, III.1), before and after
// Siegel's reduction, on both routes.
#[test]
fn the_homology_basis_is_symplectic() {
    for c in ["y^2 = x^5 - x + 1", "y^3 = x^4 - 2*x^2 + 0.5*x + 1", "y^2 = x^8 + 3*x - 1", "x^3*y + y^3 + x"] {
        for reduce in ["true", "false"] {
            let src = format!("curve C: {c}\nlet I = intersection_matrix(C, reduce = {reduce})\nlet T = tau(C)\n");
            let e = fixture::eval(&src);
            let v =
                &e.values.iter().find(|v| v.name == "I").unwrap_or_else(|| panic!("{src}: {:?}", e.diagnostics)).value;
            let kelp_evaluator::Value::Matrix(rows) = &v.value else { panic!() };
            let n = rows.len();
            let g = n / 2;
            for (i, row) in rows.iter().enumerate() {
                for (j, x) in row.iter().enumerate() {
                    let want = if j == i + g {
                        1.0
                    } else if i == j + g {
                        -1.0
                    } else {
                        0.0
                    };
                    assert!(x.is_exact() && x.to_complex().re == want, "{c} reduce = {reduce}: [{i}, {j}] = {x}");
                }
            }
        }
    }
}
