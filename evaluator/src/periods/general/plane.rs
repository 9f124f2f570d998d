//! A plane curve G(x, y) = 0 (the affine chart z = 1 of a curve in general position) with
//! complex double coefficients, for root tracking and integration.

use num_complex::Complex64 as C64;

#[derive(Clone, Debug)]
pub struct Plane {
    /// Degree in y (= total degree: the coefficient of y^d is a nonzero constant).
    pub d: usize,
    /// c[j][i]: coefficient of x^i y^j.
    pub c: Vec<Vec<C64>>,
}

impl Plane {
    pub fn from_terms(terms: impl Iterator<Item = ((u32, u32), f64)>, d: usize) -> Plane {
        let mut c = vec![vec![C64::new(0.0, 0.0); d + 1]; d + 1];
        for ((i, j), v) in terms {
            c[j as usize][i as usize] += v;
        }
        Plane { d, c }
    }

    /// The coefficients of G(x, y) as a polynomial in y, lowest first.
    pub fn fibre(&self, x: C64) -> Vec<C64> {
        self.c.iter().map(|row| row.iter().rev().fold(C64::new(0.0, 0.0), |acc, v| acc * x + v)).collect()
    }

    /// dG/dx as a polynomial in y at x.
    pub fn fibre_dx(&self, x: C64) -> Vec<C64> {
        self.c
            .iter()
            .map(|row| {
                row.iter().enumerate().skip(1).rev().fold(C64::new(0.0, 0.0), |acc, (i, v)| acc * x + v * i as f64)
            })
            .collect()
    }

    /// (G, G_x, G_y) at a point.
    pub fn eval(&self, x: C64, y: C64) -> (C64, C64, C64) {
        let (p, px) = (self.fibre(x), self.fibre_dx(x));
        let (g, gy) = horner(&p, y);
        let (gx, _) = horner(&px, y);
        (g, gx, gy)
    }

    /// The partial derivative d^(a+b) G / dx^a dy^b at a point.
    pub fn partial(&self, a: usize, b: usize, x: C64, y: C64) -> C64 {
        self.partial_with_size(a, b, x, y).0
    }

    /// The partial derivative and the sum of its terms' moduli (the scale its rounding
    /// error and any "is it zero" test are measured against).
    pub fn partial_with_size(&self, a: usize, b: usize, x: C64, y: C64) -> (C64, f64) {
        let mut s = C64::new(0.0, 0.0);
        let mut size = 0.0;
        for (j, row) in self.c.iter().enumerate() {
            if j < b {
                continue;
            }
            for (i, v) in row.iter().enumerate() {
                if i < a || *v == C64::new(0.0, 0.0) {
                    continue;
                }
                let fx: f64 = ((i - a + 1)..=i).map(|k| k as f64).product();
                let fy: f64 = ((j - b + 1)..=j).map(|k| k as f64).product();
                let t = v * fx * fy * x.powi((i - a) as i32) * y.powi((j - b) as i32);
                s += t;
                size += t.norm();
            }
        }
        (s, size)
    }

    /// Largest coefficient modulus (the scale of G on the unit bidisc).
    pub fn size(&self) -> f64 {
        self.c.iter().flatten().map(|v| v.norm()).fold(0.0, f64::max)
    }
}

/// p(y) and p'(y) for coefficients lowest first.
pub fn horner(p: &[C64], y: C64) -> (C64, C64) {
    let (mut v, mut d) = (C64::new(0.0, 0.0), C64::new(0.0, 0.0));
    for c in p.iter().rev() {
        d = d * y + v;
        v = v * y + c;
    }
    (v, d)
}

/// Taylor coefficients p^(k)(y) / k! for k = 0..deg, by repeated synthetic division.
pub fn taylor(p: &[C64], y: C64) -> Vec<C64> {
    let mut c = p.to_vec();
    let mut out = Vec::with_capacity(p.len());
    for _ in 0..p.len() {
        let mut acc = C64::new(0.0, 0.0);
        let mut next = vec![C64::new(0.0, 0.0); c.len().saturating_sub(1)];
        for k in (0..c.len()).rev() {
            acc = acc * y + c[k];
            if k > 0 {
                next[k - 1] = acc;
            }
        }
        out.push(acc);
        c = next;
        if c.is_empty() {
            break;
        }
    }
    out
}

/// All roots of a polynomial with complex coefficients (lowest first, leading one nonzero).
pub fn roots(p: &[C64]) -> Vec<C64> {
    crate::algebra::roots::aberth(p)
}
