//! Whether two Riemann matrices are Sp(2g, Z)-equivalent: `equivalent(T1, T2)`,
//! `transform_between(T1, T2)` and the invariant behind "not equivalent",
//! `theta_moduli(T)`.
//!
//! The invariant: under Gamma in Sp(2g, Z) the even theta constants are permuted and all
//! multiplied by one factor (up to eighth roots of unity; Igusa, *Theta Functions*, 1972,
//! V.1), so the sorted list of |theta[m](0)|^8 divided by the largest of them does not
//! change. With each constant's bound e_m, the true ratio lies in [(|t_m| - e_m)^8 / H,
//! (|t_m| + e_m)^8 / L] (H, L the largest upper and lower eighth powers), and the k-th
//! smallest true ratio between the k-th smallest lower and upper ends (order statistics
//! are monotone): disjoint intervals at one position prove "not equivalent".
//! "Equivalent" is shown by a transformation found by `theta::isometry::find_transform`
//! (exact integer symplectic matrix) whose action on T1 meets T2 within the tolerance, the
//! action's bound and T2's bound included, as a claim `==` would be decided.

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::symplectic_fn::{act_bounded, square_complex as matrix};
use crate::value::{Value, Valued};
use kelp_lang::ast::Arg;
use kelp_lang::{Code, Span};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

/// Sorted lower and upper ends of the invariant ratios.
struct Moduli {
    lo: Vec<f64>,
    hi: Vec<f64>,
}

fn moduli(constants: &[(C64, f64)]) -> Moduli {
    let up = |x: f64| x * (1.0 + 4.0 * f64::EPSILON);
    let down = |x: f64| x * (1.0 - 4.0 * f64::EPSILON);
    let lo8: Vec<f64> = constants.iter().map(|(t, e)| down((t.norm() - e).max(0.0).powi(8))).collect();
    let hi8: Vec<f64> = constants.iter().map(|(t, e)| up((t.norm() + e).powi(8))).collect();
    let big_hi = hi8.iter().copied().fold(0.0, f64::max);
    let big_lo = lo8.iter().copied().fold(0.0, f64::max);
    let mut lo: Vec<f64> = lo8.iter().map(|v| down(v / big_hi)).collect();
    let mut hi: Vec<f64> = hi8.iter().map(|v| if big_lo > 0.0 { up(v / big_lo).min(1.0) } else { 1.0 }).collect();
    lo.sort_by(f64::total_cmp);
    hi.sort_by(f64::total_cmp);
    Moduli { lo, hi }
}

/// The first position where the two invariants are proved different.
fn separated(a: &Moduli, b: &Moduli) -> Option<usize> {
    (0..a.lo.len()).find(|&k| a.hi[k] < b.lo[k] || b.hi[k] < a.lo[k])
}

impl Evaluator<'_> {
    pub(crate) fn equivalence_call(&mut self, span: Span, what: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let pos: Vec<_> = args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
        if what == "theta_moduli" {
            let (g, cs) = self.even_constants(span, what, args)?;
            let m = moduli(&cs);
            let mid: Vec<Num> = m.lo.iter().zip(&m.hi).map(|(l, h)| Num::Real(0.5 * (l + h))).collect();
            // Half the width, plus the rounding of the midpoint and of the width themselves.
            let err =
                m.lo.iter()
                    .zip(&m.hi)
                    .map(|(l, h)| 0.5 * (h - l) * (1.0 + 4.0 * f64::EPSILON) + 2.0 * f64::EPSILON * 0.5 * (l + h))
                    .fold(0.0, f64::max)
                    * (1.0 + 4.0 * f64::EPSILON);
            let reason = format!(
                "|theta[m](0)|^8 over the {} even characteristics of genus {g}, divided by the largest, sorted: unchanged by Sp(2g, Z); error <= {err:.1e}",
                cs.len()
            );
            return Ok(Valued { value: Value::Vector(mid), error_bound: err, reason: Some(reason) });
        }
        let (Some(e1), Some(e2)) = (pos.first(), pos.get(1)) else {
            return Err(fail(Code::MissingArgument, span, format!("`{what}` needs two Riemann matrices")));
        };
        let (v1, v2) = (self.expr(e1)?, self.expr(e2)?);
        let t1 =
            matrix(&v1.value).ok_or_else(|| fail(Code::WrongKind, e1.span, "a square Riemann matrix is needed"))?;
        let t2 =
            matrix(&v2.value).ok_or_else(|| fail(Code::WrongKind, e2.span, "a square Riemann matrix is needed"))?;
        if t1.nrows() != t2.nrows() {
            return Err(fail(
                Code::ShapeMismatch,
                e2.span,
                format!("the matrices have genus {} and {}: never equivalent", t1.nrows(), t2.nrows()),
            ));
        }
        let g = t1.nrows();
        if g > 5 {
            return Err(fail(Code::NotSupported, span, format!("`{what}` is built up to genus 5; this is genus {g}")));
        }
        let tol = self.checked.settings.tolerance();
        for (t, v, e) in [(&t1, &v1, e1), (&t2, &v2, e2)] {
            let check = crate::linalg::riemann_check(t, tol + v.error_bound);
            if !check.holds() {
                return Err(fail(Code::NotRiemannMatrix, e.span, format!("not a Riemann matrix: {}", check.reason())));
            }
        }
        // A transformation first: it is cheap when the matrices are related.
        let delta = (1e3 * (tol + v1.error_bound + v2.error_bound)).max(1e-7);
        if let Some(gamma) = crate::theta::isometry::find_transform(&t1, &t2, delta) {
            if let Ok((moved, bound)) = act_bounded(&gamma, &t1, v1.error_bound) {
                let diff = moved.iter().zip(t2.iter()).map(|(a, b)| (a - b).norm()).fold(0.0, f64::max);
                if diff + bound + v2.error_bound <= tol {
                    let reason = format!(
                        "Gamma . T1 = T2 within {:.1e} (difference {diff:.1e}, bounds {bound:.1e} and {:.1e}) for the integer symplectic Gamma = {}",
                        tol,
                        v2.error_bound,
                        show_int(&gamma)
                    );
                    let value = if what == "equivalent" {
                        Value::Bool(true)
                    } else {
                        Value::Matrix(gamma.row_iter().map(|r| r.iter().map(|&v| Num::int(v)).collect()).collect())
                    };
                    return Ok(Valued { value, error_bound: 0.0, reason: Some(reason) });
                }
            }
        }
        let c1 = self.theta_constants(&t1, v1.error_bound, e1.span, span)?;
        let c2 = self.theta_constants(&t2, v2.error_bound, e2.span, span)?;
        let (m1, m2) = (moduli(&c1), moduli(&c2));
        if let Some(k) = separated(&m1, &m2) {
            let reason = format!(
                "not equivalent: the {}-th smallest |theta[m](0)|^8 / max is in [{:.6e}, {:.6e}] for T1 and [{:.6e}, {:.6e}] for T2 (an Sp(2g, Z) invariant)",
                k + 1,
                m1.lo[k],
                m1.hi[k],
                m2.lo[k],
                m2.hi[k]
            );
            if what == "equivalent" {
                return Ok(Valued { value: Value::Bool(false), error_bound: 0.0, reason: Some(reason) });
            }
            return Err(fail(Code::EvalFailed, span, format!("no transformation exists: {reason}")));
        }
        Err(fail(
            Code::ClaimUndecided,
            span,
            format!(
                "undecided: the theta-constant invariants agree within their bounds, and the search (Siegel reduction, lattice isometries, inversions) found no transformation within {tol:.1e}"
            ),
        ))
    }
}

fn show_int(m: &DMatrix<i64>) -> String {
    let rows: Vec<String> =
        m.row_iter().map(|r| format!("[{}]", r.iter().map(|v| v.to_string()).collect::<Vec<_>>().join(", "))).collect();
    format!("[{}]", rows.join(", "))
}
