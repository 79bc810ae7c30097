//! Inputs that are not what they claim to be: a FIFO, a device or a link to
//! nothing given as a book or a calendar, and a calendar file far too big.
//! Each is a clear error naming the path, with exit status 2, and nothing
//! waits for ever (each command runs under a deadline, so a regression fails
//! rather than hangs).

use std::path::Path;
use std::process::Command as Process;
use std::time::Duration;

use predicates::prelude::*;

use crate::common::ledgerate;

const DEADLINE: Duration = Duration::from_secs(60);

fn mkfifo(path: &Path) {
    assert!(Process::new("mkfifo").arg(path).status().unwrap().success());
}

#[test]
fn a_fifo_or_a_dangling_link_given_as_a_book_is_refused_without_waiting() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("book.xlsx");
    mkfifo(&fifo);
    let dangling = dir.path().join("gone.xlsx");
    std::os::unix::fs::symlink(dir.path().join("unmounted/book.xlsx"), &dangling).unwrap();
    for (book, kind) in [
        (&fifo, "is a FIFO (named pipe)"),
        (&dangling, "is a link to nothing"),
    ] {
        for command in ["check", "run"] {
            ledgerate()
                .arg(command)
                .arg(book)
                .args(["--cutoff", "2026-11-30"])
                .current_dir(dir.path())
                .timeout(DEADLINE)
                .assert()
                .code(2)
                .stderr(predicate::str::contains(kind))
                .stderr(predicate::str::contains("give the path of a workbook file"));
        }
    }
}

#[test]
fn a_calendar_that_is_a_fifo_a_device_or_too_big_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("holidays.txt");
    mkfifo(&fifo);
    let big = dir.path().join("big.txt");
    std::fs::write(&big, "2026-12-25\n".repeat(100_000)).unwrap();
    let cases = [
        (fifo.as_path(), "is a FIFO (named pipe), not a file"),
        (Path::new("/dev/zero"), "is a device, not a file"),
        (big.as_path(), "is larger than 1024 KiB"),
    ];
    for (calendar, says) in cases {
        ledgerate()
            .args([
                "daycount",
                "BUS/252",
                "2026-01-01",
                "2026-12-31",
                "--calendar",
            ])
            .arg(calendar)
            .timeout(DEADLINE)
            .assert()
            .code(2)
            .stderr(predicate::str::contains(says));
    }
}
