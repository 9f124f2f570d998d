//! The command line. Exit status: 0 no error diagnostic, 1 an error (failed claims
//! included), 2 usage or I/O errors.

use clap::{Parser, Subcommand, ValueEnum};
use kelp_evaluator::Mode;
use kelp_lang::{Code, Diagnostic, Span};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

#[derive(Parser)]
#[command(
    name = "kelp",
    version,
    about = "Check and run kelp experiment files: curves, Riemann matrices, theta functions and KP waves"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum Format {
    Human,
    Json,
    /// SARIF 2.1.0 (code-scanning services).
    Sarif,
    /// JUnit XML (CI test reports): one test case per claim.
    Junit,
}

#[derive(Subcommand)]
enum Command {
    /// Evaluate every value and claim; write no outputs. FILES may be files, folders
    /// (every *.kelp below) or glob patterns.
    Check {
        #[arg(required = true)]
        files: Vec<PathBuf>,
        #[arg(long, value_enum, default_value = "human")]
        format: Format,
        /// Also show information diagnostics and every computed value.
        #[arg(long, short)]
        verbose: bool,
        /// Check only shard K of N (a fixed split by path, for parallel CI jobs).
        #[arg(long, value_name = "K/N")]
        shard: Option<String>,
        /// Files evaluated at once (default: the machine's cores); reports keep file order.
        #[arg(long, short)]
        jobs: Option<usize>,
        /// Reuse reports of unchanged files from this folder (keyed by the file's bytes,
        /// its path and this build of kelp), and store new ones there.
        #[arg(long, value_name = "DIR")]
        cache: Option<PathBuf>,
        /// Override a limit of every file: max_points, max_lattice_points, max_degree,
        /// max_genus, max_digits or time_budget (seconds per statement). Repeatable.
        #[arg(long = "limit", value_name = "NAME=VALUE", value_parser = crate::batch::parse_limit)]
        limits: Vec<(String, f64)>,
    },
    /// Evaluate like `check`, then write samples and plots.
    Run {
        file: PathBuf,
        #[arg(long, value_enum, default_value = "human")]
        format: Format,
        #[arg(long, short)]
        verbose: bool,
        /// Override a limit of the file (as for `check`). Repeatable.
        #[arg(long = "limit", value_name = "NAME=VALUE", value_parser = crate::batch::parse_limit)]
        limits: Vec<(String, f64)>,
    },
    /// Rewrite files in the canonical layout.
    Fmt {
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Change nothing; exit 1 if a file is not formatted.
        #[arg(long)]
        check: bool,
    },
    /// Serve experiment files to an editor over stdio (Language Server Protocol).
    Lsp,
}

pub fn main() -> i32 {
    let args: Vec<String> = std::env::args().collect();
    // The language server owns stdin/stdout itself: no lock may be held on them.
    if args.get(1).map(String::as_str) == Some("lsp") && args.len() == 2 {
        return crate::server::run();
    }
    let color = std::io::stderr().is_terminal();
    // On a thread with a large stack (see `STACK_BYTES`).
    let work = std::thread::Builder::new()
        .stack_size(crate::STACK_BYTES)
        .spawn(move || run(&args, &mut std::io::stdout().lock(), &mut std::io::stderr().lock(), color));
    match work.map(|h| h.join()) {
        Ok(Ok(code)) => code,
        _ => 2,
    }
}

/// Runs the command line with these arguments (the first is the program name),
/// writing to `out` and `err`; returns the exit status.
pub fn run(args: &[String], out: &mut dyn Write, err: &mut dyn Write, color: bool) -> i32 {
    let cli = match Cli::try_parse_from(args) {
        Ok(c) => c,
        Err(e) => {
            let to_err = e.use_stderr();
            let _ = if to_err { write!(err, "{e}") } else { write!(out, "{e}") };
            return if to_err { 2 } else { 0 };
        }
    };
    let mut io = Io { out, err, color };
    let status = match cli.command {
        Command::Check { files, format, verbose, shard, jobs, cache, limits } => {
            let opts = crate::batch::Options { verbose, color: io.color && format == Format::Human, limits };
            io.check_collection(&files, format, &opts, shard, jobs, cache)
        }
        Command::Run { format: Format::Sarif | Format::Junit, .. } => {
            Err("kelp: --format sarif and junit report `kelp check` runs; use human or json with `run`".to_string())
        }
        Command::Run { file, format, verbose, limits } => {
            let base = file.parent().map(|p| if p.as_os_str().is_empty() { std::path::Path::new(".") } else { p });
            let base = base.unwrap_or(std::path::Path::new(".")).to_path_buf();
            let opts = crate::batch::Options { verbose, color: io.color && format == Format::Human, limits };
            io.evaluate_files(&[file], format, &opts, Mode::Run { base, only: None })
        }
        Command::Fmt { files, check } => io.fmt(&files, check),
        Command::Lsp => Ok(crate::server::run()),
    };
    match status {
        Ok(code) => code,
        Err(msg) => {
            let _ = writeln!(io.err, "{msg}");
            2
        }
    }
}

/// Reads a file as text; invalid UTF-8 is replaced and reported at its first byte.
pub(crate) fn read_source(path: &Path) -> Result<(String, Option<Diagnostic>), String> {
    let bytes = std::fs::read(path).map_err(|e| format!("kelp: cannot read {}: {e}", path.display()))?;
    Ok(match String::from_utf8(bytes) {
        Ok(s) => (s, None),
        Err(e) => {
            let at = e.utf8_error().valid_up_to();
            let s = String::from_utf8_lossy(e.as_bytes()).into_owned();
            let d = Diagnostic::error(
                Code::BadToken,
                Span::new(at, at + '\u{FFFD}'.len_utf8()),
                "the file is not valid UTF-8 from here on",
            )
            .with_note("experiment files are UTF-8 text");
            (s, Some(d))
        }
    })
}

/// A progress bar on stderr for `kelp run` on a terminal: drawn only once sampling has run
/// for half a second, from the grid counters the evaluator keeps, and erased at the end.
struct ProgressBar {
    stop: std::sync::Arc<std::sync::atomic::AtomicBool>,
    thread: Option<std::thread::JoinHandle<()>>,
}

impl ProgressBar {
    fn start() -> ProgressBar {
        use kelp_evaluator::output::grid::{POINTS_DONE, POINTS_TOTAL};
        use std::sync::atomic::Ordering;
        let stop = std::sync::Arc::new(std::sync::atomic::AtomicBool::new(false));
        let flag = stop.clone();
        let (done0, total0) = (POINTS_DONE.load(Ordering::Relaxed), POINTS_TOTAL.load(Ordering::Relaxed));
        let thread = std::thread::spawn(move || {
            // The main thread holds the stderr lock for the whole run, so the bar writes to
            // file descriptor 2 directly (unix) rather than through `eprint!`, which would
            // wait for that lock forever.
            #[cfg(unix)]
            let mut tty = {
                use std::os::fd::FromRawFd;
                std::mem::ManuallyDrop::new(unsafe { std::fs::File::from_raw_fd(2) })
            };
            #[cfg(not(unix))]
            let mut tty = std::mem::ManuallyDrop::new(std::io::sink());
            let began = std::time::Instant::now();
            let mut drawn = false;
            while !flag.load(Ordering::Relaxed) {
                std::thread::sleep(std::time::Duration::from_millis(100));
                let total = POINTS_TOTAL.load(Ordering::Relaxed) - total0;
                if total == 0 || began.elapsed() < std::time::Duration::from_millis(500) {
                    continue;
                }
                let done = (POINTS_DONE.load(Ordering::Relaxed) - done0).min(total);
                let filled = 30 * done / total;
                let _ = write!(
                    tty,
                    "\r  sampling [{}{}] {done}/{total} points",
                    "#".repeat(filled),
                    ".".repeat(30 - filled)
                );
                drawn = true;
            }
            if drawn {
                let _ = write!(tty, "\r{}\r", " ".repeat(72));
            }
        });
        ProgressBar { stop, thread: Some(thread) }
    }
}

impl Drop for ProgressBar {
    fn drop(&mut self) {
        self.stop.store(true, std::sync::atomic::Ordering::Relaxed);
        if let Some(t) = self.thread.take() {
            let _ = t.join();
        }
    }
}

struct Io<'a> {
    out: &'a mut dyn Write,
    err: &'a mut dyn Write,
    color: bool,
}

type Status = Result<i32, String>;

impl Io<'_> {
    fn check_collection(
        &mut self,
        inputs: &[PathBuf],
        format: Format,
        opts: &crate::batch::Options,
        shard: Option<String>,
        jobs: Option<usize>,
        cache: Option<PathBuf>,
    ) -> Status {
        use crate::batch;
        use rayon::prelude::*;
        let mut files = batch::collect(inputs)?;
        if let Some(s) = shard {
            let sh = batch::parse_shard(&s)?;
            files.retain(|f| batch::in_shard(f, sh));
        }
        let work = || -> Vec<Result<batch::Outcome, String>> {
            files.par_iter().map(|f| batch::cached_outcome(f, opts, cache.as_deref())).collect()
        };
        let mut pool = rayon::ThreadPoolBuilder::new().stack_size(crate::STACK_BYTES);
        if let Some(n) = jobs {
            pool = pool.num_threads(n.max(1));
        }
        let results = pool.build().map_err(|e| format!("kelp: cannot start the workers: {e}"))?.install(work);
        let outcomes: Vec<batch::Outcome> = results.into_iter().collect::<Result<_, _>>()?;
        let w = |e: std::io::Error| format!("kelp: cannot write output: {e}");
        let any_error = outcomes.iter().any(|o| o.any_error);
        match format {
            Format::Human => {
                for o in &outcomes {
                    o.write_human(self.out, self.err).map_err(w)?;
                }
                if outcomes.len() > 1 {
                    let failed = outcomes.iter().filter(|o| o.any_error).count();
                    writeln!(self.out, "{} file(s), {failed} with errors", outcomes.len()).map_err(w)?;
                }
            }
            Format::Json => {
                let mut reports: Vec<serde_json::Value> = outcomes.into_iter().map(|o| o.json).collect();
                let out = if reports.len() == 1 { reports.pop().unwrap() } else { serde_json::Value::Array(reports) };
                writeln!(self.out, "{}", serde_json::to_string_pretty(&out).unwrap()).map_err(w)?;
            }
            Format::Sarif => {
                writeln!(self.out, "{}", serde_json::to_string_pretty(&batch::sarif_log(&outcomes)).unwrap())
                    .map_err(w)?;
            }
            Format::Junit => write!(self.out, "{}", batch::junit_log(&outcomes)).map_err(w)?,
        }
        Ok(i32::from(any_error))
    }

    /// `kelp run`: one file at a time, with a progress bar while sampling on a terminal.
    fn evaluate_files(
        &mut self,
        files: &[PathBuf],
        format: Format,
        opts: &crate::batch::Options,
        mode: Mode,
    ) -> Status {
        let mut reports = Vec::new();
        let mut any_error = false;
        let w = |e: std::io::Error| format!("kelp: cannot write output: {e}");
        for path in files {
            let bar = (self.color && matches!(mode, Mode::Run { .. })).then(ProgressBar::start);
            let o = crate::batch::outcome(path, &mode, opts)?;
            drop(bar);
            any_error |= o.any_error;
            if format == Format::Json {
                reports.push(o.json);
            } else {
                o.write_human(self.out, self.err).map_err(w)?;
            }
        }
        if format == Format::Json {
            let out = if reports.len() == 1 { reports.pop().unwrap() } else { serde_json::Value::Array(reports) };
            writeln!(self.out, "{}", serde_json::to_string_pretty(&out).unwrap()).map_err(w)?;
        }
        Ok(i32::from(any_error))
    }

    fn fmt(&mut self, files: &[PathBuf], check_only: bool) -> Status {
        let mut unformatted = false;
        for path in files {
            let src =
                std::fs::read_to_string(path).map_err(|e| format!("kelp: cannot read {}: {e}", path.display()))?;
            let out = kelp_lang::fmt::format(&src);
            if out == src {
                continue;
            }
            if check_only {
                let _ = writeln!(self.out, "{}: not formatted", path.display());
                unformatted = true;
            } else {
                std::fs::write(path, &out).map_err(|e| format!("kelp: cannot write {}: {e}", path.display()))?;
            }
        }
        Ok(i32::from(unformatted))
    }
}
