//! Panics inside libraries turned into errors the program reports itself.
//!
//! A dependency may panic on a damaged file or a failed write (the workbook
//! writer does when the disk is full). [`quietly`] runs such a call, catches
//! the panic and returns its message, and while it runs the panic hook that
//! [`install_hook`] sets prints nothing, so the user sees the program's own
//! message rather than a library's panic text and backtrace.
//!
//! The quiet is process-wide while any [`quietly`] call runs, so a panic on
//! another thread in that time prints nothing either; the reader and the
//! writer, the two callers, run while nothing else of the program does.
//!
//! This module never decides what a caught panic means: its caller turns the
//! message into a problem or an error naming the file.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::sync::atomic::{AtomicUsize, Ordering};

/// Calls of [`quietly`] in progress, on any thread.
static QUIET: AtomicUsize = AtomicUsize::new(0);

/// Runs `f`; a panic inside it comes back as `Err` with the panic's message,
/// and prints nothing while it unwinds.
///
/// ```
/// let ok = ledgerate::panics::quietly(|| 2 + 2);
/// assert_eq!(ok, Ok(4));
/// let caught: Result<(), String> = ledgerate::panics::quietly(|| {
///     let v: Vec<u8> = Vec::new();
///     let _ = v.get(3).copied().ok_or("no byte 3").map_err(|e| e.to_string()).unwrap();
/// });
/// assert!(caught.unwrap_err().contains("no byte 3"));
/// ```
pub fn quietly<T>(f: impl FnOnce() -> T) -> Result<T, String> {
    struct Quiet;
    impl Drop for Quiet {
        fn drop(&mut self) {
            QUIET.fetch_sub(1, Ordering::SeqCst);
        }
    }
    QUIET.fetch_add(1, Ordering::SeqCst);
    let _quiet = Quiet;
    catch_unwind(AssertUnwindSafe(f)).map_err(|payload| message(payload.as_ref()))
}

/// The text a panic was raised with.
fn message(payload: &(dyn std::any::Any + Send)) -> String {
    if let Some(s) = payload.downcast_ref::<&str>() {
        (*s).to_string()
    } else if let Some(s) = payload.downcast_ref::<String>() {
        s.clone()
    } else {
        "a panic without a message".to_string()
    }
}

/// Sets the process's panic hook: silent inside [`quietly`]; elsewhere one
/// line naming the program's defect and where it happened, instead of the
/// default text and backtrace hint.
pub fn install_hook() {
    std::panic::set_hook(Box::new(|info| {
        if QUIET.load(Ordering::SeqCst) > 0 {
            return;
        }
        let place = info
            .location()
            .map(|l| format!(" at {}:{}", l.file(), l.line()))
            .unwrap_or_default();
        eprintln!(
            "ledgerate: internal error{place}: {}; please report it with the command line that caused it",
            message(info.payload())
        );
    }));
}
