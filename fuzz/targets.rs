//! The properties every fuzz target checks, shared by the cargo-fuzz targets (nightly,
//! `fuzz/fuzz_targets/`) and the stable mutation runner (`tests/examples/fuzz_stable.rs`):
//! no panic, spans inside the input on character boundaries, and a formatter that reaches
//! a fixed point and keeps the syntax tree.

// Each cargo-fuzz binary uses one target of the four.
#![allow(dead_code)]

/// Bytes as the command line reads them: invalid UTF-8 replaced (and reported there).
pub fn text(data: &[u8]) -> String {
    String::from_utf8_lossy(data).into_owned()
}

pub fn lexer(data: &[u8]) {
    let src = text(data);
    let (tokens, diags) = kelp_lang::lexer::lex(&src);
    for (_, s) in &tokens {
        assert!(s.end <= src.len() && s.start <= s.end);
    }
    for d in &diags {
        assert!(src.is_char_boundary(d.span.start) && src.is_char_boundary(d.span.end));
    }
}

pub fn parser(data: &[u8]) {
    let src = text(data);
    let p = kelp_lang::parse(&src);
    for d in &p.diagnostics {
        assert!(d.span.end <= src.len() && src.is_char_boundary(d.span.start) && src.is_char_boundary(d.span.end));
    }
}

pub fn checker(data: &[u8]) {
    let src = text(data);
    let c = kelp_lang::check(&src);
    for d in &c.diagnostics {
        assert!(d.span.end <= src.len() && src.is_char_boundary(d.span.start) && src.is_char_boundary(d.span.end));
    }
    let _ = kelp_lang::render::render("fuzz.kelp", &src, &c.diagnostics, false);
}

/// The syntax tree without spans, for comparing a file with its formatted form.
pub fn shape(src: &str) -> String {
    let s = format!("{:?}", kelp_lang::parse(src).program.stmts);
    let mut out = String::with_capacity(s.len());
    let mut rest = s.as_str();
    while let Some(i) = rest.find("Span { start: ") {
        out.push_str(&rest[..i]);
        let j = rest[i..].find('}').expect("a span closes");
        rest = &rest[i + j + 1..];
    }
    out.push_str(rest);
    out
}

pub fn formatter(data: &[u8]) {
    let src = text(data);
    let once = kelp_lang::fmt::format(&src);
    assert_eq!(kelp_lang::fmt::format(&once), once, "formatting twice changes the text");
    if !kelp_lang::check(&src).has_errors() {
        assert_eq!(shape(&once), shape(&src), "formatting changed the syntax tree");
    }
}

pub const TARGETS: [(&str, fn(&[u8])); 4] =
    [("lexer", lexer), ("parser", parser), ("checker", checker), ("formatter", formatter)];
