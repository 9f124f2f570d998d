//! Typing assistance computed from the text alone: completion items, the signature of
//! the call around the cursor, and folding ranges. Protocol-free results; `mod.rs`
//! converts them.

use kelp_lang::builtins::{Builtin, BUILTINS};

pub const STATEMENT_KEYWORDS: &[&str] = &["set", "curve", "let", "wave", "expect", "sample", "plot"];
pub const OTHER_KEYWORDS: &[&str] = &["over", "to", "within", "in", "step", "and", "or", "not", "true", "false"];

/// A snippet for a call: required arguments as tab stops whose default text parses and
/// checks when accepted unchanged (a curve or wave the file defines, a small literal).
pub fn call_snippet(b: &Builtin, symbols: &[kelp_lang::check::Symbol]) -> String {
    // `$`, `}` and `\` are special inside a snippet's placeholder.
    let escape = |t: String| t.replace('\\', "\\\\").replace('$', "\\$").replace('}', "\\}");
    // Arguments whose sizes depend on each other: a small example that checks.
    if b.name == "soliton" {
        return "soliton(kappa = ${1:[1, 2]}, a = ${2:[[1, 1]]})$0".into();
    }
    let mut parts = Vec::new();
    let mut n = 1;
    for p in b.positional.iter().filter(|p| p.required) {
        parts.push(format!("${{{n}:{}}}", escape(kelp_lang::check::placeholder(p.kind, symbols, None))));
        n += 1;
    }
    for p in b.keywords.iter().filter(|p| p.required) {
        parts.push(format!("{} = ${{{n}:{}}}", p.name, escape(kelp_lang::check::placeholder(p.kind, symbols, None))));
        n += 1;
    }
    if b.region == kelp_lang::builtins::RegionUse::Required {
        parts.push(format!("${{{n}:x in -4..4, y in -4..4, t = 0}}"));
    }
    format!("{}({})$0", b.name, parts.join(", "))
}

/// The built-in whose argument list contains byte offset `at`, and the index of the
/// argument the cursor is in (commas at depth 0 before it).
pub fn call_at(text: &str, at: usize) -> Option<(&'static Builtin, u32)> {
    let b = text.as_bytes();
    let at = at.min(b.len());
    let line_start = text[..at].rfind(['\n', '\r']).map_or(0, |i| i + 1);
    let mut depth = 0i32;
    let mut commas = 0u32;
    let mut i = at;
    while i > line_start {
        i -= 1;
        match b[i] {
            b')' | b']' => depth += 1,
            b'(' | b'[' if depth > 0 => depth -= 1,
            // Inside a vector or matrix argument: its commas are not argument commas.
            b'[' => commas = 0,
            b',' if depth == 0 => commas += 1,
            b'(' => {
                let end = i;
                let mut s = end;
                while s > 0 && (b[s - 1].is_ascii_alphanumeric() || b[s - 1] == b'_') {
                    s -= 1;
                }
                let name = &text[s..end];
                return BUILTINS.iter().find(|bi| bi.name == name).map(|bi| (bi, commas));
            }
            _ => {}
        }
    }
    None
}

/// Lines to fold: runs of two or more comment lines, and statements that span lines.
/// Lines as LSP counts them (`\n`, `\r\n`, lone `\r`).
pub fn folds(text: &str, statements: &[(usize, usize)]) -> Vec<(u32, u32)> {
    use kelp_lang::span::{lines, Encoding, LineIndex};
    let mut out = Vec::new();
    let mut run: Option<(u32, u32)> = None;
    for (n, line) in lines(text).enumerate() {
        let n = n as u32;
        if line.trim_start().starts_with('#') {
            run = Some(run.map_or((n, n), |(s, _)| (s, n)));
        } else {
            if let Some((s, e)) = run.take() {
                if e > s {
                    out.push((s, e));
                }
            }
        }
    }
    if let Some((s, e)) = run {
        if e > s {
            out.push((s, e));
        }
    }
    let index = LineIndex::new(text);
    for &(a, b) in statements {
        let (la, lb) = (index.line_col(a, Encoding::Utf8).line, index.line_col(b, Encoding::Utf8).line);
        if lb > la {
            out.push((la, lb));
        }
    }
    out.sort_unstable();
    out
}

/// Semantic token types, in the order announced in the legend.
pub const TOKEN_TYPES: &[&str] = &["keyword", "variable", "function", "number", "string", "comment", "operator"];

/// (byte span, token type index) for highlighting: keywords, names (functions when
/// followed by `(`, and when a built-in), numbers, strings, comments, operators.
pub fn semantic(text: &str) -> Vec<(kelp_lang::Span, u32)> {
    use kelp_lang::lexer::{lex, Token};
    let (tokens, _) = lex(text);
    let mut out = Vec::with_capacity(tokens.len());
    for (i, &(t, span)) in tokens.iter().enumerate() {
        let kind = match t {
            Token::Comment(_) => 5,
            Token::Str(_) | Token::UnclosedStr(_) => 4,
            Token::Int(_) | Token::Decimal(_) | Token::Imag(_) | Token::ImagUnit => 3,
            Token::Ident(name) => {
                let call = matches!(tokens.get(i + 1), Some((Token::LParen, _)));
                if call && BUILTINS.iter().any(|b| b.name == name) {
                    2
                } else {
                    1
                }
            }
            Token::Newline | Token::Error | Token::LParen | Token::RParen | Token::LBracket | Token::RBracket => {
                continue
            }
            Token::Comma | Token::Colon => continue,
            Token::EqEq
            | Token::NotEq
            | Token::Le
            | Token::Ge
            | Token::Lt
            | Token::Gt
            | Token::Eq
            | Token::Plus
            | Token::Minus
            | Token::Star
            | Token::Slash
            | Token::Caret
            | Token::DotDot => 6,
            _ => 0,
        };
        out.push((span, kind));
    }
    out
}
