//! What an evaluation shows, statement by statement, in a plain thread-safe form: the
//! evaluation's values hold `Rc`s and stay on the document's worker thread; the server
//! keeps these views, keyed like the evaluator's stored results (`kelp_evaluator::Key`),
//! so that any version of the document can be shown from them at once.

use kelp_evaluator::num::Num;
use kelp_evaluator::{Evaluation, Key, Value, Valued};
use kelp_lang::check::Checked;
use kelp_lang::{Diagnostic, Span};
use std::collections::HashMap;
use std::sync::Arc;

/// A computed `let`, `wave` or curve, as shown on hover and in lenses.
#[derive(Clone, Debug)]
pub struct ShownValue {
    pub name: String,
    pub kind: String,
    /// Digits as far as the bound supports them.
    pub display: String,
    /// The bound of `display`: the value's own bound plus the rounding for display.
    pub error_bound: f64,
    /// How the value was obtained (a Riemann matrix's differentials, nodes and checks).
    pub detail: Option<String>,
    /// A curve's facts in one line ("smooth, genus 3"), for hover and inlay hints.
    pub fact: Option<String>,
    /// A curve's singular points, one line each.
    pub fact_lines: Vec<String>,
}

/// A claim's outcome: `Some(true)` holds, `Some(false)` false, `None` undecided.
#[derive(Clone, Debug)]
pub struct Mark {
    pub passed: Option<bool>,
}

/// One statement's results, spans relative to the statement's start.
#[derive(Clone, Debug, Default)]
pub struct StmtView {
    pub diagnostics: Vec<Diagnostic>,
    pub values: Vec<ShownValue>,
    pub marks: Vec<Mark>,
}

/// The flattened view of one document version, for handlers that want it whole.
#[derive(Clone, Debug, Default)]
pub struct EvalSummary {
    pub diagnostics: Vec<Diagnostic>,
    pub values: Vec<ShownValue>,
}

/// Rounds `x` to the decimal place of `bound`; returns the text and the rounding error.
fn round_to(x: f64, bound: f64) -> (String, f64) {
    if bound <= 0.0 || !bound.is_finite() || !x.is_finite() {
        return (kelp_evaluator::num::fmt_f64(x), 0.0);
    }
    let place = bound.log10().floor() as i32; // the digit the bound reaches
    if place < 0 {
        let decimals = (-place).min(17) as usize;
        let text = format!("{x:.decimals$}");
        let shown: f64 = text.parse().unwrap_or(x);
        let text = if shown == 0.0 { format!("{:.decimals$}", 0.0) } else { text };
        (text, (shown - x).abs())
    } else {
        // Whole digits only up to the bound's: scientific notation with that many digits.
        let mag = x.abs().log10().floor() as i32;
        let digits = (mag - place).max(0) as usize;
        let text = format!("{x:.digits$e}");
        let shown: f64 = text.parse().unwrap_or(x);
        (text, (shown - x).abs())
    }
}

fn round_num(n: &Num, bound: f64) -> (String, f64) {
    match n {
        Num::Exact(_) => (n.to_string(), 0.0),
        Num::Real(r) => round_to(*r, bound),
        Num::Complex(c) if c.re == 0.0 => {
            let (im, e) = round_to(c.im, bound);
            (format!("{im}i"), e)
        }
        Num::Complex(c) => {
            let (re, e1) = round_to(c.re, bound);
            let (im, e2) = round_to(c.im.abs(), bound);
            let sign = if c.im < 0.0 { "-" } else { "+" };
            (format!("{re} {sign} {im}i"), e1.hypot(e2))
        }
    }
}

/// A value as hover shows it: digits the bound supports (matrices one row per line), and
/// the bound of what is shown.
pub fn display(v: &Valued) -> (String, f64) {
    let b = v.error_bound;
    let mut worst = 0.0f64;
    let mut num = |n: &Num| {
        let (t, e) = round_num(n, b);
        worst = worst.max(e);
        t
    };
    let text = match &v.value {
        Value::Num(n) => num(n),
        Value::Vector(x) => format!("[{}]", x.iter().map(&mut num).collect::<Vec<_>>().join(", ")),
        Value::Matrix(rows) => {
            let lines: Vec<String> =
                rows.iter().map(|r| format!("[{}]", r.iter().map(&mut num).collect::<Vec<_>>().join(", "))).collect();
            format!("[{}]", lines.join(",\n "))
        }
        other => other.to_string(),
    };
    (text, if b > 0.0 { b + worst } else { 0.0 })
}

/// Highest degree whose facts the server computes on its own when no statement asked for
/// them: this runs after the evaluation, outside any statement's time budget, and up to
/// this degree it takes milliseconds.
const FACTS_UNASKED_DEGREE: u32 = 8;

/// A curve's facts: those the evaluation computed, or computed now for a small degree.
fn facts(c: &kelp_evaluator::value::CurveValue) -> Option<std::sync::Arc<kelp_evaluator::algebra::curve::CurveFacts>> {
    match c.facts.get() {
        Some(f) => Some(f.clone()),
        None if (c.equation.degree as u32) <= FACTS_UNASKED_DEGREE => c.facts(),
        None => None,
    }
}

/// The one-line fact of a curve.
fn curve_fact(c: &kelp_evaluator::value::CurveValue) -> String {
    use kelp_evaluator::algebra::curve::NoGenus;
    let Some(f) = facts(c) else { return format!("degree {}", c.equation.degree) };
    let n = f.singular_count();
    match f.genus() {
        Ok(g) if f.smooth() => format!("smooth, genus {g}"),
        Ok(g) => format!("genus {g}, {n} singular point{}", if n == 1 { "" } else { "s" }),
        Err(NoGenus::Reducible(_)) => "reducible".into(),
        Err(NoGenus::NonReduced(_)) => "repeated factor".into(),
        Err(NoGenus::Unsupported(_)) => format!("{n} singular points, genus not decided"),
    }
}

pub fn shown(name: &str, v: &Valued) -> ShownValue {
    let (display, error_bound) = display(v);
    let (fact, fact_lines) = match &v.value {
        Value::Curve(c) => (Some(curve_fact(c)), facts(c).map(|f| f.summary()).unwrap_or_default()),
        _ => (None, vec![]),
    };
    ShownValue {
        name: name.to_string(),
        kind: v.value.type_name().to_string(),
        display,
        error_bound,
        detail: v.reason.clone(),
        fact,
        fact_lines,
    }
}

fn relative(d: &Diagnostic, from: usize) -> Diagnostic {
    let mut d = d.clone();
    d.span = Span::new(d.span.start - from, d.span.end - from);
    for l in &mut d.labels {
        l.span = Span::new(l.span.start.saturating_sub(from), l.span.end.saturating_sub(from));
    }
    d
}

/// The views of the statements an evaluation completed, by key. A statement counts as
/// completed when the evaluation went past it (a cancelled evaluation stops before the
/// statement it was in).
pub fn views(checked: &Checked, keys: &[Option<Key>], e: &Evaluation) -> HashMap<Key, Arc<StmtView>> {
    let stmts = &checked.program.stmts;
    // Statement index by span start, to find the statement a span lies in.
    let mut starts: Vec<(usize, usize)> = checked.order.iter().map(|&i| (stmts[i].span.start, i)).collect();
    starts.sort_unstable();
    let owner = |s: Span| -> Option<usize> {
        let k = starts.partition_point(|&(at, _)| at <= s.start).checked_sub(1)?;
        let i = starts[k].1;
        (s.end <= stmts[i].span.end).then_some(i)
    };
    let mut by_stmt: HashMap<usize, StmtView> = HashMap::new();
    for d in &e.diagnostics {
        if let Some(i) = owner(d.span) {
            by_stmt.entry(i).or_default().diagnostics.push(relative(d, stmts[i].span.start));
        }
    }
    for v in &e.values {
        if let Some(i) = owner(v.span) {
            by_stmt.entry(i).or_default().values.push(shown(&v.name, &v.value));
        }
    }
    for x in &e.expectations {
        if let Some(i) = owner(x.span) {
            by_stmt.entry(i).or_default().marks.push(Mark { passed: x.passed });
        }
    }
    // Completed statements: all of `order` for a finished evaluation; for a cancelled one,
    // those whose results are present (a statement without any result is left pending).
    let mut out = HashMap::new();
    for &i in &checked.order {
        let Some(k) = keys.get(i).copied().flatten() else { continue };
        match by_stmt.remove(&i) {
            Some(v) => {
                out.insert(k, Arc::new(v));
            }
            None if !e.cancelled => {
                out.insert(k, Arc::new(StmtView::default()));
            }
            None => {}
        }
    }
    out
}

/// The view of an evaluation that panicked: one diagnostic, at the file's start.
pub fn internal_error() -> Diagnostic {
    Diagnostic::error(
        kelp_lang::Code::EvalFailed,
        Span::new(0, 0),
        "internal error while evaluating this file (please report it); syntax and checker diagnostics are still current",
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn digits_stop_where_the_bound_does() {
        // 0.1 ± 3e-13: twelve decimals (the bound's place is 1e-13).
        let (t, e) = round_to(0.123456789012345678, 3e-13);
        assert_eq!(t, "0.1234567890123");
        assert!(e <= 5e-14);
        let (t, _) = round_to(-2.0e-20, 1e-3);
        assert_eq!(t, "0.000");
        let (t, e) = round_to(123456.789, 20.0);
        assert_eq!(t, "1.2346e5");
        assert!((e - 3.211).abs() < 1e-9);
    }
}
