#![no_main]
//! cargo-fuzz target: `cargo +nightly fuzz run parser` (see DEVELOPERS.md).

#[path = "../targets.rs"]
mod targets;

libfuzzer_sys::fuzz_target!(|data: &[u8]| targets::parser(data));
