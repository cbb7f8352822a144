//! The map's input: a regular file is memory-mapped (read where it lies in the page cache, with
//! no copy into the process), anything else (standard input, a pipe, a device) is read.

use crate::fail::{CmdResult, Fail};
use oblique_map::{InMemory, MapError, MapOptions, WeldMap};
use oblique_window::PairWindow;
use std::io::Read;
use std::path::Path;

/// Set to read regular files with `read` instead of mapping them (for measurements, and for a
/// file that another program may truncate while the map reads it: a mapped file that shrinks
/// under the reader ends the process with SIGBUS).
pub const NO_MMAP_ENV: &str = "OBLIQUE_MAP_NO_MMAP";

/// An opened input.
pub enum Opened {
    /// A regular file, mapped.
    Mapped(memmap2::Mmap),
    /// Anything else, read.
    Reader(Box<dyn Read + Send>),
}

/// The opened input, its length when known, and whether it is a regular file.
pub fn open(path: &Path, stdin: bool, name: &str) -> CmdResult<(Opened, Option<u64>, bool)> {
    if stdin {
        return Ok((Opened::Reader(Box::new(std::io::stdin())), None, false));
    }
    let f =
        std::fs::File::open(path).map_err(|e| Fail::input(format!("{name}: cannot open: {e}")))?;
    let meta = f.metadata().ok();
    let is_file = meta.as_ref().is_some_and(std::fs::Metadata::is_file);
    let len = meta.map(|m| m.len());
    // Unix only: the pages read are given back with madvise, which keeps the memory bounded.
    if cfg!(unix)
        && is_file
        && len.is_some_and(|l| l > 0)
        && std::env::var_os(NO_MMAP_ENV).is_none()
    {
        // SAFETY: the mapping is read-only (shared with the page cache) and its bytes are
        // only read. A file truncated by another program while it is mapped would fault (SIGBUS):
        // documented, with `OBLIQUE_MAP_NO_MMAP` to read such a file instead.
        if let Ok(map) = unsafe { memmap2::Mmap::map(&f) } {
            // A hint only: read ahead along the file.
            #[cfg(unix)]
            let _ = map.advise(memmap2::Advice::Sequential);
            return Ok((Opened::Mapped(map), len, is_file));
        }
    }
    Ok((Opened::Reader(Box::new(f)), len, is_file))
}

/// The weld map over an opened input.
///
/// # Errors
/// As [`WeldMap::open`].
pub fn weld_map<'a>(
    window: &'a PairWindow,
    input: &'a mut Opened,
    opts: &MapOptions,
) -> Result<WeldMap<'a>, MapError> {
    match input {
        Opened::Mapped(map) => {
            let map: &'a memmap2::Mmap = map;
            let release = move |r: std::ops::Range<usize>| {
                // SAFETY: DONTNEED on a read-only shared file mapping only drops this process's
                // copies of those pages (they stay in the page cache and fault back in if read
                // again), so no data can be lost; the map calls it for ranges it is done with,
                // which keeps the resident memory bounded.
                #[cfg(unix)]
                let _ = unsafe {
                    map.unchecked_advise_range(memmap2::UncheckedAdvice::DontNeed, r.start, r.len())
                };
                #[cfg(not(unix))]
                let _ = (map, r);
            };
            WeldMap::open_in_memory(
                window,
                InMemory {
                    bytes: &map[..],
                    release: Box::new(release),
                },
                opts,
            )
        }
        Opened::Reader(r) => WeldMap::open(window, r, opts),
    }
}
