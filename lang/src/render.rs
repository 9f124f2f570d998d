//! Terminal rendering of diagnostics with ariadne, counting in bytes like our spans.
//! ariadne's lines are ours (`\n`, `\r\n`, lone `\r`) plus a few more breaks the
//! language does not know; the text it sees is rewritten for display so that its line
//! numbers and columns are the language's, with byte offsets unchanged.

use crate::diag::{Diagnostic, Severity};
use ariadne::{Color, Config, IndexType, Label, Report, ReportKind, Source};

/// Renders diagnostics of one file as text (with colour when `color`).
pub fn render(path: &str, src: &str, diags: &[Diagnostic], color: bool) -> String {
    let mut out = Vec::new();
    // A byte-order mark is not text: show the file without it, spans shifted.
    let bom = if src.starts_with('\u{FEFF}') { '\u{FEFF}'.len_utf8() } else { 0 };
    let shown = for_display(&src[bom..]);
    let src = shown.as_str();
    let shift = |r: std::ops::Range<usize>| r.start.saturating_sub(bom)..r.end.saturating_sub(bom);
    let source = Source::from(src);
    for d in diags {
        let (kind, c) = match d.severity {
            Severity::Error => (ReportKind::Error, Color::Red),
            Severity::Warning => (ReportKind::Warning, Color::Yellow),
            Severity::Information | Severity::Hint => (ReportKind::Advice, Color::Cyan),
        };
        let span = clamp(shift(d.span.range()), src);
        let mut report = Report::build(kind, (path, span.clone()))
            .with_config(Config::default().with_index_type(IndexType::Byte).with_color(color))
            .with_code(d.code.as_str())
            .with_message(&d.message)
            .with_label(Label::new((path, span)).with_color(c));
        for l in &d.labels {
            report = report.with_label(
                Label::new((path, clamp(shift(l.span.range()), src))).with_message(&l.message).with_color(Color::Blue),
            );
        }
        for n in &d.notes {
            report = report.with_note(n);
        }
        // Machine-readable fixes (the editor's quick fixes) as help lines.
        for f in &d.fixes {
            report = report.with_help(&f.title);
        }
        let _ = report.finish().write((path, source.clone()), &mut out);
    }
    String::from_utf8_lossy(&out).into_owned()
}

/// The same bytes with the line breaks ariadne knows beyond ours (vertical tab, form
/// feed, U+0085, U+2028, U+2029) replaced by characters of the same UTF-8 length that
/// break no line: a space, a pilcrow, a newline symbol.
fn for_display(src: &str) -> String {
    src.chars()
        .map(|c| match c {
            '\x0B' | '\x0C' => ' ',
            '\u{0085}' => '\u{00B6}',
            '\u{2028}' | '\u{2029}' => '\u{2424}',
            c => c,
        })
        .collect()
}

/// Keeps a span inside the text and on character boundaries (ariadne slices by it).
fn clamp(r: std::ops::Range<usize>, src: &str) -> std::ops::Range<usize> {
    let down = |mut i: usize| {
        i = i.min(src.len());
        while !src.is_char_boundary(i) {
            i -= 1;
        }
        i
    };
    let start = down(r.start);
    let mut end = down(r.end).max(start);
    if end < r.end.min(src.len()) {
        // Round a cut-off end up to the end of its character.
        end = src[end..].chars().next().map_or(end, |c| end + c.len_utf8());
    }
    start..end
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diag::Code;
    use crate::span::Span;

    /// The line and column ariadne prints after the file name ("file.kelp:L:C").
    fn shown_at(src: &str, at: usize) -> String {
        let d = Diagnostic::error(Code::BadToken, Span::new(at, at + 1), "here");
        let out = render("f.kelp", src, &[d], false);
        let i = out.find("f.kelp:").unwrap() + "f.kelp:".len();
        out[i..].split(|c: char| c != ':' && !c.is_ascii_digit()).next().unwrap().to_string()
    }

    #[test]
    fn lines_and_columns_are_the_languages() {
        // Expected lines: LSP 3.17 line ends (\n, \r\n, \r), which the lexer uses; vertical
        // tab, form feed and U+2028 are spacing or comment text to the lexer, not breaks.
        let src = "a\rb\r\nc\x0Bd # \u{2028} \u{0085} x\n@";
        assert_eq!(shown_at(src, src.find('b').unwrap()), "2:1");
        assert_eq!(shown_at(src, src.find('d').unwrap()), "3:3");
        assert_eq!(shown_at(src, src.find('x').unwrap()), "3:11");
        assert_eq!(shown_at(src, src.find('@').unwrap()), "4:1");
        // A byte-order mark is no column (as in `LineIndex::of_file`).
        let src = "\u{FEFF}ab";
        assert_eq!(shown_at(src, src.find('b').unwrap()), "1:2");
        assert_eq!(shown_at(src, src.find('a').unwrap()), "1:1");
    }
}
