//! The wave built-ins: `soliton`, `rational`, `theta_wave`, `krichever` (constructors) and
//! `value`, `kp_residual`, `regular` (evaluations over points and regions).

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::periods::shape::superelliptic_route;
use crate::theta::ThetaContext;
use crate::value::{Value, Valued};
use crate::waves::krichever::Place;
use crate::waves::rational::RationalWave;
use crate::waves::regular::{self, Verdict};
use crate::waves::soliton::Soliton;
use crate::waves::theta_wave::{dubrovin_constants, ThetaWave};
use crate::waves::{Wave, WaveKind, KP_FORM};
use kelp_lang::ast::{Arg, Axis, AxisKind, Expr, Ident, OutputKind, StrLit};
use kelp_lang::{Code, Diagnostic, Span};
use num_complex::Complex64 as C64;
use serde_json::{json, Value as J};
use std::sync::Arc;

fn show_vector(v: &[C64]) -> String {
    format!("[{}]", v.iter().map(|c| Num::Complex(*c).to_string()).collect::<Vec<_>>().join(", "))
}

/// Sample points per axis of a range written without `step`.
pub const DEFAULT_SAMPLES: usize = 21;

fn c2(c: C64) -> J {
    json!([c.re, c.im])
}

pub fn wave_json(w: &Wave) -> J {
    let mut o = json!({"kind": w.kind_name(), "origin": w.origin, "kp_form": KP_FORM});
    match &w.kind {
        WaveKind::Theta(t) => {
            o["genus"] = json!(t.u.len());
            o["u"] = J::Array(t.u.iter().map(|v| c2(*v)).collect());
            o["v"] = J::Array(t.v.iter().map(|v| c2(*v)).collect());
            o["w"] = J::Array(t.w.iter().map(|v| c2(*v)).collect());
            o["c"] = c2(t.c);
            o["shift"] = J::Array(t.shift.iter().map(|v| c2(*v)).collect());
        }
        WaveKind::Soliton(s) => {
            o["kappa"] = json!(s.kappa);
            o["k"] = json!(s.k);
            o["terms"] = json!(s.terms());
        }
        WaveKind::Rational(r) => {
            o["partition"] = json!(r.partition);
            o["tau"] = json!(format!("{}", r.tau).replace('z', "t"));
            o["exact_solution"] = json!(r.exact_solution);
        }
        WaveKind::Water(water) => {
            o["units"] = json!({"x": "m", "y": "m", "t": "s", "eta": "m"});
            o["depth_m"] = json!(water.depth);
            o["gravity_m_s2"] = json!(water.gravity);
            o["epsilon"] = json!(water.epsilon);
            o["c0_m_s"] = json!(water.c0);
            o["mapping"] = json!({
                "eta": format!("{} * u", water.eta_scale()),
                "x": format!("(x_m - {} * t_s) / {}", water.c0, water.length),
                "y": format!("y_m / {}", water.width),
                "t": format!("t_s / ({})", water.time),
                "equation": "dimensional KP-II, Ablowitz & Segur, J. Fluid Mech. 92 (1979)",
            });
            o["caution"] = json!(crate::waves::water::CAUTION);
            o["wave"] = wave_json(&water.inner);
        }
    }
    o
}

/// The sample points of a region: x, y and t values (an axis not given is 0).
pub struct Region {
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub t: Vec<f64>,
}

impl Region {
    pub fn points(&self) -> usize {
        // Saturating: three axes at the per-axis limit would overflow a 64-bit product.
        self.x.len().saturating_mul(self.y.len()).saturating_mul(self.t.len())
    }
}

impl Evaluator<'_> {
    pub(crate) fn keyword<'e>(args: &'e [Arg], name: &str) -> Option<&'e Expr> {
        args.iter().find_map(|a| match a {
            Arg::Keyword { name: n, value } if n.name == name => Some(value),
            _ => None,
        })
    }

    fn real(&mut self, e: &Expr, what: &str) -> Result<f64, Fail> {
        match self.expr(e)?.value {
            Value::Num(n) => n.to_real().ok_or_else(|| fail(Code::WrongKind, e.span, format!("{what} must be real"))),
            _ => Err(fail(Code::WrongKind, e.span, format!("{what} must be a real number"))),
        }
    }

    fn nums(&mut self, e: &Expr, what: &str) -> Result<Vec<Num>, Fail> {
        match self.expr(e)?.value {
            Value::Vector(v) => Ok(v),
            Value::Num(n) => Ok(vec![n]),
            _ => Err(fail(Code::WrongKind, e.span, format!("{what} must be a vector"))),
        }
    }

    fn complex_vector(&mut self, e: &Expr, what: &str, g: usize) -> Result<Vec<C64>, Fail> {
        let v = self.nums(e, what)?;
        if v.len() != g {
            return Err(fail(
                Code::ShapeMismatch,
                e.span,
                format!("{what} needs {g} entries (the genus of the matrix); it has {}", v.len()),
            ));
        }
        Ok(v.iter().map(Num::to_complex).collect())
    }

    pub(crate) fn region(&mut self, span: Span, args: &[Arg]) -> Result<Region, Fail> {
        // Fixed axes written `t = 0` inside a call are keyword arguments: read them too.
        let axes = kelp_lang::ast::region_axes(args);
        let refs: Vec<&Axis> = axes.iter().collect();
        self.region_of(span, &refs, DEFAULT_SAMPLES)
    }

    /// The sample points of the axes; a range without `step` gets `default_n` points.
    pub(crate) fn region_of(&mut self, span: Span, axes: &[&Axis], default_n: usize) -> Result<Region, Fail> {
        let mut r = Region { x: vec![0.0], y: vec![0.0], t: vec![0.0] };
        for ax in axes {
            let values = match &ax.kind {
                AxisKind::Fixed(e) => vec![self.real(e, &format!("the value of axis `{}`", ax.name.name))?],
                AxisKind::Range { lo, hi, step } => {
                    let end = format!("an end of the range of `{}`", ax.name.name);
                    let (a, b) = (self.real(lo, &end)?, self.real(hi, &end)?);
                    if !(b > a) {
                        return Err(fail(
                            Code::EvalFailed,
                            ax.span,
                            "a range must go from a smaller to a larger value",
                        ));
                    }
                    let n = match step {
                        Some(h) => {
                            let h = self.real(h, "a step")?;
                            if !(h > 0.0) {
                                return Err(fail(Code::EvalFailed, ax.span, "a step must be positive"));
                            }
                            let n = ((b - a) / h + 1e-9).floor() + 1.0;
                            let max_points = crate::limits::current().max_points;
                            if n > max_points as f64 {
                                return Err(fail(
                                    Code::BudgetExceeded,
                                    ax.span,
                                    format!("{n:.0} points on one axis; the limit is {max_points} (the `max_points` setting)"),
                                ));
                            }
                            n as usize
                        }
                        None => default_n,
                    };
                    let h = if n > 1 { (b - a) / (n - 1) as f64 } else { 0.0 };
                    (0..n).map(|k| a + h * k as f64).collect()
                }
            };
            match ax.name.name.as_str() {
                "x" => r.x = values,
                "y" => r.y = values,
                _ => r.t = values,
            }
        }
        let max_points = crate::limits::current().max_points;
        if r.points() > max_points {
            return Err(fail(
                Code::BudgetExceeded,
                span,
                format!(
                    "the region has {:.3e} sample points; the limit is {max_points} (the `max_points` setting)",
                    r.x.len() as f64 * r.y.len() as f64 * r.t.len() as f64
                ),
            ));
        }
        Ok(r)
    }

    pub(crate) fn wave_call(&mut self, span: Span, name: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let missing = |what: &str| fail(Code::MissingArgument, span, format!("`{name}` needs `{what}`"));
        let wave = match name {
            "soliton" => {
                let ke = Self::keyword(args, "kappa").ok_or_else(|| missing("kappa"))?;
                let ae = Self::keyword(args, "a").ok_or_else(|| missing("a"))?;
                let kappa: Vec<f64> = self
                    .nums(ke, "kappa")?
                    .iter()
                    .map(|n| n.to_real().ok_or_else(|| fail(Code::WrongKind, ke.span, "kappa must be real")))
                    .collect::<Result<_, _>>()?;
                let a = match self.expr(ae)?.value {
                    Value::Matrix(m) => m,
                    Value::Vector(v) => vec![v],
                    _ => return Err(fail(Code::WrongKind, ae.span, "`a` must be a k x n matrix")),
                };
                let s = Soliton::new(&kappa, &a).map_err(|m| fail(Code::EvalFailed, ae.span, m))?;
                let origin = format!("line soliton, Gr({}, {}), {} exponential terms", s.k, s.kappa.len(), s.terms());
                Wave { kind: WaveKind::Soliton(s), origin }
            }
            "rational" => {
                let pe = Self::keyword(args, "partition").ok_or_else(|| missing("partition"))?;
                let parts: Vec<u32> = self
                    .nums(pe, "partition")?
                    .iter()
                    .map(|n| match n {
                        Num::Exact(q) if q.is_integer() && *q >= num_rational::BigRational::from_integer(0.into()) => {
                            u32::try_from(q.to_integer()).ok()
                        }
                        _ => None,
                    })
                    .collect::<Option<_>>()
                    .ok_or_else(|| fail(Code::WrongKind, pe.span, "a partition is a list of nonnegative integers"))?;
                let higher: Vec<num_rational::BigRational> = match Self::keyword(args, "times") {
                    None => vec![],
                    Some(te) => self
                        .nums(te, "times")?
                        .into_iter()
                        .map(|n| match n {
                            Num::Exact(q) => Some(q),
                            _ => None,
                        })
                        .collect::<Option<_>>()
                        .ok_or_else(|| fail(Code::WrongKind, te.span, "higher times must be exact rationals"))?,
                };
                let r = RationalWave::new(&parts, &higher).map_err(|m| fail(Code::EvalFailed, pe.span, m))?;
                let origin = format!(
                    "rational solution, tau = s_{:?}(t1 = x, t2 = y, t3 = t{}) = {}",
                    r.partition,
                    if higher.is_empty() { String::new() } else { format!(", t4.. = {higher:?}") },
                    format!("{}", r.tau).replace('z', "t")
                );
                Wave { kind: WaveKind::Rational(r), origin }
            }
            "theta_wave" => {
                let te = args
                    .iter()
                    .find_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None })
                    .ok_or_else(|| missing("T"))?;
                let Value::Matrix(m) = self.expr(te)?.value else {
                    return Err(fail(Code::WrongKind, te.span, "`theta_wave` needs a Riemann matrix"));
                };
                let tau = crate::linalg::to_complex_matrix(&m);
                let g = tau.nrows();
                let ctx = ThetaContext::new(&tau, self.checked.settings.tolerance().max(1e-8))
                    .map_err(|e| crate::theta_fn::theta_error(e, te.span))?;
                let mut vecs = vec![];
                for k in ["u", "v", "w"] {
                    let e = Self::keyword(args, k).ok_or_else(|| missing(k))?;
                    vecs.push(self.complex_vector(e, &format!("`{k}`"), g)?);
                }
                let ce = Self::keyword(args, "c").ok_or_else(|| missing("c"))?;
                let c = match self.expr(ce)?.value {
                    Value::Num(n) => n.to_complex(),
                    _ => return Err(fail(Code::WrongKind, ce.span, "`c` must be a number")),
                };
                let shift = match Self::keyword(args, "shift") {
                    Some(e) => self.complex_vector(e, "`shift`", g)?,
                    None => vec![C64::new(0.0, 0.0); g],
                };
                let w = vecs.pop().unwrap();
                let v = vecs.pop().unwrap();
                let u = vecs.pop().unwrap();
                let origin = format!("theta wave of genus {g} from explicit data");
                Wave {
                    kind: WaveKind::Theta(ThetaWave {
                        ctx,
                        u,
                        v,
                        w,
                        shift,
                        c,
                        accuracy: 1e-14,
                        moments: Default::default(),
                    }),
                    origin,
                }
            }
            "shallow_water" => return self.water_call(span, args),
            _ => return self.krichever_call(span, args),
        };
        let detail = format!("KP form {KP_FORM}");
        Ok(Valued { value: Value::Wave(Arc::new(wave)), error_bound: 0.0, reason: Some(detail) })
    }

    /// `shallow_water(W, depth = h, epsilon = e [, gravity = g])`: W read as surface
    /// elevation in metres over metres and seconds (`waves::water` derives the map).
    fn water_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        use crate::waves::water::{Water, CAUTION, MAX_AMPLITUDE_RATIO};
        let (inner, wspan) = self.wave_arg(args, span, "shallow_water")?;
        let de = Self::keyword(args, "depth")
            .ok_or_else(|| fail(Code::MissingArgument, span, "`shallow_water` needs `depth` (metres)"))?;
        let ee = Self::keyword(args, "epsilon").ok_or_else(|| {
            fail(Code::MissingArgument, span, "`shallow_water` needs `epsilon` (eta = epsilon * depth * u)")
        })?;
        let depth = self.real(de, "`depth`")?;
        let epsilon = self.real(ee, "`epsilon`")?;
        let gravity = match Self::keyword(args, "gravity") {
            Some(ge) => self.real(ge, "`gravity`")?,
            // Standard gravity (common practice, no source).
            None => 9.80665,
        };
        let water = Water::new(inner, depth, gravity, epsilon).map_err(|m| fail(Code::EvalFailed, wspan, m))?;
        let mut caution = Diagnostic::info(Code::ModelLimits, span, format!("physical units: {CAUTION}"));
        if epsilon > MAX_AMPLITUDE_RATIO {
            caution = Diagnostic::warning(
                Code::ModelLimits,
                ee.span,
                format!(
                    "epsilon = {} puts amplitudes of order {} of the depth: beyond the weakly nonlinear range (a few tenths) KP's predictions degrade",
                    crate::num::fmt_f64(epsilon),
                    crate::num::fmt_f64(epsilon)
                ),
            )
            .with_note(CAUTION);
        }
        self.out.diagnostics.push(caution);
        let detail = format!("{}; {CAUTION}", water.describe());
        let origin = format!("{} read as shallow water ({})", water.inner.origin, water.describe());
        let wave = Wave { kind: WaveKind::Water(water), origin };
        Ok(Valued { value: Value::Wave(Arc::new(wave)), error_bound: 0.0, reason: Some(detail) })
    }

    fn krichever_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        let ce = args
            .iter()
            .find_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None })
            .ok_or_else(|| fail(Code::MissingArgument, span, "`krichever` needs a curve"))?;
        let Value::Curve(c) = self.expr(ce)?.value else {
            return Err(fail(Code::WrongKind, ce.span, "`krichever` needs a curve"));
        };
        let pe = Self::keyword(args, "at")
            .ok_or_else(|| fail(Code::MissingArgument, span, "`krichever` needs a point `at = (x, y)`"))?;
        // A finite point, or a point at infinity (z = 0) by its first two coordinates.
        enum Given {
            Finite(C64, C64),
            AtInfinity(C64, C64),
        }
        let given = match self.expr(pe)?.value {
            Value::Point { coords, projective: false } if coords.len() == 2 => {
                Given::Finite(coords[0].to_complex(), coords[1].to_complex())
            }
            Value::Point { coords, projective: true } if coords.len() == 3 => {
                let z = coords[2].to_complex();
                if z.norm() == 0.0 {
                    Given::AtInfinity(coords[0].to_complex(), coords[1].to_complex())
                } else {
                    Given::Finite(coords[0].to_complex() / z, coords[1].to_complex() / z)
                }
            }
            _ => return Err(fail(Code::WrongKind, pe.span, "`at` must be a point (x, y) or (x : y : z)")),
        };
        // How the point is shown in the wave's description (infinite at infinity).
        let shown = match given {
            Given::Finite(x, y) => (x, y),
            Given::AtInfinity(..) => (C64::new(f64::INFINITY, 0.0), C64::new(f64::INFINITY, 0.0)),
        };
        let Some(shape) = superelliptic_route(&c.equation.poly, c.equation.projective) else {
            // A finite point in the chart z = 1, a point at infinity in the chart of its
            // largest coordinate.
            let (chart, u0, v0) = match given {
                Given::Finite(xp, yp) => (2, xp, yp),
                Given::AtInfinity(px, py) if px.norm() >= py.norm() => (0, py / px, C64::new(0.0, 0.0)),
                Given::AtInfinity(px, py) => (1, px / py, C64::new(0.0, 0.0)),
            };
            let r = self.riemann_matrix(&c, true, ce.span)?;
            let forms = r
                .periods
                .plane
                .clone()
                .ok_or_else(|| fail(Code::NotSupported, ce.span, "no differentials to expand"))?;
            let f = crate::algebra::curve::homogeneous(&c.equation.poly, c.equation.projective);
            let chart_poly = crate::algebra::bivar::P2::chart(&f, chart);
            let d = f.degree().unwrap_or(0) as usize;
            let mut user = vec![vec![C64::new(0.0, 0.0); d + 1]; d + 1];
            for (&(i, j), v) in &chart_poly.terms {
                user[j as usize][i as usize] += kelp_lang::number::to_f64(v);
            }
            let k = crate::waves::krichever::krichever_general(&forms, &r, &user, chart, u0, v0)
                .map_err(|m| fail(Code::EvalFailed, pe.span, format!("`krichever({})`: {m}", c.name)))?;
            return self.finish_krichever(&c, ce.span, args, r, k, shown);
        };
        let place = match given {
            Given::Finite(xp, yp) => {
                let (sx, sy) = if shape.swapped { (yp, xp) } else { (xp, yp) };
                Place::Finite(sx, sy)
            }
            Given::AtInfinity(px, py) => {
                // In the shape's coordinates (X, Y), Y^m = f(X) with deg f = n: at X = infinity,
                // Y ~ X^(n/m), so the plane point is (0 : 1 : 0) when n > m and (1 : 0 : 0) when n < m.
                let (qx, qy) = if shape.swapped { (py, px) } else { (px, py) };
                let n = shape.f.0.len().saturating_sub(1) as u32;
                let expected_y_only = n > shape.m;
                let on_curve = if expected_y_only { qx.norm() == 0.0 } else { qy.norm() == 0.0 };
                if !on_curve {
                    let want = match (expected_y_only, shape.swapped) {
                        (true, false) | (false, true) => "(0 : 1 : 0)",
                        _ => "(1 : 0 : 0)",
                    };
                    return Err(fail(
                        Code::EvalFailed,
                        pe.span,
                        format!("this point at infinity is not on `{}`: its point at infinity is {want}", c.name),
                    ));
                }
                Place::Infinity
            }
        };
        let r = self.riemann_matrix(&c, true, ce.span)?;
        let k = crate::waves::krichever::krichever_at(&shape, &r, place)
            .map_err(|m| fail(Code::EvalFailed, pe.span, format!("`krichever({})`: {m}", c.name)))?;
        self.finish_krichever(&c, ce.span, args, r, k, shown)
    }

    /// c from Dubrovin's conditions, the shift, and the wave with its description.
    fn finish_krichever(
        &mut self,
        c: &crate::value::CurveValue,
        ce_span: Span,
        args: &[Arg],
        r: crate::periods::RiemannMatrix,
        k: crate::waves::krichever::KricheverData,
        (xp, yp): (C64, C64),
    ) -> Result<Valued, Fail> {
        let (cc, _d, dres) =
            dubrovin_constants(&r.tau, &k.u, &k.v, &k.w).map_err(|e| crate::theta_fn::theta_error(e, ce_span))?;
        let g = k.u.len();
        let shift = match Self::keyword(args, "shift") {
            Some(e) => self.complex_vector(e, "`shift`", g)?,
            None => vec![C64::new(0.0, 0.0); g],
        };
        let ctx = ThetaContext::new(&r.tau, 1e-8).map_err(|e| crate::theta_fn::theta_error(e, ce_span))?;
        let origin = format!(
            "Krichever's wave of `{}` at {}, local parameter {}; genus {g}, tau error {:.1e}{}; c = {} from Dubrovin's conditions (relative residual {:.1e})",
            c.name,
            if xp.re.is_finite() {
                format!("({}, {})", crate::num::fmt_f64(xp.re), crate::num::fmt_f64(yp.re))
            } else {
                "the point at infinity".to_string()
            },
            k.local_parameter,
            r.error,
            if r.reduced.is_some() { ", Siegel-reduced" } else { "" },
            Num::Complex(cc),
            dres
        );
        let detail = format!(
            "U = {}, V = {}, W = {}, c = {} (local parameter {}; KP form {KP_FORM})",
            show_vector(&k.u),
            show_vector(&k.v),
            show_vector(&k.w),
            Num::Complex(cc),
            k.local_parameter
        );
        let wave = Wave {
            kind: WaveKind::Theta(ThetaWave {
                ctx,
                u: k.u,
                v: k.v,
                w: k.w,
                shift,
                c: cc,
                accuracy: 1e-14,
                moments: Default::default(),
            }),
            origin,
        };
        Ok(Valued { value: Value::Wave(Arc::new(wave)), error_bound: r.error, reason: Some(detail) })
    }

    fn wave_arg(&mut self, args: &[Arg], span: Span, name: &str) -> Result<(Arc<Wave>, Span), Fail> {
        let e = args
            .iter()
            .find_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None })
            .ok_or_else(|| fail(Code::MissingArgument, span, format!("`{name}` needs a wave")))?;
        match self.expr(e)?.value {
            Value::Wave(w) => Ok((w, e.span)),
            _ => Err(fail(Code::WrongKind, e.span, format!("`{name}` needs a wave"))),
        }
    }

    pub(crate) fn wave_eval(&mut self, span: Span, name: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let (w, wspan) = self.wave_arg(args, span, name)?;
        match name {
            "value" => {
                let pos: Vec<&Expr> =
                    args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
                if pos.len() != 4 {
                    return Err(fail(Code::MissingArgument, span, "`value` needs a wave and x, y, t"));
                }
                let (x, y, t) = (self.real(pos[1], "x")?, self.real(pos[2], "y")?, self.real(pos[3], "t")?);
                let p = w.at(x, y, t).map_err(|m| at_fail(span, m))?;
                let u = p.kp.u;
                // A real answer drops Im u, which the bound then covers too.
                let (v, err) = if u.im.abs() <= p.u_error {
                    (Num::Real(u.re), p.u_error + u.im.abs())
                } else {
                    (Num::Complex(u), p.u_error)
                };
                let reason = match w.water() {
                    Some(water) => format!(
                        "surface elevation eta in metres at (x, y, t) in m, m, s ({}); {}",
                        water.describe(),
                        crate::waves::water::CAUTION
                    ),
                    None => format!("u of the {} wave", w.kind_name()),
                };
                Ok(Valued { value: Value::Num(v), error_bound: err, reason: Some(reason) })
            }
            "kp_residual" => {
                let base = w.water().map_or(&*w, |water| &*water.inner);
                if let WaveKind::Rational(r) = &base.kind {
                    if r.exact_solution {
                        return Ok(Valued {
                            value: Value::Num(Num::int(0)),
                            error_bound: 0.0,
                            reason: Some(format!("exact: the Hirota form of {KP_FORM} vanishes identically for tau")),
                        });
                    }
                }
                let region = self.region(span, args)?;
                let mut scan = crate::waves::residual::ResidualScan::default();
                for &t in &region.t {
                    for &y in &region.y {
                        for &x in &region.x {
                            crate::limits::check().map_err(|m| fail(Code::BudgetExceeded, span, m))?;
                            let p = w.at(x, y, t).map_err(|m| at_fail(span, m))?;
                            scan.add((x, y, t), &p);
                        }
                    }
                }
                Ok(Valued {
                    value: Value::Num(Num::Real(scan.value())),
                    error_bound: scan.error_bound(),
                    reason: Some(format!("{}; KP form {KP_FORM}", scan.describe())),
                })
            }
            _ => {
                // regular (a water wave is regular exactly when the wave it reads is)
                let base = w.water().map_or(&*w, |water| &*water.inner);
                let given = kelp_lang::ast::region_axes(args);
                // Read a given region even where it is not needed, so a bad one is reported.
                let region = if given.is_empty() { None } else { Some(self.region(span, args)?) };
                if let WaveKind::Soliton(s) = &base.kind {
                    let reason = match s.negative_minor() {
                        Some(m) => format!(
                            "the maximal minor Delta_{{{}}} = {} is negative (columns of kappa sorted increasingly), so tau changes sign somewhere",
                            m.columns.iter().map(|c| (c + 1).to_string()).collect::<Vec<_>>().join(","),
                            m.value
                        ),
                        None => "every maximal minor of A is >= 0 (Kodama–Williams): regular for all x, y, t".into(),
                    };
                    return Ok(Valued {
                        value: Value::Bool(s.negative_minor().is_none()),
                        error_bound: 0.0,
                        reason: Some(reason),
                    });
                }
                let Some(region) = region else {
                    return Err(fail(
                        Code::NotSupported,
                        wspan,
                        "`regular` is decided exactly for solitons; for other waves give a region to sample",
                    ));
                };
                let verdict = match &w.kind {
                    WaveKind::Theta(tw) => {
                        let budget = crate::limits::current().max_points;
                        let check = || crate::limits::check().map_err(|m| fail(Code::BudgetExceeded, span, m));
                        let engine = |m: String| fail(Code::EvalFailed, span, m);
                        regular::theta_regular(tw, [&region.x, &region.y, &region.t], budget, check, engine)?
                    }
                    _ => self.regular_by_signs(&w, &region, span)?,
                };
                match verdict {
                    Verdict::Regular(why) => {
                        Ok(Valued { value: Value::Bool(true), error_bound: 0.0, reason: Some(why) })
                    }
                    Verdict::Singular(why) => {
                        Ok(Valued { value: Value::Bool(false), error_bound: 0.0, reason: Some(why) })
                    }
                    Verdict::Undecided(why) => {
                        Err(fail(Code::ClaimUndecided, span, format!("`regular` is undecided: {why}")))
                    }
                }
            }
        }
    }

    /// `regular` for rational and shallow-water waves: false when tau (real there) is shown
    /// to change sign between two sample points, or when it is not finite; otherwise
    /// undecided: samples are no proof between them.
    fn regular_by_signs(&mut self, w: &Wave, region: &Region, span: Span) -> Result<Verdict, Fail> {
        let mut signs: [Option<(f64, f64, f64)>; 2] = [None, None];
        for &t in &region.t {
            for &y in &region.y {
                for &x in &region.x {
                    crate::limits::check().map_err(|m| fail(Code::BudgetExceeded, span, m))?;
                    let b = match &w.kind {
                        WaveKind::Rational(r) => r.series_ball(x, y, t).0[0],
                        _ => break,
                    };
                    if b.c.re.abs() > b.r {
                        if region.points() == 1 {
                            return Ok(Verdict::Regular(format!(
                                "tau = {:.6e} with error at most {:.1e} at the region's one point",
                                b.c.re, b.r
                            )));
                        }
                        signs[(b.c.re < 0.0) as usize] = Some((x, y, t));
                    }
                    if let [Some(p), Some(n)] = signs {
                        return Ok(Verdict::Singular(format!(
                            "tau is a real polynomial with opposite signs at {p:?} and {n:?} (each outside its error ball), so it vanishes between them"
                        )));
                    }
                }
            }
        }
        Ok(Verdict::Undecided(format!(
            "tau of this {} wave is not proved nonzero over the region (kelp proves it for theta waves with real U, V, W and for solitons; samples are no proof)",
            w.kind_name()
        )))
    }
}

fn at_fail(span: Span, e: crate::waves::AtError) -> Fail {
    fail(if e.undecided { Code::ClaimUndecided } else { Code::EvalFailed }, span, e.message)
}

/// Points per axis of a `plot` range written without `step`.
pub const PLOT_SAMPLES: usize = 200;

impl Evaluator<'_> {
    /// Writes a `sample` or `plot` and returns the paths written.
    pub(crate) fn output(
        &mut self,
        span: Span,
        kind: OutputKind,
        wave: &Ident,
        axes: &[Axis],
        path: &StrLit,
        base: &std::path::Path,
    ) -> Result<Vec<String>, Fail> {
        use crate::output::{grid::Grid, picture, sample, write};
        let w = match self.env_value(&wave.name) {
            None => return Err(Fail::Dep(wave.name.clone())),
            Some(Value::Wave(w)) => w,
            Some(other) => {
                return Err(fail(Code::WrongKind, wave.span, format!("`{}` is {other}, not a wave", wave.name)))
            }
        };
        let default_n = if kind == OutputKind::Plot { PLOT_SAMPLES } else { DEFAULT_SAMPLES };
        let refs: Vec<&Axis> = axes.iter().collect();
        let region = self.region_of(span, &refs, default_n)?;
        let ext =
            std::path::Path::new(&path.value).extension().and_then(|e| e.to_str()).unwrap_or("").to_ascii_lowercase();
        let grid = Grid::evaluate(&w, region.x, region.y, region.t).map_err(|m| fail(Code::EvalFailed, span, m))?;
        if grid.complex() {
            self.out.diagnostics.push(kelp_lang::Diagnostic::info(
                Code::ValueInfo,
                wave.span,
                format!("`{}` is complex-valued here (a complex solution of KP): outputs carry Re u, and Im u where the format allows", wave.name),
            ));
        }
        let what = format!("the {} wave `{}`", w.kind_name(), wave.name);
        let mut files: Vec<(String, Vec<u8>)> = vec![];
        match (kind, ext.as_str()) {
            (OutputKind::Sample, "csv") => files.push((path.value.clone(), sample::csv(&grid))),
            (OutputKind::Sample, "json") => files.push((path.value.clone(), sample::json(&grid, wave_json(&w)))),
            (OutputKind::Sample, "npy") => files.push((path.value.clone(), sample::npy(&grid))),
            (OutputKind::Plot, "apng") => {
                // One looping animation over the times, 100 ms per frame.
                files.push((
                    path.value.clone(),
                    picture::apng(&grid, &what, 100).map_err(|m| fail(Code::EvalFailed, span, m))?,
                ))
            }
            (OutputKind::Plot, "svg" | "png") => {
                let frames = grid.t.len();
                for it in 0..frames {
                    let name = if frames == 1 {
                        path.value.clone()
                    } else {
                        let p = std::path::Path::new(&path.value);
                        let stem = p.file_stem().and_then(|s| s.to_str()).unwrap_or("frame");
                        let file = format!("{stem}_t{it:03}.{ext}");
                        p.parent().map_or(file.clone(), |d| d.join(&file).to_string_lossy().into_owned())
                    };
                    let bytes = if ext == "svg" {
                        picture::svg(&grid, it, &what)
                    } else {
                        picture::png(&grid, it, &what).map_err(|m| fail(Code::EvalFailed, span, m))?
                    };
                    files.push((name, bytes));
                }
            }
            _ => {
                return Err(fail(
                    Code::EvalFailed,
                    path.span,
                    format!(
                        "`{}` cannot write `.{ext}` files (sample: .csv, .json, .npy; plot: .svg, .png, .apng)",
                        kind.keyword()
                    ),
                ))
            }
        }
        let mut written = vec![];
        for (name, bytes) in files {
            let target = write::resolve(base, &name).map_err(|m| fail(Code::EvalFailed, path.span, m))?;
            write::atomic_write(&target, &bytes).map_err(|m| fail(Code::EvalFailed, path.span, m))?;
            written.push(name);
        }
        Ok(written)
    }
}
