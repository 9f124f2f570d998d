//! Gauss–Jacobi rules for the weights (1 - t)^alpha (1 + t)^beta on [-1, 1] with alpha and
//! beta in (-1, 0], and the Bernstein-ellipse error bound that chooses their size.
//!
//! Nodes and weights by the Golub–Welsch eigenvalue method (Golub and Welsch, Math. Comp. 23
//! (1969)) from the Jacobi-polynomial recurrence; alpha = -1/2 uses the closed-form
//! Gauss–Chebyshev rule. Error bound: Gauss rules integrate polynomials of degree 2N - 1
//! exactly and have positive weights summing to mu0, so the error is at most 2 mu0 E_{2N-1}(g),
//! and a function analytic with |g| <= M inside the Bernstein ellipse E_rho has best
//! approximation error E_k <= 2 M rho^-k / (rho - 1) (Trefethen, *Approximation Theory and
//! Approximation Practice*, Thm 8.2). Together: |error| <= 4 mu0 M rho^(1 - 2N) / (rho - 1).

use nalgebra::{DMatrix, SymmetricEigen};
use std::cell::RefCell;
use std::collections::HashMap;
use std::f64::consts::PI;
use std::rc::Rc;

/// One quadrature rule: nodes in (-1, 1) and their weights.
#[derive(Debug)]
pub struct Rule {
    pub nodes: Vec<f64>,
    pub weights: Vec<f64>,
}

/// The rule sizes used, so that rules are shared between edges and calls.
pub const SIZES: [usize; 16] = [4, 6, 8, 12, 16, 20, 24, 32, 40, 48, 64, 80, 96, 128, 192, 256];

/// A weight (1 - t)^(-a/q) (1 + t)^(-b/q): exponents as fractions with one denominator.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub struct Weight {
    pub a: u32,
    pub b: u32,
    pub q: u32,
}

impl Weight {
    /// (1 - t^2)^(-p/q).
    pub fn symmetric(p: u32, q: u32) -> Weight {
        Weight { a: p, b: p, q }
    }
    pub fn alpha(&self) -> f64 {
        -(self.a as f64) / self.q as f64
    }
    pub fn beta(&self) -> f64 {
        -(self.b as f64) / self.q as f64
    }
    /// mu0 = integral of the weight over [-1, 1]
    /// = 2^(alpha + beta + 1) Gamma(alpha + 1) Gamma(beta + 1) / Gamma(alpha + beta + 2).
    pub fn mu0(&self) -> f64 {
        let (al, be) = (self.alpha(), self.beta());
        2f64.powf(al + be + 1.0) * gamma(al + 1.0) * gamma(be + 1.0) / gamma(al + be + 2.0)
    }
}

thread_local! {
    static RULES: RefCell<HashMap<(Weight, usize), Rc<Rule>>> = RefCell::new(HashMap::new());
}

/// The N-point rule for a weight, cached per thread.
pub fn rule(w: Weight, n: usize) -> Rc<Rule> {
    let g = num_integer::gcd(num_integer::gcd(w.a, w.b), w.q).max(1);
    let key = Weight { a: w.a / g, b: w.b / g, q: w.q / g };
    RULES.with(|r| r.borrow_mut().entry((key, n)).or_insert_with(|| Rc::new(build(key, n))).clone())
}

/// mu0 for the symmetric weight (1 - t^2)^alpha: sqrt(pi) Gamma(alpha + 1) / Gamma(alpha + 3/2).
pub fn mu0(alpha: f64) -> f64 {
    PI.sqrt() * gamma(alpha + 1.0) / gamma(alpha + 1.5)
}

fn build(w: Weight, n: usize) -> Rule {
    let (alpha, beta) = (w.alpha(), w.beta());
    if 2 * w.a == w.q && w.a == w.b {
        let nodes = (0..n).map(|k| (PI * (2 * k + 1) as f64 / (2 * n) as f64).cos()).collect();
        return Rule { nodes, weights: vec![PI / n as f64; n] };
    }
    // Jacobi matrix of P_k^(alpha, beta) (Golub and Welsch): diagonal a_k, off-diagonal b_k.
    let ab = alpha + beta;
    let mut jm = DMatrix::<f64>::zeros(n, n);
    for k in 0..n {
        let kf = k as f64;
        let s = 2.0 * kf + ab;
        jm[(k, k)] = if k == 0 { (beta - alpha) / (ab + 2.0) } else { (beta * beta - alpha * alpha) / (s * (s + 2.0)) };
        if k == 0 {
            continue;
        }
        let b2 = if k == 1 {
            // The general formula is 0/0 when alpha + beta = -1; this is its limit.
            4.0 * (1.0 + alpha) * (1.0 + beta) / ((2.0 + ab) * (2.0 + ab) * (3.0 + ab))
        } else {
            4.0 * kf * (kf + alpha) * (kf + beta) * (kf + ab) / (s * s * (s + 1.0) * (s - 1.0))
        };
        jm[(k - 1, k)] = b2.sqrt();
        jm[(k, k - 1)] = b2.sqrt();
    }
    let eig = SymmetricEigen::new(jm);
    let m0 = w.mu0();
    let mut pairs: Vec<(f64, f64)> =
        (0..n).map(|i| (eig.eigenvalues[i], m0 * eig.eigenvectors[(0, i)] * eig.eigenvectors[(0, i)])).collect();
    pairs.sort_by(|a, b| a.0.total_cmp(&b.0));
    Rule { nodes: pairs.iter().map(|p| p.0).collect(), weights: pairs.iter().map(|p| p.1).collect() }
}

/// The error bound 4 mu0 M rho^(1 - 2N) / (rho - 1) of an N-point rule.
pub fn error_bound(mu0: f64, m: f64, rho: f64, n: usize) -> f64 {
    4.0 * mu0 * m * rho.powf(1.0 - 2.0 * n as f64) / (rho - 1.0)
}

/// The smallest size in `SIZES` meeting `tol`, if any.
pub fn size_for(mu0: f64, m: f64, rho: f64, tol: f64) -> Option<usize> {
    SIZES.iter().copied().find(|&n| error_bound(mu0, m, rho, n) <= tol)
}

/// The point of the ellipse E_rho at angle theta: (rho e^{i theta} + rho^-1 e^{-i theta}) / 2.
pub fn ellipse_point(rho: f64, theta: f64) -> num_complex::Complex64 {
    num_complex::Complex64::new(0.5 * (rho + 1.0 / rho) * theta.cos(), 0.5 * (rho - 1.0 / rho) * theta.sin())
}

/// The ellipse parameter of u: the rho with u on the boundary of E_rho (>= 1).
pub fn rho_of(u: num_complex::Complex64) -> f64 {
    let s = (u * u - 1.0).sqrt();
    (u + s).norm().max((u - s).norm())
}

/// Gamma function for real x > 0 (Lanczos, g = 7, 9 terms; relative error near 1e-15).
pub fn gamma(x: f64) -> f64 {
    const G: [f64; 9] = [
        0.999_999_999_999_809_9,
        676.520_368_121_885_1,
        -1_259.139_216_722_402_8,
        771.323_428_777_653_1,
        -176.615_029_162_140_6,
        12.507_343_278_686_905,
        -0.138_571_095_265_720_12,
        9.984_369_578_019_572e-6,
        1.505_632_735_149_311_6e-7,
    ];
    if x < 0.5 {
        return PI / ((PI * x).sin() * gamma(1.0 - x));
    }
    let x = x - 1.0;
    let mut a = G[0];
    let t = x + 7.5;
    for (i, g) in G.iter().enumerate().skip(1) {
        a += g / (x + i as f64);
    }
    (2.0 * PI).sqrt() * t.powf(x + 0.5) * (-t).exp() * a
}

#[cfg(test)]
mod tests {
    use super::*;

    // Gamma(1/2) = sqrt(pi), Gamma(5) = 24, Gamma(1/3) = 2.678938534707747... (DLMF 5.4.6
    // and 5.4 table values; common practice, no source for the integers).
    #[test]
    fn gamma_values() {
        assert!((gamma(0.5) - PI.sqrt()).abs() < 1e-14);
        assert!((gamma(5.0) - 24.0).abs() < 1e-12);
        assert!((gamma(1.0 / 3.0) - 2.678_938_534_707_747_6).abs() < 1e-13);
    }

    // Moments of the weight: integral of t^2 (1 - t^2)^alpha = mu0 / (2 alpha + 3) (beta
    // function identity, common practice); a Gauss rule integrates t^2 and t^4 exactly.
    #[test]
    fn jacobi_rules_integrate_moments() {
        for (p, q) in [(1, 3), (2, 3), (1, 4), (3, 4), (1, 2), (4, 5)] {
            let alpha = -(p as f64) / q as f64;
            let m0 = mu0(alpha);
            let r = rule(Weight::symmetric(p, q), 12);
            let s0: f64 = r.weights.iter().sum();
            let s2: f64 = r.nodes.iter().zip(&r.weights).map(|(t, w)| w * t * t).sum();
            let s4: f64 = r.nodes.iter().zip(&r.weights).map(|(t, w)| w * t.powi(4)).sum();
            assert!((s0 - m0).abs() < 1e-13 * m0, "{p}/{q}");
            assert!((s2 - m0 / (2.0 * alpha + 3.0)).abs() < 1e-13, "{p}/{q}");
            let m4 = m0 * 3.0 / ((2.0 * alpha + 3.0) * (2.0 * alpha + 5.0));
            assert!((s4 - m4).abs() < 1e-13, "{p}/{q}");
        }
    }

    // One-sided weights through their first two moments: the mean of t under the weight is
    // (beta - alpha) / (alpha + beta + 2) (the mean of a Beta(beta + 1, alpha + 1) variable,
    // mapped to [-1, 1]; common practice); plain Legendre too.
    #[test]
    fn one_sided_and_plain_rules() {
        for w in [Weight { a: 0, b: 2, q: 3 }, Weight { a: 1, b: 0, q: 4 }, Weight { a: 0, b: 0, q: 1 }] {
            let (al, be) = (w.alpha(), w.beta());
            let r = rule(w, 10);
            let s0: f64 = r.weights.iter().sum();
            assert!((s0 - w.mu0()).abs() < 1e-13, "{w:?}");
            // integral of (1-t)^al (1+t)^be t = mu0 (be - al) / (al + be + 2).
            let s1: f64 = r.nodes.iter().zip(&r.weights).map(|(t, x)| x * t).sum();
            assert!((s1 - w.mu0() * (be - al) / (al + be + 2.0)).abs() < 1e-13, "{w:?}");
        }
        // Legendre: 2 and integral of t^2 = 2/3.
        let r = rule(Weight { a: 0, b: 0, q: 1 }, 6);
        let s2: f64 = r.nodes.iter().zip(&r.weights).map(|(t, x)| x * t * t).sum();
        assert!((s2 - 2.0 / 3.0).abs() < 1e-14);
    }

    // An analytic integrand converges at the predicted rate: 1/(t - 3) with the Chebyshev
    // weight has the closed form -pi / sqrt(8) (residue calculus, common practice).
    #[test]
    fn bound_holds_for_a_pole() {
        let exact = -PI / 8f64.sqrt();
        let u = num_complex::Complex64::new(3.0, 0.0);
        let rho_max = rho_of(u);
        let rho = 1.0 + 0.7 * (rho_max - 1.0);
        let m = (0..64).map(|k| 1.0 / (ellipse_point(rho, 2.0 * PI * k as f64 / 64.0) - u).norm()).fold(0.0, f64::max);
        for n in [4, 8, 12] {
            let r = rule(Weight::symmetric(1, 2), n);
            let v: f64 = r.nodes.iter().zip(&r.weights).map(|(t, w)| w / (t - 3.0)).sum();
            assert!((v - exact).abs() <= error_bound(PI, m, rho, n), "n = {n}");
        }
    }
}
