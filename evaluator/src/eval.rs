//! Evaluates a checked program in its dependency order. A pure function of the checked
//! program and the mode: no global state, so results can be cached by content.

use crate::limits::{CancelToken, Stop};
use crate::linalg::{riemann_check, to_complex_matrix};
use crate::num::Num;
use crate::value::{CurveValue, Value, Valued};
use kelp_lang::ast::*;
use kelp_lang::check::{strip_parens, Checked};
use kelp_lang::number::parse_exact;
use kelp_lang::{Code, Diagnostic, Span};
use std::collections::HashMap;
use std::rc::Rc;

#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Mode {
    /// Evaluate every value and claim; write nothing.
    Check,
    /// Also write samples and plots, with paths relative to `base` (the file's folder);
    /// with `only`, just the output statement of that index.
    Run { base: std::path::PathBuf, only: Option<usize> },
}

#[derive(Clone, Debug)]
pub struct NamedValue {
    pub name: String,
    /// The name's span at its definition.
    pub span: Span,
    pub value: Valued,
}

#[derive(Clone, Debug)]
pub struct Expectation {
    pub span: Span,
    /// `None` when the claim could not be decided (or depends on a failed value).
    pub passed: Option<bool>,
    pub detail: String,
}

#[derive(Clone, Debug, Default)]
pub struct Evaluation {
    pub diagnostics: Vec<Diagnostic>,
    pub values: Vec<NamedValue>,
    pub expectations: Vec<Expectation>,
    pub outputs: Vec<String>,
    /// The evaluation was cancelled through its [`CancelToken`]: the statement running then
    /// and every later one have no value (and no diagnostic); the rest is as computed.
    pub cancelled: bool,
}

impl Evaluation {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }
}

/// Why an expression has no value.
pub(crate) enum Fail {
    /// A diagnostic at the place that failed.
    At(Diagnostic),
    /// A name it uses has no value (its own error is reported there).
    Dep(String),
}

type R = Result<Valued, Fail>;

pub(crate) fn fail(code: Code, span: Span, msg: impl Into<String>) -> Fail {
    Fail::At(Diagnostic::error(code, span, msg))
}

pub fn evaluate(checked: &Checked, src: &str, mode: &Mode) -> Evaluation {
    evaluate_cancellable(checked, src, mode, &CancelToken::new())
}

/// [`evaluate`], stopping as soon as `cancel` is cancelled (from any thread).
pub fn evaluate_cancellable(checked: &Checked, src: &str, mode: &Mode, cancel: &CancelToken) -> Evaluation {
    crate::incremental::Incremental::new().evaluate(checked, src, mode, cancel, &mut || false).0
}

pub(crate) struct Evaluator<'a> {
    pub(crate) checked: &'a Checked,
    src: &'a str,
    env: HashMap<String, Valued>,
    pub(crate) out: Evaluation,
    /// Curves whose facts a statement needed (their information diagnostic follows).
    pub(crate) facts_used: Vec<String>,
}

impl<'a> Evaluator<'a> {
    pub(crate) fn new(checked: &'a Checked, src: &'a str) -> Self {
        Evaluator { checked, src, env: HashMap::new(), out: Evaluation::default(), facts_used: Vec::new() }
    }

    fn text(&self, s: Span) -> &str {
        &self.src[s.range()]
    }

    /// K605 for a statement cut short by its time budget.
    fn budget_diagnostic(span: Span, what: &str) -> Diagnostic {
        let budget = crate::limits::current().time_budget;
        // `report` words a definition "`x` is"; this sentence has its own verb.
        let what = what.strip_suffix(" is").unwrap_or(what);
        Diagnostic::error(
            Code::BudgetExceeded,
            span,
            format!("{what} ran out of its time budget of {budget} s, so it has no value"),
        )
        .with_note("raise it with `set time_budget = SECONDS` or `--limit time_budget=SECONDS`")
    }

    /// Statement `i` stopped at a checkpoint when its time ran out.
    pub(crate) fn out_of_time(&mut self, i: usize) {
        let stmt = &self.checked.program.stmts[i];
        let (span, what) = match &stmt.kind {
            StmtKind::Let { name, .. } | StmtKind::Wave { name, .. } => (name.span, format!("`{}`", name.name)),
            StmtKind::Expect { .. } => (stmt.span, "claim".to_string()),
            StmtKind::Output { kind, .. } => (stmt.span, format!("`{}`", kind.keyword())),
            _ => (stmt.span, "this statement".to_string()),
        };
        let d = Self::budget_diagnostic(span, &what);
        if matches!(stmt.kind, StmtKind::Expect { .. }) {
            let detail = d.message.clone();
            self.out.expectations.push(Expectation { span, passed: None, detail });
        }
        self.out.diagnostics.push(d);
    }

    fn report(&mut self, f: Fail, span: Span, what: &str) {
        match f {
            // Whatever a computation cut short by the clock said, the reason is the budget
            // (also for code that stopped with `limits::check` and a message without it).
            Fail::At(d) if crate::limits::stop() == Some(Stop::OutOfTime) => {
                self.out.diagnostics.push(Self::budget_diagnostic(d.span, what))
            }
            // Cancelled work is thrown away by whoever cancelled it.
            Fail::At(_) if crate::limits::stop() == Some(Stop::Cancelled) => self.out.cancelled = true,
            Fail::At(d) => self.out.diagnostics.push(d),
            Fail::Dep(name) => self.out.diagnostics.push(Diagnostic::warning(
                Code::DependsOnFailed,
                span,
                format!("{what} not evaluated: it uses `{name}`, which has no value"),
            )),
        }
    }

    pub(crate) fn statement(&mut self, i: usize, mode: &Mode) {
        let stmt = &self.checked.program.stmts[i];
        match &stmt.kind {
            StmtKind::Curve { name, .. } => {
                let Some(eq) = self.checked.curves.get(&i) else {
                    return;
                };
                let v = Valued::exact(Value::Curve(Rc::new(CurveValue {
                    name: name.name.clone(),
                    equation: eq.clone(),
                    facts: Default::default(),
                    periods: Default::default(),
                })));
                self.define(name, v);
            }
            StmtKind::Let { name, value } | StmtKind::Wave { name, value } => match self.expr(value) {
                Ok(v) => self.define(name, v),
                Err(f) => self.report(f, name.span, &format!("`{}` is", name.name)),
            },
            StmtKind::Expect { claim, within } => self.expect(stmt.span, claim, within.as_ref()),
            StmtKind::Output { kind, wave, region, path } => {
                if let Mode::Run { base, only } = mode {
                    if only.is_some_and(|k| k != i) {
                        return;
                    }
                    match self.output(stmt.span, *kind, wave, region, path, base) {
                        Ok(written) => self.out.outputs.extend(written),
                        Err(f) => self.report(f, stmt.span, &format!("`{}`", kind.keyword())),
                    }
                }
            }
            StmtKind::Set { .. } | StmtKind::Error => {}
        }
    }

    /// The value bound to a name, if it was computed.
    pub(crate) fn env_value(&self, name: &str) -> Option<Value> {
        self.env.get(name).map(|v| v.value.clone())
    }

    fn define(&mut self, name: &Ident, v: Valued) {
        self.define_value(NamedValue { name: name.name.clone(), span: name.span, value: v });
    }

    pub(crate) fn define_value(&mut self, v: NamedValue) {
        self.env.insert(v.name.clone(), v.value.clone());
        self.out.values.push(v);
    }

    fn expect(&mut self, span: Span, claim: &Expr, within: Option<&Expr>) {
        let claim_text = self.text(claim.span).to_string();
        let top = strip_parens(claim);
        let outcome = match &top.kind {
            ExprKind::Binary { op, lhs, rhs } if op.is_comparison() => self.claim_comparison(*op, lhs, rhs, within),
            _ => self.expr(claim).and_then(|v| match v.value {
                Value::Bool(b) => {
                    let why = v.reason.map(|r| format!(" ({r})")).unwrap_or_default();
                    Ok((Some(b), format!("{claim_text} is {b}{why}"), None))
                }
                other => Err(fail(
                    Code::ClaimNotBoolean,
                    claim.span,
                    format!("a claim must be true or false; this is {other}"),
                )),
            }),
        };
        match outcome {
            Ok((Some(true), detail, _)) => self.out.expectations.push(Expectation { span, passed: Some(true), detail }),
            Ok((Some(false), detail, _)) => {
                self.out.diagnostics.push(Diagnostic::error(
                    Code::ClaimFailed,
                    span,
                    format!("claim is false: {detail}"),
                ));
                self.out.expectations.push(Expectation { span, passed: Some(false), detail });
            }
            Ok((None, detail, widen)) => {
                let mut d = Diagnostic::error(Code::ClaimUndecided, span, format!("claim cannot be decided: {detail}"))
                    .with_note(
                        "the error bound of the values is larger than the tolerance; raise `within` or the accuracy",
                    );
                if let Some(fix) = widen.map(|t| widen_fix(claim.span, within.map(|w| w.span), t)) {
                    d = d.with_fix(fix);
                }
                self.out.diagnostics.push(d);
                self.out.expectations.push(Expectation { span, passed: None, detail });
            }
            Err(f) => {
                let detail = match &f {
                    Fail::At(d) => d.message.clone(),
                    Fail::Dep(n) => format!("uses `{n}`, which has no value"),
                };
                self.report(f, span, "claim");
                self.out.expectations.push(Expectation { span, passed: None, detail });
            }
        }
    }

    /// `A op B [within T]`: decides with the values' error bounds, and says what was compared.
    fn claim_comparison(
        &mut self,
        op: BinOp,
        lhs: &Expr,
        rhs: &Expr,
        within: Option<&Expr>,
    ) -> Result<(Option<bool>, String, Option<f64>), Fail> {
        let l = self.expr(lhs)?;
        let r = self.expr(rhs)?;
        let tol = match within {
            Some(t) => {
                let v = self.expr(t)?;
                match &v.value {
                    Value::Num(n) if n.to_real().is_some_and(|x| x > 0.0) => n.to_real().unwrap(),
                    _ => return Err(fail(Code::BadSettingValue, t.span, "a tolerance must be a positive real number")),
                }
            }
            None => self.checked.settings.tolerance(),
        };
        let decision = compare(op, &l, &r, tol, lhs.span.join(rhs.span))?;
        let mut detail = format!("{} = {}", self.text(lhs.span), show(&l));
        if let Some(why) = &l.reason {
            detail.push_str(&format!(" ({why})"));
        }
        if !is_literal(rhs) {
            detail.push_str(&format!(", {} = {}", self.text(rhs.span), show(&r)));
        } else if matches!(op, BinOp::Eq | BinOp::Ne) {
            detail.push_str(&format!(", expected {}", self.text(rhs.span)));
        } else {
            detail.push_str(&format!(", bound {} {}", op.text(), self.text(rhs.span)));
        }
        if let Some(d) = decision.distance {
            detail.push_str(&format!(" (difference {d:.3e}, tolerance {tol:.1e})"));
        }
        // An undecided `==` holds for any tolerance above the distance plus the bounds.
        let widen = decision.pass_at.filter(|t| op == BinOp::Eq && decision.holds.is_none() && t.is_finite());
        Ok((decision.holds, detail, widen))
    }

    pub(crate) fn expr(&mut self, e: &Expr) -> R {
        let v = self.expr_inner(e)?;
        if let Value::Num(n) = &v.value {
            if !n.is_finite() {
                return Err(fail(Code::EvalFailed, e.span, "the result is not a finite number"));
            }
        }
        Ok(v)
    }

    fn expr_inner(&mut self, e: &Expr) -> R {
        match &e.kind {
            ExprKind::Number(t) => parse_exact(t)
                .map(|q| Valued::exact(Value::Num(Num::Exact(q))))
                .map_err(|m| fail(Code::NumberTooLarge, e.span, m)),
            ExprKind::Imag(t) => {
                let q = parse_exact(t).map_err(|m| fail(Code::NumberTooLarge, e.span, m))?;
                // The literal is exact; its float carries the conversion's rounding.
                let error_bound = Num::Exact(q.clone()).conversion_error();
                let value = Value::Num(Num::Complex(num_complex::Complex64::new(0.0, kelp_lang::number::to_f64(&q))));
                Ok(Valued { value, error_bound, reason: None })
            }
            ExprKind::Bool(b) => Ok(Valued::exact(Value::Bool(*b))),
            ExprKind::Str(s) => Ok(Valued::exact(Value::Str(s.clone()))),
            ExprKind::Name(n) => {
                self.env.get(n).cloned().or_else(|| crate::matrix_fn::constant(n)).ok_or_else(|| Fail::Dep(n.clone()))
            }
            ExprKind::Index { base, indices } => crate::matrix_fn::index(self, base, indices),
            ExprKind::Paren(inner) => self.expr(inner),
            ExprKind::Error => Err(fail(Code::EvalFailed, e.span, "this expression did not parse")),
            ExprKind::Point { coords, projective } => {
                let mut out = Vec::new();
                for c in coords {
                    out.push(self.number(c)?.0);
                }
                Ok(Valued::exact(Value::Point { coords: out, projective: *projective }))
            }
            ExprKind::List(items) => self.list(items),
            ExprKind::Unary { op: UnOp::Neg, operand } => {
                let v = self.expr(operand)?;
                let value = map_nums(&v.value, &|n| n.neg())
                    .ok_or_else(|| fail(Code::WrongKind, e.span, "`-` applies to numbers, vectors and matrices"))?;
                Ok(Valued { value, ..v })
            }
            ExprKind::Unary { op: UnOp::Not, operand } => match self.expr(operand)?.value {
                Value::Bool(b) => Ok(Valued::exact(Value::Bool(!b))),
                _ => Err(fail(Code::WrongKind, e.span, "`not` applies to true/false")),
            },
            ExprKind::Binary { op, lhs, rhs } => {
                let l = self.expr(lhs)?;
                if matches!(op, BinOp::And | BinOp::Or) {
                    let lb = self.boolean(&l, lhs.span)?;
                    // Short-circuit like the words say.
                    if (*op == BinOp::And && !lb) || (*op == BinOp::Or && lb) {
                        return Ok(Valued::exact(Value::Bool(lb)));
                    }
                    let r = self.expr(rhs)?;
                    return Ok(Valued::exact(Value::Bool(self.boolean(&r, rhs.span)?)));
                }
                let r = self.expr(rhs)?;
                if op.is_comparison() {
                    let d = compare(*op, &l, &r, self.checked.settings.tolerance(), e.span)?;
                    return match d.holds {
                        Some(b) => Ok(Valued::exact(Value::Bool(b))),
                        None => Err(fail(
                            Code::ClaimUndecided,
                            e.span,
                            "the comparison cannot be decided within the tolerance",
                        )),
                    };
                }
                arith(*op, &l, &r, e.span)
            }
            ExprKind::Call { func, args } => self.call(e.span, func, args),
        }
    }

    fn boolean(&self, v: &Valued, span: Span) -> Result<bool, Fail> {
        match v.value {
            Value::Bool(b) => Ok(b),
            _ => Err(fail(Code::WrongKind, span, "expected true or false")),
        }
    }

    fn number(&mut self, e: &Expr) -> Result<(Num, f64), Fail> {
        let v = self.expr(e)?;
        match v.value {
            Value::Num(n) => Ok((n, v.error_bound)),
            other => Err(fail(Code::WrongKind, e.span, format!("expected a number, found a {}", other.type_name()))),
        }
    }

    fn list(&mut self, items: &[Expr]) -> R {
        let vals: Vec<Valued> = items.iter().map(|i| self.expr(i)).collect::<Result<_, _>>()?;
        let err = vals.iter().map(|v| v.error_bound).fold(0.0, f64::max);
        if vals.iter().all(|v| matches!(v.value, Value::Num(_))) {
            let nums = vals.into_iter().map(|v| if let Value::Num(n) = v.value { n } else { unreachable!() }).collect();
            return Ok(Valued { value: Value::Vector(nums), error_bound: err, reason: None });
        }
        if !vals.is_empty() && vals.iter().all(|v| matches!(v.value, Value::Vector(_))) {
            let rows: Vec<Vec<Num>> =
                vals.into_iter().map(|v| if let Value::Vector(r) = v.value { r } else { unreachable!() }).collect();
            if rows.iter().all(|r| r.len() == rows[0].len()) {
                return Ok(Valued { value: Value::Matrix(rows), error_bound: err, reason: None });
            }
            return Err(fail(
                Code::RaggedMatrix,
                items[0].span.join(items[items.len() - 1].span),
                "matrix rows must have equal length",
            ));
        }
        Ok(Valued { value: Value::List(vals.into_iter().map(|v| v.value).collect()), error_bound: err, reason: None })
    }

    fn call(&mut self, span: Span, func: &Ident, args: &[Arg]) -> R {
        let positional: Vec<&Expr> =
            args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
        let first = |this: &mut Self| -> R {
            let e = positional
                .first()
                .ok_or_else(|| fail(Code::MissingArgument, func.span, format!("`{}` needs an argument", func.name)))?;
            this.expr(e)
        };
        let arg_span = positional.first().map_or(span, |e| e.span);
        match func.name.as_str() {
            "degree" => match first(self)?.value {
                Value::Curve(c) => Ok(Valued::exact(Value::Num(Num::int(c.equation.degree as i64)))),
                _ => Err(fail(Code::WrongKind, arg_span, "`degree` needs a curve")),
            },
            "count" => {
                let n = match first(self)?.value {
                    Value::Vector(v) => v.len(),
                    Value::Matrix(m) => m.len(),
                    Value::List(l) => l.len(),
                    _ => return Err(fail(Code::WrongKind, arg_span, "`count` needs a list or vector")),
                };
                Ok(Valued::exact(Value::Num(Num::int(n as i64))))
            }
            "abs" | "re" | "im" | "conj" | "exp" | "log" | "sqrt" | "det" | "inverse" | "transpose" | "trace"
            | "identity" | "zeros" => crate::matrix_fn::call(self, span, func, &positional),
            "is_riemann" => {
                let v = first(self)?;
                let Value::Matrix(m) = &v.value else {
                    return Err(fail(Code::WrongKind, arg_span, "`is_riemann` needs a square matrix"));
                };
                if m.len() != m[0].len() {
                    return Err(fail(
                        Code::ShapeMismatch,
                        arg_span,
                        format!("`is_riemann` needs a square matrix; this is {} x {}", m.len(), m[0].len()),
                    ));
                }
                let r = riemann_check(&to_complex_matrix(m), self.checked.settings.tolerance() + v.error_bound);
                Ok(Valued { value: Value::Bool(r.holds()), error_bound: 0.0, reason: Some(r.reason()) })
            }
            "theta" => self.theta_call(span, args),
            "tau" => self.tau_call(span, args),
            "a_periods" | "b_periods" | "differentials" | "intersection_matrix" => {
                self.periods_call(span, &func.name, args)
            }
            "even_thetas" | "hyperelliptic" | "schottky_value" => self.jacobian_call(span, &func.name, args),
            "abel_jacobi" | "riemann_constant" | "lattice_coords" => self.abel_call(span, &func.name, args),
            "equivalent" | "transform_between" | "theta_moduli" => self.equivalence_call(span, &func.name, args),
            "igusa_invariants" => self.igusa_call(span, args),
            "siegel_transform" | "siegel_reduced" | "symplectic_act" => self.symplectic_call(span, &func.name, args),
            "soliton" | "rational" | "theta_wave" | "krichever" | "shallow_water" => {
                self.wave_call(span, &func.name, args)
            }
            "value" | "kp_residual" | "regular" => self.wave_eval(span, &func.name, args),
            "j_invariant" => match first(self)? {
                Valued { value: Value::Curve(c), .. } => self.curve_fact("j_invariant", &c, arg_span),
                Valued { value: Value::Matrix(m), error_bound, .. } => {
                    crate::tau_fn::j_of_matrix(&m, error_bound, arg_span)
                }
                _ => Err(fail(Code::WrongKind, arg_span, "`j_invariant` needs a curve or a 1 x 1 Riemann matrix")),
            },
            "smooth" | "genus" | "singular_points" => {
                let Value::Curve(c) = first(self)?.value else {
                    return Err(fail(Code::WrongKind, arg_span, format!("`{}` needs a curve", func.name)));
                };
                self.curve_fact(&func.name, &c, arg_span)
            }
            name => Err(fail(Code::NotSupported, span, not_supported(name))),
        }
    }
}

/// What is missing for a function kelp does not compute yet.
fn not_supported(name: &str) -> String {
    let why = "KP waves are not computed yet";
    format!("`{name}` is not supported yet: {why}; kelp gives no value rather than a made-up one")
}

fn is_literal(e: &Expr) -> bool {
    match &e.kind {
        ExprKind::Number(_) | ExprKind::Imag(_) | ExprKind::Bool(_) => true,
        ExprKind::Unary { operand, .. } | ExprKind::Paren(operand) => is_literal(operand),
        _ => false,
    }
}

fn show(v: &Valued) -> String {
    if v.error_bound > 0.0 {
        format!("{} (± {:.1e})", v.value, v.error_bound)
    } else {
        v.value.to_string()
    }
}

fn map_nums(v: &Value, f: &dyn Fn(&Num) -> Num) -> Option<Value> {
    Some(match v {
        Value::Num(n) => Value::Num(f(n)),
        Value::Vector(x) => Value::Vector(x.iter().map(f).collect()),
        Value::Matrix(m) => Value::Matrix(m.iter().map(|r| r.iter().map(f).collect()).collect()),
        _ => return None,
    })
}

/// The entries of a numeric value with its shape, for entrywise operations.
fn entries(v: &Value) -> Option<((usize, usize, u8), Vec<&Num>)> {
    match v {
        Value::Num(n) => Some(((1, 1, 0), vec![n])),
        Value::Vector(x) => Some(((x.len(), 1, 1), x.iter().collect())),
        Value::Matrix(m) => Some(((m.len(), m.first().map_or(0, Vec::len), 2), m.iter().flatten().collect())),
        _ => None,
    }
}

struct Decision {
    /// `None`: undecidable within the error bounds.
    holds: Option<bool>,
    /// For numeric comparisons: the largest entrywise difference.
    distance: Option<f64>,
    /// For numeric `==`: the distance plus every error bound, above which it holds.
    pass_at: Option<f64>,
}

/// K702's repair: a tolerance of one significant digit at or above `pass_at`, replacing
/// the claim's `within` or added after the claim.
fn widen_fix(claim: Span, within: Option<Span>, pass_at: f64) -> kelp_lang::Fix {
    // One digit, rounded up; the margin keeps the decimal's own rounding on the safe side.
    let x = pass_at * (1.0 + 1e-9);
    let e = x.log10().floor() as i32;
    let digit = (x / 10f64.powi(e)).ceil();
    let (digit, e) = if digit >= 10.0 { (1.0, e + 1) } else { (digit.max(1.0), e) };
    let tol = format!("{digit}e{e}");
    let title = format!("widen the tolerance to {tol} (difference plus error bounds)");
    match within {
        Some(w) => kelp_lang::Fix::replace(title, w, tol),
        None => kelp_lang::Fix::replace(title, Span::new(claim.end, claim.end), format!(" within {tol}")),
    }
}

/// Exact values compare exactly; numerical ones within `tol`, decided only when the
/// error bounds cannot change the answer.
fn compare(op: BinOp, l: &Valued, r: &Valued, tol: f64, span: Span) -> Result<Decision, Fail> {
    let err = l.error_bound + r.error_bound;
    let negate = |d: Decision| Decision { holds: d.holds.map(|b| !b), ..d };
    match op {
        BinOp::Eq | BinOp::Ne => {
            let d = match (&l.value, &r.value) {
                (Value::Bool(a), Value::Bool(b)) => Decision { holds: Some(a == b), distance: None, pass_at: None },
                (a, b) => {
                    let (Some((sa, ea)), Some((sb, eb))) = (entries(a), entries(b)) else {
                        return Err(fail(
                            Code::WrongKind,
                            span,
                            format!("cannot compare a {} with a {}", a.type_name(), b.type_name()),
                        ));
                    };
                    if sa != sb {
                        return Err(fail(Code::ShapeMismatch, span, "the two sides have different shapes"));
                    }
                    if ea.iter().chain(eb.iter()).all(|n| n.is_exact()) {
                        Decision { holds: Some(ea == eb), distance: None, pass_at: None }
                    } else {
                        // Each entry's distance is itself computed in floating point.
                        let (mut dist, mut slack) = (0.0f64, 0.0f64);
                        for (x, y) in ea.iter().zip(&eb) {
                            let d = x.distance(y);
                            dist = dist.max(d);
                            slack = slack.max(crate::rounding::distance_slack(x, y, d));
                        }
                        let err = err + slack;
                        let holds = if dist + err <= tol {
                            Some(true)
                        } else if dist - err > tol {
                            Some(false)
                        } else {
                            None
                        };
                        Decision { holds, distance: Some(dist), pass_at: Some(dist + err) }
                    }
                }
            };
            Ok(if op == BinOp::Ne { negate(d) } else { d })
        }
        _ => {
            let (Value::Num(a), Value::Num(b)) = (&l.value, &r.value) else {
                return Err(fail(Code::WrongKind, span, "`<`, `<=`, `>`, `>=` compare real numbers"));
            };
            let holds = match (a, b) {
                (Num::Exact(x), Num::Exact(y)) => Some(match op {
                    BinOp::Lt => x < y,
                    BinOp::Le => x <= y,
                    BinOp::Gt => x > y,
                    _ => x >= y,
                }),
                _ => {
                    let (Some(x), Some(y)) = (a.to_rational(), b.to_rational()) else {
                        return Err(fail(
                            Code::WrongKind,
                            span,
                            "complex numbers have no order; compare `abs(...)`, `re(...)` or `im(...)`",
                        ));
                    };
                    // (y - x) decides `<` when it clears the error bounds; floats are binary
                    // fractions, so the gap is computed exactly.
                    let gap = match op {
                        BinOp::Lt | BinOp::Le => y - x,
                        _ => x - y,
                    };
                    let err = num_rational::BigRational::from_float(err);
                    match err {
                        None => None,
                        Some(err) if gap > err => Some(true),
                        Some(err) if gap < -err.clone() => Some(false),
                        Some(err) if num_traits::Zero::is_zero(&err) => {
                            // gap is exactly 0: equal values.
                            Some(matches!(op, BinOp::Le | BinOp::Ge))
                        }
                        Some(_) => None,
                    }
                }
            };
            Ok(Decision { holds, distance: None, pass_at: None })
        }
    }
}

fn arith(op: BinOp, l: &Valued, r: &Valued, span: Span) -> R {
    let bad = || {
        fail(
            Code::WrongKind,
            span,
            format!("`{}` does not apply to a {} and a {}", op.text(), l.value.type_name(), r.value.type_name()),
        )
    };
    let scalar = |a: &Num, b: &Num| -> Result<Num, Fail> {
        match op {
            BinOp::Add => Ok(a.add(b)),
            BinOp::Sub => Ok(a.sub(b)),
            BinOp::Mul => Ok(a.mul(b)),
            BinOp::Div => a.div(b).map_err(|m| fail(Code::EvalFailed, span, m)),
            BinOp::Pow => a.pow(b).map_err(|m| fail(Code::EvalFailed, span, m)),
            _ => Err(bad()),
        }
    };
    let value = match (&l.value, &r.value) {
        (Value::Num(a), Value::Num(b)) => Value::Num(scalar(a, b)?),
        (Value::Vector(a), Value::Vector(b)) if matches!(op, BinOp::Add | BinOp::Sub) => {
            if a.len() != b.len() {
                return Err(fail(Code::ShapeMismatch, span, format!("vectors of lengths {} and {}", a.len(), b.len())));
            }
            Value::Vector(a.iter().zip(b).map(|(x, y)| scalar(x, y)).collect::<Result<_, _>>()?)
        }
        (Value::Matrix(a), Value::Matrix(b)) if matches!(op, BinOp::Add | BinOp::Sub) => {
            if a.len() != b.len() || a[0].len() != b[0].len() {
                return Err(fail(Code::ShapeMismatch, span, "matrices of different sizes"));
            }
            Value::Matrix(
                a.iter()
                    .zip(b)
                    .map(|(ra, rb)| ra.iter().zip(rb).map(|(x, y)| scalar(x, y)).collect::<Result<_, _>>())
                    .collect::<Result<_, _>>()?,
            )
        }
        (Value::Num(s), v @ (Value::Vector(_) | Value::Matrix(_))) if op == BinOp::Mul => {
            map_nums(v, &|n| s.mul(n)).unwrap()
        }
        (v @ (Value::Vector(_) | Value::Matrix(_)), Value::Num(s)) if op == BinOp::Mul => {
            map_nums(v, &|n| n.mul(s)).unwrap()
        }
        (v @ (Value::Vector(_) | Value::Matrix(_)), Value::Num(s)) if op == BinOp::Div => {
            if s.is_zero() {
                return Err(fail(Code::EvalFailed, span, "division by zero"));
            }
            map_nums(v, &|n| n.div(s).unwrap()).unwrap()
        }
        (Value::Matrix(a), Value::Matrix(b)) if op == BinOp::Mul => {
            if a[0].len() != b.len() {
                return Err(fail(Code::ShapeMismatch, span, "the matrix sizes do not fit for a product"));
            }
            Value::Matrix(
                a.iter().map(|row| (0..b[0].len()).map(|j| dot(row, b.iter().map(|br| &br[j]))).collect()).collect(),
            )
        }
        (Value::Matrix(a), Value::Vector(x)) if op == BinOp::Mul => {
            if a[0].len() != x.len() {
                return Err(fail(Code::ShapeMismatch, span, "the matrix and vector sizes do not fit for a product"));
            }
            Value::Vector(a.iter().map(|row| dot(row, x.iter())).collect())
        }
        _ => return Err(bad()),
    };
    let err = crate::rounding::arith_error(op, l, r, &value);
    Ok(Valued { value, error_bound: err, reason: None })
}

fn dot<'a>(row: &[Num], col: impl Iterator<Item = &'a Num>) -> Num {
    row.iter().zip(col).fold(Num::int(0), |acc, (a, b)| acc.add(&a.mul(b)))
}
