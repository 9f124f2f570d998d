//! Complex balls (centre, radius) and truncated series of them: the error of tau's Taylor
//! coefficients carried through log tau to u and the KP residual.
//!
//! Each operation's radius covers the inputs' radii to all orders (products of radii
//! included) and the operation's own rounding (standard model, |d| <= u = 2^-53 per real
//! operation; a complex product within sqrt 5 u |a b|, Brent, Percival & Zimmermann, Math.
//! Comp. 76 (2007), charged 3 u; a complex quotient charged 10 u |q|). Radii are themselves
//! summed in floating point, so each is rounded up by [`up`].

use super::series::{fact, monomials, product_table};
use num_complex::Complex64 as C64;

pub const U: f64 = f64::EPSILON / 2.0;

/// An upper bound of a non-negative radius computed with a few roundings.
pub fn up(r: f64) -> f64 {
    r * (1.0 + 8.0 * U) + 1e-300
}

#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Ball {
    pub c: C64,
    pub r: f64,
}

impl Ball {
    pub fn new(c: C64, r: f64) -> Ball {
        Ball { c, r }
    }
    pub fn exact(c: C64) -> Ball {
        Ball { c, r: 0.0 }
    }
    pub fn real(v: f64) -> Ball {
        Ball::exact(C64::new(v, 0.0))
    }
    pub fn add(self, o: Ball) -> Ball {
        let c = self.c + o.c;
        Ball { c, r: up(self.r + o.r + U * c.norm()) }
    }
    pub fn mul(self, o: Ball) -> Ball {
        let c = self.c * o.c;
        let (a, b) = (self.c.norm(), o.c.norm());
        Ball { c, r: up(a * o.r + self.r * b + self.r * o.r + 3.0 * U * a * b) }
    }
    /// Times an exact real (a small integer, a power of 2, ...).
    pub fn scale(self, k: f64) -> Ball {
        let c = self.c * k;
        Ball { c, r: up(self.r * k.abs() + U * c.norm()) }
    }
    /// None when the denominator's ball contains 0.
    pub fn div(self, o: Ball) -> Option<Ball> {
        let d = o.c.norm() * (1.0 - 2.0 * U) - o.r;
        if !(d > 0.0) || !o.c.re.is_finite() || !o.c.im.is_finite() {
            return None;
        }
        let q = self.c / o.c;
        let r = (self.r + q.norm() * o.r) / d * (1.0 + 4.0 * U) + 10.0 * U * q.norm();
        Some(Ball { c: q, r: up(r) })
    }
    pub fn finite(&self) -> bool {
        self.c.re.is_finite() && self.c.im.is_finite() && self.r.is_finite()
    }
}

/// A truncated series (see `series.rs`) whose coefficients are balls.
#[derive(Clone, Debug)]
pub struct BallSeries(pub Vec<Ball>);

impl BallSeries {
    pub fn zero() -> BallSeries {
        BallSeries(vec![Ball::real(0.0); monomials().len()])
    }

    pub fn mul(&self, o: &BallSeries) -> BallSeries {
        let t = product_table();
        let mut out = BallSeries::zero();
        for (i, x) in self.0.iter().enumerate() {
            if x.c == C64::new(0.0, 0.0) && x.r == 0.0 {
                continue;
            }
            for (j, y) in o.0.iter().enumerate() {
                if let Some(k) = t[i][j] {
                    out.0[k] = out.0[k].add(x.mul(*y));
                }
            }
        }
        out
    }

    /// log(S / s0) (same derivatives as log S), or None when s0's ball contains 0: then
    /// tau cannot be shown nonzero at the point. log(1 + e) = sum_k (-1)^(k+1) e^k / k is
    /// exact on the truncated series (e has no constant term; e^7 has weighted degree >= 7).
    pub fn log_normalised(&self) -> Option<BallSeries> {
        let s0 = self.0[0];
        let mut e = BallSeries::zero();
        for k in 1..e.0.len() {
            e.0[k] = self.0[k].div(s0)?;
        }
        let mut out = BallSeries::zero();
        let mut power = e.clone();
        for k in 1..=6 {
            // 1/k as a ball: the rounded quotient is within u/k of it.
            let w = Ball::new(C64::new(if k % 2 == 1 { 1.0 } else { -1.0 } / k as f64, 0.0), U / k as f64);
            for (o, p) in out.0.iter_mut().zip(&power.0) {
                *o = o.add(p.mul(w));
            }
            if k < 6 {
                power = power.mul(&e);
            }
        }
        Some(out)
    }

    fn get(&self, a: u32, b: u32, c: u32) -> Ball {
        self.0[super::series::index(a, b, c)]
    }
}

/// u = 2 F_xx + c and R = 3 u_yy + u_xxxx + 6 u_x^2 + 6 u u_xx - 4 u_xt as balls, from the
/// ball series of F = log tau (`c` is the wave's constant, exact as given).
pub fn kp_balls(f: &BallSeries, c: C64) -> (Ball, Ball) {
    let d = |a: u32, b: u32, cc: u32| f.get(a, b, cc).scale(2.0 * fact(a) * fact(b) * fact(cc));
    let u = d(2, 0, 0).add(Ball::exact(c));
    let ux = d(3, 0, 0);
    let uxx = d(4, 0, 0);
    let terms =
        [d(2, 2, 0).scale(3.0), d(6, 0, 0), ux.mul(ux).scale(6.0), u.mul(uxx).scale(6.0), d(3, 0, 1).scale(-4.0)];
    let r = terms.iter().skip(1).fold(terms[0], |acc, t| acc.add(*t));
    (u, r)
}

#[cfg(test)]
mod tests {
    use super::*;

    // (1 + x)^-1 has log -log(1 + x) whose x^2 coefficient is 1/2: the radius must cover
    // the exact value when the input coefficients are perturbed within their radii
    // (power series of log, common practice, no source).
    #[test]
    fn ball_log_covers_perturbed_inputs() {
        let mut s = BallSeries::zero();
        let i = |a, b, c| super::super::series::index(a, b, c);
        s.0[0] = Ball::new(C64::new(2.0, 0.0), 1e-3);
        s.0[i(1, 0, 0)] = Ball::new(C64::new(0.5, 0.0), 1e-3);
        let l = s.log_normalised().unwrap();
        // Exact for the inputs 2 + 1e-3 and 0.5 - 1e-3: log(1 + e x), e = 0.499/2.001, x^2: -e^2/2.
        let e: f64 = 0.499 / 2.001;
        let want = -e * e / 2.0;
        let b = l.0[i(2, 0, 0)];
        assert!((b.c.re - want).abs() <= b.r, "{b:?} vs {want}");
        assert!(b.r < 1e-3, "{b:?}");
    }

    // A denominator whose ball contains 0 gives no quotient.
    #[test]
    fn division_by_a_ball_around_zero_is_refused() {
        assert!(Ball::real(1.0).div(Ball::new(C64::new(1e-3, 0.0), 2e-3)).is_none());
        let q = Ball::real(1.0).div(Ball::new(C64::new(2.0, 0.0), 1.0)).unwrap();
        // 1 / [1, 3] lies in [1/3, 1]: within the ball around 1/2.
        assert!(q.r >= 0.5 && (q.c.re - 0.5).abs() < 1e-15);
    }
}
