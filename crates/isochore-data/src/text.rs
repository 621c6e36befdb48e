//! Bytes to text, and text to records: decoding (UTF-8 with or without byte-order mark,
//! UTF-16 with a byte-order mark, latin-1 for bytes that are not UTF-8), delimiter
//! detection, and a record reader that splits lines into cells while counting physical
//! lines (blank and `#` comment lines are skipped but counted; quoted cells may hold the
//! delimiter, doubled quotes and line breaks).
//!
//! Cells are kept as byte ranges into the decoded text, so reading a row allocates nothing.

use crate::error::Error;
use memchr::memchr;

/// How cells are separated.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Delimiter {
    /// `,`
    Comma,
    /// `;` (common where the decimal mark is a comma)
    Semicolon,
    /// A tab (text copied from a spreadsheet).
    Tab,
    /// Runs of spaces and tabs (instrument text output).
    Whitespace,
    /// `|`
    Pipe,
}

impl Delimiter {
    /// The separating byte, or `None` for runs of whitespace.
    pub fn byte(self) -> Option<u8> {
        match self {
            Delimiter::Comma => Some(b','),
            Delimiter::Semicolon => Some(b';'),
            Delimiter::Tab => Some(b'\t'),
            Delimiter::Pipe => Some(b'|'),
            Delimiter::Whitespace => None,
        }
    }

    /// A word for people: "comma", "semicolon", "tab", "whitespace", "pipe".
    pub fn name(self) -> &'static str {
        match self {
            Delimiter::Comma => "comma",
            Delimiter::Semicolon => "semicolon",
            Delimiter::Tab => "tab",
            Delimiter::Whitespace => "whitespace",
            Delimiter::Pipe => "pipe",
        }
    }
}

/// Decodes file bytes. Returns the text, the byte offset where content starts (after a
/// UTF-8 byte-order mark) and, when the text is not the very same bytes (latin-1
/// fallback), the original bytes. Valid UTF-8 is taken over without copying.
pub(crate) fn decode(bytes: Vec<u8>) -> (String, usize, Option<Vec<u8>>) {
    if bytes.len() >= 2 && (bytes[..2] == [0xFF, 0xFE] || bytes[..2] == [0xFE, 0xFF]) {
        let le = bytes[0] == 0xFF;
        let units = bytes[2..].chunks_exact(2).map(|c| {
            if le {
                u16::from_le_bytes([c[0], c[1]])
            } else {
                u16::from_be_bytes([c[0], c[1]])
            }
        });
        let text: String = char::decode_utf16(units)
            .map(|r| r.unwrap_or(char::REPLACEMENT_CHARACTER))
            .collect();
        return (text, 0, None);
    }
    let start = if bytes.starts_with(&[0xEF, 0xBB, 0xBF]) {
        3
    } else {
        0
    };
    match String::from_utf8(bytes) {
        Ok(s) => (s, start, None),
        Err(e) => {
            // Not UTF-8: keep the valid UTF-8 pieces and read every other byte as latin-1
            // (so a lone 0xB0 is a degree sign, 0xB5 a micro sign).
            let bytes = e.into_bytes();
            let mut s = String::with_capacity(bytes.len() + bytes.len() / 8);
            for chunk in bytes[start..].utf8_chunks() {
                s.push_str(chunk.valid());
                s.extend(chunk.invalid().iter().map(|&b| b as char));
            }
            (s, 0, Some(bytes))
        }
    }
}

/// Finds the first NUL character and returns its 1-based line and character position.
pub(crate) fn find_nul(text: &str, start: usize) -> Option<(usize, usize)> {
    let bytes = text.as_bytes();
    let at = start + memchr(0, &bytes[start..])?;
    let before = &text[start..at];
    let line = 1 + memchr::memchr_iter(b'\n', before.as_bytes()).count();
    let line_start = before.rfind('\n').map(|i| i + 1).unwrap_or(0);
    let character = 1 + before[line_start..].chars().count();
    Some((line, character))
}

/// A cell: byte range into the text, and whether it was quoted with doubled quotes inside.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Span {
    pub start: u32,
    pub end: u32,
    pub escaped: bool,
}

impl Span {
    /// The cell text as typed (inside quotes; doubled quotes still doubled).
    #[inline]
    pub fn raw<'a>(&self, text: &'a str) -> &'a str {
        text.get(self.start as usize..self.end as usize)
            .unwrap_or("")
    }

    /// The cell text with doubled quotes undone.
    pub fn unescaped(&self, text: &str) -> String {
        let r = self.raw(text);
        if self.escaped {
            r.replace("\"\"", "\"")
        } else {
            r.to_string()
        }
    }
}

/// One record (a data or header row): physical line of its start and its byte range.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Record {
    pub line: usize,
    pub start: u32,
    pub end: u32,
}

/// Reads records one by one, skipping blank and comment lines.
pub(crate) struct Reader<'a> {
    text: &'a str,
    pos: usize,
    /// Physical line number of the line at `pos`, minus one.
    line: usize,
    delim: Delimiter,
    max_line: usize,
    max_columns: usize,
    file: &'a str,
    quote_free: bool,
    /// Cells of the last record.
    pub spans: Vec<Span>,
}

impl<'a> Reader<'a> {
    pub fn new(
        text: &'a str,
        start: usize,
        delim: Delimiter,
        max_line: usize,
        max_columns: usize,
        file: &'a str,
    ) -> Self {
        Reader {
            text,
            pos: start,
            line: 0,
            delim,
            max_line,
            max_columns,
            file,
            quote_free: false,
            // Made on the first record (a reader may be given its buffer: `with_spans`).
            spans: Vec::new(),
        }
    }

    /// Uses `spans` (emptied) as the buffer for the cells, so that reading allocates
    /// nothing while records have no more cells than it has room for; [`Reader::spans`]
    /// gives it back.
    pub fn with_spans(mut self, mut spans: Vec<Span>) -> Self {
        spans.clear();
        self.spans = spans;
        self
    }

    /// Skips the per-line search for quotes (the caller knows there are none).
    pub fn without_quotes(mut self, quote_free: bool) -> Self {
        self.quote_free = quote_free;
        self
    }

    /// Continues numbering after physical line `line` (the reader starts at line + 1).
    pub fn starting_after_line(mut self, line: usize) -> Self {
        self.line = line;
        self
    }

    /// Physical line number of the last line read.
    pub fn line(&self) -> usize {
        self.line
    }

    /// Byte offset of the next unread line.
    pub fn position(&self) -> usize {
        self.pos.min(self.text.len())
    }

    fn too_many(&self, line: usize, found: usize) -> Error {
        Error::TooManyColumns {
            file: self.file.to_string(),
            line,
            found,
            limit: self.max_columns,
        }
    }

    /// The next record with its cells in `self.spans`, or `None` at the end.
    pub fn next_record(&mut self) -> Result<Option<Record>, Error> {
        let bytes = self.text.as_bytes();
        let len = bytes.len();
        while self.pos < len {
            if let Some(d) = self.delim.byte() {
                if let Some(rec) = self.fast_line(d)? {
                    return Ok(Some(rec));
                }
            }
            self.line += 1;
            let line_no = self.line;
            let start = self.pos;
            let nl = memchr(b'\n', &bytes[start..])
                .map(|i| start + i)
                .unwrap_or(len);
            let mut end = nl;
            if end > start && bytes[end - 1] == b'\r' {
                end -= 1;
            }
            if end - start > self.max_line {
                return Err(Error::LineTooLong {
                    file: self.file.to_string(),
                    line: line_no,
                    bytes: end - start,
                    limit: self.max_line,
                });
            }
            self.pos = nl + 1;
            let line = &bytes[start..end];
            // Blank and comment lines.
            let first = line.iter().position(|b| !matches!(b, b' ' | b'\t'));
            match first {
                None => continue,
                Some(i) if line[i] == b'#' => continue,
                _ => {}
            }
            self.spans.clear();
            let rec_end = match self.delim.byte() {
                Some(d) => {
                    if self.quote_free || memchr(b'"', line).is_none() {
                        self.split_plain(start, end, d, line_no)?;
                        end
                    } else {
                        self.split_quoted(start, d, line_no)?
                    }
                }
                None => {
                    self.split_whitespace(start, end, line_no)?;
                    end
                }
            };
            // A row of empty cells (",,,") counts as blank.
            if self.spans.iter().all(|s| is_blank(s.raw(self.text))) {
                continue;
            }
            return Ok(Some(Record {
                line: line_no,
                start: start as u32,
                end: rec_end as u32,
            }));
        }
        Ok(None)
    }

    /// One pass over an ordinary line (not blank, not a comment, no quotes, first cell not
    /// empty): finds the cells and the line end together. Returns `None`, having consumed
    /// nothing, when the line needs the general path.
    #[inline]
    fn fast_line(&mut self, d: u8) -> Result<Option<Record>, Error> {
        let bytes = self.text.as_bytes();
        let len = bytes.len();
        let start = self.pos;
        if matches!(bytes[start], b' ' | b'\t' | b'#' | b'\r' | b'\n' | b'"') || bytes[start] == d {
            return Ok(None);
        }
        self.spans.clear();
        let mut cell = start;
        let mut i = start;
        loop {
            // Cells are short: a word-at-a-time search beats a call into the vectorised
            // one, whose set-up costs more than it saves on ten bytes.
            let found = if self.quote_free {
                find_byte(bytes, i, d, b'\n', b'\n')
            } else {
                find_byte(bytes, i, d, b'\n', b'"')
            };
            let Some(k) = found else {
                i = len;
                break;
            };
            i = k;
            let b = bytes[i];
            if b == d {
                self.spans.push(Span {
                    start: cell as u32,
                    end: i as u32,
                    escaped: false,
                });
                cell = i + 1;
                i += 1;
                if self.spans.len() > self.max_columns {
                    return Err(self.too_many(self.line + 1, self.spans.len()));
                }
            } else if b == b'\n' {
                break;
            } else {
                self.spans.clear();
                return Ok(None);
            }
        }
        let nl = i;
        let mut end = nl;
        if end > start && bytes[end - 1] == b'\r' {
            end -= 1;
        }
        self.line += 1;
        if end - start > self.max_line {
            return Err(Error::LineTooLong {
                file: self.file.to_string(),
                line: self.line,
                bytes: end - start,
                limit: self.max_line,
            });
        }
        self.spans.push(Span {
            start: cell.min(end) as u32,
            end: end as u32,
            escaped: false,
        });
        if self.spans.len() > self.max_columns {
            return Err(self.too_many(self.line, self.spans.len()));
        }
        self.pos = nl + 1;
        Ok(Some(Record {
            line: self.line,
            start: start as u32,
            end: end as u32,
        }))
    }

    #[inline]
    fn split_plain(&mut self, start: usize, end: usize, d: u8, line: usize) -> Result<(), Error> {
        let bytes = &self.text.as_bytes()[start..end];
        let mut cell = 0usize;
        for (i, &b) in bytes.iter().enumerate() {
            if b == d {
                self.spans.push(Span {
                    start: (start + cell) as u32,
                    end: (start + i) as u32,
                    escaped: false,
                });
                cell = i + 1;
                if self.spans.len() > self.max_columns {
                    return Err(self.too_many(line, self.spans.len()));
                }
            }
        }
        self.spans.push(Span {
            start: (start + cell) as u32,
            end: end as u32,
            escaped: false,
        });
        if self.spans.len() > self.max_columns {
            return Err(self.too_many(line, self.spans.len()));
        }
        Ok(())
    }

    /// Splits a record that contains quotes; it may run over several physical lines.
    /// Returns the end of the record (before its line break).
    fn split_quoted(&mut self, start: usize, d: u8, line: usize) -> Result<usize, Error> {
        let bytes = self.text.as_bytes();
        let len = bytes.len();
        let mut i = start;
        loop {
            // Start of a cell: optional spaces, then maybe a quote.
            let mut j = i;
            while j < len && bytes[j] == b' ' {
                j += 1;
            }
            // A quote that never closes is read as a plain character, so that one stray
            // quote cannot swallow the rest of the file into a single cell.
            let closing = (j < len && bytes[j] == b'"')
                .then(|| closing_quote(bytes, j + 1))
                .flatten();
            if let Some((k, escaped, breaks)) = closing {
                let content = j + 1;
                self.line += breaks;
                if k - start > self.max_line {
                    return Err(Error::LineTooLong {
                        file: self.file.to_string(),
                        line,
                        bytes: k - start,
                        limit: self.max_line,
                    });
                }
                self.spans.push(Span {
                    start: content as u32,
                    end: k.min(len) as u32,
                    escaped,
                });
                // Skip the closing quote and anything up to the delimiter or line end.
                let mut m = (k + 1).min(len);
                while m < len && bytes[m] != d && bytes[m] != b'\n' {
                    m += 1;
                }
                if self.spans.len() > self.max_columns {
                    return Err(self.too_many(line, self.spans.len()));
                }
                if m < len && bytes[m] == d {
                    i = m + 1;
                    continue;
                }
                let mut rec_end = m;
                if rec_end > start && rec_end <= len && bytes[rec_end - 1] == b'\r' {
                    rec_end -= 1;
                }
                self.pos = m + 1;
                return Ok(rec_end.max(start));
            }
            // Unquoted cell up to the delimiter or line end.
            let mut k = i;
            while k < len && bytes[k] != d && bytes[k] != b'\n' {
                k += 1;
            }
            let mut cend = k;
            if (k >= len || bytes[k] == b'\n') && cend > i && bytes[cend - 1] == b'\r' {
                cend -= 1;
            }
            self.spans.push(Span {
                start: i as u32,
                end: cend as u32,
                escaped: false,
            });
            if self.spans.len() > self.max_columns {
                return Err(self.too_many(line, self.spans.len()));
            }
            if k < len && bytes[k] == d {
                i = k + 1;
                continue;
            }
            self.pos = k + 1;
            return Ok(cend);
        }
    }

    fn split_whitespace(&mut self, start: usize, end: usize, line: usize) -> Result<(), Error> {
        let bytes = &self.text.as_bytes()[start..end];
        let mut i = 0;
        while i < bytes.len() {
            while i < bytes.len() && matches!(bytes[i], b' ' | b'\t') {
                i += 1;
            }
            if i >= bytes.len() {
                break;
            }
            let s = i;
            while i < bytes.len() && !matches!(bytes[i], b' ' | b'\t') {
                i += 1;
            }
            self.spans.push(Span {
                start: (start + s) as u32,
                end: (start + i) as u32,
                escaped: false,
            });
            if self.spans.len() > self.max_columns {
                return Err(self.too_many(line, self.spans.len()));
            }
        }
        Ok(())
    }
}

/// The first index at or after `from` whose byte is `a`, `b` or `c`. Eight bytes at a time:
/// a byte equal to the target makes its XOR zero, and `(x − 0x01…) & !x & 0x80…` flags zero
/// bytes; a false flag can only appear above a true one, so the lowest flag is exact.
#[inline(always)]
pub(crate) fn find_byte(bytes: &[u8], from: usize, a: u8, b: u8, c: u8) -> Option<usize> {
    const LO: u64 = 0x0101_0101_0101_0101;
    const HI: u64 = 0x8080_8080_8080_8080;
    let (sa, sb, sc) = (LO * a as u64, LO * b as u64, LO * c as u64);
    let zero = |x: u64| x.wrapping_sub(LO) & !x;
    let mut i = from;
    while let Some(word) = bytes.get(i..i + 8) {
        let mut w = [0u8; 8];
        w.copy_from_slice(word);
        let w = u64::from_le_bytes(w);
        let m = (zero(w ^ sa) | zero(w ^ sb) | zero(w ^ sc)) & HI;
        if m != 0 {
            return Some(i + (m.trailing_zeros() / 8) as usize);
        }
        i += 8;
    }
    while i < bytes.len() {
        let x = bytes[i];
        if x == a || x == b || x == c {
            return Some(i);
        }
        i += 1;
    }
    None
}

/// From just after an opening quote, finds the closing quote: its index, whether doubled
/// quotes occur inside, and how many line breaks lie inside. `None` if it never closes.
fn closing_quote(bytes: &[u8], from: usize) -> Option<(usize, bool, usize)> {
    let mut k = from;
    let mut escaped = false;
    let mut breaks = 0;
    while k < bytes.len() {
        match bytes[k] {
            b'"' if bytes.get(k + 1) == Some(&b'"') => {
                escaped = true;
                k += 2;
            }
            b'"' => return Some((k, escaped, breaks)),
            b'\n' => {
                breaks += 1;
                k += 1;
            }
            _ => k += 1,
        }
    }
    None
}

/// Splits a whitespace-separated header, keeping units with their names: a token that
/// starts with '(' or '[' or '/', or follows a token ending in '/', joins the previous one.
pub(crate) fn merge_whitespace_header(tokens: Vec<String>) -> Vec<String> {
    let mut out: Vec<String> = Vec::with_capacity(tokens.len());
    for t in tokens {
        let join = match out.last() {
            Some(prev) => {
                t.starts_with(['(', '[', '/'])
                    || prev.ends_with('/')
                    || (prev.contains(['(', '[']) && !prev.contains([')', ']']))
            }
            None => false,
        };
        if join {
            if let Some(prev) = out.last_mut() {
                prev.push(' ');
                prev.push_str(&t);
            }
        } else {
            out.push(t);
        }
    }
    out
}

/// Splits a header line at tabs and at runs of two or more spaces.
pub(crate) fn split_wide(line: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut cur = String::new();
    let mut spaces = 0usize;
    for ch in line.chars() {
        match ch {
            ' ' => spaces += 1,
            '\t' => spaces += 2,
            c => {
                if spaces >= 2 && !cur.is_empty() {
                    out.push(std::mem::take(&mut cur));
                } else if spaces == 1 && !cur.is_empty() {
                    cur.push(' ');
                }
                spaces = 0;
                cur.push(c);
            }
        }
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Recognises a first line `sep=X` naming the delimiter. Returns where the content starts
/// after it, how many lines were skipped (0 or 1) and the delimiter named.
pub(crate) fn separator_line(text: &str, start: usize) -> (usize, usize, Option<Delimiter>) {
    let rest = &text.as_bytes()[start..];
    let end = memchr(b'\n', rest).unwrap_or(rest.len());
    let line = rest[..end].strip_suffix(b"\r").unwrap_or(&rest[..end]);
    if line.len() == 5 && line[..4].eq_ignore_ascii_case(b"sep=") {
        let d = match line[4] {
            b',' => Some(Delimiter::Comma),
            b';' => Some(Delimiter::Semicolon),
            b'\t' => Some(Delimiter::Tab),
            b'|' => Some(Delimiter::Pipe),
            _ => None,
        };
        if d.is_some() {
            return ((start + end + 1).min(text.len()), 1, d);
        }
    }
    (start, 0, None)
}

/// Guesses the delimiter from the first lines that are neither blank nor comments.
pub(crate) fn detect_delimiter(text: &str, start: usize) -> Delimiter {
    let mut lines: Vec<&str> = Vec::new();
    for l in text[start..].split('\n').take(400) {
        let t = l.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        lines.push(if l.len() > 65_536 {
            &l[..floor_char(l, 65_536)]
        } else {
            l
        });
        if lines.len() >= 40 {
            break;
        }
    }
    let Some(header) = lines.first() else {
        return Delimiter::Comma;
    };
    let count = |l: &str, d: u8| -> usize {
        let mut n = 0;
        let mut quoted = false;
        for &b in l.as_bytes() {
            if b == b'"' {
                quoted = !quoted;
            } else if b == d && !quoted {
                n += 1;
            }
        }
        n
    };
    for cand in [
        Delimiter::Tab,
        Delimiter::Semicolon,
        Delimiter::Comma,
        Delimiter::Pipe,
    ] {
        let Some(d) = cand.byte() else { continue };
        let h = count(header, d);
        if h == 0 {
            continue;
        }
        let data = &lines[1..];
        let agree = data.iter().filter(|l| count(l, d) >= h).count();
        if data.is_empty() || agree * 5 >= data.len() * 4 {
            return cand;
        }
    }
    let ws = |l: &str| l.split_whitespace().count();
    if ws(header) >= 2 && lines[1..].iter().all(|l| ws(l) >= 2) {
        return Delimiter::Whitespace;
    }
    Delimiter::Comma
}

/// Whether a cell is empty or only whitespace (quick answer for the usual printable start).
#[inline]
pub(crate) fn is_blank(s: &str) -> bool {
    match s.as_bytes().first() {
        None => true,
        Some(b) if b.is_ascii_graphic() => false,
        _ => s.trim().is_empty(),
    }
}

/// `str::trim`, answering at once when both ends are printable ASCII (the usual cell).
#[inline]
pub(crate) fn trim(s: &str) -> &str {
    match (s.as_bytes().first(), s.as_bytes().last()) {
        (Some(a), Some(b)) if a.is_ascii_graphic() && b.is_ascii_graphic() => s,
        _ => s.trim(),
    }
}

fn floor_char(s: &str, mut i: usize) -> usize {
    while i > 0 && !s.is_char_boundary(i) {
        i -= 1;
    }
    i
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cells(text: &str, d: Delimiter) -> Vec<Vec<String>> {
        let mut r = Reader::new(text, 0, d, 1 << 16, 100, "t");
        let mut out = Vec::new();
        while let Some(_rec) = r.next_record().unwrap() {
            out.push(r.spans.iter().map(|s| s.unescaped(text)).collect());
        }
        out
    }

    #[test]
    fn quotes_crlf_comments() {
        let t = "# c\r\na,\"b,1\"\r\n\r\n\"x \"\"y\"\"\",2\r\n";
        let c = cells(t, Delimiter::Comma);
        assert_eq!(c, vec![vec!["a", "b,1"], vec!["x \"y\"", "2"]]);
    }

    #[test]
    fn multiline_quoted_cell_counts_lines() {
        let t = "h1,h2\n\"two\nlines\",1\nz,2\n";
        let mut r = Reader::new(t, 0, Delimiter::Comma, 1 << 16, 100, "t");
        let a = r.next_record().unwrap().unwrap();
        let b = r.next_record().unwrap().unwrap();
        let c = r.next_record().unwrap().unwrap();
        assert_eq!((a.line, b.line, c.line), (1, 2, 4));
    }

    #[test]
    fn stray_quote_does_not_swallow_the_file() {
        let t = "T,K,note\n1,2,\"oops\n3,4,\n5,6,\n";
        let c = cells(t, Delimiter::Comma);
        assert_eq!(c.len(), 4, "{c:?}");
        assert_eq!(c[1], vec!["1", "2", "\"oops"]);
    }

    #[test]
    fn separator_line_names_the_delimiter() {
        assert_eq!(
            separator_line("sep=;\r\nT;K\n", 0),
            (7, 1, Some(Delimiter::Semicolon))
        );
        assert_eq!(separator_line("T;K\n", 0), (0, 0, None));
    }

    #[test]
    fn delimiter_detection() {
        assert_eq!(detect_delimiter("T;K\n1,5;2,5\n", 0), Delimiter::Semicolon);
        assert_eq!(detect_delimiter("T\tK\n1\t2\n", 0), Delimiter::Tab);
        assert_eq!(detect_delimiter("T,K\n1,2\n", 0), Delimiter::Comma);
        assert_eq!(detect_delimiter("T  K\n1   2\n", 0), Delimiter::Whitespace);
    }

    #[test]
    fn word_search_finds_the_first_match() {
        // Checked against a plain byte-by-byte search (common practice) on every start.
        let t = b"ab,cd\n\"e,fghijklmnopqrst,u\nvwxyz\x80\xff,\n";
        for from in 0..=t.len() {
            let want = t[from..]
                .iter()
                .position(|&x| x == b',' || x == b'\n' || x == b'"')
                .map(|k| from + k);
            assert_eq!(find_byte(t, from, b',', b'\n', b'"'), want, "from {from}");
        }
        assert_eq!(find_byte(b"0123456789", 0, b'9', b'9', b'9'), Some(9));
        assert_eq!(find_byte(b"01234567", 0, b'x', b'y', b'z'), None);
    }

    proptest::proptest! {
        #[test]
        fn word_search_matches_plain_search(
            v in proptest::collection::vec(proptest::prelude::any::<u8>(), 0..70),
            from in 0usize..70,
            a in proptest::prelude::any::<u8>(),
            b in proptest::prelude::any::<u8>(),
        ) {
            let from = from.min(v.len());
            let want = v[from..].iter().position(|&x| x == a || x == b || x == b'"').map(|k| from + k);
            proptest::prop_assert_eq!(find_byte(&v, from, a, b, b'"'), want);
        }

        #[test]
        fn quick_trim_is_trim(s in "\\PC{0,12}") {
            proptest::prop_assert_eq!(trim(&s), s.trim());
        }
    }

    #[test]
    fn latin1_fallback() {
        let (s, _, orig) = decode(b"T (\xB0C)".to_vec());
        assert!(orig.is_some());
        assert_eq!(s, "T (°C)");
        let (s, start, _) = decode(b"\xEF\xBB\xBFT".to_vec());
        assert_eq!(&s[start..], "T");
    }
}
