//! The kelp experiment language: tokens, syntax tree, parser with error recovery,
//! name resolution and static checks, the canonical formatter, and the one diagnostic
//! type with its terminal rendering. Knows nothing of LSP or of evaluation.

/// Stack size of every thread that parses, checks or evaluates: the tree is walked
/// recursively, and statements may nest up to `parser::MAX_NESTING` deep.
pub const STACK_BYTES: usize = 256 << 20;

pub mod ast;
pub mod builtins;
pub mod check;
pub mod diag;
pub mod fmt;
pub mod lexer;
pub mod number;
pub mod parser;
pub mod poly;
pub mod render;
pub mod small_poly;
pub mod span;
pub mod suggest;

pub use check::{check, Checked, Kind};
pub use diag::{Code, Diagnostic, Fix, Label, Severity};
pub use parser::{parse, Parsed};
pub use span::{Encoding, LineCol, LineIndex, Span};
