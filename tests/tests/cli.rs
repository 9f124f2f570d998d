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
    // Several files: an array (a file named twice is checked once).
    let other = temp_file("contract2.kelp", "let a = 1\n");
    let (_, out, _) =
        kelp(&["check", "--format", "json", p.to_str().unwrap(), other.to_str().unwrap(), p.to_str().unwrap()]);
    let j: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(j.as_array().unwrap().len(), 2);
}

#[test]
fn fixes_in_json_and_on_the_terminal() {
    let p = temp_file("fix.kelp", "let depth = 2\nexpect depth = 2\n");
    let (_, out, _) = kelp(&["check", "--format", "json", p.to_str().unwrap()]);
    let j: serde_json::Value = serde_json::from_str(&out).unwrap();
    let d = &j["diagnostics"][0];
    assert_eq!(d["code"], "K102");
    let edit = &d["fixes"][0]["edits"][0];
    assert_eq!(edit["text"], "==");
    assert_eq!(edit["range"]["start"], serde_json::json!({"line": 1, "character": 13}));
    // Applying it gives a file that checks and whose claim holds (common practice, no source).
    let fixed = temp_file("fixed.kelp", "let depth = 2\nexpect depth == 2\n");
    let (code, _, _) = kelp(&["check", fixed.to_str().unwrap()]);
    assert_eq!(code, 0);
    let (_, _, err) = kelp(&["check", p.to_str().unwrap()]);
    assert!(err.contains("change `=` to `==`"), "{err}");
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

/// A collection: a folder with nested files (one with a failed claim and one with a syntax
/// error), checked whole, by glob, in shards and with 1 or 2 workers.
#[test]
fn collections_shards_and_report_formats() {
    let dir = std::env::temp_dir().join(format!("kelp-coll-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(dir.join("deep/er")).unwrap();
    for k in 0..7 {
        std::fs::write(dir.join(format!("ok{k}.kelp")), format!("let a = {k}\nexpect a + 1 == {}\n", k + 1)).unwrap();
    }
    std::fs::write(dir.join("deep/claim.kelp"), "let a = 2\nexpect a == 3\n").unwrap();
    std::fs::write(dir.join("deep/er/syntax.kelp"), "let = 1\nexpect 1 == 1\n").unwrap();
    std::fs::write(dir.join("deep/notes.txt"), "not an experiment").unwrap();
    let d = dir.to_str().unwrap();
    let (code, out, _) = kelp(&["check", d]);
    assert_eq!(code, 1);
    assert!(out.contains("9 file(s), 2 with errors"), "{out}");
    let (_, by_glob, _) = kelp(&["check", &format!("{d}/**/*.kelp")]);
    assert_eq!(by_glob, out, "a glob over the tree finds the same files");
    // Shards partition the collection.
    let mut seen = vec![];
    for k in 1..=3 {
        let (_, o, _) = kelp(&["check", d, "--shard", &format!("{k}/3"), "--format", "json"]);
        let v: serde_json::Value = serde_json::from_str(&o).unwrap();
        let files: Vec<String> = match v {
            serde_json::Value::Array(a) => a.iter().map(|r| r["file"].as_str().unwrap().to_string()).collect(),
            r if r.is_object() => vec![r["file"].as_str().unwrap().to_string()],
            _ => vec![],
        };
        seen.extend(files);
    }
    seen.sort();
    assert_eq!(seen.len(), 9);
    seen.dedup();
    assert_eq!(seen.len(), 9, "no file in two shards");
    assert_eq!(kelp(&["check", d, "--shard", "4/3"]).0, 2);
    // Same report with one or two workers.
    let one = kelp(&["check", d, "--jobs", "1", "--format", "json"]).1;
    let two = kelp(&["check", d, "--jobs", "2", "--format", "json"]).1;
    assert_eq!(one, two);
    // SARIF 2.1.0: the failed claim and the syntax error with 1-based lines.
    let (_, sarif, _) = kelp(&["check", d, "--format", "sarif"]);
    let v: serde_json::Value = serde_json::from_str(&sarif).unwrap();
    assert_eq!(v["version"], "2.1.0");
    let results = v["runs"][0]["results"].as_array().unwrap();
    let claim = results.iter().find(|r| r["ruleId"] == "K701").expect("the failed claim");
    assert_eq!(claim["locations"][0]["physicalLocation"]["region"]["startLine"], 2);
    assert!(results.iter().any(|r| r["level"] == "error" && r["ruleId"].as_str().unwrap().starts_with("K1")));
    // JUnit: one case per claim plus the checks case; the failed claim is a failure.
    let (_, junit, _) = kelp(&["check", d, "--format", "junit"]);
    assert!(junit.starts_with("<?xml") && junit.trim_end().ends_with("</testsuites>"));
    assert_eq!(junit.matches("<testsuite ").count(), 9);
    assert!(junit.contains("name=\"line 2: expect a == 3\"><failure"), "{junit}");
    let _ = std::fs::remove_dir_all(&dir);
}

/// `--cache DIR` gives the same reports as a fresh check, keeps one entry per checked file,
/// and an edited file gets a new entry (its report reflects the edit).
#[test]
fn check_cache_reuses_only_identical_checks() {
    let dir = std::env::temp_dir().join(format!("kelp-cache-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let a = dir.join("shoal.kelp");
    let b = dir.join("spit.kelp");
    std::fs::write(&a, "# invented shoal\nlet m = [[1.1i, 0.3], [0.3, 0.9i]]\nexpect is_riemann(m)\n").unwrap();
    std::fs::write(&b, "# invented spit\nexpect 1 + 1 == 2\n").unwrap();
    let cache = dir.join("cache");
    let (a_s, b_s, c_s) = (a.to_str().unwrap(), b.to_str().unwrap(), cache.to_str().unwrap());
    let fresh = kelp(&["check", "--format", "json", a_s, b_s]);
    let first = kelp(&["check", "--format", "json", "--cache", c_s, a_s, b_s]);
    let second = kelp(&["check", "--format", "json", "--cache", c_s, a_s, b_s]);
    assert_eq!(fresh, first);
    assert_eq!(first, second);
    let entries = || std::fs::read_dir(&cache).unwrap().count();
    assert_eq!(entries(), 2);
    std::fs::write(&b, "# invented spit\nexpect 1 + 1 == 3\n").unwrap();
    let edited = kelp(&["check", "--cache", c_s, b_s]);
    assert_eq!(edited.0, 1, "the edited claim fails: {edited:?}");
    assert_eq!(entries(), 3);
    let _ = std::fs::remove_dir_all(&dir);
}

/// `--limit NAME=VALUE` overrides the file's settings; an unknown or out-of-range limit is
/// a usage error (exit 2).
#[test]
fn limits_from_the_command_line() {
    let f = temp_file(
        "limits.kelp",
        "wave w = soliton(kappa = [-1, 1], a = [[1, 1]])\nexpect kp_residual(w, x in -1..1 step 0.01, t = 0) < 1e-10\n",
    );
    let p = f.to_str().unwrap();
    assert_eq!(kelp(&["check", p]).0, 0);
    let (code, out, err) = kelp(&["check", "--limit", "max_points=50", p]);
    assert_eq!(code, 1, "{out}{err}");
    assert!((out.clone() + &err).contains("K605"), "{out}{err}");
    assert_eq!(kelp(&["check", "--limit", "max_pints=50", p]).0, 2);
    assert_eq!(kelp(&["check", "--limit", "max_degree=99", p]).0, 2);
    // Tolerances past what double precision reaches, or too coarse to tell values of size 1
    // apart, are refused with the allowed range; the ends themselves are allowed.
    for bad in ["accuracy=1e-20", "tolerance=1", "accuracy=1"] {
        let (code, out, err) = kelp(&["check", "--limit", bad, p]);
        assert_eq!(code, 2, "{bad}: {out}{err}");
        assert!(err.contains("from 1e-15 to 1e-1"), "{bad}: {err}");
    }
    assert_eq!(kelp(&["check", "--limit", "accuracy=1e-15", "--limit", "tolerance=0.1", p]).0, 0);
}
