//! Names: go to definition, references, rename and the document's outline. Each handler
//! reads one document version; `mod.rs` holds the lock.

use super::{assist, convert, Doc};
use kelp_lang::Span;
use std::collections::HashMap;
use tower_lsp_server::jsonrpc::Result;
use tower_lsp_server::ls_types::*;

/// The name (definition or use) under a position, with its symbol index.
pub fn symbol_at(doc: &Doc, pos: Position) -> Option<(usize, Span, String)> {
    let at = convert::offset(&doc.index, pos);
    let checked = &doc.checked;
    let hit = |s: Span| s.start <= at && at <= s.end;
    if let Some((i, s)) = checked.symbols.iter().enumerate().find(|(_, s)| hit(s.span)) {
        return Some((i, s.span, s.name.clone()));
    }
    let r = checked.references.iter().find(|r| hit(r.span))?;
    Some((r.symbol, r.span, r.name.clone()))
}

pub fn definition(doc: &Doc, uri: &Uri, pos: Position) -> Option<GotoDefinitionResponse> {
    let (sym, _, _) = symbol_at(doc, pos)?;
    let s = &doc.checked.symbols[sym];
    Some(GotoDefinitionResponse::Scalar(Location { uri: uri.clone(), range: convert::range(&doc.index, s.span) }))
}

pub fn references(doc: &Doc, uri: &Uri, pos: Position, include_declaration: bool) -> Option<Vec<Location>> {
    let (sym, _, _) = symbol_at(doc, pos)?;
    let checked = &doc.checked;
    let mut spans: Vec<Span> = checked.references.iter().filter(|r| r.symbol == sym).map(|r| r.span).collect();
    if include_declaration {
        spans.insert(0, checked.symbols[sym].span);
    }
    Some(spans.into_iter().map(|s| Location { uri: uri.clone(), range: convert::range(&doc.index, s) }).collect())
}

/// Why a name cannot be renamed to `new` (or, for `prepare_rename`, why the name under
/// the cursor cannot be renamed at all): keywords, built-in functions, settings, the
/// reserved variable and axis names, and names the file already defines.
pub fn refusal(doc: &Doc, new: &str, current: Option<&str>) -> Option<String> {
    let valid = new.chars().next().is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
        && new.chars().all(|c| c.is_ascii_alphanumeric() || c == '_');
    if !valid {
        return Some(format!(
            "`{new}` is not a valid name: a name is letters, digits and `_`, not starting with a digit"
        ));
    }
    if assist::STATEMENT_KEYWORDS.iter().chain(assist::OTHER_KEYWORDS).any(|k| *k == new) || new == "i" {
        return Some(format!("`{new}` is a keyword of the language and cannot name a value"));
    }
    if kelp_lang::builtins::lookup(new).is_some() {
        return Some(format!("`{new}` is a built-in function; pick another name"));
    }
    if kelp_lang::builtins::setting_named(new).is_some() {
        return Some(format!("`{new}` is the name of a setting; pick another name"));
    }
    if ["x", "y", "z", "t"].contains(&new) {
        return Some(format!(
            "`{new}` is reserved: x, y and z are a curve equation's variables, x, y and t a region's axes"
        ));
    }
    if current != Some(new) {
        if let Some(s) = doc.checked.symbols.iter().find(|s| s.name == new) {
            let line = convert::position(&doc.index, s.span.start).line + 1;
            return Some(format!("`{new}` is already defined on line {line}; renaming would merge two names"));
        }
    }
    None
}

fn refused(message: String) -> tower_lsp_server::jsonrpc::Error {
    tower_lsp_server::jsonrpc::Error::invalid_params(message)
}

pub fn prepare_rename(doc: &Doc, pos: Position) -> Result<Option<PrepareRenameResponse>> {
    if let Some((_, span, name)) = symbol_at(doc, pos) {
        return Ok(Some(PrepareRenameResponse::RangeWithPlaceholder {
            range: convert::range(&doc.index, span),
            placeholder: name,
        }));
    }
    let at = convert::offset(&doc.index, pos);
    let Some((s, e)) = super::word_at(&doc.text, at) else {
        return Err(refused("there is no name here to rename".into()));
    };
    let word = &doc.text[s..e];
    if word.starts_with(|c: char| c.is_ascii_digit()) {
        return Err(refused("there is no name here to rename".into()));
    }
    let why = match refusal(doc, word, None) {
        // A name that resolves to nothing (an undefined name, a keyword argument).
        None => format!("`{word}` is not defined in this file, so there is nothing to rename"),
        Some(why) => why.replace("cannot name a value", "cannot be renamed").replace("; pick another name", ""),
    };
    Err(refused(why))
}

pub fn rename(doc: &Doc, uri: &Uri, pos: Position, new: String) -> Result<Option<WorkspaceEdit>> {
    let Some((sym, _, name)) = symbol_at(doc, pos) else {
        return Err(refused("there is no defined name here to rename".into()));
    };
    if let Some(why) = refusal(doc, &new, Some(&name)) {
        return Err(refused(why));
    }
    let checked = &doc.checked;
    let mut spans = vec![checked.symbols[sym].span];
    spans.extend(checked.references.iter().filter(|r| r.symbol == sym).map(|r| r.span));
    let edits =
        spans.into_iter().map(|s| TextEdit { range: convert::range(&doc.index, s), new_text: new.clone() }).collect();
    Ok(Some(WorkspaceEdit::new(HashMap::from([(uri.clone(), edits)]))))
}

pub fn outline(doc: &Doc) -> DocumentSymbolResponse {
    let checked = &doc.checked;
    #[allow(deprecated)] // `deprecated` is a required field of the LSP type
    let symbols = checked
        .symbols
        .iter()
        .map(|s| {
            let stmt = checked.program.stmts[s.stmt].span;
            DocumentSymbol {
                name: s.name.clone(),
                detail: Some(format!("{:?}", s.def).to_lowercase()),
                kind: match format!("{:?}", s.def).as_str() {
                    "Curve" => SymbolKind::CLASS,
                    "Wave" => SymbolKind::EVENT,
                    _ => SymbolKind::VARIABLE,
                },
                tags: None,
                deprecated: None,
                range: convert::range(&doc.index, stmt),
                selection_range: convert::range(&doc.index, s.span),
                children: None,
            }
        })
        .collect();
    DocumentSymbolResponse::Nested(symbols)
}
