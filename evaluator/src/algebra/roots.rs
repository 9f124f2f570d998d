//! Numerical roots of univariate polynomials with a-posteriori error bounds.
//!
//! Aberth–Ehrlich iteration in double precision from points on a circle, then for each
//! approximation z the classical inclusion: some root lies within n |p(z) / p'(z)| of z
//! (n the degree; common practice, e.g. Henrici, *Applied and Computational Complex
//! Analysis* I, 6.4).

use super::upoly::UPoly;
use num_complex::Complex64 as C64;

/// All complex roots (with multiplicity) of a polynomial, approximately.
pub fn complex_roots(p: &UPoly) -> Vec<C64> {
    match p.degree() {
        None | Some(0) => vec![],
        Some(_) => aberth(&p.0.iter().map(|v| C64::new(kelp_lang::number::to_f64(v), 0.0)).collect::<Vec<_>>()),
    }
}

/// All roots of a polynomial with complex coefficients (lowest first, the leading one
/// nonzero) by the Aberth–Ehrlich iteration from a circle inside the Cauchy bound.
pub fn aberth(p: &[C64]) -> Vec<C64> {
    let n = p.len() - 1;
    let lead = p[n];
    let c: Vec<C64> = p.iter().map(|v| v / lead).collect();
    let radius = 1.0 + c[..n].iter().map(|v| v.norm()).fold(0.0, f64::max);
    let mut z: Vec<C64> = (0..n)
        .map(|k| C64::from_polar(radius.min(1e6) * 0.5 + 0.1, std::f64::consts::TAU * (k as f64 + 0.25) / n as f64))
        .collect();
    let eval = |x: C64| -> (C64, C64) {
        let (mut pv, mut dv) = (C64::new(0.0, 0.0), C64::new(0.0, 0.0));
        for v in c.iter().rev() {
            dv = dv * x + pv;
            pv = pv * x + v;
        }
        (pv, dv)
    };
    for _ in 0..500 {
        crate::limits::checkpoint();
        let mut moved: f64 = 0.0;
        for i in 0..n {
            let (pv, dv) = eval(z[i]);
            if pv.norm() == 0.0 {
                continue;
            }
            let ratio = pv / dv;
            let s: C64 = (0..n).filter(|&j| j != i).map(|j| C64::new(1.0, 0.0) / (z[i] - z[j])).sum();
            let step = ratio / (C64::new(1.0, 0.0) - ratio * s);
            if step.re.is_finite() && step.im.is_finite() {
                z[i] -= step;
                moved = moved.max(step.norm() / (1.0 + z[i].norm()));
            }
        }
        if moved < 1e-15 {
            break;
        }
    }
    z
}

/// A root approximation with a radius that contains a root (n |p/p'|, inflated for
/// rounding); infinite when the bound is useless (a multiple root).
pub fn inclusion_radius(p: &UPoly, z: C64) -> f64 {
    let n = p.degree().unwrap_or(0) as f64;
    let pv = p.eval_f64(z);
    let dv = p.derivative().eval_f64(z);
    if dv.norm() == 0.0 {
        return f64::INFINITY;
    }
    let scale: f64 =
        p.0.iter().map(|c| kelp_lang::number::to_f64(c).abs()).sum::<f64>() * (1.0 + z.norm()).powi(n as i32);
    n * (pv.norm() + 4.0 * n * f64::EPSILON * scale) / dv.norm()
}

/// Roots refined by Aberth–Ehrlich sweeps with p and p' evaluated in double-double
/// arithmetic, each with a radius n (|p(z)| + evaluation error) / |p'(z)| that contains a
/// root (the inclusion above, with p(z) known to about 1e-30 of sum |a_k| |z|^k instead of
/// 1e-16, so the radius reflects the root's real accuracy, and clusters of close roots are
/// resolved down to double precision). Horner in double-double: Dekker's two-sum and
/// two-product (Dekker, Numer. Math. 18 (1971)).
pub fn refined_roots(p: &UPoly) -> Vec<(C64, f64)> {
    let n = p.degree().unwrap_or(0);
    let coeffs: Vec<(f64, f64)> =
        p.0.iter()
            .map(|c| {
                let hi = kelp_lang::number::to_f64(c);
                let lo = num_rational::BigRational::from_float(hi).map_or(0.0, |h| kelp_lang::number::to_f64(&(c - h)));
                (hi, lo)
            })
            .collect();
    // (p(z), p'(z), a bound on the error of p(z)).
    let eval_dd = |z: C64| -> (C64, C64, f64) {
        use dd::Dd;
        let (zr, zi) = (Dd::from(z.re), Dd::from(z.im));
        let cmul = |(ar, ai): (Dd, Dd)| (ar.mul(zr).sub(ai.mul(zi)), ar.mul(zi).add(ai.mul(zr)));
        let (mut pv, mut dv) = ((Dd::ZERO, Dd::ZERO), (Dd::ZERO, Dd::ZERO));
        let mut size = 0.0;
        for &(hi, lo) in coeffs.iter().rev() {
            let d = cmul(dv);
            dv = (d.0.add(pv.0), d.1.add(pv.1));
            let q = cmul(pv);
            pv = (q.0.add(Dd { hi, lo }), q.1);
            size = size * z.norm() + hi.abs();
        }
        (
            C64::new(pv.0.to_f64(), pv.1.to_f64()),
            C64::new(dv.0.to_f64(), dv.1.to_f64()),
            1e-30 * (n as f64 + 1.0) * size,
        )
    };
    let mut z = complex_roots(p);
    for _ in 0..40 {
        crate::limits::checkpoint();
        let mut moved: f64 = 0.0;
        for i in 0..z.len() {
            let (pv, dv, _) = eval_dd(z[i]);
            if pv.norm() == 0.0 || dv.norm() == 0.0 {
                continue;
            }
            let ratio = pv / dv;
            let s: C64 = (0..z.len()).filter(|&j| j != i).map(|j| C64::new(1.0, 0.0) / (z[i] - z[j])).sum();
            let step = ratio / (C64::new(1.0, 0.0) - ratio * s);
            if step.re.is_finite() && step.im.is_finite() {
                z[i] -= step;
                moved = moved.max(step.norm() / (1e-300 + z[i].norm()));
            }
        }
        if moved < 1e-17 {
            break;
        }
    }
    z.into_iter()
        .map(|z| {
            let (pv, dv, err) = eval_dd(z);
            if dv.norm() == 0.0 {
                return (z, f64::INFINITY);
            }
            (z, n as f64 * (pv.norm() + err) / dv.norm())
        })
        .collect()
}

/// Double-double arithmetic: a value hi + lo with |lo| <= ulp(hi) / 2.
mod dd {
    #[derive(Clone, Copy, Debug)]
    pub struct Dd {
        pub hi: f64,
        pub lo: f64,
    }

    fn two_sum(a: f64, b: f64) -> (f64, f64) {
        let s = a + b;
        let bb = s - a;
        (s, (a - (s - bb)) + (b - bb))
    }

    fn quick(s: f64, e: f64) -> Dd {
        let hi = s + e;
        Dd { hi, lo: e - (hi - s) }
    }

    impl Dd {
        pub const ZERO: Dd = Dd { hi: 0.0, lo: 0.0 };
        pub fn from(v: f64) -> Dd {
            Dd { hi: v, lo: 0.0 }
        }
        pub fn add(self, o: Dd) -> Dd {
            let (s, e) = two_sum(self.hi, o.hi);
            quick(s, e + self.lo + o.lo)
        }
        pub fn sub(self, o: Dd) -> Dd {
            self.add(Dd { hi: -o.hi, lo: -o.lo })
        }
        pub fn mul(self, o: Dd) -> Dd {
            let p = self.hi * o.hi;
            let e = self.hi.mul_add(o.hi, -p);
            quick(p, e + self.hi * o.lo + self.lo * o.hi)
        }
        pub fn to_f64(self) -> f64 {
            self.hi + self.lo
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn roots_of_unity_and_their_bounds() {
        // x^5 - 1: the fifth roots of unity (common practice, no source).
        let p = UPoly::from_ints(&[-1, 0, 0, 0, 0, 1]);
        let r = complex_roots(&p);
        assert_eq!(r.len(), 5);
        for z in r {
            assert!((z.norm() - 1.0).abs() < 1e-12);
            let rad = inclusion_radius(&p, z);
            assert!(rad < 1e-12, "{rad}");
        }
    }

    // Roots 1/3, 99/100, 1 and -7/2 of a product (exact by construction): the refined radii
    // are near double precision and each disc holds its true root.
    #[test]
    fn refined_radii_are_tight_and_contain_the_roots() {
        use num_rational::BigRational;
        let q = |n: i64, d: i64| BigRational::new(n.into(), d.into());
        let want = [1.0 / 3.0, 0.99, 1.0, -3.5];
        let mut p = UPoly::one();
        for (n, d) in [(1, 3), (99, 100), (1, 1), (-7, 2)] {
            p = p.mul(&UPoly::new(vec![-q(n, d), q(1, 1)]));
        }
        for (z, r) in refined_roots(&p) {
            assert!(r < 1e-13, "{z}: {r}");
            let nearest = want.iter().map(|w| (z - w).norm()).fold(f64::INFINITY, f64::min);
            assert!(nearest <= r + 1e-16, "{z}: {nearest} > {r}");
        }
    }
}
