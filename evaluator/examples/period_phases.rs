use kelp_evaluator::algebra::upoly::UPoly;
use kelp_evaluator::periods::riemann_matrix;
use kelp_evaluator::periods::superelliptic::periods;
use std::time::Instant;
const DIGITS: [i64; 10] = [3, -1, 4, 1, -5, 9, 2, 6, -5, 3];
fn main() {
    let mut c: Vec<i64> = (0..41).map(|k| DIGITS[k % DIGITS.len()]).collect();
    c.push(1);
    let f = UPoly::from_ints(&c);
    for _ in 0..3 {
        let t = Instant::now();
        let r = kelp_evaluator::algebra::roots::refined_roots(&f);
        let t_roots = t.elapsed();
        let t = Instant::now();
        let _tree = kelp_evaluator::periods::tree::spanning_tree(&r.iter().map(|x| x.0).collect::<Vec<_>>());
        let t_tree = t.elapsed();
        let t = Instant::now();
        let p = periods(2, &f, 1e-12).unwrap();
        let t_p = t.elapsed();
        let t = Instant::now();
        let _ = riemann_matrix(p.clone(), false).unwrap();
        let t_u = t.elapsed();
        let t = Instant::now();
        let _ = riemann_matrix(p, true).unwrap();
        let t_r = t.elapsed();
        println!("roots {t_roots:?} tree {t_tree:?} periods(all) {t_p:?} unreduced {t_u:?} reduced {t_r:?}");
    }
}
