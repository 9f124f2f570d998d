//! Tests on a Riemann matrix through its even theta constants: `even_thetas(T)` and
//! `hyperelliptic(T)`.
//!
//! A hyperelliptic Riemann matrix of genus g has exactly
//! N(g) = 2^(g-1) (2^g + 1) - binom(2g + 2, g + 1) / 2 vanishing even theta constants
//! (Mumford, *Tata Lectures on Theta II*, ch. IIIa, section 9). A value is never proved to be
//! zero numerically; what the bounds prove is that a constant is *not* zero (|value| >
//! bound). So with Z the number of constants within their bound of zero, the true number
//! of vanishing ones is at most Z, and:
//! - g >= 3: Z < N(g) proves "not hyperelliptic"; otherwise the claim is undecided (K702),
//!   and the message says whether the count is consistent with a hyperelliptic matrix.
//! - g = 2: N = 0; when all ten are proved nonzero the matrix is indecomposable, hence the
//!   matrix of a smooth genus-2 curve, and every such curve is hyperelliptic (Mumford, Tata
//!   II, IIIa; the Torelli map in genus 2). A constant within its bound of zero leaves it
//!   undecided (a product of elliptic curves has one vanishing).
//! - g = 1: every genus-1 Riemann matrix is the matrix of an elliptic curve, a double cover
//!   of the line: true.

use crate::eval::{fail, Evaluator, Fail};
use crate::num::Num;
use crate::periods::fingerprint::even_characteristics;
use crate::value::{Value, Valued};
use kelp_lang::ast::Arg;
use kelp_lang::{Code, Span};
use num_complex::Complex64 as C64;

/// N(g): the number of vanishing even theta constants of a hyperelliptic matrix.
pub fn hyperelliptic_vanishing(g: usize) -> u64 {
    let binom = |n: u64, k: u64| (0..k).fold(1u64, |acc, i| acc * (n - i) / (i + 1));
    let g64 = g as u64;
    (1u64 << (g64 - 1)) * ((1u64 << g64) + 1) - binom(2 * g64 + 2, g64 + 1) / 2
}

impl Evaluator<'_> {
    /// The genus and the even theta constants of the matrix argument, each with its bound.
    pub(crate) fn even_constants(
        &mut self,
        span: Span,
        what: &str,
        args: &[Arg],
    ) -> Result<(usize, Vec<(C64, f64)>), Fail> {
        let Some(Arg::Positional(e)) = args.first() else {
            return Err(fail(Code::MissingArgument, span, format!("`{what}` needs a Riemann matrix")));
        };
        let v = self.expr(e)?;
        let Value::Matrix(rows) = &v.value else {
            return Err(fail(Code::WrongKind, e.span, format!("`{what}` needs a square matrix")));
        };
        let g = rows.len();
        if rows.iter().any(|r| r.len() != g) {
            return Err(fail(Code::ShapeMismatch, e.span, format!("`{what}` needs a square matrix")));
        }
        if g > 6 {
            return Err(fail(
                Code::NotSupported,
                e.span,
                format!(
                    "`{what}` is computed up to genus 6 ({} even characteristics in genus {g})",
                    (1u64 << (g - 1)) * ((1u64 << g) + 1)
                ),
            ));
        }
        let t = nalgebra::DMatrix::from_fn(g, g, |i, j| rows[i][j].to_complex());
        let out = self.theta_constants(&t, v.error_bound, e.span, span)?;
        Ok((g, out))
    }

    /// The even theta constants of T (error bound `err`), each with its bound.
    pub(crate) fn theta_constants(
        &mut self,
        t: &nalgebra::DMatrix<C64>,
        err: f64,
        tspan: Span,
        span: Span,
    ) -> Result<Vec<(C64, f64)>, Fail> {
        let zero = vec![C64::new(0.0, 0.0); t.nrows()];
        let mut out = Vec::new();
        for ch in even_characteristics(t.nrows()) {
            crate::limits::checkpoint();
            let r = self.theta_bounded(t, err, &zero, 0.0, Some(&ch), &[], tspan, span)?;
            let Value::Num(n) = r.value else { unreachable!("theta is a number") };
            out.push((n.to_complex(), r.error_bound));
        }
        Ok(out)
    }

    pub(crate) fn jacobian_call(&mut self, span: Span, what: &str, args: &[Arg]) -> Result<Valued, Fail> {
        let (genus, consts) = self.even_constants(span, what, args)?;
        if what == "even_thetas" {
            let bound = consts.iter().map(|c| c.1).fold(0.0, f64::max);
            let value = Value::Vector(consts.iter().map(|c| Num::Complex(c.0)).collect());
            let reason =
                format!("{} even theta constants, characteristics in binary order (a in the low bits)", consts.len());
            return Ok(Valued { value, error_bound: bound, reason: Some(reason) });
        }
        if what == "schottky_value" {
            return Ok(schottky(genus, &consts));
        }
        let near_zero = consts.iter().filter(|(v, e)| v.norm() <= *e).count() as u64;
        let n = hyperelliptic_vanishing(genus);
        let total = consts.len();
        let proved_nonzero = total as u64 - near_zero;
        let holds = |b: bool, why: String| Ok(Valued { value: Value::Bool(b), error_bound: 0.0, reason: Some(why) });
        match genus {
            1 => holds(true, "every genus-1 Riemann matrix is that of an elliptic curve".into()),
            2 if near_zero == 0 => holds(
                true,
                "all 10 even theta constants are proved nonzero: the matrix of a smooth genus-2 curve, which is hyperelliptic".into(),
            ),
            _ if near_zero < n => holds(
                false,
                format!(
                    "{proved_nonzero} of {total} even theta constants are proved nonzero, so at most {near_zero} vanish; a hyperelliptic matrix of genus {genus} has {n} vanishing"
                ),
            ),
            _ => Err(fail(
                Code::ClaimUndecided,
                span,
                format!(
                    "{near_zero} of {total} even theta constants are zero within their bounds ({}); a hyperelliptic matrix of genus {genus} has exactly {n} vanishing, and a value is never proved zero",
                    if near_zero == n { "consistent with a hyperelliptic matrix" } else { "more than a hyperelliptic matrix has" }
                ),
            )),
        }
    }
}

/// |J| / (2^g sum |theta_m|^16) with J = 2^g sum theta_m^16 - (sum theta_m^8)^2 over the
/// even characteristics m: the difference of the theta series of the lattices D16+ and
/// E8 + E8 in 2^-g scale (each lattice's theta series is 2^-g times the sum of the
/// theta_m^8, resp. theta_m^16, from memory), which vanishes identically in genus 1 to 3 and
/// in genus 4 is Igusa's form whose zero set is the closure of the Jacobian locus (Igusa,
/// Amer. J. Math. 103, 1981). Under Sp(2g, Z) both J and the denominator take the factor
/// |det(C T + D)|^8, so the quotient is unchanged (scale-free). Bound: each power's
/// deviation from the constants' bounds, (|t| + e)^k - |t|^k, through the sums and the
/// square, plus the rounding of about 2N + 8 operations per term; then the quotient's
/// interval.
fn schottky(genus: usize, consts: &[(C64, f64)]) -> Valued {
    let u = f64::EPSILON;
    let scale = (1u64 << genus) as f64;
    let n = consts.len() as f64;
    let (mut s8, mut s16) = (C64::new(0.0, 0.0), C64::new(0.0, 0.0));
    let (mut e8, mut e16, mut d) = (0.0, 0.0, 0.0);
    let (mut m8, mut m16) = (0.0, 0.0);
    for (t, e) in consts {
        let (a, b) = (t.norm(), *e);
        let p8 = t.powi(8);
        s8 += p8;
        s16 += p8 * p8;
        e8 += (a + b).powi(8) - a.powi(8);
        e16 += (a + b).powi(16) - a.powi(16);
        m8 += a.powi(8);
        m16 += a.powi(16);
        d += a.powi(16);
    }
    let round = (2.0 * n + 40.0) * u;
    let e8 = e8 + round * m8;
    let e16 = e16 + round * m16;
    let j = s16 * scale - s8 * s8;
    let ej = scale * e16 + (s8.norm() + e8).powi(2) - s8.norm().powi(2) + round * (scale * m16 + m8 * m8);
    let den = scale * d;
    let (den_lo, den_hi) = (scale * (den / scale - e16).max(0.0), den + scale * e16);
    let v = j.norm() / den;
    let (lo, hi) =
        ((j.norm() - ej).max(0.0) / den_hi, if den_lo > 0.0 { (j.norm() + ej) / den_lo } else { f64::INFINITY });
    let bound = ((v - lo).max(hi - v) * (1.0 + 8.0 * u)).min(f64::MAX);
    let reason = format!(
        "|2^g sum theta^16 - (sum theta^8)^2| / (2^g sum |theta|^16) over {} even constants: 0 on the closure of the Jacobian locus in genus 4, identically 0 below; error <= {bound:.1e}",
        consts.len()
    );
    Valued { value: Value::Num(Num::Real(v)), error_bound: bound, reason: Some(reason) }
}

#[cfg(test)]
mod tests {
    #[test]
    fn the_vanishing_count_matches_the_classical_table() {
        // N(g) = 2^(g-1)(2^g + 1) - binom(2g+2, g+1)/2: 0, 0, 1, 10, 66 (Mumford, Tata II, IIIa;
        // the values for g = 3, 4 from memory, checked by the formula by hand).
        let n: Vec<u64> = (1..=5).map(super::hyperelliptic_vanishing).collect();
        assert_eq!(n, vec![0, 0, 1, 10, 66]);
    }
}
