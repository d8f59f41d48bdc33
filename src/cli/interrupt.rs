//! Interrupts (SIGINT, SIGTERM; Ctrl-C on Windows): the temporary files of the outputs in
//! flight are removed and the program exits with code 130.
//!
//! Every temporary file is registered here while it exists. The handler takes the same lock as
//! the rename phase of [`super::output`], so an interrupt either comes before the outputs are
//! moved into place (and removes the temporary files) or after (and finds none).

use std::path::{Path, PathBuf};
use std::sync::{Mutex, MutexGuard};

/// Exit code after an interrupt (128 + SIGINT, the shell convention; also used for SIGTERM).
pub const EXIT_INTERRUPTED: u8 = 130;

static IN_FLIGHT: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// The registry, even if a thread panicked while holding it.
pub fn lock() -> MutexGuard<'static, Vec<PathBuf>> {
    IN_FLIGHT.lock().unwrap_or_else(|e| e.into_inner())
}

/// Installs the handler (once, at start).
pub fn install() {
    // If a handler cannot be installed (e.g. one exists already), interrupts keep their
    // default behaviour; leftovers are then cleaned by the next run.
    let _ = ctrlc::set_handler(|| {
        let files = lock();
        for f in files.iter() {
            let _ = std::fs::remove_file(f);
        }
        eprintln!("interrupted: temporary output files removed");
        std::process::exit(i32::from(EXIT_INTERRUPTED));
    });
}

/// Registers a temporary file (before it is created).
pub fn register(files: &mut Vec<PathBuf>, path: &Path) {
    files.push(path.to_path_buf());
}

/// Forgets a temporary file (after it was renamed or removed).
pub fn forget(files: &mut Vec<PathBuf>, path: &Path) {
    files.retain(|p| p != path);
}
