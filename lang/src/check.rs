//! Name resolution and static checks: definitions and references, kinds and shapes of
//! values, curve equations, settings, regions and output paths. Produces the evaluation
//! order. Everything here is decided from the text alone; nothing is computed.

use crate::ast::*;
use crate::builtins::{self, Builtin, ParamKind, RegionUse, Yields, SETTINGS};
use crate::diag::{Code, Diagnostic, Fix};
use crate::number::parse_exact;
use crate::parser::parse;
use crate::poly::Poly;
use crate::span::Span;
use crate::suggest::closest;
use num_rational::BigRational;
use num_traits::{Signed, ToPrimitive, Zero};
use std::collections::HashMap;

#[path = "check_basics.rs"]
mod basics;

/// Curves above this degree are refused (their expansion alone would be costly).
pub const MAX_CURVE_DEGREE: u32 = 64;

/// The static kind of a value, with shapes where the text fixes them.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Kind {
    Number,
    Bool,
    Str,
    Vector(Option<usize>),
    /// (rows, columns)
    Matrix(Option<(usize, usize)>),
    List,
    Curve,
    Wave,
    Point {
        projective: bool,
    },
    /// Not known (after an error, or not decidable from the text).
    Unknown,
}

impl Kind {
    pub fn describe(&self) -> String {
        match self {
            Kind::Number => "a number".into(),
            Kind::Bool => "a boolean".into(),
            Kind::Str => "a string".into(),
            Kind::Vector(Some(n)) => format!("a vector of length {n}"),
            Kind::Vector(None) => "a vector".into(),
            Kind::Matrix(Some((r, c))) => format!("a {r} x {c} matrix"),
            Kind::Matrix(None) => "a matrix".into(),
            Kind::List => "a list".into(),
            Kind::Curve => "a curve".into(),
            Kind::Wave => "a wave".into(),
            Kind::Point { projective: true, .. } => "a projective point".into(),
            Kind::Point { .. } => "a point".into(),
            Kind::Unknown => "a value".into(),
        }
    }
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DefKind {
    Curve,
    Let,
    Wave,
}

#[derive(Clone, Debug)]
pub struct Symbol {
    pub name: String,
    pub def: DefKind,
    /// The span of the name at its definition.
    pub span: Span,
    pub stmt: usize,
    pub kind: Kind,
}

/// A use of a defined name.
#[derive(Clone, Debug)]
pub struct Reference {
    pub name: String,
    pub span: Span,
    pub symbol: usize,
}

/// A curve equation as the checker read it: `poly = 0`, in x, y (affine) or
/// homogeneous in x, y, z (projective).
#[derive(Clone, Debug)]
pub struct CurveEquation {
    pub poly: Poly,
    pub projective: bool,
    pub degree: u32,
}

#[derive(Clone, Debug)]
pub struct Settings {
    /// Every setting's value by name (defaults included).
    pub values: std::collections::BTreeMap<&'static str, f64>,
}

impl Settings {
    pub fn tolerance(&self) -> f64 {
        self.get("tolerance")
    }
    pub fn accuracy(&self) -> f64 {
        self.get("accuracy")
    }
    pub fn get(&self, name: &str) -> f64 {
        self.values.get(name).copied().unwrap_or_else(|| builtins::setting_named(name).map_or(f64::NAN, |s| s.default))
    }

    /// Sets a value after checking it against the setting's range; the error says why not.
    pub fn set(&mut self, name: &str, v: f64) -> Result<(), String> {
        let s = builtins::setting_named(name).ok_or_else(|| format!("there is no setting `{name}`"))?;
        if !s.allows(v) {
            return Err(format!("`{name}` ({}) takes {}", s.meaning, s.range_text()));
        }
        self.values.insert(s.name, v);
        Ok(())
    }
}

impl Default for Settings {
    fn default() -> Self {
        Settings { values: SETTINGS.iter().map(|s| (s.name, s.default)).collect() }
    }
}

#[derive(Clone, Debug)]
pub struct Checked {
    pub program: Program,
    pub diagnostics: Vec<Diagnostic>,
    pub symbols: Vec<Symbol>,
    pub references: Vec<Reference>,
    /// Curve equations by statement index.
    pub curves: HashMap<usize, CurveEquation>,
    pub settings: Settings,
    /// Statement indices in evaluation order: definitions by dependency, then claims
    /// and outputs in source order. Statements with static errors are left out.
    pub order: Vec<usize>,
    /// Statements left out of `order` because of a static error.
    pub broken: Vec<bool>,
}

impl Checked {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }
    pub fn symbol(&self, name: &str) -> Option<&Symbol> {
        self.symbols.iter().find(|s| s.name == name)
    }
}

/// Parses and checks a whole file.
pub fn check(src: &str) -> Checked {
    check_with(src, &[])
}

/// [`check`] with settings that override the file's `set` statements (the command line's
/// `--limit NAME=VALUE`; each already validated by [`Settings::set`]).
pub fn check_with(src: &str, overrides: &[(String, f64)]) -> Checked {
    let parsed = parse(src);
    let mut c = Checker {
        diags: parsed.diagnostics,
        symbols: Vec::with_capacity(parsed.program.stmts.len()),
        by_name: HashMap::with_capacity(parsed.program.stmts.len()),
        references: Vec::with_capacity(parsed.program.stmts.len()),
        curves: HashMap::new(),
        settings: Settings::default(),
        broken: parsed.program.stmts.iter().map(|s| matches!(s.kind, StmtKind::Error)).collect(),
    };
    let program = parsed.program;
    // Settings first: they shape the checks (the digit limit of literals, for one).
    let mut seen_settings: HashMap<String, Span> = HashMap::new();
    for stmt in &program.stmts {
        if let StmtKind::Set { name, value } = &stmt.kind {
            c.check_setting(name, value, &mut seen_settings);
        }
    }
    for (name, v) in overrides {
        let _ = c.settings.set(name, *v);
    }
    c.collect_definitions(&program);
    let def_order = c.dependency_order(&program);
    for &i in &def_order {
        c.check_definition(&program, i);
    }
    let mut rest = Vec::new();
    for (i, stmt) in program.stmts.iter().enumerate() {
        match &stmt.kind {
            StmtKind::Expect { claim, within } => {
                if !c.check_expect(claim, within.as_ref()) {
                    c.broken[i] = true;
                }
                rest.push(i);
            }
            StmtKind::Output { kind, wave, region, path } => {
                if !c.check_output(*kind, wave, region, path) {
                    c.broken[i] = true;
                }
                rest.push(i);
            }
            _ => {}
        }
    }
    let order = def_order.into_iter().chain(rest).filter(|&i| !c.broken[i]).collect();
    let mut diagnostics = c.diags;
    crate::diag::sort(&mut diagnostics);
    Checked {
        program,
        diagnostics,
        symbols: c.symbols,
        references: c.references,
        curves: c.curves,
        settings: c.settings,
        order,
        broken: c.broken,
    }
}

struct Checker {
    diags: Vec<Diagnostic>,
    symbols: Vec<Symbol>,
    by_name: HashMap<String, usize>,
    references: Vec<Reference>,
    curves: HashMap<usize, CurveEquation>,
    settings: Settings,
    broken: Vec<bool>,
}

/// Whether `$body` pushed no error, to tell whether a statement stayed clean (looking
/// only at what it pushed, so a file with thousands of errors stays linear).
macro_rules! clean {
    ($self:ident, $body:expr) => {{
        let before = $self.diags.len();
        $body;
        !$self.diags[before..].iter().any(|d| d.is_error())
    }};
}

impl Checker {
    fn error(&mut self, code: Code, span: Span, msg: impl Into<String>) -> &mut Diagnostic {
        self.diags.push(Diagnostic::error(code, span, msg));
        self.diags.last_mut().unwrap()
    }

    fn collect_definitions(&mut self, program: &Program) {
        for (i, stmt) in program.stmts.iter().enumerate() {
            let (Some(name), def) = (
                stmt.defined_name(),
                match stmt.kind {
                    StmtKind::Curve { .. } => DefKind::Curve,
                    StmtKind::Wave { .. } => DefKind::Wave,
                    _ => DefKind::Let,
                },
            ) else {
                continue;
            };
            if let Some(d) = basics::reserved(name) {
                self.diags.push(d);
                self.broken[i] = true;
                continue;
            }
            if let Some(&prev) = self.by_name.get(&name.name) {
                let prev_span = self.symbols[prev].span;
                let d =
                    Diagnostic::error(Code::DuplicateName, name.span, format!("`{}` is already defined", name.name))
                        .with_label(prev_span, "first defined here")
                        .with_note("each name is defined once per file; rename one of them");
                self.diags.push(d);
                self.broken[i] = true;
                continue;
            }
            let kind = match def {
                DefKind::Curve => Kind::Curve,
                DefKind::Wave => Kind::Wave,
                DefKind::Let => Kind::Unknown,
            };
            self.by_name.insert(name.name.clone(), self.symbols.len());
            self.symbols.push(Symbol { name: name.name.clone(), def, span: name.span, stmt: i, kind });
        }
    }

    /// Definitions in an order where every name comes after what it uses; cycles are
    /// reported and their statements left out.
    fn dependency_order(&mut self, program: &Program) -> Vec<usize> {
        let defs: Vec<usize> = self.symbols.iter().map(|s| s.stmt).collect();
        let deps: Vec<Vec<usize>> = self
            .symbols
            .iter()
            .map(|s| {
                let mut out = Vec::new();
                if let StmtKind::Let { value, .. } | StmtKind::Wave { value, .. } = &program.stmts[s.stmt].kind {
                    value.walk(&mut |e| {
                        if let ExprKind::Name(n) = &e.kind {
                            if let Some(&k) = self.by_name.get(n) {
                                out.push(k);
                            }
                        }
                    });
                }
                out
            })
            .collect();
        // 0 = new, 1 = on the stack, 2 = done.
        let mut state = vec![0u8; defs.len()];
        let mut order = Vec::new();
        let mut stack: Vec<usize> = Vec::new();
        fn visit(
            k: usize,
            deps: &[Vec<usize>],
            state: &mut [u8],
            stack: &mut Vec<usize>,
            order: &mut Vec<usize>,
            cycles: &mut Vec<Vec<usize>>,
        ) {
            state[k] = 1;
            stack.push(k);
            for &d in &deps[k] {
                match state[d] {
                    0 => visit(d, deps, state, stack, order, cycles),
                    1 => {
                        let from = stack.iter().position(|&s| s == d).unwrap();
                        cycles.push(stack[from..].to_vec());
                    }
                    _ => {}
                }
            }
            stack.pop();
            state[k] = 2;
            order.push(k);
        }
        let mut cycles = Vec::new();
        for k in 0..defs.len() {
            if state[k] == 0 {
                visit(k, &deps, &mut state, &mut stack, &mut order, &mut cycles);
            }
        }
        for cycle in cycles {
            let names: Vec<String> = cycle.iter().map(|&k| format!("`{}`", self.symbols[k].name)).collect();
            let first = cycle[0];
            let mut d = Diagnostic::error(
                Code::CyclicDefinition,
                self.symbols[first].span,
                format!("definitions depend on each other in a cycle: {} -> {}", names.join(" -> "), names[0]),
            );
            for &k in &cycle[1..] {
                d = d.with_label(self.symbols[k].span, "part of the cycle");
            }
            self.diags.push(d);
            for &k in &cycle {
                self.broken[self.symbols[k].stmt] = true;
            }
        }
        order.into_iter().map(|k| defs[k]).collect()
    }

    fn check_definition(&mut self, program: &Program, i: usize) {
        if self.broken[i] {
            return;
        }
        let stmt = &program.stmts[i];
        let ok = match &stmt.kind {
            StmtKind::Curve { lhs, rhs, .. } => {
                clean!(self, self.check_curve(i, lhs, rhs.as_ref()))
            }
            StmtKind::Let { name, value } => {
                let kind;
                let ok = clean!(self, kind = self.infer(value));
                self.set_kind(&name.name, kind);
                ok
            }
            StmtKind::Wave { value, .. } => clean!(self, {
                let is_ctor = matches!(&value.kind, ExprKind::Call { func, .. }
                    if builtins::lookup(&func.name).is_none_or(Builtin::is_wave_constructor));
                if !is_ctor {
                    self.error(Code::NotAWaveConstructor, value.span, "a `wave` is made by a wave constructor")
                        .notes
                        .push("use `krichever(...)`, `theta_wave(...)`, `soliton(...)` or `rational(...)`".into());
                }
                self.infer(value);
            }),
            _ => true,
        };
        if !ok {
            self.broken[i] = true;
        }
    }

    fn set_kind(&mut self, name: &str, kind: Kind) {
        if let Some(&k) = self.by_name.get(name) {
            self.symbols[k].kind = kind;
        }
    }

    // ---- curves ----

    fn check_curve(&mut self, i: usize, lhs: &Expr, rhs: Option<&Expr>) {
        // Coefficients obey the digit limit like every other literal (`max_digits`).
        let max_digits = self.settings.get("max_digits") as usize;
        let mut too_long = vec![];
        for side in std::iter::once(lhs).chain(rhs) {
            side.walk(&mut |e| {
                if let ExprKind::Number(t) = &e.kind {
                    if let Some(m) = crate::number::literal_error_with(t, max_digits) {
                        too_long.push(Diagnostic::error(Code::NumberTooLarge, e.span, m));
                    }
                }
            });
        }
        if !too_long.is_empty() {
            self.diags.extend(too_long);
            return;
        }
        let fast = crate::small_poly::curve_poly(lhs, rhs).map(Ok);
        let poly = match fast.unwrap_or_else(|| self.exact_curve_poly(lhs, rhs)) {
            Ok(p) => p,
            Err(d) => {
                self.diags.push(d);
                return;
            }
        };
        let span = rhs.map_or(lhs.span, |r| lhs.span.join(r.span));
        let projective = poly.uses_var(2);
        let Some(degree) = poly.degree().filter(|&d| d >= 1) else {
            let what = if poly.is_zero() { "is identically zero" } else { "has no variables" };
            self.error(Code::DegreeTooLow, span, format!("the equation {what}: a curve needs degree at least 1"));
            return;
        };
        if projective && !poly.is_homogeneous() {
            let degs: Vec<String> = poly.term_degrees().iter().map(u32::to_string).collect();
            self.error(
                Code::NotHomogeneous,
                span,
                format!("an equation in x, y, z must be homogeneous, but its terms have degrees {}", degs.join(", ")),
            )
            .notes
            .push("drop z for an affine equation in x, y (its projective closure is meant)".into());
            return;
        }
        self.curves.insert(i, CurveEquation { poly, projective, degree });
    }

    /// `lhs - rhs` with big rationals: the route for equations the 128-bit fast path
    /// declines, and the one that words every diagnostic.
    fn exact_curve_poly(&mut self, lhs: &Expr, rhs: Option<&Expr>) -> Result<Poly, Diagnostic> {
        let l = self.to_poly(lhs)?;
        match rhs {
            Some(r) => Ok(l.sub(&self.to_poly(r)?)),
            None => Ok(l),
        }
    }

    fn to_poly(&mut self, e: &Expr) -> Result<Poly, Diagnostic> {
        let not_poly = |span, what: &str| {
            Diagnostic::error(
                Code::NotPolynomial,
                span,
                format!("a curve equation is a polynomial in x, y, z over Q; {what}"),
            )
        };
        match &e.kind {
            ExprKind::Number(t) => {
                parse_exact(t).map(Poly::constant).map_err(|m| Diagnostic::error(Code::NumberTooLarge, e.span, m))
            }
            ExprKind::Name(n) => match n.as_str() {
                "x" => Ok(Poly::var(0)),
                "y" => Ok(Poly::var(1)),
                "z" => Ok(Poly::var(2)),
                other => Err(Diagnostic::error(
                    Code::UnknownVariable,
                    e.span,
                    format!("`{other}` is not a variable of a curve equation"),
                )
                .with_note("use x, y for an affine equation, or x, y, z for a homogeneous one")),
            },
            ExprKind::Paren(inner) => self.to_poly(inner),
            ExprKind::Unary { op: UnOp::Neg, operand } => Ok(self.to_poly(operand)?.neg()),
            ExprKind::Binary { op, lhs, rhs } => match op {
                BinOp::Add => Ok(self.to_poly(lhs)?.add(&self.to_poly(rhs)?)),
                BinOp::Sub => Ok(self.to_poly(lhs)?.sub(&self.to_poly(rhs)?)),
                BinOp::Mul => {
                    let (l, r) = (self.to_poly(lhs)?, self.to_poly(rhs)?);
                    if l.degree().unwrap_or(0) + r.degree().unwrap_or(0) > MAX_CURVE_DEGREE {
                        return Err(too_high(e.span));
                    }
                    Ok(l.mul(&r))
                }
                BinOp::Div => {
                    let l = self.to_poly(lhs)?;
                    match self.to_poly(rhs)?.as_constant() {
                        Some(c) if !c.is_zero() => Ok(l.scale(&(BigRational::from_integer(1.into()) / c))),
                        Some(_) => Err(Diagnostic::error(Code::EvalFailed, rhs.span, "division by zero")),
                        None => Err(not_poly(rhs.span, "it cannot divide by a polynomial")),
                    }
                }
                BinOp::Pow => {
                    let base = self.to_poly(lhs)?;
                    let exp = self.to_poly(rhs)?.as_constant();
                    let k = match exp {
                        Some(q) if q.is_integer() && !q.is_negative() => q.to_integer().to_u32(),
                        _ => return Err(not_poly(rhs.span, "an exponent must be a non-negative integer")),
                    };
                    let Some(k) = k else {
                        return Err(too_high(e.span));
                    };
                    match base.as_constant() {
                        Some(c) => {
                            let bits = (c.numer().bits() + c.denom().bits()) as u64;
                            if bits.saturating_mul(k as u64) > 1_000_000 {
                                return Err(Diagnostic::error(
                                    Code::NumberTooLarge,
                                    e.span,
                                    "this power is too large a number",
                                ));
                            }
                        }
                        None => {
                            if base.degree().unwrap_or(0) as u64 * k as u64 > MAX_CURVE_DEGREE as u64 {
                                return Err(too_high(e.span));
                            }
                        }
                    }
                    Ok(base.pow(k))
                }
                _ => Err(not_poly(e.span, &format!("`{}` has no meaning there", op.text()))),
            },
            ExprKind::Imag(_) => Err(not_poly(e.span, "coefficients must be rational, not complex")),
            ExprKind::Call { func, .. } => Err(not_poly(e.span, &format!("it cannot call `{}`", func.name))),
            _ => Err(not_poly(e.span, "this is not a polynomial term")),
        }
    }

    // ---- settings, claims, outputs ----

    fn check_setting(&mut self, name: &Ident, value: &Expr, seen: &mut HashMap<String, Span>) {
        if builtins::setting_named(&name.name).is_none() {
            let d = self.error(Code::UnknownSetting, name.span, format!("there is no setting `{}`", name.name));
            match closest(&name.name, SETTINGS.iter().map(|s| s.name)) {
                Some(s) => {
                    d.notes.push(format!("did you mean `{s}`?"));
                    d.fixes.push(rename_fix(name.span, s));
                }
                None => d.notes.push(format!(
                    "the settings are {}",
                    SETTINGS.iter().map(|s| format!("`{}`", s.name)).collect::<Vec<_>>().join(", ")
                )),
            }
            return;
        }
        if let Some(prev) = seen.get(&name.name) {
            let d = Diagnostic::error(Code::DuplicateSetting, name.span, format!("`{}` is already set", name.name))
                .with_label(*prev, "first set here");
            self.diags.push(d);
            return;
        }
        seen.insert(name.name.clone(), name.span);
        let result = match const_real(value) {
            Some(v) => self.settings.set(&name.name, v),
            None => self.settings.set(&name.name, f64::NAN),
        };
        if let Err(m) = result {
            self.error(Code::BadSettingValue, value.span, m);
        }
    }

    fn check_expect(&mut self, claim: &Expr, within: Option<&Expr>) -> bool {
        clean!(self, {
            let k = self.infer(claim);
            if !matches!(k, Kind::Bool | Kind::Unknown) {
                self.error(
                    Code::ClaimNotBoolean,
                    claim.span,
                    format!("a claim must be true or false; this is {}", k.describe()),
                )
                .notes
                .push("compare it, e.g. `expect genus(C) == 2`".into());
            }
            if let Some(tol) = within {
                let top = strip_parens(claim);
                if !matches!(top.kind, ExprKind::Binary { op: BinOp::Eq, .. }) {
                    self.error(Code::WithinWithoutEquality, tol.span, "`within` gives the tolerance of an `==` claim")
                        .notes
                        .push("write `expect A == B within 1e-12`".into());
                }
                let tk = self.infer(tol);
                if !matches!(tk, Kind::Number | Kind::Unknown) {
                    self.error(Code::WrongKind, tol.span, format!("a tolerance is a number, not {}", tk.describe()));
                } else if const_real(tol).is_some_and(|t| t <= 0.0) {
                    self.error(Code::BadSettingValue, tol.span, "a tolerance must be positive");
                }
            }
        })
    }

    fn check_output(&mut self, kind: OutputKind, wave: &Ident, region: &[Axis], path: &StrLit) -> bool {
        clean!(self, {
            let k = self.resolve(&wave.name, wave.span);
            if !matches!(k, Kind::Wave | Kind::Unknown) {
                self.error(
                    Code::WrongKind,
                    wave.span,
                    format!("`{}` needs a wave, but `{}` is {}", kind.keyword(), wave.name, k.describe()),
                );
            }
            self.check_region(region);
            if let Err(d) = check_output_path(kind, path) {
                self.diags.push(d);
            }
        })
    }

    fn check_region(&mut self, axes: &[Axis]) {
        let mut seen: HashMap<&str, Span> = HashMap::new();
        for ax in axes {
            let name = ax.name.name.as_str();
            if !AXIS_NAMES.contains(&name) {
                let d = self.error(
                    Code::UnknownAxis,
                    ax.name.span,
                    format!("`{name}` is not an axis; a region is over x, y and t"),
                );
                if let Some(s) = closest(name, AXIS_NAMES) {
                    d.notes.push(format!("did you mean `{s}`?"));
                    d.fixes.push(rename_fix(ax.name.span, s));
                }
            } else if let Some(prev) = seen.get(name) {
                let d = Diagnostic::error(Code::DuplicateAxis, ax.name.span, format!("axis `{name}` is given twice"))
                    .with_label(*prev, "first given here");
                self.diags.push(d);
            } else {
                seen.insert(name, ax.name.span);
            }
            let number = |c: &mut Checker, e: &Expr| {
                let k = c.infer(e);
                if !matches!(k, Kind::Number | Kind::Unknown) {
                    c.error(Code::WrongKind, e.span, format!("an axis bound is a number, not {}", k.describe()));
                }
            };
            match &ax.kind {
                AxisKind::Fixed(v) => number(self, v),
                AxisKind::Range { lo, hi, step } => {
                    number(self, lo);
                    number(self, hi);
                    if let (Some(a), Some(b)) = (const_real(lo), const_real(hi)) {
                        if b <= a {
                            self.error(
                                Code::EmptyRange,
                                lo.span.join(hi.span),
                                format!("the range {a}..{b} is empty: its end must be above its start"),
                            );
                        }
                    }
                    if let Some(s) = step {
                        number(self, s);
                        if const_real(s).is_some_and(|h| h <= 0.0) {
                            self.error(Code::BadStep, s.span, "a step must be positive");
                        }
                    }
                }
            }
        }
    }

    // ---- kinds ----

    fn resolve(&mut self, name: &str, span: Span) -> Kind {
        if let Some(&k) = self.by_name.get(name) {
            self.references.push(Reference { name: name.to_string(), span, symbol: k });
            return self.symbols[k].kind;
        }
        if let Some(k) = basics::constant_kind(name) {
            return k;
        }
        let mut d = Diagnostic::error(Code::UndefinedName, span, format!("`{name}` is not defined"));
        if let Some(s) = closest(name, self.symbols.iter().map(|s| s.name.as_str())) {
            d = d.with_note(format!("did you mean `{s}`?")).with_fix(rename_fix(span, s));
        } else if ["x", "y", "z"].contains(&name) {
            d = d.with_note("x, y and z are variables only inside a curve equation");
        }
        self.diags.push(d);
        Kind::Unknown
    }

    fn infer(&mut self, e: &Expr) -> Kind {
        match &e.kind {
            ExprKind::Number(t) | ExprKind::Imag(t) => {
                if let Some(m) = crate::number::literal_error_with(t, self.settings.get("max_digits") as usize) {
                    self.error(Code::NumberTooLarge, e.span, m);
                }
                Kind::Number
            }
            ExprKind::Bool(_) => Kind::Bool,
            ExprKind::Str(_) => Kind::Str,
            ExprKind::Name(n) => self.resolve(n, e.span),
            ExprKind::Paren(inner) => self.infer(inner),
            ExprKind::Error => Kind::Unknown,
            ExprKind::Point { coords, projective } => {
                for c in coords {
                    let k = self.infer(c);
                    if !matches!(k, Kind::Number | Kind::Unknown) {
                        self.error(Code::WrongKind, c.span, format!("a coordinate is a number, not {}", k.describe()));
                    }
                }
                let want = if *projective { 3 } else { 2 };
                if coords.len() != want {
                    let what = if *projective { "a projective point (x : y : z)" } else { "an affine point (x, y)" };
                    self.error(
                        Code::ShapeMismatch,
                        e.span,
                        format!("{what} has {want} coordinates, not {}", coords.len()),
                    );
                }
                Kind::Point { projective: *projective }
            }
            ExprKind::List(items) => self.infer_list(items),
            ExprKind::Unary { op, operand } => {
                let k = self.infer(operand);
                match (op, k) {
                    (_, Kind::Unknown) => Kind::Unknown,
                    (UnOp::Neg, Kind::Number | Kind::Vector(_) | Kind::Matrix(_)) => k,
                    (UnOp::Not, Kind::Bool) => Kind::Bool,
                    (UnOp::Neg, _) => self.wrong(operand.span, "`-` applies to numbers, vectors and matrices", k),
                    (UnOp::Not, _) => self.wrong(operand.span, "`not` applies to true/false", k),
                }
            }
            ExprKind::Binary { op, lhs, rhs } => {
                let (l, r) = (self.infer(lhs), self.infer(rhs));
                self.infer_binary(*op, e.span, (l, lhs.span), (r, rhs.span))
            }
            ExprKind::Call { func, args } => self.infer_call(e.span, func, args),
            ExprKind::Index { base, indices } => self.infer_index(base, indices),
        }
    }

    fn wrong(&mut self, span: Span, what: &str, found: Kind) -> Kind {
        self.error(Code::WrongKind, span, format!("{what}; this is {}", found.describe()));
        Kind::Unknown
    }

    fn infer_list(&mut self, items: &[Expr]) -> Kind {
        let kinds: Vec<Kind> = items.iter().map(|i| self.infer(i)).collect();
        if kinds.iter().all(|k| matches!(k, Kind::Number | Kind::Unknown)) {
            return Kind::Vector(Some(items.len()));
        }
        if kinds.iter().all(|k| matches!(k, Kind::Vector(_) | Kind::Unknown)) {
            let lens: Vec<Option<usize>> =
                kinds.iter().map(|k| if let Kind::Vector(n) = k { *n } else { None }).collect();
            let known: Vec<(usize, usize)> = lens.iter().enumerate().filter_map(|(i, n)| n.map(|n| (i, n))).collect();
            if let Some(&(_, first)) = known.first() {
                if let Some(&(bad, n)) = known.iter().find(|(_, n)| *n != first) {
                    self.error(
                        Code::RaggedMatrix,
                        items[bad].span,
                        format!("matrix rows must have equal length: this row has {n} entries, the first has {first}"),
                    )
                    .labels
                    .push(crate::diag::Label { span: items[known[0].0].span, message: format!("{first} entries") });
                    return Kind::Unknown;
                }
                if known.len() == items.len() {
                    return Kind::Matrix(Some((items.len(), first)));
                }
            }
            return Kind::Matrix(None);
        }
        Kind::List
    }

    fn infer_binary(&mut self, op: BinOp, span: Span, (l, ls): (Kind, Span), (r, rs): (Kind, Span)) -> Kind {
        use Kind::*;
        if op.is_comparison() {
            let ordered = !matches!(op, BinOp::Eq | BinOp::Ne);
            match (l, r) {
                (Unknown, _) | (_, Unknown) => {}
                (Number, Number) => {}
                (Bool, Bool) | (Vector(_), Vector(_)) | (Matrix(_), Matrix(_)) if !ordered => {
                    self.same_shape(span, l, r);
                }
                _ => {
                    let what = if ordered {
                        "`<`, `<=`, `>`, `>=` compare real numbers"
                    } else {
                        "`==` compares values of the same kind"
                    };
                    self.error(Code::WrongKind, span, format!("{what}; here {} and {}", l.describe(), r.describe()));
                }
            }
            return Bool;
        }
        if matches!(op, BinOp::And | BinOp::Or) {
            for (k, s) in [(l, ls), (r, rs)] {
                if !matches!(k, Bool | Unknown) {
                    self.wrong(s, &format!("`{}` joins true/false claims", op.text()), k);
                }
            }
            return Bool;
        }
        match (op, l, r) {
            (_, Unknown, _) | (_, _, Unknown) => Unknown,
            (_, Number, Number) => Number,
            (BinOp::Add | BinOp::Sub, Vector(_), Vector(_)) | (BinOp::Add | BinOp::Sub, Matrix(_), Matrix(_)) => {
                self.same_shape(span, l, r);
                l
            }
            (BinOp::Mul, Number, Vector(_) | Matrix(_)) => r,
            (BinOp::Mul | BinOp::Div, Vector(_) | Matrix(_), Number) => l,
            (BinOp::Mul, Matrix(a), Matrix(b)) => match (a, b) {
                (Some((r1, c1)), Some((r2, c2))) => {
                    if c1 != r2 {
                        self.error(
                            Code::ShapeMismatch,
                            span,
                            format!("cannot multiply a {r1} x {c1} matrix by a {r2} x {c2} matrix"),
                        );
                        Unknown
                    } else {
                        Matrix(Some((r1, c2)))
                    }
                }
                _ => Matrix(None),
            },
            (BinOp::Mul, Matrix(a), Vector(n)) => match (a, n) {
                (Some((r1, c1)), Some(n)) if c1 != n => {
                    self.error(
                        Code::ShapeMismatch,
                        span,
                        format!("cannot multiply a {r1} x {c1} matrix by a vector of length {n}"),
                    );
                    Unknown
                }
                (Some((r1, _)), _) => Vector(Some(r1)),
                _ => Vector(None),
            },
            _ => {
                self.error(
                    Code::WrongKind,
                    span,
                    format!("`{}` does not apply to {} and {}", op.text(), l.describe(), r.describe()),
                );
                Unknown
            }
        }
    }

    fn same_shape(&mut self, span: Span, l: Kind, r: Kind) {
        let mismatch = match (l, r) {
            (Kind::Vector(Some(a)), Kind::Vector(Some(b))) => a != b,
            (Kind::Matrix(Some(a)), Kind::Matrix(Some(b))) => a != b,
            _ => false,
        };
        if mismatch {
            self.error(
                Code::ShapeMismatch,
                span,
                format!("the sides have different sizes: {} and {}", l.describe(), r.describe()),
            );
        }
    }

    fn placeholder(&self, kind: ParamKind, given: &[Option<(Kind, Span)>]) -> String {
        let size = given.iter().flatten().find_map(|(k, _)| match k {
            Kind::Matrix(Some((r, _))) => Some(*r),
            _ => None,
        });
        placeholder(kind, &self.symbols, size)
    }

    fn infer_call(&mut self, call: Span, func: &Ident, args: &[Arg]) -> Kind {
        let Some(b) = builtins::lookup(&func.name) else {
            let mut d =
                Diagnostic::error(Code::UnknownFunction, func.span, format!("there is no function `{}`", func.name));
            if let Some(s) = closest(&func.name, builtins::BUILTINS.iter().map(|b| b.name)) {
                d = d.with_note(format!("did you mean `{s}`?")).with_fix(rename_fix(func.span, s));
            }
            self.diags.push(d);
            for a in args {
                match a {
                    Arg::Positional(e) | Arg::Keyword { value: e, .. } => {
                        self.infer(e);
                    }
                    Arg::Axis(ax) => self.check_region(std::slice::from_ref(ax)),
                }
            }
            return Kind::Unknown;
        };
        let mut given: Vec<Option<(Kind, Span)>> = vec![None; b.positional.len() + b.keywords.len()];
        let mut axes: Vec<Axis> = Vec::new();
        let mut npos = 0;
        let mut kw_spans: HashMap<String, Span> = HashMap::new();
        let takes_region = b.region != RegionUse::None;
        for a in args {
            match a {
                Arg::Positional(e) => {
                    let k = self.infer(e);
                    if npos < b.positional.len() {
                        given[npos] = Some((k, e.span));
                    } else {
                        self.error(
                            Code::TooManyArguments,
                            e.span,
                            format!("`{}` takes {} positional argument(s)", b.name, b.positional.len()),
                        )
                        .notes
                        .push(format!("usage: {}", b.signature));
                    }
                    npos += 1;
                }
                Arg::Keyword { name, .. } if takes_region && AXIS_NAMES.contains(&name.name.as_str()) => {
                    // `t = 0`: a fixed axis; `check_region` reports an axis given twice (K507).
                    axes.extend(a.as_axis());
                }
                Arg::Keyword { name, value } => {
                    if let Some(prev) = kw_spans.get(&name.name) {
                        let d = Diagnostic::error(
                            Code::DuplicateArgument,
                            name.span,
                            format!("`{}` is given twice", name.name),
                        )
                        .with_label(*prev, "first given here");
                        self.diags.push(d);
                        continue;
                    }
                    kw_spans.insert(name.name.clone(), name.span);
                    let k = self.infer(value);
                    match b.keywords.iter().position(|p| p.name == name.name) {
                        Some(j) => given[b.positional.len() + j] = Some((k, value.span)),
                        None => {
                            let mut cands: Vec<&str> = b.keywords.iter().map(|p| p.name).collect();
                            // A function over a region: `z = 0` is most likely a misnamed axis.
                            let mut d = if takes_region {
                                cands.extend(AXIS_NAMES);
                                Diagnostic::error(
                                    Code::UnknownAxis,
                                    name.span,
                                    format!(
                                        "`{}` is not an axis (a region is over x, y and t) nor an argument of `{}`",
                                        name.name, b.name
                                    ),
                                )
                            } else {
                                Diagnostic::error(
                                    Code::UnknownKeyword,
                                    name.span,
                                    format!("`{}` takes no argument `{}`", b.name, name.name),
                                )
                            };
                            d = match closest(&name.name, cands.iter().copied()) {
                                Some(s) => {
                                    d.with_note(format!("did you mean `{s}`?")).with_fix(rename_fix(name.span, s))
                                }
                                None => d.with_note(format!("usage: {}", b.signature)),
                            };
                            self.diags.push(d);
                        }
                    }
                }
                Arg::Axis(ax) => {
                    if takes_region {
                        axes.push(ax.clone());
                    } else {
                        self.error(Code::UnknownKeyword, ax.span, format!("`{}` takes no region", b.name))
                            .notes
                            .push(format!("usage: {}", b.signature));
                    }
                }
            }
        }
        if takes_region {
            if axes.is_empty() && b.region == RegionUse::Required {
                let region = "x in -4..4, y in -4..4, t = 0";
                let fix = Fix {
                    title: format!("add the region `{region}`"),
                    edits: vec![insert_argument(call, args, None, region)],
                };
                self.error(
                    Code::MissingArgument,
                    func.span,
                    format!("`{}` needs a region, e.g. `x in -4..4, y in -4..4, t = 0`", b.name),
                )
                .fixes
                .push(fix);
            }
            self.check_region(&axes);
        }
        let params = b.positional.iter().chain(b.keywords.iter());
        for (j, p) in params.enumerate() {
            match given[j] {
                None if p.required => {
                    let how = if j < b.positional.len() {
                        format!("argument `{}`", p.name)
                    } else {
                        format!("`{} = ...`", p.name)
                    };
                    let value = self.placeholder(p.kind, &given);
                    let fix = if j < b.positional.len() {
                        let edit = insert_argument(call, args, Some(j), &value);
                        Fix { title: format!("add `{}` as `{value}`", p.name), edits: vec![edit] }
                    } else {
                        let text = format!("{} = {value}", p.name);
                        Fix { title: format!("add `{text}`"), edits: vec![insert_argument(call, args, None, &text)] }
                    };
                    let d = self.error(Code::MissingArgument, func.span, format!("`{}` needs {how}", b.name));
                    d.notes.push(format!("usage: {}", b.signature));
                    d.fixes.push(fix);
                }
                Some((k, s)) if !accepts(p.kind, k) => {
                    self.error(
                        Code::WrongKind,
                        s,
                        format!(
                            "`{}` needs {} for `{}`, but this is {}",
                            b.name,
                            describe_param(p.kind),
                            p.name,
                            k.describe()
                        ),
                    );
                }
                _ => {}
            }
        }
        self.check_shapes(b, &given);
        if let Some(k) = basics::result_kind(b, args, &given) {
            return k;
        }
        match b.yields {
            Yields::Number => Kind::Number,
            Yields::Bool => Kind::Bool,
            Yields::List => Kind::List,
            Yields::Matrix => Kind::Matrix(None),
            Yields::Vector => Kind::Vector(None),
            Yields::Wave => Kind::Wave,
            Yields::SameKind => Kind::Unknown,
        }
    }

    /// Size relations between arguments that the table cannot express.
    fn check_shapes(&mut self, b: &Builtin, given: &[Option<(Kind, Span)>]) {
        let arg = |name: &str| -> Option<(Kind, Span)> {
            let j = b.positional.iter().chain(b.keywords.iter()).position(|p| p.name == name)?;
            given[j]
        };
        let square = |c: &mut Checker, name: &str| -> Option<usize> {
            let (k, s) = arg(name)?;
            if let Kind::Matrix(Some((r, cols))) = k {
                if r != cols {
                    c.error(
                        Code::ShapeMismatch,
                        s,
                        format!("`{}` needs a square matrix; this is {r} x {cols}", b.name),
                    );
                    return None;
                }
                return Some(r);
            }
            None
        };
        let vec_len = |c: &mut Checker, name: &str, g: usize, what: &str| {
            if let Some((Kind::Vector(Some(n)), s)) = arg(name) {
                if n != g {
                    c.error(Code::ShapeMismatch, s, format!("`{name}` has length {n}, but {what} is {g} x {g}"));
                }
            }
        };
        match b.name {
            "is_riemann" => {
                square(self, "matrix");
            }
            "det" | "inverse" | "trace" => {
                square(self, "M");
            }
            "theta" => {
                if let Some(g) = square(self, "tau") {
                    vec_len(self, "z", g, "the Riemann matrix");
                    if let Some((Kind::Matrix(Some((r, c))), s)) = arg("char") {
                        if r != 2 || c != g {
                            self.error(
                                Code::ShapeMismatch,
                                s,
                                format!("`char = [a, b]` needs two rows of length {g}; this is {r} x {c}"),
                            );
                        }
                    }
                    if let Some((Kind::Matrix(Some((_, c))), s)) = arg("along") {
                        if c != g {
                            self.error(
                                Code::ShapeMismatch,
                                s,
                                format!("each direction in `along` needs length {g}, not {c}"),
                            );
                        }
                    }
                }
            }
            "theta_wave" => {
                if let Some(g) = square(self, "tau") {
                    for v in ["u", "v", "w", "shift"] {
                        vec_len(self, v, g, "the Riemann matrix");
                    }
                }
            }
            "soliton" => {
                if let (Some((Kind::Vector(Some(n)), _)), Some((Kind::Matrix(Some((k, c))), s))) =
                    (arg("kappa"), arg("a"))
                {
                    if c != n {
                        self.error(
                            Code::ShapeMismatch,
                            s,
                            format!("`a` needs {n} columns (one per kappa), but has {c}"),
                        );
                    } else if k >= n {
                        self.error(
                            Code::ShapeMismatch,
                            s,
                            format!("`a` is {k} x {n}; a point of the Grassmannian needs fewer rows than columns"),
                        );
                    }
                }
            }
            _ => {}
        }
    }
}

/// Text for an argument of `kind` that parses and, where `symbols` allow, checks: a curve
/// or wave the file defines, a vector of the length `size` of the matrix beside it.
pub fn placeholder(kind: ParamKind, symbols: &[Symbol], size: Option<usize>) -> String {
    let named = |k: Kind| symbols.iter().find(|s| s.kind == k).map(|s| s.name.clone());
    let zeros = |n: usize, z: &str| vec![z; n].join(", ");
    match kind {
        ParamKind::Number | ParamKind::Numeric => "1".into(),
        ParamKind::Bool => "true".into(),
        ParamKind::Curve => named(Kind::Curve).unwrap_or_else(|| "C".into()),
        ParamKind::CurveOrMatrix => named(Kind::Curve).unwrap_or_else(|| "[[1i]]".into()),
        ParamKind::Wave => named(Kind::Wave).unwrap_or_else(|| "W".into()),
        ParamKind::Matrix => "[[1i]]".into(),
        ParamKind::Vector | ParamKind::Collection => format!("[{}]", zeros(size.unwrap_or(1), "0")),
        ParamKind::VectorList => format!("[[{}]]", zeros(size.unwrap_or(1), "1")),
        ParamKind::Point | ParamKind::Points => "(0, 0)".into(),
        ParamKind::Characteristic => {
            let row = format!("[{}]", zeros(size.unwrap_or(1), "0"));
            format!("[{row}, {row}]")
        }
    }
}

/// Replaces a misspelt name by the suggested one.
fn rename_fix(span: Span, to: &str) -> Fix {
    Fix::replace(format!("change to `{to}`"), span, to)
}

fn arg_span(a: &Arg) -> Span {
    match a {
        Arg::Positional(e) => e.span,
        Arg::Keyword { name, value } => name.span.join(value.span),
        Arg::Axis(ax) => ax.span,
    }
}

/// The edit that adds `text` to the call spanning `call` (which ends with `)`): the
/// positional argument number `positional` goes after the positional ones before it,
/// anything else after the last argument.
fn insert_argument(call: Span, args: &[Arg], positional: Option<usize>, text: &str) -> (Span, String) {
    let before_close = Span::new(call.end.saturating_sub(1), call.end.saturating_sub(1));
    let after = match positional {
        Some(j) => {
            let earlier: Vec<&Arg> = args.iter().filter(|a| matches!(a, Arg::Positional(_))).take(j).collect();
            match (earlier.last(), args.first()) {
                (Some(a), _) => Some(arg_span(a).end),
                // No positional argument before it: it goes first.
                (None, Some(first)) => {
                    let at = arg_span(first).start;
                    return (Span::new(at, at), format!("{text}, "));
                }
                (None, None) => None,
            }
        }
        None => args.last().map(|a| arg_span(a).end),
    };
    match after {
        Some(at) => (Span::new(at, at), format!(", {text}")),
        None => (before_close, text.to_string()),
    }
}

fn too_high(span: Span) -> Diagnostic {
    Diagnostic::error(
        Code::DegreeTooHigh,
        span,
        format!("the equation's degree would exceed {MAX_CURVE_DEGREE}, the largest supported"),
    )
}

fn accepts(p: ParamKind, k: Kind) -> bool {
    use Kind::*;
    if k == Unknown {
        return true;
    }
    match p {
        ParamKind::Number => k == Number,
        ParamKind::Curve => k == Curve,
        ParamKind::Wave => k == Wave,
        ParamKind::Matrix | ParamKind::Characteristic => matches!(k, Matrix(_)),
        ParamKind::Vector => matches!(k, Vector(_)),
        ParamKind::VectorList => matches!(k, Matrix(_) | Vector(Some(0))),
        ParamKind::Collection => matches!(k, Vector(_) | Matrix(_) | List),
        ParamKind::Point => matches!(k, Point { .. }),
        ParamKind::Points => matches!(k, Point { .. } | List),
        ParamKind::Bool => k == Bool,
        ParamKind::CurveOrMatrix => matches!(k, Curve | Matrix(_)),
        ParamKind::Numeric => matches!(k, Number | Vector(_) | Matrix(_)),
    }
}

fn describe_param(p: ParamKind) -> &'static str {
    match p {
        ParamKind::Number => "a number",
        ParamKind::Curve => "a curve",
        ParamKind::Wave => "a wave",
        ParamKind::Matrix => "a matrix",
        ParamKind::Vector => "a vector",
        ParamKind::VectorList => "a list of vectors",
        ParamKind::Collection => "a list or vector",
        ParamKind::Point => "a point `(x, y)` or `(x : y : z)`",
        ParamKind::Points => "a point or a list of points",
        ParamKind::Characteristic => "characteristics `[a, b]`",
        ParamKind::Bool => "true or false",
        ParamKind::CurveOrMatrix => "a curve or a 1 x 1 matrix",
        ParamKind::Numeric => "a number, vector or matrix",
    }
}

pub fn strip_parens(e: &Expr) -> &Expr {
    match &e.kind {
        ExprKind::Paren(inner) => strip_parens(inner),
        _ => e,
    }
}

/// The value of a constant real expression made of literals and arithmetic.
pub fn const_real(e: &Expr) -> Option<f64> {
    match &e.kind {
        // Rust's float parsing rounds correctly, as the exact route would.
        ExprKind::Number(t) => crate::number::literal_error(t).is_none().then(|| t.parse::<f64>().ok()).flatten(),
        ExprKind::Paren(i) => const_real(i),
        ExprKind::Unary { op: UnOp::Neg, operand } => const_real(operand).map(|v| -v),
        ExprKind::Binary { op, lhs, rhs } => {
            let (a, b) = (const_real(lhs)?, const_real(rhs)?);
            let v = match op {
                BinOp::Add => a + b,
                BinOp::Sub => a - b,
                BinOp::Mul => a * b,
                BinOp::Div => a / b,
                BinOp::Pow => a.powf(b),
                _ => return None,
            };
            v.is_finite().then_some(v)
        }
        _ => None,
    }
}

/// Output paths are relative, stay inside the experiment's folder tree and name a
/// supported format by their extension.
pub fn check_output_path(kind: OutputKind, path: &StrLit) -> Result<(), Diagnostic> {
    let p = path.value.as_str();
    let formats: &[&str] = match kind {
        OutputKind::Sample => &["csv", "json", "npy"],
        OutputKind::Plot => &["png", "svg", "apng"],
    };
    let windows_drive = p.len() >= 2 && p.as_bytes()[1] == b':' && p.as_bytes()[0].is_ascii_alphabetic();
    if p.starts_with('/') || p.starts_with('\\') || windows_drive {
        return Err(Diagnostic::error(Code::AbsolutePath, path.span, format!("output path `{p}` is absolute"))
            .with_note("output paths are relative to the experiment file, e.g. \"out/swell.csv\""));
    }
    let mut depth: i64 = 0;
    for comp in p.split(['/', '\\']) {
        match comp {
            "" | "." => {}
            ".." => {
                depth -= 1;
                if depth < 0 {
                    return Err(Diagnostic::error(
                        Code::PathEscapes,
                        path.span,
                        format!("output path `{p}` leaves the experiment's folder"),
                    )
                    .with_note("outputs stay inside the folder tree of the experiment file"));
                }
            }
            _ => depth += 1,
        }
    }
    let ext = std::path::Path::new(p).extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase);
    match ext {
        Some(e) if formats.contains(&e.as_str()) => Ok(()),
        _ => Err(Diagnostic::error(
            Code::BadOutputFormat,
            path.span,
            format!(
                "`{}` writes {}; `{p}` has none of these extensions",
                kind.keyword(),
                formats.iter().map(|f| format!(".{f}")).collect::<Vec<_>>().join(", ")
            ),
        )),
    }
}
