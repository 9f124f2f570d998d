//! The `kelp` front end: the command line and the language server. Only this crate
//! knows LSP types; `kelp-lang` and `kelp-evaluator` stay protocol-free.

mod batch;
pub mod cli;
pub mod server;

/// Stack size of every thread that parses, checks or evaluates (one figure, kept in the
/// language crate, which spawns parser threads of its own).
pub use kelp_lang::STACK_BYTES;
