//! The checker on the expression basics: indexing with its shapes and K306, the constant
//! `pi`, the kinds of the matrix built-ins, and formatting of postfix indices.

use kelp_lang::check::{check, Kind};
use kelp_lang::fmt::format;

fn codes(src: &str) -> Vec<&'static str> {
    check(src).diagnostics.iter().map(|d| d.code.as_str()).collect()
}

fn kind_of(src: &str, name: &str) -> Kind {
    let c = check(src);
    assert!(!c.has_errors(), "{:?}", c.diagnostics);
    c.symbol(name).unwrap().kind
}

#[test]
fn indices_are_checked_where_the_shape_is_known() {
    let m = "let M = [[1, 2, 3], [4, 5, 6]]\n";
    assert!(codes(&format!("{m}let a = M[2, 3]\n")).is_empty());
    assert_eq!(codes(&format!("{m}let a = M[3, 1]\n")), ["K306"]);
    assert_eq!(codes(&format!("{m}let a = M[1, 4]\n")), ["K306"]);
    assert_eq!(codes(&format!("{m}let a = M[0]\n")), ["K306"]);
    assert_eq!(codes(&format!("{m}let a = M[1.5]\n")), ["K306"]);
    assert_eq!(codes(&format!("{m}let a = M[1, 1, 1]\n")), ["K306"]);
    assert_eq!(codes("let a = 3\nlet b = a[1]\n"), ["K301"]);
    // The range is at the index itself.
    let src = format!("{m}let a = M[3, 1]\n");
    let d = &check(&src).diagnostics[0];
    assert_eq!(&src[d.span.range()], "3");
}

#[test]
fn kinds_follow_the_shapes() {
    let m = "let M = [[1, 2, 3], [4, 5, 6]]\n";
    assert_eq!(kind_of(&format!("{m}let r = M[2]\n"), "r"), Kind::Vector(Some(3)));
    assert_eq!(kind_of(&format!("{m}let t = transpose(M)\n"), "t"), Kind::Matrix(Some((3, 2))));
    assert_eq!(kind_of(&format!("{m}let t = im(M)\n"), "t"), Kind::Matrix(Some((2, 3))));
    assert_eq!(kind_of("let z = zeros(4)\n", "z"), Kind::Vector(Some(4)));
    assert_eq!(kind_of("let z = zeros(2, 5)\n", "z"), Kind::Matrix(Some((2, 5))));
    assert_eq!(kind_of("let z = identity(3)\n", "z"), Kind::Matrix(Some((3, 3))));
    assert_eq!(kind_of("let p = 2 * pi\n", "p"), Kind::Number);
    // det of a non-square matrix, exp of a matrix.
    assert_eq!(codes(&format!("{m}let d = det(M)\n")), ["K302"]);
    assert_eq!(codes(&format!("{m}let d = exp(M)\n")), ["K301"]);
}

#[test]
fn pi_cannot_be_redefined() {
    assert_eq!(codes("let pi = 3\n"), ["K201"]);
}

#[test]
fn indices_format_tightly_and_parse_back() {
    let src = "let M = [[1, 2], [3, 4]]\nlet a = M [1 ,2]^2 * M[2][1]\n";
    let out = format(src);
    assert!(out.contains("let a = M[1, 2]^2*M[2][1]"), "{out}");
    assert_eq!(format(&out), out);
    assert!(check(&out).diagnostics.is_empty());
}
