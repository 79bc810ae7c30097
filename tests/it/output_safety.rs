//! What a run does to files besides its own workbook: nothing. The inputs
//! read the same, byte for byte, after `run` and `check`; a run killed
//! while writing leaves the previous workbook at the target untouched, with
//! at most one leftover file that says what it is; the output may not be an
//! input. The books are Harbourview Mutual's (an invented credit union).

use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use sha2::{Digest, Sha256};

use crate::common::copy_dir;

fn ledgerate() -> Command {
    Command::new(env!("CARGO_BIN_EXE_ledgerate"))
}

fn sample(rel: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-books")
        .join(rel)
}

/// SHA-256 of every file under `root` (a file or a folder), by path.
fn hashes(root: &Path) -> BTreeMap<PathBuf, String> {
    let mut out = BTreeMap::new();
    let mut stack = vec![root.to_path_buf()];
    while let Some(p) = stack.pop() {
        if p.is_dir() {
            for e in std::fs::read_dir(&p).unwrap() {
                stack.push(e.unwrap().path());
            }
        } else {
            let digest = Sha256::digest(std::fs::read(&p).unwrap());
            let hex: String = digest.iter().map(|b| format!("{b:02x}")).collect();
            out.insert(p, hex);
        }
    }
    out
}

#[test]
fn inputs_hash_the_same_after_a_run_and_after_a_check() {
    let dir = tempfile::tempdir().unwrap();
    let xlsx = dir.path().join("harbourview-2026-11.xlsx");
    std::fs::copy(sample("harbourview-2026-11.xlsx"), &xlsx).unwrap();
    let csv = dir.path().join("harbourview-csv");
    copy_dir(&sample("harbourview-2026-11-csv"), &csv);
    // The two copies hold the same accounts; a second book with the same ids
    // would be refused, so each form gets its own run.
    let before: Vec<_> = [&xlsx, &csv].iter().map(|p| hashes(p)).collect();
    assert!(before[1].len() > 3, "the CSV folder has its files");
    for book in [&xlsx, &csv] {
        let out = dir.path().join("out.xlsx");
        let status = ledgerate()
            .arg("run")
            .arg(book)
            .args(["--cutoff", "2026-11-30", "--daily", "--out"])
            .arg(&out)
            .stdout(Stdio::null())
            .status()
            .unwrap();
        assert!(status.success(), "run on {}", book.display());
        let status = ledgerate()
            .arg("check")
            .arg(book)
            .stdout(Stdio::null())
            .status()
            .unwrap();
        assert!(status.success(), "check on {}", book.display());
    }
    let after: Vec<_> = [&xlsx, &csv].iter().map(|p| hashes(p)).collect();
    assert_eq!(before, after, "an input changed");
}

/// A CSV book of `n` savers opened on 1 November, one shared rate.
fn big_book(dir: &Path, n: usize) {
    std::fs::create_dir_all(dir).unwrap();
    let mut accounts =
        std::io::BufWriter::new(std::fs::File::create(dir.join("accounts.csv")).unwrap());
    writeln!(
        accounts,
        "account,name,currency,day_count,open_date,opening_balance,rate_ref"
    )
    .unwrap();
    for i in 0..n {
        writeln!(
            accounts,
            "HM-BIG-{i:06},Harbourview saver {i},USD,ACT/365F,2026-11-01,{}.{:02},HM-STD",
            1_000 + i * 7,
            i % 100
        )
        .unwrap();
    }
    accounts.flush().unwrap();
    std::fs::write(
        dir.join("rates.csv"),
        "rate_ref,effective,rate_percent\nHM-STD,2026-01-01,2.25\n",
    )
    .unwrap();
}

#[cfg(unix)]
#[test]
fn a_run_killed_while_writing_leaves_the_previous_workbook_intact() {
    let dir = tempfile::tempdir().unwrap();
    let out_dir = dir.path().join("out");
    std::fs::create_dir_all(&out_dir).unwrap();
    let target = out_dir.join("accruals-2026-11-30.xlsx");

    // Last month's workbook, from the sample book.
    let status = ledgerate()
        .arg("run")
        .arg(sample("harbourview-2026-11.xlsx"))
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(&target)
        .stdout(Stdio::null())
        .status()
        .unwrap();
    assert!(status.success());
    let previous = std::fs::read(&target).unwrap();

    // 100,000 accounts with their Daily sheet: 3 million rows to write.
    let book = dir.path().join("big");
    big_book(&book, 100_000);
    let mut child = ledgerate()
        .arg("run")
        .arg(&book)
        .args(["--cutoff", "2026-11-30", "--daily", "--out"])
        .arg(&target)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();

    // Kill it (SIGKILL) as soon as its temporary file appears beside the target.
    let start = Instant::now();
    let partial = loop {
        let found = std::fs::read_dir(&out_dir)
            .unwrap()
            .map(|e| e.unwrap().path())
            .find(|p| p != &target);
        if let Some(p) = found {
            break p;
        }
        if let Some(status) = child.try_wait().unwrap() {
            panic!("the run ended ({status}) before its temporary file was seen");
        }
        assert!(
            start.elapsed() < Duration::from_secs(600),
            "no temporary file in 10 minutes"
        );
        std::thread::sleep(Duration::from_millis(2));
    };
    child.kill().unwrap();
    let status = child.wait().unwrap();
    assert!(!status.success(), "the run was killed, not finished");

    assert!(
        std::fs::read(&target).unwrap() == previous,
        "the previous workbook changed"
    );
    // What is left besides it says what it is: a hidden, unfinished copy of
    // this target, never a file under the target's name.
    let left: Vec<String> = std::fs::read_dir(&out_dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n != "accruals-2026-11-30.xlsx")
        .collect();
    assert!(left.len() <= 1, "{left:?}");
    for name in &left {
        assert!(
            name.starts_with(".accruals-2026-11-30.xlsx.ledgerate-") && name.ends_with(".partial"),
            "unclear leftover {name} (the temporary file was {})",
            partial.display()
        );
    }
}

#[test]
fn the_output_may_not_be_inside_a_csv_book() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("book");
    copy_dir(&sample("harbourview-2026-11-csv"), &csv);
    let before = hashes(&csv);
    let out = ledgerate()
        .arg("run")
        .arg(&csv)
        .args(["--cutoff", "2026-11-30", "--out"])
        .arg(csv.join("accounts.csv"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("would overwrite the input"));
    assert_eq!(hashes(&csv), before);
}

/// `ledgerate run` on the sample book writing to `out`, with `shell` run
/// before it in the same shell (limits, signal dispositions).
fn run_to_in_shell(out: &Path, shell: &str) -> std::process::Output {
    Command::new("bash")
        .arg("-c")
        .arg(format!(
            "{shell}\nexec \"$0\" run \"$1\" --cutoff 2026-11-30 --fixed-time 2026-12-01T00:00:00 --out \"$2\""
        ))
        .arg(env!("CARGO_BIN_EXE_ledgerate"))
        .arg(sample("harbourview-2026-11.xlsx"))
        .arg(out)
        .output()
        .unwrap()
}

fn run_to(out: &Path) -> std::process::Output {
    run_to_in_shell(out, "")
}

fn stderr(out: &std::process::Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

#[test]
fn an_output_that_is_a_fifo_a_device_or_a_dangling_link_is_refused_and_left_as_it_was() {
    use std::os::unix::fs::FileTypeExt;
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("pipe.xlsx");
    assert!(Command::new("mkfifo")
        .arg(&fifo)
        .status()
        .unwrap()
        .success());
    let out = run_to(&fifo);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("is a FIFO (named pipe), not a regular file"),
        "{}",
        stderr(&out)
    );
    assert!(std::fs::symlink_metadata(&fifo)
        .unwrap()
        .file_type()
        .is_fifo());

    let dangling = dir.path().join("gone.xlsx");
    std::os::unix::fs::symlink(dir.path().join("nothing-here.xlsx"), &dangling).unwrap();
    let out = run_to(&dangling);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(
        stderr(&out).contains("is a link to nothing"),
        "{}",
        stderr(&out)
    );
    assert!(std::fs::symlink_metadata(&dangling)
        .unwrap()
        .file_type()
        .is_symlink());

    // A character device like /dev/null, made in the test's own folder
    // (only root may make one; elsewhere this part says it is skipped).
    let device = dir.path().join("null.xlsx");
    let made = Command::new("mknod")
        .arg(&device)
        .args(["c", "1", "3"])
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    if made {
        let out = run_to(&device);
        assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
        assert!(stderr(&out).contains("is a device"), "{}", stderr(&out));
        assert!(std::fs::symlink_metadata(&device)
            .unwrap()
            .file_type()
            .is_char_device());
    } else {
        eprintln!("mknod refused (not root): the device case is skipped");
    }
}

#[test]
fn an_output_that_links_to_a_file_replaces_the_file_and_keeps_the_link() {
    let dir = tempfile::tempdir().unwrap();
    let real = dir.path().join("real.xlsx");
    std::fs::write(&real, b"old").unwrap();
    let link = dir.path().join("latest.xlsx");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let out = run_to(&link);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(std::fs::symlink_metadata(&link)
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(
        std::fs::read(&real).unwrap().starts_with(b"PK"),
        "the linked file holds the workbook"
    );
}

#[test]
fn a_long_output_name_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let name = format!("{}.xlsx", "n".repeat(245));
    let target = dir.path().join(&name);
    let out = run_to(&target);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    assert!(target.is_file());
}

#[test]
fn a_write_that_fails_for_space_is_an_error_with_exit_2_and_the_old_output_intact() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("accruals.xlsx");
    std::fs::write(&target, b"last month's workbook").unwrap();
    // A file size limit of 10 KiB stands in for a full disk: with SIGXFSZ
    // ignored, a write past it fails with an error, as on a full disk.
    let out = run_to_in_shell(&target, "trap '' XFSZ; ulimit -f 10");
    let err = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("the spreadsheet writer stopped writing"),
        "{err}"
    );
    assert!(err.contains("has free space"), "{err}");
    assert!(
        !err.contains("panicked") && !err.contains("backtrace"),
        "{err}"
    );
    assert_eq!(std::fs::read(&target).unwrap(), b"last month's workbook");
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left.len(), 1, "only the old workbook is left: {left:?}");
}
