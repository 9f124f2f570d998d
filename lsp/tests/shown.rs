//! What the server shows beside the text: hover values rounded to their bound, markdown
//! escaped or plain text, claim marks as inlay hints, curve facts in hover and inlays
//! rather than as diagnostics (unless asked for).

#[path = "common/client.rs"]
mod client;

use client::Server;
use serde_json::{json, Value};

const URI: &str = "file:///tmp/kelp-shown-test/reef.kelp";

/// An invented reef survey: a nodal quartic (genus 2), theta(0 | i), and three claims:
/// one true, one false, one undecided at the requested tolerance.
const TEXT: &str = "curve reef: x^4 + y^4 + y^2*z^2 - x^2*z^2\n\
let th = theta([[1i]], [0])\n\
expect genus(reef) == 2\n\
expect genus(reef) == 3\n\
expect th == 1.0864348112133080146 within 1e-30\n";

fn start(capabilities: Value, options: Value) -> (Server, Vec<Value>) {
    let mut s = Server::start();
    let mut aside = Vec::new();
    s.request(
        "initialize",
        json!({"processId": null, "rootUri": null, "capabilities": capabilities, "initializationOptions": options}),
        &mut aside,
    );
    s.notify("initialized", json!({}));
    s.notify(
        "textDocument/didOpen",
        json!({"textDocument": {"uri": URI, "languageId": "kelp", "version": 1, "text": TEXT}}),
    );
    // Evaluated: the false claim's diagnostic is there.
    s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics"
            && m["params"]["diagnostics"].as_array().is_some_and(|d| d.iter().any(|d| d["code"] == "K701"))
    });
    (s, aside)
}

fn hover(s: &mut Server, aside: &mut Vec<Value>, line: u32, character: u32) -> Value {
    s.request(
        "textDocument/hover",
        json!({"textDocument": {"uri": URI}, "position": {"line": line, "character": character}}),
        aside,
    )
}

#[test]
fn hover_shows_the_digits_the_bound_supports() {
    let (mut s, mut aside) = start(json!({}), json!(null));
    let h = hover(&mut s, &mut aside, 1, 5);
    let text = h["result"]["contents"]["value"].as_str().unwrap().to_string();
    assert_eq!(h["result"]["contents"]["kind"], "markdown");
    // theta(0 | i) = pi^(1/4) / Gamma(3/4) = 1.08643481121330801457531612151... (a classical
    // closed form of theta_3(e^-pi); digits from mpmath 1.3.0 at 40 digits).
    let truth = 1.0864348112133080145753161215102;
    // theta of a purely imaginary tau at z = 0 is computed as a complex number: `re + im i`.
    let line = text.lines().find(|l| l.starts_with("1.08")).unwrap();
    let real = line.split(" + ").next().unwrap().trim();
    let shown: f64 = real.parse().unwrap();
    let bound: f64 = text.split("error bound ").nth(1).unwrap().split_whitespace().next().unwrap().parse().unwrap();
    assert!((shown - truth).abs() <= bound, "{shown} ± {bound} misses {truth}: {text}");
    // No digit beyond the bound's place: the last shown decimal is worth at least bound / 10.
    let decimals = real.split('.').nth(1).unwrap().len();
    assert!(10f64.powi(-(decimals as i32)) >= bound / 10.0, "{decimals} decimals for a bound {bound}: {text}");
}

#[test]
fn a_curve_hover_has_its_equation_as_written_and_its_facts() {
    let (mut s, mut aside) = start(json!({}), json!(null));
    let h = hover(&mut s, &mut aside, 0, 8);
    let text = h["result"]["contents"]["value"].as_str().unwrap();
    // The equation as written, inside a code block (where `*` is literal) ...
    assert!(text.contains("```\ncurve reef: x^4 + y^4 + y^2*z^2 - x^2*z^2\n```"), "{text}");
    // ... and its genus: a quartic (arithmetic genus 3) with one node has genus 2
    // (genus-degree formula, common practice, no source).
    assert!(text.contains("genus 2, 1 singular point") && text.contains("A1 (node)"), "{text}");
    // Outside code blocks and code spans (shown literally by every renderer) there is no
    // `*` or `_` that markdown would eat (CommonMark 0.31, sections 6.1 and 6.2; from memory).
    for l in text.split("```").step_by(2) {
        let prose: String = l.split('`').step_by(2).collect();
        assert!(!prose.replace("\\*", "").contains('*') && !prose.replace("\\_", "").contains('_'), "{l}");
    }
}

#[test]
fn a_client_without_markdown_gets_plain_text() {
    let caps = json!({"textDocument": {"hover": {"contentFormat": ["plaintext"]}}});
    let (mut s, mut aside) = start(caps, json!(null));
    let h = hover(&mut s, &mut aside, 0, 8);
    assert_eq!(h["result"]["contents"]["kind"], "plaintext");
    let text = h["result"]["contents"]["value"].as_str().unwrap();
    assert!(!text.contains("```") && !text.contains('\\'), "{text}");
    assert!(text.contains("curve reef: x^4 + y^4 + y^2*z^2 - x^2*z^2"), "{text}");
}

fn inlays(s: &mut Server, aside: &mut Vec<Value>) -> Vec<(u64, String)> {
    let r = s.request(
        "textDocument/inlayHint",
        json!({"textDocument": {"uri": URI}, "range": {"start": {"line": 0, "character": 0}, "end": {"line": 9, "character": 0}}}),
        aside,
    );
    r["result"]
        .as_array()
        .unwrap()
        .iter()
        .map(|h| (h["position"]["line"].as_u64().unwrap(), h["label"].as_str().unwrap().trim().to_string()))
        .collect()
}

#[test]
fn claims_are_marked_and_curve_facts_are_not_diagnostics() {
    let (mut s, mut aside) = start(json!({}), json!(null));
    let hints = inlays(&mut s, &mut aside);
    let at = |line: u64| hints.iter().filter(|(l, _)| *l == line).map(|(_, t)| t.clone()).collect::<Vec<_>>();
    assert_eq!(at(0), vec!["genus 2, 1 singular point"], "{hints:?}");
    assert_eq!(at(2), vec!["✓ holds"], "{hints:?}");
    assert_eq!(at(3), vec!["✗ false"], "{hints:?}");
    // The true value to 20 digits, against a 1e-30 tolerance: the bound cannot decide it.
    assert_eq!(at(4), vec!["? undecided"], "{hints:?}");
    // The facts are not in the problems list by default ...
    let m = s.wait_for(&mut aside, |m| m["method"] == "textDocument/publishDiagnostics");
    assert!(!m["params"]["diagnostics"].as_array().unwrap().iter().any(|d| d["code"] == "K603"), "{m}");
    // ... and are, when the client asks for them.
    let (mut s, mut aside) = start(json!({}), json!({"curveFactsAsDiagnostics": true}));
    s.notify(
        "textDocument/didChange",
        json!({"textDocument": {"uri": URI, "version": 2}, "contentChanges": [
            {"range": {"start": {"line": 5, "character": 0}, "end": {"line": 5, "character": 0}}, "text": "# note\n"}
        ]}),
    );
    let m = s.wait_for(&mut aside, |m| {
        m["method"] == "textDocument/publishDiagnostics"
            && m["params"]["diagnostics"].as_array().is_some_and(|d| d.iter().any(|d| d["code"] == "K603"))
    });
    let k603: Vec<&Value> =
        m["params"]["diagnostics"].as_array().unwrap().iter().filter(|d| d["code"] == "K603").collect();
    assert_eq!(k603[0]["range"]["start"]["line"], 0);
}
