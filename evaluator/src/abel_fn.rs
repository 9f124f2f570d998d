//! `abel_jacobi(C, D [, counts =, from =, reduce =])`, `riemann_constant(C [, from =,
//! reduce =])` and `lattice_coords(T, z)`: the Abel–Jacobi map of curves y^m = f(x) in
//! the normalised coordinates of their Riemann matrix, reduced modulo the lattice, with
//! bounds (the unnormalised integrals come from `periods::abel`).
//!
//! Normalising: z = A^-1 u with A the a-periods of the basis tau refers to; A^-1 and its
//! entrywise bound from `matrix_bound::inverse` (a proven bound), so each entry of z is off
//! by at most sum_j (|A^-1_ij| + e_inv)(du) + e_inv |u_j|, plus the products' rounding.
//! Reducing: z = a + T b with b = (Im T)^-1 Im z; subtracting T k + n with k = round(b),
//! n = round(a) moves z by a lattice vector, exactly as far as the mathematics goes; the
//! bound grows by T's bound times sum |k| and the rounding of the products.

use crate::eval::{fail, Evaluator, Fail};
use crate::matrix_bound;
use crate::num::Num;
use crate::periods::abel::{AbelMap, Image, Place};
use crate::periods::shape::{superelliptic_route, Superelliptic};
use crate::periods::RiemannMatrix;
use crate::value::{Value, Valued};
use kelp_lang::ast::{Arg, Expr};
use kelp_lang::{Code, Span};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

const U: f64 = crate::num::UNIT_ROUNDOFF;

/// A point argument read as a place, with how far its image may be off because the point
/// itself is (rounding of exact coordinates, the input's bound, the move onto the curve).
struct Located {
    place: Place,
    /// Bound on |AJ(given) - AJ(place)| per entry, before normalising.
    error: f64,
}

fn gcd(a: u32, b: u32) -> u32 {
    if b == 0 {
        a
    } else {
        gcd(b, a % b)
    }
}

impl Evaluator<'_> {
    pub(crate) fn abel_call(&mut self, span: Span, what: &str, args: &[Arg]) -> Result<Valued, Fail> {
        if what == "lattice_coords" {
            return self.lattice_coords_call(span, args);
        }
        let (c, reduce, cspan) = self.curve_and_reduce(span, what, args)?;
        let shape = superelliptic_route(&c.equation.poly, c.equation.projective).ok_or_else(|| {
            fail(
                Code::NotSupported,
                cspan,
                format!(
                    "`{what}` is built for curves y^m = f(x) (f square-free) so far; `{}` takes the covering route, which has no Abel–Jacobi map yet",
                    c.name
                ),
            )
        })?;
        let r = self.riemann_matrix(&c, reduce, cspan)?;
        let accuracy = self.checked.settings.accuracy();
        let map = AbelMap::new(&r.periods, shape.m, &shape.f, accuracy)
            .map_err(|m| fail(Code::EvalFailed, cspan, format!("`{what}({})`: {m}", c.name)))?;
        let n = shape.f.degree().unwrap_or(0) as u32;
        let divisor =
            if what == "riemann_constant" { None } else { Some(self.divisor_image(span, args, &map, &shape)?) };
        // A divisor of degree 0 needs no base point.
        let needs_base = divisor.as_ref().is_none_or(|d| d.1 != 0);
        let base = match Self::keyword(args, "from") {
            Some(e) => {
                let v = self.expr(e)?;
                self.locate(&map, &shape, &v, e)?
            }
            None if gcd(shape.m, n) == 1 || !needs_base => Located { place: Place::Infinity, error: 0.0 },
            None => {
                return Err(fail(
                    Code::MissingArgument,
                    span,
                    format!(
                    "`{}` has {} places at infinity, so there is no default base point: give one with `from = (x, y)`",
                    c.name,
                    gcd(shape.m, n)
                ),
                ))
            }
        };
        let Some((u, degree, described)) = divisor else {
            let base_img = map.place(base.place).map_err(|m| fail(Code::EvalFailed, span, m))?;
            return self.riemann_constant(span, &c.name, &map, &r, &base_img, base.error);
        };
        let mut total = u;
        if degree != 0 {
            let base_img = map.place(base.place).map_err(|m| fail(Code::EvalFailed, span, m))?;
            total.add_times(&base_img, -degree);
            total.error += degree.unsigned_abs() as f64 * base.error;
        }
        let (z, err) = normalise(&r, &total).map_err(|m| fail(Code::EvalFailed, span, m))?;
        let (z, err) = reduce_mod_lattice(&r.tau, r.error, &z, err);
        let reason = format!(
            "Abel–Jacobi image of {described} from {}, in the normalised coordinates of {} tau(`{}`) (lattice Z^{g} + T Z^{g}), reduced to a + T b with a, b in [-1/2, 1/2)^{g}; error <= {err:.1e}",
            if degree == 0 {
                "any base point (degree 0)"
            } else if Self::keyword(args, "from").is_some() {
                "the given base point"
            } else {
                "the point at infinity"
            },
            if r.reduced.is_some() { "the Siegel-reduced" } else { "the unreduced" },
            c.name,
            g = z.len()
        );
        Ok(Valued { value: complex_vector(&z), error_bound: err, reason: Some(reason) })
    }

    /// sum n_i AJ(P_i) from r_0 over the divisor's points, its degree and a description.
    fn divisor_image(
        &mut self,
        span: Span,
        args: &[Arg],
        map: &AbelMap,
        shape: &Superelliptic,
    ) -> Result<(Image, i64, String), Fail> {
        let mut positional = args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None });
        let de = positional
            .nth(1)
            .ok_or_else(|| fail(Code::MissingArgument, span, "`abel_jacobi` needs a point or a list of points"))?;
        let dv = self.expr(de)?;
        let items: Vec<Valued> = match &dv.value {
            Value::Point { .. } => vec![dv.clone()],
            Value::List(vs) => {
                vs.iter().map(|v| Valued { value: v.clone(), error_bound: dv.error_bound, reason: None }).collect()
            }
            _ => return Err(fail(Code::WrongKind, de.span, "`abel_jacobi` needs a point or a list of points")),
        };
        if items.is_empty() {
            return Err(fail(Code::EvalFailed, de.span, "the list of points is empty"));
        }
        let counts: Vec<i64> = match Self::keyword(args, "counts") {
            None => vec![1; items.len()],
            Some(e) => {
                let v = self.expr(e)?;
                let Value::Vector(ns) = &v.value else {
                    return Err(fail(Code::WrongKind, e.span, "`counts` is a vector of whole numbers"));
                };
                if ns.len() != items.len() {
                    return Err(fail(
                        Code::ShapeMismatch,
                        e.span,
                        format!("`counts` has {} entries for {} points", ns.len(), items.len()),
                    ));
                }
                ns.iter()
                    .map(|q| match q {
                        Num::Exact(q) if q.is_integer() && q.numer().bits() < 40 => {
                            Ok(i64::try_from(q.to_integer()).unwrap_or(0))
                        }
                        _ => Err(fail(Code::WrongKind, e.span, "`counts` are exact whole numbers (below 2^40)")),
                    })
                    .collect::<Result<_, _>>()?
            }
        };
        let mut img = Image::zero(map.genus());
        for (it, &k) in items.iter().zip(&counts) {
            crate::limits::checkpoint();
            let loc = self.locate(map, shape, it, de)?;
            let one = map.place(loc.place).map_err(|m| fail(Code::EvalFailed, de.span, m))?;
            img.add_times(&one, k);
            img.error += k.unsigned_abs() as f64 * loc.error;
        }
        let degree: i64 = counts.iter().sum();
        let described = if items.len() == 1 && counts[0] == 1 {
            "the point".to_string()
        } else {
            format!("a divisor of degree {degree} on {} points", items.len())
        };
        Ok((img, degree, described))
    }

    /// Reads a point value as a place of y^m = f(x) (in the route's coordinates), checking
    /// that it is on the curve: exactly when its coordinates are exact, else within the
    /// tolerance after Newton's method moved it onto the curve.
    fn locate(&mut self, map: &AbelMap, shape: &Superelliptic, v: &Valued, e: &Expr) -> Result<Located, Fail> {
        let Value::Point { coords, projective } = &v.value else {
            return Err(fail(Code::WrongKind, e.span, "a point `(x, y)` or `(x : y : z)` is needed here"));
        };
        let n = shape.f.degree().unwrap_or(0) as u32;
        if *projective && coords.len() == 3 && coords[2].is_zero() {
            let (qx, qy) = if shape.swapped { (&coords[1], &coords[0]) } else { (&coords[0], &coords[1]) };
            // Y ~ X^(n/m) at X = infinity: the plane point is (0 : 1 : 0) when n > m, (1 : 0 : 0) when n < m.
            let ok = if n > shape.m { qx.is_zero() && !qy.is_zero() } else { qy.is_zero() && !qx.is_zero() };
            if !ok {
                return Err(fail(Code::EvalFailed, e.span, "this point at infinity is not on the curve"));
            }
            if gcd(shape.m, n) != 1 {
                return Err(fail(
                    Code::EvalFailed,
                    e.span,
                    format!(
                        "the curve has {} places at infinity (gcd({}, {n}) > 1), which a plane point cannot tell apart; use finite points",
                        gcd(shape.m, n),
                        shape.m
                    ),
                ));
            }
            return Ok(Located { place: Place::Infinity, error: 0.0 });
        }
        let (x, y) = match (coords.len(), projective) {
            (2, false) => (coords[0].clone(), coords[1].clone()),
            (3, true) => {
                let z = &coords[2];
                let d = |a: &Num| a.div(z).map_err(|m| fail(Code::EvalFailed, e.span, m));
                (d(&coords[0])?, d(&coords[1])?)
            }
            _ => {
                return Err(fail(
                    Code::WrongKind,
                    e.span,
                    "a plane point has two affine or three projective coordinates",
                ))
            }
        };
        let (x, y) = if shape.swapped { (y, x) } else { (x, y) };
        // Exact coordinates exactly on the curve are a point known exactly; any others
        // (decimals are exact rationals too) are read as an approximation of a point.
        let exact = x.is_exact() && y.is_exact() && v.error_bound == 0.0 && {
            let (qx, qy) = (x.to_rational().unwrap(), y.to_rational().unwrap());
            num_traits::Pow::pow(&qy, shape.m as i32) == shape.f.eval(&qx)
        };
        let (x0, y0) = (x.to_complex(), y.to_complex());
        let too_big = |z: C64| !(z.norm() < 1e100);
        if too_big(x0) || too_big(y0) {
            return Err(fail(
                Code::EvalFailed,
                e.span,
                "the point's coordinates are too large for double precision (above 1e100)",
            ));
        }
        let (xr, yr, moved) = map.refine(x0, y0);
        let size = 1.0f64.max(x0.norm()).max(y0.norm());
        let tolerance = self.checked.settings.tolerance();
        // Where f's terms cancel, double precision cannot place the point better than its
        // rounding; within that the point is as much on the curve as can be shown (the
        // move still enters the bound).
        let limit = map.rounding_limit(xr, yr);
        if !exact && !(moved <= (tolerance * size).max(limit)) {
            let why = if moved.is_finite() {
                format!("the nearest point found is {moved:.2e} away")
            } else {
                "no nearby point was found".to_string()
            };
            return Err(fail(
                Code::EvalFailed,
                e.span,
                format!("the point is not on the curve within the tolerance {tolerance:.0e}: {why}"),
            ));
        }
        // How far the point may be from the one integrated to: the conversion of exact
        // coordinates, the input's bound, the move, and the rounding of the coordinates.
        let delta =
            (x.conversion_error() + y.conversion_error() + v.error_bound + moved + 4.0 * U * size) * (1.0 + 8.0 * U);
        Ok(Located { place: Place::Finite(xr, yr), error: 2.0 * map.sensitivity(xr, yr) * delta })
    }

    /// Riemann's constant vector from the base point (see `riemann_constant_at_r0`), moved
    /// to the base: K(P0) = K(r_0) - (g - 1) AJ_(r_0)(P0), from theta(AJ_P0(D) - K(P0)) = 0
    /// with AJ_P0(D) = AJ_r0(D) - (g - 1) AJ_r0(P0) for D of degree g - 1.
    fn riemann_constant(
        &mut self,
        span: Span,
        name: &str,
        map: &AbelMap,
        r: &RiemannMatrix,
        base: &Image,
        base_error: f64,
    ) -> Result<Valued, Fail> {
        let g = map.genus();
        if g > 5 {
            return Err(fail(
                Code::NotSupported,
                span,
                format!("`riemann_constant` is computed up to genus 5 (4^g half-periods are tested); `{name}` has genus {g}"),
            ));
        }
        let (k0, k0_err, tests) = self.riemann_constant_at_r0(span, map, r)?;
        let mut shift = base.clone();
        shift.error += base_error;
        let (b, b_err) = normalise(r, &shift).map_err(|m| fail(Code::EvalFailed, span, m))?;
        let gm1 = (g as f64) - 1.0;
        let k: Vec<C64> = k0.iter().zip(&b).map(|(a, b)| a - b * gm1).collect();
        let err =
            (k0_err + gm1 * b_err) * (1.0 + 8.0 * U) + 4.0 * U * gm1 * b.iter().map(|v| v.norm()).fold(0.0, f64::max);
        let (k, err) = reduce_mod_lattice(&r.tau, r.error, &k, err);
        let reason = format!(
            "Riemann's constant of `{name}` for the basis of {} tau: 2K from a canonical divisor, the half-period fixed by theta(AJ(D) - K) = 0 on {tests} test divisors of degree {} (every other candidate proved nonzero); error <= {err:.1e}",
            if r.reduced.is_some() { "the Siegel-reduced" } else { "the unreduced" },
            g - 1
        );
        Ok(Valued { value: complex_vector(&k), error_bound: err, reason: Some(reason) })
    }

    /// K(r_0) (normalised), its bound and the number of test divisors used. 2K is the image
    /// of a canonical divisor (`AbelMap::canonical_coefficient`), so K = N S / 2 + h for
    /// one of the 4^g half-periods h = (alpha + T beta) / 2; Riemann's vanishing theorem
    /// (theta(AJ(D) - K) = 0 for every effective D of degree g - 1; Mumford, *Tata Lectures
    /// on Theta I*, II.3) keeps the true one, and a wrong one is excluded as soon as theta is
    /// proved nonzero for one D (a translate of the theta divisor by a nonzero half-period
    /// is another divisor, so generic D exclude it).
    fn riemann_constant_at_r0(
        &mut self,
        span: Span,
        map: &AbelMap,
        r: &RiemannMatrix,
    ) -> Result<(Vec<C64>, f64, usize), Fail> {
        let g = map.genus();
        let coef = map.canonical_coefficient().map_err(|m| fail(Code::EvalFailed, span, m))?;
        let mut half = Image::zero(g);
        half.add_times(&map.branch_sum(), coef);
        let (mut n_s, n_err) = normalise(r, &half).map_err(|m| fail(Code::EvalFailed, span, m))?;
        for v in n_s.iter_mut() {
            *v *= 0.5;
        }
        let n_err = 0.5 * n_err;
        let t = &r.tau;
        let candidates: Vec<Vec<C64>> = (0..1usize << (2 * g))
            .map(|bits| {
                (0..g)
                    .map(|i| {
                        let alpha = ((bits >> i) & 1) as f64;
                        let beta: C64 = (0..g).map(|j| t[(i, j)] * ((bits >> (g + j)) & 1) as f64).sum();
                        n_s[i] + 0.5 * (alpha + beta)
                    })
                    .collect()
            })
            .collect();
        // A candidate's own error: N S / 2's, and T's through beta (at most g entries of 1/2).
        let cand_err = n_err + 0.5 * g as f64 * r.error + 4.0 * U * (g as f64 + 1.0);
        let mut alive: Vec<usize> = (0..candidates.len()).collect();
        let mut tests = 0;
        let max_tests = if g == 1 { 1 } else { 6 };
        while tests < max_tests && alive.len() > 1 {
            crate::limits::checkpoint();
            let mut d = Image::zero(g);
            for q in 0..g.saturating_sub(1) {
                let (x, y) = map.test_point(tests * g + q);
                let one = map.place(Place::Finite(x, y)).map_err(|m| fail(Code::EvalFailed, span, m))?;
                d.add_times(&one, 1);
            }
            let (zd, zd_err) = normalise(r, &d).map_err(|m| fail(Code::EvalFailed, span, m))?;
            tests += 1;
            let mut keep = vec![];
            for &c in &alive {
                let z: Vec<C64> = zd.iter().zip(&candidates[c]).map(|(a, b)| a - b).collect();
                let z_err = zd_err + cand_err + 4.0 * U * z.iter().map(|v| v.norm()).fold(0.0, f64::max);
                let th = self.theta_bounded(t, r.error, &z, z_err, None, &[], span, span)?;
                let Value::Num(v) = &th.value else { unreachable!("theta is a number") };
                if v.magnitude() <= th.error_bound {
                    keep.push(c);
                }
            }
            alive = keep;
        }
        match alive.as_slice() {
            [c] => Ok((candidates[*c].clone(), cand_err, tests)),
            [] => Err(fail(
                Code::EvalFailed,
                span,
                "no half-period satisfies Riemann's vanishing theorem within the bounds; the periods may be inaccurate",
            )),
            several => Err(fail(
                Code::ClaimUndecided,
                span,
                format!(
                    "{} candidates for Riemann's constant remain after {tests} test divisors: theta is not proved nonzero at the others",
                    several.len()
                ),
            )),
        }
    }

    fn lattice_coords_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        let pos: Vec<&Expr> =
            args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
        let (Some(te), Some(ze)) = (pos.first(), pos.get(1)) else {
            return Err(fail(Code::MissingArgument, span, "`lattice_coords` needs a Riemann matrix and a vector"));
        };
        let tv = self.expr(te)?;
        let zv = self.expr(ze)?;
        let Value::Matrix(t) = &tv.value else {
            return Err(fail(Code::WrongKind, te.span, "`lattice_coords` needs a square matrix first"));
        };
        let g = t.len();
        if t.iter().any(|r| r.len() != g) {
            return Err(fail(Code::ShapeMismatch, te.span, "`lattice_coords` needs a square matrix first"));
        }
        let Value::Vector(z) = &zv.value else {
            return Err(fail(Code::WrongKind, ze.span, "`lattice_coords` needs a vector second"));
        };
        if z.len() != g {
            return Err(fail(
                Code::ShapeMismatch,
                ze.span,
                format!("the vector has {} entries for a {g} x {g} matrix", z.len()),
            ));
        }
        let im: Vec<Vec<Num>> = t.iter().map(|r| r.iter().map(|v| Num::Real(v.to_complex().im)).collect()).collect();
        // Im and Re of an entry are off by at most the entry's bound.
        let (inv, e_inv) = matrix_bound::inverse(&im, tv.error_bound)
            .map_err(|m| fail(Code::NotRiemannMatrix, te.span, format!("Im T cannot be inverted: {m}")))?;
        let (dz, dt) = (zv.error_bound, tv.error_bound);
        let mut b = vec![0.0; g];
        let mut db = vec![0.0; g];
        for i in 0..g {
            for j in 0..g {
                let w = inv[i][j].to_complex().re;
                let y = z[j].to_complex().im;
                b[i] += w * y;
                db[i] += (w.abs() + e_inv) * dz + e_inv * y.abs() + 2.0 * g as f64 * U * (w * y).abs();
            }
        }
        let mut a = vec![0.0; g];
        let mut da = vec![0.0; g];
        for i in 0..g {
            a[i] = z[i].to_complex().re;
            da[i] = dz;
            for j in 0..g {
                let w = t[i][j].to_complex().re;
                a[i] -= w * b[j];
                da[i] += (w.abs() + dt) * db[j] + dt * b[j].abs() + 2.0 * g as f64 * U * (w * b[j]).abs();
            }
            da[i] += 2.0 * g as f64 * U * a[i].abs();
        }
        let err = da.iter().chain(&db).copied().fold(0.0, f64::max) * (1.0 + 8.0 * U);
        let out: Vec<Num> = a.iter().chain(&b).map(|v| Num::Real(*v)).collect();
        Ok(Valued {
            value: Value::Vector(out),
            error_bound: err,
            reason: Some(format!("z = a + T b with [a, b] as given; error <= {err:.1e}")),
        })
    }
}

fn complex_vector(z: &[C64]) -> Value {
    Value::Vector(z.iter().map(|v| Num::Complex(*v)).collect())
}

/// z = A^-1 u with its bound (see the module header).
pub(crate) fn normalise(r: &RiemannMatrix, u: &Image) -> Result<(Vec<C64>, f64), String> {
    let a = &r.basis.a;
    let g = a.nrows();
    let rows: Vec<Vec<Num>> = (0..g).map(|i| (0..g).map(|j| Num::Complex(a[(i, j)])).collect()).collect();
    let (inv, e_inv) = matrix_bound::inverse(&rows, r.basis.a_error)?;
    let mut z = vec![C64::new(0.0, 0.0); g];
    let mut err: f64 = 0.0;
    for i in 0..g {
        let mut e = 0.0;
        for j in 0..g {
            let w = inv[i][j].to_complex();
            z[i] += w * u.v[j];
            e += (w.norm() + e_inv) * u.error + e_inv * u.v[j].norm() + 4.0 * g as f64 * U * (w * u.v[j]).norm();
        }
        err = err.max(e);
    }
    Ok((z, err * (1.0 + 8.0 * U)))
}

/// z moved by a lattice vector n + T k into a + T b with a, b in [-1/2, 1/2) (up to the
/// rounding of the reduction), with the bound grown by T's error times sum |k|.
pub(crate) fn reduce_mod_lattice(t: &DMatrix<C64>, t_err: f64, z: &[C64], err: f64) -> (Vec<C64>, f64) {
    let g = z.len();
    let im = t.map(|v| v.re * 0.0 + v.im);
    let Some(im_inv) = im.clone().try_inverse() else { return (z.to_vec(), err) };
    let zim = nalgebra::DVector::from_iterator(g, z.iter().map(|v| v.im));
    let b = &im_inv * zim;
    let k: Vec<f64> = b.iter().map(|v| (v + 0.5).floor()).collect();
    let mut out: Vec<C64> = z.to_vec();
    for i in 0..g {
        for j in 0..g {
            out[i] -= t[(i, j)] * k[j];
        }
    }
    // a = Re z1 - Re T (b - k)
    let frac: Vec<f64> = (0..g).map(|j| b[j] - k[j]).collect();
    for i in 0..g {
        let a = out[i].re - (0..g).map(|j| t[(i, j)].re * frac[j]).sum::<f64>();
        out[i] -= C64::new((a + 0.5).floor(), 0.0);
    }
    let ksum: f64 = k.iter().map(|v| v.abs()).sum();
    let tmax = t.iter().map(|v| v.norm()).fold(0.0, f64::max);
    let size = z.iter().map(|v| v.norm()).fold(0.0, f64::max);
    let extra = t_err * ksum + 4.0 * (g as f64 + 1.0) * U * (tmax * ksum + size + 1.0);
    (out, (err + extra) * (1.0 + 8.0 * U))
}
