//! One case per checker diagnostic code: the code, and the exact source text it points at.

use kelp_lang::{check, Code};

/// Checks `src` and returns (code, pointed-at text) of every diagnostic.
fn diags(src: &str) -> Vec<(Code, String)> {
    check(src).diagnostics.iter().map(|d| (d.code, src[d.span.range()].to_string())).collect()
}

fn expect_one(src: &str, code: Code, at: &str) {
    let d = diags(src);
    assert!(d.iter().any(|(c, t)| *c == code && t == at), "{src:?}: wanted {code} at {at:?}, got {d:?}");
}

#[test]
fn names() {
    let src = "let a = 1\nlet a = 2\n";
    expect_one(src, Code::DuplicateName, "a");
    let c = check(src);
    let d = &c.diagnostics[0];
    assert_eq!(d.labels.len(), 1, "the earlier definition is related information");
    assert_eq!(d.labels[0].span.start, 4);

    expect_one("let a = bee\n", Code::UndefinedName, "bee");
    let c = check("let genus_two = 1\nlet b = genus_tow\n");
    assert!(c.diagnostics[0].notes.iter().any(|n| n.contains("`genus_two`")), "did-you-mean");

    expect_one("let a = thetta(1)\n", Code::UnknownFunction, "thetta");
    assert!(check("let a = thetta(1)\n").diagnostics[0].notes[0].contains("`theta`"));

    expect_one("wave w = soliton(kapa = [1, 2], a = [[1, 1]])\n", Code::UnknownKeyword, "kapa");
    expect_one("wave w = soliton(a = [[1, 1]])\n", Code::MissingArgument, "soliton");
    expect_one("curve c: y = x^2\nlet d = degree(c, c)\n", Code::TooManyArguments, "c");
    expect_one("let p = q\nlet q = p\n", Code::CyclicDefinition, "p");
    expect_one("wave w = soliton(kappa = [1, 2], kappa = [1, 3], a = [[1, 1]])\n", Code::DuplicateArgument, "kappa");
}

#[test]
fn lines_that_are_not_statements() {
    expect_one("foo = 3\n", Code::UnknownStatement, "foo");
    let c = check("foo = 3\n");
    assert!(c.diagnostics[0].notes[0].contains("let foo = ..."));
}

#[test]
fn forward_references_are_allowed() {
    let c = check("expect b == 2\nlet b = a + 1\nlet a = 1\n");
    assert!(c.diagnostics.is_empty(), "{:?}", c.diagnostics);
    // Definitions come before the claim, in dependency order.
    let names: Vec<usize> = c.order.clone();
    assert_eq!(names, vec![2, 1, 0]);
}

#[test]
fn kinds_and_shapes() {
    expect_one("wave w = rational(partition = [2, 1])\nexpect genus(w) == 1\n", Code::WrongKind, "w");
    expect_one("let T = [[1i, 0], [0, 1i]]\nlet v = theta(T, [0, 0, 0])\n", Code::ShapeMismatch, "[0, 0, 0]");
    expect_one("let v = theta([[1i, 0]], [0])\n", Code::ShapeMismatch, "[[1i, 0]]");
    expect_one("let m = [[1, 2], [3]]\n", Code::RaggedMatrix, "[3]");
    expect_one("let m = [[1, 2], [3, 4]] * [[1, 2, 3]]\n", Code::ShapeMismatch, "[[1, 2], [3, 4]] * [[1, 2, 3]]");
    expect_one("let a = 1\nwave w = a\n", Code::NotAWaveConstructor, "a");
    expect_one("expect 1 + 1 within 1e-3\n", Code::WithinWithoutEquality, "1e-3");
    expect_one("expect 1 + 1\n", Code::ClaimNotBoolean, "1 + 1");
    expect_one("wave s = soliton(kappa = [1, 2, 3], a = [[1, 1]])\n", Code::ShapeMismatch, "[[1, 1]]");
    expect_one("let p = (1 : 2)\n", Code::ShapeMismatch, "(1 : 2)");
}

#[test]
fn curve_equations() {
    expect_one("curve c: x^2 + y^2 + z\n", Code::NotHomogeneous, "x^2 + y^2 + z");
    expect_one("curve c: x^2 + w^2\n", Code::UnknownVariable, "w");
    expect_one("curve c: x - x + 3\n", Code::DegreeTooLow, "x - x + 3");
    expect_one("curve c: y = y\n", Code::DegreeTooLow, "y = y");
    expect_one("curve c: y^2 = x^3 + 1i\n", Code::NotPolynomial, "1i");
    expect_one("curve c: y = x^(1/2)\n", Code::NotPolynomial, "(1/2)");
    expect_one("curve c: y = 1/x\n", Code::NotPolynomial, "x");
    expect_one("curve c: y = x^1000\n", Code::DegreeTooHigh, "x^1000");
    // Affine equations in x, y and homogeneous ones in x, y, z are both fine.
    let c = check("curve a: y^2 = x^3 + x^2\ncurve b: x^3*z + y^3*x + z^3*y\n");
    assert!(c.diagnostics.is_empty());
    assert_eq!(c.curves[&0].degree, 3);
    assert!(!c.curves[&0].projective);
    assert!(c.curves[&1].projective);
}

#[test]
fn settings_regions_and_paths() {
    expect_one("set tolerence = 1e-3\n", Code::UnknownSetting, "tolerence");
    expect_one("set tolerance = 1e-3\nset tolerance = 1e-4\n", Code::DuplicateSetting, "tolerance");
    expect_one("set tolerance = 2\n", Code::BadSettingValue, "2");
    let waves = "wave w = rational(partition = [1])\n";
    expect_one(&format!("{waves}sample w over x in 4..-4 to \"a.csv\"\n"), Code::EmptyRange, "4..-4");
    expect_one(&format!("{waves}sample w over x in 1..1 to \"a.csv\"\n"), Code::EmptyRange, "1..1");
    expect_one(&format!("{waves}sample w over x in 0..1 step 0 to \"a.csv\"\n"), Code::BadStep, "0");
    expect_one(&format!("{waves}sample w over x in 0..1 step -0.1 to \"a.csv\"\n"), Code::BadStep, "-0.1");
    expect_one(&format!("{waves}sample w over q in 0..1 to \"a.csv\"\n"), Code::UnknownAxis, "q");
    expect_one(&format!("{waves}sample w over x in 0..1, x = 2 to \"a.csv\"\n"), Code::DuplicateAxis, "x");
    expect_one(&format!("{waves}sample w over x in 0..1 to \"/tmp/a.csv\"\n"), Code::AbsolutePath, "\"/tmp/a.csv\"");
    expect_one(
        &format!("{waves}sample w over x in 0..1 to \"out/../../a.csv\"\n"),
        Code::PathEscapes,
        "\"out/../../a.csv\"",
    );
    expect_one(&format!("{waves}plot w over x in 0..1 to \"a.csv\"\n"), Code::BadOutputFormat, "\"a.csv\"");
    expect_one("let a = 1\nsample a over x in 0..1 to \"a.csv\"\n", Code::WrongKind, "a");
    expect_one(&format!("{waves}expect kp_residual(w) < 1\n"), Code::MissingArgument, "kp_residual");
    // Inside the tree is fine, even through `..`.
    assert!(check(&format!("{waves}sample w over x in 0..1 to \"out/../b/a.npy\"\n")).diagnostics.is_empty());
}

#[test]
fn huge_literals_are_refused_not_expanded() {
    expect_one("let a = 1e99999999\n", Code::NumberTooLarge, "1e99999999");
    let digits = "9".repeat(20_000);
    expect_one(&format!("let a = {digits}\n"), Code::NumberTooLarge, &digits);
}

#[test]
fn every_code_is_documented_in_the_language_reference() {
    let reference = include_str!("../LANGUAGE.md");
    for code in Code::ALL {
        assert!(reference.contains(&format!("`{}`", code.as_str())), "{} is missing from LANGUAGE.md", code.as_str());
    }
}

/// Axes written inside a call: `t = 0` is a fixed axis (it parses as a keyword argument), so
/// an axis given twice either way is K507 at the second one and an unknown name is K506.
#[test]
fn fixed_axes_inside_calls() {
    let waves = "wave w = rational(partition = [1])\n";
    expect_one(&format!("{waves}expect kp_residual(w, x = 1, x = 2) < 1\n"), Code::DuplicateAxis, "x");
    let c = check(&format!("{waves}expect kp_residual(w, x in 0..1, x = 2) < 1\n"));
    let d = c.diagnostics.iter().find(|d| d.code == Code::DuplicateAxis).expect("K507");
    assert_eq!(d.labels.len(), 1, "the first `x` is related information");
    expect_one(&format!("{waves}expect kp_residual(w, x in 0..1, z = 2) < 1\n"), Code::UnknownAxis, "z");
    expect_one(&format!("{waves}expect regular(w, x in 0..1, tt = 2)\n"), Code::UnknownAxis, "tt");
    // Functions without a region keep K204 for an unknown keyword.
    expect_one(&format!("{waves}let v = value(w, 1, 2, 3, x = 1)\n"), Code::UnknownKeyword, "x");
    // A fixed axis alone is a region.
    assert!(check(&format!("{waves}expect kp_residual(w, x = 0.35, t = 3) < 1\n")).diagnostics.is_empty());
}

/// `tolerance` and `accuracy` lie in [1e-15, 0.1] (the finest double precision reaches on
/// values of size 1, the coarsest that still tells such values apart); both ends are allowed.
#[test]
fn tolerance_and_accuracy_stay_within_reach() {
    for bad in ["1e-20", "1e-16", "1", "0.5", "0.10000001"] {
        for name in ["tolerance", "accuracy"] {
            expect_one(&format!("set {name} = {bad}\n"), Code::BadSettingValue, bad);
        }
    }
    let c = check("set accuracy = 1e-20\n");
    assert!(c.diagnostics[0].message.contains("from 1e-15 to 1e-1"), "{}", c.diagnostics[0].message);
    for good in ["1e-15", "0.1", "1e-10"] {
        for name in ["tolerance", "accuracy"] {
            let c = check(&format!("set {name} = {good}\n"));
            assert!(c.diagnostics.is_empty(), "{name} = {good}: {:?}", c.diagnostics);
        }
    }
    // `within` is a claim's own business: a tolerance finer than double precision is not
    // refused (the claim is then decided or undecided on the error bounds).
    assert!(check("expect 2^(1/2) == 1.4142135623730951 within 1e-20\n").diagnostics.is_empty());
}

/// Curve coefficients obey `max_digits` like every other literal.
#[test]
fn curve_coefficients_obey_the_digit_limit() {
    let long = "1".repeat(10_001);
    expect_one(&format!("curve c: y^2 = x^3 + {long}\n"), Code::NumberTooLarge, &long);
    expect_one(&format!("curve c: {long}*y^2 = x^3 + 1\n"), Code::NumberTooLarge, &long);
    expect_one("set max_digits = 5\ncurve c: y^2 = x^3 + 123456\n", Code::NumberTooLarge, "123456");
    expect_one("set max_digits = 5\ncurve c: y^2 = x^3 + 1.23456\n", Code::NumberTooLarge, "1.23456");
    assert!(check("set max_digits = 6\ncurve c: y^2 = x^3 + 123456\n").diagnostics.is_empty());
    assert!(check(&format!("curve c: y^2 = x^3 + {}\n", "1".repeat(10_000))).diagnostics.is_empty());
}
