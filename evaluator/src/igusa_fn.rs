//! `igusa_invariants(X)`: the absolute invariants I2^5 / I10, I2^3 I4 / I10, I2^2 I6 / I10 of
//! a genus-2 curve (`periods::igusa`), from its equation y^2 = f(x) (the roots of f with
//! their inclusion radii) or from a 2 x 2 Riemann matrix (Rosenhain's form from the even
//! theta constants), with bounds from ball arithmetic. Equal curves give equal invariants,
//! so the two routes check each other (Thomae's formula behind Rosenhain's).

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::periods::fingerprint::even_characteristics;
use crate::periods::igusa::{absolute, root_invariants, rosenhain};
use crate::periods::shape::superelliptic_route;
use crate::value::{Value, Valued};
use crate::waves::ball::Ball;
use kelp_lang::ast::Arg;
use kelp_lang::{Code, Span};

impl Evaluator<'_> {
    pub(crate) fn igusa_call(&mut self, span: Span, args: &[Arg]) -> Result<Valued, Fail> {
        let Some(Arg::Positional(e)) = args.first() else {
            return Err(fail(
                Code::MissingArgument,
                span,
                "`igusa_invariants` needs a genus-2 curve or Riemann matrix",
            ));
        };
        let v = self.expr(e)?;
        let (inv, how) = match &v.value {
            Value::Curve(c) => {
                let shape = superelliptic_route(&c.equation.poly, c.equation.projective)
                    .filter(|s| s.m == 2 && matches!(s.f.degree(), Some(5 | 6)))
                    .ok_or_else(|| {
                        fail(
                            Code::NotSupported,
                            e.span,
                            format!("`igusa_invariants` of a curve takes y^2 = f(x) with f square-free of degree 5 or 6; `{}` is not of that form (its Riemann matrix may be: `igusa_invariants(tau({}))`)", c.name, c.name),
                        )
                    })?;
                let roots = crate::algebra::roots::refined_roots(&shape.f);
                let mut rs: [Option<Ball>; 6] = [None; 6];
                for (k, (z, r)) in roots.iter().enumerate() {
                    rs[k] = Some(Ball::new(*z, *r));
                }
                let lead = Ball::real(kelp_lang::number::to_f64(&shape.f.lead()));
                (root_invariants(lead, &rs), "the roots of f")
            }
            Value::Matrix(rows) if rows.len() == 2 && rows.iter().all(|r| r.len() == 2) => {
                let t = nalgebra::DMatrix::from_fn(2, 2, |i, j| rows[i][j].to_complex());
                let check = crate::linalg::riemann_check(&t, self.checked.settings.tolerance() + v.error_bound);
                if !check.holds() {
                    return Err(fail(
                        Code::NotRiemannMatrix,
                        e.span,
                        format!("not a Riemann matrix: {}", check.reason()),
                    ));
                }
                let consts = self.theta_constants(&t, v.error_bound, e.span, span)?;
                let chars = even_characteristics(2);
                let theta = |i: usize| -> Ball {
                    // i = a1 + 2 a2 + 4 b1 + 8 b2 -> the characteristic [a/2, b/2].
                    let (a1, a2, b1, b2) = (i & 1, (i >> 1) & 1, (i >> 2) & 1, (i >> 3) & 1);
                    let want = ([0.5 * a1 as f64, 0.5 * a2 as f64], [0.5 * b1 as f64, 0.5 * b2 as f64]);
                    let k = chars.iter().position(|c| c.a == want.0 && c.b == want.1).expect("an even characteristic");
                    Ball::new(consts[k].0, consts[k].1)
                };
                let l = rosenhain(&theta).ok_or_else(|| {
                    fail(Code::EvalFailed, e.span, "a theta constant in Rosenhain's quotients cannot be shown nonzero: the matrix is (near) a product of elliptic curves, which is no genus-2 curve")
                })?;
                let rs = [Some(Ball::real(0.0)), Some(Ball::real(1.0)), Some(l[0]), Some(l[1]), Some(l[2]), None];
                (root_invariants(Ball::real(1.0), &rs), "Rosenhain's form from the even theta constants")
            }
            _ => {
                return Err(fail(
                    Code::WrongKind,
                    e.span,
                    "`igusa_invariants` needs a genus-2 curve or a 2 x 2 Riemann matrix",
                ))
            }
        };
        let js = absolute(&inv).ok_or_else(|| {
            fail(Code::EvalFailed, span, "I10 (the discriminant) cannot be shown nonzero: no absolute invariants")
        })?;
        let bound = js.iter().map(|b| b.r).fold(0.0, f64::max);
        let value = Value::Vector(js.iter().map(|b| Num::Complex(b.c)).collect::<Vec<_>>());
        let reason = format!("[I2^5 / I10, I2^3 I4 / I10, I2^2 I6 / I10] from {how}; error <= {bound:.1e}");
        Ok(Valued { value, error_bound: bound, reason: Some(reason) })
    }
}
