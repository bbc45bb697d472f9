//! Ctrl-C (SIGINT) and SIGTERM during a sweep: the first signal stops new
//! points from starting, lets the running ones finish and be written, and
//! the command exits 3 (stopped early; `--resume` continues). A second signal
//! exits at once with 3, but only between two checkpoint writes (it waits for
//! a write in progress, [`gatehold::io::hdf5::WRITING`]), so no temporary
//! file is ever left behind and the file on disk is the last checkpoint.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::Arc;

use super::exit::Exit;

/// Installs the handler (once per process) and returns the flag it sets.
pub fn install() -> Arc<AtomicBool> {
    let flag = Arc::new(AtomicBool::new(false));
    let f = flag.clone();
    let installed = ctrlc::set_handler(move || {
        if f.swap(true, Ordering::SeqCst) {
            let _writing = gatehold::io::hdf5::WRITING
                .lock()
                .unwrap_or_else(|e| e.into_inner());
            eprintln!("\nstopped at once; the file holds the points of the last checkpoint (run again with --resume)");
            std::process::exit(i32::from(Exit::Stopped.code()));
        }
        eprintln!(
            "\ninterrupted: no new point starts; the running points finish and are written (Ctrl-C again to stop at once)"
        );
    });
    if let Err(e) = installed {
        eprintln!("warning: cannot catch Ctrl-C ({e}); an interrupt stops the sweep at once, losing the points not yet checkpointed");
    }
    flag
}
