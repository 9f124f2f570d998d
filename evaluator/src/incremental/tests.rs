//! The reference for every reused result is a fresh evaluation of the same text: reuse
//! must not change a single diagnostic, value or claim outcome (common practice for
//! incremental computation, no source).

use super::*;
use kelp_lang::check;

fn fresh(src: &str) -> Evaluation {
    crate::evaluate(&check(src), src, &Mode::Check)
}

fn again(inc: &mut Incremental, src: &str) -> (Evaluation, Reuse) {
    inc.evaluate(&check(src), src, &Mode::Check, &CancelToken::new(), &mut || false)
}

/// Everything a user sees of an evaluation, in a comparable form.
fn seen(e: &Evaluation) -> String {
    let mut out = String::new();
    for d in &e.diagnostics {
        out.push_str(&format!("{:?} {:?} {} {:?}\n", d.code, d.span, d.message, d.notes));
    }
    for v in &e.values {
        out.push_str(&format!("{} {:?} {} {:e}\n", v.name, v.span, v.value.value, v.value.error_bound));
    }
    for x in &e.expectations {
        out.push_str(&format!("{:?} {:?} {}\n", x.span, x.passed, x.detail));
    }
    out
}

const FILE: &str = "\
curve C: y^2 = x^5 - x
let g = genus(C)
let t = tau(C)
let a = 1 / 3
let b = a * 3
expect g == 2
expect b == 1
expect a > 1
let z = 1 / 0
expect z == 0
";

#[test]
fn an_edited_claim_is_the_only_statement_evaluated_again() {
    let mut inc = Incremental::new();
    let (first, r) = again(&mut inc, FILE);
    assert_eq!(r.replayed, 0);
    assert_eq!(seen(&first), seen(&fresh(FILE)));
    let edited = FILE.replace("expect a > 1", "expect a < 1");
    let (second, r) = again(&mut inc, &edited);
    assert_eq!(r.computed, 1, "{r:?}");
    assert_eq!(seen(&second), seen(&fresh(&edited)));
}

#[test]
fn an_edited_definition_evaluates_its_dependents_again() {
    let mut inc = Incremental::new();
    again(&mut inc, FILE);
    let edited = FILE.replace("let a = 1 / 3", "let a = 2 / 3");
    let (e, r) = again(&mut inc, &edited);
    // a, b, and the claims on b and on a.
    assert_eq!(r.computed, 4, "{r:?}");
    assert_eq!(seen(&e), seen(&fresh(&edited)));
}

#[test]
fn results_move_with_lines_inserted_above() {
    let mut inc = Incremental::new();
    again(&mut inc, FILE);
    let edited = format!("# a comment\n\nlet extra = 5\n{FILE}");
    let (e, r) = again(&mut inc, &edited);
    assert_eq!(r.computed, 1, "{r:?}");
    assert_eq!(seen(&e), seen(&fresh(&edited)));
}

#[test]
fn a_changed_setting_evaluates_everything_again() {
    let mut inc = Incremental::new();
    let (_, r0) = again(&mut inc, FILE);
    let edited = format!("set tolerance = 1e-6\n{FILE}");
    let (e, r) = again(&mut inc, &edited);
    assert_eq!(r.replayed, 0);
    assert_eq!(r.computed, r0.computed);
    assert_eq!(seen(&e), seen(&fresh(&edited)));
}

#[test]
fn a_stop_between_statements_keeps_what_was_done() {
    let mut inc = Incremental::new();
    let mut n = 0;
    let (e, r) = inc.evaluate(&check(FILE), FILE, &Mode::Check, &CancelToken::new(), &mut || {
        n += 1;
        n > 3
    });
    assert!(e.cancelled);
    assert_eq!(r.computed, 3);
    let (e, r) = again(&mut inc, FILE);
    assert_eq!(r.replayed, 3);
    assert_eq!(seen(&e), seen(&fresh(FILE)));
}

#[test]
fn a_cancelled_evaluation_stores_nothing_it_did_not_finish() {
    let mut inc = Incremental::new();
    let cancel = CancelToken::new();
    cancel.cancel();
    let (e, r) = inc.evaluate(&check(FILE), FILE, &Mode::Check, &cancel, &mut || false);
    assert!(e.cancelled && r.computed == 0 && inc.is_empty());
}

/// Random edits (insert, delete, change a number, duplicate a line), each version compared
/// with a fresh evaluation. A small deterministic generator: the test is repeatable.
#[test]
fn random_edit_sequences_agree_with_fresh_evaluations() {
    let mut seed = 0x2545_f491_4f6c_dd1du64;
    let mut next = move |n: usize| {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        (seed % n as u64) as usize
    };
    let pool = [
        "let a = 1 / 3",
        "let a = 2",
        "let b = a * 3",
        "let c = b - a",
        "expect b == 1",
        "expect c > 0",
        "expect a == 2 within 1e-9",
        "curve C: y^2 = x^3 - x",
        "let g = genus(C)",
        "expect g == 1",
        "let s = smooth(C)",
        "# a comment",
        "",
        "let d = c / (a - 2)",
        "set tolerance = 1e-8",
    ];
    let mut inc = Incremental::new();
    let mut lines: Vec<String> = FILE.lines().map(str::to_string).collect();
    for _ in 0..60 {
        match next(4) {
            0 => lines.insert(next(lines.len() + 1), pool[next(pool.len())].to_string()),
            1 if !lines.is_empty() => {
                lines.remove(next(lines.len()));
            }
            2 if !lines.is_empty() => {
                let i = next(lines.len());
                lines[i] = pool[next(pool.len())].to_string();
            }
            _ if !lines.is_empty() => {
                let i = next(lines.len());
                lines.insert(i, lines[i].clone());
            }
            _ => {}
        }
        let text = lines.join("\n") + "\n";
        let (e, _) = again(&mut inc, &text);
        assert_eq!(seen(&e), seen(&fresh(&text)), "text:\n{text}");
    }
}
