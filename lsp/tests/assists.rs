//! Quick fixes, rename and completion over stdio, as an editor uses them. Every fix is
//! applied to the text and the result parsed, checked and, where it claims something,
//! evaluated. The texts are ASCII, so UTF-16 columns are byte columns.

#[path = "common/client.rs"]
mod client;

use client::Server;
use serde_json::{json, Value};

const URI: &str = "file:///tmp/kelp-assist-test/reef.kelp";

/// Starts a server, opens `text`, and returns it with the messages seen so far.
fn open(text: &str, snippets: bool) -> (Server, Vec<Value>) {
    let mut s = Server::start();
    let mut aside = Vec::new();
    let caps = json!({"textDocument": {"completion": {"completionItem": {"snippetSupport": snippets}}}});
    s.request("initialize", json!({"processId": null, "rootUri": null, "capabilities": caps}), &mut aside);
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": URI, "languageId": "kelp", "version": 1, "text": text}}),
    );
    (s, aside)
}

fn offset(text: &str, pos: &Value) -> usize {
    let line = pos["line"].as_u64().unwrap() as usize;
    let start: usize = text.split_inclusive('\n').take(line).map(str::len).sum();
    start + pos["character"].as_u64().unwrap() as usize
}

/// Applies a WorkspaceEdit's edits for `URI`, last first.
fn apply(text: &str, edit: &Value) -> String {
    let mut edits: Vec<(usize, usize, String)> = edit["changes"][URI]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| {
            let r = &e["range"];
            (offset(text, &r["start"]), offset(text, &r["end"]), e["newText"].as_str().unwrap().to_string())
        })
        .collect();
    edits.sort_by_key(|e| std::cmp::Reverse(e.0));
    let mut out = text.to_string();
    for (a, b, t) in edits {
        out.replace_range(a..b, &t);
    }
    out
}

fn line_range(line: u32) -> Value {
    json!({"start": {"line": line, "character": 0}, "end": {"line": line, "character": 200}})
}

fn actions(s: &mut Server, aside: &mut Vec<Value>, line: u32, only: &str) -> Vec<Value> {
    let params = json!({"textDocument": {"uri": URI}, "range": line_range(line),
        "context": {"diagnostics": [], "only": [only]}});
    s.request("textDocument/codeAction", params, aside)["result"].as_array().cloned().unwrap_or_default()
}

fn errors(text: &str) -> Vec<String> {
    kelp_lang::check(text).diagnostics.iter().filter(|d| d.is_error()).map(|d| format!("{}", d.code)).collect()
}

/// Each broken line has exactly one error, and its one quick fix makes the file check
/// cleanly (common practice, no source: a quick fix repairs what its diagnostic names).
#[test]
fn each_checker_fix_gives_a_file_that_parses_and_checks() {
    let base = "curve shoal: y^2 = x^3 - x\nwave w = soliton(kappa = [1, 2], a = [[1, 1]])\n";
    let cases = [
        ("let b = thetta([[1i]], [0])", "let b = theta([[1i]], [0])"),
        ("let g = genus(shoals)", "let g = genus(shoal)"),
        ("let r = tau(shoal, redce = false)", "let r = tau(shoal, reduce = false)"),
        ("wve v = soliton(kappa = [1, 3], a = [[1, 1]])", "wave v = soliton(kappa = [1, 3], a = [[1, 1]])"),
        ("set tolernce = 1e-9", "set tolerance = 1e-9"),
        ("expect degree(shoal) = 3", "expect degree(shoal) == 3"),
        ("let t = theta([[1i, 0], [0, 2i]])", "let t = theta([[1i, 0], [0, 2i]], [0, 0])"),
        ("let g = genus()", "let g = genus(shoal)"),
        ("let k = krichever(shoal)", "let k = krichever(shoal, at = (0, 0))"),
        ("let r = kp_residual(w)", "let r = kp_residual(w, x in -4..4, y in -4..4, t = 0)"),
        ("sample w over X in 0..1 to \"out.csv\"", "sample w over x in 0..1 to \"out.csv\""),
    ];
    for (broken, fixed) in cases {
        let text = format!("{base}{broken}\n");
        assert_eq!(errors(&text).len(), 1, "{broken}: one error before the fix, got {:?}", errors(&text));
        let (mut s, mut aside) = open(&text, true);
        let found = actions(&mut s, &mut aside, 2, "quickfix");
        assert_eq!(found.len(), 1, "{broken}: {found:?}");
        let a = &found[0];
        assert_eq!(a["kind"], "quickfix");
        assert_eq!(a["diagnostics"].as_array().unwrap().len(), 1, "the fix names its diagnostic");
        let after = apply(&text, &a["edit"]);
        assert_eq!(after, format!("{base}{fixed}\n"), "{broken}");
        assert_eq!(errors(&after), Vec::<String>::new(), "{fixed} must parse and check");
    }
}

fn evaluate(text: &str) -> kelp_evaluator::Evaluation {
    let checked = kelp_lang::check(text);
    assert!(checked.diagnostics.iter().all(|d| !d.is_error()), "{:?}", checked.diagnostics);
    kelp_evaluator::evaluate(&checked, text, &kelp_evaluator::Mode::Check)
}

/// theta(0 | i) = theta_3(q = e^-pi) = pi^(1/4) / Gamma(3/4) = 1.0864348112133080...
/// (a classical special value; digits from memory, the claim's tolerance is below the
/// value's own error bound, so it is undecided). The fix widens it until it decides.
#[test]
fn undecided_claim_gets_a_tolerance_that_decides_it() {
    let text = "let th = theta([[1i]], [0])\nexpect th == 1.086434811213308 within 1e-17\n";
    let before = evaluate(text);
    assert!(before.diagnostics.iter().any(|d| d.code == kelp_lang::Code::ClaimUndecided), "{:?}", before.diagnostics);
    let (mut s, mut aside) = open(text, true);
    s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics"
            && m["params"]["diagnostics"].as_array().unwrap().iter().any(|d| d["code"] == "K702")
    });
    let found = actions(&mut s, &mut aside, 1, "quickfix");
    assert_eq!(found.len(), 1, "{found:?}");
    assert!(found[0]["title"].as_str().unwrap().starts_with("widen the tolerance"));
    let after = apply(text, &found[0]["edit"]);
    let e = evaluate(&after);
    assert_eq!(e.expectations.len(), 1);
    assert_eq!(e.expectations[0].passed, Some(true), "{after}: {:?}", e.diagnostics);
    // The tolerance stays near the error bound (about 1e-14 here), not arbitrarily wide.
    let tol: f64 = after.rsplit("within ").next().unwrap().trim().parse().unwrap();
    assert!(tol < 1e-12, "{after}");
}

/// "Pin as a claim" on computed values: the inserted claims pass when evaluated. The
/// references are the values themselves (common practice, no source: a pinned value
/// must agree with what it pins); j(i) = 1728 is the classical value of the square
/// lattice (Silverman, The Arithmetic of Elliptic Curves, III.1).
#[test]
fn pinned_values_pass_when_evaluated() {
    let text = "curve shoal: y^2 = x^3 - x\n\
let th = theta([[1i]], [0.1])\n\
let q = 1/3 + 2\n\
let T = tau(shoal)\n\
let j = j_invariant(T)\n\
let z = theta([[1i, 0.5], [0.5, 2i]], [0.1, 0.2i])\n";
    let (mut s, mut aside) = open(text, true);
    // The evaluation's diagnostics come with its values: wait for a second publication.
    s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics");
    let mut pinned = text.to_string();
    for line in (1..=5).rev() {
        let mut found = actions(&mut s, &mut aside, line, "refactor");
        for _ in 0..50 {
            if !found.is_empty() {
                break;
            }
            std::thread::sleep(std::time::Duration::from_millis(100));
            found = actions(&mut s, &mut aside, line, "refactor");
        }
        assert_eq!(found.len(), 1, "line {line}: {found:?}");
        assert!(found[0]["title"].as_str().unwrap().starts_with("pin "));
        pinned = apply(&pinned, &found[0]["edit"]);
    }
    assert_eq!(pinned.matches("expect ").count(), 5, "{pinned}");
    assert!(pinned.contains("expect q == 7/3\n"), "{pinned}");
    let e = evaluate(&pinned);
    assert_eq!(e.expectations.len(), 5);
    for x in &e.expectations {
        assert_eq!(x.passed, Some(true), "{pinned}\n{}", x.detail);
    }
    let j = e.values.iter().find(|v| v.name == "j").unwrap();
    let kelp_evaluator::Value::Num(n) = &j.value.value else { panic!() };
    assert!((n.to_real().unwrap() - 1728.0).abs() < 1e-6, "j(i) = 1728");
}

fn rename_error(s: &mut Server, aside: &mut Vec<Value>, line: u32, character: u32, new: &str) -> String {
    let params =
        json!({"textDocument": {"uri": URI}, "position": {"line": line, "character": character}, "newName": new});
    let r = s.request("textDocument/rename", params, aside);
    r["error"]["message"].as_str().unwrap_or_else(|| panic!("rename to {new} must be refused: {r}")).to_string()
}

#[test]
fn rename_refuses_keywords_builtins_and_clashes() {
    let text = "curve shoal: y^2 = x^3 - x\nlet g = genus(shoal)\nexpect g == 1\nlet h = 2\n";
    let (mut s, mut aside) = open(text, true);
    let prepare = |s: &mut Server, aside: &mut Vec<Value>, line: u32, character: u32| {
        let p = json!({"textDocument": {"uri": URI}, "position": {"line": line, "character": character}});
        s.request("textDocument/prepareRename", p, aside)
    };
    // On a name: its range and the name as placeholder.
    let r = prepare(&mut s, &mut aside, 1, 16);
    assert_eq!(r["result"]["placeholder"], "shoal");
    assert_eq!(r["result"]["range"]["start"], json!({"line": 1, "character": 14}));
    // On a keyword, a built-in, a number: a refusal that says why.
    let why = |r: Value| r["error"]["message"].as_str().unwrap_or_default().to_string();
    assert!(why(prepare(&mut s, &mut aside, 1, 1)).contains("keyword"));
    assert!(why(prepare(&mut s, &mut aside, 1, 10)).contains("built-in"));
    assert!(why(prepare(&mut s, &mut aside, 2, 12)).contains("no name"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "expect").contains("keyword"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "theta").contains("built-in"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "tolerance").contains("setting"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "x").contains("reserved"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "h").contains("already defined on line 4"));
    assert!(rename_error(&mut s, &mut aside, 1, 4, "2g").contains("not a valid name"));
    // A good name: definition and both uses, and the file still checks.
    let params = json!({"textDocument": {"uri": URI}, "position": {"line": 0, "character": 7}, "newName": "atoll"});
    let r = s.request("textDocument/rename", params, &mut aside);
    let after = apply(text, &r["result"]);
    assert_eq!(after, text.replace("shoal", "atoll"));
    assert_eq!(errors(&after), Vec::<String>::new());
}

fn complete(s: &mut Server, aside: &mut Vec<Value>, line: u32, character: u32) -> Vec<Value> {
    let p = json!({"textDocument": {"uri": URI}, "position": {"line": line, "character": character}});
    s.request("textDocument/completion", p, aside)["result"].as_array().cloned().unwrap()
}

fn labels(items: &[Value]) -> Vec<String> {
    items.iter().map(|i| i["label"].as_str().unwrap().to_string()).collect()
}

/// A snippet accepted unchanged: each `${n:text}` becomes `text`, `$0` nothing.
fn expand(snippet: &str) -> String {
    let mut out = String::new();
    let mut rest = snippet;
    while let Some(i) = rest.find('$') {
        out.push_str(&rest[..i]);
        rest = &rest[i + 1..];
        if let Some(body) = rest.strip_prefix('{') {
            let end = body.find('}').unwrap();
            out.push_str(body[..end].split_once(':').map_or("", |(_, t)| t));
            rest = &body[end + 1..];
        } else {
            rest = rest.trim_start_matches(|c: char| c.is_ascii_digit());
        }
    }
    out + rest
}

#[test]
fn completion_follows_the_context_and_the_client() {
    let text =
        "curve shoal: y^2 = x^3 - x\nwave w = soliton(kappa = [1, 2], a = [[1, 1]])\nlet T = tau()\nset \nlet v = \n";
    let (mut s, mut aside) = open(text, true);
    // Inside `tau(`: only curves.
    assert_eq!(labels(&complete(&mut s, &mut aside, 2, 12)), ["shoal"]);
    // After `set `: the settings, with their ranges.
    let settings = complete(&mut s, &mut aside, 3, 4);
    assert!(labels(&settings).contains(&"tolerance".to_string()));
    assert!(!labels(&settings).contains(&"theta".to_string()));
    assert!(settings.iter().all(|i| i["detail"].as_str().unwrap().contains("number")));
    // At a line's start: statement keywords only.
    let start = labels(&complete(&mut s, &mut aside, 4, 0));
    assert_eq!(start, ["set", "curve", "let", "wave", "expect", "sample", "plot"]);
    // An expression: every built-in's snippet, accepted unchanged, parses and checks.
    let items = complete(&mut s, &mut aside, 4, 8);
    let mut calls = 0;
    for i in items.iter().filter(|i| i["kind"] == 3) {
        assert_eq!(i["insertTextFormat"], 2);
        let call = expand(i["insertText"].as_str().unwrap());
        let file =
            format!("curve shoal: y^2 = x^3 - x\nwave w = soliton(kappa = [1, 2], a = [[1, 1]])\nlet v = {call}\n");
        let file = file
            .replace("let v = krichever", "wave v = krichever")
            .replace("let v = theta_wave", "wave v = theta_wave");
        let file = file.replace("let v = soliton", "wave v = soliton").replace("let v = rational", "wave v = rational");
        let file = file.replace("let v = shallow_water", "wave v = shallow_water");
        assert_eq!(errors(&file), Vec::<String>::new(), "{call}");
        calls += 1;
    }
    assert_eq!(calls, kelp_lang::builtins::BUILTINS.len());

    // A client without snippet support gets plain text, never `$`.
    let (mut s, mut aside) = open(text, false);
    let items = complete(&mut s, &mut aside, 4, 8);
    let theta = items.iter().find(|i| i["label"] == "theta").unwrap();
    assert_eq!(theta["insertTextFormat"], 1);
    assert_eq!(theta["insertText"], "theta(");
    assert!(items.iter().all(|i| !i["insertText"].as_str().unwrap_or("").contains('$')));
}
