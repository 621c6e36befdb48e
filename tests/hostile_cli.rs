//! Regression tests of the command line under hostile use (issue 17): reports never
//! overwrite an input or a file isochore did not write, stdout and stderr failures (full
//! disk, closed pipe) never panic, temperatures closer than the resolution are refused with
//! the unit said, control characters never reach the terminal raw, long numbers and file
//! names are shown usefully, large reports stay small and fast, stale temporaries are
//! cleaned up, and reports get ordinary file permissions. Each test builds its own small
//! input.

use proptest::prelude::*;
use std::io::Read;
use std::path::{Path, PathBuf};
use std::process::{Command, Output, Stdio};

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_vhfit"))
}

fn run_in(dir: &Path, args: &[&str]) -> Output {
    bin()
        .current_dir(dir)
        .args(args)
        .output()
        .expect("the binary runs")
}

fn text(b: &[u8]) -> String {
    String::from_utf8_lossy(b).into_owned()
}

/// Six invented points, K falling with T (ΔH° about −25 kJ/mol), no σ.
const SMALL: &str = "T (K),K\n\
    283.15,2.10\n\
    288.15,1.78\n\
    293.15,1.52\n\
    298.15,1.31\n\
    303.15,1.13\n\
    308.15,0.99\n";

fn write(dir: &Path, name: &str, body: &str) -> PathBuf {
    let p = dir.join(name);
    if let Some(parent) = p.parent() {
        std::fs::create_dir_all(parent).unwrap();
    }
    std::fs::write(&p, body).unwrap();
    p
}

/// Nothing that looks like a crash: no exit 101, no panic text.
fn no_panic(out: &Output, what: &str) {
    let err = text(&out.stderr);
    assert_ne!(out.status.code(), Some(101), "{what}: exit 101\n{err}");
    assert!(out.status.code().is_some(), "{what}: killed by a signal");
    assert!(!err.contains("panicked"), "{what}: {err}");
}

// ---------------------------------------------------------------- items 1 and 2

#[test]
fn a_report_never_overwrites_its_input_file() {
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "data.csv", SMALL);
    for target in ["data.csv", "./data.csv"] {
        let out = run_in(dir.path(), &["fit", "data.csv", "--report", target]);
        no_panic(&out, target);
        assert_eq!(
            out.status.code(),
            Some(2),
            "{target}: {}",
            text(&out.stderr)
        );
        let err = text(&out.stderr);
        assert!(err.contains("data.csv") && err.contains("input"), "{err}");
        assert_eq!(
            std::fs::read_to_string(dir.path().join("data.csv")).unwrap(),
            SMALL,
            "{target}: the input must be untouched"
        );
    }
    // The same file under another name (a hard link) is the input too.
    #[cfg(unix)]
    {
        std::fs::hard_link(dir.path().join("data.csv"), dir.path().join("link.csv")).unwrap();
        let out = run_in(dir.path(), &["fit", "data.csv", "--report", "link.csv"]);
        assert_eq!(out.status.code(), Some(2), "{}", text(&out.stderr));
        assert!(text(&out.stderr).contains("link.csv"));
        assert_eq!(
            std::fs::read_to_string(dir.path().join("data.csv")).unwrap(),
            SMALL
        );
    }
}

#[test]
fn a_report_into_a_missing_folder_names_the_folder() {
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "k.csv", SMALL);
    let out = run_in(dir.path(), &["fit", "k.csv", "--report", "nofolder/k.md"]);
    no_panic(&out, "missing folder");
    assert_ne!(out.status.code(), Some(0));
    let err = text(&out.stderr);
    assert!(
        err.contains("the folder nofolder does not exist"),
        "the error names the missing folder: {err}"
    );
    assert!(
        !dir.path().join("nofolder").exists(),
        "no folder made behind the user's back"
    );
}

#[test]
fn folder_mode_never_overwrites_inputs_and_reads_them_first() {
    let dir = tempfile::tempdir().unwrap();
    // x-data.csv is the user's own data, and also the name the report set of x.csv would
    // give its data table.
    let other = SMALL.replace("2.10", "2.20");
    write(dir.path(), "x.csv", SMALL);
    write(dir.path(), "x-data.csv", &other);
    let out = run_in(dir.path(), &["fit", "x.csv", "x-data.csv", "--report", "."]);
    no_panic(&out, "folder mode");
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stderr));
    let err = text(&out.stderr);
    assert!(err.contains("x-data.csv"), "{err}");
    assert_eq!(
        std::fs::read_to_string(dir.path().join("x-data.csv")).unwrap(),
        other
    );
    assert_eq!(
        std::fs::read_to_string(dir.path().join("x.csv")).unwrap(),
        SMALL
    );
    // Nothing at all was written before the refusal.
    let names: Vec<String> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names.len(), 2, "{names:?}");
}

#[test]
fn reports_replace_only_files_isochore_wrote_and_left_unchanged() {
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "a.csv", SMALL);
    let first = run_in(dir.path(), &["fit", "a.csv", "--report", "out"]);
    assert_eq!(first.status.code(), Some(0), "{}", text(&first.stderr));
    // Writing the same reports again replaces isochore's own files.
    let again = run_in(dir.path(), &["fit", "a.csv", "--report", "out"]);
    assert_eq!(again.status.code(), Some(0), "{}", text(&again.stderr));
    // A report the user has edited since is kept.
    let html = dir.path().join("out/a.html");
    std::fs::write(&html, "my notes").unwrap();
    let third = run_in(dir.path(), &["fit", "a.csv", "--report", "out"]);
    assert_eq!(third.status.code(), Some(2), "{}", text(&third.stderr));
    assert!(text(&third.stderr).contains("a.html"));
    assert_eq!(std::fs::read_to_string(&html).unwrap(), "my notes");
    // A file isochore never wrote is kept, and so is everything else of the set.
    let pdf = write(dir.path(), "mine.pdf", "not a report");
    let out = run_in(dir.path(), &["fit", "a.csv", "--report", "mine.pdf"]);
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stderr));
    assert!(text(&out.stderr).contains("mine.pdf"));
    assert_eq!(std::fs::read_to_string(pdf).unwrap(), "not a report");
}

// ---------------------------------------------------------------- items 3 and 4

/// The command lines of every subcommand, with a good and a bad input.
fn command_lines(good: &str, bad: &str) -> Vec<Vec<String>> {
    let v = |a: &[&str]| a.iter().map(|s| s.to_string()).collect::<Vec<_>>();
    vec![
        v(&["fit", good]),
        v(&["fit", good, "--json"]),
        v(&["fit", good, bad, "--summary"]),
        v(&["fit", bad]),
        v(&["predict", good, "--at", "25"]),
        v(&["predict", good, "--at", "25", "--json"]),
        v(&[
            "two-point",
            "--t1",
            "25",
            "--k1",
            "2",
            "--t2",
            "35",
            "--k2",
            "3",
        ]),
        v(&[
            "two-point",
            "--t1",
            "25",
            "--k1",
            "2",
            "--t2",
            "35",
            "--k2",
            "3",
            "--json",
        ]),
        v(&[
            "two-point",
            "--t1",
            "25",
            "--k1",
            "2",
            "--t2",
            "25",
            "--k2",
            "3",
        ]),
        v(&["--help"]),
        v(&["fit", "--help"]),
        v(&["--version"]),
        v(&["fit"]),
        v(&["nonsense"]),
    ]
}

fn dev_full() -> Option<std::fs::File> {
    std::fs::OpenOptions::new()
        .write(true)
        .open("/dev/full")
        .ok()
}

#[test]
fn stdout_and_stderr_on_a_full_disk_never_panic() {
    if dev_full().is_none() {
        eprintln!("no /dev/full here; skipped");
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "good.csv", SMALL);
    write(dir.path(), "bad.csv", "T (K),K\n300,abc\n310,2\n");
    for args in command_lines("good.csv", "bad.csv") {
        // stdout on a full disk.
        let out = bin()
            .current_dir(dir.path())
            .args(&args)
            .stdout(dev_full().unwrap())
            .output()
            .unwrap();
        no_panic(&out, &format!("{args:?} > /dev/full"));
        // Something was to be printed and could not be: exit 1 (or 2 for bad usage, whose
        // message goes to stderr).
        assert_ne!(out.status.code(), Some(0), "{args:?} > /dev/full");
        if !matches!(args[0].as_str(), "nonsense") && args != ["fit"] {
            let err = text(&out.stderr);
            assert!(
                err.contains("writing the output failed")
                    || err.contains("bad.csv")
                    || err.contains("mK"),
                "{args:?}: {err}"
            );
        }
        // stderr on a full disk.
        let out = bin()
            .current_dir(dir.path())
            .args(&args)
            .stdout(Stdio::null())
            .stderr(dev_full().unwrap())
            .output()
            .unwrap();
        no_panic(&out, &format!("{args:?} 2> /dev/full"));
        let code = out.status.code();
        if args.iter().any(|a| a == "bad.csv") || args[0] == "nonsense" || args == ["fit"] {
            assert!(code == Some(1) || code == Some(2), "{args:?}: {code:?}");
        }
    }
}

#[test]
fn a_closed_pipe_ends_the_run_quietly() {
    let dir = tempfile::tempdir().unwrap();
    // Enough output (JSON of 4,000 points, well over a pipe's 64 KiB) that the writes
    // cannot all land in the pipe before the reader is gone.
    let mut big = String::from("T (K),K\n");
    for i in 0..4000 {
        let t = 280.0 + 40.0 * i as f64 / 4000.0;
        let k = (3000.0 / t - 10.0 + 0.01 * ((i * 7919) % 13) as f64).exp();
        big.push_str(&format!("{t:.4},{k:.6}\n"));
    }
    write(dir.path(), "big.csv", &big);
    write(dir.path(), "bad.csv", "T (K),K\n300,abc\n310,2\n");
    let mut lines = command_lines("big.csv", "bad.csv");
    lines.push(vec!["fit".into(), "big.csv".into(), "--json".into()]);
    lines.push(
        ["fit", "big.csv", "--json", "--report", "closed.html"]
            .map(String::from)
            .to_vec(),
    );
    for args in lines {
        // stdout closed.
        let mut child = bin()
            .current_dir(dir.path())
            .args(&args)
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stdout.take());
        let mut err = String::new();
        child
            .stderr
            .take()
            .unwrap()
            .read_to_string(&mut err)
            .unwrap();
        let status = child.wait().unwrap();
        assert_ne!(status.code(), Some(101), "{args:?} | closed: {err}");
        assert!(!err.contains("panicked"), "{args:?}: {err}");
        assert!(
            !err.contains("writing the output failed"),
            "a closed reader is not an error to report: {args:?}: {err}"
        );
        if args == ["fit", "big.csv", "--json"] {
            assert_eq!(status.code(), Some(0), "quiet exit on a broken pipe: {err}");
        }
        if args == ["fit", "big.csv", "--json", "--report", "closed.html"] {
            assert_eq!(status.code(), Some(0), "{err}");
            assert!(
                dir.path().join("closed.html").is_file(),
                "the report is still written when stdout's reader is gone"
            );
        }
        // stderr closed.
        let mut child = bin()
            .current_dir(dir.path())
            .args(&args)
            .stdout(Stdio::null())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        drop(child.stderr.take());
        let status = child.wait().unwrap();
        assert_ne!(status.code(), Some(101), "{args:?} 2>| closed");
        assert!(status.code().is_some(), "{args:?}: killed by a signal");
    }
}

// ---------------------------------------------------------------- item 6

#[test]
fn two_point_refuses_temperatures_closer_than_a_millikelvin_and_says_the_unit() {
    let dir = tempfile::tempdir().unwrap();
    let tp = |t2: &str, extra: &[&str]| {
        let mut a = vec![
            "two-point",
            "--t1",
            "300",
            "--k1",
            "2",
            "--t2",
            t2,
            "--k2",
            "3",
        ];
        a.extend_from_slice(extra);
        run_in(dir.path(), &a)
    };
    let out = tp("300.0000000001", &[]);
    no_panic(&out, "close temperatures");
    assert_eq!(out.status.code(), Some(2), "{}", text(&out.stdout));
    let err = text(&out.stderr);
    assert!(err.contains("1 mK"), "{err}");
    assert!(err.contains("°C") && err.contains("default"), "{err}");
    assert!(out.stdout.is_empty());
    // 2 mK apart is above the resolution and is computed.
    let out = tp("300.002", &[]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    // Temperatures in the unit given, and the default said.
    let out = tp("310", &[]);
    let t = text(&out.stdout);
    assert!(
        t.contains("300 °C (573.150 K)") && t.contains("310 °C"),
        "{t}"
    );
    assert!(t.contains("read as °C, the default"), "{t}");
    let out = tp("310", &["--temp-unit", "K"]);
    let t = text(&out.stdout);
    assert!(t.contains("at 300 K") && !t.contains("default"), "{t}");
    let out = tp("310", &["--json"]);
    let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(j["temp_unit"], "C");
    assert_eq!(j["temp_unit_assumed"], true);
    // fit applies the same rule: all temperatures within 1 mK are one temperature.
    write(
        dir.path(),
        "near.csv",
        "T (K),K\n300,1.0\n300.0000001,1.2\n300.0000002,1.4\n300.0000003,1.1\n",
    );
    let out = run_in(dir.path(), &["fit", "near.csv"]);
    assert_eq!(out.status.code(), Some(1), "{}", text(&out.stdout));
}

// ---------------------------------------------------------------- item 14

fn has_raw_controls(b: &[u8]) -> bool {
    let s = String::from_utf8_lossy(b);
    s.chars().any(|c| {
        (c.is_control() && c != '\n')
            || ('\u{2028}'..='\u{202e}').contains(&c)
            || ('\u{2066}'..='\u{2069}').contains(&c)
    })
}

#[test]
fn control_characters_never_reach_the_terminal() {
    let dir = tempfile::tempdir().unwrap();
    let name = "evil\u{1b}[2J\u{9b}31m\u{202e}name";
    let body = format!(
        "series,T (K),K\n{name},283.15,2.10\n{name},293.15,1.52\n{name},303.15,1.13\n{name},308.15,0.99\n"
    );
    write(dir.path(), "evil.csv", &body);
    for args in [
        vec!["fit", "evil.csv"],
        vec!["fit", "evil.csv", "--summary"],
        vec!["predict", "evil.csv", "--at", "25"],
    ] {
        let out = run_in(dir.path(), &args);
        assert_eq!(
            out.status.code(),
            Some(0),
            "{args:?}: {}",
            text(&out.stderr)
        );
        assert!(
            !has_raw_controls(&out.stdout),
            "{args:?}: {:?}",
            text(&out.stdout)
        );
        assert!(text(&out.stdout).contains("evil\\u{1b}[2J\\u{9b}31m\\u{202e}name"));
    }
    // JSON stays valid and carries the name exactly.
    for args in [
        vec!["fit", "evil.csv", "--json"],
        vec!["predict", "evil.csv", "--at", "25", "--json"],
    ] {
        let out = run_in(dir.path(), &args);
        assert!(!has_raw_controls(&out.stdout), "{args:?}");
        let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        let series = j["series"]
            .as_str()
            .or_else(|| j["points"][0]["series"].as_str());
        assert_eq!(series, Some(name), "{args:?}");
    }
    // Errors quoting a cell: escaped too.
    write(dir.path(), "bad.csv", "T (K),K\n300,a\u{1b}[31mb\n310,2\n");
    let out = run_in(dir.path(), &["fit", "bad.csv"]);
    assert_eq!(out.status.code(), Some(1));
    assert!(!has_raw_controls(&out.stderr), "{:?}", text(&out.stderr));
    // A file name with a control character.
    let odd = "odd\u{1b}]0;title\u{7}.csv".to_string();
    let out = run_in(dir.path(), &["fit", &odd]);
    assert_eq!(out.status.code(), Some(1));
    assert!(!has_raw_controls(&out.stderr), "{:?}", text(&out.stderr));
}

fn longest_digit_run(s: &str) -> usize {
    s.split(|c: char| !c.is_ascii_digit())
        .map(str::len)
        .max()
        .unwrap_or(0)
}

#[test]
fn messages_show_short_numbers_full_paths_and_proper_plurals() {
    let dir = tempfile::tempdir().unwrap();
    // A 300-digit value in a message.
    write(dir.path(), "huge.csv", "T (°C),K\n-1e300,2\n25,3\n35,4\n");
    write(dir.path(), "good.csv", SMALL);
    for args in [
        vec!["fit", "huge.csv"],
        vec!["predict", "good.csv", "--at=-1e300"],
        vec![
            "two-point",
            "--t1=-1e300",
            "--k1",
            "2",
            "--t2",
            "35",
            "--k2",
            "3",
        ],
    ] {
        let out = run_in(dir.path(), &args);
        no_panic(&out, &format!("{args:?}"));
        assert_ne!(out.status.code(), Some(0), "{args:?}");
        let all = format!("{}{}", text(&out.stdout), text(&out.stderr));
        assert!(longest_digit_run(&all) <= 24, "{args:?}: {all}");
    }
    // Two files of the same name in different folders are told apart.
    write(dir.path(), "d1/x.csv", "T (K),K\n300,abc\n310,2\n");
    write(dir.path(), "d2/x.csv", "T (K),K\n300,2\n310,xyz\n");
    let out = run_in(dir.path(), &["fit", "d1/x.csv", "d2/x.csv"]);
    let err = text(&out.stderr);
    assert!(
        err.contains("d1/x.csv") && err.contains("d2/x.csv"),
        "{err}"
    );
    // Singular and plural in words.
    let out = run_in(dir.path(), &["fit", "d1/x.csv"]);
    let err = text(&out.stderr);
    let last = err.lines().last().unwrap_or_default();
    assert_eq!(last, "vhfit: 1 input could not be used", "{err}");
    let out = run_in(dir.path(), &["fit", "good.csv", "d1/x.csv"]);
    let err = text(&out.stderr);
    let last = err.lines().last().unwrap_or_default();
    assert_eq!(
        last, "vhfit: 1 input could not be used; the 1 result that could be computed is above",
        "{err}"
    );
}

// ---------------------------------------------------------------- item 15

#[test]
fn a_200k_row_report_is_drawn_small_and_its_table_capped() {
    let dir = tempfile::tempdir().unwrap();
    let n = 200_000;
    let mut body = String::with_capacity(n * 24);
    body.push_str("T (K),K\n");
    for i in 0..n {
        let t = 280.0 + 40.0 * (i as f64) / (n as f64);
        // ln K = 3000/T − 10 with a deterministic scatter of ±0.05.
        let k = (3000.0 / t - 10.0 + 0.05 * (((i * 7919) % 101) as f64 / 50.0 - 1.0)).exp();
        body.push_str(&format!("{t:.5},{k:.6}\n"));
    }
    write(dir.path(), "big.csv", &body);
    let out = run_in(
        dir.path(),
        &["fit", "big.csv", "--summary", "--report", "big.html"],
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let html = std::fs::read_to_string(dir.path().join("big.html")).unwrap();
    assert!(
        html.contains("The first 500 of 200000 rows are shown"),
        "the data table is capped with a note"
    );
    assert!(
        html.contains("big.csv"),
        "the note says where the full data are"
    );
    // Every point drawn as its own circle would make the page tens of MB (three figures
    // of 200,000 elements); the envelope keeps it small.
    assert!(html.len() < 4_000_000, "{} bytes", html.len());
    let out = run_in(
        dir.path(),
        &["fit", "big.csv", "--summary", "--report", "big.png"],
    );
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let png = std::fs::read(dir.path().join("big.png")).unwrap();
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");
}

// ---------------------------------------------------------------- item 16

#[test]
fn stale_temporaries_are_removed_and_said() {
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "a.csv", SMALL);
    let old = write(dir.path(), ".isochore-abc123.part", "half a report");
    let f = std::fs::File::options().write(true).open(&old).unwrap();
    f.set_modified(std::time::SystemTime::now() - std::time::Duration::from_secs(3600))
        .unwrap();
    drop(f);
    // A temporary of a running process (this test), just written: left alone.
    let live = write(
        dir.path(),
        &format!(".isochore-{}-0-0.part", std::process::id()),
        "being written",
    );
    let out = run_in(dir.path(), &["fit", "a.csv", "--report", "r.html"]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let err = text(&out.stderr);
    assert!(err.contains("removed 1 stale temporary file"), "{err}");
    assert!(err.contains(".isochore-abc123.part"), "{err}");
    assert!(!old.exists());
    assert!(live.exists());
}

// ---------------------------------------------------------------- item 17

#[cfg(unix)]
#[test]
fn reports_get_ordinary_file_permissions_under_the_umask() {
    use std::os::unix::fs::PermissionsExt;
    let dir = tempfile::tempdir().unwrap();
    write(dir.path(), "a.csv", SMALL);
    for (umask, expected) in [("022", 0o644), ("027", 0o640)] {
        let report = format!("r{umask}.html");
        let status = Command::new("sh")
            .current_dir(dir.path())
            .arg("-c")
            .arg(format!(
                "umask {umask} && exec \"$0\" fit a.csv --report {report}"
            ))
            .arg(env!("CARGO_BIN_EXE_vhfit"))
            .stdout(Stdio::null())
            .status()
            .unwrap();
        assert!(status.success());
        let mode = std::fs::metadata(dir.path().join(&report))
            .unwrap()
            .permissions()
            .mode()
            & 0o777;
        assert_eq!(mode, expected, "umask {umask}: mode {mode:o}");
    }
}

// ---------------------------------------------------------------- proptests

/// Names mixing markup, quotes, control characters and ordinary text.
fn hostile_name() -> impl Strategy<Value = String> {
    let pieces = prop::sample::select(vec![
        "<script>alert(1)</script>",
        "&amp;",
        "\"",
        "'",
        "|",
        "*",
        "_",
        "`",
        "#",
        "\u{1b}[31m",
        "\u{1b}]0;x\u{7}",
        "\u{9b}",
        "\u{85}",
        "\u{202e}",
        "\u{2028}",
        "\t",
        "\r",
        "ΔH°",
        "a",
        "name",
        " ",
        "∞",
    ]);
    prop::collection::vec(pieces, 1..8).prop_map(|v| v.concat())
}

fn csv_field(s: &str) -> String {
    format!("\"{}\"", s.replace('"', "\"\""))
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 16, .. ProptestConfig::default() })]

    /// Hostile series names through the command line (text, JSON, and a report): no
    /// crash, nothing raw on the terminal, JSON that parses back to the same name.
    #[test]
    fn hostile_names_through_the_command_line(name in hostile_name()) {
        let dir = tempfile::tempdir().unwrap();
        let field = csv_field(&name);
        let body = format!(
            "series,T (K),K\n{field},283.15,2.10\n{field},293.15,1.52\n{field},303.15,1.13\n{field},308.15,0.99\n"
        );
        write(dir.path(), "h.csv", &body);
        let out = run_in(dir.path(), &["fit", "h.csv", "--report", "h.html"]);
        prop_assert_ne!(out.status.code(), Some(101));
        prop_assert!(!has_raw_controls(&out.stdout), "{:?}", text(&out.stdout));
        prop_assert!(!has_raw_controls(&out.stderr), "{:?}", text(&out.stderr));
        if out.status.code() == Some(0) {
            let html = std::fs::read_to_string(dir.path().join("h.html")).unwrap();
            prop_assert!(!html.contains("<script>alert"));
            let out = run_in(dir.path(), &["fit", "h.csv", "--json"]);
            prop_assert!(!has_raw_controls(&out.stdout));
            let j: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
            let series = j["points"][0]["series"].as_str().unwrap_or_default().to_string();
            // The reader trims surrounding white space (a name that is all white space
            // leaves the series named after the file); the rest is kept exactly.
            if !name.trim().is_empty() {
                prop_assert_eq!(series.trim(), name.trim());
            }
        }
    }
}

/// A report input with hostile text everywhere a caller can put text.
fn hostile_input(name: &str) -> isochore_report::ReportInput {
    let temps = [283.15, 293.15, 303.15, 308.15, 313.15];
    let m: Vec<isochore_fit::Measurement> = temps
        .iter()
        .enumerate()
        .map(|(i, &t)| isochore_fit::Measurement {
            t_k: t,
            ln_k: 3000.0 / t - 10.0 + 0.01 * i as f64,
            sigma_ln_k: Some(0.02),
            included: i != 2,
        })
        .collect();
    let fit = isochore_fit::fit(&m, &isochore_fit::FitOptions::default()).unwrap();
    let rows = m
        .iter()
        .enumerate()
        .map(|(i, p)| isochore_report::ReportRow {
            row: i + 1,
            line: i + 2,
            cells: vec![name.to_string(), format!("{}", p.t_k)],
            t_k: p.t_k,
            ln_k: p.ln_k,
            sigma_ln_k: p.sigma_ln_k,
            included: p.included,
            exclusion_reason: (!p.included).then(|| name.to_string()),
        })
        .collect();
    isochore_report::ReportInput {
        title: name.to_string(),
        series_name: name.to_string(),
        source_name: name.to_string(),
        source_sha256: "0".repeat(64),
        headers: vec![name.to_string(), "T (K)".to_string()],
        rows,
        conversions: vec![name.to_string()],
        fit,
        energy_unit: isochore_fit::EnergyUnit::KilojoulePerMole,
        temperature_unit: isochore_fit::TemperatureUnit::Celsius,
        quantity: None,
        program_version: "test".to_string(),
        record: isochore_report::Record::default(),
        settings: vec![(name.to_string(), name.to_string())],
        intervals: vec![],
        errors_in_t: None,
        calorimetric: vec![],
        calorimetric_fit: None,
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, .. ProptestConfig::default() })]

    /// Hostile text in every field of a report: every format renders without panicking;
    /// HTML and SVG parse as XML with the text escaped, never as markup.
    #[test]
    fn hostile_text_through_the_report_writer(name in hostile_name()) {
        use isochore_report::{render, FigureKind, ReportFormat};
        let input = hostile_input(&name);
        for format in [
            ReportFormat::Html,
            ReportFormat::Markdown,
            ReportFormat::DataCsv,
            ReportFormat::ResultsCsv,
            ReportFormat::FigureSvg(FigureKind::VantHoff),
        ] {
            let bytes = render(&input, format);
            prop_assert!(bytes.is_ok(), "{:?}: {:?}", format, bytes.err());
            let bytes = bytes.unwrap();
            if format == ReportFormat::Html {
                let html = String::from_utf8(bytes).unwrap();
                prop_assert!(!html.contains("<script>alert"));
            }
        }
    }
}

#[test]
fn hostile_text_in_a_pdf_report() {
    // The PDF is slower to make, so a few fixed hostile names rather than a proptest.
    for name in [
        "<script>alert(1)</script>\u{1b}[31m",
        "\u{9b}\u{85}\u{202e}\t\r",
        "ΔH° ∞ \u{0}",
    ] {
        let input = hostile_input(name);
        let pdf = isochore_report::render(&input, isochore_report::ReportFormat::Pdf)
            .unwrap_or_else(|e| panic!("{name:?}: {e}"));
        assert!(lopdf::Document::load_mem(&pdf).is_ok(), "{name:?}");
    }
}
