//! Krichever's construction for curves y^m = f(x) (conventions file): expand the
//! normalized holomorphic differentials A^-1 omega = (U + V lam + W lam^2 + O(lam^3)) d lam
//! at a point P in a local parameter lam; then u = 2 d^2/dx^2 log theta(U x + V y + W t + D)
//! + c, with c from Dubrovin's conditions (Krichever 1977; Dubrovin 1981).
//!
//! Local parameters: lam = x - x_P at a finite point with y_P != 0; lam = y at a finite
//! branch point (y_P = 0); lam = x^(-1/m) at the one place over x = infinity when
//! gcd(m, deg f) = 1. At a branch point of a hyperelliptic curve every omega / d lam is
//! even in lam, so V = 0 and u solves KdV (Its & Matveev 1975; cited from memory).

use crate::periods::shape::Superelliptic;
use crate::periods::RiemannMatrix;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

#[derive(Clone, Debug)]
pub struct KricheverData {
    pub u: Vec<C64>,
    pub v: Vec<C64>,
    pub w: Vec<C64>,
    pub local_parameter: String,
}

/// f(x0 + lam) = f0 (1 + g1 lam + g2 lam^2 + ...): (f0, g1, g2).
fn expand(f: &[C64], x0: C64) -> (C64, C64, C64) {
    let mut t = crate::periods::general::plane::taylor(f, x0);
    t.resize(3, C64::new(0.0, 0.0));
    (t[0], t[1] / t[0], t[2] / t[0])
}

/// Where the wave is taken from.
#[derive(Clone, Copy, Debug)]
pub enum Place {
    /// A finite point (x_P, y_P) in the shape's coordinates.
    Finite(C64, C64),
    /// The one place over x = infinity (needs gcd(m, deg f) = 1).
    Infinity,
}

fn coefficients(s: &Superelliptic) -> Vec<C64> {
    s.f.0.iter().map(|c| C64::new(kelp_lang::number::to_f64(c), 0.0)).collect()
}

/// Normalizes the expansion rows (one per differential: coefficients of lam^0, lam^1,
/// lam^2) with the a-periods.
fn normalize(r: &RiemannMatrix, alpha: DMatrix<C64>, local_parameter: String) -> Result<KricheverData, String> {
    let g = alpha.nrows();
    let ainv = r.basis.a.clone().try_inverse().ok_or("the a-period matrix is singular")?;
    let n = ainv * alpha;
    let col = |k: usize| (0..g).map(|j| n[(j, k)]).collect::<Vec<_>>();
    Ok(KricheverData { u: col(0), v: col(1), w: col(2), local_parameter })
}

/// At a finite branch point (x_P, 0), lam = y: f(x_P + s) = f1 s + f2 s^2 + ... = lam^m
/// gives s = lam^m / f1 - f2 lam^(2m) / f1^3 + ..., so
/// x^p dx / y^j = (m / f1) x^p lam^(m-1-j) (1 - 2 f2 lam^m / f1^2 + ...) d lam,
/// x^p = x_P^p + p x_P^(p-1) lam^m / f1 + ...; only m = 2 has corrections below lam^3.
fn at_branch_point(s: &Superelliptic, r: &RiemannMatrix, xp: C64, f1: C64, f2: C64) -> Result<KricheverData, String> {
    let m = s.m as i32;
    let diffs = &r.periods.differentials;
    let mut alpha = DMatrix::<C64>::zeros(diffs.len(), 3);
    for (l, d) in diffs.iter().enumerate() {
        let p = d.power as i32;
        let e = m - 1 - d.j as i32;
        let lead = (m as f64 / f1) * xp.powi(p);
        if e <= 2 {
            alpha[(l, e as usize)] += lead;
        }
        if m == 2 {
            // e = 0 here (j = 1): the lam^2 corrections from dx and from x^p.
            let dx_term = lead * (-2.0 * f2 / (f1 * f1));
            let xp_term = if p >= 1 { (m as f64 / f1) * (p as f64) * xp.powi(p - 1) / f1 } else { C64::new(0.0, 0.0) };
            alpha[(l, 2)] += dx_term + xp_term;
        }
    }
    let yv = if s.swapped { "x" } else { "y" };
    normalize(r, alpha, format!("{yv} (at a branch point)"))
}

/// At the one place over x = infinity (gcd(m, n) = 1), lam = x^(-1/m): with
/// f = a x^n (1 + b1 / x + ...), y = a^(1/m) lam^(-n) (1 + b1 lam^m + ...)^(1/m), and
/// x^p dx / y^j = -m a^(-j/m) lam^(nj - m(p+1) - 1) (1 - (j/m) b1 lam^m + ...) d lam.
fn at_infinity(s: &Superelliptic, r: &RiemannMatrix) -> Result<KricheverData, String> {
    let f = coefficients(s);
    let n = f.len() as i32 - 1;
    let m = s.m as i32;
    if gcd(m, n) != 1 {
        return Err(format!(
            "the curve has {} places over {} = infinity (gcd({m}, {n}) > 1), which a plane point cannot tell apart; pick a finite point",
            gcd(m, n),
            if s.swapped { "y" } else { "x" }
        ));
    }
    let a = f[n as usize];
    let b1 = f[n as usize - 1] / a;
    let diffs = &r.periods.differentials;
    let mut alpha = DMatrix::<C64>::zeros(diffs.len(), 3);
    for (l, d) in diffs.iter().enumerate() {
        let (p, j) = (d.power as i32, d.j as i32);
        let e = n * j - m * (p + 1) - 1;
        let lead = -(m as f64) * a.powf(-(j as f64) / m as f64);
        if (0..=2).contains(&e) {
            alpha[(l, e as usize)] += lead;
        }
        if (0..=2).contains(&(e + m)) {
            alpha[(l, (e + m) as usize)] += lead * (-(j as f64) / m as f64) * b1;
        }
    }
    let xv = if s.swapped { "y" } else { "x" };
    normalize(r, alpha, format!("{xv}^(-1/{m}) (at the point at infinity)"))
}

fn gcd(a: i32, b: i32) -> i32 {
    if b == 0 {
        a.abs()
    } else {
        gcd(b, a % b)
    }
}

pub fn krichever_at(s: &Superelliptic, r: &RiemannMatrix, place: Place) -> Result<KricheverData, String> {
    match place {
        Place::Infinity => at_infinity(s, r),
        Place::Finite(xp, yp) => krichever_superelliptic(s, r, xp, yp),
    }
}

pub fn krichever_superelliptic(
    s: &Superelliptic,
    r: &RiemannMatrix,
    xp: C64,
    yp: C64,
) -> Result<KricheverData, String> {
    let f = coefficients(s);
    let m = s.m as f64;
    let (f0, g1, g2) = expand(&f, xp);
    let scale = f.iter().enumerate().map(|(k, c)| c.norm() * xp.norm().powi(k as i32)).sum::<f64>().max(1.0);
    let off = (yp.powu(s.m) - f0).norm();
    if off > 1e-9 * scale.max(yp.norm().powi(s.m as i32)) {
        return Err(format!("the point is not on the curve: y^{} - f(x) = {:.3e} there", s.m, off));
    }
    if yp.norm() < 1e-12 * scale.powf(1.0 / m) {
        // f0 = f(x_P) = 0 here, so `expand`'s ratios are useless: take f1, f2 directly.
        let mut t = crate::periods::general::plane::taylor(&f, xp);
        t.resize(3, C64::new(0.0, 0.0));
        let (f1, f2) = (t[1], t[2]);
        return at_branch_point(s, r, xp, f1, f2);
    }
    let xv = if s.swapped { "y" } else { "x" };
    let diffs = &r.periods.differentials;
    // omega_l / d lam = x^p y^-j with x = x_P + lam and y^-j = y_P^-j (f / f0)^(-j/m).
    let mut alpha = DMatrix::<C64>::zeros(diffs.len(), 3);
    for (l, d) in diffs.iter().enumerate() {
        let e = -(d.j as f64) / m;
        // (1 + g1 lam + g2 lam^2)^e = 1 + a1 lam + a2 lam^2 + ...
        let a1 = e * g1;
        let a2 = e * g2 + e * (e - 1.0) / 2.0 * g1 * g1;
        let p = d.power as i32;
        let xp0 = xp.powi(p);
        let xp1 = if p >= 1 { p as f64 * xp.powi(p - 1) } else { C64::new(0.0, 0.0) };
        let xp2 = if p >= 2 { (p * (p - 1)) as f64 / 2.0 * xp.powi(p - 2) } else { C64::new(0.0, 0.0) };
        let lead = yp.powi(-(d.j as i32));
        alpha[(l, 0)] = lead * xp0;
        alpha[(l, 1)] = lead * (xp1 + xp0 * a1);
        alpha[(l, 2)] = lead * (xp2 + xp1 * a1 + xp0 * a2);
    }
    normalize(r, alpha, format!("{xv} - {xv}_P"))
}

/// Truncated power series in the local parameter: coefficients of lam^0..lam^3.
type S = [C64; 4];

const Z: C64 = C64 { re: 0.0, im: 0.0 };

fn s_mul(a: &S, b: &S) -> S {
    let mut r = [Z; 4];
    for i in 0..4 {
        for j in 0..4 - i {
            r[i + j] += a[i] * b[j];
        }
    }
    r
}

fn s_inv(a: &S) -> S {
    let mut r = [Z; 4];
    r[0] = C64::new(1.0, 0.0) / a[0];
    for k in 1..4 {
        let s: C64 = (1..=k).map(|i| a[i] * r[k - i]).sum();
        r[k] = -s * r[0];
    }
    r
}

fn s_sub(a: &S, b: &S) -> S {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2], a[3] - b[3]]
}

/// The series of sum over c[j][i] x^i y^j, or with `dy` of its derivative in y.
fn s_bivariate(c: &[Vec<C64>], x: &S, y: &S, dy: bool) -> S {
    let one = [C64::new(1.0, 0.0), Z, Z, Z];
    let mut xp = vec![one];
    let mut yp = vec![one];
    for _ in 1..c.iter().map(Vec::len).max().unwrap_or(1).max(c.len()) {
        let (lx, ly) = (*xp.last().unwrap(), *yp.last().unwrap());
        xp.push(s_mul(&lx, x));
        yp.push(s_mul(&ly, y));
    }
    let mut out = [Z; 4];
    for (j, row) in c.iter().enumerate() {
        if dy && j == 0 {
            continue;
        }
        let (yj, w) = if dy { (yp[j - 1], j as f64) } else { (yp[j], 1.0) };
        for (i, v) in row.iter().enumerate() {
            if *v == Z {
                continue;
            }
            let t = s_mul(&xp[i], &yj);
            for k in 0..4 {
                out[k] += t[k] * *v * w;
            }
        }
    }
    out
}

/// Krichever data for a general plane curve: `user` is the curve's own equation in its
/// chart z = 1 (c[j][i] for x^i y^j), P = (x_P, y_P) a smooth point. The local parameter
/// is x - x_P when F_y(P) != 0, else y - y_P; the curve is expanded as a power series in
/// it by Newton's method on series, carried to the covering route's coordinates, and the
/// differentials expanded there.
/// `chart` is the homogeneous coordinate set to 1 (2 for the affine chart z = 1; 0 or 1 for
/// a point at infinity); `user` and (xp, yp) are in that chart's two other coordinates.
pub fn krichever_general(
    forms: &crate::periods::general::PlaneForms,
    r: &RiemannMatrix,
    user: &[Vec<C64>],
    chart: usize,
    xp: C64,
    yp: C64,
) -> Result<KricheverData, String> {
    use crate::periods::general::plane::Plane;
    let d = user.len().saturating_sub(1);
    let f = Plane { d, c: user.to_vec() };
    let (v, size) = f.partial_with_size(0, 0, xp, yp);
    if v.norm() > 1e-9 * size.max(1e-300) {
        return Err(format!("the point is not on the curve: F = {:.3e} there (terms of size {size:.3e})", v.norm()));
    }
    let (fx, sx) = f.partial_with_size(1, 0, xp, yp);
    let (fy, sy) = f.partial_with_size(0, 1, xp, yp);
    let small = |v: C64, s: f64| v.norm() <= 1e-9 * s.max(1e-300);
    if small(fx, sx) && small(fy, sy) {
        return Err("the point is a singular point of the curve; Krichever's construction needs a smooth point".into());
    }
    let by_x = !small(fy, sy) && fy.norm() >= 1e-3 * fx.norm();
    // x(lam), y(lam): one of them lam plus a constant, the other by Newton on series.
    let mut x: S = [xp, Z, Z, Z];
    let mut y: S = [yp, Z, Z, Z];
    if by_x {
        x[1] = C64::new(1.0, 0.0);
    } else {
        y[1] = C64::new(1.0, 0.0);
    }
    let fx_rows: Vec<Vec<C64>> =
        user.iter().map(|row| row.iter().enumerate().skip(1).map(|(i, v)| *v * i as f64).collect::<Vec<_>>()).collect();
    for _ in 0..3 {
        let val = s_bivariate(user, &x, &y, false);
        if by_x {
            let der = s_bivariate(user, &x, &y, true);
            y = s_sub(&y, &s_mul(&val, &s_inv(&der)));
        } else {
            let der = s_bivariate(&fx_rows, &x, &y, false);
            x = s_sub(&x, &s_mul(&val, &s_inv(&der)));
        }
    }
    // The point of P^2 as series, the chart's coordinate 1 in its place; then
    // (x : y : z) = change (X : Y : Z), so (X, Y, Z) = change^-1 (x, y, z).
    let m = nalgebra::Matrix3::from_fn(|i, j| forms.change[i][j] as f64);
    let n = m.try_inverse().ok_or("singular change of coordinates")?;
    let one: S = [C64::new(1.0, 0.0), Z, Z, Z];
    let rest: Vec<usize> = (0..3).filter(|&k| k != chart).collect();
    let mut point = [one; 3];
    point[rest[0]] = x;
    point[rest[1]] = y;
    let comb = |row: usize| -> S {
        let mut out = [Z; 4];
        for (k, s) in point.iter().enumerate() {
            for t in 0..4 {
                out[t] += s[t] * n[(row, k)];
            }
        }
        out
    };
    let (cx, cy, cz) = (comb(0), comb(1), comb(2));
    // In homogeneous coordinates omega = P(X, Y, Z) (Z dX - X dZ) / G_Y = -P (Z dY - Y dZ) / G_X
    // (from P(x, y) dx / G_y in the chart Z = 1; invariant under rescaling), so no chart of
    // the covering route is needed and points on its line at infinity are fine. Divide by
    // the larger of G_Y, G_X at P (G_Y vanishes at branch points of the projection).
    let der = |s: &S| -> S { [s[1], s[2] * 2.0, s[3] * 3.0, Z] };
    let powers = |s: &S, e: usize| (0..e).fold(one, |acc, _| s_mul(&acc, s));
    let dg = forms.plane.d;
    // sum of c[j][i] * weight * X^(i - di) Y^(j - dj) Z^(rest) for the partials of G.
    let partial = |dx: bool| -> S {
        let mut out = [Z; 4];
        for (j, row) in forms.plane.c.iter().enumerate() {
            for (i, v) in row.iter().enumerate() {
                if *v == Z || i + j > dg {
                    continue;
                }
                let (w, pi, pj) = if dx { (i, i.wrapping_sub(1), j) } else { (j, i, j.wrapping_sub(1)) };
                if w == 0 {
                    continue;
                }
                let t = s_mul(&s_mul(&powers(&cx, pi), &powers(&cy, pj)), &powers(&cz, dg - i - j));
                for k in 0..4 {
                    out[k] += t[k] * *v * w as f64;
                }
            }
        }
        out
    };
    let (gy, gx) = (partial(false), partial(true));
    let common = if gy[0].norm() >= gx[0].norm() {
        s_mul(&s_sub(&s_mul(&cz, &der(&cx)), &s_mul(&cx, &der(&cz))), &s_inv(&gy))
    } else {
        let q = s_mul(&s_sub(&s_mul(&cz, &der(&cy)), &s_mul(&cy, &der(&cz))), &s_inv(&gx));
        [-q[0], -q[1], -q[2], -q[3]]
    };
    let mono: Vec<S> = forms
        .monomials
        .iter()
        .map(|&(a, b)| {
            let (a, b) = (a as usize, b as usize);
            s_mul(&s_mul(&powers(&cx, a), &powers(&cy, b)), &powers(&cz, dg - 3 - a - b))
        })
        .collect();
    let g = forms.basis.ncols();
    let mut alpha = DMatrix::<C64>::zeros(g, 3);
    for l in 0..g {
        let mut p = [Z; 4];
        for (k, s) in mono.iter().enumerate() {
            for t in 0..4 {
                p[t] += s[t] * forms.basis[(k, l)];
            }
        }
        let w = s_mul(&p, &common);
        for k in 0..3 {
            alpha[(l, k)] = w[k];
        }
    }
    // The local parameter by name: x - x_P in the chart z = 1, (y/x) - (y/x)_P in x = 1, ...
    let names = ["x", "y", "z"];
    let k = rest[if by_x { 0 } else { 1 }];
    let label = if chart == 2 {
        format!("{0} - {0}_P", names[k])
    } else {
        format!("({0}/{1}) - ({0}/{1})_P", names[k], names[chart])
    };
    normalize(r, alpha, label)
}
