//! `kelp check` over collections: folders and glob patterns expanded to a sorted file list,
//! a deterministic shard of it, files evaluated in parallel, and reports in file order
//! (so results are identical run to run and across thread counts) as human text, JSON,
//! SARIF 2.1.0 or JUnit XML.

use kelp_evaluator::{evaluate, json::file_report, Mode};
use kelp_lang::{render::render, Code, Diagnostic, Encoding, LineIndex, Severity};
use serde_json::{json, Value as J};
use std::path::{Path, PathBuf};

/// Everything the report formats need from one file, as plain data (evaluations hold
/// `Rc`s and stay inside their worker thread).
pub struct Outcome {
    pub rendered: String,
    pub summary: String,
    /// Computed values (with --verbose), shown before the summary.
    pub values: Vec<String>,
    /// Files written (`kelp run`), shown after it.
    pub written: Vec<String>,
    pub json: J,
    pub sarif: Vec<J>,
    pub junit: String,
    pub any_error: bool,
}

/// Files named directly, every `*.kelp` under a named folder (recursively), and the matches
/// of glob patterns; sorted and without repeats.
pub fn collect(inputs: &[PathBuf]) -> Result<Vec<PathBuf>, String> {
    fn walk(dir: &Path, out: &mut Vec<PathBuf>) -> Result<(), String> {
        let entries = std::fs::read_dir(dir).map_err(|e| format!("kelp: cannot read {}: {e}", dir.display()))?;
        for entry in entries.flatten() {
            let p = entry.path();
            let hidden = p.file_name().and_then(|n| n.to_str()).is_some_and(|n| n.starts_with('.'));
            if hidden {
                continue;
            }
            if p.is_dir() {
                walk(&p, out)?;
            } else if p.extension().and_then(|e| e.to_str()) == Some("kelp") {
                out.push(p);
            }
        }
        Ok(())
    }
    let mut out = vec![];
    for input in inputs {
        let text = input.to_string_lossy();
        if input.is_dir() {
            walk(input, &mut out)?;
        } else if !input.exists() && text.contains(['*', '?', '[']) {
            let paths = glob::glob(&text).map_err(|e| format!("kelp: bad pattern {text}: {e}"))?;
            let before = out.len();
            out.extend(paths.flatten().filter(|p| p.is_file()));
            if out.len() == before {
                return Err(format!("kelp: no file matches {text}"));
            }
        } else {
            out.push(input.clone());
        }
    }
    out.sort();
    out.dedup();
    Ok(out)
}

/// `K/N` (1 <= K <= N).
pub fn parse_shard(s: &str) -> Result<(u64, u64), String> {
    let (k, n) = s.split_once('/').ok_or_else(|| format!("kelp: --shard takes K/N, not {s}"))?;
    let (k, n): (u64, u64) =
        (k.trim().parse().map_err(|_| "kelp: bad shard")?, n.trim().parse().map_err(|_| "kelp: bad shard")?);
    if n == 0 || k == 0 || k > n {
        return Err(format!("kelp: --shard {s}: need 1 <= K <= N"));
    }
    Ok((k, n))
}

/// Whether a file belongs to shard K of N: by a fixed hash (FNV-1a) of its path as given,
/// so a file's shard does not change when other files are added.
pub fn in_shard(path: &Path, (k, n): (u64, u64)) -> bool {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in path.to_string_lossy().as_bytes() {
        h ^= *b as u64;
        h = h.wrapping_mul(0x0100_0000_01b3);
    }
    h % n == k - 1
}

fn xml(s: &str) -> String {
    s.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;").replace('"', "&quot;")
}

/// How files are evaluated and reported.
#[derive(Clone, Debug, Default)]
pub struct Options {
    pub verbose: bool,
    pub color: bool,
    /// `--limit NAME=VALUE` overrides of the file's settings.
    pub limits: Vec<(String, f64)>,
}

/// `NAME=VALUE` for `--limit`: a setting that exists and a value in its range.
pub fn parse_limit(s: &str) -> Result<(String, f64), String> {
    let (name, value) = s.split_once('=').ok_or_else(|| format!("`{s}`: write a limit as NAME=VALUE"))?;
    let v: f64 = value.trim().parse().map_err(|_| format!("`{value}` is not a number"))?;
    let mut probe = kelp_lang::check::Settings::default();
    probe.set(name.trim(), v)?;
    Ok((name.trim().to_string(), v))
}

/// Evaluates one file into an outcome.
pub fn outcome(path: &Path, mode: &Mode, opts: &Options) -> Result<Outcome, String> {
    let (verbose, color) = (opts.verbose, opts.color);
    let shown = path.display().to_string();
    let (src, utf8) = crate::cli::read_source(path)?;
    // Command-line limits override the file's (they were validated when parsed).
    let checked = kelp_lang::check::check_with(&src, &opts.limits);
    let eval = evaluate(&checked, &src, mode);
    let mut diags: Vec<Diagnostic> =
        utf8.into_iter().chain(checked.diagnostics.iter().cloned()).chain(eval.diagnostics.iter().cloned()).collect();
    kelp_lang::diag::sort(&mut diags);
    let any_error = diags.iter().any(Diagnostic::is_error);
    // Cautions about physical units are always shown, like warnings.
    let shown_always = |d: &Diagnostic| d.severity <= Severity::Warning || d.code == Code::ModelLimits;
    let visible: Vec<Diagnostic> = diags.iter().filter(|d| verbose || shown_always(d)).cloned().collect();
    let rendered = render(&shown, &src, &visible, color);
    let mut values = vec![];
    if verbose {
        for v in &eval.values {
            let bound =
                if v.value.error_bound > 0.0 { format!(" (± {:.1e})", v.value.error_bound) } else { String::new() };
            values.push(format!("  {} = {}{bound}", v.name, v.value.value));
        }
    }
    let passed = eval.expectations.iter().filter(|e| e.passed == Some(true)).count();
    let failed = eval.expectations.iter().filter(|e| e.passed == Some(false)).count();
    let open = eval.expectations.len() - passed - failed;
    let errors = diags.iter().filter(|d| d.is_error()).count();
    let warnings = diags.iter().filter(|d| d.severity == Severity::Warning).count();
    let verdict = if errors == 0 { "ok" } else { "FAILED" };
    let summary = format!(
        "{shown}: {verdict}: {passed} claim(s) passed, {failed} failed, {open} not decided; {errors} error(s), {warnings} warning(s)"
    );
    let written: Vec<String> = eval.outputs.iter().map(|o| format!("  wrote {o}")).collect();
    let json = file_report(&shown, &src, &diags, &eval);

    // SARIF: one result per warning or error, and the physical-units cautions as notes
    // (other information diagnostics are hover material).
    let idx = LineIndex::of_file(&src);
    let sarif = diags
        .iter()
        .filter(|d| shown_always(d))
        .map(|d| {
            let (a, b) = (idx.line_col(d.span.start, Encoding::Utf16), idx.line_col(d.span.end, Encoding::Utf16));
            let level = match d.severity {
                Severity::Error => "error",
                Severity::Warning => "warning",
                _ => "note",
            };
            json!({
                "ruleId": d.code.as_str(),
                "level": level,
                "message": {"text": d.message},
                "locations": [{"physicalLocation": {
                    "artifactLocation": {"uri": shown.replace('\\', "/")},
                    "region": {
                        "startLine": a.line + 1, "startColumn": a.character + 1,
                        "endLine": b.line + 1, "endColumn": b.character + 1,
                    },
                }}],
            })
        })
        .collect();

    // JUnit: one test case per claim, plus one for the file's other errors.
    let mut cases = String::new();
    let mut failures = 0;
    let mut skipped = 0;
    for e in &eval.expectations {
        let line = idx.line_col(e.span.start, Encoding::Utf16).line + 1;
        let name = xml(src[e.span.range()].split(['\n', '\r']).next().unwrap_or(""));
        let body = match e.passed {
            Some(true) => String::new(),
            Some(false) => {
                failures += 1;
                format!("<failure message=\"{}\"/>", xml(&e.detail))
            }
            None => {
                skipped += 1;
                format!("<skipped message=\"{}\"/>", xml(&e.detail))
            }
        };
        cases.push_str(&format!(
            "    <testcase classname=\"{}\" name=\"line {line}: {name}\">{body}</testcase>\n",
            xml(&shown)
        ));
    }
    let claim_spans: Vec<_> = eval.expectations.iter().map(|e| e.span).collect();
    let other: Vec<&Diagnostic> = diags
        .iter()
        .filter(|d| d.is_error() && !claim_spans.iter().any(|s| s.start <= d.span.start && d.span.end <= s.end))
        .collect();
    let body = if other.is_empty() {
        String::new()
    } else {
        failures += 1;
        let text: Vec<String> = other.iter().map(|d| format!("{}: {}", d.code.as_str(), d.message)).collect();
        format!("<failure message=\"{} error(s)\">{}</failure>", other.len(), xml(&text.join("\n")))
    };
    cases.push_str(&format!("    <testcase classname=\"{}\" name=\"checks\">{body}</testcase>\n", xml(&shown)));
    let junit = format!(
        "  <testsuite name=\"{}\" tests=\"{}\" failures=\"{failures}\" skipped=\"{skipped}\">\n{cases}  </testsuite>\n",
        xml(&shown),
        eval.expectations.len() + 1
    );
    Ok(Outcome { rendered, summary, values, written, json, sarif, junit, any_error })
}

/// A stable 128-bit digest (two FNV-1a 64 passes with different offset bases): the cache key.
fn digest(parts: &[&[u8]]) -> String {
    let mut out = String::new();
    for basis in [0xcbf2_9ce4_8422_2325u64, 0x6c62_272e_07bb_0142u64] {
        let mut h = basis;
        for p in parts {
            // Length first, so ("ab", "c") and ("a", "bc") differ.
            for b in (p.len() as u64).to_le_bytes().iter().chain(p.iter()) {
                h ^= *b as u64;
                h = h.wrapping_mul(0x0000_0100_0000_01b3);
            }
        }
        out.push_str(&format!("{h:016x}"));
    }
    out
}

/// The running binary's identity: its size and modification time (so a rebuilt kelp, even
/// of the same version number, never reads another build's entries).
fn build_id() -> String {
    std::env::current_exe()
        .and_then(std::fs::metadata)
        .map(|m| format!("{}-{:?}", m.len(), m.modified().ok()))
        .unwrap_or_default()
}

/// `outcome` through a cache folder: the key covers the tool version and build, the flags
/// that change the report, the path shown and the file's bytes, so an entry is reused only
/// for an identical check. Entries are written atomically (temporary file, then rename),
/// so concurrent runs at worst both compute the same entry.
pub fn cached_outcome(path: &Path, opts: &Options, cache: Option<&Path>) -> Result<Outcome, String> {
    let Some(dir) = cache else { return outcome(path, &Mode::Check, opts) };
    let bytes = std::fs::read(path).map_err(|e| format!("kelp: cannot read {}: {e}", path.display()))?;
    let shown = path.display().to_string();
    let flags = format!("verbose={} color={} limits={:?}", opts.verbose, opts.color, opts.limits);
    let key = digest(&[
        b"kelp check cache 1",
        env!("CARGO_PKG_VERSION").as_bytes(),
        build_id().as_bytes(),
        flags.as_bytes(),
        shown.as_bytes(),
        &bytes,
    ]);
    let entry = dir.join(format!("{key}.json"));
    if let Some(o) =
        std::fs::read(&entry).ok().and_then(|b| serde_json::from_slice::<J>(&b).ok()).and_then(|j| from_json(&j))
    {
        return Ok(o);
    }
    let o = outcome(path, &Mode::Check, opts)?;
    std::fs::create_dir_all(dir).map_err(|e| format!("kelp: cannot create the cache folder {}: {e}", dir.display()))?;
    let text = serde_json::to_vec(&to_json(&o)).expect("serialisable");
    kelp_evaluator::output::write::atomic_write(&entry, &text)?;
    Ok(o)
}

fn to_json(o: &Outcome) -> J {
    json!({
        "rendered": o.rendered, "summary": o.summary, "values": o.values, "written": o.written,
        "json": o.json, "sarif": o.sarif, "junit": o.junit, "any_error": o.any_error,
    })
}

fn from_json(j: &J) -> Option<Outcome> {
    let strings =
        |k: &str| -> Option<Vec<String>> { j[k].as_array()?.iter().map(|v| v.as_str().map(str::to_string)).collect() };
    Some(Outcome {
        rendered: j["rendered"].as_str()?.to_string(),
        summary: j["summary"].as_str()?.to_string(),
        values: strings("values")?,
        written: strings("written")?,
        json: j["json"].clone(),
        sarif: j["sarif"].as_array()?.clone(),
        junit: j["junit"].as_str()?.to_string(),
        any_error: j["any_error"].as_bool()?,
    })
}

impl Outcome {
    /// The human report: diagnostics to `err`, values, the summary and written files to `out`.
    pub fn write_human(&self, out: &mut dyn std::io::Write, err: &mut dyn std::io::Write) -> std::io::Result<()> {
        write!(err, "{}", self.rendered)?;
        for line in self.values.iter() {
            writeln!(out, "{line}")?;
        }
        writeln!(out, "{}", self.summary)?;
        for line in self.written.iter() {
            writeln!(out, "{line}")?;
        }
        Ok(())
    }
}

/// The SARIF 2.1.0 log of a run.
pub fn sarif_log(outcomes: &[Outcome]) -> J {
    let mut codes: Vec<&str> =
        outcomes.iter().flat_map(|o| o.sarif.iter()).filter_map(|r| r["ruleId"].as_str()).collect();
    codes.sort();
    codes.dedup();
    json!({
        "version": "2.1.0",
        "$schema": "https://json.schemastore.org/sarif-2.1.0.json",
        "runs": [{
            "tool": {"driver": {
                "name": "kelp",
                "version": env!("CARGO_PKG_VERSION"),
                "rules": codes.iter().map(|c| json!({"id": c})).collect::<Vec<_>>(),
            }},
            "results": outcomes.iter().flat_map(|o| o.sarif.iter().cloned()).collect::<Vec<_>>(),
        }],
    })
}

pub fn junit_log(outcomes: &[Outcome]) -> String {
    let mut s = String::from("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<testsuites name=\"kelp\">\n");
    for o in outcomes {
        s.push_str(&o.junit);
    }
    s.push_str("</testsuites>\n");
    s
}
