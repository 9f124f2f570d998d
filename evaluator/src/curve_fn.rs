//! `smooth`, `genus` and `singular_points`: the exact curve algebra behind the built-ins,
//! computed once per curve; the information diagnostic at the curve's name listing its
//! singular points is added after the evaluation (`facts_info`).

use crate::algebra::curve::{CurveFacts, NoGenus};
use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::value::{CurveValue, SingularInfo, Value, Valued};
use kelp_lang::{Code, Diagnostic, Span};
use std::rc::Rc;

/// The information diagnostic at a curve's name listing its singular points, once its
/// facts are computed (`None` before).
pub(crate) fn facts_info(c: &CurveValue, at: Span) -> Option<Diagnostic> {
    let f = c.facts.get()?;
    let lines = f.summary();
    let msg = if lines.is_empty() {
        format!("`{}` is smooth (degree {})", c.name, f.degree)
    } else {
        format!("`{}` has {} singular point(s)", c.name, f.singular_count())
    };
    let mut d = Diagnostic::info(Code::ValueInfo, at, msg);
    d.notes = lines;
    Some(d)
}

impl Evaluator<'_> {
    fn facts(&mut self, c: &CurveValue, span: Span) -> Result<std::sync::Arc<CurveFacts>, Fail> {
        self.facts_used.push(c.name.clone());
        let Some(f) = c.facts() else {
            return Err(fail(
                Code::BudgetExceeded,
                span,
                format!(
                    "`{}` has degree {}; singular points and genus are computed up to degree {} (the `max_degree` setting, at most 24)",
                    c.name,
                    c.equation.degree,
                    crate::limits::current().max_degree
                ),
            ));
        };
        Ok(f)
    }

    pub(crate) fn curve_fact(&mut self, what: &str, c: &CurveValue, span: Span) -> Result<Valued, Fail> {
        if what == "j_invariant" {
            use crate::algebra::jinv;
            let Some(f) = jinv::as_y2_equals(&c.equation.poly, c.equation.projective)
                .or_else(|| jinv::as_double_cover(&c.equation.poly, c.equation.projective))
            else {
                return Err(fail(
                    Code::NotSupported,
                    span,
                    format!(
                        "`j_invariant` is computed exactly for curves quadratic in y (or in x) with a constant square term, \
                         A y^2 + B(x) y + C(x) = 0 with B^2 - 4AC of degree 3 or 4 (y^2 = f(x), y^2 + x y = x^3 - 1, ...); \
                         `{}` has another shape, not supported yet (`j_invariant(tau({}))` gives j with a bound)",
                        c.name, c.name
                    ),
                ));
            };
            return jinv::j_invariant(&f)
                .map(|j| Valued::exact(Value::Num(Num::Exact(j))))
                .map_err(|m| fail(Code::EvalFailed, span, format!("`{}` has no j-invariant: {m}", c.name)));
        }
        let f = self.facts(c, span)?;
        let summary = if f.smooth() { "smooth".to_string() } else { f.summary().join("; ") };
        match what {
            "smooth" => {
                if f.non_reduced {
                    return Ok(Valued { value: Value::Bool(false), error_bound: 0.0, reason: Some(summary) });
                }
                Ok(Valued { value: Value::Bool(f.smooth()), error_bound: 0.0, reason: Some(summary) })
            }
            "genus" => match f.genus() {
                Ok(g) => Ok(Valued { value: Value::Num(Num::int(g)), error_bound: 0.0, reason: Some(summary) }),
                Err(NoGenus::NonReduced(m)) | Err(NoGenus::Reducible(m)) => {
                    Err(fail(Code::EvalFailed, span, format!("`{}` has no genus: {m}", c.name)))
                }
                Err(NoGenus::Unsupported(m)) => {
                    Err(fail(Code::NotSupported, span, format!("the genus of `{}` is not supported yet: {m}", c.name)))
                }
            },
            _ => {
                if f.non_reduced {
                    return Err(fail(
                        Code::EvalFailed,
                        span,
                        format!("`{}` has a repeated factor: it is singular along a whole component, not at finitely many points", c.name),
                    ));
                }
                if !f.irrational.is_empty() {
                    return Err(fail(
                        Code::NotSupported,
                        span,
                        format!(
                            "`{}` has singular points with irrational coordinates; listing them exactly is not supported yet ({})",
                            c.name,
                            summary
                        ),
                    ));
                }
                let mut out = Vec::new();
                for p in &f.rational {
                    let l = p.local.as_ref().map_err(|why| {
                        fail(
                            Code::NotSupported,
                            span,
                            format!("a singular point of `{}` cannot be classified yet: {why}", c.name),
                        )
                    })?;
                    out.push(Value::SingularPoint(Rc::new(SingularInfo {
                        coords: p.coords.iter().map(|q| Num::Exact(q.clone())).collect(),
                        multiplicity: l.multiplicity,
                        kind: l.kind.clone(),
                        delta: l.delta,
                        branches: l.branches,
                        milnor: l.milnor,
                    })));
                }
                Ok(Valued { value: Value::List(out), error_bound: 0.0, reason: Some(summary) })
            }
        }
    }
}
