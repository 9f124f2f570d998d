//! `tau(C [, reduce = B])` and `j_invariant(T)`: Riemann matrices of curves through the
//! period engine, with the error estimate as the value's bound and a summary (differentials,
//! nodes, self-checks, reduction) for claim messages and hover.

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::periods::shape::superelliptic_route;
use crate::periods::superelliptic::superelliptic_genus;
use crate::periods::{riemann_matrix, PeriodError, RiemannMatrix};
use crate::value::{CurveValue, Value, Valued};
use kelp_lang::ast::Arg;
use kelp_lang::{Code, Span};
use std::rc::Rc;

fn period_fail(e: &PeriodError, span: Span, name: &str) -> Fail {
    match e {
        PeriodError::Unsupported(m) => {
            fail(Code::NotSupported, span, format!("`tau({name})` is not supported yet: {m}"))
        }
        PeriodError::NoMatrix(m) => fail(Code::EvalFailed, span, format!("`{name}` has no Riemann matrix: {m}")),
        PeriodError::Accuracy(m) => fail(Code::EvalFailed, span, format!("`tau({name})` failed: {m}")),
    }
}

/// The differentials as the user wrote the curve: a curve x^m = f(y) goes through the
/// route as y^m = f(x), so its forms are shown with x and y exchanged back.
pub fn user_forms(forms: &[String], swapped: bool) -> Vec<String> {
    if !swapped {
        return forms.to_vec();
    }
    forms
        .iter()
        .map(|f| {
            f.chars()
                .map(|ch| match ch {
                    'x' => 'y',
                    'y' => 'x',
                    other => other,
                })
                .collect()
        })
        .collect()
}

fn swapped(c: &CurveValue) -> bool {
    superelliptic_route(&c.equation.poly, c.equation.projective).is_some_and(|s| s.swapped)
}

/// One line saying how a Riemann matrix was obtained.
pub fn summary(r: &RiemannMatrix, equation: &str, swapped: bool) -> String {
    let p = &r.periods;
    let diffs = &user_forms(&p.forms, swapped);
    let paths = if p.plane.is_some() {
        format!("{} keyhole loops about the critical values, {} quadrature nodes (rules of 16 and {} points; error estimated, differentials checked by a second computation)", p.edges, p.nodes, p.largest_rule)
    } else {
        format!("{} edges, {} nodes (largest rule {})", p.edges, p.nodes, p.largest_rule)
    };
    // The covering route compares two rules: an estimate, not the superelliptic route's bound.
    let err = if p.plane.is_some() { "estimated error" } else { "error <=" };
    format!(
        "genus {} Riemann matrix of {equation} from {}; {}; {paths}; symmetry defect {:.1e}, smallest eigenvalue of Im tau {:.3}; {err} {:.1e}",
        p.genus,
        diffs.join(", "),
        if r.reduced.is_some() { "Siegel-reduced" } else { "not reduced" },
        r.symmetry_defect,
        r.min_eig_im,
        r.error
    )
}

/// Entrywise complex matrix as a language value.
fn matrix_value(m: &nalgebra::DMatrix<num_complex::Complex64>) -> Value {
    Value::Matrix(m.row_iter().map(|row| row.iter().map(|v| Num::Complex(*v)).collect()).collect())
}

impl Evaluator<'_> {
    /// `a_periods(C)`, `b_periods(C)` and `differentials(C)`: the periods behind `tau`, in the
    /// cycles `tau(C, reduce = ...)` uses (after Siegel's reduction the cycles change by the
    /// reducing symplectic matrix, and so do A and B).
    pub(crate) fn periods_call(&mut self, span: Span, which: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let (c, reduce, cspan) = self.curve_and_reduce(span, which, args)?;
        let r = self.riemann_matrix(&c, reduce, cspan)?;
        let p = &r.periods;
        if which == "intersection_matrix" {
            return Ok(Valued::exact(intersection_value(&r)));
        }
        if which == "differentials" {
            let forms = user_forms(&p.forms, swapped(&c)).into_iter().map(Value::Str).collect();
            return Ok(Valued::exact(Value::List(forms)));
        }
        // In the cycles tau refers to (`periods::change_cycles` after a reduction).
        let basis = &r.basis;
        let (a, b, a_err, b_err) = (basis.a.clone(), basis.b.clone(), basis.a_error, basis.b_error);
        let (m, err, cycles) = if which == "a_periods" { (a, a_err, "a") } else { (b, b_err, "b") };
        let how = if p.plane.is_some() { "estimated error (two quadrature rules)" } else { "error <=" };
        let reason = format!(
            "{cycles}-periods of {} over the cycles of {} tau; {how} {err:.1e}",
            user_forms(&p.forms, swapped(&c)).join(", "),
            if r.reduced.is_some() { "the Siegel-reduced" } else { "the unreduced" }
        );
        Ok(Valued { value: matrix_value(&m), error_bound: err, reason: Some(reason) })
    }

    pub(crate) fn curve_and_reduce(
        &mut self,
        span: Span,
        what: &str,
        args: &[Arg],
    ) -> Result<(Rc<CurveValue>, bool, Span), Fail> {
        let mut curve = None;
        let mut reduce = true;
        for a in args {
            match a {
                Arg::Positional(e) if curve.is_none() => curve = Some(e),
                Arg::Keyword { name, value } if name.name == "reduce" => match self.expr(value)?.value {
                    Value::Bool(b) => reduce = b,
                    _ => return Err(fail(Code::WrongKind, value.span, "`reduce` is true or false")),
                },
                _ => {}
            }
        }
        let ce = curve.ok_or_else(|| fail(Code::MissingArgument, span, format!("`{what}` needs a curve")))?;
        let Value::Curve(c) = self.expr(ce)?.value else {
            return Err(fail(Code::WrongKind, ce.span, format!("`{what}` needs a curve")));
        };
        Ok((c, reduce, ce.span))
    }

    pub(crate) fn tau_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        let (c, reduce, cspan) = self.curve_and_reduce(span, "tau", args)?;
        let r = self.riemann_matrix(&c, reduce, cspan)?;
        let eq = superelliptic_route(&c.equation.poly, c.equation.projective)
            .map(|s| s.describe())
            .unwrap_or_else(|| format!("{} = 0 (by the covering x: curve -> P^1)", c.equation.poly));
        let rows =
            r.tau.row_iter().map(|row| row.iter().map(|v| Num::Complex(*v)).collect::<Vec<_>>()).collect::<Vec<_>>();
        Ok(Valued { value: Value::Matrix(rows), error_bound: r.error, reason: Some(summary(&r, &eq, swapped(&c))) })
    }

    pub(crate) fn riemann_matrix(
        &mut self,
        c: &Rc<CurveValue>,
        reduce: bool,
        span: Span,
    ) -> Result<RiemannMatrix, Fail> {
        let Some(shape) = superelliptic_route(&c.equation.poly, c.equation.projective) else {
            return self.general_matrix(c, reduce, span);
        };
        let accuracy = self.checked.settings.accuracy();
        genus_limit(superelliptic_genus(shape.m, shape.f.degree().unwrap_or(0) as u32) as i64, span, &c.name)?;
        let p = c
            .periods_or(|| crate::periods::periods_memo(shape.m, &shape.f, accuracy))
            .map_err(|e| period_fail(&e, span, &c.name))?;
        // Two independent genus computations must agree: the differentials counted here and
        // the exact curve algebra's delta invariants.
        if let Some(facts) = c.facts() {
            if let Ok(g) = facts.genus() {
                let n = shape.f.degree().unwrap_or(0) as u32;
                if g != superelliptic_genus(shape.m, n) as i64 {
                    return Err(fail(
                        Code::EvalFailed,
                        span,
                        format!(
                            "`{}`: the exact genus {g} disagrees with {} holomorphic differentials; no matrix is given",
                            c.name, p.genus
                        ),
                    ));
                }
            }
        }
        riemann_matrix((*p).clone(), reduce).map_err(|e| period_fail(&e, span, &c.name))
    }
}

impl Evaluator<'_> {
    /// A plane curve not of the form y^m = f(x): the covering route of `periods::general`,
    /// which needs the exact genus (and checks its own Riemann–Hurwitz genus against it).
    fn general_matrix(&mut self, c: &Rc<CurveValue>, reduce: bool, span: Span) -> Result<RiemannMatrix, Fail> {
        let facts = c.facts().ok_or_else(|| {
            fail(
                Code::NotSupported,
                span,
                format!(
                    "`tau({})` needs the exact curve algebra, which runs up to degree {} (the `max_degree` setting)",
                    c.name,
                    crate::limits::current().max_degree
                ),
            )
        })?;
        let genus = facts.genus().map_err(|e| match e {
            crate::algebra::curve::NoGenus::Unsupported(m) => {
                fail(Code::NotSupported, span, format!("`tau({})` needs the genus first: {m}", c.name))
            }
            other => fail(Code::EvalFailed, span, format!("`{}` has no Riemann matrix: {}", c.name, other.message())),
        })?;
        let p = c
            .periods_or(|| crate::periods::general_memo(&c.equation.poly, c.equation.projective, &facts, genus))
            .map_err(|e| period_fail(&e, span, &c.name))?;
        riemann_matrix((*p).clone(), reduce).map_err(|e| period_fail(&e, span, &c.name))
    }
}

/// The intersection numbers of the cycles tau refers to, as an exact matrix: the basis's
/// own (from the lifted cycles), moved by the reducing Gamma = [[a, b], [c, d]] when tau was
/// reduced: the new cycles are a' = d a + c b, b' = b a + a b in block form
/// (`periods::change_cycles`), so the matrix becomes M I M^T with M = [[d, c], [b, a]].
fn intersection_value(r: &RiemannMatrix) -> Value {
    let n = r.periods.intersection.len();
    let i = nalgebra::DMatrix::from_fn(n, n, |p, q| r.periods.intersection[p][q] as i128);
    let out = match &r.reduced {
        Some(gamma) => {
            let g = n / 2;
            let blk = |rr: usize, cc: usize| gamma.view((rr * g, cc * g), (g, g)).map(|v| v as i128);
            let mut m = nalgebra::DMatrix::<i128>::zeros(n, n);
            m.view_mut((0, 0), (g, g)).copy_from(&blk(1, 1));
            m.view_mut((0, g), (g, g)).copy_from(&blk(1, 0));
            m.view_mut((g, 0), (g, g)).copy_from(&blk(0, 1));
            m.view_mut((g, g), (g, g)).copy_from(&blk(0, 0));
            &m * i * m.transpose()
        }
        None => i,
    };
    Value::Matrix(out.row_iter().map(|row| row.iter().map(|&v| Num::int(v as i64)).collect()).collect())
}

/// Refuses a genus above the `max_genus` setting.
fn genus_limit(genus: i64, span: Span, name: &str) -> Result<(), Fail> {
    let max = crate::limits::current().max_genus;
    if genus > max as i64 {
        return Err(fail(
            Code::BudgetExceeded,
            span,
            format!(
                "`{name}` has genus {genus}; Riemann matrices are computed up to genus {max} (the `max_genus` setting)"
            ),
        ));
    }
    Ok(())
}

/// j(tau) of a 1 x 1 Riemann matrix.
pub fn j_of_matrix(m: &[Vec<Num>], error: f64, span: Span) -> Result<Valued, Fail> {
    if m.len() != 1 || m[0].len() != 1 {
        return Err(fail(
            Code::ShapeMismatch,
            span,
            format!(
                "`j_invariant` of a matrix needs a 1 x 1 Riemann matrix (genus 1); this is {} x {}",
                m.len(),
                m[0].len()
            ),
        ));
    }
    let t = m[0][0].to_complex();
    if !(t.im > 0.0) {
        return Err(fail(Code::NotRiemannMatrix, span, format!("Im tau must be positive; it is {:.3e}", t.im)));
    }
    let (j, e) = crate::periods::modular::j_of_tau(t, error).ok_or_else(|| {
        fail(
            Code::EvalFailed,
            span,
            format!("no bound on j is shown: the error of tau ({error:.1e}) is too large where j is evaluated"),
        )
    })?;
    let value = if j.im.abs() <= e { Num::Real(j.re) } else { Num::Complex(j) };
    Ok(Valued { value: Value::Num(value), error_bound: e, reason: Some("from Eisenstein series E4, E6".into()) })
}
