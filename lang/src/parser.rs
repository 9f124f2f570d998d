//! Statement splitting and the chumsky grammar.
//!
//! The language is line-oriented: a statement ends at a line break outside brackets, and
//! a line that starts with a statement keyword always starts a new statement. Each
//! statement is parsed on its own, so one broken statement never hides the others.

use crate::ast::*;
use crate::diag::{Code, Diagnostic, Fix};
use crate::lexer::{lex, Token};
use crate::span::Span;
use chumsky::error::{RichPattern, RichReason};
use chumsky::extra::ParserExtra;
use chumsky::input::{Input as _, ValueInput};
use chumsky::label::LabelError;
use chumsky::prelude::*;
use chumsky::DefaultExpected;

pub struct Parsed {
    pub program: Program,
    pub diagnostics: Vec<Diagnostic>,
}

type Extra<'t, 's> = extra::Err<Rich<'t, Token<'s>, SimpleSpan>>;

fn sp(s: SimpleSpan) -> Span {
    Span::new(s.start, s.end)
}

/// Parses a whole file. Never fails: broken statements become `StmtKind::Error`.
pub fn parse(src: &str) -> Parsed {
    // Asked once per process: on Linux the answer reads cgroup files, too slow for every
    // keystroke of an editor.
    static THREADS: std::sync::OnceLock<usize> = std::sync::OnceLock::new();
    parse_on(src, *THREADS.get_or_init(|| std::thread::available_parallelism().map_or(1, |n| n.get()).min(4)))
}

fn parse_on(src: &str, threads: usize) -> Parsed {
    let (tokens, mut diagnostics) = lex(src);
    let mut comments = Vec::new();
    let (sig, ends) = split_statements(&tokens, &mut comments);
    let stmts = parse_statements(&sig, &ends, threads, &mut diagnostics);
    Parsed { program: Program { stmts, comments }, diagnostics }
}

/// Files below this many tokens are parsed on the calling thread; above it the statements
/// are cut into consecutive runs parsed on scoped threads (each statement stands alone,
/// so the result is the same, in the same order).
const PARALLEL_TOKENS: usize = 4096;

fn parse_statements(
    sig: &[(Token, SimpleSpan)],
    ends: &[usize],
    threads: usize,
    diagnostics: &mut Vec<Diagnostic>,
) -> Vec<Stmt> {
    if threads < 2 || sig.len() < PARALLEL_TOKENS {
        return parse_run(sig, 0, ends, diagnostics);
    }
    // Cut `ends` where the token count passes each 1/threads share.
    let mut cuts = vec![0];
    for (k, &end) in ends.iter().enumerate() {
        if end * threads >= sig.len() * cuts.len() && k + 1 < ends.len() {
            cuts.push(k + 1);
        }
    }
    cuts.push(ends.len());
    let runs: Vec<(Vec<Stmt>, Vec<Diagnostic>)> = std::thread::scope(|scope| {
        let handles: Vec<_> = cuts
            .windows(2)
            .map(|w| {
                let (from, to) = (w[0], w[1]);
                let start = if from == 0 { 0 } else { ends[from - 1] };
                std::thread::Builder::new()
                    .stack_size(crate::STACK_BYTES)
                    .spawn_scoped(scope, move || {
                        let mut diags = Vec::new();
                        (parse_run(sig, start, &ends[from..to], &mut diags), diags)
                    })
                    .expect("spawning a parser thread")
            })
            .collect();
        handles.into_iter().map(|h| h.join().unwrap_or_else(|p| std::panic::resume_unwind(p))).collect()
    });
    let mut stmts = Vec::with_capacity(ends.len());
    for (s, d) in runs {
        stmts.extend(s);
        diagnostics.extend(d);
    }
    stmts
}

/// Parses the statements whose trivia-free tokens end at `ends`, the first one starting at
/// `start` in `sig`.
fn parse_run(
    sig: &[(Token, SimpleSpan)],
    start: usize,
    ends: &[usize],
    diagnostics: &mut Vec<Diagnostic>,
) -> Vec<Stmt> {
    // Most statements are fine: parse with a cheap error type first, and only re-parse
    // a failing statement with rich errors to say what went wrong.
    let fast = stmt_parser::<TokInput, extra::Default>();
    let rich = stmt_parser::<TokInput, Extra>();
    let mut stmts = Vec::with_capacity(ends.len());
    let mut at = start;
    for &end in ends {
        stmts.push(parse_group(&fast, &rich, &sig[at..end], diagnostics));
        at = end;
    }
    stmts
}

type TokInput<'t, 's> = chumsky::input::MappedInput<'t, Token<'s>, SimpleSpan, &'t [(Token<'s>, SimpleSpan)]>;

/// Brackets one statement may nest (deeper input would exhaust the stack of the parser,
/// the checker or the evaluator, which recurse over the tree).
pub const MAX_NESTING: usize = 256;
/// Tokens one statement may hold (bounding the depth of operator chains likewise; a dense
/// degree-64 equation needs about 20,000).
pub const MAX_STATEMENT_TOKENS: usize = 40_000;

/// A statement beyond the nesting or size limits: refused with a diagnostic at the token
/// that crosses the limit, never parsed (so never a stack overflow).
fn too_complex(group: &[(Token, SimpleSpan)]) -> Option<Diagnostic> {
    if group.len() > MAX_STATEMENT_TOKENS {
        return Some(Diagnostic::error(
            Code::TooComplex,
            sp(group[MAX_STATEMENT_TOKENS].1),
            format!("this statement has {} tokens; the limit is {MAX_STATEMENT_TOKENS}", group.len()),
        ));
    }
    let mut depth = 0usize;
    // A run of prefix operators (`- - - x`, `not not x`) nests like brackets do.
    let mut prefix_run = 0usize;
    for &(t, span) in group {
        match t {
            Token::LParen | Token::LBracket => depth += 1,
            Token::RParen | Token::RBracket => depth = depth.saturating_sub(1),
            _ => {}
        }
        prefix_run = if matches!(t, Token::Minus | Token::Not | Token::Caret) { prefix_run + 1 } else { 0 };
        if depth > MAX_NESTING || prefix_run > MAX_NESTING {
            return Some(Diagnostic::error(
                Code::TooComplex,
                sp(span),
                format!("expressions may nest at most {MAX_NESTING} deep"),
            ));
        }
    }
    None
}

/// Cuts the token stream into statements in one pass: the trivia-free tokens of every
/// statement in order, and where each statement's run of them ends. A statement ends at
/// a line break outside brackets, or where a line starts with a statement keyword.
/// Comments are collected on the way.
#[allow(clippy::type_complexity)]
fn split_statements<'s>(
    tokens: &[(Token<'s>, Span)],
    comments: &mut Vec<Comment>,
) -> (Vec<(Token<'s>, SimpleSpan)>, Vec<usize>) {
    let mut sig: Vec<(Token, SimpleSpan)> = Vec::with_capacity(tokens.len());
    let mut ends = Vec::new();
    let mut depth = 0i32;
    let mut at_line_start = true;
    for &(tok, span) in tokens {
        match tok {
            Token::Comment(text) => {
                comments.push(Comment { text: text.to_string(), span });
                continue;
            }
            Token::Newline => {
                if depth <= 0 {
                    if ends.last() != Some(&sig.len()) && !sig.is_empty() {
                        ends.push(sig.len());
                    }
                    depth = 0;
                }
                at_line_start = true;
                continue;
            }
            _ => {}
        }
        if at_line_start && tok.starts_statement() {
            if ends.last() != Some(&sig.len()) && !sig.is_empty() {
                ends.push(sig.len());
            }
            depth = 0;
        }
        at_line_start = false;
        sig.push((tok, SimpleSpan::from(span.range())));
        match tok {
            Token::LParen | Token::LBracket => depth += 1,
            Token::RParen | Token::RBracket => depth -= 1,
            _ => {}
        }
    }
    if ends.last() != Some(&sig.len()) && !sig.is_empty() {
        ends.push(sig.len());
    }
    (sig, ends)
}

const STATEMENT_WORDS: &[&str] = &["set", "curve", "let", "wave", "expect", "sample", "plot"];
const STATEMENT_KEYWORDS: &str = "`set`, `curve`, `let`, `wave`, `expect`, `sample` or `plot`";

fn parse_group<'t, 's: 't, F, P>(
    fast: &F,
    rich: &P,
    group: &'t [(Token<'s>, SimpleSpan)],
    diags: &mut Vec<Diagnostic>,
) -> Stmt
where
    F: Parser<'t, TokInput<'t, 's>, StmtKind, extra::Default>,
    P: Parser<'t, TokInput<'t, 's>, StmtKind, Extra<'t, 's>>,
{
    let span = sp(group[0].1).join(sp(group[group.len() - 1].1));
    let error = Stmt { kind: StmtKind::Error, span };
    // The lexer has reported these already; parsing would only repeat the complaint.
    if group.iter().any(|(t, _)| matches!(t, Token::Error | Token::UnclosedStr(_))) {
        return error;
    }
    let first = group[0];
    if !first.0.starts_statement() {
        let mut d = Diagnostic::error(
            Code::UnknownStatement,
            sp(first.1),
            format!("a statement starts with {STATEMENT_KEYWORDS}, not {}", first.0.describe()),
        );
        if matches!(first.0, Token::Ident(_)) && matches!(group.get(1), Some((Token::Eq, _))) {
            d = d.with_note(format!("to name a value, write `let {} = ...`", first.0.text()));
        }
        if let Token::Ident(word) = first.0 {
            if let Some(k) = crate::suggest::closest(word, STATEMENT_WORDS.iter().copied()) {
                d = d.with_note(format!("did you mean `{k}`?")).with_fix(Fix::replace(
                    format!("change to `{k}`"),
                    sp(first.1),
                    k,
                ));
            }
        }
        diags.push(d);
        return error;
    }
    if let Some(d) = too_complex(group) {
        diags.push(d);
        return error;
    }
    if let Some(d) = unclosed_delimiter(group) {
        diags.push(d);
        return error;
    }
    let eoi: SimpleSpan = (span.end..span.end).into();
    let input = group.map(eoi, (|(t, s)| (t, s)) as fn(&'t (Token<'s>, SimpleSpan)) -> (&'t Token<'s>, &'t SimpleSpan));
    if let Some(kind) = fast.parse(input).into_output() {
        return Stmt { kind, span };
    }
    let input = group.map(eoi, (|(t, s)| (t, s)) as fn(&'t (Token<'s>, SimpleSpan)) -> (&'t Token<'s>, &'t SimpleSpan));
    let (out, errs) = rich.parse(input).into_output_errors();
    match (out, errs.into_iter().next()) {
        (Some(kind), None) => Stmt { kind, span },
        (_, Some(e)) => {
            diags.push(rich_to_diagnostic(&e, group));
            error
        }
        (None, None) => error,
    }
}

fn unclosed_delimiter(group: &[(Token, SimpleSpan)]) -> Option<Diagnostic> {
    let mut stack: Vec<(Token, SimpleSpan)> = Vec::new();
    for &(t, s) in group {
        match t {
            Token::LParen | Token::LBracket => stack.push((t, s)),
            Token::RParen | Token::RBracket => {
                stack.pop();
            }
            _ => {}
        }
    }
    let (open, s) = stack.first().copied()?;
    let close = if open == Token::LParen { ")" } else { "]" };
    Some(
        Diagnostic::error(Code::UnclosedDelimiter, sp(s), format!("`{}` is not closed", open.text()))
            .with_note(format!("add `{close}` before the end of the statement")),
    )
}

fn describe_pattern(p: &RichPattern<Token>) -> String {
    match p {
        RichPattern::Token(t) => t.describe(),
        RichPattern::Label(l) => l.to_string(),
        RichPattern::EndOfInput => "end of statement".into(),
        _ => "something else".into(),
    }
}

fn rich_to_diagnostic(e: &Rich<Token, SimpleSpan>, group: &[(Token, SimpleSpan)]) -> Diagnostic {
    let last = sp(group[group.len() - 1].1);
    let span = if e.span().start >= last.end { last } else { sp(*e.span()) };
    let message = match e.reason() {
        RichReason::ExpectedFound { expected, found } => {
            let mut names: Vec<String> = expected.iter().map(describe_pattern).collect();
            names.sort();
            names.dedup();
            if names.iter().any(|n| n == "expression") {
                names.retain(|n| n != "`-`" && n != "`not`");
            }
            // After a complete value, the long list of operators says less than this.
            let ops = ["`+`", "`*`", "`==`", "end of statement"];
            if names.len() > 4 && ops.iter().all(|o| names.iter().any(|n| n == o)) {
                names = vec!["an operator".into(), "the end of the statement".into()];
            }
            let found = match found {
                Some(t) => t.describe(),
                None => "the end of the statement".into(),
            };
            if names.is_empty() {
                format!("unexpected {found}")
            } else if names.len() == 1 {
                format!("expected {}, found {found}", names[0])
            } else {
                let last = names.pop().unwrap();
                format!("expected {} or {last}, found {found}", names.join(", "))
            }
        }
        RichReason::Custom(msg) => msg.to_string(),
    };
    let mut d = Diagnostic::error(Code::UnexpectedToken, span, message);
    // A claim compares with `==`; a lone `=` there is the usual slip.
    if group[0].0 == Token::Expect && e.found() == Some(&Token::Eq) {
        d = d.with_note("a claim compares with `==`").with_fix(Fix::replace("change `=` to `==`", span, "=="));
    }
    // A common slip: juxtaposition is not multiplication.
    if let Some(i) = group.iter().position(|(_, s)| s.start == e.span().start) {
        if i > 0
            && matches!(group[i - 1].0, Token::Int(_) | Token::Decimal(_))
            && matches!(group[i].0, Token::Ident(_) | Token::LParen)
        {
            d = d.with_note(format!(
                "write multiplication explicitly, e.g. `{}*{}`",
                group[i - 1].0.text(),
                group[i].0.text()
            ));
        }
    }
    d
}

fn unescape(quoted: &str) -> String {
    let inner = &quoted[1..quoted.len() - 1];
    let mut out = String::with_capacity(inner.len());
    let mut chars = inner.chars();
    while let Some(c) = chars.next() {
        if c == '\\' {
            match chars.next() {
                Some('n') => out.push('\n'),
                Some('t') => out.push('\t'),
                Some(o) => out.push(o),
                None => {}
            }
        } else {
            out.push(c);
        }
    }
    out
}

/// A name as it stands in the source: no allocation, so alternatives that start with a
/// name and then fail (a call, a keyword argument, an axis) cost nothing to try.
fn raw_ident<'t, 's: 't, I, E>() -> impl Parser<'t, I, (&'s str, Span), E> + Clone + use<'t, 's, I, E>
where
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    select! { Token::Ident(s) => s }.map_with(|s: &'s str, e| (s, sp(e.span()))).labelled("name")
}

fn to_ident((name, span): (&str, Span)) -> Ident {
    Ident { name: name.to_string(), span }
}

fn ident<'t, 's: 't, I, E>() -> impl Parser<'t, I, Ident, E> + Clone + use<'t, 's, I, E>
where
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    raw_ident().map(to_ident)
}

/// `x in A..B [step H]`
fn range_axis<'t, 's: 't, I, E, P>(expr: P) -> impl Parser<'t, I, Axis, E> + Clone + use<'t, 's, I, E, P>
where
    P: Parser<'t, I, Expr, E> + Clone,
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    raw_ident()
        .then_ignore(just(Token::In))
        .then(expr.clone())
        .then_ignore(just(Token::DotDot))
        .then(expr.clone())
        .then(just(Token::Step).ignore_then(expr).or_not())
        .map_with(|(((name, lo), hi), step), e| Axis {
            name: to_ident(name),
            kind: AxisKind::Range { lo, hi, step },
            span: sp(e.span()),
        })
}

/// A region axis: a range, or `t = A`.
fn axis<'t, 's: 't, I, E, P>(expr: P) -> impl Parser<'t, I, Axis, E> + Clone + use<'t, 's, I, E, P>
where
    P: Parser<'t, I, Expr, E> + Clone,
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    let fixed = raw_ident().then_ignore(just(Token::Eq)).then(expr.clone()).map_with(|(name, v), e| Axis {
        name: to_ident(name),
        kind: AxisKind::Fixed(v),
        span: sp(e.span()),
    });
    choice((range_axis(expr), fixed)).labelled("axis (`x in A..B` or `t = A`)")
}

fn expr_parser<'t, 's: 't, I, E>() -> impl Parser<'t, I, Expr, E> + Clone + use<'t, 's, I, E>
where
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    recursive(|expr| {
        let literal = select! {
            Token::Int(s) => ExprKind::Number(s.to_string()),
            Token::Decimal(s) => ExprKind::Number(s.to_string()),
            Token::Imag(s) => ExprKind::Imag(s[..s.len() - 1].to_string()),
            Token::ImagUnit => ExprKind::Imag("1".to_string()),
            Token::True => ExprKind::Bool(true),
            Token::False => ExprKind::Bool(false),
            Token::Str(s) => ExprKind::Str(unescape(s)),
        }
        .map_with(|kind, e| Expr { kind, span: sp(e.span()) })
        .labelled("value");

        let keyword_arg = raw_ident()
            .then_ignore(just(Token::Eq))
            .then(expr.clone())
            .map(|(name, value)| Arg::Keyword { name: to_ident(name), value });
        let range_arg = range_axis(expr.clone()).map(Arg::Axis);
        let arg = choice((range_arg, keyword_arg, expr.clone().map(Arg::Positional)));
        let arg_list = arg
            .separated_by(just(Token::Comma))
            .allow_trailing()
            .collect::<Vec<_>>()
            .delimited_by(just(Token::LParen), just(Token::RParen));
        // A name, or a call when an argument list follows: the name is read once.
        let name_or_call = raw_ident().then(arg_list.or_not()).map_with(|(func, args), e| match args {
            Some(args) => Expr { kind: ExprKind::Call { func: to_ident(func), args }, span: sp(e.span()) },
            None => Expr { kind: ExprKind::Name(func.0.to_string()), span: func.1 },
        });

        let list = expr
            .clone()
            .separated_by(just(Token::Comma))
            .allow_trailing()
            .collect::<Vec<_>>()
            .delimited_by(just(Token::LBracket), just(Token::RBracket))
            .map_with(|items, e| Expr { kind: ExprKind::List(items), span: sp(e.span()) });

        #[derive(Clone)]
        enum Tail {
            Affine(Vec<Expr>),
            Projective(Vec<Expr>),
        }
        let tail = choice((
            just(Token::Comma)
                .ignore_then(expr.clone().separated_by(just(Token::Comma)).at_least(1).collect::<Vec<_>>())
                .map(Tail::Affine),
            just(Token::Colon)
                .ignore_then(expr.clone().separated_by(just(Token::Colon)).at_least(1).collect::<Vec<_>>())
                .map(Tail::Projective),
        ));
        let paren = expr.clone().then(tail.or_not()).delimited_by(just(Token::LParen), just(Token::RParen)).map_with(
            |(first, tail), e| {
                let kind = match tail {
                    None => ExprKind::Paren(Box::new(first)),
                    Some(Tail::Affine(rest)) => {
                        ExprKind::Point { coords: std::iter::once(first).chain(rest).collect(), projective: false }
                    }
                    Some(Tail::Projective(rest)) => {
                        ExprKind::Point { coords: std::iter::once(first).chain(rest).collect(), projective: true }
                    }
                };
                Expr { kind, span: sp(e.span()) }
            },
        );

        let plain = choice((literal, name_or_call, list, paren)).labelled("expression");
        // Postfix indexing binds tightest: `M[1, 2]^2` squares the entry.
        let index = expr
            .clone()
            .separated_by(just(Token::Comma))
            .at_least(1)
            .collect::<Vec<_>>()
            .delimited_by(just(Token::LBracket), just(Token::RBracket))
            .map_with(|ix, e| (ix, sp(e.span())));
        let atom = plain
            .foldl(index.repeated(), |base: Expr, (indices, at): (Vec<Expr>, Span)| {
                let span = base.span.join(at);
                Expr { kind: ExprKind::Index { base: Box::new(base), indices }, span }
            })
            .boxed();

        // Exponents may be negated (`2^-1`); `-x^2` is `-(x^2)`; `a^b^c` is `a^(b^c)`.
        let neg_atom =
            just(Token::Minus).map_with(|_, e| sp(e.span())).repeated().foldr_with(atom.clone(), |s, operand, e| {
                Expr { kind: ExprKind::Unary { op: UnOp::Neg, operand: Box::new(operand) }, span: s.join(sp(e.span())) }
            });
        let power = atom.then(just(Token::Caret).ignore_then(neg_atom).repeated().collect::<Vec<_>>()).map(
            |(base, mut exps)| {
                let mut acc = match exps.pop() {
                    None => return base,
                    Some(last) => last,
                };
                while let Some(prev) = exps.pop() {
                    let span = prev.span.join(acc.span);
                    acc = Expr {
                        kind: ExprKind::Binary { op: BinOp::Pow, lhs: Box::new(prev), rhs: Box::new(acc) },
                        span,
                    };
                }
                let span = base.span.join(acc.span);
                Expr { kind: ExprKind::Binary { op: BinOp::Pow, lhs: Box::new(base), rhs: Box::new(acc) }, span }
            },
        );
        // Binary operators by binding power (one Pratt loop instead of one combinator layer
        // per precedence level, which dominated parse time): `or` < `and` < `not` <
        // comparisons (non-associative) < `+ -` < `* /` < unary minus < `^` (in `power`).
        use chumsky::pratt::{infix, left, none, prefix};
        fn bin(op: BinOp, lhs: Expr, rhs: Expr) -> Expr {
            let span = lhs.span.join(rhs.span);
            Expr { kind: ExprKind::Binary { op, lhs: Box::new(lhs), rhs: Box::new(rhs) }, span }
        }
        fn un(op: UnOp, at: Span, operand: Expr) -> Expr {
            let span = at.join(operand.span);
            Expr { kind: ExprKind::Unary { op, operand: Box::new(operand) }, span }
        }
        // One `select!` per level: a single token test instead of a choice of `just`s.
        let product = select! { Token::Star => BinOp::Mul, Token::Slash => BinOp::Div };
        let sum = select! { Token::Plus => BinOp::Add, Token::Minus => BinOp::Sub };
        let comparison = select! {
            Token::EqEq => BinOp::Eq,
            Token::NotEq => BinOp::Ne,
            Token::Le => BinOp::Le,
            Token::Ge => BinOp::Ge,
            Token::Lt => BinOp::Lt,
            Token::Gt => BinOp::Gt,
        };
        power
            .pratt((
                prefix(7, just(Token::Minus).map_with(|_, e| sp(e.span())), |at, rhs, _| un(UnOp::Neg, at, rhs)),
                infix(left(6), product, |l, op, r, _| bin(op, l, r)),
                infix(left(5), sum, |l, op, r, _| bin(op, l, r)),
                infix(none(4), comparison, |l, op, r, _| bin(op, l, r)),
                prefix(3, just(Token::Not).map_with(|_, e| sp(e.span())), |at, rhs, _| un(UnOp::Not, at, rhs)),
                infix(left(2), just(Token::And), |l, _, r, _| bin(BinOp::And, l, r)),
                infix(left(1), just(Token::Or), |l, _, r, _| bin(BinOp::Or, l, r)),
            ))
            .boxed()
    })
}

fn stmt_parser<'t, 's: 't, I, E>() -> impl Parser<'t, I, StmtKind, E> + Clone + use<'t, 's, I, E>
where
    I: ValueInput<'t, Token = Token<'s>, Span = SimpleSpan>,
    E: ParserExtra<'t, I> + 't,
    E::Error: LabelError<'t, I, &'static str> + LabelError<'t, I, DefaultExpected<'t, Token<'s>>>,
{
    let expr = expr_parser();
    let set = just(Token::Set)
        .ignore_then(ident())
        .then_ignore(just(Token::Eq))
        .then(expr.clone())
        .map(|(name, value)| StmtKind::Set { name, value });
    let curve = just(Token::Curve)
        .ignore_then(ident())
        .then_ignore(just(Token::Colon))
        .then(expr.clone())
        .then(just(Token::Eq).ignore_then(expr.clone()).or_not())
        .map(|((name, lhs), rhs)| StmtKind::Curve { name, lhs, rhs });
    let let_ = just(Token::Let)
        .ignore_then(ident())
        .then_ignore(just(Token::Eq))
        .then(expr.clone())
        .map(|(name, value)| StmtKind::Let { name, value });
    let wave = just(Token::Wave)
        .ignore_then(ident())
        .then_ignore(just(Token::Eq))
        .then(expr.clone())
        .map(|(name, value)| StmtKind::Wave { name, value });
    let expect = just(Token::Expect)
        .ignore_then(expr.clone())
        .then(just(Token::Within).ignore_then(expr.clone()).or_not())
        .map(|(claim, within)| StmtKind::Expect { claim, within });
    let path = select! { Token::Str(s) => s }
        .map_with(|s: &str, e| StrLit { value: unescape(s), span: sp(e.span()) })
        .labelled("output path string");
    let output = choice((just(Token::Sample).to(OutputKind::Sample), just(Token::Plot).to(OutputKind::Plot)))
        .then(ident())
        .then_ignore(just(Token::Over))
        .then(axis(expr).separated_by(just(Token::Comma)).at_least(1).collect::<Vec<_>>())
        .then_ignore(just(Token::To))
        .then(path)
        .map(|(((kind, wave), region), path)| StmtKind::Output { kind, wave, region, path });
    choice((set, curve, let_, wave, expect, output)).then_ignore(end())
}

#[cfg(test)]
mod tests {
    /// Statements parsed on several threads give the same tree and the same
    /// diagnostics, in the same order, as on one.
    #[test]
    fn threads_do_not_change_the_result() {
        let mut src = String::new();
        for i in 0..1500 {
            src.push_str(&match i % 5 {
                0 => format!("curve c{i}: y^2 = x^3 - {i}*x + 1  # note {i}\n"),
                1 => format!("let v{i} = theta([[1i]],\n  [0.{i}]) + 2\n"),
                2 => format!("let broken{i} = (1 + \n"),
                3 => format!("expect v{} == 2 within 1e-9\n", i - 2),
                _ => format!("sample w over x in 0..1 step 0.5, t = {i} to \"out/{i}.csv\"\n"),
            });
        }
        let one = super::parse_on(&src, 1);
        assert!(src.len() / 3 > super::PARALLEL_TOKENS, "the input must take the threaded path");
        for threads in [2, 3, 4] {
            let many = super::parse_on(&src, threads);
            assert_eq!(many.program, one.program);
            assert_eq!(many.diagnostics, one.diagnostics);
        }
        assert_eq!(one.diagnostics.len(), 300);
    }
}
