//! Prints, for the benchmark curves, the genus, edges, quadrature nodes, largest rule and
//! the error estimate of tau (the node counts quoted in DEVELOPERS.md).
//! Run: `cargo run --release -p kelp-evaluator --example period_nodes`.

use kelp_evaluator::algebra::upoly::UPoly;
use kelp_evaluator::periods::riemann_matrix;
use kelp_evaluator::periods::superelliptic::periods;

const DIGITS: [i64; 10] = [3, -1, 4, 1, -5, 9, 2, 6, -5, 3];

fn main() {
    for (m, degree) in [(2u32, 5usize), (2, 21), (2, 41), (3, 4), (3, 7)] {
        let mut c: Vec<i64> = (0..degree).map(|k| DIGITS[k % DIGITS.len()]).collect();
        c.push(1);
        let f = UPoly::from_ints(&c);
        let t0 = std::time::Instant::now();
        let p = periods(m, &f, 1e-12).expect("periods");
        let (g, edges, nodes, largest) = (p.genus, p.edges, p.nodes, p.largest_rule);
        let unreduced = riemann_matrix(p.clone(), false).expect("tau").error;
        let (ae, be) = (p.a_error, p.b_error);
        let r = riemann_matrix(p, true).expect("tau");
        println!("  period errors A {ae:.1e} B {be:.1e}; tau error before reduction {unreduced:.1e}");
        println!(
            "y^{m} = f (deg {degree}): genus {g}, {edges} edges, {nodes} nodes (largest rule {largest}), error {:.1e}, symmetry defect {:.1e}, min eig Im {:.3}, {:.2} ms (cold)",
            r.error,
            r.symmetry_defect,
            r.min_eig_im,
            t0.elapsed().as_secs_f64() * 1e3
        );
    }
}
