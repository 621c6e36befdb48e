//! `import_path_rows` reads a file over `PIECES_ABOVE` (4 MiB) in pieces of 2 MiB, never
//! holding its text whole; the import must be `import_path`'s in every field but the text
//! (same SHA-256, rows bit for bit with their line and row numbers and byte ranges,
//! rejected rows, notes, decimal convention, errors), and a file the pieces cannot read
//! exactly (quotes, not UTF-8, a NUL byte, a data-set column, a unit to guess, a σ(T)
//! column, a fault of the reader) is read whole, with the same result. Invented data.

use isochore_data::{
    import::PIECES_ABOVE, import_path, import_path_rows, DecimalMark, Error, Import, ImportOptions,
};
use std::path::Path;

/// A file of `header` and rows made by `row(i)` until it passes `bytes` bytes.
fn file_of(header: &str, bytes: usize, row: impl Fn(usize) -> String) -> String {
    let mut text = format!("{header}\n");
    let mut i = 0;
    while text.len() <= bytes {
        text.push_str(&row(i));
        text.push('\n');
        i += 1;
    }
    text
}

/// Every field of two imports but the text, compared (rows through `PartialEq`: every
/// value, line, row number and byte range; an absent σ equals itself).
fn assert_same(a: &Import, b: &Import) {
    assert_eq!(a.source, b.source);
    assert_eq!(a.headers, b.headers);
    assert_eq!(a.header_line, b.header_line);
    assert_eq!(a.mapping, b.mapping);
    assert_eq!(a.delimiter, b.delimiter);
    assert_eq!(a.decimal_comma, b.decimal_comma);
    assert_eq!(a.comma_is_decimal(), b.comma_is_decimal());
    assert_eq!(a.rejected, b.rejected);
    assert_eq!(a.series.len(), b.series.len());
    for (x, y) in a.series.iter().zip(&b.series) {
        assert_eq!(x, y, "data set '{}'", x.name);
        // Bit for bit, beyond `==` (which holds for 0.0 and -0.0).
        let bits = |s: &isochore_data::DataSet| {
            s.converted()
                .unwrap()
                .iter()
                .map(|r| {
                    (
                        r.t_k.to_bits(),
                        r.ln_k.to_bits(),
                        r.sigma_ln_k().map(f64::to_bits),
                    )
                })
                .collect::<Vec<_>>()
        };
        assert_eq!(bits(x), bits(y));
        for r in x.converted().unwrap().iter() {
            assert_eq!(x.note(r), y.note(r));
        }
    }
}

/// Both readings of `text` written to a file; `Ok` when both read it, with whether the
/// pieces kept no text (read in pieces).
fn both(name: &str, text: &[u8], o: &ImportOptions) -> Result<bool, Box<Error>> {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join(name);
    std::fs::write(&path, text).unwrap();
    compare(&path, o)
}

fn compare(path: &Path, o: &ImportOptions) -> Result<bool, Box<Error>> {
    let whole = import_path(path, o);
    let pieces = import_path_rows(path, o);
    match (whole, pieces) {
        (Ok(a), Ok(b)) => {
            assert_same(&a, &b);
            assert!(a.has_text());
            if !b.has_text() {
                // No cells without the text, and nothing panics asking for them.
                let r = b.series[0].converted().unwrap()[0];
                assert!(b.cells(&r).is_empty());
            }
            Ok(!b.has_text())
        }
        (Err(a), Err(b)) => {
            assert_eq!(a, b);
            Err(Box::new(a))
        }
        (a, b) => panic!("one reading failed: {:?} / {:?}", a.err(), b.err()),
    }
}

const BIG: usize = (PIECES_ABOVE as usize) + (3 << 20) / 2;

#[test]
fn a_large_file_in_pieces_reads_like_the_whole() {
    // The generator's shape (scripts/check_outputs.sh): T in °C, K, σ(K).
    let text = file_of("T (°C),K,sigma_K", BIG, |i| {
        format!(
            "{:.4},{},{:.3e}",
            5.0 + (i % 5500) as f64 / 100.0,
            200_000 - i % 190_000,
            4150.0 - (i % 4000) as f64
        )
    });
    assert_eq!(
        both("plain.csv", text.as_bytes(), &ImportOptions::default()),
        Ok(true)
    );
}

#[test]
fn rejected_blank_comment_and_ragged_lines_keep_their_numbers() {
    // Rows that are not rows (blank, comment, empty cells, ragged, bad numbers) every few
    // hundred lines, so that parts of pieces begin and end among them, a note on some rows,
    // CRLF line ends, a byte-order mark, and no line break after the last row.
    let mut text = String::from("\u{feff}# lab export\r\nT/K;ln K;u(ln K);note\r\n");
    let mut i = 0usize;
    while text.len() <= BIG {
        let line = match i % 397 {
            13 => String::new(),
            50 => "# a comment".to_string(),
            77 => ";;;".to_string(),
            101 => "300;1,5".to_string(),
            150 => "300;abc;0,1;".to_string(),
            200 => format!("{};2,5;0,1;ok;extra", 280 + i % 60),
            _ => format!(
                "{},{:03};{},{:02};0,0{};{}",
                280 + i % 60,
                i % 1000,
                -3 + (i % 7) as i64,
                i % 100,
                1 + i % 9,
                if i.is_multiple_of(11) {
                    format!("n{i}")
                } else {
                    String::new()
                }
            ),
        };
        text.push_str(&line);
        text.push_str("\r\n");
        i += 1;
    }
    text.push_str("301;1,25;0,02;last");
    let o = ImportOptions::default();
    assert_eq!(both("marks.csv", text.as_bytes(), &o), Ok(true));
    // The file does what it is meant to: rejected rows of both kinds, notes, a last row.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("marks.csv");
    std::fs::write(&path, &text).unwrap();
    let imp = import_path_rows(&path, &o).unwrap();
    assert!(!imp.has_text());
    assert!(imp.decimal_comma);
    assert_eq!(imp.rejected.len(), 2 * i.div_ceil(397));
    let s = &imp.series[0];
    let rows = s.converted().unwrap();
    assert!(rows.iter().enumerate().all(|(k, r)| r.row() == k + 1));
    assert!(rows.iter().filter(|r| s.note(r).is_some()).count() > 1000);
    let last = rows.last().unwrap();
    assert_eq!(
        (s.note(last), last.t_k, last.sigma_ln_k()),
        (Some("last"), 301.0, Some(0.02))
    );
    // Skipped rows are reported the same with the convention stated.
    let comma = ImportOptions {
        decimal: DecimalMark::Comma,
        ..ImportOptions::default()
    };
    assert_eq!(both("marks.csv", text.as_bytes(), &comma), Ok(true));
}

#[test]
fn errors_found_after_the_rows_are_the_same() {
    // Mixed decimal marks, the point far down the file.
    let mut text = file_of("T (K);ln K", BIG, |i| {
        format!("{};1,{}", 280 + i % 50, i % 10)
    });
    text.push_str("330;2.5\n");
    let e = both("mixed.csv", text.as_bytes(), &ImportOptions::default()).unwrap_err();
    assert!(matches!(*e, Error::DecimalMark { .. }), "{e:?}");
    // One temperature only.
    let text = file_of("T (K),ln K", BIG, |i| format!("300,{}", i % 10));
    let e = both("one_t.csv", text.as_bytes(), &ImportOptions::default()).unwrap_err();
    assert!(matches!(*e, Error::SingleTemperature { .. }), "{e:?}");
    // Too few good rows.
    let text = file_of("T (K),ln K", BIG, |i| {
        if i < 2 {
            format!("{},1", 300 + i)
        } else {
            "300,x".to_string()
        }
    });
    let e = both("few.csv", text.as_bytes(), &ImportOptions::default()).unwrap_err();
    assert!(matches!(*e, Error::TooFewPoints { .. }), "{e:?}");
}

#[test]
fn what_the_pieces_cannot_read_is_read_whole() {
    let o = ImportOptions::default();
    let body = |i: usize| format!("{},{}", 280 + i % 50, 1.0 + (i % 7) as f64 / 8.0);
    let base = file_of("T (K),ln K", BIG, body);
    // A quote far down (a quoted cell may hold a line break).
    let mut t = base.clone();
    t.push_str("\"300\",1.5\n");
    assert_eq!(both("quote.csv", t.as_bytes(), &o), Ok(false));
    // A NUL byte far down: refused as binary, with its line.
    let mut t = base.clone().into_bytes();
    t.extend_from_slice(b"300,1\x00\n");
    let e = both("nul.csv", &t, &o).unwrap_err();
    assert!(matches!(*e, Error::Binary { .. }), "{e:?}");
    // A latin-1 byte far down: read as latin-1 by the whole reading.
    let mut t = base.clone().into_bytes();
    t.extend_from_slice(b"300,1.5\n# \xb0C\n");
    assert_eq!(both("latin1.csv", &t, &o), Ok(false));
    // A line too long far down.
    let mut t = base.clone();
    t.push_str(&format!("300,{}\n", "1".repeat(70_000)));
    let e = both("long.csv", t.as_bytes(), &o).unwrap_err();
    assert!(matches!(*e, Error::LineTooLong { .. }), "{e:?}");
    // A data-set column.
    let t = file_of("series,T (K),ln K", BIG, |i| {
        format!("s{},{}", i % 3, body(i))
    });
    assert_eq!(both("sets.csv", t.as_bytes(), &o), Ok(false));
    // A temperature without a unit (guessed from every value).
    let t = file_of("T,ln K", BIG, body);
    assert_eq!(both("guess.csv", t.as_bytes(), &o), Ok(false));
    // A σ(T) column (chosen; read from the cells).
    let t = file_of("T (K),ln K,u(T)", BIG, |i| format!("{},0.1", body(i)));
    let sigma_t = ImportOptions {
        columns: vec!["sigma-t=3".parse().unwrap()],
        ..ImportOptions::default()
    };
    assert_eq!(both("sigma_t.csv", t.as_bytes(), &sigma_t), Ok(false));
    // Without the choice, the column is kept but not used and the file is read in pieces.
    assert_eq!(both("u_t.csv", t.as_bytes(), &o), Ok(true));
    // Over the size limit.
    let small = ImportOptions {
        max_file_bytes: PIECES_ABOVE + 1000,
        ..ImportOptions::default()
    };
    let e = both("limit.csv", base.as_bytes(), &small).unwrap_err();
    assert!(matches!(*e, Error::FileTooLarge { .. }), "{e:?}");
}

#[test]
fn whitespace_and_tab_delimited_files_in_pieces() {
    let o = ImportOptions::default();
    let t = file_of("T (K)   ln K   u(ln K)", BIG, |i| {
        format!(
            "{}  {}   0.0{}",
            280 + i % 50,
            1.0 + (i % 7) as f64 / 8.0,
            1 + i % 9
        )
    });
    assert_eq!(both("space.txt", t.as_bytes(), &o), Ok(true));
    let t = file_of("T (°C)\tpKa\tnote", BIG, |i| {
        format!(
            "{}\t7.{:02}\t{}",
            5 + i % 50,
            i % 100,
            if i % 3 == 0 { "x" } else { "" }
        )
    });
    assert_eq!(both("tab.tsv", t.as_bytes(), &o), Ok(true));
}

#[test]
fn a_small_file_is_read_whole() {
    let t = file_of("T (K),ln K", 10_000, |i| {
        format!("{},{}", 280 + i % 50, i % 7)
    });
    assert_eq!(
        both("small.csv", t.as_bytes(), &ImportOptions::default()),
        Ok(false)
    );
}

#[test]
fn a_file_ending_where_a_piece_ends() {
    // Lines of exactly 32 bytes: every piece (a power of two in size) ends with a line
    // break, and the last read finds the end of the file with nothing in it.
    let mut text = format!("{:<31}\n", "T (K),ln K");
    let mut i = 0usize;
    while text.len() < 3 << 21 {
        let row = format!("{},{:.6}", 280 + i % 50, 1.0 + (i % 7) as f64 / 8.0);
        text.push_str(&format!("{row:<31}\n"));
        i += 1;
    }
    assert_eq!(text.len(), 3 << 21);
    assert_eq!(
        both("even.csv", text.as_bytes(), &ImportOptions::default()),
        Ok(true)
    );
}
