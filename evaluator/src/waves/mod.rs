//! KP waves in kelp's form 3 u_yy + (u_xxx + 6 u u_x - 4 u_t)_x = 0 (conventions file):
//! theta-function waves (from explicit data or Krichever's construction), line solitons
//! and rational solutions. Each gives the Taylor series of F = log tau at a point to
//! weighted degree 6, from which u and the residual come analytically.

pub mod krichever;
pub mod rational;
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

/// u and the residual at one point, with a relative error estimate of tau there.
#[derive(Clone, Copy, Debug)]
pub struct WavePoint {
    pub kp: KpPoint,
    pub tau_relative_error: f64,
}

impl Wave {
    pub fn at(&self, x: f64, y: f64, t: f64) -> Result<WavePoint, String> {
        let (s, err, c) = match &self.kind {
            WaveKind::Theta(w) => {
                let (s, e) = w.series(x, y, t).map_err(|e| e.to_string())?;
                (s, e, w.c)
            }
            WaveKind::Soliton(w) => (w.series(x, y, t), 0.0, C64::new(0.0, 0.0)),
            WaveKind::Rational(w) => (w.series(x, y, t), 0.0, C64::new(0.0, 0.0)),
            WaveKind::Water(w) => {
                // The residual is that of kelp's form at the mapped point: the map is
                // linear, so the scaled residual is the same number.
                let (kx, ky, kt) = w.kp_point(x, y, t);
                let mut p = w.inner.at(kx, ky, kt)?;
                p.kp.u *= w.eta_scale();
                return Ok(p);
            }
        };
        let singular = || format!("tau vanishes at (x, y, t) = ({x}, {y}, {t}): u is singular there");
        let f = s.log_normalised().ok_or_else(singular)?;
        let m = s.log_majorant().ok_or_else(singular)?;
        Ok(WavePoint { kp: kp_point(&f, &m, c), tau_relative_error: err })
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
            WaveKind::Rational(_) => return self.at(x, y, t).map(|p| p.kp.u),
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
