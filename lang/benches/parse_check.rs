//! Parse + check of a generated 10,000-line experiment file. The lexer alone is the
//! reference measured in the same run: read the check time as a ratio to it.
//! Run: `cargo bench -p kelp-lang --bench parse_check`.

use divan::counter::BytesCount;
use divan::Bencher;
use std::sync::LazyLock;

/// A 10,000-line file mixing every statement kind (invented content).
static SOURCE: LazyLock<String> = LazyLock::new(|| {
    let mut s = String::from("# generated benchmark input\nset tolerance = 1e-10\n");
    let mut i = 0;
    let mut lines = 2;
    while lines < 10_000 {
        lines += 1;
        let line = match i % 8 {
            0 => format!("curve c{i}: y^2 = x^5 - {}*x^3 + 4*x - {i}/7  # a reef", i % 13 + 1),
            1 => format!("let m{i} = [[1.1i, 0.3], [0.3, 0.9i + 0.{}]]", i % 9),
            2 => format!("expect is_riemann(m{})", i - 1),
            3 => format!("let v{i} = theta(m{}, [0.1, -0.2 + 0.05i], char = [[1/2, 0], [0, 1/2]])", i - 2),
            4 => format!("wave w{i} = soliton(kappa = [-1, 0, {}], a = [[1, 1, 0], [0, 1, 1]])", i % 5 + 1),
            5 => format!("expect kp_residual(w{}, x in -4..4, y in -4..4, t = 0) < 1e-8", i - 1),
            6 => format!("sample w{} over x in -10..10 step 0.1, t = 0 to \"out/w{i}.csv\"", i - 2),
            _ => format!("expect degree(c{}) == 5 and 0.1 + 0.2 == 3/10", i - 7),
        };
        s.push_str(&line);
        s.push('\n');
        i += 1;
    }
    s
});

/// The allocator of the `kelp` binary, so the figures are the ones a user sees.
#[global_allocator]
static ALLOC: mimalloc::MiMalloc = mimalloc::MiMalloc;

fn main() {
    divan::main();
}

#[divan::bench]
fn lex_reference(b: Bencher) {
    let src = SOURCE.as_str();
    b.counter(BytesCount::of_str(src)).bench(|| kelp_lang::lexer::lex(divan::black_box(src)).0.len());
}

#[divan::bench]
fn parse(b: Bencher) {
    let src = SOURCE.as_str();
    b.counter(BytesCount::of_str(src)).bench(|| kelp_lang::parse(divan::black_box(src)).program.stmts.len());
}

#[divan::bench]
fn parse_and_check(b: Bencher) {
    let src = SOURCE.as_str();
    let c = kelp_lang::check(src);
    assert!(!c.has_errors(), "the benchmark input must be clean: {:?}", &c.diagnostics[..1]);
    b.counter(BytesCount::of_str(src)).bench(|| kelp_lang::check(divan::black_box(src)).order.len());
}

#[divan::bench]
fn format(b: Bencher) {
    let src = SOURCE.as_str();
    b.counter(BytesCount::of_str(src)).bench(|| kelp_lang::fmt::format(divan::black_box(src)).len());
}
