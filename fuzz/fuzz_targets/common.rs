//! What both fuzz targets share: a scratch folder in memory when the machine
//! has one, and the rule for which panics count as crashes.
//!
//! The reader runs the workbook parser under `catch_unwind` and turns its
//! panics into a problem about the file. libFuzzer's hook aborts on any
//! panic, even a caught one; this hook lets a panic raised inside a
//! dependency unwind to the reader's guard, and aborts on every other one:
//! a panic in ledgerate's own code is always a crash.

use std::path::PathBuf;
use std::sync::Once;

/// A folder of this process for the files a target writes.
pub fn scratch(name: &str) -> PathBuf {
    let base = if std::path::Path::new("/dev/shm").is_dir() {
        PathBuf::from("/dev/shm")
    } else {
        std::env::temp_dir()
    };
    let dir = base.join(format!("ledgerate-fuzz-{name}-{}", std::process::id()));
    let _ = std::fs::create_dir_all(&dir);
    dir
}

/// Installs the panic rule once.
pub fn install_panic_rule() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        let default = std::panic::take_hook();
        std::panic::set_hook(Box::new(move |info| {
            let in_dependency = info
                .location()
                .is_some_and(|l| l.file().contains("/.cargo/registry/"));
            if in_dependency {
                // Unwinds to the reader's guard, which reports a damaged file.
                return;
            }
            default(info);
            std::process::abort();
        }));
    });
}

/// The reader's contract on any input ([`ledgerate::book::contract_violations`]).
pub fn check_contract(book: &ledgerate::book::Book) {
    let broken = ledgerate::book::contract_violations(book);
    assert!(broken.is_empty(), "{}", broken.join("\n"));
}
