//! The hostile corpus (tests/corpus/hostile/, with expected.txt) through the `kelp` binary:
//! every file gets exit status 1 (an error diagnostic; never a crash, never a signal), the
//! expected diagnostic code, and an answer within 20 seconds. Three large inputs are
//! generated here rather than committed. Then hostile protocol input to `kelp lsp`:
//! malformed frames, lone CR and mixed line ends, a byte-order mark.

#[path = "common/client.rs"]
mod client;

use serde_json::{json, Value};
use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

fn corpus() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/corpus/hostile")
}

fn codes_of(file: &Path) -> (Option<i32>, Vec<String>, Duration) {
    let t = Instant::now();
    let out = Command::new(env!("CARGO_BIN_EXE_kelp"))
        .args(["check", "--format", "json", file.to_str().unwrap()])
        .output()
        .expect("kelp runs");
    let took = t.elapsed();
    let json: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap_or_else(|_| {
        panic!("{}: no JSON report; stderr: {}", file.display(), String::from_utf8_lossy(&out.stderr))
    });
    let codes = json["diagnostics"]
        .as_array()
        .unwrap()
        .iter()
        .filter(|d| d["severity"] == "error" || d["severity"] == "warning")
        .map(|d| d["code"].as_str().unwrap().to_string())
        .collect();
    (out.status.code(), codes, took)
}

fn expect(file: &Path, code: &str) {
    let (status, codes, took) = codes_of(file);
    assert_eq!(status, Some(1), "{}: exit status {status:?} (a crash has none)", file.display());
    assert!(codes.iter().any(|c| c == code), "{}: expected {code}, got {codes:?}", file.display());
    assert!(took < Duration::from_secs(20), "{}: took {took:?}", file.display());
}

#[test]
fn hostile_corpus_gets_its_diagnostics() {
    let list = std::fs::read_to_string(corpus().join("expected.txt")).unwrap();
    let mut n = 0;
    for line in list.lines().filter(|l| !l.starts_with('#') && !l.trim().is_empty()) {
        let (name, code) = line.split_once(' ').unwrap();
        expect(&corpus().join(format!("{name}.kelp")), code.trim());
        n += 1;
    }
    assert!(n >= 50, "the corpus has {n} files");
}

#[test]
fn large_generated_inputs_are_refused_cleanly() {
    let dir = std::env::temp_dir().join(format!("kelp-hostile-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let write = |name: &str, text: String| {
        let p = dir.join(name);
        std::fs::write(&p, text).unwrap();
        p
    };
    expect(&write("digits.kelp", format!("let a = {}\n", "9".repeat(1_000_000))), "K105");
    expect(&write("chain.kelp", format!("let a = 1{}\n", "+1".repeat(30_000))), "K106");
    let kappa: Vec<String> = (0..40).map(|i| i.to_string()).collect();
    let rows: Vec<String> = (0..20)
        .map(|i| format!("[{}]", (0..40).map(|j| if i == j { "1" } else { "0" }).collect::<Vec<_>>().join(", ")))
        .collect();
    expect(
        &write("gr.kelp", format!("wave w = soliton(kappa = [{}], a = [{}])\n", kappa.join(", "), rows.join(", "))),
        "K601",
    );
    let _ = std::fs::remove_dir_all(&dir);
}

const URI: &str = "file:///tmp/kelp-hostile/lagoon.kelp";

/// (code, start line, start character, end line, end character) of each diagnostic.
fn placed(m: &Value) -> Vec<(String, u64, u64, u64, u64)> {
    let mut v: Vec<_> = m["params"]["diagnostics"]
        .as_array()
        .unwrap()
        .iter()
        .map(|d| {
            let r = &d["range"];
            let n = |a: &str, b: &str| r[a][b].as_u64().unwrap();
            (
                d["code"].as_str().unwrap().to_string(),
                n("start", "line"),
                n("start", "character"),
                n("end", "line"),
                n("end", "character"),
            )
        })
        .collect();
    v.sort();
    v
}

fn has(p: &[(String, u64, u64, u64, u64)], code: &str, line: u64, ch: u64, end: u64) -> bool {
    p.iter().any(|d| d.0 == code && d.1 == line && d.2 == ch && d.3 == line && d.4 == end)
}

/// An invented file: a wrong genus claim (evaluated, K701), an unknown name (K202) and an
/// unknown character (K101) after a comment with a two-byte letter.
const LINES: [&str; 5] = [
    "# λ-lagoon (invented)",
    "curve shoal: x^4 + y^4 + y^2*z^2 - x^2*z^2",
    "let a = nope",
    "expect genus(shoal) == 3",
    "let b = 1 @ 2",
];

/// One session over stdio: open, wait for the evaluated diagnostics, two range edits,
/// wait again; what was published each time, and the folds and semantic tokens.
fn session(breaks: &[&str]) -> Vec<Value> {
    let br = |i: usize| breaks[i % breaks.len()];
    let text: String = LINES.iter().enumerate().map(|(i, l)| format!("{l}{}", br(i))).collect();
    let mut s = client::Server::start();
    let mut aside = Vec::new();
    s.open(URI, &text, &mut aside);
    let evaluated = |version: i64| {
        move |m: &Value| {
            m["method"] == "textDocument/publishDiagnostics"
                && m["params"]["version"] == version
                && placed(m).iter().any(|d| d.0 == "K701")
        }
    };
    let first = s.wait_for(&mut aside, evaluated(1));
    // Insert a line before line 2 and fix the `@` (now on line 5), by ranges.
    let change = |line: u32, a: u32, b: u32, text: String| json!({"range": {"start": {"line": line, "character": a}, "end": {"line": line, "character": b}}, "text": text});
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": 2}, "contentChanges": [
            change(2, 0, 0, format!("let c = zilch{}", br(1))),
            change(5, 10, 11, "+".into()),
        ]}),
    );
    let second = s.wait_for(&mut aside, evaluated(2));
    let folds = s.request("textDocument/foldingRange", json!({"textDocument": {"uri": URI}}), &mut aside);
    let tokens = s.request("textDocument/semanticTokens/full", json!({"textDocument": {"uri": URI}}), &mut aside);
    vec![first, second, folds["result"].clone(), tokens["result"].clone()]
}

#[test]
fn every_line_ending_gives_the_same_positions_over_stdio() {
    // Expected positions: counted by hand on the lines above (0-based line, UTF-16
    // characters, LSP 3.17 line ends `\n`, `\r\n`, `\r`).
    let lf = session(&["\n"]);
    let (first, second) = (placed(&lf[0]), placed(&lf[1]));
    assert!(has(&first, "K202", 2, 8, 12) && has(&first, "K101", 4, 10, 11), "{first:?}");
    assert!(first.iter().any(|d| d.0 == "K701" && d.1 == 3), "{first:?}");
    assert!(has(&second, "K202", 2, 8, 13) && has(&second, "K202", 3, 8, 12), "{second:?}");
    assert!(second.iter().any(|d| d.0 == "K701" && d.1 == 4), "{second:?}");
    assert!(!second.iter().any(|d| d.0 == "K101"), "the edit replaced the `@`: {second:?}");
    for breaks in [&["\r\n"][..], &["\r"], &["\r", "\r\n", "\n", "\r\n", "\r"]] {
        let other = session(breaks);
        assert_eq!(placed(&other[0]), first, "{breaks:?}");
        assert_eq!(placed(&other[1]), second, "{breaks:?}");
        assert_eq!(other[2], lf[2], "folding ranges, {breaks:?}");
        assert_eq!(other[3], lf[3], "semantic tokens, {breaks:?}");
    }
}

#[test]
fn a_byte_order_mark_is_skipped_and_counted_where_the_client_holds_it() {
    // The server counts the text as the client sent it (LSP 3.17, "Position"): U+FEFF is
    // one UTF-16 unit, so `nope` starts at character 9; no K101 for the mark, and the
    // first statement is not lost.
    let text = "\u{FEFF}let a = nope\nexpect 1 == 2\n";
    let mut s = client::Server::start();
    let mut aside = Vec::new();
    s.open(URI, text, &mut aside);
    let m = s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics" && placed(m).iter().any(|d| d.0 == "K701")
    });
    let p = placed(&m);
    assert!(has(&p, "K202", 0, 9, 13), "{p:?}");
    assert!(!p.iter().any(|d| d.0 == "K101"), "{p:?}");
    // The command line counts columns as an editor shows the file: after the mark.
    let dir = std::env::temp_dir().join(format!("kelp-bom-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("bom.kelp");
    std::fs::write(&file, text).unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_kelp"))
        .args(["check", "--format", "json", file.to_str().unwrap()])
        .output()
        .unwrap();
    let report: Value = serde_json::from_slice(&out.stdout).unwrap();
    let d: Vec<&Value> = report["diagnostics"].as_array().unwrap().iter().collect();
    assert!(!d.iter().any(|d| d["code"] == "K101"), "{d:?}");
    let k202 = d.iter().find(|d| d["code"] == "K202").expect("K202");
    assert_eq!(k202["range"]["start"], json!({"line": 0, "character": 8}));
    assert!(d.iter().any(|d| d["code"] == "K701" && d["range"]["start"]["line"] == 1), "{d:?}");
    let _ = std::fs::remove_dir_all(&dir);
}

fn framed(v: Value) -> Vec<u8> {
    let body = v.to_string();
    format!("Content-Length: {}\r\n\r\n{body}", body.len()).into_bytes()
}

#[test]
fn malformed_frames_get_error_replies_and_the_server_serves_on() {
    // Error codes: JSON-RPC 2.0 specification, sec. 5.1 (-32700 parse error, -32600
    // invalid request, id null when it cannot be read).
    let mut s = client::Server::start();
    let mut aside = Vec::new();
    s.open(URI, "let a = 1\n", &mut aside);
    // Each input with the error replies it must get.
    let hostile: [(&[u8], &[i64]); 7] = [
        (b"Content-Length: 8\r\n\r\nnot json", &[-32700]),
        (b"Content-Length: 5\r\n\r\n[1,2]", &[-32600]),
        (b"Content-Lenght 12\r\n\r\nxxxx", &[-32700]),
        (b"Content-Type: text/plain\r\n\r\n{}", &[-32700]),
        (b"Content-Length: 1x\r\n\r\n{}", &[-32700]),
        (b"Content-Length: 99999999999\r\n\r\n", &[-32700]),
        // Too short: the cut body, then its tail (which runs into the next header).
        (b"Content-Length: 5\r\n\r\n{\"jsonrpc\":\"2.0\",\"method\":\"initialized\"}", &[-32700, -32700]),
    ];
    for (bytes, _) in &hostile {
        s.send_raw(bytes);
        // Each is followed by a good frame, which must be read whole.
        s.send_raw(&framed(json!({"jsonrpc": "2.0", "method": "$/kelpNothing", "params": {}})));
    }
    let r = s.request("textDocument/documentSymbol", json!({"textDocument": {"uri": URI}}), &mut aside);
    assert_eq!(r["result"][0]["name"], "a", "{r}");
    let errors: Vec<i64> =
        aside.iter().filter(|m| m["id"].is_null()).filter_map(|m| m["error"]["code"].as_i64()).collect();
    let mut want: Vec<i64> = hostile.iter().flat_map(|h| h.1.iter().copied()).collect();
    want.sort();
    let mut got = errors.clone();
    got.sort();
    assert_eq!(got, want, "{aside:?}");
    // A request with a readable id but an unusable shape is answered under its id.
    s.send_raw(&framed(json!({"jsonrpc": "2.0", "id": 99, "method": 7})));
    let m = s.wait_for(&mut aside, |m| m["id"] == 99);
    assert_eq!(m["error"]["code"], -32600);
    let r = s.request("textDocument/documentSymbol", json!({"textDocument": {"uri": URI}}), &mut aside);
    assert_eq!(r["result"][0]["name"], "a", "still serving: {r}");
}

#[test]
fn a_frame_cut_off_at_the_end_of_input_gets_a_parse_error_and_a_clean_exit() {
    let mut child = Command::new(env!("CARGO_BIN_EXE_kelp"))
        .arg("lsp")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stdin = child.stdin.take().unwrap();
    stdin.write_all(b"Content-Length: 100\r\n\r\n{\"jsonrpc\"").unwrap();
    drop(stdin);
    let mut out = String::new();
    child.stdout.take().unwrap().read_to_string(&mut out).unwrap();
    let mut err = String::new();
    child.stderr.take().unwrap().read_to_string(&mut err).unwrap();
    let status = child.wait().unwrap();
    assert_eq!(status.code(), Some(0), "no crash; stderr: {err}");
    let body = out.split("\r\n\r\n").nth(1).unwrap_or_else(|| panic!("no reply: {out:?}"));
    let reply: Value = serde_json::from_str(body).unwrap();
    assert_eq!((reply["id"].clone(), reply["error"]["code"].clone()), (Value::Null, json!(-32700)));
    assert!(err.contains("ended"), "stderr says why: {err}");
}
