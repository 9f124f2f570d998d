//! The expression basics: indexing, the constant `pi`, entrywise `abs`/`re`/`im`/`conj`,
//! `exp`/`log`/`sqrt` (kernels in `bounded.rs`) and the matrix built-ins (`det`, `inverse`,
//! `trace` in `matrix_bound.rs`; `transpose`, `identity`, `zeros`).

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::value::{Value, Valued};
use kelp_lang::ast::{Expr, Ident};
use kelp_lang::{Code, Span};
use num_traits::ToPrimitive;

type R = Result<Valued, Fail>;

/// |pi - fl(pi)| rounded up: fl(pi) = 3.141592653589793115997963..., pi - fl(pi) =
/// 1.2246467991473532e-16 (checked against mpmath in tests/basics_audit.rs).
pub const PI_ERROR: f64 = 1.2246467991473533e-16;

/// Largest size of `identity(n)` and `zeros(...)` per dimension (as the checker's).
const MAX_SIZE: usize = 500;

/// The value of a built-in constant.
pub(crate) fn constant(name: &str) -> Option<Valued> {
    (name == "pi").then(|| Valued {
        value: Value::Num(Num::Real(std::f64::consts::PI)),
        error_bound: PI_ERROR,
        reason: None,
    })
}

/// An exact whole number from 1 to `n`, or K306 at the index.
fn whole(v: &Valued, at: Span, n: usize, what: &str) -> Result<usize, Fail> {
    let k = match &v.value {
        Value::Num(Num::Exact(q)) if q.is_integer() && v.error_bound == 0.0 => q.to_integer().to_i64(),
        Value::Num(n) => {
            return Err(fail(Code::BadIndex, at, format!("an index must be an exact whole number, not {n}")));
        }
        other => {
            return Err(fail(Code::WrongKind, at, format!("an index is a whole number, not a {}", other.type_name())))
        }
    };
    match k {
        Some(k) if k >= 1 && k as u64 <= n as u64 => Ok(k as usize - 1),
        Some(k) if k < 1 => {
            Err(fail(Code::BadIndex, at, format!("indices count from 1; {k} is before the first entry")))
        }
        _ => Err(fail(Code::BadIndex, at, format!("index {} is past the end: {what} is {n}", v.value))),
    }
}

/// `base[i]`, `base[i, j]`: entries keep the value's bound (it bounds every entry).
pub(crate) fn index(ev: &mut Evaluator, base: &Expr, indices: &[Expr]) -> R {
    let b = ev.expr(base)?;
    let mut ix = Vec::new();
    for e in indices {
        ix.push((ev.expr(e)?, e.span));
    }
    let bound = b.error_bound;
    let value = match (&b.value, ix.as_slice()) {
        (Value::Vector(v), [(i, s)]) => Value::Num(v[whole(i, *s, v.len(), "the vector's length")?].clone()),
        (Value::List(l), [(i, s)]) => l[whole(i, *s, l.len(), "the list's length")?].clone(),
        (Value::Matrix(m), [(i, s)]) => Value::Vector(m[whole(i, *s, m.len(), "the number of rows")?].clone()),
        (Value::Matrix(m), [(i, s), (j, t)]) => {
            let r = whole(i, *s, m.len(), "the number of rows")?;
            Value::Num(m[r][whole(j, *t, m[0].len(), "the number of columns")?].clone())
        }
        (Value::Vector(_) | Value::List(_) | Value::Matrix(_), _) => {
            let first_extra = if matches!(b.value, Value::Matrix(_)) { 2 } else { 1 };
            let at = indices[first_extra.min(indices.len() - 1)].span.join(indices[indices.len() - 1].span);
            return Err(fail(
                Code::BadIndex,
                at,
                format!("a {} takes at most {first_extra} index(es)", b.value.type_name()),
            ));
        }
        (other, _) => {
            return Err(fail(
                Code::WrongKind,
                base.span,
                format!("only vectors, matrices and lists can be indexed; this is a {}", other.type_name()),
            ))
        }
    };
    Ok(Valued { value, error_bound: bound, reason: None })
}

fn map_entries(v: &Value, f: &mut dyn FnMut(&Num) -> Num) -> Option<Value> {
    Some(match v {
        Value::Num(n) => Value::Num(f(n)),
        Value::Vector(x) => Value::Vector(x.iter().map(&mut *f).collect()),
        Value::Matrix(m) => Value::Matrix(m.iter().map(|r| r.iter().map(&mut *f).collect()).collect()),
        _ => return None,
    })
}

fn conj(n: &Num) -> Num {
    match n {
        Num::Complex(c) => Num::Complex(c.conj()),
        other => other.clone(),
    }
}

/// A square matrix argument.
fn square<'v>(v: &'v Valued, at: Span, name: &str) -> Result<&'v Vec<Vec<Num>>, Fail> {
    match &v.value {
        Value::Matrix(m) if m.len() == m[0].len() => Ok(m),
        Value::Matrix(m) => Err(fail(
            Code::ShapeMismatch,
            at,
            format!("`{name}` needs a square matrix; this is {} x {}", m.len(), m[0].len()),
        )),
        other => Err(fail(Code::WrongKind, at, format!("`{name}` needs a matrix, not a {}", other.type_name()))),
    }
}

/// A size argument of `identity` or `zeros`.
fn size(v: &Valued, at: Span) -> Result<usize, Fail> {
    match &v.value {
        Value::Num(Num::Exact(q)) if q.is_integer() => match q.to_integer().to_i64() {
            Some(k) if (1..=MAX_SIZE as i64).contains(&k) => Ok(k as usize),
            _ => Err(fail(Code::EvalFailed, at, format!("a size is a whole number from 1 to {MAX_SIZE}, not {q}"))),
        },
        other => Err(fail(Code::EvalFailed, at, format!("a size is an exact whole number, not {other}"))),
    }
}

pub(crate) fn call(ev: &mut Evaluator, span: Span, func: &Ident, positional: &[&Expr]) -> R {
    let name = func.name.as_str();
    let Some(first) = positional.first() else {
        return Err(fail(Code::MissingArgument, func.span, format!("`{name}` needs an argument")));
    };
    let at = first.span;
    let v = ev.expr(first)?;
    let e = v.error_bound;
    let num = |v: &Valued| match &v.value {
        Value::Num(n) => Ok(n.clone()),
        other => Err(fail(Code::WrongKind, at, format!("`{name}` needs a number, not a {}", other.type_name()))),
    };
    let refused = |m: String| fail(Code::EvalFailed, at, m);
    let done = |(n, b): (Num, f64)| Valued { value: Value::Num(n), error_bound: b, reason: None };
    let out = match name {
        "abs" | "re" | "im" | "conj" => {
            let mut own = 0.0f64;
            let value = map_entries(&v.value, &mut |n| match name {
                "abs" => {
                    let r = n.abs();
                    let one = Valued { value: Value::Num(n.clone()), error_bound: e, reason: None };
                    own = own.max(crate::rounding::abs_error(&one, &r) - e);
                    r
                }
                "re" => n.re(),
                "im" => n.im(),
                _ => conj(n),
            })
            .ok_or_else(|| fail(Code::WrongKind, at, format!("`{name}` needs a number, vector or matrix")))?;
            // Taking parts or conjugating moves no entry farther than it was.
            Valued { value, error_bound: e + own, reason: None }
        }
        "exp" => done(crate::bounded::exp(&num(&v)?, e).map_err(refused)?),
        "log" => done(crate::bounded::log(&num(&v)?, e).map_err(refused)?),
        "sqrt" => done(crate::bounded::sqrt(&num(&v)?, e).map_err(refused)?),
        "det" => done(crate::matrix_bound::det(square(&v, at, name)?, e).map_err(refused)?),
        "trace" => done(crate::matrix_bound::trace(square(&v, at, name)?, e).map_err(refused)?),
        "inverse" => {
            let (m, b) = crate::matrix_bound::inverse(square(&v, at, name)?, e).map_err(refused)?;
            Valued { value: Value::Matrix(m), error_bound: b, reason: None }
        }
        "transpose" => match &v.value {
            Value::Matrix(m) => {
                let t = (0..m[0].len()).map(|j| m.iter().map(|r| r[j].clone()).collect()).collect();
                Valued { value: Value::Matrix(t), ..v }
            }
            other => {
                return Err(fail(
                    Code::WrongKind,
                    at,
                    format!("`transpose` needs a matrix, not a {}", other.type_name()),
                ))
            }
        },
        "identity" => {
            let n = size(&v, at)?;
            let m = (0..n).map(|i| (0..n).map(|j| Num::int((i == j) as i64)).collect()).collect();
            Valued::exact(Value::Matrix(m))
        }
        "zeros" => {
            let r = size(&v, at)?;
            match positional.get(1) {
                None => Valued::exact(Value::Vector(vec![Num::int(0); r])),
                Some(ce) => {
                    let c = size(&ev.expr(ce)?, ce.span)?;
                    Valued::exact(Value::Matrix(vec![vec![Num::int(0); c]; r]))
                }
            }
        }
        _ => return Err(fail(Code::NotSupported, span, format!("`{name}` is not a basic function"))),
    };
    Ok(out)
}
