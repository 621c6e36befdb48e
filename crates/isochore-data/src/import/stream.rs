//! Reading a large file in pieces, for a caller that needs only its converted rows (the
//! command line's fit): [`import_path_rows`].
//!
//! The file is read [`PIECE`] bytes at a time, cut after its last line break; each piece
//! is hashed (the SHA-256 of the whole file, fed piece by piece), parsed in [`PARTS`] parts
//! shared by the cores, and its rows written straight into the one buffer of rows, while
//! the next piece is read. The text is thus never held whole beside the rows: a 10⁶-row
//! file of 21.5 MB needs its 40 MB of rows and two pieces, not the 21.5 MB of text as well.
//!
//! The result is the one [`super::import_path`] gives, but for the text, which is not
//! kept. Whatever the pieces cannot read exactly as the whole text would be read is left to
//! [`super::import_path`]: quotes in the data (a quoted cell may hold a line break), bytes
//! that are not UTF-8 or a UTF-16 file, a NUL byte, a data-set column, a temperature unit
//! to be guessed from the values (that reads every row first), a σ(T) column (read from
//! the cells), a line of half a piece or more, a first piece whose lines are too few for
//! the delimiter's detection, and any error of the reader (the whole text may hold an
//! earlier fault, a NUL byte say, that is reported first). Row numbers, line numbers,
//! rejected rows, notes, the decimal marks seen and the temperature range then come out as
//! the whole text's do; `tests/large.rs` compares the two readings field by field.

use super::dialect::{self, Marks};
use super::scan::{Chunk, Kit, Scan};
use super::series::{new_series, Row, Scanned};
use super::source::{assembled, effective_limit, hex};
use super::{complete, stem, Import, ImportOptions, Parsed};
use crate::error::{Error, RejectedRow};
use crate::header;
use crate::text::Reader;
use sha2::{Digest, Sha256};
use std::fs::File;
use std::io::Read;
use std::path::Path;
use std::sync::{Condvar, Mutex};

/// Files larger than this (bytes) are read in pieces by [`import_path_rows`]; smaller
/// ones as [`super::import_path`] reads them.
pub const PIECES_ABOVE: u64 = 4 << 20;

/// Bytes read at a time (two pieces are held: the one parsed and the one read ahead).
/// Pieces of 1 MiB saved 3 MiB of the peak but made the two threads wait for each other
/// twice as often, and on a loaded machine a thread that waits loses its core to another
/// process: 10⁶ rows took 90–100 ms instead of 70–75 (2026-12-03, load 3–5).
const PIECE: usize = 2 << 20;

/// Parts each piece is parsed in, shared by the cores (more parts than cores, so that
/// the hash and the read of the next piece fit in beside them).
const PARTS: usize = 8;

/// Imports a file, as [`super::import_path`] does, for a caller that needs only the
/// converted rows, not the cells as typed: a file over [`PIECES_ABOVE`] bytes is read in
/// pieces of 2 MiB, each hashed and parsed while the next is read, so that its text is
/// never held whole (see the module documentation for the files that are read whole all
/// the same). The result equals `import_path`'s, but [`Import::cells`] gives no cells
/// when the text was not kept ([`Import::has_text`]), and then neither do the data sets of
/// [`Import::data_sets_with_cells`].
///
/// # Errors
/// As [`super::import_path`].
pub fn import_path_rows(path: impl AsRef<Path>, options: &ImportOptions) -> Result<Import, Error> {
    let path = path.as_ref();
    match in_pieces(path, options) {
        Some(result) => result,
        None => super::import_path(path, options),
    }
}

/// One part of a piece: its byte range in the piece, its line breaks, and the rows it may
/// hold (a row per line, one more for a last line without a line break).
#[derive(Debug, Clone, Copy)]
struct Part {
    start: usize,
    end: usize,
    lines: usize,
    slots: usize,
}

/// `data[from..]` in [`PARTS`] parts cut after line breaks, into `parts` (emptied; made
/// by the caller with room for them, so that the thread reading ahead allocates nothing).
fn plan(data: &[u8], from: usize, mut parts: Vec<Part>) -> Vec<Part> {
    parts.clear();
    let mut start = from;
    for i in 1..=PARTS {
        let end = if i == PARTS {
            data.len()
        } else {
            let aim = (from + (data.len() - from) * i / PARTS).max(start);
            memchr::memchr(b'\n', &data[aim..]).map_or(data.len(), |k| aim + k + 1)
        };
        let part = &data[start..end];
        let lines = memchr::memchr_iter(b'\n', part).count();
        let open = part.last().is_some_and(|&b| b != b'\n');
        parts.push(Part {
            start,
            end,
            lines,
            slots: lines + usize::from(open),
        });
        start = end;
    }
    parts
}

/// The file, read piece by piece; `None` from a read: an I/O error or more than `limit`
/// bytes (then the whole reading says what is wrong).
struct Source<'a> {
    file: &'a File,
    total: u64,
    limit: u64,
}

/// A piece read: where it is cut (after its last line break, or its end at the end of the
/// file), whether the file ends with it, and its parts.
struct Piece {
    cut: usize,
    eof: bool,
    parts: Vec<Part>,
}

impl Source<'_> {
    /// Reads up to a piece into `buf`, after `tail` (the unfinished line of the piece
    /// before): where the piece is cut (after its last line break, or its end at the end of
    /// the file) and whether the file ends with it. `None`: see [`Source`], or no line
    /// break in a piece, or a line of half a piece or more.
    fn read(&mut self, buf: &mut Vec<u8>, tail: &[u8]) -> Option<(usize, bool)> {
        if tail.len() > PIECE / 2 {
            return None;
        }
        buf.clear();
        buf.extend_from_slice(tail);
        let want = (PIECE - buf.len()) as u64;
        let got = self.file.take(want).read_to_end(buf).ok()? as u64;
        self.total += got;
        if self.total > self.limit {
            return None;
        }
        let eof = got < want;
        let cut = if eof {
            buf.len()
        } else {
            memchr::memrchr(b'\n', buf).map(|i| i + 1)?
        };
        Some((cut, eof))
    }

    /// The next piece of data rows read into `buf` after `tail`, and its parts (in
    /// `parts`). `None` also for a NUL byte or a quote in it.
    fn next(&mut self, buf: &mut Vec<u8>, tail: &[u8], parts: Vec<Part>) -> Option<Piece> {
        let (cut, eof) = self.read(buf, tail)?;
        let data = &buf[..cut];
        if memchr::memchr2(0, b'"', data).is_some() {
            return None;
        }
        Some(Piece {
            cut,
            eof,
            parts: plan(data, 0, parts),
        })
    }
}

/// One job of a piece: the hash of the piece and the read of the next (`Ahead`, which
/// allocates nothing), or the parse of one part into its room in the buffer of rows.
enum Job<'a, 'f> {
    Ahead {
        hasher: &'a mut Sha256,
        done: &'a [u8],
        read: Option<ReadAhead<'a, 'f>>,
    },
    Part {
        scan: Scan<'a>,
        part: Part,
        line: usize,
        room: &'a mut [Row],
        kit: &'a mut Kit,
        out: &'a mut Option<Result<Chunk, Error>>,
    },
}

/// The file, the buffer for the next piece, the unfinished line of this one, and where
/// the next piece's plan goes.
type ReadAhead<'a, 'f> = (
    &'a mut Source<'f>,
    &'a mut Vec<u8>,
    &'a [u8],
    Vec<Part>,
    &'a mut Option<Piece>,
);

impl Job<'_, '_> {
    fn run(self) {
        match self {
            Job::Ahead { hasher, done, read } => {
                hasher.update(done);
                if let Some((source, next, tail, parts, ahead)) = read {
                    *ahead = source.next(next, tail, parts);
                }
            }
            Job::Part {
                scan,
                part,
                line,
                room,
                kit,
                out,
            } => *out = Some(scan.run(part.start, part.end, line, 0, Some(room), Some(kit))),
        }
    }
}

/// Runs the job in `slot`, if it is still there.
fn take(slot: &Mutex<Option<Job<'_, '_>>>) {
    let job = slot.lock().ok().and_then(|mut j| j.take());
    if let Some(job) = job {
        job.run();
    }
}

/// The parts of a piece, given to the two threads once the room for their rows is made.
/// Only these two threads allocate (the parts' findings): with huge pages, every thread
/// that allocates costs an arena of the allocator's and 2 MiB or more of memory.
struct Queue<'a, 'f> {
    /// The jobs not yet taken, and whether they have been given.
    jobs: Mutex<(Vec<Job<'a, 'f>>, bool)>,
    given: Condvar,
}

impl<'a, 'f> Queue<'a, 'f> {
    fn give(&self, jobs: Vec<Job<'a, 'f>>) {
        if let Ok(mut q) = self.jobs.lock() {
            *q = (jobs, true);
        }
        self.given.notify_all();
    }

    /// Runs jobs until none is left (waiting until they are given).
    fn work(&self) {
        loop {
            let job = {
                let Ok(mut q) = self.jobs.lock() else {
                    return;
                };
                loop {
                    if let Some(j) = q.0.pop() {
                        break j;
                    }
                    if q.1 {
                        return;
                    }
                    q = match self.given.wait(q) {
                        Ok(q) => q,
                        Err(_) => return,
                    };
                }
            };
            job.run();
        }
    }
}

/// What the parts have read so far, in file order (the one data set's rows are in the
/// buffer of rows).
struct Gathered {
    set: bool,
    range: (f64, f64),
    notes: Vec<(u32, String)>,
    rejected: Vec<RejectedRow>,
    any_data: bool,
    marks: Marks,
}

impl Gathered {
    /// Takes in the next part's findings (its rows are already in place).
    fn absorb(&mut self, c: Chunk) {
        self.any_data |= c.any_data;
        self.marks.merge(c.marks);
        self.rejected.extend(c.rejected);
        if let (Some(s), Some(&(lo, hi))) = (c.series.into_iter().next(), c.ranges.first()) {
            self.set = true;
            self.range = (self.range.0.min(lo), self.range.1.max(hi));
            self.notes.extend(s.notes);
        }
    }
}

/// The reading in pieces, or `None` where the file is to be read whole (see the module
/// documentation). The errors returned are those found after every row was read (decimal
/// convention, no data rows, too few points, one temperature): the whole reading finds
/// the same.
fn in_pieces(path: &Path, o: &ImportOptions) -> Option<Result<Import, Error>> {
    let file = File::open(path).ok()?;
    let size = file.metadata().ok()?.len();
    let limit = effective_limit(o);
    if size <= PIECES_ABOVE || size > limit {
        return None;
    }
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string());
    let mut source = Source {
        file: &file,
        total: 0,
        limit,
    };
    let mut cur: Vec<u8> = Vec::with_capacity(PIECE);
    let mut next: Vec<u8> = Vec::with_capacity(PIECE);
    // The first piece: the header, and the dialect read from it as from the whole text.
    let (cut, eof) = source.read(&mut cur, &[])?;
    if cur.starts_with(&[0xFF, 0xFE]) || cur.starts_with(&[0xFE, 0xFF]) {
        return None;
    }
    if memchr::memchr(0, &cur[..cut]).is_some() {
        return None;
    }
    let text = std::str::from_utf8(&cur[..cut]).ok()?;
    let start = if text.starts_with('\u{feff}') { 3 } else { 0 };
    // The delimiter's detection looks at up to 400 lines.
    if !eof && memchr::memchr_iter(b'\n', &text.as_bytes()[start..]).count() < 400 {
        return None;
    }
    let h = dialect::read_header(&name, text, start, o).ok()?;
    if memchr::memchr(b'"', &text.as_bytes()[h.data_start..]).is_some() {
        return None;
    }
    // A data row in this piece (a whitespace-delimited header is read by the first one).
    let mut peek = Reader::new(
        text,
        h.data_start,
        h.delimiter,
        o.max_line_bytes,
        o.max_columns,
        &name,
    );
    if !matches!(peek.next_record(), Ok(Some(_))) {
        return None;
    }
    let (mapping, t_known) = match &o.mapping {
        Some(m) => {
            m.check(h.headers.len()).ok()?;
            (m.clone(), true)
        }
        None => {
            let d = header::detect(&h.headers, &name, h.header_line, o).ok()?;
            (d.mapping, d.temperature_unit_known)
        }
    };
    if !t_known || mapping.series.is_some() || mapping.temperature_uncertainty.is_some() {
        return None;
    }
    // Room for the most rows the file can hold (a row takes at least 4 bytes: two cells,
    // a delimiter and a line break): address space only, as pages never written cost no
    // memory; the room left over is given back in the series stage.
    let mut rows: Vec<Row> = Vec::new();
    // (A file that shrank since its size was taken is read all the same.)
    rows.try_reserve_exact((size as usize).saturating_sub(h.data_start) / 4 + 2)
        .ok()?;
    let default_name = stem(&name);
    let scan = Scan {
        file: &name,
        text: "",
        delimiter: h.delimiter,
        o,
        mapping: &mapping,
        headers: &h.headers,
        comma_ok: h.comma_ok,
        default_name: &default_name,
        quote_free: true,
        offset: 0,
        rows_before: 0,
    };
    let mut got = Gathered {
        set: false,
        range: (f64::INFINITY, f64::NEG_INFINITY),
        notes: Vec::new(),
        rejected: Vec::new(),
        any_data: false,
        marks: Marks::default(),
    };
    let mut hasher = Sha256::new();
    let mut piece = Piece {
        cut,
        eof,
        parts: plan(&cur[..cut], h.data_start, Vec::with_capacity(PARTS)),
    };
    let mut line = h.first_line;
    let mut offset = 0usize;
    loop {
        let Piece { cut, eof, parts } = piece;
        let text = std::str::from_utf8(&cur[..cut]).ok()?;
        let w0 = rows.len();
        let slots: usize = parts.iter().map(|p| p.slots).sum();
        let mut found: Vec<Option<Result<Chunk, Error>>> = parts.iter().map(|_| None).collect();
        // What each part works with (see `Kit`), made here.
        let mut kits: Vec<Kit> = parts
            .iter()
            .map(|_| Kit {
                spans: Vec::with_capacity(h.headers.len() + 8),
                series: Vec::with_capacity(1),
                ranges: Vec::with_capacity(1),
                set: Some(new_series(default_name.clone(), 0)),
            })
            .collect();
        let mut ahead: Option<Piece> = None;
        {
            let (done, tail) = cur.split_at(cut);
            let first = Mutex::new(Some(Job::Ahead {
                hasher: &mut hasher,
                done,
                read: (!eof).then_some((
                    &mut source,
                    &mut next,
                    tail,
                    Vec::with_capacity(PARTS),
                    &mut ahead,
                )),
            }));
            let queue = Queue {
                jobs: Mutex::new((Vec::with_capacity(parts.len()), false)),
                given: Condvar::new(),
            };
            let (first, queue, rows, found, kits) =
                (&first, &queue, &mut rows, &mut found, &mut kits);
            let parts = &parts;
            std::thread::scope(move |s| {
                // The other thread hashes this piece and reads the next while this one
                // makes the room for the rows (the first touch of their pages); then
                // both parse the parts.
                let helper = std::thread::Builder::new()
                    .spawn_scoped(s, move || {
                        take(first);
                        queue.work();
                    })
                    .ok();
                rows.resize(w0 + slots, Row::EMPTY);
                let mut room = &mut rows[w0..];
                let mut at = (line, w0);
                let mut jobs = Vec::with_capacity(parts.len());
                for ((&p, out), kit) in parts.iter().zip(found.iter_mut()).zip(kits.iter_mut()) {
                    let (mine, rest) = std::mem::take(&mut room).split_at_mut(p.slots);
                    room = rest;
                    let scan = Scan {
                        text,
                        offset: offset as u32,
                        rows_before: at.1 as u32,
                        ..scan
                    };
                    jobs.push(Job::Part {
                        scan,
                        part: p,
                        line: at.0,
                        room: mine,
                        kit,
                        out,
                    });
                    at = (at.0 + p.lines, at.1 + p.slots);
                }
                // Taken from the end: the first part first.
                jobs.reverse();
                queue.give(jobs);
                queue.work();
                if let Some(h) = helper {
                    // A job of a thread that failed left its finding empty: read whole.
                    let _ = h.join();
                }
                // The other thread did not start: its job is done here.
                take(first);
            });
        }
        // Each part numbered its rows as if every line before it in this piece were a
        // row; where some were not (blank, comment or rejected lines), its rows move down
        // and are renumbered.
        let mut w = w0;
        let mut slot = w0;
        for (p, out) in parts.iter().zip(found) {
            let mut c = out?.ok()?;
            let k = c.in_sink;
            if c.series.first().is_some_and(|s| !s.rows.is_empty()) {
                return None;
            }
            if slot != w {
                let d = (slot - w) as u32;
                rows.copy_within(slot..slot + k, w);
                rows[w..w + k].iter_mut().for_each(|r| r.row -= d);
                if let Some(s) = c.series.first_mut() {
                    s.notes.iter_mut().for_each(|n| n.0 -= d);
                }
            }
            w += k;
            slot += p.slots;
            got.absorb(c);
        }
        rows.truncate(w);
        line += parts.iter().map(|p| p.lines).sum::<usize>();
        offset += cut;
        if eof {
            break;
        }
        piece = ahead?;
        std::mem::swap(&mut cur, &mut next);
    }
    drop((cur, next));
    let header = Parsed {
        headers: h.headers,
        header_line: h.header_line,
        mapping,
        delimiter: h.delimiter,
        decimal_comma: false,
        comma_ok: h.comma_ok,
        series: Vec::new(),
        rejected: Vec::new(),
    };
    let (series, ranges) = if got.set {
        let set = Scanned {
            name: default_name.clone(),
            rows,
            notes: got.notes,
        };
        (vec![set], vec![got.range])
    } else {
        (Vec::new(), Vec::new())
    };
    let chunk = Chunk {
        series,
        ranges,
        rejected: got.rejected,
        any_data: got.any_data,
        marks: got.marks,
        in_sink: 0,
    };
    let sha256 = hex(&hasher.finalize());
    let path_shown = Some(path.display().to_string());
    Some(
        complete(&name, o, header, default_name, chunk)
            .map(|p| assembled(&name, path_shown, sha256, source.total, p, o, String::new())),
    )
}
