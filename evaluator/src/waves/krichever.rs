//! Krichever's construction for curves y^m = f(x) at a finite point P = (x_P, y_P) with
//! y_P != 0, local parameter lam = x - x_P (conventions file): expand the normalized
//! holomorphic differentials A^-1 omega = (U + V lam + W lam^2 + O(lam^3)) d lam; then
//! u = 2 d^2/dx^2 log theta(U x + V y + W t + D | tau) + c, with c from Dubrovin's
//! conditions (Krichever 1977; Dubrovin 1981).

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
    // Taylor coefficients of f at x0 by repeated synthetic division.
    let mut c: Vec<C64> = f.to_vec();
    let mut taylor = vec![];
    for _ in 0..3 {
        let mut acc = C64::new(0.0, 0.0);
        let mut next = vec![C64::new(0.0, 0.0); c.len().saturating_sub(1)];
        for k in (0..c.len()).rev() {
            acc = acc * x0 + c[k];
            if k > 0 {
                next[k - 1] = acc;
            }
        }
        taylor.push(acc);
        // `next` holds the quotient coefficients (low to high) of (f - f(x0)) / (x - x0).
        c = next;
        if c.is_empty() {
            break;
        }
    }
    taylor.resize(3, C64::new(0.0, 0.0));
    (taylor[0], taylor[1] / taylor[0], taylor[2] / taylor[0])
}

pub fn krichever_superelliptic(
    s: &Superelliptic,
    r: &RiemannMatrix,
    xp: C64,
    yp: C64,
) -> Result<KricheverData, String> {
    let f: Vec<C64> = s.f.0.iter().map(|c| C64::new(kelp_lang::number::to_f64(c), 0.0)).collect();
    let m = s.m as f64;
    let (f0, g1, g2) = expand(&f, xp);
    let scale = f.iter().enumerate().map(|(k, c)| c.norm() * xp.norm().powi(k as i32)).sum::<f64>().max(1.0);
    let off = (yp.powu(s.m) - f0).norm();
    if off > 1e-9 * scale.max(yp.norm().powi(s.m as i32)) {
        return Err(format!("the point is not on the curve: y^{} - f(x) = {:.3e} there", s.m, off));
    }
    if yp.norm() < 1e-12 * scale.powf(1.0 / m) {
        return Err(
            "the point is a branch point (y = 0); the local parameter there is y, which is not supported yet".into()
        );
    }
    let xv = if s.swapped { "y" } else { "x" };
    let diffs = &r.periods.differentials;
    let g = diffs.len();
    // omega_l / d lam = x^p y^-j with x = x_P + lam and y^-j = y_P^-j (f / f0)^(-j/m).
    let mut alpha = DMatrix::<C64>::zeros(g, 3);
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
    let ainv = r.a_basis.clone().try_inverse().ok_or("the a-period matrix is singular")?;
    let n = ainv * alpha;
    let col = |k: usize| (0..g).map(|j| n[(j, k)]).collect::<Vec<_>>();
    Ok(KricheverData { u: col(0), v: col(1), w: col(2), local_parameter: format!("{xv} - {xv}_P") })
}
