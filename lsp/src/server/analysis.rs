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
    /// Per curve (by name): a short fact for an inlay hint ("genus 2", "reducible").
    pub curve_hints: Vec<(String, String)>,
}

/// The inlay-hint fact of one curve.
fn curve_hint(eq: &kelp_lang::check::CurveEquation) -> String {
    use kelp_evaluator::algebra::curve::{analyse, NoGenus};
    if eq.degree > kelp_evaluator::curve_fn::MAX_ALGEBRA_DEGREE {
        return format!("degree {}", eq.degree);
    }
    let f = analyse(&eq.poly, eq.projective);
    match f.genus() {
        Ok(g) if f.smooth() => format!("smooth, genus {g}"),
        Ok(g) => format!(
            "genus {g}, {} singular point{}",
            f.singular_count(),
            if f.singular_count() == 1 { "" } else { "s" }
        ),
        Err(NoGenus::Reducible(_)) => "reducible".into(),
        Err(NoGenus::NonReduced(_)) => "repeated factor".into(),
        Err(NoGenus::Unsupported(_)) => format!("{} singular points, genus not decided", f.singular_count()),
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
                display: v.value.value.to_string(),
                error_bound: v.value.error_bound,
            })
            .collect();
        let curve_hints = checked
            .symbols
            .iter()
            .filter_map(|s| checked.curves.get(&s.stmt).map(|eq| (s.name.clone(), curve_hint(eq))))
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
