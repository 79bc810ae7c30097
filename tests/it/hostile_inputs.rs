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

/// The good CSV book copied into `dir`.
fn csv_book(dir: &Path) -> std::path::PathBuf {
    let book = dir.join("book");
    crate::common::copy_dir(&crate::common::fixture("harbourview_good_csv"), &book);
    book
}

#[test]
fn sheet_files_that_are_a_fifo_a_device_or_a_dangling_link_are_errors_naming_them() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path());
    for name in ["holidays.csv", "statements.csv", "movements.csv"] {
        std::fs::remove_file(book.join(name)).unwrap();
    }
    mkfifo(&book.join("holidays.csv"));
    std::os::unix::fs::symlink("/dev/null", book.join("statements.csv")).unwrap();
    std::os::unix::fs::symlink(
        dir.path().join("unmounted/movements.csv"),
        book.join("movements.csv"),
    )
    .unwrap();
    let says = [
        "holidays.csv, a FIFO (named pipe)",
        "statements.csv, a device",
        "movements.csv, a link to nothing",
    ];
    let mut check = ledgerate()
        .arg("check")
        .arg(&book)
        .timeout(DEADLINE)
        .assert()
        .code(1);
    for s in says {
        check = check.stdout(predicate::str::contains(s));
    }
    check.stdout(predicate::str::contains("no such file").not());
    // run reads, then fingerprints the book for the Run sheet: neither may
    // open the FIFO.
    ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(dir.path().join("out.xlsx"))
        .timeout(DEADLINE)
        .assert()
        .code(1);
}

/// The SHA-256 of the one input of a run's workbook, from its Run sheet.
fn input_sha(workbook: &Path) -> String {
    let cells = crate::common::sheet(workbook, "Run");
    cells
        .iter()
        .flatten()
        .map(ToString::to_string)
        .find(|s| s.len() == 64 && s.chars().all(|c| c.is_ascii_hexdigit()))
        .unwrap()
}

#[test]
fn only_the_sheet_files_of_a_csv_book_are_hashed_for_the_run_sheet() {
    let dir = tempfile::tempdir().unwrap();
    let book = csv_book(dir.path());
    let run = |out: &str| {
        let out = dir.path().join(out);
        ledgerate()
            .arg("run")
            .arg(&book)
            .args([
                "--cutoff",
                "2026-11-30",
                "--fixed-time",
                "2026-12-01T09:00:00",
                "--out",
            ])
            .arg(&out)
            .timeout(DEADLINE)
            .assert()
            .code(0);
        input_sha(&out)
    };
    let before = run("before.xlsx");
    // An unrelated export of 20 MB, a FIFO (which would block if opened)
    // and a CSV file that is no sheet: none of them is part of the book.
    std::fs::write(book.join("export.bin"), vec![7u8; 20 << 20]).unwrap();
    mkfifo(&book.join("pipe.txt"));
    std::fs::write(book.join("scratch.csv"), "a,b\n1,2\n").unwrap();
    assert_eq!(run("after.xlsx"), before);
    // A sheet file is: changing one changes the hash.
    let mut holidays = std::fs::read_to_string(book.join("holidays.csv")).unwrap();
    holidays.push_str("\nHM-HOLIDAYS,2027-01-04,Harbour Founders' Day\n");
    std::fs::write(book.join("holidays.csv"), holidays).unwrap();
    assert_ne!(run("changed.xlsx"), before);
}

#[test]
fn a_shard_that_is_a_fifo_a_dangling_link_or_a_folder_is_refused_without_waiting() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("shard-1.xlsx");
    mkfifo(&fifo);
    let dangling = dir.path().join("shard-2.xlsx");
    std::os::unix::fs::symlink(dir.path().join("lost/shard-2.xlsx"), &dangling).unwrap();
    let folder = dir.path().join("shard-3.xlsx");
    std::fs::create_dir(&folder).unwrap();
    for (shard, says) in [
        (&fifo, "is a FIFO (named pipe)"),
        (&dangling, "is a link to nothing"),
        (&folder, "is a folder"),
    ] {
        ledgerate()
            .arg("merge")
            .arg(shard)
            .arg("--out")
            .arg(dir.path().join("merged.xlsx"))
            .timeout(DEADLINE)
            .assert()
            .code(2)
            .stderr(predicate::str::contains(says));
    }
    assert!(!dir.path().join("merged.xlsx").exists());
}
