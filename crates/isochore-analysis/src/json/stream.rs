//! The fast writer of a fit's `points` array: the same bytes serde_json writes for
//! [`PointsJson`], without serde's per-field machinery.
//!
//! A million points are 340 MB of JSON; through serde's derived maps (and an unbuffered
//! writer) that took about 5 s. Here each element is written with its keys as constant byte
//! strings, the data set's name and each combination of flags rendered once by serde_json
//! itself, and every number through serde_json's own [`CompactFormatter`] (the same
//! shortest-round-trip formatting its serializer uses, so the bytes cannot drift apart).
//!
//! The rest of the document is still serde's: [`write_streamed`] serializes it once with an
//! empty `points` array and once without the field, finds where the array goes by comparing
//! the two, and writes the points there. If the comparison ever fails to find the one place
//! the document is written by serde whole, so the output never depends on this writer
//! guessing the layout.

use super::{Nulls, PointsJson};
use isochore_fit::Flags;
use serde::Serialize;
use serde_json::ser::{CompactFormatter, Formatter};
use std::io::{self, Write};

/// The element of `"points":[]` that marks where the array goes.
const MARK: &[u8] = b"\"points\":[]";

/// Writes a document whose points are streamed. `with_empty` is the document with an empty
/// `points` array, `without` the same document without the field; `points` writes the
/// elements between the brackets. Falls back to `whole` (the document serialized by serde,
/// points included) when the two serializations do not differ by exactly the field.
///
/// # Errors
/// The writer's.
pub(super) fn write_streamed(
    w: &mut impl Write,
    with_empty: &[u8],
    without: &[u8],
    points: impl FnOnce(&mut dyn Write) -> io::Result<()>,
    whole: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> io::Result<()> {
    let mut out = io::BufWriter::with_capacity(1 << 16, w);
    match split_at_points(with_empty, without) {
        Some(at) => {
            out.write_all(&with_empty[..at])?;
            points(&mut out)?;
            out.write_all(&with_empty[at..])?;
        }
        None => whole(&mut out)?,
    }
    out.flush()
}

/// Where the points go in `with_empty`: the index of the `]` of the one `"points":[]`
/// whose removal (with its separating comma) leaves `without`.
fn split_at_points(with_empty: &[u8], without: &[u8]) -> Option<usize> {
    let extra = with_empty.len().checked_sub(without.len())?;
    if extra != MARK.len() + 1 {
        return None;
    }
    let common = with_empty
        .iter()
        .zip(without)
        .take_while(|(a, b)| a == b)
        .count();
    // The inserted bytes start at or before the first difference.
    (0..=common.min(without.len())).find_map(|q| {
        let inserted = &with_empty[q..q + extra];
        let mark_at = if inserted.starts_with(MARK) && inserted[MARK.len()] == b',' {
            0
        } else if inserted[0] == b',' && inserted[1..] == *MARK {
            1
        } else {
            return None;
        };
        let same = with_empty[..q] == without[..q] && with_empty[q + extra..] == without[q..];
        same.then_some(q + mark_at + MARK.len() - 1)
    })
}

/// The elements of a fit's `points` array (without the brackets), byte for byte as serde
/// writes [`PointsJson`].
///
/// # Errors
/// The writer's.
pub(super) fn write_points(w: &mut dyn Write, p: &PointsJson<'_>) -> io::Result<()> {
    let series = serde_json::to_vec(&p.set.series).map_err(io::Error::from)?;
    let mut flags: [Option<Vec<u8>>; 8] = Default::default();
    let mut f = CompactFormatter;
    // Only the bytes matter here; the undefined values were counted when the document was
    // built.
    let mut scratch = Nulls::new();
    let mut buf: Vec<u8> = Vec::with_capacity(512);
    for (i, pt) in p.each(&mut scratch).enumerate() {
        buf.clear();
        if i > 0 {
            buf.push(b',');
        }
        buf.extend_from_slice(b"{\"row\":");
        f.write_u64(&mut buf, pt.row.get() as u64)?;
        buf.extend_from_slice(b",\"series\":");
        buf.extend_from_slice(&series);
        number(&mut buf, b",\"t_k\":", pt.t_k)?;
        number(&mut buf, b",\"ln_k\":", pt.ln_k)?;
        number(&mut buf, b",\"sigma_ln_k\":", pt.sigma_ln_k)?;
        buf.extend_from_slice(if pt.used {
            b",\"used\":true"
        } else {
            b",\"used\":false"
        });
        number(&mut buf, b",\"fitted\":", pt.fitted)?;
        number(&mut buf, b",\"residual\":", pt.residual)?;
        number(&mut buf, b",\"student_int\":", pt.student_int)?;
        number(&mut buf, b",\"student_ext\":", pt.student_ext)?;
        number(&mut buf, b",\"leverage\":", pt.leverage)?;
        number(&mut buf, b",\"cooks_d\":", pt.cooks_d)?;
        number(&mut buf, b",\"dffits\":", pt.dffits)?;
        buf.extend_from_slice(b",\"flags\":");
        let slot = &mut flags[flag_index(pt.flags)];
        if slot.is_none() {
            *slot = Some(serde_json::to_vec(pt.flags).map_err(io::Error::from)?);
        }
        buf.extend_from_slice(slot.as_deref().unwrap_or_default());
        buf.push(b'}');
        w.write_all(&buf)?;
    }
    Ok(())
}

/// `key` and the number, or `null` (serde_json writes a non-finite f64 as null too).
#[inline]
fn number(buf: &mut Vec<u8>, key: &[u8], v: Option<f64>) -> io::Result<()> {
    buf.extend_from_slice(key);
    match v {
        Some(x) if x.is_finite() => CompactFormatter.write_f64(buf, x),
        _ => {
            buf.extend_from_slice(b"null");
            Ok(())
        }
    }
}

/// The eight combinations of flags, to borrow from when the diagnostics are not kept.
static FLAG_SETS: [Flags; 8] = {
    let mut all = [Flags {
        outlier: false,
        high_leverage: false,
        influential: false,
    }; 8];
    let mut i = 0;
    while i < 8 {
        all[i] = Flags {
            outlier: i & 1 != 0,
            high_leverage: i & 2 != 0,
            influential: i & 4 != 0,
        };
        i += 1;
    }
    all
};

/// `f` as one of [`FLAG_SETS`].
pub(super) fn flag_set(f: Flags) -> &'static Flags {
    &FLAG_SETS[usize::from(f.outlier)
        | usize::from(f.high_leverage) << 1
        | usize::from(f.influential) << 2]
}

/// The combination of flags as a number 0–7.
fn flag_index(f: &Flags) -> usize {
    usize::from(f.outlier) | usize::from(f.high_leverage) << 1 | usize::from(f.influential) << 2
}

/// Serializes `doc` to bytes.
pub(super) fn to_vec(doc: &impl Serialize) -> io::Result<Vec<u8>> {
    serde_json::to_vec(doc).map_err(io::Error::from)
}

#[cfg(test)]
mod tests {
    use super::split_at_points;

    #[test]
    fn the_points_go_where_the_empty_array_was() {
        let with = br#"{"a":1,"points":[],"b":2}"#;
        let without = br#"{"a":1,"b":2}"#;
        let at = split_at_points(with, without).unwrap();
        assert_eq!(&with[..at], br#"{"a":1,"points":["#);
        // Last field: the comma comes before it.
        let with = br#"{"a":1,"points":[]}"#;
        let without = br#"{"a":1}"#;
        assert_eq!(
            &with[..split_at_points(with, without).unwrap()],
            br#"{"a":1,"points":["#
        );
        // A "points" inside a string value is not the field.
        let with = br#"{"s":"\"points\":[],","points":[],"b":2}"#;
        let without = br#"{"s":"\"points\":[],","b":2}"#;
        assert_eq!(
            &with[..split_at_points(with, without).unwrap()],
            br#"{"s":"\"points\":[],","points":["#
        );
        // Anything else: no place, and the caller writes the whole document.
        assert_eq!(split_at_points(b"{}", b"{}"), None);
        assert_eq!(split_at_points(br#"{"points":[1]}"#, b"{}"), None);
    }
}
