//! Completion and signature help, from the text and the checked program.

use super::{assist, convert, Doc};
use kelp_lang::builtins::{ParamKind, BUILTINS, SETTINGS};
use kelp_lang::Kind;
use tower_lsp_server::ls_types::*;

/// What the cursor's line asks for, from the text before it.
#[derive(Debug, PartialEq)]
enum Context {
    /// The line's first word: a statement keyword.
    StatementStart,
    /// After `set `: a setting name.
    Setting,
    /// An argument that must be of this kind (curves inside `tau(`, waves inside `value(`).
    Argument(ParamKind),
    /// Anywhere else in an expression: names, built-ins, value keywords.
    Expression,
}

fn context(text: &str, at: usize) -> Context {
    let at = at.min(text.len());
    let line = &text[text[..at].rfind('\n').map_or(0, |i| i + 1)..at];
    let word_start = line.trim_end_matches(|c: char| c.is_ascii_alphanumeric() || c == '_');
    if word_start.trim().is_empty() {
        return Context::StatementStart;
    }
    let before: Vec<&str> = word_start.split_whitespace().collect();
    if before == ["set"] {
        return Context::Setting;
    }
    if matches!(before.as_slice(), ["sample" | "plot"]) {
        return Context::Argument(ParamKind::Wave);
    }
    if let Some((b, arg)) = assist::call_at(text, at) {
        // `name = |` inside the call: that keyword's kind; else the positional one.
        let segment = word_start.rsplit(['(', ',']).next().unwrap_or("");
        let kind = match segment.trim().strip_suffix('=').map(str::trim) {
            Some(k) => b.keywords.iter().find(|p| p.name == k).map(|p| p.kind),
            None => b.positional.get(arg as usize).map(|p| p.kind),
        };
        if let Some(kind) = kind {
            return Context::Argument(kind);
        }
    }
    Context::Expression
}

pub fn completion(doc: &Doc, pos: Position, snippets: bool) -> CompletionResponse {
    let checked = &doc.checked;
    let at = convert::offset(&doc.index, pos);
    let keyword = |k: &str| CompletionItem {
        label: k.to_string(),
        kind: Some(CompletionItemKind::KEYWORD),
        ..Default::default()
    };
    let symbol = |s: &kelp_lang::check::Symbol| CompletionItem {
        label: s.name.clone(),
        kind: Some(CompletionItemKind::VARIABLE),
        detail: Some(s.kind.describe()),
        ..Default::default()
    };
    let items: Vec<CompletionItem> = match context(&doc.text, at) {
        Context::StatementStart => assist::STATEMENT_KEYWORDS.iter().map(|k| keyword(k)).collect(),
        Context::Setting => SETTINGS
            .iter()
            .map(|s| CompletionItem {
                label: s.name.to_string(),
                kind: Some(CompletionItemKind::PROPERTY),
                detail: Some(format!("{}; default {}", s.range_text(), s.default)),
                documentation: Some(Documentation::String(s.meaning.to_string())),
                ..Default::default()
            })
            .collect(),
        Context::Argument(kind) => {
            let fits = |k: Kind| match kind {
                ParamKind::Curve => k == Kind::Curve,
                ParamKind::Wave => k == Kind::Wave,
                ParamKind::CurveOrMatrix => matches!(k, Kind::Curve | Kind::Matrix(_)),
                ParamKind::Matrix | ParamKind::Characteristic => matches!(k, Kind::Matrix(_)),
                ParamKind::Vector | ParamKind::VectorList => matches!(k, Kind::Vector(_) | Kind::Matrix(_)),
                ParamKind::Collection => matches!(k, Kind::Vector(_) | Kind::List),
                ParamKind::Bool => k == Kind::Bool,
                ParamKind::Point => matches!(k, Kind::Point { .. }),
                ParamKind::Points => matches!(k, Kind::Point { .. } | Kind::List),
                ParamKind::Number => k == Kind::Number,
                ParamKind::Numeric => matches!(k, Kind::Number | Kind::Vector(_) | Kind::Matrix(_)),
            };
            let mut items: Vec<CompletionItem> =
                checked.symbols.iter().filter(|s| fits(s.kind) || s.kind == Kind::Unknown).map(symbol).collect();
            // Values come from calls too, except curves and waves, which only names give.
            if !matches!(kind, ParamKind::Curve | ParamKind::Wave) {
                items.extend(builtins(checked, snippets));
            }
            if kind == ParamKind::Bool {
                items.extend(["true", "false"].map(keyword));
            }
            items
        }
        Context::Expression => {
            let mut items: Vec<CompletionItem> = checked.symbols.iter().map(symbol).collect();
            items.extend(builtins(checked, snippets));
            items.extend(assist::OTHER_KEYWORDS.iter().map(|k| keyword(k)));
            items
        }
    };
    CompletionResponse::Array(items)
}

/// Built-in calls: with snippet support, tab stops whose default text parses and checks
/// as it stands; without, the plain text `name(`.
fn builtins(checked: &kelp_lang::Checked, snippets: bool) -> impl Iterator<Item = CompletionItem> + '_ {
    BUILTINS.iter().map(move |b| {
        let (insert_text, format) = if snippets {
            (assist::call_snippet(b, &checked.symbols), InsertTextFormat::SNIPPET)
        } else {
            (format!("{}(", b.name), InsertTextFormat::PLAIN_TEXT)
        };
        CompletionItem {
            label: b.name.to_string(),
            kind: Some(CompletionItemKind::FUNCTION),
            detail: Some(b.signature.to_string()),
            documentation: Some(Documentation::String(b.summary.to_string())),
            insert_text: Some(insert_text),
            insert_text_format: Some(format),
            ..Default::default()
        }
    })
}

pub fn signature_help(doc: &Doc, pos: Position) -> Option<SignatureHelp> {
    let at = convert::offset(&doc.index, pos);
    let (b, arg) = assist::call_at(&doc.text, at)?;
    let parameters: Vec<ParameterInformation> = b
        .positional
        .iter()
        .chain(b.keywords)
        .map(|p| ParameterInformation { label: ParameterLabel::Simple(p.name.to_string()), documentation: None })
        .collect();
    let active = arg.min(parameters.len().saturating_sub(1) as u32);
    Some(SignatureHelp {
        signatures: vec![SignatureInformation {
            label: b.signature.to_string(),
            documentation: Some(Documentation::String(b.summary.to_string())),
            parameters: Some(parameters),
            active_parameter: Some(active),
        }],
        active_signature: Some(0),
        active_parameter: Some(active),
    })
}
