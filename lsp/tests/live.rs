//! Live editing over stdio: a 2,000-line file edited claim by claim, typing while a long
//! statement computes, and superseded work stopped. What a user sees is checked after
//! every version: evaluated diagnostics never vanish, every version gets its diagnostics
//! before the long work ends, and the server goes idle once work is superseded.
//! (Behaviour required by the LSP 3.17 model of versioned documents; common practice for
//! incremental language servers, no source.)

#[path = "common/client.rs"]
mod client;
#[path = "common/survey.rs"]
mod survey;

use client::Server;
use serde_json::{json, Value};
use std::time::{Duration, Instant};

const URI: &str = "file:///tmp/kelp-live-test/survey.kelp";

fn k701(m: &Value) -> Vec<&Value> {
    m["params"]["diagnostics"]
        .as_array()
        .map(|d| d.iter().filter(|d| d["code"] == "K701").collect())
        .unwrap_or_default()
}

fn is_publish(m: &Value, version: i64) -> bool {
    m["method"] == "textDocument/publishDiagnostics" && m["params"]["version"] == version
}

fn pending_note(d: &Value) -> bool {
    d["message"].as_str().is_some_and(|m| m.contains("being evaluated again"))
}

fn change(s: &mut Server, version: i64, line: usize, from: usize, to: usize, text: &str) {
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": version}, "contentChanges": [
            {"range": {"start": {"line": line, "character": from}, "end": {"line": line, "character": to}}, "text": text}
        ]}),
    );
}

#[test]
fn evaluated_diagnostics_never_vanish_while_a_claim_is_edited() {
    let (text, false_lines) = survey::survey(2000, Some(100));
    let n = false_lines.len();
    assert!(n >= 19, "{n}");
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(URI, &text, &mut aside);
    s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics" && k701(m).len() == n);
    aside.clear();
    // Toggle the tenth false claim between `> 100` (false) and `< 100` (true), 30 versions.
    let line = false_lines[9];
    let at = text.lines().nth(line).unwrap().find('>').unwrap();
    let (mut last, mut seen) = (0, Value::Null);
    for v in 2..=31i64 {
        change(&mut s, v, line, at, at + 1, if v % 2 == 0 { "<" } else { ">" });
        let m = s.wait_for(&mut aside, |m| is_publish(m, v));
        // Every other false claim is on screen in every version, with or without a note.
        let others: Vec<_> = k701(&m).into_iter().filter(|d| d["range"]["start"]["line"] != line).collect();
        assert_eq!(others.len(), n - 1, "version {v}: {m}");
        (last, seen) = (v, m);
        std::thread::sleep(Duration::from_millis(if v % 5 == 0 { 300 } else { 20 }));
    }
    // The last version (odd: `>`, false) settles with all claims current: at once when
    // both spellings of the claim were evaluated before, else after its evaluation.
    let settled = |m: &Value| is_publish(m, last) && k701(m).len() == n && !k701(m).iter().any(|d| pending_note(d));
    if !settled(&seen) {
        s.wait_for(&mut aside, settled);
    }
    // Nothing published after a settled version removes them (all later ones arrive with it).
    for m in aside.iter().filter(|m| m["method"] == "textDocument/publishDiagnostics") {
        assert!(k701(m).len() >= n - 1, "{m}");
    }
}

/// `let slow = [theta(I_11, 0), ...]` with `k` entries: each sum has about 2e8 lattice
/// points (seconds each; the hostile corpus's slow_theta_11 with a larger budget).
fn slow_line(k: usize) -> String {
    let n = 11;
    let rows: Vec<String> = (0..n)
        .map(|i| format!("[{}]", (0..n).map(|j| if i == j { "1i" } else { "0" }).collect::<Vec<_>>().join(", ")))
        .collect();
    let zero = format!("[{}]", vec!["0"; n].join(", "));
    let one = format!("theta([{}], {zero})", rows.join(", "));
    format!("let slow = [{}]", vec![one; k].join(", "))
}

fn cpu_seconds(pid: u32) -> f64 {
    let stat = std::fs::read_to_string(format!("/proc/{pid}/stat")).unwrap();
    let fields: Vec<&str> = stat.rsplit(')').next().unwrap().split_whitespace().collect();
    // utime and stime: fields 14 and 15 of proc(5), here 12 and 13 after the name.
    let ticks: f64 = fields[11].parse::<f64>().unwrap() + fields[12].parse::<f64>().unwrap();
    ticks / 100.0
}

#[test]
fn superseded_work_is_cancelled() {
    let head = "set max_lattice_points = 2e8\nlet a = 1\nexpect a == 2\n";
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(URI, head, &mut aside);
    s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics" && k701(m).len() == 1);
    // Version 2 adds a statement that would compute for half a minute or more ...
    let slow = slow_line(20);
    change(&mut s, 2, 3, 0, 0, &format!("{slow}\n"));
    std::thread::sleep(Duration::from_millis(600));
    // ... version 3 replaces it before it can finish.
    let t0 = Instant::now();
    change(&mut s, 3, 3, 0, slow.len(), "let slow = 2");
    let done = s.wait_for(&mut aside, |m| {
        m["method"] == "kelp/evaluated" && m["params"]["version"] == 3 && m["params"]["complete"] == true
    });
    let took = t0.elapsed();
    // The version-2 run stopped inside the slow statement and said so.
    let stopped: Vec<&Value> =
        aside.iter().filter(|m| m["method"] == "kelp/evaluated" && m["params"]["version"] == 2).collect();
    assert!(stopped.iter().all(|m| m["params"]["complete"] == false), "{stopped:?} then {done}");
    assert!(took < Duration::from_secs(5), "the new version waited {took:?}");
    // And nothing goes on computing behind the user's back.
    let before = cpu_seconds(s.pid());
    std::thread::sleep(Duration::from_millis(1000));
    let busy = cpu_seconds(s.pid()) - before;
    assert!(busy < 0.3, "the server used {busy} s of CPU while idle");
}

#[test]
fn typing_during_a_long_evaluation_gets_every_version_its_diagnostics() {
    let text = format!("set max_lattice_points = 2e8\n{}\nlet a = 1\nexpect a == 2\n", slow_line(4));
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(URI, &text, &mut aside);
    std::thread::sleep(Duration::from_millis(300));
    let finished =
        |aside: &Vec<Value>| aside.iter().any(|m| m["method"] == "kelp/evaluated" && m["params"]["complete"] == true);
    for v in 2..=8i64 {
        // Retype the claim's right-hand side: `2` and `3` alternately.
        change(&mut s, v, 3, 12, 13, if v % 2 == 0 { "3" } else { "2" });
        s.wait_for(&mut aside, |m| is_publish(m, v));
        let h = s.request(
            "textDocument/hover",
            json!({"textDocument": {"uri": URI}, "position": {"line": 2, "character": 4}}),
            &mut aside,
        );
        assert!(h["result"]["contents"]["value"].as_str().is_some_and(|t| t.contains('a')), "{h}");
        std::thread::sleep(Duration::from_millis(100));
    }
    // All of that happened while the long statement was still computing.
    assert!(!finished(&aside), "the long statement ended before the typing did: {aside:?}");
}

#[test]
fn a_long_evaluation_shows_progress_and_a_cancelled_request_stops() {
    let text = format!("set max_lattice_points = 2e8\n{}\nlet a = 1\n", slow_line(1));
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.request(
        "initialize",
        json!({"processId": null, "rootUri": null, "capabilities": {"window": {"workDoneProgress": true}}}),
        &mut aside,
    );
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": URI, "languageId": "kelp", "version": 1, "text": text}}),
    );
    // Past half a second the server asks to create a progress token (LSP 3.17
    // window/workDoneProgress/create), then reports begin on it.
    let create = s.wait_for(&mut aside, |m| m["method"] == "window/workDoneProgress/create");
    let token = create["params"]["token"].clone();
    s.send(json!({"jsonrpc": "2.0", "id": create["id"], "result": null}));
    let begin = s.wait_for(&mut aside, |m| m["method"] == "$/progress" && m["params"]["token"] == token);
    assert_eq!(begin["params"]["value"]["kind"], "begin", "{begin}");
    // A command that must evaluate the file itself, then cancelled ($/cancelRequest): the
    // reply is the LSP's RequestCancelled error (-32800), long before the work could end.
    let id = 777;
    s.send(json!({"jsonrpc": "2.0", "id": id, "method": "workspace/executeCommand",
        "params": {"command": "kelp.evaluate", "arguments": [URI, "slow"]}}));
    std::thread::sleep(Duration::from_millis(200));
    s.notify("$/cancelRequest", json!({"id": id}));
    let reply = s.wait_for(&mut aside, |m| m["id"] == id && m.get("method").is_none());
    assert_eq!(reply["error"]["code"], -32800, "{reply}");
    assert!(
        !aside.iter().any(|m| m["method"] == "kelp/evaluated" && m["params"]["complete"] == true),
        "the evaluation ended before the cancelled reply: {aside:?}"
    );
    // When the document's own evaluation ends, the progress ends.
    let end = s.wait_for(&mut aside, |m| {
        m["method"] == "$/progress" && m["params"]["token"] == token && m["params"]["value"]["kind"] == "end"
    });
    assert_eq!(end["params"]["value"]["kind"], "end");
}
