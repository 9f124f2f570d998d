//! The `kelp` front end: the command line and the language server. Only this crate
//! knows LSP types; `kelp-lang` and `kelp-evaluator` stay protocol-free.

mod batch;
pub mod cli;
pub mod server;
