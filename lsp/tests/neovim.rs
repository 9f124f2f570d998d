//! A real editor: headless Neovim (Debian's `neovim`, 0.7; `.ci/run` installs it) opens
//! an experiment with a wrong genus claim through `kelp lsp` (lsp/tests/neovim.lua) and
//! must receive the diagnostic on the claim's line and a hover with the entries of tau.
//! Without `nvim` the test is skipped locally and fails under CI.

use serde_json::Value;
use std::process::Command;

#[test]
fn neovim_receives_diagnostics_and_hover() {
    if Command::new("nvim").arg("--version").output().is_err() {
        assert!(std::env::var_os("CI").is_none(), "nvim is missing: .ci/run must install Debian's neovim");
        eprintln!("skipped: nvim is not installed");
        return;
    }
    let dir = std::env::temp_dir().join(format!("kelp-nvim-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("lagoon.kelp");
    // An invented experiment: a nodal quartic (genus 2) claimed to have genus 3, and the
    // Riemann matrix of a cubic.
    std::fs::write(
        &file,
        "# lagoon survey (invented)\ncurve shoal: x^4 + y^4 + y^2*z^2 - x^2*z^2\nexpect genus(shoal) == 3\n\
         curve shell: y^2 = x*(x - 1)*(x - 3/7)\nlet tw = tau(shell)\n",
    )
    .unwrap();
    let out = dir.join("received.json");
    let script = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/neovim.lua");
    let status = Command::new("nvim")
        .args(["--headless", "-u", "NONE", "-i", "NONE", "-n", "-c", &format!("luafile {script}")])
        .env("KELP_BIN", env!("CARGO_BIN_EXE_kelp"))
        .env("KELP_FILE", &file)
        .env("KELP_OUT", &out)
        .status()
        .expect("nvim runs");
    assert!(status.success());
    let got: Value =
        serde_json::from_str(&std::fs::read_to_string(&out).expect("the script wrote its result")).unwrap();
    let diags = got["diagnostics"].as_array().unwrap();
    let claim = diags.iter().find(|d| d["code"] == "K701").unwrap_or_else(|| panic!("no K701 in {diags:?}"));
    assert_eq!(claim["line"], 2);
    assert!(claim["message"].as_str().unwrap().contains("genus(shoal) = 2"));
    // tau of y^2 = x(x-1)(x-3/7) is i K(4/7)/K(3/7) = 1.0678404794432768i (mpmath 1.4.1
    // ellipk, tests/fixtures/period_refs.json); the hover shows the entry and its checks.
    let hover = got["hover"].as_str().unwrap();
    assert!(hover.contains("1.06784047944327"), "{got}");
    assert!(hover.contains("genus 1 Riemann matrix") && hover.contains("error bound"), "{got}");
    let _ = std::fs::remove_dir_all(&dir);
}
