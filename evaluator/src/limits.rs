//! Resource limits of one evaluation (defaults, `set` in the file, `--limit` on the command
//! line) and the time budget of the statement being evaluated.
//!
//! The limits live in a thread-local set by the evaluator, so deep code (theta sums, grids,
//! periods) can read them without threading them through every signature. Long loops call
//! [`check`]; parallel loops capture [`deadline`] before they start.

use std::cell::Cell;
use std::time::{Duration, Instant};

#[derive(Clone, Copy, Debug)]
pub struct Limits {
    /// Sample points of one region.
    pub max_points: usize,
    /// Lattice points of one theta evaluation (estimated before summing).
    pub max_lattice_points: f64,
    /// Degree up to which the exact curve algebra (singular points, genus) runs.
    pub max_degree: u32,
    /// Genus up to which Riemann matrices are computed.
    pub max_genus: usize,
    /// Seconds one statement may take.
    pub time_budget: f64,
}

impl Default for Limits {
    fn default() -> Self {
        Limits { max_points: 4_000_000, max_lattice_points: 2.0e7, max_degree: 12, max_genus: 50, time_budget: 120.0 }
    }
}

thread_local! {
    static CURRENT: Cell<(Limits, Option<Instant>)> = Cell::new((Limits::default(), None));
}

pub fn set(l: Limits) {
    CURRENT.with(|c| c.set((l, None)));
}

pub fn current() -> Limits {
    CURRENT.with(|c| c.get().0)
}

/// Starts the clock of a statement.
pub fn start_statement() {
    CURRENT.with(|c| {
        let (l, _) = c.get();
        c.set((l, Instant::now().checked_add(Duration::from_secs_f64(l.time_budget))));
    });
}

/// The current statement's deadline, if any.
pub fn deadline() -> Option<Instant> {
    CURRENT.with(|c| c.get().1)
}

/// Whether the current statement has used up its time.
pub fn expired() -> bool {
    deadline().is_some_and(|d| Instant::now() >= d)
}

/// Why a computation stopped.
pub const OUT_OF_TIME: &str = "the statement ran out of its time budget";

/// `Err` once the current statement's time is up.
pub fn check() -> Result<(), &'static str> {
    if expired() {
        Err(OUT_OF_TIME)
    } else {
        Ok(())
    }
}

/// The limits a file's settings (and command-line overrides applied to them) ask for.
pub fn from_settings(s: &kelp_lang::check::Settings) -> Limits {
    Limits {
        max_points: s.get("max_points") as usize,
        max_lattice_points: s.get("max_lattice_points"),
        max_degree: s.get("max_degree") as u32,
        max_genus: s.get("max_genus") as usize,
        time_budget: s.get("time_budget"),
    }
}
