//! A file large enough (over `TWO_THREADS_ABOVE`, 1 MiB) to be read in two halves on two threads must give the
//! same rows, line numbers, row numbers and rejections as reading it in one pass would.

use isochore_data::{import_text, ImportOptions};

#[test]
fn two_halves_read_like_one() {
    let n = 300_000usize;
    let bad_rows = [7usize, 74_999, 149_999, 150_000, 150_001, 220_001, n - 1];
    let mut text = String::from("# generated\nseries;T (°C);K;note\n");
    for i in 0..n {
        let k = if bad_rows.contains(&i) {
            "oops".to_string()
        } else {
            format!("{}", 100 + i % 97)
        };
        text.push_str(&format!(
            "set_{};{},{:03};{k};n\n",
            i % 3,
            5 + i % 40,
            i % 1000
        ));
    }
    assert!(text.len() > 4 * isochore_data::import::TWO_THREADS_ABOVE);
    // Every temperature is written d,ddd, which could be a thousands separator: the file
    // states its decimal comma (the one-convention rule, README).
    let comma = ImportOptions {
        decimal: isochore_data::DecimalMark::Comma,
        ..ImportOptions::default()
    };
    let imp = import_text("big.csv", &text, &comma).unwrap();
    // Data row i is on physical line i + 3 (a comment line and the header come first).
    let lines: Vec<usize> = imp.rejected.iter().map(|r| r.line).collect();
    assert_eq!(lines, bad_rows.iter().map(|i| i + 3).collect::<Vec<_>>());
    assert!(imp.rejected.iter().all(|r| r.column == Some(3)));
    assert_eq!(imp.series.len(), 3);
    let mut total = 0;
    for (si, s) in imp.series.iter().enumerate() {
        assert_eq!(s.name, format!("set_{si}"));
        let mut prev = 0;
        for (k, r) in s.converted().unwrap().iter().enumerate() {
            assert_eq!(r.row(), k + 1, "row numbers run on across the halves");
            assert!(r.line() > prev);
            prev = r.line();
            let i = r.line() - 3;
            assert_eq!(i % 3, si);
            // T = (5 + i mod 40) + (i mod 1000)/1000 °C, K = 100 + i mod 97.
            let t = (5 + i % 40) as f64 + (i % 1000) as f64 / 1000.0 + 273.15;
            assert!((r.t_k - t).abs() < 1e-9, "line {}", r.line());
            assert!((r.ln_k - ((100 + i % 97) as f64).ln()).abs() < 1e-12);
            assert_eq!(s.note(r), Some("n"));
        }
        total += s.len();
    }
    assert_eq!(total, n - bad_rows.len());
    assert!(imp.decimal_comma);
    // The raw cells of a row from the second half come back as typed.
    let second = imp.series[1].converted().unwrap();
    let r = &second[second.len() - 1];
    let i = r.line() - 3;
    assert_eq!(
        imp.cells(r),
        vec![
            "set_1".to_string(),
            format!("{},{:03}", 5 + i % 40, i % 1000),
            format!("{}", 100 + i % 97),
            "n".to_string()
        ]
    );
}

/// A file over 4 MiB is read from disk in two halves on two threads; the import must be
/// the same as importing the very same bytes from memory (same SHA-256, rows, cells).
#[test]
fn parallel_file_read_matches_bytes() {
    let (text, i) = rows_up_to("T (K),ln K,note", 5 << 20, |i| {
        format!("{},{},row {i}", 280 + i % 50, 1.0 + (i % 7) as f64 / 8.0)
    });
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("big.csv");
    std::fs::write(&path, &text).unwrap();
    let o = ImportOptions::default();
    let from_file = isochore_data::import_path(&path, &o).unwrap();
    let from_bytes = isochore_data::import_bytes("big.csv", text.as_bytes(), &o).unwrap();
    // Every byte arrived: the hash of what was read is the hash of what was written.
    assert_eq!(
        from_file.source.sha256,
        isochore_data::sha256_hex(text.as_bytes())
    );
    assert_eq!(from_file.source.sha256, from_bytes.source.sha256);
    assert_eq!(from_file.source.bytes, text.len() as u64);
    assert_eq!(same_sets(&from_file), same_sets(&from_bytes));
    let rows = from_file.series[0].converted().unwrap();
    let last = rows.last().unwrap();
    assert_eq!(
        from_file.series[0].note(last),
        Some(format!("row {}", i - 1).as_str())
    );
    assert_eq!(from_file.cells(last)[2], format!("row {}", i - 1));
}

/// A data set that first appears in the second half, and notes on only some rows: the
/// second half's rows (kept packed until the halves are joined) come back with the right
/// line, row number, σ and note.
#[test]
fn data_set_only_in_the_second_half() {
    let n = 200_000usize;
    let mut text = String::from("set,T (K),K,sd_K,note\n");
    for i in 0..n {
        let set = if i >= n * 3 / 4 && i % 2 == 1 {
            "late"
        } else {
            "early"
        };
        let note = if i % 7 == 0 {
            format!("x{i}")
        } else {
            String::new()
        };
        let sd = if i % 5 == 0 {
            String::new()
        } else {
            "0.5".to_string()
        };
        text.push_str(&format!(
            "{set},{},{},{sd},{note}\n",
            280 + i % 40,
            10 + i % 13
        ));
    }
    assert!(text.len() > 2 * isochore_data::import::TWO_THREADS_ABOVE);
    let imp = import_text("late.csv", &text, &ImportOptions::default()).unwrap();
    assert!(imp.rejected.is_empty());
    let names: Vec<&str> = imp.series.iter().map(|s| s.name.as_str()).collect();
    assert_eq!(names, ["early", "late"]);
    let mut total = 0;
    for s in &imp.series {
        for (k, r) in s.converted().unwrap().iter().enumerate() {
            assert_eq!(r.row(), k + 1);
            let i = r.line() - 2; // the header is line 1
            assert_eq!(s.name == "late", i >= n * 3 / 4 && i % 2 == 1);
            assert_eq!(r.t_k, (280 + i % 40) as f64);
            assert!((r.ln_k - ((10 + i % 13) as f64).ln()).abs() < 1e-12);
            // σ(ln K) = σ(K)/K, first-order propagation (GUM).
            match r.sigma_ln_k() {
                None => assert_eq!(i % 5, 0),
                Some(v) => assert!((v - 0.5 / (10 + i % 13) as f64).abs() < 1e-15),
            }
            let want = (i % 7 == 0).then(|| format!("x{i}"));
            assert_eq!(s.note(r), want.as_deref(), "line {}", r.line());
        }
        total += s.len();
    }
    assert_eq!(total, n);
}

/// Thousands of data sets, half of them only in the second half of a large file: every one
/// keeps all its rows, in order, numbered from 1.
#[test]
fn many_data_sets_across_the_halves() {
    let n = 60_000usize;
    let sets = 2_500usize;
    let mut text = String::from("series,T (K),ln K\n");
    for i in 0..n {
        let s = if i < n / 2 { i % sets } else { sets + i % sets };
        text.push_str(&format!(
            "set_{s:05},{},{:.9}\n",
            280 + (i / sets) % 12,
            1.0 + i as f64 * 1e-6
        ));
    }
    assert!(text.len() > isochore_data::import::TWO_THREADS_ABOVE);
    let imp = import_text("many.csv", &text, &ImportOptions::default()).unwrap();
    assert!(imp.rejected.is_empty());
    assert_eq!(imp.series.len(), 2 * sets);
    for (k, s) in imp.series.iter().enumerate() {
        assert_eq!(s.name, format!("set_{k:05}"));
        let rows = s.converted().unwrap();
        assert_eq!(rows.len(), n / 2 / sets);
        assert!(rows.windows(2).all(|w| w[0].line() < w[1].line()));
        assert!(rows.iter().enumerate().all(|(j, r)| r.row() == j + 1));
    }
}

/// The threads that read a large file in two halves also look for quotes and NUL bytes; a
/// quote or a NUL byte in either half must still be seen: the quoted cell is read as
/// quoted (as from memory), and the NUL byte makes the file binary, at its line.
#[test]
fn quotes_and_nul_bytes_in_a_large_file_are_seen() {
    let (text, _) = rows_up_to("sample,T (K),ln K", 5 << 20, |i| {
        format!("a,{},{}", 280 + i % 50, 1.0 + (i % 7) as f64 / 8.0)
    });
    let dir = tempfile::tempdir().unwrap();
    let o = ImportOptions::default();
    let n_lines = text.lines().count();
    for (what, at) in [("early", 1000usize), ("late", n_lines - 10)] {
        let mut lines: Vec<String> = text.lines().map(str::to_string).collect();
        // Three rows of a data set whose quoted name holds the delimiter.
        for k in 0..3 {
            lines[at + k] = format!("\"b,c\",{},2.5", 300 + k);
        }
        let quoted = lines.join("\n") + "\n";
        let path = dir.path().join(format!("quoted-{what}.csv"));
        std::fs::write(&path, &quoted).unwrap();
        let from_file = isochore_data::import_path(&path, &o).unwrap();
        let from_bytes = isochore_data::import_bytes("x.csv", quoted.as_bytes(), &o).unwrap();
        assert_eq!(same_sets(&from_file), same_sets(&from_bytes), "{what}");
        let names: Vec<&str> = from_file.series.iter().map(|s| s.name.as_str()).collect();
        assert_eq!(names, ["a", "b,c"], "{what}");

        lines[at + 5].push('\0');
        let binary = lines.join("\n") + "\n";
        let path = dir.path().join(format!("nul-{what}.csv"));
        std::fs::write(&path, &binary).unwrap();
        match isochore_data::import_path(&path, &o) {
            Err(isochore_data::Error::Binary { line, .. }) => {
                assert_eq!(line, at + 6, "{what}: physical line of the NUL byte")
            }
            other => panic!("{what}: {:?}", other.map(|i| i.series.len())),
        }
    }
}

/// The temperature range of a data set is gathered while each half is read and combined
/// at the join: a data set at one temperature in both halves is refused, one whose second
/// half is at another temperature is not.
#[test]
fn one_temperature_is_judged_over_both_halves() {
    for (late_t, refused) in [(300, true), (310, false)] {
        let mut text = String::from("sample,T (K),ln K\n");
        let mut i = 0usize;
        while text.len() < 3 << 20 {
            let late = text.len() > 2 << 20; // well inside the second half
            let t = if late { late_t } else { 300 };
            text.push_str(&format!(
                "flat,{t},{}\nwide,{},1.5\n",
                1.0 + (i % 7) as f64,
                280 + i % 40
            ));
            i += 1;
        }
        match import_text("flat.csv", &text, &ImportOptions::default()) {
            Err(isochore_data::Error::SingleTemperature { series, kelvin, .. }) => {
                assert!(refused, "T = {late_t} late in the file");
                assert_eq!((series.as_str(), kelvin), ("flat", 300.0));
            }
            Ok(imp) => {
                assert!(!refused);
                assert_eq!(imp.series.len(), 2);
            }
            Err(e) => panic!("{e}"),
        }
    }
}

/// A header line and then lines `row(0)`, `row(1)`, … until the text is at least `bytes`
/// long; also returns the number of rows.
fn rows_up_to(header: &str, bytes: usize, row: impl Fn(usize) -> String) -> (String, usize) {
    let mut text = format!("{header}\n");
    let mut i = 0usize;
    while text.len() < bytes {
        text.push_str(&row(i));
        text.push('\n');
        i += 1;
    }
    (text, i)
}

/// A data set's name, converted rows and notes.
type ReadSet<'a> = (String, Vec<isochore_data::Row>, Vec<Option<&'a str>>);

/// What two reads of the same bytes must agree on (the source differs: one has a path):
/// each data set's name, converted rows and notes.
fn same_sets(imp: &isochore_data::Import) -> Vec<ReadSet<'_>> {
    imp.series
        .iter()
        .map(|s| {
            let rows = s.converted().unwrap().into_owned();
            let notes = rows.iter().map(|r| s.note(r)).collect();
            (s.name.clone(), rows, notes)
        })
        .collect()
}

/// A file with one data set (no series column) over `TWO_THREADS_ABOVE` is read by two
/// threads into one buffer of rows: rows rejected, blank and comment lines in both halves
/// (so the first half fills less room than it has lines) must still give every row its
/// line, row number, value and note, in order, with nothing left of the room between.
#[test]
fn one_data_set_read_into_one_buffer() {
    let n = 200_000usize;
    // Rejected rows, and lines without a row, on both sides of the middle.
    let bad = |i: usize| i % 9_973 == 5 || (n / 2 - 10..n / 2 + 10).contains(&i);
    let blank = |i: usize| i % 7_919 == 3 || i == n / 2;
    let mut text = String::from("# invented\nT (K),ln K,note\n");
    let mut want = Vec::new(); // (line, T, note) of each good row
    let mut rejected = Vec::new();
    let mut line = 2usize;
    for i in 0..n {
        if blank(i) {
            text.push_str(if i % 2 == 0 { "\n" } else { "# between\n" });
            line += 1;
        }
        line += 1;
        let t = 280.0 + (i % 400) as f64 / 10.0;
        let note = if i % 11 == 0 {
            format!("n{i}")
        } else {
            String::new()
        };
        if bad(i) {
            text.push_str(&format!("{t},x,{note}\n"));
            rejected.push(line);
        } else {
            text.push_str(&format!("{t},{},{note}\n", 1.0 + (i % 13) as f64 / 4.0));
            want.push((line, t, i, note));
        }
    }
    assert!(text.len() > 2 * isochore_data::import::TWO_THREADS_ABOVE);
    let o = ImportOptions::default();
    let imp = import_text("one.csv", &text, &o).unwrap();
    let got: Vec<usize> = imp.rejected.iter().map(|r| r.line).collect();
    assert_eq!(got, rejected);
    assert_eq!(imp.series.len(), 1);
    let s = &imp.series[0];
    let rows = s.converted().unwrap();
    assert_eq!(rows.len(), want.len());
    for (k, (r, (line, t, i, note))) in rows.iter().zip(&want).enumerate() {
        assert_eq!((r.row(), r.line()), (k + 1, *line), "row {}", k + 1);
        assert_eq!(r.t_k, *t);
        assert_eq!(r.ln_k, 1.0 + (i % 13) as f64 / 4.0);
        assert_eq!(s.note(r), (!note.is_empty()).then_some(note.as_str()));
    }
    // The cells of the last row, from the second half, come back as typed.
    let (_, t, i, note) = want.last().unwrap();
    assert_eq!(
        imp.cells(rows.last().unwrap()),
        [
            t.to_string(),
            (1.0 + (i % 13) as f64 / 4.0).to_string(),
            note.clone()
        ]
    );
    // The same text without its last line feed: the last row is still read.
    let trimmed = text.trim_end_matches('\n');
    let imp = import_text("one.csv", trimmed, &o).unwrap();
    assert_eq!(imp.series[0].len(), want.len());
    let last = imp.series[0].converted().unwrap()[want.len() - 1];
    assert_eq!(last.line(), want.last().unwrap().0);
}
