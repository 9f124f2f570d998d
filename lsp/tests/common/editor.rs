//! Shared by the real-editor tests (Neovim, Emacs): whether the editor is there (skipped
//! locally, required under CI), the invented experiments they open, and a PATH with the
//! freshly built `kelp` first.
#![allow(dead_code)]

use std::path::{Path, PathBuf};
use std::process::Command;

/// Whether `cmd` runs; under CI (env `CI` set) a missing editor fails the test.
pub fn available(cmd: &str, install: &str) -> bool {
    if Command::new(cmd).arg("--version").output().is_ok() {
        return true;
    }
    assert!(std::env::var_os("CI").is_none(), "{cmd} is missing: .ci/editors must install {install}");
    eprintln!("skipped: {cmd} is not installed");
    false
}

/// A fresh scratch folder for one test run.
pub fn scratch(tag: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("kelp-{tag}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    dir
}

/// Invented experiments in `project`: a nodal quartic (genus 2) claimed to have genus 3,
/// and the Riemann matrix of a cubic one folder below. Returns their paths.
pub fn experiments(project: &Path) -> (PathBuf, PathBuf) {
    std::fs::create_dir_all(project.join("notes")).unwrap();
    let a = project.join("survey.kelp");
    std::fs::write(
        &a,
        "# lagoon survey (invented)\ncurve shoal: x^4 + y^4 + y^2*z^2 - x^2*z^2\nexpect genus(shoal) == 3\n",
    )
    .unwrap();
    let b = project.join("notes").join("shell.kelp");
    std::fs::write(&b, "# shell notes (invented)\n\n\ncurve shell: y^2 = x*(x - 1)*(x - 3/7)\nlet tw = tau(shell)\n")
        .unwrap();
    (a, b)
}

/// PATH with the folder of the `kelp` binary under test first.
pub fn path_with_kelp(kelp: &str) -> std::ffi::OsString {
    let bin_dir = Path::new(kelp).parent().unwrap().to_path_buf();
    std::env::join_paths(
        std::iter::once(bin_dir).chain(std::env::split_paths(&std::env::var_os("PATH").unwrap_or_default())),
    )
    .unwrap()
}
