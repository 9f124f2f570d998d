//! KP waves in kelp's form 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x = 0 (conventions file):
//! theta-function waves (from explicit data or Krichever's construction), line solitons
//! and rational solutions. Each gives the Taylor series of F = log tau at a point to
//! weighted degree 6, from which u and the residual come analytically.

pub mod ball;
pub mod krichever;
pub mod moments;
pub mod rational;
pub mod regular;
pub mod residual;
pub mod series;
pub mod soliton;
pub mod theta_wave;
pub mod water;

#[cfg(test)]
mod tests;

use num_complex::Complex64 as C64;
use series::{kp_point, KpPoint};

/// The KP form every number refers to.
pub const KP_FORM: &str = "3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x = 0";

#[derive(Debug)]
pub enum WaveKind {
    Theta(theta_wave::ThetaWave),
    Soliton(soliton::Soliton),
    Rational(rational::RationalWave),
    /// Another wave read as shallow water in physical units.
    Water(water::Water),
}

#[derive(Debug)]
pub struct Wave {
    pub kind: WaveKind,
    /// How it was made ("Krichever's wave of reef at (0, 1), local parameter x - x_P", ...).
    pub origin: String,
}

/// u and the residual at one point, each with a bound that holds (ball arithmetic from
/// tau's coefficients, see `ball.rs`).
#[derive(Clone, Copy, Debug)]
pub struct WavePoint {
    pub kp: KpPoint,
    /// |u - u exact| <= this.
    pub u_error: f64,
    /// |R - R exact| <= this (R = `kp.residual`).
    pub residual_error: f64,
}

/// Why a point has no value: tau shown to vanish (or not finite), or not shown nonzero.
#[derive(Clone, Debug, PartialEq)]
pub struct AtError {
    /// True when the failure is the lack of a bound, not a proof: K702.
    pub undecided: bool,
    pub message: String,
}

impl std::fmt::Display for AtError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

impl From<String> for AtError {
    fn from(message: String) -> Self {
        AtError { undecided: false, message }
    }
}

impl Wave {
    pub fn at(&self, x: f64, y: f64, t: f64) -> Result<WavePoint, AtError> {
        let (b, c) = match &self.kind {
            WaveKind::Theta(w) => (w.series_ball(x, y, t).map_err(|e| e.to_string())?, w.c),
            WaveKind::Soliton(w) => (w.series_ball(x, y, t), C64::new(0.0, 0.0)),
            WaveKind::Rational(w) => (w.series_ball(x, y, t), C64::new(0.0, 0.0)),
            WaveKind::Water(w) => {
                // The residual is that of kelp's form at the mapped point: the map is
                // linear, so the scaled residual is the same number.
                let (kx, ky, kt) = w.kp_point(x, y, t);
                let mut p = w.inner.at(kx, ky, kt)?;
                let k = w.eta_scale();
                p.kp.u *= k;
                p.u_error = ball::up(p.u_error * k.abs() + ball::U * p.kp.u.norm());
                return Ok(p);
            }
        };
        let undecided = || {
            AtError {
            undecided: true,
            message: format!(
                "tau cannot be shown nonzero at (x, y, t) = ({x}, {y}, {t}): |tau| = {:.3e} is within its error bound {:.3e}, so u has no bound there",
                b.0[0].c.norm(),
                b.0[0].r
            ),
        }
        };
        let f = b.log_normalised().ok_or_else(undecided)?;
        let (ub, rb) = ball::kp_balls(&f, c);
        if !ub.finite() || !rb.finite() {
            return Err(undecided());
        }
        // Scales (s, m) from the centres, as before: they define the relative residual.
        let centre = series::Series(b.0.iter().map(|v| v.c).collect());
        let fc = series::Series(f.0.iter().map(|v| v.c).collect());
        let m = centre.log_majorant().ok_or_else(undecided)?;
        let mut kp = kp_point(&fc, &m, c);
        kp.u = ub.c;
        kp.residual = rb.c;
        Ok(WavePoint { kp, u_error: ub.r, residual_error: rb.r })
    }

    /// u alone at a point: u = 2 (tau_xx / tau - (tau_x / tau)^2) + c from the x-jet of tau,
    /// cheaper than the full series the residual needs (for samples and pictures). For a
    /// water wave: the elevation eta in metres.
    pub fn u(&self, x: f64, y: f64, t: f64) -> Result<C64, String> {
        let (j, c) = match &self.kind {
            WaveKind::Theta(w) => (w.x_jet(x, y, t).map_err(|e| e.to_string())?, w.c),
            WaveKind::Soliton(w) => {
                let j = w.x_jet(x, y, t);
                ([j[0], j[1], j[2]].map(|v| C64::new(v, 0.0)), C64::new(0.0, 0.0))
            }
            WaveKind::Rational(_) => return self.at(x, y, t).map(|p| p.kp.u).map_err(|e| e.message),
            WaveKind::Water(w) => {
                let (kx, ky, kt) = w.kp_point(x, y, t);
                return w.inner.u(kx, ky, kt).map(|u| u * w.eta_scale());
            }
        };
        if j[0].norm() == 0.0 || !j[0].re.is_finite() {
            return Err(format!("tau vanishes at (x, y, t) = ({x}, {y}, {t}): u is singular there"));
        }
        let r1 = j[1] / j[0];
        Ok(2.0 * (j[2] / j[0] - r1 * r1) + c)
    }

    pub fn kind_name(&self) -> &'static str {
        match self.kind {
            WaveKind::Theta(_) => "theta",
            WaveKind::Soliton(_) => "soliton",
            WaveKind::Rational(_) => "rational",
            WaveKind::Water(_) => "shallow-water",
        }
    }

    /// The physical reading, if this is a water wave.
    pub fn water(&self) -> Option<&water::Water> {
        match &self.kind {
            WaveKind::Water(w) => Some(w),
            _ => None,
        }
    }
}
