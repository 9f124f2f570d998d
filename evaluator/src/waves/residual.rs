//! What `kp_residual` states about a region: the largest relative residual and the largest
//! absolute one, each with where it occurs and the scales there.
//!
//! At a point, R = 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x is the sum of five terms; s is the
//! largest of their moduli as computed and m the largest computed from the moduli of log
//! tau's Taylor coefficients (`KpPoint::size`, m >= s). The value is max |R| / m over the
//! points: rounding in R is relative to m, so the bound holds also where the wave is flat
//! (there s is itself at rounding level and |R| / s is noise of order 1). Dividing by the
//! region's largest term instead (as kelp once did) let one point near a pole, where the
//! terms are huge, hide a large residual at every other point.

use super::WavePoint;

/// One point's residual, absolute and relative, and where.
#[derive(Clone, Copy, Debug, Default)]
pub struct ResidualAt {
    pub at: (f64, f64, f64),
    pub absolute: f64,
    /// The largest of the five terms as computed (s).
    pub scale: f64,
    /// Their size before cancellation (m >= s).
    pub size: f64,
}

impl ResidualAt {
    pub fn relative(&self) -> f64 {
        if self.size > 0.0 {
            self.absolute / self.size
        } else {
            // Every term is 0, so R (their sum) is 0 too.
            0.0
        }
    }
}

/// The running summary over a region's points.
#[derive(Clone, Copy, Debug, Default)]
pub struct ResidualScan {
    /// The point with the largest |R|.
    pub worst_absolute: ResidualAt,
    /// The point with the largest |R| / m.
    pub worst_relative: ResidualAt,
    /// The largest bound on | |R| / m - |R exact| / m | over the points (m as computed:
    /// it defines the quotient); |max_i a_i - max_i b_i| <= max_i |a_i - b_i|.
    pub bound: f64,
    pub points: usize,
}

impl ResidualScan {
    pub fn add(&mut self, (x, y, t): (f64, f64, f64), p: &WavePoint) {
        let here = ResidualAt { at: (x, y, t), absolute: p.kp.residual.norm(), scale: p.kp.scale, size: p.kp.size };
        if self.points == 0 || here.absolute > self.worst_absolute.absolute {
            self.worst_absolute = here;
        }
        if self.points == 0 || here.relative() > self.worst_relative.relative() {
            self.worst_relative = here;
        }
        let b = if here.size > 0.0 {
            // R's ball over m, and the rounding of |R| and of the quotient.
            p.residual_error / here.size * (1.0 + 4.0 * f64::EPSILON) + 2.0 * f64::EPSILON * here.relative()
        } else if p.residual_error > 0.0 {
            // Every computed term is 0: the quotient is 0 by definition, the exact one unknown.
            f64::INFINITY
        } else {
            0.0
        };
        self.bound = self.bound.max(b);
        self.points += 1;
    }

    /// The value `kp_residual` returns: the largest relative residual.
    pub fn value(&self) -> f64 {
        self.worst_relative.relative()
    }

    /// Its error bound: R's ball radius over m at each point (ball arithmetic from tau's
    /// coefficients, `ball.rs`), the largest over the points.
    pub fn error_bound(&self) -> f64 {
        self.bound
    }

    /// Both scales, stated: the hover text, the claim message and the JSON report's reason.
    pub fn describe(&self) -> String {
        let (a, r) = (&self.worst_absolute, &self.worst_relative);
        format!(
            "largest relative residual |R| / m = {:.2e} at (x, y, t) = {} (there |R| = {:.2e}, m = {:.3e}, s = {:.3e}); \
             largest absolute residual |R| = {:.2e} at {} (there m = {:.3e}, s = {:.3e}); over {} points. \
             R = 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x; s = the largest of |3 u_yy|, |u_xxxx|, |6 u_x^2|, |6 u u_xx|, |4 u_xt| \
             at the point; m = the same terms from the moduli of log tau's Taylor coefficients (m >= s; rounding is relative to m)",
            r.relative(),
            show_point(r.at),
            r.absolute,
            r.size,
            r.scale,
            a.absolute,
            show_point(a.at),
            a.size,
            a.scale,
            self.points
        )
    }
}

fn show_point((x, y, t): (f64, f64, f64)) -> String {
    use crate::num::fmt_f64;
    format!("({}, {}, {})", fmt_f64(x), fmt_f64(y), fmt_f64(t))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::waves::series::KpPoint;
    use num_complex::Complex64 as C64;

    fn point(residual: f64, scale: f64, size: f64) -> WavePoint {
        WavePoint {
            kp: KpPoint { u: C64::new(0.0, 0.0), residual: C64::new(residual, 0.0), scale, size },
            u_error: 0.0,
            residual_error: residual * 1e-10,
        }
    }

    // A point near a pole (terms 1e12, residual 0) must not hide a residual of 1e-3 of the
    // terms at another point: the old quotient by the region's largest term gave 1e-15 here
    // (arithmetic; common practice, no source).
    #[test]
    fn a_near_pole_does_not_hide_a_residual_elsewhere() {
        let mut scan = ResidualScan::default();
        scan.add((0.0, 0.0, 0.0), &point(0.0, 1e12, 1e12));
        scan.add((1.0, 0.0, 0.0), &point(1e-3, 1.0, 1.0));
        assert_eq!(scan.value(), 1e-3);
        assert_eq!(scan.worst_relative.at, (1.0, 0.0, 0.0));
        assert_eq!(scan.worst_absolute.absolute, 1e-3);
        // The bound is the largest radius over m: 1e-13 at the second point (arithmetic).
        assert!((scan.error_bound() - 1e-13).abs() < 1e-18, "{}", scan.error_bound());
        let why = scan.describe();
        assert!(why.contains("|R| / m = 1.00e-3") && why.contains("over 2 points"), "{why}");
    }

    // Where every term is 0 the residual (their sum) is 0.
    #[test]
    fn a_flat_point_has_residual_zero() {
        let mut scan = ResidualScan::default();
        scan.add((0.0, 0.0, 0.0), &point(0.0, 0.0, 0.0));
        assert_eq!(scan.value(), 0.0);
    }
}
