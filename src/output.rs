//! The one path from the program to the terminal. Every byte for stdout or stderr goes
//! through [`Escaped`], which shows control characters from the data (ESC, NUL, the other
//! C0 and C1 controls, DEL, bidirectional overrides, line and paragraph separators) as
//! visible escapes instead of letting them act on the terminal; only the newline of
//! multi-line text passes through.
//!
//! Failures of the streams never panic:
//! - stdout: a closed reader (broken pipe, as with `| head`) is quiet: nothing more is
//!   printed, nothing is said, and the run ends as it would have (reports still written,
//!   exit code 0 unless an input failed; see [`Escaped::closed`]); any other failure (disk
//!   full, I/O error) is said on stderr and the run ends with exit code 1.
//! - stderr: a closed reader is ignored; any other failure cannot be reported anywhere, so
//!   it turns an otherwise successful run into exit code 1 ([`stderr_failed`]).

use crate::Failure;
use std::io::{self, Write};
use std::sync::atomic::{AtomicBool, Ordering};

/// Exit code when stdout's reader has gone away (a broken pipe) and nothing else failed:
/// 0, quietly, as tools that are read through `head` usually do, so `set -o pipefail`
/// scripts are not upset.
pub const EXIT_BROKEN_PIPE: u8 = 0;

static STDERR_FAILED: AtomicBool = AtomicBool::new(false);

/// Whether a write to stderr failed for a reason other than a closed reader.
pub fn stderr_failed() -> bool {
    STDERR_FAILED.load(Ordering::Relaxed)
}

/// How escapes are spelled.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Style {
    /// Readable text: `\u{1b}`.
    Text,
    /// Inside JSON strings: `\u001b` (a valid JSON escape). serde_json already escapes the
    /// C0 controls; this catches C1 controls and the bidirectional overrides.
    Json,
}

/// A writer that escapes control characters before they reach `inner`. UTF-8 sequences
/// split across two writes are held back until complete.
pub struct Escaped<W: Write> {
    inner: W,
    style: Style,
    carry: Vec<u8>,
    closed: bool,
}

impl<W: Write> Escaped<W> {
    /// Wraps `inner`.
    pub fn new(inner: W, style: Style) -> Self {
        Escaped {
            inner,
            style,
            carry: Vec::new(),
            closed: false,
        }
    }

    /// Whether the reader has gone away (a broken pipe). From then on writes succeed and
    /// go nowhere, so a command finishes its other work quietly; a long output can stop
    /// early by checking this.
    pub fn closed(&self) -> bool {
        self.closed
    }

    /// Turns a broken pipe into a closed stream; other errors pass.
    fn settle(&mut self, r: io::Result<()>) -> io::Result<()> {
        match r {
            Err(e) if e.kind() == io::ErrorKind::BrokenPipe => {
                self.closed = true;
                self.carry.clear();
                Ok(())
            }
            other => other,
        }
    }
}

/// Length of the longest prefix of `b` that does not end inside a UTF-8 sequence.
fn complete_prefix(b: &[u8]) -> usize {
    let n = b.len();
    for back in 1..=3.min(n) {
        let c = b[n - back];
        if c & 0xC0 == 0x80 {
            continue; // a continuation byte: look further back for the lead
        }
        let need = match c {
            0x00..=0x7F => 1,
            0xC0..=0xDF => 2,
            0xE0..=0xEF => 3,
            0xF0..=0xF7 => 4,
            _ => 1,
        };
        return if back < need { n - back } else { n };
    }
    n
}

/// The escape for one character, or `None` when it may pass.
fn escape_of(c: char, style: Style) -> Option<String> {
    let code = c as u32;
    let bad = (c.is_control() && c != '\n')
        || (0x2028..=0x202E).contains(&code)
        || (0x2066..=0x2069).contains(&code);
    bad.then(|| match style {
        Style::Text => format!("\\u{{{code:x}}}"),
        Style::Json => format!("\\u{code:04x}"),
    })
}

/// Whether byte `b` may start a character that needs an escape.
fn suspicious(b: u8) -> bool {
    (b < 0x20 && b != b'\n') || b == 0x7F || b == 0xC2 || b == 0xE2
}

/// Writes `bytes` (complete UTF-8 sequences) to `w`, escaping what must not reach a
/// terminal.
fn escape_into(w: &mut impl Write, bytes: &[u8], style: Style) -> io::Result<()> {
    let mut start = 0;
    let mut i = 0;
    while i < bytes.len() {
        // Runs of 32 plain bytes (all of a number-heavy JSON document) are passed over a
        // block at a time: the test of a whole block has no branch per byte.
        if let Some(block) = bytes.get(i..i + 32) {
            if !block.iter().fold(false, |any, &b| any | suspicious(b)) {
                i += 32;
                continue;
            }
        }
        if !suspicious(bytes[i]) {
            i += 1;
            continue;
        }
        let len = match bytes[i] {
            0xC2 => 2,
            0xE2 => 3,
            _ => 1,
        };
        let end = (i + len).min(bytes.len());
        let esc = std::str::from_utf8(&bytes[i..end])
            .ok()
            .and_then(|s| s.chars().next())
            .and_then(|c| escape_of(c, style));
        match esc {
            Some(e) => {
                w.write_all(&bytes[start..i])?;
                w.write_all(e.as_bytes())?;
                i = end;
                start = i;
            }
            None => i += 1,
        }
    }
    w.write_all(&bytes[start..])
}

impl<W: Write> Write for Escaped<W> {
    fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
        self.write_all(buf)?;
        Ok(buf.len())
    }

    fn write_all(&mut self, buf: &[u8]) -> io::Result<()> {
        if self.closed {
            return Ok(());
        }
        let r = if self.carry.is_empty() {
            let cut = complete_prefix(buf);
            self.carry.extend_from_slice(&buf[cut..]);
            escape_into(&mut self.inner, &buf[..cut], self.style)
        } else {
            let mut data = std::mem::take(&mut self.carry);
            data.extend_from_slice(buf);
            let cut = complete_prefix(&data);
            self.carry = data[cut..].to_vec();
            escape_into(&mut self.inner, &data[..cut], self.style)
        };
        self.settle(r)
    }

    fn flush(&mut self) -> io::Result<()> {
        if self.closed {
            return Ok(());
        }
        let rest = std::mem::take(&mut self.carry);
        let r = escape_into(&mut self.inner, &rest, self.style).and_then(|()| self.inner.flush());
        self.settle(r)
    }
}

/// stdout, buffered and escaped in `style`.
pub fn stdout(style: Style) -> Escaped<io::BufWriter<io::StdoutLock<'static>>> {
    Escaped::new(
        io::BufWriter::with_capacity(1 << 16, io::stdout().lock()),
        style,
    )
}

/// The failure a stdout write error earns: exit 1 with a message (a closed reader never
/// gets here, see [`Escaped::closed`], but would end the run quietly with
/// [`EXIT_BROKEN_PIPE`]).
pub fn stdout_failure(e: io::Error) -> Failure {
    if e.kind() == io::ErrorKind::BrokenPipe {
        Failure {
            code: EXIT_BROKEN_PIPE,
            message: String::new(),
        }
    } else {
        Failure::input(format!("writing the output failed: {e}"))
    }
}

/// Writes `text` to stderr as it is (escaped, no prefix; a newline is not added).
pub fn stderr_raw(text: &str) {
    let mut w = Escaped::new(io::stderr().lock(), Style::Text);
    let r = w.write_all(text.as_bytes()).and_then(|()| w.flush());
    if let Err(e) = r {
        if e.kind() != io::ErrorKind::BrokenPipe {
            STDERR_FAILED.store(true, Ordering::Relaxed);
        }
    }
}

/// Writes one message line to stderr as `isochore: <message>`, with any number longer
/// than [`LONG_NUMBER_DIGITS`] digits shortened (see [`shorten_long_numbers`]).
pub fn note(message: &str) {
    stderr_raw(&format!("vhfit: {}\n", shorten_long_numbers(message)));
}

/// Numbers with more digits than this are shortened in messages.
pub const LONG_NUMBER_DIGITS: usize = 24;

/// Rewrites every run of digits (with at most one decimal point) longer than
/// [`LONG_NUMBER_DIGITS`] digits as about six significant digits in exponent form, so a
/// value such as 1e300 printed in full by some message never fills the screen.
pub fn shorten_long_numbers(text: &str) -> String {
    let b = text.as_bytes();
    let mut out = String::with_capacity(text.len());
    let mut i = 0;
    let mut copied = 0;
    while i < b.len() {
        if !b[i].is_ascii_digit() {
            i += 1;
            continue;
        }
        let start = i;
        let mut digits = 0;
        let mut point = false;
        while i < b.len() {
            if b[i].is_ascii_digit() {
                digits += 1;
            } else if b[i] == b'.' && !point && i + 1 < b.len() && b[i + 1].is_ascii_digit() {
                point = true;
            } else {
                break;
            }
            i += 1;
        }
        if digits > LONG_NUMBER_DIGITS {
            if let Ok(v) = text[start..i].parse::<f64>() {
                out.push_str(&text[copied..start]);
                out.push_str(&format!("{v:.5e}"));
                copied = i;
            }
        }
    }
    out.push_str(&text[copied..]);
    out
}

/// Writes `text` to stdout (escaped) and flushes.
///
/// # Errors
/// As [`stdout_failure`].
pub fn print(text: &str) -> Result<(), Failure> {
    let mut w = stdout(Style::Text);
    w.write_all(text.as_bytes())
        .and_then(|()| w.flush())
        .map_err(stdout_failure)
}

/// The count and noun in the right number: "1 input", "2 inputs".
pub fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// A number for a message: about six significant digits, exponent form when large or
/// small, so a 300-digit value never fills the screen.
pub fn short(v: f64) -> String {
    isochore_report::content::sig(v, 6)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn through(chunks: &[&[u8]], style: Style) -> String {
        let mut w = Escaped::new(Vec::new(), style);
        for c in chunks {
            w.write_all(c).unwrap();
        }
        w.flush().unwrap();
        String::from_utf8(w.inner).unwrap()
    }

    #[test]
    fn controls_are_escaped_and_text_passes() {
        let s = "a\u{1b}[31mb\0c\td\r\ne\u{9b}f\u{202e}g ΔH° ± 5 °C\n";
        let t = through(&[s.as_bytes()], Style::Text);
        assert_eq!(
            t,
            "a\\u{1b}[31mb\\u{0}c\\u{9}d\\u{d}\ne\\u{9b}f\\u{202e}g ΔH° ± 5 °C\n"
        );
        let j = through(&[s.as_bytes()], Style::Json);
        assert!(j.contains("\\u009b") && j.contains("\\u001b"), "{j}");
    }

    #[test]
    fn sequences_split_across_writes_are_held() {
        let s = "x\u{9b}y°\u{202e}z".as_bytes();
        for cut in 0..s.len() {
            let t = through(&[&s[..cut], &s[cut..]], Style::Text);
            assert_eq!(t, "x\\u{9b}y°\\u{202e}z", "cut at {cut}");
        }
    }

    #[test]
    fn controls_anywhere_in_long_runs_are_escaped() {
        // The block-at-a-time pass over plain bytes must not step over a control in any
        // position of a block, nor over a character that starts at a block's end.
        for bad in ["\u{1b}", "\u{9b}", "\u{202e}", "°"] {
            for at in 0..80 {
                let s = format!("{}{bad}{}", "7".repeat(at), "1".repeat(80 - at));
                let want = format!(
                    "{}{}{}",
                    "7".repeat(at),
                    escape_of(bad.chars().next().unwrap(), Style::Text)
                        .unwrap_or_else(|| bad.to_string()),
                    "1".repeat(80 - at)
                );
                assert_eq!(
                    through(&[s.as_bytes()], Style::Text),
                    want,
                    "{bad:?} at {at}"
                );
            }
        }
    }

    /// A writer whose reader is gone after `room` bytes.
    struct Pipe {
        room: usize,
        got: Vec<u8>,
    }

    impl Write for Pipe {
        fn write(&mut self, buf: &[u8]) -> io::Result<usize> {
            if self.got.len() + buf.len() > self.room {
                return Err(io::ErrorKind::BrokenPipe.into());
            }
            self.got.extend_from_slice(buf);
            Ok(buf.len())
        }
        fn flush(&mut self) -> io::Result<()> {
            Ok(())
        }
    }

    #[test]
    fn a_broken_pipe_closes_quietly_and_other_errors_pass() {
        let mut w = Escaped::new(
            Pipe {
                room: 4,
                got: Vec::new(),
            },
            Style::Text,
        );
        w.write_all(b"abc").unwrap();
        assert!(!w.closed());
        w.write_all(b"defgh").unwrap();
        assert!(w.closed());
        w.write_all(b"more").unwrap();
        w.flush().unwrap();
        assert_eq!(w.inner.got, b"abc");
        let mut full = Escaped::new(Full, Style::Text);
        assert!(full.write_all(b"x").is_err());
        assert!(!full.closed());
    }

    /// A writer that fails as a full disk does.
    struct Full;
    impl Write for Full {
        fn write(&mut self, _: &[u8]) -> io::Result<usize> {
            Err(io::Error::other("no space left"))
        }
        fn flush(&mut self) -> io::Result<()> {
            Ok(())
        }
    }

    #[test]
    fn long_numbers_are_shortened_in_messages() {
        let big = format!("{:.2}", -1e300);
        let m = shorten_long_numbers(&format!("'x' is {big} K; line 12, 2024-01-02"));
        assert_eq!(m, "'x' is -1.00000e300 K; line 12, 2024-01-02");
        let id = "0123456789012345678901234"; // 25 digits: shortened
        assert!(!shorten_long_numbers(id).contains(id));
        let ok = "012345678901234567890123"; // 24 digits: kept
        assert_eq!(shorten_long_numbers(ok), ok);
    }

    #[test]
    fn counts_and_short_numbers() {
        assert_eq!(count(1, "input", "inputs"), "1 input");
        assert_eq!(count(2, "input", "inputs"), "2 inputs");
        assert!(short(1e300).len() < 16, "{}", short(1e300));
    }
}
