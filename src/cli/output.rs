//! Output files: atomic, one run per folder, a manifest, no leftovers.
//!
//! - Every file is streamed (through a buffer, row by row: no document in memory) into a
//!   hidden temporary file `.NAME.tmp-PID` in its folder, synced, and renamed into place only
//!   when all files of the command are complete, so a failure leaves nothing half-written. Temporary files are registered with [`super::interrupt`], which removes them
//!   on SIGINT/SIGTERM; those of a killed run (`kill -9`, power loss) are removed by the next
//!   run that writes into the folder (the process PID is gone).
//! - A command that writes a folder also writes `manifest-COMMAND.json`, the list of the files
//!   of the run. The next run of the same command replaces that set: files of the old set that
//!   the new run does not write (e.g. `holes.*` of a molecule, when the new target is an atom)
//!   are removed, so a folder never mixes two runs. A run that rewrites a file of another
//!   command's set removes that whole set. Folders written before manifests existed: the
//!   command's own file names that the new run does not write are removed.

use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

use anyhow::{Context, Result};
use serde_json::{Value, json};

use super::interrupt;

fn temporary(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".into());
    path.with_file_name(format!(".{name}.tmp-{}", std::process::id()))
}

/// The PID of a temporary file name `.NAME.tmp-PID`, if it is one.
fn temporary_pid(name: &str) -> Option<u32> {
    if !name.starts_with('.') {
        return None;
    }
    let (_, pid) = name.rsplit_once(".tmp-")?;
    pid.parse().ok()
}

/// Whether a process with this PID may still be running. Where `/proc` exists (Linux) it is
/// asked; elsewhere a temporary file counts as abandoned once it is an hour old.
fn may_be_running(pid: u32, path: &Path) -> bool {
    if pid == std::process::id() {
        return true;
    }
    let proc = Path::new("/proc");
    if proc.join("self").exists() {
        return proc.join(pid.to_string()).exists();
    }
    std::fs::metadata(path)
        .and_then(|m| m.modified())
        .ok()
        .and_then(|t| t.elapsed().ok())
        .is_none_or(|age| age.as_secs() < 3600)
}

/// Removes the temporary files of runs that were killed (their PID is gone) from `dir`;
/// returns their names.
pub fn remove_leftovers(dir: &Path) -> Vec<String> {
    let mut removed = Vec::new();
    let Ok(entries) = std::fs::read_dir(dir) else {
        return removed;
    };
    let mut names: Vec<(String, PathBuf)> = entries
        .filter_map(|e| e.ok())
        .map(|e| (e.file_name().to_string_lossy().into_owned(), e.path()))
        .collect();
    names.sort();
    for (name, path) in names {
        if let Some(pid) = temporary_pid(&name)
            && !may_be_running(pid, &path)
            && std::fs::remove_file(&path).is_ok()
        {
            removed.push(name);
        }
    }
    removed
}

/// Writes the contents of one output file into a writer (streamed: no document in memory).
pub type Producer<'a> = Box<dyn FnOnce(&mut dyn Write) -> std::io::Result<()> + 'a>;

/// A writer that counts the bytes written through it.
struct Counting<W> {
    inner: W,
    bytes: u64,
}

impl<W: Write> Write for Counting<W> {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        let n = self.inner.write(buf)?;
        self.bytes += n as u64;
        Ok(n)
    }

    fn flush(&mut self) -> std::io::Result<()> {
        self.inner.flush()
    }
}

/// Size of the write buffer of an output file.
const BUFFER_BYTES: usize = 1 << 18;

/// Streams `produce` into the temporary file `tmp` through a buffer, then syncs it to disk;
/// returns the number of bytes. On error the temporary file is removed.
fn write_temporary(tmp: &Path, produce: Producer<'_>) -> std::io::Result<u64> {
    interrupt::register(&mut interrupt::lock(), tmp);
    let result = std::fs::File::create(tmp).and_then(|f| {
        let mut w = Counting {
            inner: BufWriter::with_capacity(BUFFER_BYTES, f),
            bytes: 0,
        };
        produce(&mut w)?;
        let bytes = w.bytes;
        let f = w.inner.into_inner().map_err(|e| e.into_error())?;
        f.sync_all()?;
        Ok(bytes)
    });
    if result.is_err() {
        let _ = std::fs::remove_file(tmp);
        interrupt::forget(&mut interrupt::lock(), tmp);
    }
    result
}

/// A last file written from the sizes of the others (the manifest).
pub type Listing<'a> = (PathBuf, Box<dyn FnOnce(&[u64]) -> Result<String> + 'a>);

/// Writes all `(path, producer)` files, and then `listing` from their sizes, or none of them:
/// each is streamed into a temporary file in its folder, and all are renamed into place once
/// every one is complete. Returns the size of each file.
pub fn write_all_atomic(
    files: Vec<(PathBuf, Producer<'_>)>,
    listing: Option<Listing<'_>>,
) -> Result<Vec<u64>> {
    let mut written: Vec<(PathBuf, PathBuf)> = Vec::new();
    let mut sizes = Vec::with_capacity(files.len());
    let cleanup = |written: &[(PathBuf, PathBuf)]| {
        let mut registry = interrupt::lock();
        for (tmp, _) in written {
            let _ = std::fs::remove_file(tmp);
            interrupt::forget(&mut registry, tmp);
        }
    };
    for (path, produce) in files {
        let tmp = temporary(&path);
        match write_temporary(&tmp, produce) {
            Ok(n) => sizes.push(n),
            Err(e) => {
                cleanup(&written);
                return Err(e).with_context(|| format!("cannot write {}", path.display()));
            }
        }
        written.push((tmp, path));
    }
    if let Some((path, list)) = listing {
        let tmp = temporary(&path);
        let result = list(&sizes).and_then(|text| {
            let produce: Producer<'_> = Box::new(move |w| w.write_all(text.as_bytes()));
            write_temporary(&tmp, produce)
                .with_context(|| format!("cannot write {}", path.display()))
        });
        if let Err(e) = result {
            cleanup(&written);
            return Err(e);
        }
        written.push((tmp, path));
    }
    // The rename phase holds the interrupt lock: an interrupt waits for it to finish.
    let mut registry = interrupt::lock();
    for (tmp, path) in &written {
        if let Err(e) = std::fs::rename(tmp, path) {
            drop(registry);
            cleanup(&written);
            return Err(e).with_context(|| format!("cannot write {}", path.display()));
        }
        interrupt::forget(&mut registry, tmp);
    }
    Ok(sizes)
}

/// Writes one file atomically (its folder's leftovers of killed runs are removed first).
pub fn write_atomic(path: &Path, produce: Producer<'_>) -> Result<()> {
    if let Some(dir) = path.parent() {
        remove_leftovers(if dir.as_os_str().is_empty() {
            Path::new(".")
        } else {
            dir
        });
    }
    write_all_atomic(vec![(path.to_path_buf(), produce)], None).map(|_| ())
}

/// Streams `produce` to standard output through a buffer.
pub fn write_stdout(produce: Producer<'_>) -> Result<()> {
    let stdout = std::io::stdout();
    let mut w = BufWriter::with_capacity(BUFFER_BYTES, stdout.lock());
    produce(&mut w).context("cannot write to standard output")?;
    w.flush().context("cannot write to standard output")
}

fn manifest_name(command: &str) -> String {
    format!("manifest-{command}.json")
}

/// The file names listed by a manifest (None if it is missing or unreadable).
fn manifest_files(path: &Path) -> Option<(String, Vec<String>)> {
    let text = std::fs::read_to_string(path).ok()?;
    let v: Value = serde_json::from_str(&text).ok()?;
    let command = v["command"].as_str()?.to_string();
    let files = v["files"]
        .as_array()?
        .iter()
        .filter_map(|f| f["name"].as_str().map(str::to_string))
        .filter(|n| !n.contains('/') && !n.contains('\\') && n != "." && n != "..")
        .collect();
    Some((command, files))
}

/// What [`write_set`] did.
pub struct Written {
    /// The files written (the manifest last).
    pub files: Vec<PathBuf>,
    /// Files of earlier runs removed (stale outputs and temporary files of killed runs).
    pub removed: Vec<String>,
}

/// Writes the output set of `command` into `dir` (created if missing): the files `(name,
/// contents)`, then `manifest-COMMAND.json`; then removes the files of the previous run
/// (module documentation). `own_names` are every file name the command can write (used for
/// folders without a manifest).
pub fn write_set(
    dir: &Path,
    command: &str,
    files: Vec<(String, Producer<'_>)>,
    own_names: &[&str],
) -> Result<Written> {
    std::fs::create_dir_all(dir)
        .with_context(|| format!("cannot create output folder {}", dir.display()))?;
    let mut removed = remove_leftovers(dir);
    let names: Vec<&str> = files.iter().map(|(n, _)| n.as_str()).collect();
    // The previous sets that this run replaces: this command's, and any other command's that
    // shares a file with it.
    let mut stale: Vec<String> = Vec::new();
    let mut old_manifests: Vec<String> = Vec::new();
    let mut own_manifest_found = false;
    let mut entries: Vec<String> = std::fs::read_dir(dir)
        .map(|d| {
            d.filter_map(|e| e.ok())
                .map(|e| e.file_name().to_string_lossy().into_owned())
                .filter(|n| n.starts_with("manifest-") && n.ends_with(".json"))
                .collect()
        })
        .unwrap_or_default();
    entries.sort();
    for m in entries {
        let Some((other, listed)) = manifest_files(&dir.join(&m)) else {
            continue;
        };
        let same = other == command;
        own_manifest_found |= same;
        if same || listed.iter().any(|f| names.contains(&f.as_str())) {
            stale.extend(listed.into_iter().filter(|f| !names.contains(&f.as_str())));
            if m != manifest_name(command) {
                old_manifests.push(m);
            }
        }
    }
    if !own_manifest_found {
        stale.extend(
            own_names
                .iter()
                .filter(|n| !names.contains(n))
                .map(|n| n.to_string()),
        );
    }
    let paths: Vec<PathBuf> = files.iter().map(|(n, _)| dir.join(n)).collect();
    let file_names: Vec<String> = files.iter().map(|(n, _)| n.clone()).collect();
    let manifest_path = dir.join(manifest_name(command));
    let list = |sizes: &[u64]| -> Result<String> {
        let manifest = json!({
            "holecast_version": env!("CARGO_PKG_VERSION"),
            "command": command,
            "files": file_names
                .iter()
                .zip(sizes)
                .map(|(n, b)| json!({"name": n, "bytes": b}))
                .collect::<Vec<_>>(),
        });
        let mut text = serde_json::to_string_pretty(&manifest)?;
        text.push('\n');
        Ok(text)
    };
    let listing: Listing<'_> = (manifest_path.clone(), Box::new(list));
    write_all_atomic(
        files
            .into_iter()
            .zip(&paths)
            .map(|((_, produce), path)| (path.clone(), produce))
            .collect(),
        Some(listing),
    )?;
    let mut all = paths;
    all.push(manifest_path);
    stale.sort();
    stale.dedup();
    for name in stale.into_iter().chain(old_manifests) {
        let path = dir.join(&name);
        if path.is_file() && std::fs::remove_file(&path).is_ok() {
            removed.push(name);
        }
    }
    Ok(Written {
        files: all,
        removed,
    })
}

/// Files built in memory (figures, small documents) as producers for [`write_set`].
pub fn in_memory(files: Vec<(String, Vec<u8>)>) -> Vec<(String, Producer<'static>)> {
    files
        .into_iter()
        .map(|(name, bytes)| (name, bytes_producer(bytes)))
        .collect()
}

/// Bytes built in memory as a producer for [`write_atomic`].
pub fn bytes_producer(bytes: Vec<u8>) -> Producer<'static> {
    Box::new(move |w: &mut dyn Write| w.write_all(&bytes))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn temporary_names_carry_the_pid() {
        assert_eq!(temporary_pid(".spectrum.json.tmp-4242"), Some(4242));
        assert_eq!(temporary_pid("spectrum.json"), None);
        assert_eq!(temporary_pid(".x.tmp-abc"), None);
    }
}
