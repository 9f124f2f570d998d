//! Riemann matrices of y^m = f(x) at the default accuracy 1e-12 (periods, symplectic
//! basis, tau, Siegel reduction). Curves are invented: f has coefficients
//! 3, -1, 4, 1, -5, 9, 2, 6, ... cycled up to the degree. The reference measured in the same
//! run is 1,000 complex logarithms (the edge integrals' inner operation): read the figures
//! as "costs N thousand logarithms". The Gauss–Jacobi rules are cached per thread, so the
//! figures are for a warm cache (the first call of a process builds them: about 1 ms).
//! Run: `cargo bench -p kelp-evaluator --bench periods`.

use kelp_evaluator::algebra::upoly::UPoly;
use kelp_evaluator::periods::riemann_matrix;
use kelp_evaluator::periods::superelliptic::periods;
use num_complex::Complex64 as C64;

fn main() {
    divan::main();
}

const DIGITS: [i64; 10] = [3, -1, 4, 1, -5, 9, 2, 6, -5, 3];

fn f(degree: usize) -> UPoly {
    let mut c: Vec<i64> = (0..degree).map(|k| DIGITS[k % DIGITS.len()]).collect();
    c.push(1);
    UPoly::from_ints(&c)
}

fn tau(m: u32, p: &UPoly) -> f64 {
    riemann_matrix(periods(m, p, 1e-12).expect("periods"), true).expect("tau").error
}

#[divan::bench]
fn reference_1000_complex_logs() -> C64 {
    let mut s = C64::new(0.0, 0.0);
    for k in 0..1000 {
        s += divan::black_box(C64::new(1.0 + k as f64 * 1e-3, 0.5)).ln();
    }
    s
}

#[divan::bench(args = [5, 21, 41])]
fn hyperelliptic_degree(b: divan::Bencher, degree: usize) {
    let p = f(degree);
    tau(2, &p);
    b.bench(|| tau(2, divan::black_box(&p)));
}

#[divan::bench(args = [4, 7])]
fn trigonal_degree(b: divan::Bencher, degree: usize) {
    let p = f(degree);
    tau(3, &p);
    b.bench(|| tau(3, divan::black_box(&p)));
}

const FOUR_NODES: &str = "27*x^6 + 27*x^5*y - 54*x^5 - 54*x^4*y^2 - 27*x^4*y + 54*x^4 - 54*x^3*y^3 + 54*x^3*y^2 - 54*x^3 - 54*x^2*y^4 + 54*x^2*y^3 - 54*x^2*y^2 - 54*x^2*y + 27*x^2 + 27*x*y^5 - 27*x*y^4 + 1749*x*y^3 - 1803*x*y^2 + 54*x*y + 436*y^5 - 3377*y^4 + 5446*y^3 - 2505*y^2";

/// The covering route for plane curves that are not y^m = f(x): Klein's quartic (genus 3),
/// a smooth quintic (genus 6), a smooth sextic (genus 10) and a sextic with four nodes at
/// (0, 0), (1, 0), (0, 1), (2, 3) (genus 6; found with sympy 1.14.0 by imposing the nodes),
/// all invented.
/// Exact curve facts (singular points, genus) are computed once outside the timing.
#[divan::bench(args = ["x^3*y + y^3*z + z^3*x", "x^5 + y^5 + z^5 + 3*x^2*y^2*z - 2*x*y^4 + x^3*z^2", "x^6 + y^6 + z^6 - 2*x^3*y^2*z + 5*x*y^5 - x^2*z^4 + y*z^5", FOUR_NODES])]
fn covering_route(b: divan::Bencher, src: &str) {
    let c = kelp_lang::check(&format!("curve c: {src}\n"));
    let e = c.curves.values().next().expect("a curve");
    let facts = kelp_evaluator::algebra::curve::analyse(&e.poly, e.projective);
    let g = facts.genus().expect("a genus");
    b.bench(|| {
        let out = kelp_evaluator::periods::general::periods(divan::black_box(&e.poly), e.projective, &facts, g)
            .expect("periods");
        riemann_matrix(out.periods, true).expect("tau").error
    });
}

/// The Abel–Jacobi map once the periods are known: the integrals of the three differentials
/// of the smooth plane quartic y^3 = x^4 + 3 - x + 4x^2 + x^3 (genus 3, invented) from the
/// first branch point to a point of the curve (one straight edge on top of the tree path),
/// then normalised by the a-periods. Target: 5 ms.
#[divan::bench]
fn abel_jacobi_point_genus3_quartic(b: divan::Bencher) {
    use kelp_evaluator::periods::abel::{AbelMap, Place};
    let p = f(4);
    let r = riemann_matrix(periods(3, &p, 1e-12).expect("periods"), true).expect("tau");
    let map = AbelMap::new(&r.periods, 3, &p, 1e-12).expect("map");
    let x = C64::new(0.7, 0.4);
    let fx = p.eval_f64(x);
    let y = fx.powf(1.0 / 3.0);
    let ainv = r.basis.a.clone().try_inverse().expect("invertible");
    b.bench(|| {
        let (xr, yr, _) = map.refine(divan::black_box(x), y);
        let img = map.place(Place::Finite(xr, yr)).expect("image");
        &ainv * nalgebra::DVector::from_vec(img.v)
    });
}

/// The search behind `equivalent` / `transform_between` for two genus-3 matrices related by
/// a product of generators (the Riemann matrix of y^3 = x^4 + ... above and its image under
/// J followed by an integer translation): Siegel reduction of both, lattice isometries,
/// inversions. Target: 50 ms.
#[divan::bench]
fn equivalence_search_genus3(b: divan::Bencher) {
    use kelp_evaluator::theta::isometry::find_transform;
    use kelp_evaluator::theta::siegel::{act, j_form};
    let p = f(4);
    let t = riemann_matrix(periods(3, &p, 1e-12).expect("periods"), false).expect("tau").tau;
    let mut shift = nalgebra::DMatrix::<i64>::identity(6, 6);
    shift[(0, 4)] = 1;
    shift[(1, 3)] = 1;
    let j = -j_form(3);
    let t2 = act(&(shift * j), &t).expect("invertible");
    b.bench(|| find_transform(divan::black_box(&t), &t2, 1e-7).expect("found"));
}
