//! Reading the user's files within bounds, and the register of library files that an output
//! must never replace.
//!
//! Every file oblique reads whole (a pair, material or machine file, a trial CSV, a curve or
//! point list, a saved sweep) is read through [`read_bounded`], so that a wrong path (a device
//! such as `/dev/zero`, a log of many gigabytes) ends in a clear message instead of exhausting
//! the memory. The weld map streams its input and is not bounded.
//!
//! Every library file that was loaded is registered with [`protect`]; a write of an output (a
//! plot, a map, a report) whose final file is a registered one is refused by
//! [`crate::write`], even through a symbolic link. Library writes (observations, fits, boundaries,
//! calibrations) check the file's hash instead and are not affected.

use std::collections::BTreeSet;
use std::io::Read;
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// The largest file read whole: 64 MiB. A pair file of a hundred thousand shots is under 20 MiB.
pub const MAX_READ_BYTES: u64 = 64 * 1024 * 1024;

/// Read all of `reader` (named `what` in the message), refusing more than `max` bytes.
///
/// # Errors
/// An IO error, or `InvalidData` naming the bound.
pub fn read_all_bounded(reader: impl Read, max: u64) -> std::io::Result<Vec<u8>> {
    let mut buf = Vec::new();
    reader.take(max + 1).read_to_end(&mut buf)?;
    if buf.len() as u64 > max {
        return Err(std::io::Error::new(
            std::io::ErrorKind::InvalidData,
            format!(
                "larger than {} MiB, the most oblique reads whole; is this the file you meant?",
                max / (1024 * 1024)
            ),
        ));
    }
    Ok(buf)
}

/// Read the file at `path` whole, refusing more than [`MAX_READ_BYTES`].
///
/// # Errors
/// An IO error, or `InvalidData` naming the bound.
pub fn read_bounded(path: &Path) -> std::io::Result<Vec<u8>> {
    read_all_bounded(std::fs::File::open(path)?, MAX_READ_BYTES)
}

/// [`read_bounded`] as UTF-8 text.
///
/// # Errors
/// As [`read_bounded`], or `InvalidData` when the bytes are not UTF-8.
pub fn read_text_bounded(path: &Path) -> std::io::Result<String> {
    String::from_utf8(read_bounded(path)?).map_err(|e| {
        std::io::Error::new(
            std::io::ErrorKind::InvalidData,
            format!("not UTF-8 text: {}", e.utf8_error()),
        )
    })
}

static PROTECTED: Mutex<BTreeSet<PathBuf>> = Mutex::new(BTreeSet::new());

/// Register a library file (by its canonical path) so that no output replaces it.
pub fn protect(path: &Path) {
    if let Ok(real) = std::fs::canonicalize(path) {
        if let Ok(mut set) = PROTECTED.lock() {
            set.insert(real);
        }
    }
}

/// Whether `real` (a canonical path) is a registered library file.
#[must_use]
pub fn is_protected(real: &Path) -> bool {
    let real = std::fs::canonicalize(real).unwrap_or_else(|_| real.to_path_buf());
    PROTECTED.lock().is_ok_and(|set| set.contains(&real))
}

static TEMPORARIES: Mutex<BTreeSet<PathBuf>> = Mutex::new(BTreeSet::new());

/// Register a temporary file of an unfinished write, so that an interrupted run can remove it
/// ([`remove_temporaries`]).
pub fn register_temporary(path: &Path) {
    if let Ok(mut set) = TEMPORARIES.lock() {
        set.insert(path.to_path_buf());
    }
}

/// The temporary file was renamed into place or removed.
pub fn forget_temporary(path: &Path) {
    if let Ok(mut set) = TEMPORARIES.lock() {
        set.remove(path);
    }
}

/// Remove the temporary files of every unfinished write (called on Ctrl-C or SIGTERM before
/// the process exits; the final files are untouched). Returns how many were removed.
pub fn remove_temporaries() -> usize {
    // try_lock: a signal that arrives while a writer holds the lock must not wait for it.
    let Ok(set) = TEMPORARIES.try_lock() else {
        return 0;
    };
    set.iter()
        .filter(|p| std::fs::remove_file(p).is_ok())
        .count()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bounded_read_refuses_one_byte_over() {
        let data = [b'x'; 11];
        assert_eq!(read_all_bounded(&data[..10], 10).unwrap().len(), 10);
        let err = read_all_bounded(&data[..], 10).unwrap_err();
        assert_eq!(err.kind(), std::io::ErrorKind::InvalidData);
        assert!(err.to_string().contains("larger than"));
    }

    #[test]
    fn protected_paths_are_found_through_links() {
        let dir = tempfile::tempdir().unwrap();
        let f = dir.path().join("a.ron");
        std::fs::write(&f, "x").unwrap();
        assert!(!is_protected(&f));
        protect(&f);
        assert!(is_protected(&f));
        #[cfg(unix)]
        {
            let link = dir.path().join("link.ron");
            std::os::unix::fs::symlink(&f, &link).unwrap();
            assert!(is_protected(&link));
        }
    }

    #[test]
    fn registered_temporaries_are_removed() {
        let dir = tempfile::tempdir().unwrap();
        let t = dir.path().join(".x.tmp");
        std::fs::write(&t, "partial").unwrap();
        register_temporary(&t);
        assert!(remove_temporaries() >= 1);
        assert!(!t.exists());
        forget_temporary(&t);
    }
}
