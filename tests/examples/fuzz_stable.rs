//! A mutation fuzzer on stable Rust for the same targets as the cargo-fuzz ones: seeds are
//! the samples and the hostile corpus; each round mutates one (bit flips, byte and token
//! insertions, deletions, duplications, splices of two inputs) and runs every target under
//! `catch_unwind`, timing each input. Crashing or slow inputs are written to
//! `target/fuzz-findings/`. Run:
//! `cargo run --release -p kelp-tests --example fuzz_stable -- [SECONDS] [SEED]`.

#[path = "../../fuzz/targets.rs"]
mod targets;

use std::time::{Duration, Instant};

/// xorshift64*: reproducible from the seed.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Fragments that make mutations land on meaningful syntax.
const TOKENS: &[&str] = &[
    "curve ",
    "let ",
    "wave ",
    "expect ",
    "sample ",
    "plot ",
    "set ",
    " over ",
    " to ",
    " in ",
    " step ",
    " within ",
    "(",
    ")",
    "[",
    "]",
    ",",
    ":",
    "=",
    "==",
    "^",
    "*",
    "/",
    "+",
    "-",
    "..",
    "i",
    "1e999999",
    "0.5",
    "\"out/a.csv\"",
    "x",
    "y",
    "z",
    "t",
    "tau(",
    "theta(",
    "soliton(",
    "krichever(",
    "\n",
    "#",
    "\u{e9}",
    "\u{1F30A}",
    "\u{0}",
];

fn mutate(rng: &mut Rng, input: &[u8], other: &[u8]) -> Vec<u8> {
    let mut v = input.to_vec();
    for _ in 0..1 + rng.below(4) {
        let at = rng.below(v.len() + 1);
        match rng.below(6) {
            0 if !v.is_empty() => {
                let i = rng.below(v.len());
                v[i] ^= 1 << rng.below(8);
            }
            1 => {
                let t = TOKENS[rng.below(TOKENS.len())].as_bytes();
                v.splice(at..at, t.iter().copied());
            }
            2 if !v.is_empty() => {
                let end = (at + 1 + rng.below(16)).min(v.len());
                v.drain(at.min(end)..end);
            }
            3 if !v.is_empty() => {
                let start = rng.below(v.len());
                let end = (start + 1 + rng.below(32)).min(v.len());
                let piece = v[start..end].to_vec();
                v.splice(at..at, piece);
            }
            4 if !other.is_empty() => {
                let start = rng.below(other.len());
                let end = (start + 1 + rng.below(64)).min(other.len());
                v.splice(at..at, other[start..end].iter().copied());
            }
            _ => v.insert(at, rng.next() as u8),
        }
    }
    v.truncate(64 * 1024);
    v
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let seconds: f64 = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(20.0);
    let mut rng = Rng(args.get(2).and_then(|s| s.parse().ok()).unwrap_or(0x6b65_6c70));
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).parent().unwrap().to_path_buf();
    let mut seeds: Vec<Vec<u8>> = vec![];
    for dir in [root.join("samples"), root.join("tests/corpus/hostile")] {
        for e in std::fs::read_dir(dir).unwrap().flatten() {
            if e.path().extension().is_some_and(|x| x == "kelp") {
                seeds.push(std::fs::read(e.path()).unwrap());
            }
        }
    }
    std::panic::set_hook(Box::new(|_| {}));
    let findings = root.join("target/fuzz-findings");
    let share = Duration::from_secs_f64(seconds / targets::TARGETS.len() as f64);
    println!("target      executions  crashes  slowest input");
    let mut total_crashes = 0;
    for (name, target) in targets::TARGETS {
        let (mut runs, mut crashes, mut slowest) = (0u64, 0u64, Duration::ZERO);
        let start = Instant::now();
        while start.elapsed() < share {
            let a = &seeds[rng.below(seeds.len())];
            let b = &seeds[rng.below(seeds.len())];
            let input = mutate(&mut rng, a, b);
            let t = Instant::now();
            let ok = std::panic::catch_unwind(|| target(&input)).is_ok();
            let took = t.elapsed();
            slowest = slowest.max(took);
            runs += 1;
            if !ok || took > Duration::from_secs(2) {
                crashes += u64::from(!ok);
                let _ = std::fs::create_dir_all(&findings);
                let kind = if ok { "slow" } else { "crash" };
                let _ = std::fs::write(findings.join(format!("{name}-{kind}-{runs}.kelp")), &input);
            }
        }
        total_crashes += crashes;
        println!("{name:<10} {runs:>11} {crashes:>8}  {:.1} ms", slowest.as_secs_f64() * 1e3);
    }
    std::process::exit(i32::from(total_crashes > 0));
}
