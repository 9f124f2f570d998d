//! The covering route's period lattices against Beta-function lattices: the Fermat quartic
//! x^4 + y^4 = 1 and Klein's quartic as y^7 = x (x - 1)^2 (Karcher & Weber, *The Eightfold
//! Way*, MSRI Publ. 35, 1998). Reference: tests/fixtures/cyclic_lattices.json, written by
//! tests/fixtures/gen/cyclic_lattices.py (mpmath; version in the fixture), which derives
//! generators of each lattice from Euler Beta integrals over lifts of real intervals and
//! checks every Beta value against mpmath.quad.
//!
//! kelp computes periods of its own differentials P(X, Y) dX / G_Y in its own coordinates
//! (after a change to general position); the reference differentials x^a (x-1)^b y^c dx are
//! expressed in that basis pointwise on the curve (a fit over many points, independent of
//! any period), and then the two lattices must coincide exactly: every reference
//! generator an integer combination of kelp's 2g periods, and the generators spanning
//! them (index 1).

use kelp_evaluator::periods::fingerprint::{fingerprint_distance, theta_fingerprint};
use kelp_evaluator::periods::general::{periods, General};
use kelp_evaluator::periods::riemann_matrix;
use nalgebra::{DMatrix, DVector};
use num_complex::Complex64 as C64;
use serde_json::Value;

fn doc() -> Value {
    serde_json::from_str(include_str!("../fixtures/cyclic_lattices.json")).unwrap()
}

fn covering(eq: &str) -> General {
    let checked = kelp_lang::check(&format!("curve c: {eq}\n"));
    assert!(!checked.has_errors(), "{eq}: {:?}", checked.diagnostics);
    let e = checked.curves.values().next().unwrap();
    let facts = kelp_evaluator::algebra::curve::analyse(&e.poly, e.projective);
    let genus = facts.genus().unwrap_or_else(|e| panic!("{eq}: {}", e.message()));
    periods(&e.poly, e.projective, &facts, genus).unwrap_or_else(|e| panic!("{eq}: {e:?}"))
}

fn c(v: &Value) -> C64 {
    C64::new(v[0].as_f64().unwrap(), v[1].as_f64().unwrap())
}

/// The g x 2g periods of the reference differentials x^a (x-1)^b y^c dx over kelp's cycles.
fn reference_periods(cov: &General, diffs: &[(i32, i32, i32)]) -> DMatrix<C64> {
    let forms = cov.periods.plane.as_ref().expect("covering-route forms");
    let (m, plane) = (forms.change, &forms.plane);
    let g = cov.periods.genus;
    // Points of the curve in kelp's chart: every root over a few x values.
    let mut rows_ours = vec![];
    let mut rows_ref = vec![];
    for t in 0..6 {
        let xx = C64::new(0.37 + 0.11 * t as f64, 0.23 - 0.07 * t as f64);
        let coeffs = plane.fibre(xx);
        for yy in kelp_evaluator::algebra::roots::aberth(&coeffs) {
            let (_, gx, gy) = plane.eval(xx, yy);
            let dy = -gx / gy;
            let n: Vec<C64> = (0..3).map(|i| m[i][0] as f64 * xx + m[i][1] as f64 * yy + m[i][2] as f64).collect();
            let nd: Vec<C64> = (0..3).map(|i| m[i][0] as f64 + m[i][1] as f64 * dy).collect();
            let (x, y) = (n[0] / n[2], n[1] / n[2]);
            let dx = (nd[0] * n[2] - n[0] * nd[2]) / (n[2] * n[2]);
            rows_ref.push(
                diffs.iter().map(|&(a, b, e)| x.powi(a) * (x - 1.0).powi(b) * y.powi(e) * dx).collect::<Vec<_>>(),
            );
            rows_ours.push(
                (0..g)
                    .map(|l| {
                        let p: C64 = forms
                            .monomials
                            .iter()
                            .enumerate()
                            .map(|(k, &(a, b))| forms.basis[(k, l)] * xx.powi(a as i32) * yy.powi(b as i32))
                            .sum();
                        p / gy
                    })
                    .collect::<Vec<_>>(),
            );
        }
    }
    let o = DMatrix::from_fn(rows_ours.len(), g, |i, l| rows_ours[i][l]);
    let r = DMatrix::from_fn(rows_ref.len(), g, |i, k| rows_ref[i][k]);
    // reference_k = sum_l C[k][l] ours_l at every point: O C^T = R.
    let ct = o.clone().svd(true, true).solve(&r, 1e-14).unwrap();
    let fit = (&o * &ct - &r).norm() / r.norm();
    assert!(fit < 1e-8, "the reference differentials are not in kelp's span (misfit {fit:.1e})");
    let pi = DMatrix::from_fn(g, 2 * g, |l, j| if j < g { cov.periods.a[(l, j)] } else { cov.periods.b[(l, j - g)] });
    ct.transpose() * pi
}

/// Coordinates of each generator in the basis of kelp's 2g periods (as vectors in R^2g).
fn coordinates(pi: &DMatrix<C64>, gens: &[Vec<C64>]) -> Vec<Vec<f64>> {
    let g = pi.nrows();
    let real = |v: &dyn Fn(usize) -> C64| DVector::from_fn(2 * g, |i, _| if i < g { v(i).re } else { v(i - g).im });
    let basis = DMatrix::from_columns(&(0..2 * g).map(|j| real(&|i| pi[(i, j)])).collect::<Vec<_>>());
    let lu = basis.lu();
    gens.iter().map(|v| lu.solve(&real(&|i| v[i])).unwrap().iter().copied().collect()).collect()
}

/// The index in Z^n of the lattice spanned by integer vectors (row reduction over Z).
fn index(mut rows: Vec<Vec<i128>>, n: usize) -> i128 {
    let mut det = 1i128;
    let mut top = 0;
    for col in 0..n {
        loop {
            let live: Vec<usize> = (top..rows.len()).filter(|&r| rows[r][col] != 0).collect();
            if live.len() <= 1 {
                let Some(&p) = live.first() else { return 0 };
                rows.swap(top, p);
                det *= rows[top][col].abs();
                top += 1;
                break;
            }
            let p = *live.iter().min_by_key(|&&r| rows[r][col].abs()).unwrap();
            for &r in &live {
                if r != p {
                    let q = rows[r][col] / rows[p][col];
                    let pivot = rows[p].clone();
                    for (x, y) in rows[r].iter_mut().zip(&pivot) {
                        *x -= q * y;
                    }
                }
            }
        }
    }
    det
}

/// Runs the comparison; returns the largest distance of a coordinate from an integer and
/// the index of the integer lattice the generators span.
fn compare(curve: &Value, scale: f64) -> (f64, i128, General) {
    let eq = curve["equation"].as_str().unwrap();
    let cov = covering(eq);
    let diffs: Vec<(i32, i32, i32)> = curve["differentials"]
        .as_array()
        .unwrap()
        .iter()
        .map(|d| (d[0].as_i64().unwrap() as i32, d[1].as_i64().unwrap() as i32, d[2].as_i64().unwrap() as i32))
        .collect();
    let gens: Vec<Vec<C64>> = curve["generators"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_array().unwrap().iter().map(|z| c(z) * scale).collect())
        .collect();
    let pi = reference_periods(&cov, &diffs);
    let coords = coordinates(&pi, &gens);
    let off = coords.iter().flatten().map(|x| (x - x.round()).abs()).fold(0.0, f64::max);
    let ints = coords.iter().map(|v| v.iter().map(|x| x.round() as i128).collect()).collect();
    (off, index(ints, 2 * cov.periods.genus), cov)
}

#[test]
fn fermat_and_klein_lattices_are_the_beta_function_lattices() {
    let doc = doc();
    for curve in doc["curves"].as_array().unwrap() {
        let name = curve["name"].as_str().unwrap();
        let (off, idx, cov) = compare(curve, 1.0);
        // Within kelp's own stated error (relative to the periods' size), which is what a
        // user is promised: measured 5e-15 for the Fermat quartic, 1e-7 for the 7-fold
        // cover, whose singular point y^7 = z^4 amplifies the adjoint basis' rounding.
        let p = &cov.periods;
        let size = p.a.iter().chain(p.b.iter()).map(|v| v.norm()).fold(0.0, f64::max);
        let tol = 1e-12 + 10.0 * (p.a_error + p.b_error) / size;
        eprintln!("{name}: off {off:.1e}, tolerance {tol:.1e}, index {idx}");
        assert!(
            off < tol,
            "{name}: a generator is off an integer combination of kelp's periods by {off:.1e} (tolerance {tol:.1e})"
        );
        assert_eq!(idx, 1, "{name}: the reference generators span a sublattice of index {idx}");
        // Control: a lattice 0.1 % larger is not kelp's.
        let (off, _, _) = compare(curve, 1.001);
        assert!(off > 1e-3, "{name}: a scaled lattice passed");
    }
}

/// The plane quartic x^3 y + y^3 z + z^3 x and the 7-fold cover y^7 = x (x-1)^2 are the same
/// curve (Karcher & Weber, cited above), so their Riemann matrices have the same
/// Sp(6, Z)-invariant fingerprint; the cover's lattice is the Beta-function lattice above.
#[test]
fn klein_plane_quartic_matches_its_cyclic_model() {
    let tau = |eq: &str| riemann_matrix(covering(eq).periods, true).unwrap();
    let (a, b) = (tau("x^3*y + y^3*z + z^3*x"), tau("y^7 = x*(x-1)^2"));
    let (fa, _) = theta_fingerprint(&a.tau).unwrap();
    let (fb, _) = theta_fingerprint(&b.tau).unwrap();
    let d = fingerprint_distance(&fa, &fb);
    assert!(d < 1e-6 && d < a.error + b.error, "fingerprints differ by {d:.2e}");
    // Control: the Fermat quartic is another genus-3 curve.
    let (fc, _) = theta_fingerprint(&tau("x^4 + y^4 = 1").tau).unwrap();
    assert!(fingerprint_distance(&fa, &fc) > 1e-3);
}
