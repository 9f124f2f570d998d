//! The edge between kelp's byte offsets and LSP positions (UTF-16 by default). Nothing
//! inside kelp sees an LSP type; everything passes through here once.

use kelp_lang::span::{Encoding, LineCol, LineIndex};
use kelp_lang::{Diagnostic, Severity, Span};
use tower_lsp_server::ls_types as lsp;

pub fn position(index: &LineIndex, offset: usize) -> lsp::Position {
    let lc = index.line_col(offset, Encoding::Utf16);
    lsp::Position { line: lc.line, character: lc.character }
}

pub fn range(index: &LineIndex, span: Span) -> lsp::Range {
    lsp::Range { start: position(index, span.start), end: position(index, span.end) }
}

pub fn offset(index: &LineIndex, pos: lsp::Position) -> usize {
    index.offset(LineCol { line: pos.line, character: pos.character }, Encoding::Utf16)
}

pub fn diagnostic(index: &LineIndex, uri: &lsp::Uri, d: &Diagnostic) -> lsp::Diagnostic {
    let severity = match d.severity {
        Severity::Error => lsp::DiagnosticSeverity::ERROR,
        Severity::Warning => lsp::DiagnosticSeverity::WARNING,
        Severity::Information => lsp::DiagnosticSeverity::INFORMATION,
        Severity::Hint => lsp::DiagnosticSeverity::HINT,
    };
    let mut message = d.message.clone();
    for n in &d.notes {
        message.push('\n');
        message.push_str(n);
    }
    let related: Vec<lsp::DiagnosticRelatedInformation> = d
        .labels
        .iter()
        .map(|l| lsp::DiagnosticRelatedInformation {
            location: lsp::Location { uri: uri.clone(), range: range(index, l.span) },
            message: l.message.clone(),
        })
        .collect();
    lsp::Diagnostic {
        range: range(index, d.span),
        severity: Some(severity),
        code: Some(lsp::NumberOrString::String(d.code.as_str().to_string())),
        source: Some("kelp".into()),
        message,
        related_information: if related.is_empty() { None } else { Some(related) },
        ..Default::default()
    }
}
