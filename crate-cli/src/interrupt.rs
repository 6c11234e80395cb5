//! Ctrl-C (and termination signals): the temporary files a run is writing are removed before
//! the process ends, so an interrupted run leaves every existing file as it was and nothing of
//! its own behind. Exits with 130, the shells' code for an interrupted command.

use std::path::PathBuf;
use std::sync::Mutex;

/// Temporary files written but not yet renamed into place.
static PENDING: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());

/// Installs the handler; a failure to install it is reported once and the run goes on (the
/// files would then be safe but a temporary file could stay behind after Ctrl-C).
pub fn install() {
    if let Err(error) = ctrlc::set_handler(on_signal) {
        eprintln!("ramulus: note: cannot watch for Ctrl-C ({error})");
    }
}

fn on_signal() {
    // Holding the lock for good: no file can be added, renamed away or forgotten meanwhile.
    let pending = PENDING
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    for path in pending.iter() {
        let _ = std::fs::remove_file(path);
    }
    eprintln!("ramulus: interrupted; outputs not yet in place were discarded");
    std::process::exit(130);
}

/// Runs `work` (creating a temporary file) while no signal can clean up, then remembers the
/// path it returns, so a signal never finds a file it does not know of.
pub fn track<T>(work: impl FnOnce() -> std::io::Result<(T, PathBuf)>) -> std::io::Result<T> {
    let mut pending = PENDING
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    let (value, path) = work()?;
    pending.push(path);
    Ok(value)
}

/// Runs `work` (renaming a temporary file into place) while no signal can clean up, then
/// forgets the path.
pub fn settle<T>(path: &std::path::Path, work: impl FnOnce() -> T) -> T {
    let mut pending = PENDING
        .lock()
        .unwrap_or_else(|poisoned| poisoned.into_inner());
    let value = work();
    pending.retain(|pending_path| pending_path != path);
    value
}
