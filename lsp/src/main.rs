//! `kelp`: check and run experiment files, format them, serve them to editors.

/// The syntax tree is many small allocations; mimalloc makes parsing and dropping it
/// markedly cheaper than the system allocator (see the `parse_check` benchmark).
#[global_allocator]
static ALLOC: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    std::process::exit(kelp_lsp::cli::main());
}
