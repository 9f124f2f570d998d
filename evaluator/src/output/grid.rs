//! u over a region's grid, evaluated in parallel (rayon) from one shared wave: every
//! tau-dependent piece (theta context, soliton terms, tau polynomial) is built once.

use crate::waves::Wave;
use num_complex::Complex64 as C64;
use rayon::prelude::*;
use std::sync::atomic::{AtomicUsize, Ordering};

/// Grid points evaluated and asked for since the process started: a front end may poll
/// them to draw a progress bar (the command line does, on a terminal).
pub static POINTS_DONE: AtomicUsize = AtomicUsize::new(0);
pub static POINTS_TOTAL: AtomicUsize = AtomicUsize::new(0);

/// u on a grid, indexed [t][y][x].
pub struct Grid {
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub t: Vec<f64>,
    pub u: Vec<C64>,
    /// Whether the values are a water wave's elevation in metres over metres and seconds.
    pub physical: bool,
}

impl Grid {
    /// Names of the axes and the value: kelp's dimensionless (x, y, t, u), or the
    /// physical (x, y in m, t in s, eta in m) of a water wave.
    pub fn names(&self) -> Names {
        if self.physical {
            Names {
                x: "x (m)",
                y: "y (m)",
                t_unit: " s",
                value: "eta (m)",
                csv: ["x_m", "y_m", "t_s", "eta_m", "eta_im_m"],
            }
        } else {
            Names { x: "x", y: "y", t_unit: "", value: "u", csv: ["x", "y", "t", "u", "u_im"] }
        }
    }

    pub fn at(&self, it: usize, iy: usize, ix: usize) -> C64 {
        self.u[(it * self.y.len() + iy) * self.x.len() + ix]
    }

    /// Whether u has a non-negligible imaginary part anywhere.
    pub fn complex(&self) -> bool {
        let top = self.u.iter().map(|v| v.norm()).fold(0.0, f64::max);
        self.u.iter().any(|v| v.im.abs() > 1e-9 * top.max(1e-300))
    }

    pub fn evaluate(wave: &Wave, x: Vec<f64>, y: Vec<f64>, t: Vec<f64>) -> Result<Grid, String> {
        let (nx, ny) = (x.len(), y.len());
        POINTS_TOTAL.fetch_add(t.len() * ny * nx, Ordering::Relaxed);
        // Workers do not see the evaluator's thread-locals: each enters the statement's scope
        // (limits and token), so checkpoints deep in `u` stop them; rayon hands the unwind on.
        let scope = crate::limits::scope();
        let u: Result<Vec<C64>, String> = (0..t.len() * ny * nx)
            .into_par_iter()
            .map_init(
                || scope.enter(),
                |_, k| {
                    let (it, rest) = (k / (ny * nx), k % (ny * nx));
                    let (iy, ix) = (rest / nx, rest % nx);
                    crate::limits::checkpoint();
                    let v = wave.u(x[ix], y[iy], t[it]);
                    POINTS_DONE.fetch_add(1, Ordering::Relaxed);
                    v
                },
            )
            .collect();
        Ok(Grid { u: u?, x, y, t, physical: wave.water().is_some() })
    }
}

pub struct Names {
    pub x: &'static str,
    pub y: &'static str,
    /// Unit after a time value (" s", or nothing).
    pub t_unit: &'static str,
    pub value: &'static str,
    /// CSV header: x, y, t, value, imaginary part of the value.
    pub csv: [&'static str; 5],
}
