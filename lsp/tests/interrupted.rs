//! Killing `kelp run` at any moment leaves each output either as it was or as the new run
//! writes it, never half-written (outputs are written to a temporary file and renamed), and
//! the next run removes the temporary file the killed one left.

use std::path::Path;
use std::process::Command;
use std::time::Duration;

fn run(file: &Path) {
    let st = Command::new(env!("CARGO_BIN_EXE_kelp")).arg("run").arg(file).output().unwrap();
    assert!(st.status.success(), "{}", String::from_utf8_lossy(&st.stderr));
}

#[test]
fn an_interrupted_run_leaves_the_old_or_the_new_output() {
    let dir = std::env::temp_dir().join(format!("kelp-interrupt-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let file = dir.join("breakwater.kelp");
    let src = |t: &str| {
        format!(
            "# invented breakwater survey\nwave crest = soliton(kappa = [-1, 0, 2], a = [[1, 1, 0], [0, 1, 1]])\n\
             sample crest over x in -20..20 step 0.05, y in -5..5 step 0.1, t = {t} to \"out/crest.csv\"\n"
        )
    };
    std::fs::write(&file, src("0")).unwrap();
    run(&file);
    let target = dir.join("out/crest.csv");
    let old = std::fs::read(&target).unwrap();
    // What the new run writes when it completes, made in a folder of its own.
    let other = dir.join("reference");
    std::fs::create_dir_all(&other).unwrap();
    std::fs::write(other.join("breakwater.kelp"), src("0.5")).unwrap();
    run(&other.join("breakwater.kelp"));
    let new = std::fs::read(other.join("out/crest.csv")).unwrap();
    assert_ne!(new, old);
    std::fs::write(&file, src("0.5")).unwrap();
    let mut kills = 0;
    for delay_ms in [0u64, 5, 20, 60, 120, 250, 500, 900] {
        let mut child = Command::new(env!("CARGO_BIN_EXE_kelp"))
            .arg("run")
            .arg(&file)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn()
            .unwrap();
        std::thread::sleep(Duration::from_millis(delay_ms));
        if child.try_wait().unwrap().is_none() {
            kills += 1;
        }
        let _ = child.kill();
        let _ = child.wait();
        let now = std::fs::read(&target).unwrap();
        assert!(
            now == old || now == new,
            "killed after {delay_ms} ms: neither the old nor the new file ({} bytes)",
            now.len()
        );
    }
    assert!(kills >= 3, "the runs ended before they could be interrupted ({kills} kills)");
    // A complete run gives the new output and leaves no temporary files behind.
    run(&file);
    assert_eq!(std::fs::read(&target).unwrap(), new);
    let leftovers: Vec<_> = std::fs::read_dir(dir.join("out"))
        .unwrap()
        .flatten()
        .map(|e| e.file_name().to_string_lossy().into_owned())
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");
    let _ = std::fs::remove_dir_all(&dir);
}
