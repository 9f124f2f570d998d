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
}

#[derive(Clone, Debug, Default)]
pub struct EvalSummary {
    pub diagnostics: Vec<Diagnostic>,
    pub values: Vec<ShownValue>,
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
                display: v.value.value.to_string(),
                error_bound: v.value.error_bound,
            })
            .collect();
        EvalSummary { diagnostics: e.diagnostics, values }
    });
    run.unwrap_or_else(|_| EvalSummary {
        diagnostics: vec![Diagnostic::error(
            kelp_lang::Code::EvalFailed,
            Span::new(0, 0),
            "internal error while evaluating this file (please report it); syntax and checker diagnostics are still current",
        )],
        values: vec![],
    })
}
