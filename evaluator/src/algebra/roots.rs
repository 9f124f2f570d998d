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
    let Some(n) = p.degree() else { return vec![] };
    if n == 0 {
        return vec![];
    }
    let lead = kelp_lang::number::to_f64(&p.lead());
    let c: Vec<C64> = p.0.iter().map(|v| C64::new(kelp_lang::number::to_f64(v) / lead, 0.0)).collect();
    // Cauchy bound for the starting circle.
    let radius = 1.0 + c[..n].iter().map(|v| v.norm()).fold(0.0, f64::max);
    let mut z: Vec<C64> = (0..n)
        .map(|k| {
            C64::from_polar(radius.min(1e6) * 0.5 + 0.1, 2.0 * std::f64::consts::PI * (k as f64 + 0.25) / n as f64)
        })
        .collect();
    let eval = |x: C64| -> (C64, C64) {
        let mut pv = C64::new(0.0, 0.0);
        let mut dv = C64::new(0.0, 0.0);
        for v in c.iter().rev() {
            dv = dv * x + pv;
            pv = pv * x + v;
        }
        (pv, dv)
    };
    for _ in 0..500 {
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
}
