//! `kelp lsp` driven over stdio as an editor would (LSP 3.17 framing: Content-Length
//! headers, JSON-RPC 2.0; positions in UTF-16 code units).

#[path = "common/client.rs"]
mod client;

use client::Server;
use serde_json::{json, Value};

const URI: &str = "file:///tmp/kelp-lsp-test/lagoon.kelp";

/// An invented experiment: a nodal quartic claimed to have genus 3 (it has genus 2), a
/// theta value, and a Greek letter in a comment (two bytes in UTF-8, one UTF-16 unit).
const TEXT: &str = "# λ-lagoon (invented)\n\
curve shoal: x^4 + y^4 + y^2*z^2 - x^2*z^2\n\
expect genus(shoal) == 3\n\
let th = theta([[1i]], [0])\n\
let   unused =  2\n";

fn diagnostics_with(m: &Value, code: &str) -> Vec<Value> {
    m["params"]["diagnostics"].as_array().unwrap().iter().filter(|d| d["code"] == code).cloned().collect()
}

#[test]
fn an_editor_session_over_stdio() {
    let mut s = Server::start();
    let mut aside = Vec::new();
    let init = s.request("initialize", json!({"processId": null, "rootUri": null, "capabilities": {}}), &mut aside);
    assert_eq!(init["result"]["capabilities"]["positionEncoding"], "utf-16");
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": URI, "languageId": "kelp", "version": 1, "text": TEXT}}),
    );
    // The evaluation-backed diagnostic: the wrong genus claim, on line 2, naming the node.
    let m = s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics" && !diagnostics_with(m, "K701").is_empty()
    });
    let d = &diagnostics_with(&m, "K701")[0];
    assert_eq!(d["range"]["start"]["line"], 2);
    let msg = d["message"].as_str().unwrap();
    assert!(msg.contains("genus(shoal) = 2") && msg.contains("A1 (node)"), "{msg}");

    // Hover on `th` (line 3, character 5): its computed value, theta(0 | i) = 1.0864...
    let h = s.request(
        "textDocument/hover",
        json!({"textDocument": {"uri": URI}, "position": {"line": 3, "character": 5}}),
        &mut aside,
    );
    let value = h["result"]["contents"]["value"].as_str().unwrap();
    assert!(value.contains("1.08643481121330"), "{value}");
    // Hover on the curve's name lists its singular point.
    let h = s.request(
        "textDocument/hover",
        json!({"textDocument": {"uri": URI}, "position": {"line": 1, "character": 8}}),
        &mut aside,
    );
    assert!(h["result"]["contents"]["value"].as_str().unwrap().contains("A1 (node)"), "{h}");
    // Hover on a built-in: its signature.
    let h = s.request(
        "textDocument/hover",
        json!({"textDocument": {"uri": URI}, "position": {"line": 3, "character": 10}}),
        &mut aside,
    );
    assert!(h["result"]["contents"]["value"].as_str().unwrap().contains("theta(T, z"), "{h}");

    // Signature help inside theta's second argument; completion offers it as a snippet.
    let sig = s.request(
        "textDocument/signatureHelp",
        json!({"textDocument": {"uri": URI}, "position": {"line": 3, "character": 24}}),
        &mut aside,
    );
    assert!(sig["result"]["signatures"][0]["label"].as_str().unwrap().starts_with("theta(T, z"), "{sig}");
    assert_eq!(sig["result"]["activeParameter"], 1);
    // In an expression (after `=` on line 4): names and calls; this client announced no
    // snippet support, so a call is plain text. At a line's start: statement keywords.
    let complete = |s: &mut Server, aside: &mut Vec<Value>, character: u32| {
        let p = json!({"textDocument": {"uri": URI}, "position": {"line": 4, "character": character}});
        s.request("textDocument/completion", p, aside)["result"].as_array().unwrap().clone()
    };
    let items = complete(&mut s, &mut aside, 15);
    let theta = items.iter().find(|i| i["label"] == "theta").unwrap();
    assert_eq!(theta["insertText"], "theta(");
    assert!(items.iter().any(|i| i["label"] == "shoal"));
    assert!(complete(&mut s, &mut aside, 0).iter().any(|i| i["label"] == "expect"));

    // A code lens above `let th` runs `kelp.evaluate`, which answers with the value and
    // tells the user.
    let lenses = s.request("textDocument/codeLens", json!({"textDocument": {"uri": URI}}), &mut aside);
    let lens = lenses["result"].as_array().unwrap().iter().find(|l| l["range"]["start"]["line"] == 3).unwrap().clone();
    assert_eq!(lens["command"]["command"], "kelp.evaluate");
    assert!(lens["command"]["title"].as_str().unwrap().starts_with("th = 1.08643481121330"), "{lens}");
    let run = s.request(
        "workspace/executeCommand",
        json!({"command": "kelp.evaluate", "arguments": lens["command"]["arguments"]}),
        &mut aside,
    );
    assert!(run["result"]["value"].as_str().unwrap().starts_with("1.08643481121330"), "{run}");
    let shown = s.wait_for(&mut aside, |m| m["method"] == "window/showMessage");
    assert!(shown["params"]["message"].as_str().unwrap().starts_with("th = 1.0864"));
    let unknown =
        s.request("workspace/executeCommand", json!({"command": "kelp.nothing", "arguments": []}), &mut aside);
    assert!(unknown.get("error").is_some());

    // Semantic tokens: the comment with a Greek letter is 21 UTF-16 units long; then the
    // keyword `curve` and the name `shoal` on line 1; `theta` is a function on line 3.
    let sem = s.request("textDocument/semanticTokens/full", json!({"textDocument": {"uri": URI}}), &mut aside);
    let data: Vec<u64> = sem["result"]["data"].as_array().unwrap().iter().map(|v| v.as_u64().unwrap()).collect();
    assert_eq!(&data[..15], &[0, 0, 21, 5, 0, 1, 0, 5, 0, 0, 0, 6, 5, 1, 0]);
    let theta_at = data.chunks(5).scan((0, 0), |(l, c), t| {
        *l += t[0];
        *c = if t[0] == 0 { *c + t[1] } else { t[1] };
        Some((*l, *c, t[3]))
    });
    assert!(theta_at.into_iter().any(|(l, c, k)| (l, c, k) == (3, 9, 2)));

    // Inlay hint after the curve: its genus and singular points.
    let hints = s.request(
        "textDocument/inlayHint",
        json!({"textDocument": {"uri": URI}, "range": {"start": {"line": 0, "character": 0}, "end": {"line": 9, "character": 0}}}),
        &mut aside,
    );
    let h = &hints["result"][0];
    assert_eq!(h["position"]["line"], 1);
    assert_eq!(h["label"].as_str().unwrap().trim(), "genus 2, 1 singular point", "{hints}");

    // Go to definition from the use of `shoal` on line 2.
    let g = s.request(
        "textDocument/definition",
        json!({"textDocument": {"uri": URI}, "position": {"line": 2, "character": 15}}),
        &mut aside,
    );
    assert_eq!(g["result"]["range"]["start"], json!({"line": 1, "character": 6}));

    // Formatting normalises the spacing of the last line.
    let f = s.request(
        "textDocument/formatting",
        json!({"textDocument": {"uri": URI}, "options": {"tabSize": 4, "insertSpaces": true}}),
        &mut aside,
    );
    assert!(f["result"][0]["newText"].as_str().unwrap().contains("let unused = 2\n"));

    // A comment-only edit re-evaluates nothing: the very first publication for the new
    // version already carries the claim's diagnostic, moved down one line.
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": 2}, "contentChanges": [
            {"range": {"start": {"line": 0, "character": 0}, "end": {"line": 0, "character": 0}}, "text": "# survey note\n"}
        ]}),
    );
    let m = s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics" && m["params"]["version"] == 2);
    let moved = diagnostics_with(&m, "K701");
    assert_eq!(moved.len(), 1, "{m}");
    assert_eq!(moved[0]["range"]["start"]["line"], 3);

    // An incremental edit that breaks line 5: a syntax diagnostic at once, at the right
    // place, while the comment with the Greek letter keeps UTF-16 columns honest.
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": 3}, "contentChanges": [
            {"range": {"start": {"line": 5, "character": 15}, "end": {"line": 5, "character": 17}}, "text": "2 +"}
        ]}),
    );
    let m = s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics"
            && m["params"]["version"] == 3
            && !diagnostics_with(m, "K102").is_empty()
    });
    assert_eq!(diagnostics_with(&m, "K102")[0]["range"]["start"]["line"], 5);
    // A stale change (version 3 again) is ignored, so the text stays broken.
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": 3}, "contentChanges": [{"text": "let a = 1\n"}]}),
    );
    let r = s.request("textDocument/documentSymbol", json!({"textDocument": {"uri": URI}}), &mut aside);
    let names: Vec<&str> = r["result"].as_array().unwrap().iter().map(|s| s["name"].as_str().unwrap()).collect();
    assert!(names.contains(&"shoal") && names.contains(&"th"), "{names:?}");

    // Malformed requests get JSON-RPC errors; the server lives on.
    let bad = s.request("textDocument/hover", json!({"nonsense": true}), &mut aside);
    assert!(bad.get("error").is_some(), "{bad}");
    let again = s.request(
        "textDocument/hover",
        json!({"textDocument": {"uri": URI}, "position": {"line": 4, "character": 5}}),
        &mut aside,
    );
    assert!(again.get("result").is_some());

    let shut = s.request("shutdown", json!(null), &mut aside);
    assert!(shut.get("error").is_none());
    s.notify("exit", json!(null));
}

/// A code lens above `sample` writes that output through `kelp.write`, with a message naming
/// the file; the file holds the wave's values (one soliton, u = 2 sech^2(x) at t = 0;
/// conventions file).
#[test]
fn a_lens_writes_a_sample() {
    let dir = std::env::temp_dir().join(format!("kelp-lsp-write-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("cove.kelp");
    let text =
        "wave w = soliton(kappa = [-1, 1], a = [[1, 1]])\nsample w over x in -1..1 step 1, t = 0 to \"out/w.csv\"\n";
    std::fs::write(&file, text).unwrap();
    let uri = format!("file://{}", file.display());
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.open(&uri, text, &mut aside);
    let lenses = s.request("textDocument/codeLens", json!({"textDocument": {"uri": uri}}), &mut aside);
    let lens = lenses["result"]
        .as_array()
        .unwrap()
        .iter()
        .find(|l| l["command"]["command"] == "kelp.write")
        .unwrap_or_else(|| panic!("no write lens in {lenses}"))
        .clone();
    assert_eq!(lens["command"]["title"], "write out/w.csv");
    assert_eq!(lens["range"]["start"]["line"], 1);
    let run = s.request(
        "workspace/executeCommand",
        json!({"command": "kelp.write", "arguments": lens["command"]["arguments"]}),
        &mut aside,
    );
    assert_eq!(run["result"]["written"][0], "out/w.csv", "{run}");
    let shown = s.wait_for(&mut aside, |m| m["method"] == "window/showMessage");
    assert!(shown["params"]["message"].as_str().unwrap().contains("wrote out/w.csv"));
    let csv = std::fs::read_to_string(dir.join("out/w.csv")).unwrap();
    let row: Vec<f64> = csv.lines().nth(2).unwrap().split(',').map(|v| v.parse().unwrap()).collect();
    assert!((row[3] - 2.0).abs() < 1e-14, "{csv}");
    let shut = s.request("shutdown", json!(null), &mut aside);
    assert!(shut.get("error").is_none());
    s.notify("exit", json!(null));
    let _ = std::fs::remove_dir_all(&dir);
}

/// Outputs land inside the workspace: with a workspace folder elsewhere, `kelp.write`
/// writes nothing; once the document's folder is added as a workspace folder, it writes.
#[test]
fn writes_stay_inside_workspace_folders() {
    let root = std::env::temp_dir().join(format!("kelp-lsp-ws-{}", std::process::id()));
    let (inside, elsewhere) = (root.join("project"), root.join("elsewhere"));
    let _ = std::fs::remove_dir_all(&root);
    std::fs::create_dir_all(&inside).unwrap();
    std::fs::create_dir_all(&elsewhere).unwrap();
    let file = inside.join("cove.kelp");
    let text = "wave w = soliton(kappa = [-1, 1], a = [[1, 1]])\nsample w over x in -1..1 step 1, t = 0 to \"w.csv\"\n";
    std::fs::write(&file, text).unwrap();
    let uri = format!("file://{}", file.display());
    let folder = |p: &std::path::Path| json!({"uri": format!("file://{}", p.display()), "name": "f"});
    let mut s = Server::start();
    let mut aside = Vec::new();
    let init = s.request(
        "initialize",
        json!({"processId": null, "rootUri": null, "capabilities": {}, "workspaceFolders": [folder(&elsewhere)]}),
        &mut aside,
    );
    assert_eq!(init["result"]["capabilities"]["workspace"]["workspaceFolders"]["supported"], true);
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": uri, "languageId": "kelp", "version": 1, "text": text}}),
    );
    let write = |s: &mut Server, aside: &mut Vec<Value>| {
        s.request("workspace/executeCommand", json!({"command": "kelp.write", "arguments": [uri, 1]}), aside)
    };
    let refused = write(&mut s, &mut aside);
    assert_eq!(refused["result"]["written"], json!([]), "{refused}");
    assert!(!inside.join("w.csv").exists());
    s.notify(
        "workspace/didChangeWorkspaceFolders",
        json!({"event": {"added": [folder(&inside)], "removed": [folder(&elsewhere)]}}),
    );
    let done = write(&mut s, &mut aside);
    assert_eq!(done["result"]["written"][0], "w.csv", "{done}");
    assert!(inside.join("w.csv").exists());
    let shut = s.request("shutdown", json!(null), &mut aside);
    assert!(shut.get("error").is_none());
    s.notify("exit", json!(null));
    let _ = std::fs::remove_dir_all(&root);
}
