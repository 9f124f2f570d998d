//! Identities of theta functions (classical facts, stated in DLMF ch. 21 and in the
//! project's conventions): they test the engine without any reference value.

use super::siegel::{act, j_form, siegel_reduce};
use super::*;

fn c(re: f64, im: f64) -> C64 {
    C64::new(re, im)
}

/// An invented genus-3 matrix with a moderately skewed imaginary part.
fn tau3() -> DMatrix<C64> {
    DMatrix::from_row_slice(
        3,
        3,
        &[
            c(0.31, 1.20),
            c(-0.12, 0.35),
            c(0.05, -0.20),
            c(-0.12, 0.35),
            c(0.44, 0.95),
            c(0.21, 0.10),
            c(0.05, -0.20),
            c(0.21, 0.10),
            c(-0.27, 1.40),
        ],
    )
}

fn z3() -> Vec<C64> {
    vec![c(0.13, -0.21), c(-0.4, 0.33), c(0.27, 0.05)]
}

const ACC: f64 = 1e-13;

fn close(a: C64, b: C64, tol: f64) -> bool {
    (a - b).norm() <= tol
}

#[test]
fn periodicity_and_quasi_periodicity_in_z() {
    let t = tau3();
    let ctx = ThetaContext::new(&t, 1e-14).unwrap();
    let z = z3();
    let base = ctx.eval(&z, None, &[], ACC).unwrap().full();
    for j in 0..3 {
        // theta(z + e_j) = theta(z)
        let mut zp = z.clone();
        zp[j] += 1.0;
        let v = ctx.eval(&zp, None, &[], ACC).unwrap().full();
        assert!(close(v, base, 1e-11), "period e_{j}: {v} vs {base}");
        // theta(z + tau e_j) = exp(-pi i tau_jj - 2 pi i z_j) theta(z)
        let zq: Vec<C64> = (0..3).map(|i| z[i] + t[(i, j)]).collect();
        let v = ctx.eval(&zq, None, &[], ACC).unwrap().full();
        let f = (c(0.0, -PI) * t[(j, j)] - c(0.0, 2.0 * PI) * z[j]).exp();
        assert!(close(v, f * base, 1e-10 * (1.0 + (f * base).norm())), "quasi-period {j}");
    }
    // With characteristics: theta[a;b](z + e_j) = exp(2 pi i a_j) theta[a;b](z).
    let ch = Characteristic { a: vec![0.5, 0.0, 0.5], b: vec![0.0, 0.5, 0.5] };
    let v0 = ctx.eval(&z, Some(&ch), &[], ACC).unwrap().full();
    let mut zp = z.clone();
    zp[0] += 1.0;
    let v1 = ctx.eval(&zp, Some(&ch), &[], ACC).unwrap().full();
    assert!(close(v1, -v0, 1e-11));
}

/// d theta / d tau_jk by a Cauchy integral over a small circle (spectrally accurate, and
/// independent of the engine's derivative code).
fn dtheta_dtau(t: &DMatrix<C64>, z: &[C64], j: usize, k: usize) -> C64 {
    let (r, n) = (0.05, 24);
    let mut s = c(0.0, 0.0);
    for i in 0..n {
        let e = c(0.0, 2.0 * PI * i as f64 / n as f64).exp();
        let mut tp = t.clone();
        tp[(j, k)] += e * r;
        if j != k {
            tp[(k, j)] += e * r;
        }
        let v = ThetaContext::new(&tp, 1e-14).unwrap().eval(z, None, &[], 1e-15).unwrap().full();
        s += v / e;
    }
    s / (n as f64 * r)
}

#[test]
fn heat_equation() {
    // d^2 theta / dz_j dz_k = 2 pi i (1 + delta_jk) d theta / d tau_jk, with tau_jk = tau_kj
    // moved together.
    let t = tau3();
    let z = z3();
    let ctx = ThetaContext::new(&t, 1e-14).unwrap();
    for (j, k) in [(0, 0), (0, 1), (1, 2), (2, 2)] {
        let mut ej = vec![c(0.0, 0.0); 3];
        ej[j] = c(1.0, 0.0);
        let mut ek = vec![c(0.0, 0.0); 3];
        ek[k] = c(1.0, 0.0);
        let lhs = ctx.eval(&z, None, &[ej, ek], ACC).unwrap().full();
        let delta = if j == k { 2.0 } else { 1.0 };
        let rhs = c(0.0, 2.0 * PI) * delta * dtheta_dtau(&t, &z, j, k);
        assert!(close(lhs, rhs, 1e-8 * (1.0 + lhs.norm())), "({j},{k}): {lhs} vs {rhs}");
    }
}

#[test]
fn parity_of_characteristics() {
    let t = tau3();
    let ctx = ThetaContext::new(&t, 1e-14).unwrap();
    let z = z3();
    let mz: Vec<C64> = z.iter().map(|v| -v).collect();
    let mut odd = 0;
    for bits in 0..64u32 {
        let a: Vec<f64> = (0..3).map(|i| ((bits >> (5 - i)) & 1) as f64 / 2.0).collect();
        let b: Vec<f64> = (0..3).map(|i| ((bits >> (2 - i)) & 1) as f64 / 2.0).collect();
        let ch = Characteristic { a, b };
        let even = ch.is_even().unwrap();
        let p = ctx.eval(&z, Some(&ch), &[], ACC).unwrap().full();
        let m = ctx.eval(&mz, Some(&ch), &[], ACC).unwrap().full();
        let sign = if even { 1.0 } else { -1.0 };
        assert!(close(m, p * sign, 1e-11), "{ch:?}");
        if !even {
            odd += 1;
            let zero = ctx.eval(&[c(0.0, 0.0); 3], Some(&ch), &[], ACC).unwrap();
            assert!(zero.full().norm() <= zero.full_error() + 1e-14);
        }
    }
    // 2^(g-1) (2^g - 1) odd characteristics (common practice, no source).
    assert_eq!(odd, 28);
}

#[test]
fn jacobi_identity_at_genus_one() {
    // theta3^4 = theta2^4 + theta4^4 at z = 0 (DLMF 20.7.3).
    for t in [c(0.0, 1.0), c(0.3, 0.7), c(-0.45, 0.2), c(2.1, 1.9)] {
        let ctx = ThetaContext::new(&DMatrix::from_element(1, 1, t), 0.0).unwrap();
        let th = |a: f64, b: f64| {
            ctx.eval(&[c(0.0, 0.0)], Some(&Characteristic { a: vec![a], b: vec![b] }), &[], 1e-15).unwrap().full()
        };
        let (t3, t2, t4) = (th(0.0, 0.0), th(0.5, 0.0), th(0.0, 0.5));
        assert!(close(t3.powi(4), t2.powi(4) + t4.powi(4), 1e-11 * t3.norm().powi(4)), "{t}");
    }
}

#[test]
fn reduction_changes_the_work_not_the_value() {
    // An ill-conditioned Im tau (eigenvalues about 0.05 and 12): LLL must cut the work.
    let t = DMatrix::from_row_slice(2, 2, &[c(0.2, 6.05), c(0.1, 5.9), c(0.1, 5.9), c(-0.3, 5.8)]);
    let z = vec![c(0.1, 0.3), c(-0.2, -0.1)];
    let red = ThetaContext::new(&t, 0.0).unwrap();
    let raw = ThetaContext::with_reduction(&t, 0.0, false).unwrap();
    let d = vec![vec![c(1.0, 0.0), c(-0.5, 0.0)]];
    let (a, sa) = red.sums(&z, None, &d, &[vec![0], vec![1], vec![2]], 1e-13).unwrap();
    let (b, sb) = raw.sums(&z, None, &d, &[vec![0], vec![1], vec![2]], 1e-13).unwrap();
    for (x, y) in a.iter().zip(&b) {
        assert!(close(x.full(), y.full(), x.full_error() + y.full_error()), "{x:?} vs {y:?}");
    }
    // The same points lie in the ellipsoid either way; in the reduced basis the innermost
    // direction is the short one, so the points fall on a few long lines (two
    // exponentials each) instead of many short ones.
    assert!(sa.lines * 4 < sb.lines, "reduced {sa:?}, unreduced {sb:?}");
}

#[test]
fn block_diagonal_tau_gives_products() {
    let t1 = DMatrix::from_row_slice(2, 2, &[c(0.1, 1.1), c(0.3, 0.2), c(0.3, 0.2), c(-0.2, 0.8)]);
    let t2 = c(0.4, 0.9);
    let mut t = DMatrix::from_element(3, 3, c(0.0, 0.0));
    t.view_mut((0, 0), (2, 2)).copy_from(&t1);
    t[(2, 2)] = t2;
    let z = z3();
    let ch = Characteristic { a: vec![0.5, 0.0, 0.5], b: vec![0.0, 0.0, 0.5] };
    let big = ThetaContext::new(&t, 0.0).unwrap().eval(&z, Some(&ch), &[], ACC).unwrap().full();
    let ch1 = Characteristic { a: vec![0.5, 0.0], b: vec![0.0, 0.0] };
    let ch2 = Characteristic { a: vec![0.5], b: vec![0.5] };
    let p1 = ThetaContext::new(&t1, 0.0).unwrap().eval(&z[..2], Some(&ch1), &[], ACC).unwrap().full();
    let p2 = ThetaContext::new(&DMatrix::from_element(1, 1, t2), 0.0)
        .unwrap()
        .eval(&z[2..], Some(&ch2), &[], ACC)
        .unwrap()
        .full();
    assert!(close(big, p1 * p2, 1e-11), "{big} vs {}", p1 * p2);
}

#[test]
fn huge_imaginary_z_keeps_the_factor_apart() {
    // Quasi-periodicity moved far out: z + 40 tau e_1 has a factor exp(~ pi 40^2 Y_11).
    let t = tau3();
    let ctx = ThetaContext::new(&t, 0.0).unwrap();
    let z = z3();
    let far: Vec<C64> = (0..3).map(|i| z[i] + 40.0 * t[(i, 0)]).collect();
    let v = ctx.eval(&far, None, &[], ACC).unwrap();
    assert!(v.log_factor > 1000.0 && v.value.norm() <= 10.0 && v.value.norm().is_finite());
    // log theta(z + 40 tau e_1) = log theta(z) - pi i 1600 tau_11 - 2 pi i 40 z_1 (mod 2 pi i)
    let base = ctx.eval(&z, None, &[], ACC).unwrap().full();
    let lhs = v.log_factor + v.value.ln();
    let rhs = base.ln() + c(0.0, -PI * 1600.0) * t[(0, 0)] - c(0.0, 2.0 * PI * 40.0) * z[0];
    assert!((lhs.re - rhs.re).abs() < 1e-8, "{lhs} vs {rhs}");
    let dphase = (lhs.im - rhs.im) / (2.0 * PI);
    assert!((dphase - dphase.round()).abs() < 1e-8);
}

#[test]
fn bad_matrices_are_refused_with_the_reason() {
    let asym = DMatrix::from_row_slice(2, 2, &[c(0.0, 1.0), c(0.5, 0.0), c(0.2, 0.0), c(0.0, 1.0)]);
    assert!(matches!(ThetaContext::new(&asym, 1e-12), Err(ThetaError::NotSymmetric { .. })));
    let indefinite = DMatrix::from_row_slice(2, 2, &[c(0.0, 1.0), c(0.0, 2.0), c(0.0, 2.0), c(0.0, 1.0)]);
    match ThetaContext::new(&indefinite, 1e-12) {
        Err(ThetaError::NotPositiveDefinite { smallest }) => assert!((smallest + 1.0).abs() < 1e-12),
        other => panic!("{other:?}"),
    }
    let tiny = DMatrix::from_element(1, 1, c(0.0, 1e-14));
    let ctx = ThetaContext::new(&tiny, 0.0).unwrap();
    assert!(matches!(ctx.eval(&[c(0.0, 0.0)], None, &[], 1e-12), Err(ThetaError::TooManyPoints { .. })));
}

/// j(tau) from theta constants: lambda = theta2^4 / theta3^4,
/// j = 256 (1 - lambda + lambda^2)^3 / (lambda^2 (1 - lambda)^2) (DLMF 23.15.2 and 20.9.1).
fn j_of(t: C64) -> C64 {
    let ctx = ThetaContext::new(&DMatrix::from_element(1, 1, t), 0.0).unwrap();
    let th = |a: f64| {
        ctx.eval(&[c(0.0, 0.0)], Some(&Characteristic { a: vec![a], b: vec![0.0] }), &[], 1e-15).unwrap().full()
    };
    let l = (th(0.5) / th(0.0)).powi(4);
    256.0 * (1.0 - l + l * l).powi(3) / (l * l * (1.0 - l).powi(2))
}

#[test]
fn siegel_reduction_is_symplectic_and_keeps_invariants() {
    // j(i) = 1728 (DLMF 23.15.? handbook value; also common practice).
    assert!(close(j_of(c(0.0, 1.0)), c(1728.0, 0.0), 1e-8));
    for t in [c(0.37, 0.05), c(-3.2, 0.11), c(0.01, 0.3)] {
        let s = siegel_reduce(&DMatrix::from_element(1, 1, t)).unwrap();
        let r = s.tau[(0, 0)];
        assert!(r.norm() >= 1.0 - 1e-12 && r.re.abs() <= 0.5 + 1e-12 && r.im >= 3f64.sqrt() / 2.0 - 1e-12);
        assert!(close(j_of(r), j_of(t), 1e-7 * j_of(r).norm()), "{t}: {} vs {}", j_of(r), j_of(t));
    }
    let t = tau3().map(|v| c(v.re * 3.0, v.im * 0.2));
    let s = siegel_reduce(&t).unwrap();
    let g = &s.gamma;
    assert_eq!(g.transpose() * j_form(3) * g, j_form(3), "Gamma is symplectic");
    let mapped = act(g, &t).unwrap();
    assert!((mapped - &s.tau).iter().all(|v| v.norm() < 1e-9));
    assert!(s.tau.iter().all(|v| v.re.abs() <= 0.5 + 1e-9));
    assert!(s.tau[(0, 0)].norm() >= 1.0 - 1e-9);
    assert!(s.inversions > 0);
}

#[test]
fn a_batch_equals_single_evaluations() {
    // Points along a real line z = U x + D share Im z and so share one lattice pass.
    let t = tau3();
    let ctx = ThetaContext::new(&t, 0.0).unwrap();
    let d = z3();
    let u = [c(0.7, 0.0), c(-0.3, 0.0), c(1.1, 0.0)];
    let mut zs: Vec<Vec<C64>> = (0..12).map(|k| (0..3).map(|i| d[i] + u[i] * (k as f64 * 0.37)).collect()).collect();
    zs.push(vec![c(0.1, 0.9), c(0.0, -0.4), c(0.3, 0.2)]); // a different Im z: its own pass
    let dirs = vec![u.to_vec()];
    let monos: Vec<Vec<u32>> = (0..=4).map(|k| vec![k]).collect();
    let batch = ctx.batch(&zs, None, &dirs, &monos, 1e-13).unwrap();
    for (z, got) in zs.iter().zip(&batch) {
        let (one, _) = ctx.sums(z, None, &dirs, &monos, 1e-13).unwrap();
        for (a, b) in got.iter().zip(&one) {
            assert!(close(a.full(), b.full(), 1e-13 * (1.0 + a.full().norm())), "{a:?} vs {b:?}");
        }
    }
}

#[test]
fn genus_eight_block_diagonal_and_quasi_periodicity() {
    // tau = tau_a (+) tau_b with genus 4 + 4: theta factors (common practice, no source),
    // and quasi-periodicity holds at genus 8.
    let cases = super::bench_cases::cases();
    let four: Vec<&DMatrix<C64>> = cases.iter().filter(|c| c.tau.nrows() == 4).map(|c| &c.tau).collect();
    let mut t = DMatrix::from_element(8, 8, c(0.0, 0.0));
    t.view_mut((0, 0), (4, 4)).copy_from(four[0]);
    t.view_mut((4, 4), (4, 4)).copy_from(four[1]);
    let z: Vec<C64> = (0..8).map(|i| c(0.1 * i as f64 - 0.3, 0.05 * (i % 3) as f64)).collect();
    let ch = Characteristic { a: vec![0.5, 0.0, 0.0, 0.5, 0.0, 0.5, 0.0, 0.0], b: vec![0.0; 8] };
    let big = ThetaContext::new(&t, 0.0).unwrap().eval(&z, Some(&ch), &[], 1e-12).unwrap();
    let part = |m: &DMatrix<C64>, r: std::ops::Range<usize>| {
        let chp = Characteristic { a: ch.a[r.clone()].to_vec(), b: ch.b[r.clone()].to_vec() };
        ThetaContext::new(m, 0.0).unwrap().eval(&z[r], Some(&chp), &[], 1e-13).unwrap().full()
    };
    let prod = part(four[0], 0..4) * part(four[1], 4..8);
    assert!(close(big.full(), prod, big.full_error() + 1e-12), "{} vs {prod}", big.full());
    // theta(z + tau e_5) = exp(-pi i tau_55 - 2 pi i z_5) theta(z), characteristic zero.
    let ctx = ThetaContext::new(&t, 0.0).unwrap();
    let base = ctx.eval(&z, None, &[], 1e-12).unwrap().full();
    let zq: Vec<C64> = (0..8).map(|i| z[i] + t[(i, 5)]).collect();
    let moved = ctx.eval(&zq, None, &[], 1e-12).unwrap();
    let f = (c(0.0, -PI) * t[(5, 5)] - c(0.0, 2.0 * PI) * z[5]).exp();
    assert!(close(moved.full(), f * base, moved.full_error() + 1e-11 * (f * base).norm()));
}

#[test]
fn log_derivatives_match_a_cauchy_integral_of_log_theta() {
    // d^k/ds^k log theta(z + s d) at s = 0 by a Cauchy integral over a small circle:
    // an independent route to the same numbers (common practice, no source).
    let t = tau3();
    let ctx = ThetaContext::new(&t, 0.0).unwrap();
    let z = z3();
    let d = vec![c(0.4, 0.0), c(-0.9, 0.0), c(0.2, 0.0)];
    let jet = ctx.jet(&z, None, &d, 4, 1e-14).unwrap();
    let l = log_jet(&jet);
    let (r, n) = (0.05, 64);
    let mut fact = 1.0;
    for k in 1..=4 {
        fact *= k as f64;
        let mut s = c(0.0, 0.0);
        for i in 0..n {
            let e = c(0.0, 2.0 * PI * i as f64 / n as f64).exp();
            let zp: Vec<C64> = (0..3).map(|j| z[j] + d[j] * e * r).collect();
            let v = ctx.eval(&zp, None, &[], 1e-15).unwrap();
            s += (v.value.ln() + v.log_factor) / e.powi(k);
        }
        let want = s * fact / (n as f64 * r.powi(k));
        assert!(
            close(l[k as usize - 1].0, want, 1e-8 * (1.0 + want.norm())),
            "order {k}: {:?} vs {want}",
            l[k as usize - 1]
        );
        assert!(l[k as usize - 1].1 < 1e-9 * (1.0 + want.norm()), "{:?}", l[k as usize - 1]);
    }
}

mod properties {
    use super::*;
    use proptest::prelude::*;

    /// A random Riemann matrix of genus 1..=3: Im = A A^T + 0.3 I, Re in [-2, 2].
    fn riemann() -> impl Strategy<Value = DMatrix<C64>> {
        (1usize..=3).prop_flat_map(|g| {
            (Just(g), prop::collection::vec(-1.0f64..1.0, g * g), prop::collection::vec(-2.0f64..2.0, g * g)).prop_map(
                |(g, a, re)| {
                    let a = DMatrix::from_vec(g, g, a);
                    let y = &a * a.transpose() + DMatrix::identity(g, g) * 0.3;
                    DMatrix::from_fn(g, g, |i, j| c(re[i.min(j) * g + i.max(j)], y[(i, j)]))
                },
            )
        })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(48))]

        /// Periodicity, quasi-periodicity, parity and reduction invariance on random
        /// matrices and points (classical identities, DLMF 21.3).
        #[test]
        fn identities_hold_on_random_matrices(t in riemann(), zr in prop::collection::vec(-1.0f64..1.0, 6),
                                              j in 0usize..3, bits in 0u32..64) {
            let g = t.nrows();
            let j = j % g;
            let z: Vec<C64> = (0..g).map(|i| c(zr[i], 0.5 * zr[i + 3])).collect();
            let ch = Characteristic {
                a: (0..g).map(|i| ((bits >> i) & 1) as f64 / 2.0).collect(),
                b: (0..g).map(|i| ((bits >> (i + 3)) & 1) as f64 / 2.0).collect(),
            };
            let ctx = ThetaContext::new(&t, 0.0).unwrap();
            let raw = ThetaContext::with_reduction(&t, 0.0, false).unwrap();
            let v = ctx.eval(&z, Some(&ch), &[], 1e-13).unwrap();
            let w = raw.eval(&z, Some(&ch), &[], 1e-13).unwrap();
            prop_assert!(close(v.full(), w.full(), v.full_error() + w.full_error()));
            // theta[a;b](z + e_j) = exp(2 pi i a_j) theta[a;b](z)
            let mut zp = z.clone();
            zp[j] += 1.0;
            let p = ctx.eval(&zp, Some(&ch), &[], 1e-13).unwrap();
            let f = c(0.0, 2.0 * PI * ch.a[j]).exp();
            prop_assert!(close(p.full(), f * v.full(), p.full_error() + v.full_error()));
            // theta[a;b](z + tau e_j) = exp(-pi i tau_jj - 2 pi i (z_j + b_j)) theta[a;b](z)
            let zq: Vec<C64> = (0..g).map(|i| z[i] + t[(i, j)]).collect();
            let q = ctx.eval(&zq, Some(&ch), &[], 1e-13).unwrap();
            let f = (c(0.0, -PI) * t[(j, j)] - c(0.0, 2.0 * PI) * (z[j] + ch.b[j])).exp();
            prop_assert!(close(q.full(), f * v.full(), q.full_error() + f.norm() * v.full_error()),
                "{} vs {}", q.full(), f * v.full());
            // parity: theta[a;b](-z) = (-1)^(4 a.b) theta[a;b](z)
            let mz: Vec<C64> = z.iter().map(|x| -x).collect();
            let m = ctx.eval(&mz, Some(&ch), &[], 1e-13).unwrap();
            let sign = if ch.is_even().unwrap() { 1.0 } else { -1.0 };
            prop_assert!(close(m.full(), sign * v.full(), m.full_error() + v.full_error()));
        }
    }
}
