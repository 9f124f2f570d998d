//! One open document: its text, the checked program of this version, and what the
//! evaluations so far show for it. Evaluated diagnostics never vanish on an edit: a
//! statement whose result is known for this version (same key) shows it at once; one
//! being evaluated again keeps the diagnostics it showed before, moved with the edit and
//! marked as pending, until its new result replaces them.

use super::analysis::{EvalSummary, ShownValue, StmtView};
use super::worker::Worker;
use kelp_evaluator::Key;
use kelp_lang::check::Checked;
use kelp_lang::span::LineIndex;
use kelp_lang::{check, Diagnostic, Span};
use std::collections::HashMap;
use std::sync::Arc;
use tower_lsp_server::ls_types::{self as lsp, Uri};

/// The note on a diagnostic shown from an earlier version while its statement is evaluated again.
pub const PENDING: &str = "(from before the last edit; being evaluated again)";

pub(crate) struct Doc {
    /// Which opening of the document this is (results for an earlier one are dropped).
    pub identity: u64,
    pub text: String,
    pub version: i32,
    pub index: LineIndex,
    /// The checked program of this version (parse + check run once per edit).
    pub checked: Arc<Checked>,
    /// Each statement's key for reuse (`None`: not evaluated, a static error).
    pub keys: Arc<Vec<Option<Key>>>,
    /// Bumped on every edit.
    pub generation: u64,
    /// Views of evaluated statements by key, for this and recent versions.
    pub views: HashMap<Key, Arc<StmtView>>,
    /// The evaluated diagnostics shown last, in this text's offsets (moved with edits).
    carried: Vec<Diagnostic>,
    /// This version's evaluated diagnostics: known results, and pending statements' earlier ones.
    fresh: Vec<Diagnostic>,
    stale: Vec<Diagnostic>,
    /// This version's evaluation as far as known, flattened (values and diagnostics).
    pub eval: Option<Arc<EvalSummary>>,
    /// Statements of this version whose result is not known yet.
    pub pending: usize,
    /// The generation an evaluation is running for, if any.
    pub busy: Option<u64>,
    /// The last evaluation panicked (a bug): said at the top of the file until one succeeds.
    pub failed: bool,
    pub worker: Option<Worker>,
}

/// A span after replacing `a..b` by `n` bytes: unchanged before, shifted after, and
/// clamped onto the new text where it overlapped.
fn moved(s: Span, a: usize, b: usize, n: usize) -> Span {
    let map = |x: usize, end: bool| {
        if x < a || (x == a && !end) {
            x
        } else if x >= b {
            x - b + a + n
        } else if end {
            a + n
        } else {
            a
        }
    };
    let start = map(s.start, false);
    Span::new(start, map(s.end, true).max(start))
}

impl Doc {
    pub fn new(text: String, version: i32, identity: u64) -> Doc {
        let mut d = Doc {
            identity,
            index: LineIndex::new(&text),
            text,
            version,
            checked: Arc::new(check("")),
            keys: Arc::new(vec![]),
            generation: 0,
            views: HashMap::new(),
            carried: vec![],
            fresh: vec![],
            stale: vec![],
            eval: None,
            pending: 0,
            busy: None,
            failed: false,
            worker: None,
        };
        d.recheck();
        d
    }

    /// Parse, check and key the current text (the line index follows every edit already).
    pub fn recheck(&mut self) {
        self.checked = Arc::new(check(&self.text));
        self.keys = Arc::new(kelp_evaluator::statement_keys(&self.checked, &self.text));
        self.generation += 1;
    }

    /// Applies one content change (byte range, or the whole text) and moves the shown
    /// evaluated diagnostics with it. The caller rechecks after the last change.
    pub fn edit(&mut self, range: Option<(usize, usize)>, new: &str) {
        let Some((a, b)) = range else {
            // A whole new text: the changed part is what lies between the common prefix and
            // suffix, so that diagnostics elsewhere move as with a ranged change.
            let (old, newb) = (self.text.as_bytes(), new.as_bytes());
            let mut p = old.iter().zip(newb).take_while(|(x, y)| x == y).count();
            while !self.text.is_char_boundary(p) || !new.is_char_boundary(p) {
                p -= 1;
            }
            let max_suffix = old.len().min(newb.len()) - p;
            let mut q = old.iter().rev().zip(newb.iter().rev()).take(max_suffix).take_while(|(x, y)| x == y).count();
            while !self.text.is_char_boundary(old.len() - q) || !new.is_char_boundary(newb.len() - q) {
                q -= 1;
            }
            let middle = &new[p..newb.len() - q];
            return self.edit(Some((p, old.len() - q)), middle);
        };
        let len = self.text.len();
        let (a, b) = (a.min(len), b.min(len).max(a.min(len)));
        if !(self.text.is_char_boundary(a) && self.text.is_char_boundary(b)) {
            return;
        }
        self.text.replace_range(a..b, new);
        for d in &mut self.carried {
            d.span = moved(d.span, a, b, new.len());
            for l in &mut d.labels {
                l.span = moved(l.span, a, b, new.len());
            }
        }
        // The index must follow every change: the next change's range is in its terms.
        self.index = LineIndex::new(&self.text);
    }

    /// The view of the statement defining `name`, if known for this version.
    pub fn view_of_symbol(&self, name: &str) -> Option<(&Arc<StmtView>, usize)> {
        let s = self.checked.symbol(name)?;
        let k = self.keys.get(s.stmt).copied().flatten()?;
        Some((self.views.get(&k)?, s.stmt))
    }

    pub fn value(&self, name: &str) -> Option<&ShownValue> {
        self.view_of_symbol(name)?.0.values.iter().find(|v| v.name == name)
    }

    /// Composes what this version shows from the views: known statements' results moved
    /// to where they stand now, pending statements' earlier diagnostics. Updates the
    /// carried diagnostics and the flattened summary.
    pub fn compose(&mut self) {
        let stmts = &self.checked.program.stmts;
        let (mut fresh, mut stale, mut values) = (Vec::new(), Vec::new(), Vec::new());
        let mut pending = 0;
        let mut carried = std::mem::take(&mut self.carried);
        carried.sort_by_key(|d| d.span.start);
        for &i in &self.checked.order {
            let span = stmts[i].span;
            let Some(k) = self.keys.get(i).copied().flatten() else { continue };
            match self.views.get(&k) {
                Some(v) => {
                    for d in &v.diagnostics {
                        let mut d = d.clone();
                        d.span = Span::new(d.span.start + span.start, d.span.end + span.start);
                        for l in &mut d.labels {
                            l.span = Span::new(l.span.start + span.start, l.span.end + span.start);
                        }
                        fresh.push(d);
                    }
                    values.extend(v.values.iter().cloned());
                }
                None => {
                    pending += 1;
                    let from = carried.partition_point(|d| d.span.start < span.start);
                    let end = span.end.max(span.start + 1);
                    stale.extend(carried[from..].iter().take_while(|d| d.span.start < end).cloned());
                }
            }
        }
        self.pending = pending;
        let mut all: Vec<Diagnostic> = fresh.iter().chain(&stale).cloned().collect();
        kelp_lang::diag::sort(&mut all);
        self.carried = all.clone();
        self.stale = stale;
        self.fresh = fresh;
        self.eval = Some(Arc::new(EvalSummary { diagnostics: all, values }));
    }

    /// Everything to publish: the checker's diagnostics and the evaluation's as composed;
    /// pending ones carry a note; facts about curves only when asked for.
    pub fn diagnostics(&self, uri: &Uri, facts: bool) -> Vec<lsp::Diagnostic> {
        let conv = |d: &Diagnostic| super::convert::diagnostic(&self.index, uri, d);
        let keep = |d: &&Diagnostic| facts || d.code != kelp_lang::Code::ValueInfo;
        let mut out: Vec<lsp::Diagnostic> = self.checked.diagnostics.iter().map(conv).collect();
        if self.failed {
            out.push(conv(&super::analysis::internal_error()));
        }
        out.extend(self.fresh.iter().filter(keep).map(conv));
        out.extend(self.stale.iter().filter(keep).map(|d| {
            let mut d = d.clone();
            d.notes.push(PENDING.to_string());
            conv(&d)
        }));
        out
    }
}
