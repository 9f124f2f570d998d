//! Runtime values.

use crate::num::Num;
use kelp_lang::check::CurveEquation;
use std::fmt;
use std::rc::Rc;

#[derive(Clone, Debug)]
pub struct CurveValue {
    pub name: String,
    pub equation: CurveEquation,
    /// Singular points and what follows from them, computed once on first use.
    pub facts: std::cell::OnceCell<std::sync::Arc<crate::algebra::curve::CurveFacts>>,
    /// Periods for `tau`, computed on first use (at the file's one `accuracy`).
    pub periods: std::cell::OnceCell<Result<std::sync::Arc<crate::periods::Periods>, crate::periods::PeriodError>>,
}

impl CurveValue {
    /// The curve's singular points and genus facts, computed on first use and kept;
    /// `None` above the degree the exact algebra accepts.
    pub fn facts(&self) -> Option<std::sync::Arc<crate::algebra::curve::CurveFacts>> {
        if self.equation.degree > crate::limits::current().max_degree {
            return None;
        }
        Some(
            self.facts
                .get_or_init(|| crate::algebra::curve::analyse_memo(&self.equation.poly, self.equation.projective))
                .clone(),
        )
    }
}

impl CurveValue {
    /// The periods, computed by `compute` on first use and kept; a failure while the statement
    /// is out of time (or cancelled) is not kept, so a later statement computes them afresh.
    /// (A computation stopped at a checkpoint unwinds through here and leaves the cell empty.)
    pub fn periods_or(
        &self,
        compute: impl FnOnce() -> Result<std::sync::Arc<crate::periods::Periods>, crate::periods::PeriodError>,
    ) -> Result<std::sync::Arc<crate::periods::Periods>, crate::periods::PeriodError> {
        if let Some(p) = self.periods.get() {
            return p.clone();
        }
        let p = compute();
        if p.is_ok() || !crate::limits::expired() {
            let _ = self.periods.set(p.clone());
        }
        p
    }
}

/// A singular point with its local invariants.
#[derive(Clone, Debug)]
pub struct SingularInfo {
    pub coords: Vec<Num>,
    pub multiplicity: u32,
    pub kind: String,
    pub delta: u64,
    pub branches: u32,
    pub milnor: u64,
}

#[derive(Clone, Debug)]
pub enum Value {
    Num(Num),
    Bool(bool),
    Str(String),
    Vector(Vec<Num>),
    Matrix(Vec<Vec<Num>>),
    List(Vec<Value>),
    Curve(Rc<CurveValue>),
    Point { coords: Vec<Num>, projective: bool },
    SingularPoint(Rc<SingularInfo>),
    Wave(std::sync::Arc<crate::waves::Wave>),
}

/// A value with the bound on its numerical error (0 for exact values and literals).
#[derive(Clone, Debug)]
pub struct Valued {
    pub value: Value,
    pub error_bound: f64,
    /// Why a boolean came out as it did, for claim messages ("smallest eigenvalue ...").
    pub reason: Option<String>,
}

impl Valued {
    pub fn exact(value: Value) -> Self {
        Valued { value, error_bound: 0.0, reason: None }
    }
}

impl Value {
    pub fn type_name(&self) -> &'static str {
        match self {
            Value::Num(Num::Exact(q)) if q.is_integer() => "integer",
            Value::Num(Num::Exact(_)) => "rational",
            Value::Num(Num::Real(_)) => "real",
            Value::Num(Num::Complex(_)) => "complex",
            Value::Bool(_) => "boolean",
            Value::Str(_) => "string",
            Value::Vector(_) => "vector",
            Value::Matrix(_) => "matrix",
            Value::List(_) => "list",
            Value::Curve(_) => "curve",
            Value::Point { .. } | Value::SingularPoint(_) => "point",
            Value::Wave(_) => "wave",
        }
    }
}

fn join(items: impl Iterator<Item = String>) -> String {
    items.collect::<Vec<_>>().join(", ")
}

impl fmt::Display for Value {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Value::Num(n) => write!(f, "{n}"),
            Value::Bool(b) => write!(f, "{b}"),
            Value::Str(s) => write!(f, "{s:?}"),
            Value::Vector(v) => write!(f, "[{}]", join(v.iter().map(|n| n.to_string()))),
            Value::Matrix(m) => {
                write!(f, "[{}]", join(m.iter().map(|r| format!("[{}]", join(r.iter().map(|n| n.to_string()))))))
            }
            Value::List(l) => write!(f, "[{}]", join(l.iter().map(|v| v.to_string()))),
            Value::Curve(c) => write!(f, "curve {}: {} = 0", c.name, c.equation.poly),
            Value::Point { coords, projective } => {
                let sep = if *projective { " : " } else { ", " };
                write!(f, "({})", coords.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(sep))
            }
            Value::Wave(w) => write!(f, "{} wave: {}", w.kind_name(), w.origin),
            Value::SingularPoint(p) => write!(
                f,
                "({}) {}, multiplicity {}, delta {}",
                p.coords.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(" : "),
                p.kind,
                p.multiplicity,
                p.delta
            ),
        }
    }
}
