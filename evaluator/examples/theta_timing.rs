//! Times theta values per genus for `scripts/theta_vs_flint.py` (which times python-flint
//! on the same matrices in the same run and prints the ratios). Prints one JSON object.
//! Run: `cargo run --release -p kelp-evaluator --example theta_timing`.

use kelp_evaluator::theta::bench_cases::{cases, Conditioning};
use kelp_evaluator::theta::ThetaContext;
use num_complex::Complex64 as C64;
use std::time::Instant;

fn main() {
    if std::env::args().any(|a| a == "--print-cases") {
        // The matrices and points, for the python-flint side of the comparison.
        let pair = |v: &C64| format!("[{:e}, {:e}]", v.re, v.im);
        let items: Vec<String> = cases()
            .iter()
            .map(|c| {
                let g = c.tau.nrows();
                let rows: Vec<String> = (0..g)
                    .map(|i| format!("[{}]", (0..g).map(|j| pair(&c.tau[(i, j)])).collect::<Vec<_>>().join(", ")))
                    .collect();
                let zs: Vec<String> =
                    c.zs.iter().map(|z| format!("[{}]", z.iter().map(pair).collect::<Vec<_>>().join(", "))).collect();
                format!("{{\"tau\": [{}], \"zs\": [{}]}}", rows.join(", "), zs.join(", "))
            })
            .collect();
        println!("[{}]", items.join(",\n"));
        return;
    }
    let mut rows = Vec::new();
    for case in cases() {
        let ctx = ThetaContext::new(&case.tau, 1e-12).expect("benchmark matrices are Riemann matrices");
        let g = case.tau.nrows();
        let dir: Vec<C64> = (0..g).map(|i| C64::new(1.0 / (1.0 + i as f64), 0.0)).collect();
        let time = |f: &mut dyn FnMut() -> usize| -> (f64, usize) {
            let mut best = f64::INFINITY;
            let mut pts = 0;
            for _ in 0..5 {
                let n = if g >= 6 { 3 } else { 100 };
                let t0 = Instant::now();
                for _ in 0..n {
                    pts = f();
                }
                best = best.min(t0.elapsed().as_secs_f64() / n as f64);
            }
            (best * 1e6, pts)
        };
        let zs = &case.zs;
        let mut k = 0;
        let (plain, points) = time(&mut || {
            k = (k + 1) % zs.len();
            let (v, s) = ctx.sums(&zs[k], None, &[], &[vec![]], 1e-12).unwrap();
            std::hint::black_box(v);
            s.points
        });
        let (jet, jet_points) = time(&mut || {
            k = (k + 1) % zs.len();
            let monos: Vec<Vec<u32>> = (0..=4).map(|o| vec![o]).collect();
            let (v, s) = ctx.sums(&zs[k], None, std::slice::from_ref(&dir), &monos, 1e-12).unwrap();
            std::hint::black_box(v);
            s.points
        });
        // Batches of 64 real z along a line (as a KP wave samples theta), per value.
        let line: Vec<Vec<C64>> = (0..64)
            .map(|k| (0..g).map(|i| C64::new(zs[0][i].re + 0.05 * k as f64 * dir[i].re, 0.0)).collect())
            .collect();
        let (batch, _) = time(&mut || {
            let v = ctx.batch(&line, None, &[], &[vec![]], 1e-12).unwrap();
            std::hint::black_box(v);
            0
        });
        let batch = batch / 64.0;
        let (batch_jet, _) = time(&mut || {
            let monos: Vec<Vec<u32>> = (0..=4).map(|o| vec![o]).collect();
            let v = ctx.batch(&line, None, std::slice::from_ref(&dir), &monos, 1e-12).unwrap();
            std::hint::black_box(v);
            0
        });
        let batch_jet = batch_jet / 64.0;
        rows.push(format!(
            "{{\"genus\": {g}, \"conditioning\": \"{}\", \"plain_us\": {plain:.3}, \"plain_points\": {points}, \
             \"jet4_us\": {jet:.3}, \"jet4_points\": {jet_points}, \"batch_plain_us\": {batch:.3}, \"batch_jet4_us\": {batch_jet:.3}}}",
            match case.conditioning {
                Conditioning::Well => "well",
                Conditioning::Ill => "ill",
            }
        ));
    }
    println!("[\n  {}\n]", rows.join(",\n  "));
}
