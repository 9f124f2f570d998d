//! Cross-crate and end-to-end tests live in `tests/`; this library holds what they share.

/// Runs `kelp ARGS` in-process; returns (status, stdout, stderr).
pub fn kelp(args: &[&str]) -> (i32, String, String) {
    let mut argv = vec!["kelp".to_string()];
    argv.extend(args.iter().map(|s| s.to_string()));
    let (mut out, mut err) = (Vec::new(), Vec::new());
    let code = kelp_lsp::cli::run(&argv, &mut out, &mut err, false);
    (code, String::from_utf8(out).unwrap(), String::from_utf8(err).unwrap())
}
