//! Tokens of the experiment language (logos). Comments and line breaks are tokens too:
//! the statement splitter needs the breaks and the formatter keeps the comments.

use crate::diag::{Code, Diagnostic};
use crate::span::Span;
use logos::Logos;

#[derive(Logos, Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[logos(skip r"[ \t\f\x0B]+")]
pub enum Token<'a> {
    #[token("set")]
    Set,
    #[token("curve")]
    Curve,
    #[token("let")]
    Let,
    #[token("wave")]
    Wave,
    #[token("expect")]
    Expect,
    #[token("sample")]
    Sample,
    #[token("plot")]
    Plot,
    #[token("over")]
    Over,
    #[token("to")]
    To,
    #[token("in")]
    In,
    #[token("step")]
    Step,
    #[token("within")]
    Within,
    #[token("and")]
    And,
    #[token("or")]
    Or,
    #[token("not")]
    Not,
    #[token("true")]
    True,
    #[token("false")]
    False,
    /// The imaginary unit `i` (so `i` is not available as a name).
    #[token("i", priority = 5)]
    ImagUnit,

    #[regex(r"[A-Za-z_][A-Za-z0-9_]*", |lex| lex.slice())]
    Ident(&'a str),
    #[regex(r"[0-9]+", |lex| lex.slice())]
    Int(&'a str),
    #[regex(r"[0-9]+\.[0-9]+([eE][+-]?[0-9]+)?|[0-9]+[eE][+-]?[0-9]+", |lex| lex.slice())]
    Decimal(&'a str),
    /// `2i`, `0.05i`, `1e-3i`: the text includes the trailing `i`.
    #[regex(r"[0-9]+(\.[0-9]+)?([eE][+-]?[0-9]+)?i", |lex| lex.slice())]
    Imag(&'a str),
    /// A string literal; the text includes the quotes.
    #[regex(r#""([^"\\\n\r]|\\[^\n\r])*""#, |lex| lex.slice())]
    Str(&'a str),
    /// A string that runs to the end of the line without its closing quote.
    #[regex(r#""([^"\\\n\r]|\\[^\n\r])*"#, |lex| lex.slice())]
    UnclosedStr(&'a str),
    /// `# ...` to the end of the line; the text includes the `#`.
    #[regex(r"#[^\n\r]*", |lex| lex.slice(), allow_greedy = true)]
    Comment(&'a str),
    #[regex(r"\r?\n|\r")]
    Newline,

    #[token("==")]
    EqEq,
    #[token("!=")]
    NotEq,
    #[token("<=")]
    Le,
    #[token(">=")]
    Ge,
    #[token("<")]
    Lt,
    #[token(">")]
    Gt,
    #[token("=")]
    Eq,
    #[token("+")]
    Plus,
    #[token("-")]
    Minus,
    #[token("*")]
    Star,
    #[token("/")]
    Slash,
    #[token("^")]
    Caret,
    #[token("..")]
    DotDot,
    #[token(":")]
    Colon,
    #[token(",")]
    Comma,
    #[token("(")]
    LParen,
    #[token(")")]
    RParen,
    #[token("[")]
    LBracket,
    #[token("]")]
    RBracket,

    /// Anything the language does not know; reported once by the lexer.
    Error,
}

impl Token<'_> {
    /// Keywords that can only begin a statement: a line starting with one always starts
    /// a new statement, even inside an unclosed bracket (this bounds recovery damage).
    pub fn starts_statement(&self) -> bool {
        matches!(
            self,
            Token::Set | Token::Curve | Token::Let | Token::Wave | Token::Expect | Token::Sample | Token::Plot
        )
    }

    pub fn describe(&self) -> String {
        match self {
            Token::Ident(s) => format!("name `{s}`"),
            Token::Int(s) | Token::Decimal(s) => format!("number `{s}`"),
            Token::Imag(s) => format!("imaginary number `{s}`"),
            Token::Str(s) | Token::UnclosedStr(s) => format!("string {s}"),
            Token::Comment(_) => "comment".into(),
            Token::Newline => "end of line".into(),
            Token::Error => "unknown character".into(),
            t => format!("`{}`", t.text()),
        }
    }

    /// The canonical source text of a token.
    pub fn text(&self) -> &str {
        match self {
            Token::Set => "set",
            Token::Curve => "curve",
            Token::Let => "let",
            Token::Wave => "wave",
            Token::Expect => "expect",
            Token::Sample => "sample",
            Token::Plot => "plot",
            Token::Over => "over",
            Token::To => "to",
            Token::In => "in",
            Token::Step => "step",
            Token::Within => "within",
            Token::And => "and",
            Token::Or => "or",
            Token::Not => "not",
            Token::True => "true",
            Token::False => "false",
            Token::ImagUnit => "i",
            Token::Ident(s)
            | Token::Int(s)
            | Token::Decimal(s)
            | Token::Imag(s)
            | Token::Str(s)
            | Token::UnclosedStr(s)
            | Token::Comment(s) => s,
            Token::Newline => "\n",
            Token::EqEq => "==",
            Token::NotEq => "!=",
            Token::Le => "<=",
            Token::Ge => ">=",
            Token::Lt => "<",
            Token::Gt => ">",
            Token::Eq => "=",
            Token::Plus => "+",
            Token::Minus => "-",
            Token::Star => "*",
            Token::Slash => "/",
            Token::Caret => "^",
            Token::DotDot => "..",
            Token::Colon => ":",
            Token::Comma => ",",
            Token::LParen => "(",
            Token::RParen => ")",
            Token::LBracket => "[",
            Token::RBracket => "]",
            Token::Error => "?",
        }
    }
}

/// Lexes the whole text. Never fails: unknown characters become `Token::Error` with a
/// diagnostic (consecutive unknown characters are reported once).
pub fn lex(src: &str) -> (Vec<(Token<'_>, Span)>, Vec<Diagnostic>) {
    // About one token per 2.4 bytes in typical files: reserving up front saves the
    // reallocations (and page faults) of growing a multi-megabyte vector.
    let mut out: Vec<(Token, Span)> = Vec::with_capacity(src.len() / 2 + 16);
    let mut diags = Vec::new();
    let mut lexer = Token::lexer(src);
    // A UTF-8 byte-order mark opening the file is not text (editors on some systems write
    // one); byte offsets stay those of the whole file.
    if src.starts_with('\u{FEFF}') {
        lexer.bump('\u{FEFF}'.len_utf8());
    }
    while let Some(res) = lexer.next() {
        let span: Span = lexer.span().into();
        match res {
            Ok(Token::UnclosedStr(s)) => {
                diags.push(
                    Diagnostic::error(Code::UnclosedDelimiter, span, "string is not closed")
                        .with_note("add a closing `\"` before the end of the line"),
                );
                out.push((Token::UnclosedStr(s), span));
            }
            Ok(tok) => out.push((tok, span)),
            Err(()) => {
                if let Some((Token::Error, prev)) = out.last_mut() {
                    if prev.end == span.start {
                        prev.end = span.end;
                        if let Some(d) = diags.last_mut() {
                            d.span.end = span.end;
                            d.message = format!("unexpected characters `{}`", &src[prev.range()]);
                        }
                        continue;
                    }
                }
                let text = &src[span.range()];
                let mut d = Diagnostic::error(Code::BadToken, span, format!("unexpected character `{text}`"));
                if text.starts_with('.') {
                    d = d.with_note("write decimals with a leading digit, e.g. `0.5`");
                } else if !text.is_ascii() {
                    d = d.with_note("names and operators are ASCII; other text belongs in comments or strings");
                }
                diags.push(d);
                out.push((Token::Error, span));
            }
        }
    }
    (out, diags)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(src: &str) -> Vec<Token<'_>> {
        lex(src).0.into_iter().map(|(t, _)| t).collect()
    }

    #[test]
    fn a_leading_byte_order_mark_is_not_text() {
        // U+FEFF at the start of a UTF-8 file is a byte-order mark (Unicode Standard,
        // sec. 23.8; from memory); elsewhere it stays an unexpected character.
        let (toks, diags) = lex("\u{FEFF}expect 1 == 1");
        assert!(diags.is_empty(), "{diags:?}");
        assert_eq!(toks[0].0, Token::Expect);
        assert_eq!(toks[0].1.start, 3, "offsets stay those of the whole file");
        assert!(!lex("expect 1 \u{FEFF}== 1").1.is_empty());
    }

    #[test]
    fn ranges_do_not_lex_as_decimals() {
        assert_eq!(kinds("-4..4"), vec![Token::Minus, Token::Int("4"), Token::DotDot, Token::Int("4")]);
    }

    #[test]
    fn numbers_of_every_shape() {
        assert_eq!(
            kinds("1/2 1e-10 0.05i 2i i 3.5E+2"),
            vec![
                Token::Int("1"),
                Token::Slash,
                Token::Int("2"),
                Token::Decimal("1e-10"),
                Token::Imag("0.05i"),
                Token::Imag("2i"),
                Token::ImagUnit,
                Token::Decimal("3.5E+2"),
            ]
        );
    }

    #[test]
    fn keywords_versus_names() {
        assert_eq!(
            kinds("set settings in inside"),
            vec![Token::Set, Token::Ident("settings"), Token::In, Token::Ident("inside")]
        );
    }

    #[test]
    fn bad_characters_are_reported_once_per_run() {
        let (toks, diags) = lex("let a = 1 @@ 2 # ok\n");
        assert_eq!(diags.len(), 1);
        assert_eq!(diags[0].span, Span::new(10, 12));
        assert!(toks.iter().any(|(t, _)| matches!(t, Token::Comment("# ok"))));
    }

    #[test]
    fn unclosed_string_is_reported() {
        let (_, diags) = lex("sample w over x in 0..1 to \"out/a.csv\n");
        assert_eq!(diags[0].code, Code::UnclosedDelimiter);
    }
}
