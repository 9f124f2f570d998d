//! Sp(2g, Z) on Riemann matrices: `siegel_transform(T)` (the integer symplectic matrix of
//! Siegel's reduction), `siegel_reduced(T)` and `symplectic_act(G, T)` =
//! (A T + B)(C T + D)^-1 for G = [[A, B], [C, D]], with a bound.
//!
//! G is checked exactly: integer entries, size 2g, and the block relations of G^T J G = J
//! (A^T C and B^T D symmetric, A^T D - C^T B = I; common practice, e.g. Mumford, *Tata
//! Lectures on Theta I*, II.5), naming the first that fails.
//!
//! Bound: N = A T + B and M = C T + D have entries within e * r + rounding of the exact
//! ones (e the entrywise bound of T, r the largest row sum of |A| or |C|; the rounding of a
//! sum of g integer multiples, gamma_(g+1) times the sum of moduli, Higham ch. 3). M's
//! inverse comes with an entrywise bound from `matrix_bound::inverse` (which refuses when
//! invertibility cannot be shown). Then |(N X)_ij - exact| <= sum_k (|N_ik| eX + eN |X_kj| +
//! eN eX) plus the product's rounding; the largest over (i, j) is the bound. The result is
//! symmetrised, which keeps the bound (both the result and its transpose are within it of
//! the symmetric exact value).

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::value::{Value, Valued};
use kelp_lang::ast::Arg;
use kelp_lang::{Code, Span};
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

const U: f64 = f64::EPSILON / 2.0;

/// Checks that `m` is an integer symplectic matrix of size 2g; the failing relation otherwise.
pub fn check_symplectic(m: &[Vec<Num>], g: usize) -> Result<DMatrix<i64>, String> {
    let n = 2 * g;
    if m.len() != n || m.iter().any(|r| r.len() != n) {
        return Err(format!("a symplectic matrix for a {g} x {g} Riemann matrix is {n} x {n}"));
    }
    let mut out = DMatrix::<i64>::zeros(n, n);
    for (i, row) in m.iter().enumerate() {
        for (j, x) in row.iter().enumerate() {
            let q = x.to_rational().filter(|q| q.is_integer() && matches!(x, Num::Exact(_)));
            let v = q.and_then(|q| num_traits::ToPrimitive::to_i64(q.numer())).filter(|v| v.abs() < 1 << 31);
            out[(i, j)] =
                v.ok_or_else(|| format!("entry [{}, {}] is not a whole number (of modulus below 2^31)", i + 1, j + 1))?;
        }
    }
    let blk = |r: usize, c: usize| out.view((r * g, c * g), (g, g)).into_owned().map(i128::from);
    let (a, b, c, d) = (blk(0, 0), blk(0, 1), blk(1, 0), blk(1, 1));
    let first_off = |m: &DMatrix<i128>, want: &DMatrix<i128>| {
        (0..g).flat_map(|i| (0..g).map(move |j| (i, j))).find(|&(i, j)| m[(i, j)] != want[(i, j)])
    };
    let atc = a.transpose() * &c;
    if let Some((i, j)) = first_off(&atc, &atc.transpose()) {
        return Err(format!("A^T C is not symmetric (entry [{}, {}]): not symplectic", i + 1, j + 1));
    }
    let btd = b.transpose() * &d;
    if let Some((i, j)) = first_off(&btd, &btd.transpose()) {
        return Err(format!("B^T D is not symmetric (entry [{}, {}]): not symplectic", i + 1, j + 1));
    }
    let one = a.transpose() * &d - c.transpose() * &b;
    if let Some((i, j)) = first_off(&one, &DMatrix::identity(g, g)) {
        return Err(format!("A^T D - C^T B is not the identity (entry [{}, {}]): not symplectic", i + 1, j + 1));
    }
    Ok(out)
}

fn to_nums(m: &DMatrix<C64>) -> Vec<Vec<Num>> {
    m.row_iter().map(|r| r.iter().map(|v| Num::Complex(*v)).collect()).collect()
}

fn row_sum(m: &DMatrix<f64>) -> f64 {
    m.row_iter().map(|r| r.iter().map(|v| v.abs()).sum::<f64>()).fold(0.0, f64::max)
}

/// (A T + B)(C T + D)^-1, symmetrised, with an entrywise bound; `e` is T's bound.
pub fn act_bounded(gamma: &DMatrix<i64>, t: &DMatrix<C64>, e: f64) -> Result<(DMatrix<C64>, f64), String> {
    let g = t.nrows();
    let blk = |r: usize, c: usize| gamma.view((r * g, c * g), (g, g)).map(|v| v as f64);
    let (a, b, c, d) = (blk(0, 0), blk(0, 1), blk(1, 0), blk(1, 1));
    let cx = |m: &DMatrix<f64>| m.map(|v| C64::new(v, 0.0));
    let tmax = t.iter().map(|v| v.norm()).fold(0.0, f64::max);
    let gamma_g = |n: usize| (n as f64) * 2.0 * U / (1.0 - (n as f64) * 2.0 * U);
    // Entries of N = A T + B: e * rowsum|A| + rounding of g + 1 terms (complex products by
    // integers are exact componentwise up to one rounding each).
    let n = cx(&a) * t + cx(&b);
    let en = e * row_sum(&a) + gamma_g(g + 2) * (row_sum(&a) * tmax + b.abs().max());
    let m = cx(&c) * t + cx(&d);
    let em = e * row_sum(&c) + gamma_g(g + 2) * (row_sum(&c) * tmax + d.abs().max());
    let (x, ex) = crate::matrix_bound::inverse(&to_nums(&m), em)?;
    let x = DMatrix::from_fn(g, g, |i, j| x[i][j].to_complex());
    let out = &n * &x;
    let mut bound: f64 = 0.0;
    for i in 0..g {
        for j in 0..g {
            let s: f64 = (0..g).map(|k| n[(i, k)].norm() * ex + en * x[(k, j)].norm() + en * ex).sum();
            let moduli: f64 = (0..g).map(|k| n[(i, k)].norm() * x[(k, j)].norm()).sum();
            bound = bound.max(s + 2.0 * gamma_g(g + 2) * moduli);
        }
    }
    let sym = (&out + out.transpose()) * C64::new(0.5, 0.0);
    Ok((sym, bound * (1.0 + 8.0 * U)))
}

pub(crate) fn square_complex(v: &Value) -> Option<DMatrix<C64>> {
    let Value::Matrix(rows) = v else { return None };
    let g = rows.len();
    rows.iter().all(|r| r.len() == g).then(|| DMatrix::from_fn(g, g, |i, j| rows[i][j].to_complex()))
}

impl Evaluator<'_> {
    pub(crate) fn symplectic_call(&mut self, span: Span, what: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let pos: Vec<_> = args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
        let (ge, te) = match (what, pos.as_slice()) {
            ("symplectic_act", [g, t, ..]) => (Some(*g), *t),
            (_, [t, ..]) if what != "symplectic_act" => (None, *t),
            _ => return Err(fail(Code::MissingArgument, span, format!("`{what}` needs its arguments"))),
        };
        let tv = self.expr(te)?;
        let t = square_complex(&tv.value)
            .ok_or_else(|| fail(Code::WrongKind, te.span, format!("`{what}` needs a square Riemann matrix")))?;
        let check = crate::linalg::riemann_check(&t, self.checked.settings.tolerance() + tv.error_bound);
        if !check.holds() {
            return Err(fail(Code::NotRiemannMatrix, te.span, format!("not a Riemann matrix: {}", check.reason())));
        }
        let gamma = match ge {
            Some(ge) => {
                let gv = self.expr(ge)?;
                let Value::Matrix(rows) = &gv.value else {
                    return Err(fail(Code::WrongKind, ge.span, "a symplectic matrix is an integer matrix"));
                };
                check_symplectic(rows, t.nrows()).map_err(|m| fail(Code::WrongKind, ge.span, m))?
            }
            None => {
                crate::theta::siegel::siegel_reduce(&t)
                    .map_err(|e| fail(Code::NotRiemannMatrix, te.span, e.to_string()))?
                    .gamma
            }
        };
        if what == "siegel_transform" {
            let rows = gamma.row_iter().map(|r| r.iter().map(|&v| Num::int(v)).collect()).collect();
            let reason = "the integer symplectic matrix [[A, B], [C, D]] of Siegel's reduction: siegel_reduced(T) = (A T + B)(C T + D)^-1".to_string();
            return Ok(Valued { value: Value::Matrix(rows), error_bound: 0.0, reason: Some(reason) });
        }
        let (m, bound) = act_bounded(&gamma, &t, tv.error_bound).map_err(|m| fail(Code::EvalFailed, span, m))?;
        Ok(Valued { value: Value::Matrix(to_nums(&m)), error_bound: bound, reason: None })
    }
}
