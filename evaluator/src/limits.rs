//! Resource limits of one evaluation (defaults, `set` in the file, `--limit` on the command
//! line) and the time budget of the statement being evaluated.
//!
//! The limits and the running statement's [`Token`] live in thread-locals set by the
//! evaluator, so deep code (exact algebra, theta sums, grids, periods) can read them without
//! threading them through every signature. Long loops call [`checkpoint`], which unwinds to
//! the statement once the time is up or the evaluation was cancelled (see [`Stop`]); code that
//! returns `Result` anyway may call [`check`]. Parallel loops take [`scope`] before they start
//! and [`Scope::enter`] it in each worker.
//!
//! The clock is read by one watchdog thread, not by every checkpoint: a checkpoint is two
//! relaxed atomic loads, cheap enough for the inner loops of resultants and lattice sums.

mod watchdog;

use std::cell::{Cell, RefCell};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;
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

/// Cancels an evaluation from another thread (a language server dropping superseded work):
/// pass it to [`crate::evaluate_cancellable`], keep a clone, call [`CancelToken::cancel`].
#[derive(Clone, Debug, Default)]
pub struct CancelToken(Arc<AtomicBool>);

impl CancelToken {
    pub fn new() -> Self {
        Self::default()
    }
    /// Asks the evaluation to stop; the running statement stops at its next checkpoint and
    /// no later statement starts.
    pub fn cancel(&self) {
        self.0.store(true, Ordering::Relaxed);
    }
    pub fn is_cancelled(&self) -> bool {
        self.0.load(Ordering::Relaxed)
    }
}

/// Why a computation was cut short: the payload [`checkpoint`] unwinds with.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Stop {
    /// The statement used up its time budget.
    OutOfTime,
    /// The evaluation's [`CancelToken`] was cancelled.
    Cancelled,
}

/// The running statement's stop conditions.
#[derive(Clone, Debug)]
pub struct Token {
    cancel: CancelToken,
    /// Set by the watchdog at the deadline; one per statement.
    out_of_time: Arc<AtomicBool>,
    deadline: Option<Instant>,
}

impl Token {
    /// A token whose clock starts now, with `budget` seconds.
    pub fn start(cancel: &CancelToken, budget: f64) -> Token {
        let deadline = Duration::try_from_secs_f64(budget).ok().and_then(|d| Instant::now().checked_add(d));
        let out_of_time = Arc::new(AtomicBool::new(false));
        if let Some(at) = deadline {
            watchdog::arm(at, &out_of_time);
        }
        Token { cancel: cancel.clone(), out_of_time, deadline }
    }

    /// Why to stop now, if at all.
    #[inline]
    pub fn stop(&self) -> Option<Stop> {
        if self.cancel.is_cancelled() {
            Some(Stop::Cancelled)
        } else if self.out_of_time.load(Ordering::Relaxed) {
            Some(Stop::OutOfTime)
        } else {
            None
        }
    }
}

thread_local! {
    static LIMITS: Cell<Limits> = Cell::new(Limits::default());
    static TOKEN: RefCell<Option<Token>> = const { RefCell::new(None) };
}

pub fn set(l: Limits) {
    LIMITS.with(|c| c.set(l));
}

pub fn current() -> Limits {
    LIMITS.with(|c| c.get())
}

/// What a worker thread needs to see of the statement: its limits and its token.
#[derive(Clone, Debug)]
pub struct Scope {
    limits: Limits,
    token: Option<Token>,
}

/// The calling thread's limits and token, to hand to worker threads.
pub fn scope() -> Scope {
    Scope { limits: current(), token: TOKEN.with(|t| t.borrow().clone()) }
}

impl Scope {
    /// Makes this scope the thread's until the guard drops (then the previous one returns).
    pub fn enter(&self) -> ScopeGuard {
        let previous = Scope { limits: current(), token: TOKEN.with(|t| t.replace(self.token.clone())) };
        set(self.limits);
        ScopeGuard(Some(previous))
    }
}

/// Restores the previous [`Scope`] on drop (also when unwinding).
pub struct ScopeGuard(Option<Scope>);

impl Drop for ScopeGuard {
    fn drop(&mut self) {
        if let Some(p) = self.0.take() {
            set(p.limits);
            TOKEN.with(|t| *t.borrow_mut() = p.token);
        }
    }
}

/// Starts the clock of a statement: until the guard drops, checkpoints on this thread stop
/// it at the current limits' time budget or when `cancel` is cancelled.
pub fn start_statement(cancel: &CancelToken) -> ScopeGuard {
    let l = current();
    Scope { limits: l, token: Some(Token::start(cancel, l.time_budget)) }.enter()
}

/// The current statement's deadline, if any.
pub fn deadline() -> Option<Instant> {
    TOKEN.with(|t| t.borrow().as_ref().and_then(|t| t.deadline))
}

/// Why the current statement must stop, if it must. The clock is read here as well, so a
/// late watchdog cannot make a finished budget look unfinished.
pub fn stop() -> Option<Stop> {
    TOKEN.with(|t| {
        let t = t.borrow();
        let t = t.as_ref()?;
        t.stop().or_else(|| t.deadline.is_some_and(|d| Instant::now() >= d).then_some(Stop::OutOfTime))
    })
}

/// Whether the current statement has used up its time (or was cancelled).
pub fn expired() -> bool {
    stop().is_some()
}

/// Why a computation stopped.
pub const OUT_OF_TIME: &str = "the statement ran out of its time budget";
pub const CANCELLED: &str = "the evaluation was cancelled";

/// `Err` once the current statement's time is up or it was cancelled.
pub fn check() -> Result<(), &'static str> {
    match stop() {
        None => Ok(()),
        Some(Stop::OutOfTime) => Err(OUT_OF_TIME),
        Some(Stop::Cancelled) => Err(CANCELLED),
    }
}

/// Unwinds to the statement (with a [`Stop`] payload, no panic message) once the statement's
/// time is up or the evaluation was cancelled; otherwise returns at once. Call it in every
/// loop that can run long. Outside a statement it never stops.
#[inline]
pub fn checkpoint() {
    let stop = TOKEN.with(|t| t.borrow().as_ref().and_then(Token::stop));
    if let Some(s) = stop {
        // A checkpoint reached from a destructor while unwinding must not start a second unwind.
        if !std::thread::panicking() {
            std::panic::resume_unwind(Box::new(s));
        }
    }
}

/// Runs `f`, turning a [`checkpoint`]'s unwind into `Err`; any other panic goes on unwinding.
pub fn catch<T>(f: impl FnOnce() -> T) -> Result<T, Stop> {
    match std::panic::catch_unwind(std::panic::AssertUnwindSafe(f)) {
        Ok(v) => Ok(v),
        Err(payload) => match payload.downcast::<Stop>() {
            Ok(s) => Err(*s),
            Err(other) => std::panic::resume_unwind(other),
        },
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

#[cfg(test)]
mod tests;
