//! What a path is on disk, in words, for the checks that keep the program to
//! regular files and folders: reading a FIFO or a device would wait for ever
//! or never end, and replacing one would destroy it.
//!
//! This module only looks at a path's type; it never opens, reads or writes
//! a file.

use std::path::Path;

/// What an existing path is when it is neither a regular file nor a folder
/// (after following links), in words: "a FIFO (named pipe)", "a socket",
/// "a device", "a link to nothing". `None` for a file, a folder, a link to
/// either, and a path that does not exist at all.
///
/// ```
/// use ledgerate::files::special_kind;
/// assert_eq!(special_kind(std::path::Path::new("Cargo.toml")), None);
/// assert_eq!(special_kind(std::path::Path::new("src")), None);
/// assert_eq!(special_kind(std::path::Path::new("no-such-file")), None);
/// assert_eq!(special_kind(std::path::Path::new("/dev/null")), Some("a device"));
/// ```
pub fn special_kind(path: &Path) -> Option<&'static str> {
    std::fs::symlink_metadata(path).ok()?;
    let Ok(meta) = std::fs::metadata(path) else {
        return Some("a link to nothing");
    };
    if meta.is_file() || meta.is_dir() {
        return None;
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        let t = meta.file_type();
        if t.is_fifo() {
            return Some("a FIFO (named pipe)");
        }
        if t.is_socket() {
            return Some("a socket");
        }
        if t.is_char_device() || t.is_block_device() {
            return Some("a device");
        }
    }
    Some("neither a file nor a folder")
}
