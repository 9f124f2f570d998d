//! Reusing an evaluation across edits that change only comments, spacing or blank
//! lines: the key is the token stream without comments (runs of line breaks counted
//! once), and the stored diagnostics are moved to the new
//! text token by token (a diagnostic starts and ends at token boundaries).

use super::analysis::EvalSummary;
use kelp_lang::lexer::{lex, Token};
use kelp_lang::Span;

/// The evaluation-relevant content of a text, and where its tokens are.
pub struct Shape {
    pub key: String,
    pub spans: Vec<Span>,
}

pub fn shape(text: &str) -> Shape {
    let (tokens, _) = lex(text);
    let mut key = String::with_capacity(text.len());
    let mut spans = Vec::with_capacity(tokens.len());
    let mut last_newline = true; // leading blank lines do not matter
    for (t, s) in tokens {
        if matches!(t, Token::Comment(_)) {
            continue;
        }
        // Blank lines separate nothing more than one line break does.
        let newline = matches!(t, Token::Newline);
        if newline && last_newline {
            continue;
        }
        last_newline = newline;
        key.push_str(t.text());
        key.push('\u{1}');
        spans.push(s);
    }
    Shape { key, spans }
}

/// The same position relative to the new tokens: exact at token boundaries, otherwise
/// kept at the same distance from the token it lies in.
fn move_offset(old: &[Span], new: &[Span], at: usize, end: bool) -> usize {
    if old.is_empty() {
        return at;
    }
    let i = old.partition_point(|s| s.start <= at).saturating_sub(1);
    if end {
        if let Some(j) = old.iter().position(|s| s.end == at) {
            return new[j].end;
        }
    }
    let base_old = old[i].start;
    (new[i].start + at.saturating_sub(base_old)).min(new.last().map_or(at, |s| s.end.max(at)))
}

/// The summary computed for `old` text, re-anchored to the `new` text of the same shape.
pub fn moved(summary: &EvalSummary, old: &Shape, new: &Shape) -> EvalSummary {
    let mut out = summary.clone();
    let mv = |s: Span| {
        Span::new(move_offset(&old.spans, &new.spans, s.start, false), move_offset(&old.spans, &new.spans, s.end, true))
    };
    for d in &mut out.diagnostics {
        d.span = mv(d.span);
        for l in &mut d.labels {
            l.span = mv(l.span);
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use kelp_lang::{Code, Diagnostic};

    #[test]
    fn a_comment_edit_keeps_the_shape_and_moves_diagnostics() {
        let a = "let x = 1 / 0\n";
        let b = "# a new comment line, with λ\nlet   x = 1 / 0  # and a trailing one\n";
        let (sa, sb) = (shape(a), shape(b));
        assert_eq!(sa.key, sb.key);
        let d = Diagnostic::error(Code::EvalFailed, Span::new(8, 13), "division by zero");
        let s = EvalSummary { diagnostics: vec![d], ..Default::default() };
        let m = moved(&s, &sa, &sb);
        assert_eq!(&b[m.diagnostics[0].span.range()], "1 / 0");
        assert_ne!(shape("let x = 2 / 0\n").key, sa.key);
    }
}
