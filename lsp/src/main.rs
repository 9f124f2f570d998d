//! `kelp`: check and run experiment files, format them, serve them to editors.

fn main() {
    std::process::exit(kelp_lsp::cli::main());
}
