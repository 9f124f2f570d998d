//! Checks of the expression basics: indexing (`v[i]`, `M[i, j]`, `M[i]`), the constant
//! `pi`, and the result shapes of the matrix built-ins the function table cannot express.

use super::{const_real, Checker, Kind};
use crate::ast::{Arg, Expr, Ident};
use crate::builtins::Builtin;
use crate::diag::{Code, Diagnostic};

/// Names the language defines itself; a file may not define them again (`let pi = 3` would
/// silently change every formula that reads `pi`).
pub const CONSTANTS: &[&str] = &["pi"];

/// Largest size of `identity(n)` and `zeros(...)` per dimension.
pub const MAX_BUILT_SIZE: usize = 500;

pub(super) fn constant_kind(name: &str) -> Option<Kind> {
    CONSTANTS.contains(&name).then_some(Kind::Number)
}

/// K201 for a definition of a built-in constant.
pub(super) fn reserved(name: &Ident) -> Option<Diagnostic> {
    CONSTANTS.contains(&name.name.as_str()).then(|| {
        Diagnostic::error(Code::DuplicateName, name.span, format!("`{}` is a built-in constant", name.name))
            .with_note("choose another name; `pi` always means 3.14159...")
    })
}

/// A constant whole number of an expression, if the text fixes it (`None` otherwise).
fn const_whole(e: &Expr) -> Option<f64> {
    const_real(e).filter(|v| v.fract() == 0.0)
}

/// The result kind of calls whose shape follows from their arguments.
pub(super) fn result_kind(b: &Builtin, args: &[Arg], given: &[Option<(Kind, Span)>]) -> Option<Kind> {
    let first = given.first().copied().flatten().map(|(k, _)| k);
    let positional: Vec<&Expr> =
        args.iter().filter_map(|a| if let Arg::Positional(e) = a { Some(e) } else { None }).collect();
    let size = |j: usize| -> Option<usize> {
        positional
            .get(j)
            .and_then(|e| const_whole(e))
            .filter(|&v| v >= 1.0 && v <= MAX_BUILT_SIZE as f64)
            .map(|v| v as usize)
    };
    Some(match b.name {
        "re" | "im" | "abs" | "conj" => match first? {
            k @ (Kind::Number | Kind::Vector(_) | Kind::Matrix(_)) => k,
            _ => Kind::Unknown,
        },
        "inverse" => match first? {
            k @ Kind::Matrix(_) => k,
            _ => Kind::Matrix(None),
        },
        "transpose" => match first? {
            Kind::Matrix(Some((r, c))) => Kind::Matrix(Some((c, r))),
            _ => Kind::Matrix(None),
        },
        "identity" => Kind::Matrix(size(0).map(|n| (n, n))),
        "zeros" if positional.len() >= 2 => Kind::Matrix(size(0).zip(size(1))),
        "zeros" => Kind::Vector(size(0)),
        _ => return None,
    })
}

use crate::span::Span;

impl Checker {
    /// `base[i, ...]`: one index of a vector or list, one (a row) or two of a matrix.
    pub(super) fn infer_index(&mut self, base: &Expr, indices: &[Expr]) -> Kind {
        let k = self.infer(base);
        for ix in indices {
            let ik = self.infer(ix);
            if !matches!(ik, Kind::Number | Kind::Unknown) {
                self.error(Code::WrongKind, ix.span, format!("an index is a whole number, not {}", ik.describe()));
            }
        }
        let too_many = |c: &mut Checker, most: usize, what: &str| {
            let extra = indices[most].span.join(indices[indices.len() - 1].span);
            c.error(Code::BadIndex, extra, format!("{what} takes at most {most} index(es), here {}", indices.len()));
            Kind::Unknown
        };
        match k {
            Kind::Unknown => Kind::Unknown,
            Kind::Vector(n) => {
                if indices.len() > 1 {
                    return too_many(self, 1, "a vector");
                }
                self.check_index(&indices[0], n, "the vector's length");
                Kind::Number
            }
            Kind::List => {
                if indices.len() > 1 {
                    return too_many(self, 1, "a list");
                }
                self.check_index(&indices[0], None, "");
                Kind::Unknown
            }
            Kind::Matrix(shape) => {
                if indices.len() > 2 {
                    return too_many(self, 2, "a matrix");
                }
                self.check_index(&indices[0], shape.map(|s| s.0), "the number of rows");
                if indices.len() == 2 {
                    self.check_index(&indices[1], shape.map(|s| s.1), "the number of columns");
                    Kind::Number
                } else {
                    Kind::Vector(shape.map(|s| s.1))
                }
            }
            other => {
                self.error(
                    Code::WrongKind,
                    base.span,
                    format!("only vectors, matrices and lists can be indexed; this is {}", other.describe()),
                );
                Kind::Unknown
            }
        }
    }

    /// A constant index must be a whole number from 1 to `n` (when `n` is known).
    fn check_index(&mut self, ix: &Expr, n: Option<usize>, what: &str) {
        let Some(v) = const_real(ix) else { return };
        if v.fract() != 0.0 || v < 1.0 {
            self.error(Code::BadIndex, ix.span, format!("an index is a whole number from 1 up, not {v}"))
                .notes
                .push("indices count from 1: the first entry is `v[1]`".into());
        } else if let Some(n) = n.filter(|&n| v > n as f64) {
            self.error(Code::BadIndex, ix.span, format!("index {v} is past the end: {what} is {n}"));
        }
    }
}
