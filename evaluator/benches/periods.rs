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
