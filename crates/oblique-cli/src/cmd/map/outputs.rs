//! The map's output files: written under a temporary name and renamed into place at the end,
//! or standard output.

use crate::fail::{CmdResult, Fail};
use std::io::Write;
use std::path::{Path, PathBuf};

/// An output file. A regular file (or a new name) is written next to its final name and
/// renamed into place at the end, so that a failed run leaves no half-written map behind;
/// anything else that exists (a device such as /dev/null, a pipe, a symbolic link) is written
/// in place, never replaced.
pub struct AtomicFile {
    /// The temporary name, when renaming at the end.
    tmp: Option<PathBuf>,
    dest: PathBuf,
    file: Option<std::fs::File>,
}

impl AtomicFile {
    /// Create the file for `dest`; `flag` names it in messages.
    pub fn create(dest: &Path, flag: &str) -> CmdResult<Self> {
        let cannot = |e: std::io::Error| {
            Fail::input(format!("{flag}: cannot create {}: {e}", dest.display()))
        };
        let in_place = match std::fs::symlink_metadata(dest) {
            Ok(m) => !m.file_type().is_file(),
            Err(_) => false,
        };
        if in_place {
            let file = std::fs::OpenOptions::new()
                .write(true)
                .truncate(true)
                .open(dest)
                .map_err(cannot)?;
            return Ok(Self {
                tmp: None,
                dest: dest.to_path_buf(),
                file: Some(file),
            });
        }
        let name = dest
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .ok_or_else(|| {
                Fail::input(format!("{flag}: '{}' is not a file name", dest.display()))
            })?;
        let tmp = dest.with_file_name(format!(".{name}.partial-{}", std::process::id()));
        let file = std::fs::File::create(&tmp).map_err(cannot)?;
        Ok(Self {
            tmp: Some(tmp),
            dest: dest.to_path_buf(),
            file: Some(file),
        })
    }

    /// The message for a failed write.
    pub fn write_failure(&self, e: &std::io::Error) -> Fail {
        Fail::other(format!("cannot write {}: {e}", self.dest.display()))
    }

    /// Finish: flush, and rename into place when writing under a temporary name (no fsync: a
    /// map can be made again; the rename only keeps a failed run from leaving half a file).
    pub fn commit(mut self) -> CmdResult {
        let Some(mut f) = self.file.take() else {
            return Ok(());
        };
        let tmp = self.tmp.take();
        let dest = self.dest.clone();
        let fail =
            move |e: std::io::Error| Fail::other(format!("cannot write {}: {e}", dest.display()));
        let flushed = f.flush();
        drop(f);
        match (flushed, tmp) {
            (Ok(()), Some(t)) => std::fs::rename(&t, &self.dest).map_err(|e| {
                let _ = std::fs::remove_file(&t);
                fail(e)
            }),
            (Ok(()), None) => Ok(()),
            (Err(e), Some(t)) => {
                let _ = std::fs::remove_file(&t);
                Err(fail(e))
            }
            (Err(e), None) => Err(fail(e)),
        }
    }
}

impl Write for AtomicFile {
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

impl Drop for AtomicFile {
    fn drop(&mut self) {
        if self.file.take().is_some() {
            if let Some(tmp) = &self.tmp {
                let _ = std::fs::remove_file(tmp);
            }
        }
    }
}

/// Where the map goes.
pub enum Out {
    /// Standard output.
    Stdout(std::io::Stdout),
    /// A file (`-o`).
    File(AtomicFile),
}

impl Out {
    /// The message for a failed write; a closed pipe on standard output (`| head`) ends
    /// quietly.
    pub fn write_failure(&self, e: &std::io::Error) -> Fail {
        match self {
            Out::File(f) => f.write_failure(e),
            Out::Stdout(_) if e.kind() == std::io::ErrorKind::BrokenPipe => Fail {
                message: String::new(),
                code: 0,
            },
            Out::Stdout(_) => Fail::other(format!("cannot write to standard output: {e}")),
        }
    }
}

impl Write for Out {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        match self {
            Out::File(f) => f.write(b),
            Out::Stdout(s) => s.lock().write(b),
        }
    }

    fn write_all(&mut self, b: &[u8]) -> std::io::Result<()> {
        match self {
            Out::File(f) => f.write_all(b),
            Out::Stdout(s) => s.lock().write_all(b),
        }
    }

    fn flush(&mut self) -> std::io::Result<()> {
        match self {
            Out::File(f) => f.flush(),
            Out::Stdout(s) => s.lock().flush(),
        }
    }
}

/// Write a whole file (the summary JSON, the plots); a failure is the user's path (exit 2).
pub fn write_file(path: &Path, flag: &str, bytes: &[u8]) -> CmdResult {
    std::fs::write(path, bytes)
        .map_err(|e| Fail::input(format!("{flag}: cannot write {}: {e}", path.display())))
}
