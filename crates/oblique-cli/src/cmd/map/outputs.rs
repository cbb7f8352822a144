//! The map's output files: written under a temporary name and renamed into place at the end,
//! or standard output.

use crate::fail::{CmdResult, Fail};
use std::io::Write;
use std::path::{Path, PathBuf};

/// An output file: a regular file (or a new name, or a link to one) is written beside its
/// final name and renamed into place at the end, so that a failed or killed run leaves no
/// half-written map behind and the replaced file keeps its permissions; a pipe or device is
/// written in place, never replaced (`oblique_window::write::StagedFile`).
pub struct AtomicFile {
    dest: PathBuf,
    file: oblique_window::write::StagedFile,
}

impl AtomicFile {
    /// Create the file for `dest`; `flag` names it in messages.
    pub fn create(dest: &Path, flag: &str) -> CmdResult<Self> {
        let file = oblique_window::write::StagedFile::create(dest)
            .map_err(|e| flagged(flag, "create", dest, e))?;
        if let Some(n) = file.target().note(dest) {
            errln!("note: {n}");
        }
        Ok(Self {
            dest: dest.to_path_buf(),
            file,
        })
    }

    /// The message for a failed write.
    pub fn write_failure(&self, e: &std::io::Error) -> Fail {
        Fail::other(format!("cannot write {}: {e}", self.dest.display()))
    }

    /// Finish: flush, and rename into place when writing under a temporary name (no fsync: a
    /// map can be made again; the rename only keeps a failed run from leaving half a file).
    pub fn commit(self) -> CmdResult {
        let dest = self.dest;
        self.file
            .commit()
            .map_err(|e| Fail::other(format!("cannot write {}: {e}", dest.display())))
    }
}

impl Write for AtomicFile {
    fn write(&mut self, b: &[u8]) -> std::io::Result<usize> {
        self.file.write(b)
    }

    fn write_all(&mut self, b: &[u8]) -> std::io::Result<()> {
        self.file.write_all(b)
    }

    fn flush(&mut self) -> std::io::Result<()> {
        self.file.flush()
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

/// Write a whole file (the summary JSON, the plots) safely (`oblique_window::write::
/// atomic_write`: atomic for regular files, in place for pipes and devices, links followed);
/// a failure exits as [`crate::common::write_fail`] says (2 for the user's path, 1 for IO).
pub fn write_file(path: &Path, flag: &str, bytes: &[u8]) -> CmdResult {
    oblique_window::write::atomic_write(path, bytes, None)
        .map_err(|e| flagged(flag, "write", path, e))
}

/// A failed write naming the flag, with the exit code of [`crate::common::write_fail`].
fn flagged(flag: &str, what: &str, path: &Path, e: oblique_window::write::WriteError) -> Fail {
    let message = format!("{flag}: cannot {what} {}: {e}", path.display());
    let code = crate::common::write_fail(e).code;
    Fail { message, code }
}
