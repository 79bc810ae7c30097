//! Putting a finished workbook on disk: into a temporary file beside the
//! target, flushed to the disk, then renamed over the target in one step, so
//! that a reader sees either the old file or the complete new one.
//!
//! This module never builds a sheet and never touches an input book.

use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

use rust_xlsxwriter::Workbook;

use super::error::ReportError;
use super::model::InputFile;

/// The folder the target goes into; it must exist, and the target must not be
/// a folder itself.
pub(crate) fn target_dir(target: &Path) -> Result<PathBuf, ReportError> {
    if target.is_dir() {
        return Err(ReportError::TargetIsDirectory(target.to_path_buf()));
    }
    let dir = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
        _ => PathBuf::from("."),
    };
    if !dir.is_dir() {
        return Err(ReportError::MissingDirectory(dir));
    }
    Ok(dir)
}

/// Refuses a target that is one of the input books (same file after
/// resolving links and relative paths).
pub(crate) fn check_not_input(target: &Path, inputs: &[InputFile]) -> Result<(), ReportError> {
    // A target that does not exist yet cannot be an input.
    let Ok(target_real) = std::fs::canonicalize(target) else {
        return Ok(());
    };
    for input in inputs {
        if let Ok(real) = std::fs::canonicalize(&input.path) {
            if real == target_real {
                return Err(ReportError::TargetIsInput(target.to_path_buf()));
            }
        }
    }
    Ok(())
}

/// The permissions the output gets: those of the file it replaces, else those
/// of any new file (0o666 less the umask), not the temporary file's owner-only
/// default, so that a shared folder's readers can open it.
pub(crate) fn output_permissions(target: &Path) -> Option<std::fs::Permissions> {
    if let Ok(meta) = std::fs::metadata(target) {
        return Some(meta.permissions());
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        Some(std::fs::Permissions::from_mode(0o666))
    }
    #[cfg(not(unix))]
    {
        None
    }
}

/// Saves `wb` to `target` through a temporary file in `dir`.
pub(crate) fn save_atomically(
    wb: &mut Workbook,
    target: &Path,
    dir: &Path,
) -> Result<(), ReportError> {
    let io = |action: &'static str, path: &Path| {
        let path = path.to_path_buf();
        move |source: std::io::Error| ReportError::Io {
            action,
            path,
            source,
        }
    };
    // A run killed mid-write leaves this file, never a partial target: its
    // name says which output it was and that it is unfinished.
    let prefix = format!(
        ".{}.ledgerate-",
        target
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .unwrap_or_default()
    );
    let mut builder = tempfile::Builder::new();
    builder.prefix(&prefix).suffix(".partial");
    if let Some(p) = output_permissions(target) {
        builder.permissions(p);
    }
    let mut tmp = builder
        .tempfile_in(dir)
        .map_err(io("create a temporary file in", dir))?;
    {
        let mut out = BufWriter::with_capacity(1 << 20, tmp.as_file_mut());
        wb.save_to_writer(&mut out)
            .map_err(|source| ReportError::Save {
                path: target.to_path_buf(),
                source,
            })?;
        out.flush().map_err(io("write a temporary file in", dir))?;
    }
    tmp.as_file()
        .sync_all()
        .map_err(io("flush a temporary file in", dir))?;
    // On failure the temporary file is dropped, which removes it.
    tmp.persist(target)
        .map_err(|e| io("rename the finished workbook to", target)(e.error))?;
    Ok(())
}
