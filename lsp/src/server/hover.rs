//! Hover: a name's computed value (digits as far as its bound supports), a curve's facts
//! and its equation as written, a built-in's signature. Text that is not ours (names,
//! equations, the evaluator's explanations) goes into code spans or blocks, which every
//! markdown renderer shows literally (backslash escapes are not honoured by all: Emacs's
//! markdown-mode shows them), so `*` in an equation stays a `*`; our own prose is escaped;
//! clients without markdown get plain text.

use super::{convert, navigate, Doc};
use kelp_lang::Span;
use tower_lsp_server::ls_types::*;

/// Escapes the characters markdown would read as markup: emphasis, code, links, html,
/// tables, and a heading, list or quote marker at a line's start.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    let mut line_start = true;
    for c in text.chars() {
        let markup = matches!(c, '\\' | '`' | '*' | '_' | '[' | ']' | '<' | '>' | '|' | '~');
        if markup || (line_start && matches!(c, '#' | '-' | '+' | '=')) {
            out.push('\\');
        }
        out.push(c);
        line_start = c == '\n' || (line_start && c == ' ');
    }
    out
}

/// Builds hover text in either format: prose (escaped in markdown) and code blocks.
struct Text {
    markdown: bool,
    out: String,
}

impl Text {
    fn para(&mut self, s: &str) {
        if !self.out.is_empty() {
            self.out.push_str("\n\n");
        }
        if self.markdown {
            self.out.push_str(&escape(s));
        } else {
            self.out.push_str(s);
        }
    }
    /// A paragraph shown literally: a code span in markdown.
    fn literal(&mut self, s: &str) {
        if !self.markdown {
            return self.para(s);
        }
        if !self.out.is_empty() {
            self.out.push_str("\n\n");
        }
        // A fence longer than any run of backticks inside; padded if the text touches one.
        let ticks = "`".repeat(1 + s.split(|c| c != '`').map(str::len).max().unwrap_or(0));
        let pad = if s.starts_with('`') || s.ends_with('`') { " " } else { "" };
        self.out.push_str(&format!("{ticks}{pad}{}{pad}{ticks}", s.replace('\n', " ")));
    }
    fn code(&mut self, s: &str) {
        if !self.out.is_empty() {
            self.out.push_str("\n\n");
        }
        if self.markdown {
            // A fence longer than any run of backticks inside.
            let ticks = "`".repeat(3.max(s.split(|c| c != '`').map(str::len).max().unwrap_or(0) + 1));
            self.out.push_str(&format!("{ticks}\n{s}\n{ticks}"));
        } else {
            self.out.push_str(s);
        }
    }
}

pub fn hover(doc: &Doc, pos: Position, markdown: bool) -> Option<Hover> {
    let at = convert::offset(&doc.index, pos);
    let mut t = Text { markdown, out: String::new() };
    let span = if let Some((sym, span, name)) = navigate::symbol_at(doc, pos) {
        let def = &doc.checked.symbols[sym];
        let stmt = &doc.checked.program.stmts[def.stmt];
        let is_curve = matches!(stmt.kind, kelp_lang::ast::StmtKind::Curve { .. });
        match doc.value(&name) {
            Some(v) => {
                t.literal(&format!("{} ({})", v.name, v.kind));
                if is_curve {
                    // The equation as written, not as normalised.
                    t.code(doc.text.get(stmt.span.range()).unwrap_or("").trim());
                    if let Some(f) = &v.fact {
                        t.para(f);
                    }
                    for l in &v.fact_lines {
                        t.literal(l);
                    }
                } else {
                    t.code(&v.display);
                    if v.error_bound > 0.0 {
                        t.para(&format!("error bound {:.1e}", v.error_bound));
                    }
                }
                if let Some(d) = &v.detail {
                    t.literal(d);
                }
            }
            None if doc.pending > 0 => t.literal(&format!("{name}: being computed")),
            None => t.literal(&format!("{name}: no value (see its diagnostics)")),
        }
        span
    } else {
        let (s, e) = super::word_at(&doc.text, at)?;
        let word = &doc.text[s..e];
        let b = kelp_lang::builtins::BUILTINS.iter().find(|b| b.name == word)?;
        t.code(b.signature);
        t.literal(b.summary);
        Span::new(s, e)
    };
    let kind = if markdown { MarkupKind::Markdown } else { MarkupKind::PlainText };
    Some(Hover {
        contents: HoverContents::Markup(MarkupContent { kind, value: t.out }),
        range: Some(convert::range(&doc.index, span)),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn markup_characters_are_escaped() {
        // CommonMark: a backslash before an ASCII punctuation character makes it literal
        // (CommonMark spec 0.31, section 2.4; from memory).
        assert_eq!(escape("y^2 = x*(x-1)*z"), "y^2 = x\\*(x-1)\\*z");
        assert_eq!(escape("a_b <c>"), "a\\_b \\<c\\>");
        assert_eq!(escape("- not a list\n# nor a heading"), "\\- not a list\n\\# nor a heading");
    }
}
