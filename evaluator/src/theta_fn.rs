//! The `theta(T, z, char =, along =)` built-in: argument conversion, the call into the
//! theta engine, and the propagation of the arguments' own error bounds.

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::theta::{Characteristic, ThetaContext, ThetaError};
use crate::value::{Value, Valued};
use kelp_lang::ast::{Arg, Expr};
use kelp_lang::{Code, Span};
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

fn matrix_of(v: &Value) -> Option<Vec<Vec<C64>>> {
    match v {
        Value::Matrix(m) => Some(m.iter().map(|r| r.iter().map(Num::to_complex).collect()).collect()),
        _ => None,
    }
}

fn vector_of(v: &Value) -> Option<Vec<C64>> {
    match v {
        Value::Vector(x) => Some(x.iter().map(Num::to_complex).collect()),
        Value::Num(n) => Some(vec![n.to_complex()]),
        _ => None,
    }
}

pub(crate) fn theta_error(e: ThetaError, span: Span) -> Fail {
    let code = match e {
        ThetaError::NotSymmetric { .. } | ThetaError::NotPositiveDefinite { .. } => Code::NotRiemannMatrix,
        ThetaError::TooManyPoints { .. } => Code::BudgetExceeded,
        ThetaError::WrongLength { .. } | ThetaError::NotSquare { .. } | ThetaError::Empty => Code::ShapeMismatch,
        ThetaError::NotFinite | ThetaError::ReducedNotSymmetric { .. } => Code::EvalFailed,
    };
    fail(code, span, e.to_string())
}

impl Evaluator<'_> {
    pub(crate) fn theta_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        let mut pos = Vec::new();
        let (mut ch_e, mut along_e): (Option<&Expr>, Option<&Expr>) = (None, None);
        for a in args {
            match a {
                Arg::Positional(e) => pos.push(e),
                Arg::Keyword { name, value } if name.name == "char" => ch_e = Some(value),
                Arg::Keyword { name, value } if name.name == "along" => along_e = Some(value),
                _ => {}
            }
        }
        let (Some(te), Some(ze)) = (pos.first(), pos.get(1)) else {
            return Err(fail(Code::MissingArgument, span, "`theta` needs a matrix and a vector"));
        };
        let tv = self.expr(te)?;
        let t = matrix_of(&tv.value)
            .ok_or_else(|| fail(Code::WrongKind, te.span, "`theta` needs a square matrix as its first argument"))?;
        let zv = self.expr(ze)?;
        let z = vector_of(&zv.value).ok_or_else(|| fail(Code::WrongKind, ze.span, "`theta` needs a vector z"))?;
        let g = t.len();
        let ch = match ch_e {
            None => None,
            Some(e) => {
                let v = self.expr(e)?;
                let m = matrix_of(&v.value).filter(|m| m.len() == 2 && m.iter().all(|r| r.len() == g));
                let Some(m) = m else {
                    return Err(fail(
                        Code::ShapeMismatch,
                        e.span,
                        format!("characteristics are `[a, b]` with two vectors of length {g}"),
                    ));
                };
                if m.iter().flatten().any(|c| c.im != 0.0) {
                    return Err(fail(Code::WrongKind, e.span, "characteristics are real vectors"));
                }
                Some(Characteristic { a: m[0].iter().map(|c| c.re).collect(), b: m[1].iter().map(|c| c.re).collect() })
            }
        };
        let along: Vec<Vec<C64>> = match along_e {
            None => vec![],
            Some(e) => {
                let v = self.expr(e)?;
                match &v.value {
                    Value::Matrix(_) => matrix_of(&v.value).unwrap_or_default(),
                    Value::Vector(x) if x.is_empty() => vec![],
                    _ => return Err(fail(Code::WrongKind, e.span, "`along` is a list of direction vectors")),
                }
            }
        };
        let n = t.len();
        if t.iter().any(|r| r.len() != n) {
            return Err(fail(Code::ShapeMismatch, te.span, "`theta` needs a square matrix"));
        }
        let tm = nalgebra::DMatrix::from_fn(n, n, |i, j| t[i][j]);
        self.theta_bounded(&tm, tv.error_bound, &z, zv.error_bound, ch.as_ref(), &along, te.span, span)
    }

    /// theta[ch](z | T) (with derivatives `along`) and a bound covering the sum's own error
    /// and T's and z's errors (`t_err`, `z_err`, entrywise).
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn theta_bounded(
        &self,
        tm: &nalgebra::DMatrix<C64>,
        t_err: f64,
        z: &[C64],
        z_err: f64,
        ch: Option<&Characteristic>,
        along: &[Vec<C64>],
        tspan: Span,
        span: Span,
    ) -> Result<Valued, Fail> {
        let g = tm.nrows();
        let tol = self.checked.settings.tolerance() + t_err;
        // Aim well below both the requested accuracy and the claim tolerance, so that a
        // claim `== ... within tolerance` is decided rather than left open; the extra
        // lattice points cost little (the radius grows like sqrt(log(1/accuracy))).
        let s = &self.checked.settings;
        let accuracy = (s.accuracy().min(s.tolerance()) * 1e-3).max(1e-17);
        if along.is_empty() {
            // Small Im tau: Siegel's reduction applied to the value, which carries the
            // inputs' errors itself.
            if let Some(v) = crate::theta::value_with_inputs(tm, z, ch, t_err, z_err, accuracy) {
                return self.theta_result(v.map_err(|e| theta_error(e, tspan))?, 0.0, span);
            }
        }
        let ctx = ThetaContext::new(tm, tol).map_err(|e| theta_error(e, tspan))?;
        // One pass computes the value and, when T or z carry errors, the derivatives that
        // propagate them: |d theta / d z_j| for z, |d theta / d tau_jk| = |d^2 theta /
        // dz_j dz_k| / (2 pi (1 + delta_jk)) for T (heat equation).
        let p = along.len();
        let mut dirs = along.to_vec();
        for j in 0..g {
            let mut e = vec![C64::new(0.0, 0.0); g];
            e[j] = C64::new(1.0, 0.0);
            dirs.push(e);
        }
        let base = vec![1u32; p];
        let mut monos = vec![[base.clone(), vec![0; g]].concat()];
        if z_err > 0.0 {
            for j in 0..g {
                let mut m = [base.clone(), vec![0; g]].concat();
                m[p + j] += 1;
                monos.push(m);
            }
        }
        let first_tau = monos.len();
        if t_err > 0.0 {
            for j in 0..g {
                for k in j..g {
                    let mut m = [base.clone(), vec![0; g]].concat();
                    m[p + j] += 1;
                    m[p + k] += 1;
                    monos.push(m);
                }
            }
        }
        let (vals, _) = ctx.sums(z, ch, &dirs, &monos, accuracy).map_err(|e| theta_error(e, span))?;
        let v = vals[0];
        let scale = v.log_factor.exp();
        let mut err = 0.0;
        if z_err > 0.0 {
            err += vals[1..first_tau].iter().map(|d| (d.value.norm() + d.error) * scale).sum::<f64>() * z_err;
        }
        if t_err > 0.0 {
            let mut idx = first_tau;
            for j in 0..g {
                for k in j..g {
                    let d = vals[idx];
                    let f = if j == k { 4.0 * PI } else { 2.0 * PI };
                    err += (d.value.norm() + d.error) * scale / f * t_err;
                    idx += 1;
                }
            }
        }
        self.theta_result(v, err, span)
    }

    /// The value of a theta call, with `extra` added to its own bound (the inputs' errors).
    fn theta_result(&self, v: crate::theta::ThetaValue, extra: f64, span: Span) -> Result<Valued, Fail> {
        if v.log_factor > 700.0 {
            return Err(fail(
                Code::EvalFailed,
                span,
                format!(
                    "the theta value is about e^{:.0} and does not fit in double precision; \
                     use a z with a smaller imaginary part (theta is quasi-periodic)",
                    v.log_factor + v.value.norm().ln()
                ),
            ));
        }
        let err = v.full_error() + extra;
        let value = v.full();
        Ok(Valued { value: Value::Num(Num::Complex(value)), error_bound: err, reason: None })
    }
}
