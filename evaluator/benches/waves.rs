//! Grids of KP waves: a 200 x 200 grid at t = 0 of Krichever's wave of a genus-3 curve
//! (y^3 = x^4 - 2x + 3 at (1, 2^(1/3)), invented) and of a line soliton from Gr(5, 10)
//! (252 exponential terms; kappa = -2.25, -1.75, ..., 2.25 and the totally positive matrix
//! A_ij = (j + 1)^i, invented). The reference measured in the same run is 40,000 complex
//! exponentials: read the figures as "costs N grids of exponentials".
//! Run: `cargo bench -p kelp-evaluator --bench waves`.

use kelp_evaluator::output::grid::Grid;
use kelp_evaluator::waves::Wave;
use kelp_evaluator::{evaluate, Mode, Value};
use num_complex::Complex64 as C64;
use std::sync::Arc;

fn main() {
    divan::main();
}

fn wave(src: &str) -> Arc<Wave> {
    let c = kelp_lang::check(src);
    let e = evaluate(&c, src, &Mode::Check);
    match &e.values.iter().find(|v| v.name == "w").expect("the benchmark wave evaluates").value.value {
        Value::Wave(w) => w.clone(),
        _ => unreachable!(),
    }
}

fn axis(n: usize, a: f64, b: f64) -> Vec<f64> {
    (0..n).map(|k| a + (b - a) * k as f64 / (n - 1) as f64).collect()
}

#[divan::bench]
fn reference_40000_complex_exps() -> C64 {
    let mut s = C64::new(0.0, 0.0);
    for k in 0..40_000 {
        s += divan::black_box(C64::new(k as f64 * 1e-5, 0.3)).exp();
    }
    s
}

#[divan::bench(sample_count = 10)]
fn krichever_genus_3_grid_200x200(b: divan::Bencher) {
    let owned = wave("curve p: y^3 = x^4 - 2*x + 3\nwave w = krichever(p, at = (1, 2^(1/3)))\n");
    let w: &Wave = &owned;
    b.bench(|| Grid::evaluate(w, axis(200, -3.0, 3.0), axis(200, -3.0, 3.0), vec![0.0]).unwrap().u.len());
}

#[divan::bench(sample_count = 10)]
fn soliton_gr_5_10_grid_200x200(b: divan::Bencher) {
    let kappa: Vec<String> = (0..10).map(|k| format!("{}", -2.25 + 0.5 * k as f64)).collect();
    let rows: Vec<String> = (0..5)
        .map(|i| format!("[{}]", (0..10).map(|j| ((j + 1) as i64).pow(i).to_string()).collect::<Vec<_>>().join(", ")))
        .collect();
    let owned = wave(&format!("wave w = soliton(kappa = [{}], a = [{}])\n", kappa.join(", "), rows.join(", ")));
    let w: &Wave = &owned;
    b.bench(|| Grid::evaluate(w, axis(200, -10.0, 10.0), axis(200, -10.0, 10.0), vec![0.0]).unwrap().u.len());
}
