//! Code actions: the quick fixes that parser, checker and evaluator attach to their
//! diagnostics (`kelp_lang::Fix`), and "pin as a claim" on a computed `let`.

use super::{convert, Doc};
use kelp_lang::ast::StmtKind;
use kelp_lang::{Diagnostic, Fix, Span};
use std::collections::HashMap;
use tower_lsp_server::ls_types::*;

pub fn code_actions(doc: &Doc, uri: &Uri, params: &CodeActionParams) -> Vec<CodeActionOrCommand> {
    let want = |kind: &CodeActionKind| {
        params.context.only.as_ref().is_none_or(|only| only.iter().any(|o| kind.as_str().starts_with(o.as_str())))
    };
    let (a, b) = (convert::offset(&doc.index, params.range.start), convert::offset(&doc.index, params.range.end));
    let touches = |s: Span| s.start <= b && a <= s.end;
    let mut out = Vec::new();
    if want(&CodeActionKind::QUICKFIX) {
        let eval = doc.eval.iter().flat_map(|e| e.diagnostics.iter());
        for d in doc.checked.diagnostics.iter().chain(eval).filter(|d| touches(d.span)) {
            for fix in &d.fixes {
                out.push(action(doc, uri, fix, CodeActionKind::QUICKFIX, Some(d)));
            }
        }
    }
    if want(&CodeActionKind::REFACTOR) {
        for fix in pins(doc).into_iter().filter(|(s, _)| touches(*s)) {
            out.push(action(doc, uri, &fix.1, CodeActionKind::REFACTOR, None));
        }
    }
    out
}

fn action(doc: &Doc, uri: &Uri, fix: &Fix, kind: CodeActionKind, d: Option<&Diagnostic>) -> CodeActionOrCommand {
    let edits = fix
        .edits
        .iter()
        .map(|(s, t)| TextEdit { range: convert::range(&doc.index, *s), new_text: t.clone() })
        .collect();
    CodeActionOrCommand::CodeAction(CodeAction {
        title: fix.title.clone(),
        kind: Some(kind),
        diagnostics: d.map(|d| vec![convert::diagnostic(&doc.index, uri, d)]),
        edit: Some(WorkspaceEdit::new(HashMap::from([(uri.clone(), edits)]))),
        // Only one fix is offered per diagnostic, so it may be applied without asking.
        is_preferred: d.map(|d| d.fixes.len() == 1),
        ..Default::default()
    })
}

/// For each `let` whose value is known: (the statement's span, a fix inserting after it
/// `expect NAME == VALUE within T`), T covering the value's error bound and the rounding
/// of its decimal display, so that the claim passes when evaluated.
fn pins(doc: &Doc) -> Vec<(Span, Fix)> {
    let Some(eval) = &doc.eval else { return vec![] };
    let mut out = Vec::new();
    for stmt in &doc.checked.program.stmts {
        let StmtKind::Let { name, .. } = &stmt.kind else { continue };
        let Some(v) = eval.values.iter().find(|v| v.name == name.name) else { continue };
        let Some(claim) = pin_claim(&v.name, &v.kind, &v.display, v.error_bound) else { continue };
        let title = format!("pin `{}` as a claim", v.name);
        let at = Span::new(stmt.span.end, stmt.span.end);
        out.push((stmt.span, Fix::replace(title, at, format!("\n{claim}"))));
    }
    out
}

/// The claim text, or `None` when the value has no literal form that parses.
pub fn pin_claim(name: &str, kind: &str, display: &str, bound: f64) -> Option<String> {
    let exact = matches!(kind, "integer" | "rational" | "boolean");
    if !exact && !matches!(kind, "real" | "complex" | "vector" | "matrix") {
        return None;
    }
    if !bound.is_finite() {
        return None;
    }
    let claim = if exact {
        format!("expect {name} == {display}")
    } else {
        // The shown digits round-trip each float; allow twice the bound plus a few units
        // in the last place of the largest entry for the decimal's own rounding.
        let largest = numbers(display).fold(0f64, |m, x| m.max(x.abs()));
        let tol = round_up(2.0 * bound + 1e-15 * largest.max(1e-300) + f64::MIN_POSITIVE);
        format!("expect {name} == {display} within {tol}")
    };
    let parsed = kelp_lang::parser::parse(&claim);
    (parsed.diagnostics.iter().all(|d| !d.is_error()) && parsed.program.stmts.len() == 1).then_some(claim)
}

/// The decimal numbers in a displayed value.
fn numbers(display: &str) -> impl Iterator<Item = f64> + '_ {
    display
        .split(|c: char| !(c.is_ascii_digit() || matches!(c, '.' | 'e' | '-' | '+')))
        .filter_map(|w| w.trim_matches(|c| c == '+' || c == '-').parse::<f64>().ok())
}

/// One significant digit, rounded up: 2.1e-12 -> 3e-12.
fn round_up(x: f64) -> String {
    let x = x * (1.0 + 1e-9);
    let e = x.log10().floor() as i32;
    let digit = (x / 10f64.powi(e)).ceil();
    let (digit, e) = if digit >= 10.0 { (1.0, e + 1) } else { (digit.max(1.0), e) };
    format!("{digit}e{e}")
}

#[cfg(test)]
mod tests {
    #[test]
    fn tolerances_round_up_to_one_digit() {
        // common practice, no source: a tolerance is never below the quantity it covers.
        for x in [2.1e-12, 9.99e-7, 1e-15, 3.0e-300, 0.5] {
            let t: f64 = super::round_up(x).parse().unwrap();
            assert!(t >= x && t <= 10.0 * x, "{x} -> {t}");
        }
    }
}
