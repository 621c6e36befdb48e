//! Hostile files (issue 17): implausible temperatures refused with their line, one decimal
//! convention per file, underflow named, empty σ cells located by line and column, project
//! messages that name the right column, accept a byte-order mark, mention a backup only
//! when there is one and say a location once; and a seeded mutation fuzz over CSV and
//! project bytes (byte flips, insertions, deletions, truncations of valid files).

use isochore_data::{
    import_bytes, import_text, DecimalMark, Error, ImportOptions, Project, RowProblem,
};

fn opts() -> ImportOptions {
    ImportOptions::default()
}

#[test]
fn an_implausible_temperature_is_refused_with_its_line_unless_confirmed() {
    // A typo of 37.0e300 °C on line 3.
    let text = "T (°C),K\n25,1.5\n37.0e300,2\n45,3\n55,4\n";
    let imp = import_text("typo.csv", text, &opts()).unwrap();
    let r = &imp.rejected[0];
    assert_eq!((r.line, r.column), (3, Some(1)));
    assert!(matches!(
        r.problem,
        RowProblem::ImplausibleTemperature { .. }
    ));
    let msg = imp.clone().strict().unwrap_err().to_string();
    assert!(msg.contains("typo.csv: line 3, column 1"), "{msg}");
    assert!(msg.contains("plausible range 1 to 10000 K"), "{msg}");
    assert!(
        msg.contains("confirm such temperatures explicitly"),
        "{msg}"
    );
    assert!(
        !msg.contains("--"),
        "no command-line flag in a library message: {msg}"
    );
    assert!(msg.len() < 400, "no 300-digit number: {msg}");
    // 0.5 K (in kelvin) is below the range too; confirmed, both are read.
    let text = "T/K,K\n0.5,1.5\n300,2\n310,3\n320,4\n";
    let imp = import_text("cold.csv", text, &opts()).unwrap();
    assert_eq!(imp.rejected.len(), 1);
    assert_eq!(imp.rejected[0].line, 2);
    let confirmed = ImportOptions {
        allow_extreme_temperatures: true,
        ..opts()
    };
    let imp = import_text("cold.csv", text, &confirmed).unwrap();
    assert!(imp.rejected.is_empty());
}

#[test]
fn a_column_that_mixes_decimal_marks_is_refused_with_line_and_column() {
    // Issue 17 item 8: 1,250 / 1.4 / 1,610 / 1800 in a TSV were read as 1.25, 1.4, 1.61, 1800.
    let text = "T (K)\tK\n300\t1,250\n310\t1.4\n320\t1,610\n330\t1800\n";
    match import_text("mixed.tsv", text, &opts()) {
        Err(
            e @ Error::DecimalMark {
                line: 3, column: 2, ..
            },
        ) => {
            let msg = e.to_string();
            assert!(
                msg.starts_with("mixed.tsv: line 3, column 2 ('K'): '1.4'"),
                "{msg}"
            );
            assert!(msg.contains("line 2, column 2 ('1,250')"), "{msg}");
            // The library names the cause and the way out, not a front end's flag.
            assert!(
                msg.contains("state the decimal mark (point or comma)"),
                "{msg}"
            );
            assert!(!msg.contains("--"), "{msg}");
        }
        other => panic!("{other:?}"),
    }
    // Points first, then a comma: the comma is the cell at fault.
    let text = "T (°C);K\n25;1.5\n35;2,25\n45;3\n";
    assert!(matches!(
        import_text("mixed.csv", text, &opts()),
        Err(Error::DecimalMark {
            line: 3,
            column: 2,
            ..
        })
    ));
}

#[test]
fn a_comma_that_may_be_a_thousands_separator_needs_the_convention_stated() {
    // Issue 17 item 8: in a ';' file, 1,500 became 1.5 silently.
    let text = "T (°C);K\n25;1,500\n35;2\n45;3\n55;4\n";
    match import_text("thousands.csv", text, &opts()) {
        Err(
            e @ Error::DecimalMark {
                line: 2, column: 2, ..
            },
        ) => {
            let msg = e.to_string();
            assert!(msg.contains("thousands separator"), "{msg}");
        }
        other => panic!("{other:?}"),
    }
    // Stated as a decimal comma: 1.5. Stated as a point: the cell is not a number.
    let comma = ImportOptions {
        decimal: DecimalMark::Comma,
        ..opts()
    };
    let imp = import_text("thousands.csv", text, &comma).unwrap();
    assert!((imp.series[0].converted().unwrap()[0].ln_k - 1.5f64.ln()).abs() < 1e-12);
    assert!(imp.decimal_comma);
    let point = ImportOptions {
        decimal: DecimalMark::Point,
        ..opts()
    };
    let imp = import_text("thousands.csv", text, &point).unwrap();
    assert_eq!(imp.rejected[0].line, 2);
    assert_eq!(imp.rejected[0].problem, RowProblem::NotANumber);
    // Another cell with an unmistakable decimal comma settles the file: 1,500 is 1.5.
    let text = "T (°C);K\n25;1,500\n35;2,25\n45;3\n";
    let imp = import_text("settled.csv", text, &opts()).unwrap();
    assert!((imp.series[0].converted().unwrap()[0].ln_k - 1.5f64.ln()).abs() < 1e-12);
    // A stated comma with a decimal point in the file is refused.
    let text = "T (°C);K\n25;1,5\n35;2.25\n45;3\n";
    assert!(matches!(
        import_text("stated.csv", text, &comma),
        Err(Error::DecimalMark {
            line: 3,
            column: 2,
            ..
        })
    ));
    // A comma-delimited file keeps reading points as before.
    let text = "T (°C),K\n25,1.5\n35,2.25\n45,3\n";
    assert!(import_text("plain.csv", text, &opts()).is_ok());
}

#[test]
fn an_underflowing_number_is_named_as_such() {
    // Issue 17 item 12: 1e-400 was called "zero or negative".
    let text = "T (°C),K\n25,1e-400\n35,2\n45,3\n55,4\n";
    let imp = import_text("tiny.csv", text, &opts()).unwrap();
    let r = &imp.rejected[0];
    assert_eq!((r.line, r.column), (2, Some(2)));
    assert_eq!(r.problem, RowProblem::Underflow);
    let msg = r.message();
    assert!(msg.contains("underflows"), "{msg}");
    assert!(!msg.contains("zero or negative"), "{msg}");
    // A written zero is still a zero.
    let text = "T (°C),K\n25,0e-400\n35,2\n45,3\n55,4\n";
    let imp = import_text("zero.csv", text, &opts()).unwrap();
    assert_eq!(imp.rejected[0].problem, RowProblem::NonPositiveConstant);
}

#[test]
fn an_empty_sigma_cell_is_located_by_line_and_column() {
    // Issue 17 item 11: the message named "point 2" instead of a line and column.
    let text = "T (°C),K,u(K)\n# comment\n25,1.5,0.01\n35,2,\n45,3,0.02\n";
    let imp = import_text("gaps.csv", text, &opts()).unwrap();
    match imp.check_sigma() {
        Err(
            e @ Error::MissingSigma {
                line: 4, column: 3, ..
            },
        ) => {
            let msg = e.to_string();
            assert!(
                msg.starts_with("gaps.csv: line 4, column 3 ('u(K)')"),
                "{msg}"
            );
            assert!(msg.contains("fit unweighted"), "{msg}");
            assert!(!msg.contains("--"), "{msg}");
            assert!(msg.contains("Fill in"), "{msg}");
        }
        other => panic!("{other:?}"),
    }
    // An entirely empty σ column is a file without uncertainties, not an error.
    let text = "T (°C),K,u(K)\n25,1.5,\n35,2,\n45,3,\n";
    let imp = import_text("none.csv", text, &opts()).unwrap();
    assert!(imp.check_sigma().is_ok());
    // The project keeps the rule, with the line in the original file.
    let text = "T (°C),K,u(K)\n25,1.5,0.01\n35,2,\n45,3,0.02\n";
    let imp = import_text("gaps.csv", text, &opts()).unwrap();
    let p = Project::from_import(&imp);
    assert!(matches!(
        p.series[0].check_sigma(),
        Err(Error::MissingSigma {
            line: 3,
            column: 3,
            ..
        })
    ));
}

fn project_json() -> String {
    let text = "T (°C),K\n25,1.5\n35,2\n45,3\n";
    let imp = import_text("p.csv", text, &opts()).unwrap();
    Project::from_import(&imp).to_json()
}

#[test]
fn a_huge_column_index_in_a_project_is_named_as_written() {
    // Issue 17 item 13: a column index of 2⁶⁴ − 1 was reported as "column 0".
    let json = project_json();
    let key = "\"temperature\": {\n          \"column\": 0";
    assert!(json.contains(key), "{json}");
    let bad = json.replace(key, "\"temperature\": {\n \"column\": 18446744073709551615");
    let msg = Project::from_json(&bad, "huge.isochore.json")
        .unwrap_err()
        .to_string();
    assert!(msg.contains("column 18446744073709551616"), "{msg}");
    assert!(!msg.contains("column 0 "), "{msg}");
}

#[test]
fn a_project_with_a_byte_order_mark_is_read() {
    let json = format!("\u{FEFF}{}", project_json());
    let p = Project::from_json(&json, "bom.isochore.json").unwrap();
    assert_eq!(p.series.len(), 1);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bom.isochore.json");
    std::fs::write(&path, json.as_bytes()).unwrap();
    assert!(Project::load(&path).is_ok());
}

#[test]
fn a_backup_is_mentioned_only_when_it_exists() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("broken.isochore.json");
    std::fs::write(&path, b"{\"schema_version\": 1, \"series\": [}").unwrap();
    let msg = Project::load(&path).unwrap_err().to_string();
    assert!(!msg.contains(".bak"), "no backup exists: {msg}");
    let bak = dir.path().join("broken.isochore.json.bak");
    std::fs::write(&bak, project_json()).unwrap();
    let msg = Project::load(&path).unwrap_err().to_string();
    assert!(msg.contains("broken.isochore.json.bak"), "{msg}");
}

#[test]
fn a_json_location_is_said_once() {
    let msg = Project::from_json("{\"schema_version\": 1, \"series\": [}", "x.isochore.json")
        .unwrap_err()
        .to_string();
    assert!(msg.contains("line 1, column"), "{msg}");
    assert_eq!(msg.matches("line 1").count(), 1, "{msg}");
    assert!(!msg.contains(" at line "), "{msg}");
}

/// A seeded xorshift64* generator (Vigna 2016): the same cases on every run.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }

    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Bytes that matter to the reader, inserted more often than random ones.
const INTERESTING: &[u8] = b",;\t.\"\n\r#-+eE0123456789 \x00\xff\xc2\xb0";

/// One mutation of `base`: a few byte flips, insertions, deletions, duplications or a
/// truncation.
fn mutate(base: &[u8], rng: &mut Rng) -> Vec<u8> {
    let mut v = base.to_vec();
    let edits = 1 + rng.below(4);
    for _ in 0..edits {
        let at = rng.below(v.len() + 1);
        match rng.below(6) {
            0 if at < v.len() => v[at] ^= 1 << rng.below(8),
            1 => {
                let b = if rng.below(2) == 0 {
                    INTERESTING[rng.below(INTERESTING.len())]
                } else {
                    rng.next() as u8
                };
                v.insert(at, b);
            }
            2 if at < v.len() => {
                let n = 1 + rng.below(8).min(v.len() - at - 1);
                v.drain(at..(at + n).min(v.len()));
            }
            3 => v.truncate(at),
            4 if at < v.len() => {
                let end = (at + 1 + rng.below(20)).min(v.len());
                let piece = v[at..end].to_vec();
                let to = rng.below(v.len() + 1);
                v.splice(to..to, piece);
            }
            _ if at < v.len() => v[at] = INTERESTING[rng.below(INTERESTING.len())],
            _ => {}
        }
    }
    v
}

/// Asserts that a whole-file error with a line says it (and its column, when it has one).
fn names_its_location(e: &Error) {
    let msg = e.to_string();
    let (line, column) = match e {
        Error::HeaderOnly { line, .. }
        | Error::LineTooLong { line, .. }
        | Error::TooManyColumns { line, .. }
        | Error::MissingColumn { line, .. }
        | Error::AmbiguousColumns { line, .. } => (Some(*line), None),
        Error::Binary { line, .. } => (Some(*line), None),
        Error::DuplicateHeader { line, second, .. } => (Some(*line), Some(*second)),
        Error::UnknownHeader { line, column, .. }
        | Error::UnknownUnit { line, column, .. }
        | Error::MissingUnit { line, column, .. }
        | Error::BadHeader { line, column, .. }
        | Error::DecimalMark { line, column, .. }
        | Error::MissingSigma { line, column, .. } => (Some(*line), Some(*column)),
        Error::Row { rejected, .. } => (Some(rejected.line), rejected.column),
        _ => (None, None),
    };
    if let Some(l) = line {
        assert!(msg.contains(&format!("line {l}")), "{msg}");
    }
    if let Some(c) = column {
        assert!(msg.contains(&format!("column {c}")), "{msg}");
    }
}

#[test]
fn mutated_csv_and_project_bytes_never_panic_and_errors_say_where() {
    let csvs: [&[u8]; 4] = [
        b"T (\xc2\xb0C),K,u(K),note\n25,1.5,0.01,a\n35,2.0,0.02,\"b, c\"\n45,3.1,0.01,\n55,4.2,0.03,d\n",
        b"T/K;pKa;u(pKa)\n# run 2\n298,15;7,60;0,01\n308,15;7,45;0,01\n318,15;7,31;0,02\n",
        b"sample\tT (K)\tKd (nM)\tsd_Kd (nM)\nA\t290\t12.5\t0.5\nA\t300\t18\t0.6\nA\t310\t25.1\t1\nB\t290\t3\t0.1\nB\t300\t4\t0.1\nB\t310\t5\t0.2\n",
        b"T  lnK\n280 1.2\n290 1.0\n300 0.8\n310 0.65\n",
    ];
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    let o = opts();
    let mut imported = 0;
    for case in 0..3_000 {
        let base = csvs[case % csvs.len()];
        let bytes = mutate(base, &mut rng);
        match import_bytes("fuzz.csv", &bytes, &o) {
            Ok(imp) => {
                imported += 1;
                for r in &imp.rejected {
                    let m = r.message();
                    assert!(m.starts_with(&format!("line {}", r.line)), "{m}");
                    if let Some(c) = r.column {
                        assert!(m.contains(&format!("column {c}")), "{m}");
                    }
                }
                if let Err(e) = imp.check_sigma() {
                    names_its_location(&e);
                }
                for s in &imp.series {
                    let mut s = s.clone();
                    let _ = s.exclude(1, "", "");
                    let _ = s.measurements();
                }
                // A project made from it reads back and converts the same rows.
                let p = Project::from_import(&imp);
                let back = Project::from_json(&p.to_json(), "fuzz.isochore.json")
                    .unwrap_or_else(|e| panic!("case {case}: {e}"));
                for (s, imp_s) in back.series.iter().zip(&imp.series) {
                    let rows = s.converted().unwrap_or_else(|e| panic!("case {case}: {e}"));
                    assert_eq!(rows.len(), imp_s.len());
                }
            }
            Err(e) => names_its_location(&e),
        }
    }
    // The mutations are small enough that many files still import.
    assert!(imported > 300, "only {imported} of 3000 imported");

    let base = project_json().into_bytes();
    for _ in 0..1_500 {
        let bytes = mutate(&base, &mut rng);
        let text = String::from_utf8_lossy(&bytes);
        match Project::from_json(&text, "fuzz.isochore.json") {
            Ok(p) => {
                for s in &p.series {
                    match s.points() {
                        Ok(_) => {}
                        Err(e) => {
                            let msg = e.to_string();
                            if let Error::ProjectRow { rejected, .. } = &e {
                                assert!(msg.contains(&format!("line {}", rejected.line)), "{msg}");
                            }
                        }
                    }
                    let _ = s.check_sigma();
                }
            }
            Err(e) => {
                let msg = e.to_string();
                // serde's location is said once, in front.
                assert!(!msg.contains(" at line "), "{msg}");
                assert!(!msg.contains(".bak"), "no backup exists: {msg}");
            }
        }
    }
}
