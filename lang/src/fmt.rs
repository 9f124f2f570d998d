//! The canonical formatter behind `kelp fmt`. One statement per line, canonical spacing,
//! at most one blank line in a row, comments kept (trailing comments of neighbouring
//! lines aligned). A statement that does not parse, or that has a comment inside it, is
//! kept as written. Formatting is idempotent. Line breaks are written in the style of
//! the file's first one (`\n`, `\r\n` or a lone `\r`; none: `\n`), as rustfmt's
//! `newline_style = "Auto"` does, and a leading byte-order mark is kept: the formatter
//! changes layout, not encoding.

use crate::ast::*;
use crate::parser::parse;

enum Item {
    Blank,
    Comment(String),
    Line { code: String, trailing: Option<String> },
}

pub fn format(src: &str) -> String {
    let parsed = parse(src);
    let program = &parsed.program;
    let mut items: Vec<Item> = Vec::new();
    let mut comments = program.comments.iter().peekable();
    let mut last_end = 0usize;
    let blank_between = |a: usize, b: usize| a < b && line_breaks(&src[a..b]) >= 2;
    for (k, stmt) in program.stmts.iter().enumerate() {
        let next_start = program.stmts.get(k + 1).map_or(src.len(), |n| n.span.start);
        // Comments before the statement, each on its own line.
        while let Some(c) = comments.next_if(|c| c.span.start < stmt.span.start) {
            if !items.is_empty() && blank_between(last_end, c.span.start) {
                items.push(Item::Blank);
            }
            items.push(Item::Comment(c.text.trim_end().to_string()));
            last_end = c.span.end;
        }
        if !items.is_empty() && blank_between(last_end, stmt.span.start) {
            items.push(Item::Blank);
        }
        let inner_comment = comments.peek().is_some_and(|c| c.span.start < stmt.span.end);
        let code = if matches!(stmt.kind, StmtKind::Error) || inner_comment {
            // Kept verbatim, with the comments it contains.
            while comments.next_if(|c| c.span.start < stmt.span.end).is_some() {}
            src[stmt.span.range()].trim_end_matches(lexer_space).to_string()
        } else {
            stmt_text(stmt)
        };
        last_end = stmt.span.end;
        let trailing = comments
            .next_if(|c| {
                (stmt.span.end..next_start).contains(&c.span.start)
                    && line_breaks(&src[stmt.span.end..c.span.start]) == 0
            })
            .map(|c| {
                last_end = c.span.end;
                c.text.trim_end().to_string()
            });
        items.push(Item::Line { code, trailing });
    }
    for c in comments {
        if !items.is_empty() && blank_between(last_end, c.span.start) {
            items.push(Item::Blank);
        }
        items.push(Item::Comment(c.text.trim_end().to_string()));
        last_end = c.span.end;
    }
    let out = render(&items);
    // Text kept verbatim may hold any break; breaks only separate (strings and comments
    // cannot contain one), so all become the file's style.
    let out = out.replace("\r\n", "\n").replace('\r', "\n");
    let out = match first_break(src) {
        "\n" => out,
        style => out.replace('\n', style),
    };
    if src.starts_with('\u{FEFF}') {
        format!("\u{FEFF}{out}")
    } else {
        out
    }
}

/// The first line break of the text (`\n` when it has none).
fn first_break(src: &str) -> &'static str {
    match src.find(['\n', '\r']) {
        Some(i) if src[i..].starts_with("\r\n") => "\r\n",
        Some(i) if src[i..].starts_with('\r') => "\r",
        _ => "\n",
    }
}

/// Line breaks as the lexer counts them: `\n`, `\r\n` and a lone `\r`.
fn line_breaks(s: &str) -> usize {
    s.matches('\n').count() + s.matches('\r').count() - s.matches("\r\n").count()
}

/// What the lexer skips or ends a line with: only this may be trimmed from text kept
/// verbatim (trimming any other whitespace, say a no-break space, could make a broken
/// statement parse on the next run and break idempotence).
fn lexer_space(c: char) -> bool {
    matches!(c, ' ' | '\t' | '\x0b' | '\x0c' | '\r' | '\n')
}

fn render(items: &[Item]) -> String {
    let mut out = String::new();
    let mut i = 0;
    while i < items.len() {
        match &items[i] {
            Item::Blank => out.push('\n'),
            Item::Comment(c) => {
                out.push_str(c);
                out.push('\n');
            }
            Item::Line { .. } => {
                // A run of consecutive single-line statements with trailing comments
                // shares one comment column.
                let mut j = i;
                while j < items.len()
                    && matches!(&items[j], Item::Line { code, trailing: Some(_) } if !code.contains('\n'))
                {
                    j += 1;
                }
                if j == i {
                    if let Item::Line { code, trailing } = &items[i] {
                        out.push_str(code);
                        if let Some(t) = trailing {
                            out.push_str("  ");
                            out.push_str(t);
                        }
                        out.push('\n');
                    }
                    i += 1;
                    continue;
                }
                let width = items[i..j]
                    .iter()
                    .map(|it| if let Item::Line { code, .. } = it { code.chars().count() } else { 0 })
                    .max()
                    .unwrap_or(0);
                for it in &items[i..j] {
                    if let Item::Line { code, trailing: Some(t) } = it {
                        let pad = width - code.chars().count() + 2;
                        out.push_str(code);
                        out.extend(std::iter::repeat_n(' ', pad));
                        out.push_str(t);
                        out.push('\n');
                    }
                }
                i = j;
                continue;
            }
        }
        i += 1;
    }
    out
}

pub fn stmt_text(stmt: &Stmt) -> String {
    match &stmt.kind {
        StmtKind::Set { name, value } => format!("set {} = {}", name.name, expr_text(value)),
        StmtKind::Curve { name, lhs, rhs } => match rhs {
            Some(r) => format!("curve {}: {} = {}", name.name, expr_text(lhs), expr_text(r)),
            None => format!("curve {}: {}", name.name, expr_text(lhs)),
        },
        StmtKind::Let { name, value } => format!("let {} = {}", name.name, expr_text(value)),
        StmtKind::Wave { name, value } => format!("wave {} = {}", name.name, expr_text(value)),
        StmtKind::Expect { claim, within } => match within {
            Some(t) => format!("expect {} within {}", expr_text(claim), expr_text(t)),
            None => format!("expect {}", expr_text(claim)),
        },
        StmtKind::Output { kind, wave, region, path } => format!(
            "{} {} over {} to {}",
            kind.keyword(),
            wave.name,
            region.iter().map(axis_text).collect::<Vec<_>>().join(", "),
            quote(&path.value)
        ),
        StmtKind::Error => String::new(),
    }
}

fn quote(s: &str) -> String {
    let mut out = String::from("\"");
    for c in s.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\t' => out.push_str("\\t"),
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

fn axis_text(a: &Axis) -> String {
    match &a.kind {
        AxisKind::Fixed(v) => format!("{} = {}", a.name.name, expr_text(v)),
        AxisKind::Range { lo, hi, step } => {
            let mut s = format!("{} in {}..{}", a.name.name, expr_text(lo), expr_text(hi));
            if let Some(h) = step {
                s.push_str(" step ");
                s.push_str(&expr_text(h));
            }
            s
        }
    }
}

pub fn expr_text(e: &Expr) -> String {
    match &e.kind {
        ExprKind::Number(t) => t.clone(),
        ExprKind::Imag(t) if t == "1" => "i".into(),
        ExprKind::Imag(t) => format!("{t}i"),
        ExprKind::Bool(b) => b.to_string(),
        ExprKind::Str(s) => quote(s),
        ExprKind::Name(n) => n.clone(),
        ExprKind::Call { func, args } => {
            let args: Vec<String> = args
                .iter()
                .map(|a| match a {
                    Arg::Positional(e) => expr_text(e),
                    Arg::Keyword { name, value } => format!("{} = {}", name.name, expr_text(value)),
                    Arg::Axis(ax) => axis_text(ax),
                })
                .collect();
            format!("{}({})", func.name, args.join(", "))
        }
        ExprKind::List(items) => format!("[{}]", items.iter().map(expr_text).collect::<Vec<_>>().join(", ")),
        ExprKind::Point { coords, projective } => {
            let sep = if *projective { " : " } else { ", " };
            format!("({})", coords.iter().map(expr_text).collect::<Vec<_>>().join(sep))
        }
        ExprKind::Paren(inner) => format!("({})", expr_text(inner)),
        ExprKind::Index { base, indices } => {
            format!("{}[{}]", expr_text(base), indices.iter().map(expr_text).collect::<Vec<_>>().join(", "))
        }
        ExprKind::Unary { op: UnOp::Neg, operand } => format!("-{}", expr_text(operand)),
        ExprKind::Unary { op: UnOp::Not, operand } => format!("not {}", expr_text(operand)),
        ExprKind::Binary { op, lhs, rhs } => {
            if *op == BinOp::Pow || (matches!(op, BinOp::Mul | BinOp::Div) && is_tight(lhs) && is_tight(rhs)) {
                format!("{}{}{}", expr_text(lhs), op.text(), expr_text(rhs))
            } else {
                format!("{} {} {}", expr_text(lhs), op.text(), expr_text(rhs))
            }
        }
        ExprKind::Error => "?".into(),
    }
}

/// Products of simple factors print without spaces (`5*x^3`); others spaced
/// (`(a + b) * 2`).
fn is_tight(e: &Expr) -> bool {
    match &e.kind {
        ExprKind::Number(_) | ExprKind::Imag(_) | ExprKind::Name(_) | ExprKind::Call { .. } => true,
        ExprKind::Index { .. } => true,
        ExprKind::Binary { op: BinOp::Pow, .. } => true,
        ExprKind::Binary { op: BinOp::Mul | BinOp::Div, lhs, rhs } => is_tight(lhs) && is_tight(rhs),
        ExprKind::Unary { op: UnOp::Neg, operand } => is_tight(operand),
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::format;

    // Expected layout: the canonical form `kelp fmt` gives the `\n` file (one statement per
    // line, a blank line kept); line-ending style of the first break: rustfmt's
    // `newline_style = "Auto"` (its documentation).
    #[test]
    fn line_endings_follow_the_first_break_and_a_bom_is_kept() {
        let lf = "let  a=1\n\n# note\nlet b = ( 1 +\n 2 # inside\n)\nexpect a==1\n";
        let want = format(lf);
        assert!(!want.contains('\r'), "{want:?}");
        for style in ["\r\n", "\r"] {
            let src = lf.replace('\n', style);
            assert_eq!(format(&src), want.replace('\n', style), "{style:?}");
            assert_eq!(format(&format(&src)), format(&src), "idempotent");
        }
        // Mixed: the first break decides, every break follows it.
        let mixed = "let  a=1\r\nlet b = (1 +\r 2 # inside\n)\n";
        let out = format(mixed);
        assert_eq!(out.replace("\r\n", ""), out.replace("\r\n", "").replace(['\r', '\n'], ""));
        assert_eq!(out.matches("\r\n").count(), 4, "{out:?}");
        assert_eq!(format(&out), out);
        assert_eq!(format("\u{FEFF}let  a=1\n"), "\u{FEFF}let a = 1\n");
    }
}
