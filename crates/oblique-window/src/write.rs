//! Safe writes to the user's files: a temporary file in the same folder, fsync, rename, fsync of
//! the folder. An append re-validates the whole new text before anything is written, keeps every
//! other byte of the file as it was (comments and order included), and refuses to overwrite a
//! file that changed on disk since it was read.

use crate::diag::Diagnostics;
use crate::library::sha256_hex;
use crate::materials::MaterialRecord;
use crate::pair::{parse_pair_file, ObservationEntry, Origin, PairWindow};
use std::collections::BTreeMap;
use std::io::Write;
use std::path::{Path, PathBuf};

mod edit;
mod fitted;
use edit::edit_parts;
pub use edit::{
    append_observation_text, append_to_top_list, new_pair_text, remove_top_list_item,
    render_boundary, render_observation, ron_string, NewPair,
};
pub use fitted::{render_fitted, save_fitted, set_top_field};

/// Test hook: when set to a number of milliseconds, a write pauses that long after the temporary
/// file is complete and before the rename, so that a test can kill the process mid-write.
pub const FAULT_PAUSE_ENV: &str = "OBLIQUE_FAULT_PAUSE_BEFORE_RENAME_MS";

/// Why a write did not happen. In every case the target file is as it was.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    /// Reading, writing or renaming failed.
    #[error("{path}: {source}")]
    Io {
        /// The file.
        path: PathBuf,
        /// The OS error.
        source: std::io::Error,
    },
    /// The file changed on disk since it was read.
    #[error("{path}: the file changed on disk since it was read (expected sha256 {expected}, found {found}); nothing was written")]
    Conflict {
        /// The file.
        path: PathBuf,
        /// Hash when read.
        expected: String,
        /// Hash now.
        found: String,
    },
    /// The file would not be valid after the change.
    #[error("the change would leave an invalid file; nothing was written:\n{0}")]
    Invalid(Diagnostics),
    /// The target already exists.
    #[error("{0}: already exists; nothing was written")]
    Exists(PathBuf),
    /// Another writer held the folder's lock for longer than the wait.
    #[error("{path}: another oblique process has been writing in this folder for {waited_ms} ms; nothing was written
  hint: try again; if no oblique process is running, the lock is stale only if the file system does not release locks of ended processes (then delete {path})")]
    Locked {
        /// The lock file.
        path: PathBuf,
        /// How long this writer waited.
        waited_ms: u64,
    },
    /// The file's structure is not one we can append to, or the path is not a writable file.
    #[error("{path}: {message}; nothing was written")]
    Structure {
        /// The file.
        path: PathBuf,
        /// What is wrong.
        message: String,
    },
}

fn io(path: &Path) -> impl FnOnce(std::io::Error) -> WriteError + '_ {
    move |source| WriteError::Io {
        path: path.to_path_buf(),
        source,
    }
}

/// The name of the lock file that serialises writers in a library folder. It is hidden, so the
/// library never reads it; it holds no data and may be deleted when no oblique process runs.
pub const LOCK_FILE: &str = ".oblique.lock";

/// Environment variable: how long (milliseconds) a writer waits for another writer's lock on a
/// folder before it gives up (default [`DEFAULT_LOCK_WAIT_MS`]).
pub const LOCK_WAIT_ENV: &str = "OBLIQUE_LOCK_WAIT_MS";

/// How long a writer waits for the folder lock by default (30 s).
pub const DEFAULT_LOCK_WAIT_MS: u64 = 30_000;

/// An exclusive advisory lock on a folder's [`LOCK_FILE`], held until dropped. Every oblique
/// write to a user's library file (pair observe and import, pair new, calibrations) holds it
/// across read, check, write and rename, so that two processes never interleave.
#[derive(Debug)]
pub struct FolderLock {
    _file: std::fs::File,
}

/// Take the folder lock of `dir`, waiting up to the configured time.
///
/// # Errors
/// [`WriteError::Locked`] after the wait, or an IO error opening the lock file.
pub fn lock_folder(dir: &Path) -> Result<FolderLock, WriteError> {
    let lock_path = dir.join(LOCK_FILE);
    let file = std::fs::OpenOptions::new()
        .read(true)
        .write(true)
        .create(true)
        .truncate(false)
        .open(&lock_path)
        .map_err(io(&lock_path))?;
    let wait_ms = std::env::var(LOCK_WAIT_ENV)
        .ok()
        .and_then(|v| v.parse::<u64>().ok())
        .unwrap_or(DEFAULT_LOCK_WAIT_MS);
    let start = std::time::Instant::now();
    let mut pause = std::time::Duration::from_millis(1);
    loop {
        match file.try_lock() {
            Ok(()) => return Ok(FolderLock { _file: file }),
            Err(std::fs::TryLockError::WouldBlock) => {
                if start.elapsed().as_millis() >= u128::from(wait_ms) {
                    return Err(WriteError::Locked {
                        path: lock_path,
                        waited_ms: wait_ms,
                    });
                }
                std::thread::sleep(pause);
                pause = (pause * 2).min(std::time::Duration::from_millis(50));
            }
            Err(std::fs::TryLockError::Error(e)) => {
                return Err(WriteError::Io {
                    path: lock_path,
                    source: e,
                })
            }
        }
    }
}

/// What is at a path the user asked oblique to write.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Target {
    /// Nothing yet: a new regular file at this path.
    New(PathBuf),
    /// A regular file (after following symbolic links): replaced atomically, its permissions
    /// kept.
    Regular {
        /// The file that is replaced (the link's final target when `via_link`).
        path: PathBuf,
        /// The path was a symbolic link (the write goes through it, the link stays).
        via_link: bool,
    },
    /// A FIFO or a character device (`/dev/null`, `/dev/stdout`, a pipe): written in place,
    /// never replaced.
    InPlace(PathBuf),
}

impl Target {
    /// A note for the user when the write is not a plain replacement, else `None`.
    #[must_use]
    pub fn note(&self, asked: &Path) -> Option<String> {
        match self {
            Target::Regular {
                path,
                via_link: true,
            } => Some(format!(
                "{} is a symbolic link: wrote through it to {} (the link is kept)",
                asked.display(),
                path.display()
            )),
            // A pipe or a device (/dev/null, /dev/stdout) is what the user meant: no note.
            _ => None,
        }
    }
}

/// Find out what is at `path` and how a write to it must go.
///
/// # Errors
/// A folder, a block device, a socket or a dangling symbolic link at `path`, or an IO error.
pub fn resolve_target(path: &Path) -> Result<Target, WriteError> {
    let meta = match std::fs::symlink_metadata(path) {
        Ok(m) => m,
        Err(e) if e.kind() == std::io::ErrorKind::NotFound => {
            return Ok(Target::New(path.to_path_buf()))
        }
        Err(e) => return Err(io(path)(e)),
    };
    let (real, via_link) = if meta.file_type().is_symlink() {
        match std::fs::canonicalize(path) {
            Ok(r) => (r, true),
            // `/dev/stdout` and `/dev/fd/N` lead to `/proc/self/fd/N`, whose target (a pipe)
            // has no path: what the link opens is still a pipe or a terminal.
            Err(_) if is_stream(path) => return Ok(Target::InPlace(path.to_path_buf())),
            Err(_) => {
                let to = std::fs::read_link(path)
                    .map_or_else(|_| "?".into(), |p| p.display().to_string());
                return Err(WriteError::Structure {
                    path: path.to_path_buf(),
                    message: format!(
                        "is a symbolic link to {to}, which does not exist (or cannot be reached)"
                    ),
                });
            }
        }
    } else {
        (path.to_path_buf(), false)
    };
    let meta = std::fs::metadata(&real).map_err(io(&real))?;
    let ft = meta.file_type();
    if ft.is_file() {
        return Ok(Target::Regular {
            path: real,
            via_link,
        });
    }
    if ft.is_dir() {
        return Err(WriteError::Structure {
            path: path.to_path_buf(),
            message: "is a folder, not a file".into(),
        });
    }
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        if ft.is_fifo() || ft.is_char_device() {
            return Ok(Target::InPlace(real));
        }
        let kind = if ft.is_block_device() {
            "a block device"
        } else if ft.is_socket() {
            "a socket"
        } else {
            "not a regular file"
        };
        Err(WriteError::Structure {
            path: path.to_path_buf(),
            message: format!(
                "is {kind}; oblique writes regular files, pipes and character devices only"
            ),
        })
    }
    #[cfg(not(unix))]
    Err(WriteError::Structure {
        path: path.to_path_buf(),
        message: "is not a regular file".into(),
    })
}

/// Whether `path`, links followed, is a pipe or a character device.
fn is_stream(path: &Path) -> bool {
    #[cfg(unix)]
    {
        use std::os::unix::fs::FileTypeExt;
        std::fs::metadata(path).is_ok_and(|m| {
            let ft = m.file_type();
            ft.is_fifo() || ft.is_char_device()
        })
    }
    #[cfg(not(unix))]
    {
        let _ = path;
        false
    }
}

/// Refuse to replace a file the user cannot write (a read-only pair file, a file of another
/// user in a shared folder): renaming over it would succeed where an editor would not.
fn check_writable(path: &Path) -> Result<(), WriteError> {
    // A file with no write permission for anyone is read-only on purpose, even for root.
    if std::fs::metadata(path).is_ok_and(|m| m.permissions().readonly()) {
        return Err(WriteError::Structure {
            path: path.to_path_buf(),
            message: "is read-only; change its permissions if it is meant to be replaced".into(),
        });
    }
    match std::fs::OpenOptions::new().write(true).open(path) {
        Ok(_) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::PermissionDenied => Err(WriteError::Structure {
            path: path.to_path_buf(),
            message: "is not writable for this user (read-only, or another user's file); \
                      change its permissions if it is meant to be replaced"
                .into(),
        }),
        Err(e) => Err(io(path)(e)),
    }
}

/// Refuse an output whose final file is a loaded library file (see [`crate::files::protect`]).
fn check_not_library(target: &Target, asked: &Path) -> Result<(), WriteError> {
    if let Target::Regular { path, via_link } = target {
        if crate::files::is_protected(path) {
            let how = if *via_link {
                format!(" (through the link {})", asked.display())
            } else {
                String::new()
            };
            return Err(WriteError::Structure {
                path: path.to_path_buf(),
                message: format!(
                    "is a library file this run loaded{how}; an output never replaces one: choose another name"
                ),
            });
        }
    }
    Ok(())
}

/// A temporary file beside `target`, created new (never one that exists).
fn create_temp(dir: &Path, name: &str) -> Result<(PathBuf, std::fs::File), WriteError> {
    use std::sync::atomic::{AtomicU64, Ordering};
    static COUNTER: AtomicU64 = AtomicU64::new(0);
    let mut last_err = None;
    for _ in 0..32 {
        let nanos = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.subsec_nanos());
        let n = COUNTER.fetch_add(1, Ordering::Relaxed);
        // Keep the name short enough for any file system: cut a long target name.
        let short: String = name.chars().take(80).collect();
        let tmp = dir.join(format!(
            ".{short}.tmp-{}-{n}-{nanos:08x}",
            std::process::id()
        ));
        match std::fs::OpenOptions::new()
            .write(true)
            .create_new(true)
            .open(&tmp)
        {
            Ok(f) => {
                crate::files::register_temporary(&tmp);
                return Ok((tmp, f));
            }
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => last_err = Some(e),
            // Name the folder: the temporary name means nothing to the user.
            Err(e) => return Err(io(dir)(e)),
        }
    }
    Err(io(dir)(last_err.unwrap_or_else(|| {
        std::io::Error::other("no free temporary file name")
    })))
}

/// Give the temporary file the permissions (and, where allowed, the owner) of the file it
/// replaces, so that a group-writable or private file stays so.
fn copy_attributes(from: &Path, to: &std::fs::File) {
    if let Ok(meta) = std::fs::metadata(from) {
        let _ = to.set_permissions(meta.permissions());
        #[cfg(unix)]
        {
            use std::os::unix::fs::MetadataExt;
            // Only succeeds for the owner's own group or for a privileged user; a failure
            // leaves the writer's ownership, which is what an ordinary editor does too.
            let _ = std::os::unix::fs::fchown(to, Some(meta.uid()), Some(meta.gid()));
        }
    }
}

/// Write `bytes` to `path` safely. A regular file (or a symbolic link to one) is replaced
/// atomically through a temporary file in the same folder (fsync, rename, fsync of the folder)
/// with its permissions kept; a pipe or character device is written in place; a folder, block
/// device, socket or dangling link is refused. When `expected_sha256` is given, the current
/// file must be a regular file that still has that hash just before the rename.
///
/// # Errors
/// [`WriteError`]; the target is untouched on every error.
pub fn atomic_write(
    path: &Path,
    bytes: &[u8],
    expected_sha256: Option<&str>,
) -> Result<(), WriteError> {
    let target = resolve_target(path)?;
    write_target(&target, bytes, expected_sha256)
}

/// [`atomic_write`] to an already resolved target.
///
/// # Errors
/// [`WriteError`]; the target is untouched on every error.
pub fn write_target(
    target: &Target,
    bytes: &[u8],
    expected_sha256: Option<&str>,
) -> Result<(), WriteError> {
    let path = match target {
        Target::InPlace(p) => {
            if expected_sha256.is_some() {
                return Err(WriteError::Structure {
                    path: p.clone(),
                    message: "is not a regular file; a library file must be one".into(),
                });
            }
            let mut f = std::fs::OpenOptions::new()
                .write(true)
                .open(p)
                .map_err(io(p))?;
            f.write_all(bytes).map_err(io(p))?;
            return f.flush().map_err(io(p));
        }
        Target::New(p) | Target::Regular { path: p, .. } => p.as_path(),
    };
    if matches!(target, Target::Regular { .. }) {
        if expected_sha256.is_none() {
            check_not_library(target, path)?;
        }
        check_writable(path)?;
    }
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("file");
    let (tmp, mut f) = create_temp(dir, name)?;
    let result = (|| {
        if matches!(target, Target::Regular { .. }) {
            copy_attributes(path, &f);
        }
        f.write_all(bytes).map_err(io(&tmp))?;
        f.sync_all().map_err(io(&tmp))?;
        drop(f);
        if let Some(ms) = std::env::var(FAULT_PAUSE_ENV)
            .ok()
            .and_then(|v| v.parse::<u64>().ok())
        {
            std::thread::sleep(std::time::Duration::from_millis(ms));
        }
        if let Some(expected) = expected_sha256 {
            let now = std::fs::read(path).map_err(io(path))?;
            let found = sha256_hex(&now);
            if found != expected {
                return Err(WriteError::Conflict {
                    path: path.to_path_buf(),
                    expected: expected.to_string(),
                    found,
                });
            }
        }
        std::fs::rename(&tmp, path).map_err(io(path))?;
        if let Ok(d) = std::fs::File::open(dir) {
            let _ = d.sync_all();
        }
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    crate::files::forget_temporary(&tmp);
    result
}

/// A file written as a stream and put in place at the end: for a regular file (or a new name,
/// or a link to a regular file) the bytes go to a temporary file beside the final one, which
/// is renamed into place by [`StagedFile::commit`] (with the replaced file's permissions), so
/// that a failed or killed run leaves no half-written file; a pipe or character device is
/// written in place. Dropping it uncommitted removes the temporary file.
#[derive(Debug)]
pub struct StagedFile {
    target: Target,
    tmp: Option<PathBuf>,
    file: Option<std::fs::File>,
}

impl StagedFile {
    /// Start writing `path`.
    ///
    /// # Errors
    /// What [`resolve_target`] refuses, or an IO error creating the temporary file.
    pub fn create(path: &Path) -> Result<Self, WriteError> {
        let target = resolve_target(path)?;
        match &target {
            Target::InPlace(p) => {
                let file = std::fs::OpenOptions::new()
                    .write(true)
                    .open(p)
                    .map_err(io(p))?;
                Ok(Self {
                    target,
                    tmp: None,
                    file: Some(file),
                })
            }
            Target::New(p) | Target::Regular { path: p, .. } => {
                if matches!(target, Target::Regular { .. }) {
                    check_not_library(&target, path)?;
                    check_writable(p)?;
                }
                let dir = p
                    .parent()
                    .filter(|d| !d.as_os_str().is_empty())
                    .unwrap_or(Path::new("."));
                let name = p.file_name().and_then(|n| n.to_str()).unwrap_or("file");
                let (tmp, file) = create_temp(dir, name)?;
                if matches!(target, Target::Regular { .. }) {
                    copy_attributes(p, &file);
                }
                Ok(Self {
                    target,
                    tmp: Some(tmp),
                    file: Some(file),
                })
            }
        }
    }

    /// What the write goes to (for a note to the user, see [`Target::note`]).
    #[must_use]
    pub fn target(&self) -> &Target {
        &self.target
    }

    /// Flush and put the file in place (rename of the temporary file).
    ///
    /// # Errors
    /// An IO error; the final file is then as it was.
    pub fn commit(mut self) -> Result<(), WriteError> {
        let Some(mut f) = self.file.take() else {
            return Ok(());
        };
        let (path, tmp) = match (&self.target, self.tmp.take()) {
            (Target::New(p) | Target::Regular { path: p, .. }, Some(t)) => (p.clone(), t),
            (Target::InPlace(_), _) | (_, None) => {
                let p = p_of(&self.target);
                return f.flush().map_err(io(&p));
            }
        };
        let result = (|| {
            f.flush().map_err(io(&tmp))?;
            drop(f);
            if let Some(ms) = std::env::var(FAULT_PAUSE_ENV)
                .ok()
                .and_then(|v| v.parse::<u64>().ok())
            {
                std::thread::sleep(std::time::Duration::from_millis(ms));
            }
            std::fs::rename(&tmp, &path).map_err(io(&path))
        })();
        if result.is_err() {
            let _ = std::fs::remove_file(&tmp);
        }
        crate::files::forget_temporary(&tmp);
        result
    }
}

fn p_of(t: &Target) -> PathBuf {
    match t {
        Target::New(p) | Target::Regular { path: p, .. } | Target::InPlace(p) => p.clone(),
    }
}

impl Write for StagedFile {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        match &mut self.file {
            Some(f) => f.write(b),
            None => Ok(b.len()),
        }
    }

    fn write_all(&mut self, b: &[u8]) -> std::io::Result<()> {
        match &mut self.file {
            Some(f) => f.write_all(b),
            None => Ok(()),
        }
    }

    fn flush(&mut self) -> std::io::Result<()> {
        match &mut self.file {
            Some(f) => f.flush(),
            None => Ok(()),
        }
    }
}

impl Drop for StagedFile {
    fn drop(&mut self) {
        if self.file.take().is_some() {
            if let Some(tmp) = &self.tmp {
                let _ = std::fs::remove_file(tmp);
                crate::files::forget_temporary(tmp);
            }
        }
    }
}

/// Update the user's file at `path`: read it (refusing if it is not `expected_sha256`, when the
/// caller read it earlier), make the new text with `edit`, check it with `parse` (given the
/// new text's origin), then write it atomically, refusing if the file changed on disk since it
/// was read. What `parse` returns is the result.
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn update_file<T>(
    path: &Path,
    expected_sha256: Option<&str>,
    edit: impl FnOnce(&str) -> Result<String, WriteError>,
    parse: impl FnOnce(Origin, &str) -> Result<T, Diagnostics>,
) -> Result<T, WriteError> {
    let target = resolve_target(path)?;
    let real = match &target {
        Target::Regular { path, .. } => path.clone(),
        Target::New(_) => return Err(io(path)(std::io::Error::from(std::io::ErrorKind::NotFound))),
        Target::InPlace(_) => {
            return Err(WriteError::Structure {
                path: path.to_path_buf(),
                message: "is not a regular file; a library file must be one".into(),
            })
        }
    };
    let dir = real
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    // Held across read, check, write and rename: another writer waits for it.
    let _lock = lock_folder(dir)?;
    let bytes = crate::files::read_bounded(&real).map_err(io(path))?;
    let read_sha = sha256_hex(&bytes);
    if let Some(expected) = expected_sha256 {
        if expected != read_sha {
            return Err(WriteError::Conflict {
                path: path.to_path_buf(),
                expected: expected.to_string(),
                found: read_sha,
            });
        }
    }
    let text = String::from_utf8(bytes).map_err(|e| WriteError::Structure {
        path: path.to_path_buf(),
        message: format!("not UTF-8 text: {e}"),
    })?;
    let new_text = edit(&text)?;
    let origin = Origin {
        display: path.display().to_string(),
        path: Some(path.to_path_buf()),
        sha256: sha256_hex(new_text.as_bytes()),
    };
    let parsed = parse(origin, &new_text).map_err(WriteError::Invalid)?;
    write_target(&target, new_text.as_bytes(), Some(&read_sha))?;
    Ok(parsed)
}

/// Append observations to the pair file at `path`: validate the new text against `materials`,
/// then write atomically, refusing if the file changed since it was read (or since
/// `expected_sha256`, when the caller read it earlier).
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn append_observations(
    path: &Path,
    entries: &[ObservationEntry],
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<PairWindow, WriteError> {
    update_file(
        path,
        expected_sha256,
        |text| append_observation_text(path, text, entries),
        |origin, text| parse_pair_file(origin, text, materials).map(|(_, w)| w),
    )
}

/// Append a user boundary to the pair file at `path`, as [`append_observations`] does for
/// shots: validated with the whole file, under the folder's lock, every other byte kept.
///
/// # Errors
/// [`WriteError`]; the file is untouched on every error.
pub fn append_boundary(
    path: &Path,
    entry: &crate::pair::BoundaryEntry,
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<PairWindow, WriteError> {
    update_file(
        path,
        expected_sha256,
        |text| append_to_top_list(path, text, "boundaries", &render_boundary(entry)),
        |origin, text| parse_pair_file(origin, text, materials).map(|(_, w)| w),
    )
}

/// Remove the user boundary labelled `label` from the pair file at `path`, as
/// [`append_boundary`] adds one: found in the file as it is under the folder's lock (other
/// writers may have appended meanwhile), validated with the whole file, every other byte kept.
/// Returns the window after the change and the removed text.
///
/// # Errors
/// [`WriteError`] (`Structure` when no boundary has that label); the file is untouched on
/// every error.
pub fn remove_boundary(
    path: &Path,
    label: &str,
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<(PairWindow, String), WriteError> {
    remove_item(
        path,
        "boundaries",
        |w| {
            w.boundaries
                .iter()
                .position(|b| b.label == label)
                .ok_or_else(|| format!("no boundary is labelled \"{label}\" (any more)"))
        },
        materials,
        expected_sha256,
    )
}

/// Remove the observation at `index` (0-based; shot #index+1) from the pair file at `path`, as
/// [`remove_boundary`] does, provided it is still `expected` (velocity, angle, outcome and
/// source as the caller showed them: a concurrent append never shifts it, a concurrent removal
/// may); the shots after it move up by one.
///
/// # Errors
/// [`WriteError`] (`Structure` when the shot at that number is no longer the one expected); the
/// file is untouched on every error.
pub fn remove_observation(
    path: &Path,
    index: usize,
    expected: &crate::pair::Observation,
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<(PairWindow, String), WriteError> {
    remove_item(
        path,
        "observations",
        |w| {
            match w.observations.get(index) {
            Some(o) if o.same_shot(expected) => Ok(index),
            _ => Err(format!(
                "shot #{} is no longer the one shown (another writer changed the list); nothing was removed: look again with `pair show`",
                index + 1
            )),
        }
        },
        materials,
        expected_sha256,
    )
}

/// Remove the element of `list` that `pick` finds in the file as read under the lock.
fn remove_item(
    path: &Path,
    list: &str,
    pick: impl FnOnce(&PairWindow) -> Result<usize, String>,
    materials: &BTreeMap<String, MaterialRecord>,
    expected_sha256: Option<&str>,
) -> Result<(PairWindow, String), WriteError> {
    let mut removed = String::new();
    let w = update_file(
        path,
        expected_sha256,
        |text| {
            let origin = Origin {
                display: path.display().to_string(),
                path: Some(path.to_path_buf()),
                sha256: sha256_hex(text.as_bytes()),
            };
            let (_, now) = parse_pair_file(origin, text, materials).map_err(WriteError::Invalid)?;
            let index = pick(&now).map_err(|message| WriteError::Structure {
                path: path.to_path_buf(),
                message,
            })?;
            let (out, cut) = remove_top_list_item(path, text, list, index)?;
            removed = cut;
            Ok(out)
        },
        |origin, text| parse_pair_file(origin, text, materials).map(|(_, w)| w),
    )?;
    Ok((w, removed))
}

/// Create a new file atomically; refuses to replace an existing one, also when another
/// process creates the same file at the same moment (the folder lock is held, and the file is
/// linked into place, which fails when the name exists).
///
/// # Errors
/// [`WriteError::Exists`] or an IO error.
pub fn create_new(path: &Path, text: &str) -> Result<(), WriteError> {
    if std::fs::symlink_metadata(path).is_ok() {
        return Err(WriteError::Exists(path.to_path_buf()));
    }
    let dir = path
        .parent()
        .filter(|d| !d.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let _lock = lock_folder(dir)?;
    let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("file");
    let (tmp, mut f) = create_temp(dir, name)?;
    let result = (|| {
        f.write_all(text.as_bytes()).map_err(io(&tmp))?;
        f.sync_all().map_err(io(&tmp))?;
        drop(f);
        if let Some(ms) = std::env::var(FAULT_PAUSE_ENV)
            .ok()
            .and_then(|v| v.parse::<u64>().ok())
        {
            std::thread::sleep(std::time::Duration::from_millis(ms));
        }
        match std::fs::hard_link(&tmp, path) {
            Ok(()) => Ok(()),
            Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => {
                Err(WriteError::Exists(path.to_path_buf()))
            }
            // A file system without hard links: under the lock, check and rename.
            Err(_) => {
                if std::fs::symlink_metadata(path).is_ok() {
                    return Err(WriteError::Exists(path.to_path_buf()));
                }
                std::fs::rename(&tmp, path).map_err(io(path))
            }
        }
    })();
    let _ = std::fs::remove_file(&tmp);
    crate::files::forget_temporary(&tmp);
    if result.is_ok() {
        if let Ok(d) = std::fs::File::open(dir) {
            let _ = d.sync_all();
        }
    }
    result
}

#[cfg(test)]
mod tests;
