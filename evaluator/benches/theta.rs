//! Theta values per genus (1..8, well- and ill-conditioned Im tau), single and batched,
//! at absolute accuracy 1e-12. The reference measured in the same run is 1,000 complex
//! exponentials: read each figure as "costs N exponentials", a ratio that survives a
//! noisy or different machine. The comparison with python-flint is
//! `scripts/theta_vs_flint.py`. Run: `cargo bench -p kelp-evaluator --bench theta`.

use divan::Bencher;
use kelp_evaluator::theta::bench_cases::{cases, BenchCase, Conditioning};
use kelp_evaluator::theta::ThetaContext;
use num_complex::Complex64 as C64;

fn main() {
    divan::main();
}

#[divan::bench]
fn reference_1000_complex_exps(b: Bencher) {
    let zs: Vec<C64> = (0..1000).map(|k| C64::new(-0.001 * k as f64, 0.01 * k as f64)).collect();
    b.bench(|| zs.iter().map(|z| divan::black_box(*z).exp()).sum::<C64>());
}

fn case(g: usize, ill: bool) -> &'static BenchCase {
    use std::sync::OnceLock;
    static CASES: OnceLock<Vec<BenchCase>> = OnceLock::new();
    let want = if ill { Conditioning::Ill } else { Conditioning::Well };
    CASES.get_or_init(cases).iter().find(|c| c.tau.nrows() == g && c.conditioning == want).unwrap()
}

#[divan::bench(args = [1, 2, 3, 4, 5, 6, 7, 8], consts = [false, true])]
fn value<const ILL: bool>(b: Bencher, g: usize) {
    let c = case(g, ILL);
    let ctx = ThetaContext::new(&c.tau, 1e-12).unwrap();
    let mut k = 0;
    b.bench_local(|| {
        k = (k + 1) % c.zs.len();
        ctx.sums(&c.zs[k], None, &[], &[vec![]], 1e-12).unwrap()
    });
}

#[divan::bench(args = [1, 2, 3, 4, 5, 6], consts = [false, true])]
fn value_and_4_derivatives<const ILL: bool>(b: Bencher, g: usize) {
    let c = case(g, ILL);
    let ctx = ThetaContext::new(&c.tau, 1e-12).unwrap();
    let dir: Vec<C64> = (0..g).map(|i| C64::new(1.0 / (1.0 + i as f64), 0.0)).collect();
    let monos: Vec<Vec<u32>> = (0..=4).map(|o| vec![o]).collect();
    let mut k = 0;
    b.bench_local(|| {
        k = (k + 1) % c.zs.len();
        ctx.sums(&c.zs[k], None, std::slice::from_ref(&dir), &monos, 1e-12).unwrap()
    });
}

/// 64 real z along a line, as a KP wave samples theta: divide by 64 for per value.
#[divan::bench(args = [1, 2, 3, 4, 5, 6, 7, 8])]
fn batch_of_64(b: Bencher, g: usize) {
    let c = case(g, false);
    let ctx = ThetaContext::new(&c.tau, 1e-12).unwrap();
    let line: Vec<Vec<C64>> =
        (0..64).map(|k| (0..g).map(|i| C64::new(c.zs[0][i].re + 0.05 * k as f64, 0.0)).collect()).collect();
    b.bench_local(|| ctx.batch(&line, None, &[], &[vec![]], 1e-12).unwrap());
}
