//! The rounding bound of a theta sum: how far the floating-point sum can be from the exact
//! sum of the same (truncated) series, for the matrix and z as given in binary64.
//!
//! Every term is a product of factors computed in floating point, so its relative error
//! is at most u G with u = 2^-53 and G the sum of the factors' own relative errors (units
//! of u, first order; the final bound uses exp(1.01 u G) - 1, valid to all orders while
//! u G is small). With X' = Re tau', h_j the half-widths of the enumerated box, L the
//! longest innermost line (standard error model fl(a op b) = (a op b)(1 + d), |d| <= u;
//! an argument a computed by k operations carries k u |a|; exp(i a) then adds 2u):
//!
//! * tables: exp(i pi X'_jj v^2) (|v| <= h_j): 6 pi |X'_jj| h_j^2 + 2; exp(2 pi i X'_jk v w):
//!   12 pi |X'_jk| h_j h_k + 2;
//! * the rounding of tau' = U^T tau U itself moves the phase pi n^T X' n by at most
//!   2 g pi h^T |U|^T |X| |U| h;
//! * powers of exp(i phi_j) by repeated products: h_j (2 e_j + 5), e_j the absolute
//!   rounding of phi_j in units of u (the caller's `phase_err`), and the common phase: its own
//!   rounding `common_err` + 2;
//! * products across the levels and at the start of a line: 3 per complex product
//!   (sqrt 5 u, Brent, Percival & Zimmermann, Math. Comp. 76 (2007)), g (g + 3) / 2 + g + 4
//!   products;
//! * moduli exp(-|w|^2): |w|^2 is a sum of squares of sums, each within 2 (g + 3) u of
//!   (|C||n + s|)^2 <= (kappa_C R)^2 with kappa_C = ||C||_F ||C^-1||_2;
//! * the Cholesky factor C of pi Y' is exact for pi Y' + Delta, ||Delta||_F <= u `chol_err`
//!   (Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., Thm 10.3, with
//!   the rounding of U^T Y U), which moves |w|^2 by at most ||Delta||_F ||C^-1||^2 R^2;
//! * the innermost line: t(v + 1) = t(v) rho(v), rho(v + 1) = rho(v) q, so after v steps
//!   rho carries v (dq + 3) and t carries v drho0 + v^2 / 2 (dq + 3) + 3 v, with dq =
//!   12 pi |tau'_00| + 3 and drho0 the errors of rho's first value (the step table, the
//!   cross tables at v = 1, the modulus ratio exp(-g0^2 (2 x0 + 1)) and one phase power);
//! * the sum: each line is summed recursively (L - 1 roundings, counted as L + 3 with the
//!   weight product) and the line sums are added with compensation (2 u of the total,
//!   bounded by the sum of moduli).
//!
//! Derivative weights prod (2 pi i m.d_i)^e_i are formed from sums that can cancel, so
//! their rounding is bounded absolutely: each factor s has |s| <= S_i (the ellipsoid's
//! bound on |2 pi m.d_i|) and an absolute error of (g + 2) u S_i, so a weight of total
//! order k is off by at most k (g + 2) u prod S_i^e_i (first order); times the sum of
//! the terms' moduli.

use super::ThetaContext;

/// A term's relative rounding in units of u: `shared` + `per_step` k + `per_step2` k^2
/// for the term k steps into its line (k < `max_line`).
pub(super) struct Growth {
    pub shared: f64,
    /// Per unit of the term's |w|^2 (the moduli and the Cholesky factor), and the largest |w|^2.
    pub per_w2: f64,
    pub max_w2: f64,
    pub per_step: f64,
    pub per_step2: f64,
    pub max_line: f64,
}

/// Sums of moduli from one pass: with the monomial's weights (`abs`), without (`abs0`),
/// and with weights times the growth per term (`grow`, see `sum::SumOutput::grow`).
pub(super) struct TermSums {
    pub abs: f64,
    pub grow: f64,
    /// Sum of |term| times the bound of its weight's rounding (0 without derivatives).
    pub weight_err: f64,
}
use std::f64::consts::PI;

const U: f64 = f64::EPSILON / 2.0;

/// What the bound needs from one pass.
pub(super) struct PassSizes<'a> {
    /// Half-widths of the enumerated box, per reduced coordinate.
    pub half: &'a [f64],
    pub radius: f64,
    /// Absolute rounding of each reduced phase phi_j, in units of u (largest over the z's).
    pub phase_err: &'a [f64],
    /// Absolute rounding of the common phase, in units of u.
    pub common_err: f64,
    /// |centre| = |Y^-1 Im z| and |a'|.
    pub centre: f64,
    pub char_a: f64,
    /// Absolute rounding of the exponent pi y^T Y^-1 y taken out as `log_factor`, in units of u.
    pub log_factor_err: f64,
}

impl ThetaContext {
    /// The relative rounding of one term, in units of u: a part shared by every term and,
    /// for the innermost line's recurrence, coefficients (c1, c2) so that the term k steps
    /// into its line carries at most c1 k + c2 k^2 more.
    pub(super) fn term_growth(&self, p: &PassSizes) -> Growth {
        let g = self.g;
        let h = p.half;
        let x = self.taur.map(|v| v.re.abs());
        let mut tables = 0.0;
        for j in 0..g {
            tables += 6.0 * PI * x[(j, j)] * h[j] * h[j] + 2.0;
            for k in j + 1..g {
                tables += 12.0 * PI * x[(j, k)] * h[j] * h[k] + 2.0;
            }
        }
        // Rounding of tau' = U^T tau U as seen by the phases.
        let uh: Vec<f64> = (0..g).map(|i| (0..g).map(|j| self.u[(i, j)].unsigned_abs() as f64 * h[j]).sum()).collect();
        let xabs = self.re.map(f64::abs);
        let mut tau_round = 0.0;
        for i in 0..g {
            for j in 0..g {
                tau_round += uh[i] * xabs[(i, j)] * uh[j];
            }
        }
        tau_round *= 2.0 * g as f64 * PI;
        let powers: f64 = (0..g).map(|j| h[j] * (2.0 * p.phase_err[j] + 5.0)).sum::<f64>() + p.common_err + 2.0;
        let gf = g as f64;
        let products = 3.0 * (gf * (gf + 3.0) / 2.0 + gf + 4.0);
        let r2 = p.radius * p.radius;
        // Both grow with the term's own |w|^2 (at most R^2).
        let per_w2 = 2.0 * (gf + 3.0) * self.kappa_c * self.kappa_c + self.chol_err * self.cinv_norm * self.cinv_norm;
        let moduli = 2.0;
        // The centre: the residual of the Cholesky solve moves a term's exponent by
        // 2 pi |m| |Y c - y| <= 2 pi (kappa R + |c| + |a|) 4 g ||Y||_F |c|; the rounding of
        // s = U^-1 (a + c) by 2 R ||C|| (g + 2) ||U^-1||_F (|a| + |c|).
        let m_max = self.kappa * p.radius + p.centre + p.char_a;
        let centre = 2.0 * PI * m_max * 4.0 * gf * self.y_frob * p.centre
            + 2.0 * p.radius * self.c_frob * (gf + 2.0) * self.uinv_frob * (p.char_a + p.centre);
        // The innermost line.
        let g0 = self.gammas[0];
        let dq = 12.0 * PI * self.taur[(0, 0)].norm() + 3.0;
        let step = 6.0 * PI * x[(0, 0)] * (2.0 * h[0] + 1.0) + 2.0;
        let cross1: f64 = (1..g).map(|k| 12.0 * PI * x[(0, k)] * h[k] + 2.0).sum();
        let ratio = 3.0 * (2.0 * g0 * p.radius + 3.0 * g0 * g0) + 2.0;
        let drho0 = step + cross1 + ratio + 2.0 * p.phase_err[0] + 5.0 + 3.0 * gf;
        Growth {
            shared: tables + tau_round + powers + products + moduli + centre + p.log_factor_err,
            per_w2,
            max_w2: r2 * (1.0 + 1e-6),
            per_step: drho0 + 3.0,
            per_step2: (dq + 3.0) / 2.0,
            max_line: 0.0,
        }
    }

    /// The rounding bound of one monomial's sum, from the pass's sums of moduli and the
    /// growth coefficients.
    pub(super) fn rounding_bound(&self, sums: &TermSums, growth: &Growth, mono: &[u32]) -> f64 {
        let abs = sums.abs;
        let order: u32 = mono.iter().sum();
        // The weight's own products (3u each, at most `order` of them) and the summation
        // along the longest line.
        let shared = growth.shared + 3.0 * order as f64 + growth.max_line + 3.0;
        // Every term's own step k along its line and |w|^2: sum |t| |weight| (shared + c1 k +
        // c2 k^2 + c3 |w|^2), first order, made safe for every order by the largest term's factor.
        let l = growth.max_line;
        let worst = shared + growth.per_step * l + growth.per_step2 * l * l + growth.per_w2 * growth.max_w2;
        let relative = U * (shared * abs + sums.grow) * (1.01 * U * worst).exp() * 1.01 + 2.0 * U * abs;
        let weights = 1.01 * sums.weight_err;
        (relative + weights) * (1.0 + 8.0 * U)
    }
}
