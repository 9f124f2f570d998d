//! `kelp check` over a collection of 1,000 generated experiment files (invented content:
//! matrices, theta values, solitons, small curves and claims), with 1 and 2 jobs. The
//! reference measured in the same run is parse + static check of the same files on one
//! thread, so the figures read as "evaluation costs N times checking".
//! Run: `cargo bench -p kelp-lsp --bench collection` (prints files per second).

use std::path::PathBuf;
use std::time::Instant;

fn files() -> (PathBuf, Vec<String>) {
    let dir = std::env::temp_dir().join(format!("kelp-collection-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let mut texts = vec![];
    for k in 0..1000 {
        let text = format!(
            "# invented survey {k}\nset tolerance = 1e-10\n\
             let m = [[1.{a}i, 0.3], [0.3, 0.9i + 0.{b}]]\nexpect is_riemann(m)\n\
             let th = theta([[{c}i]], [0.{b}])\nexpect abs(th) > 0\n\
             curve c{k}: y^2 = x^3 - {c}*x + {a}\nexpect degree(c{k}) == 3\n\
             wave w = soliton(kappa = [-1, 0, {c}], a = [[1, 1, 0], [0, 1, 1]])\n\
             expect kp_residual(w, x in -2..2, y in -2..2, t = 0) < 1e-8\nexpect 0.1 + 0.{b} == {b}/10 + 1/10\n",
            a = k % 7 + 1,
            b = k % 9,
            c = k % 5 + 1,
        );
        std::fs::write(dir.join(format!("survey{k:04}.kelp")), &text).unwrap();
        texts.push(text);
    }
    (dir, texts)
}

fn main() {
    let (dir, texts) = files();
    let t = Instant::now();
    for text in &texts {
        std::hint::black_box(kelp_lang::check(text).order.len());
    }
    let reference = t.elapsed().as_secs_f64();
    println!("1,000 files: parse + static check on one thread {:.1} ms (reference)", reference * 1e3);
    for jobs in ["1", "2"] {
        let argv: Vec<String> =
            ["kelp", "check", "--jobs", jobs, dir.to_str().unwrap()].iter().map(|s| s.to_string()).collect();
        let mut best = f64::INFINITY;
        for _ in 0..3 {
            let (mut out, mut err) = (Vec::new(), Vec::new());
            let t = Instant::now();
            let code = kelp_lsp::cli::run(&argv, &mut out, &mut err, false);
            best = best.min(t.elapsed().as_secs_f64());
            assert_eq!(code, 0, "{}", String::from_utf8_lossy(&out));
        }
        println!(
            "kelp check --jobs {jobs}: {:.0} ms, {:.0} files/s ({:.1}x the reference)",
            best * 1e3,
            1000.0 / best,
            best / reference
        );
    }
    let _ = std::fs::remove_dir_all(&dir);
}
