//! A real editor as a user sets it up: batch Emacs (Debian's `emacs-nox` 28 with
//! `elpa-eglot` and `elpa-markdown-mode`; `.ci/editors` installs them) whose init.el only
//! loads the shipped editors/emacs/kelp.el, as editors/emacs/README.md says, with `kelp` on
//! PATH. lsp/tests/emacs.el opens two experiments of one project (marked by `.kelp`); the
//! editor must connect eglot in kelp-mode, show the false claim in flymake, reuse the server
//! for the second file and render the hover. Without `emacs` the test is skipped locally
//! and fails under CI.

#[path = "common/editor.rs"]
mod editor;

use serde_json::Value;
use std::path::Path;
use std::process::Command;

const SHIPPED: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/../editors/emacs/kelp.el");

#[test]
fn emacs_eglot_with_the_shipped_setup() {
    if !editor::available("emacs", "Debian's emacs-nox") {
        return;
    }
    let dir = editor::scratch("emacs");
    let project = dir.join("lagoon");
    std::fs::create_dir_all(project.join("notes")).unwrap();
    std::fs::write(project.join(".kelp"), "").unwrap();
    let (a, b) = editor::experiments(&project);
    // The user's init.el, exactly as the README says.
    let init = dir.join("init.el");
    std::fs::write(&init, format!("(load {:?})\n", Path::new(SHIPPED).canonicalize().unwrap())).unwrap();

    let out = dir.join("received.json");
    let path = editor::path_with_kelp(env!("CARGO_BIN_EXE_kelp"));
    let driver = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/emacs.el");
    let output = Command::new("emacs")
        .args(["--batch", "-l", driver])
        .current_dir(&dir)
        .env("HOME", &dir)
        .env("PATH", path)
        .env("KELP_INIT", &init)
        .env("KELP_A", &a)
        .env("KELP_B", &b)
        .env("KELP_OUT", &out)
        .output()
        .expect("emacs runs");
    let log = String::from_utf8_lossy(&output.stderr);
    assert!(output.status.success(), "{log}");
    let got: Value = serde_json::from_str(
        &std::fs::read_to_string(&out).unwrap_or_else(|e| panic!("the driver wrote no result ({e}): {log}")),
    )
    .unwrap();

    assert_eq!(got["mode"], "kelp-mode", "{got}");
    assert_eq!(got["connected"], true, "{got}");
    // The `.kelp` marker made lagoon/ the project, and its second file reused the server.
    assert_eq!(got["root"], format!("{}/", project.display()), "{got}");
    assert_eq!(got["sameServer"], true, "{got}");
    assert_eq!(got["servers"], 1, "{got}");

    // genus of x^4 + y^4 + y^2 z^2 - x^2 z^2 is 2: degree-genus formula (4-1)(4-2)/2 = 3 less
    // one for its only singular point, the node (0:0:1) (sympy solve of F and its partials).
    let diags = got["diagnostics"].as_array().unwrap();
    let claim = diags
        .iter()
        .find(|d| d["text"].as_str().unwrap().contains("[K701]"))
        .unwrap_or_else(|| panic!("no K701 in {diags:?}"));
    assert_eq!(claim["line"], 2);
    assert!(claim["text"].as_str().unwrap().contains("genus(shoal) = 2"), "{got}");

    // With markdown-mode installed eglot asks for markdown and renders it: the reader sees
    // no markup. tau of y^2 = x(x-1)(x-3/7) is i K(4/7)/K(3/7) = 1.0678404794432768i
    // (mpmath 1.4.1 ellipk, tests/fixtures/period_refs.json).
    assert!(got["hoverFormats"].as_array().unwrap().contains(&Value::from("markdown")), "{got}");
    let visible = got["hoverVisible"].as_str().unwrap();
    assert!(visible.contains("1.0678404794432") && visible.contains("genus 1 Riemann matrix"), "{got}");
    assert!(!visible.contains("**") && !visible.contains("```"), "markup shown raw: {visible}");
    // The equation keeps its `*`: markdown read unescaped would have eaten it.
    assert!(visible.contains("10/7*x^2"), "{visible}");
    assert_ne!(got["hover"].as_str().unwrap(), visible, "nothing was rendered: {got}");
    let _ = std::fs::remove_dir_all(&dir);
}
