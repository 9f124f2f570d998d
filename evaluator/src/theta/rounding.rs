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
//! * tables: exp(i pi X'_jj v^2): 6 pi |X'_jj| n_j^2 + 2; exp(2 pi i X'_jk v w):
//!   12 pi |X'_jk| |n_j n_k| + 2;
//! * the rounding of tau' = U^T tau U itself moves the phase pi n^T X' n by at most
//!   2 g pi ||(|U|^T |X| |U|)||_F |n|^2;
//! * powers of exp(i phi_j) by repeated products: |n_j| (e_j + 5), e_j the absolute
//!   rounding of phi_j in units of u (the caller's `phase_err`), and the common phase: its own
//!   rounding `common_err` + 2;
//! * products across the levels and at the start of a line: 3 per complex product
//!   (sqrt 5 u, Brent, Percival & Zimmermann, Math. Comp. 76 (2007)), g (g + 3) / 2 + g + 4
//!   products;
//! * moduli exp(-|w|^2): |w|^2 is a sum of squares of sums, each within 2 (g + 3) u of
//!   (|C||n + s|)^2 <= (kappa_C |w|)^2 with kappa_C = ||C||_F ||C^-1||_2;
//! * the Cholesky factor C of pi Y' is exact for pi Y' + Delta, ||Delta||_F <= u `chol_err`
//!   (Higham, *Accuracy and Stability of Numerical Algorithms*, 2nd ed., Thm 10.3, with
//!   the rounding of U^T Y U), which moves |w|^2 by at most ||Delta||_F ||C^-1||^2 |w|^2;
//! * the centre c = Y^-1 Im z solves a nearby system (residual 4 g u ||Y||_F |c|), which
//!   moves the exponent by 2 pi |m| times that, and s = U^-1 (a + c) is rounded;
//! * the innermost line is walked from its point nearest the centre outwards:
//!   t(k + 1) = t(k) rho(k), rho(k + 1) = rho(k) q, so k steps out rho carries k (dq + 3)
//!   and t carries k drho0 + k^2 / 2 (dq + 3) + 3 k, with dq = 12 pi |tau'_00| + 3 and drho0
//!   the errors of rho's first value (the step table, the cross tables at v = +-1, the
//!   modulus ratio exp(-g0^2 (2 x0 +- 1)) and one phase power); the factors are formed
//!   once per line, at its start point m: the backward walk begins with t(m) times its
//!   own first ratio (whose cross part is the conjugate of the forward one, exact, with
//!   the same bound as the tables at v = -1), so its term k points out of m is k steps
//!   from t(m) and is charged k like a forward term (`sum::Walker::line`);
//! * the sum: each line is summed recursively (L - 1 roundings, counted as L + 3 with the
//!   weight product) and the line sums are added with compensation (2 u of the total,
//!   bounded by the sum of moduli).
//!
//! The reduced coordinates are bounded by the term's own |w|: |n_j + s_j| <= alpha_j |w|
//! with alpha_j^2 = (Y'^-1)_jj / pi and |s_j| <= 1/2, so every error above is a constant
//! plus a multiple of |w|^2 (or of k, k^2 along the line); the sum accumulates
//! |term| (c1 k + c2 k^2 + c3 |w|^2) term by term, so the large central terms are charged
//! their own small errors, not the ellipsoid's worst.
//!
//! Derivative weights prod (2 pi i m.d_i)^e_i are formed from sums s_i that can cancel, so
//! their rounding is bounded absolutely: |s_i| carries at most d_i = 2 (g + 2) u (|const| +
//! sum_j |d'_ij| h_j), and prod (|s_i| + d_i)^e_i - prod |s_i|^e_i <= k d (sigma + d)^(k-1)
//! (mean value theorem; k the total order, d = max d_i, sigma = sum |s_i|) bounds the
//! weight's error (summed term by term with the term's modulus, once per total order:
//! k d sum |t| (sigma + d)^(k-1)).
//!
//! Inputs that are themselves uncertain (tau and z out of a computation, norms E and e_z,
//! see `InputErrors`) move a term's exponent by pi |m^T E m| + 2 pi |m.e_z|, split the same
//! way into a constant and a multiple of |w|^2.

use super::ThetaContext;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

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

/// Sums of moduli from one pass, with the monomial's weights: plain (`abs`), times the
/// growth per term (`grow`, see `sum::SumOutput::grow`), and the weights' own rounding.
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
    /// The part of the growth that depends on tau only (computed once per context):
    /// (shared, per |w|^2, alpha).
    pub(super) fn tau_growth(
        g: usize,
        taur: &DMatrix<C64>,
        re: &DMatrix<f64>,
        u: &DMatrix<i64>,
        yred_inv_diag: &[f64],
    ) -> (f64, f64, Vec<f64>) {
        let gf = g as f64;
        let x = taur.map(|v| v.re.abs());
        // Most errors grow with the term's reduced coordinates n_j, which the ellipsoid
        // bounds by its own |w|: |n_j + s_j| <= alpha_j |w| (alpha_j^2 = (Y'^-1)_jj / pi) and
        // |s_j| <= 1/2, so |n_j| <= alpha_j (1 + |w|^2) / 2 + 1/2 and n_j^2 <= 2 alpha_j^2
        // |w|^2 + 1/2. Each error is split into a constant and a multiple of |w|^2.
        let alpha: Vec<f64> = yred_inv_diag.iter().map(|d| (d / PI).sqrt()).collect();
        let (mut shared, mut per_w2) = (0.0, 0.0);
        let sq = |coef: f64, j: usize, shared: &mut f64, per_w2: &mut f64| {
            // coef n_j^2
            *shared += coef * 0.5;
            *per_w2 += coef * 2.0 * alpha[j] * alpha[j];
        };
        for j in 0..g {
            // tables: 6 pi |X'_jj| n_j^2 + 2, and 12 pi |X'_jk| |n_j n_k| <= 6 pi |X'_jk| (n_j^2 + n_k^2).
            sq(6.0 * PI * x[(j, j)], j, &mut shared, &mut per_w2);
            shared += 2.0;
            for k in j + 1..g {
                sq(6.0 * PI * x[(j, k)], j, &mut shared, &mut per_w2);
                sq(6.0 * PI * x[(j, k)], k, &mut shared, &mut per_w2);
                shared += 2.0;
            }
        }
        // Rounding of tau' = U^T tau U as seen by the phases: 2 g pi |n|^T |U|^T |X| |U| |n| <=
        // 2 g pi ||M||_F sum n_j^2.
        let ua = u.map(|v| v.unsigned_abs() as f64);
        let m_norm = (ua.transpose() * re.map(f64::abs) * &ua).norm();
        for j in 0..g {
            sq(2.0 * gf * PI * m_norm, j, &mut shared, &mut per_w2);
        }
        (shared, per_w2, alpha)
    }

    pub(super) fn term_growth(&self, p: &PassSizes) -> Growth {
        let g = self.g;
        let gf = g as f64;
        let (mut shared, mut per_w2) = (self.growth_shared, self.growth_w2);
        let alpha = &self.alpha;
        let x00 = self.taur[(0, 0)].re.abs();
        // Powers of the phases: |n_j| (e_j + 5), and the common phase.
        for j in 0..g {
            let c = p.phase_err[j] + 5.0;
            shared += c * (alpha[j] / 2.0 + 0.5);
            per_w2 += c * alpha[j] / 2.0;
        }
        shared += p.common_err + 2.0;
        // Products across levels; the moduli (|w|^2 as sums of squares) and the Cholesky
        // factor (both grow with |w|^2).
        shared += 3.0 * (gf * (gf + 3.0) / 2.0 + gf + 4.0) + 2.0;
        per_w2 += 2.0 * (gf + 3.0) * self.kappa_c * self.kappa_c + self.chol_err * self.cinv_norm * self.cinv_norm;
        // The centre: the residual of the Cholesky solve moves a term's exponent by
        // 2 pi |m| |Y c - y| <= 2 pi |m| 4 g ||Y||_F |c| with |m| <= kappa |w| + |c| + |a|; the
        // rounding of s = U^-1 (a + c) by 2 |w| ||C|| (g + 2) ||U^-1||_F (|a| + |c|).
        let res = 2.0 * PI * 4.0 * gf * self.y_frob * p.centre;
        shared += res * (self.kappa / 2.0 + p.centre + p.char_a);
        per_w2 += res * self.kappa / 2.0;
        let ds = self.c_frob * (gf + 2.0) * self.uinv_frob * (p.char_a + p.centre);
        shared += ds;
        per_w2 += ds;
        shared += p.log_factor_err;
        // The innermost line.
        let h = p.half;
        let g0 = self.gammas[0];
        let dq = 12.0 * PI * self.taur[(0, 0)].norm() + 3.0;
        let step = 6.0 * PI * x00 * (2.0 * h[0] + 1.0) + 2.0;
        let cross1: f64 = (1..g).map(|k| 12.0 * PI * self.taur[(0, k)].re.abs() * h[k] + 2.0).sum();
        let ratio = 3.0 * (2.0 * g0 * p.radius + 3.0 * g0 * g0) + 2.0;
        let drho0 = step + cross1 + ratio + p.phase_err[0] + 5.0 + 3.0 * gf;
        let r2 = p.radius * p.radius;
        Growth {
            shared,
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
