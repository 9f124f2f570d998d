//! What the server knows about one document version: the checked program at once, and
//! the evaluation when the background worker has finished it. Evaluation values hold
//! `Rc`s, so the worker hands back only this plain, thread-safe summary.

use kelp_evaluator::{evaluate, Mode};
use kelp_lang::{check, Diagnostic, Span};

/// A computed `let`, `wave` or curve, as shown on hover.
#[derive(Clone, Debug)]
pub struct ShownValue {
    pub name: String,
    pub kind: String,
    pub display: String,
    pub error_bound: f64,
    /// How the value was obtained (a Riemann matrix's differentials, nodes and checks).
    pub detail: Option<String>,
}

/// Matrices one row per line, so that hover shows tau's entries as a grid.
fn display(v: &kelp_evaluator::Value) -> String {
    match v {
        kelp_evaluator::Value::Matrix(rows) => {
            let lines: Vec<String> = rows
                .iter()
                .map(|r| format!("[{}]", r.iter().map(|x| x.to_string()).collect::<Vec<_>>().join(", ")))
                .collect();
            format!("[{}]", lines.join(",\n "))
        }
        other => other.to_string(),
    }
}

#[derive(Clone, Debug, Default)]
pub struct EvalSummary {
    pub diagnostics: Vec<Diagnostic>,
    pub values: Vec<ShownValue>,
    /// Per curve (by name): a short fact for an inlay hint ("genus 2", "reducible").
    pub curve_hints: Vec<(String, String)>,
}

/// The inlay-hint fact of one curve: from the facts the evaluation already computed
/// (or computes now, once, for a curve no claim asked about).
fn curve_hint(c: &kelp_evaluator::value::CurveValue) -> String {
    use kelp_evaluator::algebra::curve::NoGenus;
    let Some(f) = c.facts() else { return format!("degree {}", c.equation.degree) };
    let n = f.singular_count();
    match f.genus() {
        Ok(g) if f.smooth() => format!("smooth, genus {g}"),
        Ok(g) => format!("genus {g}, {n} singular point{}", if n == 1 { "" } else { "s" }),
        Err(NoGenus::Reducible(_)) => "reducible".into(),
        Err(NoGenus::NonReduced(_)) => "repeated factor".into(),
        Err(NoGenus::Unsupported(_)) => format!("{n} singular points, genus not decided"),
    }
}

/// Runs the evaluation of `text` (check included); a panic becomes a diagnostic.
pub fn evaluate_text(text: &str) -> EvalSummary {
    let run = std::panic::catch_unwind(|| {
        let checked = check(text);
        let e = evaluate(&checked, text, &Mode::Check);
        let values = e
            .values
            .iter()
            .map(|v| ShownValue {
                name: v.name.clone(),
                kind: v.value.value.type_name().to_string(),
                display: display(&v.value.value),
                error_bound: v.value.error_bound,
                detail: v.value.reason.clone(),
            })
            .collect();
        let curve_hints = e
            .values
            .iter()
            .filter_map(|v| match &v.value.value {
                kelp_evaluator::Value::Curve(c) => Some((v.name.clone(), curve_hint(c))),
                _ => None,
            })
            .collect();
        EvalSummary { diagnostics: e.diagnostics, values, curve_hints }
    });
    run.unwrap_or_else(|_| EvalSummary {
        diagnostics: vec![Diagnostic::error(
            kelp_lang::Code::EvalFailed,
            Span::new(0, 0),
            "internal error while evaluating this file (please report it); syntax and checker diagnostics are still current",
        )],
        values: vec![],
        curve_hints: vec![],
    })
}
