//! The hostile corpus (tests/corpus/hostile/, with expected.txt) through the `kelp` binary:
//! every file gets exit status 1 (an error diagnostic; never a crash, never a signal), the
//! expected diagnostic code, and an answer within 20 seconds. Three large inputs are
//! generated here rather than committed.

use std::path::{Path, PathBuf};
use std::process::Command;
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
