//! The output sandbox: a path must stay inside the experiment's folder tree (checked again
//! here after symlinks are resolved; the checker has already refused absolute paths and
//! `..` escapes), and a file is replaced atomically: written to a temporary file in the
//! same folder, then renamed over the old one, so an interrupted run leaves the old or the
//! new file, never half of one.

use std::io::Write;
use std::path::{Path, PathBuf};

/// The full path for `rel` under `base`, refusing any escape (also through symlinks).
pub fn resolve(base: &Path, rel: &str) -> Result<PathBuf, String> {
    let rel_path = Path::new(rel);
    if rel_path.is_absolute() || rel_path.components().any(|c| matches!(c, std::path::Component::ParentDir)) {
        return Err(format!("output path `{rel}` leaves the experiment's folder"));
    }
    let root = base.canonicalize().map_err(|e| format!("cannot resolve the experiment's folder: {e}"))?;
    let full = root.join(rel_path);
    let parent = full.parent().ok_or_else(|| format!("output path `{rel}` has no folder"))?;
    std::fs::create_dir_all(parent).map_err(|e| format!("cannot create {}: {e}", parent.display()))?;
    let real_parent = parent.canonicalize().map_err(|e| format!("cannot resolve {}: {e}", parent.display()))?;
    if !real_parent.starts_with(&root) {
        return Err(format!("output path `{rel}` leads outside the experiment's folder through a symbolic link"));
    }
    let target = real_parent.join(full.file_name().ok_or_else(|| format!("output path `{rel}` names no file"))?);
    if let Ok(meta) = std::fs::symlink_metadata(&target) {
        if meta.file_type().is_symlink() {
            return Err(format!("output path `{rel}` is a symbolic link; kelp does not write through links"));
        }
    }
    Ok(target)
}

/// Writes `bytes` to `target` atomically.
pub fn atomic_write(target: &Path, bytes: &[u8]) -> Result<(), String> {
    let dir = target.parent().ok_or("no folder")?;
    let name = target.file_name().and_then(|n| n.to_str()).unwrap_or("output");
    let tmp = dir.join(format!(".{name}.kelp-{}.tmp", std::process::id()));
    let result = (|| -> std::io::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, target)
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    } else {
        remove_stale(dir, name);
    }
    result.map_err(|e| format!("cannot write {}: {e}", target.display()))
}

/// Removes temporary files of this output left by runs that were killed mid-write: those
/// whose process is gone (on Linux, no /proc entry), elsewhere those over an hour old. A
/// concurrent run's file in progress is left alone.
fn remove_stale(dir: &Path, name: &str) {
    let prefix = format!(".{name}.kelp-");
    let Ok(entries) = std::fs::read_dir(dir) else { return };
    for e in entries.flatten() {
        let file = e.file_name();
        let Some(f) = file.to_str() else { continue };
        let Some(pid) = f.strip_prefix(&prefix).and_then(|r| r.strip_suffix(".tmp")) else { continue };
        let gone = if cfg!(target_os = "linux") {
            pid.parse::<u32>().is_ok_and(|p| !Path::new(&format!("/proc/{p}")).exists())
        } else {
            e.metadata()
                .and_then(|m| m.modified())
                .ok()
                .and_then(|t| t.elapsed().ok())
                .is_some_and(|a| a.as_secs() > 3600)
        };
        if gone {
            let _ = std::fs::remove_file(e.path());
        }
    }
}
