//! The `kelp` front end: the command line and the language server. Only this crate
//! knows LSP types; `kelp-lang` and `kelp-evaluator` stay protocol-free.

mod batch;
pub mod cli;
pub mod server;

/// Stack size of every thread that parses, checks or evaluates: the syntax tree may be as
/// deep as the parser's limits allow (256 nested brackets, 40,000 tokens in a statement).
pub const STACK_BYTES: usize = 256 << 20;
