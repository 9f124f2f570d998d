//! The language server driven over stdio on a generated 2,000-line experiment file:
//! keystroke-to-diagnostics latency (median, p95), an edited claim's evaluated
//! diagnostic (median, worst), typing while a long statement computes (each version's
//! diagnostics, hover), hover latency on a computed value, and the server's peak memory. The reference measured in the same run is an in-process
//! parse + check of the same text, so the figures also read as "so many checks".
//! Run: `cargo bench -p kelp-lsp --bench stdio`.

#[path = "../tests/common/client.rs"]
mod client;
#[path = "../tests/common/survey.rs"]
mod survey;

use client::Server;
use serde_json::json;
use std::time::Instant;

const URI: &str = "file:///tmp/kelp-bench/harbour.kelp";

/// 2,000 lines of the invented survey; the last line is a false claim whose diagnostic
/// marks the end of the first evaluation.
fn text() -> String {
    let (mut s, _) = survey::survey(1999, None);
    s.push_str("expect 1 == 2\n");
    s
}

fn percentile(v: &mut [f64], p: f64) -> f64 {
    v.sort_by(f64::total_cmp);
    v[((v.len() - 1) as f64 * p).round() as usize]
}

fn main() {
    let text = text();
    let lines = text.lines().count();
    // Reference: parse + check in-process.
    let mut check_ms: Vec<f64> = (0..20)
        .map(|_| {
            let t = Instant::now();
            std::hint::black_box(kelp_lang::check(&text));
            t.elapsed().as_secs_f64() * 1e3
        })
        .collect();
    let check_med = percentile(&mut check_ms, 0.5);

    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(URI, &text, &mut aside);
    let t_eval = Instant::now();
    s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics"
            && m["params"]["diagnostics"].as_array().is_some_and(|d| d.iter().any(|d| d["code"] == "K701"))
    });
    let first_eval_ms = t_eval.elapsed().as_secs_f64() * 1e3;

    // Keystrokes: retype one digit of line 2 (`let depth0 = 1/7 + ...`), each a new version.
    let mut keys = Vec::new();
    for k in 0..200 {
        let version = 2 + k;
        let digit = format!("{}", k % 9 + 1);
        let t = Instant::now();
        s.notify(
            "textDocument/didChange",
            json!({"textDocument": {"uri": URI, "version": version}, "contentChanges": [
                {"range": {"start": {"line": 2, "character": 13}, "end": {"line": 2, "character": 14}}, "text": digit}
            ]}),
        );
        s.wait_for(&mut aside, |m| {
            m["method"] == "textDocument/publishDiagnostics" && m["params"]["version"] == version
        });
        keys.push(t.elapsed().as_secs_f64() * 1e3);
        aside.clear();
    }
    // An edited claim: the last line is rewritten with a claim never seen before (true
    // and false alternately, so nothing can be replayed); time until that version's
    // diagnostics show its verdict with nothing pending.
    let last_line = lines - 1;
    let mut prev_len = "expect 1 == 2".len();
    let mut claims = Vec::new();
    for k in 0..40 {
        let version = 1000 + k;
        let false_now = k % 2 == 1;
        let line = if false_now { format!("expect {k} == {}", k + 1) } else { format!("expect {k} == {k}") };
        let t = Instant::now();
        s.notify(
            "textDocument/didChange",
            json!({"textDocument": {"uri": URI, "version": version}, "contentChanges": [
                {"range": {"start": {"line": last_line, "character": 0}, "end": {"line": last_line, "character": prev_len}}, "text": line}
            ]}),
        );
        prev_len = line.len();
        s.wait_for(&mut aside, |m| {
            let Some(d) = m["params"]["diagnostics"].as_array() else { return false };
            m["method"] == "textDocument/publishDiagnostics"
                && m["params"]["version"] == version
                && d.iter().any(|d| d["code"] == "K701") == false_now
                && !d.iter().any(|d| d["message"].as_str().is_some_and(|m| m.contains("being evaluated again")))
        });
        claims.push(t.elapsed().as_secs_f64() * 1e3);
        aside.clear();
        std::thread::sleep(std::time::Duration::from_millis(50));
    }

    // Let the last evaluation finish, then hover on a computed theta value (line 7: th5).
    std::thread::sleep(std::time::Duration::from_millis(3000));
    let mut hovers = Vec::new();
    for _ in 0..200 {
        let t = Instant::now();
        let h = s.request(
            "textDocument/hover",
            json!({"textDocument": {"uri": URI}, "position": {"line": 7, "character": 5}}),
            &mut aside,
        );
        hovers.push(t.elapsed().as_secs_f64() * 1e3);
        assert!(h["result"]["contents"]["value"].as_str().is_some_and(|v| v.contains("th5")), "{h}");
        aside.clear();
    }
    let rss = std::fs::read_to_string(format!("/proc/{}/status", s.pid()))
        .ok()
        .and_then(|st| st.lines().find(|l| l.starts_with("VmHWM")).map(|l| l.to_string()))
        .unwrap_or_else(|| "VmHWM: unknown".into());
    let (km, kp) = (percentile(&mut keys.clone(), 0.5), percentile(&mut keys, 0.95));
    let (hm, hp) = (percentile(&mut hovers.clone(), 0.5), percentile(&mut hovers, 0.95));
    let (cm, cw) = (percentile(&mut claims.clone(), 0.5), percentile(&mut claims, 1.0));
    let (tv, th, slow_ms) = typing_during_long_work();
    println!("kelp lsp over stdio, {lines}-line file");
    println!("reference: in-process parse + check  median {check_med:.2} ms");
    println!(
        "keystroke -> diagnostics             median {km:.2} ms, p95 {kp:.2} ms ({:.2}x the reference)",
        km / check_med
    );
    println!(
        "hover on a computed value            median {hm:.3} ms, p95 {hp:.3} ms ({:.3}x the reference)",
        hm / check_med
    );
    println!("edited claim -> its evaluated verdict median {cm:.2} ms, worst {cw:.2} ms");
    println!("typing during a {slow_ms:.0} ms statement: each version's diagnostics worst {tv:.2} ms, hover worst {th:.2} ms");
    println!("first evaluation of the whole file   {first_eval_ms:.0} ms");
    println!("server peak memory                   {}", rss.split_whitespace().skip(1).collect::<Vec<_>>().join(" "));
}

/// A file with one long statement (theta of i times the 11 x 11 identity, several
/// entries) and a claim retyped while it computes: the worst latency of each version's
/// diagnostics and of a hover, and how long the statement took.
fn typing_during_long_work() -> (f64, f64, f64) {
    let n = 11;
    let rows: Vec<String> = (0..n)
        .map(|i| format!("[{}]", (0..n).map(|j| if i == j { "1i" } else { "0" }).collect::<Vec<_>>().join(", ")))
        .collect();
    let one = format!("theta([{}], [{}])", rows.join(", "), vec!["0"; n].join(", "));
    let text =
        format!("set max_lattice_points = 2e8\nlet slow = [{}]\nlet a = 1\nexpect a == 2\n", vec![one; 3].join(", "));
    let uri = "file:///tmp/kelp-bench/slow.kelp";
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(uri, &text, &mut aside);
    let t0 = Instant::now();
    std::thread::sleep(std::time::Duration::from_millis(200));
    let (mut versions, mut hovers) = (Vec::new(), Vec::new());
    for v in 2..=21i64 {
        let t = Instant::now();
        s.notify(
            "textDocument/didChange",
            json!({"textDocument": {"uri": uri, "version": v}, "contentChanges": [
                {"range": {"start": {"line": 3, "character": 12}, "end": {"line": 3, "character": 13}}, "text": if v % 2 == 0 { "3" } else { "2" }}
            ]}),
        );
        s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics" && m["params"]["version"] == v);
        versions.push(t.elapsed().as_secs_f64() * 1e3);
        let t = Instant::now();
        s.request(
            "textDocument/hover",
            json!({"textDocument": {"uri": uri}, "position": {"line": 2, "character": 4}}),
            &mut aside,
        );
        hovers.push(t.elapsed().as_secs_f64() * 1e3);
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    let slow = s.wait_for(&mut aside, |m| m["method"] == "kelp/evaluated" && m["params"]["complete"] == true);
    let _ = slow;
    let slow_ms = t0.elapsed().as_secs_f64() * 1e3;
    (percentile(&mut versions, 1.0), percentile(&mut hovers, 1.0), slow_ms)
}
