//! A small process-wide memo: an editor re-evaluates the whole file on every edit, and
//! results that depend only on an equation (singular points, periods) are computed once.

use std::collections::HashMap;
use std::hash::Hash;
use std::sync::Mutex;

/// Entries kept before the memo starts over (a few dozen curves per session at most).
const CAPACITY: usize = 64;

pub struct Memo<K, V>(Mutex<HashMap<K, V>>);

impl<K: Eq + Hash, V: Clone> Memo<K, V> {
    pub fn new() -> Self {
        Memo(Mutex::new(HashMap::new()))
    }

    /// The stored value for `key`, or `compute()` stored and returned. The lock is not
    /// held while computing, so two threads may compute the same value once each.
    pub fn get_or(&self, key: K, compute: impl FnOnce() -> V) -> V {
        self.get_or_keep(key, compute, |_| true)
    }

    /// As [`Memo::get_or`], storing the value only when `keep` says so (a computation cut
    /// short by the time budget must not stand in for the real result later).
    pub fn get_or_keep(&self, key: K, compute: impl FnOnce() -> V, keep: impl FnOnce(&V) -> bool) -> V {
        if let Some(hit) = self.0.lock().ok().and_then(|g| g.get(&key).cloned()) {
            return hit;
        }
        let value = compute();
        if !keep(&value) {
            return value;
        }
        if let Ok(mut g) = self.0.lock() {
            if g.len() >= CAPACITY {
                g.clear();
            }
            g.insert(key, value.clone());
        }
        value
    }
}

impl<K: Eq + Hash, V: Clone> Default for Memo<K, V> {
    fn default() -> Self {
        Self::new()
    }
}
