//! u over a region's grid, evaluated in parallel (rayon) from one shared wave: every
//! tau-dependent piece (theta context, soliton terms, tau polynomial) is built once.

use crate::waves::Wave;
use num_complex::Complex64 as C64;
use rayon::prelude::*;

/// u on a grid, indexed [t][y][x].
pub struct Grid {
    pub x: Vec<f64>,
    pub y: Vec<f64>,
    pub t: Vec<f64>,
    pub u: Vec<C64>,
}

impl Grid {
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
        let u: Result<Vec<C64>, String> = (0..t.len() * ny * nx)
            .into_par_iter()
            .map(|k| {
                let (it, rest) = (k / (ny * nx), k % (ny * nx));
                let (iy, ix) = (rest / nx, rest % nx);
                wave.u(x[ix], y[iy], t[it])
            })
            .collect();
        Ok(Grid { u: u?, x, y, t })
    }
}
