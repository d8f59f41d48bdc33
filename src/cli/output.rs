//! Atomic file output: every file is written to a temporary file in its folder and renamed
//! into place only when all files of a command are complete, so a failure leaves nothing
//! half-written.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::{Context, Result};

fn temporary(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".into());
    path.with_file_name(format!(".{name}.tmp-{}", std::process::id()))
}

/// Writes all `(path, contents)` pairs or none of them.
pub fn write_all_atomic(files: &[(PathBuf, Vec<u8>)]) -> Result<()> {
    let mut written: Vec<(PathBuf, PathBuf)> = Vec::new();
    let cleanup = |written: &[(PathBuf, PathBuf)]| {
        for (tmp, _) in written {
            let _ = std::fs::remove_file(tmp);
        }
    };
    for (path, bytes) in files {
        let tmp = temporary(path);
        let result = std::fs::File::create(&tmp)
            .and_then(|mut f| f.write_all(bytes).and_then(|_| f.sync_all()));
        if let Err(e) = result {
            let _ = std::fs::remove_file(&tmp);
            cleanup(&written);
            return Err(e).with_context(|| format!("cannot write {}", path.display()));
        }
        written.push((tmp, path.clone()));
    }
    for (tmp, path) in &written {
        if let Err(e) = std::fs::rename(tmp, path) {
            cleanup(&written);
            return Err(e).with_context(|| format!("cannot write {}", path.display()));
        }
    }
    Ok(())
}

/// Writes one file atomically.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<()> {
    write_all_atomic(&[(path.to_path_buf(), bytes.to_vec())])
}
