//! The language server driven over stdio on a generated 2,000-line experiment file:
//! keystroke-to-diagnostics latency (median, p95), hover latency on a computed value,
//! and the server's peak memory. The reference measured in the same run is an in-process
//! parse + check of the same text, so the figures also read as "so many checks".
//! Run: `cargo bench -p kelp-lsp --bench stdio`.

#[path = "../tests/common/client.rs"]
mod client;

use client::Server;
use serde_json::json;
use std::time::Instant;

const URI: &str = "file:///tmp/kelp-bench/harbour.kelp";

/// 2,000 lines of an invented harbour survey: values, small matrices, claims, a few
/// cubic curves and genus-1 theta values; the last line is a false claim whose
/// diagnostic marks the end of the first evaluation.
fn text() -> String {
    let mut s = String::from("# generated benchmark input (invented harbour survey)\nset tolerance = 1e-10\n");
    let mut i = 0;
    while s.lines().count() < 1999 {
        let line = match i % 6 {
            0 => format!("let depth{i} = {}/7 + 0.25*{}", i % 13 + 1, i % 5),
            1 => format!("let m{i} = [[1.1i, 0.{}], [0.{}, 0.9i + 0.2]]", i % 9, i % 9),
            2 => format!("expect is_riemann(m{})", i - 1),
            3 => format!("curve c{i}: y^2 = x^3 - {}*x + 1", i % 7 + 2),
            4 => format!("expect degree(c{}) == 3", i - 1),
            _ => format!("let th{i} = theta([[{}i]], [0.{}])", i % 3 + 1, i % 10),
        };
        s.push_str(&line);
        s.push('\n');
        i += 1;
    }
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
    println!("first evaluation of the whole file   {first_eval_ms:.0} ms");
    println!("server peak memory                   {}", rss.split_whitespace().skip(1).collect::<Vec<_>>().join(" "));
}
