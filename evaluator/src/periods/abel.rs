//! The Abel–Jacobi map of y^m = f(x): integrals of the holomorphic differentials from the
//! first branch point r_0, unnormalised (the caller divides by the a-periods and reduces
//! modulo the lattice).
//!
//! - A branch point is reached along the spanning tree of the periods, whose edge integrals
//!   are already known; all sheets meet at a branch point, so a path may change sheet there
//!   and any choice differs by a period.
//! - A regular point (x, y) is reached by one more straight edge from the branch point that
//!   sees it best (the largest Bernstein-ellipse parameter of the other branch points, the
//!   choice of Molin and Neurohr, Math. Comp. 2019, for tree edges), integrated with the
//!   same Gauss–Jacobi rules and error bound as the periods, on the sheet whose y matches.
//! - The one place at infinity (gcd(m, n) = 1) needs no integral: div(x - r_0) = m r_0 -
//!   m inf and div(y) = r_0 + ... + r_(n-1) - n inf, so m AJ(inf) = 0 and n AJ(inf) =
//!   sum AJ(r_k) modulo the lattice (Abel's theorem), and with u m + v n = 1,
//!   AJ(inf) = v sum AJ(r_k).

use super::quad::rho_of;
use super::superelliptic::{edge_integrals, End, Periods};
use super::tree::edge_coordinate;
use crate::algebra::upoly::UPoly;
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

/// Unnormalised integrals of the differentials, one per differential, with one bound on
/// every entry's error.
#[derive(Clone, Debug)]
pub struct Image {
    pub v: Vec<C64>,
    pub error: f64,
}

impl Image {
    pub fn zero(g: usize) -> Image {
        Image { v: vec![C64::new(0.0, 0.0); g], error: 0.0 }
    }

    /// self + k * other, with the sum's rounding.
    pub fn add_times(&mut self, other: &Image, k: i64) {
        let kf = k as f64;
        for (a, b) in self.v.iter_mut().zip(&other.v) {
            *a += *b * kf;
        }
        let size = self.v.iter().map(|v| v.norm()).fold(0.0, f64::max);
        self.error += kf.abs() * other.error + 2.0 * f64::EPSILON * size;
    }
}

/// A place of the curve in the route's coordinates (X, Y), Y^m = f(X).
#[derive(Clone, Copy, Debug)]
pub enum Place {
    Finite(C64, C64),
    /// The one place over X = infinity (gcd(m, n) = 1).
    Infinity,
}

pub struct AbelMap<'a> {
    periods: &'a Periods,
    m: u32,
    /// f's coefficients, constant term first.
    f: Vec<C64>,
    lead: f64,
    tol: f64,
}

fn gcd(a: i64, b: i64) -> i64 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}

/// (u, v) with u a + v b = gcd(a, b).
fn bezout(a: i64, b: i64) -> (i64, i64) {
    if b == 0 {
        return (a.signum(), 0);
    }
    let (u, v) = bezout(b, a % b);
    (v, u - (a / b) * v)
}

impl<'a> AbelMap<'a> {
    pub fn new(periods: &'a Periods, m: u32, f: &UPoly, tol: f64) -> Result<AbelMap<'a>, String> {
        if periods.tree.is_empty() || periods.differentials.is_empty() {
            return Err("the periods carry no edge integrals (not the y^m = f(x) route)".into());
        }
        let f: Vec<C64> = f.0.iter().map(|c| C64::new(kelp_lang::number::to_f64(c), 0.0)).collect();
        let lead = f.last().map_or(0.0, |c| c.re);
        Ok(AbelMap { periods, m, f, lead, tol })
    }

    pub fn genus(&self) -> usize {
        self.periods.genus
    }

    fn n(&self) -> usize {
        self.f.len() - 1
    }

    /// The tree path from r_0 to r_k: (edge, forwards).
    fn path(&self, k: usize) -> Vec<(usize, bool)> {
        let n = self.periods.branch_points.len();
        let mut prev: Vec<Option<(usize, usize, bool)>> = vec![None; n];
        let mut seen = vec![false; n];
        seen[0] = true;
        let mut queue = std::collections::VecDeque::from([0usize]);
        while let Some(v) = queue.pop_front() {
            for (ei, e) in self.periods.tree.iter().enumerate() {
                let (w, fwd) = if e.a == v {
                    (e.b, true)
                } else if e.b == v {
                    (e.a, false)
                } else {
                    continue;
                };
                if !seen[w] {
                    seen[w] = true;
                    prev[w] = Some((v, ei, fwd));
                    queue.push_back(w);
                }
            }
        }
        let mut out = vec![];
        let mut at = k;
        while let Some((v, ei, fwd)) = prev[at] {
            out.push((ei, fwd));
            at = v;
        }
        out.reverse();
        out
    }

    /// AJ(r_k) from r_0 along the tree.
    pub fn branch_point(&self, k: usize) -> Image {
        let mut img = Image::zero(self.genus());
        for (ei, fwd) in self.path(k) {
            let e = &self.periods.tree[ei];
            let edge = Image { v: e.integrals.clone(), error: e.errors.iter().copied().fold(0.0, f64::max) };
            img.add_times(&edge, if fwd { 1 } else { -1 });
        }
        img
    }

    /// S = sum over the branch points of AJ(r_k).
    pub fn branch_sum(&self) -> Image {
        let mut sum = Image::zero(self.genus());
        for k in 0..self.n() {
            sum.add_times(&self.branch_point(k), 1);
        }
        sum
    }

    /// N with AJ(canonical divisor) = N S modulo the lattice, from r_0. The differential
    /// dx / y^j with the smallest j in the basis has order m - 1 - j at each finite branch
    /// point (x - r = s^m, y ~ s there), no zero or pole at other finite points, and the same
    /// order c at each of the d = gcd(m, n) places at infinity (y -> zeta y permutes them),
    /// so c = (2g - 2 - n (m - 1 - j)) / d. By Abel's theorem (div(x - r_0) and div(y)),
    /// the places at infinity sum to v' S with u' m/d + v' n/d = 1.
    pub fn canonical_coefficient(&self) -> Result<i64, String> {
        let d0 = self
            .periods
            .differentials
            .iter()
            .filter(|d| d.power == 0)
            .min_by_key(|d| d.j)
            .ok_or("no differential dx / y^j in the basis")?;
        let (m, n, g) = (self.m as i64, self.n() as i64, self.genus() as i64);
        let d = gcd(m, n);
        let finite = n * (m - 1 - d0.j as i64);
        let rest = 2 * g - 2 - finite;
        if rest % d != 0 {
            return Err(format!("internal: the order at infinity {rest} is not shared by {d} places"));
        }
        let (_, v) = bezout(m / d, n / d);
        Ok((m - 1 - d0.j as i64) + (rest / d) * v)
    }

    /// A point of the curve away from the branch points, the k-th of a fixed sequence on a
    /// circle around them (for the vanishing tests of Riemann's constant).
    pub fn test_point(&self, k: usize) -> (C64, C64) {
        let roots = &self.periods.branch_points;
        let c = roots.iter().sum::<C64>() / roots.len() as f64;
        let r = 1.3 * roots.iter().map(|z| (z - c).norm()).fold(0.0, f64::max) + 0.5;
        let phi = 2.0 * PI * (0.137 + 0.618_033_988_749_895 * k as f64);
        let x = c + C64::from_polar(r, phi);
        let (fx, _) = self.f_at(x);
        (x, fx.powf(1.0 / self.m as f64))
    }

    /// AJ of the one place at infinity, by Abel's theorem (see the module header).
    pub fn infinity(&self) -> Result<Image, String> {
        let (m, n) = (self.m as i64, self.n() as i64);
        if gcd(m, n) != 1 {
            return Err(format!(
                "the curve has {} places at infinity (gcd({m}, {n}) > 1), which a plane point cannot tell apart",
                gcd(m, n)
            ));
        }
        let (_, v) = bezout(m, n);
        let sum = self.branch_sum();
        let mut out = Image::zero(self.genus());
        out.add_times(&sum, v);
        Ok(out)
    }

    fn f_at(&self, x: C64) -> (C64, C64) {
        let (mut v, mut d) = (C64::new(0.0, 0.0), C64::new(0.0, 0.0));
        for c in self.f.iter().rev() {
            d = d * x + v;
            v = v * x + c;
        }
        (v, d)
    }

    /// The point moved onto the curve by Newton's method in the coordinate whose partial
    /// derivative is larger; returns it and the distance moved.
    pub fn refine(&self, x: C64, y: C64) -> (C64, C64, f64) {
        let (x0, y0) = (x, y);
        let (mut x, mut y) = (x, y);
        let m = self.m as i32;
        for _ in 0..60 {
            let (fx, dfx) = self.f_at(x);
            let big_f = y.powi(m) - fx;
            let fy = m as f64 * y.powi(m - 1);
            let step_scale = f64::EPSILON * (1.0 + x.norm() + y.norm());
            if fy.norm() >= dfx.norm() {
                if fy.norm() == 0.0 {
                    break;
                }
                let s = big_f / fy;
                y -= s;
                if s.norm() <= step_scale {
                    break;
                }
            } else {
                let s = -big_f / dfx;
                x -= s;
                if s.norm() <= step_scale {
                    break;
                }
            }
        }
        let moved = ((x - x0).norm_sqr() + (y - y0).norm_sqr()).sqrt();
        (x, y, moved)
    }

    /// AJ(P) from r_0 for a place P (a finite point taken as on the curve: see `refine`).
    pub fn place(&self, p: Place) -> Result<Image, String> {
        match p {
            Place::Infinity => self.infinity(),
            Place::Finite(x, y) => self.finite(x, y),
        }
    }

    fn finite(&self, x0: C64, y0: C64) -> Result<Image, String> {
        let roots = &self.periods.branch_points;
        let radii = &self.periods.root_radii;
        let mf = self.m as f64;
        // The start: the branch point from which the segment to x0 is best conditioned.
        let k = (0..roots.len())
            .max_by(|&i, &j| self.sight(i, x0).total_cmp(&self.sight(j, x0)))
            .ok_or("the curve has no branch points")?;
        let mut img = self.branch_point(k);
        if x0 == roots[k] {
            return Ok(img);
        }
        let (e, _, _) =
            edge_integrals(self.m, self.lead, roots, radii, k, End::Regular(x0), &self.periods.differentials, self.tol)
                .map_err(|e| match e {
                    super::PeriodError::Accuracy(m)
                    | super::PeriodError::Unsupported(m)
                    | super::PeriodError::NoMatrix(m) => m,
                })?;
        let err = e.errors.iter().copied().fold(0.0, f64::max);
        let y_end = e.log_y_end.exp();
        // Within rounding of the branch point (y = 0 there) every sheet is as good: the
        // segment's own integral, on any sheet, goes into the bound.
        let scale = self.f.iter().enumerate().map(|(i, c)| c.norm() * x0.norm().powi(i as i32)).sum::<f64>();
        if y0.norm() <= 1e-12 * scale.powf(1.0 / mf) || y_end.norm() == 0.0 {
            let size = e.integrals.iter().map(|v| v.norm()).fold(0.0, f64::max);
            img.error += size + err;
            return Ok(img);
        }
        let ratio = y0 / y_end;
        let s = (ratio.arg() * mf / (2.0 * PI)).round().rem_euclid(mf) as i64;
        let zeta_s = C64::from_polar(1.0, 2.0 * PI * s as f64 / mf);
        if (ratio - zeta_s).norm() > 0.25 {
            return Err(format!(
                "y = {y0:.6} matches no branch of y at x = {x0:.6} (the nearest is {:.6})",
                zeta_s * y_end
            ));
        }
        let seg: Vec<C64> = e
            .integrals
            .iter()
            .zip(&self.periods.differentials)
            .map(|(v, d)| *v * C64::from_polar(1.0, -2.0 * PI * (s * d.j as i64) as f64 / mf))
            .collect();
        img.add_times(&Image { v: seg, error: err }, 1);
        Ok(img)
    }

    /// How well branch point i sees x0: the smallest ellipse parameter of the other branch
    /// points for the segment [r_i, x0].
    fn sight(&self, i: usize, x0: C64) -> f64 {
        let roots = &self.periods.branch_points;
        if roots[i] == x0 {
            return f64::INFINITY;
        }
        (0..roots.len())
            .filter(|&k| k != i)
            .map(|k| rho_of(edge_coordinate(roots[i], x0, roots[k])))
            .fold(f64::INFINITY, f64::min)
    }

    /// How far from the curve double precision can tell a point (x, y): the rounding of
    /// y^m - f(x) (64 units of the size of its terms) over the larger partial derivative.
    pub fn rounding_limit(&self, x: C64, y: C64) -> f64 {
        let m = self.m as i32;
        let terms =
            self.f.iter().enumerate().map(|(i, c)| c.norm() * x.norm().powi(i as i32)).sum::<f64>() + y.norm().powi(m);
        let (_, dfx) = self.f_at(x);
        let fy = m as f64 * y.powi(m - 1);
        64.0 * f64::EPSILON * terms / fy.norm().max(dfx.norm())
    }

    /// How fast the image moves with the point at (x, y): the largest |omega / d lambda|
    /// for the better local parameter lambda (x where dF/dy dominates, else y, which is the
    /// local parameter at a branch point), F = y^m - f(x).
    pub fn sensitivity(&self, x: C64, y: C64) -> f64 {
        let m = self.m as i32;
        let (_, dfx) = self.f_at(x);
        let fy = m as f64 * y.powi(m - 1);
        self.periods
            .differentials
            .iter()
            .map(|d| {
                let xp = x.powi(d.power as i32);
                if fy.norm() >= dfx.norm() {
                    (xp / y.powi(d.j as i32)).norm()
                } else {
                    // dx/dy = m y^(m-1) / f'(x) along the curve; j <= m - 1.
                    (m as f64 * xp * y.powi(m - 1 - d.j as i32) / dfx).norm()
                }
            })
            .fold(0.0, f64::max)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bezout_identity() {
        for (a, b) in [(2, 5), (3, 4), (4, 3), (5, 7), (7, 2)] {
            let (u, v) = bezout(a, b);
            assert_eq!(u * a + v * b, 1, "{a}, {b}");
        }
    }
}
