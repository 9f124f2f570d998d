//! A real editor as a user sets it up: headless Neovim (Debian's `neovim`, 0.7; `.ci/editors`
//! installs it) with an init.lua that only `dofile`s the shipped editors/neovim/kelp.lua, as
//! editors/neovim/README.md says, and `kelp` found on PATH. lsp/tests/neovim.lua opens two
//! experiments under one project root and one elsewhere; the editor must receive the false
//! claim's diagnostic, show the hover of a Riemann matrix when `K` is pressed, and run one
//! server per project root. Without `nvim` the test is skipped locally and fails under CI.

#[path = "common/editor.rs"]
mod editor;

use serde_json::Value;
use std::path::Path;
use std::process::Command;

const SHIPPED: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/../editors/neovim/kelp.lua");

#[test]
fn neovim_with_the_shipped_setup() {
    if !editor::available("nvim", "Debian's neovim") {
        return;
    }
    let dir = editor::scratch("nvim");
    let (project, other) = (dir.join("lagoon"), dir.join("elsewhere"));
    std::fs::create_dir_all(project.join(".git")).unwrap();
    std::fs::create_dir_all(project.join("notes")).unwrap();
    std::fs::create_dir_all(&other).unwrap();
    let (a, b) = editor::experiments(&project);
    let c = other.join("drift.kelp");
    std::fs::write(&c, "# drift (invented)\nlet d = 2 + 3\n").unwrap();
    // The user's init.lua, exactly as the README says.
    let init = dir.join("init.lua");
    std::fs::write(&init, format!("dofile({:?})\n", Path::new(SHIPPED).canonicalize().unwrap())).unwrap();

    let out = dir.join("received.json");
    let path = editor::path_with_kelp(env!("CARGO_BIN_EXE_kelp"));
    let script = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/neovim.lua");
    let status = Command::new("nvim")
        .args(["--headless", "-i", "NONE", "-n", "-u"])
        .arg(&init)
        .args(["-c", &format!("luafile {script}")])
        .current_dir(&dir)
        .env("PATH", path)
        .env("XDG_CONFIG_HOME", dir.join("config"))
        .env("XDG_DATA_HOME", dir.join("data"))
        .env("XDG_STATE_HOME", dir.join("state"))
        .env("KELP_A", &a)
        .env("KELP_B", &b)
        .env("KELP_C", &c)
        .env("KELP_OUT", &out)
        .status()
        .expect("nvim runs");
    assert!(status.success());
    let got: Value =
        serde_json::from_str(&std::fs::read_to_string(&out).expect("the script wrote its result")).unwrap();

    // The autocmd gave every .kelp buffer the kelp filetype and its comment string.
    for name in ["a", "b", "c"] {
        assert_eq!(got["buffers"][name]["filetype"], "kelp", "{got}");
        assert_eq!(got["buffers"][name]["commentstring"], "# %s", "{got}");
    }

    // genus of x^4 + y^4 + y^2 z^2 - x^2 z^2 is 2: a plane quartic has arithmetic genus
    // (4-1)(4-2)/2 = 3 (degree-genus formula); its only singular point is (0:0:1) (sympy solve
    // of F and its partials), a node (tangent cone y^2 - x^2), which lowers it by one.
    let diags = got["diagnostics"].as_array().unwrap();
    let claim = diags.iter().find(|d| d["code"] == "K701").unwrap_or_else(|| panic!("no K701 in {diags:?}"));
    assert_eq!(claim["line"], 2);
    assert!(claim["message"].as_str().unwrap().contains("genus(shoal) = 2"));

    // `K` is the shipped buffer-local mapping (Neovim 0.7 has no LSP default for it), and
    // pressing it opened the hover float. tau of y^2 = x(x-1)(x-3/7) is
    // i K(4/7)/K(3/7) = 1.0678404794432768i (mpmath 1.4.1 ellipk, tests/fixtures/period_refs.json).
    assert_eq!(got["k_mapping"]["buffer_local"], true, "{got}");
    assert_eq!(got["k_mapping"]["lua_callback"], true, "{got}");
    let hover = got["hover"].as_str().unwrap();
    // Shown to the digits its bound (2e-14) supports: 1.06784047944328 (rounded).
    assert!(hover.contains("1.0678404794432"), "{got}");
    assert!(hover.contains("genus 1 Riemann matrix") && hover.contains("error bound"), "{got}");

    // One server per project root: both files under lagoon/ (marked by .git) share one
    // client rooted there; the file elsewhere has its own, rooted at its folder.
    let clients = got["clients"].as_array().unwrap();
    assert_eq!(clients.len(), 2, "{got}");
    let root_of = |id: &Value| clients.iter().find(|c| &c["id"] == id).map(|c| c["root"].clone()).unwrap();
    let (ca, cb, cc) =
        (&got["buffers"]["a"]["clients"], &got["buffers"]["b"]["clients"], &got["buffers"]["c"]["clients"]);
    assert_eq!(ca.as_array().unwrap().len(), 1, "{got}");
    assert_eq!(ca, cb, "{got}");
    assert_eq!(cc.as_array().unwrap().len(), 1, "{got}");
    assert_ne!(ca, cc, "{got}");
    assert_eq!(root_of(&ca[0]), project.to_str().unwrap(), "{got}");
    assert_eq!(root_of(&cc[0]), other.to_str().unwrap(), "{got}");
    let _ = std::fs::remove_dir_all(&dir);
}
