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
        let span = clamp(d.span.range(), src.len());
        let mut report = Report::build(kind, (path, span.clone()))
            .with_config(Config::default().with_index_type(IndexType::Byte).with_color(color))
            .with_code(d.code.as_str())
            .with_message(&d.message)
            .with_label(Label::new((path, span)).with_color(c));
        for l in &d.labels {
            report = report.with_label(
                Label::new((path, clamp(l.span.range(), src.len()))).with_message(&l.message).with_color(Color::Blue),
            );
        }
        for n in &d.notes {
            report = report.with_note(n);
        }
        let _ = report.finish().write((path, source.clone()), &mut out);
    }
    String::from_utf8_lossy(&out).into_owned()
}

fn clamp(r: std::ops::Range<usize>, len: usize) -> std::ops::Range<usize> {
    r.start.min(len)..r.end.min(len)
}
