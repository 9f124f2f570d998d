//! `kelp`: check and run experiment files, format them, serve them to editors.

mod cli;

fn main() {
    std::process::exit(cli::main());
}
