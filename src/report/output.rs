//! Putting a finished workbook (or CSV file) on disk: into a temporary file beside the
//! target, flushed to the disk, then renamed over the target in one step, so
//! that a reader sees either the old file or the complete new one.
//!
//! This module never builds a sheet and never touches an input book.

use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

use rust_xlsxwriter::Workbook;

use super::error::ReportError;
use super::model::InputFile;

/// The longest part of the target's file name kept in the temporary file's
/// name, in bytes: the whole temporary name stays within the 255 bytes a file
/// name may have, whatever the target's name.
const TEMP_NAME_PART: usize = 100;

/// Runs a writer; a panic inside the spreadsheet library (it panics when a
/// scratch file cannot be written, on a full disk say) becomes
/// [`ReportError::Stopped`] naming the target, and prints nothing itself.
pub(crate) fn guarded<T>(
    target: &Path,
    write: impl FnOnce() -> Result<T, ReportError>,
) -> Result<T, ReportError> {
    crate::panics::quietly(write).unwrap_or_else(|message| {
        Err(ReportError::Stopped {
            path: target.to_path_buf(),
            message,
        })
    })
}

/// Where the finished workbook is renamed to: the target itself, or, when
/// the target is a link to a regular file, the file it links to (the link
/// stays a link).
fn final_path(target: &Path) -> PathBuf {
    match std::fs::symlink_metadata(target) {
        Ok(m) if m.file_type().is_symlink() => {
            std::fs::canonicalize(target).unwrap_or_else(|_| target.to_path_buf())
        }
        _ => target.to_path_buf(),
    }
}

/// The folder the target goes into; it must exist, and the target must not be
/// a folder itself, nor anything else that is not a regular file.
pub(crate) fn target_dir(target: &Path) -> Result<PathBuf, ReportError> {
    if target.is_dir() {
        return Err(ReportError::TargetIsDirectory(target.to_path_buf()));
    }
    if let Some(kind) = crate::files::special_kind(target) {
        return Err(ReportError::TargetNotFile {
            path: target.to_path_buf(),
            kind,
        });
    }
    let target = final_path(target);
    let target = target.as_path();
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
    write_atomically(target, dir, "rename the finished workbook to", |out| {
        wb.save_to_writer(out).map_err(|source| ReportError::Save {
            path: target.to_path_buf(),
            source,
        })
    })
}

/// Writes a file to `target` through a temporary file in `dir` (the
/// target's folder): `write` fills the temporary file, which is then
/// flushed to the disk and renamed over the target. `rename` names that
/// last step in an error ("rename the finished workbook to").
pub(crate) fn write_atomically(
    target: &Path,
    dir: &Path,
    rename: &'static str,
    write: impl FnOnce(&mut BufWriter<&mut std::fs::File>) -> Result<(), ReportError>,
) -> Result<(), ReportError> {
    let io = |action: &'static str, path: &Path| {
        let path = path.to_path_buf();
        move |source: std::io::Error| ReportError::Io {
            action,
            path,
            source,
        }
    };
    let real = final_path(target);
    let target = real.as_path();
    let dir = match target.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => dir,
    };
    // A run killed mid-write leaves this file, never a partial target: its
    // name says which output it was and that it is unfinished.
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let prefix = format!(".{}.ledgerate-", name_part(&name));
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
        write(&mut out)?;
        out.flush().map_err(io("write a temporary file in", dir))?;
    }
    tmp.as_file()
        .sync_all()
        .map_err(io("flush a temporary file in", dir))?;
    // On failure the temporary file is dropped, which removes it.
    tmp.persist(target)
        .map_err(|e| io(rename, target)(e.error))?;
    Ok(())
}

/// At most [`TEMP_NAME_PART`] bytes of a file name, cut at a character
/// boundary.
fn name_part(name: &str) -> &str {
    let mut end = name.len().min(TEMP_NAME_PART);
    while !name.is_char_boundary(end) {
        end -= 1;
    }
    name.get(..end).unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_long_name_is_cut_at_a_character_boundary() {
        let long = "é".repeat(120);
        let part = name_part(&long);
        assert!(part.len() <= TEMP_NAME_PART);
        assert_eq!(part.chars().count(), TEMP_NAME_PART / 2);
        assert_eq!(name_part("accruals.xlsx"), "accruals.xlsx");
    }
}
