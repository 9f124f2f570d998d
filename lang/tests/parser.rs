//! Parser snapshots for every construct, and recovery from broken statements.
//! The snapshots are S-expressions of the syntax tree written out by hand from the
//! grammar in LANGUAGE.md (precedence: or < and < not < comparison < + - < * / < unary - < ^).

use kelp_lang::ast::*;
use kelp_lang::{parse, Code};

fn sx(e: &Expr) -> String {
    match &e.kind {
        ExprKind::Number(t) => t.clone(),
        ExprKind::Imag(t) => format!("{t}i"),
        ExprKind::Bool(b) => b.to_string(),
        ExprKind::Str(s) => format!("{s:?}"),
        ExprKind::Name(n) => n.clone(),
        ExprKind::Call { func, args } => {
            let a: Vec<String> = args
                .iter()
                .map(|a| match a {
                    Arg::Positional(e) => sx(e),
                    Arg::Keyword { name, value } => format!("{}={}", name.name, sx(value)),
                    Arg::Axis(ax) => axis(ax),
                })
                .collect();
            format!("(call {} {})", func.name, a.join(" "))
        }
        ExprKind::List(items) => format!("[{}]", items.iter().map(sx).collect::<Vec<_>>().join(" ")),
        ExprKind::Point { coords, projective } => {
            format!(
                "({} {})",
                if *projective { "proj" } else { "pt" },
                coords.iter().map(sx).collect::<Vec<_>>().join(" ")
            )
        }
        ExprKind::Paren(i) => format!("(paren {})", sx(i)),
        ExprKind::Index { base, indices } => {
            format!("(index {} {})", sx(base), indices.iter().map(sx).collect::<Vec<_>>().join(" "))
        }
        ExprKind::Unary { op, operand } => {
            format!("({} {})", if *op == UnOp::Neg { "neg" } else { "not" }, sx(operand))
        }
        ExprKind::Binary { op, lhs, rhs } => format!("({} {} {})", op.text(), sx(lhs), sx(rhs)),
        ExprKind::Error => "ERR".into(),
    }
}

fn axis(a: &Axis) -> String {
    match &a.kind {
        AxisKind::Fixed(v) => format!("(axis {} = {})", a.name.name, sx(v)),
        AxisKind::Range { lo, hi, step } => format!(
            "(axis {} {}..{}{})",
            a.name.name,
            sx(lo),
            sx(hi),
            step.as_ref().map(|s| format!(" step {}", sx(s))).unwrap_or_default()
        ),
    }
}

fn stmt(s: &Stmt) -> String {
    match &s.kind {
        StmtKind::Set { name, value } => format!("(set {} {})", name.name, sx(value)),
        StmtKind::Curve { name, lhs, rhs } => {
            format!(
                "(curve {} {}{})",
                name.name,
                sx(lhs),
                rhs.as_ref().map(|r| format!(" = {}", sx(r))).unwrap_or_default()
            )
        }
        StmtKind::Let { name, value } => format!("(let {} {})", name.name, sx(value)),
        StmtKind::Wave { name, value } => format!("(wave {} {})", name.name, sx(value)),
        StmtKind::Expect { claim, within } => {
            format!(
                "(expect {}{})",
                sx(claim),
                within.as_ref().map(|w| format!(" within {}", sx(w))).unwrap_or_default()
            )
        }
        StmtKind::Output { kind, wave, region, path } => format!(
            "({} {} {} to {:?})",
            kind.keyword(),
            wave.name,
            region.iter().map(axis).collect::<Vec<_>>().join(" "),
            path.value
        ),
        StmtKind::Error => "ERROR".into(),
    }
}

/// Each source parses to one statement with the given snapshot.
fn assert_cases(cases: &[(&str, &str)]) {
    for (src, want) in cases {
        assert_eq!(one(src), *want, "{src}");
    }
}

fn one(src: &str) -> String {
    let p = parse(src);
    assert!(p.diagnostics.is_empty(), "unexpected diagnostics for {src:?}: {:?}", p.diagnostics);
    assert_eq!(p.program.stmts.len(), 1, "{src:?}");
    stmt(&p.program.stmts[0])
}

#[test]
fn every_statement_kind() {
    let cases = [
        ("set tolerance = 1e-10", "(set tolerance 1e-10)"),
        ("curve reef: y^2 = x^5 - 5*x^3 + 4*x", "(curve reef (^ y 2) = (+ (- (^ x 5) (* 5 (^ x 3))) (* 4 x)))"),
        ("curve shoal: x^4 + y^4 + z^4", "(curve shoal (+ (+ (^ x 4) (^ y 4)) (^ z 4)))"),
        ("let T = tau(reef)", "(let T (call tau reef))"),
        (
            "wave w = soliton(kappa = [-1, 0, 1], a = [[1, 1, 0], [0, 1, 1]])",
            "(wave w (call soliton kappa=[(neg 1) 0 1] a=[[1 1 0] [0 1 1]]))",
        ),
        ("expect genus(reef) == 2", "(expect (== (call genus reef) 2))"),
        ("expect theta(M, [0, 0]) == 1 within 1e-12", "(expect (== (call theta M [0 0]) 1) within 1e-12)"),
        (
            "sample s over x in -10..10 step 0.1, t = 0 to \"out/s.csv\"",
            "(sample s (axis x (neg 10)..10 step 0.1) (axis t = 0) to \"out/s.csv\")",
        ),
        (
            "plot c over x in -20..20, y in -20..20 to \"out/c.png\"",
            "(plot c (axis x (neg 20)..20) (axis y (neg 20)..20) to \"out/c.png\")",
        ),
    ];
    assert_cases(&cases);
}

#[test]
fn literals_of_every_kind() {
    let cases = [
        ("let a = 1/2", "(let a (/ 1 2))"),
        ("let a = 3.25e-3", "(let a 3.25e-3)"),
        ("let a = 2i", "(let a 2i)"),
        ("let a = i", "(let a 1i)"),
        ("let a = 0.3 + 0.9i", "(let a (+ 0.3 0.9i))"),
        ("let a = true and not false", "(let a (and true (not false)))"),
        ("let p = (0, 0)", "(let p (pt 0 0))"),
        ("let p = (1 : -1 : 0)", "(let p (proj 1 (neg 1) 0))"),
        ("let m = [[1.1i, 0.3], [0.3, 0.9i]]", "(let m [[1.1i 0.3] [0.3 0.9i]])"),
        ("let e = []", "(let e [])"),
    ];
    assert_cases(&cases);
}

#[test]
fn precedence_and_associativity() {
    let cases = [
        ("let a = -x^2", "(let a (neg (^ x 2)))"),
        ("let a = 2^3^2", "(let a (^ 2 (^ 3 2)))"),
        ("let a = 2^-1", "(let a (^ 2 (neg 1)))"),
        ("let a = 1 - 2 - 3", "(let a (- (- 1 2) 3))"),
        ("let a = 1 + 2*3", "(let a (+ 1 (* 2 3)))"),
        ("let a = (1 + 2)*3", "(let a (* (paren (+ 1 2)) 3))"),
        ("let a = 1 < 2 or 2 == 3 and true", "(let a (or (< 1 2) (and (== 2 3) true)))"),
    ];
    assert_cases(&cases);
}

#[test]
fn indexing_binds_tightest() {
    // From the grammar in LANGUAGE.md: `index` sits between `power` and `atom`.
    let cases = [
        ("let a = M[1, 2]", "(let a (index M 1 2))"),
        ("let a = -M[1]^2", "(let a (neg (^ (index M 1) 2)))"),
        ("let a = M[2][1]", "(let a (index (index M 2) 1))"),
        ("let a = tau(C)[1, 1]", "(let a (index (call tau C) 1 1))"),
        ("let a = [1, 2][i + 1]", "(let a (index [1 2] (+ 1i 1)))"),
    ];
    assert_cases(&cases);
}

#[test]
fn calls_with_regions_and_keywords() {
    assert_eq!(
        one("expect kp_residual(w, x in -4..4, y in -4..4, t = 0) < 1e-8"),
        "(expect (< (call kp_residual w (axis x (neg 4)..4) (axis y (neg 4)..4) t=0) 1e-8))"
    );
    assert_eq!(
        one("let v = theta(T, [0, 0], char = [[1/2, 0], [0, 1/2]], along = [[1, 0]])"),
        "(let v (call theta T [0 0] char=[[(/ 1 2) 0] [0 (/ 1 2)]] along=[[1 0]]))"
    );
}

#[test]
fn brackets_continue_over_lines() {
    let p = parse("let m = [[1, 2],\n         [3, 4]]  # two rows\nlet b = 1\n");
    assert!(p.diagnostics.is_empty());
    assert_eq!(p.program.stmts.len(), 2);
    assert_eq!(stmt(&p.program.stmts[0]), "(let m [[1 2] [3 4]])");
    assert_eq!(p.program.comments.len(), 1);
}

#[test]
fn the_language_sketch_parses_without_a_diagnostic() {
    let src = include_str!("fixtures/sketch.kelp");
    let c = kelp_lang::check(src);
    assert!(c.diagnostics.is_empty(), "{:?}", c.diagnostics);
    assert_eq!(c.program.stmts.len(), 22);
}

/// Three independent syntax errors give three diagnostics at their own ranges, and the
/// statements between them are still parsed and checked.
#[test]
fn recovery_reports_each_broken_statement() {
    let src = "let a = 1 +\nlet b = [1, 2\nlet c = undefined_thing\nexpect a == == 2\nlet d = 4\n";
    let c = kelp_lang::check(src);
    let codes: Vec<(Code, &str)> = c.diagnostics.iter().map(|d| (d.code, &src[d.span.range()])).collect();
    assert_eq!(
        codes,
        vec![
            (Code::UnexpectedToken, "+"),
            (Code::UnclosedDelimiter, "["),
            (Code::UndefinedName, "undefined_thing"),
            (Code::UnexpectedToken, "=="),
        ]
    );
    assert!(matches!(c.program.stmts[4].kind, StmtKind::Let { .. }));
    assert!(c.symbol("d").is_some());
}

#[test]
fn a_line_starting_with_a_keyword_ends_an_unclosed_bracket() {
    let p = parse("let m = [[1, 2], [3, 4]\nlet k = 5\n");
    assert_eq!(p.diagnostics.len(), 1);
    assert_eq!(p.diagnostics[0].code, Code::UnclosedDelimiter);
    assert!(matches!(p.program.stmts[1].kind, StmtKind::Let { .. }));
}

#[test]
fn lexer_errors_are_not_repeated_by_the_parser() {
    let p = parse("let a = 3 $ 4\nlet s = \"open\nlet b = 2\n");
    let codes: Vec<Code> = p.diagnostics.iter().map(|d| d.code).collect();
    assert_eq!(codes, vec![Code::BadToken, Code::UnclosedDelimiter]);
    assert!(matches!(p.program.stmts[2].kind, StmtKind::Let { .. }));
}

#[test]
fn spans_are_bytes_in_text_with_multibyte_characters() {
    let src = "# Ωμέγα 🌊\nlet a = b\n";
    let c = kelp_lang::check(src);
    let d = &c.diagnostics[0];
    assert_eq!(&src[d.span.range()], "b");
    let idx = kelp_lang::LineIndex::new(src);
    let pos = idx.line_col(d.span.start, kelp_lang::Encoding::Utf16);
    assert_eq!((pos.line, pos.character), (1, 8));
}
