//! A real editor: headless Neovim (Debian's `neovim`, 0.7; `.ci/run` installs it) opens
//! an experiment with a wrong genus claim through `kelp lsp` (lsp/tests/neovim.lua) and
//! must receive the diagnostic on the claim's line and a hover with the computed value.
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
    // An invented experiment: a nodal quartic (genus 2) claimed to have genus 3.
    std::fs::write(
        &file,
        "# lagoon survey (invented)\ncurve shoal: x^4 + y^4 + y^2*z^2 - x^2*z^2\nexpect genus(shoal) == 3\nlet th = theta([[1i]], [0])\n",
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
    // theta(0 | i) = 1.0864348112133080 (DLMF 20.13 lemniscatic value).
    assert!(got["hover"].as_str().unwrap().contains("1.08643481121330"), "{got}");
    let _ = std::fs::remove_dir_all(&dir);
}
