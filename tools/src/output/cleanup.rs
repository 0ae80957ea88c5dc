//! The temporaries alive in this process, removed when a signal ends it.
//!
//! A handler thread (signal-hook's iterator, so the removal runs as ordinary code, not in
//! signal context) waits for SIGINT, SIGTERM or SIGHUP, removes every registered temporary
//! and then ends the process as the signal would have (so a shell sees 130/143 and a script
//! looping over runs stops, as it does for any program killed by Ctrl-C).
//!
//! The registry's lock is what makes this exact: a temporary is created and registered under
//! it, and the renames of a run happen under it, so the handler never sees a temporary that
//! exists but is not listed, nor interrupts a run halfway through its renames.

use std::path::{Path, PathBuf};
use std::sync::{Mutex, MutexGuard, Once};

use signal_hook::consts::{SIGHUP, SIGINT, SIGTERM};

static LIVE: Mutex<Vec<PathBuf>> = Mutex::new(Vec::new());
static HANDLER: Once = Once::new();

/// The registry of live temporaries, locked; the signal handler is installed on first use.
pub(crate) fn registry() -> MutexGuard<'static, Vec<PathBuf>> {
    HANDLER.call_once(install_handler);
    // A panic while the lock was held leaves the list as it was: still right to use.
    LIVE.lock().unwrap_or_else(|p| p.into_inner())
}

/// Takes `path` off the registry (it was renamed or removed).
pub(crate) fn forget(live: &mut Vec<PathBuf>, path: &Path) {
    live.retain(|p| p != path);
}

fn install_handler() {
    // If the handler cannot be installed (no file descriptors left for its pipe), outputs are
    // still written safely; only an interrupted run may leave a hidden temporary behind.
    let Ok(mut signals) = signal_hook::iterator::Signals::new([SIGINT, SIGTERM, SIGHUP]) else {
        return;
    };
    let spawned = std::thread::Builder::new()
        .name("output-cleanup".into())
        .spawn(move || {
            if let Some(signal) = signals.forever().next() {
                let live = LIVE.lock().unwrap_or_else(|p| p.into_inner());
                for path in live.iter() {
                    let _ = std::fs::remove_file(path);
                }
                // The lock stays held: nothing may be created or renamed from here on.
                let _ = signal_hook::low_level::emulate_default_handler(signal);
                std::process::exit(128 + signal);
            }
        });
    // A thread that could not start drops `signals`, which restores the default actions.
    drop(spawned);
}
