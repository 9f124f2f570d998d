//! Terminal rendering of diagnostics with ariadne, counting in bytes like our spans.

use crate::diag::{Diagnostic, Severity};
use ariadne::{Color, Config, IndexType, Label, Report, ReportKind, Source};

/// Renders diagnostics of one file as text (with colour when `color`).
pub fn render(path: &str, src: &str, diags: &[Diagnostic], color: bool) -> String {
    let mut out = Vec::new();
    let source = Source::from(src);
    for d in diags {
        let (kind, c) = match d.severity {
            Severity::Error => (ReportKind::Error, Color::Red),
            Severity::Warning => (ReportKind::Warning, Color::Yellow),
            Severity::Information | Severity::Hint => (ReportKind::Advice, Color::Cyan),
        };
        let span = clamp(d.span.range(), src);
        let mut report = Report::build(kind, (path, span.clone()))
            .with_config(Config::default().with_index_type(IndexType::Byte).with_color(color))
            .with_code(d.code.as_str())
            .with_message(&d.message)
            .with_label(Label::new((path, span)).with_color(c));
        for l in &d.labels {
            report = report.with_label(
                Label::new((path, clamp(l.span.range(), src))).with_message(&l.message).with_color(Color::Blue),
            );
        }
        for n in &d.notes {
            report = report.with_note(n);
        }
        let _ = report.finish().write((path, source.clone()), &mut out);
    }
    String::from_utf8_lossy(&out).into_owned()
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
