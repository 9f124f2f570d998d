//! The `kelp` front end: command line now, language server next. Only this crate will
//! know LSP types; `kelp-lang` and `kelp-evaluator` stay protocol-free.

pub mod cli;
