//! The exact j-invariant of genus-1 curves given as y^2 = f(x) with deg f = 3 or 4.
//!
//! Cubic f = a x^3 + b x^2 + c x + d: (x, y) -> (X / a, Y / a) and X = t - b/3 give
//! Y^2 = t^3 + p t + q with p = a c - b^2/3, q = 2 b^3/27 - a b c/3 + a^2 d, and
//! j = 1728 * 4 p^3 / (4 p^3 + 27 q^2). Quartic f = a x^4 + b x^3 + c x^2 + d x + e: with
//! the invariants I = 12 a e - 3 b d + c^2, J = 72 a c e + 9 b c d - 27 a d^2 - 27 e b^2 - 2 c^3,
//! j = 6912 I^3 / (4 I^3 - J^2). (Common practice; the quartic invariants from memory,
//! checked in the tests against the cubic formula on the same curves.)

use super::upoly::UPoly;
use kelp_lang::poly::Poly;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::Zero;

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// f when `poly` (affine, in x and y) is y^2 * k - f(x) * k' for constants k: the curve y^2 = f(x).
pub fn as_y2_equals(poly: &Poly, projective: bool) -> Option<UPoly> {
    if projective || poly.terms.keys().any(|m| m[2] > 0) {
        return None;
    }
    let lead = poly.terms.get(&[0, 2, 0])?.clone();
    let mut f = vec![BigRational::zero(); poly.degree()? as usize + 1];
    for (m, c) in &poly.terms {
        match (m[0], m[1]) {
            (0, 2) => {}
            (i, 0) => f[i as usize] = -c / &lead,
            _ => return None,
        }
    }
    Some(UPoly::new(f))
}

/// D(x) when the curve (affine, or projective read in the chart z = 1) is quadratic in y
/// with a constant coefficient of y^2, A y^2 + B(x) y + C(x) = 0: completing the square,
/// (2 A y + B)^2 = B^2 - 4 A C = D(x), a birational change, so the curve has the j of
/// w^2 = D(x) (common practice). The same with x and y exchanged when that fits instead.
pub fn as_double_cover(poly: &Poly, projective: bool) -> Option<UPoly> {
    if !projective && poly.terms.keys().any(|m| m[2] > 0) {
        return None;
    }
    let try_var = |v: usize| -> Option<UPoly> {
        let u = 1 - v; // the other affine variable
        let mut coef: [Vec<BigRational>; 3] = Default::default();
        for (m, c) in &poly.terms {
            let (k, i) = (m[v] as usize, m[u] as usize);
            if k > 2 {
                return None;
            }
            if coef[k].len() <= i {
                coef[k].resize(i + 1, BigRational::zero());
            }
            coef[k][i] += c;
        }
        let (a, b, c) = (UPoly::new(coef[2].clone()), UPoly::new(coef[1].clone()), UPoly::new(coef[0].clone()));
        if a.degree() != Some(0) {
            return None;
        }
        let d = b.mul(&b).sub(&a.mul(&c).scale(&q(4)));
        d.degree().filter(|&n| n == 3 || n == 4).map(|_| d)
    };
    try_var(1).or_else(|| try_var(0))
}

/// The j-invariant of y^2 = f(x), or why there is none.
pub fn j_invariant(f: &UPoly) -> Result<BigRational, String> {
    let c = |i: usize| f.0.get(i).cloned().unwrap_or_else(BigRational::zero);
    match f.degree() {
        Some(3) | Some(4) => {}
        _ => return Err("y^2 = f(x) has genus 1 only when f has degree 3 or 4".into()),
    }
    if f.gcd(&f.derivative()).degree() != Some(0) {
        return Err("f has a repeated root, so the curve is singular and has genus 0".into());
    }
    if f.degree() == Some(3) {
        let (a, b, cc, d) = (c(3), c(2), c(1), c(0));
        let p = &a * &cc - &b * &b / q(3);
        let qq = q(2) * &b * &b * &b / q(27) - &a * &b * &cc / q(3) + &a * &a * &d;
        let p3 = q(4) * &p * &p * &p;
        return Ok(q(1728) * &p3 / (&p3 + q(27) * &qq * &qq));
    }
    let (a, b, cc, d, e) = (c(4), c(3), c(2), c(1), c(0));
    let i = q(12) * &a * &e - q(3) * &b * &d + &cc * &cc;
    let j = q(72) * &a * &cc * &e + q(9) * &b * &cc * &d
        - q(27) * &a * &d * &d
        - q(27) * &e * &b * &b
        - q(2) * &cc * &cc * &cc;
    let i3 = &i * &i * &i;
    let den = q(4) * &i3 - &j * &j;
    if den.is_zero() {
        return Err("the quartic's invariants vanish together (a singular curve)".into());
    }
    Ok(q(6912) * i3 / den)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn r(n: i64, d: i64) -> BigRational {
        BigRational::new(BigInt::from(n), BigInt::from(d))
    }

    #[test]
    fn legendre_and_weierstrass_forms() {
        // y^2 = x (x - 1)(x - l): j = 256 (1 - l + l^2)^3 / (l^2 (1 - l)^2) (Silverman,
        // The Arithmetic of Elliptic Curves, III.1.7; also the project's conventions).
        for l in [r(2, 1), r(-1, 1), r(1, 2), r(3, 7), r(-5, 3), r(11, 4)] {
            let f = UPoly::new(vec![q(0), l.clone(), -(&l + q(1)), q(1)]);
            let one = q(1);
            let want = q(256) * num_traits::pow(&one - &l + &l * &l, 3) / (&l * &l * (&one - &l) * (&one - &l));
            assert_eq!(j_invariant(&f), Ok(want), "lambda = {l}");
        }
        // y^2 = x^3 + a x + b: j = 1728 * 4a^3 / (4a^3 + 27b^2); j(y^2 = x^3 - x) = 1728,
        // j(y^2 = x^3 + 1) = 0.
        assert_eq!(j_invariant(&UPoly::from_ints(&[0, -1, 0, 1])), Ok(q(1728)));
        assert_eq!(j_invariant(&UPoly::from_ints(&[1, 0, 0, 1])), Ok(q(0)));
        assert_eq!(j_invariant(&UPoly::from_ints(&[5, -2, 0, 1])), Ok(q(1728) * q(4 * -8) / (q(4 * -8) + q(27 * 25))));
    }

    // Long Weierstrass forms through the completed square, against Tate's formulas
    // (Silverman, *The Arithmetic of Elliptic Curves*, III.1: b2, b4, b6, b8, c4, Delta,
    // j = c4^3 / Delta): y^2 + y = x^3 - x has Delta = 37, c4 = 48, so j = 110592/37;
    // y^2 + x y = x^3 - 1 has Delta = -431, c4 = 1, so j = -1/431 (worked by hand).
    #[test]
    fn long_weierstrass_forms() {
        let parse = |s: &str| kelp_lang::check(&format!("curve C: {s}\n")).curves.values().next().unwrap().poly.clone();
        for (eq, want) in [("y^2 + y = x^3 - x", r(110592, 37)), ("y^2 + x*y = x^3 - 1", r(-1, 431))] {
            let f = as_double_cover(&parse(eq), false).expect("quadratic in y");
            assert_eq!(j_invariant(&f), Ok(want), "{eq}");
        }
        // The same curve with x and y exchanged.
        let f = as_double_cover(&parse("x^2 + x = y^3 - y"), false).expect("quadratic in x");
        assert_eq!(j_invariant(&f), Ok(r(110592, 37)));
    }

    #[test]
    fn quartic_invariants_agree_with_the_cubic_formula() {
        // y^2 = (x - r) g(x) with g cubic, and the cubic model obtained by sending r to
        // infinity (x = r + 1/u, y = v / u^2: v^2 = u^3 g(r + 1/u)) must share j.
        let g = UPoly::from_ints(&[3, -1, 2, 1]); // x^3 + 2x^2 - x + 3
        let rr = q(2);
        let quartic = g.mul(&UPoly::new(vec![-rr.clone(), q(1)]));
        // u^3 g(r + 1/u) = g(r) u^3 + g'(r) u^2 + g''(r)/2 u + 1
        let (g0, g1) = (g.eval(&rr), g.derivative().eval(&rr));
        let g2 = g.derivative().derivative().eval(&rr) / q(2);
        let cubic = UPoly::new(vec![q(1), g2, g1, g0]);
        assert_eq!(j_invariant(&quartic), j_invariant(&cubic));
        assert_eq!(j_invariant(&UPoly::from_ints(&[-1, 0, 0, 0, 1])), Ok(q(1728)));
    }
}
