//! Per-statement evaluation with reuse across versions of a file.
//!
//! Each evaluated statement has a key: a hash of the file's settings, the statement's own
//! text and the keys of the statements that define the names it uses. A statement whose key
//! is unchanged since an earlier evaluation has the same result, so that result (its value,
//! diagnostics, claim outcomes) is replayed, moved to where the statement now stands,
//! instead of computed. An edit therefore re-evaluates only the statements it touched and
//! those that depend on them. `kelp check` runs the same loop with an empty store.
//!
//! Results are stored with spans relative to the statement's start; a result with a span
//! outside its statement (none is known, but it would not move correctly) is not stored.
//! Outputs (`sample`, `plot` in run mode) have effects and are never replayed; results cut
//! short by cancellation are never stored.

use crate::eval::{Evaluation, Evaluator, Expectation, Mode, NamedValue};
use crate::limits::{CancelToken, Stop};
use crate::value::Value;
use kelp_lang::ast::StmtKind;
use kelp_lang::check::Checked;
use kelp_lang::{Diagnostic, Span};
use std::collections::HashMap;
use std::hash::{Hash, Hasher};

/// A statement's identity for reuse: equal keys mean equal results.
pub type Key = u64;

/// The key of every statement, by statement index; `None` for statements that are not
/// evaluated (static errors).
pub fn statement_keys(checked: &Checked, src: &str) -> Vec<Option<Key>> {
    let stmts = &checked.program.stmts;
    let mut keys: Vec<Option<Key>> = vec![None; stmts.len()];
    // Settings apply to the whole file: every key includes them.
    let settings = format!("{:?}", checked.settings.values);
    // References sorted by position, so each statement finds its own by binary search.
    let mut refs: Vec<(usize, usize)> = checked.references.iter().map(|r| (r.span.start, r.symbol)).collect();
    refs.sort_unstable();
    for &i in &checked.order {
        let span = stmts[i].span;
        let mut h = std::collections::hash_map::DefaultHasher::new();
        settings.hash(&mut h);
        src.get(span.range()).unwrap_or("").hash(&mut h);
        let from = refs.partition_point(|&(at, _)| at < span.start);
        for &(at, sym) in refs[from..].iter().take_while(|&&(at, _)| at < span.end) {
            let _ = at;
            let def = &checked.symbols[sym];
            def.name.hash(&mut h);
            // A name defined by a statement that is not evaluated has no value: mark it so.
            keys.get(def.stmt).copied().flatten().unwrap_or(u64::MAX).hash(&mut h);
        }
        keys[i] = Some(h.finish());
    }
    keys
}

/// One statement's results, spans relative to the statement's start.
#[derive(Clone, Debug, Default)]
struct Outcome {
    values: Vec<NamedValue>,
    diagnostics: Vec<Diagnostic>,
    expectations: Vec<Expectation>,
    facts_used: Vec<String>,
}

struct Entry {
    /// The statement's text: a hash collision cannot hand back a wrong result.
    text: String,
    outcome: Outcome,
    /// The last evaluation that used this entry (entries unused for two are dropped).
    used: u64,
}

/// How much of an evaluation was replayed (for the server's figures and tests).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct Reuse {
    pub replayed: usize,
    pub computed: usize,
}

/// Stored statement results of earlier evaluations of (versions of) one file.
#[derive(Default)]
pub struct Incremental {
    entries: HashMap<Key, Entry>,
    epoch: u64,
}

impl Incremental {
    pub fn new() -> Self {
        Self::default()
    }

    /// Number of stored statement results.
    pub fn len(&self) -> usize {
        self.entries.len()
    }

    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// Evaluates `checked`, replaying stored results where keys match. Stops when `cancel`
    /// is cancelled (inside a statement, at its next checkpoint) or when `stop_before`
    /// says so between statements; either way the result is marked `cancelled`, and what
    /// was completed is stored.
    pub fn evaluate(
        &mut self,
        checked: &Checked,
        src: &str,
        mode: &Mode,
        cancel: &CancelToken,
        stop_before: &mut dyn FnMut() -> bool,
    ) -> (Evaluation, Reuse) {
        let keys = statement_keys(checked, src);
        self.evaluate_keyed(checked, src, &keys, mode, cancel, stop_before)
    }

    /// [`Incremental::evaluate`] with the keys already computed by [`statement_keys`] for
    /// this very `checked` and `src` (the server computes them once per edit).
    pub fn evaluate_keyed(
        &mut self,
        checked: &Checked,
        src: &str,
        keys: &[Option<Key>],
        mode: &Mode,
        cancel: &CancelToken,
        stop_before: &mut dyn FnMut() -> bool,
    ) -> (Evaluation, Reuse) {
        self.epoch += 1;
        let mut ev = Evaluator::new(checked, src);
        let mut reuse = Reuse::default();
        crate::limits::set(crate::limits::from_settings(&checked.settings));
        for &i in &checked.order {
            if cancel.is_cancelled() || stop_before() {
                ev.out.cancelled = true;
                break;
            }
            let stmt = &checked.program.stmts[i];
            let span = stmt.span;
            let text = src.get(span.range()).unwrap_or("");
            // Outputs in run mode write files: always run them.
            let replayable = !(matches!(mode, Mode::Run { .. }) && matches!(stmt.kind, StmtKind::Output { .. }));
            let key = keys.get(i).copied().flatten().filter(|_| replayable);
            if let Some(e) = key.and_then(|k| self.entries.get_mut(&k)).filter(|e| e.text == text) {
                e.used = self.epoch;
                ev.replay(&e.outcome, span.start);
                reuse.replayed += 1;
                continue;
            }
            let mark = ev.mark();
            let _clock = crate::limits::start_statement(cancel);
            // Deep code stops at a checkpoint by unwinding to here (see `limits::checkpoint`).
            match crate::limits::catch(|| ev.statement(i, mode)) {
                Ok(()) => {}
                Err(Stop::OutOfTime) => ev.out_of_time(i),
                Err(Stop::Cancelled) => ev.out.cancelled = true,
            }
            if ev.out.cancelled {
                break;
            }
            reuse.computed += 1;
            if let Some(k) = key {
                if let Some(outcome) = ev.outcome_since(&mark, span) {
                    self.entries.insert(k, Entry { text: text.to_string(), outcome, used: self.epoch });
                }
            }
        }
        ev.curve_facts();
        let epoch = self.epoch;
        // Keep what this evaluation or the one before used: an undo finds its results.
        self.entries.retain(|_, e| e.used + 1 >= epoch);
        let mut out = ev.out;
        kelp_lang::diag::sort(&mut out.diagnostics);
        (out, reuse)
    }
}

/// Where an evaluation's lists stood before a statement.
pub(crate) struct Mark {
    values: usize,
    diagnostics: usize,
    expectations: usize,
    facts_used: usize,
}

fn shift(s: Span, from: usize, to: usize) -> Span {
    Span::new(s.start - from + to, s.end - from + to)
}

fn shift_diagnostic(d: &Diagnostic, from: usize, to: usize) -> Diagnostic {
    let mut d = d.clone();
    d.span = shift(d.span, from, to);
    for l in &mut d.labels {
        l.span = shift(l.span, from, to);
    }
    d
}

impl Evaluator<'_> {
    pub(crate) fn mark(&self) -> Mark {
        Mark {
            values: self.out.values.len(),
            diagnostics: self.out.diagnostics.len(),
            expectations: self.out.expectations.len(),
            facts_used: self.facts_used.len(),
        }
    }

    /// What the statement at `span` added since `m`, relative to its start; `None` when a
    /// span lies outside the statement.
    fn outcome_since(&self, m: &Mark, span: Span) -> Option<Outcome> {
        let inside = |s: Span| span.start <= s.start && s.end <= span.end;
        let values = &self.out.values[m.values..];
        let diagnostics = &self.out.diagnostics[m.diagnostics..];
        let expectations = &self.out.expectations[m.expectations..];
        let all_inside = values.iter().all(|v| inside(v.span))
            && diagnostics.iter().all(|d| inside(d.span) && d.labels.iter().all(|l| inside(l.span)))
            && expectations.iter().all(|e| inside(e.span));
        if !all_inside {
            return None;
        }
        let from = span.start;
        Some(Outcome {
            values: values.iter().map(|v| NamedValue { span: shift(v.span, from, 0), ..v.clone() }).collect(),
            diagnostics: diagnostics.iter().map(|d| shift_diagnostic(d, from, 0)).collect(),
            expectations: expectations
                .iter()
                .map(|e| Expectation { span: shift(e.span, from, 0), ..e.clone() })
                .collect(),
            facts_used: self.facts_used[m.facts_used..].to_vec(),
        })
    }

    /// A stored outcome, moved to a statement starting at `at`.
    fn replay(&mut self, o: &Outcome, at: usize) {
        for v in &o.values {
            self.define_value(NamedValue { span: shift(v.span, 0, at), ..v.clone() });
        }
        self.out.diagnostics.extend(o.diagnostics.iter().map(|d| shift_diagnostic(d, 0, at)));
        self.out
            .expectations
            .extend(o.expectations.iter().map(|e| Expectation { span: shift(e.span, 0, at), ..e.clone() }));
        self.facts_used.extend(o.facts_used.iter().cloned());
    }

    /// An information diagnostic at each curve whose facts (singular points, genus) a
    /// statement needed, listing them. After the loop, so that it does not depend on which
    /// statement computed them first, nor on what earlier evaluations computed.
    fn curve_facts(&mut self) {
        let curves: Vec<(String, Span)> = self
            .out
            .values
            .iter()
            .filter(|v| matches!(v.value.value, Value::Curve(_)) && self.facts_used.contains(&v.name))
            .map(|v| (v.name.clone(), v.span))
            .collect();
        for (name, span) in curves {
            if let Some(Value::Curve(c)) = self.env_value(&name) {
                if let Some(d) = crate::curve_fn::facts_info(&c, span) {
                    self.out.diagnostics.push(d);
                }
            }
        }
    }
}

#[cfg(test)]
mod tests;
