//! One evaluation thread per open document. It owns the document's stored statement
//! results (`kelp_evaluator::Incremental`, whose values are not thread-safe), so at most
//! one evaluation per document is in flight, and each evaluation replays what an earlier
//! version already computed.
//!
//! Superseded work: an edit sends the new version and, when the statement being computed
//! is not part of the new version (its key is gone), cancels it at once; otherwise the
//! statement finishes (its result is still wanted) and the evaluation stops before the
//! next statement to start over on the newest version.

use super::analysis::{self, StmtView};

use kelp_evaluator::{CancelToken, Incremental, Key, Mode};
use kelp_lang::check::Checked;
use std::collections::{HashMap, HashSet};
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::mpsc::{channel, Receiver, RecvTimeoutError, Sender};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

/// One version of the document to evaluate.
pub struct Job {
    pub generation: u64,
    /// The client's version number of this text.
    pub version: i32,
    pub text: Arc<str>,
    pub checked: Arc<Checked>,
    pub keys: Arc<Vec<Option<Key>>>,
}

/// What a finished (or stopped) evaluation hands back.
pub struct Done {
    pub generation: u64,
    pub version: i32,
    pub views: HashMap<Key, Arc<StmtView>>,
    /// The evaluation ran to the end (not stopped for a newer version).
    pub complete: bool,
    /// It panicked (a bug): the document shows an internal-error diagnostic until the next
    /// evaluation that does not.
    pub failed: bool,
    pub took: Duration,
    pub replayed: usize,
    pub computed: usize,
}

/// Shared between the server and the worker thread.
#[derive(Default)]
struct Shared {
    /// The newest generation sent.
    latest: AtomicU64,
    /// The statement being computed and the token that cancels it.
    running: Mutex<Option<(Key, CancelToken)>>,
}

pub struct Worker {
    tx: Sender<Job>,
    shared: Arc<Shared>,
}

/// Pause after a keystroke before evaluating: a burst of typing is one evaluation.
const DEBOUNCE: Duration = Duration::from_millis(60);

impl Worker {
    /// Starts the thread; `started` is called on it when an evaluation begins, `done` after it.
    pub fn spawn(
        stack: usize,
        done: impl Fn(Done) + Send + 'static,
        started: impl Fn(u64) + Send + 'static,
    ) -> std::io::Result<Worker> {
        let (tx, rx) = channel::<Job>();
        let shared = Arc::new(Shared::default());
        let s = shared.clone();
        std::thread::Builder::new()
            .name("kelp-eval".into())
            .stack_size(stack)
            .spawn(move || run(rx, s, done, started))?;
        Ok(Worker { tx, shared })
    }

    /// Sends a new version; cancels the statement in flight if the new version does not
    /// contain it.
    pub fn submit(&self, job: Job) {
        self.shared.latest.store(job.generation, Ordering::SeqCst);
        let wanted: HashSet<Key> = job.keys.iter().flatten().copied().collect();
        if let Some((k, token)) = self.shared.running.lock().unwrap_or_else(|e| e.into_inner()).as_ref() {
            if !wanted.contains(k) {
                token.cancel();
            }
        }
        let _ = self.tx.send(job);
    }
}

impl Drop for Worker {
    fn drop(&mut self) {
        // The document closed: stop what runs; the thread ends when the channel closes.
        self.shared.latest.store(u64::MAX, Ordering::SeqCst);
        if let Some((_, t)) = self.shared.running.lock().unwrap_or_else(|e| e.into_inner()).as_ref() {
            t.cancel();
        }
    }
}

/// The newest job available now (older ones are superseded).
fn newest(rx: &Receiver<Job>, mut job: Job) -> Job {
    while let Ok(j) = rx.try_recv() {
        job = j;
    }
    job
}

fn run(rx: Receiver<Job>, shared: Arc<Shared>, done: impl Fn(Done), started: impl Fn(u64)) {
    let mut store = Incremental::new();
    let Ok(first) = rx.recv() else { return };
    let mut pending = Some(first);
    while let Some(job) = pending.take() {
        // Debounce: wait until no newer version arrives for a moment.
        let mut job = newest(&rx, job);
        loop {
            match rx.recv_timeout(DEBOUNCE) {
                Ok(j) => job = newest(&rx, j),
                Err(RecvTimeoutError::Timeout) => break,
                Err(RecvTimeoutError::Disconnected) => return,
            }
        }
        let t0 = Instant::now();
        let cancel = CancelToken::new();
        let (generation, version) = (job.generation, job.version);
        let mut index = 0usize;
        let order = job.checked.order.clone();
        let keys = job.keys.clone();
        let mut stop_before = || {
            // Newer version waiting: stop between statements and start over on it.
            if shared.latest.load(Ordering::SeqCst) > generation {
                return true;
            }
            let key = order.get(index).and_then(|&i| keys.get(i).copied().flatten());
            index += 1;
            let mut running = shared.running.lock().unwrap_or_else(|e| e.into_inner());
            *running = key.map(|k| (k, cancel.clone()));
            false
        };
        started(generation);
        let run = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            let (e, reuse) =
                store.evaluate_keyed(&job.checked, &job.text, &job.keys, &Mode::Check, &cancel, &mut stop_before);
            (analysis::views(&job.checked, &job.keys, &e), !e.cancelled, reuse)
        }));
        *shared.running.lock().unwrap_or_else(|e| e.into_inner()) = None;
        let took = t0.elapsed();
        let result = match run {
            Ok((views, complete, reuse)) => Done {
                generation,
                version,
                views,
                complete,
                failed: false,
                took,
                replayed: reuse.replayed,
                computed: reuse.computed,
            },
            Err(_) => {
                // Whatever the store held may be half-written: start afresh.
                store = Incremental::new();
                let views = HashMap::new();
                Done { generation, version, views, complete: true, failed: true, took, replayed: 0, computed: 0 }
            }
        };
        done(result);
        // A newer version may be waiting (or arrive later): evaluate it next.
        pending = match rx.try_recv() {
            Ok(j) => Some(j),
            Err(std::sync::mpsc::TryRecvError::Empty) => rx.recv().ok(),
            Err(_) => None,
        };
    }
}
