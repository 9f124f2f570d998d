//! Properties: nothing in the front end panics on any input, and formatting is
//! idempotent and keeps the meaning (same syntax tree up to spans).

use kelp_lang::{check, fmt::format};
use proptest::prelude::*;

/// Token-ish soup: fragments of the language glued at random, which reaches far more of
/// the grammar than random characters do.
fn soup() -> impl Strategy<Value = String> {
    let frag = prop::sample::select(vec![
        "let ",
        "curve ",
        "wave ",
        "expect ",
        "set ",
        "sample ",
        "plot ",
        "over ",
        "to ",
        "in ",
        "step ",
        "within ",
        "and ",
        "or ",
        "not ",
        "x",
        "y",
        "z",
        "t",
        "a",
        "T",
        "i",
        "2i",
        "0.5",
        "1e-3",
        "1/2",
        "(",
        ")",
        "[",
        "]",
        ",",
        ":",
        "=",
        "==",
        "<",
        "+",
        "-",
        "*",
        "/",
        "^",
        "..",
        "\"out/a.csv\"",
        "\"",
        "# c",
        "\n",
        " ",
        "genus(",
        "theta(",
        "soliton(",
        "kappa = ",
        "é",
        "🌊",
        "\r\n",
        "$",
    ]);
    prop::collection::vec(frag, 0..60).prop_map(|v| v.concat())
}

/// A well-formed program from a few statement templates.
fn program() -> impl Strategy<Value = String> {
    let stmt = prop_oneof![
        (1..50i32, 1..9i32).prop_map(|(a, b)| format!("let v{a} = {a}/{b} + {b}*{a}i")),
        (1..9u32, 1..9u32).prop_map(|(a, b)| format!("curve c{a}{b}: y^{a} = x^{b} - {a}*x + 1  # c")),
        (1..50i32).prop_map(|a| format!("expect {a} - 1 == {} within 1e-9", a - 1)),
        (1..5i32).prop_map(|a| format!("let m{a} = [[{a}i, 0.5], [0.5, {a}i]]")),
        Just(String::new()),
        Just("# a comment line".to_string()),
    ];
    prop::collection::vec(stmt, 0..12).prop_map(|v| v.join("\n") + "\n")
}

/// The tree with spans erased, for comparing meaning.
/// The syntax tree without spans (shared with the fuzz targets).
#[path = "../../fuzz/targets.rs"]
mod targets;
use targets::shape;

proptest! {
    #![proptest_config(ProptestConfig { cases: 400, .. ProptestConfig::default() })]

    #[test]
    fn front_end_never_panics_on_soup(src in soup()) {
        // No hang either: a bound far above the milliseconds these inputs take.
        let started = std::time::Instant::now();
        let c = check(&src);
        let _ = kelp_lang::render::render("soup.kelp", &src, &c.diagnostics, false);
        let f = format(&src);
        // Even broken input formats to a fixed point.
        prop_assert_eq!(format(&f), f);
        for d in c.diagnostics {
            prop_assert!(d.span.end <= src.len() && src.is_char_boundary(d.span.start) && src.is_char_boundary(d.span.end));
        }
        prop_assert!(started.elapsed() < std::time::Duration::from_secs(5), "took {:?}", started.elapsed());
    }

    #[test]
    fn front_end_never_panics_on_bytes(src in "\\PC{0,200}") {
        let c = check(&src);
        let _ = kelp_lang::render::render("bytes.kelp", &src, &c.diagnostics, false);
        let _ = format(&src);
    }

    #[test]
    fn formatting_is_idempotent_and_keeps_meaning(src in program()) {
        let once = format(&src);
        prop_assert_eq!(format(&once), once.clone());
        prop_assert_eq!(shape(&once), shape(&src));
        prop_assert_eq!(once.matches('#').count(), src.matches('#').count());
    }
}

#[test]
fn samples_are_formatted_and_formatting_is_idempotent_on_them() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/../samples");
    let mut n = 0;
    for entry in std::fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.extension().is_some_and(|e| e == "kelp") {
            let src = std::fs::read_to_string(&path).unwrap();
            let f = format(&src);
            assert_eq!(f, src, "{} is not in canonical form (run `kelp fmt`)", path.display());
            n += 1;
        }
    }
    assert!(n >= 3);
    let sketch = include_str!("fixtures/sketch.kelp");
    let f = format(sketch);
    assert_eq!(format(&f), f);
    assert_eq!(shape(&f), shape(sketch));
}

/// Inputs the mutation fuzzer found (tests/examples/fuzz_stable.rs), minimized: a lone
/// carriage return before a comment made the formatter slice backwards (a panic), and a
/// vertical tab or no-break space trimmed from a broken statement made it parse on the
/// second run (formatting was not idempotent).
#[test]
fn fuzzer_findings_stay_fixed() {
    for src in
        ["*\rx#", "4\r2#", "let a0= \"1\" + 1\u{b}", "let a = 1\nlet a =02\u{b}", "let a  = 1\u{a0}", "x\r\r\n#c\ry"]
    {
        let once = format(src);
        assert_eq!(format(&once), once, "{src:?}");
        let _ = check(src);
    }
}
