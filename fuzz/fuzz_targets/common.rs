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

/// The row number of an A1 cell (`F12`) or row (`12:12`); `None` for a sheet.
fn row_of(cell: &str) -> Option<&str> {
    let row = cell.split(':').next()?.trim_start_matches(|c: char| c.is_ascii_uppercase());
    (!row.is_empty()).then_some(row)
}

/// The reader's contract on any input (model.rs, docs/reading-books.md):
/// every problem names the book it was given; an account that an error
/// names is not in `accounts`, except for the error on a second row with
/// its id (the first row stands); movements and statement rows belong to
/// accounts that are kept.
pub fn check_contract(book: &ledgerate::book::Book, path: &std::path::Path) {
    use ledgerate::book::Severity;
    let name = path.display().to_string();
    for p in &book.problems {
        assert_eq!(p.position.book, name, "a problem names another book: {p}");
    }
    let kept: std::collections::BTreeMap<&str, &ledgerate::book::Position> = book
        .accounts
        .iter()
        .map(|a| (a.terms.id.as_str(), &a.position))
        .collect();
    for p in book.problems.iter().filter(|p| p.severity == Severity::Error) {
        let Some(at) = p.account.as_deref().and_then(|id| kept.get(id)) else {
            continue;
        };
        let other_row_of_accounts =
            p.position.sheet == at.sheet && row_of(&p.position.cell) != row_of(&at.cell);
        assert!(other_row_of_accounts, "account kept despite: {p}");
    }
    for id in book.movements.keys() {
        assert!(kept.contains_key(id.as_str()), "movements of an account left out: {id}");
    }
    for s in &book.statements {
        assert!(kept.contains_key(s.account.as_str()), "statement of an account left out: {}", s.account);
    }
}
