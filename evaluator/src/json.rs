//! The machine-readable report of one file (`--format json`), as specified in the
//! language sketch: diagnostics with LSP-style positions, values, expectations, outputs.

use crate::eval::Evaluation;
use crate::num::Num;
use crate::value::{Value, Valued};
use kelp_lang::{Diagnostic, Encoding, LineIndex, Span};
use serde_json::{json, Value as J};

fn range(idx: &LineIndex, s: Span) -> J {
    let a = idx.line_col(s.start, Encoding::Utf16);
    let b = idx.line_col(s.end, Encoding::Utf16);
    json!({"start": {"line": a.line, "character": a.character}, "end": {"line": b.line, "character": b.character}})
}

fn finite(x: f64) -> J {
    if x.is_finite() {
        json!(x)
    } else {
        J::Null
    }
}

fn num_json(n: &Num) -> (&'static str, J) {
    match n {
        Num::Exact(q) if q.is_integer() => {
            let i = q.to_integer();
            match i64::try_from(&i) {
                Ok(v) => ("integer", json!(v)),
                Err(_) => ("integer", json!(i.to_string())),
            }
        }
        Num::Exact(q) => ("rational", json!(q.to_string())),
        Num::Real(r) => ("real", finite(*r)),
        Num::Complex(c) => ("complex", json!([finite(c.re), finite(c.im)])),
    }
}

/// Entries of vectors and matrices: plain numbers when all are real, else [re, im].
fn entries_json(row: &[Num], complex: bool) -> J {
    J::Array(
        row.iter()
            .map(|n| {
                let c = n.to_complex();
                if complex {
                    json!([finite(c.re), finite(c.im)])
                } else {
                    finite(c.re)
                }
            })
            .collect(),
    )
}

fn any_complex<'a>(mut it: impl Iterator<Item = &'a Num>) -> bool {
    it.any(|n| matches!(n, Num::Complex(c) if c.im != 0.0))
}

pub fn value_json(v: &Value) -> (&'static str, J) {
    match v {
        Value::Num(n) => num_json(n),
        Value::Bool(b) => ("boolean", json!(b)),
        Value::Str(s) => ("string", json!(s)),
        Value::Vector(x) => ("vector", entries_json(x, any_complex(x.iter()))),
        Value::Matrix(m) => {
            let c = any_complex(m.iter().flatten());
            ("matrix", J::Array(m.iter().map(|r| entries_json(r, c)).collect()))
        }
        Value::List(l) => (
            "list",
            J::Array(
                l.iter()
                    .map(|x| {
                        let (t, v) = value_json(x);
                        json!({"type": t, "value": v})
                    })
                    .collect(),
            ),
        ),
        Value::Curve(c) => (
            "curve",
            json!({
                "name": c.name,
                "degree": c.equation.degree,
                "equation": format!("{} = 0", c.equation.poly),
                "projective": c.equation.projective,
            }),
        ),
        Value::Point { coords, projective } => (
            "point",
            json!({"coordinates": entries_json(coords, any_complex(coords.iter())), "projective": projective}),
        ),
        Value::Wave(w) => ("wave", crate::wave_fn::wave_json(w)),
        Value::SingularPoint(p) => (
            "point",
            json!({
                "coordinates": entries_json(&p.coords, false),
                "projective": true,
                "multiplicity": p.multiplicity,
                "kind": p.kind,
                "delta": p.delta,
                "branches": p.branches,
                "milnor": p.milnor,
            }),
        ),
    }
}

fn valued_json(name: &str, v: &Valued) -> J {
    let (t, value) = value_json(&v.value);
    let mut o = json!({"name": name, "type": t, "value": value, "display": v.value.to_string()});
    if v.error_bound > 0.0 {
        o["error_bound"] = finite(v.error_bound);
    }
    // What the number means (the scales of a residual, the source of a wave, ...): the hover text.
    if let Some(r) = &v.reason {
        o["reason"] = json!(r);
    }
    o
}

pub fn diagnostic_json(idx: &LineIndex, d: &Diagnostic) -> J {
    let mut o = json!({
        "severity": d.severity.as_str(),
        "code": d.code.as_str(),
        "message": d.message,
        "range": range(idx, d.span),
    });
    if !d.notes.is_empty() {
        o["notes"] = json!(d.notes);
    }
    if !d.fixes.is_empty() {
        o["fixes"] = J::Array(
            d.fixes
                .iter()
                .map(|f| {
                    let edits: Vec<J> =
                        f.edits.iter().map(|(s, t)| json!({"range": range(idx, *s), "text": t})).collect();
                    json!({"title": f.title, "edits": edits})
                })
                .collect(),
        );
    }
    if !d.labels.is_empty() {
        o["related"] =
            J::Array(d.labels.iter().map(|l| json!({"message": l.message, "range": range(idx, l.span)})).collect());
    }
    o
}

/// One file's report. `diagnostics` are the checker's and the evaluator's together.
pub fn file_report(path: &str, src: &str, diagnostics: &[Diagnostic], eval: &Evaluation) -> J {
    // Positions as an editor shows the file: a byte-order mark is no column.
    let idx = LineIndex::of_file(src);
    json!({
        "file": path,
        "diagnostics": diagnostics.iter().map(|d| diagnostic_json(&idx, d)).collect::<Vec<_>>(),
        "values": eval.values.iter().map(|v| valued_json(&v.name, &v.value)).collect::<Vec<_>>(),
        "expectations": eval.expectations.iter().map(|e| json!({
            "range": range(&idx, e.span),
            "passed": e.passed,
            "detail": e.detail,
        })).collect::<Vec<_>>(),
        "outputs": eval.outputs.iter().map(|p| json!({"path": p})).collect::<Vec<_>>(),
    })
}
