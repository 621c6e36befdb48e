//! Source stage of the reading pipeline: the bytes and where they came from.
//!
//! [`import_path`] reads a file, [`import_bytes`] and [`import_text`] take bytes or text in
//! memory. This stage enforces the size limit, decodes the bytes into text (UTF-8 in place,
//! UTF-16, latin-1 fallback: `crate::text::decode`), records the [`SourceInfo`] with the
//! SHA-256 of the bytes read, and hands the text to the rest of the pipeline
//! (`super::parse`). A large file is read in two halves on two threads, each looking for
//! NUL bytes and quotes while its half is in the cache, and the hash of a large input is
//! computed on a thread of its own while the text is parsed.

use super::{parse, Import, ImportOptions};
use crate::error::Error;
use crate::text;
use serde::{Deserialize, Serialize};
use sha2::{Digest, Sha256};
use std::io::Read;
use std::path::Path;

/// Where the data came from.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SourceInfo {
    /// The file name (or the name given to pasted text).
    pub name: String,
    /// The full path, when read from a file.
    #[serde(default)]
    pub path: Option<String>,
    /// SHA-256 of the bytes as read, in lower-case hex.
    pub sha256: String,
    /// Size in bytes.
    pub bytes: u64,
}

/// Imports a file.
///
/// # Errors
/// See [`Error`]: I/O, size limits, header faults, too few points, one temperature.
pub fn import_path(path: impl AsRef<Path>, options: &ImportOptions) -> Result<Import, Error> {
    let path = path.as_ref();
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string());
    let io = |e: std::io::Error| Error::Io {
        path: path.display().to_string(),
        message: e.to_string(),
    };
    let limit = effective_limit(options);
    let file = std::fs::File::open(path).map_err(io)?;
    let size = file.metadata().map_err(io)?.len();
    if size > limit {
        return Err(Error::FileTooLarge {
            file: name,
            bytes: size,
            limit,
        });
    }
    let (bytes, clean) = read_file(file, size, limit).map_err(io)?;
    import_owned(
        &name,
        Some(path.display().to_string()),
        bytes,
        clean,
        options,
    )
}

/// Files larger than this (bytes) are read in two halves on two threads.
const PARALLEL_READ_ABOVE: u64 = 4 << 20;

/// Reads the whole file (at most `limit + 1` bytes, so that a file that grew past the
/// limit is still caught). A large file is read in two halves at once: copying from the
/// page cache and the first touch of each fresh page then happen on two cores, and each
/// thread also looks for NUL bytes and quotes in its half while it is in the cache. The
/// flag returned is true when the file was read that way and has neither.
fn read_file(file: std::fs::File, size: u64, limit: u64) -> std::io::Result<(Vec<u8>, bool)> {
    if size > PARALLEL_READ_ABOVE {
        #[cfg(unix)]
        {
            use std::os::unix::fs::FileExt;
            // Zeroed memory from the allocator costs nothing until it is written.
            let mut bytes = vec![0u8; size as usize];
            let mid = bytes.len() / 2;
            let (lo, hi) = bytes.split_at_mut(mid);
            let f = &file;
            let clean = |half: &[u8]| memchr::memchr2(0, b'"', half).is_none();
            let (ok, clean) = std::thread::scope(|sc| {
                let second = std::thread::Builder::new()
                    .spawn_scoped(sc, move || {
                        f.read_exact_at(hi, mid as u64).map(|()| clean(hi))
                    })
                    .ok();
                let first = f.read_exact_at(lo, 0).map(|()| clean(lo));
                let second = match second {
                    Some(h) => h.join().ok().and_then(Result::ok),
                    None => None,
                };
                match (first, second) {
                    (Ok(a), Some(b)) => (true, a && b),
                    _ => (false, false),
                }
            });
            if ok {
                // Anything written after `size` was taken from the metadata.
                let mut rest = &file;
                std::io::Seek::seek(&mut rest, std::io::SeekFrom::Start(size))?;
                let more = rest
                    .take(limit + 1 - size.min(limit + 1))
                    .read_to_end(&mut bytes)?;
                return Ok((bytes, clean && more == 0));
            }
            // The file changed size while it was read: read it again from the start.
            let mut again = &file;
            std::io::Seek::seek(&mut again, std::io::SeekFrom::Start(0))?;
        }
    }
    let mut bytes = Vec::with_capacity(size as usize + 1);
    file.take(limit + 1).read_to_end(&mut bytes)?;
    Ok((bytes, false))
}

/// Imports bytes (for example a file already in memory). `name` is used in messages.
///
/// # Errors
/// As [`import_path`].
pub fn import_bytes(name: &str, bytes: &[u8], options: &ImportOptions) -> Result<Import, Error> {
    if bytes.len() as u64 > effective_limit(options) {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: bytes.len() as u64,
            limit: effective_limit(options),
        });
    }
    import_owned(name, None, bytes.to_vec(), false, options)
}

/// Imports text pasted from a spreadsheet or typed in. `name` is used in messages.
///
/// # Errors
/// As [`import_path`].
pub fn import_text(name: &str, text: &str, options: &ImportOptions) -> Result<Import, Error> {
    import_bytes(name, text.as_bytes(), options)
}

pub(super) fn effective_limit(o: &ImportOptions) -> u64 {
    o.max_file_bytes.min(u32::MAX as u64 - 1)
}

/// SHA-256 of bytes in lower-case hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    hex(&Sha256::digest(bytes))
}

/// Bytes in lower-case hex.
pub(super) fn hex(digest: &[u8]) -> String {
    const DIGITS: &[u8; 16] = b"0123456789abcdef";
    digest
        .iter()
        .flat_map(|&b| [DIGITS[usize::from(b >> 4)], DIGITS[usize::from(b & 15)]])
        .map(char::from)
        .collect()
}

/// `clean`: the bytes are known to hold no NUL byte and no quote.
fn import_owned(
    name: &str,
    path: Option<String>,
    bytes: Vec<u8>,
    clean: bool,
    options: &ImportOptions,
) -> Result<Import, Error> {
    let n_bytes = bytes.len() as u64;
    let limit = effective_limit(options);
    if n_bytes > limit {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: n_bytes,
            limit,
        });
    }
    // Hash now unless the text will be the very same bytes (then hash in parallel).
    let utf16 = bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]);
    let early_hash = utf16.then(|| sha256_hex(&bytes));
    let (text, start, early_hash, clean) = match text::decode(bytes) {
        // The very same bytes (or a part of them, after a byte-order mark).
        (t, s, None) if !utf16 => (t, s, early_hash, clean),
        (t, s, None) => (t, s, early_hash, false),
        (t, s, Some(original)) => (t, s, Some(sha256_hex(&original)), false),
    };
    if text.len() as u64 > limit {
        return Err(Error::FileTooLarge {
            file: name.to_string(),
            bytes: text.len() as u64,
            limit,
        });
    }
    let (sha, parsed) = std::thread::scope(|s| {
        let worker = if early_hash.is_none() && text.len() > (1 << 20) {
            // The thread only hashes and allocates nothing (the hex is written here): a
            // thread's first allocation gives it an arena of the allocator's, which with
            // huge pages costs 2 MiB of resident memory or more.
            std::thread::Builder::new()
                .spawn_scoped(s, || Sha256::digest(text.as_bytes()))
                .ok()
        } else {
            None
        };
        let parsed = parse(name, &text, start, clean, options);
        let sha = match (early_hash, worker) {
            (Some(h), _) => h,
            (None, Some(w)) => w
                .join()
                .map_or_else(|_| sha256_hex(text.as_bytes()), |d| hex(&d)),
            (None, None) => sha256_hex(text.as_bytes()),
        };
        (sha, parsed)
    });
    let p = parsed?;
    Ok(assembled(name, path, sha, n_bytes, p, options, text))
}

/// The [`Import`] of a parsed file: its source, the data sets made from what the scan
/// read, and the text (empty when it was read in pieces and not kept, see
/// `super::stream`).
pub(super) fn assembled(
    name: &str,
    path: Option<String>,
    sha256: String,
    n_bytes: u64,
    p: super::Parsed,
    options: &ImportOptions,
    text: String,
) -> Import {
    let source = SourceInfo {
        name: name.to_string(),
        path,
        sha256,
        bytes: n_bytes,
    };
    let file = super::series::FileInfo {
        source: &source,
        headers: &p.headers,
        header_line: p.header_line,
        mapping: &p.mapping,
        comma_ok: p.comma_ok,
        options,
    };
    let series = p
        .series
        .into_iter()
        .map(|s| s.into_data_set(&file))
        .collect();
    Import {
        source,
        headers: p.headers,
        header_line: p.header_line,
        mapping: p.mapping,
        delimiter: p.delimiter,
        decimal_comma: p.decimal_comma,
        series,
        rejected: p.rejected,
        comma_ok: p.comma_ok,
        text,
    }
}
