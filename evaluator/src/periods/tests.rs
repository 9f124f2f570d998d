//! Riemann matrices against outside values. Cross-crate fixtures live in tests/.

use super::modular::j_of_tau;
use super::superelliptic::periods;
use super::*;
use crate::algebra::upoly::UPoly;
use num_rational::BigRational;

fn q(n: i64, d: i64) -> BigRational {
    BigRational::new(n.into(), d.into())
}

fn tau_of(m: u32, f: &UPoly) -> RiemannMatrix {
    riemann_matrix(periods(m, f, 1e-12).expect("periods"), true).expect("tau")
}

// Legendre form y^2 = x(x-1)(x-l): j = 256 (1 - l + l^2)^3 / (l^2 (1 - l)^2) (classical;
// Silverman, *The Arithmetic of Elliptic Curves*, III.1.7). j(tau) must agree.
#[test]
fn legendre_curves_j_of_tau() {
    for (n, d) in [(2, 1), (-1, 1), (1, 2), (3, 7), (-5, 3), (9, 4), (1, 10), (17, 5), (-2, 9), (7, 8), (40, 3)] {
        let l = q(n, d);
        let f = UPoly::new(vec![q(0, 1), l.clone(), -(&l + q(1, 1)), q(1, 1)]);
        let r = tau_of(2, &f);
        let lf = n as f64 / d as f64;
        let exact = 256.0 * (1.0 - lf + lf * lf).powi(3) / (lf * lf * (1.0 - lf).powi(2));
        let (j, e) = j_of_tau(r.tau[(0, 0)], r.error).unwrap();
        assert!(
            (j - exact).norm() <= e.max(1e-9 * exact.abs()),
            "l = {n}/{d}: j(tau) = {j}, exact {exact}, error {e:.1e}, tau {}",
            r.tau[(0, 0)]
        );
        assert!(r.error < 1e-11, "error estimate {:.1e}", r.error);
    }
}
