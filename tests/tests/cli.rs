//! The command line in-process: exit codes, the JSON contract, fmt, samples.

use kelp_tests::kelp;
use std::path::PathBuf;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).parent().unwrap().to_path_buf()
}

fn temp_file(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("kelp-cli-{}-{name}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p
}

#[test]
fn every_sample_passes_check() {
    let samples = root().join("samples");
    let mut n = 0;
    for entry in std::fs::read_dir(&samples).unwrap() {
        let p = entry.unwrap().path();
        if p.extension().is_some_and(|e| e == "kelp") {
            let (code, out, err) = kelp(&["check", p.to_str().unwrap()]);
            assert_eq!(code, 0, "{}: {out}{err}", p.display());
            assert!(out.contains(": ok:"), "{out}");
            n += 1;
        }
    }
    assert!(n >= 3, "at least three samples");
}

#[test]
fn exit_codes() {
    let ok = temp_file("ok.kelp", "expect 1 + 1 == 2\n");
    let bad = temp_file("bad.kelp", "expect 1 + 1 == 3\n");
    let broken = temp_file("broken.kelp", "let a = (\n");
    assert_eq!(kelp(&["check", ok.to_str().unwrap()]).0, 0);
    assert_eq!(kelp(&["check", bad.to_str().unwrap()]).0, 1);
    assert_eq!(kelp(&["check", broken.to_str().unwrap()]).0, 1);
    assert_eq!(kelp(&["check", ok.to_str().unwrap(), bad.to_str().unwrap()]).0, 1);
    assert_eq!(kelp(&["check", "/no/such/file.kelp"]).0, 2);
    assert_eq!(kelp(&["check"]).0, 2);
    assert_eq!(kelp(&["frobnicate"]).0, 2);
    // `kelp lsp` itself serves stdio (tested in lsp/tests/stdio.rs); stray arguments are usage errors.
    assert_eq!(kelp(&["lsp", "--frobnicate"]).0, 2);
    let (code, _, err) = kelp(&["check", bad.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("K701") && err.contains("claim is false"), "{err}");
}

#[test]
fn json_contract() {
    // A non-ASCII comment before the claim: positions are UTF-16 units (LSP 3.17
    // specification, `Position`: character offsets count UTF-16 code units by default).
    let src = "# ∂ 🌊\nlet T = [[1.1i, 0.3], [0.3, 0.9i + 0.2]]\nlet q = 7/2\nlet big = 2^70\nexpect q == 3 # 🌊\n";
    let p = temp_file("contract.kelp", src);
    let (code, out, _) = kelp(&["check", "--format", "json", p.to_str().unwrap()]);
    assert_eq!(code, 1);
    let j: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(j["file"], p.to_str().unwrap());
    let d = &j["diagnostics"][0];
    assert_eq!(d["severity"], "error");
    assert_eq!(d["code"], "K701");
    assert_eq!(d["range"]["start"]["line"], 4);
    assert_eq!(d["range"]["start"]["character"], 0);
    assert_eq!(d["range"]["end"]["character"], 13);
    let values = j["values"].as_array().unwrap();
    let t = values.iter().find(|v| v["name"] == "T").unwrap();
    assert_eq!(t["type"], "matrix");
    assert_eq!(t["value"][0][0], serde_json::json!([0.0, 1.1]));
    assert_eq!(t["value"][1][1], serde_json::json!([0.2, 0.9]));
    let q = values.iter().find(|v| v["name"] == "q").unwrap();
    assert_eq!((q["type"].as_str(), q["value"].as_str()), (Some("rational"), Some("7/2")));
    // 2^70 does not fit in 64 bits: a decimal string.
    let big = values.iter().find(|v| v["name"] == "big").unwrap();
    assert_eq!(big["value"], "1180591620717411303424");
    let e = &j["expectations"][0];
    assert_eq!(e["passed"], false);
    assert!(e["detail"].as_str().unwrap().contains("q = 7/2"));
    assert!(j["outputs"].as_array().unwrap().is_empty());
    // Several files: an array.
    let (_, out, _) = kelp(&["check", "--format", "json", p.to_str().unwrap(), p.to_str().unwrap()]);
    let j: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(j.as_array().unwrap().len(), 2);
}

#[test]
fn related_information_in_json() {
    let p = temp_file("dup.kelp", "let a = 1\nlet a = 2\n");
    let (_, out, _) = kelp(&["check", "--format", "json", p.to_str().unwrap()]);
    let j: serde_json::Value = serde_json::from_str(&out).unwrap();
    let d = &j["diagnostics"][0];
    assert_eq!(d["code"], "K201");
    assert_eq!(d["related"][0]["message"], "first defined here");
    assert_eq!(d["related"][0]["range"]["start"]["line"], 0);
}

#[test]
fn invalid_utf8_is_a_diagnostic_not_a_crash() {
    let dir = std::env::temp_dir().join(format!("kelp-cli-{}-utf8", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let p = dir.join("bytes.kelp");
    std::fs::write(&p, b"let a = 1\nlet b = \xff\xfe\n").unwrap();
    let (code, _, err) = kelp(&["check", p.to_str().unwrap()]);
    assert_eq!(code, 1);
    assert!(err.contains("K101") && err.contains("UTF-8"), "{err}");
}

#[test]
fn fmt_rewrites_and_checks() {
    let p = temp_file("fmt.kelp", "let   a=[1,2]   # keep me\n\n\n\nexpect a==[1 , 2]\n");
    let path = p.to_str().unwrap();
    assert_eq!(kelp(&["fmt", "--check", path]).0, 1);
    assert_eq!(kelp(&["fmt", path]).0, 0);
    let text = std::fs::read_to_string(&p).unwrap();
    assert_eq!(text, "let a = [1, 2]  # keep me\n\nexpect a == [1, 2]\n");
    assert_eq!(kelp(&["fmt", "--check", path]).0, 0);
}

#[test]
fn run_writes_outputs_and_check_does_not() {
    let p = temp_file(
        "run.kelp",
        "wave w = soliton(kappa = [-1, 1], a = [[1, 1]])\nsample w over x in -1..1 step 0.5, t = 0 to \"out/w.csv\"\n",
    );
    let out = p.parent().unwrap().join("out/w.csv");
    let _ = std::fs::remove_file(&out);
    assert_eq!(kelp(&["check", p.to_str().unwrap()]).0, 0);
    assert!(!out.exists(), "check writes nothing");
    let (code, stdout, err) = kelp(&["run", p.to_str().unwrap()]);
    assert_eq!(code, 0, "{err}");
    assert!(stdout.contains("wrote out/w.csv"), "{stdout}");
    assert_eq!(std::fs::read_to_string(&out).unwrap().lines().count(), 6, "header and five rows");
}
