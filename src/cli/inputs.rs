//! Input files of a run: existence, fingerprints for the audit trail, and the
//! rule that the output may not overwrite an input.

use std::io::Read;
use std::path::{Path, PathBuf};

use anyhow::{bail, Context, Result};
use sha2::{Digest, Sha256};

use crate::report::model::InputFile;

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
/// hash of its files' names and hashes in name order.
pub fn fingerprint(path: &Path) -> Result<InputFile> {
    let (size, sha256) = if path.is_dir() {
        let mut names: Vec<PathBuf> = std::fs::read_dir(path)
            .with_context(|| format!("cannot list the folder {}", path.display()))?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| p.is_file())
            .collect();
        names.sort();
        let mut h = Sha256::new();
        let mut total = 0;
        for p in names {
            let (size, sha) = hash_file(&p)?;
            total += size;
            let name = p
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default();
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
