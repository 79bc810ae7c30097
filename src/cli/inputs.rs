//! Input files of a run: existence, fingerprints for the audit trail, the
//! rule that the output may not overwrite an input, and the books cut to
//! what the run knows once its settings are resolved ([`known_to_run`]).

use std::io::Read;
use std::path::{Path, PathBuf};

use anyhow::{bail, Context, Result};
use sha2::{Digest, Sha256};

use super::settings::Settings;
use crate::book::{booked, known, trial_balance, Book};
use crate::report::model::InputFile;
use crate::schema::SheetKind;

fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

fn hash_file(path: &Path) -> Result<(u64, String)> {
    let mut f =
        std::fs::File::open(path).with_context(|| format!("cannot open {}", path.display()))?;
    let mut h = Sha256::new();
    let mut buf = vec![0u8; 1 << 16];
    let mut size = 0u64;
    loop {
        let n = f
            .read(&mut buf)
            .with_context(|| format!("cannot read {}", path.display()))?;
        if n == 0 {
            break;
        }
        size += n as u64;
        h.update(buf.get(..n).unwrap_or_default());
    }
    Ok((size, hex(&h.finalize())))
}

/// The size and SHA-256 of a book: a file's own, or for a CSV folder the
/// hash of its sheet files' names and hashes in name order. Only the files
/// the reader reads are hashed (accounts.csv, rates.csv... as the schema
/// names the sheets): other files in the folder are not part of the book.
/// A sheet file that is not a regular file (a FIFO, a device, a link to
/// nothing) is never opened: the reader has already reported it, and it
/// enters the hash as its name and what it is.
pub fn fingerprint(path: &Path) -> Result<InputFile> {
    let (size, sha256) = if path.is_dir() {
        let mut h = Sha256::new();
        let mut total = 0;
        for p in sheet_files(path)? {
            let name = p
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default();
            if let Some(kind) = crate::files::special_kind(&p) {
                h.update(format!("{name}\t{kind}\n").as_bytes());
                continue;
            }
            if !p.is_file() {
                h.update(format!("{name}\ta folder\n").as_bytes());
                continue;
            }
            let (size, sha) = hash_file(&p)?;
            total += size;
            h.update(format!("{name}\t{sha}\n").as_bytes());
        }
        (total, hex(&h.finalize()))
    } else {
        hash_file(path)?
    };
    Ok(InputFile {
        path: path.display().to_string(),
        size,
        sha256,
    })
}

/// The entries of a CSV book folder named as sheet files (a sheet's name
/// with the extension .csv, in any case), in name order, whatever kind of
/// file each is.
fn sheet_files(dir: &Path) -> Result<Vec<PathBuf>> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .with_context(|| format!("cannot list the folder {}", dir.display()))?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x.eq_ignore_ascii_case("csv")))
        .filter(|p| {
            p.file_stem()
                .and_then(|s| SheetKind::from_name(&s.to_string_lossy()))
                .is_some()
        })
        .collect();
    files.sort();
    Ok(files)
}

/// The books as a run with `settings` reads them, the one place run, check
/// and explain apply what the settings say of the books' rows: with an
/// as-at date, every row booked after it left out, one note per sheet
/// counting them (behaviour.md, Knowledge date); and a warning for each
/// Booked or Trial balance row that no run of the window uses. The notes
/// and warnings join each book's problems.
pub fn known_to_run(books: &mut [Book], settings: &Settings) {
    for book in books {
        let mut found = match settings.as_at {
            Some(as_at) => known::keep_known(book, as_at),
            None => Vec::new(),
        };
        found.extend(booked::dates_not_used(
            book,
            settings.window_start,
            settings.cutoff,
        ));
        found.extend(trial_balance::dates_not_used(
            book,
            settings.window_start,
            settings.cutoff,
        ));
        book.problems.append(&mut found);
    }
}

/// Checks that every book exists and is a file or a folder: reading a FIFO
/// or a device would wait for ever or never end.
pub fn check_books_exist(books: &[PathBuf]) -> Result<()> {
    for b in books {
        if let Some(kind) = crate::files::special_kind(b) {
            bail!(
                "the book {} is {kind}: give the path of a workbook file (.xlsx, .xlsm, .xlsb, .xls, .ods) or of a folder of CSV files",
                b.display()
            );
        }
        if !b.exists() {
            bail!(
                "the book {} does not exist: give the path of a workbook (.xlsx, .xlsm, .xlsb, .xls, .ods) or of a folder of CSV files",
                b.display()
            );
        }
    }
    Ok(())
}

/// Refuses an output path that is one of the inputs (or inside a CSV-folder input).
pub fn check_output_is_not_an_input(out: &Path, books: &[PathBuf]) -> Result<()> {
    let target = canonical_target(out);
    for b in books {
        let Ok(book) = b.canonicalize() else { continue };
        if target == book || (book.is_dir() && target.starts_with(&book)) {
            bail!(
                "the output {} would overwrite the input {}: choose another --out path",
                out.display(),
                b.display()
            );
        }
    }
    Ok(())
}

/// Refuses a second output (`what` names it, "the --journal-csv file")
/// that is an input book, lies inside a CSV-folder input, or is one of the
/// run's other outputs (`others`: what each is, and its path); `fix` says
/// what to do instead.
pub fn check_other_output(
    out: &Path,
    what: &str,
    fix: &str,
    others: &[(&str, &Path)],
    books: &[PathBuf],
) -> Result<()> {
    let target = canonical_target(out);
    for b in books {
        let Ok(book) = b.canonicalize() else { continue };
        if target == book || (book.is_dir() && target.starts_with(&book)) {
            bail!(
                "{what} {} would overwrite the input {}: {fix}",
                out.display(),
                b.display()
            );
        }
    }
    for (other, path) in others {
        if canonical_target(path) == target {
            bail!("{what} {} is {other}: {fix}", out.display());
        }
    }
    Ok(())
}

/// The absolute path the output will have, even before it exists.
fn canonical_target(out: &Path) -> PathBuf {
    if let Ok(c) = out.canonicalize() {
        return c;
    }
    let parent = out
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    match (parent.canonicalize(), out.file_name()) {
        (Ok(p), Some(name)) => p.join(name),
        _ => out.to_path_buf(),
    }
}
