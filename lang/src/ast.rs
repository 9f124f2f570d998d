//! The syntax tree. Every node carries its byte span; broken statements and expressions
//! are explicit `Error` nodes so that the rest of the file is still checked.

use crate::span::Span;

#[derive(Clone, Debug, PartialEq)]
pub struct Program {
    pub stmts: Vec<Stmt>,
    /// Every comment of the file, in order (the formatter puts them back).
    pub comments: Vec<Comment>,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Comment {
    pub text: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Ident {
    pub name: String,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Stmt {
    pub kind: StmtKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum StmtKind {
    /// `set NAME = EXPR`
    Set { name: Ident, value: Expr },
    /// `curve NAME: LHS [= RHS]`
    Curve { name: Ident, lhs: Expr, rhs: Option<Expr> },
    /// `let NAME = EXPR`
    Let { name: Ident, value: Expr },
    /// `wave NAME = CALL`
    Wave { name: Ident, value: Expr },
    /// `expect CLAIM [within TOL]`
    Expect { claim: Expr, within: Option<Expr> },
    /// `sample WAVE over REGION to PATH` and `plot ...`
    Output { kind: OutputKind, wave: Ident, region: Vec<Axis>, path: StrLit },
    /// A statement that did not parse; its diagnostic is already reported.
    Error,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum OutputKind {
    Sample,
    Plot,
}

impl OutputKind {
    pub fn keyword(self) -> &'static str {
        match self {
            OutputKind::Sample => "sample",
            OutputKind::Plot => "plot",
        }
    }
}

#[derive(Clone, Debug, PartialEq)]
pub struct StrLit {
    /// The string's value, escapes resolved.
    pub value: String,
    pub span: Span,
}

/// One axis of a region: `x in A..B [step H]` or `t = A`.
#[derive(Clone, Debug, PartialEq)]
pub struct Axis {
    pub name: Ident,
    pub kind: AxisKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum AxisKind {
    Fixed(Expr),
    Range { lo: Expr, hi: Expr, step: Option<Expr> },
}

#[derive(Clone, Debug, PartialEq)]
pub struct Expr {
    pub kind: ExprKind,
    pub span: Span,
}

#[derive(Clone, Debug, PartialEq)]
pub enum ExprKind {
    /// An integer or decimal literal, as written (exact: `0.1` is 1/10).
    Number(String),
    /// An imaginary literal as written without the `i` (`"2"` for `2i`, `"1"` for `i`).
    Imag(String),
    Bool(bool),
    Str(String),
    Name(String),
    Call {
        func: Ident,
        args: Vec<Arg>,
    },
    /// `[a, b, ...]`: a vector, or a matrix when every entry is a list.
    List(Vec<Expr>),
    /// `(a, b)` affine or `(a : b : c)` projective point.
    Point {
        coords: Vec<Expr>,
        projective: bool,
    },
    Paren(Box<Expr>),
    /// `v[i]`, `M[i, j]`, `M[i]` (a row): 1-based indices.
    Index {
        base: Box<Expr>,
        indices: Vec<Expr>,
    },
    Unary {
        op: UnOp,
        operand: Box<Expr>,
    },
    Binary {
        op: BinOp,
        lhs: Box<Expr>,
        rhs: Box<Expr>,
    },
    Error,
}

#[derive(Clone, Debug, PartialEq)]
pub enum Arg {
    Positional(Expr),
    Keyword { name: Ident, value: Expr },
    Axis(Axis),
}

/// The names a region's axes may have.
pub const AXIS_NAMES: [&str; 3] = ["x", "y", "t"];

impl Arg {
    pub fn span(&self) -> Span {
        match self {
            Arg::Positional(e) => e.span,
            Arg::Keyword { name, value } => name.span.join(value.span),
            Arg::Axis(a) => a.span,
        }
    }

    /// This argument as a region axis, for a function that takes a region: a range, or a
    /// fixed axis. Inside a call `t = 0` parses as a keyword argument (the grammar cannot
    /// tell it from `shift = ...`), so a keyword named x, y or t is read as `AxisKind::Fixed`.
    pub fn as_axis(&self) -> Option<Axis> {
        match self {
            Arg::Axis(a) => Some(a.clone()),
            Arg::Keyword { name, value } if AXIS_NAMES.contains(&name.name.as_str()) => {
                Some(Axis { name: name.clone(), kind: AxisKind::Fixed(value.clone()), span: self.span() })
            }
            _ => None,
        }
    }
}

/// The region axes among a call's arguments, in order (see [`Arg::as_axis`]).
pub fn region_axes(args: &[Arg]) -> Vec<Axis> {
    args.iter().filter_map(Arg::as_axis).collect()
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum UnOp {
    Neg,
    Not,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum BinOp {
    Add,
    Sub,
    Mul,
    Div,
    Pow,
    Eq,
    Ne,
    Lt,
    Le,
    Gt,
    Ge,
    And,
    Or,
}

impl BinOp {
    pub fn text(self) -> &'static str {
        match self {
            BinOp::Add => "+",
            BinOp::Sub => "-",
            BinOp::Mul => "*",
            BinOp::Div => "/",
            BinOp::Pow => "^",
            BinOp::Eq => "==",
            BinOp::Ne => "!=",
            BinOp::Lt => "<",
            BinOp::Le => "<=",
            BinOp::Gt => ">",
            BinOp::Ge => ">=",
            BinOp::And => "and",
            BinOp::Or => "or",
        }
    }
    /// Binding strength, higher binds tighter.
    pub fn precedence(self) -> u8 {
        match self {
            BinOp::Or => 1,
            BinOp::And => 2,
            BinOp::Eq | BinOp::Ne | BinOp::Lt | BinOp::Le | BinOp::Gt | BinOp::Ge => 4,
            BinOp::Add | BinOp::Sub => 5,
            BinOp::Mul | BinOp::Div => 6,
            BinOp::Pow => 8,
        }
    }
    pub fn is_comparison(self) -> bool {
        self.precedence() == 4
    }
}

impl Stmt {
    /// The name a statement defines, if any.
    pub fn defined_name(&self) -> Option<&Ident> {
        match &self.kind {
            StmtKind::Curve { name, .. } | StmtKind::Let { name, .. } | StmtKind::Wave { name, .. } => Some(name),
            _ => None,
        }
    }
}

impl Expr {
    /// Visits this expression and every sub-expression, parents first.
    pub fn walk<'a>(&'a self, f: &mut impl FnMut(&'a Expr)) {
        f(self);
        match &self.kind {
            ExprKind::Call { args, .. } => {
                for a in args {
                    match a {
                        Arg::Positional(e) | Arg::Keyword { value: e, .. } => e.walk(f),
                        Arg::Axis(ax) => ax.walk(f),
                    }
                }
            }
            ExprKind::List(items) | ExprKind::Point { coords: items, .. } => items.iter().for_each(|e| e.walk(f)),
            ExprKind::Paren(e) | ExprKind::Unary { operand: e, .. } => e.walk(f),
            ExprKind::Index { base, indices } => {
                base.walk(f);
                indices.iter().for_each(|e| e.walk(f));
            }
            ExprKind::Binary { lhs, rhs, .. } => {
                lhs.walk(f);
                rhs.walk(f);
            }
            _ => {}
        }
    }
}

impl Axis {
    pub fn walk<'a>(&'a self, f: &mut impl FnMut(&'a Expr)) {
        match &self.kind {
            AxisKind::Fixed(e) => e.walk(f),
            AxisKind::Range { lo, hi, step } => {
                lo.walk(f);
                hi.walk(f);
                if let Some(s) = step {
                    s.walk(f);
                }
            }
        }
    }
}
