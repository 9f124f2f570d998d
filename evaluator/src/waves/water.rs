//! A KP wave read as shallow water: surface elevation eta in metres over x, y in metres and
//! t in seconds.
//!
//! The dimensional KP-II equation for the elevation eta in still depth h, with c0 = sqrt(g h)
//! and surface tension neglected (Ablowitz & Segur, J. Fluid Mech. 92 (1979)), is
//!
//!   d/dx [eta_t + c0 eta_x + (3 c0 / 2h) eta eta_x + (c0 h^2 / 6) eta_xxx] + (c0 / 2) eta_yy = 0.
//!
//! Put eta = A u, x - c0 t = L xi, y = M zeta, t = T s. Multiplying by 6 L^4 / (A c0 h^2) gives
//! (6 L^3 / (c0 h^2 T)) u_s + (9 A L^2 / h^3) u u_xi + u_xixixi under d/dxi, plus
//! (3 L^4 / (h^2 M^2)) u_zetazeta; matching kelp's form 3 u_zz + (u_xxx + 6 u u_x - 4 u_s)_x = 0
//! needs A = 2 h^3 / (3 L^2), M = L^2 / h, T = -3 L^3 / (2 c0 h^2). The one free scale is
//! the amplitude parameter eps = A / h: L = h sqrt(2 / (3 eps)), M = 2 h / (3 eps),
//! T = -(3 h / (2 c0)) (2 / (3 eps))^(3/2) (negative: kelp's t runs against physical time).
//! The tests check the result against the classical KdV solitary wave and its oblique
//! KP-II form, not against this derivation.

use super::Wave;
use std::sync::Arc;

/// What every physical output and hover says about the model.
pub const CAUTION: &str = "KP is a weakly nonlinear, weakly dispersive, nearly one-directional model of long waves over a flat bottom (amplitude/depth and (depth/wavelength)^2 small and of the same order); it is not for coastal engineering or safety decisions: defer to local codes and licensed practice";

/// Above this amplitude-to-depth ratio the weakly nonlinear assumption is clearly strained
/// (common practice, no source: the KdV family is used up to a few tenths).
pub const MAX_AMPLITUDE_RATIO: f64 = 0.3;

#[derive(Debug)]
pub struct Water {
    pub inner: Arc<Wave>,
    /// Still-water depth h, metres.
    pub depth: f64,
    /// Gravitational acceleration g, m/s^2.
    pub gravity: f64,
    /// Amplitude parameter eps: eta = eps h u.
    pub epsilon: f64,
    /// Long-wave speed c0 = sqrt(g h), m/s.
    pub c0: f64,
    /// Scales of xi, zeta and s (metres, metres, seconds; `time` is negative).
    pub length: f64,
    pub width: f64,
    pub time: f64,
}

impl Water {
    pub fn new(inner: Arc<Wave>, depth: f64, gravity: f64, epsilon: f64) -> Result<Water, String> {
        for (v, what) in [(depth, "the depth"), (gravity, "gravity"), (epsilon, "epsilon")] {
            if !(v.is_finite() && v > 0.0) {
                return Err(format!("{what} must be a positive number"));
            }
        }
        if matches!(inner.kind, super::WaveKind::Water(_)) {
            return Err("this wave is already in physical units".into());
        }
        let c0 = (gravity * depth).sqrt();
        let r = (2.0 / (3.0 * epsilon)).sqrt();
        Ok(Water {
            inner,
            depth,
            gravity,
            epsilon,
            c0,
            length: depth * r,
            width: 2.0 * depth / (3.0 * epsilon),
            time: -(3.0 * depth / (2.0 * c0)) * r * r * r,
        })
    }

    /// kelp's (x, y, t) of the physical point (metres, metres, seconds).
    pub fn kp_point(&self, x: f64, y: f64, t: f64) -> (f64, f64, f64) {
        ((x - self.c0 * t) / self.length, y / self.width, t / self.time)
    }

    /// eta = this * u, metres.
    pub fn eta_scale(&self) -> f64 {
        self.epsilon * self.depth
    }

    pub fn describe(&self) -> String {
        format!(
            "surface elevation eta = {} u (metres) at depth h = {} m, g = {} m/s^2, c0 = sqrt(g h) = {:.4} m/s, eps = {}: \
             kelp's x = (x_m - c0 t_s) / {:.4}, y = y_m / {:.4}, t = t_s / ({:.4}); dimensional KP-II of Ablowitz & Segur (1979)",
            crate::num::fmt_f64(self.eta_scale()),
            crate::num::fmt_f64(self.depth),
            crate::num::fmt_f64(self.gravity),
            self.c0,
            crate::num::fmt_f64(self.epsilon),
            self.length,
            self.width,
            self.time
        )
    }
}
